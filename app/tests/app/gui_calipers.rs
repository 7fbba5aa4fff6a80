//! Calipers on the Sheet: placing, dragging, marching, nudging, locking, deleting, undo/redo, taking a reading
//! into the Ledger (egui_kittest, no GPU).

#![allow(clippy::unwrap_used, clippy::expect_used)]

use crate::gui_support::{click_at, drag, harness, settle, sheet_point};
use egui::Pos2;
use egui_kittest::Harness;
use egui_kittest::kittest::Queryable;
use isoline::gui::IsolineApp;
use isoline_core::caliper::CaliperKind;

/// Opens the PTB record (1000 Hz), switches snapping off and places a time caliper at 2 s.
fn with_time_caliper() -> Harness<'static, IsolineApp> {
    let mut h = harness(Some("ptb-s0010/s0010_re.hea"));
    h.get_by_label("Snap").click();
    settle(&mut h);
    assert!(!h.state().settings.view.snap);
    h.get_by_label("Time caliper").click();
    settle(&mut h);
    let p = sheet_point(&h, 2.0);
    click_at(&mut h, p);
    assert_eq!(h.state().doc.calipers.len(), 1);
    h
}

fn legs(h: &Harness<'static, IsolineApp>) -> (f64, f64) {
    match h.state().doc.calipers[0].kind {
        CaliperKind::Time { t1_s, t2_s } => (t1_s, t2_s),
        other => panic!("not a time caliper: {other:?}"),
    }
}

#[test]
fn placing_and_dragging_a_time_caliper_reads_ms_and_bpm() {
    let mut h = with_time_caliper();
    let (t1, t2) = legs(&h);
    assert!((t1 - 2.0).abs() < 0.02, "first leg where clicked: {t1}");
    // A new time caliper spans the median RR of the detected beats.
    let loaded = h.state().loaded.as_ref().unwrap();
    let rr_s = isoline_core::measure::hrv::median_rr_ms(&loaded.beats, loaded.recording.sample_rate, &loaded.gaps)
        .unwrap()
        / 1000.0;
    assert!((t2 - t1 - rr_s).abs() < 1e-9, "span {} vs RR {rr_s}", t2 - t1);
    // Drag the second leg to 800 ms after the first.
    let from = sheet_point(&h, t2);
    let to = Pos2::new(sheet_point(&h, t1 + 0.8).x, from.y);
    drag(&mut h, from, to);
    let c = &h.state().doc.calipers[0];
    // Source: references.md §10: 800 ms -> 75 bpm (HR = 60000 / ms).
    assert!((c.interval_ms().unwrap() - 800.0).abs() < 0.5, "{:?}", c.kind);
    assert!((c.bpm().unwrap() - 75.0).abs() < 0.05);
    h.get_by_label_contains("#1 800 ms  75.0 bpm");
}

#[test]
fn marching_repeats_the_span() {
    let mut h = with_time_caliper();
    h.get_by_label("March #1").click();
    settle(&mut h);
    let c = h.state().doc.calipers[0].clone();
    assert!(c.march);
    let span = c.interval_ms().unwrap() / 1000.0;
    let legs = c.march_times(0.0, 10.0);
    // The span marched over the 10 s window, both ways from the first leg.
    assert!(legs.len() >= (10.0 / span) as usize, "{legs:?}");
    for w in legs.windows(2) {
        assert!((w[1] - w[0] - span).abs() < 1e-9);
    }
    // Undo turns marching off again.
    h.get_by_label("Undo").click();
    settle(&mut h);
    assert!(!h.state().doc.calipers[0].march);
}

#[test]
fn deleting_then_undo_and_redo() {
    let mut h = with_time_caliper();
    h.get_by_label("Delete #1").click();
    settle(&mut h);
    assert!(h.state().doc.calipers.is_empty());
    h.get_by_label("Undo").click();
    settle(&mut h);
    assert_eq!(h.state().doc.calipers.len(), 1);
    h.get_by_label("Redo").click();
    settle(&mut h);
    assert!(h.state().doc.calipers.is_empty());
    // Undo twice: the caliper comes back, then the placement itself is undone.
    h.key_press_modifiers(egui::Modifiers::COMMAND, egui::Key::Z);
    settle(&mut h);
    assert_eq!(h.state().doc.calipers.len(), 1);
    h.key_press_modifiers(egui::Modifiers::COMMAND, egui::Key::Z);
    settle(&mut h);
    assert!(h.state().doc.calipers.is_empty());
}

#[test]
fn a_drag_is_one_undo_step() {
    let mut h = with_time_caliper();
    let (t1, t2) = legs(&h);
    let from = sheet_point(&h, t2);
    let to = Pos2::new(sheet_point(&h, t1 + 0.6).x, from.y);
    drag(&mut h, from, to);
    assert!((legs(&h).1 - (t1 + 0.6)).abs() < 1e-3);
    h.get_by_label("Undo").click();
    settle(&mut h);
    assert!((legs(&h).1 - t2).abs() < 1e-12, "one undo restores the leg from before the whole drag");
}

#[test]
fn arrow_keys_nudge_the_selected_leg_by_one_sample() {
    let mut h = with_time_caliper();
    let (_, t2) = legs(&h);
    // Placing selects the second leg.
    h.key_press(egui::Key::ArrowRight);
    settle(&mut h);
    h.key_press(egui::Key::ArrowRight);
    settle(&mut h);
    // 1000 Hz record: one sample is 1 ms.
    assert!((legs(&h).1 - t2 - 0.002).abs() < 1e-9);
    h.key_press(egui::Key::ArrowLeft);
    settle(&mut h);
    assert!((legs(&h).1 - t2 - 0.001).abs() < 1e-9);
    // ↑ / ↓ step voltage levels (the shortcuts' help): a time leg stays (before, ↑ moved it a sample).
    h.key_press(egui::Key::ArrowUp);
    settle(&mut h);
    h.key_press(egui::Key::ArrowUp);
    settle(&mut h);
    assert!((legs(&h).1 - t2 - 0.001).abs() < 1e-9);
}

#[test]
fn a_locked_caliper_does_not_move() {
    let mut h = with_time_caliper();
    h.get_by_label("Lock #1").click();
    settle(&mut h);
    assert!(h.state().doc.calipers[0].locked);
    let before = legs(&h);
    let from = sheet_point(&h, before.1);
    drag(&mut h, from, from + egui::vec2(60.0, 0.0));
    h.key_press(egui::Key::ArrowRight);
    settle(&mut h);
    assert_eq!(legs(&h), before);
}

#[test]
fn voltage_caliper_and_plumb_line() {
    let mut h = harness(Some("ptb-s0010/s0010_re.hea"));
    h.get_by_label("Voltage caliper").click();
    settle(&mut h);
    let geo = h.state().ui_state.sheet.clone().unwrap();
    let row = geo.page.rows.last().unwrap().clone();
    let cell = row.cells[0].clone();
    // Click 10 mm above the rhythm strip's baseline: +1 mV at 10 mm/mV.
    let p = geo.screen_from_paper(cell.x_from_time(&geo.page.paper, 3.0), row.baseline_mm - 10.0);
    click_at(&mut h, p);
    let c = h.state().doc.calipers[0].clone();
    assert!((c.amplitude_uv().unwrap() - 1000.0).abs() < 1.0, "{:?}", c.kind);
    assert_eq!(c.lead.as_deref(), Some("II"));
    // ↑ raises the selected level by 10 µV; ← / → leave it (before, → raised it too).
    let level = |h: &Harness<'static, IsolineApp>| match h.state().doc.calipers[0].kind {
        CaliperKind::Voltage { uv2, .. } => uv2,
        _ => f64::NAN,
    };
    let before = level(&h);
    h.key_press(egui::Key::ArrowRight);
    settle(&mut h);
    assert_eq!(level(&h), before);
    h.key_press(egui::Key::ArrowUp);
    settle(&mut h);
    assert!((level(&h) - before - 10.0).abs() < 1e-9, "{} after {before}", level(&h));
    h.get_by_label("Plumb line").click();
    settle(&mut h);
    let p = sheet_point(&h, 4.0);
    click_at(&mut h, p);
    assert!(matches!(h.state().doc.calipers[1].kind, CaliperKind::Plumb { t_s } if (t_s - 4.0).abs() < 0.02));
}

#[test]
fn a_caliper_reading_goes_into_the_ledger() {
    let mut h = with_time_caliper();
    h.get_by_label("To Ledger #1").click();
    settle(&mut h);
    h.get_by_label("as QT").click();
    settle(&mut h);
    let ms = h.state().doc.calipers[0].interval_ms().unwrap();
    let rows = h.state().ledger_rows();
    let row = |k: &str| rows.iter().find(|r| r.key == k).unwrap().clone();
    let qt = row("qt_ms");
    assert!((qt.reviewed.unwrap() - ms).abs() < 1e-6);
    assert_eq!(qt.origin, Some(isoline::gui::state::Origin::Moved));
    // QTc follows the reviewed QT. Source: Bazett, Heart 1920;7:353-70 (QT/√RR).
    let rr = row("rr_ms").reviewed.unwrap();
    assert!((row("qtc_bazett_ms").reviewed.unwrap() - ms / (rr / 1000.0).sqrt()).abs() < 1e-6);
}
