//! The EDF header: a 256-byte fixed part and 256 bytes per signal, ASCII (Kemp et al. 1992, Kemp & Olivan 2003).
//!
//! Fixed part (byte offset, length): version 0/8, patient 8/80, recording 88/80, start date 168/8 (dd.mm.yy),
//! start time 176/8 (hh.mm.ss), header bytes 184/8, reserved 192/44 (`EDF+C`/`EDF+D` in EDF+), number of data
//! records 236/8 (−1 = unknown), record duration 244/8 (s), number of signals 252/4. Then, for each field in
//! turn, one entry per signal: label 16, transducer 80, physical dimension 8, physical minimum 8, physical
//! maximum 8, digital minimum 8, digital maximum 8, prefiltering 80, samples per record 8, reserved 32.

use std::path::Path;

use crate::io::ReadError;

/// Bytes of the fixed header part.
pub const FIXED_BYTES: usize = 256;
/// Most signals accepted (the field has 4 digits).
pub const MAX_SIGNALS: usize = 9999;
/// The label of an EDF+ annotation signal (Kemp & Olivan 2003).
pub const ANNOTATION_LABEL: &str = "EDF Annotations";

/// The fixed part of the header.
#[derive(Debug, Clone, PartialEq)]
pub struct Fixed {
    /// Local patient identification (EDF+: `code sex birthdate name`).
    pub patient: String,
    /// Local recording identification (EDF+: `Startdate dd-MMM-yyyy admincode technician equipment`).
    pub recording: String,
    /// Start date `dd.mm.yy`.
    pub start_date: String,
    /// Start time `hh.mm.ss`.
    pub start_time: String,
    /// Header size in bytes.
    pub header_bytes: u64,
    /// Reserved field (`EDF+C`, `EDF+D` or blank).
    pub reserved: String,
    /// Number of data records; `None` when the file says −1 (unknown).
    pub n_records: Option<u64>,
    /// Duration of a data record in seconds.
    pub record_duration_s: f64,
    /// Number of signals.
    pub n_signals: usize,
}

/// One signal's header entry.
#[derive(Debug, Clone, PartialEq)]
pub struct Signal {
    /// Label (e.g. `ECG II`, `EDF Annotations`).
    pub label: String,
    /// Transducer type.
    pub transducer: String,
    /// Physical dimension (e.g. `uV`, `mV`).
    pub physical_dimension: String,
    /// Physical minimum.
    pub physical_min: f64,
    /// Physical maximum.
    pub physical_max: f64,
    /// Digital minimum.
    pub digital_min: i32,
    /// Digital maximum.
    pub digital_max: i32,
    /// Prefiltering text.
    pub prefiltering: String,
    /// Samples of this signal in each data record.
    pub samples_per_record: usize,
}

impl Signal {
    /// Whether this is an EDF+ annotation signal.
    #[must_use]
    pub fn is_annotations(&self) -> bool {
        self.label == ANNOTATION_LABEL
    }
}

/// Text of a field, decoded as Latin-1 (EDF allows only ASCII; Latin-1 keeps odd bytes readable), trimmed.
fn text(bytes: &[u8]) -> String {
    bytes.iter().map(|&b| char::from(b)).collect::<String>().trim().to_string()
}

fn bad(path: &Path, at: usize, field: &str, raw: &[u8], why: &str) -> ReadError {
    ReadError::invalid(path, format!("byte {at} ({field}): '{}' {why}", crate::io::printable(&text(raw))))
}

fn int_field(path: &Path, bytes: &[u8], at: usize, len: usize, field: &str) -> Result<i64, ReadError> {
    let raw = &bytes[at..at + len];
    text(raw).parse::<i64>().map_err(|_| bad(path, at, field, raw, "is not an integer"))
}

fn num_field(path: &Path, bytes: &[u8], at: usize, len: usize, field: &str) -> Result<f64, ReadError> {
    let raw = &bytes[at..at + len];
    match text(raw).parse::<f64>() {
        Ok(v) if v.is_finite() => Ok(v),
        _ => Err(bad(path, at, field, raw, "is not a number")),
    }
}

/// Parses and checks the fixed 256-byte part.
///
/// # Errors
/// [`ReadError`] naming the field and its byte offset.
pub fn parse_fixed(path: &Path, bytes: &[u8]) -> Result<Fixed, ReadError> {
    if bytes.len() < FIXED_BYTES {
        return Err(ReadError::invalid(
            path,
            format!("file is {} bytes, shorter than the {FIXED_BYTES}-byte EDF header", bytes.len()),
        ));
    }
    if bytes[0] == 0xFF {
        return Err(ReadError::unsupported(path, "byte 0 (version): BDF (24-bit) files"));
    }
    if text(&bytes[0..8]) != "0" {
        return Err(bad(path, 0, "version", &bytes[0..8], "is not the EDF version '0'"));
    }
    let header_bytes = int_field(path, bytes, 184, 8, "number of header bytes")?;
    let n_records = int_field(path, bytes, 236, 8, "number of data records")?;
    let record_duration_s = num_field(path, bytes, 244, 8, "duration of a data record")?;
    let n_signals = int_field(path, bytes, 252, 4, "number of signals")?;
    if !(1..=MAX_SIGNALS as i64).contains(&n_signals) {
        return Err(bad(path, 252, "number of signals", &bytes[252..256], "is not between 1 and 9999"));
    }
    let n_signals = n_signals as usize;
    let expected = (FIXED_BYTES * (n_signals + 1)) as i64;
    if header_bytes != expected {
        return Err(ReadError::invalid(
            path,
            format!("byte 184 (number of header bytes): {header_bytes}, but {n_signals} signals need {expected}"),
        ));
    }
    if n_records < -1 {
        return Err(bad(path, 236, "number of data records", &bytes[236..244], "is negative"));
    }
    if record_duration_s <= 0.0 {
        return Err(bad(path, 244, "duration of a data record", &bytes[244..252], "is not above 0 s"));
    }
    Ok(Fixed {
        patient: text(&bytes[8..88]),
        recording: text(&bytes[88..168]),
        start_date: text(&bytes[168..176]),
        start_time: text(&bytes[176..184]),
        header_bytes: header_bytes as u64,
        reserved: text(&bytes[192..236]),
        n_records: u64::try_from(n_records).ok(),
        record_duration_s,
        n_signals,
    })
}

/// Parses and checks the signal part (`256 × n` bytes that follow the fixed part). Byte offsets in messages
/// count from the start of the file.
///
/// # Errors
/// [`ReadError`] naming the field, the signal and the byte offset.
pub fn parse_signals(path: &Path, bytes: &[u8], n: usize) -> Result<Vec<Signal>, ReadError> {
    if bytes.len() < 256 * n {
        return Err(ReadError::invalid(
            path,
            format!("byte {}: header ends inside the signal fields", FIXED_BYTES + bytes.len()),
        ));
    }
    // (length, offset of this field's block within the signal part)
    let widths = [16usize, 80, 8, 8, 8, 8, 8, 80, 8, 32];
    let mut starts = [0usize; 10];
    for k in 1..10 {
        starts[k] = starts[k - 1] + widths[k - 1] * n;
    }
    let at = |field: usize, sig: usize| starts[field] + widths[field] * sig;
    let mut out = Vec::with_capacity(n);
    for s in 0..n {
        let field = |k: usize| &bytes[at(k, s)..at(k, s) + widths[k]];
        let abs = |k: usize| FIXED_BYTES + at(k, s);
        let name = |what: &str| format!("{what} of signal {}", s + 1);
        let num = |k: usize, what: &str| -> Result<f64, ReadError> {
            match text(field(k)).parse::<f64>() {
                Ok(v) if v.is_finite() => Ok(v),
                _ => Err(bad(path, abs(k), &name(what), field(k), "is not a number")),
            }
        };
        let int = |k: usize, what: &str| -> Result<i64, ReadError> {
            text(field(k)).parse::<i64>().map_err(|_| bad(path, abs(k), &name(what), field(k), "is not an integer"))
        };
        let physical_min = num(3, "physical minimum")?;
        let physical_max = num(4, "physical maximum")?;
        let digital_min = int(5, "digital minimum")?;
        let digital_max = int(6, "digital maximum")?;
        let spr = int(8, "samples per data record")?;
        if physical_min == physical_max {
            return Err(bad(path, abs(4), &name("physical maximum"), field(4), "equals the physical minimum"));
        }
        if !(-32768..=32767).contains(&digital_min) {
            return Err(bad(path, abs(5), &name("digital minimum"), field(5), "is outside −32768…32767"));
        }
        if !(-32768..=32767).contains(&digital_max) || digital_max <= digital_min {
            return Err(bad(path, abs(6), &name("digital maximum"), field(6), "is not above the digital minimum"));
        }
        if !(1..=10_000_000).contains(&spr) {
            return Err(bad(path, abs(8), &name("samples per data record"), field(8), "is not between 1 and 10⁷"));
        }
        out.push(Signal {
            label: text(field(0)),
            transducer: text(field(1)),
            physical_dimension: text(field(2)),
            physical_min,
            physical_max,
            digital_min: digital_min as i32,
            digital_max: digital_max as i32,
            prefiltering: text(field(7)),
            samples_per_record: spr as usize,
        });
    }
    Ok(out)
}

/// Formats a number into at most `width` characters, rounding toward `-∞` (`floor`) or `+∞` (`!floor`) so the
/// written value still bounds `v`. `None` when it cannot fit.
#[must_use]
pub fn bound_field(v: f64, width: usize, floor: bool) -> Option<String> {
    if !v.is_finite() {
        return None;
    }
    for decimals in (0..width).rev() {
        let scale = 10f64.powi(decimals as i32);
        let r = if floor { (v * scale).floor() / scale } else { (v * scale).ceil() / scale };
        let mut s = format!("{r:.decimals$}");
        if s.contains('.') {
            s = s.trim_end_matches('0').trim_end_matches('.').to_string();
        }
        if s == "-0" {
            s = "0".into();
        }
        if s.len() <= width {
            let back: f64 = s.parse().ok()?;
            let ok = if floor { back <= v } else { back >= v };
            if ok {
                return Some(s);
            }
        }
    }
    None
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn bound_field_fits_and_bounds() {
        for v in [0.0, -4_999.876_5, 12_345.678_9, 1.0e-9, -0.000_4, 9_999_999.4] {
            let lo = bound_field(v, 8, true).unwrap_or_default();
            let hi = bound_field(v, 8, false).unwrap_or_default();
            assert!(lo.len() <= 8 && hi.len() <= 8, "{lo} {hi}");
            assert!(lo.parse::<f64>().unwrap_or(f64::NAN) <= v, "{lo} <= {v}");
            assert!(hi.parse::<f64>().unwrap_or(f64::NAN) >= v, "{hi} >= {v}");
        }
        assert_eq!(bound_field(1.0e12, 8, true), None);
    }
}
