//! Atomic file writes, the one way Isoline replaces a file (recordings, reviews, PNG pages): write a temporary
//! file in the same folder, sync it, rename it over the target (an atomic replace on one file system), then
//! sync the folder so the rename survives a power cut.

use std::fs::{File, OpenOptions};
use std::io::{self, BufWriter, Write};
use std::path::{Path, PathBuf};
use std::sync::atomic::{AtomicU64, Ordering};

static TEMP_COUNTER: AtomicU64 = AtomicU64::new(0);

/// `.NAME.tmp.` — the start of every temporary file name [`write_with`] uses for `path`, so a caller can find
/// and remove what a crashed write left behind.
#[must_use]
pub fn temp_prefix(path: &Path) -> String {
    let name = path.file_name().map_or_else(|| "file".into(), |n| n.to_string_lossy());
    format!(".{name}.tmp.")
}

/// A fresh temporary file name beside `path` (`.NAME.tmp.PID.N`, unique within this process).
#[must_use]
pub fn temp_path(path: &Path) -> PathBuf {
    let n = TEMP_COUNTER.fetch_add(1, Ordering::Relaxed);
    folder(path).join(format!("{}{}.{n}", temp_prefix(path), std::process::id()))
}

/// The folder holding `path` (`.` for a bare file name).
fn folder(path: &Path) -> PathBuf {
    match path.parent() {
        Some(d) if !d.as_os_str().is_empty() => d.to_path_buf(),
        _ => PathBuf::from("."),
    }
}

/// Writes `path` atomically: `fill` writes into a new temporary file beside it, which is synced and renamed
/// over `path`; then the folder is synced (best effort: not every platform can). On any error the temporary
/// file is removed and `path` is left as it was. A symbolic link is followed and the file it names replaced. A
/// path that is no regular file (a pipe, a terminal, a device) is written through as a shell's `>` would:
/// there is no file to replace, and renaming over it would put a file in its place.
///
/// # Errors
/// The first I/O error (creating, writing, syncing or renaming); the caller names the file. A folder is refused.
pub fn write_with(path: &Path, fill: impl FnOnce(&mut BufWriter<File>) -> io::Result<()>) -> io::Result<()> {
    if path.file_name().is_none() {
        return Err(io::Error::new(io::ErrorKind::InvalidInput, "not a file name"));
    }
    // What the path names, links followed: a regular file is replaced where it lies (the link, if any, kept).
    let real;
    let path = match std::fs::metadata(path) {
        Ok(m) if m.is_dir() => return Err(io::Error::new(io::ErrorKind::InvalidInput, "a folder, not a file")),
        Ok(m) if !m.is_file() => {
            let mut w = BufWriter::new(OpenOptions::new().write(true).open(path)?);
            fill(&mut w)?;
            return w.flush();
        }
        Ok(_) => {
            real = std::fs::canonicalize(path)?;
            real.as_path()
        }
        Err(_) => path,
    };
    let tmp = temp_path(path);
    let result = (|| {
        let file = OpenOptions::new().write(true).create_new(true).open(&tmp)?;
        let mut w = BufWriter::with_capacity(1 << 20, file);
        fill(&mut w)?;
        let file = w.into_inner().map_err(io::IntoInnerError::into_error)?;
        file.sync_all()?;
        drop(file);
        std::fs::rename(&tmp, path)
    })();
    if let Err(e) = result {
        let _ = std::fs::remove_file(&tmp);
        return Err(e);
    }
    if let Ok(d) = File::open(folder(path)) {
        let _ = d.sync_all();
    }
    Ok(())
}

/// [`write_with`] for bytes already in memory.
///
/// # Errors
/// As [`write_with`].
pub fn write_bytes(path: &Path, bytes: &[u8]) -> io::Result<()> {
    write_with(path, |w| w.write_all(bytes))
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn replaces_and_leaves_no_temp() -> Result<(), Box<dyn std::error::Error>> {
        let dir = tempfile::tempdir()?;
        let p = dir.path().join("page.png");
        write_bytes(&p, b"first")?;
        write_with(&p, |w| w.write_all(b"second"))?;
        assert_eq!(std::fs::read(&p)?, b"second");
        assert_eq!(std::fs::read_dir(dir.path())?.count(), 1);
        Ok(())
    }

    #[test]
    fn failed_fill_leaves_target_and_no_temp() -> Result<(), Box<dyn std::error::Error>> {
        let dir = tempfile::tempdir()?;
        let p = dir.path().join("r.csv");
        write_bytes(&p, b"kept")?;
        let failed = write_with(&p, |w| {
            w.write_all(b"half")?;
            Err(io::Error::other("disk full"))
        });
        assert!(failed.is_err());
        assert_eq!(std::fs::read(&p)?, b"kept");
        assert_eq!(std::fs::read_dir(dir.path())?.count(), 1);
        Ok(())
    }

    #[test]
    fn failed_rename_leaves_nothing() -> Result<(), Box<dyn std::error::Error>> {
        let dir = tempfile::tempdir()?;
        // The target is an existing non-empty folder: refused, and no temporary file is left.
        let target = dir.path().join("taken");
        std::fs::create_dir(&target)?;
        std::fs::write(target.join("keep"), b"x")?;
        assert!(write_bytes(&target, b"data").is_err());
        let names: Vec<_> = std::fs::read_dir(dir.path())?.filter_map(|e| e.ok()).map(|e| e.file_name()).collect();
        assert_eq!(names, vec![std::ffi::OsString::from("taken")]);
        // A missing folder: nothing is created.
        assert!(write_bytes(&dir.path().join("no/such/page.png"), b"data").is_err());
        assert!(!dir.path().join("no").exists());
        Ok(())
    }

    #[cfg(unix)]
    #[test]
    fn a_link_stays_a_link_and_a_pipe_stays_a_pipe() -> Result<(), Box<dyn std::error::Error>> {
        use std::os::unix::fs::FileTypeExt as _;
        let dir = tempfile::tempdir()?;
        // Writing to a symbolic link replaces the file it names; the link still names it.
        let file = dir.path().join("results.csv");
        std::fs::write(&file, b"old")?;
        let link = dir.path().join("latest.csv");
        std::os::unix::fs::symlink("results.csv", &link)?;
        write_bytes(&link, b"new")?;
        assert!(std::fs::symlink_metadata(&link)?.file_type().is_symlink());
        assert_eq!(std::fs::read(&file)?, b"new");
        // A named pipe is written through to its reader, not replaced by a file (skipped without mkfifo).
        let fifo = dir.path().join("pipe");
        if std::process::Command::new("mkfifo").arg(&fifo).status().is_ok_and(|s| s.success()) {
            let reader = std::thread::spawn({
                let fifo = fifo.clone();
                move || std::fs::read(fifo)
            });
            write_bytes(&fifo, b"through")?;
            assert_eq!(reader.join().map_err(|_| "reader panicked")??, b"through");
            assert!(std::fs::symlink_metadata(&fifo)?.file_type().is_fifo());
        }
        // A folder is refused.
        assert!(write_bytes(dir.path(), b"x").is_err());
        Ok(())
    }

    #[test]
    fn temp_names_are_unique_and_share_the_prefix() {
        let p = Path::new("some/dir/a.review.ron");
        let (a, b) = (temp_path(p), temp_path(p));
        assert_ne!(a, b);
        assert_eq!(a.parent(), Some(Path::new("some/dir")));
        assert!(a.file_name().is_some_and(|n| n.to_string_lossy().starts_with(".a.review.ron.tmp.")));
        assert_eq!(temp_path(Path::new("x.png")).parent(), Some(Path::new(".")));
    }
}
