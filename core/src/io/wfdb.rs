//! WFDB records (PhysioNet): the `.hea` header and its signal files in formats 16, 61, 80 and 212.
//!
//! Header grammar (WFDB `header(5)`): comment lines start with `#`; blank lines are skipped; CRLF accepted.
//! Record line: `name[/nseg] nsig [fs[/counterfreq][(basecounter)] [nsamp [basetime [basedate]]]]`.
//! Signal line: `file format[xsamp][:skew][+offset] gain[(baseline)][/units] adcres adczero initval checksum
//! blocksize description`. Physical value = (digital − baseline) / gain; baseline defaults to adczero; a gain
//! of 0 means 200 per unit; units default to mV.

use std::collections::BTreeMap;
use std::path::{Path, PathBuf};

use super::{file_len, read_bytes, Format, Opened, ReadError, MAX_TOTAL_SAMPLES};
use crate::recording::{Lead, LeadName, Meta, Recording};
use crate::units::Hertz;

/// The record line of a header.
#[derive(Debug, Clone, PartialEq)]
pub struct RecordLine {
    /// Record name.
    pub name: String,
    /// Number of signals.
    pub n_signals: usize,
    /// Sampling frequency, Hz (250 when absent, as WFDB defaults).
    pub fs_hz: f64,
    /// Samples per signal, if stated (0 = unknown).
    pub n_samples: Option<u64>,
    /// Base time `hh:mm:ss`, if stated.
    pub base_time: Option<String>,
    /// Base date `dd/mm/yyyy`, if stated.
    pub base_date: Option<String>,
}

/// One signal line of a header.
#[derive(Debug, Clone, PartialEq)]
pub struct SignalLine {
    /// Signal file name, relative to the header's folder.
    pub file: String,
    /// Storage format number (16, 61, 80, 212).
    pub format: u32,
    /// Byte offset of the first sample in the file.
    pub byte_offset: u64,
    /// ADC units per physical unit (after replacing 0 by 200).
    pub gain: f64,
    /// Digital value of 0 physical units.
    pub baseline: f64,
    /// Physical unit text (`mV` when absent).
    pub units: String,
    /// Signal description (lead name).
    pub description: String,
}

/// A parsed header.
#[derive(Debug, Clone, PartialEq)]
pub struct Header {
    /// The record line.
    pub record: RecordLine,
    /// One entry per signal.
    pub signals: Vec<SignalLine>,
    /// Comment lines, without the leading `#` and surrounding blanks.
    pub comments: Vec<String>,
}

/// The header path for a record path: the path itself if it ends in `.hea`, else `path.hea` if that exists.
#[must_use]
pub fn header_path(path: &Path) -> Option<PathBuf> {
    if path.extension().is_some_and(|e| e.eq_ignore_ascii_case("hea")) {
        return Some(path.to_path_buf());
    }
    let mut s = path.as_os_str().to_os_string();
    s.push(".hea");
    let p = PathBuf::from(s);
    p.is_file().then_some(p)
}

/// Parses header text. `path` is only used in error messages.
///
/// # Errors
/// [`ReadError::Invalid`] naming the line and field; [`ReadError::Unsupported`] for multi-segment records.
pub fn parse_header(path: &Path, text: &str) -> Result<Header, ReadError> {
    let mut comments = Vec::new();
    let mut lines = Vec::new();
    for (no, raw) in text.lines().enumerate() {
        let line = raw.trim_end_matches('\r').trim();
        if let Some(c) = line.strip_prefix('#') {
            comments.push(c.trim().to_string());
        } else if !line.is_empty() {
            lines.push((no + 1, line));
        }
    }
    let Some(&(rec_no, rec_line)) = lines.first() else {
        return Err(ReadError::invalid(path, "header has no record line"));
    };
    let record = parse_record_line(path, rec_no, rec_line)?;
    if record.n_signals > 4096 {
        return Err(ReadError::invalid(path, format!("line {rec_no}: {} signals is more than 4096", record.n_signals)));
    }
    let sig_lines = &lines[1..];
    if sig_lines.len() < record.n_signals {
        return Err(ReadError::invalid(
            path,
            format!("record line promises {} signals but the header has {} signal lines", record.n_signals, sig_lines.len()),
        ));
    }
    let signals = sig_lines[..record.n_signals]
        .iter()
        .map(|&(no, l)| parse_signal_line(path, no, l))
        .collect::<Result<Vec<_>, _>>()?;
    Ok(Header { record, signals, comments })
}

fn field_err(path: &Path, line: usize, field: &str, value: &str) -> ReadError {
    ReadError::invalid(path, format!("line {line}: bad {field} '{value}'"))
}

fn parse_record_line(path: &Path, no: usize, line: &str) -> Result<RecordLine, ReadError> {
    let f: Vec<&str> = line.split_whitespace().collect();
    let name_field = f[0];
    if name_field.contains('/') {
        return Err(ReadError::unsupported(path, format!("line {no}: multi-segment record '{name_field}'")));
    }
    let n_signals = f
        .get(1)
        .ok_or_else(|| ReadError::invalid(path, format!("line {no}: record line lacks the number of signals")))?;
    let n_signals: usize = n_signals.parse().map_err(|_| field_err(path, no, "number of signals", n_signals))?;
    let fs_hz = match f.get(2) {
        None => 250.0,
        Some(s) => {
            let end = s.find(['/', '(']).unwrap_or(s.len());
            let v: f64 = s[..end].parse().map_err(|_| field_err(path, no, "sampling frequency", s))?;
            if !(v.is_finite() && v > 0.0 && v <= 1.0e6) {
                return Err(field_err(path, no, "sampling frequency", s));
            }
            v
        }
    };
    let n_samples = match f.get(3) {
        None => None,
        Some(s) => match s.parse::<u64>().map_err(|_| field_err(path, no, "number of samples", s))? {
            0 => None,
            n => Some(n),
        },
    };
    Ok(RecordLine {
        name: name_field.to_string(),
        n_signals,
        fs_hz,
        n_samples,
        base_time: f.get(4).map(|s| s.to_string()),
        base_date: f.get(5).map(|s| s.to_string()),
    })
}

fn parse_signal_line(path: &Path, no: usize, line: &str) -> Result<SignalLine, ReadError> {
    let f: Vec<&str> = line.split_whitespace().collect();
    if f.len() < 2 {
        return Err(ReadError::invalid(path, format!("line {no}: signal line lacks a format")));
    }
    let file = f[0].to_string();
    if file == "-" || file.contains('/') || file.contains('\\') || file.contains("..") {
        return Err(ReadError::unsupported(path, format!("line {no}: signal file name '{file}'")));
    }
    // format[xsamp][:skew][+offset]
    let fmt_field = f[1];
    let digits_end = fmt_field.find(|c: char| !c.is_ascii_digit()).unwrap_or(fmt_field.len());
    let format: u32 = fmt_field[..digits_end].parse().map_err(|_| field_err(path, no, "format", fmt_field))?;
    let mut rest = &fmt_field[digits_end..];
    let mut byte_offset = 0u64;
    if let Some(x) = rest.strip_prefix('x') {
        let e = x.find([':', '+']).unwrap_or(x.len());
        let xs: u32 = x[..e].parse().map_err(|_| field_err(path, no, "samples per frame", fmt_field))?;
        if xs > 1 {
            return Err(ReadError::unsupported(path, format!("line {no}: {xs} samples per frame (multi-rate signals)")));
        }
        rest = &x[e..];
    }
    if let Some(s) = rest.strip_prefix(':') {
        let e = s.find('+').unwrap_or(s.len());
        let skew: i64 = s[..e].parse().map_err(|_| field_err(path, no, "skew", fmt_field))?;
        if skew != 0 {
            return Err(ReadError::unsupported(path, format!("line {no}: skew {skew}")));
        }
        rest = &s[e..];
    }
    if let Some(s) = rest.strip_prefix('+') {
        byte_offset = s.parse().map_err(|_| field_err(path, no, "byte offset", fmt_field))?;
        rest = "";
    }
    if !rest.is_empty() {
        return Err(field_err(path, no, "format", fmt_field));
    }
    // gain[(baseline)][/units]
    let mut gain = 200.0;
    let mut baseline: Option<f64> = None;
    let mut units = "mV".to_string();
    if let Some(g) = f.get(2) {
        let (num_part, unit_part) = match g.find('/') {
            Some(i) => (&g[..i], Some(&g[i + 1..])),
            None => (*g, None),
        };
        let (gain_part, base_part) = match num_part.find('(') {
            Some(i) => {
                let b = num_part[i + 1..].strip_suffix(')').ok_or_else(|| field_err(path, no, "gain", g))?;
                (&num_part[..i], Some(b))
            }
            None => (num_part, None),
        };
        let gv: f64 = gain_part.parse().map_err(|_| field_err(path, no, "gain", g))?;
        if !gv.is_finite() || gv < 0.0 {
            return Err(field_err(path, no, "gain", g));
        }
        gain = if gv == 0.0 { 200.0 } else { gv };
        if let Some(b) = base_part {
            baseline = Some(b.parse().map_err(|_| field_err(path, no, "baseline", g))?);
        }
        if let Some(u) = unit_part.filter(|u| !u.is_empty()) {
            units = u.to_string();
        }
    }
    let adc_zero: f64 = match f.get(4) {
        Some(s) => s.parse().map_err(|_| field_err(path, no, "ADC zero", s))?,
        None => 0.0,
    };
    let description = if f.len() > 8 { f[8..].join(" ") } else { String::new() };
    Ok(SignalLine { file, format, byte_offset, gain, baseline: baseline.unwrap_or(adc_zero), units, description })
}

/// Bytes per frame-group and samples per group for a format with `n` interleaved signals.
fn frame_bytes(format: u32, n: usize) -> Option<f64> {
    match format {
        16 | 61 => Some(2.0 * n as f64),
        80 => Some(n as f64),
        212 => Some(1.5 * n as f64),
        _ => None,
    }
}

/// Reads up to `len` bytes of a file from `offset` (fewer at the end of the file).
fn read_range(path: &Path, offset: u64, len: usize) -> Result<Vec<u8>, ReadError> {
    use std::io::{Read, Seek, SeekFrom};
    let mut f = std::fs::File::open(path).map_err(|e| ReadError::io(path, e))?;
    f.seek(SeekFrom::Start(offset)).map_err(|e| ReadError::io(path, e))?;
    let mut buf = Vec::with_capacity(len);
    f.take(len as u64).read_to_end(&mut buf).map_err(|e| ReadError::io(path, e))?;
    Ok(buf)
}

/// Factor from the signal's physical unit to µV.
fn uv_per_unit(path: &Path, units: &str) -> Result<f64, ReadError> {
    match units.to_ascii_lowercase().as_str() {
        "mv" => Ok(1000.0),
        "uv" | "µv" | "μv" => Ok(1.0),
        "v" => Ok(1.0e6),
        "nu" => Ok(1000.0),
        other => Err(ReadError::unsupported(path, format!("signal unit '{other}' is not a voltage"))),
    }
}

/// Decodes `n_frames` frames of `n_sig` interleaved signals, converting each digital value with `convert`
/// (signal index, value); the invalid-sample marker becomes `f32::NAN`.
fn decode(
    format: u32,
    bytes: &[u8],
    n_sig: usize,
    n_frames: usize,
    convert: impl Fn(usize, i32) -> f32,
) -> Vec<Vec<f32>> {
    let mut out: Vec<Vec<f32>> = (0..n_sig).map(|_| Vec::with_capacity(n_frames)).collect();
    let total = n_sig * n_frames;
    let mut push = |k: usize, v: Option<i32>| {
        let sig = k % n_sig;
        out[sig].push(v.map_or(f32::NAN, |d| convert(sig, d)));
    };
    match format {
        16 | 61 => {
            for k in 0..total {
                let b = [bytes[2 * k], bytes[2 * k + 1]];
                let v = if format == 16 { i16::from_le_bytes(b) } else { i16::from_be_bytes(b) };
                push(k, (v != i16::MIN).then_some(i32::from(v)));
            }
        }
        80 => {
            for (k, &b) in bytes.iter().enumerate().take(total) {
                let v = i32::from(b) - 128;
                push(k, (v != -128).then_some(v));
            }
        }
        212 => {
            for k in 0..total {
                let base = (k / 2) * 3;
                let raw = if k % 2 == 0 {
                    i32::from(bytes[base]) | ((i32::from(bytes[base + 1]) & 0x0F) << 8)
                } else {
                    i32::from(bytes[base + 2]) | ((i32::from(bytes[base + 1]) & 0xF0) << 4)
                };
                let v = if raw >= 2048 { raw - 4096 } else { raw };
                push(k, (v != -2048).then_some(v));
            }
        }
        _ => {}
    }
    out
}

/// Reads a WFDB record given its `.hea` path or its path without extension. Loads `NAME.atr` beside it as the
/// recording's annotations when present.
///
/// # Errors
/// [`ReadError`] naming the header line, field or signal file at fault. A signal file holding fewer samples than
/// the header promises is accepted with a warning when at least 99 % are there, and rejected otherwise.
pub fn read_record(path: &Path) -> Result<Opened, ReadError> {
    let hea = header_path(path).ok_or_else(|| ReadError::unsupported(path, "no WFDB header (.hea) found"))?;
    let hea_len = file_len(&hea)?;
    if hea_len > 1 << 20 {
        return Err(ReadError::invalid(&hea, format!("header is {hea_len} bytes, more than 1 MiB")));
    }
    let bytes = read_bytes(&hea)?;
    let text = String::from_utf8_lossy(&bytes);
    let header = parse_header(&hea, &text)?;
    let dir = hea.parent().map(Path::to_path_buf).unwrap_or_default();
    if header.signals.is_empty() {
        return Err(ReadError::invalid(&hea, "record has no signals"));
    }
    let sample_rate =
        Hertz::from_hz(header.record.fs_hz).map_err(|e| ReadError::invalid(&hea, format!("record line: {e}")))?;

    // Group signals by file, keeping header order.
    let mut groups: BTreeMap<(String, u64), Vec<usize>> = BTreeMap::new();
    let mut order: Vec<(String, u64)> = Vec::new();
    for (i, s) in header.signals.iter().enumerate() {
        let key = (s.file.clone(), s.byte_offset);
        if !groups.contains_key(&key) {
            order.push(key.clone());
        }
        groups.entry(key).or_default().push(i);
    }
    let mut warnings = Vec::new();
    let mut files = vec![hea.clone()];
    // Frames each file holds; the record length is the smallest.
    let mut plans = Vec::new();
    for key in &order {
        let idx = &groups[key];
        let fmt = header.signals[idx[0]].format;
        if let Some(&other) = idx.iter().find(|&&i| header.signals[i].format != fmt) {
            return Err(ReadError::unsupported(
                &hea,
                format!("signals {} and {} share file {} with different formats", idx[0] + 1, other + 1, key.0),
            ));
        }
        let Some(fb) = frame_bytes(fmt, idx.len()) else {
            return Err(ReadError::unsupported(&hea, format!("signal format {fmt} (supported: 16, 61, 80, 212)")));
        };
        let dat = dir.join(&key.0);
        let len = file_len(&dat)?;
        let avail = len.saturating_sub(key.1);
        let frames_avail = (avail as f64 / fb).floor() as u64;
        files.push(dat.clone());
        plans.push((dat, fmt, idx.clone(), frames_avail, key.1));
    }
    let frames_avail = plans.iter().map(|p| p.3).min().unwrap_or(0);
    let n_frames = match header.record.n_samples {
        Some(promised) if frames_avail < promised => {
            if (frames_avail as f64) < 0.99 * promised as f64 {
                return Err(ReadError::invalid(
                    &plans[0].0,
                    format!("header promises {promised} samples per signal but the signal file holds {frames_avail}"),
                ));
            }
            warnings.push(format!(
                "{}: header promises {promised} samples per signal; the signal file holds {frames_avail}, reading those",
                hea.display()
            ));
            frames_avail
        }
        Some(promised) => promised,
        None => frames_avail,
    };
    if n_frames.saturating_mul(header.signals.len() as u64) > MAX_TOTAL_SAMPLES {
        return Err(ReadError::invalid(&hea, format!("{n_frames} samples × {} signals is too large", header.signals.len())));
    }
    let n_frames = usize::try_from(n_frames).map_err(|_| ReadError::invalid(&hea, "too many samples"))?;

    let mut leads: Vec<Option<Lead>> = vec![None; header.signals.len()];
    for (dat, fmt, idx, _, offset) in plans {
        let Some(fb) = frame_bytes(fmt, idx.len()) else { continue };
        let need = (n_frames as f64 * fb).ceil() as usize;
        let mut slice = read_range(&dat, offset, need)?;
        slice.resize(need, 0); // an odd 212 tail: the missing half-group is never decoded into a returned frame
        let scales = idx
            .iter()
            .map(|&sig| {
                let s = &header.signals[sig];
                uv_per_unit(&hea, &s.units).map(|u| (u / s.gain, s.baseline))
            })
            .collect::<Result<Vec<_>, _>>()?;
        let digital = decode(fmt, &slice, idx.len(), n_frames, |k, v| {
            let (scale, baseline) = scales[k];
            ((f64::from(v) - baseline) * scale) as f32
        });
        for (samples, &sig) in digital.into_iter().zip(&idx) {
            let s = &header.signals[sig];
            let name = if s.description.is_empty() { format!("signal {}", sig + 1) } else { s.description.clone() };
            leads[sig] = Some(Lead { name: LeadName::parse(&name), samples });
        }
    }
    let leads: Vec<Lead> = leads.into_iter().flatten().collect();

    let mut meta = Meta { recording_info: (!header.comments.is_empty()).then(|| header.comments.join("\n")), ..Meta::default() };
    parse_comment_fields(&header.comments, &mut meta);
    let start = parse_base_datetime(&header.record);
    let mut recording = Recording { leads, sample_rate, start, meta, annotations: Vec::new() };
    let atr = hea.with_extension("atr");
    if atr.is_file() {
        match super::wfdb_annotations::read(&atr) {
            Ok(a) => {
                files.push(atr);
                recording.annotations = a;
            }
            Err(e) => warnings.push(format!("annotations not loaded: {e}")),
        }
    }
    Ok(Opened { recording, format: Format::Wfdb, files, warnings })
}

/// Picks age and sex from comment lines such as `<age>: 51`, `age: 81`, `sex: female`.
fn parse_comment_fields(comments: &[String], meta: &mut Meta) {
    for c in comments {
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
        let h = parse_header(p, "# c\r\n\r\nsel100 2 250/360 225000\r\nsel100.dat 212 200(0) 11 1024 945 -13873 0 MLII\r\nsel100.dat 212 200(0) 11 1024 955 14507 0 V5\r\n")?;
        assert_eq!(h.record.fs_hz, 250.0);
        assert_eq!(h.record.n_samples, Some(225000));
        assert_eq!(h.signals[0].baseline, 0.0);
        assert_eq!(h.signals[1].description, "V5");
        let h = parse_header(p, "1 1 500 5000\n1.dat 16 1716(6)/mV 0 0 -120 -32198 0 i\n")?;
        assert_eq!(h.signals[0].gain, 1716.0);
        assert_eq!(h.signals[0].baseline, 6.0);
        let h = parse_header(p, "r 1 250/128 10\nr.dat 212 0 12 7 -16 12292 0 ECG1\n")?;
        assert_eq!(h.signals[0].gain, 200.0);
        assert_eq!(h.signals[0].baseline, 7.0, "baseline defaults to adczero");
        assert!(parse_header(p, "r 3 250\nr.dat 16 200 12 0 0 0 0 I\n").is_err());
        assert!(parse_header(p, "r/2 1 250\n").is_err());
        Ok(())
    }

    #[test]
    fn decodes_212_pairs() {
        // first = b0 | (b1 & 0x0F) << 8, second = b2 | (b1 & 0xF0) << 4; 12-bit two's complement.
        let bytes = [0xB1, 0xF3, 0x22];
        let d = decode(212, &bytes, 2, 1, |_, v| v as f32);
        assert_eq!(d[0][0], 0x3B1 as f32);
        assert_eq!(d[1][0], (0xF22 - 4096) as f32);
        let d = decode(212, &[0x00, 0x08, 0x00], 1, 1, |_, v| v as f32);
        assert!(d[0][0].is_nan(), "-2048 marks an invalid sample");
    }
}
