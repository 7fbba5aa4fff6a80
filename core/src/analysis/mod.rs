//! The analysis pipeline of one recording: filters → beat detection → wave boundaries → representative beat →
//! measurements. The raw recording is never changed; everything here is derived data.

use crate::beat::{Beat, Boundaries};
use crate::delineate::{self, RepresentativeBeat};
use crate::detect;
use crate::filter::{self, FilterSettings};
use crate::measure::{self, Measurements, Template};
use crate::recording::{Lead, Recording};

mod windowed;

pub use windowed::{
    LONG_RECORDING_S, OnWindow, WINDOW_S, analyze_in_windows, analyze_in_windows_reporting, beats_in_windows,
    beats_in_windows_reporting,
};

/// Filtered and analysed beyond each end of a span filtered on its own, s (see [`Analysis::filtered_span`]).
// Common practice, no source: the 0.5 Hz zero-phase high-pass settles within a few seconds, the detector's
// thresholds within a few beats; 20 s holds both with room to spare.
pub const MARGIN_S: f64 = 20.0;

/// The filters an analysis ran on: their settings, with an automatic notch decided once for the whole
/// recording, and their description.
#[derive(Debug, Clone, PartialEq)]
pub struct AppliedFilters {
    /// The settings, the notch decided (never [`filter::Mains::Auto`]), so any span filtered again matches.
    pub settings: FilterSettings,
    /// The filter set as text, e.g. `0.5–150 Hz, 50 Hz notch`.
    pub description: String,
}

/// Samples `first..first + len` of every lead of a recording, as a recording of their own (same leads, rate
/// and metadata).
#[derive(Debug, Clone, PartialEq)]
pub struct Span {
    /// Sample of the whole recording where the span starts.
    pub first: usize,
    /// The span's samples.
    pub recording: Recording,
}

/// Everything derived from a recording for review.
#[derive(Debug, Clone)]
pub struct Analysis {
    /// The filters the rest was computed with.
    pub filters: AppliedFilters,
    /// The filtered copy of the whole recording, for one of up to [`LONG_RECORDING_S`]. A longer one is
    /// filtered span by span when a span is needed ([`Analysis::filtered_span`]), so its analysis holds no
    /// second copy of it.
    pub filtered: Option<Recording>,
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
    Template {
        leads: &rep.leads,
        sample_rate: rep.sample_rate,
        bounds: rep.bounds,
        baseline_step_uv: rep.baseline_step_uv,
    }
}

/// Runs the whole pipeline on a recording; one longer than [`LONG_RECORDING_S`] window by window
/// ([`analyze_in_windows`], windows of [`WINDOW_S`]), so its working memory stays near its own size.
#[must_use]
pub fn analyze(recording: &Recording, settings: &FilterSettings) -> Analysis {
    analyze_reporting(recording, settings, &|_, _| {})
}

/// [`analyze`], telling `on_window` as each window of a long recording is done (a recording analysed whole has
/// no windows and tells nothing).
#[must_use]
pub fn analyze_reporting(recording: &Recording, settings: &FilterSettings, on_window: OnWindow<'_>) -> Analysis {
    if recording.duration_s() > LONG_RECORDING_S {
        return analyze_in_windows_reporting(recording, settings, WINDOW_S, on_window);
    }
    let settings = settings.with_mains_decided(recording);
    let filtered = filter::apply(recording, &settings);
    let rec = &filtered.recording;
    let mut beats = detect::detect_beats(rec);
    let p_model = delineate::delineate_beats(rec, &mut beats);
    let representative = delineate::representative_beat_with(rec, &beats, p_model.as_ref());
    let measurements = measure::measure(rec, &beats, representative.as_ref().map(template_of).as_ref());
    Analysis {
        filters: AppliedFilters { settings, description: filtered.description },
        filtered: Some(filtered.recording),
        beats,
        representative,
        measurements,
    }
}

impl Analysis {
    /// The measurements taken again with the representative beat's boundaries `bounds` (a reader's marks) in
    /// place of the automatic ones, on the same samples as the analysis measured (`recording` being the
    /// recording analysed: its filtered copy where one is kept, else `recording` itself, as for a long one).
    /// `None` without a representative beat.
    #[must_use]
    pub fn measured_with(&self, recording: &Recording, bounds: Boundaries) -> Option<Measurements> {
        let rep = self.representative.as_ref()?;
        let template = Template { bounds, ..template_of(rep) };
        Some(measure::measure(self.filtered.as_ref().unwrap_or(recording), &self.beats, Some(&template)))
    }

    /// The filtered samples `a..b` of `recording` (the recording analysed), as [`Span::cut`] gives them: cut
    /// from the whole filtered copy, or for a long recording filtered with [`MARGIN_S`] on each side, as its
    /// windows were.
    #[must_use]
    pub fn filtered_span(&self, recording: &Recording, a: usize, b: usize) -> Span {
        let Some(whole) = &self.filtered else {
            let margin = (MARGIN_S * recording.sample_rate.hz()) as usize;
            let b = b.min(recording.len());
            let from = a.min(b).saturating_sub(margin);
            let part = windowed::part(recording, from, (b + margin).min(recording.len()));
            let mut filtered = filter::apply(&part, &self.filters.settings).recording;
            (filtered.start, filtered.meta) = (recording.start, recording.meta.clone());
            let span = Span::cut(&filtered, a.min(b) - from, b - from);
            return Span { first: span.first + from, ..span };
        };
        Span::cut(whole, a, b)
    }
}

impl Span {
    /// Samples `a..b` of `recording` (`b` clamped to its length), with its lead names, rate, start and
    /// metadata but not its annotations (their sample numbers are the whole recording's).
    #[must_use]
    pub fn cut(recording: &Recording, a: usize, b: usize) -> Self {
        let b = b.min(recording.len());
        let a = a.min(b);
        let leads =
            recording.leads.iter().map(|l| Lead { name: l.name.clone(), samples: l.samples[a..b].to_vec() }).collect();
        let recording = Recording {
            leads,
            sample_rate: recording.sample_rate,
            start: recording.start,
            meta: recording.meta.clone(),
            annotations: Vec::new(),
        };
        Self { first: a, recording }
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::recording::{Lead, LeadName, Meta};
    use crate::units::Hertz;
    use proptest::prelude::*;

    #[test]
    fn measured_again_on_the_automatic_marks_gives_the_analysis_own_measurements() {
        // The normal demo with V6's electrode off but drifting 5 µV over the 10 s: as recorded the lead is not
        // flat, after the baseline filter it is, and the analysis leaves it out of ST and the axes. Measured
        // again on the recording as recorded (as the Ledger did before), V6 got an ST level of its own.
        let mut s = crate::synth::generate(&crate::synth::Scenario::Normal.spec()).unwrap_or_else(|e| panic!("{e}"));
        let v6 = s.recording.leads.len() - 1;
        let n = s.recording.len();
        s.recording.leads[v6].samples = (0..n).map(|k| 5.0 * k as f32 / n as f32).collect();
        let a = analyze(&s.recording, &FilterSettings::default());
        let rep = a.representative.as_ref().unwrap_or_else(|| panic!("no representative beat"));
        let again = a.measured_with(&s.recording, rep.bounds).map(|m| m.values());
        assert_eq!(again, Some(a.measurements.values()));
        assert!(a.measurements.st.last().is_some_and(|st| st.j_uv.is_none()), "{:?}", a.measurements.st.last());
    }

    proptest! {
        #![proptest_config(ProptestConfig::with_cases(24))]
        /// The whole pipeline on six named limb leads (so the pacing-spike search, the lead-edge refinement on
        /// the unfiltered leads, the T end lead comparison and the Einthoven gain fit all run) with any samples,
        /// lengths and usual rates: no panic, every reported value finite, every boundary inside the recording.
        #[test]
        fn analyze_never_panics_on_limb_leads(
            len in 0usize..3000,
            rate in prop_oneof![Just(100.0f64), Just(250.0), Just(500.0), Just(1000.0)],
            seed in proptest::collection::vec(prop_oneof![8 => -3000.0f32..3000.0, 1 => Just(f32::NAN)], 97),
            spikes in proptest::collection::vec(0usize..3000, 0..12),
            gains in proptest::collection::vec(0.2f32..3.0, 6),
            qrs_uv in proptest::collection::vec(-1500.0f32..1500.0, 6),
        ) {
            let names = ["I", "II", "III", "aVR", "aVL", "aVF"];
            let leads: Vec<Lead> = names
                .iter()
                .zip(&gains)
                .enumerate()
                .map(|(l, (name, &g))| {
                    // Noise from the seed plus a 40 ms triangular QRS every 0.8 s, so beats are found.
                    let period = (0.8 * rate) as usize;
                    let half = ((0.02 * rate) as usize).max(1);
                    let mut v: Vec<f32> = (0..len)
                        .map(|k| {
                            let d = (k % period).abs_diff(period / 2);
                            let qrs = if d < half { 1.0 - d as f32 / half as f32 } else { 0.0 };
                            0.05 * seed[(k * 5 + l * 11) % seed.len()] + g * qrs_uv[l] * qrs
                        })
                        .collect();
                    for &s in spikes.iter().filter(|&&s| s < len) {
                        v[s] += 4000.0;
                    }
                    Lead { name: LeadName::parse(name), samples: v }
                })
                .collect();
            let rec = Recording {
                leads,
                sample_rate: Hertz::from_hz(rate).unwrap_or_else(|_| unreachable!()),
                start: None,
                meta: Meta::default(),
                annotations: Vec::new(),
            };
            let a = analyze(&rec, &FilterSettings::default());
            for b in &a.beats {
                for v in [b.bounds.p_on, b.bounds.p_end, b.bounds.qrs_on, b.bounds.qrs_end, b.bounds.t_end].into_iter().flatten() {
                    prop_assert!(v < len, "{:?} len {}", b, len);
                }
            }
            for v in a.measurements.values() {
                prop_assert!(v.value.is_none_or(f64::is_finite), "{} = {:?}", v.key, v.value);
            }
            prop_assert!(a.measurements.limb_gain_mismatch_pct.is_none_or(f64::is_finite));
        }
    }
}
