//! Readers and writers of recording formats, one file per format.
//!
//! Every reader validates sizes against the real file length before allocating, and its errors name the file
//! and the field or byte offset at fault.

use std::fmt;
use std::path::{Path, PathBuf};

use thiserror::Error;

use crate::recording::Recording;

pub mod atomic;
pub mod csv;
pub mod edf;
pub mod wfdb;
pub mod wfdb_annotations;

/// Most samples (all leads together) a reader will hold in memory: 1.5 × 10⁹ samples = 6 GB of f32.
pub const MAX_TOTAL_SAMPLES: u64 = 1_500_000_000;

/// A reading or writing failure. Every variant names the file.
#[derive(Debug, Error)]
#[non_exhaustive]
pub enum ReadError {
    /// The operating system refused (missing file, permission, …).
    #[error("{}: {cause}", path.display())]
    Io {
        /// File concerned.
        path: PathBuf,
        /// Underlying error (shown in the message, so not chained again as a source).
        cause: std::io::Error,
    },
    /// The content is malformed; `what` names the field or byte offset.
    #[error("{}: {what}", path.display())]
    Invalid {
        /// File concerned.
        path: PathBuf,
        /// What is wrong and where.
        what: String,
    },
    /// A valid but unsupported variant of the format.
    #[error("{}: not supported: {what}", path.display())]
    Unsupported {
        /// File concerned.
        path: PathBuf,
        /// Which feature.
        what: String,
    },
}

impl ReadError {
    /// A malformed-content error.
    pub fn invalid(path: &Path, what: impl Into<String>) -> Self {
        Self::Invalid { path: path.to_path_buf(), what: what.into() }
    }

    /// An unsupported-feature error.
    pub fn unsupported(path: &Path, what: impl Into<String>) -> Self {
        Self::Unsupported { path: path.to_path_buf(), what: what.into() }
    }

    /// An I/O error.
    pub fn io(path: &Path, source: std::io::Error) -> Self {
        Self::Io { path: path.to_path_buf(), cause: source }
    }
}

/// Recording formats Isoline reads.
#[derive(Debug, Clone, Copy, PartialEq, Eq, serde::Serialize, serde::Deserialize)]
pub enum Format {
    /// PhysioNet WFDB record (`.hea` + signal files).
    Wfdb,
    /// European Data Format.
    Edf,
    /// EDF+ (continuous).
    EdfPlus,
    /// Comma-separated values in mV.
    Csv,
}

impl Format {
    /// Short name as printed by `isoline info` (`wfdb`, `edf`, `edf+`, `csv`).
    #[must_use]
    pub fn as_str(self) -> &'static str {
        match self {
            Self::Wfdb => "wfdb",
            Self::Edf => "edf",
            Self::EdfPlus => "edf+",
            Self::Csv => "csv",
        }
    }
}

impl fmt::Display for Format {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        f.write_str(self.as_str())
    }
}

/// A recording read from a file, with what the reader noticed on the way.
#[derive(Debug, Clone)]
pub struct Opened {
    /// The recording.
    pub recording: Recording,
    /// Which format it was read as.
    pub format: Format,
    /// Files read (header and signal files), for identity and messages.
    pub files: Vec<PathBuf>,
    /// Things the reader accepted but the user should know (e.g. a signal file shorter than its header says).
    pub warnings: Vec<String>,
}

/// Options for opening a file.
#[derive(Debug, Clone, Default)]
pub struct OpenOptions {
    /// Sampling rate for CSV files that have no `time_s` column.
    pub csv_rate_hz: Option<f64>,
}

/// Opens a recording, choosing the reader from the file name: `.hea` (or a WFDB record path without
/// extension), `.edf`, `.csv`.
///
/// # Errors
/// [`ReadError`] naming the file and the problem.
pub fn open(path: &Path, options: &OpenOptions) -> Result<Opened, ReadError> {
    let mut opened = open_as_written(path, options)?;
    let renamed = opened.recording.name_leads_uniquely();
    let notes = renamed.into_iter().chain(opened.recording.signal_notes());
    opened.warnings.extend(notes.map(|r| format!("{}: {r}", path.display())));
    Ok(opened)
}

/// [`open`] with the leads named as the file names them.
fn open_as_written(path: &Path, options: &OpenOptions) -> Result<Opened, ReadError> {
    let ext = path.extension().and_then(|e| e.to_str()).map(str::to_ascii_lowercase);
    match ext.as_deref() {
        Some("hea") => wfdb::read_record(path),
        Some("edf") | Some("bdf") => edf::read(path),
        Some("csv") | Some("txt") => csv::read(path, options.csv_rate_hz),
        _ if wfdb::header_path(path).is_some() => wfdb::read_record(path),
        // Neither the file nor a WFDB header of that name: say so rather than guess at its type.
        _ if !path.exists() => Err(ReadError::io(
            path,
            std::io::Error::new(std::io::ErrorKind::NotFound, "file does not exist (nor a .hea record of that name)"),
        )),
        Some("dat") => Err(ReadError::unsupported(path, "open the record's .hea header, not its .dat signal file")),
        _ if path.is_dir() => {
            Err(ReadError::unsupported(path, "a folder, not a recording (give a .hea, .edf or .csv file)"))
        }
        _ => Err(ReadError::unsupported(path, "unknown file type (expected .hea, .edf or .csv)")),
    }
}

/// Whether a signal's name names an ECG signal (`ECG …`, `EKG …`, a standard lead name, or MIT-style `MLII`).
/// Readers whose files mix ECG with other signals (a pulse wave `PLETH`, respiration `RESP`) take the ECG ones
/// as leads where any is so named.
#[must_use]
pub(crate) fn is_ecg_label(label: &str) -> bool {
    let upper = label.to_ascii_uppercase();
    upper.contains("ECG")
        || upper.contains("EKG")
        || crate::recording::StandardLead::parse(label).is_some()
        || upper.starts_with("ML")
}

/// Longest quote from a file in a message, characters as printed: a line of binary data quoted whole made a
/// message of a thousand characters.
const QUOTE_MAX: usize = 60;

/// Text quoted from a file, made safe to print in a message: printable ASCII stays as it is, anything else
/// (control bytes, non-ASCII) becomes a Rust-style escape (`\n`, `\u{d8}`); more than `QUOTE_MAX` characters
/// so printed are cut with `...`.
#[must_use]
pub fn printable(s: &str) -> String {
    let mut out = String::new();
    for c in s.chars() {
        let piece = if matches!(c, ' '..='~') { c.to_string() } else { c.escape_default().to_string() };
        if out.chars().count() + piece.chars().count() > QUOTE_MAX {
            out.push_str("...");
            break;
        }
        out.push_str(&piece);
    }
    out
}

/// Opens a file for reading, refusing anything but a regular file (or a link to one): opening a named pipe
/// waits for a writer that may never come, and a folder or device is no recording.
///
/// # Errors
/// [`ReadError::Io`] naming `path`.
pub(crate) fn open_file(path: &Path) -> Result<std::fs::File, ReadError> {
    let meta = std::fs::metadata(path).map_err(|e| ReadError::io(path, e))?;
    if !meta.is_file() {
        let what = if meta.is_dir() { "a folder" } else { "not a regular file (a pipe, socket or device)" };
        return Err(ReadError::io(path, std::io::Error::new(std::io::ErrorKind::InvalidInput, format!("is {what}"))));
    }
    std::fs::File::open(path).map_err(|e| ReadError::io(path, e))
}

/// Reads a whole regular file (see [`open_file`]), mapping the error to [`ReadError::Io`].
pub(crate) fn read_bytes(path: &Path) -> Result<Vec<u8>, ReadError> {
    use std::io::Read;
    let mut bytes = Vec::new();
    open_file(path)?.read_to_end(&mut bytes).map_err(|e| ReadError::io(path, e))?;
    Ok(bytes)
}

/// Writes a file atomically through [`atomic::write_with`] (temporary file, sync, rename, sync the folder). On
/// any error the temporary file is removed and `path` is left as it was.
///
/// # Errors
/// [`ReadError::Io`] naming `path`.
pub fn write_atomic(
    path: &Path,
    fill: impl FnOnce(&mut std::io::BufWriter<std::fs::File>) -> std::io::Result<()>,
) -> Result<(), ReadError> {
    atomic::write_with(path, fill).map_err(|e| ReadError::io(path, e))
}

/// Length of a file in bytes.
pub(crate) fn file_len(path: &Path) -> Result<u64, ReadError> {
    std::fs::metadata(path).map(|m| m.len()).map_err(|e| ReadError::io(path, e))
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    #[cfg(unix)]
    fn a_pipe_or_folder_is_refused_without_waiting() -> Result<(), Box<dyn std::error::Error>> {
        // Before, a named pipe called *.csv or *.hea was opened and read, waiting for a writer that never came.
        let dir = tempfile::tempdir()?;
        for name in ["pipe.csv", "pipe.hea", "pipe.edf"] {
            let fifo = dir.path().join(name);
            let made = std::process::Command::new("mkfifo").arg(&fifo).status()?;
            assert!(made.success(), "mkfifo {name}");
            let err = open(&fifo, &OpenOptions::default()).err().map(|e| e.to_string()).unwrap_or_default();
            assert!(err.contains("not a regular file") && err.contains(name), "{err}");
        }
        let folder = dir.path().join("folder.csv");
        std::fs::create_dir(&folder)?;
        let err = open(&folder, &OpenOptions::default()).err().map(|e| e.to_string()).unwrap_or_default();
        assert!(err.contains("is a folder"), "{err}");
        Ok(())
    }

    #[test]
    fn missing_path_without_extension_is_not_found() -> std::io::Result<()> {
        let dir = tempfile::tempdir()?;
        let path = dir.path().join("nosuchrecord");
        let err = open(&path, &OpenOptions::default()).err();
        assert!(
            matches!(&err, Some(ReadError::Io { path: p, cause }) if p == &path && cause.kind() == std::io::ErrorKind::NotFound),
            "{err:?}"
        );
        let msg = err.map(|e| e.to_string()).unwrap_or_default();
        assert!(msg.starts_with(&path.display().to_string()) && msg.contains("does not exist"), "{msg}");
        // An existing file of an unknown type is still named as such.
        let other = dir.path().join("notes.xyz");
        std::fs::write(&other, "x")?;
        let msg = open(&other, &OpenOptions::default()).err().map(|e| e.to_string()).unwrap_or_default();
        assert!(msg.contains("unknown file type"), "{msg}");
        // A folder is said to be one (before: "unknown file type").
        let msg = open(dir.path(), &OpenOptions::default()).err().map(|e| e.to_string()).unwrap_or_default();
        assert!(msg.contains("a folder, not a recording"), "{msg}");
        Ok(())
    }

    #[test]
    fn quoted_header_bytes_are_printable_ascii() -> std::io::Result<()> {
        assert_eq!(printable("ECG II"), "ECG II");
        assert_eq!(printable("\"\u{d8}\n\u{7}"), "\"\\u{d8}\\n\\u{7}");
        // A long quote is cut: a line of binary data quoted whole made a message of a thousand characters.
        let long = printable(&"\u{fffd}".repeat(500));
        assert!(long.len() <= 70 && long.ends_with("..."), "{long}");
        // A binary file named .hea is said to be one, not taken for a multi-segment record.
        let dir = tempfile::tempdir()?;
        let hea = dir.path().join("1.hea");
        std::fs::write(&hea, [0x8Fu8, 0x2F, 0x00, 0x7C, 0xFF, 0x0A, 0x01])?;
        let msg = open(&hea, &OpenOptions::default()).err().map(|e| e.to_string()).unwrap_or_default();
        assert!(msg.contains("not a WFDB header") && msg.len() < 200, "{msg}");
        // A file of random bytes named .edf: the version field quoted in the message starts with `"ØÍÃA`.
        let dir = tempfile::tempdir()?;
        let path = dir.path().join("random.edf");
        let mut bytes = vec![0x22, 0xD8, 0xCD, 0xC3, 0x41, 0x07, 0x00, 0x1B];
        let mut x: u32 = 0x2545_F491;
        for _ in 0..1024 {
            x ^= x << 13;
            x ^= x >> 17;
            x ^= x << 5;
            bytes.push(x.to_le_bytes()[0]);
        }
        std::fs::write(&path, &bytes)?;
        let msg = open(&path, &OpenOptions::default()).err().map(|e| e.to_string()).unwrap_or_default();
        assert!(msg.contains("version"), "{msg}");
        assert!(msg.chars().all(|c| matches!(c, ' '..='~')), "{msg}");
        assert!(msg.contains("\\u{d8}"), "{msg}");
        Ok(())
    }
}
