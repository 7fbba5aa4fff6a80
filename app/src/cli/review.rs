//! `isoline review new FILE --reader NAME [--out R] [--force]`: runs the measurement engine and writes a
//! `draft` review holding every automatic value (origin `auto`) and the representative-beat marks.

use std::path::PathBuf;
use std::process::ExitCode;

use anyhow::{Context, bail};
use isoline_core::analysis::analyze_reporting;
use isoline_core::filter::FilterSettings;
use isoline_core::io;
use isoline_core::recording::Recording;
use isoline_core::review::{RecordingIdentity, Review};

/// Review subcommands.
#[derive(Debug, clap::Subcommand)]
pub enum Command {
    /// Write a draft review holding every automatic value.
    New(NewArgs),
}

/// Arguments of `isoline review new`.
#[derive(Debug, clap::Args)]
pub struct NewArgs {
    /// Recording: .hea (or WFDB record path without extension), .edf, .csv.
    pub file: PathBuf,
    /// The reader's name or initials, stored in the review.
    #[arg(long)]
    pub reader: String,
    /// Review file to write (default: NAME.review.ron beside the recording).
    #[arg(long)]
    pub out: Option<PathBuf>,
    /// Replace an existing review (its previous version is kept as .bak).
    #[arg(long)]
    pub force: bool,
    /// Sampling rate for a CSV file without a time_s column.
    #[arg(long)]
    pub rate: Option<f64>,
}

/// Runs the command.
pub fn run(command: &Command) -> anyhow::Result<ExitCode> {
    match command {
        Command::New(args) => new(args),
    }
}

pub use isoline_core::review::default_review_path;

fn new(args: &NewArgs) -> anyhow::Result<ExitCode> {
    let reader = args.reader.trim();
    if reader.is_empty() {
        bail!("--reader: give the reader's name or initials");
    }
    if let Some(why) = isoline_core::review::reader_name_problem(reader) {
        bail!("--reader: the name {why}");
    }
    let out = args.out.clone().unwrap_or_else(|| default_review_path(&args.file));
    if out.exists() {
        // Only a review is replaced, and never a final one (signed off: a fresh draft in its place would undo that
        // without trace); before, --force wrote over a PNG or a signal file named by mistake, and over final work.
        match isoline_core::review::load(&out) {
            Err(e) => bail!("{}: exists and is not a review ({e}); not replaced", out.display()),
            Ok(old) if old.is_final() => bail!(
                "{}: a final review by {} exists; a new draft does not replace signed-off work (move it away first)",
                out.display(),
                old.reader
            ),
            Ok(old) if !args.force => bail!(
                "{}: a review by {} ({}) already exists (use --force to replace it; the old one is kept as .bak)",
                out.display(),
                old.reader,
                old.stage
            ),
            Ok(old) => to_stderr!("isoline: replacing the {} review by {} (kept as .bak)", old.stage, old.reader),
        }
    }
    let opened = io::open(&args.file, &io::OpenOptions { csv_rate_hz: args.rate })?;
    super::refuse_to_overwrite(&out, &opened.files)?;
    for w in &opened.warnings {
        to_stderr!("isoline: warning: {w}");
    }
    let identity = RecordingIdentity::of(&args.file, &opened.recording, &out)?;
    let mut review = Review::new(identity, reader);
    fill_automatic(&mut review, &opened.recording)?;
    review.save(&out)?;
    to_stderr!(
        "isoline: wrote {} (draft by {reader}: {} measurements, {} marks)",
        out.display(),
        review.measurements.len(),
        review.marks.len()
    );
    Ok(ExitCode::SUCCESS)
}

/// Runs the measurement engine (default filters) and puts its automatic values and representative-beat marks
/// into the review.
fn fill_automatic(review: &mut Review, recording: &Recording) -> anyhow::Result<()> {
    let analysis = super::with_window_bar(recording, true, |on_window| {
        analyze_reporting(recording, &FilterSettings::default(), on_window)
    });
    review.put_analysis(&analysis).context("filling the new review")?;
    Ok(())
}
