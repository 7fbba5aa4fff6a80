//! `isoline measure FILE|DIR... [--format table|csv|json] [--out PATH]`: measurements of many recordings,
//! spread over every core, with progress on stderr. Bad files are listed at the end; the rest are measured.

mod output;
mod walk;

use std::path::{Path, PathBuf};
use std::process::ExitCode;

use anyhow::Context as _;
use indicatif::{ProgressBar, ProgressStyle};
use isoline_core::filter::FilterSettings;
use isoline_core::io;
use isoline_core::measure::Measurements;
use isoline_core::recording::Recording;
use rayon::prelude::*;

use output::Row;

/// Output format of `measure`.
#[derive(Debug, Clone, Copy, Default, PartialEq, Eq, clap::ValueEnum)]
pub enum MeasureFormat {
    /// Aligned columns for people, then range notes.
    #[default]
    Table,
    /// One row per recording.
    Csv,
    /// One object per recording (an array for several).
    Json,
}

/// Arguments of `isoline measure`.
#[derive(Debug, clap::Args)]
pub struct Args {
    /// Recordings (.hea or WFDB record path, .edf, .csv) and folders to search for them.
    #[arg(required = true)]
    pub paths: Vec<PathBuf>,
    /// Output format.
    #[arg(long, value_enum, default_value_t)]
    pub format: MeasureFormat,
    /// Write to this file (atomically) instead of stdout.
    #[arg(long)]
    pub out: Option<PathBuf>,
    /// Sampling rate for CSV files without a time_s column (folders are then searched for CSV files whose header
    /// names standard leads only, too).
    #[arg(long)]
    pub rate: Option<f64>,
}

/// Measures one recording: filters, beats, boundaries, representative beat, measurements; with `windows_shown`,
/// a long recording's windows show their progress (when it is the only recording, whose bar is the only one).
fn analyze(recording: &Recording, windows_shown: bool) -> Measurements {
    super::with_window_bar(recording, windows_shown, |on_window| {
        isoline_core::analysis::analyze_reporting(recording, &FilterSettings::default(), on_window).measurements
    })
}

/// A measured row with the reader's warnings and the files it was read from, or why it could not be measured.
type Outcome = anyhow::Result<(Row, Vec<String>, Vec<PathBuf>)>;

fn measure_file(path: &Path, rate: Option<f64>, windows_shown: bool) -> Outcome {
    let opened = io::open(path, &io::OpenOptions { csv_rate_hz: rate })?;
    crate::cli::refuse_empty(&opened.recording, path)?;
    let m = analyze(&opened.recording, windows_shown);
    let r = &opened.recording;
    let row = Row {
        file: path.display().to_string(),
        format: opened.format.as_str(),
        sample_rate_hz: r.sample_rate.hz(),
        duration_s: r.duration_s(),
        leads: r.leads.iter().map(|l| l.name.clone()).collect(),
        m,
        signal_notes: r.signal_notes(),
    };
    Ok((row, opened.warnings, opened.files))
}

/// Runs the command. Exit code 2 when any file failed (after measuring and writing all the others).
pub fn run(args: &Args) -> anyhow::Result<ExitCode> {
    let found = walk::find_recordings(&args.paths, args.rate.is_some());
    // With a rate given, the user has recordings without a time_s column: say which files in folders were not
    // taken as recordings, so none is left out unsaid.
    if args.rate.is_some() {
        for path in &found.passed_over {
            to_stderr!("isoline: note: {}: {}", path.display(), walk::PASSED_OVER);
        }
    }
    for path in &found.needs_rate {
        to_stderr!("isoline: note: {}: {}", path.display(), walk::NEEDS_RATE);
    }
    if found.files.is_empty() {
        // Nothing to measure (e.g. an empty folder): say why, one line per path, and write no table.
        for (path, e) in &found.errors {
            to_stderr!("isoline: {}: {e}", path.display());
        }
        return Ok(ExitCode::from(2));
    }
    let many = found.files.len() > 1;
    let bar = if many { ProgressBar::new(found.files.len() as u64) } else { ProgressBar::hidden() };
    if let Ok(style) = ProgressStyle::with_template("{bar:30} {pos}/{len} recordings measured, {elapsed} {msg}") {
        bar.set_style(style);
    }
    // As many files at a time as there are cores. A long recording's windows are analysed in parallel too, and a
    // core waiting for them takes other pending work: were every file pending at once, it could open more
    // recordings than there are cores.
    let mut results: Vec<(PathBuf, Outcome)> = Vec::with_capacity(found.files.len());
    for group in found.files.chunks(rayon::current_num_threads().max(1)) {
        results.par_extend(group.par_iter().map(|p| {
            let r = measure_file(p, args.rate, !many);
            bar.inc(1);
            (p.clone(), r)
        }));
    }
    bar.finish_and_clear();

    let mut rows = Vec::new();
    let mut failures: Vec<(PathBuf, String)> = found.errors;
    let mut inputs: Vec<PathBuf> = found.files.clone();
    for (path, result) in results {
        match result {
            Ok((row, warnings, files)) => {
                inputs.extend(files);
                // Each warning names its file already (the header or the signal file it is about).
                for w in warnings {
                    to_stderr!("isoline: warning: {w}");
                }
                rows.push(row);
            }
            Err(e) => failures.push((path, format!("{e:#}"))),
        }
    }

    let as_array = many || args.paths.len() > 1 || args.paths.iter().any(|p| p.is_dir());
    // Each failure as one line; ReadError messages already start with the file name.
    let failed: Vec<String> = failures
        .iter()
        .map(|(path, e)| {
            let shown = path.display().to_string();
            if e.starts_with(&shown) { e.clone() } else { format!("{shown}: {e}") }
        })
        .collect();
    let not_measured = format!("{} of {} file(s) could not be measured:", failed.len(), failed.len() + rows.len());
    let text = match args.format {
        MeasureFormat::Json => output::to_json(&rows, as_array)? + "\n",
        MeasureFormat::Csv => output::to_csv(&rows),
        // The table for people lists the recordings it lacks, so a saved batch says so too (also on stderr).
        MeasureFormat::Table if !failed.is_empty() => format!(
            "{}\n{not_measured}\n{}\n\n{}\n",
            output::to_table(&rows),
            failed.iter().map(|f| format!("  {f}")).collect::<Vec<_>>().join("\n"),
            isoline_core::CAUTION
        ),
        MeasureFormat::Table => format!("{}\n{}\n", output::to_table(&rows), isoline_core::CAUTION),
    };
    // A single recording that could not be measured gives its error and no table.
    let single_failed = !as_array && rows.is_empty();
    match &args.out {
        _ if single_failed => {}
        Some(path) => {
            super::refuse_to_overwrite(path, &inputs)?;
            isoline_core::io::atomic::write_bytes(path, text.as_bytes())
                .with_context(|| format!("{}: cannot write", path.display()))?;
        }
        None => super::to_stdout(&text)?,
    }
    if args.format != MeasureFormat::Table {
        to_stderr!("isoline: {}", isoline_core::CAUTION);
    }
    if failures.is_empty() {
        return Ok(ExitCode::SUCCESS);
    }
    to_stderr!("isoline: {not_measured}");
    for f in &failed {
        to_stderr!("  {f}");
    }
    Ok(ExitCode::from(2))
}
