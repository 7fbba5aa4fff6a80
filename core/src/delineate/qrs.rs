//! QRS onset and J point, found per lead and combined into global boundaries. The steep part of the QRS comes
//! from the multi-lead slope envelope; from there each lead's own |slope| (40 Hz signal, smoothed over
//! ≈ 10 ms) is walked outward to where it falls a set fraction of the way from that lead's quiet level before
//! (after) the QRS to its own QRS peak slope. Leads with a clear QRS vote: the global onset is a robust
//! earliest of their onsets and the J point a robust latest of their ends (the usual 12-lead global QRS runs
//! from the first lead to start to the last to finish).

use super::signals::{Signals, smooth};

/// Fraction of a lead's slope rise above its quiet level that marks its onset or end.
// Common practice, no source: slope-threshold delineators use 5–20 % of the QRS peak slope.
const EDGE_FRACTION: f32 = 0.05;
/// The steep part of the QRS: envelope at least this fraction of its peak.
// Common practice, no source.
const STEEP: f32 = 0.4;
/// A lead votes when its QRS peak slope is at least this fraction of the steepest lead's.
// Common practice, no source: a lead with a small, flat QRS mostly shows noise and ST slope at its edges.
const CLEAR_LEAD: f32 = 0.35;
/// With at least this many voting leads, the global onset (end) is the second earliest (latest) lead's, so
/// one noisy lead cannot move it; with fewer, the earliest (latest).
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
    (robust_first(&onsets), robust_first(&ends))
}

/// The first entry of `v` (already ordered), or the second with at least [`ROBUST_LEADS`] entries.
fn robust_first(v: &[usize]) -> Option<usize> {
    if v.len() >= ROBUST_LEADS { v.get(1).copied() } else { v.first().copied() }
}

/// Samples `a0..=b0` of the recording; a lead's envelope `e` holds them from index 0.
struct Window {
    a0: usize,
    b0: usize,
}

impl Window {
    /// A lead's onset: walking back from `first` (start of the steep part) to where its slope `e` is at or
    /// below [`EDGE_FRACTION`] of the way from its quiet level (the 200–20 ms before `first`) to `peak`.
    fn onset(&self, e: &[f32], peak: f32, first: usize, sig: &Signals) -> Option<usize> {
        let a = self.a0;
        let q = min_over(e, 0, first.saturating_sub(sig.samples(0.020)).max(a) - a)?;
        let thr = q + EDGE_FRACTION * (peak - q);
        (a..=first).rev().find(|&k| e[k - a] <= thr)
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

fn min_over(x: &[f32], a: usize, b: usize) -> Option<f32> {
    (a < b && b <= x.len()).then(|| x[a..b].iter().copied().fold(f32::INFINITY, f32::min))
}
