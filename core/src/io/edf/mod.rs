//! EDF and EDF+ (Kemp et al. 1992; Kemp & Olivan 2003): read and write.
//!
//! Reading checks every header field and the file length against the promised data records before allocating,
//! then decodes the data records in chunks straight into the leads. EDF+C annotation signals are parsed into
//! [`Recording::annotations`]; EDF+D (discontinuous) files are refused. Only ECG-like voltage signals sampled at
//! the highest common rate become leads; every other signal is named in a warning.

use std::io::Read;
use std::path::Path;

use super::{Format, MAX_TOTAL_SAMPLES, Opened, ReadError, file_len};
use crate::recording::{Annotation, Lead, LeadName, Recording};
use crate::units::Hertz;

pub mod header;
pub mod meta;
pub mod tal;
mod write;

pub use header::{ANNOTATION_LABEL, Fixed, Signal};
pub use write::{COARSE_STEP_UV, EdfWriteOptions, coarse_leads, write};

/// Raw bytes decoded per chunk of data records (about 4 MiB).
const CHUNK_BYTES: u64 = 4 << 20;

/// Factor from an EDF physical dimension to µV; `None` when it is not a voltage.
fn uv_per_unit(dim: &str) -> Option<f64> {
    match dim.trim() {
        "uV" | "µV" | "μV" | "UV" | "uv" => Some(1.0),
        "mV" | "MV" | "mv" => Some(1000.0),
        "V" | "v" => Some(1.0e6),
        _ => None,
    }
}

/// The lead name in a label: the EDF+ standard label `ECG V2` gives V2 (`ECG <name>` gives `<name>`); other
/// labels are kept as written.
fn lead_name(label: &str) -> LeadName {
    let upper = label.to_ascii_uppercase();
    match upper.strip_prefix("ECG ").or_else(|| upper.strip_prefix("EKG ")) {
        Some(_) if !label[4..].trim().is_empty() => LeadName::parse(&label[4..]),
        _ => LeadName::parse(label),
    }
}

/// Which signals become leads (same rate, ECG-like, voltage), with a warning for every other non-annotation
/// signal.
fn choose_leads(
    path: &Path,
    signals: &[Signal],
    duration_s: f64,
    warnings: &mut Vec<String>,
) -> Result<Vec<usize>, ReadError> {
    let voltage: Vec<usize> = (0..signals.len())
        .filter(|&i| !signals[i].is_annotations() && uv_per_unit(&signals[i].physical_dimension).is_some())
        .collect();
    let ecg: Vec<usize> = voltage.iter().copied().filter(|&i| crate::io::is_ecg_label(&signals[i].label)).collect();
    let pool = if ecg.is_empty() { voltage } else { ecg };
    let Some(max_spr) = pool.iter().map(|&i| signals[i].samples_per_record).max() else {
        return Err(ReadError::unsupported(path, "no signal is a voltage (physical dimension uV, mV or V)"));
    };
    let leads: Vec<usize> = pool.iter().copied().filter(|&i| signals[i].samples_per_record == max_spr).collect();
    for (i, s) in signals.iter().enumerate() {
        if s.is_annotations() || leads.contains(&i) {
            continue;
        }
        let why = if uv_per_unit(&s.physical_dimension).is_none() {
            format!("physical dimension '{}' is not a voltage", crate::io::printable(&s.physical_dimension))
        } else if !pool.contains(&i) {
            "not an ECG signal".to_string()
        } else {
            format!(
                "sampled at {} Hz, not the leads' {} Hz",
                s.samples_per_record as f64 / duration_s,
                max_spr as f64 / duration_s
            )
        };
        warnings.push(format!(
            "{}: signal {} ('{}') skipped: {why}",
            path.display(),
            i + 1,
            crate::io::printable(&s.label)
        ));
    }
    Ok(leads)
}

/// Reads an EDF or EDF+ (continuous) file.
///
/// # Errors
/// [`ReadError`] naming the header field and byte offset at fault, a file shorter than its header promises, or
/// an EDF+D file.
pub fn read(path: &Path) -> Result<Opened, ReadError> {
    let len = file_len(path)?;
    let mut file = crate::io::open_file(path)?;
    let mut fixed_bytes = Vec::with_capacity(header::FIXED_BYTES);
    (&mut file).take(header::FIXED_BYTES as u64).read_to_end(&mut fixed_bytes).map_err(|e| ReadError::io(path, e))?;
    let fixed = header::parse_fixed(path, &fixed_bytes)?;
    if fixed.reserved.starts_with("EDF+D") {
        return Err(ReadError::unsupported(path, "byte 192 (reserved): EDF+D (discontinuous) recordings"));
    }
    let plus = fixed.reserved.starts_with("EDF+C");
    if len < fixed.header_bytes {
        return Err(ReadError::invalid(
            path,
            format!("file is {len} bytes, shorter than its {}-byte header", fixed.header_bytes),
        ));
    }
    let mut sig_bytes = Vec::with_capacity(256 * fixed.n_signals);
    (&mut file).take(256 * fixed.n_signals as u64).read_to_end(&mut sig_bytes).map_err(|e| ReadError::io(path, e))?;
    let signals = header::parse_signals(path, &sig_bytes, fixed.n_signals)?;

    let record_bytes: u64 = signals.iter().map(|s| 2 * s.samples_per_record as u64).sum();
    let data_bytes = len - fixed.header_bytes;
    let mut warnings = Vec::new();
    let n_records = match fixed.n_records {
        Some(n) => {
            let need = n.checked_mul(record_bytes).and_then(|d| d.checked_add(fixed.header_bytes));
            match need {
                Some(need) if need <= len => {
                    if need < len {
                        warnings.push(format!(
                            "{}: {} bytes after the last data record ignored",
                            path.display(),
                            len - need
                        ));
                    }
                    n
                }
                _ => {
                    return Err(ReadError::invalid(
                        path,
                        format!(
                            "byte 236 (number of data records): {n} records of {record_bytes} bytes, but the file holds {} \
                             (ends at byte {len})",
                            data_bytes / record_bytes
                        ),
                    ));
                }
            }
        }
        None => {
            if data_bytes % record_bytes != 0 {
                warnings.push(format!("{}: a partial data record at the end ignored", path.display()));
            }
            data_bytes / record_bytes
        }
    };
    let lead_idx = choose_leads(path, &signals, fixed.record_duration_s, &mut warnings)?;
    let spr = signals[lead_idx[0]].samples_per_record;
    let n_samples = n_records.saturating_mul(spr as u64);
    if n_samples.saturating_mul(lead_idx.len() as u64) > MAX_TOTAL_SAMPLES {
        return Err(ReadError::invalid(path, format!("{n_samples} samples × {} leads is too many", lead_idx.len())));
    }
    let sample_rate = Hertz::for_ecg(spr as f64 / fixed.record_duration_s)
        .map_err(|e| ReadError::invalid(path, format!("byte 244 (duration of a data record): {e}")))?;

    let data = Data {
        path,
        signals: &signals,
        lead_idx: &lead_idx,
        record_bytes,
        header_bytes: fixed.header_bytes,
        n_records,
        record_duration_s: fixed.record_duration_s,
        plus,
    };
    let (mut samples, tals) = data.read_records(&mut file, &mut warnings)?;
    trim_padding(&mut samples, spr);

    let fs = sample_rate.hz();
    let mut annotations = Vec::new();
    let mut negative = 0usize;
    for t in tals {
        if t.onset_s < 0.0 {
            negative += 1;
            continue;
        }
        let mut a = Annotation::new((t.onset_s * fs).round() as u64, t.text);
        a.duration_s = t.duration_s;
        annotations.push(a);
    }
    if negative > 0 {
        warnings.push(format!("{}: {negative} annotations before the start of the recording ignored", path.display()));
    }
    let leads = lead_idx
        .iter()
        .zip(samples)
        .map(|(&i, samples)| Lead { name: lead_name(&signals[i].label), samples })
        .collect();
    let recording = Recording {
        leads,
        sample_rate,
        start: meta::parse_start(&fixed.start_date, &fixed.start_time, &fixed.recording),
        meta: meta::parse_meta(&fixed.patient, &fixed.recording, plus),
        annotations,
    };
    let format = if plus { Format::EdfPlus } else { Format::Edf };
    Ok(Opened { recording, format, files: vec![path.to_path_buf()], warnings })
}

/// What is needed to decode the data records.
struct Data<'a> {
    path: &'a Path,
    signals: &'a [Signal],
    lead_idx: &'a [usize],
    record_bytes: u64,
    header_bytes: u64,
    n_records: u64,
    record_duration_s: f64,
    plus: bool,
}

impl Data<'_> {
    /// Decodes every data record: the leads in µV, and the annotations of every annotation signal.
    ///
    /// Annotation onsets are returned relative to the first sample: EDF+ onsets count from the header's start
    /// time, and the first record may start a fraction of a second after it (its time-keeping TAL says when).
    fn read_records(
        &self,
        file: &mut std::fs::File,
        warnings: &mut Vec<String>,
    ) -> Result<(Vec<Vec<f32>>, Vec<tal::TalAnnotation>), ReadError> {
        let offsets: Vec<u64> = self
            .signals
            .iter()
            .scan(0u64, |acc, s| {
                let o = *acc;
                *acc += 2 * s.samples_per_record as u64;
                Some(o)
            })
            .collect();
        let spr = self.signals[self.lead_idx[0]].samples_per_record;
        let capacity = usize::try_from(self.n_records.saturating_mul(spr as u64)).unwrap_or(0);
        let mut leads: Vec<Vec<f32>> = self.lead_idx.iter().map(|_| Vec::with_capacity(capacity)).collect();
        // Physical = phys_min + (d − dig_min) × (phys_max − phys_min) / (dig_max − dig_min) (Kemp et al. 1992),
        // then scaled to µV. Digital values outside the digital range cannot occur in valid data: NaN.
        let conv: Vec<(f64, f64, i32, i32)> = self
            .lead_idx
            .iter()
            .map(|&i| {
                let s = &self.signals[i];
                let uv = uv_per_unit(&s.physical_dimension).unwrap_or(1.0);
                let gain = (s.physical_max - s.physical_min) / f64::from(s.digital_max - s.digital_min);
                (gain * uv, (s.physical_min - gain * f64::from(s.digital_min)) * uv, s.digital_min, s.digital_max)
            })
            .collect();
        let ann_idx: Vec<usize> = (0..self.signals.len()).filter(|&i| self.signals[i].is_annotations()).collect();
        let mut tals = Vec::new();
        let (mut tal_errors, mut first_tal_error, mut time_gaps) = (0usize, None, 0usize);
        let mut first_start: Option<f64> = None;
        let per_chunk = (CHUNK_BYTES / self.record_bytes).max(1);
        let mut buf = Vec::new();
        let mut record = 0u64;
        while record < self.n_records {
            let n = per_chunk.min(self.n_records - record);
            buf.clear();
            file.take(n * self.record_bytes).read_to_end(&mut buf).map_err(|e| ReadError::io(self.path, e))?;
            if (buf.len() as u64) < n * self.record_bytes {
                let at = self.header_bytes + record * self.record_bytes + buf.len() as u64;
                return Err(ReadError::invalid(self.path, format!("byte {at}: file ends inside a data record")));
            }
            for (r, rec) in buf.chunks_exact(self.record_bytes as usize).enumerate() {
                let rec_no = record + r as u64;
                for (lead, &i) in self.lead_idx.iter().enumerate() {
                    let (gain, offset, dmin, dmax) = conv[lead];
                    let o = offsets[i] as usize;
                    let raw = &rec[o..o + 2 * self.signals[i].samples_per_record];
                    leads[lead].extend(raw.chunks_exact(2).map(|b| {
                        let d = i32::from(i16::from_le_bytes([b[0], b[1]]));
                        if d < dmin || d > dmax { f32::NAN } else { (f64::from(d) * gain + offset) as f32 }
                    }));
                }
                for &i in &ann_idx {
                    let o = offsets[i] as usize;
                    let raw = &rec[o..o + 2 * self.signals[i].samples_per_record];
                    let base = self.header_bytes + rec_no * self.record_bytes + o as u64;
                    match tal::parse_record(raw, base) {
                        Ok(t) => {
                            if i == ann_idx[0] && rec_no == 0 {
                                first_start = t.record_start_s;
                            }
                            let expected = first_start.unwrap_or(0.0) + rec_no as f64 * self.record_duration_s;
                            if self.plus
                                && i == ann_idx[0]
                                && t.record_start_s.is_some_and(|s| (s - expected).abs() > 1e-6 + expected * 1e-9)
                            {
                                time_gaps += 1;
                            }
                            tals.extend(t.annotations);
                        }
                        Err(e) => {
                            tal_errors += 1;
                            first_tal_error.get_or_insert(e);
                        }
                    }
                }
            }
            record += n;
        }
        if let Some(e) = first_tal_error {
            warnings.push(format!(
                "{}: annotations of {tal_errors} data records not read; first: {e}",
                self.path.display()
            ));
        }
        if time_gaps > 0 {
            warnings.push(format!(
                "{}: {time_gaps} data records start at a time other than their place in an EDF+C file says",
                self.path.display()
            ));
        }
        let offset = first_start.unwrap_or(0.0);
        for t in &mut tals {
            t.onset_s -= offset;
        }
        Ok((leads, tals))
    }
}

/// Removes padding from the last data record: trailing samples that are invalid (NaN) in every lead, within the
/// last `spr` samples. [`write`] pads a recording that does not fill its last record this way.
fn trim_padding(leads: &mut [Vec<f32>], spr: usize) {
    let Some(n) = leads.first().map(Vec::len) else { return };
    let floor = n.saturating_sub(spr);
    let mut keep = n;
    while keep > floor && leads.iter().all(|l| l[keep - 1].is_nan()) {
        keep -= 1;
    }
    for l in leads {
        l.truncate(keep);
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::recording::StandardLead;

    #[test]
    fn labels_and_units() {
        assert_eq!(lead_name("ECG V2"), LeadName::Standard(StandardLead::V2));
        assert_eq!(lead_name("ECG avr"), LeadName::Standard(StandardLead::AVR));
        assert_eq!(lead_name("II"), LeadName::Standard(StandardLead::II));
        assert_eq!(lead_name("ECG1"), LeadName::Other("ECG1".into()));
        assert!(crate::io::is_ecg_label("ECG1") && !crate::io::is_ecg_label("EEG Fpz-Cz"));
        assert_eq!(uv_per_unit("mV"), Some(1000.0));
        assert_eq!(uv_per_unit("degC"), None);
    }

    #[test]
    fn trims_only_the_last_record() {
        let nan = f32::NAN;
        let mut l = vec![vec![1.0, nan, 2.0, nan, nan], vec![1.0, nan, 3.0, 4.0, nan]];
        trim_padding(&mut l, 2);
        assert_eq!(l[1].len(), 4);
        assert_eq!(l[1][3], 4.0);
        assert_eq!(l[0].len(), 4);
    }
}
