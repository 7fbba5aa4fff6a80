//! Finding recordings in the paths given to `isoline measure`.

use std::path::{Path, PathBuf};

use isoline_core::recording::StandardLead;

/// File extensions always treated as recordings when walking a folder (compared case-insensitively). A `.csv`
/// is taken only when it looks like a recording (see [`csv_text_looks_like_recording`]).
pub const RECORDING_EXTENSIONS: [&str; 2] = ["hea", "edf"];

/// Bytes read from the start of a `.csv` to find its header row.
const CSV_SNIFF_BYTES: u64 = 64 * 1024;

/// Why a folder given on the command line yielded nothing.
pub const NO_RECORDINGS: &str = "no recordings found (.hea, .edf, .csv with a time_s column)";

/// Why a `.csv` in a folder was not measured (said when a rate is given, see `measure::run`).
pub const PASSED_OVER: &str =
    "passed over as a table: its header is neither time_s first nor standard lead names (name the file to read it)";

/// Why a `.csv` in a folder whose header names standard leads only was not measured without `--rate`.
pub const NEEDS_RATE: &str =
    "passed over: its columns are lead names with no time_s column; give --rate HZ (its sampling rate) to measure it";

/// Deepest folder nesting walked.
const MAX_DEPTH: usize = 32;

/// What the walk found: recordings in a stable order, and paths that could not be read.
#[derive(Debug, Default)]
pub struct Found {
    /// Recordings: files given directly (whatever their extension), then the recordings inside folders.
    pub files: Vec<PathBuf>,
    /// Folders that could not be listed and files that could not be looked at, with the reason.
    pub errors: Vec<(PathBuf, String)>,
    /// `.csv` files in folders passed over as tables, not recordings (see [`csv_text_looks_like_recording`]).
    pub passed_over: Vec<PathBuf>,
    /// `.csv` files in folders whose header names standard leads only, passed over for want of a sampling rate
    /// (they are recordings when `--rate` is given).
    pub needs_rate: Vec<PathBuf>,
}

fn has_extension(path: &Path, exts: &[&str]) -> bool {
    path.extension().and_then(|e| e.to_str()).is_some_and(|e| exts.iter().any(|r| r.eq_ignore_ascii_case(e)))
}

/// True when the CSV text's header row (the first line that is neither blank nor a `#` comment) has `time_s` as
/// its first column, as Isoline writes recordings, or, when the sampling rate is given (`rate_given`), names
/// standard leads only (`I,II,V1`, a recording without a time column); other tables (labels, summaries) are not
/// recordings. A header separated by semicolons or tabs counts too, so that the reader says why it cannot take
/// the file rather than the walk passing over a recording unsaid.
fn csv_text_looks_like_recording(text: &str, rate_given: bool) -> bool {
    let text = text.strip_prefix('\u{feff}').unwrap_or(text);
    let Some(header) = text.lines().map(str::trim).find(|l| !l.is_empty() && !l.starts_with('#')) else {
        return false;
    };
    let mut names = header.split([',', ';', '\t']).map(|c| c.trim().trim_matches('"').trim());
    let mut first = names.clone();
    first.next().is_some_and(|n| n.eq_ignore_ascii_case("time_s"))
        || (rate_given && names.all(|n| StandardLead::parse(n).is_some()))
}

/// Reads the start of a `.csv` file and tells whether it looks like a recording; one that cannot be read is an
/// error (it might be one).
fn csv_looks_like_recording(path: &Path, rate_given: bool) -> Result<bool, String> {
    use std::io::Read as _;
    let mut head = Vec::new();
    std::fs::File::open(path)
        .and_then(|f| f.take(CSV_SNIFF_BYTES).read_to_end(&mut head))
        .map_err(|e| format!("cannot read: {e}"))?;
    Ok(csv_text_looks_like_recording(&String::from_utf8_lossy(&head), rate_given))
}

/// Whether a file found in a folder is a recording: named as one (`.csv` files are sniffed for a `time_s`
/// column) and a regular file, or a link to one. Anything else with such a name (a pipe, a socket, a device) is
/// passed over, since reading a named pipe would wait for a writer that never comes; one that cannot be looked at
/// (a broken link, no permission) is an error, so it is not dropped unsaid.
fn is_recording(path: &Path, rate_given: bool) -> Result<Kind, String> {
    let csv = has_extension(path, &["csv"]);
    if !csv && !has_extension(path, &RECORDING_EXTENSIONS) {
        return Ok(Kind::Other);
    }
    let meta = std::fs::metadata(path).map_err(|e| format!("cannot read: {e}"))?;
    Ok(match () {
        () if !meta.is_file() => Kind::Other,
        () if !csv => Kind::Recording,
        () if csv_looks_like_recording(path, rate_given)? => Kind::Recording,
        () if !rate_given && csv_looks_like_recording(path, true)? => Kind::NeedsRate,
        () => Kind::Table,
    })
}

/// What a file found in a folder is.
enum Kind {
    Recording,
    /// A `.csv` that is not a recording.
    Table,
    /// A `.csv` that would be a recording with a sampling rate given.
    NeedsRate,
    /// Not named as a recording, or not a regular file.
    Other,
}

fn walk_dir(dir: &Path, depth: usize, rate_given: bool, found: &mut Found) {
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
    // Numbered records in their numbers' order (2 before 10), as a reader lists them.
    paths.sort_by(|(a, _), (b, _)| alphanumeric_sort::compare_path(a, b));
    for (path, is_dir) in paths {
        if is_dir {
            walk_dir(&path, depth + 1, rate_given, found);
        } else {
            match is_recording(&path, rate_given) {
                Ok(Kind::Recording) => found.files.push(path),
                Ok(Kind::Table) => found.passed_over.push(path),
                Ok(Kind::NeedsRate) => found.needs_rate.push(path),
                Ok(Kind::Other) => {}
                Err(e) => found.errors.push((path, e)),
            }
        }
    }
}

/// Expands the command-line paths: a file is taken as given (whatever its extension); a folder is walked for
/// `.hea` and `.edf` files and `.csv` files whose header row starts with `time_s` (or, with `rate_given`, names
/// standard leads only), sorted by path, numbers by value (`2.hea` before `10.hea`); a path that does not exist
/// is an error.
#[must_use]
pub fn find_recordings(inputs: &[PathBuf], rate_given: bool) -> Found {
    let mut found = Found::default();
    for input in inputs {
        if input.is_dir() {
            let (files_before, errors_before) = (found.files.len(), found.errors.len());
            walk_dir(input, 0, rate_given, &mut found);
            if found.files.len() == files_before && found.errors.len() == errors_before {
                found.errors.push((input.clone(), NO_RECORDINGS.to_string()));
            }
        } else {
            // Files, and names of WFDB records without extension: the reader decides.
            found.files.push(input.clone());
        }
    }
    // A recording named twice (a folder and a file in it, or a record with and without `.hea`) is measured once.
    let mut seen = std::collections::HashSet::new();
    found.files.retain(|p| {
        let p = isoline_core::io::wfdb::header_path(p).unwrap_or_else(|| p.clone());
        seen.insert(std::fs::canonicalize(&p).unwrap_or(p))
    });
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
        std::fs::write(sub.join("c.csv"), "# ward B demo\ntime_s,I,II\n0.000000,0.1,0.2\n")?;
        // Tables that are not recordings (as in the LUDB folder) are skipped when walking.
        std::fs::write(dir.path().join("labels.csv"), "record,rhythm\n1,sinus\n")?;
        std::fs::write(sub.join("1.global.csv"), "lead,onset\nI,12\n")?;
        let found = find_recordings(&[dir.path().to_path_buf()], false);
        let names: Vec<String> =
            found.files.iter().filter_map(|p| p.file_name()).map(|n| n.to_string_lossy().into_owned()).collect();
        assert_eq!(names, ["a.hea", "b.EDF", "c.csv"]);
        assert!(found.errors.is_empty());
        // A file named on the command line is always attempted, whatever it holds.
        let labels = dir.path().join("labels.csv");
        assert_eq!(find_recordings(std::slice::from_ref(&labels), false).files, [labels]);
        Ok(())
    }

    #[test]
    #[cfg(unix)]
    fn a_named_pipe_in_a_folder_is_passed_over_and_a_broken_link_reported() -> std::io::Result<()> {
        // Before, the walk opened a pipe named like a recording to sniff its header and waited forever.
        let dir = tempfile::tempdir()?;
        let pipe = dir.path().join("monitor.csv");
        let made = std::process::Command::new("mkfifo").arg(&pipe).status()?;
        assert!(made.success(), "mkfifo failed");
        std::fs::write(dir.path().join("a.hea"), "")?;
        let found = find_recordings(&[dir.path().to_path_buf()], false);
        assert_eq!(found.files, vec![dir.path().join("a.hea")]);
        assert!(found.errors.is_empty(), "{:?}", found.errors);
        // A link to nothing, named as a recording, is reported rather than skipped unsaid.
        let broken = dir.path().join("bed-4.edf");
        std::os::unix::fs::symlink(dir.path().join("moved-away.edf"), &broken)?;
        let found = find_recordings(&[dir.path().to_path_buf()], false);
        assert_eq!(found.files, vec![dir.path().join("a.hea")]);
        assert!(
            matches!(found.errors.as_slice(), [(p, e)] if p == &broken && e.starts_with("cannot read")),
            "{:?}",
            found.errors
        );
        Ok(())
    }

    #[test]
    fn numbered_records_come_in_numeric_order() -> std::io::Result<()> {
        let dir = tempfile::tempdir()?;
        for name in ["10.hea", "2.hea", "1.hea", "bed-12.edf", "bed-9.edf"] {
            std::fs::write(dir.path().join(name), b"x")?;
        }
        let found = find_recordings(&[dir.path().to_path_buf()], false);
        let names: Vec<String> =
            found.files.iter().filter_map(|p| p.file_name()).map(|n| n.to_string_lossy().into_owned()).collect();
        assert_eq!(names, ["1.hea", "2.hea", "10.hea", "bed-9.edf", "bed-12.edf"]);
        Ok(())
    }

    #[test]
    fn empty_folder_is_an_error() -> std::io::Result<()> {
        let dir = tempfile::tempdir()?;
        std::fs::write(dir.path().join("labels.csv"), "record,rhythm\n")?;
        let found = find_recordings(&[dir.path().to_path_buf()], false);
        assert!(found.files.is_empty());
        assert_eq!(found.errors, [(dir.path().to_path_buf(), NO_RECORDINGS.to_string())]);
        Ok(())
    }

    #[test]
    fn csv_header_sniffing() {
        let looks = |text: &str| csv_text_looks_like_recording(text, false);
        assert!(looks("time_s,I\n0,1\n"));
        assert!(looks("\u{feff}\n# comment\n \"TIME_S\" , II\n"));
        assert!(!looks("I,II,time_s\n1,2,0\n"));
        // A spreadsheet's semicolons or tabs: taken, so that the reader names the separator it cannot read.
        assert!(looks("time_s;I;II\n0;0,5;1\n"));
        assert!(looks("time_s\tI\n0\t1\n"));
        assert!(!looks("record,rhythm\n"));
        assert!(!looks(""));
        // Standard lead names alone: a recording when the rate is given, a table otherwise.
        assert!(!looks("I,II,aVF,V1\n0.1,0.2,0.1,0\n"));
        assert!(csv_text_looks_like_recording("I,II,aVF,Lead V1\n0.1,0.2,0.1,0\n", true));
        assert!(!csv_text_looks_like_recording("record,rhythm\n", true));
        assert!(!csv_text_looks_like_recording("I,II,MLII\n", true));
        assert!(!csv_text_looks_like_recording("", true));
    }

    #[test]
    fn tables_are_passed_over_and_lead_only_csvs_taken_with_a_rate() -> std::io::Result<()> {
        let dir = tempfile::tempdir()?;
        std::fs::write(dir.path().join("labels.csv"), "record,rhythm\n1,sinus\n")?;
        std::fs::write(dir.path().join("bed-3.csv"), "I,II,III\n0.1,0.2,0.1\n")?;
        let names = |found: &[PathBuf]| -> Vec<String> {
            found.iter().filter_map(|p| p.file_name()).map(|n| n.to_string_lossy().into_owned()).collect()
        };
        let without = find_recordings(&[dir.path().to_path_buf()], false);
        assert!(without.files.is_empty());
        assert_eq!(names(&without.passed_over), ["labels.csv"]);
        // The lead-only one is told apart, so the command can say that a rate would read it.
        assert_eq!(names(&without.needs_rate), ["bed-3.csv"]);
        let with = find_recordings(&[dir.path().to_path_buf()], true);
        assert_eq!(names(&with.files), ["bed-3.csv"]);
        assert_eq!(names(&with.passed_over), ["labels.csv"]);
        assert!(with.needs_rate.is_empty());
        Ok(())
    }

    #[test]
    fn a_recording_named_twice_is_measured_once() -> std::io::Result<()> {
        let dir = tempfile::tempdir()?;
        for name in ["bed-1.hea", "bed-2.edf"] {
            std::fs::write(dir.path().join(name), b"x")?;
        }
        let folder = dir.path().to_path_buf();
        let paths = [folder.clone(), folder.join("bed-2.edf"), folder.join("bed-1"), folder.join("./bed-1.hea")];
        let found = find_recordings(&paths, false);
        assert_eq!(found.files, [folder.join("bed-1.hea"), folder.join("bed-2.edf")]);
        Ok(())
    }
}
