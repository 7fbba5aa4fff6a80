//! `isoline info FILE [--format text|json]`: format, leads, sample rate, duration and annotation count. Reading
//! the whole recording checks that the signal data holds what the header promises; what the reader accepted
//! with a doubt is printed as a warning on stderr.

use std::path::PathBuf;
use std::process::ExitCode;

use isoline_core::io;

/// Output format of `info`.
#[derive(Debug, Clone, Copy, Default, clap::ValueEnum)]
pub enum InfoFormat {
    /// Lines for people.
    #[default]
    Text,
    /// One JSON object.
    Json,
}

/// Arguments of `isoline info`.
#[derive(Debug, clap::Args)]
pub struct Args {
    /// Recording: .hea (or WFDB record path without extension), .edf, .csv.
    pub file: PathBuf,
    /// Output format.
    #[arg(long, value_enum, default_value_t)]
    pub format: InfoFormat,
    /// Sampling rate for a CSV file without a time_s column.
    #[arg(long)]
    pub rate: Option<f64>,
}

/// Runs the command.
pub fn run(args: &Args) -> anyhow::Result<ExitCode> {
    let opened = io::open(&args.file, &io::OpenOptions { csv_rate_hz: args.rate })?;
    for w in &opened.warnings {
        to_stderr!("isoline: warning: {w}");
    }
    let r = &opened.recording;
    let leads: Vec<String> = r.leads.iter().map(|l| l.name.to_string()).collect();
    let text = match args.format {
        InfoFormat::Json => {
            let v = serde_json::json!({
                "file": args.file.display().to_string(),
                "format": opened.format.as_str(),
                "sample_rate_hz": r.sample_rate.hz(),
                "samples": r.len(),
                "duration_s": r.duration_s(),
                "leads": leads,
                "annotations": r.annotations.len(),
            });
            serde_json::to_string_pretty(&v)? + "\n"
        }
        InfoFormat::Text => format!(
            "file:         {}\nformat:       {}\nsample rate:  {} Hz\nsamples:      {} per lead\nduration:     {:.3} s\n\
             leads:        {} ({})\nannotations:  {}\n",
            args.file.display(),
            opened.format,
            r.sample_rate.hz(),
            r.len(),
            r.duration_s(),
            leads.len(),
            leads.join(", "),
            r.annotations.len()
        ),
    };
    super::to_stdout(&text)?;
    Ok(ExitCode::SUCCESS)
}
