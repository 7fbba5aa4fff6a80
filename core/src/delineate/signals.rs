//! Signals shared by the boundary finders: each lead low-passed for the QRS (40 Hz) and for P and T (12 Hz),
//! the multi-lead QRS slope envelope, and the pacing spikes found in the unfiltered leads. Every signal here is
//! made from the leads with their pacing spikes bridged ([`without_spikes`]); the spikes' places are kept.

use std::borrow::Cow;
use std::ops::Range;

use crate::filter::{Biquad, bridged, fill_invalid, filtfilt};
use crate::gaps;

/// Low-pass cutoff for QRS boundaries, Hz.
const QRS_LP_HZ: f64 = 40.0;
/// Most a lead's slope is raised relative to the lead with the steepest QRS when the leads are equalised.
// Common practice, no source.
const MAX_GAIN: f32 = 4.0;
/// A pacing spike departs from the lead's running median (over [`SPIKE_MEDIAN_S`]) by more than this many times
/// the lead's 99th percentile sample-to-sample step.
// Common practice, no source: a pacemaker stimulus artefact is a step of a few mV within one or two samples, far
// steeper than any QRS limb, and a short running median ignores it.
const SPIKE_FACTOR: f64 = 4.0;
/// Running median window for the pacing spike test, s.
// Common practice, no source: stimulus artefacts last under ≈ 2 ms; 10 ms spans them and keeps QRS limbs.
const SPIKE_MEDIAN_S: f64 = 0.010;
/// Low-pass cutoff for P and T waves, Hz.
const WAVE_LP_HZ: f64 = 12.0;

/// Prepared signals of a multi-lead recording (or of a representative beat); `'a` is the life of the leads
/// given to [`Signals::new`], which `wide` borrows when they hold no invalid sample and no pacing spike.
pub struct Signals<'a> {
    /// Sampling rate, Hz.
    pub fs: f64,
    /// Each lead low-passed at 40 Hz, µV.
    pub qrs: Vec<Vec<f32>>,
    /// Each lead low-passed at 12 Hz, µV.
    pub slow: Vec<Vec<f32>>,
    /// Each lead as given (no low-pass; invalid samples interpolated, pacing spikes bridged), µV: where a lead is
    /// clean it shows the instant a wave leaves the baseline, which the zero-phase low-pass spreads a few samples
    /// either way. Borrowed from the caller's leads unless a lead has samples to interpolate or bridge (no copy
    /// of a 24-h recording).
    pub wide: Vec<Cow<'a, [f32]>>,
    /// Largest over the leads of |slope| of the 40 Hz signals, each lead divided by its typical QRS slope (so
    /// the first lead to start and the last to finish set the edges), smoothed over ≈ 10 ms. Dimensionless.
    pub env: Vec<f32>,
    /// Stretches where no lead has a valid sample (see [`crate::gaps`]): no boundary is sought across one.
    pub gaps: Vec<Range<usize>>,
    /// Per lead, its runs of [`gaps::ABSENT_RUN_S`] or more of invalid samples (bridged by interpolation in the
    /// leads above): a wave model read from many beats leaves the lead out of a beat where it was not recorded.
    pub absent: Vec<Vec<Range<usize>>>,
    /// Pacing spikes: sorted sample indices where any unfiltered lead jumps away from and back to its local
    /// level within a few samples (see `pacing_spikes`).
    pub spikes: Vec<usize>,
}

impl<'a> Signals<'a> {
    /// Prepares `leads` (µV, NaN = invalid; interpolated here, and pacing spikes bridged).
    #[must_use]
    pub fn new(leads: &[&'a [f32]], fs: f64) -> Self {
        let n = leads.first().map_or(0, |l| l.len());
        let pad = (fs * 0.3) as usize;
        let lp_q = [Biquad::lowpass(QRS_LP_HZ.min(fs * 0.45), fs)];
        let lp_w = [Biquad::lowpass(WAVE_LP_HZ, fs)];
        let mut qrs = Vec::with_capacity(leads.len());
        let mut slow = Vec::with_capacity(leads.len());
        let mut wide = Vec::with_capacity(leads.len());
        let mut spikes = Vec::new();
        let absent = leads.iter().map(|l| gaps::absent_runs(l, fs)).collect();
        for &lead in leads {
            let filled = fill_invalid(lead);
            let own = pacing_spikes(&filled, fs);
            let x = without_spikes(&filled, &own, |v| v);
            qrs.push(filtfilt(&lp_q, &x, pad).into_iter().map(|v| v as f32).collect::<Vec<f32>>());
            slow.push(filtfilt(&lp_w, &x, pad).into_iter().map(|v| v as f32).collect());
            wide.push(if own.is_empty() && lead.iter().all(|v| v.is_finite()) {
                Cow::Borrowed(lead)
            } else {
                Cow::Owned(x.iter().map(|&v| v as f32).collect())
            });
            spikes.extend(own);
        }
        // Each lead's slope in units of its typical QRS slope; a lead with a small QRS is raised at most
        // MAX_GAIN times relative to the largest, so its noise cannot start the QRS early.
        let scales: Vec<f32> = qrs.iter().map(|q| slope_scale(q)).collect();
        let top = scales.iter().copied().fold(0.0f32, f32::max);
        let mut raw_env = vec![0.0f32; n];
        for (q, &scale) in qrs.iter().zip(&scales) {
            let scale = scale.max(top / MAX_GAIN);
            if scale > 0.0 {
                let inv = 1.0 / scale;
                for k in 1..n.saturating_sub(1) {
                    raw_env[k] = raw_env[k].max(((q[k + 1] - q[k - 1]) * 0.5).abs() * inv);
                }
            }
        }
        let w = ((0.010 * fs).round() as usize).max(1) | 1;
        spikes.sort_unstable();
        spikes.dedup();
        Self { fs, qrs, slow, wide, env: smooth(&raw_env, w), gaps: gaps::find(leads, fs), absent, spikes }
    }

    /// Number of samples.
    #[must_use]
    pub fn len(&self) -> usize {
        self.env.len()
    }

    /// True when there are no samples.
    #[must_use]
    pub fn is_empty(&self) -> bool {
        self.env.is_empty()
    }

    /// True when samples `a..b` overlap a stretch where no lead was recorded: a boundary sought there could lie
    /// inside it, on interpolated samples.
    #[must_use]
    pub fn bridged(&self, a: usize, b: usize) -> bool {
        gaps::overlaps(&self.gaps, a, b)
    }

    /// True when lead `lead` has a run of missing samples ([`Self::absent`]) overlapping samples `a..b`.
    #[must_use]
    pub fn lead_absent(&self, lead: usize, a: usize, b: usize) -> bool {
        self.absent.get(lead).is_some_and(|runs| gaps::overlaps(runs, a, b))
    }

    /// Samples in `s` seconds (rounded).
    #[must_use]
    pub fn samples(&self, s: f64) -> usize {
        (s * self.fs).round() as usize
    }
}

/// Centred moving average over an odd `w` samples.
pub fn smooth(x: &[f32], w: usize) -> Vec<f32> {
    let n = x.len();
    let h = w / 2;
    let mut prefix = Vec::with_capacity(n + 1);
    prefix.push(0.0f64);
    let mut acc = 0.0f64;
    for &v in x {
        acc += f64::from(v);
        prefix.push(acc);
    }
    (0..n)
        .map(|k| {
            let (a, b) = (k.saturating_sub(h), (k + h + 1).min(n));
            ((prefix[b] - prefix[a]) / (b - a) as f64) as f32
        })
        .collect()
}

/// A lead's typical QRS slope: the 99th percentile of |slope| (QRS complexes fill ≈ 10 % of a recording).
fn slope_scale(q: &[f32]) -> f32 {
    let step = (q.len() / 100_000).max(1);
    let mut v: Vec<f32> =
        (1..q.len().saturating_sub(1)).step_by(step).map(|k| ((q[k + 1] - q[k - 1]) * 0.5).abs()).collect();
    if v.is_empty() {
        return 0.0;
    }
    let idx = (v.len() * 99 / 100).min(v.len() - 1);
    *v.select_nth_unstable_by(idx, f32::total_cmp).1
}

/// `x` with each of its pacing `spikes` (sorted sample indices) and the sample on either side bridged by a
/// straight line. A low-pass spreads a spike of a few samples into a bump of tens of ms and tens of µV, the size
/// of a P wave, and the P wave's edges are found on the 40 Hz and unfiltered leads too: LUDB 45 (ventricular
/// pacing, no P wave marked by the experts) read P waves of 204 ms, their ends on the spike before each QRS, and
/// PR 224 ms; now no P wave, as the experts. On LUDB 8 and 15 one T end moves 1–4 samples; on the other shared
/// records nothing moves. `from_f64` turns a bridged value back into a sample.
fn without_spikes<'x, T: Copy + Into<f64>>(x: &'x [T], spikes: &[usize], from_f64: fn(f64) -> T) -> Cow<'x, [T]> {
    if spikes.is_empty() {
        return Cow::Borrowed(x);
    }
    let n = x.len();
    // Each spike with a sample on either side, overlapping ones merged.
    let mut covered: Vec<Range<usize>> = Vec::new();
    for &k in spikes {
        let run = k.saturating_sub(1)..(k + 2).min(n);
        match covered.last_mut() {
            Some(last) if run.start <= last.end => last.end = last.end.max(run.end),
            _ => covered.push(run),
        }
    }
    let mut y = x.to_vec();
    for run in covered {
        for k in run.clone() {
            y[k] = from_f64(bridged(x, &run, k));
        }
    }
    Cow::Owned(y)
}

/// Pacing spikes of one unfiltered lead `x` (µV) at `fs` Hz: samples that stand more than [`SPIKE_FACTOR`] times
/// the lead's 99th percentile sample-to-sample step away from the running median over [`SPIKE_MEDIAN_S`] (a
/// spike of one or two samples; a QRS limb, however steep, follows the median). Only samples next to such a step
/// are tested, so a long recording costs one pass. Invalid samples (NaN) are no spikes and are left out of the
/// percentile and the medians.
pub fn pacing_spikes<T: Copy + Into<f64>>(x: &[T], fs: f64) -> Vec<usize> {
    spikes_among(x, fs, 100_000)
}

/// Neighbouring pairs the beat detector's spike test reads the lead's typical step from ([`despiked`]): fewer
/// than [`pacing_spikes`] reads for the boundaries, as the detector passes over every window of a 24-h recording
/// (the 99th percentile of 10 000 steps is as steady for a limit four times above it; reading up to 100 000 cost
/// the 24-h detection 0.08 s on one core).
const DETECTOR_STEP_PAIRS: usize = 10_000;

/// [`pacing_spikes`] with the typical step read from about `pairs` neighbouring pairs spread over the lead.
fn spikes_among<T: Copy + Into<f64>>(x: &[T], fs: f64, pairs: usize) -> Vec<usize> {
    let n = x.len();
    if n < 3 {
        return Vec::new();
    }
    let v = |k: usize| -> f64 { x[k].into() };
    let step = (n / pairs).max(1);
    let mut d: Vec<f64> = (1..n).step_by(step).map(|k| (v(k) - v(k - 1)).abs()).filter(|d| d.is_finite()).collect();
    if d.is_empty() {
        return Vec::new();
    }
    let idx = (d.len() * 99 / 100).min(d.len() - 1);
    let limit = SPIKE_FACTOR * *d.select_nth_unstable_by(idx, f64::total_cmp).1;
    if limit <= 0.0 {
        return Vec::new();
    }
    let h = ((SPIKE_MEDIAN_S * fs).round() as usize / 2).max(1);
    let mut buf = Vec::with_capacity(2 * h + 1);
    // Samples on either side of a step above the limit, each once, in order (one difference per pair).
    let mut candidates = Vec::new();
    for (i, w) in x.windows(2).enumerate() {
        let (a, b): (f64, f64) = (w[0].into(), w[1].into());
        if (b - a).abs() > limit {
            let k = i + 1;
            if candidates.last() != Some(&i) && i > 0 {
                candidates.push(i);
            }
            candidates.push(k);
        }
    }
    candidates
        .into_iter()
        .filter(|&k| {
            buf.clear();
            buf.extend((k.saturating_sub(h)..(k + h + 1).min(n)).map(v).filter(|v| v.is_finite()));
            if buf.is_empty() {
                return false;
            }
            let mid = buf.len() / 2;
            (v(k) - *buf.select_nth_unstable_by(mid, f64::total_cmp).1).abs() > limit
        })
        .collect()
}

/// Lead `x` (µV, NaN = invalid) at `fs` Hz with its spikes of one or two samples (`pacing_spikes`) bridged as
/// [`Signals`] bridges them, for the beat detector: a stimulus or a glitch of a few mV in one sample otherwise
/// counts as the lead's largest QRS energy (15 single-sample spikes of 8 mV in a 10-s recording: the typical QRS
/// height read from the spikes, 2 of 12 beats missed, R placed on T waves). Borrowed when there is none.
#[must_use]
pub fn despiked(x: &[f32], fs: f64) -> Cow<'_, [f32]> {
    without_spikes(x, &spikes_among(x, fs, DETECTOR_STEP_PAIRS), |v| v as f32)
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn pacing_spikes_are_bridged_with_a_sample_either_side() {
        // A two-sample spike at 4–5 on a ramp: samples 3–6 lie on the straight line from 2 to 7 again. A spike at
        // the first sample is held at the first value after it; no spike, no copy.
        let mut x: Vec<f64> = (0..10).map(f64::from).collect();
        x[4] += 1000.0;
        x[5] += 1000.0;
        let y = without_spikes(&x, &[4, 5], |v| v);
        assert_eq!(y.as_ref(), (0..10).map(f64::from).collect::<Vec<_>>().as_slice());
        let mut z = vec![5.0; 6];
        z[0] = 900.0;
        assert_eq!(without_spikes(&z, &[0], |v| v).as_ref(), &[5.0; 6]);
        assert!(matches!(without_spikes(&x, &[], |v| v), Cow::Borrowed(_)));
        // The spike test finds the two samples themselves on a steady lead (4 s at 500 Hz).
        let mut flat: Vec<f64> = (0..2000).map(|k| f64::from(k % 3)).collect();
        flat[1000] = 2000.0;
        flat[1001] = 2000.0;
        assert_eq!(pacing_spikes(&flat, 500.0), vec![1000, 1001]);
    }
}
