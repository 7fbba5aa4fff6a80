//! The page renderer: draws a recording on true-scale paper into an RGBA image and encodes it as PNG, with no
//! window and no GPU (tiny-skia for shapes, ab_glyph with the bundled DejaVu Sans for text).
//!
//! Geometry comes from [`crate::paper`], the same module the GUI's Sheet uses, so an exported page matches the
//! screen. Scale: 1 mm of paper = `dpi / 25.4` pixels (1 inch = 25.4 mm exactly, 1959 agreement).
//!
//! ```
//! use isoline_core::paper::{Layout, PageSpec};
//! use isoline_core::render::{RenderInput, render_page};
//! use isoline_core::recording::{Lead, Meta, Recording, StandardLead};
//! use isoline_core::units::Hertz;
//!
//! let recording = Recording {
//!     leads: vec![Lead { name: StandardLead::II.into(), samples: vec![0.0; 2500] }],
//!     sample_rate: Hertz::from_hz(500.0).unwrap(),
//!     start: None,
//!     meta: Meta::default(),
//!     annotations: vec![],
//! };
//! let spec = PageSpec { layout: Layout::Strip(StandardLead::II.into()), seconds: 5.0, ..PageSpec::default() };
//! let input = RenderInput::new(&recording, spec, 100.0);
//! let pixmap = render_page(&input).unwrap();
//! assert!(pixmap.width() > 500);
//! ```

mod canvas;
mod furniture;
mod grid;
mod ledger;
mod ledger_lines;
mod notes;
mod overlay;
mod page;
mod png;
mod tape;
mod text;
mod trace;

use thiserror::Error;

use crate::analysis::Span;
use crate::beat::MarkKind;
use crate::caliper::Caliper;
use crate::paper::{PageSpec, Scheme};
use crate::recording::Recording;

pub use self::furniture::header_lines;
pub use self::ledger_lines::{
    LEDGER_KEYS, LedgerValue, header_fields, ledger_lines, ledger_lines_from, ledger_notes, rhythm_field, signal_notes,
};
pub use self::png::{check_png_name, encode_png, write_png_atomic};
pub use self::tape::TapeEnvelope;
pub use self::trace::{Column, decimate_min_max};

/// The page's first header line for the recording in file `file_name`: the file name when the export may
/// identify the patient, else `Recording` and the first 8 digits of its signals' hash, which `sha256` gives
/// (see [`crate::review::signal_sha256`]; asked for only then, since it may read the whole recording again).
/// File names often carry a patient's name or number; the hash still tells recordings apart and matches the
/// recording's review file, which holds the whole hash.
///
/// # Errors
/// Whatever `sha256` returns.
pub fn page_title<E>(file_name: &str, identify: bool, sha256: impl FnOnce() -> Result<String, E>) -> Result<String, E> {
    if identify {
        return Ok(file_name.to_string());
    }
    let sha = sha256()?;
    Ok(format!("Recording {}", sha.get(..8).unwrap_or(&sha)))
}

/// Highest resolution accepted, dots per inch.
pub const MAX_DPI: f64 = 1200.0;
/// Largest image accepted, pixels (width × height).
pub const MAX_PIXELS: u64 = 100_000_000;

/// One line of the measurement box on an exported page.
#[derive(Debug, Clone, PartialEq, Eq, Default)]
pub struct LedgerLine {
    /// What was measured (`QTc Bazett`).
    pub label: String,
    /// Automatic value as text, if any.
    pub auto: Option<String>,
    /// Value set by the reader, if any.
    pub reviewed: Option<String>,
    /// Unit (`ms`, `bpm`, `°`).
    pub unit: String,
}

/// Everything one page shows. Independent of the review model: callers translate a review into this.
#[derive(Debug, Clone)]
pub struct RenderInput<'a> {
    /// The recording to draw: a whole recording, or a span of one (see [`RenderInput::of_span`]).
    pub recording: &'a Recording,
    /// Sample of the whole recording where `recording` starts (0 for a whole recording); the window's times
    /// stay those of the whole recording.
    pub first_sample: usize,
    /// Length of the whole recording, s: a long one gets the window's clock time in the header.
    pub recording_s: f64,
    /// Layout, lead order, speed, gain and time window.
    pub spec: PageSpec,
    /// Paper colours.
    pub scheme: Scheme,
    /// Resolution, dots per inch (1 mm = dpi / 25.4 px).
    pub dpi: f64,
    /// First header line: the recording's file name, or its de-identified name ([`page_title`]).
    pub title: String,
    /// Extra header fields shown as `name: value` (reader, stage, …).
    pub header: Vec<(String, String)>,
    /// Filter settings as text; `None` prints that the traces are unfiltered.
    pub filter_text: Option<String>,
    /// Calipers to draw with their readouts.
    pub calipers: Vec<Caliper>,
    /// Boundary marks: kind and recording time in s.
    pub marks: Vec<(MarkKind, f64)>,
    /// Lines of the measurement box (empty: no box).
    pub ledger: Vec<LedgerLine>,
    /// Notes printed under the measurement box, one per note (range notes with their sources); empty: none.
    pub notes: Vec<String>,
    /// Show the patient fields of `recording.meta`; otherwise only what [`crate::recording::Meta::deidentified`]
    /// keeps.
    pub identify: bool,
}

impl<'a> RenderInput<'a> {
    /// A plain page: Rose scheme, no header fields, calipers, marks or measurements, de-identified.
    #[must_use]
    pub fn new(recording: &'a Recording, spec: PageSpec, dpi: f64) -> Self {
        Self {
            recording,
            first_sample: 0,
            recording_s: recording.duration_s(),
            spec,
            scheme: Scheme::Rose,
            dpi,
            title: String::new(),
            header: Vec::new(),
            filter_text: None,
            calipers: Vec::new(),
            marks: Vec::new(),
            ledger: Vec::new(),
            notes: Vec::new(),
            identify: false,
        }
    }

    /// A plain page of a span of a recording `recording_s` seconds long (e.g. the filtered samples around the
    /// window, [`crate::analysis::Analysis::filtered_span`]), so a long recording is never filtered whole.
    #[must_use]
    pub fn of_span(span: &'a Span, recording_s: f64, spec: PageSpec, dpi: f64) -> Self {
        Self { first_sample: span.first, recording_s, ..Self::new(&span.recording, spec, dpi) }
    }
}

/// Why a page could not be drawn or written.
#[derive(Debug, Error)]
#[non_exhaustive]
pub enum RenderError {
    /// Resolution out of range.
    #[error("resolution {0} dpi is out of range (must be above 0 and at most 1200)")]
    Dpi(f64),
    /// Speed, gain or time window not usable.
    #[error("cannot lay out the page: {0}")]
    Spec(String),
    /// The page would be too large an image.
    #[error("page of {width} x {height} px is too large (limit 100 million pixels)")]
    TooLarge {
        /// Width, px.
        width: u64,
        /// Height, px.
        height: u64,
    },
    /// Nothing to draw.
    #[error("the recording has no leads")]
    NoLeads,
    /// The bundled font could not be read.
    #[error("bundled font unreadable")]
    Font,
    /// PNG encoding failed.
    #[error("PNG encoding failed: {0}")]
    Encode(String),
    /// The output file is not named `.png`: Isoline writes PNG only, and a page under another extension would
    /// open as the wrong type, or not at all.
    #[error("{}: a page is written as PNG only; name the file .png", .0.display())]
    NotPng(std::path::PathBuf),
    /// Writing the file failed.
    #[error("cannot write {path}: {cause}")]
    Write {
        /// Target path.
        path: std::path::PathBuf,
        /// Cause (shown in the message, so not chained again as a source: it was printed twice).
        cause: std::io::Error,
    },
}

/// Draws one page.
///
/// # Errors
/// [`RenderError::Dpi`] for a resolution ≤ 0 or above [`MAX_DPI`], [`RenderError::Spec`] for a non-positive or
/// non-finite speed, gain or window, [`RenderError::TooLarge`] above [`MAX_PIXELS`], [`RenderError::NoLeads`].
pub fn render_page(input: &RenderInput) -> Result<tiny_skia::Pixmap, RenderError> {
    page::render(input)
}
