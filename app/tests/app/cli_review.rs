//! End-to-end: `isoline agreement` and `isoline review new` through the binary.

#![allow(clippy::unwrap_used)] // a test fails by panicking

use std::path::{Path, PathBuf};
use std::process::{Command, Output};

use isoline_core::review::{Measurement, RecordingIdentity, Review, load};

fn isoline(args: &[&std::ffi::OsStr]) -> Output {
    Command::new(env!("CARGO_BIN_EXE_isoline")).args(args).output().unwrap()
}

fn run(args: &[&Path]) -> Output {
    let a: Vec<&std::ffi::OsStr> = args.iter().map(|p| p.as_os_str()).collect();
    isoline(&a)
}

fn data(rel: &str) -> PathBuf {
    Path::new(env!("CARGO_MANIFEST_DIR")).join("../tests/data").join(rel)
}

/// A review of a made-up recording (ward 7 demo) by `reader` with a QT value.
fn write_review(dir: &Path, name: &str, reader: &str, sha_digit: char, qt: f64) -> PathBuf {
    let id = RecordingIdentity {
        file_name: format!("ward7-bed{sha_digit}.csv"),
        relative_path: format!("ward7-bed{sha_digit}.csv"),
        sha256: sha_digit.to_string().repeat(64),
        leads: vec!["II".into()],
        sample_rate_hz: 500.0,
    };
    let mut r = Review::new(id, reader);
    r.put_automatic(Measurement::automatic("qt_ms", "QT", Some(qt), "ms")).unwrap();
    let p = dir.join(name);
    r.save(&p).unwrap();
    p
}

fn stderr(o: &Output) -> String {
    String::from_utf8_lossy(&o.stderr).into_owned()
}

#[test]
fn agreement_table_and_json() {
    let dir = tempfile::tempdir().unwrap();
    let d = dir.path();
    // The worked example of tests/tests/suite/review_agreement.rs: AB − CD = 10, −5, 10, 10 ms → bias 6.25,
    // SD 7.5, limits −8.45 to 20.95 (Bland & Altman, Lancet 1986;1(8476):307-10; from memory).
    let files = [
        write_review(d, "1-ab.review.ron", "AB", '1', 400.0),
        write_review(d, "2-ab.review.ron", "AB", '2', 380.0),
        write_review(d, "3-ab.review.ron", "AB", '3', 420.0),
        write_review(d, "4-ab.review.ron", "AB", '4', 410.0),
        write_review(d, "1-cd.review.ron", "CD", '1', 390.0),
        write_review(d, "2-cd.review.ron", "CD", '2', 385.0),
        write_review(d, "3-cd.review.ron", "CD", '3', 410.0),
        write_review(d, "4-cd.review.ron", "CD", '4', 400.0),
    ];
    let mut args: Vec<&Path> = vec![Path::new("agreement")];
    args.extend(files.iter().map(PathBuf::as_path));
    let o = run(&args);
    assert!(o.status.success(), "{}", stderr(&o));
    let text = String::from_utf8(o.stdout).unwrap();
    assert!(text.contains("bias 6.25, SD 7.50, 95 % limits of agreement -8.45 to 20.95"), "{text}");
    assert!(text.contains("Review aid only"), "caution shown: {text}");
    // The reviews are drafts: said before the caution.
    let drafts = text.find("Still drafts").unwrap_or(usize::MAX);
    assert!(drafts < text.find("Review aid only").unwrap_or(0), "{text}");

    args.extend([Path::new("--format"), Path::new("json")]);
    let o = run(&args);
    assert!(o.status.success(), "{}", stderr(&o));
    let v: serde_json::Value = serde_json::from_slice(&o.stdout).unwrap();
    let ba = &v["agreement"]["keys"][0]["pairs"][0]["bland_altman"];
    assert_eq!(ba["n"], 4);
    assert!((ba["bias"].as_f64().unwrap() - 6.25).abs() < 1e-12);
    assert!((ba["lower"].as_f64().unwrap() - -8.45).abs() < 1e-12);
    assert!((ba["upper"].as_f64().unwrap() - 20.95).abs() < 1e-12);
    assert_eq!(v["agreement"]["readers"], serde_json::json!(["AB", "CD"]));

    // Reviews by two readers of different recordings: nothing to compare, said so (before, tables of dashes and
    // exit 0).
    let o = run(&[Path::new("agreement"), files[0].as_path(), files[5].as_path()]);
    assert_eq!(o.status.code(), Some(2), "{}", stderr(&o));
    assert!(stderr(&o).contains("no recording was read by two of the readers"), "{}", stderr(&o));
}

#[test]
fn corrupt_review_exits_2_naming_the_file_and_is_not_modified() {
    let dir = tempfile::tempdir().unwrap();
    let good = write_review(dir.path(), "good.review.ron", "AB", '1', 400.0);
    let bad = dir.path().join("bad.review.ron");
    let text = std::fs::read_to_string(&good).unwrap();
    let broken = text.replacen("reader:", "colour: \"red\",\n  reader:", 1);
    std::fs::write(&bad, &broken).unwrap();
    let o = run(&[Path::new("agreement"), &good, &bad]);
    assert_eq!(o.status.code(), Some(2));
    let e = stderr(&o);
    assert_eq!(e.lines().count(), 1, "one line: {e}");
    assert!(e.contains("bad.review.ron") && e.contains("colour"), "{e}");
    assert_eq!(std::fs::read_to_string(&bad).unwrap(), broken, "never modified");
    assert!(!dir.path().join("bad.review.ron.bak").exists());

    let cut = dir.path().join("cut.review.ron");
    std::fs::write(&cut, &text[..text.len() / 3]).unwrap();
    let o = run(&[Path::new("agreement"), &good, &cut]);
    assert_eq!(o.status.code(), Some(2));
    assert!(stderr(&o).contains("cut.review.ron"), "{}", stderr(&o));

    let missing = dir.path().join("missing.review.ron");
    let o = run(&[Path::new("agreement"), &good, &missing]);
    assert_eq!(o.status.code(), Some(2));
    assert!(stderr(&o).contains("missing.review.ron"));
}

#[test]
fn agreement_refuses_one_reader_and_duplicates() {
    let dir = tempfile::tempdir().unwrap();
    let a = write_review(dir.path(), "a.review.ron", "AB", '1', 400.0);
    let b = write_review(dir.path(), "b.review.ron", "AB", '2', 400.0);
    let c = write_review(dir.path(), "c.review.ron", "AB", '1', 401.0);
    let o = run(&[Path::new("agreement"), &a, &b]);
    assert_eq!(o.status.code(), Some(2), "one reader only");
    // A missing review is named once, with the system's reason once (it was printed twice, as message and cause).
    let missing = dir.path().join("missing.review.ron");
    let o = run(&[Path::new("agreement"), &missing, &a]);
    assert_eq!(o.status.code(), Some(2));
    assert_eq!(stderr(&o).matches("missing.review.ron").count(), 1, "{}", stderr(&o));
    assert_eq!(stderr(&o).matches("(os error").count(), 1, "{}", stderr(&o));
    let o = run(&[Path::new("agreement"), &a, &c]);
    assert_eq!(o.status.code(), Some(2));
    let e = stderr(&o);
    assert!(e.contains("a.review.ron") && e.contains("c.review.ron"), "{e}");
}

#[test]
fn migrated_v1_review_is_read_by_agreement_without_change() {
    let dir = tempfile::tempdir().unwrap();
    let v1 = dir.path().join("v1.review.ron");
    std::fs::copy(data("review-v1.review.ron"), &v1).unwrap();
    let before = std::fs::read(&v1).unwrap();
    // A second reader's review of the same recording (sel100), to compare with.
    let mut theirs = load(&v1).unwrap();
    theirs.reader = "CD".into();
    let other = dir.path().join("other.review.ron");
    std::fs::write(&other, theirs.to_ron().unwrap()).unwrap();
    let o = run(&[Path::new("agreement"), &v1, &other]);
    assert!(o.status.success(), "{}", stderr(&o));
    assert!(String::from_utf8_lossy(&o.stdout).contains("J. Demo"));
    assert_eq!(std::fs::read(&v1).unwrap(), before);
    assert_eq!(load(&v1).unwrap().reader, "J. Demo");
}

fn copy_ludb_1(dir: &Path) -> PathBuf {
    for ext in ["hea", "dat"] {
        std::fs::copy(data(&format!("ludb/1.{ext}")), dir.join(format!("1.{ext}"))).unwrap();
    }
    dir.join("1.hea")
}

#[test]
fn review_new_writes_a_draft_with_every_automatic_value() {
    use isoline_core::MarkKind;
    use isoline_core::review::{MarkOn, Origin, Stage, load_for};

    let dir = tempfile::tempdir().unwrap();
    let hea = copy_ludb_1(dir.path());
    let o = run(&[Path::new("review"), Path::new("new"), &hea, Path::new("--reader"), Path::new("AB")]);
    assert!(o.status.success(), "{}", stderr(&o));
    let path = dir.path().join("1.review.ron");
    let r = load_for(&path, &hea).unwrap();
    assert_eq!((r.reader.as_str(), r.stage), ("AB", Stage::Draft));
    assert_eq!(r.recording.file_name, "1.hea");
    assert_eq!(r.recording.relative_path, "1.hea");
    assert_eq!(r.recording.leads.len(), 12);
    assert_eq!(r.recording.sample_rate_hz, 500.0);
    assert!(r.history.is_empty(), "automatic values are not a reader's change");

    // The values are the engine's, for every key it produces (per-lead values keyed `KEY.LEAD`).
    let opened = isoline_core::io::open(&hea, &Default::default()).unwrap();
    let analysis = isoline_core::analysis::analyze(&opened.recording, &Default::default());
    let expected = analysis.measurements.values();
    assert_eq!(r.measurements.len(), expected.len());
    for v in &expected {
        let key = isoline_core::review::automatic::review_key(v);
        let m = r.measurement(&key).unwrap_or_else(|| panic!("{key} missing"));
        assert_eq!((m.auto_value, m.reviewed_value, m.origin), (v.value, None, Origin::Auto), "{key}");
        assert_eq!(m.unit, v.unit);
    }
    assert!(r.measurement("qt_ms").unwrap().auto_value.is_some(), "LUDB record 1 has a measurable QT");
    let rep = analysis.representative.unwrap();
    for kind in MarkKind::BOUNDARIES {
        assert_eq!(r.mark(kind, MarkOn::Representative).map(|m| m.sample), rep.bounds.get(kind), "{kind}");
    }
    assert_eq!(r.mark(MarkKind::RPeak, MarkOn::Representative).unwrap().sample, rep.r_index);
    assert!(r.marks.iter().all(|m| m.origin == Origin::Auto));

    // An existing review is never overwritten without --force.
    let before = std::fs::read(&path).unwrap();
    let o = run(&[Path::new("review"), Path::new("new"), &hea, Path::new("--reader"), Path::new("CD")]);
    assert_eq!(o.status.code(), Some(2));
    assert!(stderr(&o).contains("1.review.ron") && stderr(&o).contains("--force"), "{}", stderr(&o));
    assert_eq!(std::fs::read(&path).unwrap(), before);
    let o = run(&[
        Path::new("review"),
        Path::new("new"),
        &hea,
        Path::new("--reader"),
        Path::new("CD"),
        Path::new("--force"),
    ]);
    assert!(o.status.success(), "{}", stderr(&o));
    assert!(stderr(&o).contains("replacing the draft review by AB"), "{}", stderr(&o));
    assert_eq!(load(&path).unwrap().reader, "CD");
    assert_eq!(std::fs::read(dir.path().join("1.review.ron.bak")).unwrap(), before, "old review kept as .bak");

    // Not even with --force: a final review (signed off), or a file that is not a review (before, both were
    // written over; the PNG with review text).
    let mut signed = load(&path).unwrap();
    signed.set_stage(isoline_core::review::Stage::Final, "CD").unwrap();
    std::fs::write(&path, signed.to_ron().unwrap()).unwrap();
    let png = dir.path().join("page.png");
    std::fs::write(&png, b"\x89PNG not a review").unwrap();
    for (out, says) in [(&path, "a final review by CD exists"), (&png, "exists and is not a review")] {
        let before = std::fs::read(out).unwrap();
        let args = [Path::new("review"), Path::new("new"), &hea, Path::new("--reader"), Path::new("EF")];
        let o = run(&[&args[..], &[Path::new("--out"), out, Path::new("--force")]].concat());
        assert_eq!(o.status.code(), Some(2), "{}", stderr(&o));
        assert!(stderr(&o).contains(says), "{}", stderr(&o));
        assert_eq!(std::fs::read(out).unwrap(), before);
    }
}

#[test]
fn review_new_out_elsewhere_records_the_relative_path() {
    let dir = tempfile::tempdir().unwrap();
    let rec_dir = dir.path().join("recordings");
    let out_dir = dir.path().join("reviews");
    std::fs::create_dir_all(&rec_dir).unwrap();
    std::fs::create_dir_all(&out_dir).unwrap();
    let hea = copy_ludb_1(&rec_dir);
    let out = out_dir.join("ludb-1-ab.review.ron");
    // Named by the record path without extension.
    let o = run(&[
        Path::new("review"),
        Path::new("new"),
        &rec_dir.join("1"),
        Path::new("--reader"),
        Path::new("AB"),
        Path::new("--out"),
        &out,
    ]);
    assert!(o.status.success(), "{}", stderr(&o));
    let r = load(&out).unwrap();
    assert_eq!(r.recording.relative_path, "../recordings/1");
    assert_eq!(r.recording.sha256, isoline_core::review::signal_sha256(&hea).unwrap());
}

#[test]
fn review_new_refuses_bad_input() {
    let dir = tempfile::tempdir().unwrap();
    let missing = dir.path().join("nothing.hea");
    let o = run(&[Path::new("review"), Path::new("new"), &missing, Path::new("--reader"), Path::new("AB")]);
    assert_eq!(o.status.code(), Some(2));
    assert!(stderr(&o).contains("nothing.hea"), "{}", stderr(&o));
    let hea = copy_ludb_1(dir.path());
    let o = run(&[Path::new("review"), Path::new("new"), &hea, Path::new("--reader"), Path::new("  ")]);
    assert_eq!(o.status.code(), Some(2));
    assert!(!dir.path().join("1.review.ron").exists());
    // A name with a terminal escape code would be replayed raw in every history line.
    let o = run(&[Path::new("review"), Path::new("new"), &hea, Path::new("--reader"), Path::new("A\u{1b}[31mB")]);
    assert_eq!(o.status.code(), Some(2));
    assert!(stderr(&o).contains("control character"), "{}", stderr(&o));
    assert!(!dir.path().join("1.review.ron").exists());
}

#[test]
fn a_review_is_not_drawn_on_the_same_samples_under_another_header() {
    // LUDB 1's signal file with its header saying 250 Hz instead of 500: the signal hash is the same, but the
    // review's marks (sample indices) and times would land elsewhere. Before, `render --review` drew it, exit 0.
    let dir = tempfile::tempdir().unwrap();
    let hea = copy_ludb_1(dir.path());
    let o = run(&[Path::new("review"), Path::new("new"), &hea, Path::new("--reader"), Path::new("AB")]);
    assert!(o.status.success(), "{}", stderr(&o));
    let review = dir.path().join("1.review.ron");
    let alt = dir.path().join("alt");
    std::fs::create_dir(&alt).unwrap();
    std::fs::copy(dir.path().join("1.dat"), alt.join("1.dat")).unwrap();
    let header = std::fs::read_to_string(&hea).unwrap().replacen("1 12 500 5000", "1 12 250 5000", 1);
    std::fs::write(alt.join("1.hea"), header).unwrap();
    let png = dir.path().join("x.png");
    let render =
        |rec: &Path| run(&[Path::new("render"), rec, Path::new("--review"), &review, Path::new("--out"), &png]);
    let o = render(&alt.join("1.hea"));
    assert_eq!(o.status.code(), Some(2), "{}", stderr(&o));
    assert!(stderr(&o).contains("sampled at 250 Hz, the review's at 500 Hz"), "{}", stderr(&o));
    assert!(!png.exists());
    let o = render(&hea);
    assert!(o.status.success(), "{}", stderr(&o));
}

#[test]
fn a_hand_edited_review_is_compared_with_what_it_contradicts_said() {
    // QT set to 460 ms by hand in a draft from `review new`: origin still auto, no history entry, QTc stale.
    let dir = tempfile::tempdir().unwrap();
    let hea = copy_ludb_1(dir.path());
    for (reader, out) in [("AB", "1.review.ron"), ("CD", "1.cd.review.ron")] {
        let o = run(&[
            Path::new("review"),
            Path::new("new"),
            &hea,
            Path::new("--reader"),
            Path::new(reader),
            Path::new("--out"),
            &dir.path().join(out),
        ]);
        assert!(o.status.success(), "{}", stderr(&o));
    }
    let edited = dir.path().join("1.cd.review.ron");
    let text = std::fs::read_to_string(&edited).unwrap();
    let at = text.find("key: \"qt_ms\"").unwrap();
    let none = at + text[at..].find("reviewed_value: None").unwrap();
    let text = format!("{}reviewed_value: Some(460.0){}", &text[..none], &text[none + "reviewed_value: None".len()..]);
    std::fs::write(&edited, text).unwrap();
    let o = run(&[Path::new("agreement"), &dir.path().join("1.review.ron"), &edited]);
    assert!(o.status.success(), "{}", stderr(&o));
    let err = stderr(&o);
    assert!(
        err.contains("1.cd.review.ron: measurement qt_ms holds a reviewed value (460) but says origin auto"),
        "{err}"
    );
    assert!(err.contains("does not follow the review's QT and RR"), "{err}");
    assert!(!err.contains("1.review.ron: measurement"), "the untouched review has none: {err}");
}
