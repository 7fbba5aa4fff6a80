//! `isoline convert FILE --out OUT`: to EDF (`.edf`, EDF+C when the recording has annotations) or CSV (`.csv`,
//! or `-` for CSV on stdout). Outputs are written atomically and de-identified unless `--identify` is given.

use std::io::Write;
use std::path::{Path, PathBuf};
use std::process::ExitCode;

use anyhow::{Context, bail};
use isoline_core::io::{self, csv, edf};

/// Arguments of `isoline convert`.
#[derive(Debug, clap::Args)]
pub struct Args {
    /// Recording: .hea (or WFDB record path without extension), .edf, .csv.
    pub file: PathBuf,
    /// Output file: .edf or .csv; "-" writes CSV to stdout.
    #[arg(long, short)]
    pub out: PathBuf,
    /// Sampling rate for a CSV input without a time_s column, Hz.
    #[arg(long)]
    pub rate: Option<f64>,
    /// Keep the patient's identifiers, the recording date and free-text annotations in an EDF output (removed by
    /// default).
    #[arg(long)]
    pub identify: bool,
}

/// Output kinds.
enum Target {
    Stdout,
    Edf,
    Csv,
}

fn target(out: &Path) -> anyhow::Result<Target> {
    if out.as_os_str() == "-" {
        return Ok(Target::Stdout);
    }
    match out.extension().and_then(|e| e.to_str()).map(str::to_ascii_lowercase).as_deref() {
        Some("edf") => Ok(Target::Edf),
        Some("csv") => Ok(Target::Csv),
        _ => bail!("{}: unknown output type (expected .edf, .csv or - for CSV on stdout)", out.display()),
    }
}

/// Runs the command.
pub fn run(args: &Args) -> anyhow::Result<ExitCode> {
    let target = target(&args.out)?;
    let opened = io::open(&args.file, &io::OpenOptions { csv_rate_hz: args.rate })?;
    for w in &opened.warnings {
        to_stderr!("isoline: warning: {w}");
    }
    if !matches!(target, Target::Stdout) {
        super::refuse_to_overwrite(&args.out, &opened.files)?;
    }
    let rec = &opened.recording;
    if !matches!(target, Target::Edf) && !rec.annotations.is_empty() {
        // Said, not silently lost: CSV has no place for annotations.
        let n = rec.annotations.len();
        to_stderr!(
            "isoline: {}: {n} annotation{} not written (a CSV holds samples only; convert to .edf to keep them)",
            if matches!(target, Target::Stdout) {
                "standard output".to_owned()
            } else {
                args.out.display().to_string()
            },
            if n == 1 { "" } else { "s" }
        );
    }
    match target {
        Target::Stdout => {
            let stdout = std::io::stdout();
            let mut w = std::io::BufWriter::with_capacity(1 << 20, stdout.lock());
            let result = csv::write_to(&mut w, rec).and_then(|()| w.flush());
            match result {
                Err(e) if e.kind() == std::io::ErrorKind::BrokenPipe => {}
                other => other.context("writing CSV to stdout")?,
            }
        }
        Target::Csv => csv::write(&args.out, rec)?,
        Target::Edf => {
            edf::write(&args.out, rec, &edf::EdfWriteOptions { identify: args.identify })?;
            for w in edf::coarse_leads(rec) {
                to_stderr!("isoline: warning: {}: {w}", args.out.display());
            }
            let withheld = rec.annotations.iter().filter(|a| a.shareable_label().is_none()).count();
            if !args.identify && withheld > 0 {
                to_stderr!(
                    "isoline: {}: {withheld} free-text annotation{} written as \"annotation\" (free text can name a \
                     person); --identify keeps the words",
                    args.out.display(),
                    if withheld == 1 { "" } else { "s" }
                );
            }
        }
    }
    Ok(ExitCode::SUCCESS)
}
