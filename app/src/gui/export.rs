//! Export of the Sheet as it stands to PNG through `core::render` (the same paper geometry as the screen), with
//! the review's calipers, the Ledger and the caution. De-identified: patient fields are never printed here.

use std::path::Path;

use anyhow::Context as _;
use isoline_core::paper::PageSpec;
use isoline_core::render::{self, LedgerValue, RenderInput};
use isoline_core::review::Origin;

use super::IsolineApp;

/// Resolution of exported pages, dots per inch.
// Common practice, no source: 300 dpi is the usual print resolution.
pub const EXPORT_DPI: f64 = 300.0;

impl IsolineApp {
    /// Draws the current window of the Sheet with calipers and the Ledger and writes it as PNG (atomically).
    ///
    /// # Errors
    /// No recording open, or rendering or writing failed.
    pub fn export_png(&mut self, path: &Path) -> anyhow::Result<()> {
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
        let mut input = RenderInput::new(loaded.shown(view.filters), spec, EXPORT_DPI);
        input.scheme = view.scheme;
        input.title = loaded.path.file_name().map_or_else(String::new, |n| n.to_string_lossy().into_owned());
        input.filter_text = match (&loaded.analysis, view.filters) {
            (Some(a), true) => Some(a.filtered.description.clone()),
            _ => None,
        };
        input.header = render::header_fields(self.settings.reader.as_deref(), self.review.stage);
        input.calipers = self.doc.calipers.clone();
        // A reviewed value is the reader's only where it differs from the automatic one (as the saved review
        // keeps it).
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
        input.ledger = render::ledger_lines_from(&values);
        let pixmap = render::render_page(&input)?;
        let bytes = render::encode_png(&pixmap, EXPORT_DPI)?;
        render::write_png_atomic(path, &bytes)?;
        Ok(())
    }
}
