//! Beat lens and Ledger: automatic marks fill the Ledger; dragging a handle recomputes QT and every QTc; the Tape
//! moves the Sheet (egui_kittest, no GPU).

#![allow(clippy::unwrap_used, clippy::expect_used)]

use crate::gui_support::{click_at, data, drag, harness, settle};
use egui::Pos2;
use egui_kittest::Harness;
use egui_kittest::kittest::Queryable;
use isoline::gui::IsolineApp;
use isoline::gui::command::Command;
use isoline::gui::state::Origin;
use isoline_core::beat::MarkKind;
use isoline_core::measure::ranges;

fn lens_point(h: &Harness<'static, IsolineApp>, sample: usize) -> Pos2 {
    let geo = h.state().ui_state.lens.unwrap();
    Pos2::new(geo.x_of_sample(sample as f64), geo.rect.center().y)
}

fn row(h: &Harness<'static, IsolineApp>, key: &str) -> isoline::gui::ledger::LedgerRow {
    h.state().ledger_rows().into_iter().find(|r| r.key == key).unwrap()
}

fn auto_t_end(h: &Harness<'static, IsolineApp>) -> usize {
    h.state().loaded.as_ref().unwrap().auto_marks().t_end.expect("automatic T end")
}

#[test]
fn automatic_marks_fill_the_ledger() {
    let h = harness(Some("ptb-s0010/s0010_re.hea"));
    let loaded = h.state().loaded.as_ref().unwrap();
    let rep = loaded.representative().expect("representative beat");
    assert!(rep.n_beats >= 3);
    let qt = row(&h, "qt_ms");
    let auto = qt.auto.expect("automatic QT");
    assert!((300.0..500.0).contains(&auto), "QT {auto}");
    assert_eq!(qt.reviewed, qt.auto);
    assert_eq!(qt.origin, Some(Origin::Auto));
    assert_eq!(qt.difference(), Some(0.0));
    h.get_by_label("QT");
    h.get_by_label("QTc (Bazett)");
}

#[test]
fn dragging_t_end_recomputes_qt_and_every_qtc() {
    let mut h = harness(Some("ptb-s0010/s0010_re.hea"));
    let qt_auto = row(&h, "qt_ms").auto.unwrap();
    let t_end = auto_t_end(&h);
    // 1000 Hz: 40 samples = 40 ms later.
    let from = lens_point(&h, t_end);
    let to = lens_point(&h, t_end + 40);
    drag(&mut h, from, to);
    assert_eq!(h.state().doc.marks.get(&MarkKind::TEnd).copied(), Some(t_end + 40));
    let qt = row(&h, "qt_ms");
    assert!((qt.reviewed.unwrap() - (qt_auto + 40.0)).abs() < 1e-6, "{qt:?}");
    assert_eq!(qt.origin, Some(Origin::Moved));
    assert!((qt.difference().unwrap() - 40.0).abs() < 1e-6);
    let (qt_ms, rr_ms) = (qt.reviewed.unwrap(), row(&h, "rr_ms").reviewed.unwrap());
    let (qt_s, rr_s, hr) = (qt_ms / 1000.0, rr_ms / 1000.0, 60_000.0 / rr_ms);
    // Sources: Bazett 1920; Fridericia 1920; Sagie et al. 1992; Hodges et al. 1983; Rautaharju et al. 2014
    // (references.md §3), computed here independently of the app.
    let expect = [
        ("qtc_bazett_ms", qt_s / rr_s.sqrt() * 1000.0),
        ("qtc_fridericia_ms", qt_s / rr_s.powf(1.0 / 3.0) * 1000.0),
        ("qtc_framingham_ms", (qt_s + 0.154 * (1.0 - rr_s)) * 1000.0),
        ("qtc_hodges_ms", qt_ms + 1.75 * (hr - 60.0)),
        ("qtc_rautaharju_ms", qt_ms * (120.0 + hr) / 180.0),
    ];
    for (key, v) in expect {
        let r = row(&h, key);
        assert!((r.reviewed.unwrap() - v).abs() < 1e-6, "{key}: {r:?} vs {v}");
        assert_eq!(r.origin, Some(Origin::Moved));
    }
    // Undo puts T end back in one step.
    h.get_by_label("Undo").click();
    settle(&mut h);
    assert!(h.state().doc.marks.is_empty());
    assert_eq!(row(&h, "qt_ms").origin, Some(Origin::Auto));
}

#[test]
fn reset_puts_a_moved_mark_back() {
    let mut h = harness(Some("ptb-s0010/s0010_re.hea"));
    let t_end = auto_t_end(&h);
    let from = lens_point(&h, t_end);
    let to = lens_point(&h, t_end.saturating_sub(30));
    drag(&mut h, from, to);
    assert_eq!(h.state().doc.marks.get(&MarkKind::TEnd).copied(), Some(t_end - 30));
    h.get_by_label("Reset T end").click();
    settle(&mut h);
    assert!(h.state().doc.marks.is_empty());
    assert_eq!(row(&h, "qt_ms").origin, Some(Origin::Auto));
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

#[test]
fn typing_a_reviewed_qt_recomputes_qtc_and_undoes() {
    let mut h = harness(Some("ptb-s0010/s0010_re.hea"));
    let qt = row(&h, "qt_ms");
    let shown = format!("{:.0}", qt.reviewed.unwrap());
    h.get_by_role_and_label(egui::accesskit::Role::Button, &shown).click();
    settle(&mut h);
    assert_eq!(h.state().ui_state.ledger_edit.as_ref().map(|e| e.0.as_str()), Some("qt_ms"));
    h.state_mut().ui_state.ledger_edit = Some(("qt_ms".into(), "500".into()));
    settle(&mut h);
    h.key_press(egui::Key::Enter);
    settle(&mut h);
    let qt = row(&h, "qt_ms");
    assert_eq!(qt.reviewed, Some(500.0));
    assert_eq!(qt.origin, Some(Origin::Moved));
    let rr = row(&h, "rr_ms").reviewed.unwrap();
    // Source: Fridericia, Acta Med Scand 1920;53:469-86 (QT/RR^(1/3)).
    assert!((row(&h, "qtc_fridericia_ms").reviewed.unwrap() - 500.0 / (rr / 1000.0).cbrt()).abs() < 1e-6);
    h.get_by_label("Undo").click();
    settle(&mut h);
    assert_eq!(row(&h, "qt_ms").origin, Some(Origin::Auto));
}

#[test]
fn a_typed_value_no_ecg_shows_is_refused_with_its_reason() {
    // A slip of the sign (−500 bpm) is not taken: the field stays open and a tooltip under it names the bounds;
    // 72 then is taken.
    let mut h = harness(Some("ptb-s0010/s0010_re.hea"));
    let shown = format!("{:.0}", row(&h, "heart_rate_bpm").reviewed.unwrap());
    h.get_by_role_and_label(egui::accesskit::Role::Button, &shown).click();
    settle(&mut h);
    h.state_mut().ui_state.ledger_edit = Some(("heart_rate_bpm".into(), "-500".into()));
    settle(&mut h);
    h.key_press(egui::Key::Enter);
    settle(&mut h);
    assert_eq!(row(&h, "heart_rate_bpm").origin, Some(Origin::Auto));
    assert_eq!(h.state().ui_state.ledger_edit.as_ref().map(|e| e.0.as_str()), Some("heart_rate_bpm"));
    h.get_by_label("-500 is outside 1 to 600");
    h.state_mut().ui_state.ledger_edit = Some(("heart_rate_bpm".into(), "72".into()));
    settle(&mut h);
    h.key_press(egui::Key::Enter);
    settle(&mut h);
    assert_eq!(row(&h, "heart_rate_bpm").reviewed, Some(72.0));
    assert_eq!(h.state().ui_state.ledger_edit, None);
}

#[test]
fn leads_left_out_of_the_representative_beat_are_said_on_the_qt_row() {
    // LUDB 24 with its chest leads off from 2.5 to 7.5 s: the representative beat leaves V1–V6 out, and the QT
    // row says so, also once the reader has typed a QT (the other values stay measured without them). Source of
    // the record: LUDB (Kalyakulina et al. 2020, PhysioNet).
    let opened = isoline_core::io::open(&data("ludb/24.hea"), &isoline_core::io::OpenOptions::default()).unwrap();
    let mut rec = opened.recording;
    let fs = rec.sample_rate.hz();
    for lead in rec.leads.iter_mut().filter(|l| l.name.to_string().starts_with('V')) {
        lead.samples[(2.5 * fs) as usize..(7.5 * fs) as usize].fill(f32::NAN);
    }
    let dir = tempfile::tempdir().unwrap();
    let path = dir.path().join("chest-off.csv");
    isoline_core::io::csv::write(&path, &rec).unwrap();
    let mut h = harness(Some(path.to_str().unwrap()));
    let said = |h: &Harness<'static, IsolineApp>| {
        let notes = row(h, "qt_ms").notes;
        notes.iter().any(|n| n.source == ranges::SOURCE_LEADS_LEFT_OUT && n.text.contains("V1, V2, V3, V4, V5 and V6"))
    };
    assert!(said(&h), "{:?}", row(&h, "qt_ms").notes);
    h.state_mut().run_cmd(Command::SetReviewed("qt_ms".into(), Some(540.0)));
    settle(&mut h);
    assert_eq!(row(&h, "qt_ms").reviewed, Some(540.0));
    assert!(said(&h), "{:?}", row(&h, "qt_ms").notes);
}
