//! The uniform list of measured values for the Ledger, reviews, exports and tables.

use crate::recording::LeadName;

use super::Measurements;
use super::ranges::{self, RangeNote};

/// One measured value with its stable key, label, unit and range note.
#[derive(Debug, Clone, PartialEq, serde::Serialize, serde::Deserialize)]
pub struct MeasuredValue {
    /// Stable key (`pr_ms`, `qtc_bazett_ms`, `axis_qrs_deg`, `st_j60_uv`, …). Per-lead values (ST) share a key
    /// and differ by `lead`.
    pub key: &'static str,
    /// Label for people (`PR`, `QTc (Bazett)`, `ST at J+60 ms (V2)`).
    pub label: String,
    /// The value, `None` where it could not be measured.
    pub value: Option<f64>,
    /// Unit (`ms`, `bpm`, `deg`, `µV`, `%`).
    pub unit: &'static str,
    /// A note when the value is outside its usual range.
    pub note: Option<RangeNote>,
    /// The lead, for per-lead values.
    pub lead: Option<LeadName>,
}

/// Every key [`Measurements::values`] can produce, in order (ST keys repeat once per lead).
pub const KEYS: [&str; 20] = [
    "heart_rate_bpm",
    "rr_ms",
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
    "rr_sdnn_ms",
    "rr_rmssd_ms",
    "rr_cv_pct",
    "rr_successive_pct",
    "st_j_uv",
    "st_j60_uv",
];

/// The values a reader may give for a measurement `key`, in its unit: wide bounds that refuse only what no ECG
/// shows (a negative duration, a rate of 5000 bpm, an axis beyond a full turn), that is typing slips, not
/// judgement. The QTc values are computed from QT and RR (both bounded), and the linear formulas (Framingham,
/// Hodges) take them below zero at extreme rates, so their bounds only keep them finite (±10 s: Framingham at
/// 1 bpm and QT 2 s gives −7.1 s). `None` for a key the reader placed under a name of their own.
// Common practice, no source: ventricular rates stay well under 600 bpm (RR 100 ms); no wave or interval of one
// beat lasts 2 s; axes are written from -180 to +180 or from 0 to 360 degrees; ST levels beyond ±10 mV are
// artefact.
#[must_use]
pub fn plausible_range(key: &str) -> Option<std::ops::RangeInclusive<f64>> {
    Some(match key {
        "heart_rate_bpm" => 1.0..=600.0,
        "rr_ms" => 100.0..=60_000.0,
        "rr_sdnn_ms" | "rr_rmssd_ms" => 0.0..=60_000.0,
        "rr_cv_pct" | "rr_successive_pct" => 0.0..=1000.0,
        "p_duration_ms" | "pr_ms" | "qrs_ms" | "qt_ms" => 1.0..=2000.0,
        k if k.starts_with("qtc_") => -10_000.0..=10_000.0,
        k if k.starts_with("axis_") => -180.0..=360.0,
        k if k.starts_with("st_") => -10_000.0..=10_000.0,
        _ => return None,
    })
}

/// Why `value` cannot be a value of `key` (not a finite number, or outside [`plausible_range`]), in words
/// naming the bounds; `None` when it can.
#[must_use]
pub fn implausible(key: &str, value: f64) -> Option<String> {
    if !value.is_finite() {
        return Some("not a finite number".to_string());
    }
    let r = plausible_range(key)?;
    (!r.contains(&value)).then(|| format!("{value} is outside {} to {}", r.start(), r.end()))
}

fn v(key: &'static str, label: &str, value: Option<f64>, unit: &'static str) -> MeasuredValue {
    MeasuredValue { key, label: label.to_string(), value, unit, note: None, lead: None }
}

fn with_note(mut m: MeasuredValue, f: impl Fn(f64) -> Option<RangeNote>) -> MeasuredValue {
    m.note = m.value.and_then(f);
    m
}

impl Measurements {
    /// `m` (an interval measured on the representative beat) with the note that the single beats disagree with
    /// it, unless `m` already carries a range note.
    fn or_beats_disagree(&self, mut m: MeasuredValue) -> MeasuredValue {
        if m.note.is_none() {
            m.note = self.beats_disagree(m.key);
        }
        m
    }

    /// The values in the order a reader takes them: rate and RR, intervals, QTc ×5, axes, then the RR
    /// statistics (rate variability, regularity) and ST at J and J+60 ms for each lead. Keys are listed in
    /// [`KEYS`].
    #[must_use]
    pub fn values(&self) -> Vec<MeasuredValue> {
        let i = &self.intervals;
        let q = self.qtc;
        let sex = self.sex;
        // The QT row has no range note of its own: a note there is the single beats' disagreement.
        let qt = self.or_beats_disagree(v("qt_ms", "QT", i.qt_ms, "ms"));
        let doubtful_qt = qt.note.is_some();
        let mut out = vec![
            with_note(v("heart_rate_bpm", "Heart rate", self.rr.heart_rate_bpm, "bpm"), ranges::heart_rate),
            v("rr_ms", "RR", self.rr.rr_ms, "ms"),
            v("p_duration_ms", "P duration", i.p_duration_ms, "ms"),
            self.or_beats_disagree(with_note(v("pr_ms", "PR", i.pr_ms, "ms"), ranges::pr)),
            self.or_beats_disagree(with_note(v("qrs_ms", "QRS", i.qrs_ms, "ms"), ranges::qrs)),
            qt,
        ];
        // A QTc note on a QT that the single beats do not confirm says so. A formula that gives no positive QTc
        // gives none ([`Qtc::by_key`]): before, an artefact read as 16 bpm printed "QTc −148 ms, at or below the
        // usual lower limit".
        for (key, name) in super::qtc::FORMULAS {
            let value = q.and_then(|q| q.by_key(key));
            let mut m = with_note(v(key, &format!("QTc ({name})"), value, "ms"), |x| ranges::qtc(key, name, x, sex));
            if doubtful_qt {
                m.note = m.note.map(ranges::qtc_from_doubtful_qt);
            } else if self.unsteady_baseline_note().is_some() {
                m.note = m.note.map(ranges::qtc_on_unsteady_baseline);
            }
            out.push(m);
        }
        out.push(v("axis_p_deg", "P axis", self.axes.p_deg, "deg"));
        // The QRS axis row carries its range note, or else the note that the limb leads were rescaled.
        let mut qrs_axis = with_note(v("axis_qrs_deg", "QRS axis", self.axes.qrs_deg, "deg"), ranges::qrs_axis);
        if qrs_axis.note.is_none() && qrs_axis.value.is_some() {
            qrs_axis.note = self.limb_gain_mismatch_pct.and_then(ranges::limb_gain_mismatch);
        }
        out.push(qrs_axis);
        out.push(v("axis_t_deg", "T axis", self.axes.t_deg, "deg"));
        out.extend([
            v("rr_sdnn_ms", "SDNN", self.rr.sdnn_ms, "ms"),
            v("rr_rmssd_ms", "RMSSD", self.rr.rmssd_ms, "ms"),
            v("rr_cv_pct", "RR variation", self.rr.rhythm.rr_cv.map(|c| c * 100.0), "%"),
            with_note(
                v("rr_successive_pct", "RR beat-to-beat variation", self.rr.rhythm.successive.map(|c| c * 100.0), "%"),
                // Only a regularity call with enough intervals makes a note; with no two dominant beats in a
                // row (bigeminy) the call is on all RR intervals, and the note that there is no NN interval says
                // more than one calling them irregular.
                |p| {
                    let judged = self.rr.rhythm.regular.is_some() && self.rr.nn_count > 0;
                    judged.then(|| ranges::rr_irregular(p / 100.0)).flatten()
                },
            ),
        ]);
        for s in &self.st {
            let mut a = v("st_j_uv", &format!("ST at J ({})", s.lead), s.j_uv, "µV");
            a.lead = Some(s.lead.clone());
            let mut b = v("st_j60_uv", &format!("ST at J+60 ms ({})", s.lead), s.j60_uv, "µV");
            b.lead = Some(s.lead.clone());
            out.extend([a, b]);
        }
        out
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn every_key_has_bounds_that_hold_its_usual_values() {
        // The bounds refuse slips only: the usual adult values and the extremes seen on real records pass.
        for key in KEYS {
            assert!(plausible_range(key).is_some(), "{key}");
        }
        // Extremes a real ECG shows: a 15-s pause, 12 bpm, a neonate's 220 bpm, a QT of 700 ms, an axis written
        // 270°, 5 mV of ST elevation, and a QTc by Framingham below zero at 12 bpm (computed, never refused).
        for (key, ok) in [
            ("rr_ms", 15_000.0),
            ("heart_rate_bpm", 12.0),
            ("heart_rate_bpm", 220.0),
            ("qt_ms", 700.0),
            ("axis_qrs_deg", -90.0),
            ("axis_qrs_deg", 270.0),
            ("st_j60_uv", 5000.0),
            ("qtc_framingham_ms", -116.0),
        ] {
            assert_eq!(implausible(key, ok), None, "{key} {ok}");
        }
        assert_eq!(implausible("heart_rate_bpm", -500.0).as_deref(), Some("-500 is outside 1 to 600"));
        assert!(implausible("qrs_ms", 1e308).is_some() && implausible("axis_t_deg", f64::NAN).is_some());
        assert!(implausible("qtc_bazett_ms", 1e308).is_some(), "a hand-edited QTc of 1e308 read as inf by agreement");
        // The lowest QTc the formulas give within the bounds of QT and rate: Framingham at 1 bpm and QT 2 s.
        let q = super::super::qtc::qtc(2000.0, 60_000.0);
        assert_eq!(implausible("qtc_framingham_ms", q.framingham), None, "{}", q.framingham);
        assert_eq!(implausible("my_own_key", -3.0), None);
    }

    #[test]
    fn every_key_is_listed() {
        let m = Measurements {
            st: vec![super::super::StLevel { lead: LeadName::parse("V2"), j_uv: None, j60_uv: None }],
            ..Measurements::default()
        };
        let keys: Vec<&str> = m.values().iter().map(|v| v.key).collect();
        assert_eq!(keys, KEYS.to_vec());
        assert!(m.values().iter().all(|v| v.value.is_none() && v.note.is_none()));
    }

    #[test]
    fn single_beats_that_disagree_are_noted_on_the_interval() {
        use super::super::{IntervalSource, Intervals};
        let m = Measurements {
            intervals: Intervals { qt_ms: Some(352.0), qrs_ms: Some(130.0), ..Intervals::default() },
            beat_medians: Intervals { qt_ms: Some(404.0), qrs_ms: Some(100.0), ..Intervals::default() },
            intervals_source: IntervalSource::Representative,
            ..Measurements::default()
        };
        let note = |key: &str| m.values().into_iter().find(|v| v.key == key).and_then(|v| v.note);
        assert_eq!(note("qt_ms").map(|n| n.source), Some(ranges::SOURCE_CONSISTENCY));
        // The QRS row keeps its range note; the list of notes has both.
        assert_eq!(note("qrs_ms").map(|n| n.source), Some(ranges::SOURCE_QRS));
        let keys: Vec<(String, &str)> = m.notes().into_iter().map(|n| (n.key, n.source)).collect();
        assert!(keys.contains(&("qrs_ms".to_owned(), ranges::SOURCE_CONSISTENCY)), "{keys:?}");
        // Intervals that are the beats' medians themselves are not compared with themselves.
        let own = Measurements { intervals_source: IntervalSource::BeatMedians, ..m };
        assert!(own.notes().iter().all(|n| n.source != ranges::SOURCE_CONSISTENCY));
    }

    #[test]
    fn a_qtc_from_a_qt_the_single_beats_do_not_confirm_says_so() {
        // sele0104 of the QT Database (15 min): QT 352 ms on the representative beat, 404 as the median of the
        // beats, RR 1121 ms. Every QTc is called short (≤ 390 ms); each such note now says the QT is in doubt, also
        // in the condensed line of a page. With the beats agreeing, the notes are as before.
        use super::super::{IntervalSource, Intervals, qtc};
        let m = Measurements {
            intervals: Intervals { qt_ms: Some(352.0), ..Intervals::default() },
            beat_medians: Intervals { qt_ms: Some(404.0), ..Intervals::default() },
            intervals_source: IntervalSource::Representative,
            qtc: Some(qtc::qtc(352.0, 1121.0)),
            ..Measurements::default()
        };
        let qtc_notes = |m: &Measurements| -> Vec<RangeNote> {
            m.values().into_iter().filter(|v| v.key.starts_with("qtc_")).filter_map(|v| v.note).collect()
        };
        let doubtful = qtc_notes(&m);
        assert_eq!(doubtful.len(), 5);
        assert!(doubtful.iter().all(|n| n.text.contains("lower limit") && n.text.contains("do not confirm")));
        let lines = ranges::condensed(&m.notes());
        assert!(lines.iter().any(|l| l.starts_with("QTc") && l.contains("do not confirm")), "{lines:?}");
        let agreed = Measurements { beat_medians: Intervals { qt_ms: Some(360.0), ..Intervals::default() }, ..m };
        assert!(qtc_notes(&agreed).iter().all(|n| !n.text.contains("do not confirm")));
        assert_eq!(qtc_notes(&agreed).len(), 5);
    }

    #[test]
    fn a_formula_giving_no_positive_qtc_gives_none() {
        // QT 283 ms at RR 3750 ms (16 bpm): Framingham gives 283 + 154 · (1 − 3.75) = −140.5 ms
        // (Sagie et al. 1992, Am J Cardiol), which is no QTc; the other formulas stay positive and are given.
        use super::super::{Intervals, qtc};
        let m = Measurements {
            intervals: Intervals { qt_ms: Some(283.0), ..Intervals::default() },
            qtc: Some(qtc::qtc(283.0, 3750.0)),
            ..Measurements::default()
        };
        let values = m.values();
        let get = |k: &str| values.iter().find(|v| v.key == k).and_then(|v| v.value);
        assert!(qtc::qtc(283.0, 3750.0).framingham < 0.0);
        assert_eq!(get("qtc_framingham_ms"), None);
        assert!(values.iter().find(|v| v.key == "qtc_framingham_ms").is_some_and(|v| v.note.is_none()));
        assert!(get("qtc_bazett_ms").is_some_and(|v| (v - 283.0 / 3.75f64.sqrt()).abs() < 1e-9));
    }

    #[test]
    fn leads_left_out_of_the_representative_beat_are_named_once() {
        use super::super::Intervals;
        let chest: Vec<LeadName> = ["V1", "V2", "V3"].map(LeadName::parse).to_vec();
        let m = Measurements {
            intervals: Intervals { qt_ms: Some(478.0), ..Intervals::default() },
            leads_left_out: chest,
            ..Measurements::default()
        };
        let said: Vec<RangeNote> =
            m.notes().into_iter().filter(|n| n.source == ranges::SOURCE_LEADS_LEFT_OUT).collect();
        assert_eq!(said.len(), 1, "{said:?}");
        assert!(said[0].text.contains("without leads V1, V2 and V3 ("), "{}", said[0].text);
        // Its key is no value's: a value the reader changes never takes it away.
        assert!(m.values().iter().all(|v| v.key != said[0].key && v.note.as_ref() != Some(&said[0])));
        // Said without a QT too, and never when every lead was kept.
        let no_qt = Measurements { intervals: Intervals::default(), ..m.clone() };
        assert!(no_qt.notes().iter().any(|n| n.source == ranges::SOURCE_LEADS_LEFT_OUT));
        let one = Measurements { leads_left_out: vec![LeadName::parse("II")], ..m.clone() };
        assert!(one.notes().iter().any(|n| n.text.contains("without lead II (")));
        // Axes are named only where one was measured.
        assert!(said[0].text.starts_with("P duration, PR, QRS, QT and QTc measured without"), "{}", said[0].text);
        let axes = super::super::Axes { qrs_deg: Some(20.0), ..super::super::Axes::default() };
        let with_axis = Measurements { axes, ..m.clone() };
        assert!(with_axis.notes().iter().any(|n| n.text.starts_with("P duration, PR, QRS, QT, QTc and axes measured")));
        let all = Measurements { leads_left_out: Vec::new(), ..m };
        assert!(all.notes().iter().all(|n| n.source != ranges::SOURCE_LEADS_LEFT_OUT), "{:?}", all.notes());
    }
}
