//! WFDB records (PhysioNet): the `.hea` header and its signal files in formats 16, 61, 80 and 212.
//!
//! Header grammar (WFDB `header(5)`): comment lines start with `#`; blank lines are skipped; CRLF accepted.
//! Record line: `name[/nseg] nsig [fs[/counterfreq][(basecounter)] [nsamp [basetime [basedate]]]]`.
//! Signal line: `file format[xsamp][:skew][+offset] gain[(baseline)][/units] adcres adczero initval checksum
//! blocksize description`. Physical value = (digital − baseline) / gain; baseline defaults to adczero; a gain
//! of 0 means 200 per unit; units default to mV. Signals sharing a file are interleaved; a record may spread
//! its signals over several files (e.g. PTB's `.dat` and `.xyz`).

use std::path::{Path, PathBuf};

use super::{Format, MAX_TOTAL_SAMPLES, Opened, ReadError, file_len, read_bytes};
use crate::recording::{Lead, LeadName, Meta, Recording};
use crate::units::Hertz;

mod header;
pub mod signal;

pub use header::{Header, RecordLine, SignalLine, header_path, parse_header};

/// Largest header read (1 MiB).
const MAX_HEADER_BYTES: u64 = 1 << 20;

/// One signal file of a record and the signals it holds.
struct FilePlan {
    path: PathBuf,
    format: u32,
    offset: u64,
    /// Header indices of the signals interleaved in this file, in file order.
    signals: Vec<usize>,
    /// Whole frames the file holds after the offset.
    frames_avail: u64,
}

/// Reads a WFDB record given its `.hea` path or its path without extension. Loads `NAME.atr` beside it as the
/// recording's annotations when present. Signals whose unit is not a voltage are skipped with a warning.
///
/// # Errors
/// [`ReadError`] naming the header line, field or signal file at fault. A signal file holding fewer samples than
/// the header promises is accepted with a warning when at least 99 % are there, and rejected otherwise.
pub fn read_record(path: &Path) -> Result<Opened, ReadError> {
    let hea = header_path(path).ok_or_else(|| ReadError::unsupported(path, "no WFDB header (.hea) found"))?;
    let hea_len = file_len(&hea)?;
    if hea_len > MAX_HEADER_BYTES {
        return Err(ReadError::invalid(&hea, format!("header is {hea_len} bytes, more than 1 MiB")));
    }
    let bytes = read_bytes(&hea)?;
    let text = String::from_utf8_lossy(&bytes);
    let header = parse_header(&hea, &text)?;
    let dir = hea.parent().map(Path::to_path_buf).unwrap_or_default();
    if header.signals.is_empty() {
        return Err(ReadError::invalid(&hea, "record line: the record has no signals"));
    }
    let sample_rate =
        Hertz::for_ecg(header.record.fs_hz).map_err(|e| ReadError::invalid(&hea, format!("record line: {e}")))?;
    let mut warnings = Vec::new();

    // Which signals are voltages, and their scale to µV.
    let mut scales = Vec::with_capacity(header.signals.len());
    for (i, s) in header.signals.iter().enumerate() {
        let uv = uv_per_unit(&s.units);
        if uv.is_none() {
            warnings.push(format!(
                "{}: signal {} ('{}') skipped: unit '{}' is not a voltage",
                hea.display(),
                i + 1,
                crate::io::printable(&s.description),
                crate::io::printable(&s.units)
            ));
        }
        scales.push(uv.map(|u| (u / s.gain, s.baseline)));
    }
    if scales.iter().all(Option::is_none) {
        return Err(ReadError::unsupported(&hea, "no signal of the record is a voltage (mV, µV or V)"));
    }

    let plans = plan_files(&hea, &dir, &header)?;
    let frames_avail = plans.iter().map(|p| p.frames_avail).min().unwrap_or(0);
    let promised = header.record.n_samples;
    let n_frames = match promised {
        Some(promised) if frames_avail < promised => {
            let short = plans.iter().find(|p| p.frames_avail < promised).map_or(&hea, |p| &p.path);
            if (frames_avail as f64) < 0.99 * promised as f64 {
                return Err(ReadError::invalid(
                    short,
                    format!("header promises {promised} samples per signal but the signal file holds {frames_avail}"),
                ));
            }
            warnings.push(format!(
                "{}: header promises {promised} samples per signal; the signal file holds {frames_avail}, reading those",
                short.display()
            ));
            frames_avail
        }
        Some(promised) => promised,
        None => frames_avail,
    };
    let n_leads = scales.iter().flatten().count() as u64;
    if n_frames.saturating_mul(n_leads) > MAX_TOTAL_SAMPLES {
        return Err(ReadError::invalid(
            &hea,
            format!("{n_frames} samples × {n_leads} signals is more than {MAX_TOTAL_SAMPLES} samples"),
        ));
    }
    let n_frames = usize::try_from(n_frames).map_err(|_| ReadError::invalid(&hea, "record line: too many samples"))?;
    let complete = promised.is_none_or(|p| p == n_frames as u64);

    let mut leads: Vec<Option<Lead>> = vec![None; header.signals.len()];
    let mut files = vec![hea.clone()];
    // Checksum mismatches, gathered: one note names them all (a header of the wrong record gave twelve lines).
    let mut mismatched: Vec<String> = Vec::new();
    for plan in plans {
        let group_scales: Vec<(f64, f64)> = plan.signals.iter().map(|&i| scales[i].unwrap_or((0.0, 0.0))).collect();
        let decoded =
            signal::read_signals(&plan.path, plan.format, plan.offset, plan.signals.len(), n_frames, &group_scales)?;
        for ((samples, sum), &sig) in decoded.samples.into_iter().zip(decoded.checksums).zip(&plan.signals) {
            let s = &header.signals[sig];
            if complete && s.checksum.is_some_and(|c| c != sum) {
                mismatched.push(format!(
                    "{} ('{}': {} in the header, {sum} in {})",
                    sig + 1,
                    crate::io::printable(&s.description),
                    s.checksum.unwrap_or_default(),
                    plan.path
                        .file_name()
                        .map_or_else(|| plan.path.display().to_string(), |f| f.to_string_lossy().into())
                ));
            }
            if scales[sig].is_some() {
                let name = if s.description.is_empty() { format!("signal {}", sig + 1) } else { s.description.clone() };
                leads[sig] = Some(Lead { name: LeadName::parse(&name), samples });
            }
        }
        files.push(plan.path);
    }
    if let Some(first) = mismatched.first() {
        let more = match mismatched.len() {
            1 => String::new(),
            n => format!(" and {} more", n - 1),
        };
        let (what, verb) = if mismatched.len() == 1 { ("signal", "differs") } else { ("signals", "differ") };
        warnings.push(format!(
            "{}: checksum of {what} {first}{more} {verb}: the header may not describe this signal file",
            hea.display()
        ));
    }
    // A gain of 0 marks an uncalibrated signal (WFDB header(5)); its samples are read at the default gain of 200,
    // which may be far from the truth (a helper's test: lead I 8.6 times too large, QRS 90 → 72 ms, no word said).
    // The recording's signal notes say so, in exports too (`Recording::signal_notes`). Counted among the leads
    // kept: signals that are not voltages are left out, so a header's signal number is not a lead's index.
    let uncalibrated_leads: Vec<usize> = leads
        .iter()
        .zip(&header.signals)
        .filter(|(lead, _)| lead.is_some())
        .enumerate()
        .filter(|(_, (_, s))| s.uncalibrated)
        .map(|(k, _)| k)
        .collect();
    let leads: Vec<Lead> = leads.into_iter().flatten().collect();

    let mut meta =
        Meta { recording_info: (!header.comments.is_empty()).then(|| header.comments.join("\n")), ..Meta::default() };
    parse_comment_fields(&header.comments, &mut meta);
    meta.uncalibrated_leads = uncalibrated_leads;
    let start = parse_base_datetime(&header.record);
    let mut recording = Recording { leads, sample_rate, start, meta, annotations: Vec::new() };
    let atr = hea.with_extension("atr");
    if atr.is_file() {
        match super::wfdb_annotations::read(&atr) {
            Ok(a) => recording.annotations = a,
            Err(e) => warnings.push(format!("annotations not loaded: {e}")),
        }
        // Read from either way: no output may be written over it.
        files.push(atr);
    }
    Ok(Opened { recording, format: Format::Wfdb, files, warnings })
}

/// Groups the signals by file (signals of one file are interleaved, in header order) and measures each file.
fn plan_files(hea: &Path, dir: &Path, header: &Header) -> Result<Vec<FilePlan>, ReadError> {
    let mut plans: Vec<FilePlan> = Vec::new();
    for (i, s) in header.signals.iter().enumerate() {
        if let Some(p) = plans.iter_mut().find(|p| p.path == dir.join(&s.file)) {
            if p.format != s.format {
                return Err(ReadError::unsupported(
                    hea,
                    format!("signals {} and {} share file {} with different formats", p.signals[0] + 1, i + 1, s.file),
                ));
            }
            if p.signals.last().is_some_and(|&last| last + 1 != i) {
                return Err(ReadError::unsupported(
                    hea,
                    format!("signal {}: file {} is not contiguous", i + 1, s.file),
                ));
            }
            p.signals.push(i);
        } else {
            plans.push(FilePlan {
                path: dir.join(&s.file),
                format: s.format,
                offset: s.byte_offset,
                signals: vec![i],
                frames_avail: 0,
            });
        }
    }
    for p in &mut plans {
        let fb = signal::frame_bytes(p.format, p.signals.len()).ok_or_else(|| {
            ReadError::unsupported(hea, format!("signal format {} (supported: 16, 61, 80, 212)", p.format))
        })?;
        // A signal file that is not there: say which header names it.
        let len = match std::fs::metadata(&p.path) {
            Ok(m) => m.len(),
            Err(e) if e.kind() == std::io::ErrorKind::NotFound => {
                return Err(ReadError::invalid(hea, format!("its signal file {} does not exist", p.path.display())));
            }
            Err(e) => return Err(ReadError::io(&p.path, e)),
        };
        p.frames_avail = (len.saturating_sub(p.offset) as f64 / fb).floor() as u64;
    }
    Ok(plans)
}

/// Factor from a signal's physical unit to µV; `None` when the unit is not a voltage.
fn uv_per_unit(units: &str) -> Option<f64> {
    match units.to_ascii_lowercase().as_str() {
        "mv" => Some(1000.0),
        "uv" | "µv" | "μv" => Some(1.0),
        "v" => Some(1.0e6),
        _ => None,
    }
}

/// Picks age and sex from comment lines such as `<age>: 51`, `age: 81`, `sex: female`, or else from a line that
/// starts with the age and `M` or `F`, as the MIT-BIH records (and the QT Database records drawn from them) give
/// them: `# 69 M 1085 1629 x1`.
// Source: MIT-BIH Arrhythmia Database Directory (Moody & Mark), header comments: the first comment line holds the
// subject's age and sex, then details of the original recording (from memory).
fn parse_comment_fields(comments: &[String], meta: &mut Meta) {
    for c in comments {
        let mut words = c.split_whitespace();
        if let (Some(age), Some(sex @ ("M" | "F"))) = (words.next(), words.next())
            && let Ok(age) = age.parse::<u16>()
            && age <= 130
            && meta.age_years.is_none()
            && meta.sex.is_none()
        {
            meta.age_years = Some(f64::from(age));
            meta.sex = Some(sex.into());
            continue;
        }
        let lower = c.to_ascii_lowercase();
        let lower = lower.replace(['<', '>'], "");
        if let Some(v) = lower.strip_prefix("age:") {
            meta.age_years = v.trim().parse().ok();
        } else if let Some(v) = lower.strip_prefix("sex:") {
            let v = v.trim();
            meta.sex = match v {
                "f" | "female" => Some("F".into()),
                "m" | "male" => Some("M".into()),
                "" => None,
                other => Some(other.to_string()),
            };
        }
    }
}

fn parse_base_datetime(r: &RecordLine) -> Option<time::PrimitiveDateTime> {
    let t = r.base_time.as_deref()?;
    let mut hms = t.split(':').map(|x| x.parse::<f64>().ok());
    let (h, m, s) = (hms.next()??, hms.next()??, hms.next().flatten().unwrap_or(0.0));
    let time = time::Time::from_hms(h as u8, m as u8, s as u8).ok()?;
    let date = match r.base_date.as_deref() {
        Some(d) => {
            let p: Vec<i32> = d.split('/').filter_map(|x| x.parse().ok()).collect();
            let month = time::Month::try_from(u8::try_from(*p.get(1)?).ok()?).ok()?;
            time::Date::from_calendar_date(*p.get(2)?, month, u8::try_from(*p.first()?).ok()?).ok()?
        }
        None => return None,
    };
    Some(time::PrimitiveDateTime::new(date, time))
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn parses_quirky_headers() -> Result<(), ReadError> {
        let p = Path::new("x.hea");
        let h = parse_header(
            p,
            "# c\r\n\r\nsel100 2 250/360 225000\r\nsel100.dat 212 200(0) 11 1024 945 -13873 0 MLII\r\nsel100.dat 212 200(0) 11 1024 955 14507 0 V5\r\n",
        )?;
        assert_eq!(h.record.fs_hz, 250.0);
        assert_eq!(h.record.n_samples, Some(225000));
        assert_eq!(h.signals[0].baseline, 0.0);
        assert_eq!(h.signals[0].checksum, Some(-13873));
        assert_eq!(h.signals[1].description, "V5");
        let h = parse_header(p, "1 1 500 5000\n1.dat 16 1716(6)/mV 0 0 -120 -32198 0 i\n")?;
        assert_eq!(h.signals[0].gain, 1716.0);
        assert_eq!(h.signals[0].baseline, 6.0);
        assert!(!h.signals[0].uncalibrated);
        // A gain of 0 (as the QT Database's sel14046 writes) marks an uncalibrated signal, read at 200 (header(5)).
        let h = parse_header(p, "r 1 250/128 10\nr.dat 212 0 12 7 -16 12292 0 ECG1\n")?;
        assert_eq!(h.signals[0].gain, 200.0);
        assert!(h.signals[0].uncalibrated);
        assert_eq!(h.signals[0].baseline, 7.0, "baseline defaults to adczero");
        assert!(parse_header(p, "r 3 250\nr.dat 16 200 12 0 0 0 0 I\n").is_err());
        assert!(parse_header(p, "r/2 1 250\n").is_err());
        assert!(parse_header(p, "r 1 250\nr.dat 16 200(nan) 12 0 0 0 0 I\n").is_err());
        Ok(())
    }

    #[test]
    fn units_to_microvolts() {
        assert_eq!(uv_per_unit("mV"), Some(1000.0));
        assert_eq!(uv_per_unit("uV"), Some(1.0));
        assert_eq!(uv_per_unit("V"), Some(1.0e6));
        assert_eq!(uv_per_unit("mmHg"), None);
    }

    #[test]
    fn an_uncalibrated_lead_is_counted_among_the_leads_kept() -> Result<(), Box<dyn std::error::Error>> {
        // A blood pressure signal first (skipped: not a voltage), then II with gain 0 and V5 with a gain: the note
        // names II. Counted by header signal number instead, it named V5, which is calibrated.
        let dir = tempfile::tempdir()?;
        std::fs::write(
            dir.path().join("r.hea"),
            "r 3 250 100\nr.dat 16 100/mmHg 16 0 0 0 0 ABP\nr.dat 16 0/mV 16 0 0 0 0 II\nr.dat 16 200/mV 16 0 0 0 0 V5\n",
        )?;
        let samples: Vec<u8> = (0..300i16).flat_map(|k| (k % 50).to_le_bytes()).collect();
        std::fs::write(dir.path().join("r.dat"), samples)?;
        let opened = read_record(&dir.path().join("r.hea"))?;
        let names: Vec<String> = opened.recording.leads.iter().map(|l| l.name.to_string()).collect();
        assert_eq!(names, ["II", "V5"]);
        assert_eq!(opened.recording.meta.uncalibrated_leads, [0]);
        let note = opened.recording.uncalibrated_note().unwrap_or_default();
        assert!(note.starts_with("lead II has no gain"), "{note}");
        Ok(())
    }
}
