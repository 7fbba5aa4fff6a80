//! Saving reviews without ever leaving a half-written file: write a temporary file in the same folder, sync
//! it, rename it over the review (an atomic replace on the same file system), sync the folder. The previous
//! version is kept as `NAME.review.ron.bak` (written the same way); work in progress goes to the sidecar
//! `NAME.review.ron.autosave`, which [`recover`] offers after a crash.

use std::ffi::OsString;
use std::fs::{self, OpenOptions};
use std::io::Write;
use std::path::{Path, PathBuf};

use ron::ser::PrettyConfig;

use super::ReviewError;
use super::load::load;
use super::model::{FORMAT_VERSION, Review};
use crate::io::atomic;

/// `NAME.review.ron.bak`: the version before the last save.
#[must_use]
pub fn backup_path(path: &Path) -> PathBuf {
    with_suffix(path, ".bak")
}

/// `NAME.review.ron.autosave`: the sidecar holding unsaved work.
#[must_use]
pub fn autosave_path(path: &Path) -> PathBuf {
    with_suffix(path, ".autosave")
}

fn with_suffix(path: &Path, suffix: &str) -> PathBuf {
    let mut s: OsString = path.as_os_str().to_owned();
    s.push(suffix);
    PathBuf::from(s)
}

fn io_err(path: &Path) -> impl FnOnce(std::io::Error) -> ReviewError + '_ {
    move |source| ReviewError::Io { path: path.to_path_buf(), cause: source }
}

impl Review {
    /// The review as RON text in the current format version.
    ///
    /// # Errors
    /// [`ReviewError::Encode`] when serialisation fails (it does not for a well-formed review);
    /// [`ReviewError::Implausible`] for a reader name holding a control character, which loading would refuse.
    pub fn to_ron(&self) -> Result<String, ReviewError> {
        let names = std::iter::once(&self.reader).chain(self.history.iter().map(|c| &c.by));
        if let Some((n, why)) = names.into_iter().find_map(|n| Some((n, super::reader_name_problem(n)?))) {
            return Err(ReviewError::Implausible { what: format!("reader {n:?}"), why: why.to_owned() });
        }
        let mut current = self.clone();
        current.format_version = FORMAT_VERSION;
        let config = PrettyConfig::new().struct_names(false).indentor("  ".to_owned());
        let mut text = ron::ser::to_string_pretty(&current, config).map_err(|e| ReviewError::Encode(e.to_string()))?;
        text.push('\n');
        Ok(text)
    }

    /// Saves atomically to `path`. The file there before (if any) becomes `path.bak`; the autosave sidecar,
    /// now stale, is removed. On any failure the file at `path` is left as it was.
    ///
    /// # Errors
    /// [`ReviewError::Io`] naming the file that could not be written.
    pub fn save(&self, path: &Path) -> Result<(), ReviewError> {
        let text = self.to_ron()?;
        self.backup_previous(path)?;
        write_atomic(path, text.as_bytes(), None)?;
        match fs::remove_file(autosave_path(path)) {
            Ok(()) => Ok(()),
            Err(e) if e.kind() == std::io::ErrorKind::NotFound => Ok(()),
            Err(e) => Err(io_err(&autosave_path(path))(e)),
        }
    }

    /// Writes the autosave sidecar of the review file `path` (atomically too); the review file is untouched.
    ///
    /// # Errors
    /// [`ReviewError::Io`] naming the sidecar.
    pub fn autosave(&self, path: &Path) -> Result<(), ReviewError> {
        let sidecar = autosave_path(path);
        atomic::replace_bytes(&sidecar, self.to_ron()?.as_bytes()).map_err(io_err(&sidecar))?;
        remove_stale_temps(&atomic::folder(&sidecar), &atomic::temp_prefix(&sidecar));
        Ok(())
    }

    /// Test hook: runs [`Review::save`] up to a crash after `at_byte` bytes of the new text reached the
    /// temporary file (the backup step done, no sync, no rename) and returns the temporary file left behind,
    /// as a killed process would leave it.
    ///
    /// # Errors
    /// As [`Review::save`].
    #[doc(hidden)]
    pub fn save_interrupted(&self, path: &Path, at_byte: usize) -> Result<PathBuf, ReviewError> {
        let text = self.to_ron()?;
        self.backup_previous(path)?;
        write_atomic(path, text.as_bytes(), Some(at_byte))?
            .ok_or_else(|| ReviewError::Encode("interruption point past the end of the text".to_owned()))
    }

    fn backup_previous(&self, path: &Path) -> Result<(), ReviewError> {
        match fs::read(path) {
            // The backup replaces whatever lies under its name, a link included (never written through).
            Ok(previous) => {
                let bak = backup_path(path);
                atomic::replace_bytes(&bak, &previous).map_err(io_err(&bak))
            }
            Err(e) if e.kind() == std::io::ErrorKind::NotFound => Ok(()),
            Err(e) => Err(io_err(path)(e)),
        }
    }
}

/// The autosaved review of `path` when its sidecar exists, loads, and is newer than the review file (by
/// modification time, or by the review's own `modified` stamp when the file times are equal); or when the
/// review file is missing or unreadable. `None` otherwise: nothing to offer.
#[must_use]
pub fn recover(path: &Path) -> Option<Review> {
    let sidecar = autosave_path(path);
    let auto = load(&sidecar).ok()?;
    let Ok(saved) = load(path) else { return Some(auto) };
    let mtime = |p: &Path| fs::metadata(p).and_then(|m| m.modified()).ok();
    let newer = match (mtime(&sidecar), mtime(path)) {
        (Some(a), Some(b)) if a != b => a > b,
        _ => auto.modified > saved.modified,
    };
    newer.then_some(auto)
}

/// Removes the autosave sidecar of `path` (the reader declined recovery). Missing is fine.
///
/// # Errors
/// [`ReviewError::Io`] when it exists and cannot be removed.
pub fn discard_autosave(path: &Path) -> Result<(), ReviewError> {
    let sidecar = autosave_path(path);
    match fs::remove_file(&sidecar) {
        Ok(()) => Ok(()),
        Err(e) if e.kind() == std::io::ErrorKind::NotFound => Ok(()),
        Err(e) => Err(io_err(&sidecar)(e)),
    }
}

/// Writes `bytes` to `path` atomically ([`crate::io::atomic::write_bytes`]), then removes temporary files an
/// earlier crashed save of the same file left behind. With `interrupt_at = Some(n)` it only writes the first
/// `n` bytes to a temporary file and returns it (a simulated crash); otherwise `None`.
fn write_atomic(path: &Path, bytes: &[u8], interrupt_at: Option<usize>) -> Result<Option<PathBuf>, ReviewError> {
    // Temporary files lie beside the file the write replaces (a link's target, not the link).
    let landing = atomic::landing(path).map_err(io_err(path))?;
    let target = match &landing {
        atomic::Landing::Replace(p) | atomic::Landing::Through(p) => p.clone(),
    };
    if let Some(at) = interrupt_at.filter(|&at| at < bytes.len()) {
        let tmp = atomic::temp_path(&target);
        let mut file = OpenOptions::new().write(true).create_new(true).open(&tmp).map_err(io_err(&tmp))?;
        file.write_all(&bytes[..at]).map_err(io_err(&tmp))?;
        return Ok(Some(tmp));
    }
    atomic::write_to(landing, |w| w.write_all(bytes)).map_err(io_err(path))?;
    remove_stale_temps(&atomic::folder(&target), &atomic::temp_prefix(&target));
    Ok(None)
}

/// Removes temporary files an earlier crashed save of the same file left behind.
fn remove_stale_temps(dir: &Path, prefix: &str) {
    let Ok(entries) = fs::read_dir(dir) else { return };
    for entry in entries.flatten() {
        if entry.file_name().to_string_lossy().starts_with(prefix) {
            let _ = fs::remove_file(entry.path());
        }
    }
}
