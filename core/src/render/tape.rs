//! The Tape's envelope: a whole recording's lead reduced to the smallest and largest sample of equal time
//! buckets, so a view can draw hours of signal in one strip (as [`super::decimate_min_max`] does per pixel column
//! for the Sheet).

use crate::analysis::Span;
use crate::recording::Recording;

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
const TAPE_BUCKETS: usize = 4096;

impl TapeEnvelope {
    /// Envelope of `lead` in at most 4096 buckets (`TAPE_BUCKETS`). Cost: one pass over the samples.
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
fn min_max(xs: &[f32]) -> (f32, f32) {
    let (mut lo, mut hi) = (f32::INFINITY, f32::NEG_INFINITY);
    for &x in xs {
        if x.is_finite() {
            lo = lo.min(x);
            hi = hi.max(x);
        }
    }
    if lo > hi { (f32::NAN, f32::NAN) } else { (lo, hi) }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::recording::{Lead, LeadName, Meta};
    use crate::units::Hertz;

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
                Lead { name: LeadName::parse("I"), samples: vec![0.0; n] },
                Lead { name: LeadName::parse("II"), samples },
            ],
            sample_rate: Hertz::from_hz(50.0).unwrap_or_else(|_| unreachable!()),
            start: None,
            meta: Meta::default(),
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
}
