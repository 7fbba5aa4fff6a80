//! Range notes: a measured value outside the usual range, with the source of the range named.
//! The wording is Isoline's own; the notes measure, they do not diagnose.

/// Sex as far as it decides a usual range.
#[derive(Debug, Clone, Copy, Default, PartialEq, Eq, serde::Serialize, serde::Deserialize)]
pub enum Sex {
    /// Female.
    Female,
    /// Male.
    Male,
    /// Not known.
    #[default]
    Unknown,
}

impl Sex {
    /// Reads `Meta::sex` as stored (`F`, `female`, `W`, `M`, `male`, …); anything else is unknown.
    #[must_use]
    pub fn parse(text: Option<&str>) -> Self {
        let t = text.map(|t| t.trim().to_ascii_lowercase()).unwrap_or_default();
        match t.as_str() {
            "f" | "female" | "w" | "woman" | "women" => Self::Female,
            "m" | "male" | "man" | "men" => Self::Male,
            _ => Self::Unknown,
        }
    }
}

/// A value outside its usual range.
#[derive(Debug, Clone, PartialEq, serde::Serialize, serde::Deserialize)]
pub struct RangeNote {
    /// Key of the value (as in [`super::MeasuredValue::key`]), or [`KEY_REPRESENTATIVE`] for a note on the
    /// representative beat as a whole.
    pub key: String,
    /// The note for people, e.g. `QTc (Bazett) 478 ms — above the usual upper limit of 460 ms for women
    /// (Rautaharju et al. 2009)`.
    pub text: String,
    /// Where the range comes from.
    pub source: &'static str,
    /// For a QTc note, its parts, so the notes of several formulas that break the same limit can be told as
    /// one ([`condensed`]).
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub qtc: Option<QtcFinding>,
}

/// The parts of a QTc note: `QTc ({formula}) {ms} ms — {finding}`.
#[derive(Debug, Clone, PartialEq, serde::Serialize, serde::Deserialize)]
pub struct QtcFinding {
    /// Formula name (`Bazett`, …).
    pub formula: String,
    /// The QTc, ms.
    pub ms: f64,
    /// The limit it breaks, with its source (`above 500 ms (Johnson & Ackerman 2009, …)`).
    pub finding: String,
}

/// Source of the QRS duration limits.
pub const SOURCE_QRS: &str = "Surawicz et al. 2009, J Am Coll Cardiol 53:976-81";
/// Source of the QTc limits (≥ 450 ms men, ≥ 460 ms women, ≤ 390 ms short).
// From memory (references.md §4 marks these limits as recalled, not confirmed in a retrieved text).
pub const SOURCE_QTC: &str = "Rautaharju et al. 2009, J Am Coll Cardiol 53:982-91";
/// Source of the 500 ms QTc threshold.
pub const SOURCE_QTC_500: &str = "Johnson & Ackerman 2009, Br J Sports Med";
/// Source of the PR, heart-rate and axis ranges (references.md §4: textbook values, no single paper).
pub const SOURCE_TEXTBOOK: &str = "usual textbook range";
/// Source of the limb-lead relations (references.md §5).
pub const SOURCE_EINTHOVEN: &str = "Einthoven's law; Goldberger 1942, Am Heart J 23:483";
/// Source of the beat-to-beat irregularity threshold.
pub const SOURCE_RR_IRREGULAR: &str = "Dash et al. 2009, Ann Biomed Eng 37:1701-9";

/// Source of the pause threshold ([`pause`]).
// Common practice, no source: Holter and monitoring reports list RR intervals of 2 s or more as pauses.
pub const SOURCE_PAUSE: &str = "usual reporting threshold";
/// An RR interval at least this long is a pause, ms (see [`SOURCE_PAUSE`]).
pub const PAUSE_MS: f64 = 2000.0;

/// Source of the note that two estimates of one interval disagree ([`beats_disagree`]): Isoline's own check.
pub const SOURCE_CONSISTENCY: &str = "representative beat against single beats";
/// Source of the note that leads were left out of the representative beat ([`leads_left_out`]).
pub const SOURCE_LEADS_LEFT_OUT: &str = "representative beat";
/// Source of the no-beat note: the detector itself.
pub const SOURCE_NO_BEATS: &str = "beat detection";
/// Source of the baseline note's limit ([`unsteady_baseline`]): ST deviations of 0.1 mV are read as significant.
// Source: Thygesen et al., Fourth Universal Definition of Myocardial Infarction, Circulation 2018;138:e618-51
// (from memory: ST elevation of 1 mm, 0.1 mV, at the J point in most leads).
pub const SOURCE_ST_LIMIT: &str = "Thygesen et al. 2018, Circulation 138:e618";
/// A baseline that moves by more than this from one dominant beat's PR segment to the next, µV, is too unsteady
/// for the representative beat's ST levels and T wave: a shift as large as the ST change that is read as
/// significant ([`SOURCE_ST_LIMIT`]). Measured: shared real records 2–28 µV (LUDB 1–50, QT Database, MIT-BIH
/// 100, PTB s0010); demo normal with 200 µV of muscle noise 64 µV; wander of 0.3 mV at 0.7–1 Hz (faster than the
/// spline through the beats can follow) 240–250 µV.
pub const UNSTEADY_BASELINE_UV: f64 = 100.0;

/// Largest difference, ms, between an interval on the representative beat and the median of the dominant beats'
/// own before [`beats_disagree`] speaks. The two estimates come from the same beats; where they part by more than
/// a measuring program may be off on average, the boundary is ambiguous on this recording (a biphasic or flat T,
/// a notched QRS, a P merging into the T) and wants a look.
// From memory, not confirmed: twice the mean difference IEC 60601-2-25 allows a program's global PR, QRS and QT
// (10, 10 and 25 ms as recalled in references.md §6). Measured (|representative − beats' median|, ms): LUDB 1–50
// PR ≤ 12, QRS ≤ 18, QT ≤ 21; QT Database and MIT-BIH 100 PR ≤ 4, QRS ≤ 8, QT ≤ 4 except sele0104 (biphasic low
// T: 352 against 404).
pub const BEATS_DISAGREE_MS: [(&str, f64); 3] = [("pr_ms", 20.0), ("qrs_ms", 20.0), ("qt_ms", 50.0)];

/// The interval `key` (`pr_ms`, `qrs_ms` or `qt_ms`, read `label`) measures `representative` ms on the
/// representative beat and `beats` ms as the median of the dominant beats' own, and the two (as printed) differ
/// by more than [`BEATS_DISAGREE_MS`].
#[must_use]
pub fn beats_disagree(key: &str, label: &str, representative: f64, beats: f64) -> Option<RangeNote> {
    let (_, limit) = BEATS_DISAGREE_MS.iter().find(|(k, _)| *k == key)?;
    let (a, b) = (representative.round(), beats.round());
    ((a - b).abs() > *limit).then(|| RangeNote {
        key: key.to_string(),
        text: format!(
            "{label} {a:.0} ms on the representative beat but {b:.0} ms as the median of the individual beats \
             (more than {limit:.0} ms apart): check the boundaries on individual beats"
        ),
        source: SOURCE_CONSISTENCY,
        qtc: None,
    })
}

fn note(key: &str, text: String, source: &'static str) -> Option<RangeNote> {
    Some(RangeNote { key: key.to_string(), text, source, qtc: None })
}

/// Heart rate outside 60–100 bpm (references.md §4: textbook resting range). Like every note here, it judges the
/// value as printed (to whole units), so a rate shown as 60 bpm is never called below 60.
#[must_use]
pub fn heart_rate(bpm: f64) -> Option<RangeNote> {
    let bpm = bpm.round();
    let side = if bpm < 60.0 {
        "below"
    } else if bpm > 100.0 {
        "above"
    } else {
        return None;
    };
    note(
        "heart_rate_bpm",
        format!(
            "Heart rate {bpm:.0} bpm — {side} the usual resting range of 60–100 bpm \
        ({SOURCE_TEXTBOOK})"
        ),
        SOURCE_TEXTBOOK,
    )
}

/// PR outside 120–200 ms (references.md §4: textbook range).
#[must_use]
pub fn pr(ms: f64) -> Option<RangeNote> {
    let ms = ms.round();
    let text = if ms > 200.0 {
        format!("PR {ms:.0} ms — above the usual upper limit of 200 ms ({SOURCE_TEXTBOOK})")
    } else if ms < 120.0 {
        format!("PR {ms:.0} ms — below the usual lower limit of 120 ms ({SOURCE_TEXTBOOK})")
    } else {
        return None;
    };
    note("pr_ms", text, SOURCE_TEXTBOOK)
}

/// QRS above 110 ms (adults); 120 ms named separately (Surawicz et al. 2009, references.md §4).
#[must_use]
pub fn qrs(ms: f64) -> Option<RangeNote> {
    let ms = ms.round();
    let text = if ms >= 120.0 {
        format!(
            "QRS {ms:.0} ms — at or above 120 ms, beyond the usual adult upper limit of 110 ms (Surawicz et al. 2009)"
        )
    } else if ms > 110.0 {
        format!("QRS {ms:.0} ms — above the usual adult upper limit of 110 ms (Surawicz et al. 2009)")
    } else {
        return None;
    };
    note("qrs_ms", text, SOURCE_QRS)
}

/// The range note of a value a reader gives for `key` (typed, taken from a caliper, or derived from one): the
/// same limits the automatic values are held to in [`super::Measurements::values`] (heart rate, PR, QRS, each
/// QTc, QRS axis); `None` for a key without limits or a value within them.
#[must_use]
pub fn for_value(key: &str, value: f64, sex: Sex) -> Option<RangeNote> {
    match key {
        "heart_rate_bpm" => heart_rate(value),
        "pr_ms" => pr(value),
        "qrs_ms" => qrs(value),
        "axis_qrs_deg" => qrs_axis(value),
        _ => super::qtc::FORMULAS.iter().find(|(k, _)| *k == key).and_then(|(k, name)| qtc(k, name, value, sex)),
    }
}

/// QTc by one formula against the usual limits: ≥ 450 ms men, ≥ 460 ms women, ≤ 390 ms short (Rautaharju et
/// al. 2009 — from memory), > 500 ms (Johnson & Ackerman 2009).
#[must_use]
pub fn qtc(key: &str, formula: &str, ms: f64, sex: Sex) -> Option<RangeNote> {
    let ms = ms.round();
    let (finding, source) = qtc_finding(ms, sex)?;
    Some(RangeNote {
        key: key.to_string(),
        text: format!("QTc ({formula}) {ms:.0} ms — {finding}"),
        source,
        qtc: Some(QtcFinding { formula: formula.to_string(), ms, finding }),
    })
}

/// `note` (a QTc note of [`qtc`]) for a QTc corrected from a QT that the individual beats do not confirm (see
/// [`beats_disagree`]): the finding says so, so that a QTc called long or short is not read apart from that doubt.
#[must_use]
pub fn qtc_from_doubtful_qt(note: RangeNote) -> RangeNote {
    with_doubt(note, "; corrected from a QT the individual beats do not confirm")
}

/// `note` (a QTc note of [`qtc`]) for a QTc corrected from a QT measured on a baseline too unsteady to take off
/// ([`unsteady_baseline`]): the finding says so.
#[must_use]
pub fn qtc_on_unsteady_baseline(note: RangeNote) -> RangeNote {
    with_doubt(note, "; corrected from a QT on an unsteady baseline")
}

/// `note` with `doubt` added to its text and to its QTc finding.
fn with_doubt(mut note: RangeNote, doubt: &str) -> RangeNote {
    note.text.push_str(doubt);
    if let Some(q) = note.qtc.as_mut() {
        q.finding.push_str(doubt);
    }
    note
}

/// The QTc limit `ms` breaks, as text with its source, and the source.
fn qtc_finding(ms: f64, sex: Sex) -> Option<(String, &'static str)> {
    if ms > 500.0 {
        return Some((format!("above 500 ms ({SOURCE_QTC_500})"), SOURCE_QTC_500));
    }
    // From memory: Rautaharju et al. 2009 limits (references.md §4).
    let text = match sex {
        Sex::Female if ms >= 460.0 => "at or above the usual upper limit of 460 ms for women",
        Sex::Male if ms >= 450.0 => "at or above the usual upper limit of 450 ms for men",
        Sex::Unknown if ms >= 450.0 => {
            "at or above the usual upper limit of 450 ms for men (460 ms for women; sex not recorded)"
        }
        _ if ms <= 390.0 => "at or below the usual lower limit of 390 ms",
        _ => return None,
    };
    Some((format!("{text} (Rautaharju et al. 2009)"), SOURCE_QTC))
}

/// The notes as lines for a page or a report: the QTc notes of several formulas that break the same limit
/// become one line, where the first of them stood (`QTc 520 ms by Bazett, Fridericia and Hodges — above
/// 500 ms (…)`, or with each formula's value when they differ); every other note is its own line.
#[must_use]
pub fn condensed(notes: &[RangeNote]) -> Vec<String> {
    let mut out: Vec<String> = Vec::with_capacity(notes.len());
    let mut done = vec![false; notes.len()];
    for (i, n) in notes.iter().enumerate() {
        if done[i] {
            continue;
        }
        let Some(q) = &n.qtc else {
            out.push(n.text.clone());
            continue;
        };
        let same: Vec<&QtcFinding> = notes[i..]
            .iter()
            .zip(&mut done[i..])
            .filter_map(|(m, d)| m.qtc.as_ref().filter(|x| x.finding == q.finding).inspect(|_| *d = true))
            .collect();
        if same.len() == 1 {
            out.push(n.text.clone());
            continue;
        }
        let names: Vec<&str> = same.iter().map(|x| x.formula.as_str()).collect();
        let one_value = same.iter().all(|x| x.ms.round() == q.ms.round());
        out.push(if one_value {
            format!("QTc {:.0} ms by {} — {}", q.ms, crate::recording::spoken_list(&names), q.finding)
        } else {
            let each: Vec<String> = same.iter().map(|x| format!("{} {:.0} ms", x.formula, x.ms)).collect();
            format!("QTc by {} — {}", crate::recording::spoken_list(&each), q.finding)
        });
    }
    out
}

/// QRS axis outside −30° to +90° (references.md §4: textbook frontal axis ranges).
#[must_use]
pub fn qrs_axis(deg: f64) -> Option<RangeNote> {
    let deg = deg.round();
    let side = if (-90.0..-30.0).contains(&deg) {
        "to the left"
    } else if deg > 90.0 {
        "to the right"
    } else if deg < -90.0 {
        "between −90° and ±180°"
    } else {
        return None;
    };
    note(
        "axis_qrs_deg",
        format!(
            "QRS axis {}° — outside the usual range of −30° to +90°, {side} \
        ({SOURCE_TEXTBOOK})",
            format!("{deg:.0}").replacen('-', "\u{2212}", 1)
        ),
        SOURCE_TEXTBOOK,
    )
}

/// No beat was found, so every value is absent: said once, so an empty table is not read as a normal one.
#[must_use]
pub fn no_beats() -> Option<RangeNote> {
    note(
        "heart_rate_bpm",
        "No heartbeat found: every measurement is absent (a flat, noise-only or mostly missing recording, waves too \
         slow for a QRS, or not an ECG?)"
            .to_string(),
        SOURCE_NO_BEATS,
    )
}

/// Beats were found but no representative beat could be made of them (fewer than 3 beats whose span lies in the
/// recording, as in a 2-s strip): the axes and ST levels, measured on it, are absent, and the intervals are the
/// medians of the single beats' own. Said so the empty rows are not read as a failure to find beats.
#[must_use]
pub fn no_representative_beat() -> Option<RangeNote> {
    note(
        KEY_REPRESENTATIVE,
        "No representative beat (fewer than 3 whole beats): axes and ST levels are not measured, and the intervals \
         are medians of the single beats"
            .to_string(),
        SOURCE_LEADS_LEFT_OUT,
    )
}

/// Beats were found but no two dominant beats follow each other (bigeminy, or most beats of another kind): the
/// heart rate, RR statistics and QTc, which are taken from the intervals between dominant beats, are absent.
/// Said so the empty rows are not read as a failure to find beats.
#[must_use]
pub fn no_nn_intervals() -> Option<RangeNote> {
    note(
        "heart_rate_bpm",
        "No two dominant beats in a row: heart rate, RR, rate variability and QTc are not measured (the intervals \
         around beats of another kind do not give the underlying rate); count the rate on the strip"
            .to_string(),
        SOURCE_NO_BEATS,
    )
}

/// Limb leads that break Einthoven's law by `pct` % (see [`super::einthoven`]): the frontal axes were computed
/// after rescaling the limb leads to one scale, and the reader should check the recording's lead gains.
#[must_use]
pub fn limb_gain_mismatch(pct: f64) -> Option<RangeNote> {
    note(
        "axis_qrs_deg",
        format!(
            "Limb leads disagree with Einthoven's law by {pct:.0} % (inconsistent lead gains in the file?): \
        frontal axes computed after rescaling the limb leads to one scale ({SOURCE_EINTHOVEN})"
        ),
        SOURCE_EINTHOVEN,
    )
}

/// Key of the note that leads were left out of the representative beat ([`leads_left_out`]): no value's key, as
/// the note concerns every value measured on that beat and stays when the reader changes one of them.
pub const KEY_REPRESENTATIVE: &str = "representative_beat";

/// `leads` hold a signal but were left out of the representative beat (missing samples in too many of its
/// beats): its boundaries and axes come from the other leads, and those leads have no ST level. LUDB 24 with its
/// chest leads off for 5 of its 10 s reads QT 478 ms on the limb leads for 544 on all twelve (QTc by Bazett 437
/// for 498) and PR 146 for 132. `with_axes`: whether any frontal axis was measured (with every limb lead left
/// out, none is, and the note does not name them).
#[must_use]
pub fn leads_left_out(leads: &[crate::recording::LeadName], with_axes: bool) -> Option<RangeNote> {
    if leads.is_empty() {
        return None;
    }
    let who = if leads.len() == 1 { "lead" } else { "leads" };
    let values = if with_axes { "P duration, PR, QRS, QT, QTc and axes" } else { "P duration, PR, QRS, QT and QTc" };
    note(
        KEY_REPRESENTATIVE,
        format!(
            "{values} measured without {who} {} (samples missing in too many beats for the representative beat; no \
             ST level there): they may differ from those on all leads, QRS and QT mostly shorter",
            crate::recording::spoken_list(leads)
        ),
        SOURCE_LEADS_LEFT_OUT,
    )
}

/// The baseline moves by `step_uv` (the median change of the PR level between consecutive dominant beats, after
/// the spline levelling where that was used; see `delineate::baseline`) at or above [`UNSTEADY_BASELINE_UV`]:
/// wander faster than the beats can follow (about half the heart rate and above) is left in the representative
/// beat, whose T wave and ST levels then lie on slopes of their own. (Demo normal with 1 mV of wander at 1 Hz:
/// QT 644 ms for 382, ST −50 µV in every lead, no note.)
#[must_use]
pub fn unsteady_baseline(step_uv: f64) -> Option<RangeNote> {
    note(
        KEY_REPRESENTATIVE,
        format!(
            "Baseline moves by {:.2} mV from beat to beat, too fast to be taken off (at least {:.1} mV, \
             {SOURCE_ST_LIMIT}): QT, ST levels and T axis of the representative beat are doubtful; check them \
             on single beats",
            step_uv / 1000.0,
            UNSTEADY_BASELINE_UV / 1000.0
        ),
        SOURCE_ST_LIMIT,
    )
    .filter(|_| step_uv >= UNSTEADY_BASELINE_UV)
}

/// Key of the sampling note ([`coarse_sampling`]): no value's key.
pub const KEY_SAMPLING: &str = "sampling";
/// Source of the sampling note.
pub const SOURCE_SAMPLING: &str = "Kligfield et al. 2007, Circulation 115:1306-24";
/// A recording sampled below this rate gets the sampling note, Hz.
// Common practice, no source for the threshold (the recommendation is 500 samples/s, references.md §2): the
// QT Database at 250 Hz meets the boundary goals in this project's tests; at 100 Hz the demo QRS read 80 ms for
// 140 and 120 for 90 (a helper's test).
pub const COARSE_SAMPLING_HZ: f64 = 250.0;

/// The recording is sampled below [`COARSE_SAMPLING_HZ`]: a sample spans several ms, and the wave boundaries,
/// hence PR, QRS and QT, are coarse.
#[must_use]
pub fn coarse_sampling(hz: f64) -> Option<RangeNote> {
    note(
        KEY_SAMPLING,
        format!(
            "Sampled at {hz:.0} Hz (a sample every {:.0} ms), below the 500 samples/s recommended for diagnostic \
             ECGs ({SOURCE_SAMPLING}): wave boundaries, PR, QRS and QT are coarse",
            1000.0 / hz
        ),
        SOURCE_SAMPLING,
    )
    .filter(|_| hz < COARSE_SAMPLING_HZ)
}

/// Key of the pause note ([`pause`]): no value's key, so the note stays when the reader changes the RR or rate.
pub const KEY_PAUSE: &str = "pause";

/// A pause: the longest RR interval between any two beats, `longest_ms`, at or above [`PAUSE_MS`]. A pause
/// between dominant beats is in the mean RR and lowers the heart rate of a short recording.
#[must_use]
pub fn pause(longest_ms: f64) -> Option<RangeNote> {
    note(
        KEY_PAUSE,
        format!(
            "Pause: longest RR interval {:.1} s ({:.0} s or more, {SOURCE_PAUSE})",
            longest_ms / 1000.0,
            PAUSE_MS / 1000.0
        ),
        SOURCE_PAUSE,
    )
    .filter(|_| longest_ms >= PAUSE_MS)
}

/// No beat for `seconds` at the end of the recording (`at_end`) or before its first beat: asystole after the
/// last beat, or before the first (see `Measurements::beatless_edges_s`). The rate and RR come from the beats
/// before (after) it only.
#[must_use]
pub fn no_beat_at_edge(seconds: f64, at_end: bool) -> Option<RangeNote> {
    let place = if at_end { "after the last beat, to the end of the recording" } else { "before the first beat" };
    note(
        KEY_PAUSE,
        format!(
            "No beat for {seconds:.1} s {place} (a pause of {:.0} s or more, {SOURCE_PAUSE}); the heart rate counts \
             the beats only",
            PAUSE_MS / 1000.0
        ),
        SOURCE_PAUSE,
    )
}

/// The underlying rhythm irregular: beat-to-beat variation of the NN intervals at or above
/// [`super::hrv::IRREGULAR_SUCCESSIVE`] (see [`super::hrv::Rhythm`]). `variation` is a fraction.
#[must_use]
pub fn rr_irregular(variation: f64) -> Option<RangeNote> {
    let limit = super::hrv::IRREGULAR_SUCCESSIVE;
    super::hrv::is_irregular(variation).then(|| RangeNote {
        key: "rr_successive_pct".into(),
        text: format!(
            "RR intervals between dominant beats irregular: beat-to-beat variation {:.0} % of the mean RR (regular \
             below {:.0} %, {SOURCE_RR_IRREGULAR})",
            variation * 100.0,
            limit * 100.0
        ),
        source: SOURCE_RR_IRREGULAR,
        qtc: None,
    })
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn qtc_limits_by_sex() {
        // Source: Rautaharju et al., J Am Coll Cardiol 2009;53:982-91 (from memory: 450/460/390 ms);
        // Johnson & Ackerman, Br J Sports Med 2009 (500 ms). references.md §4.
        let n = qtc("qtc_bazett_ms", "Bazett", 478.0, Sex::Female).map(|n| n.text).unwrap_or_default();
        assert_eq!(
            n,
            "QTc (Bazett) 478 ms — at or above the usual upper limit of 460 ms for women (Rautaharju et al. 2009)"
        );
        assert!(qtc("k", "Bazett", 455.0, Sex::Female).is_none());
        assert!(qtc("k", "Bazett", 455.0, Sex::Male).is_some());
        assert!(qtc("k", "Bazett", 455.0, Sex::Unknown).is_some());
        assert!(qtc("k", "Bazett", 420.0, Sex::Unknown).is_none());
        assert!(qtc("k", "Bazett", 385.0, Sex::Male).is_some());
        assert_eq!(qtc("k", "Bazett", 520.0, Sex::Female).map(|n| n.source), Some(SOURCE_QTC_500));
    }

    #[test]
    fn coarse_sampling_is_noted_below_250_hz() {
        let n = coarse_sampling(100.0).map(|n| n.text).unwrap_or_default();
        assert!(n.contains("100 Hz") && n.contains("10 ms") && n.contains("Kligfield"), "{n}");
        assert!(coarse_sampling(128.0).is_some());
        assert!(coarse_sampling(250.0).is_none() && coarse_sampling(500.0).is_none());
    }

    #[test]
    fn notes_judge_the_value_as_printed() {
        // A value printed as the limit itself is not outside it: 59.7 bpm reads "60 bpm", which is in 60–100.
        assert!(heart_rate(59.7).is_none() && heart_rate(100.4).is_none());
        assert_eq!(heart_rate(59.4).map(|n| n.text.starts_with("Heart rate 59 bpm — below")), Some(true));
        assert!(pr(200.3).is_none() && pr(119.6).is_none() && pr(200.6).is_some());
        assert!(qrs(110.4).is_none() && qrs(119.6).is_some_and(|n| n.text.contains("at or above 120 ms")));
        assert!(qtc("k", "Bazett", 449.6, Sex::Male).is_some() && qtc("k", "Bazett", 500.4, Sex::Male).is_some());
        assert_eq!(qtc("k", "Bazett", 500.4, Sex::Male).map(|n| n.source), Some(SOURCE_QTC));
        assert!(qrs_axis(-30.4).is_none() && qrs_axis(90.4).is_none() && qrs_axis(-30.6).is_some());
    }

    #[test]
    fn qtc_notes_breaking_one_limit_read_as_one_line() {
        let five = [("Bazett", 520.0), ("Fridericia", 520.0), ("Framingham", 519.6), ("Hodges", 520.4)];
        let notes: Vec<RangeNote> =
            five.iter().filter_map(|&(f, ms)| qtc("k", f, ms, Sex::Male)).chain(pr(230.0)).collect();
        assert_eq!(
            condensed(&notes),
            vec![
                "QTc 520 ms by Bazett, Fridericia, Framingham and Hodges — above 500 ms (Johnson & Ackerman 2009, \
                 Br J Sports Med)"
                    .to_string(),
                notes[4].text.clone(),
            ]
        );
        // Different values and limits: one line per limit, each formula with its own value.
        let mixed: Vec<RangeNote> = [("Bazett", 530.0), ("Fridericia", 470.0), ("Hodges", 505.0)]
            .iter()
            .filter_map(|&(f, ms)| qtc("k", f, ms, Sex::Male))
            .collect();
        let lines = condensed(&mixed);
        assert_eq!(lines.len(), 2);
        assert!(lines[0].starts_with("QTc by Bazett 530 ms and Hodges 505 ms — above 500 ms"), "{}", lines[0]);
        assert_eq!(lines[1], mixed[1].text);
    }

    #[test]
    fn other_limits() {
        // Source: references.md §4 — PR 120–200 ms and rate 60–100 bpm (textbook), QRS > 110 ms and ≥ 120 ms
        // (Surawicz et al., J Am Coll Cardiol 2009;53:976-81), normal QRS axis −30° to +90° (textbook).
        assert!(pr(210.0).is_some() && pr(110.0).is_some() && pr(160.0).is_none());
        assert!(qrs(100.0).is_none() && qrs(115.0).is_some() && qrs(130.0).is_some());
        assert!(heart_rate(55.0).is_some() && heart_rate(75.0).is_none() && heart_rate(110.0).is_some());
        assert!(qrs_axis(-45.0).is_some() && qrs_axis(60.0).is_none() && qrs_axis(120.0).is_some());
        assert!(qrs_axis(-30.0).is_none() && qrs_axis(-150.0).is_some());
        // A negative axis is printed with the minus sign the range uses.
        assert!(qrs_axis(-45.0).is_some_and(|n| n.text.starts_with("QRS axis \u{2212}45° —")));
        assert!(rr_irregular(0.04).is_none() && rr_irregular(0.2).is_some());
        assert!(pause(1990.0).is_none());
        assert!(pause(4000.0).is_some_and(|n| n.key == KEY_PAUSE && n.text.contains("4.0 s")));
        // Two estimates of one interval: twice the IEC 60601-2-25 mean allowance (references.md §6, from memory).
        assert!(beats_disagree("qt_ms", "QT", 352.0, 404.0).is_some_and(|n| n.text.starts_with("QT 352 ms on the")));
        assert!(
            beats_disagree("qt_ms", "QT", 400.0, 450.0).is_none()
                && beats_disagree("qt_ms", "QT", 400.0, 450.6).is_some()
        );
        assert!(
            beats_disagree("qrs_ms", "QRS", 90.0, 110.0).is_none()
                && beats_disagree("pr_ms", "PR", 140.0, 161.0).is_some()
        );
        assert!(beats_disagree("rr_ms", "RR", 800.0, 1000.0).is_none());
        // As printed: 9.6 % reads "10 %", at the limit; 9.4 % reads "9 %".
        assert!(rr_irregular(0.096).is_some() && rr_irregular(0.094).is_none());
        assert_eq!(Sex::parse(Some(" F ")), Sex::Female);
        assert_eq!(Sex::parse(Some("male")), Sex::Male);
        assert_eq!(Sex::parse(None), Sex::Unknown);
    }

    #[test]
    fn a_readers_value_is_held_to_the_automatic_values_limits() {
        // Source: the limits of each key's own note (heart rate 60–100 bpm, PR, QRS, QTc by formula, QRS axis).
        assert_eq!(for_value("heart_rate_bpm", 45.0, Sex::Unknown), heart_rate(45.0));
        assert_eq!(for_value("pr_ms", 240.0, Sex::Unknown), pr(240.0));
        assert_eq!(for_value("qrs_ms", 130.0, Sex::Unknown), qrs(130.0));
        assert_eq!(for_value("axis_qrs_deg", -60.0, Sex::Unknown), qrs_axis(-60.0));
        assert_eq!(for_value("qtc_hodges_ms", 470.0, Sex::Male), qtc("qtc_hodges_ms", "Hodges", 470.0, Sex::Male));
        for key in ["heart_rate_bpm", "pr_ms", "qrs_ms", "axis_qrs_deg", "qtc_hodges_ms"] {
            assert!(for_value(key, if key == "axis_qrs_deg" { -60.0 } else { 600.0 }, Sex::Male).is_some(), "{key}");
        }
        assert_eq!(for_value("qt_ms", 600.0, Sex::Unknown), None, "QT has no range of its own");
    }
}
