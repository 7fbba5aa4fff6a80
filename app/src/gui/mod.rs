//! The workstation window (eframe/egui): a shell around the Sheet, Tape, Beat lens and Ledger.
//!
//! [`IsolineApp`] holds all state and draws itself into any [`egui::Ui`], so UI tests drive it with
//! egui_kittest without a window; the eframe [`App`](eframe::App) only delegates to it and persists settings.

use std::path::{Path, PathBuf};
use std::process::ExitCode;
use std::sync::Arc;

use anyhow::Context as _;
use isoline_core::filter::FilterSettings;
use isoline_core::io::{self, OpenOptions, wfdb_annotations};
use isoline_core::render::TapeEnvelope;

pub mod beat_lens;
pub mod calipers_ui;
pub mod command;
mod edits;
mod export;
pub mod ledger;
mod review_actions;
pub mod review_io;
pub mod settings;
pub mod sheet;
mod shell;
pub mod state;
pub mod tape;

use command::{Command, History};
use settings::Settings;
use state::{Document, Loaded, Tool, UiState};

/// A file dialog the shell should show.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Dialog {
    /// Pick a recording (or review) to open.
    OpenRecording,
    /// Pick a review to open.
    OpenReview,
    /// Choose where to save the review.
    SaveReviewAs,
    /// Choose where to export the page as PNG.
    ExportPng,
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
    pending: Option<std::sync::mpsc::Receiver<state::Analysed>>,
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
        if cmd.edits_document()
            || matches!(cmd, Command::Open(_) | Command::OpenReview(_) | Command::Undo | Command::Redo)
        {
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
            Command::ExportPngDialog => self.wants_dialog = Some(Dialog::ExportPng),
            Command::ExportPng(p) => {
                if let Err(e) = self.export_png(&p) {
                    self.ui_state.error = Some(format!("Could not export {}: {e:#}", p.display()));
                }
            }
            Command::SaveReviewDialog => self.wants_dialog = Some(Dialog::SaveReviewAs),
            Command::SaveReview
            | Command::SaveReviewAs(_)
            | Command::OpenReview(_)
            | Command::SetStage(_)
            | Command::Reopen
            | Command::SetSummary(_)
            | Command::SetReader(_)
            | Command::ApplyMismatched(_)
            | Command::Recover(_)
            | Command::ShowHistory(_) => self.run_review_cmd(cmd),
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

    /// Opens a recording; on failure keeps the current one, shows the error and returns false. Long recordings
    /// are analysed on a background thread.
    fn open_recording(&mut self, path: &Path) -> bool {
        match load(path) {
            Ok(mut loaded) => {
                let rec = Arc::clone(&loaded.recording);
                let tape_lead = loaded.tape.lead;
                if rec.len() * rec.leads.len() <= BACKGROUND_ANALYSIS_SAMPLES {
                    loaded.attach(state::Analysed::of(&rec, tape_lead));
                    self.pending = None;
                } else {
                    let (tx, rx) = std::sync::mpsc::channel();
                    std::thread::spawn(move || {
                        // The receiver may be gone if another file was opened meanwhile: nothing to do then.
                        let _ = tx.send(state::Analysed::of(&rec, tape_lead));
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
    let tape = TapeEnvelope::new(&rec, tape_lead);
    let beats = wfdb_annotations::beats_from_annotations(&rec.annotations, rec.len());
    let beats_source =
        if beats.is_empty() { "analysing…".to_string() } else { format!("{} annotated beats", beats.len()) };
    let gaps = rec.gaps();
    let mut loaded = Loaded {
        path: path.to_path_buf(),
        format: opened.format,
        recording: Arc::new(rec),
        analysis: None,
        warnings: opened.warnings,
        gaps,
        tape,
        beats,
        beats_source,
        trend: Vec::new(),
        median_rr_ms: None,
        shown_span: None,
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
            Some(Dialog::ExportPng) => {
                let name = self
                    .app
                    .loaded
                    .as_ref()
                    .and_then(|l| l.path.file_stem())
                    .map(|s| format!("{}.png", s.to_string_lossy()));
                let mut dialog = rfd::FileDialog::new().add_filter("PNG image", &["png"]);
                if let Some(n) = name {
                    dialog = dialog.set_file_name(n);
                }
                // The name offered ends in .png; a name changed to another ending is refused by the export (the
                // dialog has already asked about replacing the file it names, so no other name is written).
                if let Some(p) = dialog.save_file() {
                    self.app.run_cmd(Command::ExportPng(p));
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
    .map_err(|e| anyhow::anyhow!("could not open the window: {}", no_window_reason(&e.to_string())))?;
    Ok(ExitCode::SUCCESS)
}

/// Why the window could not be opened, said for the person at the keyboard: with no display to draw on (neither
/// `DISPLAY` nor `WAYLAND_DISPLAY` set, as over ssh or in a terminal session), that, and that the command-line tools
/// work without one; otherwise the windowing system's own message (`detail`).
fn no_window_reason(detail: &str) -> String {
    let set = |v: &str| std::env::var_os(v).is_some_and(|x| !x.is_empty());
    if cfg!(target_os = "linux") && !set("DISPLAY") && !set("WAYLAND_DISPLAY") {
        "no display to draw on (neither DISPLAY nor WAYLAND_DISPLAY is set); the workstation needs a desktop \
         session, while `isoline info`, `measure`, `render` and the other commands work without one"
            .to_string()
    } else {
        detail.to_string()
    }
}
