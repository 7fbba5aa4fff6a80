//! The WFDB header (`.hea`): record line, signal lines and comments (WFDB `header(5)`).

use std::path::{Path, PathBuf};

use crate::io::ReadError;

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
    /// The header wrote the gain as 0 (or left it out): an uncalibrated signal, read at the WFDB default of 200.
    pub uncalibrated: bool,
    /// Digital value of 0 physical units.
    pub baseline: f64,
    /// Physical unit text (`mV` when absent).
    pub units: String,
    /// Checksum of the signal's digital samples (16-bit sum), if stated.
    pub checksum: Option<i16>,
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
            format!(
                "record line promises {} signals but the header has {} signal lines",
                record.n_signals,
                sig_lines.len()
            ),
        ));
    }
    let signals = sig_lines[..record.n_signals]
        .iter()
        .map(|&(no, l)| parse_signal_line(path, no, l))
        .collect::<Result<Vec<_>, _>>()?;
    // More signal lines than the record line declares: the samples are interleaved over all of them, so reading
    // only the declared ones would take other signals' samples for theirs (and measure garbage).
    let extra = sig_lines[record.n_signals..].iter().filter(|&&(no, l)| parse_signal_line(path, no, l).is_ok()).count();
    if extra > 0 {
        return Err(ReadError::invalid(
            path,
            format!(
                "record line declares {} signals but the header has {} signal lines",
                record.n_signals,
                record.n_signals + extra
            ),
        ));
    }
    Ok(Header { record, signals, comments })
}

fn field_err(path: &Path, line: usize, field: &str, value: &str) -> ReadError {
    ReadError::invalid(path, format!("line {line}: bad {field} '{}'", crate::io::printable(value)))
}

fn parse_record_line(path: &Path, no: usize, line: &str) -> Result<RecordLine, ReadError> {
    // A header is text: NUL bytes or bytes that are not UTF-8 in its record line mean a binary file (a signal
    // file named .hea, say), whose first line was otherwise taken for a multi-segment record's.
    if line.chars().any(|c| c == '\0' || c == char::REPLACEMENT_CHARACTER) {
        return Err(ReadError::invalid(path, format!("line {no}: not a WFDB header (binary data, not text)")));
    }
    let f: Vec<&str> = line.split_whitespace().collect();
    let name_field = f.first().copied().unwrap_or_default();
    if name_field.contains('/') {
        return Err(ReadError::unsupported(
            path,
            format!("line {no}: multi-segment record '{}'", crate::io::printable(name_field)),
        ));
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
        return Err(ReadError::unsupported(
            path,
            format!("line {no}: signal file name '{}'", crate::io::printable(&file)),
        ));
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
            return Err(ReadError::unsupported(
                path,
                format!("line {no}: {xs} samples per frame (multi-rate signals)"),
            ));
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
    let mut uncalibrated = true;
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
        uncalibrated = gv == 0.0;
        if let Some(b) = base_part {
            let bv: f64 = b.parse().map_err(|_| field_err(path, no, "baseline", g))?;
            if !bv.is_finite() {
                return Err(field_err(path, no, "baseline", g));
            }
            baseline = Some(bv);
        }
        if let Some(u) = unit_part.filter(|u| !u.is_empty()) {
            units = u.to_string();
        }
    }
    let adc_zero: f64 = match f.get(4) {
        Some(s) => s.parse().map_err(|_| field_err(path, no, "ADC zero", s))?,
        None => 0.0,
    };
    if !adc_zero.is_finite() {
        return Err(field_err(path, no, "ADC zero", &adc_zero.to_string()));
    }
    // The checksum is a 16-bit sum; headers write it signed (WFDB) and some tools unsigned.
    let checksum = match f.get(6) {
        Some(s) => {
            let v: i64 = s.parse().map_err(|_| field_err(path, no, "checksum", s))?;
            if !(-32768..=65535).contains(&v) {
                return Err(field_err(path, no, "checksum", s));
            }
            Some(v as u16 as i16)
        }
        None => None,
    };
    let description = if f.len() > 8 { f[8..].join(" ") } else { String::new() };
    Ok(SignalLine {
        file,
        format,
        byte_offset,
        gain,
        uncalibrated,
        baseline: baseline.unwrap_or(adc_zero),
        units,
        checksum,
        description,
    })
}
