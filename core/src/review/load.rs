//! Loading reviews: any known `format_version` (older ones migrate to the current model), errors that name
//! the file, line, column and field, and a recording check that never lets a review of another recording
//! through silently.

use std::path::Path;

use serde::Deserialize;

use super::ReviewError;
use super::identity::signal_sha256;
use super::model::{FORMAT_VERSION, Review};
use super::v1::ReviewV1;
use crate::caliper::CaliperKind;

/// Largest review file read, bytes (a review is a few kB; this guards against opening the wrong file).
pub const MAX_REVIEW_BYTES: u64 = 64 << 20;

/// Only the version, read first to choose the layout.
#[derive(Deserialize)]
struct VersionOnly {
    #[serde(default, deserialize_with = "present")]
    format_version: Option<u64>,
}

fn present<'de, D: serde::Deserializer<'de>>(d: D) -> Result<Option<u64>, D::Error> {
    u64::deserialize(d).map(Some)
}

/// Loads a review, migrating older format versions. The file is only read, never changed.
///
/// # Errors
/// [`ReviewError::Io`] when unreadable; [`ReviewError::Parse`] naming line, column and field for bad RON or
/// an unknown or missing field; [`ReviewError::UnsupportedVersion`] for a version this program does not read.
pub fn load(path: &Path) -> Result<Review, ReviewError> {
    let io = |source| ReviewError::Io { path: path.to_path_buf(), cause: source };
    let meta = std::fs::metadata(path).map_err(io)?;
    if !meta.is_file() {
        // A named pipe would wait for a writer; a folder or device is no review.
        return Err(io(std::io::Error::new(std::io::ErrorKind::InvalidInput, "is not a regular file")));
    }
    let len = meta.len();
    if len > MAX_REVIEW_BYTES {
        return Err(parse_error(path, 1, 1, None, format!("{len} bytes is too large for a review file")));
    }
    let bytes = std::fs::read(path).map_err(io)?;
    let text = std::str::from_utf8(&bytes).map_err(|e| {
        let (line, column) = line_col(&bytes[..e.valid_up_to()]);
        parse_error(path, line, column, None, "not UTF-8 text".to_owned())
    })?;
    from_ron(path, text)
}

/// Parses review text; `path` is only used in messages.
///
/// # Errors
/// As [`load`].
pub fn from_ron(path: &Path, text: &str) -> Result<Review, ReviewError> {
    // A text editor may start the file with a byte-order mark, which RON takes for the first token.
    let text = text.strip_prefix('\u{feff}').unwrap_or(text);
    if text.trim().is_empty() {
        return Err(parse_error(path, 1, 1, None, "the file is empty (no review in it)".to_owned()));
    }
    let version: VersionOnly = ron::from_str(text).map_err(|e| ron_error(path, &e))?;
    let review = match version.format_version {
        None => Err(parse_error(path, 1, 1, Some("format_version"), "missing field `format_version`".to_owned())),
        Some(1) => ron::from_str::<ReviewV1>(text).map(ReviewV1::migrate).map_err(|e| ron_error(path, &e)),
        Some(v) if v == u64::from(FORMAT_VERSION) => ron::from_str::<Review>(text).map_err(|e| ron_error(path, &e)),
        Some(found) => Err(ReviewError::UnsupportedVersion { path: path.to_path_buf(), found }),
    }?;
    check_values(path, text, &review)?;
    Ok(review)
}

/// Values RON accepts but a review cannot hold.
fn check_values(path: &Path, text: &str, review: &Review) -> Result<(), ReviewError> {
    use crate::measure::implausible;
    // Point at the `nth` line (from 0) that sets the field: the entry at fault, where every entry writes it.
    let at_nth = |field: &str, nth: usize, message: String| {
        let needle = format!("{field}:");
        let (line, column) = text
            .lines()
            .enumerate()
            .filter_map(|(i, l)| l.find(&needle).map(|c| (i + 1, c + 1)))
            .nth(nth)
            .unwrap_or((1, 1));
        Err(parse_error(path, line, column, Some(field), message))
    };
    let at = |field: &str, message: String| at_nth(field, 0, message);
    let sha = &review.recording.sha256;
    if sha.len() != 64 || !sha.bytes().all(|b| b.is_ascii_hexdigit()) {
        return at("sha256", format!("`sha256` must be 64 hexadecimal digits, found {sha:?}"));
    }
    if let Some(why) = super::reader_name_problem(&review.reader) {
        return at("reader", format!("`reader` {why}"));
    }
    if let Some((i, why)) =
        review.history.iter().enumerate().find_map(|(i, c)| Some((i, super::reader_name_problem(&c.by)?)))
    {
        return at_nth("by", i, format!("`by` of a history entry {why}"));
    }
    let fs = review.recording.sample_rate_hz;
    if !(fs.is_finite() && fs > 0.0) {
        return at("sample_rate_hz", format!("`sample_rate_hz` must be a positive number, found {fs}"));
    }
    // RON reads NaN and inf as numbers; no value in a review can be one (a hand-edited file gave a negative heart
    // rate and an agreement bias of NaN).
    // Every measurement writes both values and every mark its time, so the entry's index finds its line.
    for (i, m) in review.measurements.iter().enumerate() {
        for (field, v) in [("auto_value", m.auto_value), ("reviewed_value", m.reviewed_value)] {
            if let Some(v) = v.filter(|v| !v.is_finite()) {
                return at_nth(field, i, format!("`{field}` of `{}` must be a finite number, found {v}", m.key));
            }
            // A reviewed value no ECG shows is a slip (or a hand edit) that would be drawn and exported as read.
            if let Some(why) = v.filter(|_| field == "reviewed_value").and_then(|v| implausible(&m.key, v)) {
                return at_nth(field, i, format!("`{field}` of `{}`: {why}", m.key));
            }
        }
    }
    if let Some(i) = review.marks.iter().position(|m| !m.time_s.is_finite()) {
        let v = review.marks[i].time_s;
        return at_nth("time_s", i, format!("`time_s` of a mark must be a finite number, found {v}"));
    }
    // Calipers write only their kind's fields: count the earlier calipers that write the same one.
    let fields = |k: &CaliperKind| -> Vec<(&'static str, f64)> {
        match *k {
            CaliperKind::Time { t1_s, t2_s } => vec![("t1_s", t1_s), ("t2_s", t2_s)],
            CaliperKind::Voltage { t_s, uv1, uv2 } => vec![("t_s", t_s), ("uv1", uv1), ("uv2", uv2)],
            CaliperKind::Plumb { t_s } => vec![("t_s", t_s)],
        }
    };
    for (i, c) in review.calipers.iter().enumerate() {
        if let Some((field, v)) = fields(&c.kind).into_iter().find(|(_, v)| !v.is_finite()) {
            let nth = review.calipers[..i].iter().filter(|e| fields(&e.kind).iter().any(|(f, _)| *f == field)).count();
            return at_nth(field, nth, format!("`{field}` of caliper {} must be a finite number, found {v}", c.id));
        }
    }
    // A second entry for the same measurement, mark or caliper would be read past (the first is the one used): a
    // reader's value in it is lost without a word (a hand-edited second `qt_ms` with a reviewed 440 ms read as
    // the automatic 500).
    if let Some(i) = second_of(review.measurements.iter().map(|m| &m.key)) {
        let key = &review.measurements[i].key;
        return at_nth("key", i, format!("measurement `{key}` is given twice (one entry per measurement)"));
    }
    if let Some(i) = second_of(review.marks.iter().map(|m| (m.kind, m.on))) {
        let m = &review.marks[i];
        return at_nth("kind", i, format!("mark {:?} on {:?} is given twice (one per kind and beat)", m.kind, m.on));
    }
    if let Some(i) = second_of(review.calipers.iter().map(|c| c.id)) {
        let id = review.calipers[i].id;
        return at_nth("id", i, format!("caliper id {id} is given twice (ids are unique)"));
    }
    Ok(())
}

/// Index of the first item equal to an earlier one.
fn second_of<T: Eq + std::hash::Hash>(items: impl Iterator<Item = T>) -> Option<usize> {
    let mut seen = std::collections::HashSet::new();
    items.enumerate().find_map(|(i, x)| (!seen.insert(x)).then_some(i))
}

/// Loads a review and checks that it belongs to the recording at `recording_path` (as given to
/// [`crate::io::open`]) by the SHA-256 of its signal content.
///
/// # Errors
/// As [`load`]; [`ReviewError::Recording`] when the recording cannot be read;
/// [`ReviewError::RecordingMismatch`] when the review was made on other signal content — the CLI refuses,
/// the GUI asks the reader.
pub fn load_for(review_path: &Path, recording_path: &Path) -> Result<Review, ReviewError> {
    let review = load(review_path)?;
    let found = signal_sha256(recording_path)?;
    if !review.recording.is_signal(&found) {
        return Err(ReviewError::RecordingMismatch { expected: review.recording.sha256, found });
    }
    Ok(review)
}

fn parse_error(path: &Path, line: usize, column: usize, field: Option<&str>, message: String) -> ReviewError {
    ReviewError::Parse { path: path.to_path_buf(), line, column, field: field.map(str::to_owned), message }
}

fn ron_error(path: &Path, e: &ron::error::SpannedError) -> ReviewError {
    use ron::error::Error as E;
    let pos = e.span.start;
    let (field, message) = match &e.code {
        E::MissingStructField { field, outer } => {
            (Some(*field), format!("missing field `{field}`{}", within(outer.as_deref())))
        }
        E::NoSuchStructField { expected, found, outer } => (
            Some(found.as_str()),
            format!("unknown field `{found}`{} (expected one of: {})", within(outer.as_deref()), expected.join(", ")),
        ),
        E::DuplicateStructField { field, outer } => {
            (Some(*field), format!("field `{field}` given twice{}", within(outer.as_deref())))
        }
        E::Eof => (None, "the file ends early (cut short?)".to_owned()),
        // The likeliest hand edits, said in the file's own terms rather than RON's.
        E::ExpectedOption => {
            (None, "expected an optional value: write `Some(460.0)` for a value, `None` for none".to_owned())
        }
        E::ExpectedIdentifier => (
            None,
            "expected a word without quotes here (a stage is draft, checked or final; an origin auto, moved or \
             placed)"
                .to_owned(),
        ),
        // The first pass reads the version alone, into a struct of our own: name the review, not that struct.
        other => (None, other.to_string().replace("struct `VersionOnly`", "the review")),
    };
    parse_error(path, pos.line, pos.col, field, message)
}

/// Names the part of the file a Rust struct stands for.
fn within(outer: Option<&str>) -> String {
    let part = match outer {
        None => return String::new(),
        Some("Review" | "ReviewV1") => "the review",
        Some("RecordingIdentity") => "`recording`",
        Some("Mark") => "a `marks` entry",
        Some("Measurement") => "a `measurements` entry",
        Some("Change") => "a `history` entry",
        Some("Caliper") => "a `calipers` entry",
        Some(other) => other,
    };
    format!(" in {part}")
}

fn line_col(prefix: &[u8]) -> (usize, usize) {
    let line = 1 + prefix.iter().filter(|&&b| b == b'\n').count();
    let col = 1 + prefix.iter().rev().take_while(|&&b| b != b'\n').count();
    (line, col)
}
