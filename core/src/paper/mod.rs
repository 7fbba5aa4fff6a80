//! Paper geometry: speed, gain, page layouts and the mm ↔ time ↔ µV mapping.
//!
//! Shared by the Sheet on screen and the PNG renderer, so what the reader sees is what is exported.
//! Coordinate space "paper": millimetres, x to the right from the page's left edge, y down from its top.
//!
//! Source: Kligfield et al., Circulation 2007;115:1306-24 (25 mm/s, 10 mm/mV, 1 mV calibration pulse).

mod layout;
mod page;
mod scheme;

pub use layout::{Layout, LeadOrder, PaperError};
pub use page::{
    COLUMN_TICK_MM, Cell, NO_SIGNAL, Page, PageSpec, Row, calibration_space_mm, margins, ordered_leads, seconds_fitting,
};
pub use scheme::{Palette, Rgba, Scheme};

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

#[cfg(test)]
mod tests;
