//! `isoline`: the ECG review workstation. Without a subcommand it opens the GUI; subcommands run headless.

use std::path::PathBuf;
use std::process::ExitCode;

use clap::{Parser, Subcommand};

/// `eprintln!` that never panics: a message to stderr is dropped when stderr cannot be written (`2>/dev/full`, a
/// closed terminal), where `eprintln!` panicked (exit 101) after the work was done.
macro_rules! to_stderr {
    ($($arg:tt)*) => {{
        use std::io::Write as _;
        let _ = writeln!(std::io::stderr(), $($arg)*);
    }};
}

mod cli;
use isoline::gui;

/// Isoline — review and measure ECGs on true-scale paper.
///
/// Review aid only: automated values must be checked by qualified personnel. Follow local protocols and
/// licensed practice.
#[derive(Debug, Parser)]
#[command(name = "isoline", version, about, long_about = None)]
struct Cli {
    /// Recording (.hea, .edf, .csv) or review (.review.ron) to open in the workstation.
    file: Option<PathBuf>,
    #[command(subcommand)]
    command: Option<Command>,
}

#[derive(Debug, Subcommand)]
enum Command {
    /// Format, leads, sample rate, duration and annotation count of a recording.
    Info(cli::info::Args),
    /// Convert a recording to .edf or .csv ("-" writes CSV to stdout).
    Convert(cli::convert::Args),
    /// Write a demo recording from the dynamical ECG model, with its known truth.
    Synth(cli::synth::Args),
    /// One row per detected beat with its wave boundaries.
    Beats(cli::beats::Args),
    /// Measure recordings (files or folders): intervals, QTc, axis, ST, rate variability.
    Measure(cli::measure::Args),
    /// Work with review files.
    #[command(subcommand)]
    Review(cli::review::Command),
    /// Draw a page of a recording (and a review's calipers and marks) to PNG.
    Render(cli::render::Args),
    /// Compare reviews by different readers: differences and Bland–Altman limits.
    Agreement(cli::agreement::Args),
}

fn main() -> ExitCode {
    let cli = match Cli::try_parse() {
        Ok(cli) => cli,
        Err(e) => return usage_error(&e),
    };
    let result = match cli.command {
        None => gui::run(cli.file),
        Some(Command::Info(a)) => cli::info::run(&a),
        Some(Command::Convert(a)) => cli::convert::run(&a),
        Some(Command::Synth(a)) => cli::synth::run(&a),
        Some(Command::Beats(a)) => cli::beats::run(&a),
        Some(Command::Measure(a)) => cli::measure::run(&a),
        Some(Command::Review(c)) => cli::review::run(&c),
        Some(Command::Render(a)) => cli::render::run(&a),
        Some(Command::Agreement(a)) => cli::agreement::run(&a),
    };
    match result {
        Ok(code) => code,
        Err(e) => {
            to_stderr!("isoline: {e:#}");
            ExitCode::from(2)
        }
    }
}

/// Help and version go to stdout as clap writes them (exit 0); a usage error is one line on stderr (exit 2).
fn usage_error(e: &clap::Error) -> ExitCode {
    if !e.use_stderr() {
        // --help, --version: print as usual.
        let _ = e.print();
        return ExitCode::SUCCESS;
    }
    if e.kind() == clap::error::ErrorKind::DisplayHelpOnMissingArgumentOrSubcommand {
        // `isoline review` alone: the subcommand's help is the useful answer.
        let _ = e.print();
        return ExitCode::from(2);
    }
    // clap's first paragraph, on one line (a missing argument's name follows on the next line).
    let rendered = e.render().to_string();
    let first: Vec<&str> =
        rendered.lines().map(str::trim).skip_while(|l| l.is_empty()).take_while(|l| !l.is_empty()).collect();
    let first = first.join(" ");
    let first = first.strip_prefix("error:").map_or(first.as_str(), str::trim_start);
    let first = if first.is_empty() { "invalid arguments" } else { first };
    to_stderr!("isoline: {first} (see isoline --help)");
    ExitCode::from(2)
}
