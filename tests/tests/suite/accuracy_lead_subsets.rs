//! Wave boundaries of the LUDB records read with two of their twelve leads (or one), against the experts' marks
//! on the same leads (earliest onset / latest end over them), the way a two-lead recording such as the QT
//! Database's is analysed and annotated; also at half the records' rate, 250 Hz, the QT Database's. Run with
//! `--nocapture` to see the figures. Source: LUDB per-lead annotations (Kalyakulina et al., IEEE Access
//! 2020;8:186181-90).
//!
//! LUDB's global boundaries take the extreme of twelve per-lead marks, and a single lead's early mark moves them
//! (`accuracy_boundaries`); over the two leads read, that reference follows the leads the analysis sees.
//!
//! Goal (measurement-engine issue, P onset): |mean| ≤ 10 ms and SD ≤ 15 ms.

use isoline_core::analysis::analyze;
use isoline_core::beat::{Beat, Boundaries};
use isoline_core::filter::{Biquad, FilterSettings, filtfilt};
use isoline_core::units::Hertz;
use isoline_tests::ludb::{self, LEADS, lead_waves};
use isoline_tests::score::mean_sd;

/// Two-lead subsets read: a limb lead with a chest lead, as in two-lead recordings (not I with II, from which the
/// workstation derives the other limb leads); with the share of the beats the experts give a P onset that must
/// get one.
// Measured today (shares found): 95.6, 95.3, 66.8, 93.4 and 84.4 %; the limits sit below them. In leads III and
// V2 (and I and V4) many records' P waves stay under 40 µV, the floor under which no P wave is reported
// (pwave::MIN_P_UV, which keeps fibrillatory waves from passing for P waves): there the workstation reports no
// PR rather than one read off a wave it cannot tell from fibrillation. Lowering the floor to 20 µV found 80 % on
// III+V2 but gave one of the three atrial fibrillation records a PR (measure_ludb) and moved the twelve-lead
// P onset from +10.2 ± 21.9 to +8.9 ± 23.4 ms.
const PAIRS: [([&str; 2], f64); 5] =
    [(["ii", "v5"], 0.9), (["ii", "v1"], 0.9), (["iii", "v2"], 0.6), (["avf", "v6"], 0.9), (["i", "v4"], 0.8)];
/// Boundaries scored, in the order of [`marks`].
const NAMES: [&str; 5] = ["p_on", "p_end", "qrs_on", "qrs_end", "t_end"];
/// Sampling rate of the LUDB records, Hz.
const FS: f64 = 500.0;
/// How far from a detected R peak an expert's QRS peak mark may lie to be the same beat, samples (80 ms).
const SAME_BEAT: usize = 40;

/// A wave marked in one lead: (onset, peak, end) samples.
type Wave = (usize, usize, usize);
/// Errors of each boundary in the order of [`marks`], ms.
type Errors = [Vec<f64>; 5];
/// Per record: its number and its P onset errors, ms.
type PerRecord = Vec<(usize, Vec<f64>)>;

/// The first wave of `waves` whose peak lies in `lo..hi`, or the last when `last`.
fn peak_in(waves: &[Wave], lo: usize, hi: usize, last: bool) -> Option<Wave> {
    let inside = |w: &&Wave| w.1 >= lo && w.1 < hi;
    if last { waves.iter().rev().find(inside).copied() } else { waves.iter().find(inside).copied() }
}

/// The experts' boundaries of the beat with R peak `r` over the leads `waves` holds (each lead's P, QRS and T
/// waves), between the beats before (`prev`) and after (`next`): the earliest onset and the latest end over the
/// leads, for P onset, P end, QRS onset, QRS end, T end. `None` for a boundary no lead marks.
fn marks(waves: &[[Vec<Wave>; 3]], (prev, r, next): (usize, usize, usize)) -> [Option<usize>; 5] {
    let p: Vec<Wave> = waves
        .iter()
        .filter_map(|w| peak_in(&w[0], prev.max(r.saturating_sub(200)), r.saturating_sub(10), true))
        .collect();
    let q: Vec<Wave> =
        waves.iter().filter_map(|w| peak_in(&w[1], r.saturating_sub(SAME_BEAT), r + SAME_BEAT, false)).collect();
    let t: Vec<Wave> = waves.iter().filter_map(|w| peak_in(&w[2], r + 20, next.min(r + 225), false)).collect();
    let first = |v: &[Wave]| v.iter().map(|w| w.0).min();
    let last = |v: &[Wave]| v.iter().map(|w| w.2).max();
    [first(&p), last(&p), first(&q), last(&q), last(&t)]
}

/// `x` (sampled at [`FS`]) at half its rate: low-passed at 100 Hz with the workstation's zero-phase filter, then
/// every second sample.
// Common practice, no source: a cutoff below the halved rate's Nyquist frequency (125 Hz) keeps what folds back
// small, and above the 40 Hz the boundary finders low-pass the leads to.
fn halved(x: &[f32]) -> Vec<f32> {
    let lp = [Biquad::lowpass(100.0, FS)];
    let x: Vec<f64> = x.iter().map(|&v| f64::from(v)).collect();
    filtfilt(&lp, &x, x.len().min(250)).iter().step_by(2).map(|&v| v as f32).collect()
}

/// Errors (ms, ours − experts') of each boundary over LUDB records 1–50 read with `leads` only (at half their
/// rate when `half`); per record the P onset errors; and how many beats the experts give a P onset.
fn errors(leads: &[&str], half: bool) -> (Errors, PerRecord, usize) {
    let mut all: Errors = Default::default();
    let mut p_on = Vec::new();
    let mut p_marked = 0;
    for n in 1..=50 {
        let Some(mut recording) = ludb::recording(n) else { continue };
        let mut kept = Vec::new();
        for l in leads {
            let k = LEADS.iter().position(|x| x == l).unwrap_or_else(|| panic!("no lead {l}"));
            kept.push(recording.leads[k].clone());
        }
        recording.leads = kept;
        let step = if half { 2 } else { 1 };
        if half {
            for lead in &mut recording.leads {
                lead.samples = halved(&lead.samples);
            }
            recording.sample_rate = Hertz::from_hz(FS / 2.0).unwrap_or_else(|e| panic!("{e}"));
        }
        let beats: Vec<Beat> =
            analyze(&recording, &FilterSettings::default()).beats.iter().map(|b| at_rate(b, step)).collect();
        let waves: Vec<[Vec<Wave>; 3]> =
            leads.iter().map(|l| [lead_waves(n, l, "p"), lead_waves(n, l, "N"), lead_waves(n, l, "t")]).collect();
        let mut record_p = Vec::new();
        for (i, b) in beats.iter().enumerate() {
            let prev = if i > 0 { beats[i - 1].r + SAME_BEAT } else { 0 };
            let next = beats.get(i + 1).map_or(usize::MAX, |x| x.r.saturating_sub(SAME_BEAT));
            let theirs = marks(&waves, (prev, b.r, next));
            p_marked += usize::from(theirs[0].is_some());
            for (k, (o, t)) in ours(b).into_iter().zip(theirs).enumerate() {
                if let (Some(o), Some(t)) = (o, t) {
                    let e = (o as f64 - t as f64) * 1000.0 / FS;
                    all[k].push(e);
                    if k == 0 {
                        record_p.push(e);
                    }
                }
            }
        }
        p_on.push((n, record_p));
    }
    (all, p_on, p_marked)
}

/// `b` with every sample index multiplied by `step` (from a halved rate back to the records' own).
fn at_rate(b: &Beat, step: usize) -> Beat {
    let d = &b.bounds;
    let s = |v: Option<usize>| v.map(|x| x * step);
    Beat {
        r: b.r * step,
        kind: b.kind,
        bounds: Boundaries {
            p_on: s(d.p_on),
            p_end: s(d.p_end),
            qrs_on: s(d.qrs_on),
            qrs_end: s(d.qrs_end),
            t_end: s(d.t_end),
        },
    }
}

/// Our boundaries of `b` in the order of [`marks`].
fn ours(b: &Beat) -> [Option<usize>; 5] {
    let d = &b.bounds;
    [d.p_on, d.p_end, d.qrs_on, d.qrs_end, d.t_end]
}

/// Prints the figures of `leads` (at half rate when `half`) and checks the P onset against the goal: |mean| ≤
/// 10 ms, SD ≤ 15 ms, found on at least `min_found` of the beats the experts give one.
fn check_p_onset(leads: &[&str], half: bool, min_found: f64) {
    let (all, records, marked) = errors(leads, half);
    let line: Vec<String> = NAMES
        .iter()
        .zip(&all)
        .map(|(name, e)| match mean_sd(e) {
            Some((m, s)) => format!("{name} {m:+.1}±{s:.1} n{}", e.len()),
            None => format!("{name} –"),
        })
        .collect();
    let found = all[0].len() as f64 / marked.max(1) as f64;
    println!(
        "{}{}: {}  (P onset on {} of {marked} beats the experts give one)",
        leads.join("+"),
        if half { " at 250 Hz" } else { "" },
        line.join("  "),
        all[0].len()
    );
    let scattered: Vec<String> = records
        .iter()
        .filter_map(|(n, e)| mean_sd(e).filter(|&(m, s)| m.abs() > 20.0 || s > 20.0).map(|(m, s)| (n, m, s)))
        .map(|(n, m, s)| format!("{n}: {m:+.0}±{s:.0}"))
        .collect();
    println!("  records with P onset beyond ±20 ms: {}", scattered.join(", "));
    let Some((m, s)) = mean_sd(&all[0]) else { panic!("{leads:?}: no P onset scored") };
    assert!(m.abs() <= 10.0 && s <= 15.0, "{leads:?}: P onset {m:+.1} ± {s:.1} ms");
    assert!(found >= min_found, "{leads:?}: P onset on {} of {marked} beats the experts give one", all[0].len());
}

#[test]
fn ludb_on_two_leads_p_onset_against_the_same_two_leads() {
    // Goal (issue 3, P onset): |mean| ≤ 10 ms, SD ≤ 15 ms, for each pair of leads. Before the P edge walk went
    // past a biphasic P wave's still top (pwave::INSIDE_SHARE), II+V1 read 17.5, III+V2 16.0 and I+V4 18.3 ms.
    for (pair, min_found) in PAIRS {
        check_p_onset(&pair, false, min_found);
    }
}

#[test]
fn ludb_on_lead_ii_at_250_hz_p_onset_against_lead_ii() {
    // The same goal with lead II alone at 250 Hz. Before the realigned median's P edges were set aside where its
    // P wave ran back to the start of the search region (and the first median's did not), LUDB 19's small P waves
    // had each P onset 258 ms before the experts' (−13.5 ± 38.8 ms pooled).
    check_p_onset(&["ii"], true, 0.9);
}
