//! Data derived from the open recording for the views: the Tape envelope, the heart-rate trend, and beats from
//! the recording's own annotations (used only when the detector finds none).

use std::ops::Range;

use isoline_core::analysis::Span;
use isoline_core::beat::{Beat, BeatKind};
use isoline_core::io::wfdb_annotations::is_beat;
use isoline_core::measure::hrv;
use isoline_core::recording::{Annotation, Recording};
use isoline_core::units::Hertz;

/// Whole-recording min/max envelope of one lead, in equal time buckets.
#[derive(Debug, Clone, Default, PartialEq)]
pub struct TapeEnvelope {
    /// Index of the lead in `Recording::leads`.
    pub lead: usize,
    /// Seconds per bucket.
    pub bucket_s: f64,
    /// Smallest sample of each bucket, µV (NaN where the bucket holds no valid sample).
    pub min: Vec<f32>,
    /// Largest sample of each bucket, µV (NaN where the bucket holds no valid sample).
    pub max: Vec<f32>,
}

/// Largest number of buckets in the Tape envelope: far more than any screen is wide.
pub const TAPE_BUCKETS: usize = 4096;

impl TapeEnvelope {
    /// Envelope of `lead` in at most [`TAPE_BUCKETS`] buckets. Cost: one pass over the samples.
    #[must_use]
    pub fn new(recording: &Recording, lead: usize) -> Self {
        let Some(samples) = recording.leads.get(lead).map(|l| l.samples.as_slice()) else {
            return Self::default();
        };
        if samples.is_empty() {
            return Self { lead, ..Self::default() };
        }
        let per = samples.len().div_ceil(TAPE_BUCKETS).max(1);
        let (min, max): (Vec<f32>, Vec<f32>) = samples.chunks(per).map(min_max).unzip();
        Self { lead, bucket_s: per as f64 / recording.sample_rate.hz(), min, max }
    }

    /// The same envelope as [`TapeEnvelope::new`] of a signal never held whole: `span(a, b)` gives its samples
    /// `a..b` (e.g. a long recording filtered span by span), asked for in spans of whole buckets of
    /// `SPAN_S` or more. `recording` gives the length and rate.
    #[must_use]
    pub fn from_spans(recording: &Recording, lead: usize, mut span: impl FnMut(usize, usize) -> Span) -> Self {
        let n = recording.len();
        if lead >= recording.leads.len() || n == 0 {
            return Self { lead, ..Self::default() };
        }
        let fs = recording.sample_rate.hz();
        let per = n.div_ceil(TAPE_BUCKETS).max(1);
        let step = per * ((SPAN_S * fs) as usize).div_ceil(per).max(1);
        let (mut min, mut max) = (Vec::with_capacity(TAPE_BUCKETS), Vec::with_capacity(TAPE_BUCKETS));
        for a in (0..n).step_by(step) {
            let part = span(a, (a + step).min(n));
            let samples = part.recording.leads.get(lead).map_or(&[][..], |l| l.samples.as_slice());
            for (lo, hi) in samples.chunks(per).map(min_max) {
                min.push(lo);
                max.push(hi);
            }
        }
        Self { lead, bucket_s: per as f64 / fs, min, max }
    }
}

/// Length of the spans [`TapeEnvelope::from_spans`] asks for, s: long enough that the margins filtered with
/// each span cost little beside it.
const SPAN_S: f64 = 600.0;

/// Smallest and largest finite value of a slice (NaN, NaN when there is none: nothing was recorded there).
#[must_use]
pub fn min_max(xs: &[f32]) -> (f32, f32) {
    let (mut lo, mut hi) = (f32::INFINITY, f32::NEG_INFINITY);
    for &x in xs {
        if x.is_finite() {
            lo = lo.min(x);
            hi = hi.max(x);
        }
    }
    if lo > hi { (f32::NAN, f32::NAN) } else { (lo, hi) }
}

/// Whether a WFDB annotation label marks a beat, and of which kind. Normal and bundle-branch beats count as
/// dominant; premature, escape, fusion, paced and unclassifiable beats as other; rhythm and signal notes are
/// not beats.
///
/// Source: PhysioNet WFDB annotation codes (ecgcodes.h), MIT-BIH Arrhythmia Database directory of records.
#[must_use]
pub fn beat_kind_from_label(label: &str) -> Option<BeatKind> {
    if !is_beat(label) {
        return None;
    }
    Some(if matches!(label, "N" | "L" | "R" | "B") { BeatKind::Dominant } else { BeatKind::Other })
}

/// Beats from the recording's beat annotations, in time order.
#[must_use]
pub fn beats_from_annotations(annotations: &[Annotation], len: usize) -> Vec<Beat> {
    let mut beats: Vec<Beat> = annotations
        .iter()
        .filter_map(|a| {
            let kind = beat_kind_from_label(&a.label)?;
            let r = usize::try_from(a.sample).ok().filter(|&r| r < len)?;
            Some(Beat::at(r, kind))
        })
        .collect();
    beats.sort_by_key(|b| b.r);
    beats
}

/// Heart-rate trend points `(time of the second beat in s, 60000 / RR ms)` for consecutive dominant beats, in
/// runs: a run breaks where another beat interrupts the dominant beats, or at a gap of the recording (`gaps`,
/// see [`isoline_core::Recording::gaps`]; also within 200 ms of either beat, [`isoline_core::gaps::breaks_rr`]),
/// so the trend is not drawn across a premature beat and its pause, or across time nothing was recorded, as if a
/// rate had been measured there.
///
/// Source: references.md §10 (HR = 60 / RR in s).
#[must_use]
pub fn rate_trend(beats: &[Beat], fs: Hertz, gaps: &[Range<usize>]) -> Vec<Vec<[f64; 2]>> {
    let rate_hz = fs.hz();
    hrv::nn_pairs(beats, fs, gaps)
        .into_iter()
        .map(|run| {
            run.into_iter().map(|(a, b)| [b as f64 / rate_hz, 60_000.0 / ((b - a) as f64 * 1000.0 / rate_hz)]).collect()
        })
        .collect()
}

/// Median RR of consecutive dominant beats (the NN intervals of [`hrv::nn_pairs`], none across or next to `gaps`),
/// ms.
#[must_use]
pub fn median_rr_ms(beats: &[Beat], fs: Hertz, gaps: &[Range<usize>]) -> Option<f64> {
    let mut rr: Vec<f64> =
        hrv::nn_pairs(beats, fs, gaps).into_iter().flatten().map(|(a, b)| fs.ms_from_samples((b - a) as f64)).collect();
    median(&mut rr)
}

fn median(xs: &mut [f64]) -> Option<f64> {
    if xs.is_empty() {
        return None;
    }
    xs.sort_by(f64::total_cmp);
    let n = xs.len();
    Some(if n % 2 == 1 { xs[n / 2] } else { (xs[n / 2 - 1] + xs[n / 2]) / 2.0 })
}

#[cfg(test)]
mod tests {
    use super::*;
    use isoline_core::LeadName;

    #[test]
    fn min_max_matches_sorting() {
        let xs = [3.0, -1.0, f32::NAN, 7.5, 0.0];
        assert_eq!(min_max(&xs), (-1.0, 7.5));
        let (lo, hi) = min_max(&[f32::NAN]);
        assert!(lo.is_nan() && hi.is_nan() && min_max(&[]).0.is_nan());
    }

    #[test]
    fn envelope_from_spans_is_the_envelope_of_the_whole_signal() {
        // 2 h at 50 Hz (360 000 samples, 88 per bucket): the spans of whole buckets give the same envelope as
        // one pass over the whole lead, whatever the span boundaries.
        let n = 360_000;
        let samples: Vec<f32> = (0..n).map(|k| ((k * 7919) % 1000) as f32 - 500.0 + (k / 3000) as f32).collect();
        let rec = Recording {
            leads: vec![
                isoline_core::recording::Lead { name: LeadName::parse("I"), samples: vec![0.0; n] },
                isoline_core::recording::Lead { name: LeadName::parse("II"), samples },
            ],
            sample_rate: Hertz::from_hz(50.0).unwrap_or_else(|_| unreachable!()),
            start: None,
            meta: isoline_core::recording::Meta::default(),
            annotations: Vec::new(),
        };
        let mut asked = Vec::new();
        let spans = TapeEnvelope::from_spans(&rec, 1, |a, b| {
            asked.push((a, b));
            Span::cut(&rec, a, b)
        });
        assert_eq!(spans, TapeEnvelope::new(&rec, 1));
        assert!(asked.len() > 1 && asked.windows(2).all(|w| w[0].1 == w[1].0), "{asked:?}");
        assert_eq!(TapeEnvelope::from_spans(&rec, 2, |a, b| Span::cut(&rec, a, b)).min.len(), 0, "no such lead");
    }

    fn hz500() -> Hertz {
        Hertz::from_hz(500.0).unwrap_or_else(|_| unreachable!())
    }

    #[test]
    fn rate_trend_uses_dominant_pairs() {
        let beats =
            [Beat::at(0, BeatKind::Dominant), Beat::at(400, BeatKind::Dominant), Beat::at(600, BeatKind::Other)];
        let t = rate_trend(&beats, hz500(), &[]);
        // 400 samples at 500 Hz = 800 ms -> 75 bpm (references.md §10).
        assert_eq!(t.len(), 1);
        assert_eq!(t[0].len(), 1);
        assert!((t[0][0][1] - 75.0).abs() < 1e-9);
        assert_eq!(median_rr_ms(&beats, hz500(), &[]), Some(800.0));
    }

    #[test]
    fn rate_trend_breaks_at_other_beats() {
        // Dominant every 400 samples with one premature other beat between the third and fourth: two runs, the
        // second starting after the beat that follows the premature one.
        let kinds = [(0, true), (400, true), (800, true), (1000, false), (1600, true), (2000, true), (2400, true)];
        let beats: Vec<Beat> =
            kinds.iter().map(|&(r, d)| Beat::at(r, if d { BeatKind::Dominant } else { BeatKind::Other })).collect();
        let t = rate_trend(&beats, hz500(), &[]);
        let times: Vec<Vec<f64>> = t.iter().map(|run| run.iter().map(|p| p[0]).collect()).collect();
        assert_eq!(times, [vec![0.8, 1.6], vec![4.0, 4.8]]);
    }
}
