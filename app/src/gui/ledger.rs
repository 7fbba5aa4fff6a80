//! The Ledger: every measurement with its automatic value, reviewed value, difference, origin, unit and range
//! note. Automatic values come from `core::measure` on the automatic marks; reviewed values from the same
//! measurement on the review's marks, with values the reader typed or took from a caliper taking precedence
//! (QTc then follows the reviewed QT and RR through `measure::qtc_checked`).

use isoline_core::measure::{self, MeasuredValue, RangeNote, Sex, ranges};
use isoline_core::review::QTC_INPUT_KEYS;
use isoline_core::units::bpm_from_rr_ms;

use super::command::Command;
use super::state::{Document, Loaded, Origin};

/// One Ledger row.
#[derive(Debug, Clone, PartialEq)]
pub struct LedgerRow {
    /// Stable key (`qt_ms`, `qtc_bazett_ms`, …), as in `measure --format json`.
    pub key: &'static str,
    /// Label shown to the reader.
    pub label: String,
    /// Unit.
    pub unit: &'static str,
    /// Value computed by Isoline.
    pub auto: Option<f64>,
    /// Value after review.
    pub reviewed: Option<f64>,
    /// Where the reviewed value came from.
    pub origin: Option<Origin>,
    /// Notes with their sources: the range note when the reviewed value is outside the usual range, and, on an
    /// automatic value, the note that the single beats disagree with it (`ranges::beats_disagree`); on the QT
    /// row, the note that leads were left out of the representative beat (`ranges::leads_left_out`).
    pub notes: Vec<RangeNote>,
}

impl LedgerRow {
    /// Reviewed minus automatic.
    #[must_use]
    pub fn difference(&self) -> Option<f64> {
        Some(self.reviewed? - self.auto?)
    }
}

/// Keys a time caliper's reading can be taken into.
pub const CALIPER_KEYS: [(&str, &str); 5] =
    [("rr_ms", "RR"), ("p_duration_ms", "P duration"), ("pr_ms", "PR"), ("qrs_ms", "QRS"), ("qt_ms", "QT")];

/// Computes the Ledger rows from the automatic measurements, the review's marks and reviewed values.
#[must_use]
pub fn rows(loaded: &Loaded, doc: &Document) -> Vec<LedgerRow> {
    let Some(an) = &loaded.analysis else { return Vec::new() };
    let auto = an.measurements.values();
    let mut rev = match loaded.representative() {
        Some(rep) if !doc.marks.is_empty() => an
            .measured_with(&loaded.recording, doc.effective_marks(&rep.bounds))
            .map_or_else(|| auto.clone(), |m| m.values()),
        _ => auto.clone(),
    };
    apply_overrides(&mut rev, doc, an.measurements.sex);
    auto.iter()
        .zip(&rev)
        // ST at J is in the review and exports; the Ledger shows J+60 ms to stay short.
        .filter(|(a, _)| a.key != "st_j_uv")
        .map(|(a, r)| {
            let origin = origin(a.value, r.value);
            LedgerRow {
                key: a.key,
                label: a.label.clone(),
                unit: a.unit,
                auto: a.value,
                reviewed: r.value,
                origin,
                notes: row_notes(r.note.as_ref(), origin, an.measurements.beats_disagree(a.key))
                    .into_iter()
                    .chain(row_extra_notes(a.key, &an.measurements))
                    .collect(),
            }
        })
        .collect()
}

/// The notes of a row whose reviewed value carries `own` (its range note, or the disagreement note of a value
/// measured again on moved marks): a disagreement between the representative beat and the single beats speaks
/// of the automatic boundaries only, so it stays while the value is automatic (`origin` auto), then the
/// automatic measurement's `disagree` note is added also where the row's own note is a range note.
fn row_notes(own: Option<&RangeNote>, origin: Option<Origin>, disagree: Option<RangeNote>) -> Vec<RangeNote> {
    let automatic = origin == Some(Origin::Auto);
    let mut notes: Vec<RangeNote> =
        own.filter(|n| automatic || n.source != ranges::SOURCE_CONSISTENCY).cloned().into_iter().collect();
    if let Some(n) = disagree.filter(|n| automatic && !notes.contains(n)) {
        notes.push(n);
    }
    notes
}

/// Notes on no value's row in the measurements, shown on the row they bear on most; they stay whatever the reader
/// changes. On the QT row, that leads were left out of the representative beat (`ranges::leads_left_out`): it
/// concerns every value measured on that beat, and the QT is the one a late T end in the leads left out
/// lengthens most; and that the baseline moves too fast to be taken off (`ranges::unsteady_baseline`), which
/// makes the QT doubtful first. On the RR row, a pause (`ranges::pause`) and a stretch with no beat at either end
/// of the recording (`ranges::no_beat_at_edge`). On the QRS row, the shortest interval, that the recording is
/// sampled too coarsely for fine boundaries (`ranges::coarse_sampling`).
fn row_extra_notes(key: &str, m: &measure::Measurements) -> Vec<RangeNote> {
    match key {
        "qt_ms" => m.leads_left_out_note().into_iter().chain(m.unsteady_baseline_note()).collect(),
        "rr_ms" => m.pause_notes(),
        "qrs_ms" => m.coarse_sampling_note().into_iter().collect(),
        _ => Vec::new(),
    }
}

/// Puts typed and caliper values in place and recomputes what depends on them (rate from RR, QTc from QT and RR).
fn apply_overrides(rev: &mut [MeasuredValue], doc: &Document, sex: Sex) {
    if doc.reviewed.is_empty() {
        return;
    }
    for v in rev.iter_mut().filter(|v| v.lead.is_none()) {
        if let Some(&x) = doc.reviewed.get(v.key) {
            v.value = Some(x);
            v.note = ranges::for_value(v.key, x, sex);
        }
    }
    let get = |rev: &[MeasuredValue], key: &str| rev.iter().find(|v| v.key == key).and_then(|v| v.value);
    let (qt, mut rr) = (get(rev, "qt_ms"), get(rev, "rr_ms"));
    // A typed heart rate (and no typed RR) gives the RR for QTc, as the saved review does.
    // Source: references.md §3 (RR = 60 / HR).
    if !doc.reviewed.contains_key("rr_ms")
        && let Some(&hr) = doc.reviewed.get("heart_rate_bpm")
        && hr > 0.0
    {
        rr = Some(60_000.0 / hr);
    }
    // A typed RR gives the heart rate, unless the reader typed that too (then both stand as typed).
    if doc.reviewed.contains_key("rr_ms")
        && !doc.reviewed.contains_key("heart_rate_bpm")
        && let Some(v) = rev.iter_mut().find(|v| v.key == "heart_rate_bpm")
    {
        v.value = rr.and_then(bpm_from_rr_ms);
        v.note = v.value.and_then(|x| ranges::for_value(v.key, x, sex));
    }
    if QTC_INPUT_KEYS.iter().any(|k| doc.reviewed.contains_key(*k)) {
        let q = measure::qtc_checked(qt, rr);
        for (key, _) in measure::qtc::FORMULAS {
            if let Some(v) = rev.iter_mut().find(|v| v.key == key) {
                v.value = q.and_then(|q| q.by_key(key));
                v.note = v.value.and_then(|x| ranges::for_value(key, x, sex));
            }
        }
    }
}

/// A reviewed value as typed in the Ledger: a number, then, after a space, why (optional, in the reader's words):
/// `412 T end hidden by the next P wave`. `Ok(None)` for blank text; `Err` saying what is wrong otherwise.
fn value_and_why(text: &str) -> Result<Option<(f64, Option<String>)>, String> {
    let text = text.trim();
    if text.is_empty() {
        return Ok(None);
    }
    let (number, why) = text.split_once(char::is_whitespace).unwrap_or((text, ""));
    let v = number.parse::<f64>().map_err(|_| "not a number (type the value first, then why)".to_string())?;
    let why = why.trim();
    Ok(Some((v, (!why.is_empty()).then(|| why.to_string()))))
}

fn origin(auto: Option<f64>, reviewed: Option<f64>) -> Option<Origin> {
    match (auto, reviewed) {
        (Some(a), Some(r)) if (a - r).abs() < 1e-9 => Some(Origin::Auto),
        (Some(_), Some(_)) => Some(Origin::Moved),
        (None, Some(_)) => Some(Origin::Placed),
        _ => None,
    }
}

/// Draws the Ledger table.
///
/// `editing` holds the row whose reviewed value is being typed and the text so far; Enter stores it (an
/// undoable change), Escape or an empty text cancels.
pub fn ledger_ui(
    ui: &mut egui::Ui,
    rows: &[LedgerRow],
    doc: &Document,
    editing: &mut Option<(String, String)>,
) -> Vec<Command> {
    let mut out = Vec::new();
    let fmt = |v: Option<f64>| v.map_or_else(|| "—".to_string(), |v| format!("{v:.0}"));
    egui::Grid::new("ledger").striped(true).num_columns(7).show(ui, |ui| {
        for h in ["Measurement", "Automatic", "Reviewed", "Difference", "Origin", "Unit", "Range note"] {
            ui.strong(h);
        }
        ui.end_row();
        for r in rows {
            ui.label(&r.label);
            ui.label(fmt(r.auto));
            ui.horizontal(|ui| {
                match editing {
                    Some((key, text)) if key == r.key => {
                        // A value no ECG shows (a slip: −500 bpm) is not taken; the field stays open, its text
                        // red, and the reason shows under it (beside it, it widened the Reviewed column and pushed
                        // the range notes off a narrow panel).
                        let typed = value_and_why(text);
                        let refused = match &typed {
                            Ok(None) => None,
                            Ok(Some((v, _))) => isoline_core::measure::implausible(r.key, *v),
                            Err(why) => Some(why.clone()),
                        };
                        let mut field = egui::TextEdit::singleline(text)
                            .desired_width(50.0)
                            .id_salt(("reviewed", r.key))
                            .hint_text("value, then why");
                        if refused.is_some() {
                            field = field.text_color(ui.visuals().error_fg_color);
                        }
                        let resp = ui.add(field);
                        let (enter, escape) =
                            ui.input(|i| (i.key_pressed(egui::Key::Enter), i.key_pressed(egui::Key::Escape)));
                        if let Some(why) = &refused {
                            resp.show_tooltip_text(egui::RichText::new(why).color(ui.visuals().error_fg_color));
                        }
                        if enter && refused.is_none() {
                            match typed {
                                Ok(Some((v, Some(why)))) => {
                                    out.push(Command::SetReviewedWhy(r.key.to_string(), v, why));
                                }
                                Ok(Some((v, None))) => out.push(Command::SetReviewed(r.key.to_string(), Some(v))),
                                _ => {}
                            }
                            *editing = None;
                        } else if enter {
                            resp.request_focus();
                        } else if escape || resp.lost_focus() {
                            *editing = None;
                        } else if !resp.has_focus() {
                            resp.request_focus();
                        }
                    }
                    _ => {
                        let hover = match doc.reasons.get(r.key) {
                            Some(why) => format!("Why: {why}. Click to type a reviewed value"),
                            None => "Click to type a reviewed value, then why if you like (412 T end hidden by P)"
                                .to_string(),
                        };
                        let label = ui.add(egui::Button::new(fmt(r.reviewed)).frame(false)).on_hover_text(hover);
                        if label.clicked() && !r.key.starts_with("st_") {
                            *editing =
                                Some((r.key.to_string(), r.reviewed.map_or_else(String::new, |v| format!("{v:.0}"))));
                        }
                    }
                }
                if doc.reviewed.contains_key(r.key)
                    && ui.small_button("×").on_hover_text("Clear the typed value").clicked()
                {
                    out.push(Command::SetReviewed(r.key.to_string(), None));
                }
            });
            ui.label(r.difference().map_or_else(|| "—".to_string(), |d| format!("{d:+.0}")));
            ui.label(r.origin.map_or("—", Origin::as_str));
            ui.label(r.unit);
            if r.notes.is_empty() {
                ui.label("");
            } else {
                // The whole notes (with their sources) on hover: a narrow panel shows only their start.
                let texts: Vec<&str> = r.notes.iter().map(|n| n.text.as_str()).collect();
                ui.colored_label(ui.visuals().warn_fg_color, texts.join(" · ")).on_hover_text(texts.join("\n"));
            }
            ui.end_row();
        }
    });
    if rows.is_empty() {
        ui.weak("No measurements.");
    }
    out
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn origin_follows_the_vocabulary() {
        assert_eq!(origin(Some(400.0), Some(400.0)), Some(Origin::Auto));
        assert_eq!(origin(Some(400.0), Some(420.0)), Some(Origin::Moved));
        assert_eq!(origin(None, Some(420.0)), Some(Origin::Placed));
        assert_eq!(origin(Some(400.0), None), None);
    }

    #[test]
    #[allow(clippy::expect_used)] // a test fails by panicking
    fn disagreement_notes_follow_automatic_values_only() {
        let disagree = ranges::beats_disagree("qrs_ms", "QRS", 130.0, 100.0).expect("noted");
        let wide = ranges::qrs(130.0).expect("noted");
        let noted = Some(disagree.clone());
        // An automatic QRS with its range note gets both notes; the disagreement once.
        assert_eq!(row_notes(Some(&wide), Some(Origin::Auto), noted.clone()), [wide.clone(), disagree.clone()]);
        assert_eq!(row_notes(Some(&disagree), Some(Origin::Auto), noted.clone()), std::slice::from_ref(&disagree));
        // Measured again on moved marks: the new value's range note stays, no disagreement note.
        assert_eq!(row_notes(Some(&wide), Some(Origin::Moved), noted.clone()), [wide]);
        assert!(row_notes(Some(&disagree), Some(Origin::Moved), noted).is_empty());
        assert!(row_notes(None, Some(Origin::Auto), None).is_empty());
    }

    #[test]
    fn notes_on_no_values_row_are_shown_on_the_row_they_bear_on() {
        // Coarse sampling on the QRS row, an unsteady baseline on the QT row (before, neither was shown in the
        // Ledger, only in exports).
        let m = measure::Measurements {
            beats: 10,
            sample_rate_hz: Some(100.0),
            baseline_step_uv: Some(300.0),
            ..measure::Measurements::default()
        };
        let has = |key: &str, want: &str| row_extra_notes(key, &m).iter().any(|n| n.key == want);
        assert!(has("qrs_ms", ranges::KEY_SAMPLING));
        assert!(has("qt_ms", ranges::KEY_REPRESENTATIVE));
        assert!(!has("pr_ms", ranges::KEY_SAMPLING));
        let fine = measure::Measurements { sample_rate_hz: Some(500.0), baseline_step_uv: None, ..m };
        assert!(row_extra_notes("qrs_ms", &fine).is_empty() && row_extra_notes("qt_ms", &fine).is_empty());
    }

    /// The Ledger's reviewed values after the reader typed `typed` (key, value) on a recording measured as
    /// `auto` (heart rate 60, RR 1000, QT 400).
    fn typed(typed: &[(&str, f64)]) -> Vec<MeasuredValue> {
        let auto = measure::Measurements {
            rr: measure::RrStats { rr_ms: Some(1000.0), heart_rate_bpm: Some(60.0), ..Default::default() },
            intervals: measure::Intervals { qt_ms: Some(400.0), ..Default::default() },
            ..measure::Measurements::default()
        };
        let mut rev = auto.values();
        let doc =
            Document { reviewed: typed.iter().map(|&(k, v)| (k.to_string(), v)).collect(), ..Document::default() };
        apply_overrides(&mut rev, &doc, Sex::Unknown);
        rev
    }

    fn value(rev: &[MeasuredValue], key: &str) -> Option<f64> {
        rev.iter().find(|v| v.key == key).and_then(|v| v.value)
    }

    #[test]
    fn a_typed_rr_gives_the_rate_but_a_typed_rate_stands() {
        // RR 800 ms typed: heart rate 75 bpm (references.md §10), QTc by Bazett 400 / √0.8 = 447 ms.
        let rev = typed(&[("rr_ms", 800.0)]);
        assert_eq!(value(&rev, "heart_rate_bpm"), Some(75.0));
        assert!(value(&rev, "qtc_bazett_ms").is_some_and(|q| (q - 447.2).abs() < 0.1));
        // Both typed: each stands as the reader typed it (before, the rate was overwritten by 60000 / RR and the
        // saved review lost the typed one); QTc follows the typed RR, as the saved review's does.
        let rev = typed(&[("rr_ms", 800.0), ("heart_rate_bpm", 70.0)]);
        assert_eq!(value(&rev, "heart_rate_bpm"), Some(70.0));
        assert!(value(&rev, "qtc_bazett_ms").is_some_and(|q| (q - 447.2).abs() < 0.1));
    }

    #[test]
    fn a_typed_value_outside_its_usual_range_gets_the_same_note_as_an_automatic_one() {
        // Before, only a typed PR or QRS was noted: a typed rate of 40 bpm or a QRS axis of −60° said nothing.
        let rev = typed(&[("heart_rate_bpm", 40.0), ("axis_qrs_deg", -60.0), ("qrs_ms", 130.0)]);
        for key in ["heart_rate_bpm", "axis_qrs_deg", "qrs_ms"] {
            let note = rev.iter().find(|v| v.key == key).and_then(|v| v.note.clone());
            let x = value(&rev, key).unwrap_or(f64::NAN);
            assert_eq!(note, ranges::for_value(key, x, Sex::Unknown), "{key}");
            assert!(note.is_some(), "{key}");
        }
        assert!(typed(&[("heart_rate_bpm", 72.0)]).iter().all(|v| v.note.is_none()));
    }

    #[test]
    fn a_typed_value_may_carry_its_reason() {
        assert_eq!(value_and_why("  412 "), Ok(Some((412.0, None))));
        assert_eq!(
            value_and_why("412  T end hidden by the next P wave "),
            Ok(Some((412.0, Some("T end hidden by the next P wave".to_string()))))
        );
        assert_eq!(value_and_why(""), Ok(None));
        assert!(value_and_why("T end 412").is_err());
        assert!(value_and_why("4l2").is_err());
    }
}
