//! The notes band under the measurement box: the range notes of the values shown (a value outside its usual
//! range, inconsistent lead gains), each with its source, wrapped to the page width.

use super::canvas::Canvas;
use super::furniture::BODY;
use super::text::{Align, Fonts, Style};
use crate::paper::{Palette, margins};

/// Space above and below the notes, mm.
const PAD_MM: f64 = 1.0;

fn style(pal: &Palette) -> Style {
    Style { pt: BODY, bold: false, color: pal.text }
}

/// The notes as printed lines: each note starts a line with "Note: " and wraps within the page margins.
pub(super) fn lines(fonts: &Fonts, notes: &[String], width_mm: f64, ppm: f64, pal: &Palette) -> Vec<String> {
    let max_mm = width_mm - margins::LEFT_MM - margins::RIGHT_MM;
    notes
        .iter()
        .filter(|n| !n.trim().is_empty())
        .flat_map(|n| fonts.wrap(&format!("Note: {}", n.trim()), style(pal), ppm, max_mm))
        .collect()
}

/// Height of the band for `count` printed lines, mm (0 without notes).
pub(super) fn height_mm(count: usize) -> f64 {
    if count == 0 {
        return 0.0;
    }
    let st = Style { pt: BODY, bold: false, color: [0; 4] };
    2.0 * PAD_MM + Fonts::cap_mm(st) + (count - 1) as f64 * Fonts::line_mm(st) + Fonts::descent_mm(st)
}

/// Draws the printed lines in the band starting at paper y `top_mm`.
pub(super) fn draw(canvas: &mut Canvas, fonts: &Fonts, lines: &[String], top_mm: f64, pal: &Palette) {
    let st = style(pal);
    let mut baseline = top_mm + PAD_MM + Fonts::cap_mm(st);
    for l in lines {
        fonts.draw(canvas, l, margins::LEFT_MM, baseline, st, Align::Left);
        baseline += Fonts::line_mm(st);
    }
}

#[cfg(test)]
mod tests {
    use crate::paper::{Layout, PageSpec};
    use crate::recording::{Lead, Meta, Recording, StandardLead};
    use crate::render::{RenderInput, render_page};
    use crate::units::Hertz;

    fn dark_rows(p: &tiny_skia::Pixmap, from: u32, to: u32) -> usize {
        (from..to)
            .filter(|&y| (0..p.width()).any(|x| p.pixel(x, y).is_some_and(|c| c.red() < 80 && c.green() < 80)))
            .count()
    }

    #[test]
    fn notes_get_a_band_of_their_own_above_the_caution() {
        let recording = Recording {
            leads: vec![Lead { name: StandardLead::II.into(), samples: vec![0.0; 2500] }],
            sample_rate: Hertz::from_hz(500.0).unwrap_or_else(|_| unreachable!()),
            start: None,
            meta: Meta::default(),
            annotations: vec![],
        };
        let spec = PageSpec { layout: Layout::Strip(StandardLead::II.into()), seconds: 5.0, ..PageSpec::default() };
        let plain = RenderInput::new(&recording, spec, 100.0);
        let long = "QTc (Bazett) 560 ms — above 500 ms (a source). ".repeat(8);
        let noted =
            RenderInput { notes: vec!["Heart rate 45 bpm — below the usual range".into(), long], ..plain.clone() };
        let (a, b) = (render_page(&plain), render_page(&noted));
        let (a, b) = (a.unwrap_or_else(|e| panic!("{e}")), b.unwrap_or_else(|e| panic!("{e}")));
        assert_eq!(a.width(), b.width());
        // Three or more printed lines (the long note wraps) at 100 dpi: ≥ 3 × 3.5 mm ≈ 41 px taller.
        let extra = b.height() - a.height();
        assert!(extra >= 40, "page {} px taller", extra);
        // The traces and grid are where they were.
        let grid_bottom = a.height() - 60;
        assert!(
            a.data()[..(grid_bottom * a.width() * 4) as usize] == b.data()[..(grid_bottom * b.width() * 4) as usize]
        );
        // Three or more further lines of dark text (≈ 8 px of glyph rows each at 100 dpi).
        assert!(dark_rows(&b, 0, b.height()) >= dark_rows(&a, 0, a.height()) + 20);
    }
}
