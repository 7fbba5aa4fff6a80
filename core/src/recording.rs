//! The recording model: leads of samples in microvolts at one sampling rate, with start time and metadata.

use std::fmt;
use std::ops::Range;

use crate::units::Hertz;

/// The twelve standard lead names, in the standard order.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash, PartialOrd, Ord, serde::Serialize, serde::Deserialize)]
pub enum StandardLead {
    I,
    II,
    III,
    AVR,
    AVL,
    AVF,
    V1,
    V2,
    V3,
    V4,
    V5,
    V6,
}

impl StandardLead {
    /// All twelve in the standard order (I, II, III, aVR, aVL, aVF, V1–V6).
    pub const ALL: [StandardLead; 12] = [
        Self::I,
        Self::II,
        Self::III,
        Self::AVR,
        Self::AVL,
        Self::AVF,
        Self::V1,
        Self::V2,
        Self::V3,
        Self::V4,
        Self::V5,
        Self::V6,
    ];

    /// The conventional spelling (`aVR`, `V1`, …).
    #[must_use]
    pub fn as_str(self) -> &'static str {
        match self {
            Self::I => "I",
            Self::II => "II",
            Self::III => "III",
            Self::AVR => "aVR",
            Self::AVL => "aVL",
            Self::AVF => "aVF",
            Self::V1 => "V1",
            Self::V2 => "V2",
            Self::V3 => "V3",
            Self::V4 => "V4",
            Self::V5 => "V5",
            Self::V6 => "V6",
        }
    }

    /// Angle of a limb lead in the hexaxial frontal reference system, degrees (I 0°, II +60°, III +120°,
    /// aVR −150°, aVL −30°, aVF +90°); `None` for chest leads.
    ///
    /// Source: references.md §5 (hexaxial reference system).
    #[must_use]
    pub fn frontal_angle_deg(self) -> Option<f64> {
        match self {
            Self::I => Some(0.0),
            Self::II => Some(60.0),
            Self::III => Some(120.0),
            Self::AVR => Some(-150.0),
            Self::AVL => Some(-30.0),
            Self::AVF => Some(90.0),
            _ => None,
        }
    }

    /// Parses a lead name case-insensitively (`avr` → aVR). Accepts `lead II` / `Lead_II` prefixes too.
    #[must_use]
    pub fn parse(name: &str) -> Option<Self> {
        let t = name.trim();
        let lower = t.to_ascii_lowercase();
        let lower = lower.strip_prefix("lead").map(|s| s.trim_start_matches([' ', '_', '-'])).unwrap_or(&lower);
        Self::ALL.into_iter().find(|l| l.as_str().eq_ignore_ascii_case(lower))
    }
}

impl fmt::Display for StandardLead {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        f.write_str(self.as_str())
    }
}

/// A lead's name: one of the twelve standard leads, or any other label (e.g. `MLII`, `X`).
#[derive(Debug, Clone, PartialEq, Eq, Hash, serde::Serialize, serde::Deserialize)]
pub enum LeadName {
    /// A standard 12-lead name.
    Standard(StandardLead),
    /// Any other name, kept as written (trimmed).
    Other(String),
}

impl LeadName {
    /// Parses a name: standard names case-insensitively, anything else kept as written.
    #[must_use]
    pub fn parse(name: &str) -> Self {
        StandardLead::parse(name).map_or_else(|| Self::Other(name.trim().to_string()), Self::Standard)
    }

    /// The standard lead, if this is one.
    #[must_use]
    pub fn standard(&self) -> Option<StandardLead> {
        match self {
            Self::Standard(s) => Some(*s),
            Self::Other(_) => None,
        }
    }
}

impl fmt::Display for LeadName {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        match self {
            Self::Standard(s) => f.write_str(s.as_str()),
            Self::Other(o) => f.write_str(o),
        }
    }
}

impl From<StandardLead> for LeadName {
    fn from(s: StandardLead) -> Self {
        Self::Standard(s)
    }
}

/// One lead: a name and its samples in microvolts. An invalid or missing sample is `f32::NAN`.
#[derive(Debug, Clone, PartialEq)]
pub struct Lead {
    /// The lead's name.
    pub name: LeadName,
    /// Samples in µV, one per sampling period.
    pub samples: Vec<f32>,
}

/// A lead spanning less than this (µV, 0.5th to 99.5th percentile) is flat: no ECG lead is, even one at right
/// angles to the heart's axis (its P and T waves and noise span tens of µV); a lead whose electrode is off, or a
/// channel held at one level, is.
// Common practice, no source: well under one digital step of most ECG recorders (0.5–5 µV).
pub const FLAT_UV: f32 = 1.0;

/// A lead is clipped where it holds its own largest or smallest value unchanged for at least this long, s (and at
/// least 3 samples), in at least [`CLIPPED_RUNS`] places: a recorder at the end of its range (or a file writer
/// cutting values to its field) holds every wave that passes the limit at the limit, while a wave's own peak
/// changes within a few ms and peaks of different beats differ by a digital step or more.
// Common practice, no source. Measured on the shared records (LUDB 1–50, QT Database, MIT-BIH 100, PTB s0010): no
// lead of them is clipped by this rule (test `clipped_leads_are_noted`).
const CLIPPED_RUN_S: f64 = 0.010;
/// Fewest separate runs at the extreme value for a lead to count as clipped (see [`CLIPPED_RUN_S`]).
const CLIPPED_RUNS: usize = 3;
/// Longest run at the extreme value counted, s: a QRS cut off at a limit stays there for less than the QRS lasts;
/// a calibration pulse (1 mV for 200 ms, references.md §1) is no clipping.
// Common practice, no source.
const CLIPPED_RUN_MAX_S: f64 = 0.150;
/// A wave cut off at the limit reaches it and leaves it by at least this many digital steps from one sample to
/// the next.
// Common practice, no source. Measured (helper's review): a 60-s demo rounded to 10 or 20 µV, whose largest wave
// in V3 is the broad T wave, held +0.33 mV in 36 / 72 places, each reached one step at a time.
const CLIPPED_STEP_QUANTA: f32 = 3.0;
/// A clipping level lies at least this share of the lead's whole range from its median.
// Common practice, no source.
const FAR_FROM_MEDIAN: f32 = 0.4;

/// Where a lead is clipped: the level it is held at (µV) and in how many places, on each side that is.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Clipping {
    /// Level of the largest value and the number of runs held there, when clipped at the top.
    pub top: Option<(f32, usize)>,
    /// Level of the smallest value and the number of runs held there, when clipped at the bottom.
    pub bottom: Option<(f32, usize)>,
}

impl Lead {
    /// True when the lead is flat (see [`FLAT_UV`]), or holds no valid sample.
    #[must_use]
    pub fn is_flat(&self) -> bool {
        robust_span(&self.samples).is_none_or(|s| s < FLAT_UV)
    }

    /// Where the lead, sampled at `fs` Hz, is clipped (see [`CLIPPED_RUN_S`]); `None` when it is not, or is flat.
    #[must_use]
    pub fn clipping(&self, fs: f64) -> Option<Clipping> {
        if self.is_flat() {
            return None;
        }
        let x = &self.samples;
        let finite = x.iter().copied().filter(|v| v.is_finite());
        let (lo, hi) = finite.fold((f32::INFINITY, f32::NEG_INFINITY), |(lo, hi), v| (lo.min(v), hi.max(v)));
        let min_len = ((CLIPPED_RUN_S * fs).round() as usize).max(3);
        // The limit lies far from where the lead usually is: a lead without a wave below its baseline (a clean or
        // coarsely sampled one) holds its smallest value between every two beats, and is not clipped there.
        let step = (x.len() / 100_000).max(1);
        let mut typical: Vec<f32> = x.iter().step_by(step).copied().filter(|v| v.is_finite()).collect();
        let mid = typical.len() / 2;
        let median = *typical.select_nth_unstable_by(mid, f32::total_cmp).1;
        let far = |level: f32| (level - median).abs() >= FAR_FROM_MEDIAN * (hi - lo);
        let max_len = (CLIPPED_RUN_MAX_S * fs).round() as usize;
        // The lead's digital step: the smallest change between neighbouring samples (of up to 100 000 pairs).
        let quantum = x
            .windows(2)
            .step_by(step)
            .map(|w| (w[1] - w[0]).abs())
            .filter(|d| d.is_finite() && *d > 0.0)
            .fold(f32::INFINITY, f32::min);
        // A wave cut off at the limit arrives and leaves by a step of several digital steps; a broad wave's own
        // top (a T wave on a coarse recorder) creeps up and down one step at a time.
        let steep = |v: Option<&f32>, level: f32| v.is_some_and(|v| (v - level).abs() >= CLIPPED_STEP_QUANTA * quantum);
        let runs_at = |level: f32| {
            if !far(level) {
                return None;
            }
            let (mut runs, mut start) = (0, None);
            for (k, &v) in x.iter().chain(std::iter::once(&f32::NAN)).enumerate() {
                match (v == level, start) {
                    (true, None) => start = Some(k),
                    (false, Some(a)) => {
                        let len = k - a;
                        let ends_steep = a > 0 && steep(x.get(a - 1), level) && steep(x.get(k), level);
                        runs += usize::from((min_len..=max_len).contains(&len) && ends_steep);
                        start = None;
                    }
                    _ => {}
                }
            }
            (runs >= CLIPPED_RUNS).then_some((level, runs))
        };
        let (top, bottom) = (runs_at(hi), runs_at(lo));
        (top.is_some() || bottom.is_some()).then_some(Clipping { top, bottom })
    }
}

/// Descriptive data about the recording and the person recorded. Any of it may identify a patient;
/// [`Meta::deidentified`] keeps only sex and age (a great age as [`OLDEST_AGE_SHOWN`]).
#[derive(Debug, Clone, Default, PartialEq, serde::Serialize, serde::Deserialize)]
pub struct Meta {
    /// Patient code or identifier as stored in the file.
    pub patient_id: Option<String>,
    /// Patient name as stored in the file.
    pub patient_name: Option<String>,
    /// Sex as stored (`F`, `M`, free text).
    pub sex: Option<String>,
    /// Birth date as stored (free text, format varies by source).
    pub birth_date: Option<String>,
    /// Age in years, if the file gives it.
    pub age_years: Option<f64>,
    /// Free-text recording description (e.g. EDF recording field, WFDB comments).
    pub recording_info: Option<String>,
    /// Equipment, if known.
    pub device: Option<String>,
}

/// In a de-identified copy, an age at or above this is written as this age ("90 or older").
// Source: HIPAA Privacy Rule, 45 CFR 164.514(b)(2)(i)(C) (from memory): ages over 89 are aggregated into a
// single category of 90 or older.
pub const OLDEST_AGE_SHOWN: f64 = 90.0;

impl Meta {
    /// A copy with every field that may identify a person removed (id, name, birth date, free-text comments,
    /// and the equipment, which files also use for the site's name). Sex and age are kept: they decide the usual
    /// ranges and do not identify on their own, except a great age, which is written as [`OLDEST_AGE_SHOWN`].
    #[must_use]
    pub fn deidentified(&self) -> Self {
        Self {
            patient_id: None,
            patient_name: None,
            sex: self.sex.clone(),
            birth_date: None,
            age_years: self.age_years.filter(|a| a.is_finite()).map(|a| a.min(OLDEST_AGE_SHOWN)),
            recording_info: None,
            device: None,
        }
    }
}

/// An annotation carried by the recording (WFDB annotation file, EDF+ annotation list).
#[derive(Debug, Clone, PartialEq, serde::Serialize, serde::Deserialize)]
pub struct Annotation {
    /// Sample index the annotation refers to.
    pub sample: u64,
    /// WFDB mnemonic (`N`, `V`, `(`, `)`, `p`, `t`, …) or EDF+ annotation text.
    pub label: String,
    /// WFDB `num` field (0 for P, 1 for QRS, 2 for T in wave-boundary files); 0 otherwise.
    pub num: i32,
    /// WFDB `chan` field; 0 otherwise.
    pub chan: i32,
    /// WFDB `subtyp` field; 0 otherwise.
    pub subtype: i32,
    /// WFDB auxiliary text, if any.
    pub aux: Option<String>,
    /// EDF+ duration in seconds, if any.
    pub duration_s: Option<f64>,
}

/// The text a de-identified copy writes for an annotation whose own text it withholds (see
/// [`Annotation::shareable_label`]).
pub const WITHHELD_LABEL: &str = "annotation";

impl Annotation {
    /// A plain annotation with only a sample and label.
    #[must_use]
    pub fn new(sample: u64, label: impl Into<String>) -> Self {
        Self { sample, label: label.into(), num: 0, chan: 0, subtype: 0, aux: None, duration_s: None }
    }

    /// The label as a de-identified copy may carry it: a fixed code (a WFDB beat or wave mnemonic such as `N` or
    /// `V`, or a rhythm code such as `(AFIB`, see [`crate::io::wfdb_annotations::is_code`]) as it is. Anything
    /// else is text someone typed, which may hold a name, initials or a bed, however short; `None` then (written
    /// as [`WITHHELD_LABEL`]).
    #[must_use]
    pub fn shareable_label(&self) -> Option<&str> {
        crate::io::wfdb_annotations::is_code(&self.label).then_some(self.label.as_str())
    }
}

/// Spans (µV) of the largest lead outside which [`Recording::amplitude_doubt`] speaks: a QRS complex spans about
/// 0.5–3 mV on most leads; a lead spanning under 20 µV or over 50 mV holds no ECG at the scale stated.
// Common practice, no source: limits set an order of magnitude beyond the usual amplitudes either way.
const ECG_SPAN_UV: std::ops::Range<f64> = 20.0..50_000.0;

/// The span of `x` from its 0.5th to its 99.5th percentile (valid samples; at most about 100 000 of them, evenly
/// spread, so a 24-hour recording costs no more than a short one). `None` without a valid sample.
fn robust_span(x: &[f32]) -> Option<f32> {
    let step = (x.len() / 100_000).max(1);
    let mut v: Vec<f32> = x.iter().step_by(step).copied().filter(|v| v.is_finite()).collect();
    if v.is_empty() {
        return None;
    }
    let (lo, hi) = (v.len() / 200, (v.len() - 1) - v.len() / 200);
    let low = *v.select_nth_unstable_by(lo, f32::total_cmp).1;
    let high = *v.select_nth_unstable_by(hi, f32::total_cmp).1;
    Some(high - low)
}

/// The number of samples in `runs` (sample ranges: missing runs, gaps) and the length of the longest.
fn run_totals(runs: &[Range<usize>]) -> (usize, usize) {
    (runs.iter().map(Range::len).sum(), runs.iter().map(Range::len).max().unwrap_or(0))
}

/// More notes than this on leads missing samples at times of their own become one.
const SCATTERED_NOTES: usize = 3;

/// `part` of `whole` as a percentage with one decimal, rounded down (a lead with one valid sample is not "100.0 %"
/// missing), and "under 0.1 %" for a share that would read 0.0.
fn share(part: usize, whole: usize) -> String {
    let tenths = (1000.0 * part as f64 / whole.max(1) as f64).floor() / 10.0;
    if part > 0 && tenths == 0.0 { "under 0.1 %".to_owned() } else { format!("{tenths:.1} %") }
}

/// Lead names as prose: "I, II and V1".
fn join_names(leads: &[&Lead]) -> String {
    spoken_list(leads.iter().map(|l| &l.name))
}

/// Items as said in a sentence: `I`, `I and II`, `V1, V2 and V3`.
pub(crate) fn spoken_list<T: std::fmt::Display>(items: impl IntoIterator<Item = T>) -> String {
    let names: Vec<String> = items.into_iter().map(|x| x.to_string()).collect();
    match names.split_last() {
        Some((last, rest)) if !rest.is_empty() => format!("{} and {last}", rest.join(", ")),
        _ => names.concat(),
    }
}

/// `n` as an English ordinal: 1st, 2nd, 3rd, 4th, 11th, 21st…
fn ordinal(n: usize) -> String {
    let suffix = match (n % 10, n % 100) {
        (_, 11..=13) => "th",
        (1, _) => "st",
        (2, _) => "nd",
        (3, _) => "rd",
        _ => "th",
    };
    format!("{n}{suffix}")
}

/// A whole recording: every lead sampled at one rate.
#[derive(Debug, Clone, PartialEq)]
pub struct Recording {
    /// The leads, in file order. All have the same length.
    pub leads: Vec<Lead>,
    /// Sampling rate shared by every lead.
    pub sample_rate: Hertz,
    /// Start of the recording (local clock time as stored by the source), if known.
    pub start: Option<time::PrimitiveDateTime>,
    /// Descriptive metadata.
    pub meta: Meta,
    /// Annotations stored with the recording.
    pub annotations: Vec<Annotation>,
}

impl Recording {
    /// Gives every lead a name of its own, so a lead name finds one lead: an unlabelled lead becomes `lead N`
    /// (its position), and a lead labelled like an earlier one becomes `NAME (2)`, `NAME (3)`…, an other lead
    /// (not the standard lead of that name, which stays the first). Returns one line per renamed lead. CSV
    /// files refuse such headers; EDF and WFDB headers allow them, and without this a second `I` silently
    /// replaced the first in the axis, and a converted file could not be read back.
    pub fn name_leads_uniquely(&mut self) -> Vec<String> {
        let mut notes = Vec::new();
        let mut seen: Vec<LeadName> = Vec::with_capacity(self.leads.len());
        for (i, lead) in self.leads.iter_mut().enumerate() {
            let written = lead.name.to_string();
            let blank = written.trim().is_empty();
            if blank || seen.contains(&lead.name) {
                // An unlabelled lead tries `lead N` first; then, as for a repeated label, `BASE (2)`, `BASE (3)`….
                let base = if blank { format!("lead {}", i + 1) } else { written.clone() };
                let mut candidates = blank
                    .then(|| base.clone())
                    .into_iter()
                    .chain((2..).map(|k| format!("{base} ({k})")))
                    .map(LeadName::Other);
                let name = candidates.find(|n| !seen.contains(n)).unwrap_or_else(|| LeadName::Other(base.clone()));
                notes.push(if blank {
                    format!("a lead without a label (the {} read) is read as \"{name}\"", ordinal(i + 1))
                } else {
                    format!("another lead labelled {written} is read as \"{name}\"")
                });
                lead.name = name;
            }
            seen.push(lead.name.clone());
        }
        notes
    }

    /// Every note about the signal itself, for exports and tables: samples missing ([`Self::invalid_sample_notes`]),
    /// flat leads ([`Self::flat_lead_notes`]) and a doubt about the amplitude ([`Self::amplitude_doubt`]).
    #[must_use]
    pub fn signal_notes(&self) -> Vec<String> {
        let mut notes = self.invalid_sample_notes();
        notes.extend(self.flat_lead_notes());
        notes.extend(self.clipped_lead_notes());
        notes.extend(self.amplitude_doubt());
        notes
    }

    /// A doubt about the recording's amplitude, said once when it is opened: every lead flat, or the largest
    /// lead's span (0.5th to 99.5th percentile of its samples, so a few spikes do not count) far outside what an
    /// ECG spans. Either usually means a wrong unit or gain in the header, or a file that holds no ECG; the
    /// analysis then finds no beat or measures levels a thousand times off, so the reader is told why.
    #[must_use]
    pub fn amplitude_doubt(&self) -> Option<String> {
        let spans: Vec<f32> = self.leads.iter().filter_map(|l| robust_span(&l.samples)).collect();
        let largest = spans.iter().copied().fold(0.0f32, f32::max);
        if spans.is_empty() {
            None
        } else if largest == 0.0 {
            Some("every lead is flat: no signal to measure".to_string())
        } else if f64::from(largest) > ECG_SPAN_UV.end {
            Some(format!(
                "the largest lead spans {:.0} mV, far more than an ECG's few mV: are the units or gains in the header right?",
                largest / 1000.0
            ))
        } else if f64::from(largest) < ECG_SPAN_UV.start {
            Some(format!(
                "the largest lead spans only {largest:.1} µV, far less than an ECG's QRS: are the units or gains in the header right?"
            ))
        } else {
            None
        }
    }

    /// One note per set of leads missing the same samples, said once when the recording is opened: a lead with
    /// none valid is drawn blank and takes no part in the measurements; a lead with gaps is interpolated across
    /// them for the analysis, so its beats there are found and measured on the other leads. Where no lead was
    /// recorded ([`Recording::gaps`]: every lead alike, a one-lead recording, or different leads missing at
    /// overlapping times, which gets a note of its own), beats are not measured and no RR interval spans the gap.
    /// Either way the reader should know part of the record is not there.
    #[must_use]
    pub fn invalid_sample_notes(&self) -> Vec<String> {
        let fs = self.sample_rate.hz();
        // Leads missing exactly the same samples share one note (an unplugged recorder loses every lead at
        // once; twelve alike notes would bury the point that nothing was recorded then).
        // Compared as lists of runs, each lead's found in one pass (comparing whole masks cost up to 12 × 11 / 2
        // passes over a 24-h recording).
        let mut groups: Vec<(Vec<Range<usize>>, Vec<&Lead>)> = Vec::new();
        for lead in &self.leads {
            let runs = crate::gaps::invalid_runs(&lead.samples);
            if runs.is_empty() {
                continue;
            }
            match groups.iter_mut().find(|(r, _)| *r == runs) {
                Some((_, g)) => g.push(lead),
                None => groups.push((runs, vec![lead])),
            }
        }
        let gaps = self.gaps();
        let (min_gap, min_gap_ms) = ((crate::gaps::MIN_GAP_S * fs).ceil() as usize, crate::gaps::MIN_GAP_S * 1000.0);
        let n_leads = self.leads.len();
        // Leads missing some samples at times of their own, bridged: said in one note when there are many.
        let partial =
            |(runs, g): &&(Vec<Range<usize>>, Vec<&Lead>)| g.len() < n_leads && run_totals(runs).0 < g[0].samples.len();
        let scattered = groups.iter().filter(partial).count() > SCATTERED_NOTES;
        let mut notes: Vec<String> = groups
            .iter()
            .filter(|g| !scattered || !partial(g))
            .map(|(runs, group)| {
                let lead = group[0];
                let (invalid, longest) = run_totals(runs);
                let every = group.len() == n_leads;
                // Some of these samples fall where no lead was recorded (said in a note of its own).
                let unrecorded = runs.iter().any(|r| crate::gaps::overlaps(&gaps, r.start, r.end));
                // Who, the verb agreeing with it, and how the count applies.
                let (who, has, holds, they, each, of) = match group.len() {
                    1 => (format!("lead {}", lead.name), "has", "holds", "it is", "", "it"),
                    _ if every => ("every lead".to_owned(), "has", "holds", "they are", ", at the same times", "each"),
                    _ => (
                        format!("leads {}", join_names(group)),
                        "have",
                        "hold",
                        "they are",
                        " each, at the same times",
                        "each",
                    ),
                };
                if invalid == lead.samples.len() {
                    return format!(
                        "{who} {holds} no valid sample: {they} drawn blank and left out of the measurements"
                    );
                }
                let them = if invalid == 1 { "it" } else { "them" };
                format!(
                    "{who} {has} {invalid} missing sample{}{each} ({} of {of}; the longest run {:.3} s): {}",
                    if invalid == 1 { "" } else { "s" },
                    share(invalid, lead.samples.len()),
                    longest as f64 / fs,
                    match (every, if every { longest >= min_gap } else { unrecorded }) {
                        (true, true) => format!(
                            "nothing was recorded then, so no beat is measured within a gap of {min_gap_ms:.0} ms or \
                             more, and no RR interval spans one"
                        ),
                        (true, false) => {
                            format!("no run reaches {min_gap_ms:.0} ms, and the analysis bridges {them}")
                        }
                        (false, false) => {
                            format!("the analysis bridges {them} and measures beats there on the other leads")
                        }
                        (false, true) => {
                            format!("where another lead records, the analysis bridges {them} and measures beats on it")
                        }
                    }
                )
            })
            .collect();
        if scattered {
            // Each lead's totals from its group's runs, found once above.
            let (leads, counts): (Vec<&Lead>, Vec<(usize, usize)>) = groups
                .iter()
                .filter(partial)
                .flat_map(|(runs, g)| g.iter().map(move |&l| (l, run_totals(runs))))
                .unzip();
            let fewest = counts.iter().map(|c| c.0).min().unwrap_or(0);
            let most = counts.iter().map(|c| c.0).max().unwrap_or(0);
            let longest = counts.iter().map(|c| c.1).max().unwrap_or(0);
            let most_share = leads
                .iter()
                .zip(&counts)
                .map(|(l, c)| (c.0, l.samples.len()))
                .max_by(|a, b| (a.0 as f64 / a.1 as f64).total_cmp(&(b.0 as f64 / b.1 as f64)));
            notes.push(format!(
                "{} leads ({}) miss samples at times of their own ({} each, {}; the longest run {:.3} s): the \
                 analysis bridges them and measures beats there on the other leads",
                leads.len(),
                join_names(&leads),
                if fewest == most { fewest.to_string() } else { format!("{fewest} to {most}") },
                match most_share.map(|(k, n)| share(k, n)) {
                    Some(s) if s.starts_with("under") => format!("{s} of any lead"),
                    Some(s) => format!("at most {s} of a lead"),
                    None => String::new(),
                },
                longest as f64 / fs,
            ));
        }
        // Different leads missing at overlapping times also leave stretches with no lead at all.
        if !gaps.is_empty() && !groups.iter().any(|(_, g)| g.len() == self.leads.len()) {
            let (total, longest) = run_totals(&gaps);
            notes.push(format!(
                "no lead was recorded for {:.3} s in all (the longest stretch {:.3} s): beats there are not measured, and no RR interval spans such a stretch",
                total as f64 / fs,
                longest as f64 / fs
            ));
        }
        notes
    }

    /// One note per flat lead (see [`Lead::is_flat`]) with a valid sample, when not every lead is flat (then
    /// [`Recording::amplitude_doubt`] speaks): such a lead is left out of the axis and its ST level is absent.
    #[must_use]
    pub fn flat_lead_notes(&self) -> Vec<String> {
        let flat: Vec<bool> = self.leads.iter().map(Lead::is_flat).collect();
        if flat.iter().all(|&f| f) {
            return Vec::new();
        }
        self.leads
            .iter()
            .zip(flat)
            .filter(|(l, flat)| *flat && l.samples.iter().any(|v| v.is_finite()))
            .map(|(l, _)| {
                format!(
                    "lead {} is flat (it spans under {FLAT_UV} µV, as when its electrode is off): it is left out of the axis and has no ST level",
                    l.name
                )
            })
            .collect()
    }

    /// One note per clipped lead (see [`Lead::clipping`]): its waves are cut off at the limit, so amplitudes read
    /// from it (the axis, ST levels, voltage calipers) may be too small, and its QRS may look wider or flatter.
    #[must_use]
    pub fn clipped_lead_notes(&self) -> Vec<String> {
        let fs = self.sample_rate.hz();
        self.leads
            .iter()
            .filter_map(|l| {
                let c = l.clipping(fs)?;
                let side = |s: Option<(f32, usize)>| s.map(|(level, runs)| format!("{:+.2} mV in {runs} places", level / 1000.0));
                let sides: Vec<String> = [side(c.top), side(c.bottom)].into_iter().flatten().collect();
                Some(format!(
                    "lead {} is held at its extreme value ({}) for {:.0} ms or more each time, as a recorder at the end of its range holds it: waves there are cut off, and amplitudes, the axis and ST levels read from this lead may be wrong",
                    l.name,
                    sides.join(" and "),
                    (CLIPPED_RUN_S * 1000.0)
                ))
            })
            .collect()
    }

    /// Stretches (sorted sample ranges) of at least [`crate::gaps::MIN_GAP_S`] where no lead has a valid sample:
    /// nothing was recorded there, so beats on either side are not neighbours (see [`crate::measure::hrv`]).
    #[must_use]
    pub fn gaps(&self) -> Vec<std::ops::Range<usize>> {
        let leads: Vec<&[f32]> = self.leads.iter().map(|l| l.samples.as_slice()).collect();
        crate::gaps::find(&leads, self.sample_rate.hz())
    }

    /// Number of samples per lead (0 for a recording without leads).
    #[must_use]
    pub fn len(&self) -> usize {
        self.leads.first().map_or(0, |l| l.samples.len())
    }

    /// True when there are no samples.
    #[must_use]
    pub fn is_empty(&self) -> bool {
        self.len() == 0
    }

    /// Duration in seconds (samples / rate).
    #[must_use]
    pub fn duration_s(&self) -> f64 {
        self.len() as f64 / self.sample_rate.hz()
    }

    /// Index of the lead with this name, if present.
    #[must_use]
    pub fn lead_index(&self, name: &LeadName) -> Option<usize> {
        self.leads.iter().position(|l| &l.name == name)
    }

    /// The lead with this standard name, if present.
    #[must_use]
    pub fn standard_lead(&self, lead: StandardLead) -> Option<&Lead> {
        self.leads.iter().find(|l| l.name == LeadName::Standard(lead))
    }

    /// Adds the limb leads III, aVR, aVL and aVF that are missing, computed from I and II.
    /// Returns the leads that were added (none when I or II is absent).
    ///
    /// III = II − I (Einthoven); aVR = −(I + II)/2, aVL = I − II/2, aVF = II − I/2 (Goldberger).
    /// Source: references.md §5 (Goldberger, Am Heart J 1942;23:483).
    pub fn derive_limb_leads(&mut self) -> Vec<StandardLead> {
        let (Some(i), Some(ii)) = (self.standard_lead(StandardLead::I), self.standard_lead(StandardLead::II)) else {
            return Vec::new();
        };
        let (i, ii) = (i.samples.clone(), ii.samples.clone());
        type Rule = fn(f32, f32) -> f32;
        let rules: [(StandardLead, Rule); 4] = [
            (StandardLead::III, |i, ii| ii - i),
            (StandardLead::AVR, |i, ii| -(i + ii) / 2.0),
            (StandardLead::AVL, |i, ii| i - ii / 2.0),
            (StandardLead::AVF, |i, ii| ii - i / 2.0),
        ];
        let mut added = Vec::new();
        for (lead, rule) in rules {
            if self.standard_lead(lead).is_none() {
                let samples = i.iter().zip(&ii).map(|(&a, &b)| rule(a, b)).collect();
                self.leads.push(Lead { name: lead.into(), samples });
                added.push(lead);
            }
        }
        added
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    fn rec(leads: Vec<Lead>) -> Recording {
        Recording {
            leads,
            sample_rate: Hertz::from_hz(500.0).unwrap_or_else(|_| unreachable!()),
            start: None,
            meta: Meta::default(),
            annotations: Vec::new(),
        }
    }

    /// 10 s at 500 Hz of beats once a second: a narrow 1.5 mV R wave and a broad 0.4 mV T wave, quantised to 5 µV.
    fn beats_lead(name: &str) -> Lead {
        let samples = (0..5000)
            .map(|k| {
                let d = (k % 500) as f32 / 500.0 - 0.3;
                let v = 1500.0 * (-(d / 0.012).powi(2)).exp() + 400.0 * (-((d - 0.3) / 0.06).powi(2)).exp();
                (v / 5.0).round() * 5.0
            })
            .collect();
        Lead { name: LeadName::parse(name), samples }
    }

    #[test]
    fn clipped_leads_are_noted() {
        // Unclipped: every R peak reaches the same 1500 µV for one sample only; the broad T wave holds its peak
        // value for several samples but lies below the R peaks; the flat baseline between the beats is the lead's
        // smallest value, held most of each second, but it is where the lead usually is (its median).
        let clean = beats_lead("II");
        assert_eq!(clean.clipping(500.0), None);
        // Cut at 1 mV: ten R waves held at the limit for 10 ms or more each.
        let mut cut = beats_lead("II");
        cut.samples.iter_mut().for_each(|v| *v = v.min(1000.0));
        let c = cut.clipping(500.0).unwrap_or_else(|| panic!("not clipped"));
        assert_eq!((c.top, c.bottom), (Some((1000.0, 10)), None));
        let notes = rec(vec![cut, beats_lead("V5")]).clipped_lead_notes();
        assert_eq!(notes.len(), 1, "{notes:?}");
        assert!(notes[0].starts_with("lead II is held at its extreme value (+1.00 mV in 10 places)"), "{notes:?}");
        // Held at the limit in two places only (two beats reach it): not enough to call the lead clipped.
        let mut two = beats_lead("II");
        two.samples.iter_mut().take(1200).for_each(|v| *v = v.min(1000.0));
        assert_eq!(two.clipping(500.0), None);
        // A coarse recorder (20 µV steps) on a lead whose T wave is its largest wave: the T wave's top is held
        // for several samples in every beat, but reached one step at a time. Not clipped.
        let mut coarse = beats_lead("V3");
        coarse.samples.iter_mut().for_each(|v| *v = (*v * 0.15 / 20.0).round() * 20.0);
        for k in 0..5000 {
            let d = (k % 500) as f32 / 500.0 - 0.6;
            coarse.samples[k] += ((600.0 * (-(d / 0.06).powi(2)).exp()) / 20.0).round() * 20.0;
        }
        assert_eq!(coarse.clipping(500.0), None);
        // Calibration pulses (1 mV for 200 ms, three of them) are the lead's largest value, reached steeply, but
        // held longer than a cut-off QRS is. Not clipped.
        let mut cal = beats_lead("V1");
        cal.samples.iter_mut().for_each(|v| *v *= 0.5);
        for start in [100, 1600, 3100] {
            cal.samples[start..start + 100].fill(1000.0);
        }
        assert_eq!(cal.clipping(500.0), None);
        // A flat lead is flat, not clipped.
        assert_eq!(Lead { name: LeadName::parse("I"), samples: vec![0.0; 5000] }.clipping(500.0), None);
    }

    #[test]
    fn only_annotation_codes_are_shareable() {
        for code in ["N", "V", "(", ")", "p", "~", "+", "\"", "(AFIB", "(N", "(SVTA", "(VFL", "(BII"] {
            assert_eq!(Annotation::new(0, code).shareable_label(), Some(code), "{code}");
        }
        // Short free text is still free text: initials, a short name, a bed.
        let texts =
            ["Lights off", "pt J. Smith moved", "Bob", "JS", "Ann", "(SMITH", "(BED4", "(Smith)", "", "N ", "n1"];
        for text in texts {
            assert_eq!(Annotation::new(0, text).shareable_label(), None, "{text}");
        }
    }

    #[test]
    fn missing_samples_are_noted_per_lead() {
        let mut gappy = vec![1.0f32; 1000];
        gappy[100..350].fill(f32::NAN);
        gappy[900] = f32::INFINITY;
        let r = rec(vec![
            Lead { name: LeadName::parse("I"), samples: vec![f32::NAN; 1000] },
            Lead { name: LeadName::parse("II"), samples: gappy },
            Lead { name: LeadName::parse("V1"), samples: vec![2.0; 1000] },
        ]);
        let notes = r.invalid_sample_notes();
        assert_eq!(notes.len(), 2, "{notes:?}");
        assert!(notes[0].starts_with("lead I holds no valid sample"), "{}", notes[0]);
        // 251 of 1000 samples; the longest gap 250 samples at 500 Hz.
        assert!(
            notes[1].starts_with("lead II has 251 missing samples (25.1 % of it; the longest run 0.500 s)"),
            "{}",
            notes[1]
        );
        assert_eq!(run_totals(&crate::gaps::invalid_runs(&[1.0, f32::NAN, f32::NAN, 2.0, f32::NAN])), (3, 2));
        let mut one_left = vec![f32::NAN; 15_000];
        one_left[7] = 0.0;
        let r = rec(vec![Lead { name: LeadName::parse("I"), samples: one_left }]);
        let notes = r.invalid_sample_notes();
        assert!(notes[0].starts_with("lead I has 14999 missing samples (99.9 % of it"), "{}", notes[0]);
    }

    #[test]
    fn leads_missing_the_same_samples_share_a_note() {
        let gap = |from: usize, to: usize| {
            let mut x = vec![1.0f32; 1000];
            x[from..to].fill(f32::NAN);
            x
        };
        let lead = |name: &str, samples: Vec<f32>| Lead { name: LeadName::parse(name), samples };
        // Every lead loses the same 0.4 s (a recorder unplugged): one note, saying nothing was recorded then.
        let every = rec(["I", "II", "V1"].into_iter().map(|n| lead(n, gap(100, 300))).collect());
        assert_eq!(
            every.invalid_sample_notes(),
            ["every lead has 200 missing samples, at the same times (20.0 % of each; the longest run 0.400 s): \
              nothing was recorded then, so no beat is measured within a gap of 20 ms or more, and no RR interval \
              spans one"]
        );
        // Two of three alike; the third whole.
        let two = rec(vec![lead("I", gap(100, 300)), lead("II", gap(100, 300)), lead("V1", vec![0.0; 1000])]);
        let notes = two.invalid_sample_notes();
        assert_eq!(notes.len(), 1, "{notes:?}");
        assert!(notes[0].starts_with("leads I and II have 200 missing samples each, at the same times"), "{notes:?}");
        assert!(notes[0].ends_with("measures beats there on the other leads"), "{notes:?}");
        // Different stretches that overlap leave 0.1 s with no lead at all: said once more.
        let overlap = rec(vec![lead("I", gap(100, 300)), lead("II", gap(250, 400))]);
        let notes = overlap.invalid_sample_notes();
        assert_eq!(notes.len(), 3, "{notes:?}");
        assert!(
            notes[2].starts_with("no lead was recorded for 0.100 s in all (the longest stretch 0.100 s)"),
            "{notes:?}"
        );
        // All three leads lose the same 0.4 s (a recorder unplugged) and V1 another 0.1 s: no note may say the
        // beats of those 0.4 s are measured on other leads.
        let mut v1 = gap(100, 300);
        v1[600..650].fill(f32::NAN);
        let unplugged = rec(vec![lead("I", gap(100, 300)), lead("II", gap(100, 300)), lead("V1", v1)]);
        let notes = unplugged.invalid_sample_notes();
        assert_eq!(notes.len(), 3, "{notes:?}");
        assert!(
            notes[..2]
                .iter()
                .all(|n| n.ends_with("where another lead records, the analysis bridges them and measures beats on it")),
            "{notes:?}"
        );
        assert!(notes[2].starts_with("no lead was recorded for 0.400 s in all"), "{notes:?}");
        // Scattered single losses in five leads of 10 000 samples, at different times: one note for them all.
        let one_lost = |name: &str, at: usize| {
            let mut x = vec![1.0f32; 10_000];
            x[at] = f32::NAN;
            lead(name, x)
        };
        let scattered =
            rec(["I", "II", "III", "aVR", "aVL"].iter().enumerate().map(|(i, n)| one_lost(n, 100 * i)).collect());
        assert_eq!(
            scattered.invalid_sample_notes(),
            ["5 leads (I, II, III, aVR and aVL) miss samples at times of their own (1 each, under 0.1 % of any lead; \
              the longest run 0.002 s): the analysis bridges them and measures beats there on the other leads"]
        );
        // One lead, one sample: singular, and a share that does not read 0.0 %.
        let one = rec(vec![one_lost("I", 5)]);
        assert_eq!(
            one.invalid_sample_notes(),
            [
                "lead I has 1 missing sample (under 0.1 % of it; the longest run 0.002 s): no run reaches 20 ms, and the \
              analysis bridges it"
            ]
        );
    }

    #[test]
    fn lead_names_parse_case_insensitively() {
        assert_eq!(LeadName::parse("avr"), LeadName::Standard(StandardLead::AVR));
        assert_eq!(LeadName::parse("AVF"), LeadName::Standard(StandardLead::AVF));
        assert_eq!(LeadName::parse(" v5 "), LeadName::Standard(StandardLead::V5));
        assert_eq!(LeadName::parse("Lead II"), LeadName::Standard(StandardLead::II));
        assert_eq!(LeadName::parse("i"), LeadName::Standard(StandardLead::I));
        assert_eq!(LeadName::parse("MLII"), LeadName::Other("MLII".into()));
        assert_eq!(LeadName::parse("aVR").to_string(), "aVR");
    }

    #[test]
    fn derived_limb_leads_obey_einthoven_and_goldberger() {
        let i: Vec<f32> = (0..100).map(|k| (k as f32 * 0.1).sin() * 800.0).collect();
        let ii: Vec<f32> = (0..100).map(|k| (k as f32 * 0.07).cos() * 1200.0).collect();
        let mut r = rec(vec![
            Lead { name: StandardLead::I.into(), samples: i.clone() },
            Lead { name: StandardLead::II.into(), samples: ii.clone() },
        ]);
        let added = r.derive_limb_leads();
        assert_eq!(added.len(), 4);
        let get = |l| r.standard_lead(l).map(|x| x.samples.clone()).unwrap_or_default();
        let (iii, avr, avl, avf) =
            (get(StandardLead::III), get(StandardLead::AVR), get(StandardLead::AVL), get(StandardLead::AVF));
        for k in 0..100 {
            // Source: Einthoven's law II = I + III; Goldberger 1942: aVR + aVL + aVF = 0 (references.md §5).
            assert!((ii[k] - (i[k] + iii[k])).abs() < 1e-3);
            assert!((avr[k] + avl[k] + avf[k]).abs() < 1e-3);
            assert!((avr[k] + (i[k] + ii[k]) / 2.0).abs() < 1e-3);
        }
    }

    #[test]
    fn every_lead_gets_a_name_of_its_own() -> Result<(), crate::units::UnitError> {
        let lead = |name: &str| Lead { name: LeadName::parse(name), samples: vec![0.0; 4] };
        let mut rec = Recording {
            leads: vec![lead("I"), lead("ii"), lead(" "), lead("I"), lead("I")],
            sample_rate: Hertz::from_hz(500.0)?,
            start: None,
            meta: Meta::default(),
            annotations: Vec::new(),
        };
        let notes = rec.name_leads_uniquely();
        let names: Vec<String> = rec.leads.iter().map(|l| l.name.to_string()).collect();
        assert_eq!(names, ["I", "II", "lead 3", "I (2)", "I (3)"]);
        assert_eq!(rec.leads[0].name, LeadName::Standard(StandardLead::I));
        assert_eq!(rec.leads[3].name, LeadName::Other("I (2)".into()));
        assert_eq!(notes.len(), 3);
        assert_eq!(notes[0], "a lead without a label (the 3rd read) is read as \"lead 3\"");
        assert_eq!(notes[1], "another lead labelled I is read as \"I (2)\"");
        // Nothing to change: no note.
        assert!(rec.name_leads_uniquely().is_empty());
        // An unlabelled lead's name is not one a labelled lead already has.
        rec.leads = vec![lead("lead 2"), lead("")];
        rec.name_leads_uniquely();
        let names: Vec<String> = rec.leads.iter().map(|l| l.name.to_string()).collect();
        assert_eq!(names, ["lead 2", "lead 2 (2)"]);
        Ok(())
    }

    #[test]
    fn amplitude_far_from_an_ecgs_is_doubted() -> Result<(), crate::units::UnitError> {
        let fs = Hertz::from_hz(500.0)?;
        let rec = |scale: f32| Recording {
            // A 1 mV square wave with a single 40 mV spike, scaled.
            leads: vec![Lead {
                name: LeadName::parse("II"),
                samples: (0..5000)
                    .map(|k| {
                        scale
                            * if k == 2500 {
                                40_000.0
                            } else if (k / 250) % 2 == 0 {
                                1000.0
                            } else {
                                0.0
                            }
                    })
                    .collect(),
            }],
            sample_rate: fs,
            start: None,
            meta: Meta::default(),
            annotations: Vec::new(),
        };
        assert_eq!(rec(1.0).amplitude_doubt(), None, "one spike does not count");
        assert!(rec(1000.0).amplitude_doubt().is_some_and(|d| d.contains("1000 mV")));
        assert!(rec(0.001).amplitude_doubt().is_some_and(|d| d.contains("1.0 µV")));
        assert!(rec(0.0).amplitude_doubt().is_some_and(|d| d.contains("flat")));
        Ok(())
    }

    #[test]
    fn deidentified_meta_drops_identifiers() {
        let m = Meta {
            patient_id: Some("W3-017".into()),
            patient_name: Some("Test Person".into()),
            sex: Some("F".into()),
            birth_date: Some("01-JAN-1970".into()),
            age_years: Some(56.0),
            recording_info: Some("bed 4".into()),
            device: Some("Ward 3 cart".into()),
        };
        let d = m.deidentified();
        assert!(d.patient_id.is_none() && d.patient_name.is_none() && d.birth_date.is_none());
        assert!(d.recording_info.is_none() && d.device.is_none());
        assert_eq!(d.sex.as_deref(), Some("F"));
        assert_eq!(d.age_years, Some(56.0));
        let old = Meta { age_years: Some(97.0), ..m }.deidentified();
        assert_eq!(old.age_years, Some(OLDEST_AGE_SHOWN));
    }
}
