//! Writing EDF / EDF+C (Kemp et al. 1992; Kemp & Olivan 2003).
//!
//! 16-bit samples; each lead gets the physical range of its own data (digital −32767…32767), so reading back
//! is exact to half a digital step. −32768 (below the digital minimum) marks an invalid sample and pads the last
//! data record. With annotations the file is EDF+C with an `EDF Annotations` signal whose first TAL in every
//! record keeps the record's start time; without, plain EDF with EDF+-style patient and recording fields.

use std::io::Write;
use std::path::Path;

use super::header::bound_field;
use super::{ANNOTATION_LABEL, meta, tal};
use crate::io::{ReadError, write_atomic};
use crate::recording::{LeadName, Recording, WITHHELD_LABEL};

/// Options for [`write()`].
#[derive(Debug, Clone, Copy, Default, PartialEq, Eq)]
pub struct EdfWriteOptions {
    /// Write the patient's identifiers, name, birth date and the recording date. Off by default: the file is
    /// de-identified ([`crate::recording::Meta::deidentified`], start date and time withheld: 01.01.85 00.00.00).
    pub identify: bool,
}

/// Largest data record Kemp et al. (1992) recommend, bytes. From memory.
const MAX_RECORD_BYTES: usize = 61_440;
/// Digital range used for samples; −32768 is the invalid/padding marker.
const DIG_MIN: i32 = -32_767;
const DIG_MAX: i32 = 32_767;

/// One lead's header entry as written, and the values the reader will parse back.
struct LeadPlan {
    label: String,
    phys_min_text: String,
    phys_max_text: String,
    phys_min: f64,
    phys_max: f64,
}

/// Picks a data record duration (seconds) giving a whole number of samples per record, preferring one that
/// divides the `n` samples into whole records (no padding), of at most 61 440 bytes, as close to 1 s as listed.
fn record_duration(fs: f64, n_leads: usize, n: usize) -> Option<(f64, usize)> {
    let candidates = [1.0, 0.5, 0.25, 0.2, 0.1, 2.0, 4.0, 5.0, 10.0, 0.05, 0.04, 0.02, 0.01, 20.0, 50.0, 100.0];
    let whole: Vec<(f64, usize)> = candidates
        .iter()
        .filter_map(|&d| {
            let spr = fs * d;
            let r = spr.round();
            ((spr - r).abs() < 1e-9 * r.max(1.0) && (1.0..=1.0e7).contains(&r)).then_some((d, r as usize))
        })
        .collect();
    let fits = |&&(_, spr): &&(f64, usize)| 2 * spr * n_leads <= MAX_RECORD_BYTES;
    let divides = |&&(_, spr): &&(f64, usize)| n.is_multiple_of(spr) && spr >= 10;
    whole.iter().find(|c| fits(c) && divides(c)).or_else(|| whole.iter().find(fits)).or_else(|| whole.first()).copied()
}

/// The EDF+ label of a lead: `ECG <name>`, at most 16 ASCII characters.
fn label(name: &LeadName) -> String {
    let s = format!("ECG {name}");
    s.chars().map(|c| if c.is_ascii_graphic() || c == ' ' { c } else { '_' }).take(16).collect()
}

/// Coarsest digital step (µV) a lead is written with before [`coarse_leads`] speaks: each lead's 16-bit range
/// spans its own smallest to largest sample, so one artefact sample far off the ECG coarsens the whole lead.
// From memory: the AHA recommendations (Bailey et al., Circulation 1990;81:730-9) ask an amplitude resolution of
// 5 µV or finer for diagnostic ECGs.
pub const COARSE_STEP_UV: f64 = 5.0;

/// Smallest and largest finite sample of a lead, µV (`None` when it has none).
fn extent(samples: &[f32]) -> Option<(f64, f64)> {
    let (lo, hi) = samples
        .iter()
        .filter(|v| v.is_finite())
        .fold((f64::INFINITY, f64::NEG_INFINITY), |(lo, hi), &v| (lo.min(f64::from(v)), hi.max(f64::from(v))));
    (lo <= hi).then_some((lo, hi))
}

/// The leads [`write()`] would store coarser than [`COARSE_STEP_UV`] per digital step, as warnings naming the
/// lead, its range and its step: a sample far off the ECG (an artefact, a saturated amplifier) sets the range
/// and every wave of the lead loses detail. Empty when every lead keeps [`COARSE_STEP_UV`] or finer.
#[must_use]
pub fn coarse_leads(rec: &Recording) -> Vec<String> {
    rec.leads
        .iter()
        .filter_map(|l| {
            let (lo, hi) = extent(&l.samples)?;
            let step = (hi - lo) / f64::from(DIG_MAX - DIG_MIN);
            (step > COARSE_STEP_UV).then(|| {
                format!(
                    "lead {}: its samples span {:.1} to {:.1} mV, which leaves {step:.0} µV per digital step in \
                     16-bit EDF ({COARSE_STEP_UV} µV or finer is usual); a sample far off the ECG sets the range. \
                     CSV keeps every value as it is",
                    l.name,
                    lo / 1000.0,
                    hi / 1000.0
                )
            })
        })
        .collect()
}

fn plan_lead(path: &Path, name: &LeadName, samples: &[f32]) -> Result<LeadPlan, ReadError> {
    let (mut lo, mut hi) = extent(samples).unwrap_or((-1.0, 1.0));
    if hi - lo < 1e-3 {
        (lo, hi) = (lo - 1.0, hi + 1.0);
    }
    let too_big = || ReadError::invalid(path, format!("lead {name}: values beyond ±10⁷ µV cannot be written to EDF"));
    let phys_min_text = bound_field(lo, 8, true).ok_or_else(too_big)?;
    let phys_max_text = bound_field(hi, 8, false).ok_or_else(too_big)?;
    let phys_min = phys_min_text.parse().map_err(|_| too_big())?;
    let phys_max = phys_max_text.parse().map_err(|_| too_big())?;
    Ok(LeadPlan { label: label(name), phys_min_text, phys_max_text, phys_min, phys_max })
}

fn field(out: &mut Vec<u8>, text: &str, width: usize) {
    let bytes: Vec<u8> = text.bytes().map(|b| if (32..127).contains(&b) { b } else { b'_' }).take(width).collect();
    out.extend(&bytes);
    out.extend(std::iter::repeat_n(b' ', width - bytes.len()));
}

/// Writes `rec` to `path` as EDF (or EDF+C when it has annotations), atomically: a temporary file in the same
/// folder, synced, then renamed over `path`. On error no file is left at `path` (an existing one is untouched).
///
/// # Errors
/// [`ReadError`] when the recording cannot be represented (no samples, a rate giving no whole number of samples
/// per data record, values beyond ±10⁷ µV) or the file cannot be written.
pub fn write(path: &Path, rec: &Recording, opts: &EdfWriteOptions) -> Result<(), ReadError> {
    let n = rec.len();
    if n == 0 || rec.leads.iter().any(|l| l.samples.len() != n) {
        return Err(ReadError::invalid(path, "nothing to write: no samples, or leads of different lengths"));
    }
    let fs = rec.sample_rate.hz();
    let (duration, spr) = record_duration(fs, rec.leads.len(), n).ok_or_else(|| {
        ReadError::unsupported(path, format!("sampling rate {fs} Hz gives no whole number of samples per data record"))
    })?;
    let n_records = n.div_ceil(spr);
    if n_records > 99_999_999 {
        return Err(ReadError::invalid(path, "more than 99 999 999 data records"));
    }
    let leads = rec.leads.iter().map(|l| plan_lead(path, &l.name, &l.samples)).collect::<Result<Vec<_>, _>>()?;

    // Annotations: each goes into the record holding its sample (the last record for any beyond the end).
    let mut by_record: Vec<(usize, usize)> =
        rec.annotations.iter().enumerate().map(|(i, a)| (((a.sample as usize) / spr).min(n_records - 1), i)).collect();
    by_record.sort_unstable();
    // De-identified: free-text annotations keep their time but not their words (see `Annotation::shareable_label`).
    let tal_of = |i: usize| {
        let a = &rec.annotations[i];
        let label = if opts.identify { &a.label } else { a.shareable_label().unwrap_or(WITHHELD_LABEL) };
        tal::annotation(a.sample as f64 / fs, a.duration_s, label)
    };
    let ann_spr = if rec.annotations.is_empty() {
        0
    } else {
        let mut per_record = vec![0usize; n_records];
        for &(r, i) in &by_record {
            per_record[r] += tal_of(i).len();
        }
        let keeping = tal::timekeeping((n_records - 1) as f64 * duration).len();
        (keeping + per_record.iter().max().copied().unwrap_or(0)).div_ceil(2)
    };

    let meta = if opts.identify { rec.meta.clone() } else { rec.meta.deidentified() };
    // De-identified: the date and the time of day withheld (01.01.85 00.00.00, the fields' value when unknown).
    let start_for_field = if opts.identify { rec.start } else { None };
    let (date, time) = meta::start_fields(start_for_field);
    let ns = leads.len() + usize::from(ann_spr > 0);
    let mut h = Vec::with_capacity(256 * (ns + 1));
    field(&mut h, "0", 8);
    field(&mut h, &meta::patient_field(&meta), 80);
    field(&mut h, &meta::recording_field(start_for_field, &meta), 80);
    field(&mut h, &date, 8);
    field(&mut h, &time, 8);
    field(&mut h, &(256 * (ns + 1)).to_string(), 8);
    field(&mut h, if ann_spr > 0 { "EDF+C" } else { "" }, 44);
    field(&mut h, &n_records.to_string(), 8);
    field(&mut h, &tal::format_time(duration, false), 8);
    field(&mut h, &ns.to_string(), 4);
    let ann = (ann_spr > 0).then_some(ann_spr);
    for l in &leads {
        field(&mut h, &l.label, 16);
    }
    ann.iter().for_each(|_| field(&mut h, ANNOTATION_LABEL, 16));
    for _ in 0..ns {
        field(&mut h, "", 80);
    }
    leads.iter().for_each(|_| field(&mut h, "uV", 8));
    ann.iter().for_each(|_| field(&mut h, "", 8));
    leads.iter().for_each(|l| field(&mut h, &l.phys_min_text, 8));
    ann.iter().for_each(|_| field(&mut h, "-1", 8));
    leads.iter().for_each(|l| field(&mut h, &l.phys_max_text, 8));
    ann.iter().for_each(|_| field(&mut h, "1", 8));
    leads.iter().for_each(|_| field(&mut h, &DIG_MIN.to_string(), 8));
    ann.iter().for_each(|_| field(&mut h, "-32768", 8));
    leads.iter().for_each(|_| field(&mut h, &DIG_MAX.to_string(), 8));
    ann.iter().for_each(|_| field(&mut h, "32767", 8));
    for _ in 0..ns {
        field(&mut h, "", 80);
    }
    leads.iter().for_each(|_| field(&mut h, &spr.to_string(), 8));
    ann.iter().for_each(|a| field(&mut h, &a.to_string(), 8));
    for _ in 0..ns {
        field(&mut h, "", 32);
    }

    write_atomic(path, |w| {
        w.write_all(&h)?;
        let mut next_ann = by_record.iter().peekable();
        let mut buf = Vec::with_capacity(2 * spr * leads.len() + 2 * ann_spr);
        for r in 0..n_records {
            buf.clear();
            for (lead, plan) in rec.leads.iter().zip(&leads) {
                let scale = f64::from(DIG_MAX - DIG_MIN) / (plan.phys_max - plan.phys_min);
                for k in r * spr..(r + 1) * spr {
                    let d = match lead.samples.get(k) {
                        Some(v) if v.is_finite() => {
                            let d = ((f64::from(*v) - plan.phys_min) * scale + f64::from(DIG_MIN)).round();
                            d.clamp(f64::from(DIG_MIN), f64::from(DIG_MAX)) as i16
                        }
                        _ => i16::MIN,
                    };
                    buf.extend(d.to_le_bytes());
                }
            }
            if ann_spr > 0 {
                let start = buf.len();
                buf.extend(tal::timekeeping(r as f64 * duration));
                while let Some(&(_, i)) = next_ann.next_if(|(rr, _)| *rr == r) {
                    buf.extend(tal_of(i));
                }
                buf.resize(start + 2 * ann_spr, 0);
            }
            w.write_all(&buf)?;
        }
        Ok(())
    })
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn a_lead_whose_range_an_artefact_widens_is_named() -> Result<(), Box<dyn std::error::Error>> {
        use crate::recording::{Lead, Meta};
        use crate::units::Hertz;
        // ±2 mV of ECG gives 0.06 µV per step; one sample at 30 000 mV (a saturated input, say) gives 458 µV.
        let ecg: Vec<f32> = (0..500).map(|k| 2000.0 * (k as f32 * 0.05).sin()).collect();
        let mut spiked = ecg.clone();
        spiked[250] = 30_000_000.0;
        let rec = Recording {
            leads: vec![
                Lead { name: LeadName::parse("I"), samples: ecg },
                Lead { name: LeadName::parse("II"), samples: spiked },
            ],
            sample_rate: Hertz::from_hz(500.0)?,
            start: None,
            meta: Meta::default(),
            annotations: Vec::new(),
        };
        let w = coarse_leads(&rec);
        assert_eq!(w.len(), 1, "{w:?}");
        assert!(w[0].starts_with("lead II:") && w[0].contains("458 µV per digital step"), "{w:?}");
        Ok(())
    }

    #[test]
    fn record_durations_give_whole_samples() {
        assert_eq!(record_duration(250.0, 3, 225_000), Some((1.0, 250)));
        assert_eq!(record_duration(360.0, 2, 650_000), Some((1.0, 360)), "no divisor: 1 s and a padded last record");
        // 38 400 samples at 1000 Hz: 0.2-s records divide them exactly (no padding); 1 s would not.
        assert_eq!(record_duration(1000.0, 15, 38_400), Some((0.2, 200)));
        // 12 leads at 5000 Hz: 1 s records would be 120 000 bytes; 0.5 s records (60 000 bytes) stay under 61 440.
        assert_eq!(record_duration(5000.0, 12, 7), Some((0.5, 2500)));
        assert_eq!(record_duration(128.5, 1, 7), Some((2.0, 257)));
        assert_eq!(record_duration(std::f64::consts::PI, 1, 7), None);
    }
}
