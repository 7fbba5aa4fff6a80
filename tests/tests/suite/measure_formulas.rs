//! Measurement formulas against published worked examples and constructed beats with known answers.

use isoline_core::beat::{Beat, BeatKind, Boundaries};
use isoline_core::measure::{self, Template, hrv, qtc::qtc};
use isoline_core::paper::Paper;
use isoline_core::recording::{Lead, LeadName, Meta, Recording, StandardLead};
use isoline_core::units::{Hertz, bpm_from_rr_ms};

fn hz(f: f64) -> Hertz {
    Hertz::from_hz(f).unwrap_or_else(|_| unreachable!())
}

fn close(a: f64, b: f64, tol: f64) -> bool {
    (a - b).abs() <= tol
}

#[test]
fn qtc_worked_examples() {
    // Source: references.md §3 worked examples, computed from Bazett (Heart 1920;7:353-70), Fridericia (Acta Med
    // Scand 1920;53:469-86), Framingham (Sagie et al., Am J Cardiol 1992;70:797-801), Hodges (J Am Coll Cardiol
    // 1983;1:694) and Rautaharju, Mason, Akiyama (Int J Cardiol 2014;174:535-40).
    let rows = [
        (370.0, 710.0, [439.11, 414.75, 414.66, 412.89, 420.38]),
        (400.0, 800.0, [447.21, 430.89, 430.80, 426.25, 433.33]),
    ];
    for (qt, rr, want) in rows {
        let q = qtc(qt, rr);
        let got = [q.bazett, q.fridericia, q.framingham, q.hodges, q.rautaharju];
        for (g, w) in got.iter().zip(want) {
            assert!(close(*g, w, 0.006), "QT {qt} RR {rr}: got {got:?}, want {want:?}");
        }
    }
    // Source: references.md §3 — at RR = 1000 ms (HR 60) every formula gives QTc = QT.
    for qt in [350.0, 400.0, 480.0] {
        let q = qtc(qt, 1000.0);
        for v in [q.bazett, q.fridericia, q.framingham, q.hodges, q.rautaharju] {
            assert!(close(v, qt, 1e-9));
        }
    }
}

#[test]
fn sdnn_rmssd_worked_example() {
    // Source: Task Force of the ESC and NASPE, Circulation 1996;93:1043-65 (definitions); worked example
    // references.md §10: NN 800, 810, 790, 805 ms → RMSSD 15.55 ms, SDNN 8.54 ms (n − 1).
    let nn = [800.0, 810.0, 790.0, 805.0];
    let rmssd = hrv::rmssd(&nn).unwrap_or(f64::NAN);
    let sdnn = hrv::sdnn(&nn).unwrap_or(f64::NAN);
    assert!(close(rmssd, 15.55, 0.005), "{rmssd}");
    assert!(close(sdnn, 8.54, 0.005), "{sdnn}");
    // The same through beats at 1000 Hz.
    let mut r = 500;
    let mut beats = vec![Beat::at(r, BeatKind::Dominant)];
    for d in nn {
        r += d as usize;
        beats.push(Beat::at(r, BeatKind::Dominant));
    }
    let s = hrv::rr_stats(&beats, hz(1000.0), &[]);
    assert!(close(s.rmssd_ms.unwrap_or(f64::NAN), 15.55, 0.005));
    assert!(close(s.sdnn_ms.unwrap_or(f64::NAN), 8.54, 0.005));
    assert!(close(s.rr_ms.unwrap_or(f64::NAN), 801.25, 1e-9));
}

#[test]
fn rate_rules_300_and_1500() {
    // Source: references.md §10 (Kligfield et al., Circulation 2007;115:1306-24 grid): at 25 mm/s
    // HR = 300 / large squares = 1500 / small squares; 4 large squares → 75 bpm.
    let paper = Paper::STANDARD;
    let rate_of_mm = |mm: f64| bpm_from_rr_ms(paper.seconds_from_mm(mm) * 1000.0).unwrap_or(f64::NAN);
    assert!(close(rate_of_mm(4.0 * 5.0), 75.0, 1e-9));
    for large in 1..=8 {
        let n = f64::from(large);
        assert!(close(rate_of_mm(n * 5.0), 300.0 / n, 1e-9));
    }
    for small in 5..=40 {
        let n = f64::from(small);
        assert!(close(rate_of_mm(n), 1500.0 / n, 1e-9));
    }
}

/// Sampling rate of the constructed beats.
const FS: f64 = 500.0;

/// Boundaries of the constructed beat (samples at 500 Hz).
const BOUNDS: Boundaries =
    Boundaries { p_on: Some(60), p_end: Some(110), qrs_on: Some(140), qrs_end: Some(185), t_end: Some(350) };

/// A smooth bump that is zero outside `[start, end]`.
fn bump(k: usize, start: usize, end: usize) -> f64 {
    if k <= start || k >= end {
        return 0.0;
    }
    let x = (k - start) as f64 / (end - start) as f64;
    (std::f64::consts::PI * x).sin().powi(2)
}

/// A constructed beat: frontal vectors for P, QRS and T at the given angles; limb leads are their hexaxial
/// projections (augmented leads × √3/2, Goldberger 1942), with an isoelectric offset per lead. V2 carries an
/// ST shift of `st_uv` from the J point on.
fn constructed_beat(p_deg: f64, qrs_deg: f64, t_deg: f64, st_uv: f64) -> Vec<Lead> {
    let n = 420;
    let waves = [(p_deg, 150.0, 60, 110), (qrs_deg, 1200.0, 140, 185), (t_deg, 300.0, 200, 350)];
    let mut leads = Vec::new();
    for (idx, lead) in StandardLead::ALL.into_iter().enumerate() {
        let offset = 10.0 * idx as f64 - 40.0;
        let samples = (0..n)
            .map(|k| {
                let v = match lead.frontal_angle_deg() {
                    Some(alpha) => {
                        let gain = if matches!(lead, StandardLead::AVR | StandardLead::AVL | StandardLead::AVF) {
                            3.0_f64.sqrt() / 2.0
                        } else {
                            1.0
                        };
                        waves
                            .iter()
                            .map(|&(deg, amp, s, e)| gain * amp * bump(k, s, e) * (deg - alpha).to_radians().cos())
                            .sum::<f64>()
                    }
                    None => {
                        let st = if lead == StandardLead::V2 && k >= 185 { st_uv } else { 0.0 };
                        800.0 * bump(k, 140, 185) + st
                    }
                };
                (v + offset) as f32
            })
            .collect();
        leads.push(Lead { name: lead.into(), samples });
    }
    leads
}

fn recording_of(leads: Vec<Lead>, sex: Option<&str>) -> Recording {
    Recording {
        leads,
        sample_rate: hz(FS),
        start: None,
        meta: Meta { sex: sex.map(String::from), ..Meta::default() },
        annotations: Vec::new(),
    }
}

#[test]
fn axis_of_constructed_beats() {
    // Source: hexaxial reference system and Goldberger's relations (references.md §5); the constructed leads
    // are projections of a known frontal vector, so the measured axis must return that vector's angle.
    for qrs_deg in [0.0, 60.0, -30.0, 120.0] {
        let leads = constructed_beat(50.0, qrs_deg, 40.0, 0.0);
        let template: Vec<Vec<f32>> = leads.iter().map(|l| l.samples.clone()).collect();
        let rec = recording_of(leads, None);
        let t = Template { leads: &template, sample_rate: hz(FS), bounds: BOUNDS, baseline_step_uv: None };
        for basis in [measure::AxisBasis::NetArea, measure::AxisBasis::NetAmplitude] {
            let m = measure::measure_with(&rec, &[], Some(&t), basis);
            let got = m.axes.qrs_deg.unwrap_or(f64::NAN);
            assert!(close(got, qrs_deg, 0.5), "QRS {qrs_deg}° ({basis:?}): got {got}");
            assert!(close(m.axes.p_deg.unwrap_or(f64::NAN), 50.0, 0.5), "{:?}", m.axes);
            assert!(close(m.axes.t_deg.unwrap_or(f64::NAN), 40.0, 0.5), "{:?}", m.axes);
        }
    }
}

#[test]
fn axis_with_only_i_and_ii() {
    // Source: references.md §5 — with I and II only, aVF = II − I/2 (Goldberger) still fixes the axis.
    let mut leads = constructed_beat(50.0, -30.0, 40.0, 0.0);
    leads.retain(|l| matches!(l.name, LeadName::Standard(StandardLead::I | StandardLead::II)));
    let template: Vec<Vec<f32>> = leads.iter().map(|l| l.samples.clone()).collect();
    let rec = recording_of(leads, None);
    let t = Template { leads: &template, sample_rate: hz(FS), bounds: BOUNDS, baseline_step_uv: None };
    let got = measure::measure(&rec, &[], Some(&t)).axes.qrs_deg.unwrap_or(f64::NAN);
    assert!(close(got, -30.0, 0.5), "{got}");
}

#[test]
fn full_measurement_of_a_constructed_recording() {
    // Constructed input with known answers: intervals from BOUNDS at 500 Hz, NN 800 ms, ST +150 µV in V2.
    let leads = constructed_beat(50.0, 60.0, 40.0, 150.0);
    let template: Vec<Vec<f32>> = leads.iter().map(|l| l.samples.clone()).collect();
    let rec = recording_of(leads, Some("F"));
    let beats: Vec<Beat> = (0..12).map(|k| Beat::at(250 + k * 400, BeatKind::Dominant)).collect();
    let t = Template { leads: &template, sample_rate: hz(FS), bounds: BOUNDS, baseline_step_uv: None };
    let m = measure::measure(&rec, &beats, Some(&t));
    assert_eq!(m.beats, 12);
    assert_eq!(m.dominant_beats, 12);
    assert_eq!(m.rr.rr_ms, Some(800.0));
    assert_eq!(m.rr.heart_rate_bpm, Some(75.0));
    assert_eq!(m.rr.rhythm.regular, Some(true));
    assert_eq!(m.intervals.p_duration_ms, Some(100.0));
    assert_eq!(m.intervals.pr_ms, Some(160.0));
    assert_eq!(m.intervals.qrs_ms, Some(90.0));
    assert_eq!(m.intervals.qt_ms, Some(420.0));
    // Source: Bazett 1920 — 420 / √0.8 = 469.6 ms: at or above 460 ms for women (Rautaharju et al. 2009,
    // from memory).
    let q = m.qtc.map_or(f64::NAN, |q| q.bazett);
    assert!(close(q, 469.57, 0.01), "{q}");
    let notes = m.notes();
    assert!(notes.iter().any(|n| n.key == "qtc_bazett_ms" && n.text.contains("460 ms for women")), "{notes:?}");
    assert!(!notes.iter().any(|n| n.key == "pr_ms" || n.key == "qrs_ms"), "{notes:?}");
    let v2 = LeadName::Standard(StandardLead::V2);
    let st = m.st_j60(&v2).unwrap_or(f64::NAN);
    assert!(close(st, 150.0, 1e-3), "{st}");
    let st_i = m.st_j60(&LeadName::Standard(StandardLead::I)).unwrap_or(f64::NAN);
    // Lead I at J+60 ms (sample 215) is inside the T wave: a real, non-zero value, positive for T at 40°.
    assert!(st_i > 0.0, "{st_i}");
    // Every value of the uniform list is present with its key.
    let values = m.values();
    assert!(values.iter().any(|v| v.key == "axis_qrs_deg" && v.value.is_some_and(|a| close(a, 60.0, 0.5))));
    assert_eq!(values.iter().filter(|v| v.key == "st_j60_uv").count(), 12);
}

#[test]
fn nothing_measurable_gives_none() {
    let rec = recording_of(Vec::new(), None);
    let m = measure::measure(&rec, &[], None);
    assert_eq!(m.rr.rr_ms, None);
    assert_eq!(m.intervals, measure::Intervals::default());
    assert_eq!(m.qtc, None);
    // The one note says why every value is absent.
    let notes = m.notes();
    assert_eq!(notes.len(), 1, "{notes:?}");
    assert_eq!(notes[0].source, measure::ranges::SOURCE_NO_BEATS);
    assert!(m.values().iter().all(|v| v.value.is_none()));
}
