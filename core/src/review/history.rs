//! The change history of a review, and the UTC timestamps it carries.

use std::fmt;

use serde::{Deserialize, Serialize};
use time::format_description::well_known::Rfc3339;
use time::{OffsetDateTime, UtcOffset};

/// A moment in UTC, written as ISO 8601 / RFC 3339 text (`2026-12-02T03:15:24.5Z`).
#[derive(Debug, Clone, Copy, PartialEq, Eq, PartialOrd, Ord, Hash)]
pub struct Timestamp(OffsetDateTime);

impl Timestamp {
    /// Now, in UTC.
    #[must_use]
    pub fn now() -> Self {
        Self(OffsetDateTime::now_utc())
    }

    /// From a date-time, converted to UTC.
    #[must_use]
    pub fn from_datetime(t: OffsetDateTime) -> Self {
        Self(t.to_offset(UtcOffset::UTC))
    }

    /// From seconds and nanoseconds since 1970-01-01T00:00:00Z; `None` outside the representable range.
    #[must_use]
    pub fn from_unix(seconds: i64, nanos: u32) -> Option<Self> {
        let t = OffsetDateTime::from_unix_timestamp(seconds).ok()?;
        t.replace_nanosecond(nanos).ok().map(Self)
    }

    /// The date-time (UTC).
    #[must_use]
    pub fn datetime(self) -> OffsetDateTime {
        self.0
    }

    /// ISO 8601 / RFC 3339 text in UTC (`Z`).
    #[must_use]
    pub fn to_iso8601(self) -> String {
        // Formatting a UTC date-time of years 0000–9999 cannot fail; fall back to the Debug form otherwise.
        self.0.format(&Rfc3339).unwrap_or_else(|_| format!("{:?}", self.0))
    }

    /// Parses RFC 3339 text (any offset; converted to UTC).
    ///
    /// # Errors
    /// The parser's message when the text is not RFC 3339.
    pub fn parse(text: &str) -> Result<Self, time::error::Parse> {
        OffsetDateTime::parse(text, &Rfc3339).map(Self::from_datetime)
    }
}

impl fmt::Display for Timestamp {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        f.write_str(&self.to_iso8601())
    }
}

impl Serialize for Timestamp {
    fn serialize<S: serde::Serializer>(&self, s: S) -> Result<S::Ok, S::Error> {
        s.serialize_str(&self.to_iso8601())
    }
}

impl<'de> Deserialize<'de> for Timestamp {
    fn deserialize<D: serde::Deserializer<'de>>(d: D) -> Result<Self, D::Error> {
        let text = String::deserialize(d)?;
        Self::parse(&text).map_err(|e| serde::de::Error::custom(format!("timestamp {text:?} is not ISO 8601 UTC: {e}")))
    }
}

/// One change a reader made: what, old → new, when, by whom, and why when the reader said.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct Change {
    /// When (UTC).
    pub at: Timestamp,
    /// The reader who made it.
    pub by: String,
    /// What changed (`measurement qt_ms (moved)`, `mark T end on representative beat`, `stage`, `reopened`).
    pub what: String,
    /// The value before, as text; `None` when there was none.
    pub old: Option<String>,
    /// The value after, as text; `None` when removed.
    pub new: Option<String>,
    /// Why, in the reader's words (`T wave end hidden by the next P wave`); `None` when not given. Left out of
    /// the file when `None`, so a review written before this field reads and writes alike.
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub why: Option<String>,
}

impl fmt::Display for Change {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        let old = self.old.as_deref().unwrap_or("—");
        let new = self.new.as_deref().unwrap_or("—");
        write!(f, "{}  {}  {}: {} → {}", self.at, self.by, self.what, old, new)?;
        match &self.why {
            Some(why) => write!(f, " (why: {why})"),
            None => Ok(()),
        }
    }
}

#[cfg(test)]
#[allow(clippy::unwrap_used)] // a test fails by panicking
mod tests {
    use super::*;

    #[test]
    fn timestamp_text_is_utc_iso8601_and_round_trips() {
        let t = Timestamp::from_unix(1_796_181_324, 500_000_000).unwrap();
        assert_eq!(t.to_iso8601(), "2026-12-02T03:15:24.5Z");
        assert_eq!(Timestamp::parse("2026-12-02T04:15:24.5+01:00").unwrap(), t);
    }
}
