//! Wave boundaries against cardiologists' annotations. Run with `--nocapture` to see per-record figures.
//!
//! QT Database: cardiologist 1 (`.q1c`), compared also with cardiologist 2 (`.q2c`, sel100 and sel117) and
//! with the published automatic delineator whose output ships as `.pu`. Source: Laguna et al., Computers in
//! Cardiology 1997;24:673-6. LUDB global boundaries (earliest onset / latest end over 12 leads). Source:
//! Kalyakulina et al., IEEE Access 2020;8:186181-90.
//!
//! Goals (measurement-engine issue): |mean| ≤ 10 ms (T end ≤ 25 ms); SD ≤ 15 (P onset), 10 (QRS onset),
//! 12 (QRS end), 30 (T end) ms; boundaries found for ≥ 95 % of annotated beats.

use isoline_core::io::wfdb_annotations;
use isoline_tests::data;
use isoline_tests::ludb::LEADS;
use isoline_tests::score::{
    BeatMarks, BoundaryErrors, KEYS, beats_of, group_wave_annotations, read_reference_csv, score_boundaries,
};

const QTDB: [&str; 6] = ["sel100", "sel117", "sel16265", "sel803", "sele0104", "sel14046"];

/// Goal per key: (|mean| limit, SD limit), ms.
const GOALS: [(f64, f64); 4] = [(10.0, 15.0), (10.0, 10.0), (10.0, 12.0), (25.0, 30.0)];

fn per_record_line(name: &str, e: &BoundaryErrors) -> String {
    let parts: Vec<String> = (0..4)
        .map(|k| match e.mean_sd(k) {
            Some((m, s)) => format!("{} {m:+.1}±{s:.1} ({}/{})", KEYS[k], e.errors[k].len(), e.wanted[k]),
            None => format!("{} – ({}/{})", KEYS[k], e.errors[k].len(), e.wanted[k]),
        })
        .collect();
    format!("{name}: {}", parts.join("  "))
}

/// Checks pooled errors against per-key (|mean|, SD) bounds and the found fraction.
fn check(e: &BoundaryErrors, bounds: [(f64, f64); 4], min_found: f64) {
    for k in 0..4 {
        let Some((m, s)) = e.mean_sd(k) else { panic!("{}: no errors to score", KEYS[k]) };
        assert!(m.abs() <= bounds[k].0, "{} mean {m:+.1} ms exceeds ±{}", KEYS[k], bounds[k].0);
        assert!(s <= bounds[k].1, "{} SD {s:.1} ms exceeds {}", KEYS[k], bounds[k].1);
        assert!(e.found(k) >= min_found, "{} found for {:.1} % of annotated beats", KEYS[k], 100.0 * e.found(k));
    }
}

#[test]
fn qtdb_boundaries_against_cardiologist_1() -> Result<(), String> {
    let (mut ours, mut second, mut pu) =
        (BoundaryErrors::default(), BoundaryErrors::default(), BoundaryErrors::default());
    for rec in QTDB {
        let (recording, beats) = beats_of(&data(&format!("qtdb/{rec}.hea")))?;
        let fs = recording.sample_rate.hz();
        let q1c = read_reference_csv(&data(&format!("qtdb/{rec}.q1c.csv")))?;
        let det: Vec<BeatMarks> = beats.iter().map(BeatMarks::from).collect();
        let e = score_boundaries(&q1c, &det, fs);
        println!("{}", per_record_line(&format!("isoline  {rec}"), &e));
        ours.add(&e);
        // The published automatic delineator (an algorithm, not truth), scored the same way.
        let pu_anns = wfdb_annotations::read(&data(&format!("qtdb/{rec}.pu"))).map_err(|e| e.to_string())?;
        let e = score_boundaries(&q1c, &group_wave_annotations(&pu_anns, fs), fs);
        println!("{}", per_record_line(&format!(".pu      {rec}"), &e));
        pu.add(&e);
        // Cardiologist 2 where the database has a second reading.
        let q2c_path = data(&format!("qtdb/{rec}.q2c"));
        if q2c_path.exists() {
            let anns = wfdb_annotations::read(&q2c_path).map_err(|e| e.to_string())?;
            let e = score_boundaries(&q1c, &group_wave_annotations(&anns, fs), fs);
            println!("{}", per_record_line(&format!("q2c−q1c  {rec}"), &e));
            second.add(&e);
        }
    }
    println!("pooled isoline : {}", ours.summary());
    println!("pooled .pu     : {}", pu.summary());
    println!("pooled q2c−q1c : {}", second.summary());
    // Source: goals of the measurement-engine issue (all met on these records).
    check(&ours, GOALS, 0.95);
    // T end regression bound, just above today's figure (measured −1.0 ± 23.7 ms, 181/181 found).
    let (m, s) = ours.mean_sd(3).ok_or("no T end errors")?;
    assert!(m.abs() <= 1.5 && s <= 24.0, "QTDB T end {m:+.1} ± {s:.1} ms exceeds ±1.5 / 24.0");
    Ok(())
}

#[test]
fn ludb_global_boundaries() -> Result<(), String> {
    let mut pooled = BoundaryErrors::default();
    for n in 1..=50 {
        let global = data(&format!("ludb/{n}.global.csv"));
        if !global.exists() {
            continue;
        }
        let (recording, beats) = beats_of(&data(&format!("ludb/{n}.hea")))?;
        let reference = read_reference_csv(&global)?;
        let det: Vec<BeatMarks> = beats.iter().map(BeatMarks::from).collect();
        let e = score_boundaries(&reference, &det, recording.sample_rate.hz());
        println!("{}", per_record_line(&format!("ludb {n}"), &e));
        pooled.add(&e);
    }
    println!("pooled LUDB: {}", pooled.summary());
    // Source: goals of the measurement-engine issue. Not all are met yet on LUDB's global (12-lead extreme)
    // boundaries: P onset mean (by 0.2 ms) and SD. These bounds sit just above what the method achieves today
    // (measured: P on +10.2 ± 21.9, QRS on +8.4 ± 9.2, QRS end −9.0 ± 11.6, T end −4.5 ± 28.9 ms), so a
    // regression fails. The P onset lies 10 ms after LUDB's earliest-of-12 mark but on the second-earliest
    // lead's (+0.4 ± 10.1, `ludb_p_onset_against_the_second_earliest_lead`); aligning the beats' P waves before
    // their median (+9.3 → +10.3 here) brought the QT Database P onset from −2.3 ± 13.9 to −1.0 ± 13.2 and, with
    // muscle noise at 12 dB, from −12.1 ± 17.3 to −3.9 ± 13.2.
    check(&pooled, [(10.5, 22.2), (8.7, 10.0), (9.5, 11.9), (5.0, 29.5)], 0.95);
    Ok(())
}

#[test]
fn ludb_reference_p_onset_scatters_more_than_the_goal_allows() {
    // The LUDB global P onset is the earliest of 12 hand-marked leads. Its position relative to the same beat's
    // QRS onset (the PR interval, steady within a 10-s sinus record) scatters from beat to beat by more than the
    // goal's P onset SD of 15 ms: even a method that put every P onset at exactly the right mean PR of each
    // record would score this SD. Taking the second-earliest lead's mark instead (one early outlier lead left
    // out) removes most of the scatter. Source: LUDB per-lead annotations (Kalyakulina et al., IEEE Access 2020).
    let mut earliest = Vec::new();
    let mut second = Vec::new();
    for n in 1..=50 {
        let Ok(reference) = read_reference_csv(&data(&format!("ludb/{n}.global.csv"))) else { continue };
        let pr: Vec<f64> = reference.iter().filter_map(|b| Some(b.marks[1]? - b.marks[0]?)).collect();
        if pr.len() < 2 {
            continue;
        }
        let mean = pr.iter().sum::<f64>() / pr.len() as f64;
        earliest.extend(pr.iter().map(|p| (p - mean) * 2.0)); // 500 Hz: 2 ms per sample
        let per_lead = second_earliest_p_onsets(n, &reference);
        let pr2: Vec<f64> = per_lead.iter().filter_map(|&(p, q)| Some(q? - p?)).collect();
        if pr2.len() >= 2 {
            let m2 = pr2.iter().sum::<f64>() / pr2.len() as f64;
            second.extend(pr2.iter().map(|p| (p - m2) * 2.0));
        }
    }
    let sd = |v: &[f64]| (v.iter().map(|x| x * x).sum::<f64>() / (v.len() - 1) as f64).sqrt();
    let (s1, s2) = (sd(&earliest), sd(&second));
    println!(
        "LUDB reference PR scatter within records: earliest lead {s1:.1} ms (n {}), second-earliest lead {s2:.1} ms (n {})",
        earliest.len(),
        second.len()
    );
    assert!(s1 > 15.0 && s2 < s1, "earliest {s1:.1}, second {s2:.1}");
}

#[test]
fn ludb_p_onset_against_the_second_earliest_lead() -> Result<(), String> {
    // The same P onsets as in `ludb_global_boundaries`, scored against the second-earliest of the 12 per-lead
    // marks instead of the earliest (one outlying lead's mark left out; on LUDB 5 one beat's earliest mark is
    // V6's, 84–114 ms before the eleven other leads'). Against this reference the P onset goal holds (measured
    // +0.4 ± 10.1 ms, 307 beats); against the earliest mark it does not (+10.3 ± 22.0). Source: LUDB per-lead
    // annotations (Kalyakulina et al., IEEE Access 2020;8:186181-90); goal from the measurement-engine issue.
    let second = |n, r: &[BeatMarks]| second_earliest_p_onsets(n, r).into_iter().map(|(p, _)| p).collect();
    check_ludb_against(0, "P onset vs the second-earliest lead", second)
}

/// LUDB record `n`'s per-lead marks: for each of the 12 annotation files, the sample of every `first` label that
/// `second` follows (a P onset is a `(` before a `p`, a T end a `)` after a `t`), taking the first of the pair
/// when `take_first`.
fn per_lead_marks(n: usize, (first, second): (&str, &str), take_first: bool) -> Vec<Vec<f64>> {
    LEADS
        .iter()
        .filter_map(|l| wfdb_annotations::read(&data(&format!("ludb/{n}.{l}"))).ok())
        .map(|anns| {
            anns.windows(2)
                .filter(|w| w[0].label == first && w[1].label == second)
                .map(|w| if take_first { w[0].sample } else { w[1].sample } as f64)
                .collect()
        })
        .collect()
}

/// For each beat of `reference` (LUDB record `n`): the second-earliest P onset over the 12 per-lead annotation
/// files and the global QRS onset, samples.
fn second_earliest_p_onsets(n: usize, reference: &[BeatMarks]) -> Vec<(Option<f64>, Option<f64>)> {
    let onsets = per_lead_marks(n, ("(", "p"), true);
    reference
        .iter()
        .map(|b| {
            let Some(q) = b.marks[1] else { return (None, None) };
            // Each lead's P onset within 400 ms before this beat's QRS onset.
            let mut p: Vec<f64> =
                onsets.iter().filter_map(|o| o.iter().copied().rfind(|&x| x < q && q - x < 200.0)).collect();
            p.sort_by(f64::total_cmp);
            (p.get(1).copied(), Some(q))
        })
        .collect()
}

/// For each beat of `reference` (LUDB record `n`): the second-latest T end over the 12 per-lead annotation files,
/// samples (each lead's first T end after the beat's QRS onset and within 700 ms of it).
fn second_latest_t_ends(n: usize, reference: &[BeatMarks]) -> Vec<Option<f64>> {
    let ends = per_lead_marks(n, ("t", ")"), false);
    reference
        .iter()
        .map(|b| {
            let q = b.marks[1]?;
            let mut t: Vec<f64> =
                ends.iter().filter_map(|e| e.iter().copied().find(|&x| x > q && x - q < 350.0)).collect();
            t.sort_by(|a, b| b.total_cmp(a));
            t.get(1).copied()
        })
        .collect()
}

#[test]
fn ludb_t_end_against_the_second_latest_lead() -> Result<(), String> {
    // The same T ends as in `ludb_global_boundaries`, scored against the second-latest of the 12 per-lead marks
    // instead of the latest (one outlying lead's mark left out). On LUDB 29, lead II's T ends lie 55–80 ms after
    // the eleven other leads' in every beat but the first (the record's T end error −101 ± 48 ms against the
    // latest mark). Source: LUDB per-lead annotations (Kalyakulina et al., IEEE Access 2020;8:186181-90); goal
    // from the measurement-engine issue.
    check_ludb_against(3, "T end vs the second-latest lead", second_latest_t_ends)
}

/// Scores boundary `key` of LUDB 1–50 against `marks(n, reference)` (one per reference beat of record `n`) in
/// place of the global mark, where the experts gave one; prints each record's and the pooled figures, `what`
/// naming the reference, and checks the goal for that boundary.
fn check_ludb_against(
    key: usize,
    what: &str,
    marks: impl Fn(usize, &[BeatMarks]) -> Vec<Option<f64>>,
) -> Result<(), String> {
    let mut pooled = BoundaryErrors::default();
    for n in 1..=50 {
        let Ok(mut reference) = read_reference_csv(&data(&format!("ludb/{n}.global.csv"))) else { continue };
        let (recording, beats) = beats_of(&data(&format!("ludb/{n}.hea")))?;
        let other = marks(n, &reference);
        for (b, m) in reference.iter_mut().zip(other) {
            b.marks[key] = b.marks[key].and(m);
        }
        let det: Vec<BeatMarks> = beats.iter().map(BeatMarks::from).collect();
        let e = score_boundaries(&reference, &det, recording.sample_rate.hz());
        if let Some((m, s)) = e.mean_sd(key) {
            println!("ludb {n}: {what} {m:+.1} ± {s:.1} ms ({} beats)", e.errors[key].len());
        }
        pooled.add(&e);
    }
    let (m, s) = pooled.mean_sd(key).ok_or(format!("no {what} errors"))?;
    println!("LUDB {what}: {m:+.1} ± {s:.1} ms (n {})", pooled.errors[key].len());
    assert!(m.abs() <= GOALS[key].0 && s <= GOALS[key].1, "{what}: {m:+.1} ± {s:.1} ms");
    assert!(pooled.found(key) >= 0.95, "{what}: found for {:.1} %", 100.0 * pooled.found(key));
    Ok(())
}
