//! The paper grid: thin lines every 1 mm, heavier lines every 5 mm, at true scale.
//!
//! Source: Kligfield et al., Circulation 2007;115:1306-24 (1 mm small squares, 5 mm large squares).
//! Lines are snapped to whole pixels with exact colours; their centres stay within half a pixel of
//! `mm × dpi / 25.4`, so the 5 mm period averages 59.06 px at 300 dpi.

use super::canvas::Canvas;
use crate::paper::{MAJOR_MM, MINOR_MM, Palette};

/// Thickness of 1 mm lines, mm. // Common practice, no source.
const MINOR_LINE_MM: f64 = 0.08;
/// Thickness of 5 mm lines, mm. // Common practice, no source.
const MAJOR_LINE_MM: f64 = 0.17;

/// A rectangle of paper in whole millimetres from the page origin.
#[derive(Debug, Clone, Copy, PartialEq)]
pub(super) struct Area {
    pub x0: f64,
    pub y0: f64,
    pub x1: f64,
    pub y1: f64,
}

/// Draws the grid over `area`; lines sit at whole millimetres from the page's top-left corner.
pub(super) fn draw(canvas: &mut Canvas, area: Area, palette: &Palette) {
    let minor_w = canvas.line_px(MINOR_LINE_MM);
    let major_w = canvas.line_px(MAJOR_LINE_MM);
    let per_major = (MAJOR_MM / MINOR_MM).round() as i64;
    let (x0, x1) = (area.x0.ceil() as i64, area.x1.floor() as i64);
    let (y0, y1) = (area.y0.ceil() as i64, area.y1.floor() as i64);
    for pass_major in [false, true] {
        for k in x0..=x1 {
            let major = k.rem_euclid(per_major) == 0;
            if major == pass_major {
                let w = if major { major_w } else { minor_w };
                let c = if major { palette.major } else { palette.minor };
                canvas.vline(k as f64 * MINOR_MM, area.y0, area.y1, w, c);
            }
        }
        for k in y0..=y1 {
            let major = k.rem_euclid(per_major) == 0;
            if major == pass_major {
                let w = if major { major_w } else { minor_w };
                let c = if major { palette.major } else { palette.minor };
                canvas.hline(k as f64 * MINOR_MM, area.x0, area.x1, w, c);
            }
        }
    }
}
