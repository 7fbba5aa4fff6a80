//! A final review is read-only until reopened, and the reopening is in the history; every change is recorded
//! with its old and new value and reader.

#![allow(clippy::unwrap_used)] // a test fails by panicking

use crate::review_support::sample_review;
use isoline_core::MarkKind;
use isoline_core::caliper::{Caliper, CaliperKind};
use isoline_core::review::{MarkOn, Measurement, Origin, ReviewError, Stage};

#[test]
fn final_is_read_only_until_reopened() {
    let mut r = sample_review("AB");
    r.set_stage(Stage::Checked, "AB").unwrap();
    r.set_stage(Stage::Final, "MD").unwrap();
    let frozen = r.clone();
    let cal = Caliper { id: 9, kind: CaliperKind::Plumb { t_s: 2.0 }, lead: None, locked: false, march: false };
    let attempts: Vec<Result<(), ReviewError>> = vec![
        r.set_measurement("qt_ms", 430.0, "MD"),
        r.revert_measurement("qt_ms", "MD"),
        r.move_mark(MarkKind::TEnd, MarkOn::Representative, 210, 0.42, "MD"),
        r.remove_mark(MarkKind::TEnd, MarkOn::Representative, "MD"),
        r.put_caliper(cal.clone(), "MD"),
        r.remove_caliper(1, "MD"),
        r.set_summary("changed", "MD"),
        r.set_stage(Stage::Draft, "MD"),
        r.put_automatic(Measurement::automatic("qrs_ms", "QRS", Some(1.0), "ms")),
        r.put_automatic_mark(MarkKind::RPeak, MarkOn::Beat(0), 5, 0.01),
    ];
    for (i, a) in attempts.into_iter().enumerate() {
        assert!(matches!(a, Err(ReviewError::Final)), "attempt {i}: {a:?}");
    }
    assert_eq!(r, frozen, "nothing changed while final");

    r.reopen("MD").unwrap();
    assert_eq!(r.stage, Stage::Checked);
    let last = r.history.last().unwrap();
    assert_eq!((last.what.as_str(), last.by.as_str()), ("reopened", "MD"));
    assert_eq!((last.old.as_deref(), last.new.as_deref()), (Some("final"), Some("checked")));
    r.set_measurement("qt_ms", 430.0, "MD").unwrap();
    assert_eq!(r.measurement("qt_ms").unwrap().value(), Some(430.0));
    assert!(matches!(r.reopen("MD"), Err(ReviewError::NotFinal(Stage::Checked))));
}

#[test]
fn origins_and_history_follow_the_reader() {
    let mut r = sample_review("AB");
    let n = r.history.len();
    // auto → moved keeps the automatic value and position.
    let qt = r.measurement("qt_ms").unwrap();
    assert_eq!((qt.auto_value, qt.reviewed_value, qt.origin), (Some(402.0), Some(412.0), Origin::Moved));
    let t_end = r.mark(MarkKind::TEnd, MarkOn::Representative).unwrap();
    assert_eq!((t_end.sample, t_end.auto_sample, t_end.origin), (206, Some(201), Origin::Moved));
    // A second move keeps the first automatic position.
    r.move_mark(MarkKind::TEnd, MarkOn::Representative, 199, 0.398, "CD").unwrap();
    let t_end = r.mark(MarkKind::TEnd, MarkOn::Representative).unwrap();
    assert_eq!((t_end.sample, t_end.auto_sample, t_end.origin), (199, Some(201), Origin::Moved));
    let c = &r.history[n];
    assert_eq!(c.by, "CD");
    assert_eq!(c.old.as_deref(), Some("sample 206 (0.412 s)"));
    assert_eq!(c.new.as_deref(), Some("sample 199 (0.398 s)"));
    // New automatic values do not clobber the reader's.
    r.put_automatic_mark(MarkKind::TEnd, MarkOn::Representative, 150, 0.3).unwrap();
    assert_eq!(r.mark(MarkKind::TEnd, MarkOn::Representative).unwrap().sample, 199);
    r.put_automatic(Measurement::automatic("qt_ms", "QT", Some(399.0), "ms")).unwrap();
    assert_eq!(r.measurement("qt_ms").unwrap().value(), Some(412.0));
    // Reverting drops the reader's value; a placed value with no automatic one disappears.
    r.revert_measurement("qt_ms", "CD").unwrap();
    let qt = r.measurement("qt_ms").unwrap();
    assert_eq!((qt.value(), qt.origin), (Some(399.0), Origin::Auto));
    r.revert_measurement("pr_ms", "CD").unwrap();
    assert!(r.measurement("pr_ms").is_none());
    assert!(matches!(r.revert_measurement("pr_ms", "CD"), Err(ReviewError::UnknownMeasurement(_))));
    assert!(matches!(r.set_measurement("qt_ms", f64::NAN, "CD"), Err(ReviewError::NotFinite { .. })));
    assert!(matches!(r.set_measurement("heart_rate_bpm", -500.0, "CD"), Err(ReviewError::Implausible { .. })));
    assert!(r.modified >= r.created);
    assert!(r.history.windows(2).all(|w| w[0].at <= w[1].at));
}
