//! One lead of samples, and what can be read from it alone: whether it is flat or clipped.

use super::LeadName;

/// One lead: a name and its samples in microvolts. An invalid or missing sample is `f32::NAN`.
#[derive(Debug, Clone, PartialEq)]
pub struct Lead {
    /// The lead's name.
    pub name: LeadName,
    /// Samples in µV, one per sampling period.
    pub samples: Vec<f32>,
}

/// A lead spanning less than this (µV, 0.5th to 99.5th percentile) is flat: no ECG lead is, even one at right
/// angles to the heart's axis (its P and T waves and noise span tens of µV); a lead whose electrode is off, or a
/// channel held at one level, is.
// Common practice, no source: well under one digital step of most ECG recorders (0.5–5 µV).
pub const FLAT_UV: f32 = 1.0;

/// A lead is clipped where it holds its own largest or smallest value unchanged for at least this long, s (and at
/// least 3 samples), in at least [`CLIPPED_RUNS`] places: a recorder at the end of its range (or a file writer
/// cutting values to its field) holds every wave that passes the limit at the limit, while a wave's own peak
/// changes within a few ms and peaks of different beats differ by a digital step or more.
// Common practice, no source. Measured on the shared records (LUDB 1–50, QT Database, MIT-BIH 100, PTB s0010): no
// lead of them is clipped by this rule (test `clipped_leads_are_noted`).
pub(super) const CLIPPED_RUN_S: f64 = 0.010;
/// Fewest separate runs at the extreme value for a lead to count as clipped (see `CLIPPED_RUN_S`).
const CLIPPED_RUNS: usize = 3;
/// Longest run at the extreme value counted, s: a QRS cut off at a limit stays there for less than the QRS lasts;
/// a calibration pulse (1 mV for 200 ms, references.md §1) is no clipping.
// Common practice, no source.
const CLIPPED_RUN_MAX_S: f64 = 0.150;
/// A wave cut off at the limit reaches it and leaves it by at least this many digital steps from one sample to
/// the next.
// Common practice, no source. Measured (helper's review): a 60-s demo rounded to 10 or 20 µV, whose largest wave
// in V3 is the broad T wave, held +0.33 mV in 36 / 72 places, each reached one step at a time.
const CLIPPED_STEP_QUANTA: f32 = 3.0;
/// A clipping level lies at least this share of the lead's whole range from its median.
// Common practice, no source.
const FAR_FROM_MEDIAN: f32 = 0.4;

/// Where a lead is clipped: the level it is held at (µV) and in how many places, on each side that is.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Clipping {
    /// Level of the largest value and the number of runs held there, when clipped at the top.
    pub top: Option<(f32, usize)>,
    /// Level of the smallest value and the number of runs held there, when clipped at the bottom.
    pub bottom: Option<(f32, usize)>,
}

impl Lead {
    /// True when the lead is flat (see [`FLAT_UV`]), or holds no valid sample.
    #[must_use]
    pub fn is_flat(&self) -> bool {
        robust_span(&self.samples).is_none_or(|s| s < FLAT_UV)
    }

    /// Where the lead, sampled at `fs` Hz, is clipped (see `CLIPPED_RUN_S`); `None` when it is not, or is flat.
    #[must_use]
    pub fn clipping(&self, fs: f64) -> Option<Clipping> {
        if self.is_flat() {
            return None;
        }
        let x = &self.samples;
        let finite = x.iter().copied().filter(|v| v.is_finite());
        let (lo, hi) = finite.fold((f32::INFINITY, f32::NEG_INFINITY), |(lo, hi), v| (lo.min(v), hi.max(v)));
        let min_len = ((CLIPPED_RUN_S * fs).round() as usize).max(3);
        // The limit lies far from where the lead usually is: a lead without a wave below its baseline (a clean or
        // coarsely sampled one) holds its smallest value between every two beats, and is not clipped there.
        let step = (x.len() / 100_000).max(1);
        let mut typical: Vec<f32> = x.iter().step_by(step).copied().filter(|v| v.is_finite()).collect();
        let mid = typical.len() / 2;
        let median = *typical.select_nth_unstable_by(mid, f32::total_cmp).1;
        let far = |level: f32| (level - median).abs() >= FAR_FROM_MEDIAN * (hi - lo);
        let max_len = (CLIPPED_RUN_MAX_S * fs).round() as usize;
        // The lead's digital step: the smallest change between neighbouring samples (of up to 100 000 pairs).
        let quantum = x
            .windows(2)
            .step_by(step)
            .map(|w| (w[1] - w[0]).abs())
            .filter(|d| d.is_finite() && *d > 0.0)
            .fold(f32::INFINITY, f32::min);
        // A wave cut off at the limit arrives and leaves by a step of several digital steps; a broad wave's own
        // top (a T wave on a coarse recorder) creeps up and down one step at a time.
        let steep = |v: Option<&f32>, level: f32| v.is_some_and(|v| (v - level).abs() >= CLIPPED_STEP_QUANTA * quantum);
        let runs_at = |level: f32| {
            if !far(level) {
                return None;
            }
            let (mut runs, mut start) = (0, None);
            for (k, &v) in x.iter().chain(std::iter::once(&f32::NAN)).enumerate() {
                match (v == level, start) {
                    (true, None) => start = Some(k),
                    (false, Some(a)) => {
                        let len = k - a;
                        let ends_steep = a > 0 && steep(x.get(a - 1), level) && steep(x.get(k), level);
                        runs += usize::from((min_len..=max_len).contains(&len) && ends_steep);
                        start = None;
                    }
                    _ => {}
                }
            }
            (runs >= CLIPPED_RUNS).then_some((level, runs))
        };
        let (top, bottom) = (runs_at(hi), runs_at(lo));
        (top.is_some() || bottom.is_some()).then_some(Clipping { top, bottom })
    }
}

/// The span of `x` from its 0.5th to its 99.5th percentile (valid samples; at most about 100 000 of them, evenly
/// spread, so a 24-hour recording costs no more than a short one). `None` without a valid sample.
pub(super) fn robust_span(x: &[f32]) -> Option<f32> {
    let step = (x.len() / 100_000).max(1);
    let mut v: Vec<f32> = x.iter().step_by(step).copied().filter(|v| v.is_finite()).collect();
    if v.is_empty() {
        return None;
    }
    let (lo, hi) = (v.len() / 200, (v.len() - 1) - v.len() / 200);
    let low = *v.select_nth_unstable_by(lo, f32::total_cmp).1;
    let high = *v.select_nth_unstable_by(hi, f32::total_cmp).1;
    Some(high - low)
}
