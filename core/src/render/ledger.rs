//! The measurement box: one line per measurement with its automatic and reviewed values and unit, set in as
//! many side-by-side blocks as the page width allows.

use super::LedgerLine;
use super::canvas::Canvas;
use super::furniture::BODY;
use super::text::{Align, Fonts, Style};
use crate::paper::{Palette, margins};

const HEAD: [&str; 4] = ["Measurement", "Automatic", "Reviewed", "Unit"];
const PAD_MM: f64 = 2.0;
const COL_GAP_MM: f64 = 3.0;
const BLOCK_GAP_MM: f64 = 6.0;

/// Column widths, block count and line count of a planned box.
pub(super) struct Plan {
    cols: [f64; 4],
    blocks: usize,
    per_block: usize,
}

fn cells(l: &LedgerLine) -> [String; 4] {
    let dash = || "\u{2014}".to_string();
    [l.label.clone(), l.auto.clone().unwrap_or_else(dash), l.reviewed.clone().unwrap_or_else(dash), l.unit.clone()]
}

fn style(pal: &Palette, bold: bool) -> Style {
    Style { pt: BODY, bold, color: pal.text }
}

/// Plans the box for a page `width_mm` wide; `None` when there are no lines.
pub(super) fn plan(fonts: &Fonts, lines: &[LedgerLine], width_mm: f64, ppm: f64, pal: &Palette) -> Option<Plan> {
    if lines.is_empty() {
        return None;
    }
    let mut cols = [0.0f64; 4];
    for (j, h) in HEAD.iter().enumerate() {
        cols[j] = fonts.width_mm(h, style(pal, true), ppm);
    }
    for l in lines {
        for (j, c) in cells(l).iter().enumerate() {
            cols[j] = cols[j].max(fonts.width_mm(c, style(pal, false), ppm));
        }
    }
    let block_w = cols.iter().sum::<f64>() + 3.0 * COL_GAP_MM;
    let avail = width_mm - margins::LEFT_MM - margins::RIGHT_MM - 2.0 * PAD_MM;
    let blocks = (((avail + BLOCK_GAP_MM) / (block_w + BLOCK_GAP_MM)).floor() as usize).clamp(1, lines.len());
    Some(Plan { cols, blocks, per_block: lines.len().div_ceil(blocks) })
}

/// Height of the band holding the box, mm.
pub(super) fn height_mm(plan: &Plan) -> f64 {
    let st = Style { pt: BODY, bold: false, color: [0; 4] };
    // Padding, capitals of the heading, one line per row, descenders, padding, 1 mm above and below.
    PAD_MM + Fonts::cap_mm(st) + plan.per_block as f64 * Fonts::line_mm(st) + Fonts::descent_mm(st) + PAD_MM + 2.0
}

/// Draws the box in the band starting at paper y `top_mm`.
pub(super) fn draw(canvas: &mut Canvas, fonts: &Fonts, lines: &[LedgerLine], plan: &Plan, top_mm: f64, pal: &Palette) {
    let lh = Fonts::line_mm(style(pal, false));
    let block_w = plan.cols.iter().sum::<f64>() + 3.0 * COL_GAP_MM;
    let box_w = plan.blocks as f64 * block_w + (plan.blocks - 1) as f64 * BLOCK_GAP_MM + 2.0 * PAD_MM;
    let box_h = height_mm(plan) - 2.0;
    let (x, y) = (margins::LEFT_MM, top_mm + 1.0);
    canvas.fill_rect_mm(x, y, box_w, box_h, pal.background);
    canvas.outline_mm(x, y, box_w, box_h, pal.text, 0.15);
    for b in 0..plan.blocks {
        let bx = x + PAD_MM + b as f64 * (block_w + BLOCK_GAP_MM);
        let mut baseline = y + PAD_MM + Fonts::cap_mm(style(pal, true));
        draw_row(canvas, fonts, &HEAD.map(str::to_string), bx, baseline, &plan.cols, style(pal, true));
        for l in lines.iter().skip(b * plan.per_block).take(plan.per_block) {
            baseline += lh;
            draw_row(canvas, fonts, &cells(l), bx, baseline, &plan.cols, style(pal, false));
        }
    }
}

fn draw_row(
    canvas: &mut Canvas,
    fonts: &Fonts,
    cells: &[String; 4],
    x: f64,
    baseline: f64,
    cols: &[f64; 4],
    st: Style,
) {
    let mut cx = x;
    for (j, text) in cells.iter().enumerate() {
        // Label and unit left-aligned; values right-aligned so digits line up.
        if j == 1 || j == 2 {
            fonts.draw(canvas, text, cx + cols[j], baseline, st, Align::Right);
        } else {
            fonts.draw(canvas, text, cx, baseline, st, Align::Left);
        }
        cx += cols[j] + COL_GAP_MM;
    }
}
