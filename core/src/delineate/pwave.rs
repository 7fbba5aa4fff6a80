//! P waves. A P wave is only reported when the record has a consistent one: the median of the PR windows of
//! the dominant beats (aligned on QRS onset) shows a P wave, and the individual beats resemble that median
//! (an irregular rhythm with fibrillatory waves gives a flat median and low resemblance, so no P).
//! Boundaries are found with a multi-lead slope envelope (each lead in units of its own P slope) on the median of the
//! PR windows, each beat's moved to where its P wave best matches a first model (a median aligned on QRS onset is
//! blurred by the beat-to-beat scatter of the PR interval and of the QRS onsets), and carried to each beat at the lag
//! where the beat best matches the median. As for the QRS edges, where the unfiltered median leads resolve it the edges
//! are then moved inward over the few samples the low-pass and smoothing spread the wave's abrupt start and end (see
//! [`SPREAD_S`]). The PR window is [`WINDOW_S`], reaching back towards the previous T end (at most [`LONG_WINDOW_S`])
//! when the P wave runs into its start: a long PR (first-degree AV block) is measured whole.
//!
//! Accuracy limit (measured on the 43 LUDB records with P waves): LUDB's global P onset is the earliest of twelve
//! leads annotated one by one, so a single lead's early mark moves it; relative to any fixed point of the beat it
//! jitters with SD ≈ 19 ms within a record (≈ 9 ms for the second-earliest lead). A per-record P model carried
//! to each beat therefore cannot reach a pooled SD much below that against this reference. Read with two of their
//! leads, against the experts' marks on the same two, the P onset is −2.2 to −6.3 ms, SD 11.8 to 14.8 (five pairs;
//! the tests' `accuracy_lead_subsets`).

use super::signals::{Signals, smooth};
use crate::detect::correlation;
use crate::filter::{Biquad, filtfilt};

/// Length of the PR window before QRS onset, s.
const WINDOW_S: f64 = 0.300;
/// Longest PR window, s, tried when the P wave runs into the start of the [`WINDOW_S`] one and the time since
/// the previous T end leaves room: a first-degree AV block has a PR above 200 ms, often 300–400 ms.
// Common practice, no source: PR intervals above ≈ 450 ms are rare; the window also spans the quiet before P.
const LONG_WINDOW_S: f64 = 0.500;
/// The P wave is taken as cut by the window when its onset lies within this time of the search start, s.
// Common practice, no source: a few samples of baseline before the onset show the wave has started inside.
const CUT_S: f64 = 0.010;
/// The median P wave must be at least this big on its clearest lead, µV.
// Common practice, no source: normal P waves are 50–250 µV in their clearest lead; the median of
// fibrillatory or flutter waves over beats is far smaller.
const MIN_P_UV: f32 = 40.0;
/// Mean correlation of the beats' P waves with the median needed to call the P wave consistent.
// Common practice, no source.
const MIN_CONSISTENCY: f64 = 0.75;
/// A beat gets a P wave when its PR window correlates at least this well with the median one.
// Common practice, no source.
const MIN_BEAT_CORR: f64 = 0.30;
/// Fraction of the P envelope's rise marking onset and end.
// Common practice, no source. 0.10 rather than 0.12: global 12-lead P onsets are the earliest onset over the
// leads, which lies before the foot of the multi-lead envelope (LUDB mean error +10.0 → +8.6 ms).
const EDGE_FRACTION: f32 = 0.10;
/// Walking out from the P wave's steepest slope, an edge is also where the envelope stops falling (a local
/// minimum) once it lies below this fraction of the way from its quiet level to the slope's peak: on a flat
/// baseline the sum of twelve leads' |slope| keeps a noise floor with bumps of its own, and a threshold a tenth
/// of the way up can lie inside it, so the walk ran on through the baseline to the reach limit or to a bump
/// before the wave (LUDB 11: P onset 44 ms before the experts').
// Source: Martínez et al., IEEE Trans Biomed Eng 2004;51:570-81 (from memory): wave edges where the wavelet
// modulus falls below a threshold or reaches a local minimum. The fraction is ours (common practice, no source):
// below it a minimum is taken as the baseline, above it as a dip within the limb. Measured (LUDB 1-50, P onset
// against the second-earliest lead's mark): −3.1 ± 13.6 ms without the minimum rule, −0.6 ± 10.5 with it at
// 0.15–0.20, −0.2 ± 9.9 at 0.25, +1.4 ± 12.8 at 0.40; QT Database P onset unchanged (−2.3 ± 13.9).
const DIP_FRACTION: f32 = 0.20;
/// A P edge where the leads still stand at more than this share of the P wave's height (their summed departure
/// from the baseline, at its largest) lies inside the wave: the slope envelope also falls to its threshold, and
/// to a local minimum, at the still top of one phase of a wide, notched or biphasic P wave, and the walk stopped
/// there, at the top of the first phase when the second was the steeper (LUDB 13 read with leads II and V1 only:
/// P onset 72 ms after the experts' on every beat). The walk then goes on from the steepest slope beyond.
// Common practice, no source: a wave's edge lies where it has not yet risen (has fallen back) to half its height.
// Measured on LUDB 1-50 read with two or one of their leads, against the experts' extreme over the same leads (P
// onset, ms): II+V1 −2.2 ± 17.5 → −4.8 ± 11.8, III+V2 −2.5 ± 16.0 → −4.8 ± 12.7, I+V4 −3.4 ± 18.3 → −5.7 ± 11.8,
// II+V5, aVF+V6, II and V5 alone unchanged; at 0.6 III+V2 stays at 16.0, at 0.4 the P end of II+V5 scatters (10.8 →
// 15.1). The twelve-lead records, the QT Database and the demos are unchanged.
const INSIDE_SHARE: f32 = 0.5;
/// The P edge walk goes past at most this many still tops (see [`INSIDE_SHARE`]), and its edge lies at most
/// this many times [`EDGE_REACH_S`] from the slope it started from.
// Common practice, no source: a P wave has at most three phases, so two tops between them.
const MAX_TOPS: usize = 2;
/// Farthest a P edge lies from the steepest slope it is walked out from, s.
// Common practice, no source: a P wave's limbs last ≈ 40–60 ms each; 120 ms P waves are already wide.
const EDGE_REACH_S: f64 = 0.080;
/// Low-pass cutoff of the leads the P edges are found on, Hz (on top of the 40 Hz QRS leads).
// Common practice, no source: the P wave's energy lies well below 30 Hz, while muscle noise spreads from ≈ 20 Hz
// up. Chosen among 25/30/35 Hz on the demo waves with muscle noise (8 seeds) and the QT Database and LUDB
// records: 35 Hz keeps QTDB P onset unchanged (−0.8 ± 13.4 ms), moves LUDB from +8.6 ± 21.5 to +7.9 ± 21.4 and
// halves the PR error's spread with noise; 25–30 Hz blur the edges outwards (QTDB −2.8 to −3.4 ms).
const P_LP_HZ: f64 = 35.0;
/// Most a lead's P slope is raised relative to the lead with the steepest P when the leads are equalised for
/// the slope envelope.
// Common practice, no source: as for the QRS envelope (`signals::MAX_GAIN`); a lead with a tiny P wave mostly
// shows noise. Measured (P onset, ms): QT Database −1.6 ± 14.0 summed in µV → −1.0 ± 13.2 equalised (also with
// at most 2×); LUDB against the second-earliest lead +0.3 ± 10.1 → +0.2 ± 10.1; the largest lead's slope alone
// (at most 2× or 4×) scattered LUDB to ± 16–18.
const MAX_GAIN: f32 = 4.0;
/// With at least this many beats matched to the first P model, the aligned median is taken over the better
/// half of them only (see `model_in`); with fewer, over all, since halving a handful of beats costs more in the
/// median's noise (√2) than the worse matches blur.
// Common practice, no source. Measured (P onset, ms): QT Database with muscle noise at 12 dB −10.5 ± 18.3 over
// all beats, −3.9 ± 13.2 over the better half (−5.2 ± 12.5 / −3.2 ± 11.8 keeping 75 % / 25 %); clean QT
// Database unchanged (−1.0 ± 13.2); on the 10-s demo waves with noise (10–12 beats) the half scattered the PR
// (SD 3.1 → 3.7 ms, worst 8 → 10 ms), hence the floor.
const SELECT_FROM: usize = 20;
/// Largest lag tried when matching a beat to the median P, s.
const MAX_LAG_S: f64 = 0.024;
/// How far before a QRS onset the P model reads a beat: its longest window, moved by the largest lag.
pub(super) const READ_BEFORE_S: f64 = LONG_WINDOW_S + MAX_LAG_S;
/// A lead enters a median of PR windows when it is present in at least this many of them (see [`median_of`]).
// Common practice, no source: a median of one or two beats is mostly their noise.
const MIN_PRESENT: usize = 3;
/// A lead is left out of a beat's PR window when it misses samples ([`crate::gaps::ABSENT_RUN_S`] or more)
/// within this time of the part read, s: the zero-phase low-passes spread the interpolated stretch into the
/// samples around it.
// Common practice, no source: about half the impulse response of the 12 Hz low-pass.
const SETTLE_S: f64 = 0.040;
/// How far the P-band and 40 Hz zero-phase low-passes and the 16 ms envelope smoothing spread an abrupt start
/// (end) of the P wave, s: an edge found on the envelope moves at most this far towards the P peak, over samples
/// where the unfiltered median leads still stand still (as for the QRS edges in `qrs`).
// Common practice, no source: half the 16 ms smoothing plus about half a period of the 35 Hz cutoff.
const SPREAD_S: f64 = 0.024;
/// Within [`SPREAD_S`] of a P edge, the unfiltered median leads stand still while their summed sample-to-sample
/// step is at most this fraction of the edge threshold; the refinement applies only where their noise (see
/// [`NOISE_FACTOR`]) is below the same level.
// Common practice, no source: a step under half the threshold slope is taken as no departure.
const STILL: f32 = 0.5;
/// Noise of an unfiltered median lead: this many times the median absolute deviation of (unfiltered − P-band)
/// over the search region outside the P wave (where the low-pass leaves a clean lead unchanged).
// Common practice, no source: a deflection is told from noise when it exceeds a few times the noise level.
const NOISE_FACTOR: f32 = 4.0;

/// The record's P wave: offsets of its onset and end from QRS onset (samples, negative = before), and the
/// median P window used to match beats.
#[derive(Debug, Clone)]
pub struct PModel {
    /// P onset − QRS onset, samples (negative).
    pub on_rel: isize,
    /// P end − QRS onset, samples (negative).
    pub end_rel: isize,
    /// Median PR window per lead, baseline at the PR segment, µV; index 0 is `qrs_on − window`.
    template: Vec<Vec<f32>>,
    /// Margin around the P wave over which beats are compared with the template, samples.
    margin: usize,
    /// Mean correlation of the beats with the template (0–1).
    pub consistency: f64,
    /// The record's T ends were held back from the next P wave when this model was found (see `delineate_with`);
    /// the representative beat's T end is then found the same way.
    pub(super) t_held_back: bool,
}

/// The PR window of one beat (per lead, relative to the PR-segment level), `w` samples long, if its last `need`
/// samples lie inside the recording (any earlier ones outside it read 0). A lead missing samples where the beat's
/// window is read ([`absent_leads`]) reads NaN throughout: its interpolated stretch would flatten the median P
/// wave and lower the beat's resemblance to it.
fn segment(sig: &Signals, qrs_on: usize, lag: isize, w: usize, need: usize) -> Option<Vec<Vec<f32>>> {
    segment_of(sig, &sig.slow, qrs_on, lag, w, need)
}

/// [`segment`] on chosen leads (`sig.slow`, `sig.qrs` or `sig.wide`).
fn segment_of<L: AsRef<[f32]>>(
    sig: &Signals,
    leads: &[L],
    qrs_on: usize,
    lag: isize,
    w: usize,
    need: usize,
) -> Option<Vec<Vec<f32>>> {
    let end = qrs_on as isize + lag;
    if end < need.min(w) as isize + 1 || end as usize >= sig.len() {
        return None;
    }
    let end = end as usize;
    let ref_a = end - sig.samples(0.012).max(1);
    let lead_in = w.saturating_sub(end);
    let absent = absent_leads(sig, qrs_on, need.min(w));
    Some(
        leads
            .iter()
            .zip(absent)
            .map(|(x, absent)| {
                if absent {
                    return vec![f32::NAN; w];
                }
                let x = x.as_ref();
                let base = x[ref_a..end].iter().sum::<f32>() / (end - ref_a) as f32;
                let mut v = vec![0.0f32; lead_in];
                v.extend(x[end + lead_in - w..end].iter().map(|v| v - base));
                v
            })
            .collect(),
    )
}

/// Which leads are left out of the beat with QRS onset `qrs_on` whose last `span` samples of PR window are read:
/// those with a run of at least [`crate::gaps::ABSENT_RUN_S`] of missing samples within [`SETTLE_S`] of that
/// span at any lag tried ([`MAX_LAG_S`]), so the same leads are compared at every lag. None when every lead would
/// be: the leads as bridged are then compared, as with a loss in each lead at times of its own.
fn absent_leads(sig: &Signals, qrs_on: usize, span: usize) -> Vec<bool> {
    let reach = sig.samples(MAX_LAG_S + SETTLE_S);
    let (a, b) = (qrs_on.saturating_sub(span + reach), qrs_on + reach);
    let absent: Vec<bool> = (0..sig.slow.len()).map(|l| sig.lead_absent(l, a, b)).collect();
    if absent.iter().all(|&x| x) { vec![false; absent.len()] } else { absent }
}

/// True when a lead of a PR window (or of a median of them) holds samples: see [`segment`].
fn present(lead: &[f32]) -> bool {
    lead.first().is_some_and(|v| v.is_finite())
}

/// Builds the P model from dominant beats' QRS onsets; `earliest` is, per beat, the first sample the P wave
/// may occupy (after the previous T wave). `None` when the record has no consistent P wave.
///
/// The P wave is sought in the [`WINDOW_S`] before QRS onset. Where it runs into the start of that search and
/// the beats' typical time since the previous T end is longer, it is sought again in a window reaching back to
/// that T end (at most [`LONG_WINDOW_S`]); a long PR (first-degree AV block) is then measured whole. A record
/// with no P wave in the usual window is not searched further (a wider search would more often take a T or U
/// wave tail, or a paced rhythm's artefacts, for a P wave). At fast rates the previous T end bounds both
/// searches, so neither reaches into a T wave.
#[must_use]
pub fn model(sig: &Signals, onsets: &[(usize, usize)]) -> Option<PModel> {
    let base = sig.samples(WINDOW_S);
    let first = model_in(sig, onsets, base);
    let mut room: Vec<usize> = onsets.iter().map(|&(on, earliest)| on.saturating_sub(earliest)).collect();
    if room.is_empty() {
        return None;
    }
    let mid = room.len() / 2;
    let long = (*room.select_nth_unstable(mid).1).min(sig.samples(LONG_WINDOW_S));
    if long <= base + sig.samples(CUT_S) {
        return first.map(|(m, _)| m);
    }
    match first {
        Some((m, true)) => Some(model_in(sig, onsets, long).map_or(m, |(l, _)| l)),
        first => first.map(|(m, _)| m),
    }
}

/// [`model`] in a PR window of `w` samples; the flag says the onset lies within [`CUT_S`] of the search start
/// (the P wave may begin before the window).
fn model_in(sig: &Signals, onsets: &[(usize, usize)], w: usize) -> Option<(PModel, bool)> {
    let segs: Vec<(Vec<Vec<f32>>, usize)> = onsets
        .iter()
        .filter_map(|&(on, earliest)| segment(sig, on, 0, w, w).map(|s| (s, on.saturating_sub(earliest))))
        .collect();
    if segs.len() < 3 {
        return None;
    }
    let template = median_of(&segs.iter().map(|(s, _)| s).collect::<Vec<_>>(), w);
    // Search region in the template: after the typical previous T end, and 20 ms clear of the QRS.
    let mut room: Vec<usize> = segs.iter().map(|(_, r)| *r).collect();
    room.sort_unstable();
    let room = room[room.len() / 2].min(w);
    let start = w - room + sig.samples(0.010).min(room);
    let stop = w - sig.samples(0.020);
    if start + sig.samples(0.040) >= stop {
        return None;
    }
    // The P wave's size on its clearest lead, and its peak where the leads together depart most from straight
    // lines joining the region's ends (summed |departure| over leads): one noisy lead or a lead on a sloping
    // baseline cannot place the peak on a bump of its own, while a P wave moves most leads at once.
    let each = departures(template.iter().filter(|t| present(t)), (start, stop));
    let best_amp = each.iter().flatten().copied().fold(0.0f32, f32::max);
    let departure = summed(&each);
    let peak = start + (0..departure.len()).max_by(|&a, &b| departure[a].total_cmp(&departure[b]))?;
    if best_amp < MIN_P_UV || peak <= start || peak >= stop {
        return None;
    }
    // Edges on the median of the PR windows aligned on QRS onset; then again with each beat moved to the lag
    // where its P wave best matches that first model: the PR interval varies a little from beat to beat and the
    // QRS onsets jitter, and a median of misaligned P waves starts earlier and ends later than any of them. The
    // second median is taken over the half of the beats that match the first model best, when there are at least
    // SELECT_FROM: in noise the others' lags scatter as much as the noise moves their best match, and blur the P
    // wave again.
    let at_qrs: Vec<(usize, isize)> = onsets.iter().map(|&(q, _)| (q, 0)).collect();
    let found = edges(sig, &at_qrs, w, (start, peak, stop))?;
    let first = PModel {
        on_rel: found.on as isize - w as isize,
        end_rel: found.end as isize - w as isize,
        ..PModel::of(template, sig.samples(0.020))
    };
    let need = first.compared_tail();
    let matched: Vec<(usize, isize, f64)> =
        onsets.iter().filter_map(|&(q, _)| first.best_lag(sig, q, need).map(|(lag, c)| (q, lag, c))).collect();
    let mut cs: Vec<f64> = matched.iter().map(|m| m.2).collect();
    let mid = cs.len() / 2;
    let median_c =
        if cs.len() < SELECT_FROM { f64::NEG_INFINITY } else { *cs.select_nth_unstable_by(mid, f64::total_cmp).1 };
    let aligned: Vec<(usize, isize)> = matched.iter().filter(|m| m.2 >= median_c).map(|m| (m.0, m.1)).collect();
    // Where the realigned median's P wave runs back to the start of the search region and the first median's
    // does not, the realignment has blurred a small P wave into the baseline, and the first median's edges stay
    // (LUDB 19 read with lead II alone at 250 Hz: P waves of 368 ms from the previous T end to the QRS); the P
    // wave is then not taken as cut by the window either, as the first median's is not. (A P wave may end where
    // the region does, 20 ms before the QRS, when the PR is short.)
    let found = edges(sig, &aligned, w, (start, peak, stop))
        .filter(|second| !second.from_start || found.from_start)
        .unwrap_or(found);
    let (on, end) = (found.on, found.end);
    let cut = on <= start + sig.samples(CUT_S);
    let mut m = PModel { on_rel: on as isize - w as isize, end_rel: end as isize - w as isize, ..first };
    // Beats holding no lead the template has cannot be compared and are left out.
    let corrs: Vec<f64> = segs.iter().filter_map(|(s, _)| m.similarity(s)).collect();
    if corrs.is_empty() {
        return None;
    }
    m.consistency = corrs.iter().sum::<f64>() / corrs.len() as f64;
    (m.consistency >= MIN_CONSISTENCY).then_some((m, cut))
}

/// P onset and end, as indices into a PR window of `w` samples, on the median over the beats (`beats`: QRS
/// onset and the lag each PR window is moved by) of their PR windows: where the multi-lead slope envelope, walked
/// out from its steepest up- and downslope around the P peak `peak`, falls to its threshold within the search
/// region `start..=stop`, then refined over the low-pass spread ([`refine`]).
fn edges(
    sig: &Signals,
    beats: &[(usize, isize)],
    w: usize,
    (start, peak, stop): (usize, usize, usize),
) -> Option<Edges> {
    // Slope envelope over the leads of the median of the beats' PR windows, each low-passed to the P band (P_LP_HZ
    // on top of the 40 Hz leads): muscle noise above the P wave's band would otherwise add a rectified floor and
    // bumps to the envelope that move the edges outwards.
    let lp = [Biquad::lowpass(P_LP_HZ.min(sig.fs * 0.45), sig.fs)];
    let fine_segs: Vec<Vec<Vec<f32>>> = beats
        .iter()
        .filter_map(|&(on, lag)| segment_of(sig, &sig.qrs, on, lag, w, w))
        .map(|seg| {
            seg.iter()
                .map(|t| {
                    if !present(t) {
                        return t.clone();
                    }
                    let x: Vec<f64> = t.iter().map(|&v| f64::from(v)).collect();
                    filtfilt(&lp, &x, w / 2).into_iter().map(|v| v as f32).collect()
                })
                .collect()
        })
        .collect();
    let fine = median_of(&fine_segs.iter().collect::<Vec<_>>(), w);
    // Each lead's slope in units of its own steepest P slope in the search region (a lead with a small P wave
    // raised at most MAX_GAIN times relative to the lead with the steepest), so the leads' P waves count alike
    // and the biggest one does not alone set the edges.
    let slope = |t: &[f32], k: usize| ((t[k + 1] - t[k - 1]) * 0.5).abs();
    let shown: Vec<&Vec<f32>> = fine.iter().filter(|t| present(t)).collect();
    let peaks: Vec<f32> =
        shown.iter().map(|t| (start.max(1)..stop.min(w - 1)).map(|k| slope(t, k)).fold(0.0, f32::max)).collect();
    let top = peaks.iter().copied().fold(0.0f32, f32::max);
    let scales: Vec<f32> = peaks.iter().map(|&p| p.max(top / MAX_GAIN).max(f32::MIN_POSITIVE)).collect();
    let raw_env: Vec<f32> = (0..w)
        .map(|k| {
            if k == 0 || k + 1 >= w {
                return 0.0;
            }
            shown.iter().zip(&scales).map(|(t, s)| slope(t, k) / s).sum()
        })
        .collect();
    let env = smooth(&raw_env, (sig.samples(0.016).max(1)) | 1);
    let walk = Walk::new(&env, &shown, (start, stop), sig.samples(EDGE_REACH_S));
    let up = walk.steepest(start..peak)?;
    let down = walk.steepest(peak + 1..=stop)?;
    let quiet_before = env[start..=up].iter().copied().fold(f32::INFINITY, f32::min);
    let quiet_after = env[down..=stop].iter().copied().fold(f32::INFINITY, f32::min);
    let on_level = quiet_before + EDGE_FRACTION * (env[up] - quiet_before);
    let end_level = quiet_after + EDGE_FRACTION * (env[down] - quiet_after);
    // The walk also stops where the envelope stops falling (a local minimum) low enough that it is not a dip
    // within the limb: on a flat baseline the threshold may lie inside the noise of the summed envelope.
    let on_dip = quiet_before + DIP_FRACTION * (env[up] - quiet_before);
    let end_dip = quiet_after + DIP_FRACTION * (env[down] - quiet_after);
    let (on, up) = walk.onset(up, on_level, on_dip)?;
    let (end, down) = walk.end(down, end_level, end_dip)?;
    let from_start = on == start;
    let (on, end) = refine(sig, beats, w, &fine, (start, stop), (on, up, on_level), (end, down, end_level));
    Some(Edges { on, end, from_start })
}

/// A P wave's edges in a PR window, and whether the onset walk ran back to the search region's start.
struct Edges {
    on: usize,
    end: usize,
    from_start: bool,
}

/// Each of `leads`' |departure| from the straight line joining its values at `start` and `stop`, at every sample
/// of `start..=stop` (index 0 at `start`).
fn departures<'a>(leads: impl Iterator<Item = &'a Vec<f32>>, (start, stop): (usize, usize)) -> Vec<Vec<f32>> {
    leads
        .map(|t| {
            let (ya, yb) = (t[start], t[stop]);
            (start..=stop)
                .map(|k| (t[k] - (ya + (yb - ya) * (k - start) as f32 / (stop - start) as f32)).abs())
                .collect()
        })
        .collect()
}

/// `each` (one row per lead) summed over the leads, sample by sample.
fn summed(each: &[Vec<f32>]) -> Vec<f32> {
    let n = each.first().map_or(0, Vec::len);
    (0..n).map(|k| each.iter().map(|d| d[k]).sum()).collect()
}

/// The multi-lead P slope envelope `env` of the leads `shown`, walked out from a steepest slope to a P edge within
/// the search region `start..=stop`, at most `reach` samples: to where the envelope falls to its threshold, or
/// stops falling low enough that it is no dip within the limb (see [`DIP_FRACTION`]); where it does neither
/// (noise between P and T), to the quietest sample within reach. An edge where the leads still stand at more
/// than [`INSIDE_SHARE`] of the P wave's height is the still top of one phase of the wave, and the walk goes on
/// from the steepest slope within reach beyond it (past at most [`MAX_TOPS`] tops, and as many reaches).
struct Walk<'a> {
    env: &'a [f32],
    start: usize,
    stop: usize,
    reach: usize,
    /// The leads' summed |departure| from the straight lines joining their values at `start` and `stop`, per
    /// sample from `start`.
    departure: Vec<f32>,
    /// The largest of `departure`: the P wave's height.
    height: f32,
}

impl<'a> Walk<'a> {
    fn new(env: &'a [f32], shown: &[&Vec<f32>], (start, stop): (usize, usize), reach: usize) -> Self {
        let departure = summed(&departures(shown.iter().copied(), (start, stop)));
        let height = departure.iter().copied().fold(0.0, f32::max);
        Self { env, start, stop, reach, departure, height }
    }

    /// The sample of `r` where the envelope is steepest (highest).
    fn steepest(&self, r: impl Iterator<Item = usize>) -> Option<usize> {
        r.max_by(|&a, &b| self.env[a].total_cmp(&self.env[b]))
    }

    /// Whether the leads at `k` stand at more than [`INSIDE_SHARE`] of the P wave's height.
    fn inside(&self, k: usize) -> bool {
        self.departure[k - self.start] > INSIDE_SHARE * self.height
    }

    /// The quietest sample of `r`.
    fn quietest(&self, r: std::ops::RangeInclusive<usize>) -> Option<usize> {
        r.min_by(|&a, &b| self.env[a].total_cmp(&self.env[b]))
    }

    /// The P onset walked back from the steepest upslope `up` (threshold `level`, dip level `dip`), past at most
    /// [`MAX_TOPS`] still tops and no further than that many reaches before `up`; with the upslope it was last
    /// walked from.
    fn onset(&self, mut up: usize, level: f32, dip: f32) -> Option<(usize, usize)> {
        let env = self.env;
        let first = up.saturating_sub(MAX_TOPS * self.reach).max(self.start);
        let back = |up: usize| {
            let from = up.saturating_sub(self.reach).max(first);
            (from..=up)
                .rev()
                .find(|&k| env[k] <= level || (k > from && k < up && env[k] <= dip && env[k - 1] > env[k]))
                .or_else(|| self.quietest(from..=up))
        };
        let mut on = back(up)?;
        for _ in 0..MAX_TOPS {
            if !self.inside(on) {
                break;
            }
            match self.steepest(on.saturating_sub(self.reach).max(first)..on).filter(|&u| env[u] > dip) {
                Some(u) => (up, on) = (u, back(u)?),
                None => break,
            }
        }
        Some((on, up))
    }

    /// The P end walked on from the steepest downslope `down`, as [`Walk::onset`] walks back.
    fn end(&self, mut down: usize, level: f32, dip: f32) -> Option<(usize, usize)> {
        let env = self.env;
        let last = (down + MAX_TOPS * self.reach).min(self.stop);
        let forth = |down: usize| {
            let to = (down + self.reach).min(last);
            (down..=to)
                .find(|&k| env[k] <= level || (k > down && k < to && env[k] <= dip && env[k + 1] > env[k]))
                .or_else(|| self.quietest(down..=to))
        };
        let mut end = forth(down)?;
        for _ in 0..MAX_TOPS {
            if !self.inside(end) {
                break;
            }
            match self.steepest(end + 1..=(end + self.reach).min(last)).filter(|&d| env[d] > dip) {
                Some(d) => (down, end) = (d, forth(d)?),
                None => break,
            }
        }
        Some((end, down))
    }
}

/// Moves the P edges found on the envelope inward over the low-pass spread: the onset `on` (steepest upslope
/// `up`, threshold `on_level`) forward to the last sample before the unfiltered median leads step by more than
/// [`STILL`] times the threshold, at most [`SPREAD_S`] and not past `up`; the end likewise back towards `down`.
/// Only where those leads' noise over the search region `start..stop` outside the P wave (see [`NOISE_FACTOR`])
/// is below the same level, so noisy or coarsely quantised records keep the envelope's edges.
fn refine(
    sig: &Signals,
    beats: &[(usize, isize)],
    w: usize,
    fine: &[Vec<f32>],
    (start, stop): (usize, usize),
    (on, up, on_level): (usize, usize, f32),
    (end, down, end_level): (usize, usize, f32),
) -> (usize, usize) {
    let wide_segs: Vec<Vec<Vec<f32>>> =
        beats.iter().filter_map(|&(q, lag)| segment_of(sig, &sig.wide, q, lag, w, w)).collect();
    if wide_segs.is_empty() {
        return (on, end);
    }
    let raw = median_of(&wide_segs.iter().collect::<Vec<_>>(), w);
    let noise: f32 = raw
        .iter()
        .zip(fine)
        .filter(|(r, f)| present(r) && present(f))
        .map(|(r, f)| {
            // The two are levelled on different PR-segment means, so the deviation is taken about its median.
            let mut d: Vec<f32> = (start..on).chain(end + 1..stop).map(|k| r[k] - f[k]).collect();
            if d.is_empty() {
                return f32::INFINITY;
            }
            let mid = d.len() / 2;
            let offset = *d.select_nth_unstable_by(mid, f32::total_cmp).1;
            let mut dev: Vec<f32> = d.iter().map(|v| (v - offset).abs()).collect();
            NOISE_FACTOR * *dev.select_nth_unstable_by(mid, f32::total_cmp).1
        })
        .sum();
    let step = |k: usize| -> f32 { raw.iter().filter(|r| present(r)).map(|r| (r[k + 1] - r[k]).abs()).sum() };
    let spread = sig.samples(SPREAD_S);
    let on = if noise <= STILL * on_level {
        let reach = (on + spread).min(up);
        (on..reach).find(|&j| step(j) > STILL * on_level).unwrap_or(reach)
    } else {
        on
    };
    let end = if noise <= STILL * end_level && end > 0 {
        let back = end.saturating_sub(spread).max(down).max(1);
        (back..=end).rev().find(|&j| step(j - 1) > STILL * end_level).unwrap_or(back)
    } else {
        end
    };
    (on, end)
}

/// Sample-by-sample median over segments (per lead), over the segments where the lead is present (see
/// [`segment`]); a lead present in fewer than [`MIN_PRESENT`] of them (or in fewer than all of them, when there
/// are fewer) reads NaN.
fn median_of(segs: &[&Vec<Vec<f32>>], w: usize) -> Vec<Vec<f32>> {
    let leads = segs.first().map_or(0, |s| s.len());
    let mut col = Vec::with_capacity(segs.len());
    (0..leads)
        .map(|l| {
            let with: Vec<&Vec<f32>> = segs.iter().map(|s| &s[l]).filter(|t| present(t)).collect();
            if with.len() < MIN_PRESENT.min(segs.len()) {
                return vec![f32::NAN; w];
            }
            (0..w)
                .map(|k| {
                    col.clear();
                    col.extend(with.iter().map(|t| t[k]));
                    let mid = col.len() / 2;
                    *col.select_nth_unstable_by(mid, f32::total_cmp).1
                })
                .collect()
        })
        .collect()
}

impl PModel {
    /// Correlation of a beat's PR window with the template over the P wave (±20 ms), over the leads both hold
    /// together; `None` when they hold none in common.
    fn similarity(&self, seg: &[Vec<f32>]) -> Option<f64> {
        let w = self.template.first().map_or(0, Vec::len) as isize;
        let margin = self.margin as isize;
        let a = (w + self.on_rel - margin).clamp(0, w - 1) as usize;
        let b = (w + self.end_rel + margin).clamp(0, w) as usize;
        if b <= a + 2 {
            return Some(0.0);
        }
        let (mut x, mut y) = (Vec::new(), Vec::new());
        for (s, t) in seg.iter().zip(&self.template).filter(|(s, t)| present(s) && present(t)) {
            x.extend_from_slice(&s[a..b]);
            y.extend_from_slice(&t[a..b]);
        }
        (!x.is_empty()).then(|| correlation(&x, &y))
    }

    /// A model of the median PR window `template` with no edges yet, compared with beats over the P wave and
    /// `margin` samples either side.
    fn of(template: Vec<Vec<f32>>, margin: usize) -> Self {
        Self { on_rel: 0, end_rel: 0, template, margin, consistency: 0.0, t_held_back: false }
    }

    /// How many samples at the end of the PR window a beat must hold to be compared: only the P wave from its
    /// onset and the margin before it are compared, so a beat (the representative one) may start inside the
    /// window.
    fn compared_tail(&self) -> usize {
        (-self.on_rel).max(0) as usize + self.margin
    }

    /// The lag (within ± [`MAX_LAG_S`]) at which the PR window of the beat with QRS onset `qrs_on` matches the
    /// template best, with that correlation; only the last `need` samples of the window must lie inside the
    /// recording. `None` when no lag does.
    fn best_lag(&self, sig: &Signals, qrs_on: usize, need: usize) -> Option<(isize, f64)> {
        let max_lag = sig.samples(MAX_LAG_S) as isize;
        let w = self.template.first().map_or(0, Vec::len);
        let step = if sig.fs > 300.0 { 2 } else { 1 };
        let mut best: Option<(isize, f64)> = None;
        let mut lag = -max_lag;
        while lag <= max_lag {
            let c = segment(sig, qrs_on, lag, w, need).and_then(|seg| self.similarity(&seg));
            if let Some(c) = c.filter(|&c| best.is_none_or(|(_, b)| c > b)) {
                best = Some((lag, c));
            }
            lag += step;
        }
        best
    }

    /// P onset and end of the beat with this QRS onset: the template's boundaries at the lag (±24 ms) where
    /// the beat matches it best; `None` when the beat does not resemble the record's P wave or the P wave would
    /// start before `earliest`.
    #[must_use]
    pub fn for_beat(&self, sig: &Signals, qrs_on: usize, earliest: usize) -> Option<(usize, usize)> {
        let (lag, c) = self.best_lag(sig, qrs_on, self.compared_tail())?;
        if c < MIN_BEAT_CORR {
            return None;
        }
        let on = qrs_on as isize + lag + self.on_rel;
        let end = qrs_on as isize + lag + self.end_rel;
        (on >= earliest as isize && end > on && end < qrs_on as isize).then_some((on as usize, end as usize))
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    const FS: f64 = 500.0;

    /// Raised-cosine bump of `amp` µV from `a` to `b` seconds, peaking half-way.
    fn bump(t: f64, a: f64, b: f64, amp: f64) -> f32 {
        crate::delineate::tests::bump(t, a, (a + b) / 2.0, b, amp) as f32
    }

    /// Four leads with QRS onsets every 0.8 s (returned, samples). Leads 0–2 carry a 100 µV P wave from 160 to
    /// 60 ms before QRS onset; lead 3 alone carries a bigger (150 µV) earlier wave, 260–200 ms before QRS onset.
    fn leads_with_one_lead_bump() -> (Vec<Vec<f32>>, Vec<usize>) {
        let n = (6.0 * FS) as usize;
        let onsets: Vec<usize> = (1..7).map(|i| (i as f64 * 0.8 * FS) as usize).collect();
        let mut leads = vec![vec![0.0f32; n]; 4];
        for (l, lead) in leads.iter_mut().enumerate() {
            for (k, v) in lead.iter_mut().enumerate() {
                let t = k as f64 / FS;
                for &q in &onsets {
                    let q = q as f64 / FS;
                    *v +=
                        if l < 3 { bump(t, q - 0.160, q - 0.060, 100.0) } else { bump(t, q - 0.260, q - 0.200, 150.0) };
                }
            }
        }
        (leads, onsets)
    }

    /// The P model of two leads with QRS onsets every 0.8 s, each carrying `wave(t)` µV at `t` s from each QRS
    /// onset (the second lead at half size): its onset and end, ms from QRS onset.
    fn model_of(wave: impl Fn(f64) -> f64) -> (f64, f64) {
        let n = (6.0 * FS) as usize;
        let onsets: Vec<usize> = (1..7).map(|i| (i as f64 * 0.8 * FS) as usize).collect();
        let lead: Vec<f32> =
            (0..n).map(|k| onsets.iter().map(|&q| wave((k as f64 - q as f64) / FS)).sum::<f64>() as f32).collect();
        let half: Vec<f32> = lead.iter().map(|v| v * 0.5).collect();
        let sig = Signals::new(&[&lead, &half], FS);
        let pairs: Vec<(usize, usize)> = onsets.iter().map(|&q| (q, q - sig.samples(0.350))).collect();
        let m = model(&sig, &pairs).unwrap_or_else(|| panic!("no P model"));
        (m.on_rel as f64 / FS * 1000.0, m.end_rel as f64 / FS * 1000.0)
    }

    #[test]
    fn a_biphasic_p_wave_is_measured_from_its_first_phase_to_its_last() {
        // A slow upright phase (80 µV, 200 to 110 ms before QRS onset) overlapped by a steeper, deeper inverted one
        // (120 µV, 140 to 70 ms before), and the same wave mirrored in time. The steepest slope lies in the steep
        // phase, and walking out from it the slope envelope falls to its threshold at the slow phase's still top,
        // where the leads stand at two thirds of the wave's height: the edge lies beyond, where the slow phase
        // leaves (regains) the baseline. Without the rule the onset was the slow phase's top (−156 ms), and the
        // mirrored wave's end −114 ms.
        let slow_first = |t: f64| f64::from(bump(t, -0.200, -0.110, 80.0)) + f64::from(bump(t, -0.140, -0.070, -120.0));
        let (on, end) = model_of(slow_first);
        assert!((on + 200.0).abs() <= 10.0, "P onset {on} ms from QRS onset, the slow phase starts at −200");
        assert!((end + 70.0).abs() <= 10.0, "P end {end} ms from QRS onset, the wave ends at −70");
        let slow_last = |t: f64| slow_first(-0.270 - t);
        let (on, end) = model_of(slow_last);
        assert!((on + 200.0).abs() <= 10.0, "P onset {on} ms from QRS onset, the wave starts at −200");
        assert!((end + 70.0).abs() <= 10.0, "P end {end} ms from QRS onset, the slow phase ends at −70");
    }

    #[test]
    fn p_wave_is_where_the_leads_move_together_not_on_one_leads_bump() {
        let (leads, onsets) = leads_with_one_lead_bump();
        let refs: Vec<&[f32]> = leads.iter().map(Vec::as_slice).collect();
        let sig = Signals::new(&refs, FS);
        let pairs: Vec<(usize, usize)> = onsets.iter().map(|&q| (q, q - sig.samples(0.350))).collect();
        let m = model(&sig, &pairs).unwrap_or_else(|| panic!("no P model"));
        let on_ms = m.on_rel as f64 / FS * 1000.0;
        let end_ms = m.end_rel as f64 / FS * 1000.0;
        assert!((on_ms + 160.0).abs() <= 20.0, "P onset {on_ms} ms from QRS onset, wave starts at −160");
        assert!((end_ms + 60.0).abs() <= 20.0, "P end {end_ms} ms from QRS onset, wave ends at −60");
    }
}
