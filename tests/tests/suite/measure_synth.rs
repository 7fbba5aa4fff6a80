//! Synthetic truth: on every demo scenario the measured RR, PR, QRS and QT match the truth the generator
//! reports. Source of the model: McSharry, Clifford, Tarassenko & Smith, IEEE Trans Biomed Eng 2003;50:289-94
//! (as implemented by `isoline_core::synth`, which reports every beat's true boundaries). The generator's
//! events have compact support, so every true boundary is the definite instant a wave leaves or regains the
//! baseline, whatever delineation method is used (see `isoline_core::synth::shape`).

use isoline_core::analysis::analyze;
use isoline_core::beat::BeatKind;
use isoline_core::filter::FilterSettings;
use isoline_core::measure;
use isoline_core::synth::noise::NoiseSpec;
use isoline_core::synth::{self, Scenario, SynthSpec};

/// Allowed difference in samples (issue 3: "within 1–2 samples of the truth").
const TOLERANCE_SAMPLES: f64 = 2.0;

struct Outcome {
    name: String,
    rows: Vec<(&'static str, Option<f64>, Option<f64>)>,
    sample_ms: f64,
}

fn run(spec: &SynthSpec) -> Outcome {
    let s = synth::generate(spec).unwrap_or_else(|e| panic!("{}: {e}", spec.scenario));
    let a = analyze(&s.recording, &FilterSettings::default());
    let m = &a.measurements;
    let t = &s.truth;
    Outcome {
        name: spec.scenario.clone(),
        rows: vec![
            ("RR", m.rr.rr_ms, t.rr_ms),
            ("PR", m.intervals.pr_ms, t.pr_ms),
            ("QRS", m.intervals.qrs_ms, t.qrs_ms),
            ("QT", m.intervals.qt_ms, t.qt_ms),
        ],
        sample_ms: 1000.0 / spec.rate_hz,
    }
}

fn check(outcomes: &[Outcome]) {
    let mut bad = Vec::new();
    for o in outcomes {
        let line: Vec<String> = o
            .rows
            .iter()
            .map(|(k, got, want)| {
                let fmt = |v: &Option<f64>| v.map_or("—".to_string(), |x| format!("{x:.1}"));
                let ok = matches!((got, want), (Some(g), Some(w)) if (g - w).abs() <= TOLERANCE_SAMPLES * o.sample_ms);
                if !ok {
                    bad.push(format!("{} {k}: measured {} truth {}", o.name, fmt(got), fmt(want)));
                }
                format!("{k} {} / {}{}", fmt(got), fmt(want), if ok { "" } else { " ✗" })
            })
            .collect();
        println!("{:<20} {}", o.name, line.join("   "));
    }
    assert!(bad.is_empty(), "outside ±{TOLERANCE_SAMPLES} samples: {bad:#?}");
}

/// Every scenario without noise (all but the 24-hour one and the noisy one).
fn clean_specs() -> Vec<SynthSpec> {
    Scenario::ALL
        .into_iter()
        .filter(|s| *s != Scenario::Holter)
        .map(Scenario::spec)
        .filter(|s| s.noise.is_none())
        .collect()
}

/// The noisy scenario, and the clean ones again with its noise (baseline wander, mains, muscle noise).
fn noisy_specs() -> Vec<SynthSpec> {
    let noise = Scenario::Noisy.spec().noise;
    let with_noise =
        clean_specs().into_iter().map(|s| SynthSpec { noise, scenario: format!("{}+noise", s.scenario), ..s });
    std::iter::once(Scenario::Noisy.spec()).chain(with_noise).collect()
}

/// Every scenario but the 24-hour one, without and with noise.
fn specs() -> Vec<SynthSpec> {
    clean_specs().into_iter().chain(noisy_specs()).collect()
}

#[test]
fn measurement_of_the_true_boundaries_matches_the_truth() {
    // The measurement alone: beats and boundaries straight from the generator's truth (sample indices, rounded)
    // against the truth's means from exact times. Tolerance 1 sample.
    for spec in Scenario::ALL.into_iter().filter(|s| *s != Scenario::Holter).map(Scenario::spec) {
        let s = synth::generate(&spec).unwrap_or_else(|e| panic!("{}: {e}", spec.scenario));
        let beats: Vec<_> = s.truth.beats.iter().map(|b| b.to_beat()).collect();
        let m = measure::measure(&s.recording, &beats, None);
        let t = &s.truth;
        let one = 1000.0 / spec.rate_hz;
        for (k, got, want) in [
            ("RR", m.rr.rr_ms, t.rr_ms),
            ("P", m.intervals.p_duration_ms, t.p_duration_ms),
            ("PR", m.intervals.pr_ms, t.pr_ms),
            ("QRS", m.intervals.qrs_ms, t.qrs_ms),
            ("QT", m.intervals.qt_ms, t.qt_ms),
        ] {
            let ok = matches!((got, want), (Some(g), Some(w)) if (g - w).abs() <= one);
            assert!(ok, "{} {k}: measured {got:?}, truth {want:?}", spec.scenario);
        }
        assert_eq!(m.intervals_source, measure::IntervalSource::BeatMedians);
    }
}

#[test]
fn full_analysis_qrs_axis_matches_the_truth() {
    // The whole pipeline; the generator's QRS axis is exact by construction. Measured today: within 2.1° on
    // every scenario with and without noise. Tolerance 5°.
    for spec in specs() {
        let s = synth::generate(&spec).unwrap_or_else(|e| panic!("{}: {e}", spec.scenario));
        let a = analyze(&s.recording, &FilterSettings::default());
        let got = a.measurements.axes.qrs_deg.unwrap_or(f64::NAN);
        println!("{:<26} QRS axis {got:6.1}° truth {:6.1}°", spec.scenario, s.truth.qrs_axis_deg);
        assert!((got - s.truth.qrs_axis_deg).abs() <= 5.0, "{}: {got} vs {}", spec.scenario, s.truth.qrs_axis_deg);
    }
}

#[test]
fn full_analysis_intervals_match_the_truth_without_noise() {
    // Goal (issue 3): RR, PR, QRS, QT within 1–2 samples of the truth on every scenario. Measured today (500 Hz,
    // ms): PR and RR exact, QRS 0..+2, QT 0..+2 on every clean scenario.
    check(&clean_specs().iter().map(run).collect::<Vec<_>>());
}

#[test]
fn coarse_sampling_is_noted_with_the_measurements() {
    // At 100 Hz a sample spans 10 ms and the demo's QRS read 80 ms for 140 (a helper's test): the measurements
    // say the sampling is coarse; at 250 Hz and above they do not.
    for (rate_hz, noted) in [(100.0, true), (128.0, true), (250.0, false), (500.0, false)] {
        let s = synth::generate(&SynthSpec { rate_hz, ..Scenario::Normal.spec() }).unwrap_or_else(|e| panic!("{e}"));
        let notes = analyze(&s.recording, &FilterSettings::default()).measurements.notes();
        let has = notes.iter().any(|n| n.key == measure::ranges::KEY_SAMPLING);
        assert_eq!(has, noted, "{rate_hz} Hz: {notes:?}");
    }
}

#[test]
fn inverted_t_waves_at_fast_rates_end_before_the_next_p_wave() {
    // Sinus tachycardia (PR 110 ms, P 80 ms) with the T axis at −135°: the T wave is inverted in the limb leads and
    // the upright P wave follows it 40 ms after its end. The trapezium's fixed point 120 ms past the T limb lay
    // in that P wave, whose opposite deflection kept adding area: every lead's T end fell in the middle of the P
    // wave (found by a review; QT 326 ms for 250 at 150 bpm, 336 for 203 at 170 bpm), and with the P search
    // starting there, no PR. Measured now: QT exact at 500 Hz, +2 and +5 ms at 250 Hz (the narrow T wave's knee,
    // spread later by the 12 Hz low-pass, is found on the clean unfiltered lead); PR +4 to +6 ms. Tolerance 2
    // samples.
    for (hr, qt, rate_hz) in [(150.0, 250.0, 500.0), (150.0, 250.0, 250.0), (170.0, 202.0, 250.0)] {
        let spec = SynthSpec {
            heart_rate_bpm: hr,
            qt_ms: qt,
            pr_ms: 110.0,
            p_ms: 80.0,
            t_axis_deg: -135.0,
            rate_hz,
            ..Scenario::Normal.spec()
        };
        let o = run(&SynthSpec { scenario: format!("{hr} bpm {rate_hz} Hz, T −135°"), ..spec });
        println!("{}: {:?}", o.name, o.rows);
        let row = |k: &str| o.rows.iter().find(|r| r.0 == k).map(|r| (r.1, r.2)).unwrap_or_default();
        let (qt_got, qt_true) = row("QT");
        let (pr_got, pr_true) = row("PR");
        assert!(
            matches!((qt_got, qt_true), (Some(g), Some(w)) if (g - w).abs() <= TOLERANCE_SAMPLES * o.sample_ms),
            "{}: QT {qt_got:?} vs {qt_true:?}",
            o.name
        );
        assert!(
            matches!((pr_got, pr_true), (Some(g), Some(w)) if (g - w).abs() <= TOLERANCE_SAMPLES * o.sample_ms),
            "{}: PR {pr_got:?} vs {pr_true:?}",
            o.name
        );
    }
}

#[test]
fn trigeminy_is_measured_on_beats_no_premature_beat_follows() {
    // Every third beat premature (ventricular, coupled at a share of the RR): the dominant beat before each one
    // holds the premature QRS in its span. The representative beat leaves those beats out, so QT is the sinus
    // beats' (before: QT 654 ms for 382 on a 60-s trigeminy, the median switching between T wave and premature
    // QRS); the underlying rhythm is regular.
    use isoline_core::synth::Ectopics;
    let mut bad = Vec::new();
    for seconds in [10.0, 30.0, 60.0] {
        let spec = SynthSpec { seconds, ectopics: Ectopics::Every(3), ..Scenario::Ectopics.spec() };
        let o = run(&SynthSpec { scenario: format!("trigeminy {seconds} s"), ..spec.clone() });
        for (k, got, want) in &o.rows {
            println!("{} {k} {got:?} / {want:?}", o.name);
            if !matches!((got, want), (Some(g), Some(w)) if (g - w).abs() <= TOLERANCE_SAMPLES * o.sample_ms) {
                bad.push(format!("{} {k}: {got:?} vs {want:?}", o.name));
            }
        }
        let s = synth::generate(&spec).unwrap_or_else(|e| panic!("{e}"));
        let rhythm = analyze(&s.recording, &FilterSettings::default()).measurements.rr.rhythm;
        assert_eq!(rhythm.regular, Some(true), "{seconds} s: {rhythm:?}");
    }
    assert!(bad.is_empty(), "{bad:#?}");
}

#[test]
fn bigeminy_types_the_sinus_beats_dominant_and_measures_them() {
    // Every other beat ventricular: two shapes equally common, so the median of all beats resembled neither and
    // every beat was typed other (a blended representative beat: on a helper's spliced record QRS 148 ms, axis
    // -84°). Now the sinus beats (the group that follows the long RR) are dominant, the ventricular ones other,
    // and PR, QRS and QT are the sinus beats' (the T end sought before the premature beat that follows).
    use isoline_core::synth::{Ectopics, TrueKind};
    let mut bad = Vec::new();
    for seconds in [10.0, 30.0] {
        let spec = SynthSpec { seconds, ectopics: Ectopics::Every(2), ..Scenario::Ectopics.spec() };
        let s = synth::generate(&spec).unwrap_or_else(|e| panic!("{e}"));
        let a = analyze(&s.recording, &FilterSettings::default());
        let typed = a.beats.iter().zip(&s.truth.beats);
        let right = typed.filter(|(b, t)| (b.kind == BeatKind::Dominant) == (t.kind == TrueKind::Sinus)).count();
        assert_eq!((right, a.beats.len()), (s.truth.beats.len(), s.truth.beats.len()), "{seconds} s beats typed");
        let o = run(&SynthSpec { scenario: format!("bigeminy {seconds} s"), ..spec });
        for (k, got, want) in o.rows.iter().filter(|(k, _, _)| *k != "RR") {
            println!("{} {k} {got:?} / {want:?}", o.name);
            if !matches!((got, want), (Some(g), Some(w)) if (g - w).abs() <= TOLERANCE_SAMPLES * o.sample_ms) {
                bad.push(format!("{} {k}: {got:?} vs {want:?}", o.name));
            }
        }
    }
    assert!(bad.is_empty(), "{bad:#?}");
}

#[test]
fn ectopy_patterns_are_measured_alike_window_by_window() {
    // Long recordings (over an hour) are analysed in windows and their representative beat built from a stack of
    // beats: in bigeminy its T wave was sought within the record's median RR, past the premature beat that
    // follows each sinus beat (30 s: QT 654 ms for 380; the median RR of a bigeminy is the long or the short one
    // as the count of beats falls). Here 30 and 60 s in 10-s windows: PR, QRS and QT within 2 samples of the
    // truth, as for the whole recording at once.
    use isoline_core::analysis::analyze_in_windows;
    use isoline_core::synth::Ectopics;
    let mut bad = Vec::new();
    for (name, every, seconds) in [("bigeminy", 2, 30.0), ("bigeminy", 2, 60.0), ("trigeminy", 3, 30.0)] {
        let spec = SynthSpec { seconds, ectopics: Ectopics::Every(every), ..Scenario::Ectopics.spec() };
        let s = synth::generate(&spec).unwrap_or_else(|e| panic!("{e}"));
        let m = analyze_in_windows(&s.recording, &FilterSettings::default(), 10.0).measurements;
        let t = &s.truth;
        let one = 1000.0 / spec.rate_hz;
        for (k, got, want) in [
            ("PR", m.intervals.pr_ms, t.pr_ms),
            ("QRS", m.intervals.qrs_ms, t.qrs_ms),
            ("QT", m.intervals.qt_ms, t.qt_ms),
        ] {
            println!("{name} {seconds} s in windows {k} {got:?} / {want:?}");
            // The truth's times carry rounding (160 ms as 159.999…): two samples exactly are within.
            if !matches!((got, want), (Some(g), Some(w)) if (g - w).abs() <= TOLERANCE_SAMPLES * one + 1e-6) {
                bad.push(format!("{name} {seconds} s {k}: {got:?} vs {want:?}"));
            }
        }
    }
    assert!(bad.is_empty(), "{bad:#?}");
}

#[test]
fn intervals_hold_at_higher_sampling_rates() {
    // The same scenarios recorded at 1000 and 2000 Hz: the boundaries are found in time, not in samples, so the
    // intervals stay within the 500-Hz tolerance (2 samples there, 4 ms). Before the QRS edges judged the
    // unfiltered lead's noise by a per-sample step, at 1000 Hz and above the refinement of the low-pass spread
    // was shut off on clean leads: QRS +6 to +9 ms and PR -5 ms at 1000-5000 Hz.
    let mut bad = Vec::new();
    for rate_hz in [1000.0, 2000.0] {
        for spec in clean_specs() {
            let o = run(&SynthSpec { rate_hz, ..spec });
            for (k, got, want) in &o.rows {
                let err = got.zip(*want).map(|(g, w)| g - w);
                println!("{rate_hz} Hz {:<20} {k} {err:?}", o.name);
                if !err.is_some_and(|e| e.abs() <= 4.0) {
                    bad.push(format!("{rate_hz} Hz {} {k}: {got:?} vs {want:?}", o.name));
                }
            }
        }
    }
    assert!(bad.is_empty(), "{bad:#?}");
}

#[test]
fn intervals_hold_at_250_hz() {
    // The QT Database's rate. Within 2 samples (8 ms) of the truth on every clean scenario. Before the T end's
    // noise gate read the unfiltered lead's third differences, a wide T wave's own curvature (second
    // differences, four times larger per sample than at 500 Hz) shut off carrying the end on to its knee: long-qt
    // QT 508 ms for 520.
    let mut bad = Vec::new();
    for spec in clean_specs() {
        let o = run(&SynthSpec { rate_hz: 250.0, ..spec });
        for (k, got, want) in &o.rows {
            let err = got.zip(*want).map(|(g, w)| g - w);
            println!("250 Hz {:<20} {k} {err:?}", o.name);
            if !err.is_some_and(|e| e.abs() <= TOLERANCE_SAMPLES * o.sample_ms + 1e-6) {
                bad.push(format!("250 Hz {} {k}: {got:?} vs {want:?}", o.name));
            }
        }
    }
    assert!(bad.is_empty(), "{bad:#?}");
}

#[test]
fn intervals_hold_on_a_wandering_baseline() {
    // Baseline wander (breathing, movement) the 0.5 Hz high-pass leaves in part: each beat sits on its own slope,
    // and the median of the beats had no flat baseline to end its T wave on. Before (QT, ms): long-qt with 2 mV at
    // 0.3 Hz 608 for 520, first-degree block 446 for 380, normal with 1 mV at 0.5 Hz 452, with 2 mV 706 (and no
    // RR); the single beats were near the truth. The beats are now
    // levelled by a cubic spline through their PR levels before the median (Meyer & Keiser 1977,
    // `delineate::baseline`), which follows wander up to about 0.4 × the heart rate (one knot a beat). RR, QRS
    // and QT within 2 samples of the truth, 10 and 30 s; PR, where given, too. Measured today: PR is withheld on
    // the first-degree block (2 mV at 0.3 Hz) and on every scenario at 0.5 Hz: the single beats' P waves, on the
    // unlevelled signal, are not alike enough for the record's P model.
    let wander = |uv: f64, hz: f64| NoiseSpec { baseline_uv: uv, baseline_hz: hz, ..NoiseSpec::NONE };
    let cases = [
        (Scenario::Normal, 2000.0, 0.3),
        (Scenario::LongQt, 2000.0, 0.3),
        (Scenario::FirstDegreeBlock, 2000.0, 0.3),
        (Scenario::Normal, 1000.0, 0.5),
        (Scenario::Normal, 2000.0, 0.5),
    ];
    let mut outcomes = Vec::new();
    for (scenario, uv, hz) in cases {
        for seconds in [10.0, 30.0] {
            let spec = SynthSpec { seconds, noise: wander(uv, hz), ..scenario.spec() };
            let name = format!("{} {seconds} s {uv} µV {hz} Hz", spec.scenario);
            let mut o = run(&spec);
            // PR only where measured.
            o.rows.retain(|(k, got, _)| *k != "PR" || got.is_some());
            outcomes.push(Outcome { name, ..o });
        }
    }
    check(&outcomes);
}

#[test]
fn wander_too_fast_to_take_off_is_noted() {
    // Wander at about the heart rate passes between the beats' PR segments, where the spline's knots lie: the
    // representative beat keeps it and its QT and ST levels are off (normal with 1 mV at 1 Hz: QT 644 ms for 382,
    // ST −50 µV in every lead, and before no word of it). The baseline's step from beat to beat says so; slow
    // wander, taken off, and none at all say nothing. Limit: `ranges::UNSTEADY_BASELINE_UV`.
    let wander = |uv: f64, hz: f64| NoiseSpec { baseline_uv: uv, baseline_hz: hz, ..NoiseSpec::NONE };
    for (noise, want) in [(wander(1000.0, 1.0), true), (wander(600.0, 0.8), true), (wander(2000.0, 0.3), false)] {
        for seconds in [10.0, 30.0] {
            let spec = SynthSpec { seconds, noise, ..Scenario::Normal.spec() };
            let s = synth::generate(&spec).unwrap_or_else(|e| panic!("{e}"));
            let m = analyze(&s.recording, &FilterSettings::default()).measurements;
            let noted = m.notes().iter().any(|n| n.text.starts_with("Baseline moves by"));
            // A QTc called long from that QT says its QT is doubtful (for this reason, or that the single beats
            // do not confirm it, which is said first).
            let doubt = |t: &str| t.ends_with("on an unsteady baseline") || t.ends_with("do not confirm");
            let qtc_noted = m.notes().iter().filter(|n| n.qtc.is_some()).all(|n| doubt(&n.text));
            assert!(qtc_noted || !want, "{:?}", m.notes());
            println!(
                "{} µV at {} Hz, {seconds} s: step {:?} µV, noted {noted}",
                noise.baseline_uv, noise.baseline_hz, m.baseline_step_uv
            );
            assert_eq!(noted, want, "{} µV at {} Hz, {seconds} s", noise.baseline_uv, noise.baseline_hz);
        }
    }
    let clean = analyze(
        &synth::generate(&Scenario::Normal.spec()).unwrap_or_else(|e| panic!("{e}")).recording,
        &FilterSettings::default(),
    );
    assert!(clean.measurements.baseline_step_uv.is_some_and(|s| s < 10.0), "{:?}", clean.measurements.baseline_step_uv);
}

// Tried and not kept (LUDB: LUDB records 1-50, representative beat against the median of the experts' global
// boundaries): moving the representative beat's QRS edges to where the multi-lead departure from the baseline
// (each 40 Hz lead's deviation in units of its noise SD over 60 ms outside the edge, summed in squares over the
// leads, less its noise expectation) extrapolates to zero brought QRS within ±2 samples on all 36 noisy runs
// (6 scenarios × 6 seeds) and PR to −6..+4 ms with the same step on the P onset, but it shortened the
// representative QRS on 40 of 50 LUDB records, 39 further from the experts (QRS −20.2 ± 12.5 → −25.4 ± 13.1 ms;
// PR +4.7 ± 16.2 → +6.8 ± 16.5 ms); lower departure levels (3–4 noise units) cost less on LUDB (−22.5 ms) but
// leave QRS up to +10 ms with noise; per-lead departures voted as the QRS edges are gave −27.7 ms. A
// least-squares corner fit (two-phase regression) on the median beat's leads scattered ±3 samples even without
// noise. Undoing the low-pass spread on noisy leads by trial (hold the lead at its 40 Hz level beyond a
// candidate edge, filter and smooth it again, and move the edge inward while the trial still crosses the same
// threshold at the same sample): on the representative beat alone, QRS with noise +8..+12 → +4..+8 ms (the
// noisy scenario within 2 samples; the rest not: per lead the ends fall within 0..−3 samples, but one noisy lead
// in nine still starts 3–5 samples early and the earliest confirmed pair takes it), while the reported LUDB QRS
// went −18.3 ± 13.5 → −22.2 ± 13.2 ms and PR +2.4 → +4.8 (real QRS onsets are gradual, not corners); on every
// beat as well it moved the LUDB QRS onset +8.2 → +10.2 ms and the QT Database one −0.8 → +3.9, and the QT
// Database P onset was found on 150 of 181 annotated beats (181 before).
#[test]
#[ignore = "with noise (25 uV muscle, 40 uV mains, 150 uV wander; 500 Hz; ms, seed 1): QRS +8..+12 on the 90 ms \
            QRS (onset 2-5 samples early, J point 0-2 late: the unfiltered leads are too noisy to refine the \
            low-pass spread), +6 on 140 ms; QT +6..+8 (from the early QRS onset; long-qt -6, where the \
            trapezium end on a 52 ms-sigma T stands short of the knee the noise hides); PR -4..+4 (within 2 \
            samples; -8..+4 over 48 runs, measure_synth_p); RR within 0.4"]
fn full_analysis_intervals_match_the_truth_with_noise() {
    // Goal (issue 3): the same, also with noise switched on.
    check(&noisy_specs().iter().map(run).collect::<Vec<_>>());
}

#[test]
fn ectopic_beats_leave_the_underlying_rhythm_regular() {
    // The ectopics scenario: steady sinus rhythm with premature wide beats and full compensatory pauses (30 s).
    // Every ectopic beat is typed other, and the rhythm of the dominant beats is regular; the irregular
    // scenario stays irregular.
    let spec = SynthSpec { seconds: 30.0, ..Scenario::Ectopics.spec() };
    let s = synth::generate(&spec).unwrap_or_else(|e| panic!("{e}"));
    let a = analyze(&s.recording, &FilterSettings::default());
    let rhythm = a.measurements.rr.rhythm;
    assert!(s.truth.ectopic_beats >= 4, "{} ectopic beats", s.truth.ectopic_beats);
    // Every dominant beat whose span (0.45 s but at most 0.6 RR before R, 0.70 s but at most one RR after) lies in
    // the recording joins the representative beat, also the first and last, which have no room to be lined up;
    // but not one a premature beat follows (it lies in its span).
    let rep = a.representative.as_ref().map_or(0, |r| r.n_beats);
    let (n, fs) = (s.recording.len(), spec.rate_hz);
    let rr = s.truth.rr_ms.unwrap_or(f64::NAN) * fs / 1000.0;
    let (before, after) = ((0.45 * fs).min(0.6 * rr) as usize, (0.70 * fs).min(rr) as usize);
    let followed_by_other = |i: usize| a.beats.get(i + 1).is_some_and(|next| next.kind == BeatKind::Other);
    let fits = (0..a.beats.len())
        .filter(|&i| !followed_by_other(i))
        .map(|i| &a.beats[i])
        .filter(|b| b.kind == BeatKind::Dominant && b.r >= before && b.r + after <= n)
        .count();
    assert_eq!(rep, fits, "beats in the representative beat");
    assert_eq!(rhythm.other_beats, s.truth.ectopic_beats, "{rhythm:?}");
    assert_eq!(rhythm.regular, Some(true), "{rhythm:?}");
    let irregular = synth::generate(&Scenario::Irregular.spec()).unwrap_or_else(|e| panic!("{e}"));
    let rhythm = analyze(&irregular.recording, &FilterSettings::default()).measurements.rr.rhythm;
    assert_eq!(rhythm.regular, Some(false), "{rhythm:?}");
}

#[test]
fn coarse_sampling_keeps_beats_dominant_and_rr_steady() {
    // At 100–200 Hz a sample is 5–10 ms: identical beats whose R peaks fall at different points between two
    // samples must still be typed alike and their R peaks placed on the same wave, or the RR scatters and the
    // rate variability reads tens of ms on a steady rhythm (before: a third of a 100 Hz demo's beats typed other,
    // SDNN 29 ms; 22 extra other beats over 30 demo recordings at 100 and 128 Hz without the half-sample
    // comparison). The generator's rhythm is exactly steady (truth:
    // SDNN 0), so RR may differ from the truth by one sample at most and SDNN stays under one sample.
    for rate_hz in [100.0, 128.0, 200.0] {
        let spec = SynthSpec { rate_hz, ..Scenario::Normal.spec() };
        let s = synth::generate(&spec).unwrap_or_else(|e| panic!("{rate_hz} Hz: {e}"));
        let a = analyze(&s.recording, &FilterSettings::default());
        let m = &a.measurements;
        let one = 1000.0 / rate_hz;
        let other = a.beats.iter().filter(|b| b.kind == BeatKind::Other).count();
        let (rr, sdnn) = (m.rr.rr_ms.unwrap_or(f64::NAN), m.rr.sdnn_ms.unwrap_or(f64::NAN));
        println!("{rate_hz} Hz: {} beats, {other} other, RR {rr:.1} ms, SDNN {sdnn:.1} ms", a.beats.len());
        assert_eq!(other, 0, "{rate_hz} Hz");
        assert!((rr - s.truth.rr_ms.unwrap_or(f64::NAN)).abs() <= one, "{rate_hz} Hz: RR {rr}");
        assert!(sdnn <= one, "{rate_hz} Hz: SDNN {sdnn}");
        // With premature wide beats over 30 s (three seeds), exactly those are typed other.
        for seed in 1..=3 {
            let spec = SynthSpec { rate_hz, seed, seconds: 30.0, ..Scenario::Ectopics.spec() };
            let s = synth::generate(&spec).unwrap_or_else(|e| panic!("{rate_hz} Hz: {e}"));
            let a = analyze(&s.recording, &FilterSettings::default());
            let other = a.beats.iter().filter(|b| b.kind == BeatKind::Other).count();
            assert_eq!(other, s.truth.ectopic_beats, "{rate_hz} Hz ectopics seed {seed}");
        }
    }
}
