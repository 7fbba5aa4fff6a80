//! Settings remembered between runs (through eframe's storage): view settings, ruler calibration, recent files.
//! Also the ruler calibration window.

use std::path::{Path, PathBuf};

use egui::{Color32, Stroke, Vec2};

use super::command::Command;
use super::state::ViewSettings;

/// Width of an ID-1 card (bank card, identity card), mm.
///
/// Source: ISO/IEC 7810 (ID-1: 85.60 mm × 53.98 mm) — from memory, widely published (references.md §1).
pub const ID1_CARD_WIDTH_MM: f32 = 85.60;

/// Logical points per inch that desktop systems assume at scale 1 (CSS px and egui points).
// Common practice, no source: 96 logical units per inch on desktop systems.
pub const NOMINAL_POINTS_PER_INCH: f32 = 96.0;

/// Key under which the settings are stored.
pub const STORAGE_KEY: &str = "isoline.settings";

/// Most recent files remembered.
pub const MAX_RECENT: usize = 8;

/// Everything remembered between runs.
#[derive(Debug, Clone, Default, PartialEq, serde::Serialize, serde::Deserialize)]
#[serde(default)]
pub struct Settings {
    /// How the Sheet is shown.
    pub view: ViewSettings,
    /// Ruler calibration: physical screen pixels per millimetre, measured with an ID-1 card. `None`: not
    /// calibrated (nominal 96 points per inch).
    pub ruler_px_per_mm: Option<f32>,
    /// Recently opened files, newest first.
    pub recent: Vec<PathBuf>,
    /// The reader's name or initials, asked once.
    pub reader: Option<String>,
}

impl Settings {
    /// Screen points per millimetre of paper at the given `pixels_per_point`.
    #[must_use]
    pub fn points_per_mm(&self, pixels_per_point: f32) -> f32 {
        match self.ruler_px_per_mm {
            Some(px) if px > 0.0 && pixels_per_point > 0.0 => px / pixels_per_point,
            _ => isoline_core::paper::px_per_mm(f64::from(NOMINAL_POINTS_PER_INCH)) as f32,
        }
    }

    /// Puts a file at the top of the recent list.
    pub fn remember(&mut self, path: &Path) {
        self.recent.retain(|p| p != path);
        self.recent.insert(0, path.to_path_buf());
        self.recent.truncate(MAX_RECENT);
    }

    /// Reads the settings from eframe's storage (defaults when absent or unreadable).
    #[must_use]
    pub fn load(storage: Option<&dyn eframe::Storage>) -> Self {
        storage
            .and_then(|s| s.get_string(STORAGE_KEY))
            .and_then(|text| serde_json::from_str(&text).ok())
            .unwrap_or_default()
    }

    /// Writes the settings to eframe's storage.
    pub fn save(&self, storage: &mut dyn eframe::Storage) {
        if let Ok(text) = serde_json::to_string(self) {
            storage.set_string(STORAGE_KEY, text);
        }
    }
}

/// The ruler calibration window: the reader holds an ID-1 card against the screen and drags the bar's width to
/// match it. Returns commands to store or reset the calibration.
pub fn ruler_ui(ctx: &egui::Context, settings: &Settings, bar_points: &mut f32) -> Vec<Command> {
    let mut out = Vec::new();
    let ppp = ctx.pixels_per_point();
    if *bar_points <= 0.0 {
        *bar_points = ID1_CARD_WIDTH_MM * settings.points_per_mm(ppp);
    }
    let mut open = true;
    egui::Window::new("Ruler calibration").open(&mut open).collapsible(false).show(ctx, |ui| {
        ui.label("Hold a bank or identity card (ID-1, 85.60 mm wide) against the screen and match the bar to it.");
        ui.add(egui::Slider::new(bar_points, 150.0..=900.0).text("bar width (points)"));
        let (rect, _) = ui.allocate_exact_size(Vec2::new(*bar_points, 40.0), egui::Sense::hover());
        ui.painter().rect_filled(rect, 2.0, Color32::from_rgb(60, 120, 200));
        ui.painter().line_segment([rect.left_bottom(), rect.right_bottom()], Stroke::new(1.0, Color32::BLACK));
        let px_per_mm = *bar_points * ppp / ID1_CARD_WIDTH_MM;
        ui.label(format!(
            "{px_per_mm:.2} screen pixels per mm ({:.0} dpi)",
            f64::from(px_per_mm) * isoline_core::paper::MM_PER_INCH
        ));
        ui.horizontal(|ui| {
            if ui.button("Use this calibration").clicked() {
                out.push(Command::SetRuler(Some(px_per_mm)));
                out.push(Command::ShowRuler(false));
            }
            if ui.button("Reset to nominal").clicked() {
                out.push(Command::SetRuler(None));
                *bar_points = 0.0;
            }
        });
    });
    if !open {
        out.push(Command::ShowRuler(false));
    }
    out
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn points_per_mm_follows_calibration() {
        let mut s = Settings::default();
        assert!((s.points_per_mm(2.0) - 96.0 / 25.4).abs() < 1e-4);
        // A 200 dpi screen at scale 2: 200/25.4 px per mm, half as many points.
        s.ruler_px_per_mm = Some(200.0 / 25.4);
        assert!((s.points_per_mm(2.0) - 100.0 / 25.4).abs() < 1e-4);
    }

    #[test]
    fn recent_files_stay_unique_and_short() {
        let mut s = Settings::default();
        for k in 0..12 {
            s.remember(Path::new(&format!("/r/{}.hea", k % 10)));
        }
        s.remember(Path::new("/r/5.hea"));
        assert_eq!(s.recent.len(), MAX_RECENT);
        assert_eq!(s.recent[0], Path::new("/r/5.hea"));
        assert_eq!(s.recent.iter().filter(|p| **p == Path::new("/r/5.hea")).count(), 1);
    }
}
