//! Values derived from other reviewed values: when a reader sets or reverts QT, RR or heart rate, the five
//! QTc values are recomputed from the QT and RR in force (reviewed, else automatic), so that every view of the
//! review (rendered pages, agreement, the Ledger) shows QTc consistent with the reviewed QT and RR.

use super::model::{Measurement, Origin, Review};
use crate::measure::qtc::{FORMULAS, Qtc, qtc_checked};

/// Keys whose reviewed value changes the QTc values.
pub const QTC_INPUT_KEYS: [&str; 3] = ["qt_ms", "rr_ms", "heart_rate_bpm"];

impl Review {
    fn reviewed(&self, key: &str) -> Option<f64> {
        self.measurement(key).and_then(|m| m.reviewed_value)
    }

    /// The RR interval in force (ms): the reviewed RR, else RR from the reviewed heart rate, else the automatic
    /// RR, else RR from the automatic heart rate. Source: references.md §3 (RR = 60 / HR).
    fn rr_in_force(&self) -> Option<f64> {
        let from_hr = |hr: Option<f64>| hr.filter(|&h| h > 0.0).map(|h| 60_000.0 / h);
        let auto = |key: &str| self.measurement(key).and_then(|m| m.auto_value);
        self.reviewed("rr_ms")
            .or_else(|| from_hr(self.reviewed("heart_rate_bpm")))
            .or_else(|| auto("rr_ms"))
            .or_else(|| from_hr(auto("heart_rate_bpm")))
    }

    /// The QTc values the QT and RR in force give while any of [`QTC_INPUT_KEYS`] is reviewed; `None` while none
    /// is (the automatic QTc values stand) or when they give none.
    pub(super) fn qtc_in_force(&self) -> Option<Qtc> {
        let any_reviewed = QTC_INPUT_KEYS.iter().any(|k| self.reviewed(k).is_some());
        let qt = self.measurement("qt_ms").and_then(Measurement::value);
        if any_reviewed { qtc_checked(qt, self.rr_in_force()) } else { None }
    }

    /// Brings the QTc values in line with the QT and RR in force after a reviewed value of one of
    /// [`QTC_INPUT_KEYS`] changed. While any of them is reviewed, each QTc gets a reviewed value computed by
    /// [`crate::measure::qtc::qtc`] (origin `moved`, or `placed` with no automatic value); when none is reviewed,
    /// the automatic QTc values stand again. Each change is recorded in the history by `reader`.
    pub(super) fn recompute_qtc(&mut self, reader: &str) {
        let q = self.qtc_in_force();
        for (key, name) in FORMULAS {
            let idx = self.measurements.iter().position(|m| m.key == key);
            // A formula that gives no positive QTc gives none (`Qtc::by_key`): that QTc stays automatic.
            match (q.and_then(|q| q.by_key(key)), idx) {
                (Some(value), idx) => {
                    let idx = idx.unwrap_or_else(|| {
                        // Labelled as `measure::Measurements::values` labels it.
                        let label = format!("QTc ({name})");
                        self.measurements.push(Measurement::automatic(key, &label, None, "ms"));
                        self.measurements.len() - 1
                    });
                    let m = &mut self.measurements[idx];
                    if m.reviewed_value == Some(value) {
                        continue;
                    }
                    let old = m.value();
                    m.reviewed_value = Some(value);
                    m.origin = if m.auto_value.is_some() { Origin::Moved } else { Origin::Placed };
                    let origin = m.origin;
                    self.record(
                        reader,
                        format!("measurement {key} ({origin}) recomputed from QT and RR"),
                        old.map(|v| format!("{v} ms")),
                        Some(format!("{value} ms")),
                    );
                }
                (None, Some(idx)) if self.measurements[idx].reviewed_value.is_some() => {
                    self.revert_at(idx, reader, &format!("measurement {key} reverted to automatic with QT and RR"));
                }
                (None, _) => {}
            }
        }
    }
}

#[cfg(test)]
#[allow(clippy::unwrap_used)] // a test fails by panicking
mod tests {
    use super::*;
    use crate::measure::qtc::qtc;
    use crate::review::identity::RecordingIdentity;

    fn review_with_auto() -> Review {
        let id = RecordingIdentity::example();
        let mut r = Review::new(id, "AB");
        let auto = qtc(370.0, 710.0);
        let put = |r: &mut Review, key: &str, v: f64, unit: &str| {
            r.put_automatic(Measurement::automatic(key, key, Some(v), unit))
        };
        put(&mut r, "heart_rate_bpm", 60_000.0 / 710.0, "bpm").unwrap();
        put(&mut r, "rr_ms", 710.0, "ms").unwrap();
        put(&mut r, "qt_ms", 370.0, "ms").unwrap();
        for (key, _) in FORMULAS {
            put(&mut r, key, auto.by_key(key).unwrap(), "ms").unwrap();
        }
        r
    }

    fn qtc_values(r: &Review) -> Vec<(Option<f64>, Origin)> {
        FORMULAS.iter().map(|(k, _)| r.measurement(k).map_or((None, Origin::Auto), |m| (m.value(), m.origin))).collect()
    }

    #[test]
    fn reviewed_qt_and_rr_recompute_qtc_and_revert_restores_automatic() {
        let mut r = review_with_auto();
        let auto = qtc_values(&r);
        r.set_measurement("qt_ms", 400.0, "AB").unwrap();
        // Source: references.md §3 — Bazett, Heart 1920;7:353-70 (QT/√RR); Fridericia, Acta Med Scand
        // 1920;53:469-86 (QT/∛RR); Framingham, Sagie et al., Am J Cardiol 1992;70:797-801 (QT + 154·(1 − RR));
        // Hodges, J Am Coll Cardiol 1983;1:694 (QT + 1.75·(HR − 60)); Rautaharju et al., Int J Cardiol
        // 2014;174:535-40 (QT·(120 + HR)/180). RR = 0.710 s, HR = 84.51/min.
        let (rr_s, hr): (f64, f64) = (0.710, 60.0 / 0.710);
        let expected = [
            400.0 / rr_s.sqrt(),
            400.0 / f64::cbrt(rr_s),
            400.0 + 154.0 * (1.0 - rr_s),
            400.0 + 1.75 * (hr - 60.0),
            400.0 * (120.0 + hr) / 180.0,
        ];
        for ((value, origin), want) in qtc_values(&r).into_iter().zip(expected) {
            assert!(value.is_some_and(|v| (v - want).abs() < 1e-9), "{value:?} vs {want}");
            assert_eq!(origin, Origin::Moved);
        }
        // One history entry for QT and one for each QTc.
        assert_eq!(r.history.len(), 6);
        assert!(r.history[1..].iter().all(|c| c.what.starts_with("measurement qtc_") && c.by == "AB"));

        // The worked example of references.md §3: QT 400 ms, RR 800 ms → Bazett 447.21 ms.
        r.set_measurement("rr_ms", 800.0, "AB").unwrap();
        let bazett = r.measurement("qtc_bazett_ms").and_then(|m| m.reviewed_value).unwrap();
        assert!((bazett - 447.21).abs() < 0.005, "{bazett}");

        r.revert_measurement("rr_ms", "AB").unwrap();
        r.revert_measurement("qt_ms", "AB").unwrap();
        assert_eq!(qtc_values(&r), auto);
        assert!(r.measurements.iter().all(|m| m.reviewed_value.is_none()));
    }

    #[test]
    fn reviewed_heart_rate_gives_the_rr() {
        let mut r = review_with_auto();
        r.set_measurement("heart_rate_bpm", 75.0, "CD").unwrap();
        let want = qtc(370.0, 800.0).bazett;
        let bazett = r.measurement("qtc_bazett_ms").and_then(|m| m.reviewed_value).unwrap();
        assert!((bazett - want).abs() < 1e-9);
    }

    #[test]
    fn other_keys_leave_qtc_alone() {
        let mut r = review_with_auto();
        r.set_measurement("pr_ms", 180.0, "AB").unwrap();
        assert!(FORMULAS.iter().all(|(k, _)| r.measurement(k).is_some_and(|m| m.reviewed_value.is_none())));
        assert_eq!(r.history.len(), 1);
    }
}
