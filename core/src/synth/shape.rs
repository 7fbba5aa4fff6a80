//! One beat's events and its true wave boundaries.
//!
//! **Boundary rule.** Every event has compact support (see `model`): it is exactly zero before its leading
//! cut tᵢ − k·σᵢ and after its trailing cut tᵢ + k·σᵢ, k = [`CUT_SIGMAS`]. A wave's onset is where its first
//! event starts and its end where its last event ends: the instant the wave leaves the baseline and the instant
//! it returns to it, in every lead that does not stand exactly perpendicular to that first (last) event's
//! dipole (so also the earliest onset and latest end over the leads). The truth is therefore a
//! property of the waveform, not of any delineation method (tangent, threshold, area): any method measures
//! against the same definite instants. The cuts are placed where the requested durations put them (P
//! duration, QRS, QT), so each event's σ is its span / (2k). Boundaries are computed from the events
//! themselves ([`wave_span`]), not from the requested values, and tests check that they agree.

use super::model::{CUT_SIGMAS, Event, PAPER_EVENTS};

/// Share of QT − QRS taken by the T wave's support (±k·σ); the rest is the ST segment.
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

/// Onset and end of a wave made of `events`, by the boundary rule: the first start and the last end.
#[must_use]
pub fn wave_span(events: &[Event]) -> (f64, f64) {
    let on = events.iter().map(Event::start_s).fold(f64::INFINITY, f64::min);
    let end = events.iter().map(Event::end_s).fold(f64::NEG_INFINITY, f64::max);
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
/// span by the boundary rule equals `timing.qrs_s`. P is one event of width `p_s`/(2k) ending `pr_s − p_s`
/// before QRS onset; T is one event of width `T_SHARE·(qt_s − qrs_s)/(2k)` ending `qt_s` after QRS onset.
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
        let sigma = timing.p_s / (2.0 * CUT_SIGMAS);
        let p = Event { centre_s: qrs_on - pr + CUT_SIGMAS * sigma, sigma_s: sigma, dipole_uv: dipoles[0] };
        let (on, end) = wave_span(&[p]);
        (p_on, p_end) = (Some(on), Some(end));
        events.push(p);
    }
    events.extend(qrs);
    let t_sigma = T_SHARE * (timing.qt_s - timing.qrs_s) / (2.0 * CUT_SIGMAS);
    let t = Event { centre_s: qrs_on + timing.qt_s - CUT_SIGMAS * t_sigma, sigma_s: t_sigma, dipole_uv: dipoles[4] };
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
    fn boundaries_are_where_the_beat_leaves_and_regains_the_baseline() {
        // Slow and obvious: sum the beat's events on a fine grid and find, per wave, the first and last
        // instant where the sum is not zero.
        let timing = Timing { pr_s: Some(0.16), p_s: 0.1, qrs_s: 0.09, qt_s: 0.4 };
        let dip = [
            [150.0, 80.0, 30.0],
            [-160.0, -90.0, 80.0],
            [1000.0, 700.0, -150.0],
            [-250.0, -170.0, -80.0],
            [300.0, 200.0, 80.0],
        ];
        let (events, b) = beat_events(3.0, &timing, &dip);
        let dt = 1e-6;
        let sum = |t: f64| events.iter().map(|e| e.value(t)[0]).sum::<f64>();
        let nonzero: Vec<f64> = (0..1_000_000).map(|k| 2.6 + k as f64 * dt).filter(|&t| sum(t) != 0.0).collect();
        // Split into waves at gaps of flat baseline.
        let mut waves: Vec<(f64, f64)> = Vec::new();
        for &t in &nonzero {
            match waves.last_mut() {
                Some(w) if t - w.1 < 2.0 * dt => w.1 = t,
                _ => waves.push((t, t)),
            }
        }
        let want = [
            (b.p_on.unwrap_or(0.0), b.p_end.unwrap_or(0.0)),
            (b.qrs_on, b.qrs_end),
            (b.qrs_end + 0.4 * (b.t_end - b.qrs_end), b.t_end),
        ];
        assert_eq!(waves.len(), 3, "{waves:?}");
        for (got, want) in waves.iter().zip(want) {
            assert!((got.0 - want.0).abs() <= 2.0 * dt && (got.1 - want.1).abs() <= 2.0 * dt, "{got:?} vs {want:?}");
        }
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
