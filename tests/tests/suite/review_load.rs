//! Loading reviews: the version-1 file kept in tests/data migrates; bad files give messages naming the file,
//! the line, the column and the field; loading never changes the file.

#![allow(clippy::unwrap_used)] // a test fails by panicking

use std::path::Path;

use isoline_core::MarkKind;
use isoline_core::review::{FORMAT_VERSION, MarkOn, Origin, ReviewError, Stage, load, load_for};
use isoline_tests::data;

#[test]
fn version_1_file_migrates() {
    let path = data("review-v1.review.ron");
    let before = std::fs::read(&path).unwrap();
    let r = load(&path).unwrap();
    assert_eq!(r.format_version, FORMAT_VERSION);
    assert_eq!(r.reader, "J. Demo", "v1 `reviewer` becomes `reader`");
    assert_eq!(r.stage, Stage::Checked);
    assert_eq!(r.created.to_iso8601(), "2025-03-14T09:26:53Z");
    assert_eq!(r.modified.to_iso8601(), "2025-03-14T09:41:07.25Z");
    assert_eq!(r.recording.file_name, "sel100.hea");
    assert_eq!(r.recording.leads, ["MLII", "V5"]);
    assert_eq!(r.calipers.len(), 2);
    assert!(r.calipers[0].locked && r.calipers[0].march);
    let t_end = r.mark(MarkKind::TEnd, MarkOn::Representative).unwrap();
    assert_eq!((t_end.sample, t_end.origin, t_end.auto_sample), (160, Origin::Moved, Some(157)));
    assert_eq!(r.mark(MarkKind::POnset, MarkOn::Beat(12)).unwrap().origin, Origin::Placed);
    let qt = r.measurement("qt_ms").unwrap();
    assert_eq!((qt.auto_value, qt.reviewed_value, qt.value()), (Some(380.0), Some(392.0), Some(392.0)));
    assert!(r.summary.starts_with("Demo review"));
    // v1 kept no history: the migration is the first entry.
    assert_eq!(r.history.len(), 1);
    assert_eq!(r.history[0].by, "isoline");
    assert_eq!(r.history[0].old.as_deref(), Some("1"));
    assert_eq!(r.history[0].new.as_deref(), Some("2"));
    // Loading never writes.
    assert_eq!(std::fs::read(&path).unwrap(), before);
}

#[test]
fn version_1_file_belongs_to_sel100() {
    // The SHA-256 in the v1 file was computed with GNU coreutils `sha256sum qtdb/sel100.dat`, independently
    // of Isoline's hashing.
    let r = load_for(&data("review-v1.review.ron"), &data("qtdb/sel100.hea")).unwrap();
    assert_eq!(r.recording.recording_path(&data("review-v1.review.ron")), data("qtdb/sel100.hea"));
    assert!(matches!(
        load_for(&data("review-v1.review.ron"), &data("qtdb/sel117.hea")),
        Err(ReviewError::RecordingMismatch { .. })
    ));
}

fn write(dir: &Path, text: &str) -> std::path::PathBuf {
    let p = dir.join("bad.review.ron");
    std::fs::write(&p, text).unwrap();
    p
}

fn current_text() -> String {
    crate::review_support::sample_review("AB").to_ron().unwrap()
}

fn parse_err(path: &Path) -> (usize, usize, Option<String>, String) {
    match load(path) {
        Err(e @ ReviewError::Parse { .. }) => {
            let msg = e.to_string();
            assert!(msg.contains(&path.display().to_string()), "message names the file: {msg}");
            let ReviewError::Parse { line, column, field, .. } = e else { unreachable!() };
            (line, column, field, msg)
        }
        other => panic!("expected a parse error, got {other:?}"),
    }
}

#[test]
fn unknown_field_is_named_with_its_line() {
    let dir = tempfile::tempdir().unwrap();
    let text = current_text().replacen("  summary:", "  colour: \"red\",\n  summary:", 1);
    let line = 1 + text.lines().position(|l| l.contains("colour")).unwrap();
    let p = write(dir.path(), &text);
    let (l, _, field, msg) = parse_err(&p);
    assert_eq!(field.as_deref(), Some("colour"), "{msg}");
    assert_eq!(l, line, "{msg}");
    assert!(msg.contains("unknown field `colour`"), "{msg}");
}

#[test]
fn missing_field_is_named() {
    let dir = tempfile::tempdir().unwrap();
    let text: String =
        current_text().lines().filter(|l| !l.starts_with("  stage:")).map(|l| format!("{l}\n")).collect();
    let p = write(dir.path(), &text);
    let (_, _, field, msg) = parse_err(&p);
    assert_eq!(field.as_deref(), Some("stage"), "{msg}");
    assert!(msg.contains("missing field `stage`"), "{msg}");
}

#[test]
fn missing_field_inside_a_mark_is_named() {
    let dir = tempfile::tempdir().unwrap();
    let text = current_text().replacen("      origin: moved,\n      auto_sample", "      auto_sample", 1);
    let p = write(dir.path(), &text);
    let (_, _, field, msg) = parse_err(&p);
    assert_eq!(field.as_deref(), Some("origin"), "{msg}");
}

#[test]
fn v2_field_in_a_v1_file_is_refused() {
    let dir = tempfile::tempdir().unwrap();
    let v1 = std::fs::read_to_string(data("review-v1.review.ron")).unwrap();
    let p = write(dir.path(), &v1.replacen("  summary:", "  history: [],\n  summary:", 1));
    let (_, _, field, _) = parse_err(&p);
    assert_eq!(field.as_deref(), Some("history"));
}

#[test]
fn missing_or_future_version_is_refused() {
    let dir = tempfile::tempdir().unwrap();
    let text = current_text();
    let p = write(dir.path(), &text.replacen("  format_version: 2,\n", "", 1));
    assert_eq!(parse_err(&p).2.as_deref(), Some("format_version"));
    let p = write(dir.path(), &text.replacen("format_version: 2", "format_version: 9", 1));
    match load(&p) {
        Err(ReviewError::UnsupportedVersion { found: 9, path }) => assert_eq!(path, p),
        other => panic!("{other:?}"),
    }
}

#[test]
fn truncated_or_garbage_file_gives_position() {
    let dir = tempfile::tempdir().unwrap();
    let text = current_text();
    let p = write(dir.path(), &text[..text.len() / 2]);
    let (line, _, _, msg) = parse_err(&p);
    assert!(line > 1, "{msg}");
    let p = write(dir.path(), "this is not a review");
    parse_err(&p);
    std::fs::write(&p, [0xff, 0xfe, 0x00, 0x41]).unwrap();
    parse_err(&p);
    assert!(matches!(load(&dir.path().join("missing.review.ron")), Err(ReviewError::Io { .. })));
}

#[test]
fn impossible_values_are_named() {
    let dir = tempfile::tempdir().unwrap();
    let text = current_text();
    let p = write(dir.path(), &text.replacen(&"ab".repeat(32), "not-a-hash", 1));
    let (line, _, field, msg) = parse_err(&p);
    assert_eq!(field.as_deref(), Some("sha256"), "{msg}");
    assert_eq!(line, 1 + text.lines().position(|l| l.contains("sha256:")).unwrap());
    let p = write(dir.path(), &text.replacen("sample_rate_hz: 500.0", "sample_rate_hz: -1.0", 1));
    assert_eq!(parse_err(&p).2.as_deref(), Some("sample_rate_hz"));
    // RON reads NaN and inf as numbers: a value, a mark's time or a caliper's position cannot be one.
    for (field, before, bad) in
        [("auto_value", "auto_value: Some(", "NaN"), ("time_s", "time_s: ", "inf"), ("t1_s", "t1_s: ", "-inf")]
    {
        let p = write(dir.path(), &with_number(&text, before, bad));
        let (_, _, named, msg) = parse_err(&p);
        assert_eq!(named.as_deref(), Some(field), "{msg}");
        assert!(msg.contains("finite number"), "{msg}");
    }
    // A reviewed value no ECG shows (a hand edit: QT −412 ms) is named with its bounds, not drawn as read.
    let p = write(dir.path(), &text.replacen("reviewed_value: Some(412.0)", "reviewed_value: Some(-412.0)", 1));
    let (_, _, named, msg) = parse_err(&p);
    assert_eq!(named.as_deref(), Some("reviewed_value"), "{msg}");
    assert!(msg.contains("`qt_ms`: -412 is outside 1 to 2000"), "{msg}");
    // A reader name with a terminal escape code, hand-edited in.
    let p = write(dir.path(), &text.replacen("reader: \"AB\"", "reader: \"A\\u{1b}[31mB\"", 1));
    let (_, _, named, msg) = parse_err(&p);
    assert_eq!(named.as_deref(), Some("reader"), "{msg}");
    assert!(msg.contains("control character"), "{msg}");
    // An empty reader name, hand-edited in (`agreement` printed a table heading "−CD" for it).
    let p = write(dir.path(), &text.replacen("reader: \"AB\"", "reader: \" \"", 1));
    let (_, _, named, msg) = parse_err(&p);
    assert_eq!(named.as_deref(), Some("reader"), "{msg}");
    assert!(msg.contains("is empty"), "{msg}");
    // A byte-order mark before the review, as some editors write one, is skipped.
    let p = write(dir.path(), &format!("\u{feff}{text}"));
    assert!(load(&p).is_ok(), "{:?}", load(&p).err());
    // An extreme but real reviewed rate (12 bpm) with the QTc values computed from it saves and loads again;
    // Framingham, which gives no positive QTc there (Sagie et al. 1992, Am J Cardiol: QT + 154 (1 − RR)), gets no
    // reviewed value (before: a QTc below zero was saved and printed).
    let mut r = crate::review_support::sample_review("AB");
    r.set_measurement("heart_rate_bpm", 12.0, "AB").unwrap();
    let framingham = r.measurement("qtc_framingham_ms").and_then(|m| m.reviewed_value);
    assert_eq!(framingham, None);
    let bazett = r.measurement("qtc_bazett_ms").and_then(|m| m.reviewed_value);
    assert!(bazett.is_some_and(|v| v > 0.0), "{bazett:?}");
    let p = write(dir.path(), &r.to_ron().unwrap());
    assert_eq!(load(&p).unwrap().measurement("qtc_bazett_ms").and_then(|m| m.reviewed_value), bazett);
}

#[test]
fn a_bad_value_in_a_later_entry_is_located_there() {
    // The second measurement holding an automatic value gets NaN: the message points at its line, not at the
    // first measurement's.
    let dir = tempfile::tempdir().unwrap();
    let text = current_text();
    let needle = "auto_value: Some(";
    let second = text.match_indices(needle).nth(1).map(|(i, _)| i).unwrap_or_else(|| panic!("two automatic values"));
    let bad = format!("{}{}", &text[..second], with_number(&text[second..], needle, "NaN"));
    let (line, _, field, msg) = parse_err(&write(dir.path(), &bad));
    assert_eq!(field.as_deref(), Some("auto_value"), "{msg}");
    assert_eq!(line, 1 + text[..second].matches('\n').count(), "{msg}");
}

#[test]
fn empty_or_non_review_file_is_named_as_such() {
    let dir = tempfile::tempdir().unwrap();
    let (line, _, _, msg) = parse_err(&write(dir.path(), "  \n"));
    assert!(msg.contains("the file is empty") && line == 1, "{msg}");
    let (_, _, _, msg) = parse_err(&write(dir.path(), "42"));
    assert!(!msg.contains("VersionOnly"), "{msg}");
}

/// `text` with the number after the first `field` replaced by `bad`.
fn with_number(text: &str, field: &str, bad: &str) -> String {
    let at = text.find(field).unwrap_or_else(|| panic!("{field} not in the sample review")) + field.len();
    let len = text[at..].find(|c: char| !(c.is_ascii_digit() || c == '.' || c == '-')).unwrap_or(0);
    format!("{}{bad}{}", &text[..at], &text[at + len..])
}

#[test]
fn an_entry_given_twice_is_refused_where_the_second_stands() {
    // A second entry for one measurement, mark or caliper was read past: a reader's value in it was lost without
    // a word (a hand-edited second `qt_ms` with a reviewed 440 ms read as the automatic 500 in `agreement`).
    let dir = tempfile::tempdir().unwrap();
    let base = crate::review_support::sample_review("AB");
    let mut twice = base.clone();
    let mut again = twice.measurements[0].clone();
    again.reviewed_value = Some(again.auto_value.unwrap_or(400.0) + 40.0);
    twice.measurements.push(again);
    let text = twice.to_ron().unwrap();
    let second =
        1 + text.lines().enumerate().filter(|(_, l)| l.contains("key:")).nth(twice.measurements.len() - 1).unwrap().0;
    let (line, _, field, msg) = parse_err(&write(dir.path(), &text));
    assert_eq!(field.as_deref(), Some("key"), "{msg}");
    assert_eq!(line, second, "{msg}");
    assert!(msg.contains(&format!("measurement `{}` is given twice", base.measurements[0].key)), "{msg}");
    if let Some(c) = base.calipers.first() {
        let mut twice = base.clone();
        twice.calipers.push(c.clone());
        let (_, _, field, msg) = parse_err(&write(dir.path(), &twice.to_ron().unwrap()));
        assert_eq!(field.as_deref(), Some("id"), "{msg}");
        assert!(msg.contains("is given twice"), "{msg}");
    }
    assert!(load(&write(dir.path(), &base.to_ron().unwrap())).is_ok());
}

#[test]
fn a_misspelt_caliper_field_is_named() {
    let dir = tempfile::tempdir().unwrap();
    let text = current_text().replacen("locked:", "lockd:", 1);
    let (_, _, field, msg) = parse_err(&write(dir.path(), &text));
    assert_eq!(field.as_deref(), Some("lockd"), "{msg}");
    assert!(msg.contains("unknown field `lockd`"), "{msg}");
}

#[test]
fn the_likeliest_hand_edits_are_explained_in_the_files_terms() {
    // A value written without `Some(…)`, a stage in quotes: RON said "Expected option" and "Expected identifier".
    let dir = tempfile::tempdir().unwrap();
    let text = current_text();
    let p = write(dir.path(), &text.replacen("reviewed_value: Some(412.0)", "reviewed_value: 412.0", 1));
    let (line, _, _, msg) = parse_err(&p);
    assert_eq!(line, 1 + text.lines().position(|l| l.contains("reviewed_value: Some(412.0)")).unwrap(), "{msg}");
    assert!(msg.contains("write `Some(460.0)` for a value"), "{msg}");
    let p = write(dir.path(), &text.replacen("stage: draft", "stage: \"final\"", 1));
    let (_, _, _, msg) = parse_err(&p);
    assert!(msg.contains("a stage is draft, checked or final"), "{msg}");
}
