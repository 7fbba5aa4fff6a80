//! Changing a review: every change a reader makes goes through these methods, which record it in the
//! history (what, old → new, when, by whom) and refuse while the review is `final`.

use super::ReviewError;
use super::history::{Change, Timestamp};
use super::model::{Mark, MarkOn, Measurement, Origin, Review, Stage};
use crate::beat::MarkKind;
use crate::caliper::Caliper;

impl Review {
    fn writable(&self) -> Result<(), ReviewError> {
        if self.is_final() { Err(ReviewError::Final) } else { Ok(()) }
    }

    pub(super) fn record(&mut self, reader: &str, what: String, old: Option<String>, new: Option<String>) {
        let at = Timestamp::now();
        self.modified = at;
        self.history.push(Change { at, by: reader.to_owned(), what, old, new, why: None });
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
    pub fn put_automatic_mark(
        &mut self,
        kind: MarkKind,
        on: MarkOn,
        sample: usize,
        time_s: f64,
    ) -> Result<(), ReviewError> {
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
    /// [`ReviewError::Final`] on a final review; [`ReviewError::NotFinite`] for NaN or infinite values;
    /// [`ReviewError::Implausible`] for a value outside the key's bounds
    /// ([`crate::measure::plausible_range`]).
    pub fn set_measurement(&mut self, key: &str, value: f64, reader: &str) -> Result<(), ReviewError> {
        self.writable()?;
        if !value.is_finite() {
            return Err(ReviewError::NotFinite { what: format!("measurement {key}") });
        }
        if let Some(why) = crate::measure::implausible(key, value) {
            return Err(ReviewError::Implausible { what: format!("measurement {key}"), why });
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
        if super::derived::QTC_INPUT_KEYS.contains(&key) {
            self.recompute_qtc(reader);
        }
        Ok(())
    }

    /// [`Review::set_measurement`], with the reader's reason for the value (`why`; blank = none given) kept in the
    /// history entry of the change. Control characters in it become spaces (the history is shown line by line).
    ///
    /// # Errors
    /// As [`Review::set_measurement`].
    pub fn set_measurement_why(
        &mut self,
        key: &str,
        value: f64,
        reader: &str,
        why: Option<&str>,
    ) -> Result<(), ReviewError> {
        let at = self.history.len();
        self.set_measurement(key, value, reader)?;
        let why: Option<String> = why
            .map(|w| w.chars().map(|c| if c.is_control() { ' ' } else { c }).collect::<String>().trim().to_owned())
            .filter(|w| !w.is_empty());
        if let Some(entry) = self.history.get_mut(at) {
            entry.why = why;
        }
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
        self.revert_at(idx, reader, &format!("measurement {key} reverted to automatic"));
        if super::derived::QTC_INPUT_KEYS.contains(&key) {
            self.recompute_qtc(reader);
        }
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

impl Review {
    /// Drops the reviewed value of the measurement at `idx` (removing it when it has no automatic value) and
    /// records `what` in the history with the old and new values.
    pub(super) fn revert_at(&mut self, idx: usize, reader: &str, what: &str) {
        let m = &mut self.measurements[idx];
        let old = m.value();
        let unit = m.unit.clone();
        m.reviewed_value = None;
        m.origin = Origin::Auto;
        let new = m.auto_value;
        if new.is_none() {
            self.measurements.remove(idx);
        }
        self.record(reader, what.to_owned(), old.map(|v| fmt_value(v, &unit)), new.map(|v| fmt_value(v, &unit)));
    }
}

fn fmt_value(v: f64, unit: &str) -> String {
    if unit.is_empty() { format!("{v}") } else { format!("{v} {unit}") }
}
