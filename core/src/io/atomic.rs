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
#[must_use]
pub fn folder(path: &Path) -> PathBuf {
    match path.parent() {
        Some(d) if !d.as_os_str().is_empty() => d.to_path_buf(),
        _ => PathBuf::from("."),
    }
}

/// Most symbolic links followed from one path, as the usual system limit.
// Common practice, no source: Linux allows 40 links in one path lookup.
const MAX_LINKS: usize = 40;

/// True when `path` is, or leads by symbolic links to, one of the process's own descriptors (`/dev/stdout`,
/// `/dev/stderr`, `/dev/fd/N`, anything under `/proc`): by a relative path (`../../dev/stdout`), a folder link
/// or a link to it alike. (Devices are no regular files and are written through anyway.)
fn reaches_system_path(path: &Path) -> bool {
    let system = |p: &Path| {
        p.starts_with("/proc")
            || p.starts_with("/dev/fd")
            || p == Path::new("/dev/stdout")
            || p == Path::new("/dev/stderr")
    };
    // The folder with its links resolved, then the name: the name itself may be a link to follow.
    let resolve = |p: &Path| -> Option<PathBuf> { Some(std::fs::canonicalize(folder(p)).ok()?.join(p.file_name()?)) };
    let mut p = path.to_path_buf();
    for _ in 0..MAX_LINKS {
        if system(&p) {
            return true;
        }
        let Some(real) = resolve(&p) else { return false };
        if system(&real) {
            return true;
        }
        match std::fs::read_link(&real) {
            Ok(target) => p = folder(&real).join(target),
            Err(_) => return false,
        }
    }
    false
}

/// Where a write to a path lands ([`landing`]).
#[derive(Debug, Clone, PartialEq, Eq)]
pub enum Landing {
    /// A regular file (or none yet), replaced through a temporary file beside it: the path itself, or the file
    /// a symbolic link names (the link stays a link).
    Replace(PathBuf),
    /// No file to replace: a pipe, a terminal, a device or the process's own standard output or error
    /// (`/dev/stdout`), written through and appended to, as a shell's `>>` would.
    Through(PathBuf),
}

/// Where a write to `path` lands. The process's own descriptors are written through: `/dev/stdout` names
/// whatever the shell redirected standard output to, and replacing that file would lose what it held.
///
/// # Errors
/// No file name; a folder; a symbolic link to a missing file (replacing the link would cut it from its file).
pub fn landing(path: &Path) -> io::Result<Landing> {
    if path.file_name().is_none() {
        return Err(io::Error::new(io::ErrorKind::InvalidInput, "not a file name"));
    }
    if reaches_system_path(path) {
        return Ok(Landing::Through(path.to_path_buf()));
    }
    let link = std::fs::symlink_metadata(path).is_ok_and(|m| m.file_type().is_symlink());
    match std::fs::metadata(path) {
        Ok(m) if m.is_dir() => Err(io::Error::new(io::ErrorKind::InvalidInput, "a folder, not a file")),
        Ok(m) if !m.is_file() => Ok(Landing::Through(path.to_path_buf())),
        Ok(_) if link => Ok(Landing::Replace(std::fs::canonicalize(path)?)),
        Err(_) if link => Err(io::Error::new(io::ErrorKind::NotFound, "a symbolic link to a missing file")),
        Ok(_) | Err(_) => Ok(Landing::Replace(path.to_path_buf())),
    }
}

/// Writes `path` atomically: `fill` writes into a new temporary file beside it, which is synced and renamed
/// over `path`; then the folder is synced (best effort: not every platform can). On any error the temporary
/// file is removed and `path` is left as it was. Where the write lands is [`landing`]'s: a symbolic link is
/// followed and the file it names replaced; a pipe, a terminal or a device is written through.
///
/// # Errors
/// As [`landing`]; then the first I/O error (creating, writing, syncing or renaming); the caller names the file.
pub fn write_with(path: &Path, fill: impl FnOnce(&mut BufWriter<File>) -> io::Result<()>) -> io::Result<()> {
    write_to(landing(path)?, fill)
}

/// [`write_bytes`] for a program's own side file (a backup, an autosave): the path itself is replaced, a
/// symbolic link there included, never followed, so a link planted under that name (to a recording, say)
/// cannot turn the side file's write into a write over what it names.
///
/// # Errors
/// As [`write_with`]; a folder at `path` is refused.
pub fn replace_bytes(path: &Path, bytes: &[u8]) -> io::Result<()> {
    if path.file_name().is_none() || std::fs::symlink_metadata(path).is_ok_and(|m| m.is_dir()) {
        return Err(io::Error::new(io::ErrorKind::InvalidInput, "not a file name, or a folder"));
    }
    write_to(Landing::Replace(path.to_path_buf()), |w| w.write_all(bytes))
}

/// Writes where [`landing`] said: through, or by a temporary file renamed over the path.
///
/// # Errors
/// As [`write_with`], after the landing.
pub fn write_to(landing: Landing, fill: impl FnOnce(&mut BufWriter<File>) -> io::Result<()>) -> io::Result<()> {
    let path = match landing {
        Landing::Through(p) => {
            let mut w = BufWriter::new(OpenOptions::new().append(true).open(p)?);
            fill(&mut w)?;
            return w.flush();
        }
        Landing::Replace(p) => p,
    };
    let path = path.as_path();
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
    fn a_folder_or_a_missing_folder_is_refused_and_leaves_nothing() -> Result<(), Box<dyn std::error::Error>> {
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
        // A side file's write replaces a link planted under its name; the file the link names is untouched.
        let side = dir.path().join("results.csv.bak");
        std::os::unix::fs::symlink("results.csv", &side)?;
        replace_bytes(&side, b"backup")?;
        assert!(!std::fs::symlink_metadata(&side)?.file_type().is_symlink());
        assert_eq!((std::fs::read(&side)?, std::fs::read(&file)?), (b"backup".to_vec(), b"new".to_vec()));
        // A folder is refused, and so is a link to a missing file (replacing the link would cut it off).
        assert!(write_bytes(dir.path(), b"x").is_err());
        let dangling = dir.path().join("dangling.csv");
        std::os::unix::fs::symlink("nowhere/x.csv", &dangling)?;
        assert!(write_bytes(&dangling, b"x").is_err());
        assert!(std::fs::symlink_metadata(&dangling)?.file_type().is_symlink());
        // The process's own descriptors are written through: /dev/stdout may name a file a shell appends to,
        // also when reached by a relative path or through a link.
        assert_eq!(landing(Path::new("/dev/stdout"))?, Landing::Through(PathBuf::from("/dev/stdout")));
        let up = Path::new("../../../../../../../../dev/stdout");
        assert_eq!(landing(up)?, Landing::Through(up.to_path_buf()));
        let to_stdout = dir.path().join("out.csv");
        std::os::unix::fs::symlink("/dev/stdout", &to_stdout)?;
        assert_eq!(landing(&to_stdout)?, Landing::Through(to_stdout.clone()));
        assert_eq!(landing(&file)?, Landing::Replace(file.clone()));
        assert_eq!(landing(&link)?, Landing::Replace(std::fs::canonicalize(&file)?));
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
