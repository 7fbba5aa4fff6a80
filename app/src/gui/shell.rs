//! The shell: menu, toolbar, status bar, caution, error banner, help overlay, keyboard shortcuts, drag and drop,
//! and the panels around the Sheet.

use egui::{Key, KeyboardShortcut, Modifiers, Sense, Vec2};
use isoline_core::paper::{GAINS_MM_PER_MV, Layout, LeadOrder, PageSpec, SPEEDS_MM_PER_S, Scheme};
use isoline_core::{CAUTION, LeadName, StandardLead, timescale};

use super::command::Command;
use super::state::Tool;
use super::{IsolineApp, beat_lens, calipers_ui, ledger, settings, sheet, tape};

const SHORTCUTS: [(&str, &str); 15] = [
    ("Ctrl+O", "Open a recording"),
    ("Ctrl+S", "Save the review"),
    ("Ctrl+Z", "Undo"),
    ("Ctrl+Shift+Z / Ctrl+Y", "Redo"),
    ("T", "Time caliper tool"),
    ("V", "Voltage caliper tool"),
    ("P", "Plumb line tool"),
    ("Esc", "Pointer tool, clear selection"),
    ("← / →", "Nudge the selected leg by one sample"),
    ("↑ / ↓", "Nudge the selected level by 10 µV"),
    ("Delete", "Delete the selected caliper"),
    ("M", "March the selected time caliper on/off"),
    ("L", "Lock the selected caliper on/off"),
    ("PageUp / PageDown", "Previous / next window"),
    ("F1", "This help"),
];

/// Draws the shell and every view; returns the commands to apply after layout.
pub fn shell_ui(app: &mut IsolineApp, ui: &mut egui::Ui) -> Vec<Command> {
    let mut out = Vec::new();
    let ctx = ui.ctx().clone();
    if ui.visuals().dark_mode != app.settings.view.dark {
        ctx.set_visuals(if app.settings.view.dark { egui::Visuals::dark() } else { egui::Visuals::light() });
    }
    out.extend(keyboard(app, &ctx));
    for f in ctx.input(|i| i.raw.dropped_files.clone()) {
        out.push(Command::Open(f.path().to_path_buf()));
    }
    egui::Panel::top("menu").show(ui, |ui| {
        egui::MenuBar::new().ui(ui, |ui| menu_ui(app, ui, &mut out));
        toolbar_ui(app, ui, &mut out);
    });
    if let Some(err) = app.ui_state.error.clone() {
        egui::Panel::top("error").show(ui, |ui| {
            ui.horizontal_wrapped(|ui| {
                ui.colored_label(ui.visuals().error_fg_color, format!("Error: {err}"));
                if ui.button("Dismiss").clicked() {
                    out.push(Command::DismissError);
                }
            });
        });
    }
    egui::Panel::bottom("status").show(ui, |ui| {
        if let Some(l) = &app.loaded {
            reading_notes_ui(ui, l);
        }
        ui.colored_label(ui.visuals().warn_fg_color, CAUTION);
        ui.label(status_text(app));
    });
    let ledger_rows = app.cached_ledger_rows();
    if let Some(loaded) = &app.loaded {
        egui::Panel::bottom("tape").resizable(false).show(ui, |ui| {
            out.extend(tape::tape_ui(ui, loaded, app.start_s, app.window_s, &mut app.ui_state.tape));
        });
        let side = (ui.available_width() * 0.36).clamp(280.0, 560.0);
        egui::Panel::right("review").default_size(side).show(ui, |ui| {
            egui::ScrollArea::both().auto_shrink([false, false]).show(ui, |ui| {
                super::review_io::review_panel_ui(&app.review, ui, &mut out);
                ui.separator();
                out.extend(beat_lens::beat_lens_ui(ui, loaded, &app.doc, &app.settings.view, &mut app.ui_state));
                ui.separator();
                ui.strong("Calipers");
                out.extend(calipers_ui::caliper_list_ui(ui, &app.doc, app.ui_state.selected));
                ui.separator();
                ui.strong("Ledger");
                out.extend(ledger::ledger_ui(ui, &ledger_rows, &app.doc, &mut app.ui_state.ledger_edit));
            });
        });
    }
    egui::CentralPanel::default().show(ui, |ui| sheet_panel_ui(app, ui, &mut out));
    if app.ui_state.help_open {
        let mut open = true;
        egui::Window::new("Keyboard shortcuts").open(&mut open).collapsible(false).show(&ctx, |ui| {
            egui::Grid::new("shortcuts").striped(true).show(ui, |ui| {
                for (k, what) in SHORTCUTS {
                    ui.monospace(k);
                    ui.label(what);
                    ui.end_row();
                }
            });
        });
        if !open {
            out.push(Command::ShowHelp(false));
        }
    }
    out.extend(super::review_io::review_windows_ui(&ctx, &mut app.review));
    if app.ui_state.ruler_open {
        let mut bar = app.ui_state.ruler_bar_points;
        out.extend(settings::ruler_ui(&ctx, &app.settings, &mut bar));
        app.ui_state.ruler_bar_points = bar;
    }
    out
}

fn sheet_panel_ui(app: &mut IsolineApp, ui: &mut egui::Ui, out: &mut Vec<Command>) {
    let Some(duration_s) = app.loaded.as_ref().map(|l| l.recording.duration_s()) else {
        ui.centered_and_justified(|ui| {
            ui.heading("Open a recording (Ctrl+O) or drop a .hea, .edf or .csv file here.");
        });
        app.ui_state.sheet = None;
        return;
    };
    let view = &app.settings.view;
    let ppmm = app.settings.points_per_mm(ui.ctx().pixels_per_point());
    let available_mm = f64::from((ui.available_width() - 12.0) / ppmm);
    app.window_s = sheet::window_seconds(view, available_mm, duration_s);
    let spec = PageSpec {
        layout: view.layout.clone(),
        order: view.order,
        paper: view.paper,
        start_s: app.start_s,
        seconds: app.window_s,
    };
    let Some(loaded) = app.loaded.as_mut() else { return };
    if view.filters {
        loaded.prepare_shown(&spec);
    }
    let loaded = &*loaded;
    let page = spec.page(loaded.shown(view.filters).recording);
    let size = Vec2::new(page.width_mm as f32, page.height_mm as f32) * ppmm;
    let name = loaded.path.file_name().map_or_else(String::new, |n| n.to_string_lossy().into_owned());
    let header = format!(
        "{name}   {}   {}   filters: {}   {} – {}",
        view.paper.describe(),
        view.layout,
        filter_text(loaded, view.filters),
        timescale::clock(app.start_s),
        timescale::clock(app.start_s + app.window_s)
    );
    egui::ScrollArea::both().auto_shrink([false, false]).show(ui, |ui| {
        let (rect, response) = ui.allocate_exact_size(size, Sense::click_and_drag());
        let painter = ui.painter_at(rect);
        let geo = sheet::draw_page(&painter, loaded, view, &spec, rect.min, ppmm, &header);
        let cx = calipers_ui::SheetContext { geo: &geo, loaded, doc: &app.doc, view, tool: app.tool };
        out.extend(calipers_ui::calipers_ui(ui, &response, &cx, &mut app.ui_state));
        app.ui_state.sheet = Some(geo);
    });
}

/// Most notes from reading the file shown one per line; the rest are behind a hover.
const NOTES_SHOWN: usize = 3;

/// What the reader noticed in the open file (a lead missing or renamed, gains in doubt, a short signal file),
/// above the caution for as long as the file is open: each changes what the measurements rest on.
fn reading_notes_ui(ui: &mut egui::Ui, loaded: &super::state::Loaded) {
    // The notes name the file; the status bar already does.
    let prefix = format!("{}: ", loaded.path.display());
    let notes: Vec<&str> = loaded.warnings.iter().map(|w| w.strip_prefix(&prefix).unwrap_or(w)).collect();
    let colour = ui.visuals().warn_fg_color;
    for note in notes.iter().take(NOTES_SHOWN) {
        ui.colored_label(colour, format!("Read with a warning: {note}"));
    }
    if notes.len() > NOTES_SHOWN {
        ui.colored_label(colour, format!("and {} more warnings (hover to read)", notes.len() - NOTES_SHOWN))
            .on_hover_text(notes[NOTES_SHOWN..].join("\n"));
    }
}

/// What the filter setting means for the signal on screen.
fn filter_text(loaded: &super::state::Loaded, on: bool) -> String {
    match (&loaded.analysis, on) {
        (Some(a), true) => a.filters.description.clone(),
        (None, true) => "analysis running, signal as recorded".to_string(),
        (_, false) => "off (signal as recorded)".to_string(),
    }
}

fn status_text(app: &IsolineApp) -> String {
    let Some(l) = &app.loaded else { return format!("No recording open   frame {:.1} ms", app.ui_state.last_frame_ms) };
    let rec = &l.recording;
    let name = l.path.file_name().map_or_else(String::new, |n| n.to_string_lossy().into_owned());
    // The Ledger's heart rate once the analysis has run (so the two never disagree); before, the file's beats.
    let bpm = match &l.analysis {
        Some(a) => a.measurements.rr.heart_rate_bpm,
        None => l.median_rr_ms.map(|rr| 60_000.0 / rr),
    };
    let rate = bpm.map_or_else(|| "rate —".to_string(), |bpm| format!("rate {bpm:.0} bpm"));
    let cursor =
        app.ui_state.cursor.map_or_else(String::new, |(t, uv)| format!("   cursor {t:.3} s  {:.2} mV", uv / 1000.0));
    format!(
        "{name} ({})   {} leads   {} Hz   {}   {rate}   {}   filters: {}{cursor}   frame {:.1} ms",
        l.format,
        rec.leads.len(),
        rec.sample_rate.hz(),
        timescale::clock(rec.duration_s()),
        l.beats_source,
        filter_text(l, app.settings.view.filters),
        app.ui_state.last_frame_ms
    )
}

fn menu_ui(app: &IsolineApp, ui: &mut egui::Ui, out: &mut Vec<Command>) {
    ui.menu_button("File", |ui| {
        if ui.button("Open…  (Ctrl+O)").clicked() {
            out.push(Command::OpenDialog);
            ui.close();
        }
        let has = app.loaded.is_some();
        if ui.add_enabled(has, egui::Button::new("Save review  (Ctrl+S)")).clicked() {
            out.push(Command::SaveReview);
            ui.close();
        }
        if ui.add_enabled(has, egui::Button::new("Save review as…")).clicked() {
            out.push(Command::SaveReviewDialog);
            ui.close();
        }
        if ui.button("Open review…").clicked() {
            out.push(Command::OpenReviewDialog);
            ui.close();
        }
        if ui.add_enabled(has, egui::Button::new("Export PNG…")).clicked() {
            out.push(Command::ExportPngDialog);
            ui.close();
        }
        ui.menu_button("Open recent", |ui| {
            if app.settings.recent.is_empty() {
                ui.weak("none yet");
            }
            for p in &app.settings.recent {
                if ui.button(p.display().to_string()).clicked() {
                    out.push(Command::Open(p.clone()));
                    ui.close();
                }
            }
        });
    });
    ui.menu_button("Edit", |ui| {
        let undo = app.history.undo_label().map_or("Undo".to_string(), |w| format!("Undo {w}"));
        if ui.add_enabled(app.history.undo_label().is_some(), egui::Button::new(undo)).clicked() {
            out.push(Command::Undo);
            ui.close();
        }
        let redo = app.history.redo_label().map_or("Redo".to_string(), |w| format!("Redo {w}"));
        if ui.add_enabled(app.history.redo_label().is_some(), egui::Button::new(redo)).clicked() {
            out.push(Command::Redo);
            ui.close();
        }
    });
    ui.menu_button("View", |ui| {
        let v = &app.settings.view;
        for order in [LeadOrder::Standard, LeadOrder::Cabrera] {
            if ui.radio(v.order == order, format!("Lead order: {}", order.as_str())).clicked() {
                out.push(Command::SetOrder(order));
            }
        }
        ui.separator();
        for s in Scheme::ALL {
            if ui.radio(v.scheme == s, format!("Paper: {}", scheme_name(s))).clicked() {
                out.push(Command::SetScheme(s));
            }
        }
        ui.separator();
        if ui.checkbox(&mut v.dark.clone(), "Dark window").clicked() {
            out.push(Command::SetDark(!v.dark));
        }
        if ui.button("Ruler calibration…").clicked() {
            out.push(Command::ShowRuler(true));
            ui.close();
        }
    });
    ui.menu_button("Help", |ui| {
        if ui.button("Keyboard shortcuts  (F1)").clicked() {
            out.push(Command::ShowHelp(true));
            ui.close();
        }
    });
}

/// Display name of a scheme (vocabulary: Rose, Graphite, Mono).
fn scheme_name(s: Scheme) -> &'static str {
    match s {
        Scheme::Rose => "Rose",
        Scheme::Graphite => "Graphite",
        Scheme::Mono => "Mono",
    }
}

fn toolbar_ui(app: &IsolineApp, ui: &mut egui::Ui, out: &mut Vec<Command>) {
    let v = &app.settings.view;
    let lead_of_layout = match &v.layout {
        Layout::ThreeByFourPlusOne { rhythm } => rhythm.clone(),
        Layout::Strip(l) => l.clone(),
        _ => LeadName::Standard(StandardLead::II),
    };
    ui.horizontal_wrapped(|ui| {
        let layouts = [
            ("3x4+1", Layout::ThreeByFourPlusOne { rhythm: lead_of_layout.clone() }),
            ("6x2", Layout::SixByTwo),
            ("12x1", Layout::TwelveByOne),
            ("strip", Layout::Strip(lead_of_layout.clone())),
        ];
        for (name, l) in layouts {
            let on = std::mem::discriminant(&v.layout) == std::mem::discriminant(&l);
            if ui.selectable_label(on, name).clicked() {
                out.push(Command::SetLayout(l));
            }
        }
        if let (Some(loaded), Layout::ThreeByFourPlusOne { .. } | Layout::Strip(_)) = (&app.loaded, &v.layout) {
            // The lead drawn: a strip lead the file lacks falls back to its first lead (see `PageSpec::page`).
            let drawn = match (loaded.recording.lead_index(&lead_of_layout), loaded.recording.leads.first()) {
                (None, Some(first)) => format!("{} (no {lead_of_layout} in the file)", first.name),
                _ => lead_of_layout.to_string(),
            };
            egui::ComboBox::new("layout_lead", "strip lead").selected_text(drawn).show_ui(ui, |ui| {
                for lead in &loaded.recording.leads {
                    if ui.selectable_label(lead.name == lead_of_layout, lead.name.to_string()).clicked() {
                        out.push(Command::SetLayout(match v.layout {
                            Layout::Strip(_) => Layout::Strip(lead.name.clone()),
                            _ => Layout::ThreeByFourPlusOne { rhythm: lead.name.clone() },
                        }));
                    }
                }
            });
        }
        ui.separator();
        for s in SPEEDS_MM_PER_S {
            if ui.selectable_label(v.paper.speed_mm_per_s == s, format!("{s} mm/s")).clicked() {
                out.push(Command::SetSpeed(s));
            }
        }
        ui.separator();
        for g in GAINS_MM_PER_MV {
            if ui.selectable_label(v.paper.gain_mm_per_mv == g, format!("{g} mm/mV")).clicked() {
                out.push(Command::SetGain(g));
            }
        }
        ui.separator();
        for t in [Tool::Pointer, Tool::TimeCaliper, Tool::VoltageCaliper, Tool::PlumbLine] {
            if ui.selectable_label(app.tool == t, t.label()).clicked() {
                out.push(Command::SetTool(t));
            }
        }
        ui.separator();
        let mut snap = v.snap;
        if ui.checkbox(&mut snap, "Snap").changed() {
            out.push(Command::SetSnap(snap));
        }
        let mut filters = v.filters;
        if ui.checkbox(&mut filters, "Filters").changed() {
            out.push(Command::SetFilters(filters));
        }
        ui.separator();
        if ui.add_enabled(app.history.undo_label().is_some(), egui::Button::new("Undo")).clicked() {
            out.push(Command::Undo);
        }
        if ui.add_enabled(app.history.redo_label().is_some(), egui::Button::new("Redo")).clicked() {
            out.push(Command::Redo);
        }
        if app.loaded.is_some() {
            ui.separator();
            if ui.button("Previous window").clicked() {
                out.push(Command::Page(-1.0));
            }
            if ui.button("Next window").clicked() {
                out.push(Command::Page(1.0));
            }
        }
    });
}

fn keyboard(app: &IsolineApp, ctx: &egui::Context) -> Vec<Command> {
    let mut out = Vec::new();
    let typing = ctx.memory(|m| m.focused().is_some()) && ctx.egui_wants_keyboard_input();
    let ctrl = |k| KeyboardShortcut::new(Modifiers::COMMAND, k);
    let ctrl_shift = |k| KeyboardShortcut::new(Modifiers::COMMAND | Modifiers::SHIFT, k);
    ctx.input_mut(|i| {
        if i.consume_shortcut(&ctrl(Key::O)) {
            out.push(Command::OpenDialog);
        }
        if i.consume_shortcut(&ctrl(Key::S)) && app.loaded.is_some() {
            out.push(Command::SaveReview);
        }
        if i.consume_shortcut(&ctrl_shift(Key::Z)) || i.consume_shortcut(&ctrl(Key::Y)) {
            out.push(Command::Redo);
        }
        if i.consume_shortcut(&ctrl(Key::Z)) {
            out.push(Command::Undo);
        }
        if i.key_pressed(Key::F1) {
            out.push(Command::ShowHelp(!app.ui_state.help_open));
        }
        if typing {
            return;
        }
        let sel = app.ui_state.selected;
        let plain = |i: &egui::InputState, k| i.modifiers.is_none() && i.key_pressed(k);
        for (k, t) in [(Key::T, Tool::TimeCaliper), (Key::V, Tool::VoltageCaliper), (Key::P, Tool::PlumbLine)] {
            if plain(i, k) {
                out.push(Command::SetTool(t));
            }
        }
        if i.key_pressed(Key::Escape) {
            out.push(Command::SetTool(Tool::Pointer));
            out.push(Command::Select(None));
        }
        // ← / → move a time leg or plumb line, ↑ / ↓ a voltage level (see SHORTCUTS); each only its own kind.
        let is_voltage = sel
            .and_then(|(id, _)| app.doc.caliper(id))
            .map(|c| matches!(c.kind, isoline_core::caliper::CaliperKind::Voltage { .. }));
        for (k, n, vertical) in [
            (Key::ArrowLeft, -1, false),
            (Key::ArrowRight, 1, false),
            (Key::ArrowDown, -1, true),
            (Key::ArrowUp, 1, true),
        ] {
            if is_voltage == Some(vertical) && i.key_pressed(k) {
                out.push(Command::Nudge(n));
            }
        }
        if let Some((id, _)) = sel {
            if i.key_pressed(Key::Delete) || i.key_pressed(Key::Backspace) {
                out.push(Command::DeleteCaliper(id));
            }
            if let Some(c) = app.doc.caliper(id) {
                if plain(i, Key::M) {
                    out.push(Command::SetMarch(id, !c.march));
                }
                if plain(i, Key::L) {
                    out.push(Command::SetLocked(id, !c.locked));
                }
            }
        }
        if i.key_pressed(Key::PageDown) {
            out.push(Command::Page(1.0));
        }
        if i.key_pressed(Key::PageUp) {
            out.push(Command::Page(-1.0));
        }
    });
    out
}
