//! The workstation's state, in three kinds that never mix:
//!
//! - [`Document`]: the reader's work (calipers, moved marks, reviewed values). Saved with the review; every change
//!   to it goes through a [`Command`](super::command::Command) and can be undone.
//! - [`Loaded`]: the open recording and data derived from it (Tape envelope, beats, representative beat,
//!   automatic marks). Recomputed when its inputs change, never saved.
//! - [`UiState`]: throwaway interaction state (selection, hover, open overlays, last error).

use std::collections::BTreeMap;
use std::path::PathBuf;
use std::sync::Arc;

use isoline_core::beat::{Beat, Boundaries, MarkKind};
use isoline_core::caliper::{Caliper, CaliperKind};
use isoline_core::io::Format;
use isoline_core::measure::hrv;
use isoline_core::paper::{Layout, LeadOrder, PageSpec, Paper, Scheme};
use isoline_core::recording::Recording;

use isoline_core::analysis::{Analysis, Span};
use isoline_core::delineate::RepresentativeBeat;

use isoline_core::render::TapeEnvelope;

/// Where a value or mark came from (see the vocabulary: `auto`, `moved`, `placed`): the review's own enum.
pub use isoline_core::review::Origin;

/// The reader's work on one recording: what a review saves and what undo/redo restores.
#[derive(Debug, Clone, Default, PartialEq)]
pub struct Document {
    /// Calipers on the Sheet.
    pub calipers: Vec<Caliper>,
    /// Next caliper id to hand out.
    pub next_caliper_id: u32,
    /// Marks on the representative beat that the reader moved or placed, as sample indices on that beat's axis.
    /// A kind not present here uses the automatic mark.
    pub marks: BTreeMap<MarkKind, usize>,
    /// Values the reader typed or took from a caliper, by Ledger key (`qt_ms`, …), in the row's unit.
    pub reviewed: BTreeMap<String, f64>,
    /// Why the reader gave a value, by Ledger key, when they said (typed after the value: `412 T end hidden by
    /// the next P wave`); saved with the value's history entry.
    pub reasons: BTreeMap<String, String>,
}

impl Document {
    /// The caliper with this id.
    #[must_use]
    pub fn caliper(&self, id: u32) -> Option<&Caliper> {
        self.calipers.iter().find(|c| c.id == id)
    }

    /// Mutable access to the caliper with this id.
    pub fn caliper_mut(&mut self, id: u32) -> Option<&mut Caliper> {
        self.calipers.iter_mut().find(|c| c.id == id)
    }

    /// Marks in effect on the representative beat: the reader's where present, else the automatic ones.
    #[must_use]
    pub fn effective_marks(&self, auto: &Boundaries) -> Boundaries {
        let mut b = *auto;
        for (&kind, &s) in &self.marks {
            b.set(kind, Some(s));
        }
        b
    }

    /// Origin of one mark given the automatic marks.
    #[must_use]
    pub fn mark_origin(&self, kind: MarkKind, auto: &Boundaries) -> Option<Origin> {
        match (self.marks.get(&kind), auto.get(kind)) {
            (Some(&s), Some(a)) if s == a => Some(Origin::Auto),
            (Some(_), Some(_)) => Some(Origin::Moved),
            (Some(_), None) => Some(Origin::Placed),
            (None, Some(_)) => Some(Origin::Auto),
            (None, None) => None,
        }
    }
}

/// The tool a click on the Sheet uses.
#[derive(Debug, Clone, Copy, Default, PartialEq, Eq, serde::Serialize, serde::Deserialize)]
pub enum Tool {
    /// Select and drag existing calipers.
    #[default]
    Pointer,
    /// A click places a time caliper.
    TimeCaliper,
    /// A click places a voltage caliper.
    VoltageCaliper,
    /// A click places a plumb line.
    PlumbLine,
}

impl Tool {
    /// Label on the toolbar.
    #[must_use]
    pub fn label(self) -> &'static str {
        match self {
            Self::Pointer => "Pointer",
            Self::TimeCaliper => "Time caliper",
            Self::VoltageCaliper => "Voltage caliper",
            Self::PlumbLine => "Plumb line",
        }
    }
}

/// How the Sheet is shown: remembered between runs, not part of the review, not undone.
#[derive(Debug, Clone, PartialEq, serde::Serialize, serde::Deserialize)]
#[serde(default)]
pub struct ViewSettings {
    /// Page layout.
    pub layout: Layout,
    /// Lead order.
    pub order: LeadOrder,
    /// Speed and gain.
    pub paper: Paper,
    /// Paper colour scheme.
    pub scheme: Scheme,
    /// Dark window chrome.
    pub dark: bool,
    /// Snap caliper legs to detected beats and boundaries.
    pub snap: bool,
    /// Show the filtered signal (when filters are available).
    pub filters: bool,
}

impl Default for ViewSettings {
    fn default() -> Self {
        Self {
            layout: Layout::default(),
            order: LeadOrder::Standard,
            paper: Paper::STANDARD,
            scheme: Scheme::Rose,
            dark: false,
            snap: true,
            filters: true,
        }
    }
}

/// The open recording and everything derived from it.
#[derive(Debug, Clone)]
pub struct Loaded {
    /// File the user opened.
    pub path: PathBuf,
    /// Format it was read as.
    pub format: Format,
    /// The recording as read (shared: views read it every frame).
    pub recording: Arc<Recording>,
    /// Filters, beats, representative beat and automatic measurements (computed on the filtered copy);
    /// `None` while a long recording is still being analysed in the background.
    pub analysis: Option<Analysis>,
    /// What the reader noticed while reading.
    pub warnings: Vec<String>,
    /// Stretches where no lead has a valid sample (see [`isoline_core::Recording::gaps`]).
    pub gaps: Vec<std::ops::Range<usize>>,
    /// Whole-recording min/max envelope of the Tape lead.
    pub tape: TapeEnvelope,
    /// Beats for the Tape's rate trend and caliper snapping: the detector's, or the file's annotated beats
    /// when the detector found none.
    pub beats: Vec<Beat>,
    /// Where the beats came from, for the status bar.
    pub beats_source: String,
    /// Heart-rate trend points `(s, bpm)` from `beats`, in runs of consecutive dominant beats.
    pub trend: Vec<Vec<[f64; 2]>>,
    /// Median RR of consecutive dominant beats, ms.
    pub median_rr_ms: Option<f64>,
    /// The filtered samples around the Sheet's window of a long recording, whose analysis keeps no whole
    /// filtered copy (see [`Loaded::prepare_shown`]).
    pub shown_span: Option<Span>,
}

/// A finished analysis with the Tape envelope of its filtered signal, both computed off the UI thread for a
/// long recording.
#[derive(Debug, Clone)]
pub struct Analysed {
    /// Filters, beats, representative beat and automatic measurements.
    pub analysis: Analysis,
    /// The Tape lead's envelope, filtered.
    pub tape: TapeEnvelope,
}

impl Analysed {
    /// Analyses `recording` ([`super::analyze`]) and takes the envelope of its lead `tape_lead`, filtered.
    #[must_use]
    pub fn of(recording: &Recording, tape_lead: usize) -> Self {
        let analysis = super::analyze(recording);
        let tape = match &analysis.filtered {
            Some(whole) => TapeEnvelope::new(whole, tape_lead),
            None => TapeEnvelope::from_spans(recording, tape_lead, |a, b| analysis.filtered_span(recording, a, b)),
        };
        Self { analysis, tape }
    }
}

/// The samples the Sheet draws: `recording` holds the whole recording's samples from sample `first` on.
#[derive(Debug, Clone, Copy)]
pub struct Shown<'a> {
    /// The samples (the whole recording, or a span of it).
    pub recording: &'a Recording,
    /// Sample of the whole recording where `recording` starts.
    pub first: usize,
}

impl Loaded {
    /// Uses a finished analysis: detected beats (the file's annotated beats stay when none were detected), the
    /// Tape envelope of the filtered signal, the rate trend.
    pub fn attach(&mut self, analysed: Analysed) {
        let Analysed { analysis, tape } = analysed;
        if !analysis.beats.is_empty() {
            self.beats.clone_from(&analysis.beats);
            self.beats_source = format!("{} beats detected", analysis.beats.len());
        } else if self.beats.is_empty() {
            self.beats_source = "no beats found".to_string();
        } else {
            self.beats_source = format!("{} annotated beats (none detected)", self.beats.len());
        }
        self.tape = tape;
        self.shown_span = None;
        self.analysis = Some(analysis);
        self.derive_rates();
    }

    /// Recomputes the rate trend and median RR from `beats`.
    pub fn derive_rates(&mut self) {
        let fs = self.recording.sample_rate;
        self.trend = hrv::rate_trend(&self.beats, fs, &self.gaps);
        self.median_rr_ms = hrv::median_rr_ms(&self.beats, fs, &self.gaps);
    }

    /// The representative beat, if there were enough beats.
    #[must_use]
    pub fn representative(&self) -> Option<&RepresentativeBeat> {
        self.analysis.as_ref().and_then(|a| a.representative.as_ref())
    }

    /// Automatic marks on the representative beat.
    #[must_use]
    pub fn auto_marks(&self) -> Boundaries {
        self.representative().map(|r| r.bounds).unwrap_or_default()
    }

    /// Makes sure the filtered samples of the window `spec` shows are at hand for [`Loaded::shown`]: a long
    /// recording's are filtered around the window, with a window's length to spare on each side so that
    /// scrolling filters again only now and then.
    pub fn prepare_shown(&mut self, spec: &PageSpec) {
        let Some(analysis) = self.analysis.as_ref().filter(|a| a.filtered.is_none()) else { return };
        let (a, b) = spec.sample_range(self.recording.sample_rate.hz());
        let b = b.min(self.recording.len());
        let held = |s: &Span| s.first <= a && b <= s.first + s.recording.len();
        if self.shown_span.as_ref().is_some_and(held) {
            return;
        }
        let spare = b.saturating_sub(a);
        self.shown_span = Some(analysis.filtered_span(&self.recording, a.saturating_sub(spare), b + spare));
    }

    /// The signal the Sheet shows: filtered or as read. A long recording's filtered signal is the span
    /// [`Loaded::prepare_shown`] made (the recording as read until it has run).
    #[must_use]
    pub fn shown(&self, filters: bool) -> Shown<'_> {
        let whole = |recording| Shown { recording, first: 0 };
        match (&self.analysis, filters) {
            (Some(a), true) => match (&a.filtered, &self.shown_span) {
                (Some(filtered), _) => whole(filtered),
                (None, Some(span)) => Shown { recording: &span.recording, first: span.first },
                (None, None) => whole(&self.recording),
            },
            _ => whole(&self.recording),
        }
    }
}

/// What the selected caliper part is.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Part {
    /// First leg (time) or first level (voltage), or the plumb line itself.
    First,
    /// Second leg or level.
    Second,
}

/// Throwaway interaction state.
#[derive(Debug, Clone, Default)]
pub struct UiState {
    /// Selected caliper and part (the target of arrow-key nudges).
    pub selected: Option<(u32, Part)>,
    /// Caliper part being dragged on the Sheet, with the row and cell the drag started in.
    pub drag: Option<(u32, Part, usize, usize)>,
    /// Cursor position on the Sheet: recording time (s) and amplitude (µV) on the lead under it.
    pub cursor: Option<(f64, f64)>,
    /// Beat lens: the one lead shown (`None`: every lead overlaid).
    pub lens_lead: Option<usize>,
    /// Beat lens: the mark a click places.
    pub lens_active: Option<MarkKind>,
    /// Beat lens: the mark being dragged.
    pub lens_drag: Option<MarkKind>,
    /// Ledger row whose reviewed value is being typed, with the text so far.
    pub ledger_edit: Option<(String, String)>,
    /// Help overlay open.
    pub help_open: bool,
    /// Ruler calibration window open.
    pub ruler_open: bool,
    /// Width of the on-screen ruler bar in points while calibrating.
    pub ruler_bar_points: f32,
    /// Last error, shown in a banner until dismissed.
    pub error: Option<String>,
    /// CPU time of the last frame's `ui`, ms.
    pub last_frame_ms: f64,
    /// Geometry of the Sheet as drawn in the last frame (for hit tests from outside, e.g. UI tests).
    pub sheet: Option<super::sheet::SheetGeometry>,
    /// Tape envelope on screen, last frame: (centre y, x at time 0, x at the recording's end).
    pub tape: Option<(f32, f32, f32)>,
    /// Screen rectangle of the Beat lens plot area and its time axis, from the last frame.
    pub lens: Option<super::beat_lens::LensGeometry>,
}

/// Convenience: a new caliper of a kind.
#[must_use]
pub fn new_caliper(id: u32, kind: CaliperKind, lead: Option<String>) -> Caliper {
    Caliper { id, kind, lead, locked: false, march: false }
}
