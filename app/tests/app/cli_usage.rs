//! Command-line usage errors: one line on stderr and exit 2; --help and --version still print and exit 0.

use std::process::{Command, Output};

fn isoline(args: &[&str]) -> std::io::Result<Output> {
    Command::new(env!("CARGO_BIN_EXE_isoline")).args(args).output()
}

#[test]
fn usage_errors_are_one_line_and_exit_2() -> Result<(), Box<dyn std::error::Error>> {
    for args in [
        vec!["render", "x.hea", "--speed", "-5"],
        vec!["render", "x.hea", "--no-such-option"],
        vec!["measure"],
        vec!["measure", "x.hea", "--format", "xml"],
        vec!["no-such-command", "x", "y"],
    ] {
        let out = isoline(&args)?;
        assert_eq!(out.status.code(), Some(2), "{args:?}");
        let err = String::from_utf8_lossy(&out.stderr);
        assert_eq!(err.lines().count(), 1, "{args:?}: {err}");
        assert!(err.starts_with("isoline: ") && err.contains("isoline --help"), "{args:?}: {err}");
        assert!(!err.contains("error: error"), "{err}");
        assert!(out.stdout.is_empty(), "{args:?}");
    }
    // A missing argument is named on the same line.
    let err = String::from_utf8_lossy(&isoline(&["measure"])?.stderr).into_owned();
    assert!(err.contains("<PATHS>"), "{err}");
    Ok(())
}

#[test]
fn help_and_version_print_and_exit_0() -> Result<(), Box<dyn std::error::Error>> {
    for args in [vec!["--help"], vec!["--version"], vec!["measure", "--help"]] {
        let out = isoline(&args)?;
        assert_eq!(out.status.code(), Some(0), "{args:?}");
        assert!(!out.stdout.is_empty(), "{args:?}");
        assert!(out.stderr.is_empty(), "{args:?}");
    }
    let help = String::from_utf8_lossy(&isoline(&["--help"])?.stdout).into_owned();
    assert!(help.contains("Usage:") && help.lines().count() > 5, "{help}");
    Ok(())
}

#[test]
#[cfg(target_os = "linux")]
fn with_no_display_the_workstation_says_so_and_points_to_the_commands() -> std::io::Result<()> {
    // Before, winit's own message: "winit EventLoopError: os error at /root/.cargo/registry/…".
    let out = Command::new(env!("CARGO_BIN_EXE_isoline"))
        .env_remove("DISPLAY")
        .env_remove("WAYLAND_DISPLAY")
        .arg("no-such-recording.edf")
        .output()?;
    let err = String::from_utf8_lossy(&out.stderr);
    assert_eq!(out.status.code(), Some(2), "{err}");
    assert!(err.contains("no display to draw on") && err.contains("isoline info"), "{err}");
    Ok(())
}
