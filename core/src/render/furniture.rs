//! Page furniture around the traces: the header (recording, start, paper settings, reader, stage, patient
//! fields only when asked), the measurement box and the caution footer.

use super::RenderInput;
use super::canvas::Canvas;
use super::text::{Align, Fonts, Style};
use crate::analysis::LONG_RECORDING_S;
use crate::paper::{Palette, margins};
use crate::recording::OLDEST_AGE_SHOWN;
use crate::timescale::clock;

/// Header text: the first line's title and paper settings, then lines of fields.
pub(super) struct Header {
    pub title: String,
    pub paper: String,
    pub fields: Vec<String>,
    pub patient: Vec<String>,
}

/// Builds the header. Patient fields come from `Meta::deidentified` unless `identify` is set.
pub(super) fn header(input: &RenderInput) -> Header {
    let rec = input.recording;
    let spec = &input.spec;
    let title = if input.title.trim().is_empty() { "Recording".to_string() } else { input.title.clone() };
    let filter = input.filter_text.clone().unwrap_or_else(|| "unfiltered".to_string());
    let paper = format!("{}   {}", spec.paper.describe(), filter);
    let mut fields = Vec::new();
    // The recording date can identify a patient: printed only when asked.
    if let Some(s) = rec.start.filter(|_| input.identify) {
        fields.push(format!(
            "Start: {:04}-{:02}-{:02} {:02}:{:02}:{:02}",
            s.year(),
            u8::from(s.month()),
            s.day(),
            s.hour(),
            s.minute(),
            s.second()
        ));
    }
    // Most important first: a narrow page cuts the line from the right.
    for (k, v) in &input.header {
        fields.push(format!("{k}: {v}"));
    }
    // The window as far as the recording goes: past its end the page is blank, and said to be.
    let (a, asked) = (spec.start_s, spec.start_s + spec.seconds);
    let b = asked.min(input.recording_s);
    // In a long recording (an hour or more), the elapsed clock time too: 43200 s is hard to place in a Holter day.
    let clock = if input.recording_s >= LONG_RECORDING_S {
        format!(" ({}\u{2013}{})", clock(a), clock(b))
    } else {
        String::new()
    };
    let ends = if b < asked { ", where the recording ends" } else { "" };
    fields.push(format!("Window: {a:.2}\u{2013}{b:.2} s{clock}{ends}"));
    fields.push(format!("Layout: {} ({})", spec.layout, spec.order.as_str()));
    fields.push(format!("{} Hz", rec.sample_rate.hz()));
    let meta = if input.identify { rec.meta.clone() } else { rec.meta.deidentified() };
    let mut patient = Vec::new();
    if let Some(v) = &meta.patient_name {
        patient.push(format!("Patient: {v}"));
    }
    if let Some(v) = &meta.patient_id {
        patient.push(format!("ID: {v}"));
    }
    if let Some(v) = &meta.birth_date {
        patient.push(format!("Born: {v}"));
    }
    if let Some(v) = &meta.sex {
        patient.push(format!("Sex: {v}"));
    }
    if let Some(v) = meta.age_years {
        let or_older = if !input.identify && v.round() >= OLDEST_AGE_SHOWN { " or older" } else { "" };
        patient.push(format!("Age: {v:.0}{or_older}"));
    }
    if let Some(v) = &meta.recording_info {
        patient.push(format!("Note: {v}"));
    }
    if !input.identify {
        patient.push("De-identified".to_string());
    }
    Header { title, paper, fields, patient }
}

/// Every header line as plain text, as drawn (before any cut to the page width). For checks and logs.
#[must_use]
pub fn header_lines(input: &RenderInput) -> Vec<String> {
    let h = header(input);
    vec![format!("{}   {}", h.title, h.paper), h.fields.join("   "), h.patient.join("   ")]
}

pub(super) const BODY: f64 = 8.0;
const TITLE: f64 = 10.0;
const GAP_MM: f64 = 2.0;

/// Draws the header band (top `margins::HEADER_MM` of the page).
pub(super) fn draw_header(canvas: &mut Canvas, fonts: &Fonts, input: &RenderInput, width_mm: f64, pal: &Palette) {
    let h = header(input);
    let ppm = canvas.ppm;
    let left = margins::LEFT_MM;
    let right = width_mm - margins::RIGHT_MM;
    let body = Style { pt: BODY, bold: false, color: pal.text };
    let title = Style { pt: TITLE, bold: true, color: pal.text };
    let y1 = 1.5 + Fonts::cap_mm(title);
    let y2 = y1 + Fonts::line_mm(body) + 0.6;
    let y3 = y2 + Fonts::line_mm(body);
    let paper_w = fonts.width_mm(&h.paper, body, ppm).min((right - left) * 0.5);
    let paper_text = fonts.fit(&h.paper, body, ppm, paper_w);
    fonts.draw(canvas, &paper_text, right, y1, body, Align::Right);
    let t = fonts.fit(&h.title, title, ppm, right - left - paper_w - GAP_MM * 2.0);
    fonts.draw(canvas, &t, left, y1, title, Align::Left);
    let line2 = fonts.fit(&h.fields.join("   "), body, ppm, right - left);
    fonts.draw(canvas, &line2, left, y2, body, Align::Left);
    let line3 = fonts.fit(&h.patient.join("   "), body, ppm, right - left);
    fonts.draw(canvas, &line3, left, y3, body, Align::Left);
}

/// Caution lines wrapped to the page width.
pub(super) fn caution_lines(fonts: &Fonts, width_mm: f64, ppm: f64) -> Vec<String> {
    let st = Style { pt: BODY, bold: true, color: [0, 0, 0, 255] };
    fonts.wrap(crate::CAUTION, st, ppm, width_mm - margins::LEFT_MM - margins::RIGHT_MM)
}

/// Height of the footer band for these caution lines, mm (at least `margins::FOOTER_MM`).
pub(super) fn footer_height_mm(lines: usize) -> f64 {
    let st = Style { pt: BODY, bold: true, color: [0, 0, 0, 255] };
    (3.0 + lines as f64 * Fonts::line_mm(st)).max(margins::FOOTER_MM)
}

/// Draws the caution footer starting at paper y `top_mm`.
pub(super) fn draw_footer(canvas: &mut Canvas, fonts: &Fonts, lines: &[String], top_mm: f64, pal: &Palette) {
    let st = Style { pt: BODY, bold: true, color: pal.text };
    let mut y = top_mm + 2.0 + Fonts::cap_mm(st);
    for l in lines {
        fonts.draw(canvas, l, margins::LEFT_MM, y, st, Align::Left);
        y += Fonts::line_mm(st);
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::paper::PageSpec;
    use crate::recording::{Lead, LeadName, Meta, Recording};
    use crate::units::Hertz;

    fn recording(seconds: usize) -> Recording {
        Recording {
            leads: vec![Lead { name: LeadName::parse("II"), samples: vec![0.0; seconds * 10] }],
            sample_rate: Hertz::from_hz(10.0).unwrap_or_else(|_| unreachable!()),
            start: None,
            meta: Meta::default(),
            annotations: Vec::new(),
        }
    }

    #[test]
    fn a_long_recordings_window_also_reads_as_clock_time() {
        let spec = PageSpec { start_s: 43_200.0, seconds: 10.0, ..PageSpec::default() };
        let day = recording(86_400);
        let line = header_lines(&RenderInput::new(&day, spec, 100.0))[1].clone();
        assert!(line.contains("Window: 43200.00\u{2013}43210.00 s (12:00:00\u{2013}12:00:10)"), "{line}");
        let spec = PageSpec { start_s: 0.0, seconds: 10.0, ..PageSpec::default() };
        let short = recording(10);
        let line = header_lines(&RenderInput::new(&short, spec, 100.0))[1].clone();
        assert!(line.contains("Window: 0.00\u{2013}10.00 s   "), "{line}");
        // A window running past the end names the end, not a time that was never recorded.
        let spec = PageSpec { start_s: 5.0, seconds: 10.0, ..PageSpec::default() };
        let line = header_lines(&RenderInput::new(&short, spec, 100.0))[1].clone();
        assert!(line.contains("Window: 5.00\u{2013}10.00 s, where the recording ends   "), "{line}");
    }
}
