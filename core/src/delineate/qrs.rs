//! QRS onset and J point, found per lead and combined into global boundaries. The steep part of the QRS is the run
//! around the peak of the multi-lead slope envelope; from there each lead's own |slope| (40 Hz signal, smoothed
//! over ≈ 10 ms) is walked outward to where it falls a set fraction of the way from that lead's quiet level before
//! (after) the QRS to its own QRS peak slope; the threshold is never below a multiple of the lead's noise (its
//! typical slope outside the QRS), so a clean lead is followed down to its first (last) small deflection while a
//! noisy lead stops where the QRS rises out of (sinks into) its noise. Leads with a clear QRS vote: the global
//! onset is the earliest lead onset that another lead confirms within [`AGREE_S`], and the J point the latest end
//! that another lead confirms (the usual 12-lead global QRS runs from the first lead to start to the last to
//! finish; one lead alone is more often noise). A pacing spike before the QRS bounds the onset search: the QRS
//! starts after the stimulus artefact. Where what an edge is found from (the quiet before the QRS up to R, or R to
//! the quiet after it) holds a stretch with no recorded lead, that edge is not given.
//!
//! The zero-phase low-pass and the smoothing spread an abrupt start (end) of a deflection a few samples outward,
//! so the smoothed slope crosses the threshold 1–3 samples before the lead leaves (after it regains) its level.
//! Where the unfiltered lead resolves the threshold (its noise and quantisation steps well below it), each lead
//! edge is moved inward, at most [`SPREAD_S`], over samples where the unfiltered lead still stands still.

use super::signals::{Signals, smooth};

/// Fraction of a lead's slope rise above its quiet level that marks its end.
// Common practice, no source: slope-threshold delineators use 5–20 % of the QRS peak slope.
const EDGE_FRACTION: f32 = 0.05;
/// The end threshold is at least this many times the lead's noise slope: the lesser of the lower quartiles of
/// its smoothed |slope| before the QRS (as for [`ONSET_NOISE`]) and over the 20–200 ms after it, so neither a P
/// wave nor a sloping ST segment raises it. Without it, muscle noise after the QRS keeps the slope above a
/// threshold set by the QRS alone and the end runs on into the ST segment.
// Common practice, no source: a deflection is told from noise when it exceeds a few times the noise level; lower
// than ONSET_NOISE because the lesser of two estimates is taken. Measured on the QT Database records with muscle
// noise and wander added at 12 dB (tests/suite/accuracy_noise.rs): J point +25.0 ± 24.1 ms without it, +4.7 ±
// 14.7 with it; the clean records move by under 1 ms.
const END_NOISE: f32 = 3.0;
/// Fraction of a lead's slope rise above its quiet level that marks its onset, where the noise floor
/// ([`ONSET_NOISE`]) also holds: lower than at the end, since the first deflection of a QRS is often small and
/// slow (septal q or initial r) and the reference onset is the first lead to leave its baseline.
// Common practice, no source.
const ONSET_FRACTION: f32 = 0.025;
/// The onset threshold is at least this many times the lead's noise slope: the lower quartile of its smoothed
/// |slope| over the 200–20 ms before the steep part (the PR segment and P wave; robust to a P wave or a spike).
// Common practice, no source: a deflection is told from noise when it exceeds a few times the noise level.
const ONSET_NOISE: f32 = 4.0;
/// The global onset is the earliest lead onset that another voting lead confirms within this time, s.
// Common practice, no source: one lead alone starting early is more often noise than an early QRS vector, but
// two leads within a few ms of each other mark the start of depolarisation.
const AGREE_S: f64 = 0.006;
/// The onset is sought no earlier than this long after a pacing spike, s.
// Common practice, no source: the stimulus artefact and its recovery last a few ms at most.
const AFTER_SPIKE_S: f64 = 0.006;
/// How far the 40 Hz zero-phase low-pass and the 10 ms smoothing spread an abrupt change of slope, s: a lead
/// edge found on the smoothed slope is moved at most this far towards the QRS, over samples where the
/// unfiltered lead has not yet left (has already regained) its level at the edge by more than the threshold.
// Common practice, no source: half the 10 ms smoothing plus about one period of the 40 Hz cutoff's ripple.
const SPREAD_S: f64 = 0.020;
/// Within [`SPREAD_S`] of a lead edge, the unfiltered lead is still at its level while its sample-to-sample step
/// is at most this fraction of the edge threshold (the low-passed slope there is filter spread).
// Common practice, no source: a step under half the threshold slope is taken as no departure.
const STILL: f32 = 0.5;
/// The steep part of the QRS: envelope at least this fraction of its peak.
// Common practice, no source.
const STEEP: f32 = 0.4;
/// The steep part of the QRS is the run of envelope at [`STEEP`] around its peak ([`steep_reach`]); the run ends
/// where the envelope stays under this fraction of its peak (every lead quiet) for more than [`STEEP_QUIET_S`], or
/// under [`STEEP`] for more than [`STEEP_GAP_S`]. A steep stretch further out is one lead's electrode artefact, a
/// tall P wave or a noise burst, not the QRS.
// Common practice, no source: a tenth of the QRS peak slope is about where a lead's QRS edge is found.
const STEEP_QUIET: f32 = 0.1;
/// See [`STEEP_QUIET`], s.
// Common practice, no source: a notch between two waves of one QRS lasts a few ms; 20 ms is a fifth of a QRS.
// Measured: LUDB 15, whose V4 electrode artefact 50 ms before one QRS placed that beat's onset there (44 ms before
// the experts' earliest lead; now 20 ms after it, the record's other beats 0 to 8 ms after); no other boundary on
// LUDB 1–50, the QT Database or MIT-BIH 100 moves, but the last J point of LUDB 32, now found.
const STEEP_QUIET_S: f64 = 0.020;
/// See [`STEEP_QUIET`], s: a wide QRS's broad top or notch lies under [`STEEP`] for up to about 40 ms (an ectopic
/// beat of the QT Database's sel803: with a 20 ms limit its onset was placed at its top, 68 ms late).
// Common practice, no source. Measured on the QT Database with noise at 6 dB (accuracy_noise): QRS onset +4.4 ±
// 29.5 ms and J point +21.4 ± 41.0 with neither limit, +11.3 ± 20.9 and +7.6 ± 24.1 with both (the onset's mean
// later, its scatter smaller: noise bursts before the QRS no longer start it), T ends found on 171 of 181 beats
// for 160; at 12 and 18 dB no change.
const STEEP_GAP_S: f64 = 0.060;
/// A lead votes when its QRS peak slope is at least this fraction of the steepest lead's.
// Common practice, no source: a lead with a small, flat QRS mostly shows noise and ST slope at its edges.
const CLEAR_LEAD: f32 = 0.35;
/// When no two leads agree (see [`AGREE_S`]), the global onset (end) is the second earliest (latest) lead's with
/// at least this many voting leads, so one noisy lead cannot move it; with fewer, the earliest (latest).
// Common practice, no source.
const ROBUST_LEADS: usize = 4;
/// A lead's QRS end is sought at most this long after the steep part, s (later is ST or T slope).
// Common practice, no source.
const END_REACH_S: f64 = 0.120;

/// A lead's QRS end found where its slope falls to its threshold lies at a notch within the QRS, and the walk goes
/// on to where the slope falls again, when within [`NOTCH_S`] the slope rises back to this fraction of the lead's
/// QRS peak slope (and to [`RESUMED_NOISE`] times the threshold): the second peak of a notched QRS (R and R' in a
/// bundle branch block, or a slow S after a notch on the downstroke) is too slow to count in the steep part, and
/// at the notch between the peaks the slope falls to nothing. Without this, one lead alone ended such a QRS at
/// the notch (LUDB 13, incomplete left bundle branch block, lead II alone: 88 ms early on one beat).
// Common practice, no source: half the steep-part level (STEEP). Measured (QRS end, ms; LUDB 1-50 against the
// experts' latest over the same leads): twelve leads −9.0 ± 11.6 → −8.3 ± 11.3; two leads (II+V5, II+V1, III+V2,
// aVF+V6, I+V4) each 0.3–1.0 ms later, SD −0.7 to +0.4; lead II alone −2.8 ± 15.6 → −1.6 ± 13.7. One wide beat of
// LUDB 2 now ends 32 ms after the experts' latest lead (12 ms before it before). At 0.3: twelve leads −8.6 ± 11.4;
// at 0.15 (without the noise floor below) −7.3 ± 11.8. The QT Database and the demos are unchanged.
const RESUMED: f32 = 0.2;
/// See [`RESUMED`]: without this floor, muscle noise after the QRS resumed the walk (QT Database with noise at
/// 6 dB, `accuracy_noise`: J point +7.6 ± 24.1 → +15.2 ± 26.4 ms at [`RESUMED`] 0.3; unchanged with it).
// Common practice, no source: a deflection is told from noise when it exceeds a few times the noise level.
const RESUMED_NOISE: f32 = 3.0;
/// See [`RESUMED`], s.
// Common practice, no source: a notch within the QRS lasts a few ms; the slope of a slow second peak needs a few
// more to rise.
const NOTCH_S: f64 = 0.030;
/// A lead's QRS end walk goes past at most this many notches (see [`RESUMED`]).
// Common practice, no source: a QRS rarely has more than three peaks.
const MAX_NOTCHES: usize = 2;

/// The QRS onset is sought at most this long before the R peak, s.
// Common practice, no source: the QRS rarely starts more than 120 ms before its largest peak.
const BEFORE_R_S: f64 = 0.120;
/// The steep part of the QRS is sought at most this long after the R peak, s (the J point up to
/// [`END_REACH_S`] further).
// Common practice, no source: even a wide QRS has its steep part within 150 ms of its largest peak.
const AFTER_R_S: f64 = 0.150;

/// QRS onset and J point around R peak `r`, as sample indices. `None` where no lead gives a clear edge.
#[must_use]
pub fn qrs_bounds(sig: &Signals, r: usize, min_start: usize, max_end: usize) -> (Option<usize>, Option<usize>) {
    let edges = lead_edges(sig, r, min_start, max_end);
    let mut onsets: Vec<usize> = edges.iter().filter_map(|e| e.1).collect();
    let mut ends: Vec<usize> = edges.iter().filter_map(|e| e.2).collect();
    onsets.sort_unstable();
    ends.sort_unstable_by(|a, b| b.cmp(a));
    (agreed_first(&onsets, sig.samples(AGREE_S)), agreed_first(&ends, sig.samples(AGREE_S)))
}

/// Each voting lead's QRS onset and end around R peak `r`, as (lead index, onset, end); [`qrs_bounds`] combines
/// them. Empty where no lead gives a clear QRS.
#[must_use]
pub fn lead_edges(
    sig: &Signals,
    r: usize,
    min_start: usize,
    max_end: usize,
) -> Vec<(usize, Option<usize>, Option<usize>)> {
    let n = sig.len();
    if n == 0 || r >= n {
        return Vec::new();
    }
    let lo = r.saturating_sub(sig.samples(BEFORE_R_S)).max(min_start);
    // After a pacing spike between the search start and R, the QRS can only start once the artefact is over.
    // (`spikes` is sorted: the last spike before R is found by bisection, not by a scan per beat.)
    let before_r = &sig.spikes[..sig.spikes.partition_point(|&s| s < r)];
    let lo = match before_r.last().filter(|&&s| s >= lo) {
        Some(&s) => (s + sig.samples(AFTER_SPIKE_S)).min(r),
        None => lo,
    };
    let hi = (r + sig.samples(AFTER_R_S)).min(n - 1).min(max_end);
    if lo >= hi {
        return Vec::new();
    }
    let near = (r.saturating_sub(sig.samples(0.060)).max(lo), (r + sig.samples(0.060)).min(hi));
    // Steep part from the multi-lead envelope: the run at ≥ STEEP of its peak near R around that peak, across
    // short dips (reaching R at least on either side).
    let g = &sig.env;
    let g_peak = (near.0..=near.1).map(|k| g[k]).fold(0.0f32, f32::max);
    if g_peak <= 0.0 {
        return Vec::new();
    }
    let steep = |k: usize| g[k] >= STEEP * g_peak;
    let quiet = |k: usize| g[k] < STEEP_QUIET * g_peak;
    let peak_at = (near.0..=near.1).find(|&k| g[k] >= g_peak).unwrap_or(r);
    let limits = (sig.samples(STEEP_QUIET_S), sig.samples(STEEP_GAP_S));
    let first = steep_reach((lo..=peak_at).rev(), steep, quiet, limits).map_or(r, |k| k.min(r));
    let last = steep_reach(peak_at..=hi, steep, quiet, limits).map_or(r, |k| k.max(r));
    // Each lead's smoothed |slope| on a window holding every sample the searches can reach.
    let win = Window {
        a0: first.saturating_sub(sig.samples(0.200)).max(min_start.min(first)),
        b0: (last + sig.samples(0.200)).min(n - 1).min(max_end.max(last)),
        on_min: lo,
    };
    // What the edges are found from: the quiet before the QRS and its steep part up to R for the onset, from R to
    // the quiet after it for the end. Where that holds a stretch with no recorded lead, the edge could lie in it.
    let onset_readable = !sig.bridged(win.a0, r + 1);
    let end_readable = !sig.bridged(r, win.b0 + 1);
    let w = ((0.010 * sig.fs).round() as usize).max(1) | 1;
    let envs: Vec<(Vec<f32>, f32)> = sig
        .qrs
        .iter()
        .map(|q| {
            let raw: Vec<f32> = (win.a0..=win.b0)
                .map(|k| if k == 0 || k + 1 >= n { 0.0 } else { ((q[k + 1] - q[k - 1]) * 0.5).abs() })
                .collect();
            let e = smooth(&raw, w);
            let peak = (near.0..=near.1).map(|k| e[k - win.a0]).fold(0.0f32, f32::max);
            (e, peak)
        })
        .collect();
    let top = envs.iter().map(|(_, p)| *p).fold(0.0f32, f32::max);
    if top <= 0.0 {
        return Vec::new();
    }
    envs.iter()
        .enumerate()
        .filter(|(_, (_, p))| *p >= CLEAR_LEAD * top)
        .map(|(i, (e, peak))| {
            let lead = Lead { x: &sig.wide[i], q: &sig.qrs[i] };
            let noise = win.noise_before(e, first, sig);
            let onset = noise.filter(|_| onset_readable).and_then(|n| win.onset(e, lead, *peak, n, first, sig));
            let end = if end_readable { win.end(e, lead, *peak, noise, last, sig) } else { None };
            (i, onset, end)
        })
        .collect()
}

/// The last of `ks` (samples walked outward from the envelope's peak) that is `steep` and in the run around the
/// peak: the walk stops after `quiet_run` samples in a row that are `quiet`, or `gap` samples past the last steep
/// one. `None` when no sample is steep.
fn steep_reach(
    ks: impl Iterator<Item = usize>,
    steep: impl Fn(usize) -> bool,
    quiet: impl Fn(usize) -> bool,
    (quiet_run, gap): (usize, usize),
) -> Option<usize> {
    let mut reached = None;
    let mut run = 0;
    for k in ks {
        if steep(k) {
            reached = Some(k);
        }
        run = if quiet(k) { run + 1 } else { 0 };
        if reached.is_some_and(|at: usize| run > quiet_run || at.abs_diff(k) > gap) {
            break;
        }
    }
    reached
}

/// The first entry of `v` (ascending onsets or descending ends) that the next one follows within `agree` samples;
/// without such a pair, the robust first ([`robust_first`]). With two entries this is the first either way.
fn agreed_first(v: &[usize], agree: usize) -> Option<usize> {
    v.windows(2).find(|w| w[1].abs_diff(w[0]) <= agree).map(|w| w[0]).or_else(|| robust_first(v))
}

/// The first entry of `v` (already ordered), or the second with at least [`ROBUST_LEADS`] entries.
fn robust_first(v: &[usize]) -> Option<usize> {
    if v.len() >= ROBUST_LEADS { v.get(1).copied() } else { v.first().copied() }
}

/// Samples `a0..=b0` of the recording; a lead's envelope `e` holds them from index 0. No onset before `on_min`.
struct Window {
    a0: usize,
    b0: usize,
    on_min: usize,
}

impl Window {
    /// The last sample before the QRS that counts as quiet for a lead's onset: 20 ms before `first` (the start
    /// of the steep part), and not before the window.
    fn quiet_end(&self, first: usize, sig: &Signals) -> usize {
        first.saturating_sub(sig.samples(0.020)).max(self.a0)
    }

    /// A lead's noise slope before the QRS: the lower quartile of its smoothed |slope| `e` from the window's
    /// start (≈ 200 ms before `first`) to [`Self::quiet_end`]; the PR segment and P wave, robust to a P wave or
    /// a spike. `None` when that span is empty.
    fn noise_before(&self, e: &[f32], first: usize, sig: &Signals) -> Option<f32> {
        lower_quartile(&e[..self.quiet_end(first, sig) - self.a0])
    }

    /// A lead's onset: walking back from `first` (start of the steep part) to where its slope `e` is at or
    /// below [`ONSET_FRACTION`] of the way from its quiet level (least slope over the 200–20 ms before
    /// `first`) to `peak`, and at or below [`ONSET_NOISE`] times its noise slope over the same time; then, where
    /// the unfiltered lead resolves the threshold, on to its last still sample;
    /// never before `on_min`.
    fn onset(&self, e: &[f32], lead: Lead<'_>, peak: f32, noise: f32, first: usize, sig: &Signals) -> Option<usize> {
        let x = lead.x;
        let a = self.a0;
        let quiet_end = self.quiet_end(first, sig);
        let q = min_over(e, 0, quiet_end - a)?;
        let thr = (q + ONSET_FRACTION * (peak - q)).max(ONSET_NOISE * noise);
        let k = (a..=first).rev().find(|&k| e[k - a] <= thr)?;
        let k = match lead.noise(a, quiet_end) {
            Some(wn) if wn <= STILL * thr => {
                let reach = (k + sig.samples(SPREAD_S)).min(first);
                (k..reach).find(|&j| (x[j + 1] - x[j]).abs() > STILL * thr).unwrap_or(reach)
            }
            _ => k,
        };
        Some(k.max(self.on_min))
    }

    /// A lead's end: walking on from `last` (end of the steep part), at most [`END_REACH_S`], to where its
    /// slope is at or below [`EDGE_FRACTION`] of the way from its quiet level (20–200 ms after `last`) to `peak`,
    /// and at or below [`END_NOISE`] times its noise slope (the lesser of `noise_before` and the lower quartile
    /// of its slope over the same 20–200 ms), past any notch ([`RESUMED`]); then, where the unfiltered lead
    /// resolves the threshold, back to its first still sample.
    fn end(
        &self,
        e: &[f32],
        lead: Lead<'_>,
        peak: f32,
        noise_before: Option<f32>,
        last: usize,
        sig: &Signals,
    ) -> Option<usize> {
        let x = lead.x;
        let b = self.b0;
        let quiet_start = (last + sig.samples(0.020)).min(b);
        let after = &e[quiet_start - self.a0..b - self.a0];
        let q = min_over(after, 0, after.len())?;
        let noise = lower_quartile(after).map_or(0.0, |n| noise_before.map_or(n, |m| m.min(n)));
        let thr = (q + EDGE_FRACTION * (peak - q)).max(END_NOISE * noise);
        let reach = (last + sig.samples(END_REACH_S)).min(b);
        let mut k = (last..=reach).find(|&k| e[k - self.a0] <= thr)?;
        // Past a notch: where the slope rises again within NOTCH_S, the lead has not finished its QRS.
        let resumed = (RESUMED * peak).max(RESUMED_NOISE * thr);
        for _ in 0..MAX_NOTCHES {
            let ahead = (k + sig.samples(NOTCH_S)).min(reach);
            let Some(again) = (k..=ahead).find(|&j| e[j - self.a0] >= resumed) else { break };
            match (again..=reach).find(|&j| e[j - self.a0] <= thr) {
                Some(next) => k = next,
                None => break,
            }
        }
        Some(match lead.noise(quiet_start, b) {
            Some(wn) if wn <= STILL * thr => {
                let back = k.saturating_sub(sig.samples(SPREAD_S)).max(last).max(1);
                (back..=k).rev().find(|&j| (x[j] - x[j - 1]).abs() > STILL * thr).unwrap_or(back)
            }
            _ => k,
        })
    }
}

/// One lead unfiltered (`x`) and low-passed at 40 Hz (`q`), µV, over the whole recording.
#[derive(Clone, Copy)]
struct Lead<'a> {
    x: &'a [f32],
    q: &'a [f32],
}

impl Lead<'_> {
    /// What the unfiltered lead adds to the 40 Hz one over samples `a..b` (noise, quantisation steps), as a
    /// sample-to-sample step, µV: [`ONSET_NOISE`] times the median step of that residue (unfiltered − 40 Hz)
    /// over √2, which for white noise equals the median |residue| (the measure used before, so real records
    /// are judged as they were). A step, like the per-sample slope thresholds it is compared with, scales with
    /// the sampling interval for whatever wave content lies above 40 Hz; the |residue| itself does not, and at
    /// 1000 Hz and above it shut the refinement off on clean leads (demo QRS 6–9 ms long).
    fn noise(&self, a: usize, b: usize) -> Option<f32> {
        let b = b.min(self.x.len().saturating_sub(1));
        let residue = |k: usize| self.x[k] - self.q[k];
        let mut v: Vec<f32> = (a..b).map(|k| (residue(k + 1) - residue(k)).abs()).collect();
        if v.is_empty() {
            return None;
        }
        let mid = v.len() / 2;
        Some(ONSET_NOISE * *v.select_nth_unstable_by(mid, f32::total_cmp).1 / std::f32::consts::SQRT_2)
    }
}

/// Lower quartile of `x` (`None` when empty).
fn lower_quartile(x: &[f32]) -> Option<f32> {
    if x.is_empty() {
        return None;
    }
    let mut v = x.to_vec();
    let idx = v.len() / 4;
    Some(*v.select_nth_unstable_by(idx, f32::total_cmp).1)
}

fn min_over(x: &[f32], a: usize, b: usize) -> Option<f32> {
    (a < b && b <= x.len()).then(|| x[a..b].iter().copied().fold(f32::INFINITY, f32::min))
}

#[cfg(test)]
#[allow(clippy::expect_used)] // a test fails by panicking
mod tests {
    use super::*;
    use crate::delineate::signals::pacing_spikes;
    use crate::delineate::tests::bump;

    const FS: f64 = 500.0;

    /// Small deterministic noise in ±`amp` (linear congruential generator).
    fn noise(n: usize, amp: f32, seed: u64) -> Vec<f32> {
        let mut s = seed;
        (0..n)
            .map(|_| {
                s = s.wrapping_mul(6_364_136_223_846_793_005).wrapping_add(1_442_695_040_888_963_407);
                ((s >> 33) as f32 / (1u64 << 31) as f32 * 2.0 - 1.0) * amp
            })
            .collect()
    }

    /// Beats every second from 0.5 s over `secs` s: QRS from `on` to `on + width` s after each beat start, peak
    /// at its middle, `amp` µV per lead. Returns the leads and the QRS onsets (s).
    fn beats(secs: f64, width: f64, amps: &[f64]) -> (Vec<Vec<f32>>, Vec<f64>) {
        let n = (secs * FS) as usize;
        let onsets: Vec<f64> = (0..).map(|i| 0.5 + f64::from(i)).take_while(|&t| t + 1.0 < secs).collect();
        let leads = amps
            .iter()
            .map(|&a| {
                (0..n)
                    .map(|k| {
                        let t = k as f64 / FS;
                        onsets.iter().map(|&o| bump(t, o, o + width / 2.0, o + width, a)).sum::<f64>() as f32
                    })
                    .collect()
            })
            .collect();
        (leads, onsets)
    }

    #[test]
    fn agreed_first_takes_the_first_edge_another_lead_confirms() {
        assert_eq!(agreed_first(&[100, 120, 122, 130], 3), Some(120));
        assert_eq!(agreed_first(&[100, 102, 120, 130], 3), Some(100));
        // No two leads agree: second earliest with four or more leads, earliest with fewer.
        assert_eq!(agreed_first(&[100, 110, 120, 130], 3), Some(110));
        assert_eq!(agreed_first(&[100, 110], 3), Some(100));
        assert_eq!(agreed_first(&[], 3), None);
        // Ends, latest first: the latest end another lead confirms.
        assert_eq!(agreed_first(&[160, 141, 140, 120], 3), Some(141));
        assert_eq!(agreed_first(&[160, 150, 140, 130], 3), Some(150));
    }

    #[test]
    fn pacing_spikes_are_found_and_steep_qrs_limbs_are_not() {
        let (mut leads, onsets) = beats(6.0, 0.060, &[1500.0]);
        let x = &mut leads[0];
        let spikes: Vec<usize> = onsets.iter().map(|&o| ((o - 0.010) * FS) as usize).collect();
        for &s in &spikes {
            x[s] += 2000.0;
        }
        let x64: Vec<f64> = x.iter().map(|&v| f64::from(v)).collect();
        assert_eq!(pacing_spikes(&x64, FS), spikes);
        let clean: Vec<f64> = beats(6.0, 0.060, &[1500.0]).0[0].iter().map(|&v| f64::from(v)).collect();
        assert!(pacing_spikes(&clean, FS).is_empty());
    }

    #[test]
    fn paced_qrs_starts_after_the_spike() {
        // Wide paced QRS (140 ms) 10 ms after a one-sample 2 mV stimulus artefact in both leads.
        let (mut leads, onsets) = beats(6.0, 0.140, &[1200.0, -900.0]);
        for x in &mut leads {
            for &o in &onsets {
                x[((o - 0.010) * FS) as usize] += 2000.0;
            }
        }
        let refs: Vec<&[f32]> = leads.iter().map(Vec::as_slice).collect();
        let sig = Signals::new(&refs, FS);
        for &o in &onsets[1..onsets.len() - 1] {
            let spike = ((o - 0.010) * FS) as usize;
            let r = ((o + 0.070) * FS) as usize;
            let (on, _) = qrs_bounds(&sig, r, 0, sig.len());
            let on = on.expect("onset found");
            assert!(on > spike, "onset {on} not after the spike at {spike}");
            let err_ms = (on as f64 / FS - o) * 1000.0;
            assert!(err_ms.abs() <= 10.0, "onset error {err_ms:+.1} ms");
        }
    }

    #[test]
    fn abrupt_edges_are_found_on_the_sample_in_clean_leads() {
        // A triangular QRS (slope jumps from zero at its onset and back to zero at its end, 80 ms) in three clean
        // leads of different size: the 40 Hz low-pass and the smoothing spread both corners outward, the
        // unfiltered leads show them on the sample. Tolerance 1 sample.
        let n = 3000;
        let onsets: Vec<usize> = (0..5).map(|i| 250 + 500 * i).collect();
        let width = 40;
        let leads: Vec<Vec<f32>> = [1000.0f32, -700.0, 300.0]
            .iter()
            .map(|&a| {
                let mut x = vec![0.0f32; n];
                for &o in &onsets {
                    for k in 0..=width {
                        x[o + k] = a * (1.0 - (2.0 * k as f32 / width as f32 - 1.0).abs());
                    }
                }
                x
            })
            .collect();
        let refs: Vec<&[f32]> = leads.iter().map(Vec::as_slice).collect();
        let sig = Signals::new(&refs, FS);
        for &o in &onsets[1..onsets.len() - 1] {
            let (on, end) = qrs_bounds(&sig, o + width / 2, 0, sig.len());
            let (on, end) = (on.expect("onset found"), end.expect("end found"));
            assert!(on.abs_diff(o) <= 1, "onset {on} vs {o}");
            assert!(end.abs_diff(o + width) <= 1, "end {end} vs {}", o + width);
        }
    }

    #[test]
    fn a_notched_qrs_ends_after_its_second_peak_not_at_the_notch() {
        // One lead: a tall narrow R (1000 µV, 0–40 ms) and a lower, slower R' (500 µV, 30–130 ms), as in a bundle
        // branch block. The slope falls to nothing at the notch between them; R' is too slow to count in the steep
        // part, so the end was sought from R's downstroke and found at the notch (789 for 815 before RESUMED).
        let n = 3000;
        let onsets: Vec<usize> = (0..5).map(|i| 250 + 500 * i).collect();
        let ms = |v: f64| (v * FS / 1000.0) as usize;
        let lead: Vec<f32> = (0..n)
            .map(|k| {
                let t = k as f64 / FS;
                onsets
                    .iter()
                    .map(|&o| {
                        let o = o as f64 / FS;
                        bump(t, o, o + 0.020, o + 0.040, 1000.0) + bump(t, o + 0.030, o + 0.080, o + 0.130, 500.0)
                    })
                    .sum::<f64>() as f32
            })
            .collect();
        let sig = Signals::new(&[&lead], FS);
        for &o in &onsets[1..onsets.len() - 1] {
            let (on, end) = qrs_bounds(&sig, o + ms(20.0), 0, sig.len());
            let (on, end) = (on.expect("onset found"), end.expect("end found"));
            assert!(on.abs_diff(o) <= 1, "onset {on} vs {o}");
            assert!(end.abs_diff(o + ms(130.0)) <= 1, "end {end} vs {}", o + ms(130.0));
        }
    }

    #[test]
    fn noisy_lead_does_not_start_the_qrs_early() {
        // A clean lead and a lead with ±40 µV noise; the noise must not move the onset out of ±10 ms.
        let (mut leads, onsets) = beats(6.0, 0.090, &[1000.0, 800.0]);
        for (v, e) in leads[1].iter_mut().zip(noise(3000, 40.0, 7)) {
            *v += e;
        }
        let refs: Vec<&[f32]> = leads.iter().map(Vec::as_slice).collect();
        let sig = Signals::new(&refs, FS);
        for &o in &onsets[1..onsets.len() - 1] {
            let r = ((o + 0.045) * FS) as usize;
            let (on, end) = qrs_bounds(&sig, r, 0, sig.len());
            let err_ms = (on.expect("onset found") as f64 / FS - o) * 1000.0;
            assert!(err_ms.abs() <= 10.0, "onset error {err_ms:+.1} ms");
            let end_ms = (end.expect("end found") as f64 / FS - o - 0.090) * 1000.0;
            assert!(end_ms.abs() <= 10.0, "end error {end_ms:+.1} ms");
        }
    }

    #[test]
    fn the_steep_run_crosses_short_dips_and_stops_at_quiet_or_long_ones() {
        // Envelope levels walked outward from its peak: 2 = steep, 1 = neither, 0 = quiet. Limits: 3 quiet
        // samples in a row, 6 samples past the last steep one.
        let walk = |levels: &[u8]| {
            let steep = |k: usize| levels[k] == 2;
            let quiet = |k: usize| levels[k] == 0;
            steep_reach(0..levels.len(), steep, quiet, (3, 6))
        };
        // A short quiet dip and a broad top (5 samples under steep) are crossed.
        assert_eq!(walk(&[2, 2, 0, 0, 2, 1, 1, 1, 1, 1, 2, 0]), Some(10));
        // Four quiet samples end the run: the steep stretch beyond (an artefact) is not reached.
        assert_eq!(walk(&[2, 2, 0, 0, 0, 0, 2, 2]), Some(1));
        // Seven samples under steep, none of them quiet (noise), end it too; six and three quiet are crossed.
        assert_eq!(walk(&[2, 1, 1, 1, 1, 1, 1, 1, 2]), Some(0));
        assert_eq!(walk(&[2, 1, 1, 1, 1, 1, 1, 2]), Some(7));
        assert_eq!(walk(&[2, 0, 0, 0, 2]), Some(4));
        assert_eq!(walk(&[1, 0, 1]), None);
    }
}
