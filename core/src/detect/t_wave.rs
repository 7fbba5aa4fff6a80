//! The T-wave test on the leads, for a T wave taller than the QRS. Pan & Tompkins (IEEE Trans Biomed Eng
//! 1985;32:230-6) take a peak within 360 ms of a QRS for its T wave when its slope is under half the QRS's; the
//! detector ([`super::peaks`]) asks the same of the height of its integrated energy. Both scale with a wave's height
//! over its width, so a T wave taller than the QRS passed (demo with T waves five times their height: 24 beats for
//! 12). Curvature scales with height over width squared: a T wave, some four times wider than the QRS's waves, has a
//! tenth of its curvature or so. A peak the energy test would take is therefore also asked whether it is far more
//! rounded than the QRS of the beats before it.
//!
//! The test only ever takes a peak away, never adds one the energy test refused: muscle noise raises a wave's
//! curvature (its sharpest point is the noise's), and letting curvature overrule the energy test counted noisy T
//! waves and muscle bursts after the beats as beats (a reviewer's LUDB records with T waves three times taller and
//! 20 µV of muscle noise: 32 extra beats over 50 records, none before). A peak is rounded only against both the
//! median of the recent beats and the last beat. The median, because the last beat may itself be an artefact taken
//! for a beat (muscle bursts ending 280 ms before every fourth beat: 28 beats missed over three seeds against the
//! last beat alone, 4 before; with the median the reviewer's recording misses as many as before). The last beat,
//! because a run of wide beats must be compared beat by beat, not with the sinus beats before it. A wide premature
//! beat as rounded as a T wave (a single smooth deflection 180 ms wide, 260 ms after the sinus beat) is taken for
//! one; real premature ventricular beats (templates from the QT Database's sel14046 and sel803 placed 240–360 ms
//! after a sinus beat) were not.

/// A peak soon after a beat whose curvature (summed over the leads, [`curvature`]) is under this fraction of both
/// the last beat's and the median of the recent beats' is a T wave.
// Common practice, no source. Measured (curvature around each feature peak less its lag): T waves made 5 and 8
// times taller on the normal demo (Gaussian, σ 35–50 ms) 0.12–0.14 of the QRS before them; the demo's premature
// beats (QRS 150 ms, 260 ms after the sinus beat at 150 bpm) 0.54 on twelve leads at 500 Hz, 0.32 on two at 250 Hz.
// On the shared real records no peak the energy test takes comes within 360 ms of a beat, so none is judged;
// there, with R peaks as placed, every beat has at least 0.34 of its record's typical curvature (premature
// ventricular beats of the QT Database's sel14046 and sel803 0.36–0.42).
const T_CURVATURE: f64 = 0.2;

/// Half-width of the average the curvature is taken on, s.
// Common practice, no source: a mean over about 10 ms averages out sample noise and keeps a QRS's waves (≈ 10–30
// ms) sharp.
const AVERAGE_S: f64 = 0.004;
/// Spacing of the second difference, s.
// Common practice, no source: about the width of a narrow QRS wave's peak.
const SPACING_S: f64 = 0.008;
/// The curvature is the largest within this time of the middle of the wave (the feature's peak less its lag), s.
// Common practice, no source: the feature's lag is known to a few tens of ms, and a QRS's waves lie within 50 ms
// of its middle.
const REACH_S: f64 = super::R_SEARCH_S;

/// Beats before a candidate whose median QRS curvature it is compared with.
// Common practice, no source: a handful of beats, so one artefact taken for a beat (a muscle burst, whose
// curvature is many times a QRS's) does not make the beat after it look rounded.
const RECENT_BEATS: usize = 5;

/// The T-wave test on `leads` (those with a QRS) sampled at `fs` Hz, for feature peaks that lag the middle of
/// their wave by `lag` samples: [`Self::is_rounded`].
pub struct TWaveTest<'a> {
    leads: &'a [&'a [f32]],
    fs: f64,
    lag: usize,
    /// Curvatures already taken, by feature peak (the recent beats are asked about again and again).
    known: Vec<(usize, f64)>,
}

impl<'a> TWaveTest<'a> {
    pub fn new(leads: &'a [&'a [f32]], fs: f64, lag: usize) -> Self {
        Self { leads, fs, lag, known: Vec::new() }
    }

    /// Whether the candidate at feature peak `c`, soon after the beats at feature peaks `beats` (in time order,
    /// the last the one it follows), is far more rounded than their QRS: its curvature is under [`T_CURVATURE`]
    /// of both the median over the last [`RECENT_BEATS`] and the last beat's. The median keeps an artefact taken
    /// for a beat from making the beat after it look rounded; the last beat keeps a run of wide beats found beat
    /// by beat (each compared with the one before, not with the sinus beats before the run: against the median
    /// alone, a run of smooth wide beats at 180–250 bpm lost every beat after its first). False where the beats
    /// show no curvature (no lead recorded).
    pub fn is_rounded(&mut self, beats: &[usize], c: usize) -> bool {
        let Some(&last) = beats.last() else { return false };
        let mut recent: Vec<f64> =
            beats[beats.len().saturating_sub(RECENT_BEATS)..].iter().map(|&b| self.curvature_at(b)).collect();
        let mid = recent.len() / 2;
        let typical = *recent.select_nth_unstable_by(mid, f64::total_cmp).1;
        let reference = typical.min(self.curvature_at(last));
        reference > 0.0 && curvature(self.leads, c.saturating_sub(self.lag), self.fs) < T_CURVATURE * reference
    }

    /// The curvature of the wave at feature peak `p`, remembered for the beats asked about last.
    fn curvature_at(&mut self, p: usize) -> f64 {
        if let Some(&(_, v)) = self.known.iter().find(|(at, _)| *at == p) {
            return v;
        }
        let v = curvature(self.leads, p.saturating_sub(self.lag), self.fs);
        if self.known.len() >= 2 * RECENT_BEATS {
            self.known.remove(0);
        }
        self.known.push((p, v));
        v
    }
}

/// The curvature of the wave around sample `p`, summed over `leads`, µV: in each lead the largest within
/// [`REACH_S`] of `p` of |a(k + h) − 2a(k) + a(k − h)|, a the lead's mean over ± [`AVERAGE_S`] and h
/// [`SPACING_S`]. A mean holding an invalid sample gives no value.
fn curvature(leads: &[&[f32]], p: usize, fs: f64) -> f64 {
    let m = (AVERAGE_S * fs).round() as usize;
    let h = ((SPACING_S * fs).round() as usize).max(1);
    let reach = (REACH_S * fs).round() as usize;
    leads
        .iter()
        .map(|x| {
            let n = x.len();
            let (a, b) = (p.saturating_sub(reach + h + m), (p + reach + h + m + 1).min(n));
            if b < a + 2 * (h + m) + 1 {
                return 0.0;
            }
            let means: Vec<f64> =
                x[a..b].windows(2 * m + 1).map(|w| w.iter().map(|&v| f64::from(v)).sum::<f64>()).collect();
            let scale = 1.0 / (2 * m + 1) as f64;
            means
                .windows(2 * h + 1)
                .map(|w| (w[2 * h] - 2.0 * w[h] + w[0]).abs() * scale)
                .filter(|v| v.is_finite())
                .fold(0.0, f64::max)
        })
        .sum()
}

#[cfg(test)]
mod tests {
    use super::*;

    /// A lead at `fs` Hz with a Gaussian of `height` µV and width `sigma_s` at each time of `at` (s).
    fn waves(fs: f64, seconds: f64, at: &[(f64, f64, f64)]) -> Vec<f32> {
        (0..(seconds * fs) as usize)
            .map(|k| {
                let t = k as f64 / fs;
                at.iter().map(|&(c, height, sigma)| height * (-0.5 * ((t - c) / sigma).powi(2)).exp()).sum::<f64>()
                    as f32
            })
            .collect()
    }

    #[test]
    fn a_t_wave_taller_than_its_qrs_is_told_from_a_premature_wide_beat() {
        for fs in [250.0, 500.0] {
            // QRS (R of 1 mV, σ 8 ms) at 0.5 s; its T wave of 2 mV (σ 40 ms) at 0.75 s; a wide premature beat
            // (1.5 mV, σ 20 ms) at 1.05 s. Feature peaks lag their wave by 95 ms.
            let x = waves(fs, 2.0, &[(0.5, 1000.0, 0.008), (0.75, 2000.0, 0.040), (1.05, 1500.0, 0.020)]);
            let lag = (0.095 * fs) as usize;
            let at = |t: f64| (t * fs) as usize + lag;
            let leads: [&[f32]; 1] = [&x];
            let mut test = TWaveTest::new(&leads, fs, lag);
            assert!(test.is_rounded(&[at(0.5)], at(0.75)), "{fs} Hz");
            assert!(!test.is_rounded(&[at(0.5)], at(1.05)), "{fs} Hz");
            let qrs = curvature(&leads, at(0.5) - lag, fs);
            let (t, wide) = (curvature(&leads, at(0.75) - lag, fs) / qrs, curvature(&leads, at(1.05) - lag, fs) / qrs);
            assert!(t < 0.15 && wide > 0.3, "{fs} Hz: T {t:.3}, wide beat {wide:.3}");
        }
    }

    #[test]
    fn an_artefact_taken_for_a_beat_does_not_make_the_next_beat_look_rounded() {
        // QRS at 0.5, 1.3 and 2.1 s; a spike-like artefact (4 mV, σ 3 ms) at 2.6 s taken for a beat; a QRS at
        // 2.9 s, 300 ms after it. Against the artefact alone the QRS would look rounded; against the median of
        // the recent beats it does not.
        let fs = 250.0;
        let x = waves(
            fs,
            3.5,
            &[
                (0.5, 1000.0, 0.008),
                (1.3, 1000.0, 0.008),
                (2.1, 1000.0, 0.008),
                (2.6, 4000.0, 0.003),
                (2.9, 1000.0, 0.008),
            ],
        );
        let lag = 24;
        let at = |t: f64| (t * fs) as usize + lag;
        let leads: [&[f32]; 1] = [&x];
        let mut test = TWaveTest::new(&leads, fs, lag);
        assert!(test.is_rounded(&[at(2.6)], at(2.9)), "against the artefact alone");
        assert!(!test.is_rounded(&[at(0.5), at(1.3), at(2.1), at(2.6)], at(2.9)));
    }

    #[test]
    fn a_run_of_wide_beats_is_compared_beat_by_beat() {
        // Four narrow beats (σ 8 ms) every 0.8 s, then wide beats (σ 30 ms, as rounded as a T wave) every 300 ms.
        // The second wide beat follows the first: compared with it, not with the narrow beats, it is no T wave.
        let fs = 250.0;
        let mut at: Vec<(f64, f64, f64)> = (0..4).map(|i| (0.5 + 0.8 * i as f64, 1000.0, 0.008)).collect();
        at.extend((0..3).map(|i| (3.3 + 0.3 * i as f64, -1200.0, 0.030)));
        let x = waves(fs, 5.0, &at);
        let lag = 24;
        let p = |t: f64| (t * fs) as usize + lag;
        let leads: [&[f32]; 1] = [&x];
        let mut test = TWaveTest::new(&leads, fs, lag);
        let narrow: Vec<usize> = (0..4).map(|i| p(0.5 + 0.8 * i as f64)).collect();
        assert!(test.is_rounded(&narrow, p(3.3)), "against the narrow beats, a wide beat looks like a T wave");
        let with_first = [narrow.as_slice(), &[p(3.3)]].concat();
        assert!(!test.is_rounded(&with_first, p(3.6)));
        let with_two = [with_first.as_slice(), &[p(3.6)]].concat();
        assert!(!test.is_rounded(&with_two, p(3.9)));
    }

    #[test]
    fn where_no_lead_is_recorded_nothing_is_rounded() {
        let fs = 250.0;
        let nan = vec![f32::NAN; 500];
        let leads: [&[f32]; 1] = [&nan];
        assert_eq!(curvature(&leads, 125, fs), 0.0);
        let mut test = TWaveTest::new(&leads, fs, 24);
        assert!(!test.is_rounded(&[150], 210));
        assert!(!test.is_rounded(&[], 210));
        // And at the very start or end of a recording there is nothing to take a curvature on.
        let x = waves(fs, 2.0, &[(0.5, 1000.0, 0.008)]);
        let leads: [&[f32]; 1] = [&x];
        assert!(curvature(&leads, 0, fs).is_finite());
        assert_eq!(curvature(&leads, x.len() + 10, fs), 0.0);
        assert_eq!(curvature(&[], 125, fs), 0.0);
    }
}
