//! A made-up review for the review tests (our own demo scenario: ward 7, bed 2; no real patient).

#![allow(dead_code, clippy::unwrap_used)]

use isoline_core::MarkKind;
use isoline_core::caliper::{Caliper, CaliperKind};
use isoline_core::review::{MarkOn, Measurement, RecordingIdentity, Review};

/// Identity of a made-up recording with a given SHA-256.
pub fn identity(sha256: &str) -> RecordingIdentity {
    RecordingIdentity {
        file_name: "ward7-bed2.csv".into(),
        relative_path: "ward7-bed2.csv".into(),
        sha256: sha256.into(),
        leads: vec!["I".into(), "II".into(), "V5".into()],
        sample_rate_hz: 500.0,
    }
}

/// A review with automatic values, a moved and a placed mark, a caliper, a reviewed value and a summary.
pub fn sample_review(reader: &str) -> Review {
    let mut r = Review::new(identity(&"ab".repeat(32)), reader);
    r.put_automatic(Measurement::automatic("qt_ms", "QT", Some(402.0), "ms")).unwrap();
    r.put_automatic(Measurement::automatic("qrs_ms", "QRS duration", Some(94.0), "ms")).unwrap();
    r.put_automatic(Measurement::automatic("pr_ms", "PR", None, "ms")).unwrap();
    r.put_automatic_mark(MarkKind::TEnd, MarkOn::Representative, 201, 0.402).unwrap();
    r.put_automatic_mark(MarkKind::QrsOnset, MarkOn::Beat(3), 1510, 3.02).unwrap();
    r.move_mark(MarkKind::TEnd, MarkOn::Representative, 206, 0.412, reader).unwrap();
    r.move_mark(MarkKind::POnset, MarkOn::Beat(3), 1440, 2.88, reader).unwrap();
    r.set_measurement("qt_ms", 412.0, reader).unwrap();
    r.set_measurement("pr_ms", 140.0, reader).unwrap();
    r.put_caliper(
        Caliper { id: 1, kind: CaliperKind::Time { t1_s: 1.0, t2_s: 1.8 }, lead: None, locked: false, march: true },
        reader,
    )
    .unwrap();
    r.set_summary("Ward 7 demo: sinus rhythm, QT checked on the Beat lens.", reader).unwrap();
    r
}
