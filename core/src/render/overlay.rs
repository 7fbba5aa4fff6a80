//! Calipers and boundary marks drawn over the traces, in every cell whose time window shows them.

use super::canvas::Canvas;
use super::text::{Align, Fonts, Style};
use crate::beat::MarkKind;
use crate::caliper::{Caliper, CaliperKind};
use crate::paper::{Cell, Page, Palette, Row};
use crate::recording::Recording;

const LEG_MM: f64 = 0.2;
const MARCH_MM: f64 = 0.12;
const MARK_MM: f64 = 0.15;
const SMALL_PT: f64 = 6.5;
const READOUT_PT: f64 = 7.5;

/// Label tier (0 = lowest line) so neighbouring marks' labels do not collide.
fn tier(kind: MarkKind) -> usize {
    match kind {
        MarkKind::POnset | MarkKind::JPoint => 0,
        MarkKind::PEnd | MarkKind::TEnd => 1,
        MarkKind::QrsOnset => 2,
        MarkKind::RPeak => 3,
    }
}

fn cells(page: &Page) -> impl Iterator<Item = (&Row, &Cell)> {
    page.rows.iter().flat_map(|r| r.cells.iter().map(move |c| (r, c)))
}

/// Text on a small paper-coloured plate so grid lines do not cut through it.
fn plate_text(
    canvas: &mut Canvas,
    fonts: &Fonts,
    text: &str,
    (x, baseline): (f64, f64),
    st: Style,
    align: Align,
    bg: [u8; 4],
) {
    let w = fonts.width_mm(text, st, canvas.ppm);
    let cap = Fonts::cap_mm(st);
    let left = match align {
        Align::Left => x,
        Align::Center => x - w / 2.0,
        Align::Right => x - w,
    };
    canvas.fill_rect_mm(left - 0.4, baseline - cap - 0.5, w + 0.8, cap + 1.3, [bg[0], bg[1], bg[2], 230]);
    fonts.draw(canvas, text, x, baseline, st, align);
}

/// Draws the marks: a thin line through the row band and a short label near its bottom.
pub(super) fn draw_marks(canvas: &mut Canvas, fonts: &Fonts, page: &Page, marks: &[(MarkKind, f64)], pal: &Palette) {
    let st = Style { pt: SMALL_PT, bold: false, color: pal.mark };
    let lh = Fonts::line_mm(st);
    // Lines first, then labels, so no line crosses another mark's label.
    for labels in [false, true] {
        for (row, cell) in cells(page) {
            for &(kind, t) in marks {
                if !cell.contains_time(t) {
                    continue;
                }
                let x = cell.x_from_time(&page.paper, t);
                let bottom = row.top_mm + row.height_mm;
                let label_y = bottom - 0.8 - tier(kind) as f64 * lh;
                if labels {
                    plate_text(canvas, fonts, kind.short_label(), (x, label_y), st, Align::Center, pal.background);
                } else {
                    let end = label_y - Fonts::cap_mm(st) - 0.6;
                    canvas.segment((x, row.top_mm + 6.0), (x, end), pal.mark, MARK_MM, Some((0.8, 0.5)));
                }
            }
        }
    }
}

/// Whether a voltage caliper belongs on this cell (same lead name, or no lead given).
fn on_lead(recording: &Recording, cal: &Caliper, cell: &Cell) -> bool {
    cal.shows_on(recording.leads.get(cell.lead).map(|l| &l.name))
}

/// Draws the calipers. The readout goes on the first cell (top to bottom, left to right) that shows it.
pub(super) fn draw_calipers(
    canvas: &mut Canvas,
    fonts: &Fonts,
    page: &Page,
    recording: &Recording,
    calipers: &[Caliper],
    pal: &Palette,
) {
    let st = Style { pt: READOUT_PT, bold: true, color: pal.caliper };
    let p = page.paper;
    for cal in calipers {
        let mut readout_done = false;
        for (row, cell) in cells(page) {
            let (top, bottom) = (row.top_mm + 1.0, row.top_mm + row.height_mm - 1.0);
            match cal.kind {
                CaliperKind::Time { t1_s, t2_s } => {
                    for t in cal.march_times(cell.t0_s, cell.t1_s) {
                        let x = cell.x_from_time(&p, t);
                        canvas.segment((x, top), (x, bottom), pal.caliper, MARCH_MM, Some((1.0, 0.8)));
                    }
                    let legs: Vec<f64> = [t1_s, t2_s]
                        .into_iter()
                        .filter(|&t| cell.contains_time(t))
                        .map(|t| cell.x_from_time(&p, t))
                        .collect();
                    for &x in &legs {
                        canvas.segment((x, top), (x, bottom), pal.caliper, LEG_MM, None);
                    }
                    if legs.len() == 2 {
                        let y = top + 6.5;
                        canvas.segment((legs[0], y), (legs[1], y), pal.caliper, LEG_MM, None);
                        if !readout_done {
                            let mid = (legs[0] + legs[1]) / 2.0;
                            plate_text(
                                canvas,
                                fonts,
                                &cal.readout(),
                                (mid, y - 1.0),
                                st,
                                Align::Center,
                                pal.background,
                            );
                            readout_done = true;
                        }
                    }
                }
                CaliperKind::Voltage { t_s, uv1, uv2 } => {
                    if !cell.contains_time(t_s) || !on_lead(recording, cal, cell) {
                        continue;
                    }
                    let x = cell.x_from_time(&p, t_s);
                    let y1 = row.y_from_uv(&p, uv1, cell.inverted);
                    let y2 = row.y_from_uv(&p, uv2, cell.inverted);
                    for y in [y1, y2] {
                        canvas.segment((x - 4.0, y), (x + 4.0, y), pal.caliper, LEG_MM, None);
                    }
                    canvas.segment((x, y1), (x, y2), pal.caliper, MARCH_MM, None);
                    if !readout_done {
                        let base = (y1 + y2) / 2.0 + Fonts::cap_mm(st) / 2.0;
                        plate_text(canvas, fonts, &cal.readout(), (x + 5.0, base), st, Align::Left, pal.background);
                        readout_done = true;
                    }
                }
                CaliperKind::Plumb { t_s } => {
                    if !cell.contains_time(t_s) {
                        continue;
                    }
                    let x = cell.x_from_time(&p, t_s);
                    canvas.segment(
                        (x, row.top_mm),
                        (x, row.top_mm + row.height_mm),
                        pal.caliper,
                        MARCH_MM,
                        Some((2.0, 1.0)),
                    );
                    if !readout_done {
                        plate_text(
                            canvas,
                            fonts,
                            &cal.readout(),
                            (x + 1.0, top + 6.0),
                            st,
                            Align::Left,
                            pal.background,
                        );
                        readout_done = true;
                    }
                }
            }
        }
    }
}
