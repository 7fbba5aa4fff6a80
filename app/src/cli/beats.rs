//! `isoline beats`.

use std::process::ExitCode;

/// Arguments of `isoline beats`.
#[derive(Debug, clap::Args)]
pub struct Args {
    /// Input files.
    pub files: Vec<std::path::PathBuf>,
}

/// Runs the command.
pub fn run(args: &Args) -> anyhow::Result<ExitCode> {
    let _ = args;
    anyhow::bail!("isoline beats is not available yet")
}
