//! RR statistics: mean RR and heart rate, SDNN and RMSSD over normal-to-normal intervals, rhythm regularity.
//!
//! Source: Task Force of the ESC and NASPE, Heart rate variability: standards of measurement, physiological
//! interpretation and clinical use, Circulation 1996;93:1043-65 — SDNN is the standard deviation of the NN
//! intervals; RMSSD the square root of the mean of the squared differences of successive NN intervals.
//! Here an NN interval is the interval between two consecutive beats that are both typed dominant, with no gap in
//! the recording between them (a stretch where no lead has a valid sample, [`crate::Recording::gaps`]): across a
//! gap the beats in between were not recorded, so the time from one beat to the next is not an RR interval.

use std::ops::Range;

use crate::beat::{Beat, BeatKind};
use crate::gaps;
use crate::units::{Hertz, bpm_from_rr_ms};

use super::stats::{mean, median, sample_sd};

/// Beat-to-beat variation (RMSSD over the mean, of the intervals the regularity is judged on) at or above which
/// the rhythm is called irregular (10 %). Judged beat to beat, not by the overall spread: over hours the rate
/// rises and falls with activity and sleep while each interval still follows the last closely.
// Source: Dash et al., Ann Biomed Eng 2009;37:1701-9 (from memory): normalised RMSSD about 0.1 separates the
// RR series of atrial fibrillation from sinus rhythm. A screening threshold, not a diagnostic criterion.
// Measured: demo scenarios 0.0–0.3 % (irregular one 21 %); LUDB sinus records ≤ 4 %, atrial fibrillation
// 20–23 %; QT Database and MIT-BIH 100 2–5 %; the 24-h demo Holter 5.7 % (its overall CV 11 %).
pub const IRREGULAR_SUCCESSIVE: f64 = 0.10;

/// Fewest RR intervals for a regularity call.
pub const MIN_RR_FOR_REGULARITY: usize = 4;

/// RR-interval statistics.
#[derive(Debug, Clone, Copy, Default, PartialEq, serde::Serialize, serde::Deserialize)]
pub struct RrStats {
    /// Number of NN intervals (dominant to dominant).
    pub nn_count: usize,
    /// Mean NN interval, ms.
    pub rr_ms: Option<f64>,
    /// 60 000 / mean NN, beats per minute.
    pub heart_rate_bpm: Option<f64>,
    /// SDNN, ms (n − 1 denominator).
    pub sdnn_ms: Option<f64>,
    /// RMSSD, ms (successive differences only between adjacent NN intervals).
    pub rmssd_ms: Option<f64>,
    /// Regularity of the underlying rhythm (NN intervals), with the count of other beats.
    pub rhythm: Rhythm,
}

/// Regularity of the underlying rhythm: of the NN intervals (between consecutive dominant beats), so that a
/// premature beat and the pause after it do not make a steady rhythm irregular; when other beats leave too few
/// NN intervals side by side (bigeminy, trigeminy), of the NN intervals each compared with the next one; of all
/// RR intervals when too few NN intervals are left for a call (few or no dominant beats). Differences are never
/// taken across a gap of the recording. A measurement, not a diagnosis.
#[derive(Debug, Clone, Copy, Default, PartialEq, serde::Serialize, serde::Deserialize)]
pub struct Rhythm {
    /// Number of intervals the regularity is judged on.
    pub rr_count: usize,
    /// Coefficient of variation of those intervals (SD / mean, a fraction: 0.05 = 5 %).
    pub rr_cv: Option<f64>,
    /// Their beat-to-beat variation: RMSSD (differences only between adjacent intervals) over their mean, a
    /// fraction; the regularity is judged on it (see [`IRREGULAR_SUCCESSIVE`]).
    #[serde(default)]
    pub successive: Option<f64>,
    /// `Some(true)` regular, `Some(false)` irregular, `None` with too few intervals.
    pub regular: Option<bool>,
    /// Beats typed other (premature, wide or unlike the dominant beats), left out of the regularity.
    #[serde(default)]
    pub other_beats: usize,
    /// The longest RR interval between any two beats (not across a gap of the recording), ms: a pause shows here
    /// whatever the beats around it are.
    #[serde(default)]
    pub longest_rr_ms: Option<f64>,
}

impl Rhythm {
    /// `regular`, `irregular` or `not called (too few beats)`, followed by the number of other beats when there are any
    /// ("regular, 2 other beats").
    #[must_use]
    pub fn describe(&self) -> String {
        let call = match self.regular {
            Some(true) => "regular",
            Some(false) => "irregular",
            None => "not called (too few beats)",
        };
        match self.other_beats {
            0 => call.to_string(),
            1 => format!("{call}, 1 other beat"),
            n => format!("{call}, {n} other beats"),
        }
    }
}

/// True when a beat-to-beat variation (a fraction) calls the rhythm irregular: at or above
/// [`IRREGULAR_SUCCESSIVE`], judged as printed, in whole percent, so the call and the figure shown beside it
/// never disagree (9.6 % prints as 10 % and is irregular).
#[must_use]
pub fn is_irregular(variation: f64) -> bool {
    (variation * 100.0).round() / 100.0 >= IRREGULAR_SUCCESSIVE
}

/// Runs of consecutive NN intervals (ms): a run breaks where a non-dominant beat interrupts or a gap of the
/// recording (`gaps`, sorted) lies between two beats or near either ([`gaps::breaks_rr`]).
#[must_use]
pub fn nn_runs(beats: &[Beat], fs: Hertz, gaps: &[Range<usize>]) -> Vec<Vec<f64>> {
    as_ms(nn_pairs(beats, fs, gaps), fs)
}

/// The NN intervals of [`nn_runs`] as the R peaks (samples at `fs`) that bound them, first and second, in the
/// same runs; none where a gap lies between two beats or cuts into either's QRS ([`gaps::breaks_rr`]).
#[must_use]
pub fn nn_pairs(beats: &[Beat], fs: Hertz, gaps: &[Range<usize>]) -> Vec<Vec<(usize, usize)>> {
    pairs(beats, fs, gaps, Kept::Nn)
}

/// Heart-rate trend points `(time of the second beat in s, 60000 / RR ms)` for consecutive dominant beats, in
/// runs: a run breaks where another beat interrupts the dominant beats, or at a gap of the recording (`gaps`,
/// see [`crate::Recording::gaps`]; also within 200 ms of either beat, [`gaps::breaks_rr`]),
/// so the trend is not drawn across a premature beat and its pause, or across time nothing was recorded, as if a
/// rate had been measured there.
///
/// Source: references.md §10 (HR = 60 / RR in s).
#[must_use]
pub fn rate_trend(beats: &[Beat], fs: Hertz, gaps: &[Range<usize>]) -> Vec<Vec<[f64; 2]>> {
    let rate_hz = fs.hz();
    nn_pairs(beats, fs, gaps)
        .into_iter()
        .map(|run| {
            run.into_iter().map(|(a, b)| [b as f64 / rate_hz, 60_000.0 / ((b - a) as f64 * 1000.0 / rate_hz)]).collect()
        })
        .collect()
}

/// Median RR of consecutive dominant beats (the NN intervals of [`nn_pairs`], none across or next to `gaps`),
/// ms.
#[must_use]
pub fn median_rr_ms(beats: &[Beat], fs: Hertz, gaps: &[Range<usize>]) -> Option<f64> {
    let rr: Vec<f64> =
        nn_pairs(beats, fs, gaps).into_iter().flatten().map(|(a, b)| fs.ms_from_samples((b - a) as f64)).collect();
    median(&rr)
}

/// Which intervals [`pairs`] keeps, and where a run of them breaks besides at gaps of the recording.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
enum Kept {
    /// NN intervals; a beat of another kind breaks the run.
    Nn,
    /// NN intervals; a run goes on across beats of another kind (each NN interval followed by the next one).
    NnAcrossOther,
    /// Every RR interval.
    Rr,
}

/// Runs of the intervals `kept` as the R peaks that bound them; every run breaks where a gap lies between two
/// beats or cuts into either's QRS ([`gaps::breaks_rr`]).
fn pairs(beats: &[Beat], fs: Hertz, gaps: &[Range<usize>], kept: Kept) -> Vec<Vec<(usize, usize)>> {
    let mut runs: Vec<Vec<(usize, usize)>> = Vec::new();
    let mut current = Vec::new();
    for w in beats.windows(2) {
        let (a, b) = (&w[0], &w[1]);
        let gap = b.r <= a.r || gaps::breaks_rr(gaps, a.r, b.r, fs.hz());
        let nn = a.kind == BeatKind::Dominant && b.kind == BeatKind::Dominant;
        if !gap && (nn || kept == Kept::Rr) {
            current.push((a.r, b.r));
        } else if (gap || kept == Kept::Nn) && !current.is_empty() {
            runs.push(std::mem::take(&mut current));
        }
    }
    if !current.is_empty() {
        runs.push(current);
    }
    runs
}

/// Runs of (first, second) R peaks as the intervals between them, ms.
fn as_ms(runs: Vec<Vec<(usize, usize)>>, fs: Hertz) -> Vec<Vec<f64>> {
    runs.into_iter().map(|run| run.into_iter().map(|(a, b)| fs.ms_from_samples((b - a) as f64)).collect()).collect()
}

/// SDNN of NN intervals (ms); `None` for fewer than two.
#[must_use]
pub fn sdnn(nn_ms: &[f64]) -> Option<f64> {
    sample_sd(nn_ms)
}

/// RMSSD of one run of adjacent NN intervals (ms); `None` for fewer than two intervals.
#[must_use]
pub fn rmssd(nn_ms: &[f64]) -> Option<f64> {
    rmssd_runs(&[nn_ms.to_vec()])
}

/// RMSSD pooled over several runs: differences are taken only inside each run.
#[must_use]
pub fn rmssd_runs(runs: &[Vec<f64>]) -> Option<f64> {
    let sq: Vec<f64> = runs.iter().flat_map(|r| r.windows(2).map(|w| (w[1] - w[0]).powi(2))).collect();
    mean(&sq).map(f64::sqrt)
}

/// Regularity of the underlying rhythm (see [`Rhythm`]), leaving out intervals across or next to `gaps` (sorted;
/// see [`gaps::breaks_rr`]).
#[must_use]
pub fn rhythm(beats: &[Beat], fs: Hertz, gaps: &[Range<usize>]) -> Rhythm {
    let other_beats = beats.iter().filter(|b| b.kind != BeatKind::Dominant).count();
    // Enough to judge on: as many successive differences as MIN_RR_FOR_REGULARITY intervals in one run give.
    let enough =
        |runs: &[Vec<f64>]| runs.iter().map(|r| r.len().saturating_sub(1)).sum::<usize>() + 1 >= MIN_RR_FOR_REGULARITY;
    let nn = nn_runs(beats, fs, gaps);
    let runs = if enough(&nn) {
        nn
    } else {
        // Other beats so frequent that dominant beats seldom follow each other (trigeminy, bigeminy): each NN
        // interval still shows the underlying rhythm, and one compared with the next NN interval (across the
        // other beat between them) shows its regularity; with fewer NN intervals still, all RR intervals.
        let joined = as_ms(pairs(beats, fs, gaps, Kept::NnAcrossOther), fs);
        if enough(&joined) { joined } else { as_ms(pairs(beats, fs, gaps, Kept::Rr), fs) }
    };
    let rr: Vec<f64> = runs.iter().flatten().copied().collect();
    let m = mean(&rr).filter(|&m| m > 0.0);
    let rr_cv = m.zip(sample_sd(&rr)).map(|(m, sd)| sd / m);
    let successive = m.zip(rmssd_runs(&runs)).map(|(m, d)| d / m);
    let regular = successive.filter(|_| enough(&runs)).map(|v| !is_irregular(v));
    let longest_rr_ms = as_ms(pairs(beats, fs, gaps, Kept::Rr), fs).into_iter().flatten().reduce(f64::max);
    Rhythm { rr_count: rr.len(), rr_cv, successive, regular, other_beats, longest_rr_ms }
}

/// All RR statistics of a beat list at rate `fs`, leaving out intervals across or next to `gaps` (sorted; see
/// [`gaps::breaks_rr`]).
#[must_use]
pub fn rr_stats(beats: &[Beat], fs: Hertz, gaps: &[Range<usize>]) -> RrStats {
    let runs = nn_runs(beats, fs, gaps);
    let nn: Vec<f64> = runs.iter().flatten().copied().collect();
    let rr_ms = mean(&nn);
    RrStats {
        nn_count: nn.len(),
        rr_ms,
        heart_rate_bpm: rr_ms.and_then(bpm_from_rr_ms),
        sdnn_ms: sdnn(&nn),
        rmssd_ms: rmssd_runs(&runs),
        rhythm: rhythm(beats, fs, gaps),
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    fn fs() -> Hertz {
        Hertz::from_hz(1000.0).unwrap_or_else(|_| unreachable!())
    }

    fn beats(rs: &[(usize, BeatKind)]) -> Vec<Beat> {
        rs.iter().map(|&(r, k)| Beat::at(r, k)).collect()
    }

    #[test]
    #[allow(clippy::single_range_in_vec_init)] // one gap: a list of one range, as `Recording::gaps` gives
    fn an_interval_across_a_gap_is_not_an_rr_interval() {
        // Beats every 800 ms; nothing recorded from 2700 to 4000 (the beats at 3.2 s were lost): the 2400-ms
        // interval from 2.4 s to 4.8 s is left out, and the runs on either side stay apart for RMSSD.
        let rs = [0usize, 800, 1600, 2400, 4800, 5600, 6400, 7200];
        let b: Vec<Beat> = rs.iter().map(|&r| Beat::at(r, BeatKind::Dominant)).collect();
        let gaps = [2700..4000];
        assert_eq!(nn_runs(&b, fs(), &gaps), vec![vec![800.0; 3], vec![800.0; 3]]);
        let s = rr_stats(&b, fs(), &gaps);
        assert_eq!((s.nn_count, s.rr_ms, s.sdnn_ms), (6, Some(800.0), Some(0.0)));
        assert_eq!(s.rhythm.regular, Some(true));
        assert_eq!(s.rhythm.longest_rr_ms, Some(800.0), "no pause across a gap");
        // Without the gap the long interval counts: a slower rate, an irregular rhythm and a 2.4-s pause.
        let s = rr_stats(&b, fs(), &[]);
        assert_eq!(s.nn_count, 7);
        assert_eq!(s.rhythm.regular, Some(false));
        assert_eq!(s.rhythm.longest_rr_ms, Some(2400.0));
        assert!(super::super::ranges::pause(2400.0).is_some_and(|n| n.text.contains("2.4 s")));
    }

    #[test]
    fn runs_break_at_other_beats() {
        use BeatKind::{Dominant as D, Other as O};
        let b = beats(&[(0, D), (800, D), (1600, D), (2100, O), (3000, D), (3800, D)]);
        assert_eq!(nn_runs(&b, fs(), &[]), vec![vec![800.0, 800.0], vec![800.0]]);
        let s = rr_stats(&b, fs(), &[]);
        assert_eq!(s.nn_count, 3);
        assert_eq!(s.rr_ms, Some(800.0));
        assert_eq!(s.heart_rate_bpm, Some(75.0));
        assert_eq!(s.rmssd_ms, Some(0.0));
        // Three NN intervals are too few for a call: all five RR intervals are judged.
        assert_eq!(s.rhythm.rr_count, 5);
        assert_eq!(s.rhythm.regular, Some(false));
        assert_eq!(s.rhythm.other_beats, 1);
        assert_eq!(s.rhythm.describe(), "irregular, 1 other beat");
    }

    #[test]
    fn other_beats_do_not_make_a_steady_rhythm_irregular() {
        use BeatKind::{Dominant as D, Other as O};
        // 800 ms sinus rhythm, a premature beat at 500 ms with a compensatory pause, twice.
        let mut b = Vec::new();
        let mut t = 0;
        for k in 0..14 {
            b.push((t, D));
            t += 800;
            if k == 4 || k == 9 {
                b.push((t - 300, O));
            }
        }
        let r = rhythm(&beats(&b), fs(), &[]);
        assert_eq!((r.regular, r.other_beats, r.rr_count), (Some(true), 2, 11));
        assert_eq!(r.describe(), "regular, 2 other beats");
        // With no dominant beat, all RR intervals are judged.
        let all_other: Vec<Beat> = beats(&b).into_iter().map(|x| Beat::at(x.r, O)).collect();
        assert_eq!(rhythm(&all_other, fs(), &[]).regular, Some(false));
    }

    #[test]
    fn trigeminy_is_judged_on_the_dominant_beats() {
        use BeatKind::{Dominant as D, Other as O};
        // Sinus rhythm at 800 ms with every third beat premature (500 ms) and a compensatory pause, 30 times:
        // no two NN intervals side by side, but each NN interval is 800 ms, so the underlying rhythm is regular.
        let mut b = Vec::new();
        for k in 0..30 {
            let t = k * 2400;
            b.extend([(t, D), (t + 800, D), (t + 1300, O)]);
        }
        let r = rhythm(&beats(&b), fs(), &[]);
        assert_eq!((r.regular, r.other_beats, r.rr_count), (Some(true), 30, 30), "{r:?}");
        assert_eq!(r.describe(), "regular, 30 other beats");
        // Bigeminy leaves no NN interval at all: all RR intervals are judged, short and long alternating.
        let b: Vec<(usize, BeatKind)> = (0..20).flat_map(|k| [(k * 1600, D), (k * 1600 + 600, O)]).collect();
        assert_eq!(rhythm(&beats(&b), fs(), &[]).regular, Some(false));
    }

    #[test]
    #[allow(clippy::single_range_in_vec_init)] // one gap: a list of one range, as `Recording::gaps` gives
    fn the_fallback_to_all_intervals_takes_no_difference_across_a_gap() {
        use BeatKind::{Dominant as D, Other as O};
        // Too few NN intervals, so all RR intervals are judged: 800, 800 before the gap and 600 four times after
        // it. Taken as one run they would read 13 % beat to beat (irregular); in two runs they differ by nothing.
        let b = beats(&[(0, D), (800, D), (1600, D), (4000, D), (4600, O), (5200, D), (5800, O), (6400, D)]);
        let r = rhythm(&b, fs(), &[2000..3000]);
        assert_eq!((r.rr_count, r.successive), (6, Some(0.0)), "{r:?}");
        assert_eq!(r.regular, Some(true));
    }

    #[test]
    fn the_call_and_the_printed_variation_agree() {
        // 9.6 % prints as 10 %: irregular, and the note says so; 9.4 % prints as 9 %: regular, no note.
        assert!(is_irregular(0.096));
        assert!(super::super::ranges::rr_irregular(0.096).is_some());
        assert!(!is_irregular(0.094));
        assert!(super::super::ranges::rr_irregular(0.094).is_none());
    }

    #[test]
    fn a_slow_change_of_rate_is_not_irregular() {
        // RR lengthening steadily from 600 to 1200 ms over 40 beats (overall CV ≈ 20 %), each interval 15 ms
        // longer than the last.
        let mut t = 0;
        let b: Vec<Beat> = (0..41)
            .map(|k| {
                let beat = Beat::at(t, BeatKind::Dominant);
                t += 600 + 15 * k;
                beat
            })
            .collect();
        let r = rhythm(&b, fs(), &[]);
        assert!(r.rr_cv.is_some_and(|cv| cv > 0.15), "{r:?}");
        assert!(r.successive.is_some_and(|v| v < 0.02), "{r:?}");
        assert_eq!(r.regular, Some(true));
    }

    #[test]
    fn irregular_dominant_beats_stay_irregular() {
        // RR alternating 600 and 1000 ms, every beat dominant (as in atrial fibrillation with narrow QRS).
        let b: Vec<Beat> = (0..12).map(|k| Beat::at(k * 800 + (k % 2) * 200, BeatKind::Dominant)).collect();
        let r = rhythm(&b, fs(), &[]);
        assert_eq!((r.regular, r.other_beats), (Some(false), 0));
        assert_eq!(r.describe(), "irregular");
    }

    #[test]
    fn steady_rhythm_is_regular_and_few_beats_undecided() {
        let b: Vec<Beat> = (0..10).map(|k| Beat::at(k * 1000 + (k % 2) * 20, BeatKind::Dominant)).collect();
        assert_eq!(rhythm(&b, fs(), &[]).regular, Some(true));
        assert_eq!(rhythm(&b[..3], fs(), &[]).regular, None);
        assert_eq!(rr_stats(&b[..1], fs(), &[]).rr_ms, None);
    }

    fn hz500() -> Hertz {
        Hertz::from_hz(500.0).unwrap_or_else(|_| unreachable!())
    }

    #[test]
    fn rate_trend_uses_dominant_pairs() {
        let beats =
            [Beat::at(0, BeatKind::Dominant), Beat::at(400, BeatKind::Dominant), Beat::at(600, BeatKind::Other)];
        let t = rate_trend(&beats, hz500(), &[]);
        // 400 samples at 500 Hz = 800 ms -> 75 bpm (references.md §10).
        assert_eq!(t.len(), 1);
        assert_eq!(t[0].len(), 1);
        assert!((t[0][0][1] - 75.0).abs() < 1e-9);
        assert_eq!(median_rr_ms(&beats, hz500(), &[]), Some(800.0));
    }

    #[test]
    fn rate_trend_breaks_at_other_beats() {
        // Dominant every 400 samples with one premature other beat between the third and fourth: two runs, the
        // second starting after the beat that follows the premature one.
        let kinds = [(0, true), (400, true), (800, true), (1000, false), (1600, true), (2000, true), (2400, true)];
        let beats: Vec<Beat> =
            kinds.iter().map(|&(r, d)| Beat::at(r, if d { BeatKind::Dominant } else { BeatKind::Other })).collect();
        let t = rate_trend(&beats, hz500(), &[]);
        let times: Vec<Vec<f64>> = t.iter().map(|run| run.iter().map(|p| p[0]).collect()).collect();
        assert_eq!(times, [vec![0.8, 1.6], vec![4.0, 4.8]]);
    }
}
