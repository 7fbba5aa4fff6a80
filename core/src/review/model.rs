//! The review model (format version 2): what the reader accepted, moved, placed and concluded, with who did
//! what and when. Saved state only: nothing here is derived or throwaway.

use std::fmt;

use serde::{Deserialize, Serialize};

use super::ReviewError;
use super::history::Change;
use super::identity::RecordingIdentity;
use super::history::Timestamp;
use crate::beat::MarkKind;
use crate::caliper::Caliper;

/// The current `format_version` written by [`Review::save`](crate::review::Review::save).
pub const FORMAT_VERSION: u32 = 2;

/// Review progress: `draft` → `checked` → `final`. A `final` review is read-only until reopened.
#[derive(Debug, Clone, Copy, Default, PartialEq, Eq, Hash, PartialOrd, Ord, Serialize, Deserialize)]
#[serde(rename_all = "snake_case")]
pub enum Stage {
    /// Being worked on.
    #[default]
    Draft,
    /// Checked by a reader (e.g. a technician), awaiting overread.
    Checked,
    /// Signed off; read-only until [`Review::reopen`].
    Final,
}

impl Stage {
    /// `draft`, `checked` or `final`.
    #[must_use]
    pub fn as_str(self) -> &'static str {
        match self {
            Self::Draft => "draft",
            Self::Checked => "checked",
            Self::Final => "final",
        }
    }
}

impl fmt::Display for Stage {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        f.write_str(self.as_str())
    }
}

/// Where a value or mark came from.
#[derive(Debug, Clone, Copy, Default, PartialEq, Eq, Hash, Serialize, Deserialize)]
#[serde(rename_all = "snake_case")]
pub enum Origin {
    /// Computed by Isoline and left as it was.
    #[default]
    Auto,
    /// Computed, then adjusted by the reader.
    Moved,
    /// Added by the reader (no automatic counterpart).
    Placed,
}

impl Origin {
    /// `auto`, `moved` or `placed`.
    #[must_use]
    pub fn as_str(self) -> &'static str {
        match self {
            Self::Auto => "auto",
            Self::Moved => "moved",
            Self::Placed => "placed",
        }
    }
}

impl fmt::Display for Origin {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        f.write_str(self.as_str())
    }
}

/// Which beat a mark sits on.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash, Serialize, Deserialize)]
#[serde(rename_all = "snake_case")]
pub enum MarkOn {
    /// A beat of the recording, by its index in the detected beat list.
    Beat(usize),
    /// The representative (median) beat shown in the Beat lens.
    Representative,
}

impl fmt::Display for MarkOn {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        match self {
            Self::Beat(i) => write!(f, "beat {i}"),
            Self::Representative => f.write_str("representative beat"),
        }
    }
}

/// A boundary mark on a beat.
#[derive(Debug, Clone, Copy, PartialEq, Serialize, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct Mark {
    /// Which boundary.
    pub kind: MarkKind,
    /// On which beat.
    pub on: MarkOn,
    /// Sample index: on the recording's axis for [`MarkOn::Beat`], on the representative beat's own axis
    /// for [`MarkOn::Representative`].
    pub sample: usize,
    /// The same position in seconds on the same axis (sample / sampling rate).
    pub time_s: f64,
    /// Where the mark came from.
    pub origin: Origin,
    /// The automatic position (sample) before the reader moved it; `None` for `auto` and `placed` marks.
    pub auto_sample: Option<usize>,
}

/// One measurement: the automatic value, the reader's value and where the value in force came from.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct Measurement {
    /// Stable key, as in `isoline measure --format json` (`qrs_ms`, `qtc_bazett_ms`, …).
    pub key: String,
    /// Label for readers (`QRS duration`).
    pub label: String,
    /// Value computed by Isoline; `None` when it could not be measured.
    pub auto_value: Option<f64>,
    /// Value entered by the reader; `None` when the reader left the automatic value standing.
    pub reviewed_value: Option<f64>,
    /// `auto` when the automatic value stands, `moved` when the reader changed it, `placed` when the reader
    /// gave a value with no automatic one.
    pub origin: Origin,
    /// Unit of both values (`ms`, `bpm`, `deg`, `uV`).
    pub unit: String,
}

impl Measurement {
    /// An automatic measurement with no reader's value yet.
    #[must_use]
    pub fn automatic(key: &str, label: &str, value: Option<f64>, unit: &str) -> Self {
        Self {
            key: key.to_owned(),
            label: label.to_owned(),
            auto_value: value,
            reviewed_value: None,
            origin: Origin::Auto,
            unit: unit.to_owned(),
        }
    }

    /// The value in force: the reader's when given, else the automatic one.
    #[must_use]
    pub fn value(&self) -> Option<f64> {
        self.reviewed_value.or(self.auto_value)
    }
}

/// A review (format version 2). Build with [`Review::new`]; change it only through the methods, which keep
/// the history and refuse changes while the review is `final`.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct Review {
    /// Layout version of the file; [`FORMAT_VERSION`] after loading (older files are migrated).
    pub format_version: u32,
    /// The recording this review belongs to.
    pub recording: RecordingIdentity,
    /// The reader who made the review (name or initials).
    pub reader: String,
    /// Progress.
    pub stage: Stage,
    /// When the review was created (UTC).
    pub created: Timestamp,
    /// When it was last changed (UTC).
    pub modified: Timestamp,
    /// The reader's calipers.
    pub calipers: Vec<Caliper>,
    /// Boundary marks (automatic, moved or placed).
    pub marks: Vec<Mark>,
    /// Measurements, automatic and reviewed.
    pub measurements: Vec<Measurement>,
    /// The reader's written conclusion (free text; Isoline writes none).
    pub summary: String,
    /// Every change, oldest first.
    pub history: Vec<Change>,
}

impl Review {
    /// A new empty `draft` review of a recording by a reader, created now.
    #[must_use]
    pub fn new(recording: RecordingIdentity, reader: &str) -> Self {
        let now = Timestamp::now();
        Self {
            format_version: FORMAT_VERSION,
            recording,
            reader: reader.to_owned(),
            stage: Stage::Draft,
            created: now,
            modified: now,
            calipers: Vec::new(),
            marks: Vec::new(),
            measurements: Vec::new(),
            summary: String::new(),
            history: Vec::new(),
        }
    }

    /// `true` when the review is `final` (read-only).
    #[must_use]
    pub fn is_final(&self) -> bool {
        self.stage == Stage::Final
    }

    /// The measurement with a given key.
    #[must_use]
    pub fn measurement(&self, key: &str) -> Option<&Measurement> {
        self.measurements.iter().find(|m| m.key == key)
    }

    /// The mark of a kind on a beat.
    #[must_use]
    pub fn mark(&self, kind: MarkKind, on: MarkOn) -> Option<&Mark> {
        self.marks.iter().find(|m| m.kind == kind && m.on == on)
    }

    fn writable(&self) -> Result<(), ReviewError> {
        if self.is_final() { Err(ReviewError::Final) } else { Ok(()) }
    }

    fn record(&mut self, reader: &str, what: String, old: Option<String>, new: Option<String>) {
        let at = Timestamp::now();
        self.modified = at;
        self.history.push(Change { at, by: reader.to_owned(), what, old, new });
    }

    /// Adds (or replaces, by key) an automatic measurement, e.g. from the measurement engine. A reader's value
    /// already given for the key is kept. Not recorded in the history: automatic values are the starting
    /// point, not a reader's change.
    ///
    /// # Errors
    /// [`ReviewError::Final`] on a final review.
    pub fn put_automatic(&mut self, m: Measurement) -> Result<(), ReviewError> {
        self.writable()?;
        match self.measurements.iter_mut().find(|x| x.key == m.key) {
            Some(x) => {
                x.auto_value = m.auto_value;
                x.label = m.label;
                x.unit = m.unit;
                x.origin = match (x.reviewed_value, x.auto_value) {
                    (None, _) => Origin::Auto,
                    (Some(_), None) => Origin::Placed,
                    (Some(_), Some(_)) => Origin::Moved,
                };
            }
            None => self.measurements.push(Measurement { reviewed_value: None, origin: Origin::Auto, ..m }),
        }
        self.modified = Timestamp::now();
        Ok(())
    }

    /// Adds an automatic mark (origin `auto`), replacing an automatic mark of the same kind on the same beat.
    /// A mark the reader moved or placed is kept. Not recorded in the history.
    ///
    /// # Errors
    /// [`ReviewError::Final`] on a final review.
    pub fn put_automatic_mark(&mut self, kind: MarkKind, on: MarkOn, sample: usize, time_s: f64) -> Result<(), ReviewError> {
        self.writable()?;
        let mark = Mark { kind, on, sample, time_s, origin: Origin::Auto, auto_sample: None };
        match self.marks.iter_mut().find(|m| m.kind == kind && m.on == on) {
            Some(m) if m.origin == Origin::Auto => *m = mark,
            Some(_) => {}
            None => self.marks.push(mark),
        }
        self.modified = Timestamp::now();
        Ok(())
    }

    /// The reader gives a value for a measurement (in the measurement's unit). Origin becomes `moved` when an
    /// automatic value exists, `placed` when not (a new key is added with an empty label and unit).
    ///
    /// # Errors
    /// [`ReviewError::Final`] on a final review; [`ReviewError::NotFinite`] for NaN or infinite values.
    pub fn set_measurement(&mut self, key: &str, value: f64, reader: &str) -> Result<(), ReviewError> {
        self.writable()?;
        if !value.is_finite() {
            return Err(ReviewError::NotFinite { what: format!("measurement {key}") });
        }
        let idx = match self.measurements.iter().position(|m| m.key == key) {
            Some(i) => i,
            None => {
                self.measurements.push(Measurement {
                    key: key.to_owned(),
                    label: String::new(),
                    auto_value: None,
                    reviewed_value: None,
                    origin: Origin::Placed,
                    unit: String::new(),
                });
                self.measurements.len() - 1
            }
        };
        let m = &mut self.measurements[idx];
        let old = m.value();
        m.reviewed_value = Some(value);
        m.origin = if m.auto_value.is_some() { Origin::Moved } else { Origin::Placed };
        let (unit, origin) = (m.unit.clone(), m.origin);
        self.record(
            reader,
            format!("measurement {key} ({origin})"),
            old.map(|v| fmt_value(v, &unit)),
            Some(fmt_value(value, &unit)),
        );
        Ok(())
    }

    /// Drops the reader's value for a measurement: the automatic value stands again (a `placed` measurement
    /// with no automatic value is removed).
    ///
    /// # Errors
    /// [`ReviewError::Final`]; [`ReviewError::UnknownMeasurement`] when no measurement has the key.
    pub fn revert_measurement(&mut self, key: &str, reader: &str) -> Result<(), ReviewError> {
        self.writable()?;
        let idx = self
            .measurements
            .iter()
            .position(|m| m.key == key)
            .ok_or_else(|| ReviewError::UnknownMeasurement(key.to_owned()))?;
        let m = &mut self.measurements[idx];
        let old = m.value();
        let unit = m.unit.clone();
        m.reviewed_value = None;
        m.origin = Origin::Auto;
        let new = m.auto_value;
        if new.is_none() {
            self.measurements.remove(idx);
        }
        self.record(
            reader,
            format!("measurement {key} reverted to automatic"),
            old.map(|v| fmt_value(v, &unit)),
            new.map(|v| fmt_value(v, &unit)),
        );
        Ok(())
    }

    /// The reader moves a mark (or places it where there was none): origin `auto` becomes `moved` (the
    /// automatic position is kept in `auto_sample`); a new mark is `placed`.
    ///
    /// # Errors
    /// [`ReviewError::Final`]; [`ReviewError::NotFinite`] for a NaN or infinite time.
    pub fn move_mark(
        &mut self,
        kind: MarkKind,
        on: MarkOn,
        sample: usize,
        time_s: f64,
        reader: &str,
    ) -> Result<(), ReviewError> {
        self.writable()?;
        if !time_s.is_finite() {
            return Err(ReviewError::NotFinite { what: format!("{kind} on {on}") });
        }
        let old = match self.marks.iter_mut().find(|m| m.kind == kind && m.on == on) {
            Some(m) => {
                let old = (m.sample, m.time_s);
                if m.origin == Origin::Auto {
                    m.origin = Origin::Moved;
                    m.auto_sample = Some(m.sample);
                }
                m.sample = sample;
                m.time_s = time_s;
                Some(old)
            }
            None => {
                self.marks.push(Mark { kind, on, sample, time_s, origin: Origin::Placed, auto_sample: None });
                None
            }
        };
        self.record(
            reader,
            format!("mark {kind} on {on}"),
            old.map(|(s, t)| format!("sample {s} ({t:.3} s)")),
            Some(format!("sample {sample} ({time_s:.3} s)")),
        );
        Ok(())
    }

    /// Removes a mark.
    ///
    /// # Errors
    /// [`ReviewError::Final`]; [`ReviewError::UnknownMark`] when there is no such mark.
    pub fn remove_mark(&mut self, kind: MarkKind, on: MarkOn, reader: &str) -> Result<(), ReviewError> {
        self.writable()?;
        let idx = self
            .marks
            .iter()
            .position(|m| m.kind == kind && m.on == on)
            .ok_or_else(|| ReviewError::UnknownMark(format!("{kind} on {on}")))?;
        let m = self.marks.remove(idx);
        self.record(reader, format!("mark {kind} on {on} removed"), Some(format!("sample {}", m.sample)), None);
        Ok(())
    }

    /// Adds a caliper, or replaces the caliper with the same id (a drag ends).
    ///
    /// # Errors
    /// [`ReviewError::Final`].
    pub fn put_caliper(&mut self, caliper: Caliper, reader: &str) -> Result<(), ReviewError> {
        self.writable()?;
        let new = Some(caliper.readout());
        let (what, old) = match self.calipers.iter_mut().find(|c| c.id == caliper.id) {
            Some(c) => {
                let old = c.readout();
                *c = caliper.clone();
                (format!("caliper {}", caliper.id), Some(old))
            }
            None => {
                self.calipers.push(caliper.clone());
                (format!("caliper {} added", caliper.id), None)
            }
        };
        self.record(reader, what, old, new);
        Ok(())
    }

    /// Removes a caliper by id.
    ///
    /// # Errors
    /// [`ReviewError::Final`]; [`ReviewError::UnknownCaliper`].
    pub fn remove_caliper(&mut self, id: u32, reader: &str) -> Result<(), ReviewError> {
        self.writable()?;
        let idx = self.calipers.iter().position(|c| c.id == id).ok_or(ReviewError::UnknownCaliper(id))?;
        let c = self.calipers.remove(idx);
        self.record(reader, format!("caliper {id} removed"), Some(c.readout()), None);
        Ok(())
    }

    /// The next free caliper id.
    #[must_use]
    pub fn next_caliper_id(&self) -> u32 {
        self.calipers.iter().map(|c| c.id).max().map_or(1, |m| m.saturating_add(1))
    }

    /// Replaces the reader's summary text.
    ///
    /// # Errors
    /// [`ReviewError::Final`].
    pub fn set_summary(&mut self, text: &str, reader: &str) -> Result<(), ReviewError> {
        self.writable()?;
        if self.summary == text {
            return Ok(());
        }
        let old = std::mem::replace(&mut self.summary, text.to_owned());
        self.record(reader, "summary".to_owned(), Some(old), Some(text.to_owned()));
        Ok(())
    }

    /// Moves the review to another stage. Setting `final` makes it read-only.
    ///
    /// # Errors
    /// [`ReviewError::Final`] when the review is already final (use [`Review::reopen`]).
    pub fn set_stage(&mut self, stage: Stage, reader: &str) -> Result<(), ReviewError> {
        self.writable()?;
        if self.stage == stage {
            return Ok(());
        }
        let old = self.stage;
        self.stage = stage;
        self.record(reader, "stage".to_owned(), Some(old.to_string()), Some(stage.to_string()));
        Ok(())
    }

    /// Reopens a final review for changes: it goes back to `checked`, and the reopening is recorded.
    ///
    /// # Errors
    /// [`ReviewError::NotFinal`] when the review is not final.
    pub fn reopen(&mut self, reader: &str) -> Result<(), ReviewError> {
        if !self.is_final() {
            return Err(ReviewError::NotFinal(self.stage));
        }
        self.stage = Stage::Checked;
        self.record(reader, "reopened".to_owned(), Some(Stage::Final.to_string()), Some(Stage::Checked.to_string()));
        Ok(())
    }
}

fn fmt_value(v: f64, unit: &str) -> String {
    if unit.is_empty() { format!("{v}") } else { format!("{v} {unit}") }
}
