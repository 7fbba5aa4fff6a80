//! One beat's Gaussian events and its true wave boundaries.
//!
//! **Boundary rule.** A wave's onset (end) is where the tangent at the steepest point of the leading edge of
//! its first event (trailing edge of its last event) meets the baseline. For a Gaussian of width σ that point
//! lies exactly 2σ from the centre, where the event has fallen to e⁻² ≈ 13.5 % of its peak. For T end this is
//! the tangent method (McLaughlin et al., Br Heart J 1995;74:84-9; references.md §8); the same rule is used for
//! P onset, P end, QRS onset and J point so that every boundary has one definition. At usual amplitudes the
//! outermost event is then 20–40 µV from the baseline (0.2–0.4 mm at 10 mm/mV), about the smallest deflection
//! a reader sees on paper, so the truth sits where a careful reader would mark. Boundaries are computed
//! from the events themselves ([`wave_span`]), not from the requested values, and tests check that they agree.

use super::model::{Event, PAPER_EVENTS};

/// Distance of a boundary from its event's centre, in units of σ (see the module's boundary rule).
pub const BOUNDARY_SIGMAS: f64 = 2.0;

/// Share of QT − QRS taken by the T wave's ±2σ span; the rest is the ST segment.
/// Common practice, no source: gives an ST segment and T wave of usual proportions (about 120 and 190 ms at
/// QT 400 ms, QRS 90 ms).
pub const T_SHARE: f64 = 0.6;

/// Timing of one kind of beat, seconds.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Timing {
    /// P onset to QRS onset; `None` for a beat with no P wave.
    pub pr_s: Option<f64>,
    /// P wave duration (P onset to P end).
    pub p_s: f64,
    /// QRS onset to J point.
    pub qrs_s: f64,
    /// QRS onset to T end.
    pub qt_s: f64,
}

/// Dipole (three components, µV) of each wave event: P, Q, R, S, T.
pub type Dipoles = [[f64; 3]; 5];

/// A beat's true boundaries, seconds from the start of the recording.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct BoundsS {
    /// P onset.
    pub p_on: Option<f64>,
    /// P end.
    pub p_end: Option<f64>,
    /// QRS onset.
    pub qrs_on: f64,
    /// J point.
    pub qrs_end: f64,
    /// T end.
    pub t_end: f64,
}

impl BoundsS {
    /// The earliest boundary of the beat (P onset, else QRS onset).
    #[must_use]
    pub fn first(&self) -> f64 {
        self.p_on.unwrap_or(self.qrs_on)
    }
}

/// Onset and end of a wave made of `events`, by the boundary rule.
#[must_use]
pub fn wave_span(events: &[Event]) -> (f64, f64) {
    let on = events.iter().map(|e| e.centre_s - BOUNDARY_SIGMAS * e.sigma_s).fold(f64::INFINITY, f64::min);
    let end = events.iter().map(|e| e.centre_s + BOUNDARY_SIGMAS * e.sigma_s).fold(f64::NEG_INFINITY, f64::max);
    (on, end)
}

/// Onset and end of the paper's Q–R–S events at 60 bpm relative to R, seconds.
fn paper_qrs_span() -> (f64, f64) {
    let unit: Vec<Event> = PAPER_EVENTS[1..4]
        .iter()
        .map(|p| Event { centre_s: p.centre_s(), sigma_s: p.sigma_s(), dipole_uv: [1.0; 3] })
        .collect();
    wave_span(&unit)
}

/// Seconds from QRS onset to the R peak for a QRS of `qrs_s` (the paper's Q–R–S, time-scaled).
#[must_use]
pub fn r_offset_s(qrs_s: f64) -> f64 {
    let (on, end) = paper_qrs_span();
    -on * qrs_s / (end - on)
}

/// The events of one beat with its R peak at `r_s`, and its true boundaries.
///
/// The Q, R and S events are the paper's (centres ±π/12 rad round R, widths b = 0.1 rad), time-scaled so their
/// span by the boundary rule equals `timing.qrs_s`. P is one event of width `p_s`/4 ending `pr_s − p_s` before
/// QRS onset; T is one event of width `T_SHARE·(qt_s − qrs_s)/4` ending `qt_s` after QRS onset.
#[must_use]
pub fn beat_events(r_s: f64, timing: &Timing, dipoles: &Dipoles) -> (Vec<Event>, BoundsS) {
    let (u_on, u_end) = paper_qrs_span();
    let scale = timing.qrs_s / (u_end - u_on);
    let mut events = Vec::with_capacity(5);
    let qrs: Vec<Event> = (1..4)
        .map(|i| Event {
            centre_s: r_s + scale * PAPER_EVENTS[i].centre_s(),
            sigma_s: scale * PAPER_EVENTS[i].sigma_s(),
            dipole_uv: dipoles[i],
        })
        .collect();
    let (qrs_on, qrs_end) = wave_span(&qrs);
    let (mut p_on, mut p_end) = (None, None);
    if let Some(pr) = timing.pr_s {
        let sigma = timing.p_s / (2.0 * BOUNDARY_SIGMAS);
        let p = Event { centre_s: qrs_on - pr + BOUNDARY_SIGMAS * sigma, sigma_s: sigma, dipole_uv: dipoles[0] };
        let (on, end) = wave_span(&[p]);
        (p_on, p_end) = (Some(on), Some(end));
        events.push(p);
    }
    events.extend(qrs);
    let t_sigma = T_SHARE * (timing.qt_s - timing.qrs_s) / (2.0 * BOUNDARY_SIGMAS);
    let t =
        Event { centre_s: qrs_on + timing.qt_s - BOUNDARY_SIGMAS * t_sigma, sigma_s: t_sigma, dipole_uv: dipoles[4] };
    let (_, t_end) = wave_span(&[t]);
    events.push(t);
    (events, BoundsS { p_on, p_end, qrs_on, qrs_end, t_end })
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn boundaries_follow_from_the_events_and_match_the_timing() {
        let timing = Timing { pr_s: Some(0.16), p_s: 0.1, qrs_s: 0.09, qt_s: 0.4 };
        let (events, b) = beat_events(5.0, &timing, &[[100.0; 3]; 5]);
        assert_eq!(events.len(), 5);
        let close = |a: f64, b: f64| (a - b).abs() < 1e-12;
        assert!(close(b.qrs_end - b.qrs_on, 0.09));
        assert!(close(b.qrs_on - b.p_on.unwrap_or(0.0), 0.16));
        assert!(close(b.p_end.unwrap_or(0.0) - b.p_on.unwrap_or(0.0), 0.1));
        assert!(close(b.t_end - b.qrs_on, 0.4));
        assert!(close(5.0 - b.qrs_on, r_offset_s(0.09)));
        // The paper's QRS is symmetric round R.
        assert!(close(r_offset_s(0.09), 0.045));
    }

    #[test]
    fn boundary_is_where_the_tangent_meets_the_baseline() {
        // Slow and obvious: find the steepest point of a sampled Gaussian's trailing edge numerically, draw the
        // tangent, and intersect it with zero. Source: McLaughlin et al. 1995 (tangent method), references.md §8.
        let e = Event { centre_s: 1.0, sigma_s: 0.05, dipole_uv: [300.0, 0.0, 0.0] };
        let dt = 1e-5;
        let (mut best_t, mut best_slope) = (0.0, 0.0);
        for k in 0..100_000 {
            let t = 1.0 + k as f64 * dt;
            let slope = (e.gaussian(t + dt)[0] - e.gaussian(t - dt)[0]) / (2.0 * dt);
            if slope < best_slope {
                (best_t, best_slope) = (t, slope);
            }
        }
        let crossing = best_t - e.gaussian(best_t)[0] / best_slope;
        let (_, end) = wave_span(&[e]);
        assert!((crossing - end).abs() < 1e-4, "tangent meets baseline at {crossing}, rule gives {end}");
    }

    #[test]
    fn beat_without_p_has_no_p_boundaries() {
        let timing = Timing { pr_s: None, p_s: 0.1, qrs_s: 0.15, qt_s: 0.46 };
        let (events, b) = beat_events(2.0, &timing, &[[100.0; 3]; 5]);
        assert_eq!(events.len(), 4);
        assert_eq!((b.p_on, b.p_end), (None, None));
        assert!((b.qrs_end - b.qrs_on - 0.15).abs() < 1e-12);
    }
}
