//! The Sheet: leads on true-scale grid paper, laid out by `core::paper`.
//!
//! Coordinate spaces: "paper" is millimetres from the page's top-left corner (as in `core::paper`); "screen" is
//! egui points. `screen_from_paper` scales by the calibrated points per mm. Trace drawing costs one min/max pass
//! per screen pixel column, whatever the sampling rate or zoom.

use egui::{Color32, FontId, Pos2, Rect, Shape, Stroke, Vec2};
use isoline_core::paper::{Cell, MAJOR_MM, MINOR_MM, Page, PageSpec, Palette, Rgba, margins};
use isoline_core::recording::Recording;
use isoline_core::render::decimate_min_max;

use super::state::{Loaded, ViewSettings};

/// Where the Sheet was drawn in the last frame: enough to map between screen, paper and recording time.
#[derive(Debug, Clone, PartialEq)]
pub struct SheetGeometry {
    /// Screen position of paper (0, 0).
    pub origin: Pos2,
    /// Screen points per paper millimetre.
    pub points_per_mm: f32,
    /// The page as laid out.
    pub page: Page,
}

impl SheetGeometry {
    /// Screen point of a paper position.
    #[must_use]
    pub fn screen_from_paper(&self, x_mm: f64, y_mm: f64) -> Pos2 {
        self.origin + Vec2::new(x_mm as f32, y_mm as f32) * self.points_per_mm
    }

    /// Paper position (mm) of a screen point.
    #[must_use]
    pub fn paper_from_screen(&self, p: Pos2) -> (f64, f64) {
        let d = (p - self.origin) / self.points_per_mm;
        (f64::from(d.x), f64::from(d.y))
    }

    /// The row and cell under a screen point.
    #[must_use]
    pub fn cell_at(&self, p: Pos2) -> Option<(usize, usize)> {
        let (x, y) = self.paper_from_screen(p);
        self.page.rows.iter().enumerate().find_map(|(ri, row)| {
            if y < row.top_mm || y > row.top_mm + row.height_mm {
                return None;
            }
            row.cells.iter().position(|c| x >= c.x_mm && x <= c.x_mm + c.width_mm).map(|ci| (ri, ci))
        })
    }

    /// Screen x of a recording time in a given cell.
    #[must_use]
    pub fn x_of_time(&self, cell: &Cell, t_s: f64) -> f32 {
        self.screen_from_paper(cell.x_from_time(&self.page.paper, t_s), 0.0).x
    }

    /// A screen point at recording time `t_s` on the baseline of the last row showing that time (the rhythm
    /// strip when there is one). `None` when the time is off the page.
    #[must_use]
    pub fn point_at_time(&self, t_s: f64) -> Option<Pos2> {
        self.page.rows.iter().rev().find_map(|row| {
            let cell = row.cells.iter().find(|c| c.contains_time(t_s))?;
            Some(self.screen_from_paper(cell.x_from_time(&self.page.paper, t_s), row.baseline_mm))
        })
    }

    /// Screen rectangle of a row's band.
    #[must_use]
    pub fn row_rect(&self, row: usize) -> Option<Rect> {
        let r = self.page.rows.get(row)?;
        let first = r.cells.first()?;
        let last = r.cells.last()?;
        Some(Rect::from_min_max(
            self.screen_from_paper(first.x_mm, r.top_mm),
            self.screen_from_paper(last.x_mm + last.width_mm, r.top_mm + r.height_mm),
        ))
    }
}

/// egui colour from a palette entry.
#[must_use]
pub fn color(c: Rgba) -> Color32 {
    Color32::from_rgba_unmultiplied(c[0], c[1], c[2], c[3])
}

/// Seconds the Sheet shows: 10 s for the multi-column layouts (the conventional page), else the width available.
#[must_use]
pub fn window_seconds(view: &ViewSettings, available_mm: f64, duration_s: f64) -> f64 {
    let fit = isoline_core::paper::seconds_fitting(&view.paper, available_mm);
    let s = match view.layout {
        isoline_core::paper::Layout::ThreeByFourPlusOne { .. } | isoline_core::paper::Layout::SixByTwo => 10.0,
        _ => fit,
    };
    s.min(duration_s.max(1.0))
}

/// Lays out and draws the page at `origin`, returning its geometry.
pub fn draw_page(
    painter: &egui::Painter,
    loaded: &Loaded,
    view: &ViewSettings,
    spec: &PageSpec,
    origin: Pos2,
    points_per_mm: f32,
    header: &str,
) -> SheetGeometry {
    let shown = loaded.shown(view.filters);
    let rec: &Recording = shown.recording;
    let page = spec.page(rec);
    let geo = SheetGeometry { origin, points_per_mm, page };
    let pal = view.scheme.palette();
    let page_rect =
        Rect::from_min_size(origin, Vec2::new(geo.page.width_mm as f32, geo.page.height_mm as f32) * points_per_mm);
    painter.rect_filled(page_rect, 0.0, color(pal.background));
    draw_grid(painter, &geo, &pal, page_rect);
    let text_font = FontId::proportional((3.2 * points_per_mm).clamp(11.0, 18.0));
    painter.text(
        geo.screen_from_paper(margins::LEFT_MM, 4.0),
        egui::Align2::LEFT_TOP,
        header,
        text_font.clone(),
        color(pal.text),
    );
    let ppp = painter.ctx().pixels_per_point();
    let trace = Stroke::new(1.2_f32.max(0.25 * points_per_mm).min(2.0), color(pal.trace));
    for row in &geo.page.rows {
        let pulse: Vec<Pos2> =
            row.calibration_pulse(&geo.page.paper).iter().map(|&(x, y)| geo.screen_from_paper(x, y)).collect();
        painter.add(Shape::line(pulse, trace));
        for cell in &row.cells {
            let Some(lead) = rec.leads.get(cell.lead) else { continue };
            let runs = trace_points(&geo, row, cell, (&lead.samples, shown.first), rec.sample_rate.hz(), ppp);
            for pts in runs.into_iter().filter(|pts| pts.len() > 1) {
                painter.add(Shape::line(pts, trace));
            }
            painter.text(
                geo.screen_from_paper(cell.x_mm + 1.0, row.top_mm + 1.0),
                egui::Align2::LEFT_TOP,
                cell.label_over(&lead.samples, shown.first, rec.sample_rate.hz()),
                text_font.clone(),
                color(pal.text),
            );
        }
        // A short tick marks each column boundary, as on the exported page.
        for (x, top, bottom) in row.column_ticks() {
            painter.line_segment([geo.screen_from_paper(x, top), geo.screen_from_paper(x, bottom)], trace);
        }
    }
    painter.text(
        geo.screen_from_paper(margins::LEFT_MM, geo.page.height_mm - margins::FOOTER_MM + 2.0),
        egui::Align2::LEFT_TOP,
        isoline_core::CAUTION,
        FontId::proportional((2.6 * points_per_mm).clamp(10.0, 14.0)),
        color(pal.text),
    );
    geo
}

fn draw_grid(painter: &egui::Painter, geo: &SheetGeometry, pal: &Palette, page_rect: Rect) {
    let clip = painter.clip_rect().intersect(page_rect);
    if !clip.is_positive() {
        return;
    }
    let (x0, y0) = geo.paper_from_screen(clip.min);
    let (x1, y1) = geo.paper_from_screen(clip.max);
    let minor = Stroke::new(0.6, color(pal.minor));
    let major = Stroke::new(1.0, color(pal.major));
    let ratio = (MAJOR_MM / MINOR_MM).round() as i64;
    // Minor lines first so major lines draw over them; skip minor lines when closer than 2 points.
    let show_minor = geo.points_per_mm * MINOR_MM as f32 >= 2.0;
    for pass_major in [false, true] {
        if !pass_major && !show_minor {
            continue;
        }
        let stroke = if pass_major { major } else { minor };
        for k in (x0.floor() as i64).max(0)..=(x1.ceil() as i64).min(geo.page.width_mm as i64) {
            if (k % ratio == 0) != pass_major {
                continue;
            }
            let x = geo.screen_from_paper(k as f64, 0.0).x;
            painter.line_segment([Pos2::new(x, clip.top()), Pos2::new(x, clip.bottom())], stroke);
        }
        for k in (y0.floor() as i64).max(0)..=(y1.ceil() as i64).min(geo.page.height_mm as i64) {
            if (k % ratio == 0) != pass_major {
                continue;
            }
            let y = geo.screen_from_paper(0.0, k as f64).y;
            painter.line_segment([Pos2::new(clip.left(), y), Pos2::new(clip.right(), y)], stroke);
        }
    }
}

/// Screen points of one cell's trace, as runs to draw each as one line: every sample when there are at most two
/// per pixel column, otherwise the minimum and maximum of each pixel column ([`decimate_min_max`], as on the
/// exported page), the one nearer the column's first sample first. Missing samples (NaN) end a run, so the paper
/// stays blank where nothing was recorded rather than showing a line bridging the gap. `held` is the lead's
/// samples from sample `held.1` of the recording on (a span of a long recording's filtered signal, or the whole
/// lead from 0).
#[must_use]
pub fn trace_points(
    geo: &SheetGeometry,
    row: &isoline_core::paper::Row,
    cell: &Cell,
    held: (&[f32], usize),
    rate_hz: f64,
    pixels_per_point: f32,
) -> Vec<Vec<Pos2>> {
    let paper = geo.page.paper;
    let (samples, from) = held;
    let end = from + samples.len();
    let first = ((cell.t0_s * rate_hz).floor().max(0.0) as usize).max(from);
    let last = ((cell.t1_s * rate_hz).ceil() as usize).min(end.saturating_sub(1));
    if end == from || first >= last {
        return Vec::new();
    }
    let sample = |k: usize| samples[k - from];
    let y = |uv: f32| geo.screen_from_paper(0.0, row.y_from_uv(&paper, f64::from(uv), cell.inverted)).y;
    let x_of = |k: usize| geo.x_of_time(cell, k as f64 / rate_hz);
    let px_per_s = paper.speed_mm_per_s as f32 * geo.points_per_mm * pixels_per_point;
    let samples_per_px = rate_hz as f32 / px_per_s.max(1e-3);
    let mut runs: Vec<Vec<Pos2>> = Vec::new();
    let mut run: Vec<Pos2> = Vec::new();
    if samples_per_px <= 2.0 {
        for k in first..=last {
            if sample(k).is_finite() {
                run.push(Pos2::new(x_of(k), y(sample(k))));
            } else if !run.is_empty() {
                runs.push(std::mem::take(&mut run));
            }
        }
    } else {
        // Same min/max column decimation as the exported page, in physical pixels; a column without a valid
        // sample is left out, and the run breaks there.
        let x0_px = f64::from(x_of(first) * pixels_per_point);
        let px_per_sample = f64::from(px_per_s) / rate_hz;
        let mut prev_x = None;
        for c in decimate_min_max(&samples[first - from..=last - from], x0_px, px_per_sample) {
            if prev_x.is_some_and(|x| x + 1 != c.x) && !run.is_empty() {
                runs.push(std::mem::take(&mut run));
            }
            prev_x = Some(c.x);
            let x = c.x as f32 / pixels_per_point;
            // Start with the extreme nearer the column's first sample, so the line follows the order of the
            // samples.
            let (p, q) =
                if (c.first - c.min).abs() <= (c.first - c.max).abs() { (c.min, c.max) } else { (c.max, c.min) };
            run.push(Pos2::new(x, y(p)));
            run.push(Pos2::new(x, y(q)));
        }
    }
    if !run.is_empty() {
        runs.push(run);
    }
    runs
}

#[cfg(test)]
mod tests {
    use super::*;
    use isoline_core::paper::{Layout, PageSpec};
    use isoline_core::recording::{Lead, LeadName, Meta};

    #[test]
    fn a_gap_leaves_the_paper_blank() {
        // 10 s of lead II at 500 Hz with nothing recorded from 3 to 4 s. Before, the points on either side were
        // joined, and the Sheet drew a straight line across the gap (the exported page already left it blank).
        let mut samples: Vec<f32> = (0..5000).map(|k| (k as f32 * 0.05).sin() * 500.0).collect();
        samples[1500..2000].fill(f32::NAN);
        let rec = Recording {
            leads: vec![Lead { name: LeadName::parse("II"), samples }],
            sample_rate: isoline_core::units::Hertz::from_hz(500.0).unwrap_or_else(|_| unreachable!()),
            start: None,
            meta: Meta::default(),
            annotations: Vec::new(),
        };
        let spec = PageSpec { layout: Layout::Strip(LeadName::parse("II")), ..PageSpec::default() };
        // 4 points per mm: 5 samples per pixel column (decimated); 40: half a sample per column (every sample).
        for points_per_mm in [4.0f32, 40.0] {
            let geo = SheetGeometry { origin: Pos2::ZERO, points_per_mm, page: spec.page(&rec) };
            let (row, cell) = (&geo.page.rows[0], &geo.page.rows[0].cells[0]);
            let runs = trace_points(&geo, row, cell, (&rec.leads[0].samples, 0), 500.0, 1.0);
            assert_eq!(runs.len(), 2, "{points_per_mm} points/mm");
            let (gap_from, gap_to) = (geo.x_of_time(cell, 3.0), geo.x_of_time(cell, 3.998));
            let inside = runs.iter().flatten().filter(|p| p.x > gap_from + 1.0 && p.x < gap_to - 1.0).count();
            assert_eq!(inside, 0, "{points_per_mm} points/mm");
        }
    }
}
