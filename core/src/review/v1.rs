//! Format version 1, kept to read old files: it named the reader `reviewer` and kept no change history.

use serde::Deserialize;

use super::history::{Change, Timestamp};
use super::identity::RecordingIdentity;
use super::model::{FORMAT_VERSION, Mark, Measurement, Review, Stage};
use crate::caliper::Caliper;

/// A version-1 review, field for field.
#[derive(Debug, Deserialize)]
#[serde(deny_unknown_fields)]
pub(super) struct ReviewV1 {
    pub format_version: u32,
    pub recording: RecordingIdentity,
    pub reviewer: String,
    pub stage: Stage,
    pub created: Timestamp,
    pub modified: Timestamp,
    pub calipers: Vec<Caliper>,
    pub marks: Vec<Mark>,
    pub measurements: Vec<Measurement>,
    pub summary: String,
}

impl ReviewV1 {
    /// Version 1 → 2: `reviewer` becomes `reader`; the history starts with one entry recording the migration
    /// (by `isoline`, at load time). Everything else carries over unchanged.
    pub(super) fn migrate(self) -> Review {
        let migrated = Change {
            at: Timestamp::now(),
            by: "isoline".to_owned(),
            what: "format_version (migrated on load; version 1 kept no history)".to_owned(),
            old: Some(self.format_version.to_string()),
            new: Some(FORMAT_VERSION.to_string()),
            why: None,
        };
        Review {
            format_version: FORMAT_VERSION,
            recording: self.recording,
            reader: self.reviewer,
            stage: self.stage,
            created: self.created,
            modified: self.modified,
            calipers: self.calipers,
            marks: self.marks,
            measurements: self.measurements,
            summary: self.summary,
            history: vec![migrated],
        }
    }
}
