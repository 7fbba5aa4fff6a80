//! Which recording a review belongs to: its file name, where it lies relative to the review, and the
//! SHA-256 of its signal content, so that a review is never applied to another recording by mistake.

use std::io::{Read, Seek, SeekFrom};
use std::path::{Component, Path, PathBuf};

use serde::{Deserialize, Serialize};
use sha2::{Digest, Sha256};

use crate::io::{ReadError, wfdb};
use crate::recording::Recording;

/// The identity of a recording as a review stores it.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct RecordingIdentity {
    /// File name of the recording as opened (`sel100.hea`, `night.edf`).
    pub file_name: String,
    /// Path of the recording relative to the review file's folder, `/`-separated (absolute when the two
    /// share no root).
    pub relative_path: String,
    /// SHA-256 of the signal content, lowercase hex (see [`signal_sha256`]).
    pub sha256: String,
    /// Lead names in recording order.
    pub leads: Vec<String>,
    /// Sampling rate, Hz.
    pub sample_rate_hz: f64,
}

#[cfg(test)]
impl RecordingIdentity {
    /// An invented one-lead recording's identity for unit tests (ward 7, bed 2 of our demo ward).
    pub(crate) fn example() -> Self {
        Self {
            file_name: "ward7-bed2.csv".into(),
            relative_path: "ward7-bed2.csv".into(),
            sha256: "0".repeat(64),
            leads: vec!["II".into()],
            sample_rate_hz: 500.0,
        }
    }
}

impl RecordingIdentity {
    /// The identity of an opened recording (`recording_path` as given to [`crate::io::open`]) for a review that
    /// will be saved at `review_path`.
    ///
    /// # Errors
    /// [`ReadError`] when the signal files cannot be read.
    pub fn of(recording_path: &Path, recording: &Recording, review_path: &Path) -> Result<Self, ReadError> {
        let sha256 = signal_sha256(recording_path)?;
        let file_name = recording_path.file_name().map(|n| n.to_string_lossy().into_owned()).unwrap_or_default();
        Ok(Self {
            file_name,
            relative_path: relative_to_review(recording_path, review_path),
            sha256,
            leads: recording.leads.iter().map(|l| l.name.to_string()).collect(),
            sample_rate_hz: recording.sample_rate.hz(),
        })
    }

    /// Whether signal content with SHA-256 `found` (hex, as [`signal_sha256`] gives it) is this recording's:
    /// the hex compared without regard to case, as a review file written by hand may spell it in capitals.
    #[must_use]
    pub fn is_signal(&self, found: &str) -> bool {
        self.sha256.eq_ignore_ascii_case(found)
    }

    /// How the opened `recording` differs from this identity in what the signal hash does not cover (the header:
    /// sampling rate and lead names), said for a person; `None` when it does not. The review's marks are sample
    /// indices and its calipers lead names, so a review of the same samples under another rate or other leads
    /// would put them in the wrong place.
    #[must_use]
    pub fn differs_from(&self, recording: &Recording) -> Option<String> {
        let fs = recording.sample_rate.hz();
        let leads: Vec<String> = recording.leads.iter().map(|l| l.name.to_string()).collect();
        let mut what = Vec::new();
        if (fs - self.sample_rate_hz).abs() > 1e-9 * self.sample_rate_hz.abs().max(1.0) {
            what.push(format!("sampled at {fs} Hz, the review's at {} Hz", self.sample_rate_hz));
        }
        if leads != self.leads {
            what.push(format!("leads {}, the review's {}", leads.join(" "), self.leads.join(" ")));
        }
        (!what.is_empty()).then(|| format!("the recording's header differs from the review's: {}", what.join("; ")))
    }

    /// Where the recording is expected, resolving [`Self::relative_path`] against the review file's folder.
    #[must_use]
    pub fn recording_path(&self, review_path: &Path) -> PathBuf {
        let rel = Path::new(&self.relative_path);
        if rel.is_absolute() {
            return rel.to_path_buf();
        }
        review_path.parent().unwrap_or(Path::new("")).join(rel)
    }
}

/// SHA-256 (lowercase hex) of a recording's signal content, hashed in file order:
/// - WFDB (`.hea` or record path without extension): the signal (`.dat`) files named by the header, each once,
///   in the order the header first names them (not the header, whose comments may be edited);
/// - EDF / EDF+ / BDF: the data records, i.e. the bytes after the header (its length is the header field at
///   bytes 184–191);
/// - anything else (CSV): the whole file.
///
/// # Errors
/// [`ReadError`] naming the file that cannot be read or whose header is malformed.
pub fn signal_sha256(recording_path: &Path) -> Result<String, ReadError> {
    let ext = recording_path.extension().and_then(|e| e.to_str()).map(str::to_ascii_lowercase);
    let mut hasher = Sha256::new();
    match ext.as_deref() {
        Some("edf") | Some("bdf") => {
            let offset = edf_header_len(recording_path)?;
            hash_file(&mut hasher, recording_path, offset)?;
        }
        Some("csv") | Some("txt") => hash_file(&mut hasher, recording_path, 0)?,
        _ => match wfdb::header_path(recording_path) {
            Some(hea) => {
                for dat in wfdb_signal_files(&hea)? {
                    hash_file(&mut hasher, &dat, 0)?;
                }
            }
            None => hash_file(&mut hasher, recording_path, 0)?,
        },
    }
    Ok(hex(&hasher.finalize()))
}

fn wfdb_signal_files(hea: &Path) -> Result<Vec<PathBuf>, ReadError> {
    let len = std::fs::metadata(hea).map_err(|e| ReadError::io(hea, e))?.len();
    if len > 1 << 20 {
        return Err(ReadError::invalid(hea, format!("header is {len} bytes, more than 1 MiB")));
    }
    let bytes = crate::io::read_bytes(hea)?;
    let header = wfdb::parse_header(hea, &String::from_utf8_lossy(&bytes))?;
    let dir = hea.parent().unwrap_or(Path::new(""));
    let mut files: Vec<PathBuf> = Vec::new();
    for s in &header.signals {
        let p = dir.join(&s.file);
        if !files.contains(&p) {
            files.push(p);
        }
    }
    if files.is_empty() {
        return Err(ReadError::invalid(hea, "record has no signal files"));
    }
    Ok(files)
}

/// Length of an EDF header: the ASCII number of bytes at offset 184 (8 bytes). Source: Kemp et al. 1992,
/// Electroencephalogr Clin Neurophysiol 82:391-393 (EDF header layout). From memory.
fn edf_header_len(path: &Path) -> Result<u64, ReadError> {
    let mut f = crate::io::open_file(path)?;
    let mut head = [0u8; 192];
    f.read_exact(&mut head).map_err(|_| ReadError::invalid(path, "shorter than an EDF header (192 bytes)"))?;
    let field = String::from_utf8_lossy(&head[184..192]);
    let n: u64 = field.trim().parse().map_err(|_| {
        ReadError::invalid(path, format!("header byte count (offset 184) {:?} is not a number", field.trim()))
    })?;
    let file_len = f.metadata().map_err(|e| ReadError::io(path, e))?.len();
    if n < 256 || n > file_len {
        return Err(ReadError::invalid(
            path,
            format!("header byte count (offset 184) {n} does not fit the file ({file_len} bytes)"),
        ));
    }
    Ok(n)
}

fn hash_file(hasher: &mut Sha256, path: &Path, offset: u64) -> Result<(), ReadError> {
    let mut f = crate::io::open_file(path)?;
    f.seek(SeekFrom::Start(offset)).map_err(|e| ReadError::io(path, e))?;
    let mut buf = vec![0u8; 1 << 16];
    loop {
        let n = f.read(&mut buf).map_err(|e| ReadError::io(path, e))?;
        if n == 0 {
            return Ok(());
        }
        hasher.update(&buf[..n]);
    }
}

fn hex(bytes: &[u8]) -> String {
    bytes.iter().map(|b| format!("{b:02x}")).collect()
}

/// Path of `target` relative to the folder of `review_path`, `/`-separated; the absolute path of `target`
/// when the two share no root or cannot be resolved.
#[must_use]
pub fn relative_to_review(target: &Path, review_path: &Path) -> String {
    let abs = |p: &Path| -> Option<PathBuf> {
        if let Ok(c) = p.canonicalize() {
            return Some(c);
        }
        // The file may not exist yet (a review about to be written): resolve its folder.
        let name = p.file_name()?;
        let dir = match p.parent() {
            Some(d) if !d.as_os_str().is_empty() => d.canonicalize().ok()?,
            _ => std::env::current_dir().ok()?.canonicalize().ok()?,
        };
        Some(dir.join(name))
    };
    let (Some(t), Some(r)) = (abs(target), abs(review_path)) else {
        return target.to_string_lossy().replace('\\', "/");
    };
    let Some(from) = r.parent() else { return t.to_string_lossy().into_owned() };
    let a: Vec<Component> = from.components().collect();
    let b: Vec<Component> = t.components().collect();
    if a.first() != b.first() {
        return t.to_string_lossy().into_owned();
    }
    let common = a.iter().zip(&b).take_while(|(x, y)| x == y).count();
    let mut parts: Vec<String> = vec!["..".to_owned(); a.len() - common];
    parts.extend(b[common..].iter().map(|c| c.as_os_str().to_string_lossy().into_owned()));
    parts.join("/")
}

#[cfg(test)]
#[allow(clippy::unwrap_used)] // a test fails by panicking
mod tests {
    use super::*;

    #[test]
    fn sha256_of_known_text() {
        // Source: FIPS 180-2, appendix B.1 (SHA-256 of "abc").
        let mut h = Sha256::new();
        h.update(b"abc");
        assert_eq!(hex(&h.finalize()), "ba7816bf8f01cfea414140de5dae2223b00361a396177a9cb410ff61f20015ad");
    }

    #[test]
    fn a_signal_hash_matches_in_either_case() {
        // Before, the workstation compared the hex exactly and called a review whose hash was written in capitals
        // "made for a different recording", while `load_for` accepted it.
        let id = RecordingIdentity { sha256: "ab".repeat(32), ..RecordingIdentity::example() };
        assert!(id.is_signal(&"AB".repeat(32)) && id.is_signal(&"ab".repeat(32)));
        assert!(!id.is_signal(&"0".repeat(64)));
    }

    #[test]
    fn relative_path_between_folders() {
        let dir = tempfile::tempdir().unwrap();
        let rec_dir = dir.path().join("data/qtdb");
        let rev_dir = dir.path().join("reviews/a");
        std::fs::create_dir_all(&rec_dir).unwrap();
        std::fs::create_dir_all(&rev_dir).unwrap();
        let rec = rec_dir.join("sel100.hea");
        std::fs::write(&rec, b"x").unwrap();
        assert_eq!(relative_to_review(&rec, &rev_dir.join("sel100.review.ron")), "../../data/qtdb/sel100.hea");
        assert_eq!(relative_to_review(&rec, &rec_dir.join("sel100.review.ron")), "sel100.hea");
    }
}
