//! Export of the Sheet as it stands to PNG through `core::render` (the same paper geometry as the screen), with
//! the review's calipers, the Ledger and the caution. De-identified: patient fields are never printed here.

use std::path::Path;

use anyhow::Context as _;
use isoline_core::analysis::Span;
use isoline_core::measure::{RangeNote, ranges};
use isoline_core::paper::PageSpec;
use isoline_core::render::{self, LedgerLine, LedgerValue, RenderInput};
use isoline_core::review::Origin;

use super::IsolineApp;
use super::ledger::LedgerRow;

/// Resolution of exported pages, dots per inch.
// Common practice, no source: 300 dpi is the usual print resolution.
pub const EXPORT_DPI: f64 = 300.0;

impl IsolineApp {
    /// Draws the current window of the Sheet with calipers and the Ledger and writes it as PNG (atomically).
    ///
    /// # Errors
    /// No recording open, or rendering or writing failed.
    pub fn export_png(&mut self, path: &Path) -> anyhow::Result<()> {
        // A name that is not .png is refused before the page is drawn, as on the command line.
        render::check_png_name(path)?;
        let rows = self.cached_ledger_rows();
        let loaded = self.loaded.as_ref().context("no recording is open")?;
        let view = &self.settings.view;
        let spec = PageSpec {
            layout: view.layout.clone(),
            order: view.order,
            paper: view.paper,
            start_s: self.start_s,
            seconds: self.window_s,
        };
        let recording_s = loaded.recording.duration_s();
        // The window's samples, filtered as on the Sheet (a span: a long recording is never filtered whole).
        let (lo, hi) = spec.sample_range(loaded.recording.sample_rate.hz());
        let (span, filter_text) = match (&loaded.analysis, view.filters) {
            (Some(a), true) => (a.filtered_span(&loaded.recording, lo, hi), Some(a.filters.description.clone())),
            _ => (Span::cut(&loaded.recording, lo, hi), None),
        };
        let mut input = RenderInput::of_span(&span, recording_s, spec, EXPORT_DPI);
        input.scheme = view.scheme;
        let name = loaded.path.file_name().map_or_else(String::new, |n| n.to_string_lossy().into_owned());
        // The recording's identity: from its review when one is open, else read again from the file.
        input.title = render::page_title(&name, input.identify, || match self.review.base.as_ref() {
            Some(r) => Ok(r.recording.sha256.to_ascii_lowercase()),
            None => isoline_core::review::signal_sha256(&loaded.path)
                .with_context(|| format!("reading {} for its identity", loaded.path.display())),
        })?;
        input.filter_text = filter_text;
        input.header = render::header_fields(self.settings.reader.as_deref(), self.review.stage);
        input.header.extend(loaded.analysis.as_ref().and_then(|a| render::rhythm_field(&a.measurements)));
        input.calipers = self.doc.calipers.clone();
        input.ledger = export_ledger(&rows);
        // The Ledger's range notes, which follow the reader's values.
        let notes: Vec<RangeNote> = rows.iter().flat_map(|r| r.notes.iter().cloned()).collect();
        input.notes = render::signal_notes(&loaded.recording);
        input.notes.extend(ranges::condensed(&notes));
        let pixmap = render::render_page(&input)?;
        let bytes = render::encode_png(&pixmap, EXPORT_DPI)?;
        render::write_png_atomic(path, &bytes)?;
        Ok(())
    }
}

/// The exported box from the Ledger rows, through the same builder as `isoline render`. A reviewed value is
/// the reader's only where it differs from the automatic one (as the saved review keeps it).
fn export_ledger(rows: &[LedgerRow]) -> Vec<LedgerLine> {
    let values: Vec<LedgerValue<'_>> = rows
        .iter()
        .map(|r| LedgerValue {
            key: r.key,
            label: &r.label,
            unit: r.unit,
            auto: r.auto,
            reviewed: r.reviewed.filter(|_| matches!(r.origin, Some(Origin::Moved | Origin::Placed))),
        })
        .collect();
    render::ledger_lines_from(&values)
}

#[cfg(test)]
mod tests {
    use super::*;

    fn row(key: &'static str, unit: &'static str, auto: f64, reviewed: f64, origin: Origin) -> LedgerRow {
        let (auto, reviewed, origin) = (Some(auto), Some(reviewed), Some(origin));
        LedgerRow { key, label: key.to_owned(), unit, auto, reviewed, origin, notes: Vec::new() }
    }

    #[test]
    fn box_shows_only_the_readers_values_with_print_units() {
        let rows = [
            row("qt_ms", "ms", 400.0, 420.0, Origin::Moved),
            row("qrs_ms", "ms", 96.0, 96.0, Origin::Auto),
            row("axis_qrs_deg", "deg", -30.0, -30.0, Origin::Auto),
            row("rr_sdnn_ms", "ms", 40.0, 40.0, Origin::Auto),
        ];
        let lines = export_ledger(&rows);
        let got: Vec<(&str, Option<&str>, Option<&str>, &str)> = lines
            .iter()
            .map(|l| (l.label.as_str(), l.auto.as_deref(), l.reviewed.as_deref(), l.unit.as_str()))
            .collect();
        assert_eq!(
            got,
            [
                ("qrs_ms", Some("96"), None, "ms"),
                ("qt_ms", Some("400"), Some("420"), "ms"),
                ("axis_qrs_deg", Some("\u{2212}30"), None, "\u{b0}"),
            ]
        );
    }
}
