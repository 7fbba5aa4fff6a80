//! Beat typing: dominant versus other, by correlation with the dominant template (median of beats),
//! QRS energy width and prematurity.

use std::ops::Range;

use crate::gaps;

/// Window around the R peak compared with the template, s (before, after).
pub(crate) const WIN_S: (f64, f64) = (0.080, 0.100);
/// Correlation below which a beat's shape differs from the dominant one.
// Common practice, no source: template-matching classifiers use correlation thresholds near 0.9.
const MIN_CORR: f64 = 0.90;
/// An RR below this fraction of the local median RR is premature.
// Common practice, no source: 15 % prematurity is a usual cut for supraventricular ectopy.
const PREMATURE: f64 = 0.85;
/// How many standard deviations of the surrounding RRs an RR must fall below the local median to count as
/// premature: in an irregular rhythm (atrial fibrillation, marked sinus arrhythmia) a short RR is ordinary and
/// says nothing about the beat's origin. The SD is estimated robustly (1.4826 × MAD), see `premature_beats`.
// Common practice, no source: a 3-SD outlier rule on a robust spread.
const OUTLIER_SD: f64 = 3.0;
/// Fewest ordinary RRs (not right after a short one) within 16 RRs either side of a beat to judge the local
/// variability; with fewer (a run of premature beats) prematurity alone decides.
const MIN_ORDINARY: usize = 3;
/// Most beats used to build the template.
const TEMPLATE_BEATS: usize = 301;
/// A beat's window is also compared with the template moved by up to this much either way, s: the R peak is
/// one sample of the QRS (the largest deflection of one lead), and where two peaks of the complex are about as
/// high (an R and an S wave 20–40 ms apart), noise tips one over the other and the R peak jumps from beat to beat
/// although the shape is the same.
// Common practice, no source: template matching searches the best alignment within a few tens of ms. Measured
// (beats typed other, against the reference beat labels, tests/suite/accuracy_hrv.rs): QT Database sel117 88
// of 766 normal beats at lag 0 only (its R peaks jump 32–36 ms between R and S), 0 with 30–40 ms; sel100
// 22 → 20 (19 atrial premature), sel14046 33 → 28 (27 ventricular), sel803 74 (74 ventricular), MIT-BIH 100
// 42 → 39 (34 premature).
// The beats typed dominant this way are lined up again for the representative beat (`delineate::median`);
// LUDB reported QRS −18.0 ± 12.4 → −18.3 ± 13.5 ms (LUDB 35, atrial flutter, −22 → −48: three beats after
// longer RRs joined its median). Placing R on the same wave
// in every beat instead moved ventricular beats' R peaks away from the reference (3 missed, 3 extra on
// sel14046) and widened the LUDB QRS end scatter (SD 11.6 → 15.8 ms).
pub(crate) const ALIGN_S: f64 = 0.040;

/// Below this sampling rate a beat's window is also compared half a sample on (see [`dominant`]): at 100 Hz a
/// 90 ms QRS spans nine samples, and identical beats whose R peaks fall at different points between two samples
/// correlated below [`MIN_CORR`] (a third of the beats of a steady 100 Hz demo recording were typed other); at
/// 250 Hz and above they do not.
// Common practice, no source: a sample period above 5 ms is coarse against a QRS slope.
const COARSE_HZ: f64 = 200.0;

/// Types each beat: `true` = dominant. `leads` are the samples (µV, NaN = invalid), `weights` the leads' detection
/// weights (leads of weight 0 are not compared), `gaps` the stretches where no lead was recorded (see
/// [`crate::gaps`]): an RR across one is not an RR, so it neither makes a beat premature nor sets the local median.
/// A beat flagged in `unsure` (its R peak placed with no lead able to place it, a gap reaching into the search; see
/// `place_r`) is not judged by its shape, as a beat whose window misses samples in every lead is not: its window
/// may not be where its QRS is (LUDB 24 with every lead lost 46–66 ms after an R peak: R placed 70 ms early, and
/// the beat typed other). A beat whose window misses samples in some leads is judged on the others: before, it was
/// not judged either, and beats of LUDB 8 and 43 typed other on the complete records were typed dominant where
/// leads were off. Measured on 250 LUDB files (records 1–50; chest or limb leads off 2.5–7.5 s, V1 or II off 3–6 s,
/// I and V5 off 1–9 s): beats typed otherwise than on the complete record 43 → 27 (21 fewer, most of them beats of
/// another shape that were typed dominant; 5 more, beats near the correlation limit that crossed it). On six QT
/// Database records with one lead or the other off for 10–120 s at a time (5 stretches), a ventricular beat of
/// sel14046 is now typed other, as the reference has it, and two normal beats of sel16265 judged on its smaller
/// lead alone are typed other. A moved window (see `matching_shift`) is compared on the leads it holds, which near
/// a lost stretch may be fewer than at the beat's own place; refusing such shifts instead typed beats other where
/// each lead loses short runs at times of its own (`measure_losses`).
pub fn dominant(
    leads_in: &[&[f32]],
    weights: &[f64],
    r: &[usize],
    unsure: &[bool],
    fs: f64,
    gaps: &[Range<usize>],
) -> Vec<bool> {
    let n = leads_in.first().map_or(0, |l| l.len());
    let (a, b) = ((WIN_S.0 * fs) as usize, (WIN_S.1 * fs) as usize);
    let half = smooth_half(fs);
    let reach = (ALIGN_S * fs).round() as usize;
    let leads: Vec<usize> = (0..leads_in.len()).filter(|&l| weights[l] > 0.0).collect();
    if r.is_empty() || leads.is_empty() {
        return vec![true; r.len()];
    }
    // Each lead's window with its own mean removed (baseline offsets must not count as shape), leads joined; a
    // lead missing samples in the window is NaN there and left out of the comparison (see `correlation`). `None`
    // where no lead is whole.
    let snippet = |p: usize| -> Option<Vec<f32>> {
        if p < a || p + b >= n {
            return None;
        }
        let mut s = Vec::with_capacity(leads.len() * (a + b + 1));
        for &l in &leads {
            let w = &leads_in[l][p - a..=p + b];
            if w.iter().all(|v| v.is_finite()) {
                push_levelled(&mut s, w, half);
            } else {
                s.extend(std::iter::repeat_n(f32::NAN, w.len()));
            }
        }
        s.iter().any(|v| v.is_finite()).then_some(s)
    };
    let snippets: Vec<Option<Vec<f32>>> = r
        .iter()
        .zip(unsure.iter().chain(std::iter::repeat(&false)))
        .map(|(&p, &u)| snippet(p).filter(|_| !u))
        .collect();
    let len = leads.len() * (a + b + 1);
    let step = (r.len() / TEMPLATE_BEATS).max(1);
    let pool_at: Vec<usize> = (0..r.len()).step_by(step).filter(|&i| snippets[i].is_some()).collect();
    let pool: Vec<&Vec<f32>> = pool_at.iter().filter_map(|&i| snippets[i].as_ref()).collect();
    let mut template = median_template(&pool, len);
    // Second pass: the template from the beats that resemble the first one.
    let close: Vec<&Vec<f32>> = pool.iter().copied().filter(|s| correlation(s, &template) >= MIN_CORR).collect();
    if close.len() * 3 >= pool.len() {
        template = median_template(&close, len);
    } else if let Some(cluster) = dominant_cluster(&pool, &pool_at, r) {
        // Two shapes about as common (bigeminy: every other beat ventricular): the median of all is a blend
        // that resembles neither, and every beat was typed other. The template is then the shape of the group
        // of alike beats that is largest and least premature.
        template = median_template(&cluster, len);
    }
    let premature = premature_beats(r, gaps, fs);
    snippets
        .iter()
        .zip(r)
        .zip(premature)
        .map(|((s, &p), premature)| {
            // A window that does not match where it is is compared again at the other alignments within reach.
            let corr = |d: isize| {
                let moved = if d == 0 { s.clone() } else { p.checked_add_signed(d).and_then(snippet) };
                moved.map(|m| correlation(&m, &template))
            };
            // At coarse sampling the R peak lies anywhere within a sample, and a narrow QRS sampled half a sample
            // later is a different sequence of values: the window is also tried half a sample on (the mean of
            // its neighbouring windows), within the same reach.
            let half = |d: isize| {
                let at = p.checked_add_signed(d)?;
                let (x, y) = (snippet(at)?, snippet(at + 1)?);
                Some(correlation(&x.iter().zip(&y).map(|(u, v)| 0.5 * (u + v)).collect::<Vec<f32>>(), &template))
            };
            let shape_ok = s.is_none()
                || matching_shift(reach, corr).is_some()
                || (fs < COARSE_HZ && matching_shift(reach, half).is_some());
            shape_ok && !premature
        })
        .collect()
}

/// Most beats tried as the centre of a group of alike beats in [`dominant_cluster`].
const CLUSTER_CANDIDATES: usize = 40;

/// Where the beats' median resembles too few of them (two shapes about as common), the group of beats alike
/// (correlation at least [`MIN_CORR`] with one of them) whose size times its members' mean preceding RR is
/// largest: in bigeminy the sinus beats, which follow the long RR, not the ventricular ones, which come early;
/// with rarer ectopy the larger group wins anyway. `pool` holds the windows of beats `pool_at` (indices into the
/// R peaks `r`). `None` when no group holds 3 beats and a quarter of the pool.
fn dominant_cluster<'a>(pool: &[&'a Vec<f32>], pool_at: &[usize], r: &[usize]) -> Option<Vec<&'a Vec<f32>>> {
    let prev_rr = |i: usize| (i > 0).then(|| r[i].saturating_sub(r[i - 1]) as f64);
    let step = (pool.len() / CLUSTER_CANDIDATES).max(1);
    let (members, _) = (0..pool.len())
        .step_by(step)
        .map(|c| {
            let members: Vec<usize> = (0..pool.len()).filter(|&j| correlation(pool[j], pool[c]) >= MIN_CORR).collect();
            let rrs: Vec<f64> = members.iter().filter_map(|&j| prev_rr(pool_at[j])).collect();
            let mean_rr = if rrs.is_empty() { 0.0 } else { rrs.iter().sum::<f64>() / rrs.len() as f64 };
            let score = members.len() as f64 * mean_rr;
            (members, score)
        })
        .max_by(|x, y| x.1.total_cmp(&y.1))?;
    (members.len() >= 3 && members.len() * 4 >= pool.len()).then(|| members.iter().map(|&j| pool[j]).collect())
}

/// Half-width of the running average a beat's window is smoothed with before it is compared, s (about 10 ms in
/// all: 5 samples at 500 Hz, 3 at 250 Hz, none at 100 Hz).
// Common practice, no source: a QRS keeps its shape under a 10-ms average, while white noise falls by √5 at 500
// Hz and mains hum at 50 Hz by a third. Measured on the synthetic normal recording with 100 µV of white noise on
// every lead: 5 of 12 beats typed dominant unsmoothed, 12 of 12 smoothed; 200 µV: 0 and 12 of 12 (heart rate
// withheld before, "no two dominant beats in a row").
const SMOOTH_HALF_S: f64 = 0.004;

/// Samples either side of a sample in the running average of [`push_levelled`] at `fs` Hz.
pub(crate) fn smooth_half(fs: f64) -> usize {
    (SMOOTH_HALF_S * fs).round() as usize
}

/// Appends `window` to `out` as typing compares a beat's window, one lead after another: averaged over `half`
/// samples either side (fewer at the ends; see [`smooth_half`]), less the straight line fitted to it by least
/// squares, so that neither baseline offsets nor the slope of a wandering baseline count as shape. (Less only
/// its mean, as before, residual wander of 1 mV at 0.7 Hz typed 7 of 12 beats of the synthetic normal recording
/// other; at 1 Hz 8 of 12, and heart rate and QT were withheld.)
pub(crate) fn push_levelled(out: &mut Vec<f32>, window: &[f32], half: usize) {
    let (start, n) = (out.len(), window.len());
    out.extend((0..n).map(|k| {
        let part = &window[k.saturating_sub(half)..(k + half + 1).min(n)];
        part.iter().sum::<f32>() / part.len() as f32
    }));
    let w = &mut out[start..];
    let centre = (n as f32 - 1.0) / 2.0;
    let mean = w.iter().sum::<f32>() / n.max(1) as f32;
    let (mut sxy, mut sxx) = (0.0f32, 0.0f32);
    for (k, v) in w.iter().enumerate() {
        let x = k as f32 - centre;
        sxy += x * (v - mean);
        sxx += x * x;
    }
    let slope = if sxx > 0.0 { sxy / sxx } else { 0.0 };
    for (k, v) in w.iter_mut().enumerate() {
        *v -= mean + slope * (k as f32 - centre);
    }
}

/// The shift, within ± `reach` samples, at which a beat's window matches the template (correlation at least
/// [`MIN_CORR`]): 0 when it matches where it is, else the shift where it matches best; `None` when it matches
/// nowhere. `corr(d)` is the window's correlation with the template when moved by `d` samples (`None` where
/// the moved window is not available).
pub(crate) fn matching_shift(reach: usize, corr: impl Fn(isize) -> Option<f64>) -> Option<isize> {
    if corr(0).is_some_and(|c| c >= MIN_CORR) {
        return Some(0);
    }
    let reach = reach as isize;
    (-reach..=reach)
        .filter(|&d| d != 0)
        .filter_map(|d| corr(d).filter(|&c| c >= MIN_CORR).map(|c| (d, c)))
        .max_by(|x, y| x.1.total_cmp(&y.1))
        .map(|(d, _)| d)
}

/// Sample-by-sample median of the windows in `pool`, over those that hold the sample (NaN where none does).
fn median_template(pool: &[&Vec<f32>], len: usize) -> Vec<f32> {
    let mut col = Vec::with_capacity(pool.len());
    (0..len)
        .map(|k| {
            col.clear();
            col.extend(pool.iter().map(|s| s[k]).filter(|v| v.is_finite()));
            if col.is_empty() {
                return f32::NAN;
            }
            let mid = col.len() / 2;
            *col.select_nth_unstable_by(mid, f32::total_cmp).1
        })
        .collect()
}

/// Pearson correlation of two equal-length snippets over the samples both hold (NaN in either is left out; 0
/// when either is constant there or none is held by both).
pub fn correlation(x: &[f32], y: &[f32]) -> f64 {
    let both = || x.iter().zip(y).filter(|(a, b)| a.is_finite() && b.is_finite());
    let (mut n, mut sx, mut sy) = (0usize, 0.0f64, 0.0f64);
    for (a, b) in both() {
        n += 1;
        sx += f64::from(*a);
        sy += f64::from(*b);
    }
    if n == 0 {
        return 0.0;
    }
    let (mx, my) = (sx / n as f64, sy / n as f64);
    let (mut cxy, mut cxx, mut cyy) = (0.0, 0.0, 0.0);
    for (a, b) in both() {
        let (dx, dy) = (f64::from(*a) - mx, f64::from(*b) - my);
        cxy += dx * dy;
        cxx += dx * dx;
        cyy += dy * dy;
    }
    if cxx <= 0.0 || cyy <= 0.0 { 0.0 } else { cxy / (cxx * cyy).sqrt() }
}

/// Which beats are premature for their rhythm: the RR ending at the beat is below [`PREMATURE`] × the median of
/// the 17 RRs around it (its own, 8 before and 8 after), AND — when enough ordinary RRs surround it — more than [`OUTLIER_SD`] SDs
/// (of the 16 RRs before and 16 after) below that median. So in a regular rhythm a 15 % early beat is
/// premature, while in atrial fibrillation or an irregular sinus rhythm, where short RRs are ordinary, a beat
/// is `other` only by its shape. An interval across one of `gaps` (or next to one, [`gaps::breaks_rr`]; R peaks
/// at `fs` Hz) is no RR: it is left out of the medians and spreads, and the beat it ends is not judged by it.
fn premature_beats(r: &[usize], gaps: &[Range<usize>], fs: f64) -> Vec<bool> {
    let rr: Vec<Option<f64>> =
        r.windows(2).map(|w| (!gaps::breaks_rr(gaps, w[0], w[1], fs)).then(|| (w[1] - w[0]) as f64)).collect();
    let mut buf = Vec::with_capacity(17);
    let mut ordinary = Vec::with_capacity(33);
    (0..r.len())
        .map(|i| {
            if i == 0 {
                return false;
            }
            let j = i - 1; // rr[j] ends at beat i
            let Some(own) = rr[j] else { return false };
            buf.clear();
            buf.extend(rr[j.saturating_sub(8)..(j + 9).min(rr.len())].iter().flatten());
            let m = median(&mut buf);
            let short = |k: usize| rr[k].is_some_and(|v| v < PREMATURE * m);
            if !short(j) {
                return false;
            }
            // The spread of the 16 RRs before and 16 after: 1.4826 × their median absolute deviation from m
            // (the SD of a normal spread). Leaves out this beat's own RR, the pause after it and every RR
            // right after a short one (pauses of other premature beats).
            ordinary.clear();
            ordinary.extend(
                (j.saturating_sub(16)..(j + 17).min(rr.len()))
                    .filter(|&k| k != j && k != j + 1 && (k == 0 || !short(k - 1)))
                    .filter_map(|k| rr[k].map(|v| (v - m).abs())),
            );
            if ordinary.len() < MIN_ORDINARY {
                return true;
            }
            let sd = 1.4826 * median(&mut ordinary);
            own < m - OUTLIER_SD * sd
        })
        .collect()
}

/// Median of a non-empty buffer (reorders it).
fn median(v: &mut [f64]) -> f64 {
    let mid = v.len() / 2;
    *v.select_nth_unstable_by(mid, f64::total_cmp).1
}

#[cfg(test)]
// Test signals are written sample by sample at the index they describe.
#[allow(clippy::needless_range_loop)]
mod tests {
    use super::*;

    #[test]
    fn correlation_of_scaled_copy_is_one() {
        let x: Vec<f32> = (0..20).map(|k| (k as f32 * 0.4).sin()).collect();
        let y: Vec<f32> = x.iter().map(|v| 3.0 * v + 1.0).collect();
        assert!((correlation(&x, &y) - 1.0).abs() < 1e-9);
        assert_eq!(correlation(&x, &[0.0; 20]), 0.0);
    }

    /// Adds a Gaussian wave of `amp` µV and width `width` samples peaking at sample `at`, over `at ± half`.
    fn add_gaussian(lead: &mut [f32], at: usize, amp: f32, width: f32, half: usize) {
        for k in at - half..at + half {
            let d = (k as f32 - at as f32) / width;
            lead[k] += amp * (-d * d).exp();
        }
    }

    #[test]
    fn premature_wide_beat_is_other() {
        let fs = 250.0;
        let n = 250 * 20;
        let mut lead = vec![0.0f32; n];
        let mut r = Vec::new();
        let mut t = 200;
        while t + 200 < n {
            r.push(t);
            t += 250;
        }
        r[10] -= 70; // premature
        for (i, &p) in r.iter().enumerate() {
            add_gaussian(&mut lead, p, 1000.0, if i == 10 { 12.0 } else { 4.0 }, 25);
        }
        let dom = dominant(&[lead.as_slice()], &[1.0], &r, &[], fs, &[]);
        assert!(!dom[10]);
        assert_eq!(dom.iter().filter(|&&d| d).count(), r.len() - 1);
    }

    #[test]
    fn a_wide_beat_where_a_lead_is_off_is_typed_on_the_other_leads() {
        // Three leads (1000, −600 and 1500 µV), a regular rhythm, and beat 10 on time (not premature: an escape
        // beat or a late ectopic beat), wide in the leads listed, with leads off (invalid) over samples relative
        // to its R peak, as when an electrode falls off.
        let fs = 250.0;
        let n = 250 * 20;
        let r: Vec<usize> = (0..).map(|i| 200 + 250 * i).take_while(|&t| t + 200 < n).collect();
        let typed = |wide: &[usize], off: &[usize], (from, to): (isize, isize)| {
            let mut leads = vec![vec![0.0f32; n]; 3];
            for (i, &p) in r.iter().enumerate() {
                for (l, (lead, amp)) in leads.iter_mut().zip([1000.0, -600.0, 1500.0]).enumerate() {
                    add_gaussian(lead, p, amp, if i == 10 && wide.contains(&l) { 12.0 } else { 4.0 }, 25);
                }
            }
            let at = |d: isize| r[10].saturating_add_signed(d);
            for &l in off {
                leads[l][at(from)..at(to)].fill(f32::NAN);
            }
            let views: Vec<&[f32]> = leads.iter().map(Vec::as_slice).collect();
            dominant(&views, &[1.0, 1.0, 1.0], &r, &[], fs, &[])
        };
        let all = [0, 1, 2];
        // Wide in every lead, lead 2 off for a second around it: judged on leads 0 and 1, other. Before, a window
        // missing samples in any lead was not judged, and the beat was typed dominant.
        let dom = typed(&all, &[2], (-125, 125));
        assert!(!dom[10], "the wide beat typed dominant");
        assert_eq!(dom.iter().filter(|&&d| d).count(), r.len() - 1);
        // Narrow like the others there: dominant. Every lead off: not judged (dominant, being on time).
        assert!(typed(&[], &[2], (-125, 125)).iter().all(|&d| d));
        assert!(typed(&all, &all, (-125, 125))[10]);
    }

    #[test]
    fn r_peaks_jumping_between_r_and_s_keep_their_beats_dominant() {
        // 250 Hz, every beat the same R (+900 µV) and S (−850 µV) 32 ms apart; the R peak is placed on the R wave
        // in two beats of three and on the S wave in the third, as where noise tips the larger of the two.
        let fs = 250.0;
        let n = 250 * 30;
        let mut lead = vec![0.0f32; n];
        let mut r = Vec::new();
        let mut t = 300;
        let mut k = 0;
        while t + 300 < n {
            add_gaussian(&mut lead, t, 900.0, 3.0, 10);
            add_gaussian(&mut lead, t + 8, -850.0, 3.0, 10);
            r.push(if k % 3 == 2 { t + 8 } else { t });
            t += 220 + (k % 2) * 4;
            k += 1;
        }
        let dom = dominant(&[lead.as_slice()], &[1.0], &r, &[], fs, &[]);
        assert!(dom.iter().all(|&d| d), "{} of {} beats dominant", dom.iter().filter(|&&d| d).count(), dom.len());
    }

    /// Sampling rate of the R peaks built by [`peaks`], Hz.
    const FS_TEST: f64 = 250.0;

    /// R peaks from RRs (samples), starting at 200.
    fn peaks(rr: &[usize]) -> Vec<usize> {
        let mut r = vec![200];
        for v in rr {
            r.push(r[r.len() - 1] + v);
        }
        r
    }

    #[test]
    fn early_beat_in_a_regular_rhythm_is_premature() {
        let mut rr: Vec<usize> = (0..30).map(|k| 200 + k % 3).collect();
        rr[15] = 160; // 20 % early
        rr[16] = 240; // compensatory pause
        let p = premature_beats(&peaks(&rr), &[], FS_TEST);
        assert_eq!(p.iter().filter(|&&b| b).count(), 1);
        assert!(p[16]);
    }

    #[test]
    fn short_rrs_of_an_irregular_rhythm_are_not_premature() {
        // RRs varying ±25 % beat to beat (fixed pseudo-random pattern), as in atrial fibrillation.
        let mut state = 11u64;
        let rr: Vec<usize> = (0..60)
            .map(|_| {
                state = state.wrapping_mul(6364136223846793005).wrapping_add(1442695040888963407);
                (200.0 * (0.75 + 0.5 * ((state >> 33) as f64 / (1u64 << 31) as f64))) as usize
            })
            .collect();
        assert!(rr.iter().filter(|&&v| v < 170).count() >= 5, "the pattern must hold short RRs");
        assert!(premature_beats(&peaks(&rr), &[], FS_TEST).iter().all(|&b| !b));
    }

    #[test]
    fn trigeminy_stays_premature() {
        // Normal, short, pause, normal, short, pause…: the early beats stand out from the steady normal RRs.
        let rr: Vec<usize> = (0..30).map(|k| [200, 140, 250][k % 3]).collect();
        let p = premature_beats(&peaks(&rr), &[], FS_TEST);
        let expected: Vec<bool> = (0..p.len()).map(|i| i > 0 && (i - 1) % 3 == 1).collect();
        assert_eq!(p, expected);
    }

    #[test]
    fn an_interval_across_a_gap_is_no_rr() {
        // A steady rhythm (RR 200) where two intervals in three hold a stretch with no recorded lead and read
        // twice as long (a beat lost in the gap): those are not RRs. Counted, they doubled the local median and
        // made beats after an ordinary RR premature.
        let rr: Vec<usize> = (0..30).map(|k| [200, 400, 400][k % 3]).collect();
        let r = peaks(&rr);
        let gaps: Vec<Range<usize>> =
            r.windows(2).filter(|w| w[1] - w[0] == 400).map(|w| w[0] + 150..w[0] + 250).collect();
        assert!(premature_beats(&r, &gaps, FS_TEST).iter().all(|&p| !p));
        assert!(premature_beats(&r, &[], FS_TEST).iter().filter(|&&p| p).count() >= 3);
    }
}
