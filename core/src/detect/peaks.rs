//! Adaptive-threshold peak picking on the combined feature, after Pan & Tompkins (IEEE Trans Biomed Eng
//! 1985;32:230-6): running signal and noise peak levels, threshold a quarter of the way from noise to signal,
//! 200 ms refractory period, T-wave test within 360 ms (on the feature's height, and on the leads' curvature for
//! a T wave taller than the QRS, see [`super::t_wave`]), search-back at half threshold after 1.66 mean RR. A peak
//! the height test refused is taken back as a premature beat when a pause follows it ([`PAUSE_RR`]).

/// Refractory period, s. Source: Pan & Tompkins 1985.
const REFRACTORY_S: f64 = 0.200;
/// A peak this soon after a QRS is tested for being its T wave, s. Source: Pan & Tompkins 1985 (360 ms T-wave
/// discrimination).
const T_WAVE_S: f64 = 0.360;
/// Search back when no QRS has come for this many mean RR intervals. Source: Pan & Tompkins 1985.
const SEARCH_BACK_RR: f64 = 1.66;
/// A peak within [`T_WAVE_S`] of a QRS that its height alone marked as a T wave was a premature beat when the
/// next QRS comes at least this many mean RR intervals after it: the pause after a premature beat (a T wave or a
/// burst of noise is followed by the next beat on time, sooner than one RR).
// Common practice, no source: a premature ventricular beat is followed by a full compensatory pause (coupling
// plus pause = two RR), a premature atrial beat by a pause of about one RR as the sinus node is reset.
const PAUSE_RR: f64 = 1.0;

/// Median of the last eight of `v` (the upper one of an even count); `None` when empty.
fn median_recent(v: &[f64]) -> Option<f64> {
    let mut r: Vec<f64> = v[v.len().saturating_sub(8)..].to_vec();
    let mid = r.len() / 2;
    (!r.is_empty()).then(|| *r.select_nth_unstable_by(mid, f64::total_cmp).1)
}

/// Local maxima of `x` that are the largest value within ± the refractory period.
fn candidates(x: &[f32], fs: f64) -> Vec<usize> {
    let r = ((REFRACTORY_S * fs) as usize).max(1);
    let n = x.len();
    let mut out = Vec::new();
    // Sliding-window maximum over [k − r, k + r] with a monotone deque.
    let mut dq: std::collections::VecDeque<usize> = std::collections::VecDeque::new();
    let mut next = 0;
    for k in 0..n {
        while next < n && next <= k + r {
            while dq.back().is_some_and(|&b| x[b] <= x[next]) {
                dq.pop_back();
            }
            dq.push_back(next);
            next += 1;
        }
        while dq.front().is_some_and(|&f| f + r < k) {
            dq.pop_front();
        }
        if dq.front() == Some(&k) && x[k] > 0.0 && out.last().is_none_or(|&l: &usize| k - l > r / 2) {
            // On a flat top (every lead clipped at once: a very large deflection, or a step of the baseline) the
            // peak is the middle of the top, not its last sample: from the last, a beat soon after an artefact
            // fell within the T-wave test of the plateau's end and was lost.
            out.push(flat_top_middle(x, k, r));
        }
    }
    out
}

/// The middle of the run of values equal to `x[k]` that ends at `k` (at most `reach` samples back); `k` itself
/// when `x[k - 1]` differs, as it does at almost every peak.
fn flat_top_middle(x: &[f32], k: usize, reach: usize) -> usize {
    if k == 0 || x[k - 1] != x[k] {
        return k;
    }
    let first = (k.saturating_sub(reach)..k).rev().take_while(|&j| x[j] == x[k]).last().unwrap_or(k);
    (first + k) / 2
}

/// QRS positions (feature peak samples) found on the combined, normalised feature `x` (≈ 1 at a typical QRS).
/// A candidate within [`T_WAVE_S`] of the last QRS is its T wave when its feature is under half that QRS's
/// (Pan & Tompkins' test on the integrated energy rather than the slope), or when `rounded(beats, c)` says the
/// candidate at feature peak `c` is far more rounded than the QRS of the beats found so far (`beats`, feature
/// peaks; see [`super::t_wave`]): a T wave taller than the QRS.
pub fn pick(x: &[f32], fs: f64, mut rounded: impl FnMut(&[usize], usize) -> bool) -> Vec<usize> {
    let cand = candidates(x, fs);
    let t_wave = (T_WAVE_S * fs) as usize;
    // The feature is normalised, so levels start from the typical QRS height and a low noise level.
    let mut spk = 1.0f64;
    let mut npk = 0.1f64;
    let mut rr: Vec<f64> = Vec::new();
    let mut beats: Vec<usize> = Vec::new();
    let mut pending: Vec<usize> = Vec::new(); // rejected candidates since the last QRS
    // Candidates since the last QRS above the threshold that the T-wave test refused on their height alone: their
    // noise level waits until the next QRS says whether one of them was a premature beat.
    let mut refused: Vec<usize> = Vec::new();
    // RR intervals of the rhythm the pause is judged against: between two beats taken on their own (not in the
    // search-back, not premature), with no refused candidate between them.
    let mut steady_rr: Vec<f64> = Vec::new();
    let mut last_premature = false;
    let mut any_refused = false;
    let thr = |spk: f64, npk: f64| npk + 0.25 * (spk - npk);
    let rr_mean = |rr: &[f64]| -> Option<f64> {
        (rr.len() >= 2).then(|| rr.iter().rev().take(8).sum::<f64>() / rr.len().min(8) as f64)
    };
    let accept = |p: usize, beats: &mut Vec<usize>, rr: &mut Vec<f64>| {
        if let Some(&last) = beats.last() {
            rr.push((p - last) as f64);
        }
        beats.push(p);
    };
    let as_noise = |v: f32, npk: f64| 0.125 * f64::from(v) + 0.875 * npk;
    for &c in &cand {
        // Search-back: a long gap since the last QRS → take the largest pending peak above half threshold.
        if let (Some(&last), Some(m)) = (beats.last(), rr_mean(&rr))
            && (c - last) as f64 > SEARCH_BACK_RR * m
        {
            let th2 = 0.5 * thr(spk, npk);
            let best = pending
                .iter()
                .copied()
                .filter(|&p| p > last + t_wave.min((0.6 * m) as usize) / 2 && f64::from(x[p]) > th2)
                .max_by(|&a, &b| x[a].total_cmp(&x[b]));
            if let Some(p) = best {
                spk = 0.25 * f64::from(x[p]) + 0.75 * spk;
                accept(p, &mut beats, &mut rr);
                pending.retain(|&q| q > p);
                for q in refused.extract_if(.., |q| *q <= p) {
                    if q != p {
                        npk = as_noise(x[q], npk);
                    }
                }
            }
        }
        let v = f64::from(x[c]);
        let above = v > thr(spk, npk);
        let (is_qrs, low) = match beats.last() {
            Some(&last) if c - last < t_wave => {
                let tall = v > 0.5 * f64::from(x[last]);
                (above && tall && !rounded(&beats, c), above && !tall)
            }
            _ => (above, false),
        };
        if is_qrs {
            // A peak the height test refused was a premature beat when the QRS that follows it comes after a
            // pause (see [`PAUSE_RR`]) and it is not rounded like a T wave.
            let premature = median_recent(&steady_rr).and_then(|m| {
                refused
                    .iter()
                    .copied()
                    .filter(|&p| (c - p) as f64 >= PAUSE_RR * m)
                    .max_by(|&a, &b| x[a].total_cmp(&x[b]))
                    .filter(|&p| !rounded(&beats, p))
            });
            if let Some(&last) = beats.last()
                && !last_premature
                && !any_refused
            {
                steady_rr.push((c - last) as f64);
            }
            for q in refused.drain(..) {
                if Some(q) == premature {
                    spk = 0.125 * f64::from(x[q]) + 0.875 * spk;
                    accept(q, &mut beats, &mut rr);
                } else {
                    npk = as_noise(x[q], npk);
                }
            }
            spk = 0.125 * v + 0.875 * spk;
            accept(c, &mut beats, &mut rr);
            last_premature = premature.is_some();
            any_refused = false;
            pending.clear();
        } else {
            any_refused |= low;
            if low {
                refused.push(c);
            } else {
                npk = as_noise(x[c], npk);
            }
            pending.push(c);
        }
    }
    beats
}

#[cfg(test)]
// Test signals are written sample by sample at the index they describe.
#[allow(clippy::needless_range_loop)]
mod tests {
    use super::*;

    #[test]
    fn picks_regular_peaks_and_skips_small_waves() {
        let fs = 250.0;
        let mut x = vec![0.0f32; 5000];
        for b in 0..19 {
            let r: usize = 125 + b * 250;
            for k in r.saturating_sub(10)..r + 10 {
                x[k] = 1.0 - (k as f32 - r as f32).abs() / 10.0;
            }
            let t = r + 75;
            for k in t - 15..t + 15 {
                x[k] = 0.15 * (1.0 - (k as f32 - t as f32).abs() / 15.0);
            }
        }
        let b = pick(&x, fs, |_, _| false);
        assert_eq!(b.len(), 19);
        assert!(b.iter().enumerate().all(|(i, &p)| p == 125 + i * 250));
    }

    #[test]
    fn search_back_finds_a_small_beat() {
        let fs = 250.0;
        let mut x = vec![0.0f32; 5000];
        for b in 0..19 {
            let r: usize = 125 + b * 250;
            let h = if b == 10 { 0.2 } else { 1.0 };
            for k in r - 10..r + 10 {
                x[k] = h * (1.0 - (k as f32 - r as f32).abs() / 10.0);
            }
        }
        assert_eq!(pick(&x, fs, |_, _| false).len(), 19);
    }

    #[test]
    fn a_tall_rounded_peak_soon_after_a_beat_is_its_t_wave() {
        // Beats every second, each followed 280 ms later by a peak above half its height (0.8) or under (0.4).
        let fs = 250.0;
        for (h, by_height) in [(0.8, 38), (0.4, 19)] {
            let mut x = vec![0.0f32; 5000];
            for b in 0..19 {
                let r: usize = 125 + b * 250;
                for (at, h) in [(r, 1.0), (r + 70, h)] {
                    for k in at - 10..at + 10 {
                        x[k] = x[k].max(h * (1.0 - (k as f32 - at as f32).abs() / 10.0));
                    }
                }
            }
            // Not rounded: the feature's height decides.
            assert_eq!(pick(&x, fs, |_, _| false).len(), by_height, "{h}");
            // Rounded: none is taken; the test is asked only about peaks the height would take, after a beat.
            let mut asked = 0;
            let rounded = |beats: &[usize], c: usize| {
                asked += 1;
                assert!(beats.last().is_some_and(|&last| c > last && c - last < (T_WAVE_S * fs) as usize));
                true
            };
            assert_eq!(pick(&x, fs, rounded).len(), 19, "{h}");
            assert_eq!(asked > 0, h > 0.5, "{h}: asked {asked} times");
        }
    }

    #[test]
    fn a_low_peak_soon_after_a_beat_is_a_premature_beat_only_before_a_pause() {
        // Beats every 100 samples (400 ms at 250 Hz); after every third one a peak 0.45 high 60 samples later (240
        // ms, under half the beat's height). Followed by a pause (the next beat 160 samples after the one before
        // it, 100 after the peak: one RR, and too soon for the search-back), it is a premature beat when not
        // rounded; followed by the next beat on time, or rounded, it is a T wave.
        let fs = 250.0;
        for (pause, is_rounded) in [(true, false), (true, true), (false, false)] {
            let mut x = vec![0.0f32; 8000];
            let mut r = 100;
            let (mut n, mut low) = (0, 0);
            while r + 200 < x.len() {
                for k in r - 10..r + 10 {
                    x[k] = 1.0 - (k as f32 - r as f32).abs() / 10.0;
                }
                n += 1;
                if n % 3 == 0 {
                    low += 1;
                    let t = r + 60;
                    for k in t - 10..t + 10 {
                        x[k] = 0.45 * (1.0 - (k as f32 - t as f32).abs() / 10.0);
                    }
                    r += if pause { 160 } else { 100 };
                } else {
                    r += 100;
                }
            }
            let want = if pause && !is_rounded { n + low } else { n };
            assert_eq!(pick(&x, fs, |_, _| is_rounded).len(), want, "pause {pause}, rounded {is_rounded}");
        }
    }
}
