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
    let (before, after) = span(fs, rr);
    let chosen: Vec<usize> = median_beats(beats)
        .map(|b| b.r)
        .filter(|&r| r >= before && r + after < n)
        .filter(|&r| recording.leads.iter().all(|l| l.samples[r - before..r + after].iter().all(|v| v.is_finite())))
        .collect();
    if chosen.len() < 3 {
        return None;
    }
    let leads = median_leads(recording.leads.len(), before + after, chosen.len(), |lead, k, b| {
        recording.leads[lead].samples[chosen[b] - before + k]
    });
    Some(delineated(leads, recording.sample_rate, before, rr, p_model, chosen.len()))
}

/// Samples before and after R in the representative beat of a record with median RR `rr` (samples).
fn span(fs: f64, rr: usize) -> (usize, usize) {
    (((BEFORE_S * fs) as usize).min(rr * 6 / 10), ((AFTER_S * fs) as usize).min(rr))
}

/// The beats the median is taken over: the dominant ones, or all when none is dominant.
fn median_beats(beats: &[Beat]) -> impl Iterator<Item = &Beat> {
    let any_dominant = beats.iter().any(|b| b.kind == BeatKind::Dominant);
    beats.iter().filter(move |b| !any_dominant || b.kind == BeatKind::Dominant)
}

/// Per lead, the sample-by-sample median over `count` beats of `len` samples, `value(lead, k, beat)` giving
/// sample `k` of a beat.
fn median_leads(n_leads: usize, len: usize, count: usize, value: impl Fn(usize, usize, usize) -> f32) -> Vec<Vec<f32>> {
    let mut col = Vec::with_capacity(count);
    (0..n_leads)
        .map(|lead| {
            (0..len)
                .map(|k| {
                    col.clear();
                    col.extend((0..count).map(|b| value(lead, k, b)));
                    let mid = col.len() / 2;
                    *col.select_nth_unstable_by(mid, f32::total_cmp).1
                })
                .collect()
        })
        .collect()
}

/// The median beat `leads` (R at sample `before`) delineated as one beat of a record with median RR `rr`.
fn delineated(
    leads: Vec<Vec<f32>>,
    sample_rate: Hertz,
    before: usize,
    rr: usize,
    p_model: Option<&PModel>,
    n_beats: usize,
) -> RepresentativeBeat {
    let len = leads.first().map_or(0, Vec::len);
    let refs: Vec<&[f32]> = leads.iter().map(Vec::as_slice).collect();
    let sig = Signals::new(&refs, sample_rate.hz());
    let (on, end) = qrs::qrs_bounds(&sig, before, 0, len);
    let t_end = beat_t_waves(&sig, before, on, end, rr, len).and_then(|t| twave::global_end(&sig, &t));
    let (p_on, p_end) = match (p_model, on) {
        (Some(m), Some(q)) => m.for_beat(&sig, q, 0).map_or((None, None), |(a, b)| (Some(a), Some(b))),
        _ => (None, None),
    };
    drop(sig);
    RepresentativeBeat {
        leads,
        sample_rate,
        r_index: before,
        bounds: Boundaries { p_on, p_end, qrs_on: on, qrs_end: end, t_end },
        n_beats,
    }
}

/// How many beats a [`BeatStack`] keeps, about (each window gives an equal share, rounded up): the median of
/// this many beats spread over the recording is as steady as that of all of them, and their samples stay a few
/// MB.
// Common practice, no source: the median's noise falls as 1/√n; beyond a few hundred beats it is far below
// the quantisation step of the recording.
pub const STACK_BEATS: usize = 1000;

/// Beats gathered window by window for the representative beat of a long recording (see
/// `analysis::analyze_in_windows`), whose filtered copy is never held whole: about [`STACK_BEATS`] of the beats
/// the median is taken over, spread evenly over the windows, each kept over the longest span a representative
/// beat can have.
#[derive(Debug, Clone)]
pub struct BeatStack {
    sample_rate: Hertz,
    /// Samples kept before and after each R peak.
    before: usize,
    after: usize,
    /// Beats the stack takes from each window.
    quota: usize,
    /// Per kept beat, per lead: samples R − `before` .. R + `after`.
    beats: Vec<Vec<Vec<f32>>>,
}

impl BeatStack {
    /// An empty stack for a recording at `sample_rate` analysed in `windows` windows.
    #[must_use]
    pub fn new(sample_rate: Hertz, windows: usize) -> Self {
        let fs = sample_rate.hz();
        Self {
            sample_rate,
            before: (BEFORE_S * fs) as usize,
            after: (AFTER_S * fs) as usize,
            quota: STACK_BEATS.div_ceil(windows.max(1)),
            beats: Vec::new(),
        }
    }

    /// Keeps up to the stack's quota of `beats` (found in `part`, a window with its margins), evenly spaced
    /// among those the median is taken over whose R peak lies in `own` (the window's own samples of `part`) and
    /// whose span lies in `part` with every sample valid.
    pub fn gather(&mut self, part: &Recording, beats: &[Beat], own: std::ops::Range<usize>) {
        let n = part.len();
        let (before, after) = (self.before, self.after);
        let usable: Vec<usize> = median_beats(beats)
            .map(|b| b.r)
            .filter(|r| own.contains(r) && *r >= before && r + after < n)
            .filter(|&r| part.leads.iter().all(|l| l.samples[r - before..r + after].iter().all(|v| v.is_finite())))
            .collect();
        let take = usable.len().min(self.quota);
        for i in 0..take {
            let r = usable[i * usable.len() / take];
            self.beats.push(part.leads.iter().map(|l| l.samples[r - before..r + after].to_vec()).collect());
        }
    }

    /// Number of beats kept.
    #[must_use]
    pub fn len(&self) -> usize {
        self.beats.len()
    }

    /// True when no beat was kept.
    #[must_use]
    pub fn is_empty(&self) -> bool {
        self.beats.is_empty()
    }

    /// The representative beat of the kept beats, for a recording whose beats (all of them, in time order) are
    /// `beats` and whose P model is `p_model`, as [`representative_beat_with`] gives it. `None` with fewer than
    /// 3 beats kept.
    #[must_use]
    pub fn representative(&self, beats: &[Beat], p_model: Option<&PModel>) -> Option<RepresentativeBeat> {
        let rs: Vec<usize> = beats.iter().map(|b| b.r).collect();
        let rr = median_rr(&rs)?;
        if self.beats.len() < 3 {
            return None;
        }
        // The kept spans are the longest; the record's RR may shorten them.
        let (before, after) = span(self.sample_rate.hz(), rr);
        let skip = self.before - before;
        let leads = median_leads(self.beats[0].len(), before + after, self.beats.len(), |lead, k, b| {
            self.beats[b][lead][skip + k]
        });
        Some(delineated(leads, self.sample_rate, before, rr, p_model, self.beats.len()))
    }
}
