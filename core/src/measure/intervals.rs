//! Global intervals from wave boundaries: P duration, PR, QRS and QT.

use crate::beat::{Beat, BeatKind, Boundaries};
use crate::units::Hertz;

use super::stats::median;

/// Intervals in milliseconds; `None` where a boundary is missing or the boundaries are out of order.
#[derive(Debug, Clone, Copy, Default, PartialEq, serde::Serialize, serde::Deserialize)]
pub struct Intervals {
    /// P onset → P end.
    pub p_duration_ms: Option<f64>,
    /// P onset → QRS onset.
    pub pr_ms: Option<f64>,
    /// QRS onset → J point.
    pub qrs_ms: Option<f64>,
    /// QRS onset → T end.
    pub qt_ms: Option<f64>,
}

/// Intervals of one set of boundaries (sample indices at rate `fs`).
///
/// Cheap enough to call on every drag of a boundary handle.
#[must_use]
pub fn intervals(bounds: &Boundaries, fs: Hertz) -> Intervals {
    let span = |a: Option<usize>, b: Option<usize>| match (a, b) {
        (Some(a), Some(b)) if b > a => Some(fs.ms_from_samples((b - a) as f64)),
        _ => None,
    };
    // Two marks, where both are known, in order (`a` before `b`, or at the same sample when `same` is allowed).
    let ordered = |a: Option<usize>, b: Option<usize>, same: bool| match (a, b) {
        (Some(a), Some(b)) => b > a || (same && b == a),
        _ => true,
    };
    // The P wave ends no earlier than it starts and no later than the QRS starts; the QRS ends after it starts
    // (a QRS onset after the J point is wrong, or the J point is, so neither QRS nor QT stands); a T end lies
    // after the J point. Marks out of this order (placed by hand, say) give no interval they bound.
    let p_ok = ordered(bounds.p_on, bounds.p_end, true) && ordered(bounds.p_end, bounds.qrs_on, true);
    let qrs_ok = ordered(bounds.qrs_on, bounds.qrs_end, false);
    let t_ok = ordered(bounds.qrs_end, bounds.t_end, false);
    Intervals {
        p_duration_ms: if p_ok { span(bounds.p_on, bounds.p_end) } else { None },
        pr_ms: if p_ok { span(bounds.p_on, bounds.qrs_on) } else { None },
        qrs_ms: span(bounds.qrs_on, bounds.qrs_end),
        qt_ms: if qrs_ok && t_ok { span(bounds.qrs_on, bounds.t_end) } else { None },
    }
}

/// Median of each interval over the dominant beats that have it (a cross-check of the representative beat).
#[must_use]
pub fn median_intervals(beats: &[Beat], fs: Hertz) -> Intervals {
    let each: Vec<Intervals> =
        beats.iter().filter(|b| b.kind == BeatKind::Dominant).map(|b| intervals(&b.bounds, fs)).collect();
    let med = |f: fn(&Intervals) -> Option<f64>| median(&each.iter().filter_map(f).collect::<Vec<_>>());
    Intervals {
        p_duration_ms: med(|i| i.p_duration_ms),
        pr_ms: med(|i| i.pr_ms),
        qrs_ms: med(|i| i.qrs_ms),
        qt_ms: med(|i| i.qt_ms),
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    fn fs() -> Hertz {
        Hertz::from_hz(500.0).unwrap_or_else(|_| unreachable!())
    }

    #[test]
    fn spans_at_500_hz() {
        let b =
            Boundaries { p_on: Some(100), p_end: Some(150), qrs_on: Some(180), qrs_end: Some(225), t_end: Some(380) };
        let i = intervals(&b, fs());
        assert_eq!(i.p_duration_ms, Some(100.0));
        assert_eq!(i.pr_ms, Some(160.0));
        assert_eq!(i.qrs_ms, Some(90.0));
        assert_eq!(i.qt_ms, Some(400.0));
    }

    #[test]
    fn missing_or_disordered_boundaries_give_none() {
        let b = Boundaries { p_on: None, p_end: Some(150), qrs_on: Some(180), qrs_end: Some(225), t_end: Some(200) };
        let i = intervals(&b, fs());
        assert_eq!(i.p_duration_ms, None);
        assert_eq!(i.pr_ms, None);
        assert_eq!(i.qrs_ms, Some(90.0));
        assert_eq!(i.qt_ms, None);
        let b = Boundaries { p_on: Some(100), p_end: Some(190), qrs_on: Some(180), ..Boundaries::default() };
        assert_eq!(intervals(&b, fs()).pr_ms, None);
        // A P onset dragged past the P end: neither P duration nor PR.
        let b = Boundaries { p_on: Some(170), p_end: Some(150), qrs_on: Some(180), ..Boundaries::default() };
        assert_eq!((intervals(&b, fs()).p_duration_ms, intervals(&b, fs()).pr_ms), (None, None));
        // A QRS onset dragged past the J point: neither QRS nor QT; the PR, which the J point does not bound,
        // stands.
        let b =
            Boundaries { p_on: Some(100), p_end: Some(150), qrs_on: Some(200), qrs_end: Some(190), t_end: Some(400) };
        let i = intervals(&b, fs());
        assert_eq!((i.p_duration_ms, i.pr_ms, i.qrs_ms, i.qt_ms), (Some(100.0), Some(200.0), None, None));
    }

    #[test]
    fn medians_use_dominant_beats_only() {
        let mk = |q: usize, kind| Beat {
            r: 0,
            kind,
            bounds: Boundaries { qrs_on: Some(100), qrs_end: Some(100 + q), ..Boundaries::default() },
        };
        let beats = [
            mk(40, BeatKind::Dominant),
            mk(45, BeatKind::Dominant),
            mk(50, BeatKind::Dominant),
            mk(90, BeatKind::Other),
            mk(95, BeatKind::Other),
        ];
        assert_eq!(median_intervals(&beats, fs()).qrs_ms, Some(90.0));
        assert_eq!(median_intervals(&beats, fs()).qt_ms, None);
    }
}
