//! Finding recordings in the paths given to `isoline measure`.

use std::path::{Path, PathBuf};

/// File extensions treated as recordings when walking a folder (compared case-insensitively).
pub const RECORDING_EXTENSIONS: [&str; 3] = ["hea", "edf", "csv"];

/// Deepest folder nesting walked.
const MAX_DEPTH: usize = 32;

/// What the walk found: recordings in a stable order, and paths that could not be read.
#[derive(Debug, Default)]
pub struct Found {
    /// Recordings: files given directly (whatever their extension), then the recordings inside folders.
    pub files: Vec<PathBuf>,
    /// Paths that could not be listed, with the reason.
    pub errors: Vec<(PathBuf, String)>,
}

fn is_recording(path: &Path) -> bool {
    path.extension()
        .and_then(|e| e.to_str())
        .is_some_and(|e| RECORDING_EXTENSIONS.iter().any(|r| r.eq_ignore_ascii_case(e)))
}

fn walk_dir(dir: &Path, depth: usize, found: &mut Found) {
    if depth > MAX_DEPTH {
        found.errors.push((dir.to_path_buf(), format!("folders nested deeper than {MAX_DEPTH} levels")));
        return;
    }
    let entries = match std::fs::read_dir(dir) {
        Ok(e) => e,
        Err(e) => {
            found.errors.push((dir.to_path_buf(), format!("cannot list folder: {e}")));
            return;
        }
    };
    let mut paths: Vec<(PathBuf, bool)> = entries
        .filter_map(Result::ok)
        .map(|e| {
            // Symbolic links to folders are not followed (no loops); links to files are.
            let is_dir = e.file_type().is_ok_and(|t| t.is_dir());
            (e.path(), is_dir)
        })
        .collect();
    paths.sort();
    for (path, is_dir) in paths {
        if is_dir {
            walk_dir(&path, depth + 1, found);
        } else if is_recording(&path) {
            found.files.push(path);
        }
    }
}

/// Expands the command-line paths: a file is taken as given; a folder is walked for `.hea`, `.edf` and `.csv`
/// files (sorted by path); a path that does not exist is an error.
#[must_use]
pub fn find_recordings(inputs: &[PathBuf]) -> Found {
    let mut found = Found::default();
    for input in inputs {
        if input.is_dir() {
            walk_dir(input, 0, &mut found);
        } else {
            // Files, and names of WFDB records without extension: the reader decides.
            found.files.push(input.clone());
        }
    }
    found
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn walks_folders_for_recordings_only() -> std::io::Result<()> {
        let dir = tempfile::tempdir()?;
        let sub = dir.path().join("ward-b");
        std::fs::create_dir(&sub)?;
        for name in ["a.hea", "a.dat", "notes.txt", "b.EDF"] {
            std::fs::write(dir.path().join(name), b"x")?;
        }
        std::fs::write(sub.join("c.csv"), b"x")?;
        let found = find_recordings(&[dir.path().to_path_buf()]);
        let names: Vec<String> =
            found.files.iter().filter_map(|p| p.file_name()).map(|n| n.to_string_lossy().into_owned()).collect();
        assert_eq!(names, ["a.hea", "b.EDF", "c.csv"]);
        assert!(found.errors.is_empty());
        Ok(())
    }
}
