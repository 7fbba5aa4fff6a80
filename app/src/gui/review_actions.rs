//! Review actions of the workstation: the review commands, opening and applying reviews, saving, autosave.

use std::path::{Path, PathBuf};

use isoline_core::review::Stage;

use super::command::Command;
use super::{IsolineApp, review_io};

impl IsolineApp {
    /// Applies a review command (save, open, stage, summary, reader, answers to questions, history).
    pub(super) fn run_review_cmd(&mut self, cmd: Command) {
        match cmd {
            Command::SaveReview => {
                if let Some(l) = &self.loaded {
                    let path = self.review.path.clone().unwrap_or_else(|| review_io::default_review_path(&l.path));
                    self.save_review(path);
                }
            }
            Command::SaveReviewAs(p) => self.save_review(p),
            Command::OpenReview(p) => self.open_review(&p, true),
            Command::SetStage(s) => {
                if self.review.stage == Stage::Final {
                    self.ui_state.error = Some("The review is final: reopen it to change its stage.".into());
                } else if self.review.stage != s {
                    self.review.stage = s;
                    self.review.dirty = true;
                }
            }
            Command::Reopen if self.review.stage == Stage::Final => {
                self.review.stage = Stage::Draft;
                self.review.dirty = true;
            }
            Command::SetSummary(t) => {
                if self.review.stage == Stage::Final {
                    self.ui_state.error = Some("The review is final: reopen it to change it.".into());
                } else {
                    self.review.summary = t;
                    self.review.dirty = true;
                }
            }
            Command::SetReader(name) => {
                self.settings.reader = Some(name);
                if let Some(p) = self.review.asking_reader.take() {
                    self.save_review(p);
                }
            }
            Command::ApplyMismatched(yes) => {
                if let Some((path, r, _)) = self.review.mismatch.take()
                    && yes
                {
                    self.apply_review(r, path);
                }
            }
            Command::Recover(yes) => {
                if let Some(r) = self.review.recovery.take() {
                    let path = self
                        .review
                        .path
                        .clone()
                        .or_else(|| self.loaded.as_ref().map(|l| review_io::default_review_path(&l.path)));
                    if yes {
                        let base = self.review.base.take();
                        let saved_path = self.review.path.clone();
                        self.apply_review(r, path.clone().unwrap_or_default());
                        // The restored work is unsaved: keep the saved review as the base for history.
                        self.review.base = base;
                        self.review.path = saved_path.or(path);
                        self.review.dirty = true;
                    } else if let Some(p) = path
                        && let Err(e) = isoline_core::review::discard_autosave(&p)
                    {
                        self.ui_state.error = Some(format!("{e}"));
                    }
                }
            }
            Command::ShowHistory(b) => self.review.history_open = b,
            _ => {}
        }
    }

    /// Opens a review file. With `with_recording`, first opens the recording it names (when it is not the one
    /// open). A review of another recording is never applied silently: the reader is asked.
    pub(super) fn open_review(&mut self, path: &Path, with_recording: bool) {
        let review = match isoline_core::review::load(path) {
            Ok(r) => r,
            Err(e) => {
                self.ui_state.error = Some(format!("Could not open the review: {e}"));
                return;
            }
        };
        if with_recording {
            let rec_path = review.recording.recording_path(path);
            let already = self.loaded.as_ref().is_some_and(|l| l.path == rec_path);
            if !already && !self.open_recording(&rec_path) {
                return;
            }
        }
        let Some(l) = &self.loaded else { return };
        // Same signal and same header (rate, leads): applied; otherwise the reader is asked, and told why.
        match review_io::matches_recording(&review, &l.path) {
            Ok(true) => match review.recording.differs_from(&l.recording) {
                None => self.apply_review(review, path.to_path_buf()),
                Some(why) => self.review.mismatch = Some((path.to_path_buf(), review, why)),
            },
            Ok(false) => {
                let why = format!(
                    "it was made for a different recording ({}, SHA-256 {}…)",
                    review.recording.file_name,
                    review.recording.sha256.get(..12).unwrap_or_default()
                );
                self.review.mismatch = Some((path.to_path_buf(), review, why));
            }
            Err(e) => self.ui_state.error = Some(format!("{e:#}")),
        }
    }

    /// Makes a loaded review the one being worked on.
    fn apply_review(&mut self, review: isoline_core::review::Review, path: PathBuf) {
        let Some(l) = &self.loaded else { return };
        // Applied as it stands; what its parts contradict (a file edited by hand) is said.
        let odd = review.inconsistencies();
        if !odd.is_empty() {
            self.ui_state.error =
                Some(format!("{}: this review contradicts itself: {}.", path.display(), odd.join("; ")));
        }
        self.doc = review_io::document_from_review(&review, l);
        self.history.clear();
        self.ledger_cache = None;
        self.review.stage = review.stage;
        self.review.summary.clone_from(&review.summary);
        self.review.base = Some(review);
        self.review.path = Some(path);
        self.review.dirty = false;
    }

    /// The review as it stands (document, Ledger rows, session), by `reader`, to be written to `path`; `None`
    /// without a loaded recording. Saving and autosaving both write this.
    fn review_to_write(&mut self, reader: &str, path: &Path) -> Option<anyhow::Result<isoline_core::review::Review>> {
        let rows = self.cached_ledger_rows();
        let loaded = self.loaded.as_ref()?;
        let input = review_io::ReviewInput { loaded, doc: &self.doc, rows: &rows, session: &self.review, reader, path };
        Some(review_io::build_review(&input))
    }

    /// Saves the review to `path`, asking the reader's name first when it is not known yet.
    fn save_review(&mut self, path: PathBuf) {
        let Some(reader) = self.settings.reader.clone() else {
            self.review.asking_reader = Some(path);
            return;
        };
        let Some(built) = self.review_to_write(&reader, &path) else { return };
        match built.and_then(|r| r.save(&path).map(|()| r).map_err(anyhow::Error::from)) {
            Ok(r) => {
                self.review.base = Some(r);
                self.review.path = Some(path);
                self.review.dirty = false;
            }
            Err(e) => self.ui_state.error = Some(format!("Could not save the review: {e:#}")),
        }
    }

    /// Writes the autosave sidecar when there is unsaved work and the last autosave is old enough.
    pub(super) fn autosave_if_due(&mut self) {
        if !self.autosave || !self.review.dirty || self.review.stage == Stage::Final {
            return;
        }
        if self.review.last_autosave.is_some_and(|t| t.elapsed().as_secs_f64() < review_io::AUTOSAVE_EVERY_S) {
            return;
        }
        self.review.last_autosave = Some(std::time::Instant::now());
        let reader = self.settings.reader.clone().unwrap_or_else(|| "(reader not named yet)".into());
        let Some(l) = &self.loaded else { return };
        let path = self.review.path.clone().unwrap_or_else(|| review_io::default_review_path(&l.path));
        let Some(built) = self.review_to_write(&reader, &path) else { return };
        if let Err(e) = built.and_then(|r| r.autosave(&path).map_err(anyhow::Error::from)) {
            self.ui_state.error = Some(format!("Autosave failed: {e:#}"));
        }
    }
}
