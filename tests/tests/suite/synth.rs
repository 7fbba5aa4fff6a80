//! The demo generator (`isoline_core::synth`): lead relations, truth against the parameters asked for,
//! determinism, noise power, rhythm. Each outside fact names its source.

use isoline_core::StandardLead as L;
use isoline_core::synth::{self, Ectopics, LeadSet, NoiseSpec, Scenario, SynthSpec, Synthetic, TrueKind};

fn make(spec: &SynthSpec) -> Synthetic {
    match synth::generate(spec) {
        Ok(s) => s,
        Err(e) => panic!("{}: {e}", spec.scenario),
    }
}

fn lead(s: &Synthetic, l: L) -> &[f32] {
    match s.recording.standard_lead(l) {
        Some(x) => &x.samples,
        None => panic!("lead {l} missing"),
    }
}

/// Tolerance for a relation computed in f32: a few units in the last place of the largest operand.
fn ulps(a: f32, b: f32) -> f32 {
    4.0 * f32::EPSILON * a.abs().max(b.abs()).max(1.0)
}

#[test]
fn derived_leads_obey_einthoven_and_goldberger_to_float_precision() {
    for scenario in [Scenario::Normal, Scenario::Noisy, Scenario::Ectopics, Scenario::WideQrs] {
        let s = make(&scenario.spec());
        let names: Vec<String> = s.recording.leads.iter().map(|l| l.name.to_string()).collect();
        assert_eq!(names, ["I", "II", "III", "aVR", "aVL", "aVF", "V1", "V2", "V3", "V4", "V5", "V6"]);
        let (i, ii, iii) = (lead(&s, L::I), lead(&s, L::II), lead(&s, L::III));
        let (avr, avl, avf) = (lead(&s, L::AVR), lead(&s, L::AVL), lead(&s, L::AVF));
        for k in 0..i.len() {
            // Source: Einthoven's law II = I + III (references.md §5).
            assert!((ii[k] - (i[k] + iii[k])).abs() <= ulps(ii[k], i[k]), "{} sample {k}", scenario.name());
            // Source: Goldberger, Am Heart J 1942;23:483 (references.md §5): aVR = −(I+II)/2, aVL = I − II/2,
            // aVF = II − I/2, and aVR + aVL + aVF = 0.
            assert!((avr[k] + (i[k] + ii[k]) / 2.0).abs() <= ulps(i[k], ii[k]));
            assert!((avl[k] - (i[k] - ii[k] / 2.0)).abs() <= ulps(i[k], ii[k]));
            assert!((avf[k] - (ii[k] - i[k] / 2.0)).abs() <= ulps(i[k], ii[k]));
            assert!((avr[k] + avl[k] + avf[k]).abs() <= 2.0 * ulps(i[k], ii[k]));
        }
    }
}

#[test]
fn truth_intervals_match_the_parameters_within_one_sample() {
    for scenario in Scenario::ALL {
        let mut spec = scenario.spec();
        spec.seconds = spec.seconds.min(30.0);
        for rate in [250.0, 360.0, 500.0, 1000.0] {
            spec.rate_hz = rate;
            let s = make(&spec);
            let t = &s.truth;
            let one = 1000.0 / rate;
            // Means over sinus beats use exact times: equal to what was asked for.
            for (got, want) in [(t.pr_ms, spec.pr_ms), (t.qrs_ms, spec.qrs_ms), (t.qt_ms, spec.qt_ms)] {
                let got = got.unwrap_or(f64::NAN);
                assert!((got - want).abs() < 1e-6, "{}: {got} vs {want}", scenario.name());
            }
            assert!(t.sinus_beats >= 8, "{}", scenario.name());
            for b in t.beats.iter().filter(|b| b.kind == TrueKind::Sinus) {
                let ms = |a: Option<usize>, z: Option<usize>| match (a, z) {
                    (Some(a), Some(z)) => (z as f64 - a as f64) * one,
                    _ => f64::NAN,
                };
                // Each boundary is rounded to the nearest sample, so an interval is within one sample.
                assert!((ms(b.p_on, b.qrs_on) - spec.pr_ms).abs() <= one, "{} PR {b:?}", scenario.name());
                assert!((ms(b.qrs_on, b.qrs_end) - spec.qrs_ms).abs() <= one, "{} QRS {b:?}", scenario.name());
                assert!((ms(b.qrs_on, b.t_end) - spec.qt_ms).abs() <= one, "{} QT {b:?}", scenario.name());
                assert!((ms(b.p_on, b.p_end) - spec.p_ms).abs() <= one, "{} P {b:?}", scenario.name());
                let r = Some(b.r_sample);
                assert!(b.qrs_on < r && r < b.qrs_end);
            }
            // Mean RR is the mean of the sinus-to-sinus R peak intervals.
            let rr: Vec<f64> = t
                .beats
                .windows(2)
                .filter(|w| w[0].kind == TrueKind::Sinus && w[1].kind == TrueKind::Sinus)
                .map(|w| (w[1].r_sample - w[0].r_sample) as f64 * one)
                .collect();
            let mean = rr.iter().sum::<f64>() / rr.len() as f64;
            assert!((mean - t.rr_ms.unwrap_or(f64::NAN)).abs() <= one, "{}", scenario.name());
        }
    }
}

#[test]
fn regular_rhythm_has_the_rate_asked_for() {
    let spec = Scenario::Normal.spec();
    let t = make(&spec).truth;
    // Source: references.md §10 (HR = 60 / RR in seconds).
    assert!((t.rr_ms.unwrap_or(0.0) - 60_000.0 / spec.heart_rate_bpm).abs() < 1e-6);
    assert!((t.heart_rate_bpm.unwrap_or(0.0) - 72.0).abs() < 1e-9);
}

/// Baseline of a beat: the mean of the 20 ms before its first onset.
fn baseline(x: &[f32], first: usize, fs: f64) -> f64 {
    let w = (0.02 * fs) as usize;
    x[first - w..first].iter().map(|&v| f64::from(v)).sum::<f64>() / w as f64
}

/// Largest change from sample `k` to `k + 1` over all leads, µV.
fn step(s: &Synthetic, k: usize) -> f64 {
    s.recording.leads.iter().map(|l| (f64::from(l.samples[k + 1]) - f64::from(l.samples[k])).abs()).fold(0.0, f64::max)
}

/// Most the trace may move per sample where no wave is: only the model's slow pull to baseline acts there
/// (λ = 2π·0.05 s⁻¹ on an offset of some tens of µV: at most 0.07 µV per sample at 500 Hz in these
/// scenarios, where a Gaussian's tail 2–3σ out would still move by several µV).
const FLAT_UV: f64 = 0.2;
/// Least move per sample just inside a wave: every event leaves the baseline at its corner slope
/// h·k·e^(−k²/2)/((1 − e^(−k²/2))σ), about 1.7 µV per sample for the smallest (the 150 µV P wave) at 500 Hz.
const MOVING_UV: f64 = 0.5;

#[test]
fn truth_agrees_with_the_waveform() {
    for scenario in [Scenario::Normal, Scenario::LongQt, Scenario::WideQrs, Scenario::Ectopics] {
        let spec = scenario.spec();
        let s = make(&spec);
        let fs = spec.rate_hz;
        let name = scenario.name();
        let ii = lead(&s, L::II);
        for b in &s.truth.beats {
            let (Some(qrs_on), Some(qrs_end), Some(t_end)) = (b.qrs_on, b.qrs_end, b.t_end) else {
                panic!("{name}: beat without QRS or T: {b:?}");
            };
            let first = b.p_on.unwrap_or(qrs_on);
            if scenario == Scenario::Normal {
                // The largest deflection of the beat in lead II lies inside the QRS, within 4 ms of the R peak,
                // and is clearly away from the baseline.
                let base = baseline(ii, first, fs);
                let (kmax, dev) = (first..t_end)
                    .map(|k| (k, (f64::from(ii[k]) - base).abs()))
                    .fold((0, 0.0), |a, c| if c.1 > a.1 { c } else { a });
                assert!(kmax > qrs_on && kmax < qrs_end && kmax.abs_diff(b.r_sample) as f64 <= 0.004 * fs, "{b:?}");
                assert!(dev > 500.0, "R deflection {dev} µV");
            }
            // Boundary rule (synth::shape): every wave leaves the baseline at its onset and regains it at its
            // end, in the leads taken together. A true instant is rounded to the nearest sample, so the sample
            // before an onset (after an end) is outside the wave and the sample after it (before it) inside.
            let mut onsets = vec![qrs_on];
            let mut ends = vec![qrs_end, t_end];
            if let (Some(p_on), Some(p_end)) = (b.p_on, b.p_end) {
                onsets.push(p_on);
                ends.push(p_end);
            }
            for on in onsets {
                for k in on - 6..on - 1 {
                    assert!(step(&s, k) < FLAT_UV, "{name}: moving {} µV at {k}, before onset {on}", step(&s, k));
                }
                assert!(step(&s, on + 1) > MOVING_UV, "{name}: still flat after onset {on}: {}", step(&s, on + 1));
            }
            for end in ends {
                assert!(step(&s, end - 2) > MOVING_UV, "{name}: already flat before end {end}: {}", step(&s, end - 2));
                for k in end + 1..end + 6 {
                    assert!(step(&s, k) < FLAT_UV, "{name}: moving {} µV at {k}, after end {end}", step(&s, k));
                }
            }
        }
    }
}

#[test]
fn frontal_qrs_axis_is_the_one_asked_for() {
    for (scenario, want) in [(Scenario::Normal, 50.0), (Scenario::WideQrs, -45.0)] {
        let s = make(&scenario.spec());
        let (i, avf) = (lead(&s, L::I), lead(&s, L::AVF));
        let (mut area_i, mut area_f) = (0.0, 0.0);
        for b in s.truth.beats.iter().filter(|b| b.kind == TrueKind::Sinus) {
            let (Some(on), Some(end)) = (b.qrs_on, b.qrs_end) else { continue };
            let (bi, bf) = (f64::from(i[on - 2]), f64::from(avf[on - 2]));
            area_i += i[on..=end].iter().map(|&v| f64::from(v) - bi).sum::<f64>();
            area_f += avf[on..=end].iter().map(|&v| f64::from(v) - bf).sum::<f64>();
        }
        // Source: references.md §5, θ = atan2(2·aVF/√3, I) from the hexaxial geometry [computed].
        let axis = (2.0 * area_f / 3f64.sqrt()).atan2(area_i).to_degrees();
        assert!((axis - want).abs() < 2.0, "{}: axis {axis}", scenario.name());
    }
}

#[test]
fn every_scenario_shows_its_beats_in_one_and_two_leads() {
    // The short lead sets hold lead II (and I): a scenario whose QRS lay at right angles to lead II gave a flat
    // one-lead demo with no beat to find (wide-qrs at −30°).
    use isoline_core::analysis::analyze;
    use isoline_core::filter::FilterSettings;
    for scenario in Scenario::ALL.into_iter().filter(|s| *s != Scenario::Holter) {
        for leads in [LeadSet::Single, LeadSet::Pair] {
            let s = make(&SynthSpec { leads, ..scenario.spec() });
            let found = analyze(&s.recording, &FilterSettings::default()).beats.len();
            assert_eq!(found, s.truth.beats.len(), "{} with {leads:?}", scenario.name());
        }
    }
}

#[test]
fn same_seed_same_recording_other_seed_other_recording() {
    for scenario in [Scenario::Noisy, Scenario::Irregular, Scenario::Holter] {
        let mut spec = scenario.spec();
        spec.seconds = 20.0;
        let (a, b) = (make(&spec), make(&spec));
        assert_eq!(a.recording, b.recording, "{}", scenario.name());
        assert_eq!(a.truth, b.truth);
        spec.seed = 99;
        let c = make(&spec);
        assert_ne!(a.recording.leads[0].samples, c.recording.leads[0].samples, "{}", scenario.name());
    }
}

fn rms_diff(a: &[f32], b: &[f32]) -> f64 {
    let s: f64 = a.iter().zip(b).map(|(&x, &y)| (f64::from(x) - f64::from(y)).powi(2)).sum();
    (s / a.len() as f64).sqrt()
}

#[test]
fn noise_has_the_power_asked_for() {
    let mut noisy = Scenario::Noisy.spec();
    noisy.seconds = 60.0;
    let clean = SynthSpec { noise: NoiseSpec::NONE, ..noisy.clone() };
    let (a, b) = (make(&noisy), make(&clean));
    let n = noisy.noise;
    // Sinusoids of peak A have power A²/2; the muscle noise is specified by its RMS.
    let want = (n.baseline_uv.powi(2) / 2.0 + n.mains_uv.powi(2) / 2.0 + n.muscle_uv.powi(2)).sqrt();
    for l in [L::I, L::II, L::V1, L::V6] {
        let got = rms_diff(lead(&a, l), lead(&b, l));
        assert!((got - want).abs() < 0.05 * want, "{l}: noise RMS {got} µV, asked {want} µV");
    }
    // The clean scenario has no noise at all: the waveform is the same apart from the added noise.
    assert_eq!(a.truth.beats, b.truth.beats);
}

#[test]
fn mains_hum_sits_at_the_frequency_asked_for() {
    for hz in [50.0, 60.0] {
        let mut spec = Scenario::Normal.spec();
        spec.noise = NoiseSpec { mains_uv: 50.0, mains_hz: hz, ..NoiseSpec::NONE };
        let clean = SynthSpec { noise: NoiseSpec::NONE, ..spec.clone() };
        let (a, b) = (make(&spec), make(&clean));
        let d: Vec<f64> = lead(&a, L::I).iter().zip(lead(&b, L::I)).map(|(&x, &y)| f64::from(x - y)).collect();
        // Correlate with sinusoids at nearby frequencies: the strongest is the one asked for.
        let power = |f: f64| {
            let (mut c, mut s) = (0.0, 0.0);
            for (k, v) in d.iter().enumerate() {
                let ph = std::f64::consts::TAU * f * k as f64 / spec.rate_hz;
                c += v * ph.cos();
                s += v * ph.sin();
            }
            c * c + s * s
        };
        let best = [45.0, 50.0, 55.0, 60.0, 65.0].into_iter().max_by(|&x, &y| power(x).total_cmp(&power(y)));
        assert_eq!(best, Some(hz));
    }
}

fn rr_cv(t: &synth::Truth) -> f64 {
    let rr: Vec<f64> = t.beats.windows(2).map(|w| (w[1].r_sample - w[0].r_sample) as f64).collect();
    let m = rr.iter().sum::<f64>() / rr.len() as f64;
    (rr.iter().map(|r| (r - m).powi(2)).sum::<f64>() / (rr.len() - 1) as f64).sqrt() / m
}

#[test]
fn irregular_rhythm_is_irregular_and_normal_is_not() {
    let mut spec = Scenario::Irregular.spec();
    spec.seconds = 60.0;
    let irregular = make(&spec).truth;
    assert!(rr_cv(&irregular) > 0.08, "irregular RR variation {}", rr_cv(&irregular));
    assert!(irregular.beats.iter().all(|b| b.kind == TrueKind::Sinus && b.p_on.is_some()));
    let normal = make(&Scenario::Normal.spec()).truth;
    assert!(rr_cv(&normal) < 0.003, "normal RR variation {}", rr_cv(&normal));
}

#[test]
fn ectopic_beats_are_premature_wide_and_without_p() {
    let mut spec = Scenario::Ectopics.spec();
    spec.seconds = 30.0;
    let t = make(&spec).truth;
    assert!(t.ectopic_beats >= 4, "{} ectopic beats", t.ectopic_beats);
    let fs = spec.rate_hz;
    let rr_ms = t.rr_ms.unwrap_or(f64::NAN);
    for (k, w) in t.beats.windows(3).enumerate() {
        if w[1].kind != TrueKind::Ectopic {
            continue;
        }
        let (before, after) = (
            (w[1].r_sample - w[0].r_sample) as f64 * 1000.0 / fs,
            (w[2].r_sample - w[1].r_sample) as f64 * 1000.0 / fs,
        );
        assert!(before < 0.8 * rr_ms, "beat {}: coupling {before} ms vs RR {rr_ms} ms", k + 1);
        // Full compensatory pause: the two intervals add up to two sinus RRs.
        assert!((before + after - 2.0 * rr_ms).abs() <= 2.0 * 1000.0 / fs);
        assert_eq!((w[1].p_on, w[1].p_end), (None, None));
        let width = |b: &synth::TrueBeat| b.qrs_end.unwrap_or(0) - b.qrs_on.unwrap_or(0);
        assert!(width(&w[1]) > width(&w[0]) + (0.03 * fs) as usize);
        assert_eq!(w[0].kind, TrueKind::Sinus);
        assert_eq!(w[1].to_beat().kind, isoline_core::BeatKind::Other);
    }
}

#[test]
fn ambulatory_set_and_single_leads() {
    let spec = SynthSpec { leads: LeadSet::Ambulatory3, ..Scenario::Normal.spec() };
    let s = make(&spec);
    let names: Vec<String> = s.recording.leads.iter().map(|l| l.name.to_string()).collect();
    assert_eq!(names, ["I", "II", "V5"]);
    assert_eq!(s.truth.leads, names);
    // The same heart seen through the same leads: I and II equal the 12-lead recording's.
    let full = make(&Scenario::Normal.spec());
    assert_eq!(lead(&s, L::II), lead(&full, L::II));
    let one = make(&SynthSpec { leads: LeadSet::Single, ..Scenario::Normal.spec() });
    assert_eq!(one.recording.leads.len(), 1);
    assert_eq!(lead(&one, L::II), lead(&full, L::II));
}

#[test]
fn chest_leads_show_r_wave_progression() {
    let s = make(&Scenario::Normal.spec());
    let b = s.truth.beats[3];
    let (Some(on), Some(end)) = (b.qrs_on, b.qrs_end) else { panic!("no QRS") };
    let rs = |l| {
        let x = lead(&s, l);
        let base = f64::from(x[on - 3]);
        let r = x[on..=end].iter().map(|&v| f64::from(v) - base).fold(f64::MIN, f64::max);
        let sw = x[on..=end].iter().map(|&v| f64::from(v) - base).fold(f64::MAX, f64::min);
        (r, -sw)
    };
    let (r1, s1) = rs(L::V1);
    let (r4, _) = rs(L::V4);
    let (r6, s6) = rs(L::V6);
    // Common practice, no source: small r and deep S in V1, tall R and small S in V6, R grows across.
    assert!(s1 > 2.0 * r1, "V1 r {r1} S {s1}");
    assert!(r6 > 3.0 * r1 && r4 > r1, "R V1 {r1} V4 {r4} V6 {r6}");
    assert!(s1 > 2.0 * s6, "S V1 {s1} V6 {s6}");
}

#[test]
fn bad_parameters_are_refused_with_their_name() {
    let bad = |f: fn(&mut SynthSpec)| {
        let mut s = SynthSpec::default();
        f(&mut s);
        synth::generate(&s).map(|_| ()).map_err(|e| e.to_string())
    };
    assert!(bad(|s| s.rate_hz = 0.0).is_err_and(|e| e.contains("rate_hz")));
    assert!(bad(|s| s.qt_ms = 100.0).is_err_and(|e| e.contains("qt_ms")));
    assert!(bad(|s| s.seconds = f64::NAN).is_err_and(|e| e.contains("seconds")));
    // 150 bpm leaves no room for PR 160 + QT 380.
    assert!(bad(|s| s.heart_rate_bpm = 150.0).is_err_and(|e| e.contains("bpm")));
    assert!(bad(|s| s.ectopics = Ectopics::Chance(2.0)).is_err());
    // A week at 20 kHz on 12 leads would not fit in memory: refused before any allocation.
    assert!(bad(|s| (s.seconds, s.rate_hz) = (7.0 * 86_400.0, 20_000.0)).is_err_and(|e| e.contains("leads")));
}

#[test]
fn truth_json_has_the_documented_keys() {
    let s = make(&Scenario::Ectopics.spec());
    let v: serde_json::Value = serde_json::from_str(&s.truth.to_json().unwrap_or_default()).unwrap_or_default();
    for key in ["rr_ms", "pr_ms", "qrs_ms", "qt_ms", "parameters", "beats", "sample_rate_hz", "leads"] {
        assert!(v.get(key).is_some(), "missing {key}");
    }
    let beats = v["beats"].as_array().cloned().unwrap_or_default();
    for key in ["r_sample", "kind", "p_on", "p_end", "qrs_on", "qrs_end", "t_end"] {
        assert!(beats.iter().all(|b| b.get(key).is_some()), "beat key {key}");
    }
    let ectopic = beats.iter().find(|b| b["kind"] == "ectopic");
    assert!(ectopic.is_some_and(|b| b["p_on"].is_null()));
}

/// A full day at 250 Hz, 3 leads. Run with `cargo test --release -p isoline-tests -- synth:: --ignored`.
#[test]
#[ignore = "heavy: generates 24 h of signal"]
fn holter_day_fits_in_memory_and_reports_its_time() {
    let spec = Scenario::Holter.spec();
    let start = std::time::Instant::now();
    let s = make(&spec);
    let took = start.elapsed();
    let n = s.recording.len();
    assert_eq!(n, 86_400 * 250);
    assert_eq!(s.recording.leads.len(), 3);
    let bytes: usize = s.recording.leads.iter().map(|l| l.samples.capacity() * 4).sum();
    assert!(bytes <= n * 3 * 4 * 3 / 2, "{bytes} bytes");
    eprintln!("24-h holter: {} beats in {:.2} s", s.truth.beats.len(), took.as_secs_f64());
    assert!(s.truth.ectopic_beats > 100);
}

/// Waves of neighbouring beats never overlap: each beat's first onset comes after the previous T end.
fn assert_beats_apart(t: &synth::Truth) {
    for w in t.beats.windows(2) {
        let first = w[1].p_on.or(w[1].qrs_on).unwrap_or(0);
        assert!(first > w[0].t_end.unwrap_or(usize::MAX), "{:?} then {:?}", w[0], w[1]);
    }
}

#[test]
fn beats_never_overlap_in_any_scenario() {
    for scenario in Scenario::ALL {
        let mut spec = scenario.spec();
        spec.seconds = spec.seconds.min(120.0);
        assert_beats_apart(&make(&spec).truth);
    }
}

proptest::proptest! {
    #![proptest_config(proptest::prelude::ProptestConfig::with_cases(40))]
    /// Any parameters in range either give a clear timing error or a recording whose truth matches them.
    #[test]
    fn random_parameters_give_truth_that_matches_them(
        hr in 40.0f64..110.0,
        pr in 120.0f64..300.0,
        qrs in 60.0f64..160.0,
        qt_extra in 220.0f64..420.0,
        axis in -90.0f64..180.0,
        rate in proptest::sample::select(vec![250.0, 360.0, 500.0]),
        variation in 0.0f64..0.2,
        every in 0u32..7,
        seed in 0u64..1000,
    ) {
        let spec = SynthSpec {
            seconds: 12.0,
            rate_hz: rate,
            heart_rate_bpm: hr,
            pr_ms: pr,
            qrs_ms: qrs,
            qt_ms: qrs + qt_extra,
            axis_deg: axis,
            rr_variation: variation,
            ectopics: if every >= 2 { Ectopics::Every(every) } else { Ectopics::None },
            seed,
            ..SynthSpec::default()
        };
        match synth::generate(&spec) {
            Err(synth::SynthError::Timing(_)) => {}
            Err(e) => proptest::prop_assert!(false, "unexpected error {e}"),
            Ok(s) => {
                let t = &s.truth;
                assert_beats_apart(t);
                let one = 1000.0 / rate;
                for b in t.beats.iter().filter(|b| b.kind == TrueKind::Sinus) {
                    let (Some(p), Some(q), Some(j), Some(e)) = (b.p_on, b.qrs_on, b.qrs_end, b.t_end) else {
                        return Err(proptest::test_runner::TestCaseError::fail("sinus beat without boundaries"));
                    };
                    proptest::prop_assert!(((q - p) as f64 * one - pr).abs() <= one);
                    proptest::prop_assert!(((j - q) as f64 * one - qrs).abs() <= one);
                    proptest::prop_assert!(((e - q) as f64 * one - spec.qt_ms).abs() <= one);
                }
                proptest::prop_assert!(s.recording.leads.iter().all(|l| l.samples.iter().all(|v| v.is_finite())));
            }
        }
    }
}
