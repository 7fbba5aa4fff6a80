//! EDF / EDF+ reader and writer.
//!
//! Header layout and EDF+ rules checked here: Kemp B, Olivan J. European data format 'plus' (EDF+), an EDF
//! alike standard format for the exchange of physiological data. Clin Neurophysiol 2003;114:1755-61; and
//! Kemp B et al. A simple format for exchange of digitized polygraphic recordings. EEG Clin Neurophysiol
//! 1992;82:391-3. (Field offsets as listed in `tests/data/README.md`, format notes.)

use std::path::Path;

use isoline_core::Hertz;
use isoline_core::io::{self, Format, edf};
use isoline_core::recording::{Annotation, Lead, LeadName, Meta, Recording, StandardLead};
use isoline_tests::data;

type TestResult = Result<(), Box<dyn std::error::Error>>;

fn field(bytes: &[u8], at: usize, len: usize) -> String {
    String::from_utf8_lossy(&bytes[at..at + len]).trim().to_string()
}

fn demo(n: usize, fs: f64, annotations: Vec<Annotation>) -> Result<Recording, Box<dyn std::error::Error>> {
    let wave = |k: usize, a: f64, f: f64| (a * (k as f64 * f / fs * std::f64::consts::TAU).sin()) as f32;
    Ok(Recording {
        leads: vec![
            Lead { name: StandardLead::I.into(), samples: (0..n).map(|k| wave(k, 812.3, 1.1)).collect() },
            Lead { name: StandardLead::AVR.into(), samples: (0..n).map(|k| wave(k, 2400.0, 0.7) - 300.0).collect() },
            Lead {
                name: LeadName::Other("MLII".into()),
                samples: (0..n).map(|k| if k == 7 { f32::NAN } else { wave(k, 5.0, 3.0) }).collect(),
            },
        ],
        sample_rate: Hertz::from_hz(fs)?,
        start: Some(time::macros::datetime!(2026-03-14 08:30:15)),
        meta: Meta {
            patient_id: Some("W7-0042".into()),
            patient_name: Some("Made Up Person".into()),
            sex: Some("F".into()),
            birth_date: Some("01-JAN-1960".into()),
            device: Some("Bench rig".into()),
            ..Meta::default()
        },
        annotations,
    })
}

#[test]
fn round_trip_is_exact_to_the_digital_resolution() -> TestResult {
    let dir = tempfile::tempdir()?;
    // 1003 samples: not a whole number of 1-s records, so the last record is padded and the padding trimmed.
    let rec = demo(1003, 250.0, Vec::new())?;
    let path = dir.path().join("rt.edf");
    edf::write(&path, &rec, &edf::EdfWriteOptions::default())?;
    let back = io::open(&path, &io::OpenOptions::default())?;
    assert_eq!(back.format, Format::Edf, "no annotations: plain EDF");
    let r = back.recording;
    assert_eq!(r.len(), 1003);
    assert_eq!(r.sample_rate.hz(), 250.0);
    for (a, b) in rec.leads.iter().zip(&r.leads) {
        assert_eq!(a.name, b.name);
        let (lo, hi) =
            a.samples.iter().filter(|v| v.is_finite()).fold((f32::MAX, f32::MIN), |(l, h), &v| (l.min(v), h.max(v)));
        // One digital step of a 16-bit range spanning the lead's data (the written range is at most 1 % wider).
        let step = f64::from(hi - lo).max(2.0) * 1.01 / 65534.0;
        for (x, y) in a.samples.iter().zip(&b.samples) {
            if x.is_nan() {
                assert!(y.is_nan(), "an invalid sample stays invalid");
            } else {
                assert!(f64::from((x - y).abs()) <= step / 2.0 + 1e-3, "{x} vs {y}, step {step}");
            }
        }
    }
    Ok(())
}

#[test]
fn header_fields_follow_edf_plus() -> TestResult {
    let dir = tempfile::tempdir()?;
    let anns = vec![Annotation::new(10, "N"), Annotation::new(260, "V"), Annotation::new(600, "Made-up event")];
    let rec = demo(750, 250.0, anns)?;
    let path = dir.path().join("plus.edf");
    edf::write(&path, &rec, &edf::EdfWriteOptions::default())?;
    let b = std::fs::read(&path)?;
    // Kemp 1992: version "0"; header bytes = 256 × (ns + 1); 3 leads + 1 annotation signal.
    assert_eq!(field(&b, 0, 8), "0");
    assert_eq!(field(&b, 252, 4), "4");
    assert_eq!(field(&b, 184, 8), "1280");
    // Kemp & Olivan 2003: reserved field starts "EDF+C"; the annotation signal is labelled "EDF Annotations".
    assert_eq!(field(&b, 192, 44), "EDF+C");
    assert_eq!(field(&b, 256 + 3 * 16, 16), "EDF Annotations");
    assert_eq!(field(&b, 256, 16), "ECG I");
    assert_eq!(field(&b, 256 + 16, 16), "ECG aVR");
    // De-identified by default: patient "X F X X" (code sex birthdate name), recording "Startdate X X X X" (date,
    // admin code, technician, equipment),
    // start date and time withheld (01.01.85 00.00.00, the fields' value when unknown).
    assert_eq!(field(&b, 8, 80), "X F X X");
    assert_eq!(field(&b, 88, 80), "Startdate X X X X");
    assert_eq!(field(&b, 168, 8), "01.01.85");
    assert_eq!(field(&b, 176, 8), "00.00.00");
    let n_records: usize = field(&b, 236, 8).parse()?;
    assert_eq!(n_records, 3);
    assert_eq!(field(&b, 244, 8), "1");
    // Physical dimension of the leads, and the whole file length equals header + records.
    assert_eq!(field(&b, 256 + 4 * 96, 8), "uV");
    let spr_at = 256 + 4 * (16 + 80 + 8 * 5 + 80);
    let sprs: Vec<usize> = (0..4).map(|k| field(&b, spr_at + 8 * k, 8).parse()).collect::<Result<_, _>>()?;
    assert_eq!(&sprs[..3], &[250, 250, 250]);
    let record_bytes: usize = sprs.iter().map(|s| 2 * s).sum();
    assert_eq!(b.len(), 1280 + n_records * record_bytes);
    // Every data record's annotation signal starts with a TAL holding the record's start time (+0, +1, +2).
    for r in 0..n_records {
        let at = 1280 + r * record_bytes + 2 * 750;
        let expected = format!("+{r}\x14\x14\x00");
        assert_eq!(&b[at..at + expected.len()], expected.as_bytes(), "record {r}");
    }
    // And the reader gives the annotations back at their samples.
    let back = io::open(&path, &io::OpenOptions::default())?;
    assert_eq!(back.format, Format::EdfPlus);
    let got: Vec<(u64, &str)> = back.recording.annotations.iter().map(|a| (a.sample, a.label.as_str())).collect();
    // Codes stay; free text, which may name a person, keeps its time but not its words unless asked.
    assert_eq!(got, vec![(10, "N"), (260, "V"), (600, "annotation")]);
    assert!(back.recording.meta.patient_name.is_none());
    edf::write(&path, &rec, &edf::EdfWriteOptions { identify: true })?;
    let back = io::open(&path, &io::OpenOptions::default())?;
    let got: Vec<(u64, &str)> = back.recording.annotations.iter().map(|a| (a.sample, a.label.as_str())).collect();
    assert_eq!(got, vec![(10, "N"), (260, "V"), (600, "Made-up event")]);
    Ok(())
}

#[test]
fn identify_keeps_patient_fields() -> TestResult {
    let dir = tempfile::tempdir()?;
    let rec = demo(500, 500.0, Vec::new())?;
    let path = dir.path().join("id.edf");
    edf::write(&path, &rec, &edf::EdfWriteOptions { identify: true })?;
    let b = std::fs::read(&path)?;
    assert_eq!(field(&b, 8, 80), "W7-0042 F 01-JAN-1960 Made_Up_Person");
    assert_eq!(field(&b, 88, 80), "Startdate 14-MAR-2026 X X Bench_rig");
    let back = io::open(&path, &io::OpenOptions::default())?.recording;
    // Plain EDF (no annotations), its patient and recording fields written the EDF+ way: read back the same way.
    assert_eq!(back.start, rec.start);
    let m = &back.meta;
    assert_eq!(m.patient_id.as_deref(), Some("W7-0042"));
    assert_eq!(m.patient_name.as_deref(), Some("Made Up Person"));
    assert_eq!((m.sex.as_deref(), m.birth_date.as_deref()), (Some("F"), Some("01-JAN-1960")));
    assert_eq!(m.device.as_deref(), Some("Bench rig"));
    Ok(())
}

#[test]
fn a_de_identified_plain_edf_keeps_the_sex_and_no_made_up_start() -> TestResult {
    // The QTc limits depend on the sex: a converted recording without annotations (plain EDF, de-identified)
    // must give it back; its withheld start date (01.01.85, "Startdate X") is no start at all, not 1 January 1985.
    let dir = tempfile::tempdir()?;
    let rec = demo(500, 500.0, Vec::new())?;
    let path = dir.path().join("plain.edf");
    edf::write(&path, &rec, &edf::EdfWriteOptions::default())?;
    let back = io::open(&path, &io::OpenOptions::default())?;
    assert_eq!(back.format, Format::Edf);
    assert_eq!(back.recording.meta.sex.as_deref(), Some("F"));
    assert_eq!((back.recording.start, back.recording.meta.patient_id.clone()), (None, None));
    Ok(())
}

/// Builds an EDF+C file by hand: `signals` = (label, dimension, phys min, phys max, dig min, dig max, spr),
/// then the data records as raw bytes.
fn hand_edf(
    reserved: &str,
    n_records: &str,
    duration: &str,
    signals: &[(&str, &str, &str, &str, &str, &str, &str)],
    records: &[u8],
) -> Vec<u8> {
    let pad = |s: &str, w: usize| format!("{s:<w$}").into_bytes();
    let ns = signals.len();
    let mut h = Vec::new();
    h.extend(pad("0", 8));
    h.extend(pad("ABC-123 M 02-MAY-1951 Made_Up", 80));
    h.extend(pad("Startdate 02-MAR-2002 X X Rig_9", 80));
    h.extend(pad("02.03.02", 8));
    h.extend(pad("14.05.09", 8));
    h.extend(pad(&(256 * (ns + 1)).to_string(), 8));
    h.extend(pad(reserved, 44));
    h.extend(pad(n_records, 8));
    h.extend(pad(duration, 8));
    h.extend(pad(&ns.to_string(), 4));
    for s in signals {
        h.extend(pad(s.0, 16));
    }
    for _ in signals {
        h.extend(pad("", 80));
    }
    for s in signals {
        h.extend(pad(s.1, 8));
    }
    for s in signals {
        h.extend(pad(s.2, 8));
    }
    for s in signals {
        h.extend(pad(s.3, 8));
    }
    for s in signals {
        h.extend(pad(s.4, 8));
    }
    for s in signals {
        h.extend(pad(s.5, 8));
    }
    for _ in signals {
        h.extend(pad("", 80));
    }
    for s in signals {
        h.extend(pad(s.6, 8));
    }
    for _ in signals {
        h.extend(pad("", 32));
    }
    h.extend(records);
    h
}

fn i16s(v: &[i16]) -> Vec<u8> {
    v.iter().flat_map(|x| x.to_le_bytes()).collect()
}

fn tal_bytes(text: &[u8], len: usize) -> Vec<u8> {
    let mut v = text.to_vec();
    v.resize(len, 0);
    v
}

#[test]
fn hand_made_edf_plus_with_annotations() -> TestResult {
    let dir = tempfile::tempdir()?;
    // Two 5-ms records: ECG II at 800 Hz (4 samples per record, mV), ECG V1 at 800 Hz (uV), a respiration
    // signal at 200 Hz, and an annotation signal of 40 bytes.
    let signals = [
        ("ECG II", "mV", "-3.2768", "3.2767", "-32768", "32767", "4"),
        ("ECG V1", "uV", "-1000", "1000", "-1000", "1000", "4"),
        ("Resp", "Ohm", "0", "100", "0", "100", "1"),
        ("EDF Annotations", "", "-1", "1", "-32768", "32767", "20"),
    ];
    let mut data = Vec::new();
    data.extend(i16s(&[0, 1000, -1000, 32767]));
    data.extend(i16s(&[5, -5, 0, 1000]));
    data.extend(i16s(&[50]));
    data.extend(tal_bytes(b"+0\x14\x14\x00+0.0025\x150.001\x14Pace\x14\x00", 40));
    data.extend(i16s(&[1, 2, 3, 4]));
    data.extend(i16s(&[-1000, 0, 0, 0]));
    data.extend(i16s(&[60]));
    data.extend(tal_bytes(b"+0.005\x14\x14\x00+0.00875\x14Tilt up\x14Cough\x14\x00", 40));
    let bytes = hand_edf("EDF+C", "2", "0.005", &signals, &data);
    let path = dir.path().join("hand.edf");
    std::fs::write(&path, &bytes)?;
    let o = io::open(&path, &io::OpenOptions::default())?;
    let r = &o.recording;
    assert_eq!(o.format, Format::EdfPlus);
    assert_eq!(r.sample_rate.hz(), 800.0);
    assert_eq!(r.leads.len(), 2, "respiration is not a lead");
    assert!(o.warnings.iter().any(|w| w.contains("Resp")), "skipped signal named: {:?}", o.warnings);
    assert_eq!(r.leads[0].name, LeadName::Standard(StandardLead::II));
    // mV → µV: digital 1000 with range ±3.2767 mV over ±32767 → 0.1 mV = 100 µV.
    let ii = &r.leads[0].samples;
    assert_eq!(ii.len(), 8);
    assert!((ii[1] - 100.0).abs() < 0.01 && (ii[3] - 3276.7).abs() < 0.01 && (ii[4] - 0.1).abs() < 0.01);
    assert!((r.leads[1].samples[3] - 1000.0).abs() < 1e-3);
    let anns: Vec<(u64, &str, Option<f64>)> =
        r.annotations.iter().map(|a| (a.sample, a.label.as_str(), a.duration_s)).collect();
    // Onsets × 800 Hz: 2.5 ms → 2, 8.75 ms → 7.
    assert_eq!(anns, vec![(2, "Pace", Some(0.001)), (7, "Tilt up", None), (7, "Cough", None)]);
    assert!(o.warnings.iter().all(|w| !w.contains("start at a time")), "{:?}", o.warnings);

    // The same file starting 1.25 ms after the header's start time (Kemp & Olivan 2003: the first record's
    // time-keeping TAL gives its start): onsets count from the header time, samples from the first record.
    let mut shifted = bytes.clone();
    let base = bytes.len() - data.len();
    for (rec_start, tal_at) in [(b"+0.00125\x14\x14\x00".to_vec(), 0usize), (b"+0.00625\x14\x14\x00".to_vec(), 1)] {
        let at = base + tal_at * (data.len() / 2) + 2 * (4 + 4 + 1);
        let mut t = rec_start.clone();
        let rest: &[u8] =
            if tal_at == 0 { b"+0.00375\x150.001\x14Pace\x14\x00" } else { b"+0.01\x14Tilt up\x14Cough\x14\x00" };
        t.extend(rest);
        t.resize(40, 0);
        shifted[at..at + 40].copy_from_slice(&t);
    }
    let path = dir.path().join("shifted.edf");
    std::fs::write(&path, &shifted)?;
    let o = io::open(&path, &io::OpenOptions::default())?;
    let anns: Vec<(u64, &str)> = o.recording.annotations.iter().map(|a| (a.sample, a.label.as_str())).collect();
    assert_eq!(anns, vec![(2, "Pace"), (7, "Tilt up"), (7, "Cough")]);
    assert!(o.warnings.iter().all(|w| !w.contains("start at a time")), "{:?}", o.warnings);
    assert_eq!(r.meta.patient_id.as_deref(), Some("ABC-123"));
    assert_eq!(r.meta.sex.as_deref(), Some("M"));
    assert_eq!(r.meta.patient_name.as_deref(), Some("Made Up"));
    assert_eq!(r.start.map(|s| s.year()), Some(2002));
    Ok(())
}

fn open_err(dir: &Path, name: &str, bytes: &[u8]) -> String {
    let p = dir.join(name);
    if std::fs::write(&p, bytes).is_err() {
        return String::new();
    }
    io::open(&p, &io::OpenOptions::default()).err().map(|e| e.to_string()).unwrap_or_default()
}

#[test]
fn a_lead_label_given_twice_names_two_leads() -> TestResult {
    // EDF headers may repeat a label (CSV headers may not): each lead still gets a name of its own, the standard
    // lead of that name stays the first, and the file says what was renamed.
    let dir = tempfile::tempdir()?;
    let signals =
        [("ECG I", "uV", "-100", "100", "-100", "100", "2"), ("ECG I", "uV", "-100", "100", "-100", "100", "2")];
    let mut data = i16s(&[1, 2]);
    data.extend(i16s(&[3, 4]));
    let path = dir.path().join("twice.edf");
    std::fs::write(&path, hand_edf("", "1", "0.01", &signals, &data))?;
    let o = io::open(&path, &io::OpenOptions::default())?;
    let names: Vec<String> = o.recording.leads.iter().map(|l| l.name.to_string()).collect();
    assert_eq!(names, ["I", "I (2)"]);
    assert_eq!(o.recording.standard_lead(StandardLead::I).map(|l| l.samples[0]), Some(1.0));
    let w = o.warnings.join("\n");
    assert!(w.contains("twice.edf: another lead labelled I is read as \"I (2)\""), "{w}");
    Ok(())
}

#[test]
fn bad_headers_name_field_and_offset() -> TestResult {
    let dir = tempfile::tempdir()?;
    let ecg = [("ECG I", "uV", "-100", "100", "-100", "100", "2")];
    let good = hand_edf("", "1", "0.01", &ecg, &i16s(&[1, 2]));
    assert!(
        io::open(
            &{
                let p = dir.path().join("good.edf");
                std::fs::write(&p, &good)?;
                p
            },
            &io::OpenOptions::default()
        )
        .is_ok()
    );
    // EDF+D is refused as unsupported.
    let e = open_err(dir.path(), "d.edf", &hand_edf("EDF+D", "1", "1", &ecg, &i16s(&[1, 2])));
    assert!(e.contains("EDF+D") && e.contains("not supported"), "{e}");
    // A header claiming 10^12 data records is rejected before allocation, naming the field and its offset.
    // 99 999 999 records × 10 000 samples per record = 10^12 samples promised, 20 000 bytes present.
    let big = [("ECG I", "uV", "-100", "100", "-100", "100", "10000")];
    let e = open_err(dir.path(), "big.edf", &hand_edf("", "99999999", "1", &big, &vec![0u8; 20_000]));
    assert!(e.contains("byte 236") && e.contains("number of data records"), "{e}");
    let e = open_err(dir.path(), "nsig.edf", &{
        let mut b = good.clone();
        b[252..256].copy_from_slice(b"x   ");
        b
    });
    assert!(e.contains("byte 252"), "{e}");
    let e = open_err(
        dir.path(),
        "dig.edf",
        &hand_edf("", "1", "0.01", &[("ECG I", "uV", "-100", "100", "100", "-100", "2")], &i16s(&[1, 2])),
    );
    // Digital maximum block: 256 + 16 + 80 + 4 × 8 = byte 384 for one signal.
    assert!(e.contains("digital maximum of signal 1") && e.contains("byte 384"), "{e}");
    let e = open_err(dir.path(), "short.edf", &good[..good.len() - 1]);
    assert!(e.contains("number of data records"), "{e}");
    let e = open_err(dir.path(), "dur.edf", &hand_edf("", "1", "0", &ecg, &i16s(&[1, 2])));
    assert!(e.contains("byte 244"), "{e}");
    // A record duration in the wrong unit gives a rate no ECG is recorded at (2 samples per ns: 2 GHz; per
    // second: 2 Hz), refused before any analysis sizes its windows by it.
    for (name, duration, rate) in [("ghz.edf", "1e-9", "2.000e9 Hz"), ("slow.edf", "1", "2 Hz")] {
        let e = open_err(dir.path(), name, &hand_edf("", "1", duration, &ecg, &i16s(&[1, 2])));
        assert!(e.contains("byte 244") && e.contains(rate) && e.contains("outside the 100 to 20000 Hz"), "{e}");
    }
    Ok(())
}

#[test]
fn converts_a_real_record_to_edf_and_back() -> TestResult {
    // Source of the reference: the WFDB reader (checked against wfdb 4.3.1 in io_wfdb.rs); here EDF must keep
    // every sample within one digital step and every annotation at its sample.
    let dir = tempfile::tempdir()?;
    let o = io::open(&data("mitdb-100/100"), &io::OpenOptions::default())?;
    let path = dir.path().join("100.edf");
    edf::write(&path, &o.recording, &edf::EdfWriteOptions::default())?;
    let back = io::open(&path, &io::OpenOptions::default())?.recording;
    assert_eq!(back.len(), o.recording.len());
    assert_eq!(back.sample_rate, o.recording.sample_rate);
    for (a, b) in o.recording.leads.iter().zip(&back.leads) {
        assert_eq!(a.name, b.name);
        let worst = a.samples.iter().zip(&b.samples).map(|(x, y)| (x - y).abs()).fold(0.0f32, f32::max);
        assert!(worst < 0.2, "{} µV", worst);
    }
    let a: Vec<(u64, &str)> = o.recording.annotations.iter().map(|a| (a.sample, a.label.as_str())).collect();
    let b: Vec<(u64, &str)> = back.annotations.iter().map(|a| (a.sample, a.label.as_str())).collect();
    assert_eq!(a, b);
    Ok(())
}

#[test]
fn only_ecg_signals_at_the_highest_rate_are_leads() -> TestResult {
    let dir = tempfile::tempdir()?;
    // ECG I at 400 Hz, ECG II at 200 Hz (lower rate), an EEG at 800 Hz (not an ECG), in volts or microvolts.
    let signals = [
        ("ECG I", "V", "-1", "1", "-1000", "1000", "4"),
        ("ECG II", "uV", "-1000", "1000", "-1000", "1000", "2"),
        ("EEG Fpz-Cz", "uV", "-1000", "1000", "-1000", "1000", "8"),
    ];
    let mut data = i16s(&[1, 2, 3, 4]);
    data.extend(i16s(&[5, 6]));
    data.extend(i16s(&[0; 8]));
    let path = dir.path().join("rates.edf");
    std::fs::write(&path, hand_edf("", "1", "0.01", &signals, &data))?;
    let o = io::open(&path, &io::OpenOptions::default())?;
    assert_eq!(o.recording.leads.len(), 1);
    assert_eq!(o.recording.sample_rate.hz(), 400.0);
    // V → µV: digital 1 of ±1000 over ±1 V is 1 mV = 1000 µV.
    assert!((o.recording.leads[0].samples[0] - 1000.0).abs() < 1e-3);
    let w = o.warnings.join("\n");
    assert!(w.contains("ECG II") && w.contains("200 Hz"), "{w}");
    assert!(w.contains("EEG Fpz-Cz") && w.contains("not an ECG"), "{w}");
    Ok(())
}

#[test]
fn reads_an_edf_plus_file_from_an_independent_writer() -> TestResult {
    // Source: tests/data/edf/pyedflib-sample.* written and read back by pyedflib 0.1.42 (EDFlib); see the
    // README beside them.
    let o = io::open(&data("edf/pyedflib-sample.edf"), &io::OpenOptions::default())?;
    let r = &o.recording;
    assert_eq!(o.format, Format::EdfPlus);
    assert_eq!(r.sample_rate.hz(), 256.0);
    assert_eq!(r.len(), 2560);
    let names: Vec<String> = r.leads.iter().map(|l| l.name.to_string()).collect();
    assert_eq!(names, ["I", "II"]);
    assert!(o.warnings.iter().any(|w| w.contains("Resp")), "{:?}", o.warnings);
    let values = std::fs::read_to_string(data("edf/pyedflib-sample.values.csv"))?;
    let mut checked = 0;
    for line in values.lines().skip(1) {
        let f: Vec<&str> = line.split(',').collect();
        let lead = r.leads.iter().find(|l| format!("ECG {}", l.name) == f[0]).ok_or("lead")?;
        let (k, uv): (usize, f64) = (f[1].parse()?, f[2].parse()?);
        assert!((f64::from(lead.samples[k]) - uv).abs() < 0.01, "{} sample {k}: {} vs {uv}", f[0], lead.samples[k]);
        checked += 1;
    }
    assert_eq!(checked, 16);
    let anns: Vec<(u64, &str, Option<f64>)> =
        r.annotations.iter().map(|a| (a.sample, a.label.as_str(), a.duration_s)).collect();
    // Onsets 0.5, 2.25, 7.75 s × 256 Hz (pyedflib-sample.annotations.csv).
    assert_eq!(anns, vec![(128, "Made-up start", None), (576, "Pace", Some(0.5)), (1984, "Made-up end", None)]);
    assert_eq!(r.meta.patient_id.as_deref(), Some("BENCH-07"));
    assert_eq!(r.meta.sex.as_deref(), Some("M"));
    assert_eq!(r.meta.patient_name.as_deref(), Some("Bench Test"));
    assert_eq!(r.meta.device.as_deref(), Some("Rig 3"));
    assert_eq!(r.start.map(|s| (s.year(), u8::from(s.month()), s.day())), Some((2026, 12, 2)));
    Ok(())
}
