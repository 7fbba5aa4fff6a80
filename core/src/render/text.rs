//! Text with the bundled DejaVu Sans (Bitstream Vera licence, `assets/LICENSE-DejaVu.txt`), rasterised by
//! ab_glyph and blended into the pixmap. Sizes are in typographic points (1 pt = 1/72 inch = 25.4/72 mm).

use ab_glyph::{Font, FontRef, PxScale, ScaleFont, point};

use super::RenderError;
use super::canvas::Canvas;
use crate::paper::Rgba;

static REGULAR: &[u8] = include_bytes!("../../../assets/DejaVuSans.ttf");
static BOLD: &[u8] = include_bytes!("../../../assets/DejaVuSans-Bold.ttf");

/// Millimetres per typographic point.
const MM_PER_PT: f64 = 25.4 / 72.0;

/// A text style.
#[derive(Debug, Clone, Copy)]
pub(super) struct Style {
    /// Em size in points.
    pub pt: f64,
    /// Bold face.
    pub bold: bool,
    /// Colour.
    pub color: Rgba,
}

/// Horizontal anchor of drawn text.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub(super) enum Align {
    Left,
    Center,
    Right,
}

/// The two faces.
pub(super) struct Fonts {
    regular: FontRef<'static>,
    bold: FontRef<'static>,
}

impl Fonts {
    /// Parses the bundled fonts.
    pub fn load() -> Result<Self, RenderError> {
        Ok(Self {
            regular: FontRef::try_from_slice(REGULAR).map_err(|_| RenderError::Font)?,
            bold: FontRef::try_from_slice(BOLD).map_err(|_| RenderError::Font)?,
        })
    }

    fn face(&self, style: Style) -> &FontRef<'static> {
        if style.bold { &self.bold } else { &self.regular }
    }

    fn scale(&self, style: Style, ppm: f64) -> PxScale {
        let font = self.face(style);
        let em_px = style.pt * MM_PER_PT * ppm;
        let units = f64::from(font.units_per_em().unwrap_or(2048.0));
        PxScale::from((em_px * f64::from(font.height_unscaled()) / units) as f32)
    }

    /// Advance width of `text`, paper mm.
    pub fn width_mm(&self, text: &str, style: Style, ppm: f64) -> f64 {
        let font = self.face(style).as_scaled(self.scale(style, ppm));
        let mut w = 0.0f32;
        let mut prev = None;
        for ch in text.chars() {
            let id = font.glyph_id(ch);
            if let Some(p) = prev {
                w += font.kern(p, id);
            }
            w += font.h_advance(id);
            prev = Some(id);
        }
        f64::from(w) / ppm
    }

    /// Height of capital letters above the baseline, paper mm (about 0.73 em for DejaVu Sans).
    pub fn cap_mm(style: Style) -> f64 {
        style.pt * MM_PER_PT * 0.73
    }

    /// Depth of descenders below the baseline, with a little room, paper mm (0.3 em).
    pub fn descent_mm(style: Style) -> f64 {
        style.pt * MM_PER_PT * 0.3
    }

    /// Line spacing for a style, paper mm.
    pub fn line_mm(style: Style) -> f64 {
        style.pt * MM_PER_PT * 1.25
    }

    /// The longest prefix of `text` (ending in "…" when cut) no wider than `max_mm`.
    pub fn fit(&self, text: &str, style: Style, ppm: f64, max_mm: f64) -> String {
        if self.width_mm(text, style, ppm) <= max_mm {
            return text.to_string();
        }
        let chars: Vec<char> = text.chars().collect();
        let mut n = chars.len();
        while n > 0 {
            n -= 1;
            let s: String = chars[..n].iter().collect::<String>() + "\u{2026}";
            if self.width_mm(&s, style, ppm) <= max_mm {
                return s;
            }
        }
        String::new()
    }

    /// Splits `text` into lines no wider than `max_mm`, breaking at spaces (a single over-long word is cut).
    pub fn wrap(&self, text: &str, style: Style, ppm: f64, max_mm: f64) -> Vec<String> {
        let mut lines = Vec::new();
        let mut cur = String::new();
        for word in text.split_whitespace() {
            let candidate = if cur.is_empty() { word.to_string() } else { format!("{cur} {word}") };
            if self.width_mm(&candidate, style, ppm) <= max_mm || cur.is_empty() {
                cur = candidate;
            } else {
                lines.push(std::mem::take(&mut cur));
                cur = word.to_string();
            }
        }
        if !cur.is_empty() {
            lines.push(cur);
        }
        lines.into_iter().map(|l| self.fit(&l, style, ppm, max_mm)).collect()
    }

    /// Draws `text` with its baseline at paper y and its anchor at paper x. Returns the width in mm.
    pub fn draw(
        &self,
        canvas: &mut Canvas,
        text: &str,
        x_mm: f64,
        baseline_mm: f64,
        style: Style,
        align: Align,
    ) -> f64 {
        let w_mm = self.width_mm(text, style, canvas.ppm);
        let x0 = match align {
            Align::Left => x_mm,
            Align::Center => x_mm - w_mm / 2.0,
            Align::Right => x_mm - w_mm,
        };
        let scale = self.scale(style, canvas.ppm);
        let font = self.face(style).as_scaled(scale);
        let (pw, ph) = (canvas.pixmap.width() as i64, canvas.pixmap.height() as i64);
        let data = canvas.pixmap.data_mut();
        let [r, g, b, a] = style.color.map(f32::from);
        let mut x = canvas_px(x0, canvas.ppm);
        let y = canvas_px(baseline_mm, canvas.ppm);
        let mut prev = None;
        for ch in text.chars() {
            let id = font.glyph_id(ch);
            if let Some(p) = prev {
                x += font.kern(p, id);
            }
            let glyph = id.with_scale_and_position(scale, point(x, y));
            x += font.h_advance(id);
            prev = Some(id);
            let Some(outlined) = font.outline_glyph(glyph) else { continue };
            let bounds = outlined.px_bounds();
            outlined.draw(|gx, gy, coverage| {
                let px = bounds.min.x as i64 + i64::from(gx);
                let py = bounds.min.y as i64 + i64::from(gy);
                if px < 0 || py < 0 || px >= pw || py >= ph {
                    return;
                }
                let k = coverage.clamp(0.0, 1.0) * a / 255.0;
                let i = ((py * pw + px) * 4) as usize;
                // Source-over on premultiplied RGBA.
                for (j, src) in [r, g, b, 255.0].into_iter().enumerate() {
                    let dst = f32::from(data[i + j]);
                    data[i + j] = (src * k + dst * (1.0 - k)).round().clamp(0.0, 255.0) as u8;
                }
            });
        }
        w_mm
    }
}

fn canvas_px(mm: f64, ppm: f64) -> f32 {
    (mm * ppm) as f32
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn fonts_load_and_measure() -> Result<(), RenderError> {
        let f = Fonts::load()?;
        let st = Style { pt: 10.0, bold: false, color: [0, 0, 0, 255] };
        let w = f.width_mm("QTc 440 ms", st, 300.0 / 25.4);
        // Plausible width for ten characters at 10 pt (em 3.53 mm): between 0.4 and 0.8 em per character.
        assert!(w > 14.0 && w < 28.0, "{w}");
        let cut = f.fit("a rather long line of text", st, 300.0 / 25.4, 20.0);
        assert!(cut.ends_with('\u{2026}') && f.width_mm(&cut, st, 300.0 / 25.4) <= 20.0);
        let lines = f.wrap("one two three four five six seven", st, 300.0 / 25.4, 25.0);
        assert!(lines.len() >= 2);
        assert_eq!(lines.join(" "), "one two three four five six seven");
        Ok(())
    }
}
