//! QRS onset and J point from the multi-lead slope envelope: the QRS is where the summed |slope| of all leads
//! (each lead scaled by its typical QRS slope, so every lead counts equally) stands high; its onset (end) is where the envelope, walking out from the steep part, falls to a set
//! fraction of the way from the quiet level before (after) the QRS to the envelope's QRS peak. Summing the
//! leads makes the boundaries global (the first lead to start and the last to finish move the envelope).

use super::signals::Signals;

/// Fraction of the envelope's rise above the quiet level that marks the onset.
// Common practice, no source: slope-threshold delineators use 5–20 % of the QRS peak slope.
const ON_FRACTION: f32 = 0.07;
/// Fraction for the J point (the ST segment slopes, so its quiet level sits higher than the PR segment's).
const END_FRACTION: f32 = 0.07;
/// The steep part of the QRS: envelope at least this fraction of its peak.
const STEEP: f32 = 0.4;

/// QRS onset and J point around R peak `r`, as sample indices. `None` where the envelope gives no clear edge.
#[must_use]
pub fn qrs_bounds(sig: &Signals, r: usize, min_start: usize, max_end: usize) -> (Option<usize>, Option<usize>) {
    let env = &sig.env;
    let n = env.len();
    if n == 0 || r >= n {
        return (None, None);
    }
    let lo = r.saturating_sub(sig.samples(0.120)).max(min_start);
    let hi = (r + sig.samples(0.150)).min(n - 1).min(max_end);
    if lo >= hi {
        return (None, None);
    }
    // Peak of the envelope near R.
    let near = (r.saturating_sub(sig.samples(0.060)).max(lo), (r + sig.samples(0.060)).min(hi));
    let peak = (near.0..=near.1).map(|k| env[k]).fold(0.0f32, f32::max);
    if peak <= 0.0 {
        return (None, None);
    }
    // Steep region: the first and last samples at ≥ STEEP·peak, grown outward from R while they connect.
    let first = (lo..=r).find(|&k| env[k] >= STEEP * peak).unwrap_or(r);
    let last = (r..=hi).rev().find(|&k| env[k] >= STEEP * peak).unwrap_or(r);

    let onset = {
        let a = first.saturating_sub(sig.samples(0.200)).max(min_start);
        let quiet = min_over(env, a, first.saturating_sub(sig.samples(0.020)).max(a));
        quiet.and_then(|q| {
            let thr = q + ON_FRACTION * (peak - q);
            (a..=first).rev().find(|&k| env[k] <= thr)
        })
    };
    let end = {
        let b = (last + sig.samples(0.200)).min(n - 1).min(max_end.max(last));
        let quiet = min_over(env, (last + sig.samples(0.020)).min(b), b);
        quiet.and_then(|q| {
            let thr = q + END_FRACTION * (peak - q);
            (last..=b).find(|&k| env[k] <= thr)
        })
    };
    (onset, end)
}

fn min_over(x: &[f32], a: usize, b: usize) -> Option<f32> {
    (a < b && b <= x.len()).then(|| x[a..b].iter().copied().fold(f32::INFINITY, f32::min))
}
