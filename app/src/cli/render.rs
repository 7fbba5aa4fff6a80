//! `isoline render FILE [--review R] --out PNG [--layout L] [--speed 25] [--gain 10] [--dpi 300] [--start S]
//! [--seconds N] [--identify] [--scheme rose|graphite|mono] [--order standard|cabrera]`.

use std::path::PathBuf;
use std::process::ExitCode;

use anyhow::{Context, bail};
use isoline_core::io;
use isoline_core::paper::{LeadOrder, Layout, PageSpec, Paper, Scheme};
use isoline_core::render::{self, RenderInput};

/// Arguments of `isoline render`.
#[derive(Debug, clap::Args)]
pub struct Args {
    /// Recording: .hea (or WFDB record path without extension), .edf, .csv.
    pub file: PathBuf,
    /// Review whose calipers, marks and values to draw (.review.ron).
    #[arg(long)]
    pub review: Option<PathBuf>,
    /// PNG to write (replaced atomically; nothing is left behind on error).
    #[arg(long)]
    pub out: PathBuf,
    /// Page layout: 3x4+1, 3x4+1:LEAD, 6x2, 12x1 or strip:LEAD.
    #[arg(long, default_value = "3x4+1")]
    pub layout: String,
    /// Paper speed, mm/s.
    #[arg(long, default_value_t = 25.0)]
    pub speed: f64,
    /// Gain, mm/mV.
    #[arg(long, default_value_t = 10.0)]
    pub gain: f64,
    /// Resolution, dots per inch (at most 1200).
    #[arg(long, default_value_t = 300.0)]
    pub dpi: f64,
    /// Start of the window, s from the start of the recording.
    #[arg(long, default_value_t = 0.0)]
    pub start: f64,
    /// Length of the window, s.
    #[arg(long, default_value_t = 10.0)]
    pub seconds: f64,
    /// Print the patient fields (the page is de-identified otherwise).
    #[arg(long)]
    pub identify: bool,
    /// Paper colours: rose, graphite or mono.
    #[arg(long, default_value = "rose")]
    pub scheme: String,
    /// Lead order: standard or cabrera.
    #[arg(long, default_value = "standard")]
    pub order: String,
    /// Sampling rate for a CSV file without a time_s column.
    #[arg(long)]
    pub rate: Option<f64>,
}

/// Runs the command.
pub fn run(args: &Args) -> anyhow::Result<ExitCode> {
    let file = args.file.display();
    if let Some(r) = &args.review {
        bail!("{}: --review is not available yet (the review model has not landed); render without it", r.display());
    }
    let layout: Layout = args.layout.parse().with_context(|| format!("{file}: --layout"))?;
    let scheme: Scheme = args.scheme.parse().with_context(|| format!("{file}: --scheme"))?;
    let order: LeadOrder = args.order.parse().with_context(|| format!("{file}: --order"))?;
    for (name, v) in [("--speed", args.speed), ("--gain", args.gain), ("--seconds", args.seconds)] {
        if !(v.is_finite() && v > 0.0) {
            bail!("{file}: {name} must be a positive number, got {v}");
        }
    }
    let opened = io::open(&args.file, &io::OpenOptions { csv_rate_hz: args.rate })?;
    for w in &opened.warnings {
        eprintln!("isoline: warning: {w}");
    }
    let rec = &opened.recording;
    if !(args.start.is_finite() && args.start >= 0.0 && args.start < rec.duration_s()) {
        bail!("{file}: --start {} s is outside the recording (0 to {:.3} s)", args.start, rec.duration_s());
    }
    let spec = PageSpec {
        layout,
        order,
        paper: Paper { speed_mm_per_s: args.speed, gain_mm_per_mv: args.gain },
        start_s: args.start,
        seconds: args.seconds,
    };
    let title = args.file.file_name().map_or_else(|| file.to_string(), |n| n.to_string_lossy().into_owned());
    let input = RenderInput { scheme, title, identify: args.identify, ..RenderInput::new(rec, spec, args.dpi) };
    let pixmap = render::render_page(&input).with_context(|| format!("{file}: cannot draw the page"))?;
    let bytes = render::encode_png(&pixmap, args.dpi).with_context(|| format!("{file}: cannot encode PNG"))?;
    render::write_png_atomic(&args.out, &bytes)?;
    eprintln!("isoline: wrote {} ({} x {} px at {} dpi)", args.out.display(), pixmap.width(), pixmap.height(), args.dpi);
    Ok(ExitCode::SUCCESS)
}
