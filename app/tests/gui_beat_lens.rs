//! Beat lens and Ledger: placing and dragging marks recomputes intervals and every QTc; the Tape moves the
//! Sheet (egui_kittest, no GPU).

#![allow(clippy::unwrap_used, clippy::expect_used)]

mod gui_support;

use egui::Pos2;
use egui_kittest::kittest::Queryable;
use egui_kittest::Harness;
use gui_support::{click_at, drag, harness, settle};
use isoline::gui::IsolineApp;
use isoline_core::beat::MarkKind;

fn lens_x(h: &Harness<'static, IsolineApp>, ms: f64) -> Pos2 {
    let app = h.state();
    let rep = app.loaded.as_ref().unwrap().representative.as_ref().unwrap();
    let geo = app.ui_state.lens.unwrap();
    Pos2::new(geo.x_of_sample(rep.sample_from_ms(ms)), geo.rect.center().y)
}

fn reviewed(h: &Harness<'static, IsolineApp>, key: &str) -> f64 {
    h.state().ledger_rows().into_iter().find(|r| r.key == key).and_then(|r| r.reviewed).unwrap()
}

/// QT database record sel100 (250 Hz): its beat annotations give the representative beat. Places the five marks
/// at known times from the R peak (multiples of the 4 ms sample period).
fn with_marks() -> Harness<'static, IsolineApp> {
    let mut h = harness(Some("qtdb/sel100.hea"));
    assert!(h.state().loaded.as_ref().unwrap().representative.is_some(), "representative beat from annotations");
    h.get_by_label("P onset").click();
    settle(&mut h);
    for ms in [-200.0, -100.0, -48.0, 48.0, 352.0] {
        let p = lens_x(&h, ms);
        click_at(&mut h, p);
    }
    assert_eq!(h.state().doc.marks.len(), 5);
    h
}

#[test]
fn placed_marks_give_intervals_in_the_ledger() {
    let h = with_marks();
    assert!((reviewed(&h, "pr_ms") - 152.0).abs() < 1e-9);
    assert!((reviewed(&h, "qrs_ms") - 96.0).abs() < 1e-9);
    assert!((reviewed(&h, "qt_ms") - 400.0).abs() < 1e-9);
    assert!((reviewed(&h, "p_duration_ms") - 100.0).abs() < 1e-9);
    let qt = h.state().ledger_rows().into_iter().find(|r| r.key == "qt_ms").unwrap();
    assert_eq!(qt.origin, Some(isoline::gui::state::Origin::Placed));
}

#[test]
fn dragging_t_end_recomputes_qt_and_every_qtc() {
    let mut h = with_marks();
    let rr = reviewed(&h, "rr_ms");
    assert!(rr > 300.0 && rr < 2000.0, "RR from the annotated beats: {rr}");
    let bazett_before = reviewed(&h, "qtc_bazett_ms");
    let from = lens_x(&h, 352.0);
    let to = lens_x(&h, 392.0);
    drag(&mut h, from, to);
    assert_eq!(h.state().doc.marks.get(&MarkKind::TEnd).copied(), Some(h.state().loaded.as_ref().unwrap().representative.as_ref().unwrap().sample_from_ms(392.0).round() as usize));
    let qt = reviewed(&h, "qt_ms");
    assert!((qt - 440.0).abs() < 1e-9, "QT after the drag: {qt}");
    let (qt_s, rr_s) = (qt / 1000.0, rr / 1000.0);
    let hr = 60.0 / rr_s;
    // Sources: Bazett 1920; Fridericia 1920; Sagie et al. 1992; Hodges et al. 1983; Rautaharju et al. 2014
    // (formulas as in references.md §3), computed here independently of the app.
    let expect = [
        ("qtc_bazett_ms", qt_s / rr_s.sqrt() * 1000.0),
        ("qtc_fridericia_ms", qt_s / rr_s.powf(1.0 / 3.0) * 1000.0),
        ("qtc_framingham_ms", (qt_s + 0.154 * (1.0 - rr_s)) * 1000.0),
        ("qtc_hodges_ms", qt + 1.75 * (hr - 60.0)),
        ("qtc_rautaharju_ms", qt * (120.0 + hr) / 180.0),
    ];
    for (key, v) in expect {
        assert!((reviewed(&h, key) - v).abs() < 1e-6, "{key}: {} vs {v}", reviewed(&h, key));
    }
    assert!(reviewed(&h, "qtc_bazett_ms") > bazett_before);
    // Undo puts T end back in one step.
    h.get_by_label("Undo").click();
    settle(&mut h);
    assert!((reviewed(&h, "qt_ms") - 400.0).abs() < 1e-9);
}

#[test]
fn clicking_the_tape_moves_the_sheet() {
    let mut h = harness(Some("qtdb/sel100.hea"));
    let (y, x0, x1) = h.state().ui_state.tape.unwrap();
    let duration = h.state().loaded.as_ref().unwrap().recording.duration_s();
    assert!(duration > 800.0, "15-minute record");
    let t = 400.0;
    let x = x0 + (x1 - x0) * (t / duration) as f32;
    click_at(&mut h, Pos2::new(x, y));
    let app = h.state();
    let centre = app.start_s + app.window_s / 2.0;
    // One screen pixel on the Tape is about duration / width seconds.
    assert!((centre - t).abs() < 2.0 * duration / f64::from(x1 - x0), "centre {centre}");
    let g = app.ui_state.sheet.as_ref().unwrap();
    assert!((g.page.rows.last().unwrap().cells[0].t0_s - app.start_s).abs() < 1e-9);
}
