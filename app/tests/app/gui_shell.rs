//! Workstation shell: opening files, errors, layout, speed, gain, scheme, help (egui_kittest, no GPU).

#![allow(clippy::unwrap_used, clippy::expect_used)]

use crate::gui_support::{data, harness, settle};
use egui_kittest::kittest::Queryable;
use isoline::gui::IsolineApp;
use isoline_core::paper::{Layout, Scheme};

#[test]
fn opening_a_sample_shows_its_leads_and_the_caution() {
    let h = harness(Some("ptb-s0010/s0010_re.hea"));
    let app = h.state();
    let loaded = app.loaded.as_ref().expect("recording open");
    assert_eq!(loaded.recording.leads.len(), 15);
    assert!(app.ui_state.error.is_none());
    // 3x4+1: three rows of four leads and the rhythm strip.
    let geo = app.ui_state.sheet.as_ref().expect("Sheet drawn");
    assert_eq!(geo.page.rows.len(), 4);
    assert_eq!(geo.page.rows[0].cells.iter().map(|c| c.label.as_str()).collect::<Vec<_>>(), ["I", "aVR", "V1", "V4"]);
    h.get_by_label(isoline_core::CAUTION);
    h.get_by_label_contains("s0010_re.hea (wfdb)   15 leads   1000 Hz");
}

#[test]
fn what_the_reader_noticed_is_shown_while_the_file_is_open() {
    // A lead the file leaves empty: the workstation draws it blank and says so (before, the note reached the
    // command line only).
    let dir = tempfile::tempdir().unwrap();
    let path = dir.path().join("no-lead-i.csv");
    let mut text = String::from("time_s,I,II\n");
    for k in 0..2500 {
        let t = f64::from(k) / 500.0;
        text.push_str(&format!("{t:.3},NaN,{:.4}\n", (t * 7.0).sin()));
    }
    std::fs::write(&path, text).unwrap();
    let app = IsolineApp::new(Some(path));
    let mut h = egui_kittest::Harness::builder()
        .with_size(egui::Vec2::new(1400.0, 900.0))
        .build_ui_state(|ui, app: &mut IsolineApp| app.ui(ui), app);
    settle(&mut h);
    assert!(h.state().loaded.is_some());
    h.get_by_label(
        "Read with a warning: lead I holds no valid sample: it is drawn blank and left out of the measurements",
    );
}

#[test]
fn an_unreadable_file_shows_an_error_instead_of_crashing() {
    let dir = tempfile::tempdir().unwrap();
    let bad = dir.path().join("broken.hea");
    std::fs::write(&bad, "this is not a WFDB header\n\u{0}\u{1}garbage").unwrap();
    let app = IsolineApp::new(Some(bad.clone()));
    let mut h = egui_kittest::Harness::builder()
        .with_size(egui::Vec2::new(1400.0, 900.0))
        .build_ui_state(|ui, app: &mut IsolineApp| app.ui(ui), app);
    settle(&mut h);
    assert!(h.state().loaded.is_none());
    let err = h.state().ui_state.error.clone().expect("error kept");
    assert!(err.contains("broken.hea"), "{err}");
    h.get_by_label_contains("Error: Could not open");
    h.get_by_label("Dismiss").click();
    settle(&mut h);
    assert!(h.state().ui_state.error.is_none());
    assert!(h.query_by_label_contains("Error:").is_none());
}

#[test]
fn a_missing_file_keeps_the_open_recording() {
    let mut h = harness(Some("ptb-s0010/s0010_re.hea"));
    h.state_mut().run_cmd(isoline::gui::command::Command::Open(data("no/such/record.hea")));
    settle(&mut h);
    assert!(h.state().loaded.is_some(), "the open recording stays");
    assert!(h.state().ui_state.error.as_deref().is_some_and(|e| e.contains("record.hea")));
}

#[test]
fn switching_layouts_relays_the_sheet() {
    let mut h = harness(Some("ptb-s0010/s0010_re.hea"));
    h.get_by_label("6x2").click();
    settle(&mut h);
    assert_eq!(h.state().settings.view.layout, Layout::SixByTwo);
    let rows = &h.state().ui_state.sheet.as_ref().unwrap().page.rows;
    assert_eq!(rows.len(), 6);
    assert_eq!(rows[0].cells.len(), 2);
    h.get_by_label("12x1").click();
    settle(&mut h);
    // Every lead of the record, one per row (12 standard + 3 Frank leads).
    assert_eq!(h.state().ui_state.sheet.as_ref().unwrap().page.rows.len(), 15);
    h.get_by_label("strip").click();
    settle(&mut h);
    let geo = h.state().ui_state.sheet.clone().unwrap();
    assert_eq!(geo.page.rows.len(), 1);
    assert_eq!(geo.page.rows[0].cells[0].label, "II");
}

#[test]
fn switching_speed_changes_time_per_millimetre() {
    let mut h = harness(Some("ptb-s0010/s0010_re.hea"));
    let span = |h: &egui_kittest::Harness<'static, IsolineApp>| {
        let g = h.state().ui_state.sheet.clone().unwrap();
        let cell = g.page.rows.last().unwrap().cells[0].clone();
        (g.x_of_time(&cell, 1.2) - g.x_of_time(&cell, 1.0)) / g.points_per_mm
    };
    // Source: Kligfield et al. 2007 (references.md §1): at 25 mm/s 200 ms = 5 mm; at 50 mm/s 200 ms = 10 mm.
    assert!((span(&h) - 5.0).abs() < 1e-3);
    h.get_by_label("50 mm/s").click();
    settle(&mut h);
    assert_eq!(h.state().settings.view.paper.speed_mm_per_s, 50.0);
    assert!((span(&h) - 10.0).abs() < 1e-3);
    h.get_by_label("12.5 mm/s").click();
    settle(&mut h);
    assert!((span(&h) - 2.5).abs() < 1e-3);
}

#[test]
fn switching_gain_changes_millimetres_per_millivolt() {
    let mut h = harness(Some("ptb-s0010/s0010_re.hea"));
    let mm_per_mv = |h: &egui_kittest::Harness<'static, IsolineApp>| {
        let g = h.state().ui_state.sheet.clone().unwrap();
        let row = &g.page.rows[0];
        row.baseline_mm - row.y_from_uv(&g.page.paper, 1000.0, false)
    };
    // Source: Kligfield et al. 2007: 10 mm/mV standard; the calibration pulse is 1 mV tall.
    assert!((mm_per_mv(&h) - 10.0).abs() < 1e-9);
    h.get_by_label("20 mm/mV").click();
    settle(&mut h);
    assert!((mm_per_mv(&h) - 20.0).abs() < 1e-9);
    h.get_by_label("5 mm/mV").click();
    settle(&mut h);
    assert!((mm_per_mv(&h) - 5.0).abs() < 1e-9);
    let g = h.state().ui_state.sheet.clone().unwrap();
    let pulse = g.page.rows[0].calibration_pulse(&g.page.paper);
    assert!(((pulse[0].1 - pulse[2].1) - 5.0).abs() < 1e-9);
}

#[test]
fn scheme_and_lead_order_from_the_view_menu() {
    let mut h = harness(Some("ptb-s0010/s0010_re.hea"));
    h.get_by_label("View").click();
    settle(&mut h);
    h.get_by_label("Paper: Graphite").click();
    settle(&mut h);
    assert_eq!(h.state().settings.view.scheme, Scheme::Graphite);
    h.get_by_label("View").click();
    settle(&mut h);
    h.get_by_label("Lead order: cabrera").click();
    settle(&mut h);
    let g = h.state().ui_state.sheet.clone().unwrap();
    assert_eq!(g.page.rows[0].cells[0].label, "aVL");
    assert!(g.page.rows.iter().flat_map(|r| &r.cells).any(|c| c.label == "\u{2212}aVR" && c.inverted));
}

#[test]
fn help_overlay_lists_shortcuts() {
    let mut h = harness(None);
    assert!(h.query_by_label("Keyboard shortcuts").is_none());
    h.key_press(egui::Key::F1);
    settle(&mut h);
    h.get_by_label("Nudge the selected leg by one sample");
    h.get_by_label_contains("Open a recording (Ctrl+O)");
}

#[test]
fn ruler_calibration_sets_true_scale_and_is_remembered() {
    let mut h = harness(Some("ptb-s0010/s0010_re.hea"));
    h.get_by_label("View").click();
    settle(&mut h);
    h.get_by_label("Ruler calibration…").click();
    settle(&mut h);
    // The reader matched a 400-point bar to an ID-1 card (85.60 mm, ISO/IEC 7810; from memory).
    h.state_mut().ui_state.ruler_bar_points = 400.0;
    settle(&mut h);
    h.get_by_label("Use this calibration").click();
    settle(&mut h);
    let ppmm = h.state().ui_state.sheet.as_ref().unwrap().points_per_mm;
    assert!((ppmm - 400.0 / 85.6).abs() < 1e-3, "{ppmm}");
    // Remembered between runs through eframe's storage.
    struct Mem(std::collections::HashMap<String, String>);
    impl eframe::Storage for Mem {
        fn get_string(&self, key: &str) -> Option<String> {
            self.0.get(key).cloned()
        }
        fn set_string(&mut self, key: &str, value: String) {
            self.0.insert(key.to_string(), value);
        }
        fn remove_string(&mut self, key: &str) {
            self.0.remove(key);
        }
        fn flush(&mut self) {}
    }
    let mut mem = Mem(Default::default());
    h.state().settings.save(&mut mem);
    let back = isoline::gui::settings::Settings::load(Some(&mem));
    assert_eq!(back, h.state().settings);
    assert!(back.recent[0].ends_with("s0010_re.hea"));
}

#[test]
fn dark_window_and_graphite_paper() {
    let mut h = harness(Some("ptb-s0010/s0010_re.hea"));
    h.get_by_label("View").click();
    settle(&mut h);
    h.get_by_label("Dark window").click();
    settle(&mut h);
    assert!(h.state().settings.view.dark);
    assert!(h.ctx.global_style().visuals.dark_mode);
}

#[test]
fn dropping_a_file_opens_it() {
    #[derive(Debug)]
    struct Dropped(std::path::PathBuf);
    impl egui::DroppedFile for Dropped {
        fn path(&self) -> &std::path::Path {
            &self.0
        }
        fn bytes(&self) -> Result<Vec<u8>, String> {
            std::fs::read(&self.0).map_err(|e| e.to_string())
        }
    }
    let mut h = harness(None);
    assert!(h.state().loaded.is_none());
    h.input_mut().dropped_files.push(std::sync::Arc::new(Dropped(data("qtdb/sel100.hea"))));
    settle(&mut h);
    let loaded = h.state().loaded.as_ref().expect("dropped file opened");
    assert!(loaded.path.ends_with("sel100.hea"));
    assert_eq!(h.state().settings.recent.len(), 1);
}

#[test]
fn filters_switch_between_filtered_and_recorded_signal() {
    let mut h = harness(Some("ptb-s0010/s0010_re.hea"));
    assert!(h.state().settings.view.filters, "filters on by default");
    let loaded = h.state().loaded.as_ref().unwrap();
    let filtered = loaded.shown(true).recording.leads[0].samples[5000];
    let raw = loaded.shown(false).recording.leads[0].samples[5000];
    assert_ne!(filtered, raw, "the baseline filter changes the signal");
    h.get_by_label_contains("0.5–").hover();
    h.get_by_label("Filters").click();
    settle(&mut h);
    assert!(!h.state().settings.view.filters);
    h.get_by_label_contains("filters: off (signal as recorded)");
}

#[test]
fn page_keys_move_the_window() {
    let mut h = harness(Some("qtdb/sel100.hea"));
    assert_eq!(h.state().start_s, 0.0);
    h.key_press(egui::Key::PageDown);
    settle(&mut h);
    let w = h.state().window_s;
    assert!((h.state().start_s - w).abs() < 1e-9);
    h.get_by_label("Previous window").click();
    settle(&mut h);
    assert_eq!(h.state().start_s, 0.0);
}

#[test]
fn exporting_the_page_writes_a_png() {
    let dir = tempfile::tempdir().unwrap();
    let out = dir.path().join("page.png");
    let mut h = harness(Some("ptb-s0010/s0010_re.hea"));
    h.state_mut().run_cmd(isoline::gui::command::Command::AddCaliper {
        kind: isoline_core::caliper::CaliperKind::Time { t1_s: 1.0, t2_s: 1.8 },
        lead: None,
    });
    h.state_mut().run_cmd(isoline::gui::command::Command::ExportPng(out.clone()));
    settle(&mut h);
    assert!(h.state().ui_state.error.is_none(), "{:?}", h.state().ui_state.error);
    let bytes = std::fs::read(&out).unwrap();
    assert_eq!(&bytes[..8], b"\x89PNG\r\n\x1a\n");
    // Width of the 3x4+1 page at 300 dpi: 10 s at 25 mm/s plus margins, from core::paper.
    let page = h.state().ui_state.sheet.as_ref().unwrap().page.width_mm;
    let width = u32::from_be_bytes([bytes[16], bytes[17], bytes[18], bytes[19]]);
    assert!((f64::from(width) - page * 300.0 / 25.4).abs() < 2.0, "{width} px for {page} mm");
    // A name not ending in .png is refused with the reason, and nothing is written.
    let jpg = dir.path().join("ECG v1.2");
    h.state_mut().run_cmd(isoline::gui::command::Command::ExportPng(jpg.clone()));
    let err = h.state().ui_state.error.clone().unwrap_or_default();
    assert!(err.contains("PNG only"), "{err}");
    assert!(!jpg.exists());
    // Exporting with no recording shows an error instead of crashing.
    let mut empty = harness(None);
    empty.state_mut().run_cmd(isoline::gui::command::Command::ExportPng(dir.path().join("none.png")));
    assert!(empty.state().ui_state.error.is_some());
}

#[test]
fn the_status_bar_rate_is_the_ledger_heart_rate() {
    // LUDB record 1: the median RR (46 bpm) and the Ledger's mean NN (1319 ms, 45 bpm) differ; the
    // status bar must show the Ledger's figure once the analysis has run.
    let h = harness(Some("ludb/1.hea"));
    let loaded = h.state().loaded.as_ref().expect("recording open");
    let hr = loaded.analysis.as_ref().expect("analysis done").measurements.rr.heart_rate_bpm.expect("heart rate");
    h.get_by_label_contains(&format!("   rate {hr:.0} bpm   "));
}

#[test]
fn a_long_recording_is_shown_filtered_span_by_span() {
    // Over an hour (70 min of the demo Holter: 3 leads, 250 Hz) the analysis keeps no filtered copy: the Sheet
    // filters the samples around its window, the Tape envelope was filtered span by span, and the exported
    // page is the filtered window too.
    let dir = tempfile::tempdir().unwrap();
    let path = dir.path().join("ward9-long.edf");
    let spec = isoline_core::synth::SynthSpec { seconds: 4200.0, ..isoline_core::synth::Scenario::Holter.spec() };
    let syn = isoline_core::synth::generate(&spec).unwrap();
    isoline_core::io::edf::write(&path, &syn.recording, &Default::default()).unwrap();
    let app = IsolineApp::new(Some(path));
    let mut h = egui_kittest::Harness::builder()
        .with_size(egui::Vec2::new(1600.0, 1000.0))
        .build_ui_state(|ui, app: &mut IsolineApp| app.ui(ui), app);
    h.state_mut().poll_analysis(true);
    h.state_mut().run_cmd(isoline::gui::command::Command::SetStart(2000.0));
    settle(&mut h);
    let loaded = h.state().loaded.as_ref().expect("opened");
    let analysis = loaded.analysis.as_ref().expect("analysed");
    assert!(analysis.filtered.is_none(), "no whole filtered copy of a long recording");
    let shown = loaded.shown(true);
    let (a, b) = (2000 * 250, (2000.0 + h.state().window_s) as usize * 250);
    assert!(shown.first <= a && b <= shown.first + shown.recording.len(), "the span holds the window");
    let again = analysis.filtered_span(&loaded.recording, a, b);
    let k = a - shown.first;
    assert_eq!(&shown.recording.leads[1].samples[k..k + (b - a)], &again.recording.leads[1].samples[..]);
    assert_ne!(again.recording.leads[1].samples, loaded.recording.leads[1].samples[a..b], "filtered, not raw");
    let tape = &loaded.tape;
    assert!(tape.min.len() > 1000 && tape.min.iter().zip(&tape.max).all(|(lo, hi)| lo <= hi));
    let png = dir.path().join("page.png");
    h.state_mut().export_png(&png).unwrap();
    assert!(std::fs::metadata(&png).unwrap().len() > 10_000);
}
