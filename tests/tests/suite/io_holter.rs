//! 24-hour 3-lead 250 Hz files (the size of an ambulatory recording): written with the EDF writer and as a
//! hand-packed WFDB format-212 record, read back, values checked, read speed printed. Heavy: run with
//! `cargo test --release -p isoline-tests -- io_holter --ignored --nocapture`. Set `ISOLINE_HOLTER_DIR`
//! to keep the files (e.g. to measure `isoline info` with `/usr/bin/time -v`).
//! The memory target (≤ 1.5 × samples × 4 bytes) comes from design.md; common practice, no source.

use std::io::Write;
use std::path::PathBuf;
use std::time::Instant;

use isoline_core::Hertz;
use isoline_core::io::{self, edf};
use isoline_core::recording::{Lead, Meta, Recording, StandardLead};

type TestResult = Result<(), Box<dyn std::error::Error>>;

const FS: usize = 250;
const N: usize = 24 * 3600 * FS;

/// A cheap test signal in digital units of 5 µV (gain 200/mV): a square-ish beat every 0.8 s plus a slow wave.
fn digital(lead: usize, k: usize) -> i32 {
    let beat = if k % 200 < 20 { 300 } else { 0 };
    let slow = ((k / 25 + lead * 7) % 100) as i32 - 50;
    (beat + slow) * (lead as i32 + 1) / 2
}

fn out_dir() -> Result<(PathBuf, Option<tempfile::TempDir>), Box<dyn std::error::Error>> {
    match std::env::var_os("ISOLINE_HOLTER_DIR") {
        Some(d) => {
            std::fs::create_dir_all(&d)?;
            Ok((PathBuf::from(d), None))
        }
        None => {
            let t = tempfile::tempdir()?;
            Ok((t.path().to_path_buf(), Some(t)))
        }
    }
}

/// Writes a 3-signal format-212 record by hand (pairs packed as WFDB signal(5) describes).
fn write_wfdb_212(dir: &std::path::Path) -> Result<PathBuf, Box<dyn std::error::Error>> {
    let hea = dir.join("holter212.hea");
    let mut h = format!("holter212 3 {FS} {N}\n");
    for (lead, name) in ["I", "II", "V2"].iter().enumerate() {
        // WFDB checksum: the 16-bit sum of the signal's digital samples.
        let sum = (0..N).fold(0u16, |s, k| s.wrapping_add(digital(lead, k) as u16)) as i16;
        let first = digital(lead, 0);
        h.push_str(&format!("holter212.dat 212 200 12 0 {first} {sum} 0 {name}\n"));
    }
    std::fs::write(&hea, h)?;
    let mut w = std::io::BufWriter::new(std::fs::File::create(dir.join("holter212.dat"))?);
    let mut pending: Option<i32> = None;
    for k in 0..N {
        for lead in 0..3 {
            let v = digital(lead, k) & 0xFFF;
            match pending.take() {
                None => pending = Some(v),
                Some(a) => {
                    w.write_all(&[(a & 0xFF) as u8, (((a >> 8) & 0x0F) | ((v >> 4) & 0xF0)) as u8, (v & 0xFF) as u8])?
                }
            }
        }
    }
    if let Some(a) = pending {
        w.write_all(&[(a & 0xFF) as u8, ((a >> 8) & 0x0F) as u8])?;
    }
    w.flush()?;
    Ok(hea)
}

fn timed_read(path: &std::path::Path, bytes: u64) -> Result<io::Opened, Box<dyn std::error::Error>> {
    let t = Instant::now();
    let o = io::open(path, &io::OpenOptions::default())?;
    let s = t.elapsed().as_secs_f64();
    println!("{}: {:.1} MB in {s:.3} s = {:.0} MB/s", path.display(), bytes as f64 / 1e6, bytes as f64 / 1e6 / s);
    Ok(o)
}

#[test]
#[ignore = "writes and reads two 24-hour files (~300 MB); run with --ignored"]
fn holter_24h_files_read_back_exactly() -> TestResult {
    let (dir, _keep) = out_dir()?;

    let hea = write_wfdb_212(&dir)?;
    let dat_len = std::fs::metadata(dir.join("holter212.dat"))?.len();
    let o = timed_read(&hea, dat_len)?;
    assert_eq!(o.recording.len(), N);
    assert!(o.warnings.is_empty(), "{:?}", o.warnings);
    for (lead, l) in o.recording.leads.iter().enumerate() {
        for k in (0..N).step_by(9973) {
            // Gain 200 per mV: one digital unit = 5 µV.
            assert_eq!(l.samples[k], digital(lead, k) as f32 * 5.0, "lead {lead} sample {k}");
        }
    }
    drop(o);

    let rec = Recording {
        leads: [StandardLead::I, StandardLead::II, StandardLead::V2]
            .iter()
            .enumerate()
            .map(|(j, &name)| Lead { name: name.into(), samples: (0..N).map(|k| digital(j, k) as f32 * 5.0).collect() })
            .collect(),
        sample_rate: Hertz::from_hz(FS as f64)?,
        start: None,
        meta: Meta::default(),
        annotations: Vec::new(),
    };
    let path = dir.join("holter.edf");
    let t = Instant::now();
    edf::write(&path, &rec, &edf::EdfWriteOptions::default())?;
    println!("EDF write: {:.3} s", t.elapsed().as_secs_f64());
    let len = std::fs::metadata(&path)?.len();
    let o = timed_read(&path, len)?;
    assert_eq!(o.recording.len(), N);
    for (a, b) in rec.leads.iter().zip(&o.recording.leads) {
        let worst = a.samples.iter().zip(&b.samples).map(|(x, y)| (x - y).abs()).fold(0.0f32, f32::max);
        // Range ≤ 2 × 350 × 5 µV = 3500 µV over 65534 steps: half a step is under 0.03 µV.
        assert!(worst < 0.05, "{worst} µV");
    }
    Ok(())
}
