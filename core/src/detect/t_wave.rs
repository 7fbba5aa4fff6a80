//! The T-wave test on the leads: a peak found soon after a beat (within Pan & Tompkins' 360 ms, see
//! [`super::peaks`]) whose wave is much more rounded than that beat's QRS is its T wave, not a beat. Pan & Tompkins
//! (IEEE Trans Biomed Eng 1985;32:230-6) judge such a peak by its slope (a T wave if under half the QRS's), and the
//! feature alone would judge it by the height of its integrated QRS energy. Both scale with a wave's height over
//! its width, so a T wave taller than the QRS passed (demo with T waves five times their height: 24 beats for 12),
//! and a premature wide beat with less energy than the sinus QRS was taken for a T wave (every premature beat of
//! a 150-bpm demo recorded on two leads missed). Curvature scales with height over width squared: a T wave, some
//! four times wider than the QRS's waves, has a tenth of its curvature or so, a premature ventricular beat a third
//! or more.

/// A peak soon after a beat whose curvature (summed over the leads, [`curvature`]) is under this fraction of that
/// beat's is its T wave.
// Common practice, no source. Measured (curvature around each feature peak less its lag): T waves made 5 and 8
// times taller on the normal demo (Gaussian, σ 35–50 ms) 0.12–0.14 of the QRS before them; the demo's premature
// beats (QRS 150 ms, 260 ms after the sinus beat at 150 bpm) 0.54 on twelve leads at 500 Hz, 0.32 on two at 250 Hz.
// On the shared real records no peak above the detection threshold comes within 360 ms of a beat, so none is
// judged; there, with R peaks as placed, every beat has at least 0.34 of its record's typical curvature
// (premature ventricular beats of the QT Database's sel14046 and sel803 0.36–0.42).
const T_CURVATURE: f64 = 0.2;

/// Half-width of the average the curvature is taken on, s.
// Common practice, no source: 8 ms averages out sample noise and keeps a QRS's waves (≈ 10–30 ms) sharp.
const AVERAGE_S: f64 = 0.004;
/// Spacing of the second difference, s.
// Common practice, no source: about the width of a narrow QRS wave's peak.
const SPACING_S: f64 = 0.008;
/// The curvature is the largest within this time of the middle of the wave (the feature's peak less its lag), s.
// Common practice, no source: the feature's lag is known to a few tens of ms, and a QRS's waves lie within 50 ms
// of its middle.
const REACH_S: f64 = super::R_SEARCH_S;

/// The T-wave test on `leads` (those with a QRS) sampled at `fs` Hz, for feature peaks that lag the middle of
/// their wave by `lag` samples: [`Self::is_t_wave`].
pub struct TWaveTest<'a> {
    leads: &'a [&'a [f32]],
    fs: f64,
    lag: usize,
    /// The curvature of the last QRS asked about (its feature peak and value): a beat is compared with every
    /// candidate after it.
    last: Option<(usize, f64)>,
}

impl<'a> TWaveTest<'a> {
    pub fn new(leads: &'a [&'a [f32]], fs: f64, lag: usize) -> Self {
        Self { leads, fs, lag, last: None }
    }

    /// Whether the candidate at feature peak `c`, soon after the QRS at feature peak `qrs`, is that beat's T wave:
    /// its curvature is under [`T_CURVATURE`] of the QRS's. `None` where the QRS shows no curvature (no lead
    /// recorded there).
    pub fn is_t_wave(&mut self, qrs: usize, c: usize) -> Option<bool> {
        let before = match self.last {
            Some((at, v)) if at == qrs => v,
            _ => curvature(self.leads, qrs.saturating_sub(self.lag), self.fs),
        };
        self.last = Some((qrs, before));
        (before > 0.0).then(|| curvature(self.leads, c.saturating_sub(self.lag), self.fs) < T_CURVATURE * before)
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
            assert_eq!(test.is_t_wave(at(0.5), at(0.75)), Some(true), "{fs} Hz");
            assert_eq!(test.is_t_wave(at(0.5), at(1.05)), Some(false), "{fs} Hz");
            let qrs = curvature(&leads, at(0.5) - lag, fs);
            let (t, wide) = (curvature(&leads, at(0.75) - lag, fs) / qrs, curvature(&leads, at(1.05) - lag, fs) / qrs);
            assert!(t < 0.15 && wide > 0.3, "{fs} Hz: T {t:.3}, wide beat {wide:.3}");
        }
    }

    #[test]
    fn where_no_lead_is_recorded_the_test_cannot_tell() {
        let fs = 250.0;
        let nan = vec![f32::NAN; 500];
        let leads: [&[f32]; 1] = [&nan];
        assert_eq!(curvature(&leads, 125, fs), 0.0);
        assert_eq!(TWaveTest::new(&leads, fs, 24).is_t_wave(150, 210), None);
        // And at the very start or end of a recording there is nothing to take a curvature on.
        let x = waves(fs, 2.0, &[(0.5, 1000.0, 0.008)]);
        let leads: [&[f32]; 1] = [&x];
        assert!(curvature(&leads, 0, fs).is_finite());
        assert_eq!(curvature(&leads, x.len() + 10, fs), 0.0);
        assert_eq!(curvature(&[], 125, fs), 0.0);
    }
}
