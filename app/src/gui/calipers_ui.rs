//! Calipers on the Sheet: drawing (legs, levels, marched legs, plumb lines, readouts) and interaction (place with
//! a tool, select, drag, snap).

use egui::{Align2, Color32, FontId, Pos2, Rect, Response, Stroke, Vec2};
use isoline_core::caliper::{Caliper, CaliperKind};

use super::command::Command;
use super::sheet::{SheetGeometry, color};
use super::state::{Document, Loaded, Part, Tool, UiState, ViewSettings};

/// Grab distance for legs and levels, points.
const GRAB_POINTS: f32 = 6.0;

/// What the caliper layer reads: the Sheet as drawn and the state it shows.
pub struct SheetContext<'a> {
    /// Geometry of the Sheet this frame.
    pub geo: &'a SheetGeometry,
    /// The open recording.
    pub loaded: &'a Loaded,
    /// The review.
    pub doc: &'a Document,
    /// View settings.
    pub view: &'a ViewSettings,
    /// Tool for clicks.
    pub tool: Tool,
}

/// Draws every caliper and handles the pointer on the Sheet. `response` is the Sheet's response.
pub fn calipers_ui(ui: &egui::Ui, response: &Response, cx: &SheetContext<'_>, state: &mut UiState) -> Vec<Command> {
    let SheetContext { geo, loaded, doc, view, tool } = *cx;
    let mut out = Vec::new();
    // Cursor readout for the status bar.
    state.cursor = response.hover_pos().and_then(|p| time_uv_at(geo, loaded, p).map(|(t, uv, _, _)| (t, uv)));

    if response.drag_started()
        && let Some(p) = ui.input(|i| i.pointer.press_origin()).or(response.interact_pointer_pos())
    {
        state.drag = hit(geo, loaded, doc, p).filter(|h| doc.caliper(h.0).is_some_and(|c| !c.locked));
        if let Some((id, part, _, _)) = state.drag {
            out.push(Command::Select(Some((id, part))));
        }
    }
    if response.dragged()
        && let (Some((id, part, ri, ci)), Some(p)) = (state.drag, response.interact_pointer_pos())
        && let Some(c) = doc.caliper(id)
        && let Some(cell) = geo.page.rows.get(ri).and_then(|r| r.cells.get(ci))
    {
        let row = &geo.page.rows[ri];
        let (x_mm, y_mm) = geo.paper_from_screen(p);
        let mut t = cell.time_from_x(&geo.page.paper, x_mm).clamp(0.0, loaded.recording.duration_s());
        if view.snap {
            t = isoline_core::caliper::snap_time(
                &loaded.beats,
                loaded.recording.sample_rate,
                t,
                f64::from(GRAB_POINTS) / (geo.page.paper.speed_mm_per_s * f64::from(geo.points_per_mm)),
            );
        }
        let uv = row.uv_from_y(&geo.page.paper, y_mm, cell.inverted);
        let kind = match (c.kind, part) {
            (CaliperKind::Time { t2_s, .. }, Part::First) => CaliperKind::Time { t1_s: t, t2_s },
            (CaliperKind::Time { t1_s, .. }, Part::Second) => CaliperKind::Time { t1_s, t2_s: t },
            (CaliperKind::Voltage { t_s, uv2, .. }, Part::First) => CaliperKind::Voltage { t_s, uv1: uv, uv2 },
            (CaliperKind::Voltage { t_s, uv1, .. }, Part::Second) => CaliperKind::Voltage { t_s, uv1, uv2: uv },
            (CaliperKind::Plumb { .. }, _) => CaliperKind::Plumb { t_s: t },
        };
        if kind != c.kind {
            out.push(Command::MoveCaliper { id, kind });
        }
    }
    if response.drag_stopped() {
        state.drag = None;
    }
    if response.clicked()
        && let Some(p) = response.interact_pointer_pos()
    {
        out.extend(click(geo, loaded, doc, tool, p));
    }
    for c in &doc.calipers {
        let selected = state.selected.filter(|s| s.0 == c.id).map(|s| s.1);
        draw_caliper(ui.painter(), geo, loaded, c, view, selected);
    }
    out
}

fn click(geo: &SheetGeometry, loaded: &Loaded, doc: &Document, tool: Tool, p: Pos2) -> Vec<Command> {
    let Some((t, uv, ri, ci)) = time_uv_at(geo, loaded, p) else { return vec![Command::Select(None)] };
    let lead_name = geo.page.rows[ri].cells[ci].lead;
    let lead = loaded.recording.leads.get(lead_name).map(|l| l.name.to_string());
    match tool {
        Tool::Pointer => vec![Command::Select(hit(geo, loaded, doc, p).map(|h| (h.0, h.1)))],
        Tool::TimeCaliper => {
            let span_s = loaded.median_rr_ms.map_or(1.0, |ms| ms / 1000.0);
            vec![Command::AddCaliper { kind: CaliperKind::Time { t1_s: t, t2_s: t + span_s }, lead: None }]
        }
        Tool::VoltageCaliper => {
            vec![Command::AddCaliper { kind: CaliperKind::Voltage { t_s: t, uv1: 0.0, uv2: uv }, lead }]
        }
        Tool::PlumbLine => vec![Command::AddCaliper { kind: CaliperKind::Plumb { t_s: t }, lead: None }],
    }
}

/// Recording time (s), amplitude (µV), row and cell under a screen point.
#[must_use]
pub fn time_uv_at(geo: &SheetGeometry, loaded: &Loaded, p: Pos2) -> Option<(f64, f64, usize, usize)> {
    let (ri, ci) = geo.cell_at(p)?;
    let row = &geo.page.rows[ri];
    let cell = &row.cells[ci];
    let (x, y) = geo.paper_from_screen(p);
    let t = cell.time_from_x(&geo.page.paper, x);
    (t >= 0.0 && t <= loaded.recording.duration_s())
        .then(|| (t, row.uv_from_y(&geo.page.paper, y, cell.inverted), ri, ci))
}

/// The caliper part under a screen point, with the row and cell it is in. Later calipers win.
#[must_use]
pub fn hit(geo: &SheetGeometry, loaded: &Loaded, doc: &Document, p: Pos2) -> Option<(u32, Part, usize, usize)> {
    let (ri, ci) = geo.cell_at(p)?;
    let cell = &geo.page.rows[ri].cells[ci];
    let row = &geo.page.rows[ri];
    for c in doc.calipers.iter().rev() {
        let legs: Vec<(f64, Part)> = match c.kind {
            CaliperKind::Time { t1_s, t2_s } => vec![(t1_s, Part::First), (t2_s, Part::Second)],
            CaliperKind::Plumb { t_s } => vec![(t_s, Part::First)],
            CaliperKind::Voltage { t_s, uv1, uv2 } => {
                let on_lead = c.shows_on(loaded.recording.leads.get(cell.lead).map(|x| &x.name));
                if on_lead && cell.contains_time(t_s) && (geo.x_of_time(cell, t_s) - p.x).abs() < 40.0 {
                    for (uv, part) in [(uv2, Part::Second), (uv1, Part::First)] {
                        let y = geo.screen_from_paper(0.0, row.y_from_uv(&geo.page.paper, uv, cell.inverted)).y;
                        if (y - p.y).abs() < GRAB_POINTS {
                            return Some((c.id, part, ri, ci));
                        }
                    }
                }
                continue;
            }
        };
        for (t, part) in legs {
            if cell.contains_time(t) && (geo.x_of_time(cell, t) - p.x).abs() < GRAB_POINTS {
                return Some((c.id, part, ri, ci));
            }
        }
    }
    None
}

fn draw_caliper(
    painter: &egui::Painter,
    geo: &SheetGeometry,
    loaded: &Loaded,
    c: &Caliper,
    view: &ViewSettings,
    selected: Option<Part>,
) {
    let pal = view.scheme.palette();
    let col = color(pal.caliper);
    let width = |part: Part| if selected == Some(part) { 2.5 } else { 1.3 };
    let font = FontId::proportional((3.0 * geo.points_per_mm).clamp(12.0, 16.0));
    // The readout is drawn once, on the first row that shows the caliper whole.
    let mut readout_drawn = false;
    for (ri, row) in geo.page.rows.iter().enumerate() {
        let Some(band) = geo.row_rect(ri) else { continue };
        for cell in &row.cells {
            let leg = |t: f64, part: Part| {
                cell.contains_time(t).then(|| {
                    let x = geo.x_of_time(cell, t);
                    painter.line_segment(
                        [Pos2::new(x, band.top()), Pos2::new(x, band.bottom())],
                        Stroke::new(width(part), col),
                    );
                    x
                })
            };
            match c.kind {
                CaliperKind::Time { t1_s, t2_s } => {
                    for t in c.march_times(cell.t0_s, cell.t1_s) {
                        let x = geo.x_of_time(cell, t);
                        dashed_vline(painter, x, band, Stroke::new(1.0, col.gamma_multiply(0.7)));
                    }
                    let (a, b) = (leg(t1_s, Part::First), leg(t2_s, Part::Second));
                    if let (Some(a), Some(b)) = (a, b) {
                        let y = band.top() + 0.2 * band.height();
                        painter.line_segment([Pos2::new(a, y), Pos2::new(b, y)], Stroke::new(1.0, col));
                        if !readout_drawn {
                            readout(painter, Pos2::new((a + b) / 2.0, y - 2.0), &label(c), &font, col, &pal);
                            readout_drawn = true;
                        }
                    }
                }
                CaliperKind::Plumb { t_s } => {
                    if leg(t_s, Part::First).is_some() && !readout_drawn {
                        readout_drawn = true;
                        let x = geo.x_of_time(cell, t_s);
                        readout(painter, Pos2::new(x, band.top() + 2.0), &label(c), &font, col, &pal);
                    }
                }
                CaliperKind::Voltage { t_s, uv1, uv2 } => {
                    let on_lead = c.shows_on(loaded.recording.leads.get(cell.lead).map(|x| &x.name));
                    if !on_lead || !cell.contains_time(t_s) {
                        continue;
                    }
                    let x = geo.x_of_time(cell, t_s);
                    let y = |uv: f64| geo.screen_from_paper(0.0, row.y_from_uv(&geo.page.paper, uv, cell.inverted)).y;
                    let (y1, y2) = (y(uv1), y(uv2));
                    for (yy, part) in [(y1, Part::First), (y2, Part::Second)] {
                        painter.line_segment(
                            [Pos2::new(x - 30.0, yy), Pos2::new(x + 30.0, yy)],
                            Stroke::new(width(part), col),
                        );
                    }
                    painter.line_segment([Pos2::new(x, y1), Pos2::new(x, y2)], Stroke::new(1.0, col));
                    readout(painter, Pos2::new(x + 34.0, (y1 + y2) / 2.0), &label(c), &font, col, &pal);
                }
            }
        }
    }
}

/// A caliper's label: its number, readout and lock state.
#[must_use]
pub fn label(c: &Caliper) -> String {
    format!("#{} {}{}", c.id, c.readout(), if c.locked { " (locked)" } else { "" })
}

fn readout(
    painter: &egui::Painter,
    at: Pos2,
    text: &str,
    font: &FontId,
    col: Color32,
    pal: &isoline_core::paper::Palette,
) {
    let galley = painter.layout_no_wrap(text.to_string(), font.clone(), col);
    let rect = Align2::CENTER_BOTTOM.anchor_size(at, galley.size()).expand(2.0);
    painter.rect_filled(rect, 3.0, color(pal.background).gamma_multiply(0.92));
    painter.rect_stroke(rect, 3.0, Stroke::new(0.8, col), egui::StrokeKind::Inside);
    painter.galley(rect.min + Vec2::splat(2.0), galley, col);
}

fn dashed_vline(painter: &egui::Painter, x: f32, band: Rect, stroke: Stroke) {
    let pts = [Pos2::new(x, band.top()), Pos2::new(x, band.bottom())];
    painter.extend(egui::Shape::dashed_line(&pts, stroke, 4.0, 3.0));
}

/// The list of calipers with their readouts and controls (lock, march, delete, take into the Ledger).
pub fn caliper_list_ui(ui: &mut egui::Ui, doc: &Document, selected: Option<(u32, Part)>) -> Vec<Command> {
    let mut out = Vec::new();
    if doc.calipers.is_empty() {
        ui.weak("No calipers. Choose a tool (T, V, P) and click on the Sheet.");
        return out;
    }
    for c in &doc.calipers {
        ui.horizontal_wrapped(|ui| {
            let is_sel = selected.is_some_and(|s| s.0 == c.id);
            if ui.selectable_label(is_sel, label(c)).clicked() {
                out.push(Command::Select(if is_sel { None } else { Some((c.id, Part::Second)) }));
            }
            let mut locked = c.locked;
            if ui.checkbox(&mut locked, format!("Lock #{}", c.id)).changed() {
                out.push(Command::SetLocked(c.id, locked));
            }
            if matches!(c.kind, CaliperKind::Time { .. }) {
                let mut march = c.march;
                if ui.checkbox(&mut march, format!("March #{}", c.id)).changed() {
                    out.push(Command::SetMarch(c.id, march));
                }
                ui.menu_button(format!("To Ledger #{}", c.id), |ui| {
                    for (key, name) in super::ledger::CALIPER_KEYS {
                        // A span that no such interval can be (60 ms as an RR) is offered greyed, with the bounds.
                        let refused = c.interval_ms().and_then(|ms| isoline_core::measure::implausible(key, ms));
                        let button = ui.add_enabled(refused.is_none(), egui::Button::new(format!("as {name}")));
                        let button = match &refused {
                            Some(why) => button.on_disabled_hover_text(why.as_str()),
                            None => button,
                        };
                        if button.clicked() {
                            out.push(Command::TakeCaliper { id: c.id, key: key.to_string() });
                            ui.close();
                        }
                    }
                });
            }
            if ui.button(format!("Delete #{}", c.id)).clicked() {
                out.push(Command::DeleteCaliper(c.id));
            }
        });
    }
    out
}
