//! Shared helpers for the workstation UI tests (egui_kittest, no GPU, no window).

#![allow(dead_code, clippy::unwrap_used, clippy::expect_used)]

use std::path::PathBuf;

use egui::{Event, Modifiers, PointerButton, Pos2, Vec2};
use egui_kittest::Harness;
use isoline::gui::IsolineApp;

/// Path of a file under the workspace's `tests/data`.
pub fn data(rel: &str) -> PathBuf {
    PathBuf::from(env!("CARGO_MANIFEST_DIR")).join("../tests/data").join(rel)
}

/// A harness around a fresh workstation, optionally opening a test file.
pub fn harness(file: Option<&str>) -> Harness<'static, IsolineApp> {
    let app = IsolineApp::new(file.map(data));
    let mut h = Harness::builder()
        .with_size(Vec2::new(1600.0, 1000.0))
        .build_ui_state(|ui, app: &mut IsolineApp| app.ui(ui), app);
    h.run_steps(3);
    h
}

/// Steps a few frames (the views settle their layout in two).
pub fn settle(h: &mut Harness<'static, IsolineApp>) {
    h.run_steps(3);
}

/// A primary click at a screen point.
pub fn click_at(h: &mut Harness<'static, IsolineApp>, p: Pos2) {
    h.hover_at(p);
    h.run_steps(1);
    press(h, p, true);
    h.run_steps(1);
    press(h, p, false);
    settle(h);
}

/// A drag from one point to another in small steps.
pub fn drag(h: &mut Harness<'static, IsolineApp>, from: Pos2, to: Pos2) {
    h.hover_at(from);
    h.run_steps(1);
    press(h, from, true);
    h.run_steps(1);
    for k in 1..=8 {
        let f = k as f32 / 8.0;
        h.hover_at(from + (to - from) * f);
        h.run_steps(1);
    }
    press(h, to, false);
    settle(h);
}

fn press(h: &Harness<'static, IsolineApp>, pos: Pos2, pressed: bool) {
    h.event(Event::PointerButton { pos, button: PointerButton::Primary, pressed, modifiers: Modifiers::NONE });
}

/// Screen point of a recording time on the Sheet (on the last row showing it).
pub fn sheet_point(h: &Harness<'static, IsolineApp>, t_s: f64) -> Pos2 {
    h.state().ui_state.sheet.as_ref().and_then(|g| g.point_at_time(t_s)).expect("time on the Sheet")
}
