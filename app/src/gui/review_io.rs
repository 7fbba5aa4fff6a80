//! Reviews in the workstation (`core::review`): building a review from the reader's work, applying a loaded
//! review, the review file beside the recording, autosave and recovery, and the review windows (reader name,
//! recording mismatch, recovery, history).

use std::path::{Path, PathBuf};
use std::time::Instant;

use anyhow::Context as _;
use isoline_core::beat::MarkKind;
use isoline_core::review::{MarkOn, Measurement, REVIEW_SUFFIX, RecordingIdentity, Review, Stage};
use isoline_core::units::bpm_from_rr_ms;

use super::command::Command;
use super::ledger::LedgerRow;
use super::state::{Document, Loaded, Origin};

/// Review state outside the undo history: the file, the stage, the summary, and what is waiting for an answer.
#[derive(Debug, Default)]
pub struct ReviewSession {
    /// The review as last saved or loaded (keeps `created` and the change history).
    pub base: Option<Review>,
    /// Review file; `None` until saved or loaded (then `NAME.review.ron` beside the recording by default).
    pub path: Option<PathBuf>,
    /// Stage.
    pub stage: Stage,
    /// The reader's summary.
    pub summary: String,
    /// A review made for another recording (SHA-256 differs) or for the same samples under another header (rate,
    /// leads), waiting for the reader's answer, with the reason shown to the reader.
    pub mismatch: Option<(PathBuf, Review, String)>,
    /// Autosaved work found at opening, waiting for the reader's answer.
    pub recovery: Option<Review>,
    /// The reader-name window is open; save to this path once the name is given.
    pub asking_reader: Option<PathBuf>,
    /// Text typed in the reader-name window.
    pub reader_input: String,
    /// The history window is open.
    pub history_open: bool,
    /// Work changed since the last save.
    pub dirty: bool,
    /// Last autosave.
    pub last_autosave: Option<Instant>,
}

/// Seconds between autosaves while editing.
// Common practice, no source.
pub const AUTOSAVE_EVERY_S: f64 = 5.0;

pub use isoline_core::review::default_review_path;

/// Whether a path names a review file.
#[must_use]
pub fn is_review_path(path: &Path) -> bool {
    path.to_string_lossy().ends_with(REVIEW_SUFFIX)
}

/// Everything needed to write a review.
pub struct ReviewInput<'a> {
    /// Open recording.
    pub loaded: &'a Loaded,
    /// The reader's work.
    pub doc: &'a Document,
    /// Ledger rows as they stand.
    pub rows: &'a [LedgerRow],
    /// Stage and summary.
    pub session: &'a ReviewSession,
    /// Reader name.
    pub reader: &'a str,
    /// Where the review goes.
    pub path: &'a Path,
}

/// Builds the review to save: the base review (or a new one) brought up to date with the workstation, each
/// change recorded in its history by `reader`.
///
/// # Errors
/// When the recording's signal cannot be read for its identity, or the base review is final and not reopened.
pub fn build_review(input: &ReviewInput<'_>) -> anyhow::Result<Review> {
    let ReviewInput { loaded, doc, rows, session, reader, path } = *input;
    let mut r = match &session.base {
        Some(b) => b.clone(),
        None => Review::new(RecordingIdentity::of(&loaded.path, &loaded.recording, path)?, reader),
    };
    if r.is_final() && session.stage == Stage::Final {
        return Ok(r);
    }
    if r.is_final() {
        r.reopen(reader)?;
    }
    for row in rows.iter().filter(|row| !row.key.starts_with("st_")) {
        r.put_automatic(Measurement::automatic(row.key, &row.label, row.auto, row.unit))?;
        let current = r.measurement(row.key).and_then(|m| m.reviewed_value);
        match (row.origin, row.reviewed) {
            (Some(Origin::Moved | Origin::Placed), Some(v)) if current != Some(v) => {
                r.set_measurement_why(row.key, v, reader, doc.reasons.get(row.key).map(String::as_str))?;
            }
            (Some(Origin::Auto) | None, _) if current.is_some() => r.revert_measurement(row.key, reader)?,
            _ => {}
        }
    }
    let fs = loaded.representative().map_or(loaded.recording.sample_rate.hz(), |rep| rep.sample_rate.hz());
    let auto = loaded.auto_marks();
    for kind in MarkKind::BOUNDARIES {
        let on = MarkOn::Representative;
        let existing = r.mark(kind, on).copied();
        match (doc.marks.get(&kind), existing) {
            (Some(&s), Some(m)) if m.sample == s && m.origin != Origin::Auto => {}
            (Some(&s), _) => {
                if let Some(a) = auto.get(kind) {
                    r.put_automatic_mark(kind, on, a, a as f64 / fs)?;
                }
                r.move_mark(kind, on, s, s as f64 / fs, reader)?;
            }
            (None, Some(m)) if m.origin != Origin::Auto => {
                r.remove_mark(kind, on, reader)?;
                if let Some(a) = auto.get(kind) {
                    r.put_automatic_mark(kind, on, a, a as f64 / fs)?;
                }
            }
            (None, _) => {
                if let Some(a) = auto.get(kind) {
                    r.put_automatic_mark(kind, on, a, a as f64 / fs)?;
                }
            }
        }
    }
    // The representative beat's R peak, as `review new` records it (`Review::put_analysis`).
    if let Some(rep) = loaded.representative() {
        r.put_automatic_mark(MarkKind::RPeak, MarkOn::Representative, rep.r_index, rep.r_index as f64 / fs)?;
    }
    for c in &doc.calipers {
        if !r.calipers.contains(c) {
            r.put_caliper(c.clone(), reader)?;
        }
    }
    let gone: Vec<u32> = r.calipers.iter().map(|c| c.id).filter(|id| doc.caliper(*id).is_none()).collect();
    for id in gone {
        r.remove_caliper(id, reader)?;
    }
    r.set_summary(&session.summary, reader)?;
    if r.stage != session.stage {
        r.set_stage(session.stage, reader)?;
    }
    Ok(r)
}

/// The document a review describes: its calipers, the reader's marks on the representative beat, and the
/// reviewed values that the marks do not already give.
#[must_use]
pub fn document_from_review(review: &Review, loaded: &Loaded) -> Document {
    let mut doc = Document {
        calipers: review.calipers.clone(),
        next_caliper_id: review.calipers.iter().map(|c| c.id).max().unwrap_or(0),
        ..Document::default()
    };
    for m in review.marks.iter().filter(|m| m.on == MarkOn::Representative && m.origin != Origin::Auto) {
        doc.marks.insert(m.kind, m.sample);
    }
    let rows = super::ledger::rows(loaded, &doc);
    // QTc values recomputed from a reviewed QT, RR or rate are derived, not typed: the Ledger recomputes them.
    let qtc_derived = isoline_core::review::QTC_INPUT_KEYS
        .iter()
        .any(|k| review.measurement(k).is_some_and(|m| m.reviewed_value.is_some()));
    // A rate equal to 60000 / the reviewed RR is the one the Ledger derives from that RR, not one the reader typed.
    let rate_from_rr = review.measurement("rr_ms").and_then(|m| m.reviewed_value).and_then(bpm_from_rr_ms);
    for m in &review.measurements {
        let Some(v) = m.reviewed_value else { continue };
        if qtc_derived && m.key.starts_with("qtc_") {
            continue;
        }
        if m.key == "heart_rate_bpm" && rate_from_rr.is_some_and(|hr| (hr - v).abs() < 1e-6) {
            continue;
        }
        let from_marks = rows.iter().find(|r| r.key == m.key).and_then(|r| r.reviewed);
        if from_marks.is_none_or(|x| (x - v).abs() > 1e-6) {
            doc.reviewed.insert(m.key.clone(), v);
        }
    }
    doc
}

/// Whether a review belongs to the recording at `recording_path` (same signal SHA-256).
///
/// # Errors
/// When the recording's signal cannot be read.
pub fn matches_recording(review: &Review, recording_path: &Path) -> anyhow::Result<bool> {
    let sha = isoline_core::review::signal_sha256(recording_path)
        .with_context(|| format!("reading {} for its identity", recording_path.display()))?;
    Ok(review.recording.is_signal(&sha))
}

/// The review's file, stage, summary and save button.
pub fn review_panel_ui(session: &ReviewSession, ui: &mut egui::Ui, out: &mut Vec<Command>) {
    use isoline_core::review::Stage;
    let file = session
        .path
        .as_ref()
        .and_then(|p| p.file_name())
        .map_or("not saved yet".into(), |n| n.to_string_lossy().into_owned());
    ui.horizontal_wrapped(|ui| {
        ui.strong("Review");
        ui.label(format!("{file}{}", if session.dirty { " (unsaved changes)" } else { "" }));
        if ui.button("Save review").clicked() {
            out.push(Command::SaveReview);
        }
        if ui.button("History").clicked() {
            out.push(Command::ShowHistory(!session.history_open));
        }
    });
    ui.horizontal_wrapped(|ui| {
        ui.label("Stage:");
        for stage in [Stage::Draft, Stage::Checked, Stage::Final] {
            if ui.selectable_label(session.stage == stage, stage.as_str()).clicked() && session.stage != stage {
                out.push(Command::SetStage(stage));
            }
        }
        if session.stage == Stage::Final {
            ui.weak("read-only");
            if ui.button("Reopen").clicked() {
                out.push(Command::Reopen);
            }
        }
    });
    let mut summary = session.summary.clone();
    let edit = egui::TextEdit::multiline(&mut summary)
        .hint_text("Summary (the reader's conclusion; Isoline writes none)")
        .desired_rows(2)
        .interactive(session.stage != Stage::Final);
    if ui.add(edit).changed() {
        out.push(Command::SetSummary(summary));
    }
}

/// The review windows: reader name, recording mismatch, recovery, history. Returns the reader's answers.
pub fn review_windows_ui(ctx: &egui::Context, session: &mut ReviewSession) -> Vec<Command> {
    let mut out = Vec::new();
    if session.asking_reader.is_some() {
        egui::Window::new("Reader").collapsible(false).show(ctx, |ui| {
            ui.label("Your name or initials, recorded with every change of this review:");
            ui.add(egui::TextEdit::singleline(&mut session.reader_input).hint_text("reader"));
            let name = session.reader_input.trim().to_string();
            // An empty field only keeps the button off: it is not yet an error to show.
            let problem = isoline_core::review::reader_name_problem(&name).filter(|_| !name.is_empty());
            ui.horizontal(|ui| {
                let save =
                    ui.add_enabled(!name.is_empty() && problem.is_none(), egui::Button::new("Save as this reader"));
                if save.clicked() {
                    out.push(Command::SetReader(name));
                }
                if ui.button("Cancel").clicked() {
                    session.asking_reader = None;
                }
            });
            if let Some(why) = problem {
                ui.colored_label(ui.visuals().error_fg_color, format!("The name {why}."));
            }
        });
    }
    if let Some((path, _, why)) = &session.mismatch {
        let text = format!("{}: {why}. Its calipers and marks may not fit this one.", path.display());
        egui::Window::new("Review for another recording").collapsible(false).show(ctx, |ui| {
            ui.label(text);
            ui.horizontal(|ui| {
                if ui.button("Apply it anyway").clicked() {
                    out.push(Command::ApplyMismatched(true));
                }
                if ui.button("Do not apply").clicked() {
                    out.push(Command::ApplyMismatched(false));
                }
            });
        });
    }
    if let Some(r) = &session.recovery {
        let text = format!("Unsaved work from an earlier session was found (autosaved {}).", r.modified.to_iso8601());
        egui::Window::new("Recover unsaved work").collapsible(false).show(ctx, |ui| {
            ui.label(text);
            ui.horizontal(|ui| {
                if ui.button("Restore it").clicked() {
                    out.push(Command::Recover(true));
                }
                if ui.button("Discard it").clicked() {
                    out.push(Command::Recover(false));
                }
            });
        });
    }
    if session.history_open {
        let mut open = true;
        egui::Window::new("Review history").open(&mut open).show(ctx, |ui| match &session.base {
            None => {
                ui.weak("Not saved yet: the history starts with the first save.");
            }
            Some(r) => {
                egui::ScrollArea::vertical().max_height(400.0).show(ui, |ui| {
                    egui::Grid::new("history").striped(true).show(ui, |ui| {
                        for h in ["When (UTC)", "Reader", "What", "Before", "After"] {
                            ui.strong(h);
                        }
                        ui.end_row();
                        for c in &r.history {
                            ui.label(c.at.to_iso8601());
                            ui.label(&c.by);
                            ui.label(&c.what);
                            ui.label(c.old.as_deref().unwrap_or("—"));
                            ui.label(c.new.as_deref().unwrap_or("—"));
                            ui.end_row();
                        }
                    });
                });
            }
        });
        if !open {
            session.history_open = false;
        }
    }
    out
}
