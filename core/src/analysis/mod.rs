//! The analysis pipeline of one recording: filters → beat detection → wave boundaries → representative beat →
//! measurements. The raw recording is never changed; everything here is derived data.

use crate::beat::Beat;
use crate::delineate::{self, RepresentativeBeat};
use crate::detect;
use crate::filter::{self, FilterSettings, Filtered};
use crate::measure::{self, Measurements, Template};
use crate::recording::Recording;

mod windowed;

pub use windowed::{LONG_RECORDING_S, WINDOW_S, analyze_in_windows, beats_in_windows};

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

/// Runs the whole pipeline on a recording; one longer than [`LONG_RECORDING_S`] window by window
/// ([`analyze_in_windows`], windows of [`WINDOW_S`]), so its working memory stays near its own size.
#[must_use]
pub fn analyze(recording: &Recording, settings: &FilterSettings) -> Analysis {
    if recording.duration_s() > LONG_RECORDING_S {
        return analyze_in_windows(recording, settings, WINDOW_S);
    }
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

#[cfg(test)]
mod tests {
    use super::*;
    use crate::recording::{Lead, LeadName, Meta};
    use crate::units::Hertz;
    use proptest::prelude::*;

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
