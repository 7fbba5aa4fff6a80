//! Robustness of every reader: random bytes, truncation at every length and single-field corruption give `Err`
//! (or a valid recording), never a panic; lying headers are refused before allocating.
//! Common practice (fuzzing readers of untrusted files), no source.

use std::path::{Path, PathBuf};

use isoline_core::Hertz;
use isoline_core::io::{self, csv, edf, wfdb, wfdb_annotations};
use isoline_core::recording::{Annotation, Lead, Meta, Recording, StandardLead};
use isoline_tests::data;
use proptest::prelude::*;

type TestResult = Result<(), Box<dyn std::error::Error>>;

fn small_recording() -> Result<Recording, Box<dyn std::error::Error>> {
    let n = 600;
    Ok(Recording {
        leads: [StandardLead::I, StandardLead::II, StandardLead::V2]
            .iter()
            .enumerate()
            .map(|(j, &l)| Lead {
                name: l.into(),
                samples: (0..n).map(|k| ((k * (j + 3)) % 97) as f32 * 10.0 - 400.0).collect(),
            })
            .collect(),
        sample_rate: Hertz::from_hz(250.0)?,
        start: None,
        meta: Meta::default(),
        annotations: vec![Annotation::new(12, "N"), Annotation::new(300, "V"), Annotation::new(590, "N")],
    })
}

fn edf_bytes() -> Result<Vec<u8>, Box<dyn std::error::Error>> {
    static BYTES: std::sync::OnceLock<Vec<u8>> = std::sync::OnceLock::new();
    if let Some(b) = BYTES.get() {
        return Ok(b.clone());
    }
    let dir = tempfile::tempdir()?;
    let p = dir.path().join("s.edf");
    edf::write(&p, &small_recording()?, &edf::EdfWriteOptions::default())?;
    Ok(BYTES.get_or_init(|| std::fs::read(p).unwrap_or_default()).clone())
}

fn csv_bytes() -> Result<Vec<u8>, Box<dyn std::error::Error>> {
    let mut out = Vec::new();
    csv::write_to(&mut out, &small_recording()?)?;
    Ok(out)
}

/// A two-signal format-212 record of 100 frames, written by hand (WFDB signal(5) packing).
fn wfdb_files() -> (String, Vec<u8>) {
    let header = "fz 2 250 100\nfz.dat 212 200 12 0 0 0 0 I\nfz.dat 212 200 12 0 0 0 0 II\n".to_string();
    let mut dat = Vec::new();
    for k in 0..100i32 {
        let (a, b) = ((k * 37 % 4000 - 2000) & 0xFFF, (-(k * 11) % 2000) & 0xFFF); // 12-bit two's complement
        dat.extend([(a & 0xFF) as u8, (((a >> 8) & 0x0F) | ((b >> 4) & 0xF0)) as u8, (b & 0xFF) as u8]);
    }
    (header, dat)
}

/// Writes `bytes` to `dir/name` and opens it; panics propagate (and fail the test).
fn open_bytes(dir: &Path, name: &str, bytes: &[u8]) -> Result<io::Opened, io::ReadError> {
    let p: PathBuf = dir.join(name);
    std::fs::write(&p, bytes).map_err(|e| io::ReadError::io(&p, e))?;
    io::open(&p, &io::OpenOptions { csv_rate_hz: None })
}

#[test]
fn edf_truncated_at_every_length_is_an_error() -> TestResult {
    let dir = tempfile::tempdir()?;
    let full = edf_bytes()?;
    assert!(open_bytes(dir.path(), "t.edf", &full).is_ok());
    // Cut the same file shorter and shorter (one set_len call per length, no rewriting).
    let path = dir.path().join("t.edf");
    let file = std::fs::OpenOptions::new().write(true).open(&path)?;
    for len in (0..full.len()).rev() {
        file.set_len(len as u64)?;
        assert!(io::open(&path, &io::OpenOptions::default()).is_err(), "EDF cut at {len} of {} bytes read", full.len());
    }
    Ok(())
}

#[test]
fn csv_truncated_at_every_length_never_panics() -> TestResult {
    let full = csv_bytes()?;
    for len in 0..full.len() {
        // A cut between rows is a shorter valid file; a cut inside the header or a row is an error.
        let r = csv::read_from(Path::new("t.csv"), &full[..len], None);
        if let Ok(o) = r {
            assert_eq!(o.recording.leads.len(), 3, "cut at {len}");
        }
    }
    Ok(())
}

#[test]
fn wfdb_truncated_at_every_length() -> TestResult {
    let dir = tempfile::tempdir()?;
    let (hea, dat) = wfdb_files();
    std::fs::write(dir.path().join("fz.hea"), &hea)?;
    std::fs::write(dir.path().join("fz.dat"), &dat)?;
    assert_eq!(wfdb::read_record(&dir.path().join("fz"))?.recording.len(), 100);
    for len in 0..dat.len() {
        std::fs::write(dir.path().join("fz.dat"), &dat[..len])?;
        // The header promises 100 samples (3 bytes per frame): fewer than 99 % is an error; 99 is read with a
        // warning.
        let r = wfdb::read_record(&dir.path().join("fz"));
        match r {
            Ok(o) => assert!(len >= 297 && o.recording.len() == 99 && !o.warnings.is_empty(), "cut at {len}"),
            Err(e) => assert!(len < 297 && e.to_string().contains("fz.dat"), "cut at {len}: {e}"),
        }
    }
    std::fs::write(dir.path().join("fz.dat"), &dat)?;
    for len in 0..hea.len() {
        std::fs::write(dir.path().join("fz.hea"), &hea.as_bytes()[..len])?;
        let _ = wfdb::read_record(&dir.path().join("fz.hea"));
    }
    let atr = std::fs::read(data("qtdb/sel100.q1c"))?;
    for len in 0..atr.len() {
        if let Ok(a) = wfdb_annotations::parse(Path::new("t.q1c"), &atr[..len]) {
            assert!(a.len() <= 300);
        }
    }
    Ok(())
}

#[test]
fn wfdb_header_claiming_a_trillion_samples_is_refused() -> TestResult {
    let dir = tempfile::tempdir()?;
    std::fs::write(dir.path().join("t.hea"), "t 1 250 1000000000000\nt.dat 16 200 16 0 0 0 0 II\n")?;
    std::fs::write(dir.path().join("t.dat"), [0u8; 64])?;
    assert!(wfdb::read_record(&dir.path().join("t")).is_err());
    // Without a sample count the length comes from the file itself: 32 samples.
    std::fs::write(dir.path().join("t.hea"), "t 1 250\nt.dat 16 200 16 0 0 0 0 II\n")?;
    assert_eq!(wfdb::read_record(&dir.path().join("t"))?.recording.len(), 32);
    Ok(())
}

proptest! {
    #![proptest_config(ProptestConfig { cases: 300, ..ProptestConfig::default() })]

    #[test]
    fn random_bytes_never_panic(bytes in proptest::collection::vec(any::<u8>(), 0..2048)) {
        let dir = tempfile::tempdir().map_err(|e| TestCaseError::fail(e.to_string()))?;
        let _ = open_bytes(dir.path(), "r.edf", &bytes);
        let _ = open_bytes(dir.path(), "r.csv", &bytes);
        let _ = wfdb::parse_header(Path::new("r.hea"), &String::from_utf8_lossy(&bytes));
        let _ = wfdb_annotations::parse(Path::new("r.atr"), &bytes);
        let _ = csv::read_from(Path::new("r.csv"), &bytes[..], Some(250.0));
    }

    #[test]
    fn corrupted_edf_never_panics(at in 0usize..4000, byte in any::<u8>(), span in 1usize..9) {
        let dir = tempfile::tempdir().map_err(|e| TestCaseError::fail(e.to_string()))?;
        let mut b = edf_bytes().map_err(|e| TestCaseError::fail(e.to_string()))?;
        let at = at % b.len();
        let end = (at + span).min(b.len());
        b[at..end].iter_mut().for_each(|x| *x = byte);
        // A corrupted size field can still describe a valid file (e.g. fewer samples per record and trailing
        // bytes): then the samples must come from the file's bytes, never more.
        if let Ok(o) = open_bytes(dir.path(), "c.edf", &b) {
            prop_assert!(o.recording.len() * o.recording.leads.len() <= b.len() / 2);
        }
    }

    #[test]
    fn corrupted_wfdb_never_panics(line_pick in 0usize..3, field_pick in 0usize..9, value in "[-+0-9a-z()/.x:]{0,12}", dat_at in 0usize..300, dat_byte in any::<u8>()) {
        let dir = tempfile::tempdir().map_err(|e| TestCaseError::fail(e.to_string()))?;
        let (hea, mut dat) = wfdb_files();
        let mut lines: Vec<Vec<String>> = hea.lines().map(|l| l.split(' ').map(str::to_string).collect()).collect();
        let line = &mut lines[line_pick];
        let f = field_pick % line.len();
        line[f] = value;
        let text: String = lines.iter().map(|l| l.join(" ") + "\n").collect();
        dat[dat_at % 300] = dat_byte;
        std::fs::write(dir.path().join("fz.hea"), text).map_err(|e| TestCaseError::fail(e.to_string()))?;
        std::fs::write(dir.path().join("fz.dat"), &dat).map_err(|e| TestCaseError::fail(e.to_string()))?;
        if let Ok(o) = wfdb::read_record(&dir.path().join("fz.hea")) {
            // At most one sample per byte of the 300-byte signal file (format 80 is the densest).
            prop_assert!(o.recording.len() * o.recording.leads.len() <= 300);
        }
    }

    #[test]
    fn corrupted_annotations_never_panic(at in 0usize..5000, byte in any::<u8>()) {
        let mut b = std::fs::read(data("qtdb/sel100.q1c")).map_err(|e| TestCaseError::fail(e.to_string()))?;
        let at = at % b.len();
        b[at] = byte;
        let _ = wfdb_annotations::parse(Path::new("c.q1c"), &b);
    }

    #[test]
    fn tal_bytes_never_panic(bytes in proptest::collection::vec(prop_oneof![Just(0u8), Just(0x14u8), Just(0x15u8), Just(b'+'), Just(b'.'), b'0'..=b'9', any::<u8>()], 0..120)) {
        // Random annotation-signal bytes, biased to the TAL control bytes and digits (Kemp & Olivan 2003 §2.2).
        let _ = edf::tal::parse_record(&bytes, 0);
        let mut valid = b"+0\x14\x14\x00+1.5\x150.2\x14Made-up event\x14\x00".to_vec();
        let cut = bytes.len().min(valid.len());
        valid[..cut].copy_from_slice(&bytes[..cut]);
        let _ = edf::tal::parse_record(&valid, 0);
    }

    #[test]
    fn corrupted_csv_never_panics(at in 0usize..20000, byte in any::<u8>()) {
        let mut b = csv_bytes().map_err(|e| TestCaseError::fail(e.to_string()))?;
        let at = at % b.len();
        b[at] = byte;
        if let Ok(o) = csv::read_from(Path::new("c.csv"), &b[..], None) {
            prop_assert!(o.recording.len() <= 600);
        }
    }
}
