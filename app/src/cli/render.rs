//! `isoline render FILE [--review R] --out PNG [--layout L] [--speed 25] [--gain 10] [--dpi 300] [--start S]
//! [--seconds N] [--identify] [--scheme rose|graphite|mono] [--order standard|cabrera]`.

use std::path::PathBuf;
use std::process::ExitCode;

use anyhow::{Context, bail};
use isoline_core::measure::{self, Measurements};
use isoline_core::paper::{Layout, LeadOrder, PageSpec, Paper, Scheme};
use isoline_core::recording::Recording;
use isoline_core::render::{self, LedgerLine, RenderInput};
use isoline_core::review::{self, MarkOn, Review};
use isoline_core::{MarkKind, delineate, detect, filter, io};

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

/// Measurement keys shown in the box, in order.
const LEDGER_KEYS: [&str; 11] = [
    "heart_rate_bpm",
    "rr_ms",
    "p_duration_ms",
    "pr_ms",
    "qrs_ms",
    "qt_ms",
    "qtc_bazett_ms",
    "qtc_fridericia_ms",
    "axis_p_deg",
    "axis_qrs_deg",
    "axis_t_deg",
];

/// Runs the command.
pub fn run(args: &Args) -> anyhow::Result<ExitCode> {
    let file = args.file.display();
    let layout: Layout = args.layout.parse().with_context(|| format!("{file}: --layout"))?;
    let scheme: Scheme = args.scheme.parse().with_context(|| format!("{file}: --scheme"))?;
    let order: LeadOrder = args.order.parse().with_context(|| format!("{file}: --order"))?;
    for (name, v) in [("--speed", args.speed), ("--gain", args.gain), ("--seconds", args.seconds)] {
        if !(v.is_finite() && v > 0.0) {
            bail!("{file}: {name} must be a positive number, got {v}");
        }
    }
    let review = match &args.review {
        Some(r) => {
            Some(review::load_for(r, &args.file).with_context(|| format!("{}: cannot use this review", r.display()))?)
        }
        None => None,
    };
    let opened = io::open(&args.file, &io::OpenOptions { csv_rate_hz: args.rate })?;
    for w in &opened.warnings {
        eprintln!("isoline: warning: {w}");
    }
    let raw = &opened.recording;
    if raw.leads.is_empty() || raw.is_empty() {
        bail!("{file}: the recording has no samples");
    }
    if !(args.start.is_finite() && args.start >= 0.0 && args.start < raw.duration_s()) {
        bail!("{file}: --start {} s is outside the recording (0 to {:.3} s)", args.start, raw.duration_s());
    }
    // The page shows what was measured: the filtered recording, with the filters named in the header.
    let filtered = filter::apply(raw, &filter::FilterSettings::default());
    let measured = analyze(&filtered.recording);
    let spec = PageSpec {
        layout,
        order,
        paper: Paper { speed_mm_per_s: args.speed, gain_mm_per_mv: args.gain },
        start_s: args.start,
        seconds: args.seconds,
    };
    let title = args.file.file_name().map_or_else(|| file.to_string(), |n| n.to_string_lossy().into_owned());
    let mut input = RenderInput {
        scheme,
        title,
        identify: args.identify,
        filter_text: Some(filtered.description.clone()),
        ledger: ledger(&measured, review.as_ref()),
        ..RenderInput::new(&filtered.recording, spec, args.dpi)
    };
    if let Some(r) = &review {
        input.header = vec![("Reader".into(), r.reader.clone()), ("Stage".into(), r.stage.as_str().into())];
        input.calipers.clone_from(&r.calipers);
        input.marks = marks(r);
    }
    let pixmap = render::render_page(&input).with_context(|| format!("{file}: cannot draw the page"))?;
    let bytes = render::encode_png(&pixmap, args.dpi).with_context(|| format!("{file}: cannot encode PNG"))?;
    render::write_png_atomic(&args.out, &bytes)?;
    eprintln!(
        "isoline: wrote {} ({} x {} px at {} dpi)",
        args.out.display(),
        pixmap.width(),
        pixmap.height(),
        args.dpi
    );
    Ok(ExitCode::SUCCESS)
}

/// Beats, wave boundaries, representative beat and measurements of a filtered recording (the same steps as
/// `core/src/analysis.rs`, which is not in the build yet).
fn analyze(rec: &Recording) -> Measurements {
    let mut beats = detect::detect_beats(rec);
    delineate::delineate_beats(rec, &mut beats);
    let rep = delineate::representative_beat(rec, &beats);
    let template =
        rep.as_ref().map(|r| measure::Template { leads: &r.leads, sample_rate: r.sample_rate, bounds: r.bounds });
    measure::measure(rec, &beats, template.as_ref())
}

/// Marks on beats of the recording; marks on the representative beat live on its own time axis and are not
/// drawn on the strip (their values are in the box).
fn marks(r: &Review) -> Vec<(MarkKind, f64)> {
    r.marks.iter().filter(|m| matches!(m.on, MarkOn::Beat(_))).map(|m| (m.kind, m.time_s)).collect()
}

/// A value as printed in the box, with a true minus sign.
fn format_value(v: f64, unit: &str) -> String {
    let s = match unit {
        "%" => format!("{v:.1}"),
        _ => format!("{v:.0}"),
    };
    if s.starts_with("-0") && s.trim_start_matches(['-', '0', '.']).is_empty() {
        return s[1..].to_string();
    }
    s.replacen('-', "\u{2212}", 1)
}

fn unit_text(unit: &str) -> String {
    match unit {
        "deg" => "\u{b0}".to_string(),
        "uV" => "\u{b5}V".to_string(),
        u => u.to_string(),
    }
}

/// The box: automatic values from this run (or the review's stored automatic value when this run has none),
/// and the reader's values from the review.
fn ledger(m: &Measurements, review: Option<&Review>) -> Vec<LedgerLine> {
    let values = m.values();
    LEDGER_KEYS
        .iter()
        .filter_map(|key| {
            let auto = values.iter().find(|v| v.key == *key);
            let stored = review.and_then(|r| r.measurement(key));
            let label = auto.map(|v| v.label.clone()).or_else(|| stored.map(|s| s.label.clone()))?;
            let unit = auto.map(|v| v.unit.to_string()).or_else(|| stored.map(|s| s.unit.clone())).unwrap_or_default();
            let auto_value = auto.and_then(|v| v.value).or_else(|| stored.and_then(|s| s.auto_value));
            Some(LedgerLine {
                label,
                auto: auto_value.map(|v| format_value(v, &unit)),
                reviewed: stored.and_then(|s| s.reviewed_value).map(|v| format_value(v, &unit)),
                unit: unit_text(&unit),
            })
        })
        .collect()
}
