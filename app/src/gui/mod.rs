//! The workstation window (eframe/egui).

use std::path::PathBuf;
use std::process::ExitCode;

/// Opens the workstation, optionally on a file.
pub fn run(file: Option<PathBuf>) -> anyhow::Result<ExitCode> {
    let _ = file;
    anyhow::bail!("the workstation window is not available yet")
}
