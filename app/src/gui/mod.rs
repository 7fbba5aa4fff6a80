//! The workstation window (eframe/egui): a shell around the Sheet, Tape, Beat lens and Ledger.
//!
//! [`IsolineApp`] holds all state and draws itself into any [`egui::Ui`], so UI tests drive it with
//! egui_kittest without a window; the eframe [`App`](eframe::App) only delegates to it and persists settings.

use std::path::{Path, PathBuf};
use std::process::ExitCode;
use std::sync::Arc;

use anyhow::Context as _;
use isoline_core::caliper::CaliperKind;
use isoline_core::filter::FilterSettings;
use isoline_core::io::{self, OpenOptions};

pub mod beat_lens;
pub mod calipers_ui;
pub mod command;
pub mod derived;
pub mod ledger;
pub mod review_io;
pub mod settings;
mod shell;
pub mod sheet;
pub mod state;
pub mod tape;

use command::{Command, History};
use settings::Settings;
use state::{Document, Loaded, Part, Tool, UiState};

/// A file dialog the shell should show.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Dialog {
    /// Pick a recording (or review) to open.
    OpenRecording,
    /// Pick a review to open.
    OpenReview,
    /// Choose where to save the review.
    SaveReviewAs,
}

/// The whole workstation.
pub struct IsolineApp {
    /// Settings remembered between runs.
    pub settings: Settings,
    /// The open recording and derived data.
    pub loaded: Option<Loaded>,
    /// The reader's work (what undo/redo restores).
    pub doc: Document,
    /// Undo/redo history.
    pub history: History,
    /// Throwaway interaction state.
    pub ui_state: UiState,
    /// Tool for clicks on the Sheet.
    pub tool: Tool,
    /// Start of the Sheet's window, s.
    pub start_s: f64,
    /// Length of the Sheet's window in the last frame, s.
    pub window_s: f64,
    /// A file dialog was asked for (handled by the eframe shell, never in tests).
    pub wants_dialog: Option<Dialog>,
    /// The review being worked on: file, stage, summary, pending questions.
    pub review: review_io::ReviewSession,
    /// Write the autosave sidecar while editing (on in the window; off by default so tests never write beside
    /// their data).
    pub autosave: bool,
    /// Ledger rows as of the last change (derived data, dropped whenever the review or the analysis changes).
    ledger_cache: Option<Vec<ledger::LedgerRow>>,
    /// Analysis running in the background for the open recording.
    pending: Option<std::sync::mpsc::Receiver<isoline_core::analysis::Analysis>>,
}

impl IsolineApp {
    /// A workstation with default settings, opening `file` if given. A file that cannot be read leaves the
    /// workstation empty with the error shown.
    #[must_use]
    pub fn new(file: Option<PathBuf>) -> Self {
        Self::with_settings(file, Settings::default())
    }

    /// As [`IsolineApp::new`], with remembered settings.
    #[must_use]
    pub fn with_settings(file: Option<PathBuf>, settings: Settings) -> Self {
        let mut app = Self {
            settings,
            loaded: None,
            doc: Document::default(),
            history: History::default(),
            ui_state: UiState::default(),
            tool: Tool::Pointer,
            start_s: 0.0,
            window_s: 10.0,
            wants_dialog: None,
            review: review_io::ReviewSession::default(),
            autosave: false,
            ledger_cache: None,
            pending: None,
        };
        if let Some(f) = file {
            app.run_cmd(Command::Open(f));
        }
        app
    }

    /// Whether an analysis is still running in the background.
    #[must_use]
    pub fn analysing(&self) -> bool {
        self.pending.is_some()
    }

    /// Takes a finished background analysis, waiting for it when `block` is true.
    pub fn poll_analysis(&mut self, block: bool) {
        let Some(rx) = &self.pending else { return };
        let got = if block { rx.recv().ok() } else { rx.try_recv().ok() };
        let finished = got.is_some() || matches!(rx.try_recv(), Err(std::sync::mpsc::TryRecvError::Disconnected));
        if let (Some(a), Some(l)) = (got, self.loaded.as_mut()) {
            l.attach(a);
            self.ledger_cache = None;
        }
        if finished {
            self.pending = None;
        }
    }

    /// Draws the whole workstation and applies the commands its views returned.
    pub fn ui(&mut self, ui: &mut egui::Ui) {
        let t0 = std::time::Instant::now();
        self.poll_analysis(false);
        if self.pending.is_some() {
            ui.ctx().request_repaint_after(std::time::Duration::from_millis(200));
        }
        let commands = shell::shell_ui(self, ui);
        if !ui.ctx().input(|i| i.pointer.any_down()) {
            self.history.end_drag();
        }
        for c in commands {
            self.run_cmd(c);
        }
        self.autosave_if_due();
        self.ui_state.last_frame_ms = t0.elapsed().as_secs_f64() * 1000.0;
    }

    /// The Ledger rows as they stand.
    #[must_use]
    pub fn ledger_rows(&self) -> Vec<ledger::LedgerRow> {
        self.loaded.as_ref().map(|l| ledger::rows(l, &self.doc)).unwrap_or_default()
    }

    /// The Ledger rows, computed once per change.
    pub fn cached_ledger_rows(&mut self) -> Vec<ledger::LedgerRow> {
        if self.ledger_cache.is_none() {
            self.ledger_cache = Some(self.ledger_rows());
        }
        self.ledger_cache.clone().unwrap_or_default()
    }

    /// Applies one command.
    pub fn run_cmd(&mut self, cmd: Command) {
        if cmd.edits_document() || matches!(cmd, Command::Open(_) | Command::OpenReview(_) | Command::Undo | Command::Redo) {
            self.ledger_cache = None;
        }
        let changes_work = cmd.edits_document() || matches!(cmd, Command::Undo | Command::Redo);
        if changes_work && self.review.stage == isoline_core::review::Stage::Final {
            self.ui_state.error = Some("The review is final: reopen it to change it.".into());
            return;
        }
        if changes_work {
            self.review.dirty = true;
        }
        if cmd.edits_document() {
            let before = self.doc.clone();
            if self.apply_edit(&cmd) && self.doc != before {
                self.history.record(&cmd, &before);
            }
            return;
        }
        let view = &mut self.settings.view;
        match cmd {
            Command::Open(path) => self.open(&path),
            Command::OpenDialog => self.wants_dialog = Some(Dialog::OpenRecording),
            Command::OpenReviewDialog => self.wants_dialog = Some(Dialog::OpenReview),
            Command::SaveReviewDialog => self.wants_dialog = Some(Dialog::SaveReviewAs),
            Command::SaveReview => {
                if let Some(l) = &self.loaded {
                    let path = self.review.path.clone().unwrap_or_else(|| review_io::default_review_path(&l.path));
                    self.save_review(path);
                }
            }
            Command::SaveReviewAs(p) => self.save_review(p),
            Command::OpenReview(p) => self.open_review(&p, true),
            Command::SetStage(s) => {
                if self.review.stage == isoline_core::review::Stage::Final {
                    self.ui_state.error = Some("The review is final: reopen it to change its stage.".into());
                } else if self.review.stage != s {
                    self.review.stage = s;
                    self.review.dirty = true;
                }
            }
            Command::Reopen => {
                if self.review.stage == isoline_core::review::Stage::Final {
                    self.review.stage = isoline_core::review::Stage::Draft;
                    self.review.dirty = true;
                }
            }
            Command::SetSummary(t) => {
                if self.review.stage == isoline_core::review::Stage::Final {
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
                if let Some((path, r)) = self.review.mismatch.take()
                    && yes
                {
                    self.apply_review(r, path);
                }
            }
            Command::Recover(yes) => {
                if let Some(r) = self.review.recovery.take() {
                    let path = self.review.path.clone().or_else(|| self.loaded.as_ref().map(|l| review_io::default_review_path(&l.path)));
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
            Command::SetLayout(l) => view.layout = l,
            Command::SetOrder(o) => view.order = o,
            Command::SetSpeed(s) => view.paper.speed_mm_per_s = s,
            Command::SetGain(g) => view.paper.gain_mm_per_mv = g,
            Command::SetScheme(s) => view.scheme = s,
            Command::SetDark(d) => view.dark = d,
            Command::SetSnap(s) => view.snap = s,
            Command::SetFilters(f) => view.filters = f,
            Command::SetStart(t) => self.set_start(t),
            Command::Page(n) => self.set_start(self.start_s + n * self.window_s),
            Command::SetTool(t) => self.tool = t,
            Command::Select(s) => self.ui_state.selected = s,
            Command::Undo => {
                if let Some(d) = self.history.undo(&self.doc) {
                    self.doc = d;
                }
            }
            Command::Redo => {
                if let Some(d) = self.history.redo(&self.doc) {
                    self.doc = d;
                }
            }
            Command::ShowHelp(b) => self.ui_state.help_open = b,
            Command::ShowRuler(b) => {
                self.ui_state.ruler_open = b;
                self.ui_state.ruler_bar_points = 0.0;
            }
            Command::SetRuler(px) => self.settings.ruler_px_per_mm = px,
            Command::DismissError => self.ui_state.error = None,
            // Edits are handled above.
            _ => {}
        }
    }

    fn set_start(&mut self, t: f64) {
        let duration = self.loaded.as_ref().map_or(0.0, |l| l.recording.duration_s());
        self.start_s = t.clamp(0.0, (duration - self.window_s).max(0.0));
    }

    /// Applies a document edit; false when it does not apply (unknown caliper, locked, …).
    fn apply_edit(&mut self, cmd: &Command) -> bool {
        let rate = self.loaded.as_ref().map_or(500.0, |l| l.recording.sample_rate.hz());
        let doc = &mut self.doc;
        match cmd {
            Command::AddCaliper { kind, lead } => {
                doc.next_caliper_id += 1;
                let id = doc.next_caliper_id;
                doc.calipers.push(state::new_caliper(id, *kind, lead.clone()));
                self.ui_state.selected = Some((id, Part::Second));
                self.tool = Tool::Pointer;
            }
            Command::MoveCaliper { id, kind } => match doc.caliper_mut(*id) {
                Some(c) if !c.locked => c.kind = *kind,
                _ => return false,
            },
            Command::Nudge(n) => {
                let Some((id, part)) = self.ui_state.selected else { return false };
                let Some(c) = doc.caliper_mut(id).filter(|c| !c.locked) else { return false };
                let dt = *n as f64 / rate;
                c.kind = match (c.kind, part) {
                    (CaliperKind::Time { t1_s, t2_s }, Part::First) => CaliperKind::Time { t1_s: t1_s + dt, t2_s },
                    (CaliperKind::Time { t1_s, t2_s }, Part::Second) => CaliperKind::Time { t1_s, t2_s: t2_s + dt },
                    (CaliperKind::Plumb { t_s }, _) => CaliperKind::Plumb { t_s: t_s + dt },
                    // Voltage levels step by 10 µV (0.1 mm at 10 mm/mV) per press.
                    (CaliperKind::Voltage { t_s, uv1, uv2 }, Part::First) => CaliperKind::Voltage { t_s, uv1: uv1 + 10.0 * *n as f64, uv2 },
                    (CaliperKind::Voltage { t_s, uv1, uv2 }, Part::Second) => CaliperKind::Voltage { t_s, uv1, uv2: uv2 + 10.0 * *n as f64 },
                };
            }
            Command::DeleteCaliper(id) => {
                let n = doc.calipers.len();
                doc.calipers.retain(|c| c.id != *id);
                if doc.calipers.len() == n {
                    return false;
                }
                if self.ui_state.selected.is_some_and(|s| s.0 == *id) {
                    self.ui_state.selected = None;
                }
            }
            Command::SetLocked(id, b) => match doc.caliper_mut(*id) {
                Some(c) => c.locked = *b,
                None => return false,
            },
            Command::SetMarch(id, b) => match doc.caliper_mut(*id) {
                Some(c) => c.march = *b,
                None => return false,
            },
            Command::MoveMark(kind, s) => {
                doc.marks.insert(*kind, *s);
            }
            Command::ResetMark(kind) => {
                doc.marks.remove(kind);
            }
            Command::SetReviewed(key, v) => match v {
                Some(v) => {
                    doc.reviewed.insert(key.clone(), *v);
                }
                None => {
                    doc.reviewed.remove(key);
                }
            },
            Command::TakeCaliper { id, key } => {
                let Some(ms) = doc.caliper(*id).and_then(isoline_core::caliper::Caliper::interval_ms) else { return false };
                doc.reviewed.insert(key.clone(), ms);
            }
            _ => return false,
        }
        true
    }

    /// Opens a recording, or a review with its recording. A review beside the recording
    /// (`NAME.review.ron`) is applied, and autosaved work is offered back.
    fn open(&mut self, path: &Path) {
        if review_io::is_review_path(path) {
            self.open_review(path, true);
            return;
        }
        if !self.open_recording(path) {
            return;
        }
        let review_path = review_io::default_review_path(path);
        if review_path.exists() {
            self.open_review(&review_path, false);
        }
        self.review.recovery = isoline_core::review::recover(&review_path);
    }

    /// Opens a review file. With `with_recording`, first opens the recording it names (when it is not the one
    /// open). A review of another recording is never applied silently: the reader is asked.
    fn open_review(&mut self, path: &Path, with_recording: bool) {
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
        match review_io::matches_recording(&review, &l.path) {
            Ok(true) => self.apply_review(review, path.to_path_buf()),
            Ok(false) => self.review.mismatch = Some((path.to_path_buf(), review)),
            Err(e) => self.ui_state.error = Some(format!("{e:#}")),
        }
    }

    /// Makes a loaded review the one being worked on.
    fn apply_review(&mut self, review: isoline_core::review::Review, path: PathBuf) {
        let Some(l) = &self.loaded else { return };
        self.doc = review_io::document_from_review(&review, l);
        self.history.clear();
        self.ledger_cache = None;
        self.review.stage = review.stage;
        self.review.summary.clone_from(&review.summary);
        self.review.base = Some(review);
        self.review.path = Some(path);
        self.review.dirty = false;
    }

    /// Saves the review to `path`, asking the reader's name first when it is not known yet.
    fn save_review(&mut self, path: PathBuf) {
        let Some(reader) = self.settings.reader.clone() else {
            self.review.asking_reader = Some(path);
            return;
        };
        let rows = self.cached_ledger_rows();
        let Some(l) = &self.loaded else { return };
        let input = review_io::ReviewInput { loaded: l, doc: &self.doc, rows: &rows, session: &self.review, reader: &reader, path: &path };
        match review_io::build_review(&input).and_then(|r| r.save(&path).map(|()| r).map_err(anyhow::Error::from)) {
            Ok(r) => {
                self.review.base = Some(r);
                self.review.path = Some(path);
                self.review.dirty = false;
            }
            Err(e) => self.ui_state.error = Some(format!("Could not save the review: {e:#}")),
        }
    }

    /// Writes the autosave sidecar when there is unsaved work and the last autosave is old enough.
    fn autosave_if_due(&mut self) {
        if !self.autosave || !self.review.dirty || self.review.stage == isoline_core::review::Stage::Final {
            return;
        }
        if self.review.last_autosave.is_some_and(|t| t.elapsed().as_secs_f64() < review_io::AUTOSAVE_EVERY_S) {
            return;
        }
        self.review.last_autosave = Some(std::time::Instant::now());
        let reader = self.settings.reader.clone().unwrap_or_else(|| "(reader not named yet)".into());
        let rows = self.cached_ledger_rows();
        let Some(l) = &self.loaded else { return };
        let path = self.review.path.clone().unwrap_or_else(|| review_io::default_review_path(&l.path));
        let input = review_io::ReviewInput { loaded: l, doc: &self.doc, rows: &rows, session: &self.review, reader: &reader, path: &path };
        if let Err(e) = review_io::build_review(&input).and_then(|r| r.autosave(&path).map_err(anyhow::Error::from)) {
            self.ui_state.error = Some(format!("Autosave failed: {e:#}"));
        }
    }

    /// Opens a recording; on failure keeps the current one, shows the error and returns false. Long recordings
    /// are analysed on a background thread.
    fn open_recording(&mut self, path: &Path) -> bool {
        match load(path) {
            Ok(mut loaded) => {
                let rec = Arc::clone(&loaded.recording);
                if rec.len() * rec.leads.len() <= BACKGROUND_ANALYSIS_SAMPLES {
                    loaded.attach(analyze(&rec));
                    self.pending = None;
                } else {
                    let (tx, rx) = std::sync::mpsc::channel();
                    std::thread::spawn(move || {
                        // The receiver may be gone if another file was opened meanwhile: nothing to do then.
                        let _ = tx.send(analyze(&rec));
                    });
                    self.pending = Some(rx);
                }
                self.settings.remember(path);
                self.loaded = Some(loaded);
                self.doc = Document::default();
                self.history.clear();
                self.ui_state = UiState::default();
                self.review = review_io::ReviewSession::default();
                self.start_s = 0.0;
                true
            }
            Err(e) => {
                self.ui_state.error = Some(format!("Could not open {}: {e:#}", path.display()));
                false
            }
        }
    }
}

/// Recordings with more samples than this (all leads together) are analysed in the background, so the Sheet
/// appears at once; smaller ones are analysed before the first frame.
pub const BACKGROUND_ANALYSIS_SAMPLES: usize = 4_000_000;

/// Reads a recording and derives what the views need before analysis: the Tape envelope and the file's
/// annotated beats.
///
/// # Errors
/// The reader's error, naming the file and the problem.
pub fn load(path: &Path) -> anyhow::Result<Loaded> {
    let opened = io::open(path, &OpenOptions::default()).with_context(|| "reading the recording")?;
    let rec = opened.recording;
    if rec.leads.is_empty() || rec.is_empty() {
        anyhow::bail!("the recording has no samples");
    }
    let order = isoline_core::paper::ordered_leads(&rec, isoline_core::paper::LeadOrder::Standard);
    let tape_lead = rec
        .lead_index(&isoline_core::LeadName::Standard(isoline_core::StandardLead::II))
        .or_else(|| order.first().map(|o| o.0))
        .unwrap_or(0);
    let tape = derived::TapeEnvelope::new(&rec, tape_lead);
    let beats = derived::beats_from_annotations(&rec.annotations, rec.len());
    let beats_source = if beats.is_empty() { "analysing…".to_string() } else { format!("{} annotated beats", beats.len()) };
    let mut loaded = Loaded {
        path: path.to_path_buf(),
        format: opened.format,
        recording: Arc::new(rec),
        analysis: None,
        warnings: opened.warnings,
        tape,
        beats,
        beats_source,
        trend: Vec::new(),
        median_rr_ms: None,
    };
    loaded.derive_rates();
    Ok(loaded)
}

/// Filters, detects, delineates and measures (`core::analysis`) with the default filter settings.
#[must_use]
pub fn analyze(recording: &isoline_core::Recording) -> isoline_core::analysis::Analysis {
    isoline_core::analysis::analyze(recording, &FilterSettings::default())
}

struct EframeApp {
    app: IsolineApp,
}

impl eframe::App for EframeApp {
    fn ui(&mut self, ui: &mut egui::Ui, _frame: &mut eframe::Frame) {
        self.app.ui(ui);
        match self.app.wants_dialog.take() {
            Some(Dialog::OpenRecording) => {
                let picked = rfd::FileDialog::new()
                    .add_filter("Recordings and reviews", &["hea", "edf", "csv", "ron"])
                    .add_filter("All files", &["*"])
                    .pick_file();
                if let Some(p) = picked {
                    self.app.run_cmd(Command::Open(p));
                }
            }
            Some(Dialog::OpenReview) => {
                if let Some(p) = rfd::FileDialog::new().add_filter("Reviews", &["ron"]).pick_file() {
                    self.app.run_cmd(Command::OpenReview(p));
                }
            }
            Some(Dialog::SaveReviewAs) => {
                let name = self.app.loaded.as_ref().map(|l| review_io::default_review_path(&l.path));
                let mut dialog = rfd::FileDialog::new().add_filter("Reviews", &["ron"]);
                if let Some(n) = name.as_ref().and_then(|n| n.file_name()) {
                    dialog = dialog.set_file_name(n.to_string_lossy());
                }
                if let Some(p) = dialog.save_file() {
                    self.app.run_cmd(Command::SaveReviewAs(p));
                }
            }
            None => {}
        }
    }

    fn save(&mut self, storage: &mut dyn eframe::Storage) {
        self.app.settings.save(storage);
    }
}

/// Opens the workstation, optionally on a file.
///
/// # Errors
/// When the window cannot be created (no display, no GL).
pub fn run(file: Option<PathBuf>) -> anyhow::Result<ExitCode> {
    let options = eframe::NativeOptions {
        viewport: egui::ViewportBuilder::default().with_inner_size([1500.0, 950.0]).with_title("Isoline"),
        ..Default::default()
    };
    eframe::run_native(
        "Isoline",
        options,
        Box::new(move |cc| {
            let settings = Settings::load(cc.storage);
            let mut app = IsolineApp::with_settings(file, settings);
            app.autosave = true;
            Ok(Box::new(EframeApp { app }))
        }),
    )
    .map_err(|e| anyhow::anyhow!("could not open the window: {e}"))?;
    Ok(ExitCode::SUCCESS)
}
