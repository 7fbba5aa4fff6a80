//! Reviews in the workstation: save (reader asked once), reopen, stage and read-only final, a review of another
//! recording is never applied silently, history (egui_kittest, no GPU). Works on a copy of the PTB record in a
//! temporary folder so nothing is written beside the test data.

#![allow(clippy::unwrap_used, clippy::expect_used)]

use std::path::{Path, PathBuf};

use crate::gui_support::{data, settle};
use egui_kittest::Harness;
use egui_kittest::kittest::Queryable;
use isoline::gui::IsolineApp;
use isoline::gui::command::Command;
use isoline_core::beat::MarkKind;
use isoline_core::caliper::CaliperKind;
use isoline_core::review::Stage;

fn copy_record(dir: &Path) -> PathBuf {
    for ext in ["hea", "dat", "xyz"] {
        std::fs::copy(data(&format!("ptb-s0010/s0010_re.{ext}")), dir.join(format!("s0010_re.{ext}"))).unwrap();
    }
    dir.join("s0010_re.hea")
}

fn open(path: &Path) -> Harness<'static, IsolineApp> {
    let app = IsolineApp::new(Some(path.to_path_buf()));
    let mut h = Harness::builder()
        .with_size(egui::Vec2::new(1600.0, 1000.0))
        .build_ui_state(|ui, app: &mut IsolineApp| app.ui(ui), app);
    settle(&mut h);
    h
}

/// Adds a caliper, moves T end by 20 samples and saves as reader "AB" (asked through the reader window).
fn work_and_save(h: &mut Harness<'static, IsolineApp>) -> usize {
    let t_end = h.state().loaded.as_ref().unwrap().auto_marks().t_end.unwrap();
    let app = h.state_mut();
    app.run_cmd(Command::AddCaliper { kind: CaliperKind::Time { t1_s: 1.0, t2_s: 1.8 }, lead: None });
    app.run_cmd(Command::MoveMark(MarkKind::TEnd, t_end + 20));
    app.run_cmd(Command::SetSummary("Checked on the ward monitor strip.".into()));
    settle(h);
    h.get_by_label("Save review").click();
    settle(h);
    h.get_by_label("Reader");
    h.state_mut().review.reader_input = "AB".into();
    h.get_by_label("Save as this reader").click();
    settle(h);
    assert!(h.state().ui_state.error.is_none(), "{:?}", h.state().ui_state.error);
    t_end
}

#[test]
fn a_saved_review_comes_back_with_its_recording() {
    let dir = tempfile::tempdir().unwrap();
    let rec = copy_record(dir.path());
    let mut h = open(&rec);
    let t_end = work_and_save(&mut h);
    let review_path = dir.path().join("s0010_re.review.ron");
    let text = std::fs::read_to_string(&review_path).unwrap();
    assert!(text.contains("reader: \"AB\""), "{text}");
    assert!(text.contains("qt_ms"));
    // The marks of the representative beat, its R peak too, as `review new` records them.
    let saved = isoline_core::review::load(&review_path).unwrap();
    for kind in MarkKind::BOUNDARIES.into_iter().chain([MarkKind::RPeak]) {
        assert!(saved.mark(kind, isoline_core::review::MarkOn::Representative).is_some(), "{kind:?}");
    }
    let qt_before = h.state().ledger_rows().into_iter().find(|r| r.key == "qt_ms").unwrap();
    assert_eq!(h.state().settings.reader.as_deref(), Some("AB"));

    // Opening the recording again applies the review beside it.
    let h2 = open(&rec);
    let app = h2.state();
    assert_eq!(app.review.path.as_deref(), Some(review_path.as_path()));
    assert_eq!(app.doc.calipers.len(), 1);
    assert_eq!(app.doc.marks.get(&MarkKind::TEnd).copied(), Some(t_end + 20));
    assert_eq!(app.review.summary, "Checked on the ward monitor strip.");
    let qt_after = app.ledger_rows().into_iter().find(|r| r.key == "qt_ms").unwrap();
    assert_eq!(qt_after, qt_before);
    assert_eq!(qt_after.origin, Some(isoline::gui::state::Origin::Moved));
    // Opening the review file itself does the same.
    let h3 = open(&review_path);
    assert_eq!(h3.state().doc.calipers.len(), 1);
}

#[test]
fn a_final_review_is_read_only_until_reopened() {
    let dir = tempfile::tempdir().unwrap();
    let rec = copy_record(dir.path());
    let mut h = open(&rec);
    work_and_save(&mut h);
    h.get_by_label("final").click();
    settle(&mut h);
    assert_eq!(h.state().review.stage, Stage::Final);
    h.state_mut().run_cmd(Command::DeleteCaliper(1));
    settle(&mut h);
    assert_eq!(h.state().doc.calipers.len(), 1, "edits refused");
    assert!(h.state().ui_state.error.as_deref().is_some_and(|e| e.contains("final")));
    h.get_by_label("Save review").click();
    settle(&mut h);
    h.get_by_label("Reopen").click();
    settle(&mut h);
    h.state_mut().run_cmd(Command::DeleteCaliper(1));
    h.state_mut().run_cmd(Command::SaveReview);
    settle(&mut h);
    let review = isoline_core::review::load(&dir.path().join("s0010_re.review.ron")).unwrap();
    assert_eq!(review.stage, Stage::Draft);
    assert!(review.calipers.is_empty());
    let whats: Vec<&str> = review.history.iter().map(|c| c.what.as_str()).collect();
    assert!(whats.iter().any(|w| w.contains("reopen")), "{whats:?}");
    assert!(review.history.iter().all(|c| c.by == "AB"));
    h.get_by_label("History").click();
    settle(&mut h);
    h.get_by_label("Review history");
}

#[test]
fn a_review_of_another_recording_is_not_applied_silently() {
    let dir = tempfile::tempdir().unwrap();
    let rec = copy_record(dir.path());
    let mut h = open(&rec);
    work_and_save(&mut h);
    drop(h);
    // Change one byte of the signal file.
    let dat = dir.path().join("s0010_re.dat");
    let mut bytes = std::fs::read(&dat).unwrap();
    bytes[1000] ^= 0x01;
    std::fs::write(&dat, bytes).unwrap();
    let mut h = open(&rec);
    assert!(h.state().doc.calipers.is_empty(), "not applied before the reader answers");
    h.get_by_label("Review for another recording");
    h.get_by_label("Do not apply").click();
    settle(&mut h);
    assert!(h.state().doc.calipers.is_empty());
    assert!(h.state().review.mismatch.is_none());
    // Asked again, the reader applies it.
    let review_path = dir.path().join("s0010_re.review.ron");
    h.state_mut().run_cmd(Command::OpenReview(review_path));
    settle(&mut h);
    h.get_by_label("Apply it anyway").click();
    settle(&mut h);
    assert_eq!(h.state().doc.calipers.len(), 1);
}

#[test]
fn an_unreadable_review_shows_an_error() {
    let dir = tempfile::tempdir().unwrap();
    let rec = copy_record(dir.path());
    let review_path = dir.path().join("s0010_re.review.ron");
    std::fs::write(&review_path, "(format_version: 2, this is not a review").unwrap();
    let before = std::fs::read(&review_path).unwrap();
    let h = open(&rec);
    assert!(h.state().loaded.is_some(), "the recording still opens");
    assert!(
        h.state().ui_state.error.as_deref().is_some_and(|e| e.contains("review")),
        "{:?}",
        h.state().ui_state.error
    );
    assert_eq!(std::fs::read(&review_path).unwrap(), before, "the file is never modified");
}

#[test]
fn a_saved_review_carries_qtc_from_the_reviewed_qt_and_rr() {
    let dir = tempfile::tempdir().unwrap();
    let rec = copy_record(dir.path());
    let mut h = open(&rec);
    // A Beat lens drag (T end later) changes QT; a typed RR changes the rate.
    work_and_save(&mut h);
    h.state_mut().run_cmd(Command::SetReviewed("rr_ms".into(), Some(800.0)));
    settle(&mut h);
    h.state_mut().run_cmd(Command::SaveReview);
    settle(&mut h);
    let review = isoline_core::review::load(&dir.path().join("s0010_re.review.ron")).unwrap();
    let qt = review.measurement("qt_ms").unwrap();
    assert!(qt.reviewed_value.is_some(), "{qt:?}");
    // Source: references.md §3 — Bazett, Heart 1920;7:353-70; Fridericia, Acta Med Scand 1920;53:469-86.
    let q = isoline_core::measure::qtc::qtc(qt.reviewed_value.unwrap(), 800.0);
    for (key, want) in [("qtc_bazett_ms", q.bazett), ("qtc_fridericia_ms", q.fridericia)] {
        let m = review.measurement(key).unwrap();
        assert!(m.reviewed_value.is_some_and(|v| (v - want).abs() < 1e-9), "{m:?} vs {want}");
        assert_eq!(m.origin, isoline_core::review::Origin::Moved);
    }
    // The Ledger shows the same QTc as the saved review, before and after reopening.
    let ledger = |h: &Harness<'static, IsolineApp>| {
        h.state().ledger_rows().into_iter().find(|r| r.key == "qtc_bazett_ms").unwrap().reviewed
    };
    assert!(ledger(&h).is_some_and(|v| (v - q.bazett).abs() < 1e-9));
    let mut h2 = open(&rec);
    assert!(ledger(&h2).is_some_and(|v| (v - q.bazett).abs() < 1e-9));
    // The rate the typed RR gave (75 bpm, saved as a reviewed value) comes back as following RR, not as typed: a
    // new RR moves it again (before, it stayed at 75 after reopening).
    assert!(!h2.state().doc.reviewed.contains_key("heart_rate_bpm"), "{:?}", h2.state().doc.reviewed);
    h2.state_mut().run_cmd(Command::SetReviewed("rr_ms".into(), Some(1000.0)));
    settle(&mut h2);
    let hr = h2.state().ledger_rows().into_iter().find(|r| r.key == "heart_rate_bpm").unwrap().reviewed;
    assert!(hr.is_some_and(|v| (v - 60.0).abs() < 1e-9), "{hr:?}");
}

#[test]
fn a_reader_name_with_a_control_character_is_refused_in_the_reader_window() {
    // A tab pasted into the name: the window says why and the review is not saved until the name is mended.
    let dir = tempfile::tempdir().unwrap();
    let rec = copy_record(dir.path());
    let mut h = open(&rec);
    h.get_by_label("Save review").click();
    settle(&mut h);
    h.state_mut().review.reader_input = "A\tB".into();
    settle(&mut h);
    h.get_by_label("The name holds a control character (a line break, a tab or an escape code).");
    h.get_by_label("Save as this reader").click();
    settle(&mut h);
    let review_path = dir.path().join("s0010_re.review.ron");
    assert!(!review_path.exists(), "saved under a name with a tab");
    assert!(h.state().settings.reader.is_none());
    h.state_mut().review.reader_input = "A B".into();
    settle(&mut h);
    h.get_by_label("Save as this reader").click();
    settle(&mut h);
    assert!(review_path.exists(), "{:?}", h.state().ui_state.error);
}

#[test]
fn a_value_typed_with_its_reason_is_saved_with_the_reason() {
    // Typed in the Ledger as "412 T end hidden by the next P wave": the value and its reason, one undo step; the
    // saved review's history entry for QT says why.
    let dir = tempfile::tempdir().unwrap();
    let rec = copy_record(dir.path());
    let mut h = open(&rec);
    work_and_save(&mut h);
    let why = "T end hidden by the next P wave";
    h.state_mut().run_cmd(Command::SetReviewedWhy("qt_ms".into(), 412.0, why.into()));
    settle(&mut h);
    assert_eq!(h.state().doc.reasons.get("qt_ms").map(String::as_str), Some(why));
    h.state_mut().run_cmd(Command::SaveReview);
    settle(&mut h);
    let review = isoline_core::review::load(&dir.path().join("s0010_re.review.ron")).unwrap();
    let entry = review.history.iter().rev().find(|c| c.what.starts_with("measurement qt_ms")).unwrap();
    assert_eq!((entry.new.as_deref(), entry.why.as_deref()), (Some("412 ms"), Some(why)), "{entry}");
    // A value typed again without a reason carries none over.
    h.state_mut().run_cmd(Command::SetReviewed("qt_ms".into(), Some(420.0)));
    settle(&mut h);
    assert!(!h.state().doc.reasons.contains_key("qt_ms"));
}
