//! Detecting mains interference (50 or 60 Hz) from the averaged power spectrum (rustfft).

use rustfft::FftPlanner;
use rustfft::num_complex::Complex;

/// Segment length of the averaged periodogram (Welch), samples.
const SEG: usize = 2048;
/// Most segments averaged (spread evenly over the recording).
const MAX_SEGMENTS: usize = 24;
/// A mains line must stand this many times above the neighbouring spectrum (10 dB).
// Common practice, no source: a line 10 dB above its neighbourhood is clearly interference, not ECG content.
const MIN_RATIO: f64 = 10.0;
/// …and this many times above the highest other line in the neighbourhood (6 dB). A regular heart rhythm puts
/// its own harmonics every 1–2 Hz all the way up the spectrum; one of them near 50 or 60 Hz stands above the
/// noise floor between them but not above its neighbouring harmonics, while mains hum stands above them all.
// Common practice, no source.
const MIN_COMB_RATIO: f64 = 4.0;

/// The mains frequency (50 or 60 Hz) whose line stands out of the spectrum of `leads`, or `None` when neither
/// does (or the sampling rate is too low to see it).
#[must_use]
pub fn detect_mains<L: AsRef<[T]>, T: Copy + Into<f64>>(leads: &[L], fs_hz: f64) -> Option<f64> {
    let n = leads.first().map_or(0, |l| l.as_ref().len());
    if fs_hz < 140.0 || n < SEG {
        return None;
    }
    let psd = averaged_spectrum(leads, n);
    let df = fs_hz / SEG as f64;
    let ratio = |f: f64| -> f64 {
        let bin = |hz: f64| ((hz / df).round() as usize).min(SEG / 2);
        let line = (bin(f - 0.6)..=bin(f + 0.6)).map(|k| psd[k]).fold(0.0, f64::max);
        let mut around: Vec<f64> =
            (bin(f - 6.0)..=bin(f + 6.0)).filter(|&k| (k as f64 * df - f).abs() > 2.0).map(|k| psd[k]).collect();
        around.sort_by(f64::total_cmp);
        let med = around.get(around.len() / 2).copied().unwrap_or(0.0);
        let top = around.last().copied().unwrap_or(0.0);
        if line <= 0.0 || line < MIN_COMB_RATIO * top {
            0.0
        } else if med > 0.0 {
            line / med
        } else {
            f64::INFINITY
        }
    };
    let (r50, r60) = (ratio(50.0), if fs_hz > 2.0 * 67.0 { ratio(60.0) } else { 0.0 });
    let best = if r50 >= r60 { (50.0, r50) } else { (60.0, r60) };
    (best.1 >= MIN_RATIO).then_some(best.0)
}

/// Welch average of Hann-windowed periodograms over every lead and up to [`MAX_SEGMENTS`] segments.
/// Invalid (non-finite) samples count as the segment's mean, so they add nothing to the spectrum.
fn averaged_spectrum<L: AsRef<[T]>, T: Copy + Into<f64>>(leads: &[L], n: usize) -> Vec<f64> {
    let mut planner = FftPlanner::<f64>::new();
    let fft = planner.plan_fft_forward(SEG);
    let window: Vec<f64> =
        (0..SEG).map(|k| 0.5 - 0.5 * (2.0 * std::f64::consts::PI * k as f64 / SEG as f64).cos()).collect();
    let count = (n / SEG).clamp(1, MAX_SEGMENTS);
    let step = if count > 1 { (n - SEG) / (count - 1) } else { 0 };
    let mut psd = vec![0.0; SEG / 2 + 1];
    let mut buf = vec![Complex::new(0.0, 0.0); SEG];
    for lead in leads {
        let lead = lead.as_ref();
        if lead.len() < n {
            continue;
        }
        for s in 0..count {
            let seg = &lead[s * step..s * step + SEG];
            let (sum, valid) = seg
                .iter()
                .map(|&v| v.into())
                .filter(|v: &f64| v.is_finite())
                .fold((0.0, 0usize), |(a, k), v| (a + v, k + 1));
            let mean = if valid > 0 { sum / valid as f64 } else { 0.0 };
            for (b, (&v, &w)) in buf.iter_mut().zip(seg.iter().zip(&window)) {
                let v: f64 = v.into();
                *b = Complex::new(if v.is_finite() { (v - mean) * w } else { 0.0 }, 0.0);
            }
            fft.process(&mut buf);
            for (p, c) in psd.iter_mut().zip(&buf) {
                *p += c.norm_sqr();
            }
        }
    }
    psd
}

#[cfg(test)]
mod tests {
    use super::*;

    fn ecg_like(fs: f64, n: usize, hum_hz: f64, hum_uv: f64) -> Vec<f64> {
        let mut state = 12345u64;
        (0..n)
            .map(|k| {
                state = state.wrapping_mul(6364136223846793005).wrapping_add(1442695040888963407);
                let noise = ((state >> 33) as f64 / (1u64 << 31) as f64 - 0.5) * 20.0;
                let t = k as f64 / fs;
                let beat = (-(((t % 0.8) - 0.4) / 0.02).powi(2)).exp() * 1000.0;
                beat + noise + hum_uv * (2.0 * std::f64::consts::PI * hum_hz * t).sin()
            })
            .collect()
    }

    #[test]
    fn finds_50_and_60_hz_and_nothing_in_clean_signal() {
        let fs = 500.0;
        assert_eq!(detect_mains(&[ecg_like(fs, 20_000, 50.0, 60.0)], fs), Some(50.0));
        assert_eq!(detect_mains(&[ecg_like(fs, 20_000, 60.0, 60.0)], fs), Some(60.0));
        assert_eq!(detect_mains(&[ecg_like(fs, 20_000, 50.0, 0.0)], fs), None);
    }

    #[test]
    fn heart_rate_harmonics_of_the_demo_rhythms_are_not_hum() {
        // Regular synthetic rhythms put a harmonic of the heart rate within 0.6 Hz of 50 or 60 Hz (at 72 bpm one
        // sits at 50.4 Hz); only the noisy demo carries hum (50 Hz).
        use crate::synth::{Scenario, generate};
        for scenario in Scenario::ALL.into_iter().filter(|s| *s != Scenario::Holter) {
            let synthetic = generate(&scenario.spec()).map_err(|e| e.to_string());
            let Ok(synthetic) = synthetic else { panic!("{}: {synthetic:?}", scenario.name()) };
            let rec = &synthetic.recording;
            let leads: Vec<&[f32]> = rec.leads.iter().map(|l| l.samples.as_slice()).collect();
            let want = (scenario == Scenario::Noisy).then_some(50.0);
            assert_eq!(detect_mains(&leads, rec.sample_rate.hz()), want, "{}", scenario.name());
        }
    }
}
