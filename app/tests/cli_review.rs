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
    // The worked example of tests/tests/review_agreement.rs: AB − CD = 10, −5, 10, 10 ms → bias 6.25,
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
    let other = write_review(dir.path(), "other.review.ron", "CD", '9', 400.0);
    let o = run(&[Path::new("agreement"), &v1, &other]);
    assert!(o.status.success(), "{}", stderr(&o));
    assert!(String::from_utf8_lossy(&o.stdout).contains("J. Demo"));
    assert_eq!(std::fs::read(&v1).unwrap(), before);
    assert_eq!(load(&v1).unwrap().reader, "J. Demo");
}
