//! The representative beat: the sample-by-sample median of the dominant beats aligned on their R peaks, per
//! lead, delineated with the same method as single beats (its P wave only when the record's P is consistent).

use super::{PModel, Signals, beat_t_waves, delineate_with, median_rr, qrs, twave};
use crate::beat::{Beat, BeatKind, Boundaries};
use crate::recording::Recording;
use crate::units::Hertz;

/// Span of the representative beat before and after R, s.
const BEFORE_S: f64 = 0.45;
const AFTER_S: f64 = 0.70;

/// The median beat of each lead, µV, with its global boundaries on its own sample axis.
#[derive(Debug, Clone, PartialEq)]
pub struct RepresentativeBeat {
    /// One median beat per lead of the recording (same order), µV.
    pub leads: Vec<Vec<f32>>,
    /// Sampling rate of the beat.
    pub sample_rate: Hertz,
    /// Index of the R peak in each lead's samples.
    pub r_index: usize,
    /// Global boundaries, indices into `leads[_]`.
    pub bounds: Boundaries,
    /// Number of beats in the median.
    pub n_beats: usize,
}

/// Builds and delineates the representative beat from the dominant beats (all beats when none is dominant).
/// `recording` should be baseline-corrected. `None` with fewer than 3 usable beats. Delineates the whole
/// recording again to get its P model; when the beats were just delineated, pass that model to
/// [`representative_beat_with`] instead.
#[must_use]
pub fn representative_beat(recording: &Recording, beats: &[Beat]) -> Option<RepresentativeBeat> {
    // The record's P model comes from delineating the beats themselves.
    let views: Vec<&[f32]> = recording.leads.iter().map(|l| l.samples.as_slice()).collect();
    let full = Signals::new(&views, recording.sample_rate.hz());
    let mut scratch = beats.to_vec();
    let p_model = delineate_with(&full, &mut scratch);
    drop(full);
    representative_beat_with(recording, beats, p_model.as_ref())
}

/// [`representative_beat`] with the record's P model already known (the value [`super::delineate_beats`]
/// returned for these beats; `None` = the record has no consistent P wave).
#[must_use]
pub fn representative_beat_with(
    recording: &Recording,
    beats: &[Beat],
    p_model: Option<&PModel>,
) -> Option<RepresentativeBeat> {
    let fs = recording.sample_rate.hz();
    let n = recording.len();
    let rs: Vec<usize> = beats.iter().map(|b| b.r).collect();
    let rr = median_rr(&rs)?;
    let before = ((BEFORE_S * fs) as usize).min(rr * 6 / 10);
    let after = ((AFTER_S * fs) as usize).min(rr);
    let any_dominant = beats.iter().any(|b| b.kind == BeatKind::Dominant);
    let chosen: Vec<usize> = beats
        .iter()
        .filter(|b| !any_dominant || b.kind == BeatKind::Dominant)
        .map(|b| b.r)
        .filter(|&r| r >= before && r + after < n)
        .filter(|&r| recording.leads.iter().all(|l| l.samples[r - before..r + after].iter().all(|v| v.is_finite())))
        .collect();
    if chosen.len() < 3 {
        return None;
    }
    let mut col = Vec::with_capacity(chosen.len());
    let leads: Vec<Vec<f32>> = recording
        .leads
        .iter()
        .map(|l| {
            (0..before + after)
                .map(|k| {
                    col.clear();
                    col.extend(chosen.iter().map(|&r| l.samples[r - before + k]));
                    let mid = col.len() / 2;
                    *col.select_nth_unstable_by(mid, f32::total_cmp).1
                })
                .collect()
        })
        .collect();
    let refs: Vec<&[f32]> = leads.iter().map(Vec::as_slice).collect();
    let sig = Signals::new(&refs, fs);
    let (on, end) = qrs::qrs_bounds(&sig, before, 0, before + after);
    let t_end = beat_t_waves(&sig, before, on, end, rr, before + after).and_then(|t| twave::global_end(&sig, &t));
    let (p_on, p_end) = match (p_model, on) {
        (Some(m), Some(q)) => m.for_beat(&sig, q, 0).map_or((None, None), |(a, b)| (Some(a), Some(b))),
        _ => (None, None),
    };
    Some(RepresentativeBeat {
        leads,
        sample_rate: recording.sample_rate,
        r_index: before,
        bounds: Boundaries { p_on, p_end, qrs_on: on, qrs_end: end, t_end },
        n_beats: chosen.len(),
    })
}
