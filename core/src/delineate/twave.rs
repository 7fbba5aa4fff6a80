//! T wave end on the terminal limb of the T wave: from the limb's steepest point (as in the tangent method,
//! McLaughlin, Campbell & Murray, Br Heart J 1995;74:84-9; references.md §8), the end is the point that
//! maximises the area of the trapezium it forms with the steepest point and a fixed point further on
//! (trapezium-area method, Vázquez-Seisdedos et al., Biomed Eng Online 2011;10:77 — from memory). The end
//! itself needs no isoelectric level and lands nearer the visual end than the tangent's baseline crossing. Works for
//! upright, inverted and biphasic T waves (the terminal lobe is used). Each lead gives a T end when its T wave
//! is clear. The global T end is the latest lead end (as the 12-lead global T end is defined: the last lead to
//! finish) among the leads whose T wave is at least [`CANDIDATE`] of the largest, leaving out any lead that ends
//! more than [`AGREE_S`] after the median end of the leads with a large T (at least [`RELIABLE`] of the largest).

use super::signals::Signals;

/// The second lobe of a biphasic T counts as terminal when at least this fraction of the main lobe.
// Common practice, no source.
const BIPHASIC: f32 = 0.5;
/// …and when its peak comes within this time of the main lobe's (a later, separate wave is a U wave), s.
// Common practice, no source.
const BIPHASIC_GAP_S: f64 = 0.150;
/// A lead's T wave sets the agreement reference (the median end) when its amplitude is at least this fraction
/// of the largest T over the leads.
// Common practice, no source: leads with a near-flat T give unreliable ends, so they do not set the reference.
const RELIABLE: f32 = 0.35;
/// A lead's T end may be the global (latest) end when its amplitude is at least this fraction of the largest T
/// and it agrees with the reference. Smaller than [`RELIABLE`]: the last lead to finish is often one with a
/// smaller T wave, and the agreement test already guards against a lead misled by another wave.
// Common practice, no source.
const CANDIDATE: f32 = 0.20;
/// A T wave smaller than this (µV) is not delineated.
// Common practice, no source.
const MIN_T_UV: f32 = 25.0;
/// The trapezium's fixed point lies this long after the steepest point of the terminal limb, s.
// Common practice, no source: past the end of the limb on almost every T wave.
const TRAPEZIUM_REACH_S: f64 = 0.120;
/// Leads whose T end lies more than this after the median lead's are left out of the latest end, s.
// Common practice, no source.
const AGREE_S: f64 = 0.060;

/// One lead's T wave: amplitude of the lobe used (µV, signed) and its T end (fractional sample).
#[derive(Debug, Clone, Copy)]
struct LeadT {
    amplitude: f32,
    end: f64,
}

/// Global T end for a beat. `iso_at` is where the isoelectric level is read (just before QRS onset), `from`
/// the start of the T search (after the J point) and `to` its end (before the next beat's P).
#[must_use]
pub fn t_end(sig: &Signals, iso_at: usize, from: usize, to: usize) -> Option<usize> {
    let n = sig.len();
    let to = to.min(n.saturating_sub(2));
    if from + sig.samples(0.060) >= to || iso_at < sig.samples(0.020) {
        return None;
    }
    let found: Vec<LeadT> = sig
        .slow
        .iter()
        .filter_map(|slow| {
            // Isoelectric level: median of the 200 ms before QRS onset (PR and TP segments; the P wave is brief).
            let mut pre: Vec<f32> = slow[iso_at.saturating_sub(sig.samples(0.200))..=iso_at].to_vec();
            let mid = pre.len() / 2;
            let iso = *pre.select_nth_unstable_by(mid, f32::total_cmp).1;
            lead_t_end(
                slow,
                iso,
                from,
                to,
                sig.samples(0.250),
                sig.samples(BIPHASIC_GAP_S),
                sig.samples(TRAPEZIUM_REACH_S),
            )
        })
        .collect();
    let biggest = found.iter().map(|t| t.amplitude.abs()).fold(0.0f32, f32::max);
    if biggest < MIN_T_UV {
        return None;
    }
    let mut reference: Vec<f64> =
        found.iter().filter(|t| t.amplitude.abs() >= RELIABLE * biggest).map(|t| t.end).collect();
    reference.sort_by(f64::total_cmp);
    // Latest end among the leads that agree: a lead more than AGREE_S past the median of the large-T leads is
    // taken as misled (a U wave or the next P wave), not as the last lead to finish.
    let med = reference[reference.len() / 2];
    let latest = found
        .iter()
        .filter(|t| t.amplitude.abs() >= CANDIDATE * biggest && t.end <= med + AGREE_S * sig.fs)
        .map(|t| t.end)
        .fold(f64::NEG_INFINITY, f64::max);
    // A tangent that lands past the last sample gives no T end (the recording stops before the wave does).
    (latest.is_finite() && latest >= from as f64 && latest.round() < n as f64).then(|| latest.round() as usize)
}

/// T end on one lead, or `None` when the terminal limb is flat or the end lands outside the search window.
/// `reach`: [`TRAPEZIUM_REACH_S`] in samples.
fn lead_t_end(x: &[f32], iso: f32, from: usize, to: usize, max_limb: usize, gap: usize, reach: usize) -> Option<LeadT> {
    let dev = |k: usize| x[k] - iso;
    let main = (from..=to).max_by(|&i, &j| dev(i).abs().total_cmp(&dev(j).abs()))?;
    let a_main = dev(main);
    // Terminal lobe: an opposite-sign extremum after the main one, big enough, makes the T biphasic.
    let mut peak = main;
    if main < to {
        let opp = (main + 1..=to.min(main + gap))
            .max_by(|&i, &j| (-dev(i) * a_main.signum()).total_cmp(&(-dev(j) * a_main.signum())));
        if let Some(o) = opp
            && -dev(o) * a_main.signum() >= BIPHASIC * a_main.abs()
            && o + 2 < to
        {
            peak = o;
        }
    }
    let amp = dev(peak);
    let sign = amp.signum();
    // Steepest descent back toward the isoelectric level after the peak.
    let stop = (peak + max_limb).min(to + max_limb / 2).min(x.len() - 2);
    let mut best: Option<(usize, f32)> = None;
    for k in peak + 1..=stop {
        let slope = (x[k + 1] - x[k - 1]) * 0.5;
        let toward = -slope * sign; // positive when heading back to baseline
        if dev(k) * sign < 0.0 {
            break; // crossed the baseline: the limb is over
        }
        if best.is_none_or(|(_, s)| toward > s) {
            best = Some((k, toward));
        }
    }
    let (k, s) = best?;
    if s <= 1e-3 {
        return None;
    }
    // Trapezium with corners at the steepest point (k, y_k), the candidate (i, y_i) and the fixed point x_r on
    // the baseline: area ∝ (y_k − y_i)(2·x_r − i − k), largest at the T end.
    let xr = (k + reach).min(x.len() - 1);
    let y_k = dev(k) * sign;
    let area = |i: usize| (y_k - dev(i) * sign) * (2 * xr - i - k) as f32;
    let end = (k..=xr).max_by(|&i, &j| area(i).total_cmp(&area(j)))? as f64;
    (end > peak as f64 && end <= (to + max_limb / 2) as f64).then_some(LeadT { amplitude: amp, end })
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn trapezium_on_a_triangle_ends_where_the_line_meets_zero() {
        // A T wave shaped as a rise then a straight fall from 300 µV at sample 100 to 0 at sample 160.
        let mut x = vec![0.0f32; 300];
        for k in 40..100 {
            x[k] = 300.0 * (k - 40) as f32 / 60.0;
        }
        for k in 100..160 {
            x[k] = 300.0 * (160 - k) as f32 / 60.0;
        }
        let t = lead_t_end(&x, 0.0, 30, 200, 100, 40, 100).map(|t| t.end.round() as usize);
        assert_eq!(t, Some(160));
        let inv: Vec<f32> = x.iter().map(|v| -v).collect();
        assert_eq!(lead_t_end(&inv, 0.0, 30, 200, 100, 40, 100).map(|t| t.end.round() as usize), Some(160));
    }
}
