//! The drawing surface: a tiny-skia pixmap with the page's scale (pixels per paper mm) and snapped helpers.
//!
//! Coordinate spaces: "paper" is mm from the page's top-left corner (as in [`crate::paper`]); "image" is pixels.
//! `image_from_paper(mm) = mm × dpi / 25.4`.

use tiny_skia::{Color, LineCap, LineJoin, Paint, Path, Pixmap, Rect, Stroke, StrokeDash, Transform};

use crate::paper::Rgba;

/// A pixmap and its scale.
pub(super) struct Canvas {
    /// The image.
    pub pixmap: Pixmap,
    /// Pixels per paper millimetre.
    pub ppm: f64,
}

pub(super) fn color(c: Rgba) -> Color {
    Color::from_rgba8(c[0], c[1], c[2], c[3])
}

fn paint(c: Rgba, anti_alias: bool) -> Paint<'static> {
    let mut p = Paint::default();
    p.set_color(color(c));
    p.anti_alias = anti_alias;
    p
}

impl Canvas {
    /// Image x or y (px) of a paper coordinate (mm).
    pub fn px(&self, mm: f64) -> f32 {
        (mm * self.ppm) as f32
    }

    /// Width in whole pixels (at least 1) of a line `mm` thick.
    pub fn line_px(&self, mm: f64) -> u32 {
        (mm * self.ppm).round().max(1.0) as u32
    }

    /// Fills an axis-aligned rectangle given in image pixels (not snapped; anti-aliased edges).
    pub fn fill_rect_px(&mut self, x: f32, y: f32, w: f32, h: f32, c: Rgba) {
        if let Some(r) = Rect::from_xywh(x, y, w, h) {
            self.pixmap.fill_rect(r, &paint(c, true), Transform::identity(), None);
        }
    }

    /// A crisp vertical line at paper x, `width` whole pixels wide and centred on the exact position, from
    /// paper y0 to y1. Colours are exact (no anti-aliasing), which the geometry tests rely on.
    pub fn vline(&mut self, x_mm: f64, y0_mm: f64, y1_mm: f64, width: u32, c: Rgba) {
        let x = (x_mm * self.ppm - f64::from(width) / 2.0).round();
        let y0 = (y0_mm * self.ppm).round();
        let y1 = (y1_mm * self.ppm).round();
        if let Some(r) = Rect::from_ltrb(x as f32, y0 as f32, (x + f64::from(width)) as f32, y1 as f32) {
            self.pixmap.fill_rect(r, &paint(c, false), Transform::identity(), None);
        }
    }

    /// A crisp horizontal line at paper y; see [`Canvas::vline`].
    pub fn hline(&mut self, y_mm: f64, x0_mm: f64, x1_mm: f64, width: u32, c: Rgba) {
        let y = (y_mm * self.ppm - f64::from(width) / 2.0).round();
        let x0 = (x0_mm * self.ppm).round();
        let x1 = (x1_mm * self.ppm).round();
        if let Some(r) = Rect::from_ltrb(x0 as f32, y as f32, x1 as f32, (y + f64::from(width)) as f32) {
            self.pixmap.fill_rect(r, &paint(c, false), Transform::identity(), None);
        }
    }

    /// Strokes a path given in image pixels, anti-aliased, with round joins and caps; `dash_mm` gives an
    /// on/off pattern in paper mm.
    pub fn stroke(&mut self, path: &Path, c: Rgba, width_mm: f64, dash_mm: Option<(f64, f64)>) {
        self.stroke_with(path, c, width_mm, dash_mm, LineJoin::Round);
    }

    /// Strokes a long polyline (a trace): bevel joins, which look the same at trace widths and avoid the many
    /// arc edges that round joins add to paths of thousands of vertices.
    pub fn stroke_polyline(&mut self, path: &Path, c: Rgba, width_mm: f64) {
        self.stroke_with(path, c, width_mm, None, LineJoin::Bevel);
    }

    fn stroke_with(&mut self, path: &Path, c: Rgba, width_mm: f64, dash_mm: Option<(f64, f64)>, join: LineJoin) {
        let stroke = Stroke {
            width: (width_mm * self.ppm).max(1.0) as f32,
            line_cap: if join == LineJoin::Round { LineCap::Round } else { LineCap::Butt },
            line_join: join,
            dash: dash_mm.and_then(|(on, off)| StrokeDash::new(vec![self.px(on), self.px(off)], 0.0)),
            ..Stroke::default()
        };
        self.pixmap.stroke_path(path, &paint(c, true), &stroke, Transform::identity(), None);
    }

    /// A straight segment between two paper points.
    pub fn segment(&mut self, a: (f64, f64), b: (f64, f64), c: Rgba, width_mm: f64, dash_mm: Option<(f64, f64)>) {
        let mut pb = tiny_skia::PathBuilder::new();
        pb.move_to(self.px(a.0), self.px(a.1));
        pb.line_to(self.px(b.0), self.px(b.1));
        if let Some(p) = pb.finish() {
            self.stroke(&p, c, width_mm, dash_mm);
        }
    }

    /// Fills a paper-mm rectangle (anti-aliased).
    pub fn fill_rect_mm(&mut self, x: f64, y: f64, w: f64, h: f64, c: Rgba) {
        self.fill_rect_px(self.px(x), self.px(y), self.px(w), self.px(h), c);
    }

    /// Outline of a paper-mm rectangle.
    pub fn outline_mm(&mut self, x: f64, y: f64, w: f64, h: f64, c: Rgba, width_mm: f64) {
        if let Some(r) = Rect::from_xywh(self.px(x), self.px(y), self.px(w), self.px(h)) {
            let path = tiny_skia::PathBuilder::from_rect(r);
            self.stroke(&path, c, width_mm, None);
        }
    }
}
