//! Pages: rows of cells, each one lead over a time window, laid out in mm.

use super::{CALIBRATION_PULSE_S, Layout, LeadOrder, MAJOR_MM, Paper};
use crate::recording::{LeadName, Recording};

/// Fixed page furniture, in mm.
pub mod margins {
    /// Left margin before the calibration pulse.
    pub const LEFT_MM: f64 = 5.0;
    /// Right margin after the traces.
    pub const RIGHT_MM: f64 = 5.0;
    /// Band at the top for the header text.
    pub const HEADER_MM: f64 = 15.0;
    /// Band at the bottom for the caution footer.
    pub const FOOTER_MM: f64 = 10.0;
    /// Space for the calibration pulse at the start of each row (pulse plus gaps), at any speed.
    pub const CALIBRATION_MM: f64 = 10.0;
    /// Smallest row height, mm.
    pub const MIN_ROW_MM: f64 = 20.0;
}

/// One lead drawn over a time window, in a rectangle of the page.
#[derive(Debug, Clone, PartialEq)]
pub struct Cell {
    /// Index of the lead in `Recording::leads`.
    pub lead: usize,
    /// Label to print (`II`, `−aVR`).
    pub label: String,
    /// Whether the trace is drawn upside down (−aVR in the Cabrera sequence).
    pub inverted: bool,
    /// Left edge, paper mm.
    pub x_mm: f64,
    /// Width, paper mm.
    pub width_mm: f64,
    /// Recording time at the left edge, s.
    pub t0_s: f64,
    /// Recording time at the right edge, s.
    pub t1_s: f64,
}

/// One row of cells sharing a baseline.
#[derive(Debug, Clone, PartialEq)]
pub struct Row {
    /// Top of the row's band, paper mm.
    pub top_mm: f64,
    /// Height of the band, paper mm.
    pub height_mm: f64,
    /// Baseline (0 µV) of every trace in the row, paper mm.
    pub baseline_mm: f64,
    /// Left edge of the calibration pulse, paper mm.
    pub calibration_x_mm: f64,
    /// The row's cells, left to right.
    pub cells: Vec<Cell>,
}

/// A whole page: its size and rows, computed from layout, paper and recording.
#[derive(Debug, Clone, PartialEq)]
pub struct Page {
    /// Page width, mm.
    pub width_mm: f64,
    /// Page height, mm.
    pub height_mm: f64,
    /// Paper speed and gain.
    pub paper: Paper,
    /// Rows from top to bottom.
    pub rows: Vec<Row>,
}

/// What to lay out: the window of the recording and how to arrange it.
#[derive(Debug, Clone, PartialEq)]
pub struct PageSpec {
    /// Layout shape.
    pub layout: Layout,
    /// Lead order.
    pub order: LeadOrder,
    /// Speed and gain.
    pub paper: Paper,
    /// Start of the window, s.
    pub start_s: f64,
    /// Length of the window, s.
    pub seconds: f64,
}

impl Default for PageSpec {
    fn default() -> Self {
        Self {
            layout: Layout::default(),
            order: LeadOrder::Standard,
            paper: Paper::STANDARD,
            start_s: 0.0,
            seconds: 10.0,
        }
    }
}

/// Leads of a recording in page order: the twelve standard leads (as ordered) that are present, then any others
/// in file order. Each entry: (lead index, label, inverted).
#[must_use]
pub fn ordered_leads(recording: &Recording, order: LeadOrder) -> Vec<(usize, String, bool)> {
    let mut out = Vec::new();
    for (std_lead, inverted) in order.sequence() {
        if let Some(i) = recording.lead_index(&LeadName::Standard(std_lead)) {
            let label = if inverted { format!("\u{2212}{std_lead}") } else { std_lead.to_string() };
            out.push((i, label, inverted));
        }
    }
    for (i, lead) in recording.leads.iter().enumerate() {
        if lead.name.standard().is_none() {
            out.push((i, lead.name.to_string(), false));
        }
    }
    out
}

impl PageSpec {
    /// The samples the window shows at `fs` Hz, `a..b` (one more at each end, so a trace can start and end
    /// on the window's edges).
    #[must_use]
    pub fn sample_range(&self, fs: f64) -> (usize, usize) {
        let a = (self.start_s * fs).floor().max(0.0) as usize;
        let b = ((self.start_s + self.seconds) * fs).ceil().max(0.0) as usize;
        (a.saturating_sub(1), b.saturating_add(2))
    }

    /// Lays out the page for a recording. Leads missing from the recording leave their cells out; a rhythm or
    /// strip lead that is missing falls back to the first lead in file order (`recording.leads[0]`), shown upright.
    #[must_use]
    pub fn page(&self, recording: &Recording) -> Page {
        let paper = self.paper;
        let leads = ordered_leads(recording, self.order);
        let row_h = (3.0 * paper.gain_mm_per_mv).max(margins::MIN_ROW_MM);
        let trace_x = margins::LEFT_MM + calibration_space_mm(&paper);
        let total_w = paper.mm_from_seconds(self.seconds);
        let find = |name: &LeadName| -> Option<(usize, String, bool)> {
            recording
                .lead_index(name)
                .map(|i| (i, name.to_string(), false))
                .or_else(|| recording.leads.first().map(|l| (0, l.name.to_string(), false)))
        };
        // grid[r][c] = entry index into `leads`, for column-major layouts.
        let (n_rows, n_cols, rhythm): (usize, usize, Option<(usize, String, bool)>) = match &self.layout {
            Layout::ThreeByFourPlusOne { rhythm } => (3, 4, find(rhythm)),
            Layout::SixByTwo => (6, 2, None),
            Layout::TwelveByOne => (leads.len().max(1), 1, None),
            Layout::Strip(lead) => (0, 1, find(lead)),
        };
        // A recording with fewer leads than the grid has cells (e.g. 3 ambulatory leads in 3x4+1) uses only the
        // columns it fills, each widened, so no column is left empty.
        let n_cols = if n_rows > 0 { n_cols.min(leads.len().div_ceil(n_rows)).max(1) } else { n_cols };
        let col_w = total_w / n_cols as f64;
        let col_s = self.seconds / n_cols as f64;
        let mut rows = Vec::new();
        let mut top = margins::HEADER_MM;
        for r in 0..n_rows {
            let mut cells = Vec::new();
            for c in 0..n_cols {
                if let Some((lead, label, inverted)) = leads.get(c * n_rows + r).cloned() {
                    cells.push(Cell {
                        lead,
                        label,
                        inverted,
                        x_mm: trace_x + c as f64 * col_w,
                        width_mm: col_w,
                        t0_s: self.start_s + c as f64 * col_s,
                        t1_s: self.start_s + (c + 1) as f64 * col_s,
                    });
                }
            }
            if !cells.is_empty() {
                rows.push(row(top, row_h, cells));
                top += row_h;
            }
        }
        if let Some((lead, label, inverted)) = rhythm {
            let cell = Cell {
                lead,
                label,
                inverted,
                x_mm: trace_x,
                width_mm: total_w,
                t0_s: self.start_s,
                t1_s: self.start_s + self.seconds,
            };
            rows.push(row(top, row_h, vec![cell]));
            top += row_h;
        }
        Page { width_mm: trace_x + total_w + margins::RIGHT_MM, height_mm: top + margins::FOOTER_MM, paper, rows }
    }
}

/// How far a column tick ([`Row::column_ticks`]) reaches above and below the baseline, mm.
pub const COLUMN_TICK_MM: f64 = 3.0;

/// Seconds of trace that fit a page `width_mm` wide on `paper` (one column: margins, the calibration space
/// [`calibration_space_mm`] and the right margin taken off), at least 1 s.
#[must_use]
pub fn seconds_fitting(paper: &Paper, width_mm: f64) -> f64 {
    let fixed = margins::LEFT_MM + calibration_space_mm(paper) + margins::RIGHT_MM;
    paper.seconds_from_mm(width_mm - fixed).max(1.0)
}

/// Space before the traces for the calibration pulse, mm: `margins::CALIBRATION_MM`, or more at fast speeds
/// where the 200 ms pulse is wider (2 mm offset + 1 mm lead-in + pulse + 1 mm lead-out + 1 mm gap), rounded up
/// to whole 5 mm squares so traces still start on a heavy line.
#[must_use]
pub fn calibration_space_mm(paper: &Paper) -> f64 {
    let need = 2.0 + 1.0 + paper.mm_from_seconds(CALIBRATION_PULSE_S) + 1.0 + 1.0;
    if need <= margins::CALIBRATION_MM { margins::CALIBRATION_MM } else { (need / MAJOR_MM).ceil() * MAJOR_MM }
}

fn row(top: f64, height: f64, cells: Vec<Cell>) -> Row {
    Row {
        top_mm: top,
        height_mm: height,
        baseline_mm: top + height * 0.6,
        calibration_x_mm: margins::LEFT_MM + 2.0,
        cells,
    }
}

impl Cell {
    /// Paper x (mm) of recording time `t_s`.
    #[must_use]
    pub fn x_from_time(&self, paper: &Paper, t_s: f64) -> f64 {
        self.x_mm + paper.mm_from_seconds(t_s - self.t0_s)
    }

    /// Recording time (s) at paper x (mm).
    #[must_use]
    pub fn time_from_x(&self, paper: &Paper, x_mm: f64) -> f64 {
        self.t0_s + paper.seconds_from_mm(x_mm - self.x_mm)
    }

    /// Whether the recording time falls inside this cell's window.
    #[must_use]
    pub fn contains_time(&self, t_s: f64) -> bool {
        t_s >= self.t0_s && t_s <= self.t1_s
    }

    /// The label the cell shows over its lead's `samples` (held from sample `first` of a recording at `rate_hz`):
    /// its own, followed by [`NO_SIGNAL`] when the lead has samples in the cell's window but none valid (a lead
    /// missing from the file there), so a blank cell is not read as a flat line. A window past the end of the
    /// recording keeps the plain label.
    #[must_use]
    pub fn label_over(&self, samples: &[f32], first: usize, rate_hz: f64) -> String {
        let end = first + samples.len();
        let a = ((self.t0_s * rate_hz).floor().max(0.0) as usize).clamp(first, end);
        let b = ((self.t1_s * rate_hz).ceil().max(0.0) as usize).saturating_add(1).clamp(a, end);
        let held = &samples[a - first..b - first];
        if !held.is_empty() && !held.iter().any(|v| v.is_finite()) {
            format!("{} {NO_SIGNAL}", self.label)
        } else {
            self.label.clone()
        }
    }
}

/// Shown after a lead's label where the lead has no valid sample in the window.
pub const NO_SIGNAL: &str = "(no signal)";

impl Row {
    /// Paper y (mm) of a voltage in µV on this row (inverted cells flip the sign).
    #[must_use]
    pub fn y_from_uv(&self, paper: &Paper, uv: f64, inverted: bool) -> f64 {
        let v = if inverted { -uv } else { uv };
        self.baseline_mm - paper.mm_from_uv(v)
    }

    /// Voltage in µV at paper y (mm) on this row.
    #[must_use]
    pub fn uv_from_y(&self, paper: &Paper, y_mm: f64, inverted: bool) -> f64 {
        let v = paper.uv_from_mm(self.baseline_mm - y_mm);
        if inverted { -v } else { v }
    }

    /// The column-boundary ticks of the row: for every cell but the first, its left edge `x` and the tick's
    /// ends above and below the baseline, `(x, y_top, y_bottom)` in paper mm. Printed pages mark where one column's
    /// window ends and the next begins with a short bar through the baseline.
    // Common practice, no source: a bar of about a large square (6 mm here).
    pub fn column_ticks(&self) -> impl Iterator<Item = (f64, f64, f64)> + '_ {
        self.cells
            .iter()
            .skip(1)
            .map(|c| (c.x_mm, self.baseline_mm - COLUMN_TICK_MM, self.baseline_mm + COLUMN_TICK_MM))
    }

    /// Corner points of the 1 mV calibration pulse (step up, 200 ms plateau, step down) as paper mm,
    /// starting and ending on the baseline.
    #[must_use]
    pub fn calibration_pulse(&self, paper: &Paper) -> [(f64, f64); 6] {
        let x0 = self.calibration_x_mm;
        let lead_in = 1.0;
        let w = paper.mm_from_seconds(CALIBRATION_PULSE_S);
        let top = self.baseline_mm - paper.gain_mm_per_mv;
        let y = self.baseline_mm;
        [
            (x0, y),
            (x0 + lead_in, y),
            (x0 + lead_in, top),
            (x0 + lead_in + w, top),
            (x0 + lead_in + w, y),
            (x0 + 2.0 * lead_in + w, y),
        ]
    }
}
