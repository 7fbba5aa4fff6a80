//! Reference levels on a beat: the isoelectric (PR-segment) level and the level before the P wave.

use crate::beat::Boundaries;
use crate::units::Hertz;

use super::stats::median;

/// Length of the window before QRS onset that gives the isoelectric level, ms.
// Common practice, no source: the PR segment just before the QRS is taken as the isoelectric reference.
pub const ISO_WINDOW_MS: f64 = 20.0;

/// Length of the window before P onset that gives the P wave's reference level, ms.
// Common practice, no source.
pub const PRE_P_WINDOW_MS: f64 = 10.0;

fn window_samples(fs: Hertz, ms: f64) -> usize {
    (fs.sample_from_seconds(ms / 1000.0).round() as usize).max(1)
}

/// Median of finite samples in `samples[start..=end]`, `None` when the range is empty or out of bounds.
fn median_in(samples: &[f32], start: usize, end: usize) -> Option<f64> {
    if start > end || end >= samples.len() {
        return None;
    }
    median(&samples[start..=end].iter().map(|&x| f64::from(x)).collect::<Vec<_>>())
}

/// Isoelectric level (µV) of one lead: the median over the PR segment just before QRS onset — from P end (when
/// known and within [`ISO_WINDOW_MS`]) or [`ISO_WINDOW_MS`] before QRS onset, to QRS onset.
/// `None` without a QRS onset inside the samples.
#[must_use]
pub fn isoelectric_level(samples: &[f32], bounds: &Boundaries, fs: Hertz) -> Option<f64> {
    let q = bounds.qrs_on?;
    let mut start = q.saturating_sub(window_samples(fs, ISO_WINDOW_MS));
    if let Some(pe) = bounds.p_end.filter(|&pe| pe <= q) {
        start = start.max(pe);
    }
    median_in(samples, start, q)
}

/// Reference level (µV) for the P wave: the median over [`PRE_P_WINDOW_MS`] up to P onset.
#[must_use]
pub fn pre_p_level(samples: &[f32], bounds: &Boundaries, fs: Hertz) -> Option<f64> {
    let p = bounds.p_on?;
    median_in(samples, p.saturating_sub(window_samples(fs, PRE_P_WINDOW_MS)), p)
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn pr_segment_level() {
        let fs = Hertz::from_hz(500.0).unwrap_or_else(|_| unreachable!());
        let mut x = vec![0.0_f32; 300];
        for v in &mut x[90..=100] {
            *v = 35.0;
        }
        x[100] = 500.0; // the QRS starts rising at its onset; the median ignores one sample
        let b = Boundaries { p_end: Some(92), qrs_on: Some(100), ..Boundaries::default() };
        assert_eq!(isoelectric_level(&x, &b, fs), Some(35.0));
        assert_eq!(isoelectric_level(&x, &Boundaries::default(), fs), None);
        let b = Boundaries { qrs_on: Some(400), ..Boundaries::default() };
        assert_eq!(isoelectric_level(&x, &b, fs), None);
    }
}
