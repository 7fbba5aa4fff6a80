//! Wave boundaries: QRS onset and J point per lead, combined over the leads (see `qrs`), T end by the
//! trapezium-area method per lead, combined over the leads after each lead is compared with its neighbouring
//! beats (see `twave`), P onset and end only where the record has a consistent P wave; and the representative
//! (median) beat per lead with its own global boundaries found by the same method.
//!
//! All leads are combined, so the boundaries are global (earliest onset and latest end over the leads, as the
//! usual 12-lead global intervals are defined). A boundary that cannot be found is `None`, never a guess.

mod baseline;
mod median;
mod pwave;
mod qrs;
mod signals;
mod twave;

pub use median::{BeatStack, RepresentativeBeat, STACK_BEATS, representative_beat, representative_beat_with};
pub use pwave::PModel;
pub use signals::{Signals, despiked};

/// Each voting lead's QRS onset and end around R peak `r` (lead index, onset, end), for analysis tools.
#[doc(hidden)]
#[must_use]
pub fn qrs_lead_edges(
    sig: &Signals,
    r: usize,
    min_start: usize,
    max_end: usize,
) -> Vec<(usize, Option<usize>, Option<usize>)> {
    qrs::lead_edges(sig, r, min_start, max_end)
}

use crate::beat::{Beat, BeatKind, Boundaries};
use crate::recording::Recording;

/// The next beat's P wave may start this long before its QRS onset, s: no T wave end is placed later (at fast
/// rates the search's [`T_RR_FRACTION`] of the RR reaches into the next P wave).
// Common practice, no source: a PR interval under 120 ms is short (pre-excitation, junctional rhythm). Measured on
// the demo waves at 150 bpm (PR 110 ms, QT 250 ms) with inverted T waves: the T end was placed in the middle of the
// upright P wave that followed (QT 326 ms, no PR); normal rates are not affected (the guard lies past the search).
const MIN_PR_S: f64 = 0.120;

/// A P wave found after T ends held back from the next P wave (see [`MIN_PR_S`]) is taken when its beats
/// resemble it at least this well (mean correlation, as `pwave`'s consistency); a less consistent one is sought
/// again after T ends placed without that limit.
// Common practice, no source: sinus P waves repeat almost unchanged from beat to beat. Measured: LUDB 35 (atrial
// flutter, 2:1) gave 0.844 from its flutter waves after held-back T ends, and no P wave (as before) without them;
// 39 of the 43 LUDB records with a P wave are above 0.9; the 150-bpm demo with inverted T waves 1.000.
const HELD_BACK_CONSISTENCY: f64 = 0.9;

/// Longest QT search after the R peak, s.
// Common practice, no source: QT rarely exceeds 700 ms even when markedly prolonged.
const T_MAX_S: f64 = 0.70;
/// The T search ends at this fraction of the RR interval after R (before the next P wave).
// Common practice, no source.
const T_RR_FRACTION: f64 = 0.65;

/// A P wave is sought from this long after a stretch with no recorded lead: one whose onset is hidden in the
/// gap then lies partly before the search and is not placed.
// Common practice, no source: a P wave's first 20 ms are its slow start, where its onset is judged.
const AFTER_GAP_S: f64 = 0.020;

/// Largest departure of a beat's R-to-T-end time from the record's median, s.
// Common practice, no source: the QT interval adapts to rate over many beats and changes by a few tens of ms
// from one beat to the next; a 100 ms jump marks a misplaced T end.
const T_OUTLIER_S: f64 = 0.100;

/// Fills every beat's boundaries from `recording`, which should be baseline-corrected (see
/// [`crate::filter::apply`]). Beats must be in time order. Returns the record's P model (see
/// [`delineate_with`]) for [`representative_beat_with`].
pub fn delineate_beats(recording: &Recording, beats: &mut [Beat]) -> Option<PModel> {
    let leads: Vec<&[f32]> = recording.leads.iter().map(|l| l.samples.as_slice()).collect();
    let sig = Signals::new(&leads, recording.sample_rate.hz());
    delineate_with(&sig, beats)
}

/// Delineates beats on prepared signals and returns the record's P model (if it has a consistent P wave).
pub fn delineate_with(sig: &Signals, beats: &mut [Beat]) -> Option<PModel> {
    let n = sig.len();
    let rs: Vec<usize> = beats.iter().map(|b| b.r).collect();
    for i in 0..beats.len() {
        let r = rs[i];
        let min_start = if i > 0 { rs[i - 1] + sig.samples(0.150).min((r - rs[i - 1]) / 2) } else { 0 };
        let max_end = if i + 1 < rs.len() { rs[i + 1].saturating_sub(sig.samples(0.120)).max(r) } else { n };
        let (on, end) = qrs::qrs_bounds(sig, r, min_start, max_end);
        beats[i].bounds = Boundaries { p_on: None, p_end: None, qrs_on: on, qrs_end: end, t_end: None };
    }
    // T ends first as for a rhythm with P waves (none placed where the next P wave may start), and the P waves
    // sought after them. Only a very consistent P wave is taken from that pass ([`HELD_BACK_CONSISTENCY`]);
    // otherwise the T ends are placed again without the limit and the P waves sought after those (in atrial
    // flutter the T wave may end close to the next QRS, and flutter waves time-locked to the QRS would pass for P
    // waves once the T ends are held back).
    place_t_ends(sig, beats, true);
    if let Some(mut model) = p_waves(sig, beats).filter(|m| m.consistency >= HELD_BACK_CONSISTENCY) {
        model.t_held_back = true;
        return Some(model);
    }
    place_t_ends(sig, beats, false);
    p_waves(sig, beats)
}

/// The record's P model from `beats` (QRS edges and T ends set) and each beat's P onset and end where it matches
/// (none where the record has no consistent P wave).
fn p_waves(sig: &Signals, beats: &mut [Beat]) -> Option<PModel> {
    let rs: Vec<usize> = beats.iter().map(|b| b.r).collect();
    // P waves: earliest allowed sample = previous beat's T end (or 60 % of the way from the previous R), and
    // [`AFTER_GAP_S`] after a stretch with no recorded lead before the QRS.
    let earliest: Vec<usize> = (0..beats.len())
        .map(|i| {
            let e = match i {
                0 => 0,
                _ => beats[i - 1].bounds.t_end.unwrap_or(beats[i - 1].r + (rs[i] - beats[i - 1].r) * 6 / 10),
            };
            let last_gap_end = sig.gaps[..sig.gaps.partition_point(|g| g.start < rs[i])].last().map(|g| g.end);
            last_gap_end.map_or(e, |g| e.max(g + sig.samples(AFTER_GAP_S)))
        })
        .collect();
    let onsets: Vec<(usize, usize)> = beats
        .iter()
        .zip(&earliest)
        .filter(|(b, _)| b.kind == BeatKind::Dominant)
        .filter_map(|(b, &e)| b.bounds.qrs_on.map(|q| (q, e)))
        // The P model's template is read up to its longest window (and lag) before the QRS: none from a gap.
        .filter(|&(q, e)| e < q && !sig.bridged(q.saturating_sub(sig.samples(pwave::READ_BEFORE_S)), q))
        .collect();
    let model = pwave::model(sig, &onsets);
    for (b, &e) in beats.iter_mut().zip(&earliest) {
        let p = model.as_ref().and_then(|m| b.bounds.qrs_on.filter(|&q| e < q).and_then(|q| m.for_beat(sig, q, e)));
        (b.bounds.p_on, b.bounds.p_end) = (p.map(|p| p.0), p.map(|p| p.1));
    }
    model
}

/// Each beat's T wave on every lead ([`beat_t_waves`], sought before the next beat, the last beat within the
/// record's median RR), each lead's end then compared with the same lead's on the neighbouring beats
/// ([`twave::drop_inconsistent_leads`]). `beats` in time order, their QRS edges set; `before_p` as for
/// [`beat_t_waves`].
fn t_waves_of(sig: &Signals, beats: &[Beat], before_p: bool) -> Vec<Option<twave::BeatT>> {
    let rs: Vec<usize> = beats.iter().map(|b| b.r).collect();
    let typical_rr = median_rr(&rs).unwrap_or(sig.samples(1.0));
    let mut t_waves: Vec<Option<twave::BeatT>> = beats
        .iter()
        .enumerate()
        .map(|(i, b)| {
            let rr_next = if i + 1 < rs.len() { rs[i + 1] - b.r } else { typical_rr };
            beat_t_waves(sig, b.r, b.bounds.qrs_on, b.bounds.qrs_end, (rr_next, sig.len()), before_p)
        })
        .collect();
    let kinds: Vec<BeatKind> = beats.iter().map(|b| b.kind).collect();
    twave::drop_inconsistent_leads(sig, &mut t_waves, &kinds);
    t_waves
}

/// Each beat's T wave per lead as (signed lobe amplitude, µV; T end, sample) before the leads are combined, for
/// analysis tools: `beats` already delineated (QRS edges set), in time order, on the signals they were found on;
/// `before_p` as for a record with P waves (see [`delineate_with`]).
#[doc(hidden)]
#[must_use]
pub fn t_lead_ends(sig: &Signals, beats: &[Beat], before_p: bool) -> Vec<Vec<Option<(f32, f64)>>> {
    t_waves_of(sig, beats, before_p).iter().map(|t| t.as_ref().map_or_else(Vec::new, twave::BeatT::lead_ends)).collect()
}

/// Sets every beat's T end from its leads' T waves ([`t_waves_of`]; `before_p`: none placed where the next P
/// wave may start), then removes the outlying ones ([`drop_outlying_t_ends`]).
fn place_t_ends(sig: &Signals, beats: &mut [Beat], before_p: bool) {
    let t_waves = t_waves_of(sig, beats, before_p);
    for (b, t) in beats.iter_mut().zip(&t_waves) {
        // The end may lie past the search (the limb is followed to its knee): not into a gap either.
        b.bounds.t_end = t.as_ref().and_then(|t| twave::global_end(sig, t)).filter(|&e| !sig.bridged(b.r, e + 1));
    }
    drop_outlying_t_ends(sig, beats);
}

/// Each lead's T wave for the beat with R peak `r`, QRS `on`–`end` and following RR `rr` (samples); the leads
/// are combined by [`twave::global_end`] (for the beats of a record, after comparing each lead over the beats).
/// The T wave is sought from 50 ms after the J point (at least 100 ms after R) to the lesser of [`T_MAX_S`] and
/// [`T_RR_FRACTION`] of the RR after R, and never at or past `limit`. With `before_p` (a rhythm with P waves) no
/// lead's T end is placed past [`MIN_PR_S`] before the next QRS onset (expected `rr` after this one's).
fn beat_t_waves(
    sig: &Signals,
    r: usize,
    on: Option<usize>,
    end: Option<usize>,
    (rr, limit): (usize, usize),
    before_p: bool,
) -> Option<twave::BeatT> {
    let earliest = r + sig.samples(0.100);
    let from = end.map_or(earliest, |e| (e + sig.samples(0.050)).max(earliest));
    let on = on?;
    let last = limit.saturating_sub(1);
    let guard = if before_p { (on + rr).saturating_sub(sig.samples(MIN_PR_S)).min(last) } else { last };
    let to = (r + sig.samples(T_MAX_S).min((T_RR_FRACTION * rr as f64) as usize)).min(guard);
    let iso_at = on.saturating_sub(sig.samples(0.008));
    // The search reads the isoelectric level before the QRS (see `twave::lead_ts`) and the signal up to `to`.
    if sig.bridged(iso_at.saturating_sub(sig.samples(twave::ISO_S)), to + 1) {
        return None;
    }
    twave::lead_ts(sig, iso_at, from, (to, guard))
}

/// A beat whose R-to-T-end time differs from the record's median by more than [`T_OUTLIER_S`] has followed
/// another wave (a U wave, the next P wave, noise): its T end is unreliable and is removed. Needs at least five
/// T ends to judge.
fn drop_outlying_t_ends(sig: &Signals, beats: &mut [Beat]) {
    let mut rt: Vec<usize> = beats.iter().filter_map(|b| b.bounds.t_end.map(|t| t.saturating_sub(b.r))).collect();
    if rt.len() < 5 {
        return;
    }
    let mid = rt.len() / 2;
    let median = *rt.select_nth_unstable(mid).1;
    let limit = sig.samples(T_OUTLIER_S);
    for b in beats.iter_mut() {
        if b.bounds.t_end.is_some_and(|t| t.saturating_sub(b.r).abs_diff(median) > limit) {
            b.bounds.t_end = None;
        }
    }
}

/// Median RR of R peaks (in time order), samples; `None` without two peaks, or when most RRs are zero (the same
/// R peak repeated): a representative beat of no span cannot be built.
pub(super) fn median_rr(rs: &[usize]) -> Option<usize> {
    median_samples(rs.windows(2).map(|w| w[1].saturating_sub(w[0])).collect()).filter(|&rr| rr > 0)
}

/// Median of sample counts (the upper one of an even count); `None` when empty.
pub(super) fn median_samples(mut v: Vec<usize>) -> Option<usize> {
    if v.is_empty() {
        return None;
    }
    let mid = v.len() / 2;
    Some(*v.select_nth_unstable(mid).1)
}

#[cfg(test)]
mod tests;
