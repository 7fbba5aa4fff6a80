//! `isoline render`.

use std::process::ExitCode;

/// Arguments of `isoline render`.
#[derive(Debug, clap::Args)]
pub struct Args {
    /// Input files.
    pub files: Vec<std::path::PathBuf>,
}

/// Runs the command.
pub fn run(args: &Args) -> anyhow::Result<ExitCode> {
    let _ = args;
    anyhow::bail!("isoline render is not available yet")
}
