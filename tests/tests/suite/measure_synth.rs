//! Synthetic truth: on every demo scenario the measured RR, PR, QRS and QT match the truth the generator
//! reports. Source of the model: McSharry, Clifford, Tarassenko & Smith, IEEE Trans Biomed Eng 2003;50:289-94
//! (as implemented by `isoline_core::synth`, which reports every beat's true boundaries). The generator's
//! events have compact support, so every true boundary is the definite instant a wave leaves or regains the
//! baseline, whatever delineation method is used (see `isoline_core::synth::shape`).

use isoline_core::analysis::{analyze, analyze_in_windows};
use isoline_core::beat::BeatKind;
use isoline_core::filter::FilterSettings;
use isoline_core::measure;
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
    // the recording joins the representative beat, also the first and last, which have no room to be lined up.
    let rep = a.representative.as_ref().map_or(0, |r| r.n_beats);
    let (n, fs) = (s.recording.len(), spec.rate_hz);
    let rr = s.truth.rr_ms.unwrap_or(f64::NAN) * fs / 1000.0;
    let (before, after) = ((0.45 * fs).min(0.6 * rr) as usize, (0.70 * fs).min(rr) as usize);
    let fits = a.beats.iter().filter(|b| b.kind == BeatKind::Dominant && b.r >= before && b.r + after <= n).count();
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

#[test]
fn a_missing_lead_leaves_the_others_measured() {
    // A lead the file marks invalid throughout (lead I), or over a 4-s gap (each lead in turn), must neither move
    // the beats nor take the representative beat away from the other leads. Before: with lead I missing the
    // axis and every lead's ST level were absent; with the gap in the lead R peaks are placed on, the beats inside
    // it landed 120 ms late.
    let s = synth::generate(&SynthSpec { seconds: 30.0, ..Scenario::Normal.spec() }).unwrap_or_else(|e| panic!("{e}"));
    // Each case also window by window (10-s windows), as long recordings are analysed: their representative beat
    // is gathered window by window (`BeatStack`), some windows with the lead, some without.
    let settings = FilterSettings::default();
    let both = |r: &isoline_core::Recording| [analyze(r, &settings), analyze_in_windows(r, &settings, 10.0)];
    let clean = both(&s.recording);
    let fs = s.recording.sample_rate.hz();
    let mut cases = Vec::new();
    let mut no_i = s.recording.clone();
    let i = s.recording.lead_index(&isoline_core::recording::LeadName::parse("I"));
    no_i.leads[i.unwrap_or_else(|| panic!("no lead I"))].samples.fill(f32::NAN);
    cases.push(("lead I missing".to_string(), no_i, 11));
    // Lead I flat at -5 mV (its electrode off): left out as if missing. Before, it pulled the axis to 62° for 50°.
    let mut flat_i = s.recording.clone();
    flat_i.leads[i.unwrap_or_else(|| panic!("no lead I"))].samples.fill(-5000.0);
    assert!(flat_i.flat_lead_notes()[0].starts_with("lead I is flat"), "{:?}", flat_i.flat_lead_notes());
    cases.push(("lead I flat".to_string(), flat_i, 11));
    // Lead I with a single valid sample (too few for its median): as if missing. Lead I with every other sample
    // missing: each sample of its median still has half the beats.
    let mut one_i = s.recording.clone();
    let lead_i = i.unwrap_or_else(|| panic!("no lead I"));
    for (k, v) in one_i.leads[lead_i].samples.iter_mut().enumerate() {
        if k != 4000 {
            *v = f32::NAN;
        }
    }
    cases.push(("lead I with one valid sample".to_string(), one_i, 11));
    let mut alternate_i = s.recording.clone();
    alternate_i.leads[lead_i].samples.iter_mut().step_by(2).for_each(|v| *v = f32::NAN);
    cases.push(("every other sample of lead I missing".to_string(), alternate_i, 12));
    for (k, lead) in s.recording.leads.iter().enumerate() {
        let mut gap = s.recording.clone();
        gap.leads[k].samples[(5.0 * fs) as usize..(9.0 * fs) as usize].fill(f32::NAN);
        cases.push((format!("gap in lead {}", lead.name), gap, 12));
    }
    for (name, rec, leads_with_st) in cases {
        for (a, clean, how) in both(&rec).iter().zip(&clean).zip(["whole", "in windows"]).map(|((a, c), h)| (a, c, h)) {
            let name = format!("{name} ({how})");
            let (m, c) = (&a.measurements, &clean.measurements);
            assert_eq!(a.beats.len(), clean.beats.len(), "{name}: beats");
            for (b, cb) in a.beats.iter().zip(&clean.beats) {
                assert!(b.r.abs_diff(cb.r) <= 1, "{name}: R at {} instead of {}", b.r, cb.r);
            }
            let axis = m.axes.qrs_deg.unwrap_or_else(|| panic!("{name}: no QRS axis"));
            assert!((axis - s.truth.qrs_axis_deg).abs() <= 5.0, "{name}: axis {axis} vs {}", s.truth.qrs_axis_deg);
            // Within one sample (2 ms) of the complete recording's: measured today, equal but for QRS 94 for 92
            // with every other sample of lead I missing.
            for (what, got, whole) in
                [("QRS", m.intervals.qrs_ms, c.intervals.qrs_ms), ("QT", m.intervals.qt_ms, c.intervals.qt_ms)]
            {
                let near = matches!((got, whole), (Some(g), Some(w)) if (g - w).abs() <= 2.0);
                assert!(near, "{name}: {what} {got:?}, complete recording {whole:?}");
            }
            let with_st = m.st.iter().filter(|l| l.j_uv.is_some()).count();
            assert_eq!(with_st, leads_with_st, "{name}: leads with an ST level");
        }
    }
}

#[test]
fn time_nothing_was_recorded_is_not_an_rr_interval() {
    // Every lead blank from 10 to 13 s (a lead-off stretch marked invalid), and a one-lead demo blank for 2 s in
    // every 6: the intervals across the gaps are not RR intervals. Before, the 3-s gap read HR 64 and SDNN 599 ms
    // for 72 and 1, and the one-lead demo HR 47, "irregular" and a short QTc.
    let s = synth::generate(&SynthSpec { seconds: 30.0, ..Scenario::Normal.spec() }).unwrap_or_else(|e| panic!("{e}"));
    let fs = s.recording.sample_rate.hz();
    let mut gap = s.recording.clone();
    for lead in &mut gap.leads {
        lead.samples[(10.0 * fs) as usize..(13.0 * fs) as usize].fill(f32::NAN);
    }
    let one = synth::generate(&SynthSpec { seconds: 30.0, leads: synth::LeadSet::Single, ..Scenario::Normal.spec() })
        .unwrap_or_else(|e| panic!("{e}"));
    let mut gaps = one.recording.clone();
    for (k, v) in gaps.leads[0].samples.iter_mut().enumerate() {
        if (k as f64 / fs) % 6.0 >= 4.0 {
            *v = f32::NAN;
        }
    }
    for (name, rec, whole) in
        [("12 leads, 3-s gap", gap, &s.recording), ("1 lead, 2 s in 6 blank", gaps, &one.recording)]
    {
        let (m, c) = (
            analyze(&rec, &FilterSettings::default()).measurements,
            analyze(whole, &FilterSettings::default()).measurements,
        );
        let (hr, hr_whole) = (m.rr.heart_rate_bpm.unwrap_or(f64::NAN), c.rr.heart_rate_bpm.unwrap_or(f64::NAN));
        println!("{name}: HR {hr:.1} (complete {hr_whole:.1}), SDNN {:?}, {}", m.rr.sdnn_ms, m.rr.rhythm.describe());
        assert!((hr - hr_whole).abs() <= 1.0, "{name}: HR {hr} for {hr_whole}");
        assert!(m.rr.sdnn_ms.is_some_and(|sd| sd <= 2.0), "{name}: SDNN {:?}", m.rr.sdnn_ms);
        assert_eq!(m.rr.rhythm.regular, Some(true), "{name}");
    }
}

#[test]
fn no_boundary_is_placed_across_a_gap() {
    // A one-lead demo (RR 833 ms) blank for 0.4 s in every 2.3 s, so that gaps cut P waves, QRS complexes and T
    // waves in turn. Before, boundaries were sought over the interpolated gaps: on this demo a T end 42 ms and a
    // J point 34 ms off, a QRS onset 24 ms early; on LUDB 1's lead II blank 0.5 s in every 2 s, QT 445 ms for
    // 496. The intervals across gaps also made the next beats premature (typed other), and `beats` printed them
    // as RR intervals. Now each boundary of the gapped recording is the complete recording's or absent, and every
    // beat keeps its kind: within 2 samples, the P wave's within 4, since it is placed by the record's P model,
    // made here from the fewer beats with no gap in the half second before their QRS (measured: P end 8 ms on).
    let spec = SynthSpec { seconds: 30.0, leads: synth::LeadSet::Single, ..Scenario::Normal.spec() };
    let one = synth::generate(&spec).unwrap_or_else(|e| panic!("{e}"));
    let fs = one.recording.sample_rate.hz();
    let mut cut = one.recording.clone();
    for (k, v) in cut.leads[0].samples.iter_mut().enumerate() {
        if (k as f64 / fs) % 2.3 >= 1.9 {
            *v = f32::NAN;
        }
    }
    let (a, whole) = (analyze(&cut, &FilterSettings::default()), analyze(&one.recording, &FilterSettings::default()));
    let mut kept = [0usize; 5];
    for b in &a.beats {
        let w = whole.beats.iter().find(|w| w.r.abs_diff(b.r) <= 2).unwrap_or_else(|| panic!("beat at {}", b.r));
        assert_eq!(b.kind, w.kind, "beat at {}", b.r);
        let (g, c) = (&b.bounds, &w.bounds);
        for (i, (name, got, want, tolerance)) in [
            ("P onset", g.p_on, c.p_on, 4),
            ("P end", g.p_end, c.p_end, 4),
            ("QRS onset", g.qrs_on, c.qrs_on, 2),
            ("J point", g.qrs_end, c.qrs_end, 2),
            ("T end", g.t_end, c.t_end, 2),
        ]
        .into_iter()
        .enumerate()
        {
            if let Some(got) = got {
                kept[i] += 1;
                let near = want.is_some_and(|want| want.abs_diff(got) <= tolerance);
                assert!(near, "beat at {}: {name} {got} where the complete recording has {want:?}", b.r);
            }
        }
    }
    println!("{} beats in the gapped demo; boundaries kept (P on, P end, QRS on, J, T end): {kept:?}", a.beats.len());
    // Beats clear of the gaps keep their boundaries.
    assert!(kept.iter().all(|&k| k >= 5), "{kept:?}");
    let rr = isoline_core::detect::rr_ms(&a.beats, cut.sample_rate, &cut.gaps());
    // No RR spans a gap, and every RR whose beats lie clear of the gaps is given: 200 ms from them, beyond the R
    // peak search's reach (an R peak is sought within 100 ms of a QRS middle found within 100 ms of it).
    let reach = (0.200 * fs) as usize;
    for (w, rr) in a.beats.windows(2).zip(&rr[1..]) {
        let across = cut.gaps().iter().any(|g| g.start < w[1].r && g.end > w[0].r);
        let clear = cut.gaps().iter().all(|g| g.start >= w[1].r + reach || g.end + reach <= w[0].r);
        assert!(!(across && rr.is_some()), "RR from {} to {} across a gap: {rr:?}", w[0].r, w[1].r);
        assert!(!(clear && rr.is_none()), "no RR from {} to {}, clear of the gaps", w[0].r, w[1].r);
    }
}

#[test]
fn single_lost_samples_are_bridged() {
    // A one-lead demo losing one sample in about every thousand, as wireless recorders drop them. Such a loss
    // cannot hide a beat and moves a boundary by at most a sample, so it is not a gap: every beat, boundary and
    // RR interval is the complete recording's (within 1 sample). A first version of the gap rule counted each
    // lost sample as a gap: 28 RR intervals and 39 T ends of 72 beats were left.
    let spec = SynthSpec { seconds: 60.0, leads: synth::LeadSet::Single, ..Scenario::Normal.spec() };
    let one = synth::generate(&spec).unwrap_or_else(|e| panic!("{e}"));
    let mut lossy = one.recording.clone();
    for k in (0..lossy.len()).step_by(997) {
        lossy.leads[0].samples[k] = f32::NAN;
    }
    assert!(lossy.gaps().is_empty());
    let (a, whole) = (analyze(&lossy, &FilterSettings::default()), analyze(&one.recording, &FilterSettings::default()));
    assert_eq!(a.beats.len(), whole.beats.len());
    for (b, w) in a.beats.iter().zip(&whole.beats) {
        assert!(b.r.abs_diff(w.r) <= 1 && b.kind == w.kind, "beat at {} vs {}", b.r, w.r);
        let (g, c) = (&b.bounds, &w.bounds);
        for (name, got, want) in [
            ("P onset", g.p_on, c.p_on),
            ("P end", g.p_end, c.p_end),
            ("QRS onset", g.qrs_on, c.qrs_on),
            ("J point", g.qrs_end, c.qrs_end),
            ("T end", g.t_end, c.t_end),
        ] {
            let same = match (got, want) {
                (Some(g), Some(w)) => g.abs_diff(w) <= 1,
                (g, w) => g == w,
            };
            assert!(same, "beat at {}: {name} {got:?} where the complete recording has {want:?}", b.r);
        }
    }
    let (m, c) = (&a.measurements, &whole.measurements);
    assert_eq!(m.rr.nn_count, c.rr.nn_count);
    assert_eq!(m.intervals.qt_ms, c.intervals.qt_ms);
    // Twelve leads losing the same sample every half second: before, no beat joined the representative beat (one
    // lead had to be valid throughout), so the axes and ST levels were gone.
    let twelve = synth::generate(&Scenario::Normal.spec()).unwrap_or_else(|e| panic!("{e}"));
    let mut lossy = twelve.recording.clone();
    let half_s = (0.5 * twelve.recording.sample_rate.hz()) as usize;
    for lead in &mut lossy.leads {
        for k in (0..lead.samples.len()).step_by(half_s) {
            lead.samples[k] = f32::NAN;
        }
    }
    let (a, whole) =
        (analyze(&lossy, &FilterSettings::default()), analyze(&twelve.recording, &FilterSettings::default()));
    let (got, want) = (a.measurements.axes.qrs_deg, whole.measurements.axes.qrs_deg);
    assert!(got.zip(want).is_some_and(|(g, w)| (g - w).abs() <= 1.0), "QRS axis {got:?} for {want:?}");
    assert_eq!(a.measurements.st.iter().filter(|s| s.j_uv.is_some()).count(), 12);
}

#[test]
fn beats_are_found_on_the_leads_left() {
    // Eleven leads of a 12-lead demo missing for 2 s while V6 records on (electrodes off, one left). Before, the
    // detector averaged the missing leads in as silence, found too little energy on V6 alone and lost the beats
    // there (0.5 s missing: one beat lost, an RR of 1666 ms; LUDB 1 with 5 s: HR 45 read 19.5, SDNN 3020 ms).
    let s = synth::generate(&SynthSpec { seconds: 20.0, ..Scenario::Normal.spec() }).unwrap_or_else(|e| panic!("{e}"));
    let fs = s.recording.sample_rate.hz();
    let v6 = s.recording.lead_index(&isoline_core::recording::LeadName::parse("V6")).unwrap_or_else(|| panic!("V6"));
    let mut left = s.recording.clone();
    for (_, lead) in left.leads.iter_mut().enumerate().filter(|(k, _)| *k != v6) {
        lead.samples[(6.0 * fs) as usize..(8.0 * fs) as usize].fill(f32::NAN);
    }
    let (a, whole) = (analyze(&left, &FilterSettings::default()), analyze(&s.recording, &FilterSettings::default()));
    assert_eq!(a.beats.len(), whole.beats.len());
    for (b, w) in a.beats.iter().zip(&whole.beats) {
        assert!(b.r.abs_diff(w.r) <= 2 && b.kind == w.kind, "beat at {} ({:?}) vs {} ({:?})", b.r, b.kind, w.r, w.kind);
    }
    let (m, c) = (&a.measurements.rr, &whole.measurements.rr);
    assert_eq!(m.nn_count, c.nn_count);
    assert!(
        m.sdnn_ms.zip(c.sdnn_ms).is_some_and(|(x, y)| (x - y).abs() <= 2.0),
        "SDNN {:?} vs {:?}",
        m.sdnn_ms,
        c.sdnn_ms
    );
}

/// LUDB record 24 (10 s, 12 leads, 500 Hz; a wide QRS, RR ≈ 1.2 s) as opened, and its analysis.
fn ludb_24() -> (isoline_core::io::Opened, isoline_core::analysis::Analysis) {
    let opened = isoline_core::io::open(&isoline_tests::data("ludb/24.hea"), &isoline_core::io::OpenOptions::default())
        .unwrap_or_else(|e| panic!("{e}"));
    let whole = analyze(&opened.recording, &FilterSettings::default());
    (opened, whole)
}

#[test]
fn a_lost_sample_near_an_r_peak_keeps_the_beat_on_its_lead() {
    // LUDB 24 (a wide QRS) with one sample lost in each of V5, II and I, 6-120 ms from the R peak of the beat at
    // 6.05 s. Before, that beat moved to the next clearest lead whole there, whose largest deflection is another
    // wave: R 66 ms later, RR 1172 -> 1238 and 1154 -> 1088 ms, RMSSD 37 -> 84 ms. Now the beats and the rate
    // variability are the complete recording's. Source of the record: LUDB (Kalyakulina et al. 2020, PhysioNet).
    let (opened, whole) = ludb_24();
    let mut lossy = opened.recording.clone();
    for (name, k) in [("V5", 3033), ("II", 3067), ("I", 3090)] {
        let i = lossy.lead_index(&isoline_core::recording::LeadName::parse(name)).unwrap_or_else(|| panic!("{name}"));
        lossy.leads[i].samples[k] = f32::NAN;
    }
    let a = analyze(&lossy, &FilterSettings::default());
    assert_eq!(a.beats.len(), whole.beats.len());
    for (b, w) in a.beats.iter().zip(&whole.beats) {
        assert!(b.r.abs_diff(w.r) <= 1, "R at {} instead of {}", b.r, w.r);
    }
    let (x, y) = (a.measurements.rr.rmssd_ms, whole.measurements.rr.rmssd_ms);
    assert!(x.zip(y).is_some_and(|(x, y)| (x - y).abs() <= 1.0), "RMSSD {x:?} vs {y:?}");
}

/// `recording` (LUDB 24) with its six limb leads missing from 2.5 to 7.5 s: limb electrodes off, chest ones on.
fn limb_leads_off(recording: &isoline_core::Recording) -> isoline_core::Recording {
    let fs = recording.sample_rate.hz();
    let mut off = recording.clone();
    for name in ["I", "II", "III", "aVR", "aVL", "aVF"] {
        let i = off.lead_index(&isoline_core::recording::LeadName::parse(name)).unwrap_or_else(|| panic!("{name}"));
        off.leads[i].samples[(2.5 * fs) as usize..(7.5 * fs) as usize].fill(f32::NAN);
    }
    off
}

#[test]
fn r_peaks_keep_the_clearest_leads_time_where_it_is_missing() {
    // LUDB 24 (a wide QRS) with its limb leads off from 2.5 to 7.5 s: the beats there are placed on a chest lead,
    // whose largest deflection lies a few samples before the clearest limb lead's. Before, those R peaks were 2–8
    // samples early and the RRs into and out of the stretch read the difference (RMSSD 42 ms for 37). Now a beat
    // placed on another lead is moved by that lead's usual offset: within 5 samples (measured 0–5), RMSSD within 2
    // ms. Source of the record: LUDB (Kalyakulina et al. 2020, PhysioNet).
    let (opened, whole) = ludb_24();
    let a = analyze(&limb_leads_off(&opened.recording), &FilterSettings::default());
    assert_eq!(a.beats.len(), whole.beats.len());
    for (b, w) in a.beats.iter().zip(&whole.beats) {
        assert!(b.r.abs_diff(w.r) <= 5, "R at {} instead of {}", b.r, w.r);
    }
    let (x, y) = (a.measurements.rr.rmssd_ms, whole.measurements.rr.rmssd_ms);
    println!("RMSSD {x:?} ms, complete recording {y:?} ms");
    assert!(x.zip(y).is_some_and(|(x, y)| (x - y).abs() <= 2.0), "RMSSD {x:?} vs {y:?}");
}

/// `recording` with every lead missing 12 ms in every 200 ms, each at times of its own (lead i from i/n of the
/// period on), so that no instant misses every lead: as a recorder losing short packets channel by channel.
fn staggered_losses(recording: &isoline_core::Recording) -> isoline_core::Recording {
    let fs = recording.sample_rate.hz();
    let mut staggered = recording.clone();
    let (period, run) = ((0.200 * fs) as usize, (0.012 * fs) as usize);
    let n_leads = staggered.leads.len();
    for (i, lead) in staggered.leads.iter_mut().enumerate() {
        let n = lead.samples.len();
        for start in (i * period / n_leads..n).step_by(period) {
            lead.samples[start..(start + run).min(n)].fill(f32::NAN);
        }
    }
    assert!(staggered.gaps().is_empty());
    staggered
}

#[test]
fn r_peaks_stay_put_when_each_lead_loses_short_runs() {
    // LUDB 1 and 24 with every lead missing 12 ms in every 200 ms at times of its own: every R search window
    // holds a loss in every lead. Before, each beat then fell back to the clearest lead's valid samples, and an R
    // peak lost there moved the beat (LUDB 1: 3 samples; over 21 such files with random phases, 118 of 225 RRs
    // were more than 4 ms off, the worst 70 ms). Now a lead places the beat when its peak lies clear of its losses:
    // every R peak within 1 sample of the complete recording's. Source of the records: LUDB (Kalyakulina et al.
    // 2020, PhysioNet).
    for record in ["ludb/1.hea", "ludb/24.hea"] {
        let opened = isoline_core::io::open(&isoline_tests::data(record), &isoline_core::io::OpenOptions::default())
            .unwrap_or_else(|e| panic!("{e}"));
        let whole = analyze(&opened.recording, &FilterSettings::default());
        let a = analyze(&staggered_losses(&opened.recording), &FilterSettings::default());
        assert_eq!(a.beats.len(), whole.beats.len(), "{record}");
        for (b, w) in a.beats.iter().zip(&whole.beats) {
            assert!(b.r.abs_diff(w.r) <= 1 && b.kind == w.kind, "{record}: R at {} instead of {}", b.r, w.r);
        }
    }
}

#[test]
fn p_waves_are_found_on_the_leads_left() {
    // LUDB 24 with its six limb leads missing from 2.5 to 7.5 s (limb electrodes off, chest ones on). Before, the
    // P model's median PR window held the limb leads' interpolated straight stretch in half the beats, the beats
    // no longer resembled it, and every P wave was lost (no PR). Now a lead missing in a beat is left out of that
    // beat: each beat keeps its P wave within 4 samples of the complete recording's (measured: 3), and the PR
    // within 4 ms. Source of the record: LUDB (Kalyakulina et al. 2020, PhysioNet).
    let (opened, whole) = ludb_24();
    let a = analyze(&limb_leads_off(&opened.recording), &FilterSettings::default());
    let with_p = whole.beats.iter().filter(|w| w.bounds.p_on.is_some()).count();
    assert!(with_p >= 7, "{with_p} beats with a P wave in the complete recording");
    let same_p_waves = |a: &isoline_core::analysis::Analysis, case: &str| {
        for w in whole.beats.iter().filter(|w| w.bounds.p_on.is_some()) {
            let b = a.beats.iter().find(|b| b.r.abs_diff(w.r) <= 10).unwrap_or_else(|| panic!("beat at {}", w.r));
            let (p, c) = (&b.bounds, &w.bounds);
            for (name, got, want) in [("P onset", p.p_on, c.p_on), ("P end", p.p_end, c.p_end)] {
                let near = got.zip(want).is_some_and(|(g, w)| g.abs_diff(w) <= 4);
                assert!(near, "{case}, beat at {}: {name} {got:?} where the complete recording has {want:?}", w.r);
            }
        }
    };
    same_p_waves(&a, "limb leads off");
    // Every lead missing 12 ms in every 200 ms, each at times of its own (never a gap): every lead is missing in
    // every beat's PR window, so the leads are compared as bridged, as before the leads missing in a beat were
    // left out (a first version left every lead out of every beat, and no P wave was found).
    let staggered = staggered_losses(&opened.recording);
    same_p_waves(&analyze(&staggered, &FilterSettings::default()), "staggered losses");
    let (pr, want) = (a.measurements.intervals.pr_ms, whole.measurements.intervals.pr_ms);
    println!("PR {pr:?} ms, complete recording {want:?} ms");
    assert!(pr.zip(want).is_some_and(|(p, w)| (p - w).abs() <= 4.0), "PR {pr:?} for {want:?}");
    // The limb leads are in only two beats whose span fits the recording, too few for their median over the
    // whole QRS: the axis is not given, rather than read from the part of the QRS before R (before: 41° for 27°).
    let (axis, want) = (a.measurements.axes.qrs_deg, whole.measurements.axes.qrs_deg);
    println!("QRS axis {axis:?} degrees, complete recording {want:?}");
    assert!(axis.is_none_or(|d| want.is_some_and(|w| (d - w).abs() <= 5.0)), "QRS axis {axis:?} for {want:?}");
}

#[test]
fn a_beat_lost_in_a_gap_leaves_no_false_beat_or_rr() {
    // LUDB 24 (RR ≈ 1.2 s) with every lead lost over one beat, at several places around its R peak (8.434 s).
    // Before: lost 8.30–8.70 s, the resumed leads' step was taken for a beat on the lost beat's T wave, and the
    // next beat was typed other by its 786 ms RR; lost 8.40–8.48 s, the beat was placed on the first sample after
    // the loss and the next RR read 1160 ms for 1208; lost 8.48–8.56 s, its R peak was placed 70 ms early and its
    // RR read 1154 ms for 1224, and the beat was typed other. Now every beat found is one of the complete
    // recording's, of the same kind, and every RR given joins two beats that follow each other there, within 2
    // samples of its RR. Source of the record: LUDB (Kalyakulina et al. 2020, PhysioNet).
    let (opened, whole) = ludb_24();
    let fs = opened.recording.sample_rate.hz();
    let rs: Vec<usize> = whole.beats.iter().map(|b| b.r).collect();
    for (from, to) in [(8.30, 8.70), (8.36, 8.60), (8.40, 8.48), (8.44, 8.52), (8.48, 8.56), (8.20, 8.50)] {
        let mut cut = opened.recording.clone();
        for lead in &mut cut.leads {
            lead.samples[(from * fs) as usize..(to * fs) as usize].fill(f32::NAN);
        }
        let a = analyze(&cut, &FilterSettings::default());
        let rr = isoline_core::detect::rr_ms(&a.beats, cut.sample_rate, &cut.gaps());
        // The complete recording's beat each beat found is (within 150 ms), by index.
        let index: Vec<usize> = a
            .beats
            .iter()
            .map(|b| {
                let near = rs.iter().position(|&r| r.abs_diff(b.r) as f64 <= 0.150 * fs);
                near.unwrap_or_else(|| panic!("lost {from}–{to} s: a beat at {} that the recording has not", b.r))
            })
            .collect();
        for (b, &i) in a.beats.iter().zip(&index) {
            assert_eq!(b.kind, whole.beats[i].kind, "lost {from}–{to} s: beat at {}", b.r);
        }
        for (i, rr) in rr.iter().enumerate() {
            let Some(rr) = rr else { continue };
            let (j, k) = (index[i - 1], index[i]);
            let want = (rs[k] - rs[j]) as f64 * 1000.0 / fs;
            assert!(k == j + 1, "lost {from}–{to} s: an RR of {rr} ms across the lost beat");
            assert!((rr - want).abs() <= 2000.0 / fs, "lost {from}–{to} s: RR {rr} ms for {want}");
        }
    }
}
