//! `isoline info` and `isoline convert` end to end, on the real records in `tests/data/`.
//!
//! Source of the expected values: `tests/data/wfdb-reference-values.csv`, made with the `wfdb` Python package
//! 4.3.1 (`wfdb.rdrecord`) from the PhysioNet records (see `tests/data/README.md`).

use std::collections::BTreeMap;
use std::path::{Path, PathBuf};
use std::process::{Command, Output};

type TestResult = Result<(), Box<dyn std::error::Error>>;

fn data(rel: &str) -> PathBuf {
    Path::new(env!("CARGO_MANIFEST_DIR")).join("../tests/data").join(rel)
}

fn isoline(args: &[&str]) -> Result<Output, std::io::Error> {
    Command::new(env!("CARGO_BIN_EXE_isoline")).args(args).output()
}

fn path_str(p: &Path) -> String {
    p.display().to_string()
}

/// (record, lead) → (rate, count, [(sample, mV)]).
type Reference = BTreeMap<(String, String), (f64, usize, Vec<(usize, f64)>)>;

fn reference() -> Result<Reference, Box<dyn std::error::Error>> {
    let mut out: Reference = BTreeMap::new();
    for line in std::fs::read_to_string(data("wfdb-reference-values.csv"))?.lines().skip(1) {
        let f: Vec<&str> = line.split(',').collect();
        if f.len() != 6 {
            continue;
        }
        let e = out.entry((f[0].to_string(), f[1].to_string())).or_insert((f[2].parse()?, f[3].parse()?, Vec::new()));
        e.2.push((f[4].parse()?, f[5].parse()?));
    }
    Ok(out)
}

#[test]
fn info_json_has_the_documented_keys() -> TestResult {
    let out = isoline(&["info", &path_str(&data("qtdb/sel100")), "--format", "json"])?;
    assert!(out.status.success(), "{}", String::from_utf8_lossy(&out.stderr));
    let v: serde_json::Value = serde_json::from_slice(&out.stdout)?;
    let keys: Vec<&str> = v.as_object().ok_or("not an object")?.keys().map(String::as_str).collect();
    assert_eq!(keys, ["annotations", "duration_s", "file", "format", "leads", "sample_rate_hz", "samples"]);
    assert_eq!(v["format"], "wfdb");
    assert_eq!(v["sample_rate_hz"], 250.0);
    // Reference: sel100 has 225000 samples per lead at 250 Hz (wfdb 4.3.1), so 900 s.
    assert_eq!(v["samples"], 225000);
    assert_eq!(v["duration_s"], 900.0);
    assert_eq!(v["leads"], serde_json::json!(["MLII", "V5"]));
    assert!(v["annotations"].as_u64().is_some_and(|n| n >= 1100), "{}", v["annotations"]);
    Ok(())
}

/// Parses CSV output (`time_s`, then leads in mV) into lead name → values.
/// Time column and lead name (lower case) → values in mV.
type Table = (Vec<f64>, BTreeMap<String, Vec<f64>>);

fn parse_csv(text: &str) -> Result<Table, Box<dyn std::error::Error>> {
    let mut lines = text.lines();
    let header: Vec<&str> = lines.next().ok_or("empty")?.split(',').collect();
    assert_eq!(header[0], "time_s");
    let mut time = Vec::new();
    let mut cols: Vec<Vec<f64>> = vec![Vec::new(); header.len() - 1];
    for l in lines {
        let mut f = l.split(',');
        time.push(f.next().ok_or("row")?.parse()?);
        for (c, v) in cols.iter_mut().zip(f) {
            c.push(if v.is_empty() { f64::NAN } else { v.parse()? });
        }
    }
    Ok((time, header[1..].iter().map(|s| s.to_ascii_lowercase()).zip(cols).collect()))
}

fn check_against_reference(record: &str, csv: &str, reference: &Reference, tol_mv: f64) -> TestResult {
    let (time, cols) = parse_csv(csv)?;
    for ((rec, lead), (fs, n, values)) in reference.iter().filter(|((r, _), _)| r == record) {
        let col = cols.get(&lead.to_ascii_lowercase()).ok_or_else(|| format!("{rec}: no column {lead}"))?;
        assert_eq!(col.len(), *n, "{rec} {lead} sample count");
        assert!((time[1] - 1.0 / fs).abs() < 1e-6, "{rec} time step");
        for &(k, mv) in values {
            assert!((col[k] - mv).abs() <= tol_mv, "{rec} {lead} sample {k}: {} vs reference {mv}", col[k]);
        }
    }
    Ok(())
}

#[test]
fn convert_to_csv_reproduces_the_reference_values() -> TestResult {
    let reference = reference()?;
    let records: std::collections::BTreeSet<&str> = reference.keys().map(|(r, _)| r.as_str()).collect();
    assert!(records.len() >= 12);
    for record in records {
        let out = isoline(&["convert", &path_str(&data(record)), "--out", "-"])?;
        assert!(out.status.success(), "{record}: {}", String::from_utf8_lossy(&out.stderr));
        // 0.001 mV (the reference tolerance) + 0.00005 mV rounding of the 4-decimal output.
        check_against_reference(record, &String::from_utf8(out.stdout)?, &reference, 0.00105)?;
    }
    Ok(())
}

#[test]
fn convert_to_csv_says_the_annotations_are_left_behind() -> TestResult {
    // Before, a record's beat annotations vanished from a CSV without a word.
    let out = isoline(&["convert", &path_str(&data("qtdb/sel100")), "--out", "-"])?;
    assert!(out.status.success(), "{}", String::from_utf8_lossy(&out.stderr));
    let err = String::from_utf8(out.stderr)?;
    assert!(
        err.contains("standard output: ") && err.contains("annotations not written (a CSV holds samples only"),
        "{err}"
    );
    Ok(())
}

#[test]
fn convert_through_edf_keeps_the_reference_values() -> TestResult {
    let reference = reference()?;
    let dir = tempfile::tempdir()?;
    for record in ["qtdb/sel117", "ludb/2", "ptb-s0010/s0010_re"] {
        let edf = dir.path().join("x.edf");
        let out = isoline(&["convert", &path_str(&data(record)), "--out", &path_str(&edf)])?;
        assert!(out.status.success(), "{record}: {}", String::from_utf8_lossy(&out.stderr));
        let csv = dir.path().join("x.csv");
        let out = isoline(&["convert", &path_str(&edf), "--out", &path_str(&csv)])?;
        assert!(out.status.success(), "{record}: {}", String::from_utf8_lossy(&out.stderr));
        // EDF adds at most half a 16-bit step of each lead's range (well under 0.001 mV for these records).
        check_against_reference(record, &std::fs::read_to_string(&csv)?, &reference, 0.0011)?;
        let info = isoline(&["info", &path_str(&edf), "--format", "json"])?;
        let v: serde_json::Value = serde_json::from_slice(&info.stdout)?;
        assert!(v["format"] == "edf" || v["format"] == "edf+", "{}", v["format"]);
    }
    Ok(())
}

/// Runs a command that must fail: exit 2, one stderr line naming `name`.
fn assert_bad(args: &[&str], name: &str) -> TestResult {
    let out = isoline(args)?;
    let err = String::from_utf8_lossy(&out.stderr);
    assert_eq!(out.status.code(), Some(2), "{args:?}: {err}");
    let lines: Vec<&str> = err.lines().filter(|l| !l.contains("warning:")).collect();
    assert_eq!(lines.len(), 1, "{args:?}: {err}");
    assert!(lines[0].contains(name), "{args:?}: {err}");
    Ok(())
}

#[test]
fn bad_input_exits_2_naming_the_file() -> TestResult {
    let dir = tempfile::tempdir()?;
    let d = |n: &str| path_str(&dir.path().join(n));
    std::fs::write(dir.path().join("junk.edf"), b"this is not an EDF file at all")?;
    assert_bad(&["info", &d("junk.edf")], "junk.edf")?;
    assert_bad(&["info", &d("missing.edf")], "missing.edf")?;
    std::fs::write(dir.path().join("norate.csv"), "I,II\n1,2\n3,4\n")?;
    assert_bad(&["info", &d("norate.csv")], "norate.csv")?;
    std::fs::write(dir.path().join("badcell.csv"), "time_s,I\n0,1\n0.004,zz\n")?;
    assert_bad(&["info", &d("badcell.csv")], "line 3")?;
    // WFDB header promising 10^12 samples, with a 6-byte signal file.
    std::fs::write(dir.path().join("lie.hea"), "lie 1 250 1000000000000\nlie.dat 16 200 16 0 0 0 0 II\n")?;
    std::fs::write(dir.path().join("lie.dat"), [0u8; 6])?;
    assert_bad(&["info", &d("lie")], "lie.dat")?;
    // Unknown output type, and an output that would overwrite the input.
    assert_bad(&["convert", &path_str(&data("ludb/1")), "--out", &d("x.txt")], "x.txt")?;
    std::fs::write(dir.path().join("ok.csv"), "time_s,I\n0,1\n0.004,2\n")?;
    assert_bad(&["convert", &d("ok.csv"), "--out", &d("ok.csv")], "ok.csv")?;
    assert_eq!(std::fs::read_to_string(dir.path().join("ok.csv"))?, "time_s,I\n0,1\n0.004,2\n", "input untouched");
    // Nor does `measure --out` or `review new --out … --force` write over a recording it reads.
    let wave: String = (0..2500).map(|k| format!("{},{}\n", k as f64 / 250.0, (k % 200 == 0) as u8)).collect();
    let recording = format!("time_s,II\n{wave}");
    std::fs::write(dir.path().join("strip.csv"), &recording)?;
    assert_bad(&["measure", &d("strip.csv"), "--format", "csv", "--out", &d("strip.csv")], "strip.csv")?;
    assert_bad(&["review", "new", &d("strip.csv"), "--reader", "T", "--out", &d("strip.csv"), "--force"], "strip.csv")?;
    assert_eq!(std::fs::read_to_string(dir.path().join("strip.csv"))?, recording, "recording untouched");
    // A failed conversion leaves no output file, partial or whole.
    assert_bad(&["convert", &d("junk.edf"), "--out", &d("out.edf")], "junk.edf")?;
    let left: Vec<String> = std::fs::read_dir(dir.path())?
        .filter_map(Result::ok)
        .map(|e| e.file_name().to_string_lossy().into_owned())
        .filter(|n| n.contains("out.edf"))
        .collect();
    assert!(left.is_empty(), "{left:?}");
    Ok(())
}

#[test]
fn an_unwritable_standard_output_is_an_error_not_a_panic() -> TestResult {
    // Standard output on a full device (Linux /dev/full): every subcommand that prints reports the failure and
    // exits with 2; `print!` would panic (exit 101). A reader that stops early (a closed pipe) is no error.
    if !Path::new("/dev/full").exists() {
        return Ok(());
    }
    let rec = path_str(&data("ludb/1.hea"));
    for args in [vec!["info", rec.as_str()], vec!["measure", rec.as_str()], vec!["beats", rec.as_str()]] {
        let full = std::fs::OpenOptions::new().write(true).open("/dev/full")?;
        let out = Command::new(env!("CARGO_BIN_EXE_isoline")).args(&args).stdout(full).output()?;
        let err = String::from_utf8_lossy(&out.stderr);
        assert_eq!(out.status.code(), Some(2), "{args:?}: {err}");
        assert!(err.contains("writing to standard output") && !err.contains("panicked"), "{args:?}: {err}");
        let mut child = Command::new(env!("CARGO_BIN_EXE_isoline"))
            .args(&args)
            .stdout(std::process::Stdio::piped())
            .stderr(std::process::Stdio::null())
            .spawn()?;
        drop(child.stdout.take()); // the reader goes away before the first line
        assert_eq!(child.wait()?.code(), Some(0), "{args:?} into a closed pipe");
    }
    Ok(())
}

#[test]
fn an_unwritable_standard_error_loses_the_message_not_the_exit_code() -> TestResult {
    // Standard error on a full device: `eprintln!` panicked (exit 101) on the first warning or error line. Now
    // the message is lost but the exit code still tells: 0 for a measured recording (in CSV the caution goes to
    // stderr), 2 for a missing one.
    if !Path::new("/dev/full").exists() {
        return Ok(());
    }
    let rec = path_str(&data("ludb/1.hea"));
    for (args, code) in
        [(vec!["measure", rec.as_str(), "--format", "csv"], 0), (vec!["info", "no-such-recording.edf"], 2)]
    {
        let full = std::fs::OpenOptions::new().write(true).open("/dev/full")?;
        let out = Command::new(env!("CARGO_BIN_EXE_isoline"))
            .args(&args)
            .stdout(std::process::Stdio::null())
            .stderr(full)
            .output()?;
        assert_eq!(out.status.code(), Some(code), "{args:?}");
    }
    Ok(())
}
