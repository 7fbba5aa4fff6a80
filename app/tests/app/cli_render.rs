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
        .args([
            "--dpi",
            "100",
            "--layout",
            "6x2",
            "--scheme",
            "mono",
            "--order",
            "cabrera",
            "--start",
            "1",
            "--seconds",
            "8",
        ])
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
    let cases: [&[&str]; 10] = [
        &["--dpi", "5000"],
        // A huge or tiny start is written short (it printed 301 digits).
        &["--start", "1e300"],
        &["--start=-1e-300"],
        // A negative number reaches the check that names it (not clap's "unexpected argument '-1'").
        &["--gain", "-10"],
        &["--layout", "4x3"],
        // A lead named in the layout that the recording does not have (it has I … V6 and the Frank leads).
        &["--layout", "strip:XYZ"],
        &["--layout", "3x4+1:MLII"],
        &["--start", "9999"],
        &["--speed", "0"],
        &["--review", "/nonexistent/missing.review.ron"],
    ];
    for extra in cases {
        let st =
            isoline().arg("render").arg(data("ptb-s0010/s0010_re.hea")).args(extra).arg("--out").arg(&out).output()?;
        assert_eq!(st.status.code(), Some(2), "{extra:?}");
        let err = String::from_utf8_lossy(&st.stderr);
        assert_eq!(err.trim().lines().count(), 1, "{extra:?}: {err}");
        assert!(err.len() < 200, "{extra:?}: {err}");
        assert_eq!(std::fs::read_dir(dir.path())?.count(), 0, "{extra:?} left a file");
    }
    // A page named anything but .png would hold PNG bytes under the wrong type: refused, with the name.
    let jpg = dir.path().join("page.jpg");
    let st = isoline().arg("render").arg(data("ptb-s0010/s0010_re.hea")).arg("--out").arg(&jpg).output()?;
    assert_eq!(st.status.code(), Some(2));
    let err = String::from_utf8_lossy(&st.stderr);
    assert!(err.contains("page.jpg") && err.contains("PNG"), "{err}");
    assert!(!jpg.exists());
    let st = isoline().arg("render").arg(data("no/such.hea")).arg("--out").arg(&out).output()?;
    assert_eq!(st.status.code(), Some(2));
    assert!(String::from_utf8_lossy(&st.stderr).contains("such.hea"));
    assert!(!out.exists());
    Ok(())
}

/// A review made with the core API on the PTB record: a time caliper and a reader's QT value.
fn make_review(dir: &std::path::Path, tamper: bool) -> Result<std::path::PathBuf, Box<dyn std::error::Error>> {
    use isoline_core::caliper::{Caliper, CaliperKind};
    use isoline_core::review::{Measurement, RecordingIdentity, Review};
    let rec_path = data("ptb-s0010/s0010_re.hea");
    let rec = isoline_core::io::open(&rec_path, &isoline_core::io::OpenOptions::default())?.recording;
    let path = dir.join(if tamper { "other.review.ron" } else { "s0010.review.ron" });
    let mut id = RecordingIdentity::of(&rec_path, &rec, &path)?;
    if tamper {
        id.sha256 = "0".repeat(64);
    }
    let mut r = Review::new(id, "T. Demo");
    let kind = CaliperKind::Time { t1_s: 2.0, t2_s: 2.8 };
    r.put_caliper(Caliper { id: 1, kind, lead: None, locked: false, march: true }, "T. Demo")?;
    r.put_automatic(Measurement::automatic("qt_ms", "QT", Some(468.0), "ms"))?;
    r.set_measurement("qt_ms", 452.0, "T. Demo")?;
    r.save(&path)?;
    Ok(path)
}

#[test]
fn review_is_drawn_and_a_foreign_review_refused() -> Res {
    let dir = tempfile::tempdir()?;
    let run = |extra: &[&std::ffi::OsStr], out: &std::path::Path| {
        isoline()
            .arg("render")
            .arg(data("ptb-s0010/s0010_re.hea"))
            .args(["--dpi", "100", "--layout", "strip:II"])
            .args(extra)
            .arg("--out")
            .arg(out)
            .output()
    };
    let plain = dir.path().join("plain.png");
    let with = dir.path().join("with.png");
    let review = make_review(dir.path(), false)?;
    assert!(run(&[], &plain)?.status.success());
    let st = run(&["--review".as_ref(), review.as_os_str()], &with)?;
    assert!(st.status.success(), "{}", String::from_utf8_lossy(&st.stderr));
    assert_ne!(std::fs::read(&plain)?, std::fs::read(&with)?, "the review's caliper and reader must show");

    let other = make_review(dir.path(), true)?;
    let refused = dir.path().join("refused.png");
    let st = run(&["--review".as_ref(), other.as_os_str()], &refused)?;
    assert_eq!(st.status.code(), Some(2));
    let err = String::from_utf8_lossy(&st.stderr);
    assert!(err.contains("other.review.ron") && err.contains("another recording"), "{err}");
    assert!(!refused.exists());
    Ok(())
}

#[test]
fn a_review_that_cannot_be_read_is_named_once() -> Res {
    // Before: "nope.review.ron: cannot use this review: nope.review.ron: No such file or directory".
    let dir = tempfile::tempdir()?;
    let review = dir.path().join("nope.review.ron");
    let out = isoline()
        .arg("render")
        .arg(data("ludb/1.hea"))
        .arg("--review")
        .arg(&review)
        .arg("--out")
        .arg(dir.path().join("x.png"))
        .output()?;
    let err = String::from_utf8_lossy(&out.stderr);
    assert_eq!(out.status.code(), Some(2), "{err}");
    assert_eq!(err.matches("nope.review.ron").count(), 1, "{err}");
    assert!(err.contains("cannot use this review"), "{err}");
    Ok(())
}
