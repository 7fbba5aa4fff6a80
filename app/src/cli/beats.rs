//! `isoline beats FILE [--format csv|json]`: one row per detected beat with its wave boundaries.

use std::fmt::Write as _;
use std::path::PathBuf;
use std::process::ExitCode;

use isoline_core::{analysis, delineate, detect, filter, io};

/// Output format of `beats`.
#[derive(Debug, Clone, Copy, Default, clap::ValueEnum)]
pub enum BeatsFormat {
    /// `sample,time_s,kind,rr_ms,p_on,p_end,qrs_on,qrs_end,t_end` (empty where absent).
    #[default]
    Csv,
    /// One JSON object: file, filters, and the beats (null where absent).
    Json,
}

/// Arguments of `isoline beats`.
#[derive(Debug, clap::Args)]
pub struct Args {
    /// Recording: .hea (or WFDB record path without extension), .edf, .csv.
    pub file: PathBuf,
    /// Output format.
    #[arg(long, value_enum, default_value_t)]
    pub format: BeatsFormat,
    /// Sampling rate for a CSV file without a time_s column.
    #[arg(long)]
    pub rate: Option<f64>,
}

/// Runs the command: default filters (baseline removal, automatic mains notch), detection, delineation.
pub fn run(args: &Args) -> anyhow::Result<ExitCode> {
    let opened = io::open(&args.file, &io::OpenOptions { csv_rate_hz: args.rate })?;
    for w in &opened.warnings {
        to_stderr!("isoline: warning: {w}");
    }
    let raw = &opened.recording;
    super::refuse_empty(raw, &args.file)?;
    let fs = raw.sample_rate;
    // No RR interval spans a stretch where nothing was recorded.
    let gaps = raw.gaps();
    let settings = filter::FilterSettings::default();
    let (beats, filters) = if raw.duration_s() > analysis::LONG_RECORDING_S {
        // A long recording window by window: memory stays near the recording's own size.
        super::with_window_bar(raw, true, |on_window| {
            analysis::beats_in_windows_reporting(raw, &settings, analysis::WINDOW_S, on_window)
        })
    } else {
        let filtered = filter::apply(raw, &settings);
        // Only the filtered copy is needed from here on.
        drop(opened);
        let mut beats = detect::detect_beats(&filtered.recording);
        delineate::delineate_beats(&filtered.recording, &mut beats);
        (beats, filtered.description)
    };
    let rr = detect::rr_ms(&beats, fs, &gaps);
    let mut out = String::new();
    match args.format {
        BeatsFormat::Csv => {
            // The table stays plain CSV for other programs; the caution goes beside it, on stderr.
            to_stderr!("isoline: {}", isoline_core::CAUTION);
            out.push_str("sample,time_s,kind,rr_ms,p_on,p_end,qrs_on,qrs_end,t_end\n");
            let opt = |v: Option<usize>| v.map_or(String::new(), |x| x.to_string());
            for (b, rr) in beats.iter().zip(&rr) {
                let _ = writeln!(
                    out,
                    "{},{:.4},{},{},{},{},{},{},{}",
                    b.r,
                    fs.seconds_from_sample(b.r as f64),
                    b.kind.as_str(),
                    rr.map_or(String::new(), |v| format!("{v:.1}")),
                    opt(b.bounds.p_on),
                    opt(b.bounds.p_end),
                    opt(b.bounds.qrs_on),
                    opt(b.bounds.qrs_end),
                    opt(b.bounds.t_end),
                );
            }
        }
        BeatsFormat::Json => {
            let rows: Vec<serde_json::Value> = beats
                .iter()
                .zip(&rr)
                .map(|(b, rr)| {
                    serde_json::json!({
                        "sample": b.r,
                        "time_s": fs.seconds_from_sample(b.r as f64),
                        "kind": b.kind.as_str(),
                        "rr_ms": rr,
                        "p_on": b.bounds.p_on,
                        "p_end": b.bounds.p_end,
                        "qrs_on": b.bounds.qrs_on,
                        "qrs_end": b.bounds.qrs_end,
                        "t_end": b.bounds.t_end,
                    })
                })
                .collect();
            let v = serde_json::json!({
                "file": args.file.display().to_string(),
                "sample_rate_hz": fs.hz(),
                "filters": filters,
                "caution": isoline_core::CAUTION,
                "beats": rows,
            });
            out = serde_json::to_string_pretty(&v)?;
            out.push('\n');
        }
    }
    super::to_stdout(&out)?;
    Ok(ExitCode::SUCCESS)
}
