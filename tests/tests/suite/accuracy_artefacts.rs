//! Brief artefacts (electrode pops, a lead touched) must not hide the beats around them. Before, each lead's
//! typical QRS height was the median of its 2-s block maxima: with three 10-ms 3-mV pulses in a 10-s recording
//! most blocks' maximum was a pulse, every real QRS read as a tenth of typical, and 3 "beats" were found (heart
//! rate 16 bpm, QRS 28 ms, QTc by Framingham −148 ms). Now the lower quartile of the block maxima.
//!
//! Demo recordings from the dynamical model (McSharry, Clifford, Tarassenko & Smith, IEEE Trans Biomed Eng
//! 2003;50:289-94, as implemented by `isoline_core::synth`), with pulses added; the beats are the generator's.

use isoline_core::analysis::analyze;
use isoline_core::filter::FilterSettings;
use isoline_core::synth::{self, Scenario, SynthSpec};

#[test]
fn brief_pulses_on_every_lead_leave_every_beat_found() {
    for (seconds, pulses) in [(10.0, 3), (60.0, 18)] {
        let spec = SynthSpec { seconds, ..Scenario::Normal.spec() };
        let mut s = synth::generate(&spec).unwrap_or_else(|e| panic!("{e}"));
        let fs = spec.rate_hz;
        let rs: Vec<usize> = s.truth.beats.iter().map(|b| b.to_beat().r).collect();
        // Pulses of 3 mV for 10 ms, spread evenly, each midway between two R peaks.
        let every = rs.len() / pulses;
        let at: Vec<usize> = (0..pulses).map(|i| (rs[i * every] + rs[i * every + 1]) / 2).collect();
        for lead in &mut s.recording.leads {
            for &p in &at {
                for v in &mut lead.samples[p..p + (0.010 * fs) as usize] {
                    *v += 3000.0;
                }
            }
        }
        let a = analyze(&s.recording, &FilterSettings::default());
        let found = |r: usize| a.beats.iter().any(|b| b.r.abs_diff(r) <= (0.150 * fs) as usize);
        let missed = rs.iter().filter(|&&r| !found(r)).count();
        let extra = a.beats.len() + missed - rs.len();
        let hr = a.measurements.rr.heart_rate_bpm.unwrap_or(f64::NAN);
        println!(
            "{seconds} s, {pulses} pulses: {} beats of {}, {missed} missed, {extra} extra, heart rate {hr:.1}",
            a.beats.len(),
            rs.len()
        );
        assert_eq!(missed, 0, "{seconds} s");
        assert!(extra <= pulses, "{seconds} s: {extra} extra beats");
        assert!((hr - spec.heart_rate_bpm).abs() <= 2.0, "{seconds} s: heart rate {hr}");
    }
}

#[test]
fn single_sample_spikes_are_not_taken_for_beats() {
    // Glitches of one sample (8 mV) at 15 places in a 10-s recording, in every lead (as a recorder's data error
    // or an unsensed pacing stimulus gives them). Before, the spikes' energy set the leads' typical QRS height:
    // 14 beats for 12, half of the R peaks away from the QRS, none dominant (heart rate withheld). Now the
    // detector judges QRS energy and shape with such spikes bridged: every beat found where it is, and dominant.
    let spec = SynthSpec { seconds: 10.0, ..Scenario::Normal.spec() };
    let mut s = synth::generate(&spec).unwrap_or_else(|e| panic!("{e}"));
    let fs = spec.rate_hz;
    let n = s.recording.len();
    // Spread over the recording by a fixed stride coprime with the beat period (not on the beats on purpose).
    let at: Vec<usize> = (0..15).map(|i| (200 + i * 317) % n).collect();
    for lead in &mut s.recording.leads {
        for &p in &at {
            lead.samples[p] += 8000.0;
        }
    }
    let a = analyze(&s.recording, &FilterSettings::default());
    let rs: Vec<usize> = s.truth.beats.iter().map(|b| b.to_beat().r).collect();
    let near = |r: usize| a.beats.iter().find(|b| b.r.abs_diff(r) <= (0.010 * fs) as usize);
    let dominant = a.beats.iter().filter(|b| b.kind == isoline_core::beat::BeatKind::Dominant).count();
    println!("{} beats of {}, {dominant} dominant", a.beats.len(), rs.len());
    assert!(
        rs.iter().all(|&r| near(r).is_some()),
        "R peaks {:?} for {rs:?}",
        a.beats.iter().map(|b| b.r).collect::<Vec<_>>()
    );
    assert_eq!(a.beats.len(), rs.len());
    assert_eq!(dominant, rs.len());
}
