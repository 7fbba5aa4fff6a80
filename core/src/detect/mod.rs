//! Beat detection: a multi-lead QRS detector in the family of Pan & Tompkins (IEEE Trans Biomed Eng
//! 1985;32:230-6), R peaks placed on the signal, beats typed dominant or other, and the RR series.

mod feature;
mod peaks;
mod t_wave;
mod typing;

pub use typing::correlation;
pub(crate) use typing::{ALIGN_S, WIN_S, matching_shift, push_levelled, smooth_half};

use std::ops::Range;

use crate::beat::{Beat, BeatKind};
use crate::gaps;
use crate::recording::Recording;
use crate::units::Hertz;

/// Half-width of the R peak search around the QRS middle found by the feature, s.
pub const R_SEARCH_S: f64 = 0.100;

/// A QRS has a steep limb: the steepest slope within 50 ms of a beat's R peak (over the leads with a QRS, each
/// averaged over 10 ms and the slope taken over 16 ms, see [`qrs_slopes`]) must reach this, µV/s, or what was
/// found is no QRS and no beat. P waves alone (ventricular standstill) were read as a regular rhythm at 75 bpm with
/// a QRS of 104 ms.
// Common practice, no source: a P or T wave rises a few tenths of a mV in 50–150 ms (2–7 mV/s); a QRS, even of
// low voltage, at least 0.3 mV in 30 ms (10 mV/s). Measured on the shared real records (LUDB 1–50, QT Database,
// MIT-BIH 100): the slowest beat 13.8 mV/s (LUDB 34, whose beats' median is 15.7); P waves alone with 15 µV of
// white noise give no beat, with 30 µV eight of twelve.
const MIN_QRS_SLOPE_UV_PER_S: f64 = 8000.0;

/// Detects beats on every lead together. Returns R peaks in time order with their kind; boundaries are
/// empty (see [`crate::delineate::delineate_beats`]). Works on raw or filtered recordings (it band-passes
/// internally); a flat or noise-only lead gets no weight.
#[must_use]
pub fn detect_beats(recording: &Recording) -> Vec<Beat> {
    let fs = recording.sample_rate.hz();
    if recording.len() < (fs * 0.5) as usize {
        return Vec::new();
    }
    let leads: Vec<&[f32]> = recording.leads.iter().map(|l| l.samples.as_slice()).collect();
    // QRS energy and shape are judged with spikes of one or two samples (pacing stimuli, glitches) bridged; R
    // peaks and QRS slopes are read on the leads as given (a running median there ignores spikes, and a paced
    // beat's stimulus is part of it: bridged, one beat of paced LUDB 34 was placed 100 ms off and lost).
    let despiked: Vec<std::borrow::Cow<'_, [f32]>> =
        recording.leads.iter().map(|l| crate::delineate::despiked(&l.samples, fs)).collect();
    let clean: Vec<&[f32]> = despiked.iter().map(AsRef::as_ref).collect();
    let f = feature::features(&clean, fs);
    if f.weights.iter().all(|&w| w == 0.0) {
        return Vec::new();
    }
    let clean_with_qrs = with_qrs(&clean, &f.weights);
    let mut t_wave = t_wave::TWaveTest::new(&clean_with_qrs, fs, (feature::lag_s() * fs).round() as usize);
    let peaks = peaks::pick(&f.combined, fs, |beats, c| t_wave.is_rounded(beats, c));
    let gaps = gaps::find(&leads, fs);
    let (r, unsure): (Vec<usize>, Vec<bool>) = place_r(&leads, &f.weights, &peaks, fs, &gaps).into_iter().unzip();
    // Peaks without a QRS's steep limb (P or T waves taken for beats where no QRS follows) are no beats.
    let steep: Vec<bool> =
        qrs_slopes(&with_qrs(&leads, &f.weights), &r, fs).iter().map(|&s| s >= MIN_QRS_SLOPE_UV_PER_S).collect();
    let (r, unsure): (Vec<usize>, Vec<bool>) =
        r.into_iter().zip(unsure).zip(&steep).filter(|(_, s)| **s).map(|(b, _)| b).unzip();
    let dominant = typing::dominant(&clean, &f.weights, &r, &unsure, fs, &gaps);
    r.iter().zip(dominant).map(|(&p, d)| Beat::at(p, if d { BeatKind::Dominant } else { BeatKind::Other })).collect()
}

/// The leads of `leads` with a QRS (a feature weight above 0 in `weights`).
fn with_qrs<'a>(leads: &[&'a [f32]], weights: &[f64]) -> Vec<&'a [f32]> {
    leads.iter().zip(weights).filter(|(_, w)| **w > 0.0).map(|(x, _)| *x).collect()
}

/// For each R peak of `r`, the steepest slope within 50 ms of it over `leads` (those with a QRS), µV/s: each lead
/// is averaged over about 10 ms, and the slope taken over 16 ms (the difference of the averages 8 ms either
/// side). A QRS limb keeps most of its slope; white noise of 15 µV at 500 Hz reads under 1 mV/s instead of about 3
/// sample to sample, so that noise on P waves alone does not lift them to a QRS's slope.
// Not inlined: inlined into `detect_beats`, it slowed the whole detector by a quarter (24-h 3-lead detection on one
// core 1.68 → 2.10 s, LUDB 1 full analysis 11.6 → 16.7 ms), though it costs a few milliseconds itself.
#[inline(never)]
fn qrs_slopes(leads: &[&[f32]], r: &[usize], fs: f64) -> Vec<f64> {
    let h = ((0.008 * fs).round() as usize).max(1);
    let m = ((0.010 * fs).round() as usize / 2).max(1); // half-width of the average
    let reach = (0.050 * fs).round() as usize;
    let mut avg = Vec::new();
    r.iter()
        .map(|&p| {
            let mut steepest = 0.0f64;
            for x in leads {
                // Averages of 2m + 1 samples centred on a..b (running sum), then slopes between averages 2h apart.
                let (a, b) = (p.saturating_sub(reach + h + m), (p + reach + h + m + 1).min(x.len()));
                if b < a + 2 * m + 2 * h + 2 {
                    continue;
                }
                // The running sum holds the valid samples; an average with an invalid sample in it is NaN (a lost
                // sample must not make every later average NaN).
                avg.clear();
                let valid = |v: f32| if v.is_finite() { (f64::from(v), 0) } else { (0.0, 1) };
                let (mut sum, mut lost) = (0.0f64, 0usize);
                for k in a..b {
                    let (v, l) = valid(x[k]);
                    sum += v;
                    lost += l;
                    if k > a + 2 * m {
                        let (v, l) = valid(x[k - 2 * m - 1]);
                        sum -= v;
                        lost -= l;
                    }
                    if k >= a + 2 * m {
                        avg.push(if lost == 0 { sum } else { f64::NAN });
                    }
                }
                let d = avg.windows(2 * h + 1).map(|w| (w[2 * h] - w[0]).abs()).filter(|v| v.is_finite());
                steepest = steepest.max(d.fold(0.0, f64::max));
            }
            steepest / (2 * m + 1) as f64 * fs / (2 * h) as f64
        })
        .collect()
}

/// Places each R peak on the lead with the clearest QRS that is valid around it: the sample of largest absolute
/// deflection (of a short running median, which ignores pacing spikes) from the local mean within
/// ± [`R_SEARCH_S`] of the QRS middle (the feature peak moved back by its lag). Keeps peaks strictly increasing.
/// Each R peak comes with a flag: true where no lead could place it ([`RSearch::clear_peak`]; a gap reaches into
/// the search) and the peak was taken from the clearest lead's valid samples, so it may lie on another part of the
/// QRS.
fn place_r(leads: &[&[f32]], weights: &[f64], peaks: &[usize], fs: f64, gaps: &[Range<usize>]) -> Vec<(usize, bool)> {
    // Leads with a QRS (weight above 0) from the clearest down (the first listed wins a tie). A beat is placed on
    // the first whose search window holds no run of invalid samples wider than the running median bridges, and
    // at most a tenth of them invalid: on a lead missing there, every beat of the gap would land on the window's
    // first sample, while a lost sample or two must not send the beat to another lead, whose largest deflection
    // may be another wave (three lost samples in three leads of LUDB 24 moved an R peak 66 ms). A lead missing
    // more there still places the beat when the peak of its valid samples lies clear of what it misses
    // ([`RSearch::clear_peak`]), so leads each losing short runs at times of their own still place every beat. With
    // none able to, the clearest lead's valid samples are used.
    let mut order: Vec<usize> = (0..leads.len()).filter(|&i| weights[i] > 0.0).collect();
    order.sort_by(|&a, &b| weights[b].total_cmp(&weights[a]).then(a.cmp(&b)));
    let Some(&best) = order.first() else { return Vec::new() };
    let search = RSearch::new(leads, fs, gaps);
    let placed: Vec<Option<(usize, usize, bool)>> = peaks
        .iter()
        .map(|&p| match order.iter().copied().find_map(|i| search.clear_peak(i, p).map(|r| (i, r))) {
            Some((lead, r)) => Some((lead, r, false)),
            None => search.peak(best, p).map(|r| (best, r, true)),
        })
        .collect();
    // A beat placed on another lead than the clearest is moved by that lead's usual offset from the clearest
    // (median over the beats that both place): in a wide or notched QRS the leads' largest deflections lie
    // apart, and the RRs into and out of a stretch where the clearest lead is missing would read the difference
    // (LUDB 24 with its limb leads off for 5 s: R peaks 2–8 samples early there, RMSSD 42 ms for 37).
    let mut offsets: Vec<Option<isize>> = vec![None; leads.len()];
    for lead in order.iter().copied().filter(|&l| l != best) {
        if !placed.iter().flatten().any(|&(l, _, _)| l == lead) {
            continue;
        }
        let mut d: Vec<isize> = peaks
            .iter()
            .zip(&placed)
            .filter_map(|(&p, at)| {
                let (l, r, unsure) = (*at)?;
                (l == best && !unsure).then(|| Some(search.clear_peak(lead, p)? as isize - r as isize))?
            })
            .collect();
        if d.len() >= MIN_OFFSET_BEATS {
            let mid = d.len() / 2;
            offsets[lead] = Some(*d.select_nth_unstable(mid).1);
        }
    }
    let mut out: Vec<(usize, bool)> = Vec::with_capacity(peaks.len());
    for &(lead, r, unsure) in placed.iter().flatten() {
        let r = offsets[lead].map_or(r, |d| r.saturating_add_signed(-d).min(search.n.saturating_sub(1)));
        if out.last().is_none_or(|&(l, _)| r > l) {
            out.push((r, unsure));
        }
    }
    out
}

/// A lead missing samples in a beat's R search places the beat only when it misses none within this time of the
/// peak of its valid samples, s: a peak next to a loss may be the edge of a larger deflection lost there.
// Common practice, no source: the Q and S waves lie some 20–40 ms from the R wave, so one beside a lost R wave is
// not taken for it. Measured on 21 LUDB files with each lead missing 10–15 ms every 150–300 ms at times of its own
// (RRs more than 4 ms off the complete records', of 225): 65 at 40 ms, 37 at 25, 32 at 20, 19 at 15, 13 at 8.
const CLEAR_S: f64 = 0.020;

/// Fewest beats, placed on the clearest lead and placeable on another, from which that lead's offset is taken.
// Common practice, no source: a median of a handful of beats is steady against one odd beat.
const MIN_OFFSET_BEATS: usize = 3;

/// The R peak search of [`place_r`] on a recording's leads.
struct RSearch<'a> {
    leads: &'a [&'a [f32]],
    n: usize,
    /// Half-width of the search, samples.
    h: usize,
    /// How far the feature's peak lags the QRS middle, samples.
    lag: usize,
    /// Half-width of the running median, samples.
    hm: usize,
    /// [`CLEAR_S`] in samples.
    clear: usize,
    /// The recording's gaps ([`gaps::find`]).
    gaps: &'a [Range<usize>],
}

impl<'a> RSearch<'a> {
    fn new(leads: &'a [&'a [f32]], fs: f64, gaps: &'a [Range<usize>]) -> Self {
        // Half-width of the running median: ±4 ms, at least 2 samples, but 1 sample where 2 would span over ±8 ms
        // (below 250 Hz): at 100 Hz two samples either side span 40 ms, wider than a narrow R wave, whose median
        // then fell below the S wave's and put R on the S wave on some beats (every third beat of a steady 100 Hz
        // demo: RR 800/870 ms for 833). 250 Hz and above are unchanged.
        let hm = ((0.004 * fs).round() as usize).max(2).min(((0.008 * fs) as usize).max(1));
        Self {
            leads,
            n: leads.first().map_or(0, |l| l.len()),
            h: (R_SEARCH_S * fs) as usize,
            lag: (feature::lag_s() * fs).round() as usize,
            hm,
            clear: (CLEAR_S * fs).round() as usize,
            gaps,
        }
    }

    /// The search window around feature peak `p`, and its centre; `None` when empty.
    fn window(&self, p: usize) -> Option<(usize, usize, usize)> {
        let c = p.saturating_sub(self.lag);
        let (a, b) = (c.saturating_sub(self.h), (c + self.h + 1).min(self.n));
        (a < b).then_some((a, b, c))
    }

    /// True when `lead`'s samples in the window of `p` hold no invalid run wider than the running median bridges
    /// and at most a tenth of them are invalid.
    fn usable(&self, lead: usize, p: usize) -> bool {
        self.window(p).is_some_and(|(a, b, _)| {
            let w = &self.leads[lead][a..b];
            longest_invalid_run(w) <= self.hm && w.iter().filter(|v| !v.is_finite()).count() * 10 <= w.len()
        })
    }

    /// The R peak of the beat at feature peak `p` on `lead` when that lead can place it: it is usable
    /// ([`Self::usable`]), or at least half its samples in the window are valid, none within [`CLEAR_S`] of the
    /// peak of those is missing, and the window holds no gap (where every lead misses the same samples, no lead
    /// is clearer than another, and the beat is left to the clearest, flagged unsure).
    fn clear_peak(&self, lead: usize, p: usize) -> Option<usize> {
        if self.usable(lead, p) {
            return self.peak(lead, p);
        }
        let (a, b, _) = self.window(p)?;
        let x = self.leads[lead];
        if gaps::overlaps(self.gaps, a, b) || x[a..b].iter().filter(|v| v.is_finite()).count() * 2 < b - a {
            return None;
        }
        let r = self.peak(lead, p)?;
        let (lo, hi) = (r.saturating_sub(self.clear), (r + self.clear + 1).min(self.n));
        x[lo..hi].iter().all(|v| v.is_finite()).then_some(r)
    }

    /// The R peak of the beat at feature peak `p` on `lead`; `None` when the window is empty.
    fn peak(&self, lead: usize, p: usize) -> Option<usize> {
        let (a, b, c) = self.window(p)?;
        let (lead, n, hm) = (self.leads[lead], self.n, self.hm);
        let valid = lead[a..b].iter().filter(|v| v.is_finite());
        let count = valid.clone().count();
        let mean = if count > 0 { valid.sum::<f32>() / count as f32 } else { 0.0 };
        // Deflection of a running median (≈ 10 ms), so a pacing spike of a few ms is not taken for R.
        let mut buf = Vec::with_capacity(2 * hm + 1);
        // R is not placed inside a run of invalid samples longer than the running median's width (it would sit in
        // a gap, one sample past the last valid one); in a shorter one it takes its neighbours' median.
        let runs = invalid_run_lengths(&lead[a..b]);
        let mut dev = |i: usize| -> f32 {
            if runs[i - a] > 2 * hm + 1 {
                return -1.0;
            }
            buf.clear();
            buf.extend(lead[i.saturating_sub(hm)..(i + hm + 1).min(n)].iter().copied().filter(|v| v.is_finite()));
            if buf.is_empty() {
                return -1.0;
            }
            let mid = buf.len() / 2;
            (*buf.select_nth_unstable_by(mid, f32::total_cmp).1 - mean).abs()
        };
        let devs: Vec<f32> = (a..b).map(&mut dev).collect();
        // The largest deflection that is a peak of its own (no larger neighbour): a wandering baseline's slope
        // across the window, measured from the window's mean, is largest at an edge, and R was placed there rather
        // than on a smaller QRS (demo ectopics with 1 mV of wander at 1 Hz: 8 of 35 beats placed up to 130 ms
        // off, then lost to the QRS slope check). The window's edges hold no peak; without one, the largest.
        let peak = |i: usize| i > 0 && i + 1 < devs.len() && devs[i] >= devs[i - 1] && devs[i] >= devs[i + 1];
        let largest = |ok: &dyn Fn(usize) -> bool| {
            (0..devs.len()).filter(|&i| ok(i)).max_by(|&x, &y| devs[x].total_cmp(&devs[y]))
        };
        Some(largest(&peak).or_else(|| largest(&|_| true)).map_or(c, |i| a + i))
    }
}

/// Length of the longest run of invalid samples in `x`.
fn longest_invalid_run(x: &[f32]) -> usize {
    invalid_run_lengths(x).into_iter().max().unwrap_or(0)
}

/// For each sample of `x`, the length of the run of invalid samples it belongs to (0 for a valid sample).
fn invalid_run_lengths(x: &[f32]) -> Vec<usize> {
    let mut out = vec![0; x.len()];
    for run in gaps::invalid_runs(x) {
        let len = run.len();
        out[run].fill(len);
    }
    out
}

/// RR interval to the previous beat, ms: `None` for the first beat and where one of `gaps` (stretches where no
/// lead was recorded, see [`crate::gaps`]) lies between the two or cuts into either QRS ([`gaps::breaks_rr`]).
#[must_use]
pub fn rr_ms(beats: &[Beat], fs: Hertz, gaps: &[Range<usize>]) -> Vec<Option<f64>> {
    let mut out = Vec::with_capacity(beats.len());
    out.extend(beats.first().map(|_| None));
    out.extend(beats.windows(2).map(|w| {
        let (a, b) = (w[0].r, w[1].r);
        (b > a && !gaps::breaks_rr(gaps, a, b, fs.hz())).then(|| fs.ms_from_samples((b - a) as f64))
    }));
    out
}

#[cfg(test)]
// Test signals are written sample by sample at the index they describe.
#[allow(clippy::needless_range_loop)]
mod tests {
    use super::*;
    use crate::recording::{Lead, LeadName, Meta};

    fn rec(leads: Vec<Vec<f32>>, fs: f64) -> Recording {
        Recording {
            leads: leads.into_iter().map(|s| Lead { name: LeadName::parse("X"), samples: s }).collect(),
            sample_rate: Hertz::from_hz(fs).unwrap_or_else(|_| unreachable!()),
            start: None,
            meta: Meta::default(),
            annotations: Vec::new(),
        }
    }

    /// The next value of a linear congruential generator at `state`, uniform in [−0.5, 0.5): test noise that is
    /// the same on every run.
    fn uniform(state: &mut u64) -> f32 {
        *state = state.wrapping_mul(6364136223846793005).wrapping_add(1442695040888963407);
        (*state >> 33) as f32 / (1u64 << 31) as f32 - 0.5
    }

    /// A train of narrow QRS-like pulses plus T waves every 0.8 s, with a little deterministic noise.
    fn synthetic(fs: f64, seconds: f64) -> (Vec<f32>, Vec<usize>) {
        let n = (fs * seconds) as usize;
        let mut x = vec![0.0f32; n];
        let mut r = Vec::new();
        let mut t = 0.5;
        while t < seconds - 0.5 {
            r.push((t * fs) as usize);
            t += 0.8;
        }
        for (k, v) in x.iter_mut().enumerate() {
            let s = k as f64 / fs;
            let mut y = 20.0 * (s * 37.0).sin() * (s * 3.1).cos();
            for &p in &r {
                let d = s - p as f64 / fs;
                y += 1200.0 * (-(d / 0.012).powi(2)).exp() + 300.0 * (-((d - 0.3) / 0.05).powi(2)).exp();
            }
            *v = y as f32;
        }
        (x, r)
    }

    #[test]
    fn finds_every_beat_even_with_a_flat_lead() {
        let fs = 250.0;
        let (x, truth) = synthetic(fs, 30.0);
        let beats = detect_beats(&rec(vec![x, vec![0.0; 7500]], fs));
        assert_eq!(beats.len(), truth.len());
        for (b, t) in beats.iter().zip(&truth) {
            assert!(b.r.abs_diff(*t) <= 2, "{} vs {}", b.r, t);
            assert_eq!(b.kind, BeatKind::Dominant);
        }
        let hz = Hertz::from_hz(fs).unwrap_or_else(|_| unreachable!());
        let rr = rr_ms(&beats, hz, &[]);
        assert_eq!(rr[0], None);
        assert!(rr[1..].iter().all(|v| v.is_some_and(|ms| (ms - 800.0).abs() <= 8.0)));
        // A stretch of the recording with no valid sample between beats 3 and 4: no RR across it. Beats 3 and 4
        // are 240 ms from it, beyond the R peak search's reach (2 × 100 ms), so their other RRs stand; 80 ms from
        // it, they go too.
        let gap = beats[3].r + 60..beats[4].r - 60;
        let rr = rr_ms(&beats, hz, std::slice::from_ref(&gap));
        assert_eq!(rr[4], None);
        assert!(rr[3].is_some() && rr[5].is_some());
        let near = beats[3].r + 20..beats[4].r - 20;
        let rr = rr_ms(&beats, hz, std::slice::from_ref(&near));
        assert!(rr[3..=5].iter().all(Option::is_none) && rr[2].is_some() && rr[6].is_some());
    }

    #[test]
    fn waves_too_slow_for_a_qrs_are_no_beats() {
        // P waves alone every 0.8 s (150 µV, Gaussian of 25 ms SD: at most 3.6 mV/s) in two leads: no beat, where
        // they were read as a regular rhythm. With two QRS complexes (1.2 mV, 12 ms) among them, those two only.
        let fs = 500.0;
        let n = (10.0 * fs) as usize;
        let p_times: Vec<f64> = (0..12).map(|i| 0.4 + 0.8 * f64::from(i)).collect();
        let wave = |s: f64, qrs: &[f64]| -> f32 {
            let p: f64 = p_times.iter().map(|&t| 150.0 * (-((s - t) / 0.025).powi(2) / 2.0).exp()).sum();
            let q: f64 = qrs.iter().map(|&t| 1200.0 * (-((s - t) / 0.012).powi(2)).exp()).sum();
            (p + q) as f32
        };
        let lead = |qrs: &[f64]| -> Vec<f32> { (0..n).map(|k| wave(k as f64 / fs, qrs)).collect() };
        assert!(detect_beats(&rec(vec![lead(&[]), lead(&[])], fs)).is_empty());
        // With white noise of 14 µV SD (±25 µV uniform) on them, still none.
        let mut state = 3u64;
        let mut noisy = || -> Vec<f32> { lead(&[]).into_iter().map(|v| v + uniform(&mut state) * 50.0).collect() };
        let leads = vec![noisy(), noisy()];
        assert!(detect_beats(&rec(leads, fs)).is_empty());
        let qrs = [p_times[0] + 0.16, p_times[1] + 0.16];
        let beats = detect_beats(&rec(vec![lead(&qrs), lead(&qrs)], fs));
        let rs: Vec<usize> = beats.iter().map(|b| b.r).collect();
        assert_eq!(rs.len(), 2, "{rs:?}");
        assert!(rs.iter().zip(qrs).all(|(&r, t)| r.abs_diff((t * fs) as usize) <= 2), "{rs:?}");
    }

    #[test]
    fn a_fast_rhythm_with_a_small_qrs_is_told_from_noise_and_tremor() {
        // 180 bpm, 40 s, three leads (gains 1, 0.7, 0.4) at 250 Hz: P 0.15 mV (22 ms SD), QRS q −0.06, R 0.5, S −0.14 mV
        // (8–10 ms SD), T 0.4 mV (40 ms SD) peaking 143 ms after R. Every lead's feature looked like noise (its lower
        // decile a seventh of its QRS height): no beat at all. Its rhythm tells it from noise; white noise alone and a
        // 4 Hz tremor alone (each on three leads) still give no beat.
        let fs = 250.0;
        let n = (40.0 * fs) as usize;
        let rr = 60.0 / 180.0;
        let rs: Vec<f64> = (0..).map(|i| 0.5 + rr * f64::from(i)).take_while(|&t| t < 39.5).collect();
        let waves = [
            (-0.16, 150.0, 0.022),
            (-0.022, -60.0, 0.008),
            (0.0, 500.0, 0.010),
            (0.024, -140.0, 0.009),
            (0.143, 400.0, 0.040),
        ];
        let ecg: Vec<f32> = (0..n)
            .map(|k| {
                let t = k as f64 / fs;
                let near = rs.iter().filter(|&&r| (t - r).abs() < 0.5);
                near.map(|&r| {
                    waves.iter().map(|&(at, a, sd)| a * (-0.5 * ((t - r - at) / sd).powi(2)).exp()).sum::<f64>()
                })
                .sum::<f64>() as f32
            })
            .collect();
        let leads: Vec<Vec<f32>> = [1.0f32, 0.7, 0.4].iter().map(|&g| ecg.iter().map(|v| v * g).collect()).collect();
        let beats = detect_beats(&rec(leads, fs));
        assert!(beats.len() + 1 >= rs.len() && beats.len() <= rs.len(), "{} beats of {}", beats.len(), rs.len());
        let mut state = 11u64;
        let mut white = || -> Vec<f32> { (0..n).map(|_| uniform(&mut state) * 200.0).collect() };
        assert!(detect_beats(&rec(vec![white(), white(), white()], fs)).is_empty());
        let tremor: Vec<Vec<f32>> = [200.0f64, 140.0, 80.0]
            .iter()
            .map(|&a| (0..n).map(|k| (a * (std::f64::consts::TAU * 4.0 * k as f64 / fs).sin()) as f32).collect())
            .collect();
        assert!(detect_beats(&rec(tremor, fs)).is_empty());
    }

    #[test]
    fn a_noise_lead_does_not_flood_beats() {
        let fs = 250.0;
        let (x, truth) = synthetic(fs, 30.0);
        let mut state = 7u64;
        let noise: Vec<f32> = (0..x.len()).map(|_| uniform(&mut state) * 400.0).collect();
        let beats = detect_beats(&rec(vec![noise, x], fs));
        assert_eq!(beats.len(), truth.len());
    }

    #[test]
    fn a_noise_burst_does_not_flood_beats() {
        let fs = 250.0;
        let (mut x, truth) = synthetic(fs, 60.0);
        let mut y = x.clone();
        // 3 s of large muscle-like noise on both leads from 20 s.
        let mut state = 99u64;
        for k in (20.0 * fs) as usize..(23.0 * fs) as usize {
            let v = uniform(&mut state) * 1500.0;
            x[k] += v;
            y[k] -= 0.7 * v;
        }
        let beats = detect_beats(&rec(vec![x, y], fs));
        let outside = |r: usize| !(19.5 * fs..23.5 * fs).contains(&(r as f64));
        let found = beats.iter().filter(|b| outside(b.r)).count();
        let expected = truth.iter().filter(|&&t| outside(t)).count();
        assert!(found.abs_diff(expected) <= 1, "{found} beats outside the burst, {expected} expected");
        // Inside the burst at most a few extra detections, not a flood (4 true beats there).
        let inside = beats.len() - found;
        assert!(inside <= 8, "{inside} detections in a 4-s burst");
    }

    #[test]
    fn beats_in_a_dropout_are_placed_on_a_lead_with_a_qrs() {
        // The clearest lead drops out for 12 ms around one beat. With a weaker copy whole there, the beat is placed
        // on the copy; with only a flat lead (no QRS, weight 0) whole there, on the clearest lead's valid samples,
        // not on the flat lead, where every sample is alike and R would land at the window's end.
        let fs = 250.0;
        let (x, truth) = synthetic(fs, 30.0);
        let mut strong = x.clone();
        let r = truth[10];
        strong[r - 1..r + 2].fill(f32::NAN);
        let weak: Vec<f32> = x.iter().map(|v| 0.5 * v).collect();
        let flat = vec![0.0f32; x.len()];
        for leads in [vec![flat.clone(), strong.clone(), weak], vec![flat, strong]] {
            let beats = detect_beats(&rec(leads, fs));
            assert_eq!(beats.len(), truth.len());
            for (b, t) in beats.iter().zip(&truth) {
                assert!(b.r.abs_diff(*t) <= 2, "{} vs {t}", b.r);
            }
        }
    }

    #[test]
    fn a_baseline_step_does_not_hide_the_next_beat() {
        // A 5 mV step of the baseline on both leads (an electrode moving) 400 ms before a beat. The step clips
        // every lead's feature into a flat top; the beat after it must not be taken for its T wave. The step
        // itself may count as one extra detection.
        let fs = 250.0;
        let (x, truth) = synthetic(fs, 30.0);
        let step = (12.1 * fs) as usize;
        let stepped: Vec<f32> = x.iter().enumerate().map(|(k, &v)| if k >= step { v + 5000.0 } else { v }).collect();
        let beats = detect_beats(&rec(vec![stepped.clone(), stepped], fs));
        for t in &truth {
            assert!(beats.iter().any(|b| b.r.abs_diff(*t) <= 2), "beat at {:.2} s missed", *t as f64 / fs);
        }
        assert!(beats.len() <= truth.len() + 1, "{} detections for {} beats", beats.len(), truth.len());
    }

    #[test]
    fn a_run_of_wide_beats_is_found_beat_by_beat_and_typed_other() {
        // Sinus beats every 0.8 s (narrow QRS, upright T) with a run of six wide beats every 0.45 s (QRS σ 30 ms,
        // deep, T opposite) from 12 s, then a pause and sinus rhythm again. Every beat is found once, the run's
        // beats are other and the sinus beats dominant.
        let fs = 250.0;
        let n = (fs * 30.0) as usize;
        let mut narrow = Vec::new();
        let mut t = 0.5;
        while t < 11.9 {
            narrow.push(t);
            t += 0.8;
        }
        let wide: Vec<f64> = (0..6).map(|i| 12.0 + 0.45 * f64::from(i)).collect();
        let mut t = wide[5] + 1.2;
        while t < 29.5 {
            narrow.push(t);
            t += 0.8;
        }
        let mut x = vec![0.0f32; n];
        for (k, v) in x.iter_mut().enumerate() {
            let s = k as f64 / fs;
            let mut y = 0.0;
            for &p in &narrow {
                let d = s - p;
                y += 1200.0 * (-(d / 0.012).powi(2)).exp() + 300.0 * (-((d - 0.3) / 0.05).powi(2)).exp();
            }
            for &p in &wide {
                let d = s - p;
                y += -1800.0 * (-(d / 0.030).powi(2)).exp() + 500.0 * (-((d - 0.25) / 0.05).powi(2)).exp();
            }
            *v = y as f32;
        }
        let beats = detect_beats(&rec(vec![x], fs));
        let mut truth: Vec<(f64, BeatKind)> = narrow.iter().map(|&t| (t, BeatKind::Dominant)).collect();
        truth.extend(wide.iter().map(|&t| (t, BeatKind::Other)));
        truth.sort_by(|a, b| a.0.total_cmp(&b.0));
        assert_eq!(beats.len(), truth.len(), "{:?}", beats.iter().map(|b| b.r as f64 / fs).collect::<Vec<_>>());
        for (b, (t, kind)) in beats.iter().zip(&truth) {
            assert!((b.r as f64 / fs - t).abs() <= 0.02, "R at {:.3} s for {t:.3} s", b.r as f64 / fs);
            assert_eq!(b.kind, *kind, "beat at {t:.2} s");
        }
    }

    #[test]
    fn paced_beats_are_detected_once() {
        // Pacing spike (2 ms, 4 mV) 30 ms before a wide QRS, every 0.9 s, at 500 Hz.
        let fs = 500.0;
        let n = (fs * 30.0) as usize;
        let mut x = vec![0.0f32; n];
        let mut truth = Vec::new();
        let mut t = 0.5;
        while t < 29.5 {
            let spike = (t * fs) as usize;
            x[spike] += 4000.0;
            x[spike + 1] += 4000.0;
            let r = spike + (0.030 * fs) as usize + 25;
            for k in r - 60..r + 60 {
                let d = (k as f64 - r as f64) / 20.0;
                x[k] += (1500.0 * (-d * d).exp()) as f32;
            }
            truth.push(r);
            t += 0.9;
        }
        let beats = detect_beats(&rec(vec![x], fs));
        assert_eq!(beats.len(), truth.len());
        for (b, r) in beats.iter().zip(&truth) {
            assert!(b.r.abs_diff(*r) <= (0.05 * fs) as usize, "{} vs {r}", b.r);
        }
    }

    #[test]
    fn flat_recording_has_no_beats() {
        assert!(detect_beats(&rec(vec![vec![0.0; 5000]], 250.0)).is_empty());
    }
}
