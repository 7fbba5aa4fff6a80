//! QRS onset and J point, found per lead and combined into global boundaries. The steep part of the QRS comes
//! from the multi-lead slope envelope; from there each lead's own |slope| (40 Hz signal, smoothed over
//! ≈ 10 ms) is walked outward to where it falls a set fraction of the way from that lead's quiet level before
//! (after) the QRS to its own QRS peak slope; before the QRS the threshold is never below a multiple of the
//! lead's noise (its typical slope before the QRS), so a clean lead is followed down to its first small
//! deflection while a noisy lead stops where the QRS rises out of its noise. Leads with a clear QRS vote: the
//! global onset is the earliest lead onset that another lead confirms within [`AGREE_S`], and the J point a
//! robust latest of their ends (the usual 12-lead global QRS runs from the first lead to start to the last to
//! finish). A pacing spike before the QRS bounds the onset search: the QRS starts after the stimulus artefact.

use super::signals::{Signals, smooth};

/// Fraction of a lead's slope rise above its quiet level that marks its end.
// Common practice, no source: slope-threshold delineators use 5–20 % of the QRS peak slope.
const EDGE_FRACTION: f32 = 0.05;
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
/// The steep part of the QRS: envelope at least this fraction of its peak.
// Common practice, no source.
const STEEP: f32 = 0.4;
/// A lead votes when its QRS peak slope is at least this fraction of the steepest lead's.
// Common practice, no source: a lead with a small, flat QRS mostly shows noise and ST slope at its edges.
const CLEAR_LEAD: f32 = 0.35;
/// With at least this many voting leads, the global end is the second latest lead's, so one noisy lead cannot
/// move it; with fewer, the latest. The same holds for the onset when no two leads agree (see [`AGREE_S`]).
// Common practice, no source.
const ROBUST_LEADS: usize = 4;
/// A lead's QRS end is sought at most this long after the steep part, s (later is ST or T slope).
// Common practice, no source.
const END_REACH_S: f64 = 0.120;

/// QRS onset and J point around R peak `r`, as sample indices. `None` where no lead gives a clear edge.
#[must_use]
pub fn qrs_bounds(sig: &Signals, r: usize, min_start: usize, max_end: usize) -> (Option<usize>, Option<usize>) {
    let n = sig.len();
    if n == 0 || r >= n {
        return (None, None);
    }
    let lo = r.saturating_sub(sig.samples(0.120)).max(min_start);
    // After a pacing spike between the search start and R, the QRS can only start once the artefact is over.
    let lo = match sig.spikes.iter().rev().find(|&&s| s >= lo && s < r) {
        Some(&s) => (s + sig.samples(AFTER_SPIKE_S)).min(r),
        None => lo,
    };
    let hi = (r + sig.samples(0.150)).min(n - 1).min(max_end);
    if lo >= hi {
        return (None, None);
    }
    let near = (r.saturating_sub(sig.samples(0.060)).max(lo), (r + sig.samples(0.060)).min(hi));
    // Steep part from the multi-lead envelope: the first and last samples at ≥ STEEP of its peak near R.
    let g = &sig.env;
    let g_peak = (near.0..=near.1).map(|k| g[k]).fold(0.0f32, f32::max);
    if g_peak <= 0.0 {
        return (None, None);
    }
    let first = (lo..=r).find(|&k| g[k] >= STEEP * g_peak).unwrap_or(r);
    let last = (r..=hi).rev().find(|&k| g[k] >= STEEP * g_peak).unwrap_or(r);
    // Each lead's smoothed |slope| on a window holding every sample the searches can reach.
    let win = Window {
        a0: first.saturating_sub(sig.samples(0.200)).max(min_start.min(first)),
        b0: (last + sig.samples(0.200)).min(n - 1).min(max_end.max(last)),
        on_min: lo,
    };
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
        return (None, None);
    }
    let mut onsets = Vec::new();
    let mut ends = Vec::new();
    for (e, peak) in envs.iter().filter(|(_, p)| *p >= CLEAR_LEAD * top) {
        onsets.extend(win.onset(e, *peak, first, sig));
        ends.extend(win.end(e, *peak, last, sig));
    }
    onsets.sort_unstable();
    ends.sort_unstable_by(|a, b| b.cmp(a));
    (agreed_first(&onsets, sig.samples(AGREE_S)), robust_first(&ends))
}

/// The first entry of ascending `v` that the next one follows within `agree` samples; without such a pair, the
/// robust first ([`robust_first`]). With two entries this is the earlier one either way.
fn agreed_first(v: &[usize], agree: usize) -> Option<usize> {
    v.windows(2).find(|w| w[1] - w[0] <= agree).map(|w| w[0]).or_else(|| robust_first(v))
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
    /// A lead's onset: walking back from `first` (start of the steep part) to where its slope `e` is at or
    /// below [`ONSET_FRACTION`] of the way from its quiet level (least slope over the 200–20 ms before
    /// `first`) to `peak`, and at or below [`ONSET_NOISE`] times its noise slope over the same time; never
    /// before `on_min`.
    fn onset(&self, e: &[f32], peak: f32, first: usize, sig: &Signals) -> Option<usize> {
        let a = self.a0;
        let quiet = &e[..first.saturating_sub(sig.samples(0.020)).max(a) - a];
        let q = min_over(quiet, 0, quiet.len())?;
        let noise = lower_quartile(quiet)?;
        let thr = (q + ONSET_FRACTION * (peak - q)).max(ONSET_NOISE * noise);
        (a..=first).rev().find(|&k| e[k - a] <= thr).map(|k| k.max(self.on_min))
    }

    /// A lead's end: walking on from `last` (end of the steep part), at most [`END_REACH_S`], to where its
    /// slope is at or below [`EDGE_FRACTION`] of the way from its quiet level (20–200 ms after `last`) to `peak`.
    fn end(&self, e: &[f32], peak: f32, last: usize, sig: &Signals) -> Option<usize> {
        let b = self.b0;
        let q = min_over(e, (last + sig.samples(0.020)).min(b) - self.a0, b - self.a0)?;
        let thr = q + EDGE_FRACTION * (peak - q);
        let reach = (last + sig.samples(END_REACH_S)).min(b);
        (last..=reach).find(|&k| e[k - self.a0] <= thr)
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
