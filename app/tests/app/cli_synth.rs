//! `isoline synth` end to end: writes EDF and CSV that `isoline` reads back, with a truth file; bad input exits 2.

use std::path::Path;
use std::process::{Command, Output};

type TestResult = Result<(), Box<dyn std::error::Error>>;

fn isoline(args: &[&str]) -> Result<Output, std::io::Error> {
    Command::new(env!("CARGO_BIN_EXE_isoline")).args(args).output()
}

fn s(p: &Path) -> String {
    p.display().to_string()
}

#[test]
fn synth_writes_edf_with_truth_that_info_reads_back() -> TestResult {
    let dir = tempfile::tempdir()?;
    let (edf, truth) = (dir.path().join("demo.edf"), dir.path().join("demo.truth.json"));
    let out =
        isoline(&["synth", "--scenario", "long-qt", "--out", &s(&edf), "--seconds", "12", "--truth", &s(&truth)])?;
    assert!(out.status.success(), "{}", String::from_utf8_lossy(&out.stderr));
    let info = isoline(&["info", &s(&edf), "--format", "json"])?;
    assert!(info.status.success(), "{}", String::from_utf8_lossy(&info.stderr));
    let info: serde_json::Value = serde_json::from_slice(&info.stdout)?;
    assert_eq!(info["sample_rate_hz"], 500.0);
    assert_eq!(info["samples"], 6000);
    assert_eq!(info["leads"].as_array().map(Vec::len), Some(12));
    let t: serde_json::Value = serde_json::from_str(&std::fs::read_to_string(&truth)?)?;
    let qt = t["qt_ms"].as_f64().unwrap_or(f64::NAN);
    assert!((qt - 520.0).abs() < 1e-6, "QT {qt}");
    assert!(t["beats"].as_array().is_some_and(|b| b.len() >= 10));
    Ok(())
}

#[test]
fn synth_csv_has_the_asked_leads_rate_and_length() -> TestResult {
    let dir = tempfile::tempdir()?;
    let csv = dir.path().join("amb.csv");
    let out = isoline(&[
        "synth",
        "--scenario",
        "irregular",
        "--out",
        &s(&csv),
        "--seconds",
        "5",
        "--leads",
        "3",
        "--rate",
        "250",
        "--seed",
        "7",
    ])?;
    assert!(out.status.success(), "{}", String::from_utf8_lossy(&out.stderr));
    let text = std::fs::read_to_string(&csv)?;
    let mut lines = text.lines();
    assert_eq!(lines.next(), Some("time_s,I,II,V5"));
    assert_eq!(lines.count(), 5 * 250);
    Ok(())
}

#[test]
fn synth_bad_input_exits_2_with_one_line() -> TestResult {
    let dir = tempfile::tempdir()?;
    let out_edf = s(&dir.path().join("x.edf"));
    let same_by_another_name = s(&dir.path().join(".").join("x.edf"));
    for args in [
        vec!["synth", "--scenario", "nonsense", "--out", &out_edf],
        vec!["synth", "--scenario", "normal", "--out", "x.wav"],
        vec!["synth", "--scenario", "normal", "--out", &out_edf, "--leads", "5"],
        vec!["synth", "--scenario", "normal", "--out", &out_edf, "--rate=-5"],
        vec!["synth", "--scenario", "normal", "--out", &out_edf, "--seconds", "0.2"],
        // The truth written over the recording it describes.
        vec!["synth", "--scenario", "normal", "--out", &out_edf, "--truth", &out_edf],
        vec!["synth", "--scenario", "normal", "--out", &out_edf, "--truth", &same_by_another_name],
    ] {
        let out = isoline(&args)?;
        assert_eq!(out.status.code(), Some(2), "{args:?}");
        let err = String::from_utf8_lossy(&out.stderr);
        assert_eq!(err.trim().lines().count(), 1, "{args:?}: {err}");
    }
    assert!(!dir.path().join("x.edf").exists());
    Ok(())
}

#[test]
fn synth_too_many_samples_names_the_limit_as_a_number() -> TestResult {
    let dir = tempfile::tempdir()?;
    let out_edf = s(&dir.path().join("x.edf"));
    let args = ["synth", "--scenario", "normal", "--out", &out_edf, "--seconds", "600000", "--rate", "20000"];
    let out = isoline(&args)?;
    assert_eq!(out.status.code(), Some(2));
    let err = String::from_utf8_lossy(&out.stderr);
    assert_eq!(err.trim().lines().count(), 1, "{err}");
    assert!(err.contains("at most 1500000000 samples"), "{err}");
    assert!(!err.contains("MAX_TOTAL_SAMPLES"), "{err}");
    Ok(())
}
