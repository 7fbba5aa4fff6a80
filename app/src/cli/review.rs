//! `isoline review …`.

use std::process::ExitCode;

/// Review subcommands.
#[derive(Debug, clap::Subcommand)]
pub enum Command {
    /// Write a draft review holding every automatic value.
    New {
        /// Recording.
        file: std::path::PathBuf,
    },
}

/// Runs the command.
pub fn run(command: &Command) -> anyhow::Result<ExitCode> {
    let _ = command;
    anyhow::bail!("isoline review is not available yet")
}
