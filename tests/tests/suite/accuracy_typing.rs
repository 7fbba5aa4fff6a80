//! Beat typing (dominant versus other) where the rhythm decides: an irregular sinus rhythm must keep its beats
//! dominant (short RRs are ordinary there), while premature beats in a regular rhythm stay `other`.
//! Run with `--nocapture` to see the figures.
//!
//! Source: beat labels of MIT-BIH record 100 (`A` = atrial premature beat), Moody & Mark, IEEE Eng Med Biol
//! 2001;20(3):45-50; the demo generator's own truth (made-up scenarios) for the synthetic rhythms.

use isoline_core::beat::BeatKind;
use isoline_core::synth::{self, Scenario, TrueKind};
use isoline_core::{detect, filter};
use isoline_tests::data;
use isoline_tests::score::{beats_of, match_beats};

/// (true kind, detected kind) counts of the matched beats: [sinus→dominant, sinus→other, ectopic→dominant,
/// ectopic→other].
fn typing_of(scenario: Scenario, seed: u64) -> Result<[usize; 4], String> {
    let spec = synth::SynthSpec { seed, seconds: 120.0, ..scenario.spec() };
    let s = synth::generate(&spec).map_err(|e| e.to_string())?;
    let filtered = filter::apply(&s.recording, &filter::FilterSettings::default());
    let beats = detect::detect_beats(&filtered.recording);
    let truth: Vec<f64> = s.truth.beats.iter().map(|b| b.r_sample as f64).collect();
    let found: Vec<f64> = beats.iter().map(|b| b.r as f64).collect();
    let window = 0.075 * s.recording.sample_rate.hz();
    let mut counts = [0; 4];
    for (t, d) in match_beats(&truth, &found, window) {
        let ectopic = s.truth.beats[t].kind == TrueKind::Ectopic;
        let other = beats[d].kind == BeatKind::Other;
        counts[usize::from(ectopic) * 2 + usize::from(other)] += 1;
    }
    println!(
        "{} seed {seed}: sinus→dominant {} sinus→other {} ectopic→dominant {} ectopic→other {}",
        scenario.name(),
        counts[0],
        counts[1],
        counts[2],
        counts[3]
    );
    Ok(counts)
}

#[test]
fn irregular_sinus_rhythm_keeps_its_beats_dominant() -> Result<(), String> {
    let (mut dominant, mut sinus) = (0, 0);
    for seed in 1..=6 {
        let c = typing_of(Scenario::Irregular, seed)?;
        dominant += c[0];
        sinus += c[0] + c[1];
    }
    // Every beat of this scenario is sinus; allow 1 % typed other.
    assert!(sinus > 600, "only {sinus} sinus beats matched");
    assert!(dominant as f64 >= 0.99 * sinus as f64, "{dominant} of {sinus} sinus beats dominant");
    Ok(())
}

#[test]
fn ectopic_beats_in_a_regular_rhythm_stay_other() -> Result<(), String> {
    let c = typing_of(Scenario::Ectopics, 1)?;
    assert!(c[2] + c[3] >= 20, "too few ectopic beats matched");
    assert_eq!(c[2], 0, "ectopic beats typed dominant");
    assert_eq!(c[1], 0, "sinus beats typed other");
    Ok(())
}

#[test]
fn atrial_premature_beats_of_mitdb_100_stay_other() -> Result<(), String> {
    let text = std::fs::read_to_string(data("mitdb-100/100.beats.csv")).map_err(|e| e.to_string())?;
    let labels: Vec<(f64, String)> = text
        .lines()
        .skip(1)
        .filter_map(|l| {
            let (s, sym) = l.split_once(',')?;
            Some((s.trim().parse().ok()?, sym.trim().to_string()))
        })
        .collect();
    let (recording, beats) = beats_of(&data("mitdb-100/100.hea"))?;
    let reference: Vec<f64> = labels.iter().map(|l| l.0).collect();
    let found: Vec<f64> = beats.iter().map(|b| b.r as f64).collect();
    let (mut a_total, mut a_other, mut n_total, mut n_dominant) = (0, 0, 0, 0);
    for (t, d) in match_beats(&reference, &found, 0.075 * recording.sample_rate.hz()) {
        let other = beats[d].kind == BeatKind::Other;
        match labels[t].1.as_str() {
            "A" => {
                a_total += 1;
                a_other += usize::from(other);
            }
            "N" => {
                n_total += 1;
                n_dominant += usize::from(!other);
            }
            _ => {}
        }
    }
    println!("mitdb 100: A beats other {a_other}/{a_total}; N beats dominant {n_dominant}/{n_total}");
    assert_eq!(a_total, 33, "the record holds 33 atrial premature beats");
    assert!(a_other >= 31, "A beats typed other: {a_other}/{a_total}");
    assert!(n_dominant as f64 >= 0.99 * n_total as f64, "N beats dominant {n_dominant}/{n_total}");
    Ok(())
}
