//! The beat schedule: when each beat's R peak falls, which beats are ectopic, and every beat's events.

use super::leads::{ectopic_dipoles, sinus_dipoles};
use super::model::Event;
use super::noise::Rng;
use super::shape::{BoundsS, Timing, beat_events, r_offset_s};
use super::{SynthError, SynthSpec};

/// How ectopic beats are placed.
#[derive(Debug, Clone, Copy, PartialEq, serde::Serialize, serde::Deserialize)]
#[serde(rename_all = "kebab-case")]
pub enum Ectopics {
    /// None.
    None,
    /// Every n-th beat (n ≥ 2), starting with beat n − 1 (0-based).
    Every(u32),
    /// Each beat after a sinus beat is ectopic with this probability (seeded).
    Chance(f64),
}

/// Kind of a synthetic beat.
#[derive(Debug, Clone, Copy, PartialEq, Eq, serde::Serialize, serde::Deserialize)]
#[serde(rename_all = "kebab-case")]
pub enum TrueKind {
    /// Sinus beat: P wave, normal QRS; the dominant beats.
    Sinus,
    /// Ectopic (ventricular) beat: premature, wider QRS, no P wave, discordant T.
    Ectopic,
}

/// QRS duration of ectopic beats, s. Common practice, no source (ventricular beats ≥ 120 ms).
pub const ECTOPIC_QRS_S: f64 = 0.15;
/// Coupling interval of an ectopic beat as a share of the current sinus RR. Common practice, no source.
pub const COUPLING: f64 = 0.65;
/// Least isoelectric gap between one beat's T end and the next beat's first onset, s.
pub const MIN_GAP_S: f64 = 0.04;
/// Time before the first beat's first onset, s.
pub const LEAD_IN_S: f64 = 0.25;
/// Period of the slow heart-rate swing of long recordings, s (one day).
pub const SWING_PERIOD_S: f64 = 86_400.0;

/// One planned beat.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct PlannedBeat {
    /// R peak time, s.
    pub r_s: f64,
    /// Sinus or ectopic.
    pub kind: TrueKind,
    /// True boundaries, s.
    pub bounds: BoundsS,
}

/// The whole schedule: beats in time order and their events sorted by start time.
#[derive(Debug, Clone)]
pub struct Plan {
    /// Beats in time order.
    pub beats: Vec<PlannedBeat>,
    /// Every event of every beat, sorted by [`Event::start_s`].
    pub events: Vec<Event>,
}

/// Timing of sinus beats.
#[must_use]
pub fn sinus_timing(spec: &SynthSpec) -> Timing {
    Timing { pr_s: Some(spec.pr_ms / 1e3), p_s: spec.p_ms / 1e3, qrs_s: spec.qrs_ms / 1e3, qt_s: spec.qt_ms / 1e3 }
}

/// Timing of ectopic beats: no P, QRS [`ECTOPIC_QRS_S`], QT longer by the extra QRS width.
#[must_use]
pub fn ectopic_timing(spec: &SynthSpec) -> Timing {
    let qrs = ECTOPIC_QRS_S.max(spec.qrs_ms / 1e3);
    Timing { pr_s: None, p_s: spec.p_ms / 1e3, qrs_s: qrs, qt_s: spec.qt_ms / 1e3 + qrs - spec.qrs_ms / 1e3 }
}

/// Nominal sinus RR at time `t`, s: 60 / (rate + swing·cos(2πt / day)).
#[must_use]
pub fn nominal_rr_s(spec: &SynthSpec, t: f64) -> f64 {
    60.0 / (spec.heart_rate_bpm + spec.heart_rate_swing_bpm * (std::f64::consts::TAU * t / SWING_PERIOD_S).cos())
}

/// Seconds from a beat's first onset to its R peak.
fn lead_to_r(timing: &Timing) -> f64 {
    timing.pr_s.unwrap_or(0.0) + r_offset_s(timing.qrs_s)
}

/// Seconds from R peak to T end.
fn r_to_t_end(timing: &Timing) -> f64 {
    timing.qt_s - r_offset_s(timing.qrs_s)
}

/// Shortest RR from a beat of timing `a` to one of timing `b` that keeps an isoelectric gap between them.
#[must_use]
pub fn min_rr_s(a: &Timing, b: &Timing) -> f64 {
    r_to_t_end(a) + MIN_GAP_S + lead_to_r(b)
}

/// Plans the beats of a recording of `spec.seconds`.
///
/// # Errors
/// [`SynthError::Timing`] when the sinus rate leaves no room for PR and QT, or the recording holds no beat.
pub fn plan(spec: &SynthSpec) -> Result<Plan, SynthError> {
    let sinus = sinus_timing(spec);
    let ectopic = ectopic_timing(spec);
    let fastest_rr = 60.0 / (spec.heart_rate_bpm + spec.heart_rate_swing_bpm.abs());
    let need = min_rr_s(&sinus, &sinus);
    if fastest_rr < need {
        return Err(SynthError::Timing(format!(
            "at {:.0} bpm the RR ({:.0} ms) is shorter than PR + QT + a {:.0} ms gap need ({:.0} ms)",
            60.0 / fastest_rr,
            fastest_rr * 1e3,
            MIN_GAP_S * 1e3,
            need * 1e3
        )));
    }
    let (sinus_dip, ectopic_dip) = (sinus_dipoles(spec), ectopic_dipoles(spec));
    let mut rng = Rng::new(spec.seed, 0x5EED_0001);
    let mut beats = Vec::new();
    let mut events = Vec::new();
    let mut r = LEAD_IN_S + lead_to_r(&sinus);
    let mut kind = TrueKind::Sinus;
    let mut last_rr = nominal_rr_s(spec, 0.0);
    for n in 0usize.. {
        let (timing, dip) = match kind {
            TrueKind::Sinus => (&sinus, &sinus_dip),
            TrueKind::Ectopic => (&ectopic, &ectopic_dip),
        };
        let (ev, bounds) = beat_events(r, timing, dip);
        if bounds.t_end + MIN_GAP_S > spec.seconds {
            break;
        }
        events.extend(ev);
        beats.push(PlannedBeat { r_s: r, kind, bounds });
        let next = match (kind, spec.ectopics) {
            (TrueKind::Ectopic, _) | (_, Ectopics::None) => TrueKind::Sinus,
            (_, Ectopics::Every(k)) if k >= 2 && (n + 2) % k as usize == 0 => TrueKind::Ectopic,
            (_, Ectopics::Chance(p)) if rng.uniform() < p => TrueKind::Ectopic,
            _ => TrueKind::Sinus,
        };
        let nominal = nominal_rr_s(spec, r);
        let jitter = rng.normalish();
        let mut rr = match (kind, next) {
            (_, TrueKind::Ectopic) => COUPLING * nominal,
            // Full compensatory pause: the sinus node keeps its own timing.
            (TrueKind::Ectopic, _) => 2.0 * nominal - last_rr,
            _ => nominal * (1.0 + spec.rr_variation * jitter).clamp(0.6, 1.6),
        };
        let next_timing = if next == TrueKind::Sinus { &sinus } else { &ectopic };
        rr = rr.max(min_rr_s(timing, next_timing));
        last_rr = rr;
        kind = next;
        r += rr;
    }
    if beats.is_empty() {
        return Err(SynthError::Timing(format!("{} s is too short to hold one whole beat", spec.seconds)));
    }
    events.sort_by(|a, b| a.start_s().total_cmp(&b.start_s()));
    Ok(Plan { beats, events })
}
