//! The Beat lens: the representative beat of each lead overlaid (or one chosen lead), with draggable handles for
//! P onset, P end, QRS onset, J point and T end. Moving a handle changes the review's marks; the Ledger
//! recomputes every interval and QTc from them.

use egui::{Align2, Color32, FontId, Pos2, Rect, Sense, Shape, Stroke, Vec2};
use isoline_core::beat::MarkKind;

use super::command::Command;
use super::sheet::color;
use super::state::{Document, Loaded, UiState, ViewSettings};

/// Grab distance for a handle, points.
const GRAB_POINTS: f32 = 7.0;

/// Where the lens was drawn: maps between screen x and beat samples.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct LensGeometry {
    /// Plot area on screen.
    pub rect: Rect,
    /// Number of samples in the beat.
    pub len: usize,
    /// Index of the R peak in the beat.
    pub r_index: usize,
    /// Sampling rate of the beat, Hz.
    pub rate_hz: f64,
}

impl LensGeometry {
    /// Screen x of beat sample `k`.
    #[must_use]
    pub fn x_of_sample(&self, k: f64) -> f32 {
        self.rect.left() + (k / (self.len.max(2) - 1) as f64) as f32 * self.rect.width()
    }

    /// Beat sample (fractional) at a time relative to the R peak, ms.
    #[must_use]
    pub fn sample_from_ms(&self, ms: f64) -> f64 {
        self.r_index as f64 + ms * self.rate_hz / 1000.0
    }

    /// Time relative to the R peak of beat sample `k`, ms.
    #[must_use]
    pub fn ms_from_sample(&self, k: f64) -> f64 {
        (k - self.r_index as f64) * 1000.0 / self.rate_hz
    }

    /// Screen x of a time relative to the R peak, ms.
    #[must_use]
    pub fn x_of_ms(&self, ms: f64) -> f32 {
        self.x_of_sample(self.sample_from_ms(ms))
    }

    /// Beat sample nearest to screen x, clamped to the beat.
    #[must_use]
    pub fn sample_of_x(&self, x: f32) -> usize {
        let f = ((x - self.rect.left()) / self.rect.width()).clamp(0.0, 1.0);
        (f64::from(f) * (self.len.max(2) - 1) as f64).round() as usize
    }
}

/// Draws the Beat lens and returns mark commands.
pub fn beat_lens_ui(
    ui: &mut egui::Ui,
    loaded: &Loaded,
    doc: &Document,
    view: &ViewSettings,
    state: &mut UiState,
) -> Vec<Command> {
    let mut out = Vec::new();
    let Some(rep) = loaded.representative() else {
        ui.weak("Beat lens: no representative beat (needs at least 3 detected beats).");
        state.lens = None;
        return out;
    };
    let auto = loaded.auto_marks();
    let marks = doc.effective_marks(&auto);
    ui.horizontal_wrapped(|ui| {
        ui.label(format!("Beat lens (median of {} beats)", rep.n_beats));
        let current = state
            .lens_lead
            .and_then(|i| loaded.recording.leads.get(i))
            .map_or("all leads".to_string(), |l| l.name.to_string());
        egui::ComboBox::new("lens_lead", "shown").selected_text(current).show_ui(ui, |ui| {
            ui.selectable_value(&mut state.lens_lead, None, "all leads");
            for (i, l) in loaded.recording.leads.iter().enumerate() {
                ui.selectable_value(&mut state.lens_lead, Some(i), l.name.to_string());
            }
        });
    });
    ui.horizontal_wrapped(|ui| {
        ui.label("Place:");
        for kind in MarkKind::BOUNDARIES {
            let on = state.lens_active == Some(kind);
            if ui.selectable_label(on, kind.label()).clicked() {
                state.lens_active = if on { None } else { Some(kind) };
            }
        }
    });
    let size = Vec2::new(ui.available_width().min(520.0), 220.0);
    let (rect, response) = ui.allocate_exact_size(size, Sense::click_and_drag());
    let pal = view.scheme.palette();
    let painter = ui.painter_at(rect);
    painter.rect_filled(rect, 2.0, color(pal.background));
    let plot = rect.shrink2(Vec2::new(6.0, 26.0));
    let len = rep.leads.first().map_or(0, Vec::len);
    let geo = LensGeometry { rect: plot, len, r_index: rep.r_index, rate_hz: rep.sample_rate.hz() };
    state.lens = Some(geo);
    draw_grid(&painter, &geo, &pal);
    let shown: Vec<usize> = match state.lens_lead {
        Some(i) if i < rep.leads.len() => vec![i],
        _ => (0..rep.leads.len()).collect(),
    };
    let (lo, hi) = shown
        .iter()
        .flat_map(|&i| rep.leads[i].iter())
        .fold((f32::INFINITY, f32::NEG_INFINITY), |(a, b), &v| (a.min(v), b.max(v)));
    let (lo, hi) = if lo < hi { (lo, hi) } else { (-1000.0, 1000.0) };
    let y_of = |uv: f32| plot.bottom() - (uv - lo) / (hi - lo) * plot.height();
    for &i in &shown {
        let pts: Vec<Pos2> =
            rep.leads[i].iter().enumerate().map(|(k, &v)| Pos2::new(geo.x_of_sample(k as f64), y_of(v))).collect();
        let alpha = if shown.len() > 1 { 0.55 } else { 1.0 };
        painter.add(Shape::line(pts, Stroke::new(1.2, color(pal.trace).gamma_multiply(alpha))));
    }
    let font = FontId::proportional(12.0);
    for (n, kind) in MarkKind::BOUNDARIES.into_iter().enumerate() {
        let Some(s) = marks.get(kind) else { continue };
        let x = geo.x_of_sample(s as f64);
        let origin = doc.mark_origin(kind, &auto);
        let col = if origin == Some(super::state::Origin::Auto) { color(pal.mark) } else { color(pal.caliper) };
        let w = if state.lens_drag == Some(kind) { 2.5 } else { 1.5 };
        painter.line_segment([Pos2::new(x, rect.top() + 25.0), Pos2::new(x, rect.bottom())], Stroke::new(w, col));
        let y = rect.top() + 1.0 + (n % 2) as f32 * 11.0;
        painter.text(Pos2::new(x, y), Align2::CENTER_TOP, kind.short_label(), font.clone(), col);
    }
    if response.drag_started()
        && let Some(p) = ui.input(|i| i.pointer.press_origin()).or(response.interact_pointer_pos())
    {
        state.lens_drag = MarkKind::BOUNDARIES
            .into_iter()
            .filter_map(|k| marks.get(k).map(|s| (k, (geo.x_of_sample(s as f64) - p.x).abs())))
            .filter(|&(_, d)| d < GRAB_POINTS)
            .min_by(|a, b| a.1.total_cmp(&b.1))
            .map(|(k, _)| k);
    }
    if response.dragged()
        && let (Some(kind), Some(p)) = (state.lens_drag, response.interact_pointer_pos())
    {
        let s = geo.sample_of_x(p.x);
        if marks.get(kind) != Some(s) {
            out.push(Command::MoveMark(kind, s));
        }
    }
    if response.drag_stopped() {
        state.lens_drag = None;
    }
    if response.clicked()
        && let (Some(kind), Some(p)) = (state.lens_active, response.interact_pointer_pos())
    {
        out.push(Command::MoveMark(kind, geo.sample_of_x(p.x)));
        state.lens_active = next_missing(&marks, kind);
    }
    ui.horizontal_wrapped(|ui| {
        for kind in MarkKind::BOUNDARIES {
            if doc.marks.contains_key(&kind) && ui.small_button(format!("Reset {}", kind.label())).clicked() {
                out.push(Command::ResetMark(kind));
            }
        }
    });
    out
}

/// After placing `kind`, the next boundary without a mark (so a reader can place all five in turn).
fn next_missing(marks: &isoline_core::beat::Boundaries, placed: MarkKind) -> Option<MarkKind> {
    MarkKind::BOUNDARIES.into_iter().find(|&k| k != placed && marks.get(k).is_none())
}

fn draw_grid(painter: &egui::Painter, geo: &LensGeometry, pal: &isoline_core::paper::Palette) {
    // A vertical line every 40 ms (1 mm at 25 mm/s), stronger every 200 ms, aligned on the R peak.
    let ms0 = geo.ms_from_sample(0.0);
    let ms1 = geo.ms_from_sample((geo.len.max(1) - 1) as f64);
    let mut ms = (ms0 / 40.0).ceil() * 40.0;
    while ms <= ms1 {
        let x = geo.x_of_ms(ms);
        let major = (ms / 200.0).round() * 200.0 == ms;
        let c: Color32 = color(if major { pal.major } else { pal.minor });
        painter.line_segment(
            [Pos2::new(x, geo.rect.top()), Pos2::new(x, geo.rect.bottom())],
            Stroke::new(if major { 1.0 } else { 0.5 }, c),
        );
        ms += 40.0;
    }
}
