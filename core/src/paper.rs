//! Paper geometry: speed, gain, page layouts and the mm ↔ time ↔ µV mapping.
//!
//! Shared by the Sheet on screen and the PNG renderer, so what the reader sees is what is exported.
//! Coordinate space "paper": millimetres, x to the right from the page's left edge, y down from its top.
//!
//! Source: Kligfield et al., Circulation 2007;115:1306-24 (25 mm/s, 10 mm/mV, 1 mV calibration pulse).

use std::fmt;
use std::str::FromStr;

use thiserror::Error;

use crate::recording::{LeadName, Recording, StandardLead};

/// Millimetres per inch, exact by the 1959 international yard and pound agreement.
pub const MM_PER_INCH: f64 = 25.4;
/// Paper speeds offered, mm/s.
pub const SPEEDS_MM_PER_S: [f64; 4] = [12.5, 25.0, 50.0, 100.0];
/// Gains offered, mm/mV.
pub const GAINS_MM_PER_MV: [f64; 4] = [2.5, 5.0, 10.0, 20.0];
/// Small grid square, mm.
pub const MINOR_MM: f64 = 1.0;
/// Large grid square, mm.
pub const MAJOR_MM: f64 = 5.0;
/// Width of the 1 mV calibration pulse, seconds (conventionally 200 ms).
pub const CALIBRATION_PULSE_S: f64 = 0.2;

/// Pixels per millimetre at a given resolution in dots per inch.
#[must_use]
pub fn px_per_mm(dpi: f64) -> f64 {
    dpi / MM_PER_INCH
}

/// Speed and gain of the paper.
#[derive(Debug, Clone, Copy, PartialEq, serde::Serialize, serde::Deserialize)]
pub struct Paper {
    /// Paper speed in mm per second.
    pub speed_mm_per_s: f64,
    /// Gain in mm per millivolt.
    pub gain_mm_per_mv: f64,
}

impl Default for Paper {
    fn default() -> Self {
        Self::STANDARD
    }
}

impl Paper {
    /// 25 mm/s and 10 mm/mV.
    pub const STANDARD: Paper = Paper { speed_mm_per_s: 25.0, gain_mm_per_mv: 10.0 };

    /// Millimetres spanned by a duration.
    #[must_use]
    pub fn mm_from_seconds(&self, seconds: f64) -> f64 {
        seconds * self.speed_mm_per_s
    }

    /// Duration spanned by a distance along the time axis.
    #[must_use]
    pub fn seconds_from_mm(&self, mm: f64) -> f64 {
        mm / self.speed_mm_per_s
    }

    /// Millimetres spanned by a voltage in µV.
    #[must_use]
    pub fn mm_from_uv(&self, uv: f64) -> f64 {
        uv / 1000.0 * self.gain_mm_per_mv
    }

    /// Voltage in µV spanned by a vertical distance.
    #[must_use]
    pub fn uv_from_mm(&self, mm: f64) -> f64 {
        mm / self.gain_mm_per_mv * 1000.0
    }

    /// Description for headers: `25 mm/s  10 mm/mV`.
    #[must_use]
    pub fn describe(&self) -> String {
        format!("{} mm/s  {} mm/mV", self.speed_mm_per_s, self.gain_mm_per_mv)
    }
}

/// Order of the limb leads on a page.
#[derive(Debug, Clone, Copy, Default, PartialEq, Eq, serde::Serialize, serde::Deserialize)]
pub enum LeadOrder {
    /// I, II, III, aVR, aVL, aVF, V1–V6.
    #[default]
    Standard,
    /// The Cabrera sequence: aVL, I, −aVR, II, aVF, III, V1–V6.
    Cabrera,
}

impl LeadOrder {
    /// The twelve leads in this order, with `true` where the lead is shown inverted (−aVR).
    #[must_use]
    pub fn sequence(self) -> [(StandardLead, bool); 12] {
        use StandardLead::*;
        match self {
            Self::Standard => StandardLead::ALL.map(|l| (l, false)),
            Self::Cabrera => [
                (AVL, false),
                (I, false),
                (AVR, true),
                (II, false),
                (AVF, false),
                (III, false),
                (V1, false),
                (V2, false),
                (V3, false),
                (V4, false),
                (V5, false),
                (V6, false),
            ],
        }
    }

    /// `standard` or `cabrera`.
    #[must_use]
    pub fn as_str(self) -> &'static str {
        match self {
            Self::Standard => "standard",
            Self::Cabrera => "cabrera",
        }
    }
}

impl FromStr for LeadOrder {
    type Err = PaperError;
    fn from_str(s: &str) -> Result<Self, Self::Err> {
        match s.trim().to_ascii_lowercase().as_str() {
            "standard" => Ok(Self::Standard),
            "cabrera" => Ok(Self::Cabrera),
            _ => Err(PaperError::LeadOrder(s.to_string())),
        }
    }
}

/// A page layout, described by its shape.
#[derive(Debug, Clone, PartialEq, Eq, serde::Serialize, serde::Deserialize)]
pub enum Layout {
    /// Three rows of four columns (2.5 s each at 10 s) plus one full-width rhythm row of the given lead.
    ThreeByFourPlusOne {
        /// Lead of the rhythm strip.
        rhythm: LeadName,
    },
    /// Six rows of two columns.
    SixByTwo,
    /// Twelve rows (every lead), each the whole window.
    TwelveByOne,
    /// One lead over the whole window.
    Strip(LeadName),
}

impl Default for Layout {
    fn default() -> Self {
        Self::ThreeByFourPlusOne { rhythm: LeadName::Standard(StandardLead::II) }
    }
}

/// Errors parsing paper settings.
#[derive(Debug, Clone, PartialEq, Error)]
#[non_exhaustive]
pub enum PaperError {
    /// Unknown layout text.
    #[error("unknown layout '{0}' (expected 3x4+1, 3x4+1:LEAD, 6x2, 12x1 or strip:LEAD)")]
    Layout(String),
    /// Unknown lead order.
    #[error("unknown lead order '{0}' (expected standard or cabrera)")]
    LeadOrder(String),
    /// Unknown paper scheme.
    #[error("unknown paper scheme '{0}' (expected rose, graphite or mono)")]
    Scheme(String),
}

impl FromStr for Layout {
    type Err = PaperError;
    fn from_str(s: &str) -> Result<Self, Self::Err> {
        let t = s.trim();
        let lower = t.to_ascii_lowercase();
        if lower == "3x4+1" {
            return Ok(Self::default());
        }
        if let Some(lead) = lower.strip_prefix("3x4+1:").map(|_| &t[6..]) {
            return Ok(Self::ThreeByFourPlusOne { rhythm: LeadName::parse(lead) });
        }
        match lower.as_str() {
            "6x2" => return Ok(Self::SixByTwo),
            "12x1" => return Ok(Self::TwelveByOne),
            _ => {}
        }
        if lower.starts_with("strip:") && t.len() > 6 {
            return Ok(Self::Strip(LeadName::parse(&t[6..])));
        }
        Err(PaperError::Layout(s.to_string()))
    }
}

impl fmt::Display for Layout {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        match self {
            Self::ThreeByFourPlusOne { rhythm } if *rhythm == LeadName::Standard(StandardLead::II) => {
                f.write_str("3x4+1")
            }
            Self::ThreeByFourPlusOne { rhythm } => write!(f, "3x4+1:{rhythm}"),
            Self::SixByTwo => f.write_str("6x2"),
            Self::TwelveByOne => f.write_str("12x1"),
            Self::Strip(lead) => write!(f, "strip:{lead}"),
        }
    }
}

/// RGBA colour, 8 bits per channel.
pub type Rgba = [u8; 4];

/// A paper colour scheme.
#[derive(Debug, Clone, Copy, Default, PartialEq, Eq, serde::Serialize, serde::Deserialize)]
pub enum Scheme {
    /// Classic red grid on cream.
    #[default]
    Rose,
    /// Dark paper, soft grey grid, light traces.
    Graphite,
    /// Black and grey on white, for printing.
    Mono,
}

/// Colours of one scheme.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub struct Palette {
    /// Paper background.
    pub background: Rgba,
    /// 1 mm lines.
    pub minor: Rgba,
    /// 5 mm lines.
    pub major: Rgba,
    /// ECG traces and calibration pulses.
    pub trace: Rgba,
    /// Labels and text.
    pub text: Rgba,
    /// Calipers and their readouts.
    pub caliper: Rgba,
    /// Boundary marks.
    pub mark: Rgba,
}

impl Scheme {
    /// All schemes.
    pub const ALL: [Scheme; 3] = [Self::Rose, Self::Graphite, Self::Mono];

    /// The scheme's colours.
    #[must_use]
    pub fn palette(self) -> Palette {
        match self {
            Self::Rose => Palette {
                background: [255, 250, 242, 255],
                minor: [244, 196, 196, 255],
                major: [222, 120, 120, 255],
                trace: [20, 22, 30, 255],
                text: [60, 30, 30, 255],
                caliper: [20, 90, 200, 255],
                mark: [0, 130, 90, 255],
            },
            Self::Graphite => Palette {
                background: [28, 30, 34, 255],
                minor: [48, 52, 58, 255],
                major: [78, 84, 94, 255],
                trace: [230, 236, 242, 255],
                text: [200, 206, 214, 255],
                caliper: [255, 190, 70, 255],
                mark: [90, 220, 160, 255],
            },
            Self::Mono => Palette {
                background: [255, 255, 255, 255],
                minor: [222, 222, 222, 255],
                major: [160, 160, 160, 255],
                trace: [0, 0, 0, 255],
                text: [0, 0, 0, 255],
                caliper: [60, 60, 60, 255],
                mark: [90, 90, 90, 255],
            },
        }
    }

    /// `rose`, `graphite` or `mono`.
    #[must_use]
    pub fn as_str(self) -> &'static str {
        match self {
            Self::Rose => "rose",
            Self::Graphite => "graphite",
            Self::Mono => "mono",
        }
    }
}

impl FromStr for Scheme {
    type Err = PaperError;
    fn from_str(s: &str) -> Result<Self, Self::Err> {
        Self::ALL
            .into_iter()
            .find(|x| x.as_str().eq_ignore_ascii_case(s.trim()))
            .ok_or_else(|| PaperError::Scheme(s.to_string()))
    }
}

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
}

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

#[cfg(test)]
mod tests {
    use super::*;
    use crate::recording::{Lead, Meta};
    use crate::units::Hertz;

    fn twelve_lead() -> Recording {
        Recording {
            leads: StandardLead::ALL.iter().map(|&l| Lead { name: l.into(), samples: vec![0.0; 5000] }).collect(),
            sample_rate: Hertz::from_hz(500.0).unwrap_or_else(|_| unreachable!()),
            start: None,
            meta: Meta::default(),
            annotations: vec![],
        }
    }

    #[test]
    fn grid_squares_at_standard_speed_and_gain() {
        // Source: Kligfield et al. 2007 (references.md §1): at 25 mm/s 5 mm = 200 ms, 1 mm = 40 ms;
        // at 10 mm/mV 1 mm = 0.1 mV.
        let p = Paper::STANDARD;
        assert!((p.seconds_from_mm(MAJOR_MM) - 0.200).abs() < 1e-12);
        assert!((p.seconds_from_mm(MINOR_MM) - 0.040).abs() < 1e-12);
        assert!((p.uv_from_mm(MINOR_MM) - 100.0).abs() < 1e-9);
        assert!((p.mm_from_seconds(1.0) - 25.0).abs() < 1e-12);
        let fast = Paper { speed_mm_per_s: 50.0, ..p };
        assert!((fast.seconds_from_mm(1.0) - 0.020).abs() < 1e-12);
    }

    #[test]
    fn dpi_conversion() {
        // Source: 1 inch = 25.4 mm exactly (1959 agreement; references.md §1).
        assert!((px_per_mm(300.0) * MAJOR_MM - 59.055).abs() < 1e-3);
        assert!((px_per_mm(25.4) - 1.0).abs() < 1e-12);
    }

    #[test]
    fn layouts_parse_and_print() -> Result<(), PaperError> {
        for s in ["3x4+1", "6x2", "12x1", "strip:II", "3x4+1:V1"] {
            assert_eq!(s.parse::<Layout>()?.to_string(), s);
        }
        assert_eq!("strip:avr".parse::<Layout>()?, Layout::Strip(LeadName::Standard(StandardLead::AVR)));
        assert!("4x3".parse::<Layout>().is_err());
        assert!("strip:".parse::<Layout>().is_err());
        Ok(())
    }

    #[test]
    fn three_by_four_page() {
        let rec = twelve_lead();
        let page = PageSpec::default().page(&rec);
        assert_eq!(page.rows.len(), 4);
        let labels: Vec<_> = page.rows[0].cells.iter().map(|c| c.label.clone()).collect();
        assert_eq!(labels, ["I", "aVR", "V1", "V4"]);
        assert!((page.rows[0].cells[1].t0_s - 2.5).abs() < 1e-12);
        assert_eq!(page.rows[3].cells.len(), 1);
        assert_eq!(page.rows[3].cells[0].label, "II");
        assert!((page.rows[3].cells[0].width_mm - 250.0).abs() < 1e-9);
    }

    #[test]
    fn missing_rhythm_lead_falls_back_to_first_lead_in_file_order() {
        // A two-lead Holter-style record (MLII, V5): page order puts V5 first, file order MLII.
        let rec = Recording {
            leads: ["MLII", "V5"].iter().map(|n| Lead { name: LeadName::parse(n), samples: vec![0.0; 5000] }).collect(),
            ..twelve_lead()
        };
        assert_eq!(ordered_leads(&rec, LeadOrder::default())[0].1, "V5");
        let page = PageSpec::default().page(&rec);
        let rhythm = &page.rows.last().map(|r| r.cells.clone()).unwrap_or_default();
        assert_eq!(rhythm.len(), 1);
        assert_eq!((rhythm[0].lead, rhythm[0].label.as_str()), (0, "MLII"));
        let strip = PageSpec { layout: Layout::Strip(StandardLead::II.into()), ..PageSpec::default() }.page(&rec);
        assert_eq!(strip.rows.len(), 1);
        assert_eq!((strip.rows[0].cells[0].lead, strip.rows[0].cells[0].label.as_str()), (0, "MLII"));
    }

    #[test]
    fn few_leads_fill_whole_columns() {
        let mut rec = twelve_lead();
        rec.leads.truncate(3); // I, II, III
        let page = PageSpec::default().page(&rec);
        assert_eq!(page.rows.len(), 4);
        for row in &page.rows {
            assert_eq!(row.cells.len(), 1);
            assert!((row.cells[0].width_mm - 250.0).abs() < 1e-9);
            assert!((row.cells[0].t1_s - 10.0).abs() < 1e-12);
        }
        let five = {
            let mut r = twelve_lead();
            r.leads.truncate(5);
            r
        };
        let page = PageSpec::default().page(&five);
        assert_eq!(page.rows[0].cells.len(), 2);
        assert!((page.rows[0].cells[1].t0_s - 5.0).abs() < 1e-12);
    }

    #[test]
    fn cabrera_inverts_avr() {
        let rec = twelve_lead();
        let spec = PageSpec { order: LeadOrder::Cabrera, layout: Layout::SixByTwo, ..PageSpec::default() };
        let page = spec.page(&rec);
        let first_col: Vec<_> = page.rows.iter().map(|r| r.cells[0].label.clone()).collect();
        // Source: the Cabrera sequence orders the limb leads by frontal angle, aVL −30°, I 0°, −aVR +30°,
        // II +60°, aVF +90°, III +120° (hexaxial angles in references.md §5). From memory: the sequence itself.
        assert_eq!(first_col, ["aVL", "I", "\u{2212}aVR", "II", "aVF", "III"]);
        assert!(page.rows[2].cells[0].inverted);
        let row = &page.rows[2];
        assert!((row.y_from_uv(&page.paper, 1000.0, true) - (row.baseline_mm + 10.0)).abs() < 1e-9);
    }

    #[test]
    fn calibration_pulse_is_one_millivolt_tall() {
        let rec = twelve_lead();
        let page = PageSpec::default().page(&rec);
        let pts = page.rows[0].calibration_pulse(&page.paper);
        // Source: Kligfield et al. 2007: 1 mV calibration = 10 mm at 10 mm/mV, 200 ms wide (5 mm at 25 mm/s).
        assert!(((pts[0].1 - pts[2].1) - 10.0).abs() < 1e-9);
        assert!(((pts[3].0 - pts[2].0) - 5.0).abs() < 1e-9);
    }

    #[test]
    fn cell_time_mapping_round_trips() {
        let rec = twelve_lead();
        let page = PageSpec { start_s: 3.0, ..PageSpec::default() }.page(&rec);
        let cell = &page.rows[3].cells[0];
        let x = cell.x_from_time(&page.paper, 4.2);
        assert!((cell.time_from_x(&page.paper, x) - 4.2).abs() < 1e-12);
        assert!((x - cell.x_mm - 30.0).abs() < 1e-9);
    }
}
