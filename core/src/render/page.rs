//! Composes a page: paper, grid, calibration pulses, traces, lead labels, marks, calipers, header,
//! measurement box and caution footer.
//!
//! The page's trace geometry is exactly [`crate::paper::PageSpec::page`]; the measurement box and a footer tall
//! enough for the caution are added below the last row, so nothing shifts relative to the GUI's Sheet.

use tiny_skia::Pixmap;

use super::canvas::{Canvas, color};
use super::grid::{self, Area};
use super::text::{Align, Fonts, Style};
use super::{MAX_DPI, MAX_PIXELS, RenderError, RenderInput, furniture, ledger, notes, overlay, trace};
use crate::paper::{Page, Palette, margins, px_per_mm};

const LABEL_PT: f64 = 9.0;
/// Narrowest sheet, mm: room for the header and the caution on one or two lines.
const MIN_WIDTH_MM: f64 = 160.0;
/// Narrowest trace cell, mm: room for a lead label (`aVR` at [`LABEL_PT`] is about 6 mm) beside the next cell's.
/// At 25 mm/s a 3x4 cell of a 10-s page is 62.5 mm; at 1 mm/s the labels of a row were drawn over each other.
const MIN_CELL_MM: f64 = 8.0;

/// [`RenderError::Spec`] when a cell of `page` that shares its row with another is narrower than [`MIN_CELL_MM`]
/// (a strip's single cell has no neighbour's label to run into).
fn check_cells(page: &Page, seconds: f64) -> Result<(), RenderError> {
    let shared = page.rows.iter().filter(|r| r.cells.len() > 1).flat_map(|r| &r.cells);
    let narrowest = shared.map(|c| c.width_mm).fold(f64::INFINITY, f64::min);
    if narrowest < MIN_CELL_MM {
        return Err(RenderError::Spec(format!(
            "a lead's stretch of paper would be {narrowest:.1} mm wide ({seconds} s at {} mm/s), under the \
             {MIN_CELL_MM} mm its label needs: lengthen the window, raise the speed or choose a layout with \
             fewer columns",
            page.paper.speed_mm_per_s
        )));
    }
    Ok(())
}

fn check(input: &RenderInput) -> Result<(), RenderError> {
    if !input.dpi.is_finite() || input.dpi <= 0.0 || input.dpi > MAX_DPI {
        return Err(RenderError::Dpi(input.dpi));
    }
    let s = &input.spec;
    let ok = |v: f64| v.is_finite() && v > 0.0;
    if !ok(s.paper.speed_mm_per_s) || !ok(s.paper.gain_mm_per_mv) {
        return Err(RenderError::Spec(format!(
            "speed {} mm/s and gain {} mm/mV must be positive",
            s.paper.speed_mm_per_s, s.paper.gain_mm_per_mv
        )));
    }
    if !ok(s.seconds) || !s.start_s.is_finite() || s.start_s < 0.0 {
        return Err(RenderError::Spec(format!("window start {} s, length {} s", s.start_s, s.seconds)));
    }
    if input.recording.leads.is_empty() {
        return Err(RenderError::NoLeads);
    }
    Ok(())
}

fn size_px(width_mm: f64, height_mm: f64, ppm: f64) -> Result<(u32, u32), RenderError> {
    let w = (width_mm * ppm).ceil();
    let h = (height_mm * ppm).ceil();
    if !(w.is_finite() && h.is_finite())
        || w < 1.0
        || h < 1.0
        || w * h > MAX_PIXELS as f64
        || w > f64::from(u32::MAX)
        || h > f64::from(u32::MAX)
    {
        return Err(RenderError::TooLarge {
            width: w.max(0.0).min(u64::MAX as f64) as u64,
            height: h.max(0.0).min(u64::MAX as f64) as u64,
        });
    }
    Ok((w as u32, h as u32))
}

/// Grid area: from the left margin to the right margin, over every row band, in whole mm.
fn grid_area(page: &Page) -> Area {
    let y0 = page.rows.first().map_or(margins::HEADER_MM, |r| r.top_mm);
    let y1 = page.rows.last().map_or(y0, |r| r.top_mm + r.height_mm);
    Area { x0: margins::LEFT_MM, y0: y0.floor(), x1: (page.width_mm - margins::RIGHT_MM).ceil(), y1: y1.ceil() }
}

pub(super) fn render(input: &RenderInput) -> Result<Pixmap, RenderError> {
    check(input)?;
    let fonts = Fonts::load()?;
    let ppm = px_per_mm(input.dpi);
    let page = input.spec.page(input.recording);
    check_cells(&page, input.spec.seconds)?;
    let pal = input.scheme.palette();
    let area = grid_area(&page);
    // Page size first (cheap), so an absurd request fails before any drawing.
    size_px(page.width_mm, page.height_mm, ppm)?;
    // Short windows give narrow paper; the sheet is widened (blank to the right) so the header stays legible.
    let width_mm = page.width_mm.max(MIN_WIDTH_MM);
    let plan = ledger::plan(&fonts, &input.ledger, width_mm, ppm, &pal);
    let ledger_h = plan.as_ref().map_or(0.0, ledger::height_mm);
    let note_lines = notes::lines(&fonts, &input.notes, width_mm, ppm, &pal);
    let caution = furniture::caution_lines(&fonts, width_mm, ppm);
    let footer_top = area.y1 + ledger_h + notes::height_mm(note_lines.len());
    let height_mm = footer_top + furniture::footer_height_mm(caution.len());
    let (w, h) = size_px(width_mm, height_mm.max(page.height_mm), ppm)?;
    let pixmap = Pixmap::new(w, h).ok_or(RenderError::TooLarge { width: u64::from(w), height: u64::from(h) })?;
    let mut canvas = Canvas { pixmap, ppm };
    canvas.pixmap.fill(color(pal.background));

    grid::draw(&mut canvas, area, &pal);
    draw_rows(&mut canvas, &fonts, input, &page, area, &pal);
    overlay::draw_marks(&mut canvas, &fonts, &page, &input.marks, &pal);
    overlay::draw_calipers(&mut canvas, &fonts, &page, input.recording, &input.calipers, &pal);
    furniture::draw_header(&mut canvas, &fonts, input, width_mm, &pal);
    if let Some(plan) = &plan {
        ledger::draw(&mut canvas, &fonts, &input.ledger, plan, area.y1, &pal);
    }
    notes::draw(&mut canvas, &fonts, &note_lines, area.y1 + ledger_h, &pal);
    furniture::draw_footer(&mut canvas, &fonts, &caution, footer_top, &pal);
    Ok(canvas.pixmap)
}

/// Calibration pulses, traces, column separators and lead labels.
fn draw_rows(canvas: &mut Canvas, fonts: &Fonts, input: &RenderInput, page: &Page, area: Area, pal: &Palette) {
    let paper = page.paper;
    let label = Style { pt: LABEL_PT, bold: true, color: pal.text };
    for row in &page.rows {
        trace::draw_calibration(canvas, &paper, row, pal.trace);
        for cell in &row.cells {
            trace::draw_cell(
                canvas,
                (input.recording, input.first_sample),
                &paper,
                row,
                cell,
                (area.y0, area.y1),
                pal.trace,
            );
        }
        // A short bar where one column's window ends and the next begins.
        for (x, top, bottom) in row.column_ticks() {
            canvas.segment((x, top), (x, bottom), pal.trace, trace::TRACE_MM, None);
        }
    }
    // Labels last, so no trace covers them.
    let fs = input.recording.sample_rate.hz();
    for row in &page.rows {
        for cell in &row.cells {
            let text = input
                .recording
                .leads
                .get(cell.lead)
                .map_or_else(|| cell.label.clone(), |l| cell.label_over(&l.samples, input.first_sample, fs));
            let (x, y) = (cell.x_mm + 1.0, row.top_mm + 1.0 + Fonts::cap_mm(label));
            let w = fonts.width_mm(&text, label, canvas.ppm);
            canvas.fill_rect_mm(
                x - 0.4,
                row.top_mm + 0.5,
                w + 0.8,
                Fonts::cap_mm(label) + 1.2,
                [pal.background[0], pal.background[1], pal.background[2], 220],
            );
            fonts.draw(canvas, &text, x, y, label, Align::Left);
        }
    }
}
