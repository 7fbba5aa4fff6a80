//! `isoline beats` end to end: CSV and JSON on a real record, and bad input.

use std::path::PathBuf;
use std::process::Command;

fn data(rel: &str) -> PathBuf {
    PathBuf::from(env!("CARGO_MANIFEST_DIR")).join("../tests/data").join(rel)
}

fn isoline(args: &[&str]) -> std::process::Output {
    Command::new(env!("CARGO_BIN_EXE_isoline")).args(args).output().unwrap_or_else(|e| panic!("run isoline: {e}"))
}

#[test]
fn beats_csv_on_a_ludb_record() {
    let path = data("ludb/1.hea");
    let out = isoline(&["beats", path.to_str().unwrap_or_default(), "--format", "csv"]);
    assert!(out.status.success(), "{}", String::from_utf8_lossy(&out.stderr));
    let text = String::from_utf8_lossy(&out.stdout);
    let mut lines = text.lines();
    assert_eq!(lines.next(), Some("sample,time_s,kind,rr_ms,p_on,p_end,qrs_on,qrs_end,t_end"));
    let rows: Vec<Vec<&str>> = lines.map(|l| l.split(',').collect()).collect();
    // Source: LUDB record 1's cardiologist annotations (`1.global.csv`): every annotated beat is found within
    // 150 ms, and at most the first and last beats (left unannotated by LUDB) come on top.
    let reference = std::fs::read_to_string(data("ludb/1.global.csv")).unwrap_or_default();
    let annotated: Vec<f64> =
        reference.lines().skip(1).filter_map(|l| l.split(',').next().and_then(|s| s.parse().ok())).collect();
    let detected: Vec<f64> = rows.iter().filter_map(|r| r[0].parse().ok()).collect();
    assert!(!annotated.is_empty());
    for a in &annotated {
        assert!(detected.iter().any(|d| (d - a).abs() <= 75.0), "annotated beat at {a} not found");
    }
    assert!(rows.len() <= annotated.len() + 2, "{} beats for {} annotated", rows.len(), annotated.len());
    for r in &rows {
        assert_eq!(r.len(), 9);
        let sample: usize = r[0].parse().unwrap_or_else(|e| panic!("sample {e}"));
        let time: f64 = r[1].parse().unwrap_or_else(|e| panic!("time {e}"));
        assert!((time - sample as f64 / 500.0).abs() < 1e-3);
        assert!(r[2] == "dominant" || r[2] == "other");
        if let (Ok(on), Ok(end)) = (r[6].parse::<usize>(), r[7].parse::<usize>()) {
            assert!(on < sample && sample < end, "QRS {on}..{end} around R {sample}");
        }
    }
    assert!(rows[0][3].is_empty(), "first beat has no RR");
    assert!(rows[1][3].parse::<f64>().is_ok());
}

#[test]
fn beats_json_has_filters_and_caution() {
    let path = data("qtdb/sel100.hea");
    let out = isoline(&["beats", path.to_str().unwrap_or_default(), "--format", "json"]);
    assert!(out.status.success(), "{}", String::from_utf8_lossy(&out.stderr));
    let v: serde_json::Value = serde_json::from_slice(&out.stdout).unwrap_or_else(|e| panic!("json: {e}"));
    assert_eq!(v["sample_rate_hz"], 250.0);
    assert!(v["filters"].as_str().is_some_and(|s| s.starts_with("0.5–125 Hz")));
    assert!(v["caution"].as_str().is_some_and(|s| s.contains("qualified")));
    let beats = v["beats"].as_array().map_or(0, Vec::len);
    // Source: QT Database sel100 has 1134 annotated beats in its 15 minutes (sel100.atr).
    assert!((1120..=1150).contains(&beats), "{beats} beats");
}

#[test]
fn bad_input_exits_2_with_one_line() {
    let out = isoline(&["beats", "/nonexistent/record.hea"]);
    assert_eq!(out.status.code(), Some(2));
    let err = String::from_utf8_lossy(&out.stderr);
    assert_eq!(err.trim_end().lines().count(), 1, "{err}");
    assert!(err.contains("record.hea"));
}
