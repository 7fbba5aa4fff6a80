//! End-to-end: `isoline render` writes a PNG, and on any error exits with code 2, one line naming the file and
//! the problem, and no file (partial or whole) left behind.

use std::process::Command;

type Res = Result<(), Box<dyn std::error::Error>>;

fn data(rel: &str) -> std::path::PathBuf {
    std::path::PathBuf::from(env!("CARGO_MANIFEST_DIR")).join("../tests/data").join(rel)
}

fn isoline() -> Command {
    Command::new(env!("CARGO_BIN_EXE_isoline"))
}

#[test]
fn renders_a_png() -> Res {
    let dir = tempfile::tempdir()?;
    let out = dir.path().join("page.png");
    let st = isoline()
        .args(["render"])
        .arg(data("ptb-s0010/s0010_re.hea"))
        .args(["--dpi", "100", "--layout", "6x2", "--scheme", "mono", "--order", "cabrera", "--start", "1", "--seconds", "8"])
        .arg("--out")
        .arg(&out)
        .output()?;
    assert!(st.status.success(), "{}", String::from_utf8_lossy(&st.stderr));
    let bytes = std::fs::read(&out)?;
    assert_eq!(&bytes[..8], b"\x89PNG\r\n\x1a\n");
    // 8 s at 25 mm/s = 200 mm of trace plus 20 mm of margins and calibration: 220 mm = 866 px at 100 dpi.
    let width = u32::from_be_bytes([bytes[16], bytes[17], bytes[18], bytes[19]]);
    assert_eq!(width, (220.0f64 * 100.0 / 25.4).ceil() as u32);
    assert_eq!(std::fs::read_dir(dir.path())?.count(), 1, "only the PNG is left");
    Ok(())
}

#[test]
fn errors_leave_no_file() -> Res {
    let dir = tempfile::tempdir()?;
    let out = dir.path().join("page.png");
    let cases: [&[&str]; 5] = [
        &["--dpi", "5000"],
        &["--layout", "4x3"],
        &["--start", "9999"],
        &["--speed", "0"],
        &["--review", "missing.review.ron"],
    ];
    for extra in cases {
        let st = isoline().arg("render").arg(data("ptb-s0010/s0010_re.hea")).args(extra).arg("--out").arg(&out).output()?;
        assert_eq!(st.status.code(), Some(2), "{extra:?}");
        let err = String::from_utf8_lossy(&st.stderr);
        assert_eq!(err.trim().lines().count(), 1, "{extra:?}: {err}");
        assert_eq!(std::fs::read_dir(dir.path())?.count(), 0, "{extra:?} left a file");
    }
    let st = isoline().arg("render").arg(data("no/such.hea")).arg("--out").arg(&out).output()?;
    assert_eq!(st.status.code(), Some(2));
    assert!(String::from_utf8_lossy(&st.stderr).contains("such.hea"));
    assert!(!out.exists());
    Ok(())
}
