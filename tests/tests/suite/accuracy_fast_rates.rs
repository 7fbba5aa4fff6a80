//! Fast rhythms: every beat of a regular tachycardia is found, up to 200 bpm. Before, the detector judged each
//! lead's QRS energy against the median of its feature, which at 180 bpm and above is itself QRS energy (the
//! complexes and their integration window fill most of each RR): every lead read as noise, and a 180-bpm
//! recording gave no beat at all, "not an ECG?".
//!
//! Demo recordings from the dynamical model (McSharry, Clifford, Tarassenko & Smith, IEEE Trans Biomed Eng
//! 2003;50:289-94, as implemented by `isoline_core::synth`): QRS (70 ms), P wave (50 ms), PR (80 ms) and QT
//! (170 ms) shortened so that a beat fits its RR (the generator keeps 40 ms between T end and the next P wave:
//! 300 ms at 200 bpm).

use isoline_core::analysis::analyze;
use isoline_core::filter::FilterSettings;
use isoline_core::synth::{self, LeadSet, Scenario, SynthSpec};

#[test]
fn regular_tachycardia_up_to_200_bpm_is_detected_beat_by_beat() {
    let mut bad = Vec::new();
    for bpm in [150.0, 180.0, 200.0] {
        for leads in [LeadSet::Standard12, LeadSet::Single] {
            let shorter = SynthSpec {
                heart_rate_bpm: bpm,
                heart_rate_swing_bpm: 0.0,
                p_ms: 50.0,
                pr_ms: 80.0,
                qrs_ms: 70.0,
                qt_ms: 170.0,
                ..Scenario::Normal.spec()
            };
            let spec = SynthSpec { leads, ..shorter };
            let s = synth::generate(&spec).unwrap_or_else(|e| panic!("{bpm} bpm: {e}"));
            let a = analyze(&s.recording, &FilterSettings::default());
            let truth = s.truth.beats.len();
            let hr = a.measurements.rr.heart_rate_bpm.unwrap_or(f64::NAN);
            println!("{bpm} bpm, {leads:?}: {} beats of {truth}, heart rate {hr:.1}", a.beats.len());
            // A beat cut by the recording's start or end may be missed: at most one at each end.
            if a.beats.len() + 2 < truth || a.beats.len() > truth || (hr - bpm).abs() > 2.0 {
                bad.push(format!("{bpm} bpm {leads:?}: {} beats of {truth}, heart rate {hr:.1}", a.beats.len()));
            }
        }
    }
    assert!(bad.is_empty(), "{bad:#?}");
}
