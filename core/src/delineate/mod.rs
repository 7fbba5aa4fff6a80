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
    let t_waves = t_waves_of(sig, beats);
    for (b, t) in beats.iter_mut().zip(&t_waves) {
        // The end may lie past the search (the limb is followed to its knee): not into a gap either.
        b.bounds.t_end = t.as_ref().and_then(|t| twave::global_end(sig, t)).filter(|&e| !sig.bridged(b.r, e + 1));
    }
    drop_outlying_t_ends(sig, beats);
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
    let model = pwave::model(sig, &onsets)?;
    for (b, &e) in beats.iter_mut().zip(&earliest) {
        if let Some((on, end)) = b.bounds.qrs_on.filter(|&q| e < q).and_then(|q| model.for_beat(sig, q, e)) {
            b.bounds.p_on = Some(on);
            b.bounds.p_end = Some(end);
        }
    }
    Some(model)
}

/// Each beat's T wave on every lead ([`beat_t_waves`], sought before the next beat, the last beat within the
/// record's median RR), each lead's end then compared with the same lead's on the neighbouring beats
/// ([`twave::drop_inconsistent_leads`]). `beats` in time order, their QRS edges set.
fn t_waves_of(sig: &Signals, beats: &[Beat]) -> Vec<Option<twave::BeatT>> {
    let rs: Vec<usize> = beats.iter().map(|b| b.r).collect();
    let typical_rr = median_rr(&rs).unwrap_or(sig.samples(1.0));
    let mut t_waves: Vec<Option<twave::BeatT>> = beats
        .iter()
        .enumerate()
        .map(|(i, b)| {
            let rr_next = if i + 1 < rs.len() { rs[i + 1] - b.r } else { typical_rr };
            beat_t_waves(sig, b.r, b.bounds.qrs_on, b.bounds.qrs_end, rr_next, sig.len())
        })
        .collect();
    let kinds: Vec<BeatKind> = beats.iter().map(|b| b.kind).collect();
    twave::drop_inconsistent_leads(sig, &mut t_waves, &kinds);
    t_waves
}

/// Each beat's T wave per lead as (signed lobe amplitude, µV; T end, sample) before the leads are combined, for
/// analysis tools: `beats` already delineated (QRS edges set), in time order, on the signals they were found on.
#[doc(hidden)]
#[must_use]
pub fn t_lead_ends(sig: &Signals, beats: &[Beat]) -> Vec<Vec<Option<(f32, f64)>>> {
    t_waves_of(sig, beats).iter().map(|t| t.as_ref().map_or_else(Vec::new, twave::BeatT::lead_ends)).collect()
}

/// Each lead's T wave for the beat with R peak `r`, QRS `on`–`end` and following RR `rr` (samples); the leads
/// are combined by [`twave::global_end`] (for the beats of a record, after comparing each lead over the beats).
/// The T wave is sought from 50 ms after the J point (at least 100 ms after R) to the lesser of [`T_MAX_S`] and
/// [`T_RR_FRACTION`] of the RR after R, and never at or past `limit`.
fn beat_t_waves(
    sig: &Signals,
    r: usize,
    on: Option<usize>,
    end: Option<usize>,
    rr: usize,
    limit: usize,
) -> Option<twave::BeatT> {
    let earliest = r + sig.samples(0.100);
    let from = end.map_or(earliest, |e| (e + sig.samples(0.050)).max(earliest));
    let to = (r + sig.samples(T_MAX_S).min((T_RR_FRACTION * rr as f64) as usize)).min(limit.saturating_sub(1));
    let iso_at = on?.saturating_sub(sig.samples(0.008));
    // The search reads the isoelectric level before the QRS (see `twave::lead_ts`) and the signal up to `to`.
    if sig.bridged(iso_at.saturating_sub(sig.samples(twave::ISO_S)), to + 1) {
        return None;
    }
    twave::lead_ts(sig, iso_at, from, to)
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

/// Median RR of R peaks, samples.
pub(super) fn median_rr(rs: &[usize]) -> Option<usize> {
    median_samples(rs.windows(2).map(|w| w[1] - w[0]).collect())
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
