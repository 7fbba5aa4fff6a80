//! Reviews: the reader's work on one recording — calipers, marks, measurements with their origin, the
//! summary, the stage and the change history — saved as RON (`NAME.review.ron` beside the recording).
//!
//! - [`model`]: the [`Review`] and its parts; every change goes through a method that records it and refuses
//!   while the review is `final`.
//! - [`save`]: atomic save (temporary file, sync, rename) with a `.bak` of the previous version, autosave
//!   sidecar and [`recover`].
//! - [`load()`]: reading any known `format_version` (older ones migrate), errors naming file, line, column and
//!   field, and [`load_for`] which refuses a review of another recording.
//! - [`identity`]: SHA-256 of a recording's signal content.
//! - [`agreement`]: per-measurement differences between readers and Bland–Altman limits of agreement.
//!
//! ```
//! use isoline_core::review::{Review, RecordingIdentity, Stage, ReviewError};
//! let id = RecordingIdentity {
//!     file_name: "ward7-bed2.csv".into(), relative_path: "ward7-bed2.csv".into(),
//!     sha256: "0".repeat(64), leads: vec!["II".into()], sample_rate_hz: 500.0,
//! };
//! let mut r = Review::new(id, "AB");
//! r.set_measurement("qt_ms", 402.0, "AB").unwrap();
//! r.set_stage(Stage::Final, "AB").unwrap();
//! assert!(matches!(r.set_measurement("qt_ms", 410.0, "AB"), Err(ReviewError::Final)));
//! r.reopen("CD").unwrap();
//! assert_eq!(r.history.len(), 3);
//! ```

use std::path::PathBuf;

use thiserror::Error;

pub mod agreement;
pub mod automatic;
mod consistency;
mod derived;
mod edit;
pub mod history;
pub mod identity;
pub mod load;
pub mod model;
pub mod save;
mod v1;

pub use derived::QTC_INPUT_KEYS;
pub use history::{Change, Timestamp};
pub use identity::{RecordingIdentity, signal_sha256};
pub use load::{load, load_for};
pub use model::{FORMAT_VERSION, Mark, MarkOn, Measurement, Origin, Review, Stage};
pub use save::{autosave_path, backup_path, discard_autosave, recover};

/// Why a reader's name cannot be recorded, or `None` when it can. Names are printed in every history line, in
/// tables and on pages: a control character (a line break, a tab, a terminal escape code) would break a line or
/// be replayed raw by a terminal (a hand-edited escape sequence was, by `agreement`). Checked where a name is
/// given (`review new`, the workstation's reader window), saved and loaded.
///
/// ```
/// use isoline_core::review::reader_name_problem;
/// assert_eq!(reader_name_problem("Dr Ó Briain (AB)"), None);
/// assert!(reader_name_problem("AB\tCD").is_some());
/// assert!(reader_name_problem("AB\u{1b}[2J").is_some());
/// assert!(reader_name_problem(" ").is_some());
/// ```
#[must_use]
pub fn reader_name_problem(name: &str) -> Option<&'static str> {
    // A review must say who read it: an empty name printed a table heading "−CD" in `agreement`.
    if name.trim().is_empty() {
        return Some("is empty (give the reader's name or initials)");
    }
    name.chars().any(char::is_control).then_some("holds a control character (a line break, a tab or an escape code)")
}

/// Suffix of review files.
pub const REVIEW_SUFFIX: &str = ".review.ron";

/// `NAME.review.ron` beside the recording, `NAME` being its file name without the extension (`sel100.hea` and
/// `sel100` both give `sel100.review.ron`; a path with no file name gives `recording.review.ron`).
#[must_use]
pub fn default_review_path(recording: &std::path::Path) -> PathBuf {
    let stem = recording.file_stem().map_or_else(|| "recording".into(), |s| s.to_string_lossy().into_owned());
    recording.with_file_name(format!("{stem}{REVIEW_SUFFIX}"))
}

/// What can go wrong with a review. Variants about a file name it.
#[derive(Debug, Error)]
#[non_exhaustive]
pub enum ReviewError {
    /// The operating system refused (missing file, permission, disk full, …).
    #[error("{}: {cause}", path.display())]
    Io {
        /// File concerned.
        path: PathBuf,
        /// Underlying error (shown in the message, so not chained again as a source: it was printed twice).
        cause: std::io::Error,
    },
    /// The file is not a readable review: bad RON, an unknown or missing field, a wrong value.
    #[error("{}:{line}:{column}: {message}", path.display())]
    Parse {
        /// File concerned.
        path: PathBuf,
        /// Line (1-based) where the problem was found.
        line: usize,
        /// Column (1-based).
        column: usize,
        /// The field at fault when known.
        field: Option<String>,
        /// What is wrong.
        message: String,
    },
    /// The file's `format_version` is not one this program reads.
    #[error("{}: format_version {found} is not supported (this Isoline reads 1 to {FORMAT_VERSION})", path.display())]
    UnsupportedVersion {
        /// File concerned.
        path: PathBuf,
        /// Version found in the file.
        found: u64,
    },
    /// The review belongs to another recording: the signal content's SHA-256 differs.
    #[error(
        "the review belongs to another recording: signal SHA-256 {found} differs from {expected} stored in the review"
    )]
    RecordingMismatch {
        /// SHA-256 stored in the review.
        expected: String,
        /// SHA-256 of the recording at hand.
        found: String,
    },
    /// The recording could not be read to check its identity.
    #[error(transparent)]
    Recording(#[from] crate::io::ReadError),
    /// The review is `final` and read-only; reopen it first.
    #[error("the review is final (read-only); reopen it to make changes")]
    Final,
    /// Only a `final` review can be reopened.
    #[error("the review is {0}, not final: nothing to reopen")]
    NotFinal(Stage),
    /// No measurement with this key.
    #[error("no measurement {0:?} in the review")]
    UnknownMeasurement(String),
    /// No such mark.
    #[error("no mark {0} in the review")]
    UnknownMark(String),
    /// No caliper with this id.
    #[error("no caliper {0} in the review")]
    UnknownCaliper(u32),
    /// A value that is NaN or infinite.
    #[error("{what}: value must be a finite number")]
    NotFinite {
        /// Which value.
        what: String,
    },
    /// A value no ECG shows (see [`crate::measure::plausible_range`]): a typing slip.
    #[error("{what}: {why}")]
    Implausible {
        /// Which value.
        what: String,
        /// Why, with the bounds.
        why: String,
    },
    /// The review could not be written as RON.
    #[error("cannot write the review: {0}")]
    Encode(String),
}
