//! What the measurement box on an exported page says: which measurements, in which order, and how their
//! values and units are written. The command line and the workstation both build their box here.

use super::LedgerLine;
use crate::measure::{Measurements, RangeNote, ranges};
use crate::recording::Recording;
use crate::review::{Review, Stage};

/// Measurement keys the box always lists (when measured or reviewed), in order. Any other measurement follows
/// only when the reader gave it a value.
pub const LEDGER_KEYS: [&str; 11] = [
    "heart_rate_bpm",
    "rr_ms",
    "p_duration_ms",
    "pr_ms",
    "qrs_ms",
    "qt_ms",
    "qtc_bazett_ms",
    "qtc_fridericia_ms",
    "axis_p_deg",
    "axis_qrs_deg",
    "axis_t_deg",
];

/// One measurement as the box needs it, before formatting.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct LedgerValue<'a> {
    /// Stable key (`qt_ms`, …), as in `isoline measure --format json`.
    pub key: &'a str,
    /// Label for readers.
    pub label: &'a str,
    /// Unit as stored (`ms`, `bpm`, `deg`, `uV`, `%`).
    pub unit: &'a str,
    /// Value computed by Isoline.
    pub auto: Option<f64>,
    /// Value the reader set; `None` when the automatic value stands.
    pub reviewed: Option<f64>,
}

/// The box's lines from any source of values: the [`LEDGER_KEYS`] in order (the first value of each key; a key
/// with no value is left out), then every other value the reader set, in the order given, so no reviewed value
/// is left off the page. Values are rounded to whole units (`%` to one decimal) with a true minus sign; `deg`
/// prints as `°` and `uV` as `µV`.
#[must_use]
pub fn ledger_lines_from(values: &[LedgerValue<'_>]) -> Vec<LedgerLine> {
    let listed = LEDGER_KEYS.iter().filter_map(|key| values.iter().find(|v| v.key == *key));
    let others = values.iter().filter(|v| v.reviewed.is_some() && !LEDGER_KEYS.contains(&v.key));
    listed.chain(others).map(line).collect()
}

/// The box for a recording's automatic measurements and, optionally, a review of it: automatic values from
/// `measurements` (or the review's stored automatic value where this run has none), reviewed values from the
/// review. See [`ledger_lines_from`].
#[must_use]
pub fn ledger_lines(measurements: &Measurements, review: Option<&Review>) -> Vec<LedgerLine> {
    let auto = measurements.values();
    let mut values: Vec<LedgerValue<'_>> = LEDGER_KEYS
        .iter()
        .filter_map(|key| {
            let a = auto.iter().find(|v| v.key == *key);
            let stored = review.and_then(|r| r.measurement(key));
            Some(LedgerValue {
                key,
                label: a.map(|v| v.label.as_str()).or_else(|| stored.map(|s| s.label.as_str()))?,
                unit: a.map(|v| v.unit).or_else(|| stored.map(|s| s.unit.as_str())).unwrap_or_default(),
                auto: a.and_then(|v| v.value).or_else(|| stored.and_then(|s| s.auto_value)),
                reviewed: stored.and_then(|s| s.reviewed_value),
            })
        })
        .collect();
    if let Some(r) = review {
        values.extend(r.measurements.iter().filter(|s| !LEDGER_KEYS.contains(&s.key.as_str())).map(|s| LedgerValue {
            key: &s.key,
            label: &s.label,
            unit: &s.unit,
            auto: s.auto_value,
            reviewed: s.reviewed_value,
        }));
    }
    ledger_lines_from(&values)
}

/// The notes for a page made by the command line: the range notes of the automatic values (with their sources,
/// see [`Measurements::notes`]), leaving out the note of a value the reader changed in `review` — the box prints
/// the reader's value, and a note on the automatic one would no longer describe it — and adding the reader's
/// value's own range note ([`ranges::for_value`], as the workstation's Ledger and its exported page do). QTc
/// notes breaking one limit share a line ([`ranges::condensed`]).
#[must_use]
pub fn ledger_notes(measurements: &Measurements, review: Option<&Review>) -> Vec<String> {
    let auto = measurements.values();
    let changed = |key: &str| {
        let stored = review.and_then(|r| r.measurement(key)).and_then(|s| s.reviewed_value);
        let own = auto.iter().find(|v| v.key == key).and_then(|v| v.value);
        stored.filter(|&x| own.is_none_or(|a| (a - x).abs() > 1e-9))
    };
    let mut kept: Vec<RangeNote> = measurements.notes().into_iter().filter(|n| changed(&n.key).is_none()).collect();
    kept.extend(
        auto.iter()
            .filter(|v| v.lead.is_none())
            .filter_map(|v| ranges::for_value(v.key, changed(v.key)?, measurements.sex)),
    );
    ranges::condensed(&kept)
}

/// Notes on the signal itself, printed before the range notes: missing samples, flat or clipped leads,
/// implausible amplitudes and uncalibrated leads (see [`Recording::signal_notes`]), each marked as about the whole
/// recording. A blank stretch or a flat trace on
/// the page is then not read as the heart's own; the notes name leads, never the patient.
#[must_use]
pub fn signal_notes(recording: &Recording) -> Vec<String> {
    // They describe the whole recording, of which the page may show a window.
    recording.signal_notes().into_iter().map(|n| format!("whole recording: {n}")).collect()
}

/// Header fields naming the reader (when known) and the stage: `Reader: AB`, `Stage: checked`.
#[must_use]
pub fn header_fields(reader: Option<&str>, stage: Stage) -> Vec<(String, String)> {
    let reader = reader.map(|r| ("Reader".to_owned(), r.to_owned()));
    reader.into_iter().chain([("Stage".to_owned(), stage.as_str().to_owned())]).collect()
}

/// Header field stating the automatic rhythm call, `Rhythm (automatic): regular, 2 other beats`; `None` when
/// too few beats were found for a call. A reader's own rhythm statement belongs in the review, not here.
#[must_use]
pub fn rhythm_field(measurements: &Measurements) -> Option<(String, String)> {
    let rhythm = measurements.rr.rhythm;
    rhythm.regular.map(|_| ("Rhythm (automatic)".to_owned(), rhythm.describe()))
}

fn line(v: &LedgerValue<'_>) -> LedgerLine {
    LedgerLine {
        label: v.label.to_owned(),
        auto: v.auto.map(|x| format_value(x, v.unit)),
        reviewed: v.reviewed.map(|x| format_value(x, v.unit)),
        unit: unit_text(v.unit),
    }
}

/// A value as printed in the box, with a true minus sign and no negative zero.
fn format_value(v: f64, unit: &str) -> String {
    let s = match unit {
        "%" => format!("{v:.1}"),
        _ => format!("{v:.0}"),
    };
    if s.starts_with("-0") && s.trim_start_matches(['-', '0', '.']).is_empty() {
        return s[1..].to_string();
    }
    s.replacen('-', "\u{2212}", 1)
}

fn unit_text(unit: &str) -> String {
    match unit {
        "deg" => "\u{b0}".to_owned(),
        "uV" => "\u{b5}V".to_owned(),
        u => u.to_owned(),
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    fn value<'a>(key: &'a str, unit: &'a str, auto: Option<f64>, reviewed: Option<f64>) -> LedgerValue<'a> {
        LedgerValue { key, label: key, unit, auto, reviewed }
    }

    #[test]
    fn the_page_says_what_the_signal_lacks() {
        // A blank stretch or a flat trace on an exported page must not be read as the heart's own.
        use crate::recording::{Lead, LeadName, Meta};
        let mut gappy: Vec<f32> = (0..5000).map(|k| (k as f32 * 0.01).sin() * 800.0).collect();
        gappy[1000..1500].fill(f32::NAN);
        let rec = Recording {
            leads: vec![
                Lead { name: LeadName::parse("I"), samples: gappy },
                Lead { name: LeadName::parse("II"), samples: vec![-5000.0; 5000] },
            ],
            sample_rate: crate::units::Hertz::from_hz(500.0).unwrap_or_else(|_| unreachable!()),
            start: None,
            meta: Meta::default(),
            annotations: Vec::new(),
        };
        let notes = signal_notes(&rec);
        assert_eq!(notes.len(), 2, "{notes:?}");
        assert!(notes[0].starts_with("whole recording: lead I has 500 missing samples"), "{notes:?}");
        assert!(notes[1].starts_with("whole recording: lead II is flat"), "{notes:?}");
    }

    #[test]
    fn listed_keys_in_order_then_reviewed_others() {
        let values = [
            value("st_j60_uv", "uV", Some(-40.0), None),
            value("qt_ms", "ms", Some(401.6), Some(420.0)),
            value("axis_qrs_deg", "deg", Some(-0.2), None),
            value("heart_rate_bpm", "bpm", Some(71.0), None),
            value("st_j_uv", "uV", Some(-52.0), Some(-60.0)),
        ];
        let lines = ledger_lines_from(&values);
        let labels: Vec<&str> = lines.iter().map(|l| l.label.as_str()).collect();
        assert_eq!(labels, ["heart_rate_bpm", "qt_ms", "axis_qrs_deg", "st_j_uv"]);
        assert_eq!((lines[1].auto.as_deref(), lines[1].reviewed.as_deref()), (Some("402"), Some("420")));
        assert_eq!((lines[2].auto.as_deref(), lines[2].unit.as_str()), (Some("0"), "\u{b0}"));
        assert_eq!((lines[3].reviewed.as_deref(), lines[3].unit.as_str()), (Some("\u{2212}60"), "\u{b5}V"));
    }

    #[test]
    fn notes_leave_out_values_the_reader_changed() {
        use crate::measure::{Intervals, Measurements, RrStats, qtc_checked};
        use crate::review::{Measurement, RecordingIdentity};
        // QT 560 ms at RR 1000 ms: every QTc is 560 ms, above 500 ms; heart rate 60 bpm has no note.
        let m = Measurements {
            rr: RrStats { rr_ms: Some(1000.0), heart_rate_bpm: Some(60.0), ..RrStats::default() },
            intervals: Intervals { qt_ms: Some(560.0), qrs_ms: Some(130.0), ..Intervals::default() },
            qtc: qtc_checked(Some(560.0), Some(1000.0)),
            ..Measurements::default()
        };
        let all = ledger_notes(&m, None);
        // QRS, and the five QTc notes as one line.
        assert_eq!(all.len(), 2, "{all:#?}");
        assert!(all[0].starts_with("QRS 130 ms"), "{all:#?}");
        assert!(all[1].starts_with("QTc 560 ms by Bazett, Fridericia, Framingham, Hodges and Rautaharju"), "{all:#?}");
        let id = RecordingIdentity::example();
        let mut r = Review::new(id, "AB");
        for v in m.values().iter().filter(|v| v.lead.is_none()) {
            r.put_automatic(Measurement::automatic(v.key, &v.label, v.value, v.unit)).unwrap_or_else(|e| panic!("{e}"));
        }
        // The reader's QRS equals the automatic value: its note stays. A new QT recomputes every QTc: their
        // notes speak of the automatic values and go.
        r.set_measurement("qrs_ms", 130.0, "AB").unwrap_or_else(|e| panic!("{e}"));
        r.set_measurement("qt_ms", 400.0, "AB").unwrap_or_else(|e| panic!("{e}"));
        assert_eq!(ledger_notes(&m, Some(&r)), all[..1]);
        // A reader's value outside its range gets its own note, as in the workstation's export (before, none): a
        // rate of 40 bpm, and the QTc it recomputes from QT 400 ms at RR 1500 ms (Bazett 327 ms), short.
        r.set_measurement("heart_rate_bpm", 40.0, "AB").unwrap_or_else(|e| panic!("{e}"));
        let notes = ledger_notes(&m, Some(&r));
        assert_eq!(notes.len(), 3, "{notes:#?}");
        assert!(notes[1].starts_with("Heart rate 40 bpm — below the usual resting range"), "{notes:#?}");
        assert!(notes[2].starts_with("QTc by Bazett 327 ms") && notes[2].contains("lower limit"), "{notes:#?}");
    }

    #[test]
    fn percent_keeps_one_decimal() {
        assert_eq!(format_value(12.34, "%"), "12.3");
        assert_eq!(format_value(-0.04, "%"), "0.0");
    }

    #[test]
    fn rhythm_field_states_the_automatic_call() {
        use crate::measure::hrv::Rhythm;
        use crate::measure::{Measurements, RrStats};
        let with =
            |rhythm: Rhythm| Measurements { rr: RrStats { rhythm, ..RrStats::default() }, ..Measurements::default() };
        let steady = Rhythm { rr_count: 8, regular: Some(true), other_beats: 2, ..Rhythm::default() };
        let field = rhythm_field(&with(steady));
        assert_eq!(field, Some(("Rhythm (automatic)".to_owned(), "regular, 2 other beats".to_owned())));
        let unsteady = Rhythm { rr_count: 8, regular: Some(false), ..Rhythm::default() };
        assert_eq!(rhythm_field(&with(unsteady)).map(|f| f.1), Some("irregular".to_owned()));
        // Too few beats for a call: no field, rather than "not called" on a page.
        assert_eq!(rhythm_field(&with(Rhythm::default())), None);
    }

    #[test]
    fn header_names_reader_when_known() {
        assert_eq!(header_fields(None, Stage::Draft), [("Stage".to_owned(), "draft".to_owned())]);
        assert_eq!(header_fields(Some("AB"), Stage::Final)[0], ("Reader".to_owned(), "AB".to_owned()));
    }
}
