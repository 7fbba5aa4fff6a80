//! The analysis pipeline of one recording: filters → beat detection → wave boundaries → representative beat →
//! measurements. The raw recording is never changed; everything here is derived data.

use crate::beat::Beat;
use crate::delineate::{self, RepresentativeBeat};
use crate::detect;
use crate::filter::{self, FilterSettings, Filtered};
use crate::measure::{self, Measurements, Template};
use crate::recording::Recording;

/// Everything derived from a recording for review.
#[derive(Debug, Clone)]
pub struct Analysis {
    /// The filtered copy the rest was computed on, with the filters' description.
    pub filtered: Filtered,
    /// Detected beats with their boundaries (sample indices of the recording).
    pub beats: Vec<Beat>,
    /// Median beat of the dominant beats, with its global boundaries.
    pub representative: Option<RepresentativeBeat>,
    /// The measurements.
    pub measurements: Measurements,
}

/// The representative beat as measurement sees it.
#[must_use]
pub fn template_of(rep: &RepresentativeBeat) -> Template<'_> {
    Template { leads: &rep.leads, sample_rate: rep.sample_rate, bounds: rep.bounds }
}

/// Runs the whole pipeline on a recording.
#[must_use]
pub fn analyze(recording: &Recording, settings: &FilterSettings) -> Analysis {
    let filtered = filter::apply(recording, settings);
    let rec = &filtered.recording;
    let mut beats = detect::detect_beats(rec);
    let p_model = delineate::delineate_beats(rec, &mut beats);
    let representative = delineate::representative_beat_with(rec, &beats, p_model.as_ref());
    let measurements = measure::measure(rec, &beats, representative.as_ref().map(template_of).as_ref());
    Analysis { filtered, beats, representative, measurements }
}

impl Analysis {
    /// Measures again after the representative beat's boundaries changed (a Beat lens handle was dragged):
    /// intervals, QTc, axes, ST and notes follow; beats and RR statistics are unchanged.
    pub fn remeasure(&mut self) {
        let rec = &self.filtered.recording;
        self.measurements = measure::measure(rec, &self.beats, self.representative.as_ref().map(template_of).as_ref());
    }
}
