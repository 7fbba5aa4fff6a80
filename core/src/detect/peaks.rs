//! Adaptive-threshold peak picking on the combined feature, after Pan & Tompkins (IEEE Trans Biomed Eng
//! 1985;32:230-6): running signal and noise peak levels, threshold a quarter of the way from noise to signal,
//! 200 ms refractory period, T-wave test within 360 ms (on the feature's height, and on the leads' curvature for
//! a T wave taller than the QRS, see [`super::t_wave`]), search-back at half threshold after 1.66 mean RR. Peaks are
//! sought within ±100 ms, so that a beat closely followed by a larger one is not hidden by it (see [`candidates`]).

/// Refractory period, s. Source: Pan & Tompkins 1985.
const REFRACTORY_S: f64 = 0.200;
/// A peak this soon after a QRS is tested for being its T wave, s. Source: Pan & Tompkins 1985 (360 ms T-wave
/// discrimination).
const T_WAVE_S: f64 = 0.360;
/// Search back when no QRS has come for this many mean RR intervals. Source: Pan & Tompkins 1985.
const SEARCH_BACK_RR: f64 = 1.66;
/// A weak candidate (see [`candidates`]) is a beat only beyond the T-wave test of the last beat and at least this
/// fraction of the steady RR after it (and nearer the time the rhythm is due than the larger peak near it): a sinus
/// beat on time before a larger premature beat, not a burst of muscle noise before a beat.
// Common practice, no source: sinus rhythm at rest varies from one beat to the next by well under a fifth of its RR.
const ON_TIME_RR: f64 = 0.8;

/// Median of the last eight of `v` (the upper one of an even count); `None` when empty.
fn median_recent(v: &[f64]) -> Option<f64> {
    let mut r: Vec<f64> = v[v.len().saturating_sub(8)..].to_vec();
    let mid = r.len() / 2;
    (!r.is_empty()).then(|| *r.select_nth_unstable_by(mid, f64::total_cmp).1)
}

/// Local maxima of `x` that are the largest value within ± half the refractory period, each with the sample of the
/// largest value within ± the whole refractory period where that is larger (a weak candidate; `None`: a strong
/// one). A weak one has a larger peak 100–200 ms away: a wave's other hump or a P or T wave before the QRS, but also
/// a beat followed closely by a larger one (a sinus beat and a premature ventricular beat 240 ms after it).
fn candidates(x: &[f32], fs: f64) -> Vec<(usize, Option<usize>)> {
    let r = ((REFRACTORY_S * fs) as usize).max(1);
    local_maxima(x, (r / 2).max(1), r)
        .into_iter()
        .map(|k| {
            let near = k.saturating_sub(r)..=(k + r).min(x.len() - 1);
            (k, near.max_by(|&a, &b| x[a].total_cmp(&x[b])).filter(|&m| x[m] > x[k]))
        })
        .collect()
}

/// Local maxima of `x` that are the largest value within ± `r` samples, more than `r / 2` apart; a flat top's
/// middle (at most `reach` samples back from its end).
fn local_maxima(x: &[f32], r: usize, reach: usize) -> Vec<usize> {
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
            out.push(flat_top_middle(x, k, reach));
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
/// peaks; see [`super::t_wave`]): a T wave taller than the QRS. A weak candidate (a larger peak lies 100–200 ms
/// from it, see [`candidates`]) is a beat only on time after the last beat ([`Picker::weak_may_be_beat`]); a
/// candidate within the refractory period of a beat replaces it when larger.
pub fn pick(x: &[f32], fs: f64, mut rounded: impl FnMut(&[usize], usize) -> bool) -> Vec<usize> {
    let mut p = Picker::new(x, fs);
    for (c, larger) in candidates(x, fs) {
        if p.within_refractory(c) {
            continue;
        }
        // A weak candidate belongs to the larger peak near it unless it is above the threshold and comes on time.
        if larger.is_some_and(|l| !p.weak_may_be_beat(c, l)) {
            continue;
        }
        p.search_back(c);
        let v = f64::from(x[c]);
        let is_qrs = v > p.threshold()
            && match p.beats.last() {
                Some(&last) if c - last < p.t_wave => v > 0.5 * f64::from(x[last]) && !rounded(&p.beats, c),
                _ => true,
            };
        if is_qrs {
            p.take(c);
        } else {
            p.pass_over(c, larger.is_none());
        }
    }
    p.beats
}

/// The running state of [`pick`].
struct Picker<'a> {
    /// The feature.
    x: &'a [f32],
    /// [`T_WAVE_S`] and [`REFRACTORY_S`] in samples.
    t_wave: usize,
    refractory: usize,
    /// Running signal and noise peak levels.
    spk: f64,
    npk: f64,
    /// The beats found so far (feature peaks) and the RR intervals between them, samples.
    beats: Vec<usize>,
    rr: Vec<f64>,
    /// Candidates passed over since the last beat (strong ones only), for the search-back.
    pending: Vec<usize>,
    /// RR intervals of the rhythm a weak candidate's timing is judged against: from the last beat to a beat taken
    /// (not in the search-back) at least [`T_WAVE_S`] after it, unless the last beat taken was itself within the
    /// T-wave test of the beat before it.
    steady_rr: Vec<f64>,
    /// Whether the last beat starts no steady RR (taken within the T-wave test of the one before it).
    last_early: bool,
}

impl<'a> Picker<'a> {
    fn new(x: &'a [f32], fs: f64) -> Self {
        Self {
            x,
            t_wave: (T_WAVE_S * fs) as usize,
            refractory: ((REFRACTORY_S * fs) as usize).max(1),
            // The feature is normalised, so levels start from the typical QRS height and a low noise level.
            spk: 1.0,
            npk: 0.1,
            beats: Vec::new(),
            rr: Vec::new(),
            pending: Vec::new(),
            steady_rr: Vec::new(),
            last_early: false,
        }
    }

    /// A quarter of the way from the noise level to the signal level.
    fn threshold(&self) -> f64 {
        self.npk + 0.25 * (self.spk - self.npk)
    }

    /// Mean of the last eight RR intervals; `None` before two.
    fn rr_mean(&self) -> Option<f64> {
        let rr = &self.rr;
        (rr.len() >= 2).then(|| rr.iter().rev().take(8).sum::<f64>() / rr.len().min(8) as f64)
    }

    fn accept(&mut self, p: usize) {
        if let Some(&last) = self.beats.last() {
            self.rr.push((p - last) as f64);
        }
        self.beats.push(p);
    }

    fn as_noise(&mut self, p: usize) {
        self.npk = 0.125 * f64::from(self.x[p]) + 0.875 * self.npk;
    }

    /// Whether candidate `c` falls within the refractory period of the last beat: it is part of that beat, and
    /// replaces it when larger.
    fn within_refractory(&mut self, c: usize) -> bool {
        let Some(&last) = self.beats.last().filter(|&&last| c - last < self.refractory) else { return false };
        if self.x[c] > self.x[last] {
            self.beats.pop();
            if let Some(&before) = self.beats.last() {
                self.rr.pop();
                self.rr.push((c - before) as f64);
            }
            self.beats.push(c);
        }
        true
    }

    /// Whether a weak candidate `c` could be a beat: above the threshold and half the signal level (a QRS's height,
    /// as the T-wave test asks of a peak soon after a beat), beyond the T-wave test of the last beat and at least
    /// [`ON_TIME_RR`] of the steady RR after it, and nearer than the larger peak near it (`larger`, see
    /// [`candidates`]) to where the steady RR puts the next beat: a sinus beat on time before a premature beat, not
    /// an artefact shortly before a beat on time. Never the first beat.
    fn weak_may_be_beat(&self, c: usize, larger: usize) -> bool {
        let (Some(&last), Some(m)) = (self.beats.last(), median_recent(&self.steady_rr)) else { return false };
        let v = f64::from(self.x[c]);
        if v <= self.threshold().max(0.5 * self.spk) || c - last < self.t_wave || ((c - last) as f64) < ON_TIME_RR * m {
            return false;
        }
        let due = last as f64 + m;
        (c as f64 - due).abs() < (larger as f64 - due).abs()
    }

    /// Search-back: with no beat for [`SEARCH_BACK_RR`] mean RR before candidate `c`, the largest pending peak
    /// above half the threshold is a beat.
    fn search_back(&mut self, c: usize) {
        let (Some(&last), Some(m)) = (self.beats.last(), self.rr_mean()) else { return };
        if (c - last) as f64 <= SEARCH_BACK_RR * m {
            return;
        }
        let th2 = 0.5 * self.threshold();
        let x = self.x;
        let Some(p) = self
            .pending
            .iter()
            .copied()
            .filter(|&p| p > last + self.t_wave.min((0.6 * m) as usize) / 2 && f64::from(x[p]) > th2)
            .max_by(|&a, &b| x[a].total_cmp(&x[b]))
        else {
            return;
        };
        self.spk = 0.25 * f64::from(x[p]) + 0.75 * self.spk;
        self.accept(p);
        self.pending.retain(|&q| q > p);
    }

    /// Candidate `c` is a beat.
    fn take(&mut self, c: usize) {
        if let Some(&last) = self.beats.last()
            && !self.last_early
            && c - last >= self.t_wave
        {
            self.steady_rr.push((c - last) as f64);
        }
        self.spk = 0.125 * f64::from(self.x[c]) + 0.875 * self.spk;
        self.accept(c);
        self.last_early = self.beats.len() >= 2 && c - self.beats[self.beats.len() - 2] < self.t_wave;
        self.pending.clear();
    }

    /// Candidate `c` is no beat: a noise peak. The search-back looks among strong candidates only: a weak one is
    /// the larger peak's T or P wave more often than a beat.
    fn pass_over(&mut self, c: usize, strong: bool) {
        self.as_noise(c);
        if strong {
            self.pending.push(c);
        }
    }
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
    fn a_beat_closely_followed_by_a_larger_one_is_kept_but_an_early_peak_is_not() {
        // Beats every 200 samples (800 ms at 250 Hz). After every third one, a premature beat 60 samples (240 ms)
        // later whose feature is a broad hump 2.3 times as high, then a full pause: the hump's rising limb stands
        // above the beat's peak within 200 ms of it, so only the ± 100 ms window finds the beat, on time. Or, with
        // broad beats 2.3 high, a narrow peak 1.0 high 60 samples before every third beat (140 after the one before,
        // 0.7 RR: a burst of noise): it is found the same way but comes early, and is no beat.
        let fs = 250.0;
        let hump = |x: &mut [f32], at: usize, height: f32, half: usize| {
            for k in at - half..at + half {
                x[k] = x[k].max(height * (1.0 - (k as f32 - at as f32).abs() / half as f32));
            }
        };
        for premature_beat in [true, false] {
            let mut x = vec![0.0f32; 12_000];
            let mut r = 100;
            let (mut n, mut extra) = (0, 0);
            while r + 300 < x.len() {
                n += 1;
                if premature_beat {
                    hump(&mut x, r, 1.0, 10);
                    r += 200;
                    if n % 3 == 0 {
                        extra += 1;
                        hump(&mut x, r - 140, 2.3, 30);
                        r += 60;
                    }
                } else {
                    hump(&mut x, r, 2.3, 30);
                    if n % 3 == 0 {
                        hump(&mut x, r - 60, 1.0, 10);
                    }
                    r += 200;
                }
            }
            let want = if premature_beat { n + extra } else { n };
            let got = pick(&x, fs, |_, _| false);
            assert_eq!(got.len(), want, "premature beat {premature_beat}: {got:?}");
        }
    }
}
