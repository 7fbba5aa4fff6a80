//! The review model (format version 2): what the reader accepted, moved, placed and concluded, with who did
//! what and when. Saved state only: nothing here is derived or throwaway.

use std::fmt;

use serde::{Deserialize, Serialize};

use super::history::Change;
use super::history::Timestamp;
use super::identity::RecordingIdentity;
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
}
