//! Output of `isoline measure`: JSON (keys as in design.md), CSV (one row per recording) and a table for people.

use std::collections::BTreeSet;
use std::fmt::Write as _;

use isoline_core::measure::{self, Measurements, ranges};
use isoline_core::recording::{LeadName, StandardLead};

/// One measured recording.
#[derive(Debug, Clone)]
pub struct Row {
    /// The file as given or found.
    pub file: String,
    /// Format name (`wfdb`, `edf`, `edf+`, `csv`).
    pub format: &'static str,
    /// Sampling rate, Hz.
    pub sample_rate_hz: f64,
    /// Duration, s.
    pub duration_s: f64,
    /// Lead names in file order.
    pub leads: Vec<LeadName>,
    /// The measurements.
    pub m: Measurements,
    /// Notes about the signal itself (samples missing, flat leads, a doubtful amplitude), said with the
    /// measurements' notes so that a table written to a file carries them too.
    pub signal_notes: Vec<String>,
}

impl Row {
    /// The measurements' notes (condensed), then the notes about the signal.
    fn notes(&self) -> Vec<String> {
        let mut notes = ranges::condensed(&self.m.notes());
        notes.extend(self.signal_notes.iter().cloned());
        notes
    }
}

/// Rounds to 0.01 (ms, µV, degrees): the tables carry no false precision, and nothing is made up.
fn r2(v: Option<f64>) -> Option<f64> {
    v.filter(|x| x.is_finite()).map(|x| (x * 100.0).round() / 100.0)
}

/// The JSON object of one recording, with exactly the keys design.md lists.
#[must_use]
pub fn json_value(row: &Row) -> serde_json::Value {
    let m = &row.m;
    let q = |key: &str| m.qtc.and_then(|q| q.by_key(key));
    let mut st = serde_json::Map::new();
    for s in &m.st {
        st.insert(s.lead.to_string(), serde_json::json!(r2(s.j60_uv)));
    }
    serde_json::json!({
        "file": row.file,
        "format": row.format,
        "sample_rate_hz": row.sample_rate_hz,
        "duration_s": row.duration_s,
        "leads": row.leads.iter().map(ToString::to_string).collect::<Vec<_>>(),
        "beats": m.beats,
        "dominant_beats": m.dominant_beats,
        "heart_rate_bpm": r2(m.rr.heart_rate_bpm),
        "rr_ms": r2(m.rr.rr_ms),
        "rr_sdnn_ms": r2(m.rr.sdnn_ms),
        "rr_rmssd_ms": r2(m.rr.rmssd_ms),
        "p_duration_ms": r2(m.intervals.p_duration_ms),
        "pr_ms": r2(m.intervals.pr_ms),
        "qrs_ms": r2(m.intervals.qrs_ms),
        "qt_ms": r2(m.intervals.qt_ms),
        "qtc_ms": {
            "bazett": r2(q("qtc_bazett_ms")),
            "fridericia": r2(q("qtc_fridericia_ms")),
            "framingham": r2(q("qtc_framingham_ms")),
            "hodges": r2(q("qtc_hodges_ms")),
            "rautaharju": r2(q("qtc_rautaharju_ms")),
        },
        "axis_deg": { "p": r2(m.axes.p_deg), "qrs": r2(m.axes.qrs_deg), "t": r2(m.axes.t_deg) },
        "st_uv": st,
        "notes": row.notes(),
    })
}

/// JSON text: one object, or an array when `as_array`.
///
/// # Errors
/// Serialisation errors (not expected for these values).
pub fn to_json(rows: &[Row], as_array: bool) -> serde_json::Result<String> {
    let values: Vec<serde_json::Value> = rows.iter().map(json_value).collect();
    match (as_array, values.as_slice()) {
        (false, [one]) => serde_json::to_string_pretty(one),
        _ => serde_json::to_string_pretty(&values),
    }
}

fn csv_field(s: &str) -> String {
    if s.contains([',', '"', '\n', '\r']) { format!("\"{}\"", s.replace('"', "\"\"")) } else { s.to_string() }
}

fn num(v: Option<f64>) -> String {
    r2(v).map_or_else(String::new, |x| x.to_string())
}

/// Leads that get an ST column: the standard leads present in any row in standard order, then other names in
/// order of first appearance.
fn st_leads(rows: &[Row]) -> Vec<LeadName> {
    let present: BTreeSet<StandardLead> =
        rows.iter().flat_map(|r| r.m.st.iter().filter_map(|s| s.lead.standard())).collect();
    let mut out: Vec<LeadName> = present.into_iter().map(LeadName::Standard).collect();
    for r in rows {
        for s in &r.m.st {
            if s.lead.standard().is_none() && !out.contains(&s.lead) {
                out.push(s.lead.clone());
            }
        }
    }
    out
}

/// Fixed CSV columns before the per-lead ST columns.
pub const CSV_COLUMNS: [&str; 23] = [
    "file",
    "format",
    "sample_rate_hz",
    "duration_s",
    "leads",
    "beats",
    "dominant_beats",
    "heart_rate_bpm",
    "rr_ms",
    "rr_sdnn_ms",
    "rr_rmssd_ms",
    "p_duration_ms",
    "pr_ms",
    "qrs_ms",
    "qt_ms",
    "qtc_bazett_ms",
    "qtc_fridericia_ms",
    "qtc_framingham_ms",
    "qtc_hodges_ms",
    "qtc_rautaharju_ms",
    "axis_p_deg",
    "axis_qrs_deg",
    "axis_t_deg",
];

/// CSV: a header, then one row per recording; ST at J+60 ms as `st_uv_LEAD` columns; notes joined by `; `.
#[must_use]
pub fn to_csv(rows: &[Row]) -> String {
    let leads = st_leads(rows);
    let mut out = CSV_COLUMNS.join(",");
    for l in &leads {
        out.push(',');
        out.push_str(&csv_field(&format!("st_uv_{l}")));
    }
    out.push_str(",notes\n");
    for row in rows {
        let m = &row.m;
        let lead_names: Vec<String> = row.leads.iter().map(ToString::to_string).collect();
        let mut cells = vec![
            csv_field(&row.file),
            row.format.to_string(),
            row.sample_rate_hz.to_string(),
            num(Some(row.duration_s)),
            csv_field(&lead_names.join(" ")),
            m.beats.to_string(),
            m.dominant_beats.to_string(),
            num(m.rr.heart_rate_bpm),
            num(m.rr.rr_ms),
            num(m.rr.sdnn_ms),
            num(m.rr.rmssd_ms),
            num(m.intervals.p_duration_ms),
            num(m.intervals.pr_ms),
            num(m.intervals.qrs_ms),
            num(m.intervals.qt_ms),
        ];
        cells.extend(measure::qtc::FORMULAS.iter().map(|(key, _)| num(m.qtc.and_then(|q| q.by_key(key)))));
        cells.extend([num(m.axes.p_deg), num(m.axes.qrs_deg), num(m.axes.t_deg)]);
        cells.extend(leads.iter().map(|l| num(m.st_j60(l))));
        cells.push(csv_field(&row.notes().join("; ")));
        out.push_str(&cells.join(","));
        out.push('\n');
    }
    out
}

fn cell(v: Option<f64>) -> String {
    v.filter(|x| x.is_finite()).map_or_else(|| "—".to_string(), |x| format!("{x:.0}"))
}

/// A table for people: one line per recording with the main values, then each recording's rhythm call and notes.
#[must_use]
pub fn to_table(rows: &[Row]) -> String {
    let width = rows.iter().map(|r| r.file.chars().count()).max().unwrap_or(4).clamp(4, 60);
    let mut out = String::new();
    let _ = writeln!(
        out,
        "{:<width$}  {:>5} {:>5} {:>4} {:>4} {:>4} {:>4} {:>5} {:>5} {:>5} {:>6} {:>6}",
        "file", "beats", "HR", "RR", "PR", "QRS", "QT", "QTcB", "QTcF", "axis", "SDNN", "RMSSD"
    );
    let _ = writeln!(
        out,
        "{:<width$}  {:>5} {:>5} {:>4} {:>4} {:>4} {:>4} {:>5} {:>5} {:>5} {:>6} {:>6}",
        "", "", "bpm", "ms", "ms", "ms", "ms", "ms", "ms", "deg", "ms", "ms"
    );
    for r in rows {
        let m = &r.m;
        let _ = writeln!(
            out,
            "{:<width$}  {:>5} {:>5} {:>4} {:>4} {:>4} {:>4} {:>5} {:>5} {:>5} {:>6} {:>6}",
            r.file,
            m.beats,
            cell(m.rr.heart_rate_bpm),
            cell(m.rr.rr_ms),
            cell(m.intervals.pr_ms),
            cell(m.intervals.qrs_ms),
            cell(m.intervals.qt_ms),
            cell(m.qtc.and_then(|q| q.by_key("qtc_bazett_ms"))),
            cell(m.qtc.and_then(|q| q.by_key("qtc_fridericia_ms"))),
            cell(m.axes.qrs_deg),
            cell(m.rr.sdnn_ms),
            cell(m.rr.rmssd_ms),
        );
    }
    for r in rows {
        // The automatic rhythm call for every recording (not only those with notes), then its notes.
        let _ = writeln!(out, "\n{}: rhythm {}", r.file, r.m.rr.rhythm.describe());
        for n in r.notes() {
            let _ = writeln!(out, "  {n}");
        }
    }
    out
}

#[cfg(test)]
mod tests {
    use super::*;
    use isoline_core::measure::{Axes, Intervals, StLevel, qtc_checked};

    fn row() -> Row {
        let mut m = Measurements { beats: 12, dominant_beats: 11, ..Measurements::default() };
        m.rr.rr_ms = Some(800.0);
        m.rr.heart_rate_bpm = Some(75.0);
        m.intervals =
            Intervals { p_duration_ms: Some(100.0), pr_ms: Some(240.0), qrs_ms: Some(90.0), qt_ms: Some(400.0) };
        m.qtc = qtc_checked(Some(400.0), Some(800.0));
        m.axes = Axes { p_deg: Some(50.0), qrs_deg: None, t_deg: Some(40.0) };
        m.st = vec![
            StLevel { lead: LeadName::parse("V2"), j_uv: Some(80.0), j60_uv: Some(120.0) },
            StLevel { lead: LeadName::parse("MLII"), j_uv: None, j60_uv: None },
        ];
        Row {
            file: "ward 4, bed 2.hea".into(),
            format: "wfdb",
            sample_rate_hz: 500.0,
            duration_s: 10.0,
            leads: vec![LeadName::parse("V2"), LeadName::parse("MLII")],
            m,
            signal_notes: Vec::new(),
        }
    }

    #[test]
    fn json_has_the_design_keys_and_nulls() {
        let v = json_value(&row());
        let keys: BTreeSet<&str> = v.as_object().map(|o| o.keys().map(String::as_str).collect()).unwrap_or_default();
        let want: BTreeSet<&str> = [
            "file",
            "format",
            "sample_rate_hz",
            "duration_s",
            "leads",
            "beats",
            "dominant_beats",
            "heart_rate_bpm",
            "rr_ms",
            "rr_sdnn_ms",
            "rr_rmssd_ms",
            "p_duration_ms",
            "pr_ms",
            "qrs_ms",
            "qt_ms",
            "qtc_ms",
            "axis_deg",
            "st_uv",
            "notes",
        ]
        .into();
        assert_eq!(keys, want);
        assert_eq!(v["qtc_ms"]["bazett"], serde_json::json!(447.21));
        assert!(v["axis_deg"]["qrs"].is_null());
        assert!(v["rr_sdnn_ms"].is_null());
        assert_eq!(v["st_uv"]["V2"], serde_json::json!(120.0));
        assert!(v["st_uv"]["MLII"].is_null());
        assert!(v["notes"][0].as_str().is_some_and(|n| n.starts_with("PR 240 ms")));
    }

    #[test]
    fn notes_about_the_signal_follow_the_measurements_notes_in_every_format() {
        // A lead without a valid sample is said in the table written to a file, not only on stderr.
        let said = "lead I holds no valid sample: it is drawn blank and left out of the measurements";
        let r = Row { signal_notes: vec![said.into()], ..row() };
        let notes = json_value(&r)["notes"].as_array().cloned().unwrap_or_default();
        assert!(notes.len() >= 2 && notes.last().and_then(|n| n.as_str()) == Some(said), "{notes:?}");
        assert!(to_csv(std::slice::from_ref(&r)).contains(said));
        assert!(to_table(std::slice::from_ref(&r)).contains(said));
        // The rhythm call is in the table also for a recording without any note.
        let quiet = Row { m: Measurements { beats: 10, dominant_beats: 10, ..Measurements::default() }, ..row() };
        assert!(quiet.notes().is_empty());
        assert!(to_table(&[quiet]).contains("ward 4, bed 2.hea: rhythm not called (too few beats)"));
    }

    #[test]
    fn csv_quotes_and_flattens() {
        let csv = to_csv(&[row(), row()]);
        let lines: Vec<&str> = csv.lines().collect();
        assert_eq!(lines.len(), 3);
        assert!(lines[0].starts_with("file,format,") && lines[0].ends_with(",st_uv_V2,st_uv_MLII,notes"));
        assert!(
            lines[1].starts_with("\"ward 4, bed 2.hea\",wfdb,500,10,V2 MLII,12,11,75,800,,,100,240,90,400,447.21,")
        );
        assert!(lines[1].contains(",50,,40,120,,"));
        let (json_one, json_many) = (to_json(&[row()], false), to_json(&[row()], true));
        assert!(json_one.is_ok_and(|j| j.starts_with('{')));
        assert!(json_many.is_ok_and(|j| j.starts_with('[')));
        assert!(to_table(&[row()]).contains("PR 240 ms"));
    }
}
