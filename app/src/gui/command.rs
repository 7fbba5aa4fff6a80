//! Commands: views return them, the shell applies them after layout. Commands that change the
//! [`Document`] are recorded so they can be undone and redone.

use std::path::PathBuf;

use isoline_core::beat::MarkKind;
use isoline_core::caliper::CaliperKind;
use isoline_core::paper::{Layout, LeadOrder, Scheme};

use isoline_core::review::Stage;

use super::state::{Document, Part, Tool};

/// Something the user asked for.
#[must_use]
#[derive(Debug, Clone, PartialEq)]
pub enum Command {
    /// Open a recording.
    Open(PathBuf),
    /// Show the file dialog and open what the user picks.
    OpenDialog,
    /// Change the page layout.
    SetLayout(Layout),
    /// Change the lead order.
    SetOrder(LeadOrder),
    /// Change the paper speed, mm/s.
    SetSpeed(f64),
    /// Change the gain, mm/mV.
    SetGain(f64),
    /// Change the paper scheme.
    SetScheme(Scheme),
    /// Light or dark window chrome.
    SetDark(bool),
    /// Snap caliper legs to beats and boundaries.
    SetSnap(bool),
    /// Show filtered or raw signal.
    SetFilters(bool),
    /// Move the Sheet's window to start at this recording time, s.
    SetStart(f64),
    /// Move the Sheet's window by a number of windows (negative: back).
    Page(f64),
    /// Choose the tool for clicks on the Sheet.
    SetTool(Tool),
    /// Place a caliper.
    AddCaliper {
        /// What and where.
        kind: CaliperKind,
        /// Lead name for voltage calipers.
        lead: Option<String>,
    },
    /// Move a caliper (drag or nudge).
    MoveCaliper {
        /// Caliper id.
        id: u32,
        /// New position.
        kind: CaliperKind,
    },
    /// Nudge the selected caliper part by a number of samples.
    Nudge(i64),
    /// Delete a caliper.
    DeleteCaliper(u32),
    /// Lock or unlock a caliper.
    SetLocked(u32, bool),
    /// Switch marching on or off for a time caliper.
    SetMarch(u32, bool),
    /// Select a caliper part (or nothing).
    Select(Option<(u32, Part)>),
    /// Move or place a mark on the representative beat (sample on that beat's axis).
    MoveMark(MarkKind, usize),
    /// Put a mark back to its automatic position (or remove a placed one).
    ResetMark(MarkKind),
    /// Set (or clear) the reviewed value of a Ledger row.
    SetReviewed(String, Option<f64>),
    /// Set the reviewed value of a Ledger row with the reader's reason for it (one undo step).
    SetReviewedWhy(String, f64, String),
    /// Take a caliper's reading into a Ledger row as its reviewed value.
    TakeCaliper {
        /// Caliper id.
        id: u32,
        /// Ledger key.
        key: String,
    },
    /// Undo the last change to the review.
    Undo,
    /// Redo the last undone change.
    Redo,
    /// Open or close the help overlay.
    ShowHelp(bool),
    /// Open or close the ruler calibration.
    ShowRuler(bool),
    /// Store the ruler calibration: physical pixels per mm (`None` resets to the display's nominal scale).
    SetRuler(Option<f32>),
    /// Dismiss the error banner.
    DismissError,
    /// Save the review (to its file, or `NAME.review.ron` beside the recording).
    SaveReview,
    /// Show the save dialog for the review.
    SaveReviewDialog,
    /// Save the review to a chosen file.
    SaveReviewAs(PathBuf),
    /// Show the open dialog for a review.
    OpenReviewDialog,
    /// Open a review file (and its recording when another is open).
    OpenReview(PathBuf),
    /// Change the review's stage.
    SetStage(Stage),
    /// Reopen a final review for changes (recorded in its history on the next save).
    Reopen,
    /// Replace the summary text.
    SetSummary(String),
    /// The reader's name, asked once and remembered.
    SetReader(String),
    /// Answer to "this review was made for another recording": apply it or not.
    ApplyMismatched(bool),
    /// Answer to "unsaved work was found": restore it or discard it.
    Recover(bool),
    /// Open or close the review history.
    ShowHistory(bool),
    /// Show the dialog to export the page as PNG.
    ExportPngDialog,
    /// Export the page as it stands (window, layout, calipers, Ledger) to a PNG file.
    ExportPng(PathBuf),
}

impl Command {
    /// Whether the command changes the review (and therefore enters the undo history).
    #[must_use]
    pub fn edits_document(&self) -> bool {
        matches!(
            self,
            Self::AddCaliper { .. }
                | Self::MoveCaliper { .. }
                | Self::Nudge(_)
                | Self::DeleteCaliper(_)
                | Self::SetLocked(..)
                | Self::SetMarch(..)
                | Self::MoveMark(..)
                | Self::ResetMark(_)
                | Self::SetReviewed(..)
                | Self::SetReviewedWhy(..)
                | Self::TakeCaliper { .. }
        )
    }

    /// Commands with the same key that arrive during one drag merge into a single undo step.
    #[must_use]
    pub fn merge_key(&self) -> Option<String> {
        match self {
            Self::MoveCaliper { id, .. } => Some(format!("caliper {id}")),
            Self::MoveMark(kind, _) => Some(format!("mark {kind}")),
            _ => None,
        }
    }
}

/// Undo and redo as snapshots of the document before each change.
#[derive(Debug, Clone, Default)]
pub struct History {
    undo: Vec<(String, Document)>,
    redo: Vec<(String, Document)>,
    /// Merge key of the drag in progress.
    open_merge: Option<String>,
}

/// Most undo steps kept.
const MAX_UNDO: usize = 500;

impl History {
    /// Records `before` as the state to return to, unless the command continues the current drag.
    pub fn record(&mut self, cmd: &Command, before: &Document) {
        let key = cmd.merge_key();
        if key.is_some() && key == self.open_merge {
            return;
        }
        self.open_merge = key;
        self.undo.push((describe(cmd), before.clone()));
        if self.undo.len() > MAX_UNDO {
            self.undo.remove(0);
        }
        self.redo.clear();
    }

    /// Ends the drag in progress: the next move starts a new undo step.
    pub fn end_drag(&mut self) {
        self.open_merge = None;
    }

    /// Steps back: returns the document to restore, keeping `current` for redo.
    pub fn undo(&mut self, current: &Document) -> Option<Document> {
        self.open_merge = None;
        let (what, doc) = self.undo.pop()?;
        self.redo.push((what, current.clone()));
        Some(doc)
    }

    /// Steps forward again.
    pub fn redo(&mut self, current: &Document) -> Option<Document> {
        self.open_merge = None;
        let (what, doc) = self.redo.pop()?;
        self.undo.push((what, current.clone()));
        Some(doc)
    }

    /// Description of the step `undo` would revert.
    #[must_use]
    pub fn undo_label(&self) -> Option<&str> {
        self.undo.last().map(|(w, _)| w.as_str())
    }

    /// Description of the step `redo` would repeat.
    #[must_use]
    pub fn redo_label(&self) -> Option<&str> {
        self.redo.last().map(|(w, _)| w.as_str())
    }

    /// Forgets everything (a new recording was opened).
    pub fn clear(&mut self) {
        *self = Self::default();
    }
}

fn describe(cmd: &Command) -> String {
    match cmd {
        Command::AddCaliper { .. } => "add caliper".into(),
        Command::MoveCaliper { id, .. } => format!("move caliper {id}"),
        Command::Nudge(_) => "nudge caliper".into(),
        Command::DeleteCaliper(id) => format!("delete caliper {id}"),
        Command::SetLocked(id, _) => format!("lock caliper {id}"),
        Command::SetMarch(id, _) => format!("march caliper {id}"),
        Command::MoveMark(kind, _) => format!("move {kind}"),
        Command::ResetMark(kind) => format!("reset {kind}"),
        Command::SetReviewed(key, _) | Command::SetReviewedWhy(key, ..) => format!("edit {key}"),
        Command::TakeCaliper { key, .. } => format!("caliper to {key}"),
        other => format!("{other:?}"),
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn drag_merges_into_one_step() {
        let mut h = History::default();
        let mut doc = Document::default();
        let kind = CaliperKind::Plumb { t_s: 1.0 };
        for k in 0..5 {
            let before = doc.clone();
            doc.next_caliper_id = k + 1;
            h.record(&Command::MoveCaliper { id: 1, kind }, &before);
        }
        h.end_drag();
        let restored = h.undo(&doc).unwrap_or_default();
        assert_eq!(restored.next_caliper_id, 0);
        assert!(h.undo(&restored).is_none());
        assert_eq!(h.redo(&restored).map(|d| d.next_caliper_id), Some(5));
    }
}
