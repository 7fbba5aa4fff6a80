//! Per-lead QRS feature signals in the manner of Pan & Tompkins (IEEE Trans Biomed Eng 1985;32:230-6):
//! band-pass 5–15 Hz, five-point derivative, squaring, moving-window integration (150 ms), causal as in the
//! original, computed in one streaming pass per lead. Each lead is normalised by its local typical QRS
//! height and clipped, and the leads are averaged with weights that fall for leads without a clear QRS.

use std::ops::Range;

use crate::filter::Biquad;

/// Length of a normalisation block, seconds.
const BLOCK_S: f64 = 2.0;
/// Blocks on each side over which the typical QRS height is the lower quartile of the block maxima (≈ 1 min).
const BLOCK_SPAN: usize = 15;
/// A lead's normalised feature is clipped here, so a noise burst in one lead cannot dominate.
const CLIP: f32 = 2.5;

/// A lead whose feature autocorrelates at least this much at some heart-rhythm lag is rhythmic ([`rhythmic`]).
// Common practice, no source: a clearly repeating pattern; noise gives about 0.1.
const RHYTHMIC: f64 = 0.5;
/// Lags searched for a heart rhythm, s (220 down to 30 bpm).
const RHYTHM_LAGS_S: (f64, f64) = (0.27, 2.0);
/// A rhythmic lead gets weight from this ratio of its QRS height to its feature's lower decile (noise gives 2–5,
/// four to eight times less than a lead with a clear QRS; see [`normalise`]).
// Common practice, no source.
const RHYTHMIC_FLOOR: f64 = 4.0;

/// Feature signals of a recording.
pub struct Features {
    /// Weighted mean of the leads' normalised features (≈ 1 at a typical QRS). Causal: it lags the QRS by
    /// about [`lag_s`] seconds.
    pub combined: Vec<f32>,
    /// Each lead's weight in `combined` (0 for a flat or shapeless lead).
    pub weights: Vec<f64>,
}

/// Leads of at least this many samples are prepared on several cores at once; shorter ones one after another,
/// where starting the threads costs more than it saves (a 10-s 12-lead record took 4 ms longer in parallel).
const PARALLEL_FROM: usize = 1 << 20;

/// Most leads prepared at once: each holds a feature of 4 bytes per sample (173 MB for 24 h at 500 Hz).
const AT_ONCE: usize = 4;

/// Moving-window integration width, s. Source: Pan & Tompkins 1985 (150 ms).
const MWI_S: f64 = 0.150;

/// How far the feature's peak lags the middle of the QRS, s: half the integration window plus the band-pass
/// group delay near 10 Hz (≈ 20 ms for the two second-order sections).
#[must_use]
pub fn lag_s() -> f64 {
    MWI_S / 2.0 + 0.020
}

/// Computes the feature signals. `leads` are raw samples (µV, NaN = invalid, bridged by a straight line).
/// One streaming pass per lead (band-pass, derivative, square, integrate), so a 24-h Holter stays fast. Leads of
/// [`PARALLEL_FROM`] samples or more are prepared on the rayon pool's threads, at most [`AT_ONCE`] at a time (each
/// holds a feature as long as the recording); they are added in lead order, so the result does not depend on
/// the number of threads.
pub fn features(leads: &[&[f32]], fs: f64) -> Features {
    let f = features_judged(leads, fs, false);
    // Only where no lead shows a clear QRS are leads judged by their rhythm as well (see [`rhythmic`]): a lead with a
    // rhythm under heavy noise would otherwise join leads with a clear QRS, and its noise their beats' shapes.
    if f.weights.iter().all(|&w| w == 0.0) { features_judged(leads, fs, true) } else { f }
}

/// [`features`], with leads that show no clear QRS judged by their rhythm when `by_rhythm`.
fn features_judged(leads: &[&[f32]], fs: f64, by_rhythm: bool) -> Features {
    use rayon::prelude::*;
    let n = leads.first().map_or(0, |l| l.len());
    let mut combined = vec![0.0f32; n];
    let mut weights = Vec::with_capacity(leads.len());
    let prepare = |lead: &&[f32]| {
        // Each lead's runs of invalid samples are found once, for its feature and for where it is absent.
        let runs = crate::gaps::invalid_runs(lead);
        let mwi = lead_feature(lead, &runs, fs);
        let (local, weight) = normalise(&mwi, fs, &runs, by_rhythm);
        (mwi, local, weight, runs)
    };
    let at_once = if n >= PARALLEL_FROM { rayon::current_num_threads().clamp(1, AT_ONCE) } else { 1 };
    // Where some lead is absent somewhere: the weight of the leads absent at each sample, and what they would
    // have added (bridged), used where no lead is present.
    let mut absent: Option<(Vec<f32>, Vec<f32>)> = None;
    for group in leads.chunks(at_once) {
        let prepared: Vec<_> =
            if group.len() > 1 { group.par_iter().map(prepare).collect() } else { group.iter().map(prepare).collect() };
        for (mut mwi, local, weight, runs) in prepared {
            let spans = absent_spans(runs, n, fs);
            if weight > 0.0 && !spans.is_empty() {
                let (missing, hidden) = absent.get_or_insert_with(|| (vec![0.0; n], vec![0.0; n]));
                let mut part = vec![0.0f32; n];
                for span in spans {
                    part[span.clone()].copy_from_slice(&mwi[span.clone()]);
                    mwi[span.clone()].fill(0.0);
                    missing[span].iter_mut().for_each(|m| *m += weight as f32);
                }
                add_lead(hidden, &part, &local, weight, fs);
            }
            add_lead(&mut combined, &mwi, &local, weight, fs);
            weights.push(weight);
        }
    }
    let total: f64 = weights.iter().sum();
    if total > 0.0 {
        let inv = (1.0 / total) as f32;
        match &absent {
            // Divided by the weight of the leads present: where some leads are missing the others still give
            // about 1 at a QRS, so their beats are found (before, one lead of twelve left gave a twelfth). Where
            // none is present, the absent leads as bridged count after all (a QRS partly lost in every lead).
            Some((missing, hidden)) => combined.iter_mut().zip(missing).zip(hidden).for_each(|((c, &m), &h)| {
                let present = total as f32 - m;
                *c = if present > 1e-6 * total as f32 { *c / present } else { (*c + h) * inv };
            }),
            None => combined.iter_mut().for_each(|c| *c *= inv),
        }
    }
    Features { combined, weights }
}

/// The samples over which `lead` is absent from the combined feature (bridged by a straight line there, its
/// feature is near zero, then has a corner where the signal resumes): each run of
/// [`crate::gaps::ABSENT_RUN_S`] or more of invalid samples, and the feature's reach after it (the integration
/// window and the band-pass settling on the resumed signal, [`MWI_S`] + 50 ms). `runs` are the lead's runs of
/// invalid samples ([`crate::gaps::invalid_runs`]), `n` its length.
fn absent_spans(runs: Vec<Range<usize>>, n: usize, fs: f64) -> Vec<Range<usize>> {
    let reach = ((MWI_S + 0.050) * fs).round() as usize;
    let mut spans: Vec<Range<usize>> = Vec::new();
    for run in crate::gaps::absent_among(runs, fs) {
        let span = run.start..(run.end + reach).min(n);
        match spans.last_mut() {
            Some(last) if last.end >= span.start => last.end = span.end,
            _ => spans.push(span),
        }
    }
    spans
}

/// Adds one lead's feature `mwi`, normalised by its local heights `local` (one per block) and clipped at [`CLIP`],
/// times its `weight`, to `combined`.
fn add_lead(combined: &mut [f32], mwi: &[f32], local: &[f32], weight: f64, fs: f64) {
    if weight <= 0.0 {
        return;
    }
    // Block by block, multiplying by each block's reciprocal height (no division per sample, no normalised copy
    // of the lead).
    let block = block_len(fs);
    for ((c, m), &l) in combined.chunks_mut(block).zip(mwi.chunks(block)).zip(local) {
        let inv = 1.0 / l;
        for (c, &v) in c.iter_mut().zip(m) {
            *c += (weight as f32) * (v * inv).min(CLIP);
        }
    }
}

/// Band-pass 5–15 Hz (causal second-order Butterworth sections), five-point derivative, squaring and a
/// trailing moving-window mean of 150 ms, in one pass. `runs` are the lead's runs of invalid samples
/// ([`crate::gaps::invalid_runs`]).
fn lead_feature(x: &[f32], runs: &[Range<usize>], fs: f64) -> Vec<f32> {
    let hp = Biquad::highpass(5.0, fs);
    let lp = Biquad::lowpass(15.0_f64.min(fs * 0.45), fs);
    // Invalid samples are bridged by a straight line (as `fill_invalid` does): held at the last valid value,
    // a lead resuming after a loss stepped, and the step's feature after a stretch with no lead recorded was
    // taken for a beat (LUDB 24 with every lead lost for 0.4 s: a beat on the T wave of the beat lost, and the
    // next beat typed other by its short RR).
    let mut run = runs.iter().peekable();
    let first = x.iter().copied().find(|v| v.is_finite()).map_or(0.0, f64::from);
    let mut sh = hp.state_for(first);
    let mut sl = lp.state_for(0.0);
    let w = ((MWI_S * fs).round() as usize).max(1);
    let mut ring = vec![0.0f64; w];
    let mut sum = 0.0f64;
    let mut out = vec![0.0f32; x.len()];
    // No division per sample (the ring's slot wraps, the mean multiplies by 1/w): on a 24-h recording each
    // division costs about a tenth of the detector's time.
    let mut slot = 0;
    let inv_w = 1.0 / w as f64;
    // The band-passed lead's last five samples, oldest first, in variables, and the output written in place: with
    // an array rotated each sample and the output pushed, a 24-h lead at 250 Hz took 0.30 s, now 0.17 s.
    let (mut y0, mut y1, mut y2, mut y3) = (0.0f64, 0.0f64, 0.0f64, 0.0f64);
    for (k, (&v, o)) in x.iter().zip(out.iter_mut()).enumerate() {
        let u = if v.is_finite() {
            f64::from(v)
        } else {
            while run.next_if(|r| r.end <= k).is_some() {}
            run.peek().map_or(0.0, |r| crate::filter::bridged(x, r, k))
        };
        let y4 = lp.step(&mut sl, hp.step(&mut sh, u));
        // Derivative centred two samples back: (2x[k−1] + x[k] − x[k−4] − 2x[k−3]) / 8.
        let d = (2.0 * y3 + y4 - y0 - 2.0 * y1) / 8.0;
        (y0, y1, y2, y3) = (y1, y2, y3, y4);
        let sq = d * d;
        sum += sq - ring[slot];
        ring[slot] = sq;
        slot = if slot + 1 == w { 0 } else { slot + 1 };
        *o = (sum.max(0.0) * inv_w) as f32;
    }
    out
}

fn median(v: &mut [f32]) -> f32 {
    if v.is_empty() {
        return 0.0;
    }
    let mid = v.len() / 2;
    *v.select_nth_unstable_by(mid, f32::total_cmp).1
}

/// Lower quartile of `v` (reordered); 0 when empty.
/// With fewer than four values, the median: the lower quartile of two or three is their least, which in a
/// recording of a few seconds is a short last block or one with no QRS.
fn lower_quartile(v: &mut [f32]) -> f32 {
    if v.is_empty() {
        return 0.0;
    }
    let at = if v.len() >= 4 { v.len() / 4 } else { v.len() / 2 };
    *v.select_nth_unstable_by(at, f32::total_cmp).1
}

/// Per block of `block` samples of `n`, how many fall in `runs` (sorted, not overlapping): one pass over the runs.
fn missing_per_block(runs: &[Range<usize>], n: usize, block: usize) -> Vec<usize> {
    let mut missing = vec![0usize; n.div_ceil(block)];
    for r in runs {
        let mut k = r.start.min(n);
        while k < r.end.min(n) {
            let b = k / block;
            let e = ((b + 1) * block).min(r.end).min(n);
            missing[b] += e - k;
            k = e;
        }
    }
    missing
}

/// Samples per normalisation block.
fn block_len(fs: f64) -> usize {
    ((BLOCK_S * fs) as usize).max(1)
}

/// The local typical QRS height of each block of [`block_len`] samples (lower quartile of the 2-s block maxima
/// over ≈ 1 min) and the lead's weight: 1 when QRS peaks stand far above the feature's median level, falling to 0
/// for a flat lead or one that looks like noise throughout (no heights then). `runs` are the lead's runs of
/// invalid samples: a block more than a tenth missing has no maximum of its own (its QRS may be lost).
///
/// The lower quartile, not the median: where brief artefacts (electrode pops) fall in most blocks, the median
/// maximum was an artefact's, every real QRS read as a tenth of typical and was missed (three 10-ms 3-mV pulses
/// in 10 s: 3 beats found of 12).
fn normalise(mwi: &[f32], fs: f64, runs: &[Range<usize>], by_rhythm: bool) -> (Vec<f32>, f64) {
    let n = mwi.len();
    let block = block_len(fs);
    let missing = missing_per_block(runs, n, block);
    // A block counts when at most a tenth of it is missing and it is at least half a block long (a recording's
    // short last block may hold no QRS).
    let maxima: Vec<Option<f32>> = mwi
        .chunks(block)
        .zip(&missing)
        .map(|(c, &m)| (m * 10 <= c.len() && c.len() * 2 >= block).then(|| c.iter().copied().fold(0.0, f32::max)))
        .collect();
    let mut all: Vec<f32> = maxima.iter().flatten().copied().collect();
    if all.is_empty() {
        all = mwi.chunks(block).map(|c| c.iter().copied().fold(0.0, f32::max)).collect();
    }
    let typical = lower_quartile(&mut all);
    let step = (n / 200_000).max(1);
    let mut sub: Vec<f32> = mwi.iter().step_by(step).copied().collect();
    let level = median(&mut sub);
    // The lower decile of the samples recorded (over a bridged stretch the feature is about 0: a lead a tenth
    // missing would read as clean).
    let mut recorded: Vec<f32> = Vec::with_capacity(sub.len());
    let mut run = runs.iter().peekable();
    for k in (0..n).step_by(step) {
        while run.next_if(|r| r.end <= k).is_some() {}
        if run.peek().is_none_or(|r| k < r.start) {
            recorded.push(mwi[k]);
        }
    }
    let decile = recorded.len() / 10;
    let low = if recorded.is_empty() { level } else { *recorded.select_nth_unstable_by(decile, f32::total_cmp).1 };
    if typical.is_nan() || typical <= 1e-6 {
        return (Vec::new(), 0.0);
    }
    // Common practice, no source: QRS energy peaks of a clean lead are tens of times the median feature level;
    // pure noise gives a ratio of a few.
    let ratio = f64::from(typical) / (f64::from(level) + 1e-12);
    // At fast rates the QRS energy and its integration window fill most of each RR (at 200 bpm, 80 ms of QRS and
    // 150 ms of window in every 300 ms), so the median is QRS energy and a clean lead read as noise: a 180-bpm
    // rhythm gave no beat at all. A lead the median calls noise is judged again on the lower decile, which still
    // falls between the complexes up to about 220 bpm; for noise it is about half the median (a white-noise
    // lead: ratios 2.3 and 4.5, measured with the median block maximum as the typical height), so its limits are
    // doubled. A lead the median accepts keeps its weight: taking the larger weight everywhere raised wide paced
    // leads (LUDB 45, median ratios 8–17, measured likewise) and moved R peaks from one lead's peak to another's.
    // Common practice, no source.
    let ratio_low = f64::from(typical) / (f64::from(low) + 1e-12);
    let by_median = ((ratio - 4.0) / 16.0).clamp(0.0, 1.0);
    let by_low = ((ratio_low - 8.0) / 32.0).clamp(0.0, 1.0);
    // Fast rhythms with a small QRS and tall T waves (180 bpm, QRS 0.5 mV, T 0.4 mV: lower-decile ratio 6.8 on every
    // lead, no beat at all) are told from noise by their rhythm instead ([`rhythmic`]), above a lower floor, when
    // `by_rhythm` (no lead of the recording passed otherwise). Common practice, no source. Measured: such rhythms
    // at 180 bpm autocorrelate 0.92–0.97 at their RR and −0.7 to −0.8 at half of it; white and muscle noise at most
    // 0.12 (lower-decile ratios 3.8–4.6); tremor at 3–8 Hz 0.5–0.84, but 0.54–0.92 at half the lag (ratios 1.3–3.7).
    let weight = if by_median > 0.0 {
        by_median
    } else if by_low > 0.0 {
        by_low
    } else if by_rhythm && rhythmic(mwi, fs) {
        ((ratio_low - RHYTHMIC_FLOOR) / 32.0).clamp(0.0, 1.0)
    } else {
        0.0
    };
    if weight == 0.0 {
        return (Vec::new(), 0.0);
    }
    let mut local = Vec::with_capacity(maxima.len());
    let mut buf = Vec::with_capacity(2 * BLOCK_SPAN + 1);
    for b in 0..maxima.len() {
        buf.clear();
        buf.extend(maxima[b.saturating_sub(BLOCK_SPAN)..(b + BLOCK_SPAN + 1).min(maxima.len())].iter().flatten());
        let height = if buf.is_empty() { typical } else { lower_quartile(&mut buf) };
        local.push(height.max(typical * 0.05));
    }
    (local, weight)
}

/// Whether a lead's feature repeats like a heart rhythm: its normalised autocorrelation (feature sampled every 20
/// ms over the first minute, mean removed) reaches [`RHYTHMIC`] at some lag between 0.27 s (220 bpm) and 2 s (30
/// bpm), and at half that lag stays under half as much. The energy of a tremor repeats at its own period, and so also
/// at twice it; a heart rhythm's falls between the complexes at half its period.
fn rhythmic(mwi: &[f32], fs: f64) -> bool {
    let step = ((0.020 * fs).round() as usize).max(1);
    let take = ((60.0 * fs) as usize).min(mwi.len());
    let v: Vec<f64> = mwi[..take].iter().step_by(step).map(|&x| f64::from(x)).collect();
    let mean = v.iter().sum::<f64>() / v.len().max(1) as f64;
    let v: Vec<f64> = v.iter().map(|x| x - mean).collect();
    let energy: f64 = v.iter().map(|x| x * x).sum();
    // Normalised for the overlap's length, so a long lag is not penalised.
    let acf = |lag: usize| -> f64 {
        if lag >= v.len() || energy <= 0.0 {
            return 0.0;
        }
        let sum: f64 = v.iter().zip(&v[lag..]).map(|(a, b)| a * b).sum();
        sum / energy * v.len() as f64 / (v.len() - lag) as f64
    };
    let dt = step as f64 / fs;
    let (lo, hi) = ((RHYTHM_LAGS_S.0 / dt).round() as usize, (RHYTHM_LAGS_S.1 / dt).round() as usize);
    let Some((lag, peak)) = (lo..=hi).map(|lag| (lag, acf(lag))).max_by(|a, b| a.1.total_cmp(&b.1)) else {
        return false;
    };
    peak >= RHYTHMIC && acf(lag / 2) < 0.5 * peak
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn missing_samples_are_counted_per_block() {
        assert_eq!(missing_per_block(&[2..5, 7..13], 15, 4), vec![2, 2, 4, 1]);
        assert_eq!(missing_per_block(&[], 8, 4), vec![0, 0]);
        assert_eq!(missing_per_block(&[6..20, 30..31], 8, 4), vec![0, 2]);
        let mut few = [5.0f32, 1.0, 9.0];
        assert_eq!(lower_quartile(&mut few), 5.0, "the median of three");
        let mut more = [5.0f32, 1.0, 9.0, 7.0, 3.0];
        assert_eq!(lower_quartile(&mut more), 3.0);
    }

    #[test]
    fn streaming_feature_matches_step_by_step_computation() {
        let fs = 250.0;
        let x: Vec<f32> = (0..2000).map(|k| (k as f32 * 0.21).sin() * 300.0 + ((k * 37) % 17) as f32 * 5.0).collect();
        let fast = lead_feature(&x, &[], fs);
        // Slow and obvious: filter the whole lead, then derivative, square, trailing mean of 38 samples.
        let mut y: Vec<f64> = x.iter().map(|&v| f64::from(v)).collect();
        Biquad::highpass(5.0, fs).run(&mut y);
        let lp = Biquad::lowpass(15.0, fs);
        let mut s = lp.state_for(0.0);
        for v in y.iter_mut() {
            *v = lp.step(&mut s, *v);
        }
        let w = 38;
        let d2: Vec<f64> = (0..y.len())
            .map(|k| {
                let at = |i: isize| if i < 0 { 0.0 } else { y[i as usize] };
                let k = k as isize;
                let d = (2.0 * at(k - 1) + at(k) - at(k - 4) - 2.0 * at(k - 3)) / 8.0;
                d * d
            })
            .collect();
        for k in 100..2000 {
            let slow = d2[k + 1 - w..=k].iter().sum::<f64>() / w as f64;
            assert!((f64::from(fast[k]) - slow).abs() <= 1e-3 * slow.max(1.0), "{k}: {} vs {slow}", fast[k]);
        }
    }

    #[test]
    fn leads_prepared_in_parallel_give_the_same_feature() {
        // Long enough to be prepared on several cores; the same leads on a one-thread pool give the same bits.
        let fs = 250.0;
        let n = PARALLEL_FROM + 1000;
        let lead = |f: f32, a: f32| -> Vec<f32> { (0..n).map(|k| a * (k as f32 * f).sin().powi(21)).collect() };
        let leads = [lead(0.025, 1000.0), lead(0.0251, -700.0), vec![0.0; n]];
        let refs: Vec<&[f32]> = leads.iter().map(Vec::as_slice).collect();
        let two = rayon::ThreadPoolBuilder::new().num_threads(2).build().unwrap_or_else(|e| panic!("{e}"));
        let one = rayon::ThreadPoolBuilder::new().num_threads(1).build().unwrap_or_else(|e| panic!("{e}"));
        let (a, b) = (two.install(|| features(&refs, fs)), one.install(|| features(&refs, fs)));
        assert_eq!(a.weights, b.weights);
        assert!(a.weights[0] > 0.0 && a.weights[2] == 0.0, "{:?}", a.weights);
        assert!(a.combined.iter().zip(&b.combined).all(|(x, y)| x.to_bits() == y.to_bits()));
    }

    #[test]
    fn flat_lead_gets_no_weight() {
        let flat = vec![100.0f32; 5000];
        let f = features(&[&flat], 250.0);
        assert_eq!(f.weights, vec![0.0]);
        assert!(f.combined.iter().all(|&v| v == 0.0));
    }
}
