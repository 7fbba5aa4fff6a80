//! `isoline render FILE [--review R] --out PNG [--layout L] [--speed 25] [--gain 10] [--dpi 300] [--start S]
//! [--seconds N] [--identify] [--scheme rose|graphite|mono] [--order standard|cabrera]`.

use std::path::PathBuf;
use std::process::ExitCode;

use anyhow::{Context, bail};
use isoline_core::paper::{Layout, LeadOrder, PageSpec, Paper, Scheme};
use isoline_core::render::{self, RenderInput};
use isoline_core::review::{self, MarkOn, Review};
use isoline_core::{MarkKind, analysis, filter, io};

/// Arguments of `isoline render`.
#[derive(Debug, clap::Args)]
pub struct Args {
    /// Recording: .hea (or WFDB record path without extension), .edf, .csv.
    pub file: PathBuf,
    /// Review whose calipers, marks, reader, stage and reviewed values to draw (.review.ron). Refused when it
    /// was made on a recording with different signal content (SHA-256).
    #[arg(long)]
    pub review: Option<PathBuf>,
    /// PNG to write (replaced atomically; nothing is left behind on error).
    #[arg(long)]
    pub out: PathBuf,
    /// Page layout: 3x4+1, 3x4+1:LEAD, 6x2, 12x1 or strip:LEAD.
    #[arg(long, default_value = "3x4+1")]
    pub layout: String,
    /// Paper speed, mm/s.
    #[arg(long, allow_negative_numbers = true, default_value_t = 25.0)]
    pub speed: f64,
    /// Gain, mm/mV.
    #[arg(long, allow_negative_numbers = true, default_value_t = 10.0)]
    pub gain: f64,
    /// Resolution, dots per inch (at most 1200, and at most 100 million pixels on the page: the default 10-s
    /// 12-lead page up to about 1100 dpi).
    #[arg(long, allow_negative_numbers = true, default_value_t = 300.0)]
    pub dpi: f64,
    /// Start of the window, s from the start of the recording.
    #[arg(long, allow_negative_numbers = true, default_value_t = 0.0)]
    pub start: f64,
    /// Length of the window, s.
    #[arg(long, allow_negative_numbers = true, default_value_t = 10.0)]
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
    let layout: Layout = args.layout.parse().with_context(|| format!("{file}: --layout"))?;
    let scheme: Scheme = args.scheme.parse().with_context(|| format!("{file}: --scheme"))?;
    let order: LeadOrder = args.order.parse().with_context(|| format!("{file}: --order"))?;
    render::check_png_name(&args.out).context("--out")?;
    for (name, v) in [("--speed", args.speed), ("--gain", args.gain), ("--seconds", args.seconds)] {
        if !(v.is_finite() && v > 0.0) {
            bail!("{file}: {name} must be a positive number, got {v}");
        }
    }
    let review = match &args.review {
        // The review's name once: a reading error names it already, a mismatch does not.
        Some(r) => Some(review::load_for(r, &args.file).map_err(|e| {
            let (msg, shown) = (e.to_string(), r.display().to_string());
            if msg.starts_with(&shown) {
                anyhow::anyhow!("cannot use this review: {msg}")
            } else {
                anyhow::anyhow!("{shown}: cannot use this review: {msg}")
            }
        })?),
        None => None,
    };
    let opened = io::open(&args.file, &io::OpenOptions { csv_rate_hz: args.rate })?;
    for w in &opened.warnings {
        to_stderr!("isoline: warning: {w}");
    }
    let raw = &opened.recording;
    super::refuse_empty(raw, &args.file)?;
    if let (Some(r), Some(path)) = (&review, &args.review) {
        // A review whose parts contradict each other (edited by hand) is drawn, with what it contradicts said.
        for what in r.inconsistencies() {
            to_stderr!("isoline: warning: {}: {what}", path.display());
        }
        // The same samples under another header (rate, leads) would put the review's marks and calipers elsewhere.
        if let Some(why) = r.recording.differs_from(raw) {
            bail!("{}: cannot use this review: {why}", path.display());
        }
    }
    if !(args.start.is_finite() && args.start >= 0.0 && args.start < raw.duration_s()) {
        // A huge or tiny start is written short (1e300 and -1e-300, not 300 digits).
        let plain = args.start == 0.0 || (1e-3..1e6).contains(&args.start.abs());
        let start = if plain { args.start.to_string() } else { format!("{:e}", args.start) };
        bail!("{file}: --start {start} s is outside the recording (0 to {:.3} s)", raw.duration_s());
    }
    // A lead the reader named in --layout must be there: the page would otherwise show the first lead under a
    // header that names the one asked for. (The default rhythm lead II falls back to the first lead, labelled.)
    if args.layout.contains(':')
        && let Layout::Strip(lead) | Layout::ThreeByFourPlusOne { rhythm: lead } = &layout
        && raw.lead_index(lead).is_none()
    {
        let have: Vec<String> = raw.leads.iter().map(|l| l.name.to_string()).collect();
        bail!("{file}: --layout {}: the recording has no lead {lead} (it has {})", args.layout, have.join(", "));
    }
    // The page shows what was measured: the filtered recording, with the filters named in the header.
    let analysis = super::with_window_bar(raw, true, |on_window| {
        analysis::analyze_reporting(raw, &filter::FilterSettings::default(), on_window)
    });
    let spec = PageSpec {
        layout,
        order,
        paper: Paper { speed_mm_per_s: args.speed, gain_mm_per_mv: args.gain },
        start_s: args.start,
        seconds: args.seconds,
    };
    let (a, b) = spec.sample_range(raw.sample_rate.hz());
    let span = analysis.filtered_span(raw, a, b);
    let name = args.file.file_name().map_or_else(|| file.to_string(), |n| n.to_string_lossy().into_owned());
    let title = render::page_title(&name, args.identify, || match &review {
        Some(r) => Ok(r.recording.sha256.to_ascii_lowercase()),
        None => review::signal_sha256(&args.file),
    })?;
    let mut input = RenderInput {
        scheme,
        title,
        identify: args.identify,
        filter_text: Some(analysis.filters.description.clone()),
        ledger: render::ledger_lines(&analysis.measurements, review.as_ref()),
        notes: render::signal_notes(raw)
            .into_iter()
            .chain(render::ledger_notes(&analysis.measurements, review.as_ref()))
            .collect(),
        ..RenderInput::of_span(&span, raw.duration_s(), spec, args.dpi)
    };
    if let Some(r) = &review {
        input.header = render::header_fields(Some(&r.reader), r.stage);
        input.calipers.clone_from(&r.calipers);
        input.marks = marks(r);
    }
    input.header.extend(render::rhythm_field(&analysis.measurements));
    let pixmap = render::render_page(&input).with_context(|| format!("{file}: cannot draw the page"))?;
    let bytes = render::encode_png(&pixmap, args.dpi).with_context(|| format!("{file}: cannot encode PNG"))?;
    render::write_png_atomic(&args.out, &bytes)?;
    to_stderr!(
        "isoline: wrote {} ({} x {} px at {} dpi)",
        args.out.display(),
        pixmap.width(),
        pixmap.height(),
        args.dpi
    );
    Ok(ExitCode::SUCCESS)
}

/// Marks on beats of the recording; marks on the representative beat live on its own time axis and are not
/// drawn on the strip (their values are in the box).
fn marks(r: &Review) -> Vec<(MarkKind, f64)> {
    r.marks.iter().filter(|m| matches!(m.on, MarkOn::Beat(_))).map(|m| (m.kind, m.time_s)).collect()
}
