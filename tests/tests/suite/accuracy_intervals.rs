//! The intervals Isoline reports (PR, QRS, QT of the representative beat) against the experts' intervals of the
//! same record (the median over the annotated beats of the per-beat intervals). Run with `--nocapture` to see
//! per-record figures.
//!
//! Reference sets: LUDB records 1–50 (global boundaries = earliest onset / latest end over 12 hand-marked
//! leads; source: Kalyakulina et al., IEEE Access 2020;8:186181-90) and the QT Database records (cardiologist 1,
//! `.q1c`; source: Laguna et al., Computers in Cardiology 1997;24:673-6).
//!
//! Design target: global intervals within the IEC 60601-2-25 tolerances for mean difference / SD against the
//! reference — PR ±10 / 10 ms, QRS ±10 / 10 ms, QT ±25 / 30 ms (references.md §6, from memory). Not met today on
//! LUDB (see the bounds below); the test keeps the figures from getting worse and prints where they stand.

use isoline_core::analysis::analyze;
use isoline_core::filter::FilterSettings;
use isoline_core::io;
use isoline_core::measure::ranges;
use isoline_tests::data;
use isoline_tests::score::{BeatMarks, mean_sd, median, read_reference_csv};

/// Interval names, in the order of the arrays below.
const NAMES: [&str; 3] = ["PR", "QRS", "QT"];
/// IEC 60601-2-25 tolerances (|mean|, SD), ms. From memory (references.md §6).
const IEC: [(f64, f64); 3] = [(10.0, 10.0), (10.0, 10.0), (25.0, 30.0)];

/// Median of the experts' per-beat PR, QRS and QT of a record, ms (marks: P on, QRS on, QRS end, T end).
fn expert_intervals(reference: &[BeatMarks], fs: f64) -> [Option<f64>; 3] {
    let span = |a: usize, b: usize| {
        median(reference.iter().filter_map(|x| Some((x.marks[b]? - x.marks[a]?) * 1000.0 / fs)).collect())
    };
    [span(0, 1), span(1, 2), span(1, 3)]
}

/// Differences (Isoline − expert, ms) of one record, printed on one line. Returns the keys of the intervals the
/// measurement notes as disagreeing with the single beats' median (`ranges::beats_disagree`).
fn compare(name: &str, reference_csv: &str, record: &str, errors: &mut [Vec<f64>; 3]) -> Vec<String> {
    let opened = io::open(&data(record), &io::OpenOptions::default()).unwrap_or_else(|e| panic!("{record}: {e}"));
    let fs = opened.recording.sample_rate.hz();
    let reference = read_reference_csv(&data(reference_csv)).unwrap_or_else(|e| panic!("{e}"));
    let want = expert_intervals(&reference, fs);
    let a = analyze(&opened.recording, &FilterSettings::default());
    let i = &a.measurements.intervals;
    let got = [i.pr_ms, i.qrs_ms, i.qt_ms];
    let mut line = format!("{name:>9}:");
    for k in 0..3 {
        let cell = match (got[k], want[k]) {
            (Some(g), Some(w)) => {
                errors[k].push(g - w);
                format!("{} {g:.0} vs {w:.0} ({:+.0})", NAMES[k], g - w)
            }
            (g, w) => format!("{} {} vs {}", NAMES[k], fmt(g), fmt(w)),
        };
        line.push_str(&format!("   {cell:<22}"));
    }
    let flagged: Vec<String> =
        a.measurements.notes().into_iter().filter(|n| n.source == ranges::SOURCE_CONSISTENCY).map(|n| n.key).collect();
    // No shared record's baseline moves too fast to take off (measured: at most 28 µV from beat to beat).
    let step = a.measurements.baseline_step_uv;
    assert!(step.is_some_and(|s| s < ranges::UNSTEADY_BASELINE_UV / 2.0), "{name}: baseline step {step:?} µV");
    if !flagged.is_empty() {
        line.push_str(&format!("   noted: {}", flagged.join(", ")));
    }
    println!("{line}");
    flagged
}

fn fmt(v: Option<f64>) -> String {
    v.map_or_else(|| "—".to_string(), |x| format!("{x:.0}"))
}

/// Prints the pooled figures against the IEC tolerances and checks them against `bounds` (|mean|, SD).
fn check(set: &str, errors: &[Vec<f64>; 3], bounds: [(f64, f64); 3]) {
    for k in 0..3 {
        let Some((m, s)) = mean_sd(&errors[k]) else { panic!("{set} {}: nothing to compare", NAMES[k]) };
        let iec = if m.abs() <= IEC[k].0 && s <= IEC[k].1 { "within" } else { "outside" };
        println!(
            "{set} {}: n {} mean {m:+.1} sd {s:.1} ms ({iec} IEC ±{} / {})",
            NAMES[k],
            errors[k].len(),
            IEC[k].0,
            IEC[k].1
        );
        assert!(m.abs() <= bounds[k].0 && s <= bounds[k].1, "{set} {}: {m:+.1} ± {s:.1} ms", NAMES[k]);
    }
}

#[test]
fn reported_intervals_against_ludb_experts() {
    let mut errors: [Vec<f64>; 3] = Default::default();
    for n in 1..=50 {
        let csv = format!("ludb/{n}.global.csv");
        if data(&csv).exists() {
            let noted = compare(&format!("ludb {n}"), &csv, &format!("ludb/{n}.hea"), &mut errors);
            // Measured today: no LUDB record's representative beat and single beats part by the note's limits.
            assert!(noted.is_empty(), "ludb {n}: {noted:?}");
        }
    }
    // Measured today: PR +2.3 ± 12.7, QRS −17.7 ± 12.6, QT −10.6 ± 23.3 ms. The reported QRS is shorter than the
    // earliest-to-latest span over 12 hand-marked leads (per beat: onset +8, end −9 ms, see accuracy_boundaries).
    check("LUDB", &errors, [(5.0, 14.0), (19.5, 14.0), (15.0, 24.0)]);
}

#[test]
fn reported_intervals_against_qtdb_cardiologist_1() {
    let mut errors: [Vec<f64>; 3] = Default::default();
    for r in ["sel100", "sel117", "sel16265", "sel803", "sele0104", "sel14046"] {
        let noted = compare(r, &format!("qtdb/{r}.q1c.csv"), &format!("qtdb/{r}.hea"), &mut errors);
        // The record whose reported QT is furthest from the cardiologist's (sele0104, −86 ms) is the one the
        // measurement tells the reader to check: its representative beat (352 ms) and its single beats' median
        // (404 ms) disagree. No other record is noted.
        let want: &[&str] = if r == "sele0104" { &["qt_ms"] } else { &[] };
        assert_eq!(noted, want, "{r}");
    }
    // Measured today: PR −1.3 ± 7.0, QRS +6.3 ± 6.7, QT −9.0 ± 39.0 ms (sele0104: QT 352 vs 438 ms, the low T
    // waves on a wandering baseline, see accuracy_boundaries). The QRS mean rose from +5.0 (± 9.4) when the
    // representative beat's baseline was levelled (`delineate::baseline`): sel16265 88 → 96 ms for 100, the one
    // record measured short, so the records' errors no longer cancel.
    check("QTDB", &errors, [(2.5, 9.0), (7.0, 10.5), (12.5, 40.0)]);
}
