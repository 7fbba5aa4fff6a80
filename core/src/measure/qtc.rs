//! Heart-rate correction of the QT interval: five published formulas.
//!
//! Inputs and outputs are milliseconds; heart rate HR = 60 000 / RR(ms). Sources (references.md §3):
//! - Bazett, Heart 1920;7:353-70: QTc = QT / √RR(s).
//! - Fridericia, Acta Med Scand 1920;53:469-86: QTc = QT / ∛RR(s).
//! - Framingham: Sagie et al., Am J Cardiol 1992;70:797-801: QTc = QT + 154 ms · (1 − RR(s)).
//! - Hodges et al., J Am Coll Cardiol 1983;1:694: QTc = QT + 1.75 ms · (HR − 60).
//! - Rautaharju, Mason, Akiyama, Int J Cardiol 2014;174:535-40: QTc = QT · (120 + HR) / 180.

/// QT corrected for heart rate by each formula, in milliseconds.
#[derive(Debug, Clone, Copy, PartialEq, serde::Serialize, serde::Deserialize)]
pub struct Qtc {
    /// Bazett 1920.
    pub bazett: f64,
    /// Fridericia 1920.
    pub fridericia: f64,
    /// Framingham (Sagie et al. 1992).
    pub framingham: f64,
    /// Hodges et al. 1983.
    pub hodges: f64,
    /// Rautaharju et al. 2014.
    pub rautaharju: f64,
}

/// Each formula's measurement key and name, in the order the values are listed.
pub const FORMULAS: [(&str, &str); 5] = [
    ("qtc_bazett_ms", "Bazett"),
    ("qtc_fridericia_ms", "Fridericia"),
    ("qtc_framingham_ms", "Framingham"),
    ("qtc_hodges_ms", "Hodges"),
    ("qtc_rautaharju_ms", "Rautaharju"),
];

impl Qtc {
    /// The value of one formula by its measurement key (`qtc_bazett_ms`, `qtc_fridericia_ms`,
    /// `qtc_framingham_ms`, `qtc_hodges_ms`, `qtc_rautaharju_ms`); `None` for another key, and where the formula,
    /// carried far past the rates it was fitted on, gives no positive QTc (Framingham below about 17 bpm: at QT
    /// 283 ms and RR 3.75 s it gives −140 ms, which is no QT interval).
    #[must_use]
    pub fn by_key(&self, key: &str) -> Option<f64> {
        let v = match key {
            "qtc_bazett_ms" => self.bazett,
            "qtc_fridericia_ms" => self.fridericia,
            "qtc_framingham_ms" => self.framingham,
            "qtc_hodges_ms" => self.hodges,
            "qtc_rautaharju_ms" => self.rautaharju,
            _ => return None,
        };
        (v > 0.0).then_some(v)
    }
}

/// The five QTc values for a QT and an RR interval, both in milliseconds.
///
/// The inputs must be finite and positive; otherwise the results are NaN or meaningless. Use
/// [`qtc_checked`] when the inputs may be absent or invalid.
#[must_use]
pub fn qtc(qt_ms: f64, rr_ms: f64) -> Qtc {
    let rr_s = rr_ms / 1000.0;
    let hr = 60_000.0 / rr_ms;
    Qtc {
        bazett: qt_ms / rr_s.sqrt(),
        fridericia: qt_ms / rr_s.cbrt(),
        framingham: qt_ms + 154.0 * (1.0 - rr_s),
        hodges: qt_ms + 1.75 * (hr - 60.0),
        rautaharju: qt_ms * (120.0 + hr) / 180.0,
    }
}

/// [`qtc`] when both values are present, finite and positive; `None` otherwise.
#[must_use]
pub fn qtc_checked(qt_ms: Option<f64>, rr_ms: Option<f64>) -> Option<Qtc> {
    let ok = |v: f64| v.is_finite() && v > 0.0;
    match (qt_ms, rr_ms) {
        (Some(qt), Some(rr)) if ok(qt) && ok(rr) => Some(qtc(qt, rr)),
        _ => None,
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn identity_at_sixty_per_minute() {
        // Source: references.md §3 — at RR = 1000 ms (HR 60) every formula returns QT unchanged.
        let q = qtc(412.0, 1000.0);
        for v in [q.bazett, q.fridericia, q.framingham, q.hodges, q.rautaharju] {
            assert!((v - 412.0).abs() < 1e-9, "{v}");
        }
    }

    #[test]
    fn by_key_gives_each_formula_and_no_qtc_below_zero() {
        // Source: Sagie et al. 1992, Am J Cardiol — Framingham QTc = QT + 154 (1 − RR): 283 + 154 · (1 − 3.75).
        let q = qtc(283.0, 3750.0);
        assert!((q.framingham - (283.0 - 154.0 * 2.75)).abs() < 1e-9);
        assert_eq!(q.by_key("qtc_framingham_ms"), None);
        assert_eq!(q.by_key("qtc_bazett_ms"), Some(q.bazett));
        assert_eq!(q.by_key("qtc_rautaharju_ms"), Some(q.rautaharju));
        assert_eq!(q.by_key("qt_ms"), None);
        let at_60 = qtc(400.0, 1000.0);
        for (key, _) in FORMULAS {
            assert_eq!(at_60.by_key(key), Some(400.0), "{key}");
        }
    }

    #[test]
    fn checked_rejects_missing_and_nonsense() {
        assert!(qtc_checked(None, Some(800.0)).is_none());
        assert!(qtc_checked(Some(400.0), Some(0.0)).is_none());
        assert!(qtc_checked(Some(f64::NAN), Some(800.0)).is_none());
        assert!(qtc_checked(Some(400.0), Some(800.0)).is_some());
    }
}
