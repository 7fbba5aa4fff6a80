//! End-to-end checks of `isoline measure`: JSON keys, CSV rows, and a batch with a corrupt file.

use std::path::{Path, PathBuf};
use std::process::Command;

fn data(rel: &str) -> PathBuf {
    Path::new(env!("CARGO_MANIFEST_DIR")).join("../tests/data").join(rel)
}

fn isoline() -> Command {
    Command::new(env!("CARGO_BIN_EXE_isoline"))
}

/// Copies a WFDB record (header and signal file) into `dir`.
fn copy_record(rel_hea: &str, dir: &Path) -> std::io::Result<()> {
    let hea = data(rel_hea);
    for ext in ["hea", "dat"] {
        let src = hea.with_extension(ext);
        let name = src.file_name().map(PathBuf::from).unwrap_or_default();
        std::fs::copy(&src, dir.join(name))?;
    }
    Ok(())
}

#[test]
fn json_has_the_design_keys() -> Result<(), Box<dyn std::error::Error>> {
    let out = isoline().args(["measure", "--format", "json"]).arg(data("ludb/2.hea")).output()?;
    assert!(out.status.success(), "{}", String::from_utf8_lossy(&out.stderr));
    let v: serde_json::Value = serde_json::from_slice(&out.stdout)?;
    let mut keys: Vec<&str> = v.as_object().map(|o| o.keys().map(String::as_str).collect()).unwrap_or_default();
    keys.sort_unstable();
    // Source: design.md, `measure --format json` keys.
    let mut want = vec![
        "file",
        "format",
        "sample_rate_hz",
        "duration_s",
        "leads",
        "beats",
        "dominant_beats",
        "heart_rate_bpm",
        "rr_ms",
        "rr_sdnn_ms",
        "rr_rmssd_ms",
        "p_duration_ms",
        "pr_ms",
        "qrs_ms",
        "qt_ms",
        "qtc_ms",
        "axis_deg",
        "st_uv",
        "notes",
    ];
    want.sort_unstable();
    assert_eq!(keys, want);
    let mut q: Vec<&str> = v["qtc_ms"].as_object().map(|o| o.keys().map(String::as_str).collect()).unwrap_or_default();
    q.sort_unstable();
    assert_eq!(q, ["bazett", "framingham", "fridericia", "hodges", "rautaharju"]);
    assert!(v["axis_deg"].get("qrs").is_some() && v["axis_deg"].get("p").is_some() && v["axis_deg"].get("t").is_some());
    assert_eq!(v["st_uv"].as_object().map(serde_json::Map::len), Some(12));
    assert_eq!(v["sample_rate_hz"], serde_json::json!(500.0));
    // A 10-s sinus record: a measured rate, not null.
    assert!(v["heart_rate_bpm"].as_f64().is_some_and(|hr| (30.0..200.0).contains(&hr)));
    Ok(())
}

#[test]
fn batch_lists_bad_files_and_measures_the_rest() -> Result<(), Box<dyn std::error::Error>> {
    let dir = tempfile::tempdir()?;
    copy_record("ludb/2.hea", dir.path())?;
    copy_record("ludb/6.hea", dir.path())?;
    std::fs::write(dir.path().join("broken.edf"), b"this is not an EDF file")?;
    let out_csv = dir.path().join("out").join("table.csv");
    std::fs::create_dir(dir.path().join("out"))?;
    let out = isoline().args(["measure", "--format", "csv", "--out"]).arg(&out_csv).arg(dir.path()).output()?;
    assert_eq!(out.status.code(), Some(2), "{}", String::from_utf8_lossy(&out.stderr));
    let stderr = String::from_utf8_lossy(&out.stderr);
    assert!(stderr.contains("broken.edf"), "{stderr}");
    assert_eq!(stderr.lines().filter(|l| l.contains("broken.edf")).count(), 1, "{stderr}");
    let csv = std::fs::read_to_string(&out_csv)?;
    let lines: Vec<&str> = csv.lines().collect();
    assert_eq!(lines.len(), 3, "{csv}");
    assert!(lines[0].starts_with("file,format,sample_rate_hz,"));
    assert!(lines[1].contains("2.hea") && lines[2].contains("6.hea"), "{csv}");
    // Only the table itself was left in the output folder: no temporary files.
    assert_eq!(std::fs::read_dir(dir.path().join("out"))?.count(), 1);
    Ok(())
}

#[test]
fn folder_walk_skips_csv_tables_that_are_not_recordings() -> Result<(), Box<dyn std::error::Error>> {
    let dir = tempfile::tempdir()?;
    copy_record("ludb/2.hea", dir.path())?;
    // LUDB ships per-record and folder-wide tables next to the records; they are not recordings.
    std::fs::copy(data("ludb/2.global.csv"), dir.path().join("2.global.csv"))?;
    std::fs::write(dir.path().join("labels.csv"), "record,rhythm\n2,sinus\n")?;
    let out_csv = dir.path().join("table.out");
    let out = isoline().args(["measure", "--format", "csv", "--out"]).arg(&out_csv).arg(dir.path()).output()?;
    assert_eq!(out.status.code(), Some(0), "{}", String::from_utf8_lossy(&out.stderr));
    let csv = std::fs::read_to_string(&out_csv)?;
    assert_eq!(csv.lines().count(), 2, "{csv}");
    Ok(())
}

#[test]
fn empty_folder_is_exit_code_2_with_one_line_and_no_output() -> Result<(), Box<dyn std::error::Error>> {
    let dir = tempfile::tempdir()?;
    let empty = dir.path().join("empty");
    std::fs::create_dir(&empty)?;
    let out_csv = dir.path().join("table.csv");
    let out = isoline().args(["measure", "--format", "csv", "--out"]).arg(&out_csv).arg(&empty).output()?;
    assert_eq!(out.status.code(), Some(2));
    let stderr = String::from_utf8_lossy(&out.stderr);
    assert_eq!(stderr.lines().count(), 1, "{stderr}");
    let expected = format!("{}: no recordings found (.hea, .edf, .csv with a time_s column)", empty.display());
    assert!(stderr.contains(&expected), "{stderr}");
    assert!(!out_csv.exists());
    assert!(out.stdout.is_empty());
    Ok(())
}

#[test]
fn missing_file_is_exit_code_2_with_its_name() -> Result<(), Box<dyn std::error::Error>> {
    let out = isoline().args(["measure", "--format", "json", "no-such-record.hea"]).output()?;
    assert_eq!(out.status.code(), Some(2));
    assert!(String::from_utf8_lossy(&out.stderr).contains("no-such-record.hea"));
    assert!(out.stdout.is_empty(), "{}", String::from_utf8_lossy(&out.stdout));
    // In a batch, the table lists what it lacks, so a table saved with --out says so too (before, only stderr).
    let dir = tempfile::tempdir()?;
    let saved = dir.path().join("batch.txt");
    let out =
        isoline().args(["measure", "no-such-record.hea"]).arg(data("ludb/2.hea")).arg("--out").arg(&saved).output()?;
    assert_eq!(out.status.code(), Some(2));
    let table = std::fs::read_to_string(&saved)?;
    assert!(table.contains("1 of 2 file(s) could not be measured:\n  no-such-record.hea"), "{table}");
    assert!(table.trim_end().ends_with(isoline_core::CAUTION), "{table}");
    Ok(())
}

#[test]
fn a_recording_with_no_samples_is_refused_as_beats_and_render_refuse_it() -> Result<(), Box<dyn std::error::Error>> {
    // A header declaring no samples: `measure` printed a row with "No heartbeat found" and exit 0, while `beats`
    // and `render` refused the same file.
    let dir = tempfile::tempdir()?;
    let hea = dir.path().join("empty.hea");
    std::fs::write(&hea, "empty 1 500 0\nempty.dat 16 200 16 0 0 0 0 II\n")?;
    std::fs::write(dir.path().join("empty.dat"), [])?;
    for cmd in ["measure", "beats"] {
        let out = isoline().arg(cmd).arg(&hea).output()?;
        let err = String::from_utf8_lossy(&out.stderr);
        assert_eq!(out.status.code(), Some(2), "{cmd}: {err}");
        assert!(err.contains("empty.hea") && err.contains("no samples"), "{cmd}: {err}");
    }
    Ok(())
}
