//! Intervals and QTc from marks on the representative beat, for the Ledger.
//!
//! Kept small and local until the core measurement module (`measure::intervals`, `measure::qtc`) is merged;
//! the formulas are the published ones listed in references.md §3.

use isoline_core::beat::Boundaries;

/// Global intervals in ms from marks on one beat axis sampled at `rate_hz`. `None` where a mark is missing.
#[derive(Debug, Clone, Copy, Default, PartialEq)]
pub struct Intervals {
    /// P onset to P end.
    pub p_ms: Option<f64>,
    /// P onset to QRS onset.
    pub pr_ms: Option<f64>,
    /// QRS onset to J point.
    pub qrs_ms: Option<f64>,
    /// QRS onset to T end.
    pub qt_ms: Option<f64>,
}

impl Intervals {
    /// Intervals from marks (sample indices) at `rate_hz`.
    #[must_use]
    pub fn from_marks(b: &Boundaries, rate_hz: f64) -> Self {
        let span = |a: Option<usize>, z: Option<usize>| match (a, z) {
            (Some(a), Some(z)) if z > a => Some((z - a) as f64 * 1000.0 / rate_hz),
            _ => None,
        };
        Self {
            p_ms: span(b.p_on, b.p_end),
            pr_ms: span(b.p_on, b.qrs_on),
            qrs_ms: span(b.qrs_on, b.qrs_end),
            qt_ms: span(b.qrs_on, b.t_end),
        }
    }
}

/// The five QTc formulas, each in ms.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Qtc {
    /// QT/√RR. Source: Bazett, Heart 1920;7:353-70.
    pub bazett: f64,
    /// QT/RR^(1/3). Source: Fridericia, Acta Med Scand 1920;53:469-86.
    pub fridericia: f64,
    /// QT + 0.154·(1 − RR). Source: Sagie et al., Am J Cardiol 1992;70:797-801.
    pub framingham: f64,
    /// QT + 1.75·(HR − 60) ms. Source: Hodges et al., J Am Coll Cardiol 1983;1:694.
    pub hodges: f64,
    /// QT·(120 + HR)/180. Source: Rautaharju, Mason, Akiyama, Int J Cardiol 2014;174:535-40.
    pub rautaharju: f64,
}

impl Qtc {
    /// Every QTc from QT and RR in ms. `None` for a non-positive RR or QT.
    #[must_use]
    pub fn new(qt_ms: f64, rr_ms: f64) -> Option<Self> {
        if !(qt_ms > 0.0 && rr_ms > 0.0) {
            return None;
        }
        let (qt, rr) = (qt_ms / 1000.0, rr_ms / 1000.0);
        let hr = 60.0 / rr;
        Some(Self {
            bazett: qt / rr.sqrt() * 1000.0,
            fridericia: qt / rr.cbrt() * 1000.0,
            framingham: (qt + 0.154 * (1.0 - rr)) * 1000.0,
            hodges: qt_ms + 1.75 * (hr - 60.0),
            rautaharju: qt_ms * (120.0 + hr) / 180.0,
        })
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn qtc_worked_examples() {
        // Source: references.md §3 worked example computed from the published formulas: QT 400, RR 800 ms.
        let q = Qtc::new(400.0, 800.0).unwrap_or_else(|| unreachable!());
        assert!((q.bazett - 447.21).abs() < 0.01);
        assert!((q.fridericia - 430.89).abs() < 0.01);
        assert!((q.framingham - 430.80).abs() < 0.01);
        assert!((q.hodges - 426.25).abs() < 0.01);
        assert!((q.rautaharju - 433.33).abs() < 0.01);
        // At RR 1000 ms every formula returns QT.
        let q = Qtc::new(370.0, 1000.0).unwrap_or_else(|| unreachable!());
        for v in [q.bazett, q.fridericia, q.framingham, q.hodges, q.rautaharju] {
            assert!((v - 370.0).abs() < 1e-9);
        }
    }

    #[test]
    fn intervals_from_marks() {
        let b = Boundaries { p_on: Some(100), p_end: Some(150), qrs_on: Some(180), qrs_end: Some(230), t_end: Some(380) };
        let i = Intervals::from_marks(&b, 500.0);
        assert_eq!(i.pr_ms, Some(160.0));
        assert_eq!(i.qrs_ms, Some(100.0));
        assert_eq!(i.qt_ms, Some(400.0));
        assert_eq!(i.p_ms, Some(100.0));
        assert_eq!(Intervals::from_marks(&Boundaries::default(), 500.0).qt_ms, None);
    }
}
