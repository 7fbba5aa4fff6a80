//! Second-order IIR sections (biquads), zero-phase forward–backward filtering and NaN filling.
//!
//! Coefficients follow R. Bristow-Johnson, "Cookbook formulae for audio EQ biquad filter coefficients"
//! (bilinear transform of the analogue prototypes). Filtering runs in f64.

use std::f64::consts::PI;

/// One normalised second-order section: `y = b0 x + b1 x[-1] + b2 x[-2] − a1 y[-1] − a2 y[-2]`.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Biquad {
    b0: f64,
    b1: f64,
    b2: f64,
    a1: f64,
    a2: f64,
}

impl Biquad {
    fn normalised(b: [f64; 3], a: [f64; 3]) -> Self {
        Self { b0: b[0] / a[0], b1: b[1] / a[0], b2: b[2] / a[0], a1: a[1] / a[0], a2: a[2] / a[0] }
    }

    fn w0(cutoff_hz: f64, fs_hz: f64) -> (f64, f64) {
        let w0 = 2.0 * PI * cutoff_hz / fs_hz;
        (w0.cos(), w0.sin())
    }

    /// Second-order Butterworth low-pass (Q = 1/√2) at `cutoff_hz` (−3 dB per pass).
    #[must_use]
    pub fn lowpass(cutoff_hz: f64, fs_hz: f64) -> Self {
        let (c, s) = Self::w0(cutoff_hz, fs_hz);
        let alpha = s / (2.0 * std::f64::consts::FRAC_1_SQRT_2);
        Self::normalised([(1.0 - c) / 2.0, 1.0 - c, (1.0 - c) / 2.0], [1.0 + alpha, -2.0 * c, 1.0 - alpha])
    }

    /// Second-order Butterworth high-pass (Q = 1/√2) at `cutoff_hz` (−3 dB per pass).
    #[must_use]
    pub fn highpass(cutoff_hz: f64, fs_hz: f64) -> Self {
        let (c, s) = Self::w0(cutoff_hz, fs_hz);
        let alpha = s / (2.0 * std::f64::consts::FRAC_1_SQRT_2);
        Self::normalised([(1.0 + c) / 2.0, -(1.0 + c), (1.0 + c) / 2.0], [1.0 + alpha, -2.0 * c, 1.0 - alpha])
    }

    /// Notch at `centre_hz` with quality factor `q` (bandwidth = centre / q).
    #[must_use]
    pub fn notch(centre_hz: f64, q: f64, fs_hz: f64) -> Self {
        let (c, s) = Self::w0(centre_hz, fs_hz);
        let alpha = s / (2.0 * q);
        Self::normalised([1.0, -2.0 * c, 1.0], [1.0 + alpha, -2.0 * c, 1.0 - alpha])
    }

    /// Gain at DC, `H(1)`.
    fn dc_gain(&self) -> f64 {
        let den = 1.0 + self.a1 + self.a2;
        if den.abs() < 1e-300 { 0.0 } else { (self.b0 + self.b1 + self.b2) / den }
    }

    /// The state of a filter that has seen the constant input `u` forever (its steady state).
    #[must_use]
    pub fn state_for(&self, u: f64) -> BiquadState {
        let g = self.dc_gain();
        let z2 = self.b2 * u - self.a2 * g * u;
        let z1 = self.b1 * u - self.a1 * g * u + z2;
        BiquadState { z1, z2 }
    }

    /// Filters one sample (transposed direct form II).
    #[inline]
    pub fn step(&self, s: &mut BiquadState, x: f64) -> f64 {
        let y = self.b0 * x + s.z1;
        s.z1 = self.b1 * x - self.a1 * y + s.z2;
        s.z2 = self.b2 * x - self.a2 * y;
        y
    }

    /// Filters in place, starting in the steady state of a constant input equal to the first sample, so a
    /// step at the start causes no transient.
    pub fn run(&self, x: &mut [f64]) {
        let Some(&u) = x.first() else { return };
        let mut s = self.state_for(u);
        for v in x.iter_mut() {
            *v = self.step(&mut s, *v);
        }
    }
}

/// The memory of a [`Biquad`] between samples.
#[derive(Debug, Clone, Copy, Default, PartialEq)]
pub struct BiquadState {
    z1: f64,
    z2: f64,
}

/// Zero-phase filtering: every section forward, then every section backward (squared magnitude response,
/// no phase shift). The ends are padded with an odd reflection of `pad` samples to limit edge transients.
#[must_use]
pub fn filtfilt(sections: &[Biquad], x: &[f64], pad: usize) -> Vec<f64> {
    let n = x.len();
    if n == 0 || sections.is_empty() {
        return x.to_vec();
    }
    let pad = pad.min(n - 1);
    let mut buf = Vec::with_capacity(n + 2 * pad);
    let (first, last) = (x[0], x[n - 1]);
    buf.extend((1..=pad).rev().map(|k| 2.0 * first - x[k]));
    buf.extend_from_slice(x);
    buf.extend((1..=pad).map(|k| 2.0 * last - x[n - 1 - k]));
    for s in sections {
        s.run(&mut buf);
    }
    buf.reverse();
    for s in sections {
        s.run(&mut buf);
    }
    buf.reverse();
    buf.drain(..pad);
    buf.truncate(n);
    buf
}

/// Copies samples to f64, replacing invalid (NaN or infinite) samples by linear interpolation between the
/// nearest valid neighbours (held flat at the ends; see [`bridged`]). A lead with no valid sample becomes all zeros.
#[must_use]
pub fn fill_invalid(samples: &[f32]) -> Vec<f64> {
    let mut out: Vec<f64> = samples.iter().map(|&v| f64::from(v)).collect();
    for run in crate::gaps::invalid_runs(samples) {
        for k in run.clone() {
            out[k] = bridged(samples, &run, k);
        }
    }
    out
}

/// The value [`fill_invalid`] gives sample `k` of `run`, a whole run of invalid samples of `x`: on the straight
/// line from the last valid sample before the run to the first after it; the one valid neighbour's value at an
/// end of the lead; 0 in a lead with none. One sample at a time, for passes that stream a long lead. Also for
/// any other run of `x` to be bridged (a pacing spike in a lead already filled, `f64`).
#[must_use]
pub fn bridged<T: Copy + Into<f64>>(x: &[T], run: &std::ops::Range<usize>, k: usize) -> f64 {
    let before = run.start.checked_sub(1).map(|a| (a, x[a].into()));
    let after = x.get(run.end).map(|&v| (run.end, v.into()));
    match (before, after) {
        (Some((a, va)), Some((b, vb))) => va + (vb - va) * (k - a) as f64 / (b - a) as f64,
        (Some((_, v)), None) | (None, Some((_, v))) => v,
        (None, None) => 0.0,
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    fn sine(f: f64, fs: f64, n: usize) -> Vec<f64> {
        (0..n).map(|k| (2.0 * PI * f * k as f64 / fs).sin()).collect()
    }

    fn rms(x: &[f64]) -> f64 {
        (x.iter().map(|v| v * v).sum::<f64>() / x.len() as f64).sqrt()
    }

    #[test]
    fn lowpass_passes_low_and_stops_high() {
        let fs = 500.0;
        let lp = [Biquad::lowpass(40.0, fs)];
        let low = filtfilt(&lp, &sine(5.0, fs, 5000), 500);
        let high = filtfilt(&lp, &sine(150.0, fs, 5000), 500);
        assert!((rms(&low[500..4500]) - rms(&sine(5.0, fs, 5000)[500..4500])).abs() < 0.01);
        assert!(rms(&high[500..4500]) < 0.02);
    }

    #[test]
    fn filtfilt_has_zero_phase() {
        // A symmetric pulse stays centred after forward-backward filtering.
        let mut x = vec![0.0; 2001];
        for (k, v) in x.iter_mut().enumerate() {
            let t = (k as f64 - 1000.0) / 20.0;
            *v = (-t * t).exp();
        }
        let y = filtfilt(&[Biquad::lowpass(10.0, 500.0)], &x, 200);
        let peak = y.iter().enumerate().fold((0, f64::MIN), |a, (i, &v)| if v > a.1 { (i, v) } else { a }).0;
        assert_eq!(peak, 1000);
    }

    #[test]
    fn notch_removes_its_frequency_only() {
        let fs = 500.0;
        let n = [Biquad::notch(50.0, 30.0, fs)];
        let hum = filtfilt(&n, &sine(50.0, fs, 10_000), 1000);
        let ok = filtfilt(&n, &sine(10.0, fs, 10_000), 1000);
        assert!(rms(&hum[2000..8000]) < 0.01);
        assert!((rms(&ok[2000..8000]) - std::f64::consts::FRAC_1_SQRT_2).abs() < 0.01);
    }

    #[test]
    fn invalid_samples_are_interpolated() {
        let x = [f32::NAN, 1.0, f32::NAN, f32::NAN, 4.0, f32::NAN];
        assert_eq!(fill_invalid(&x), vec![1.0, 1.0, 2.0, 3.0, 4.0, 4.0]);
        assert_eq!(fill_invalid(&[f32::NAN; 3]), vec![0.0; 3]);
    }
}
