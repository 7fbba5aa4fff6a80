//! ST level at the J point and at J + 60 ms, per lead, relative to the isoelectric (PR-segment) level.

use crate::beat::Boundaries;
use crate::recording::LeadName;
use crate::units::Hertz;

use super::level::isoelectric_level;

/// Delay after the J point of the second ST reading, ms.
// Common practice, no source: J+60 ms is the usual second ST reading point (J+80 ms at slower rates).
pub const ST_DELAY_MS: f64 = 60.0;

/// ST levels of one lead, µV (positive = elevation).
#[derive(Debug, Clone, PartialEq, serde::Serialize, serde::Deserialize)]
pub struct StLevel {
    /// The lead.
    pub lead: LeadName,
    /// Level at the J point minus the isoelectric level.
    pub j_uv: Option<f64>,
    /// Level at J + 60 ms minus the isoelectric level.
    pub j60_uv: Option<f64>,
}

fn at(samples: &[f32], i: usize) -> Option<f64> {
    samples.get(i).map(|&x| f64::from(x)).filter(|x| x.is_finite())
}

/// ST levels of one lead's beat (samples on the beat's own axis, boundaries on the same axis).
#[must_use]
pub fn st_level(lead: LeadName, samples: &[f32], bounds: &Boundaries, fs: Hertz) -> StLevel {
    let iso = isoelectric_level(samples, bounds, fs);
    let delay = fs.sample_from_seconds(ST_DELAY_MS / 1000.0).round() as usize;
    let rel = |i: Option<usize>| Some(at(samples, i?)? - iso?);
    StLevel { lead, j_uv: rel(bounds.qrs_end), j60_uv: rel(bounds.qrs_end.map(|j| j.saturating_add(delay))) }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::recording::StandardLead;

    #[test]
    fn constructed_st_elevation() {
        // A beat at 500 Hz: isoelectric 20 µV, QRS 100..150, then ST at 120 µV rising to 170 µV by J+60 ms.
        let fs = Hertz::from_hz(500.0).unwrap_or_else(|_| unreachable!());
        let mut x = vec![20.0_f32; 400];
        for (k, v) in x[100..150].iter_mut().enumerate() {
            *v = 1000.0 * (k as f32 / 50.0 * std::f32::consts::PI).sin();
        }
        for (k, v) in x[150..].iter_mut().enumerate() {
            *v = 120.0 + 50.0 * (k as f32 / 30.0).min(1.0);
        }
        let b = Boundaries { qrs_on: Some(100), qrs_end: Some(150), t_end: Some(350), ..Boundaries::default() };
        let s = st_level(StandardLead::V2.into(), &x, &b, fs);
        assert_eq!(s.j_uv, Some(100.0));
        assert_eq!(s.j60_uv, Some(150.0));
        let b = Boundaries { qrs_on: Some(100), qrs_end: Some(390), ..Boundaries::default() };
        assert_eq!(st_level(StandardLead::V2.into(), &x, &b, fs).j60_uv, None);
    }
}
