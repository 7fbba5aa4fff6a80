//! The Ledger: every measurement with its automatic value, reviewed value, difference, origin, unit and range
//! note. Reviewed intervals follow the marks on the Beat lens; a typed value or a caliper reading overrides them.

use isoline_core::beat::Boundaries;

use super::command::Command;
use super::derived::median_rr_ms;
use super::intervals::{Intervals, Qtc};
use super::state::{Document, Loaded, Origin};

/// One Ledger row.
#[derive(Debug, Clone, PartialEq)]
pub struct LedgerRow {
    /// Stable key (`qt_ms`, `qtc_bazett_ms`, …), as in `measure --format json`.
    pub key: &'static str,
    /// Label shown to the reader.
    pub label: &'static str,
    /// Unit.
    pub unit: &'static str,
    /// Value computed by Isoline.
    pub auto: Option<f64>,
    /// Value after review.
    pub reviewed: Option<f64>,
    /// Where the reviewed value came from.
    pub origin: Option<Origin>,
    /// Range note with its source, when the reviewed value is outside the usual range.
    pub note: Option<String>,
}

impl LedgerRow {
    /// Reviewed minus automatic.
    #[must_use]
    pub fn difference(&self) -> Option<f64> {
        Some(self.reviewed? - self.auto?)
    }
}

/// Keys a time caliper's reading can be taken into.
pub const CALIPER_KEYS: [(&str, &str); 5] =
    [("rr_ms", "RR"), ("p_duration_ms", "P duration"), ("pr_ms", "PR"), ("qrs_ms", "QRS"), ("qt_ms", "QT")];

/// Computes the Ledger rows from the automatic marks, the review's marks and reviewed values.
#[must_use]
pub fn rows(loaded: &Loaded, doc: &Document) -> Vec<LedgerRow> {
    let fs = loaded.representative.as_ref().map_or(loaded.recording.sample_rate.hz(), |r| r.rate_hz);
    let auto_iv = Intervals::from_marks(&loaded.auto_marks, fs);
    let rev_marks: Boundaries = doc.effective_marks(&loaded.auto_marks);
    let rev_iv = Intervals::from_marks(&rev_marks, fs);
    let auto_rr = median_rr_ms(&loaded.beats, loaded.recording.sample_rate.hz());
    let pick = |key: &str, computed: Option<f64>| doc.reviewed.get(key).copied().or(computed);
    let rr = pick("rr_ms", auto_rr);
    let qt = pick("qt_ms", rev_iv.qt_ms);
    let female = loaded.recording.meta.sex.as_deref().is_some_and(|s| s.trim().to_ascii_lowercase().starts_with('f'));
    let auto_qtc = auto_iv.qt_ms.zip(auto_rr).and_then(|(q, r)| Qtc::new(q, r));
    let rev_qtc = qt.zip(rr).and_then(|(q, r)| Qtc::new(q, r));
    let mut out = vec![
        row("heart_rate_bpm", "Heart rate", "bpm", auto_rr.map(|r| 60_000.0 / r), rr.map(|r| 60_000.0 / r)),
        row("rr_ms", "RR", "ms", auto_rr, rr),
        row("p_duration_ms", "P duration", "ms", auto_iv.p_ms, pick("p_duration_ms", rev_iv.p_ms)),
        row("pr_ms", "PR", "ms", auto_iv.pr_ms, pick("pr_ms", rev_iv.pr_ms)),
        row("qrs_ms", "QRS", "ms", auto_iv.qrs_ms, pick("qrs_ms", rev_iv.qrs_ms)),
        row("qt_ms", "QT", "ms", auto_iv.qt_ms, qt),
    ];
    type QtcRow = (&'static str, &'static str, fn(&Qtc) -> f64);
    let qtc_rows: [QtcRow; 5] = [
        ("qtc_bazett_ms", "QTc Bazett", |q| q.bazett),
        ("qtc_fridericia_ms", "QTc Fridericia", |q| q.fridericia),
        ("qtc_framingham_ms", "QTc Framingham", |q| q.framingham),
        ("qtc_hodges_ms", "QTc Hodges", |q| q.hodges),
        ("qtc_rautaharju_ms", "QTc Rautaharju", |q| q.rautaharju),
    ];
    for (key, label, f) in qtc_rows {
        out.push(row(key, label, "ms", auto_qtc.as_ref().map(f), rev_qtc.as_ref().map(f)));
    }
    for r in &mut out {
        r.note = r.reviewed.and_then(|v| range_note(r.key, v, female));
    }
    out
}

fn row(key: &'static str, label: &'static str, unit: &'static str, auto: Option<f64>, reviewed: Option<f64>) -> LedgerRow {
    let origin = match (auto, reviewed) {
        (Some(a), Some(r)) if (a - r).abs() < 1e-9 => Some(Origin::Auto),
        (Some(_), Some(_)) => Some(Origin::Moved),
        (None, Some(_)) => Some(Origin::Placed),
        _ => None,
    };
    LedgerRow { key, label, unit, auto, reviewed, origin, note: None }
}

/// A range note for a value outside the usual range, naming its source.
#[must_use]
pub fn range_note(key: &str, v: f64, female: bool) -> Option<String> {
    match key {
        // Source: references.md §4, resting sinus rate 60–100 bpm (textbook).
        "heart_rate_bpm" if v < 60.0 => Some(format!("{v:.0} bpm: below usual 60–100 bpm (textbook range)")),
        "heart_rate_bpm" if v > 100.0 => Some(format!("{v:.0} bpm: above usual 60–100 bpm (textbook range)")),
        // Source: references.md §4, PR 120–200 ms (textbook).
        "pr_ms" if v > 200.0 => Some(format!("PR {v:.0} ms: above usual upper limit (200 ms, textbook range)")),
        "pr_ms" if v < 120.0 => Some(format!("PR {v:.0} ms: below usual lower limit (120 ms, textbook range)")),
        // Source: Surawicz et al., J Am Coll Cardiol 2009;53:976-81 (QRS > 110 ms abnormal in adults).
        "qrs_ms" if v > 110.0 => Some(format!("QRS {v:.0} ms: above 110 ms (Surawicz et al. 2009)")),
        k if k.starts_with("qtc_") => {
            // Source: Johnson & Ackerman, Br J Sports Med 2009 (> 500 ms); Rautaharju et al., J Am Coll Cardiol
            // 2009;53:982-91 (≥ 450 ms men, ≥ 460 ms women) — from memory (references.md §4).
            let limit = if female { 460.0 } else { 450.0 };
            let who = if female { "women" } else { "men" };
            if v > 500.0 {
                Some(format!("QTc {v:.0} ms: above 500 ms (Johnson & Ackerman 2009)"))
            } else if v >= limit {
                Some(format!("QTc {v:.0} ms: at or above usual upper limit ({limit:.0} ms, {who}; Rautaharju et al. 2009)"))
            } else {
                None
            }
        }
        _ => None,
    }
}

/// Draws the Ledger table.
pub fn ledger_ui(ui: &mut egui::Ui, rows: &[LedgerRow], doc: &Document) -> Vec<Command> {
    let mut out = Vec::new();
    let fmt = |v: Option<f64>| v.map_or_else(|| "—".to_string(), |v| format!("{v:.0}"));
    egui::Grid::new("ledger").striped(true).num_columns(7).show(ui, |ui| {
        for h in ["Measurement", "Automatic", "Reviewed", "Difference", "Origin", "Unit", "Range note"] {
            ui.strong(h);
        }
        ui.end_row();
        for r in rows {
            ui.label(r.label);
            ui.label(fmt(r.auto));
            ui.horizontal(|ui| {
                ui.label(fmt(r.reviewed));
                if doc.reviewed.contains_key(r.key) && ui.small_button("×").on_hover_text("Clear the typed value").clicked() {
                    out.push(Command::SetReviewed(r.key.to_string(), None));
                }
            });
            ui.label(r.difference().map_or_else(|| "—".to_string(), |d| format!("{d:+.0}")));
            ui.label(r.origin.map_or("—", Origin::as_str));
            ui.label(r.unit);
            match &r.note {
                Some(n) => ui.colored_label(ui.visuals().warn_fg_color, n),
                None => ui.label(""),
            };
            ui.end_row();
        }
    });
    if rows.iter().all(|r| r.auto.is_none()) {
        ui.weak("Automatic values appear once the measurement engine is wired in; place marks on the Beat lens or take caliper readings.");
    }
    out
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn range_notes_name_their_source() {
        assert!(range_note("qtc_bazett_ms", 455.0, false).is_some_and(|n| n.contains("Rautaharju")));
        assert!(range_note("qtc_bazett_ms", 455.0, true).is_none());
        assert!(range_note("qtc_hodges_ms", 510.0, true).is_some_and(|n| n.contains("Johnson")));
        assert!(range_note("qrs_ms", 124.0, false).is_some_and(|n| n.contains("Surawicz")));
        assert!(range_note("pr_ms", 160.0, false).is_none());
    }
}
