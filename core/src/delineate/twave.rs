//! T wave end on the terminal limb of the T wave. The limb's steepest point is found as in the tangent method
//! (McLaughlin, Campbell & Murray, Br Heart J 1995;74:84-9; references.md §8), but the end is not the tangent's
//! crossing of the isoelectric level: it is the point that maximises the area of the trapezium it forms with the
//! steepest point and a fixed point further on (trapezium-area method, Vázquez-Seisdedos et al., Biomed Eng
//! Online 2011;10:77 — from memory). The end itself needs no isoelectric level. Measured on the LUDB per-lead
//! annotations (leads with a large T), the trapezium end scatters less than the tangent's crossing (robust SD
//! about 9 against 12 ms). Works for upright, inverted and biphasic T waves (the terminal lobe is used), and for
//! a T wave rising out of a displaced ST segment ([`ST_DISPLACED`]).
//!
//! The trapezium lands on the knee where a limb regains the baseline only when its fixed point lies far enough
//! past the knee (about 3.3 σ past the steepest point for a Gaussian limb cut at 2.5 σ); a fixed point further
//! out moves the end later on real T waves, whose tails fade slowly. So the fixed point stays put, and where the
//! unfiltered lead is clean enough to show it (its step noise and quantisation well below the step looked for),
//! the end is carried on over the samples where the lead still heads back to the baseline at more than
//! [`MOVING`] of the limb's steepest slope, or, where the lead has already stopped there, moved back to the first
//! sample it stopped at (the 12 Hz low-pass spreads a narrow T wave's knee later: the demo waves at 120–150 bpm
//! ended 8–10 ms late) ([`Lead::end_at_knee`]). On real records the noise gate mostly keeps the trapezium end (QT
//! Database and LUDB T ends within 0.3 ms of it); on a clean T wave the end reaches the knee.
//!
//! Combining leads: each lead gives a T end when its T wave is clear; a lead's end that jumps away from the same
//! lead's ends on the neighbouring beats is dropped ([`drop_inconsistent_leads`]). The global T end is the latest
//! lead end (as the 12-lead global T end is defined: the last lead to finish) among the leads whose T wave is at
//! least [`CANDIDATE`] of the largest, leaving out any lead that ends more than [`AGREE_S`] after the median end of
//! the leads with a large T (at least [`RELIABLE`] of the largest).

use super::signals::Signals;
use crate::beat::BeatKind;

/// The isoelectric level of a lead is the median of its 12 Hz signal over this long before the QRS onset, s.
// Common practice, no source: the PR segment and the end of the TP segment; the P wave is brief.
pub(super) const ISO_S: f64 = 0.200;

/// The second lobe of a biphasic T counts as terminal when at least this fraction of the main lobe.
// Common practice, no source.
const BIPHASIC: f32 = 0.5;
/// …and when its peak comes within this time of the main lobe's (a later, separate wave is a U wave), s.
// Common practice, no source.
const BIPHASIC_GAP_S: f64 = 0.150;
/// The main lobe is an ST displacement rather than the T wave when it already stands at this fraction of its size
/// where the search starts (50 ms after the J point): an ST segment depressed (or raised) from the J point on, as
/// in ventricular strain or ischaemia, with the T wave rising out of it. An opposite lobe of at least [`BIPHASIC`]
/// of it is then sought anywhere in the search, not only within [`BIPHASIC_GAP_S`]. Without this, the end of the
/// displaced segment, where the T wave crosses the baseline on its way up (near its peak), was taken as the T end.
// Common practice, no source: half its size (0.3 to 0.7 measure alike). Measured against the LUDB experts'
// per-lead T ends (`t_leads`, 4555 lead T waves): before, 107 of the 125 ends more than 60 ms early lay within
// 20 ms of the experts' T peak; +10.4 ± 30.6 ms with 6.8 % beyond ±60 ms, now +11.8 ± 27.7 with 5.9 % (85 early,
// 152 late, from 125 and 150). LUDB global T end −4.6 ± 29.2 → −4.5 ± 28.9; QT Database unchanged, with muscle
// noise added (accuracy_noise) at 12 dB +0.9 ± 26.2 → +1.6 ± 26.3 and at 6 dB +1.8 ± 31.5 → +3.3 ± 34.2 (a lobe
// of noise later in the search taken for the T wave).
const ST_DISPLACED: f32 = 0.5;
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
/// Past the trapezium end, the lead is still on its terminal limb while the unfiltered lead steps back toward
/// the baseline by more than this fraction of the limb's steepest slope each sample.
// Source: threshold on the first derivative as a fraction of the limb's largest slope (Laguna et al., Comput
// Biomed Res 1994;27:45-60 — from memory); the fraction is common practice, no source.
const MOVING: f32 = 0.05;
/// The unfiltered lead resolves [`MOVING`] where its step noise is at most this fraction of that step.
// Common practice, no source: as for the QRS edges (`STILL` in `qrs`).
const STILL: f32 = 0.5;
/// Leads whose T end lies more than this after the median lead's are left out of the latest end, s.
// Common practice, no source.
const AGREE_S: f64 = 0.060;

/// A lead's T end is left out when it lies more than this from the median of the same lead's T ends (each
/// measured from its beat's QRS onset) over the neighbouring beats, s.
// Common practice, no source: the QT interval changes by a few tens of ms from one beat to the next (see
// `T_OUTLIER_S` in the parent module); one lead jumping further has followed another wave or noise.
const LEAD_CONSISTENT_S: f64 = 0.040;
/// Neighbouring beats on each side compared by [`drop_inconsistent_leads`].
// Common practice, no source.
const NEIGHBOURS: usize = 6;
/// Fewest T ends of a lead (the beat's own included) among the neighbours for the comparison to be made.
// Common practice, no source.
const MIN_NEIGHBOURS: usize = 5;

/// One lead's T wave: amplitude of the lobe used (µV, signed) and its T end (fractional sample).
#[derive(Debug, Clone, Copy)]
struct LeadT {
    amplitude: f32,
    end: f64,
}

/// One beat's T wave as found on each lead, before the leads are combined by [`global_end`].
#[derive(Debug, Clone)]
pub struct BeatT {
    /// Where the isoelectric level was read (just before QRS onset), sample; lead ends are compared from here.
    anchor: usize,
    /// Start of the T search, sample.
    from: usize,
    /// Each lead's T (`None` where the lead gives none), in lead order.
    leads: Vec<Option<LeadT>>,
}

impl BeatT {
    /// Each lead's T wave as (signed amplitude of the lobe used, µV; T end, fractional sample), in lead order.
    #[must_use]
    pub fn lead_ends(&self) -> Vec<Option<(f32, f64)>> {
        self.leads.iter().map(|t| t.map(|t| (t.amplitude, t.end))).collect()
    }
}

/// Each lead's T wave for a beat. `iso_at` is where the isoelectric level is read (just before QRS onset),
/// `from` the start of the T search (after the J point) and `to` its end (before the next beat's P); no lead's T
/// end, nor the trapezium's fixed point, lies past `guard` (where the next P wave may start). `None` when the
/// search window is too short.
#[must_use]
pub fn lead_ts(sig: &Signals, iso_at: usize, from: usize, (to, guard): (usize, usize)) -> Option<BeatT> {
    let n = sig.len();
    let to = to.min(n.saturating_sub(2));
    if from + sig.samples(0.060) >= to || iso_at < sig.samples(0.020) {
        return None;
    }
    let leads = sig
        .slow
        .iter()
        .zip(&sig.wide)
        .map(|(slow, wide)| {
            // Isoelectric level: median of the ISO_S before QRS onset (PR and TP segments; the P wave is brief).
            let mut pre: Vec<f32> = slow[iso_at.saturating_sub(sig.samples(ISO_S))..=iso_at].to_vec();
            let mid = pre.len() / 2;
            let iso = *pre.select_nth_unstable_by(mid, f32::total_cmp).1;
            lead_t_end(
                Lead { x: slow, wide },
                iso,
                from,
                (to, guard),
                sig.samples(0.250),
                sig.samples(BIPHASIC_GAP_S),
                sig.samples(TRAPEZIUM_REACH_S),
            )
        })
        .collect();
    Some(BeatT { anchor: iso_at, from, leads })
}

/// Removes, lead by lead, the T ends that disagree with the same lead's T ends on the neighbouring beats of the
/// same kind ([`NEIGHBOURS`] each side; at least [`MIN_NEIGHBOURS`] ends needed): more than [`LEAD_CONSISTENT_S`]
/// from their median, measured from each beat's QRS onset. `beats` in time order (`None` = beat without a T
/// search) with their `kinds`: an ectopic beat's repolarisation differs from a dominant beat's, so the two are
/// never compared.
pub fn drop_inconsistent_leads(sig: &Signals, beats: &mut [Option<BeatT>], kinds: &[BeatKind]) {
    for kind in [BeatKind::Dominant, BeatKind::Other] {
        let idx: Vec<usize> = (0..beats.len()).filter(|&i| beats[i].is_some() && kinds.get(i) == Some(&kind)).collect();
        drop_inconsistent_among(sig, beats, &idx);
    }
}

/// [`drop_inconsistent_leads`] over the beats `idx` (indices into `beats`, in time order).
fn drop_inconsistent_among(sig: &Signals, beats: &mut [Option<BeatT>], idx: &[usize]) {
    let tol = LEAD_CONSISTENT_S * sig.fs;
    for lead in 0..sig.slow.len() {
        let rel: Vec<Option<f64>> = idx
            .iter()
            .map(|&i| {
                let b = beats[i].as_ref()?;
                Some(b.leads.get(lead).copied().flatten()?.end - b.anchor as f64)
            })
            .collect();
        for (j, &i) in idx.iter().enumerate() {
            let Some(v) = rel[j] else { continue };
            let mut near: Vec<f64> = rel[j.saturating_sub(NEIGHBOURS)..(j + NEIGHBOURS + 1).min(rel.len())]
                .iter()
                .flatten()
                .copied()
                .collect();
            if near.len() < MIN_NEIGHBOURS {
                continue;
            }
            near.sort_by(f64::total_cmp);
            let m = near.len() / 2;
            let median = if near.len().is_multiple_of(2) { 0.5 * (near[m - 1] + near[m]) } else { near[m] };
            if (v - median).abs() > tol
                && let Some(slot) = beats[i].as_mut().and_then(|b| b.leads.get_mut(lead))
            {
                *slot = None;
            }
        }
    }
}

/// The global T end of a beat from its leads' T waves: the latest lead end among the leads whose T is at least
/// [`CANDIDATE`] of the largest and that agree with the large-T leads (see the module comment).
#[must_use]
pub fn global_end(sig: &Signals, beat: &BeatT) -> Option<usize> {
    let found: Vec<LeadT> = beat.leads.iter().flatten().copied().collect();
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
    (latest.is_finite() && latest >= beat.from as f64 && latest.round() < sig.len() as f64)
        .then(|| latest.round() as usize)
}

/// T end on one lead, or `None` when the terminal limb is flat or the end lands outside the search window.
/// `reach`: [`TRAPEZIUM_REACH_S`] in samples; the trapezium's fixed point and the end stay at or before `guard`.
fn lead_t_end(
    lead: Lead<'_>,
    iso: f32,
    from: usize,
    (to, guard): (usize, usize),
    max_limb: usize,
    gap: usize,
    reach: usize,
) -> Option<LeadT> {
    let x = lead.x;
    let dev = |k: usize| x[k] - iso;
    let main = (from..=to).max_by(|&i, &j| dev(i).abs().total_cmp(&dev(j).abs()))?;
    let a_main = dev(main);
    // Terminal lobe: an opposite-sign extremum after the main one, big enough, makes the T biphasic. After an ST
    // displacement it is the T wave itself, and may come later.
    let displaced = dev(from) * a_main.signum() >= ST_DISPLACED * a_main.abs();
    let mut peak = main;
    if main < to {
        let opp = (main + 1..=if displaced { to } else { to.min(main + gap) })
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
    let stop = (peak + max_limb).min(to + max_limb / 2).min(guard).min(x.len() - 2);
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
    // The fixed point lies on the baseline after the T wave, not in the next P wave: past the guard, a P wave of
    // the other sign than the lobe would keep adding area and draw the end into it.
    let xr = (k + reach).min(guard).min(x.len() - 1);
    if xr <= k {
        return None;
    }
    let y_k = dev(k) * sign;
    let area = |i: usize| (y_k - dev(i) * sign) * (2 * xr - i - k) as f32;
    let end = (k..=xr).max_by(|&i, &j| area(i).total_cmp(&area(j)))?;
    let limit = (end + reach / 2).min(to + max_limb / 2).min(guard).min(x.len() - 2);
    let end = lead.end_at_knee(end, sign, s, (end.saturating_sub(reach / 4).max(k + 1), limit)) as f64;
    (end > peak as f64 && end <= (to + max_limb / 2) as f64).then_some(LeadT { amplitude: amp, end })
}

/// One lead low-passed for P and T (`x`, 12 Hz) and as given (`wide`), µV.
#[derive(Clone, Copy)]
struct Lead<'a> {
    x: &'a [f32],
    wide: &'a [f32],
}

impl Lead<'_> {
    /// The trapezium end `end` moved to the knee where the unfiltered lead regains its level: carried on, at most
    /// to `limit`, over samples where it still heads back to the baseline (direction `sign` of the lobe) by more
    /// than [`MOVING`] of the limb's steepest slope `steepest` (µV per sample, 12 Hz signal) per sample; or, where
    /// it no longer does at `end`, moved back to the sample after its last such step when that lies after `floor`
    /// (a lead still over the whole stretch keeps `end`: its knee is not near). Only where the unfiltered lead
    /// resolves that step: its step noise (see [`Lead::noise`]) at most [`STILL`] of it; otherwise `end` stands.
    fn end_at_knee(&self, end: usize, sign: f32, steepest: f32, (floor, limit): (usize, usize)) -> usize {
        let thr = MOVING * steepest;
        if end >= limit || self.noise(end, limit).is_none_or(|wn| wn > STILL * thr) {
            return end;
        }
        let heading_back = |j: usize| (self.wide[j] - self.wide[j + 1]) * sign > thr;
        if !heading_back(end) {
            return (floor..end).rev().find(|&j| heading_back(j)).map_or(end, |j| j + 1);
        }
        (end..limit).find(|&j| !heading_back(j)).unwrap_or(limit)
    }

    /// The unfiltered lead's sample-to-sample step noise over samples `a..b`, µV: four times the step noise
    /// of white noise estimated from the mean |third difference| (for white noise √10 times the step noise, as
    /// √20 against √2 standard deviations; a smooth wave barely moves it). The mean, not the median, so that
    /// quantisation steps count even where most samples repeat their neighbour's value. (The second difference
    /// used before counted a wide T wave's own curvature, four times larger per sample at 250 Hz than at 500 Hz:
    /// at 250 Hz the end was not carried on to a clean wave's knee, demo long-QT QT 508 ms for 520. On the shared
    /// real records the T ends of LUDB 40 and 41 move (their means by 0.3 and 2 ms) and LUDB 45's reported QT by
    /// 4 ms towards the experts'; no QT Database boundary and no pooled figure moves.)
    fn noise(&self, a: usize, b: usize) -> Option<f32> {
        let b = b.min(self.wide.len().saturating_sub(2));
        let a = a.max(1);
        if a >= b {
            return None;
        }
        let w = &self.wide;
        let sum: f32 = (a..b).map(|k| (w[k + 2] - 3.0 * w[k + 1] + 3.0 * w[k] - w[k - 1]).abs()).sum();
        Some(4.0 / 10.0f32.sqrt() * sum / (b - a) as f32)
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn trapezium_on_a_triangle_ends_where_the_line_meets_zero() {
        // A T wave shaped as a rise then a straight fall from 300 µV at sample 100 to 0 at sample 160.
        let mut x = vec![0.0f32; 300];
        for (k, v) in x.iter_mut().enumerate().take(160).skip(40) {
            *v = if k < 100 { 300.0 * (k - 40) as f32 / 60.0 } else { 300.0 * (160 - k) as f32 / 60.0 };
        }
        let t = lead_t_end(Lead { x: &x, wide: &x }, 0.0, 30, (200, x.len() - 1), 100, 40, 100)
            .map(|t| t.end.round() as usize);
        assert_eq!(t, Some(160));
        let inv: Vec<f32> = x.iter().map(|v| -v).collect();
        assert_eq!(
            lead_t_end(Lead { x: &inv, wide: &inv }, 0.0, 30, (200, inv.len() - 1), 100, 40, 100)
                .map(|t| t.end.round() as usize),
            Some(160)
        );
    }

    #[test]
    fn an_inverted_t_end_stays_before_the_guard_and_out_of_the_next_wave() {
        // An inverted T wave falling back from −300 µV at sample 100 to 0 at 140, then an upright bump (a P wave)
        // from 160 to 220 peaking at 150 µV at 190. The fixed point 100 samples past the limb's steepest point lies
        // in the bump, whose deflection past the baseline adds area: the end is drawn into it. With the guard at the
        // bump's start, the end is the T wave's.
        let x = polyline(&[(40, 0.0), (100, -300.0), (140, 0.0), (160, 0.0), (190, 150.0), (220, 0.0)]);
        let end = |guard: usize| {
            lead_t_end(Lead { x: &x, wide: &x }, 0.0, 30, (200, guard), 100, 40, 100).map(|t| t.end.round() as usize)
        };
        assert!(end(x.len() - 1).is_some_and(|e| e > 160), "{:?}", end(x.len() - 1));
        assert_eq!(end(160), Some(140));
    }

    /// 400 samples on straight lines between `knots` (sample, µV, in order), 0 before the first and after the last.
    fn polyline(knots: &[(usize, f32)]) -> Vec<f32> {
        let mut x = vec![0.0f32; 400];
        for w in knots.windows(2) {
            let ((a, va), (b, vb)) = (w[0], w[1]);
            for (k, v) in x.iter_mut().enumerate().take(b).skip(a) {
                *v = va + (vb - va) * (k - a) as f32 / (b - a) as f32;
            }
        }
        x
    }

    /// The T wave of the clean lead `x` (500 Hz) searched from sample 20 to 350, with the terminal-lobe gap (75
    /// samples, 150 ms) and trapezium reach (60, 120 ms) the recordings use.
    fn t_of(x: &[f32]) -> LeadT {
        lead_t_end(Lead { x, wide: x }, 0.0, 20, (350, x.len() - 1), 125, 75, 60).unwrap_or_else(|| panic!("no T end"))
    }

    #[test]
    fn an_upright_t_wave_rising_out_of_a_depressed_st_segment_ends_where_it_does() {
        // 500 Hz, search from sample 20 to 350. The ST segment stands at −80 µV where the search starts, sinks to
        // −100 µV (sample 40) and rises to the baseline at 160; the T wave then rises to +60 µV at 200 and falls
        // straight back to the baseline at 260. The depression is the largest deviation, and the T peak lies 320
        // ms after its deepest point, beyond the reach of a terminal lobe. Taken as the T wave, the depression
        // gave an end at sample 200, the T wave's peak (as on the LUDB leads with ST depression).
        let t = t_of(&polyline(&[(20, -80.0), (40, -100.0), (160, 0.0), (200, 60.0), (260, 0.0)]));
        assert!(t.amplitude > 0.0 && (t.end - 260.0).abs() <= 2.0, "{t:?}");
    }

    #[test]
    fn a_strain_pattern_ends_with_its_inverted_t_wave() {
        // 500 Hz, search from sample 20 to 350: an ST segment sloping down from −100 µV into an inverted T wave
        // (−150 µV at sample 140) that regains the baseline at 200, then a small overshoot (+40 µV at 230, gone at
        // 280). The segment is displaced, but the overshoot is under half the inverted T: the T ends at 200.
        let t = t_of(&polyline(&[(20, -100.0), (140, -150.0), (200, 0.0), (230, 40.0), (280, 0.0)]));
        assert!(t.amplitude < 0.0 && (t.end - 200.0).abs() <= 2.0, "{t:?}");
    }

    /// A Gaussian T wave of 400 µV peaking at sample 400 of 900 (σ `sigma` samples at 500 Hz), lowered by its
    /// value at 2.5σ and cut there, as the demo generator draws it; and its knee, where it regains the baseline.
    fn cut_gaussian_t(sigma: f64) -> (Vec<f32>, f64) {
        let k_cut = 2.5f64;
        let e = (-0.5 * k_cut * k_cut).exp();
        let raw = (0..900)
            .map(|i| {
                let u = (i as f64 - 400.0) / sigma;
                if u.abs() >= k_cut { 0.0 } else { (400.0 * ((-0.5 * u * u).exp() - e) / (1.0 - e)) as f32 }
            })
            .collect();
        (raw, 400.0 + k_cut * sigma)
    }

    /// The T end of the lead whose 12 Hz signal is `slow` and unfiltered signal `wide`, searched from sample 300 to
    /// 600 with the recordings' gap and reach (NaN when none).
    fn end_on(slow: &[f32], wide: &[f32]) -> f64 {
        lead_t_end(Lead { x: slow, wide }, 0.0, 300, (600, wide.len() - 1), 125, 75, 60).map_or(f64::NAN, |t| t.end)
    }

    #[test]
    fn a_wide_t_wave_that_stops_at_a_knee_ends_there_where_the_lead_is_clean() {
        // Gaussian T (400 µV, σ = 25.8 samples ≈ 52 ms at 500 Hz) lowered by its value at 2.5σ and cut there, as
        // the demo generator draws it: it regains the baseline with a knee at sample 400 + 64.5. The trapezium
        // with its fixed point 60 samples (120 ms) past the steepest point stops short of the knee; on the clean
        // unfiltered lead the end is carried on to the knee. With noise on the unfiltered lead it is not.
        let (raw, knee) = cut_gaussian_t(25.8);
        let sig = Signals::new(&[&raw], 500.0);
        let end = |wide: &[f32]| end_on(&sig.slow[0], wide);
        let clean = end(&raw);
        assert!((clean - knee).abs() <= 1.0, "clean end {clean} vs knee {knee}");
        let mut s = 11u64;
        let noisy: Vec<f32> = raw
            .iter()
            .map(|v| {
                s = s.wrapping_mul(6_364_136_223_846_793_005).wrapping_add(1_442_695_040_888_963_407);
                v + ((s >> 33) as f32 / (1u64 << 31) as f32 * 2.0 - 1.0) * 10.0
            })
            .collect();
        let rough = end(&noisy);
        assert!(rough < knee - 3.0, "noisy end {rough} carried on to the knee {knee}");
    }

    #[test]
    fn a_narrow_t_wave_ends_at_its_knee_not_where_the_low_pass_spread_it() {
        // The same T wave drawn narrow (σ = 12 samples ≈ 24 ms, as at fast rates): the 12 Hz low-pass spreads its
        // knee (400 + 30) later, and the trapezium on it ended past the knee, where the clean unfiltered lead had
        // already stopped (the demo waves at 120–150 bpm: T ends 8–10 ms late). The end is moved back to the knee.
        let (raw, knee) = cut_gaussian_t(12.0);
        let sig = Signals::new(&[&raw], 500.0);
        let end = end_on(&sig.slow[0], &raw);
        assert!((end - knee).abs() <= 1.0, "end {end} vs knee {knee}");
    }

    #[test]
    fn a_lead_jumping_away_from_its_neighbouring_beats_is_dropped() {
        let flat = vec![0.0f32; 5000];
        let sig = Signals::new(&[&flat, &flat], 500.0);
        // Eight beats 500 samples apart; lead 0 ends 150 samples after each anchor except beat 3 (+50 samples =
        // 100 ms late); lead 1 drifts by 4 samples a beat (QT adapting) and stays within 40 ms of its neighbours.
        let mut beats: Vec<Option<BeatT>> = (0..8)
            .map(|i| {
                let anchor = 100 + 500 * i;
                let e0 = (anchor + if i == 3 { 200 } else { 150 }) as f64;
                let e1 = (anchor + 140 + 4 * i) as f64;
                Some(BeatT {
                    anchor,
                    from: anchor + 60,
                    leads: vec![Some(LeadT { amplitude: 300.0, end: e0 }), Some(LeadT { amplitude: 200.0, end: e1 })],
                })
            })
            .collect();
        beats.insert(5, None); // a beat without a T search does not break the comparison
        let mut kinds = vec![BeatKind::Dominant; beats.len()];
        // An ectopic beat with a much later T end on lead 0: compared with no dominant beat, so kept.
        beats.push(Some(BeatT {
            anchor: 4600,
            from: 4660,
            leads: vec![Some(LeadT { amplitude: 300.0, end: 4850.0 }), None],
        }));
        kinds.push(BeatKind::Other);
        drop_inconsistent_leads(&sig, &mut beats, &kinds);
        assert!(beats[9].as_ref().is_some_and(|b| b.leads[0].is_some()));
        beats.pop();
        let kept = |lead: usize| beats.iter().flatten().filter(|b| b.leads[lead].is_some()).count();
        assert_eq!(kept(0), 7);
        assert!(beats[3].as_ref().is_some_and(|b| b.leads[0].is_none() && b.leads[1].is_some()));
        assert_eq!(kept(1), 8);
        // The beat that lost its misled lead still gets a global end, from the other lead.
        assert_eq!(beats[3].as_ref().and_then(|b| global_end(&sig, b)), Some(100 + 1500 + 152));
    }
}
