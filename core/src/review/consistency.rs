//! What a loaded review says that its own parts contradict: a file edited by hand (or by another program) can
//! hold a reviewed value with origin `auto`, a value no history entry records, a final stage nobody set, or QTc
//! values that no longer follow its QT and RR. Such a review loads (it may be all a reader has), and these are
//! said beside it so that nobody takes it for a record the workstation kept.

use super::model::{Origin, Review, Stage};
use crate::measure::qtc::FORMULAS;

/// QTc values this far (ms) from the ones the review's QT and RR give do not follow them.
// Common practice, no source: values are written with their digits; a QTc recomputed and saved agrees to 1e-9.
const QTC_TOLERANCE_MS: f64 = 0.5;

impl Review {
    /// Contradictions between this review's parts, each as a sentence for the reader (empty for a review the
    /// workstation or `review new` wrote). A review migrated from version 1 (which kept no history) is not held
    /// to its history.
    #[must_use]
    pub fn inconsistencies(&self) -> Vec<String> {
        let mut found = Vec::new();
        let migrated = self.history.iter().any(|c| c.what.starts_with("format_version"));
        let recorded = |key: &str| {
            let what = format!("measurement {key} ");
            self.history.iter().any(|c| c.what.starts_with(&what))
        };
        for m in &self.measurements {
            match (m.origin, m.reviewed_value) {
                (Origin::Auto, Some(v)) => {
                    found.push(format!("measurement {} holds a reviewed value ({v}) but says origin auto", m.key));
                }
                (Origin::Moved | Origin::Placed, None) => {
                    found.push(format!("measurement {} says origin {} but holds no reviewed value", m.key, m.origin));
                }
                _ => {}
            }
            if let Some(v) = m.reviewed_value.filter(|_| !migrated && !recorded(&m.key)) {
                found.push(format!("measurement {}: the reviewed value {v} has no history entry", m.key));
            }
        }
        if self.stage != Stage::Draft && !migrated && !self.history.iter().any(|c| c.what == "stage") {
            found.push(format!("the stage is {} but no history entry sets it", self.stage));
        }
        if let Some(q) = self.qtc_in_force() {
            let stale: Vec<&str> = FORMULAS
                .iter()
                .filter(|(key, _)| {
                    let want = q.by_key(key);
                    let have = self.measurement(key).and_then(super::model::Measurement::value);
                    matches!((want, have), (Some(w), Some(h)) if (w - h).abs() > QTC_TOLERANCE_MS)
                })
                .map(|(_, name)| *name)
                .collect();
            if !stale.is_empty() {
                found.push(format!(
                    "QTc by {} does not follow the review's QT and RR (edited by hand?)",
                    crate::recording::spoken_list(stale)
                ));
            }
        }
        found
    }
}

#[cfg(test)]
#[allow(clippy::unwrap_used)] // a test fails by panicking
mod tests {
    use super::super::model::Measurement;
    use super::*;
    use crate::review::identity::RecordingIdentity;

    fn review() -> Review {
        let mut r = Review::new(RecordingIdentity::example(), "AB");
        r.put_automatic(Measurement::automatic("qt_ms", "QT", Some(400.0), "ms")).unwrap();
        r.put_automatic(Measurement::automatic("rr_ms", "RR", Some(1000.0), "ms")).unwrap();
        for (key, name) in FORMULAS {
            r.put_automatic(Measurement::automatic(key, &format!("QTc ({name})"), Some(400.0), "ms")).unwrap();
        }
        r
    }

    #[test]
    fn a_review_kept_by_the_workstation_has_none() {
        let mut r = review();
        assert!(r.inconsistencies().is_empty());
        r.set_measurement("qt_ms", 440.0, "AB").unwrap();
        r.set_stage(Stage::Final, "AB").unwrap();
        assert!(r.inconsistencies().is_empty(), "{:?}", r.inconsistencies());
    }

    #[test]
    fn hand_edits_that_contradict_the_review_are_named() {
        // QT set to 460 by hand with origin auto and no history entry, the stage set to final by hand: the QTc
        // values still follow QT 400.
        let mut r = review();
        let qt = r.measurements.iter_mut().find(|m| m.key == "qt_ms").unwrap();
        qt.reviewed_value = Some(460.0);
        r.stage = Stage::Final;
        let found = r.inconsistencies();
        assert_eq!(found.len(), 4, "{found:#?}");
        assert!(found[0].contains("qt_ms holds a reviewed value (460) but says origin auto"), "{found:#?}");
        assert!(found[1].contains("qt_ms: the reviewed value 460 has no history entry"), "{found:#?}");
        assert!(found[2].contains("the stage is final but no history entry sets it"), "{found:#?}");
        assert!(found[3].starts_with("QTc by Bazett, Fridericia, Framingham, Hodges and Rautaharju"), "{found:#?}");
    }
}
