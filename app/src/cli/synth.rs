//! `isoline synth`.

use std::process::ExitCode;

/// Arguments of `isoline synth`.
#[derive(Debug, clap::Args)]
pub struct Args {
    /// Input files.
    pub files: Vec<std::path::PathBuf>,
}

/// Runs the command.
pub fn run(args: &Args) -> anyhow::Result<ExitCode> {
    let _ = args;
    anyhow::bail!("isoline synth is not available yet")
}
