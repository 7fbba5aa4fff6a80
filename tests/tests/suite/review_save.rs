//! Saving is crash safe: a save interrupted at any byte leaves the previous review intact and loadable; the
//! previous version is kept as `.bak`; the autosave sidecar is offered for recovery only when newer.

#![allow(clippy::unwrap_used)] // a test fails by panicking

use std::fs;
use std::time::{Duration, SystemTime};

use crate::review_support::sample_review;
use isoline_core::review::{Review, Stage, autosave_path, backup_path, discard_autosave, load, recover};

fn later_version(r: &Review) -> Review {
    let mut b = r.clone();
    b.set_measurement("qrs_ms", 98.0, "CD").unwrap();
    b.set_summary("Second reader: QRS re-measured on lead V5 with the time caliper; agrees otherwise.", "CD").unwrap();
    b.set_stage(Stage::Checked, "CD").unwrap();
    b
}

fn temp_files(dir: &std::path::Path) -> Vec<String> {
    fs::read_dir(dir)
        .unwrap()
        .map(|e| e.unwrap().file_name().to_string_lossy().into_owned())
        .filter(|n| n.contains(".tmp."))
        .collect()
}

#[test]
fn interrupted_save_leaves_previous_review_intact() {
    let dir = tempfile::tempdir().unwrap();
    let path = dir.path().join("ward7-bed2.review.ron");
    let a = sample_review("AB");
    a.save(&path).unwrap();
    let a_bytes = fs::read(&path).unwrap();
    let b = later_version(&a);
    let b_text = b.to_ron().unwrap();
    let len = b_text.len();
    // Every byte of the first and last 64, and about 150 offsets in between.
    let mut offsets: Vec<usize> = (0..64.min(len)).chain(len.saturating_sub(64)..len).collect();
    offsets.extend((0..len).step_by((len / 150).max(1)));
    offsets.sort_unstable();
    offsets.dedup();
    for &at in &offsets {
        let tmp = b.save_interrupted(&path, at).unwrap();
        // The crash left a partial temporary file beside the review, never the review itself.
        assert_eq!(tmp.parent(), path.parent());
        assert_eq!(fs::metadata(&tmp).unwrap().len(), at as u64);
        assert_eq!(fs::read(&path).unwrap(), a_bytes, "review changed by a save interrupted at byte {at}");
        assert_eq!(load(&path).unwrap(), a, "interrupted at byte {at}");
        // No partial temporary file passes for a review (all but the final newline is content).
        if at < len - 1 {
            assert!(load(&tmp).is_err(), "a temporary file cut at byte {at} of {len} loaded");
        }
        assert!(recover(&path).is_none(), "a crashed save is not offered as an autosave");
    }
    assert!(!temp_files(dir.path()).is_empty());
    // The next save succeeds, replaces the review, keeps the previous one as .bak, and clears the debris.
    b.save(&path).unwrap();
    assert_eq!(load(&path).unwrap(), b);
    assert_eq!(fs::read(backup_path(&path)).unwrap(), a_bytes);
    assert_eq!(temp_files(dir.path()), Vec::<String>::new());
}

#[test]
fn first_save_interrupted_leaves_no_review() {
    let dir = tempfile::tempdir().unwrap();
    let path = dir.path().join("new.review.ron");
    let a = sample_review("AB");
    a.save_interrupted(&path, 100).unwrap();
    assert!(!path.exists());
    assert!(!backup_path(&path).exists());
}

#[test]
fn backup_holds_the_previous_version() {
    let dir = tempfile::tempdir().unwrap();
    let path = dir.path().join("r.review.ron");
    let a = sample_review("AB");
    a.save(&path).unwrap();
    assert!(!backup_path(&path).exists(), "nothing to back up on the first save");
    let b = later_version(&a);
    b.save(&path).unwrap();
    assert_eq!(load(&backup_path(&path)).unwrap(), a);
    assert_eq!(load(&path).unwrap(), b);
    let mut c = b.clone();
    c.set_stage(Stage::Final, "MD").unwrap();
    c.save(&path).unwrap();
    assert_eq!(load(&backup_path(&path)).unwrap(), b);
}

#[test]
fn autosave_is_recovered_only_when_newer() {
    let dir = tempfile::tempdir().unwrap();
    let path = dir.path().join("r.review.ron");
    let a = sample_review("AB");
    a.save(&path).unwrap();
    assert!(recover(&path).is_none(), "no sidecar");

    let b = later_version(&a);
    b.autosave(&path).unwrap();
    assert_eq!(load(&path).unwrap(), a, "autosave never touches the review");
    assert_eq!(recover(&path), Some(b.clone()));

    // A sidecar older than the review (e.g. left from an earlier session) is not offered.
    let old = SystemTime::now() - Duration::from_secs(3600);
    fs::File::options().write(true).open(autosave_path(&path)).unwrap().set_modified(old).unwrap();
    assert!(recover(&path).is_none());

    // Saving removes the stale sidecar.
    b.autosave(&path).unwrap();
    b.save(&path).unwrap();
    assert!(!autosave_path(&path).exists());
    assert!(recover(&path).is_none());

    // Review never saved (crash before the first save): the sidecar is all there is.
    let fresh = dir.path().join("fresh.review.ron");
    a.autosave(&fresh).unwrap();
    assert_eq!(recover(&fresh), Some(a.clone()));
    discard_autosave(&fresh).unwrap();
    assert!(recover(&fresh).is_none());
    discard_autosave(&fresh).unwrap();

    // A corrupt sidecar is not offered.
    fs::write(autosave_path(&path), "(format_version: 2, rec").unwrap();
    assert!(recover(&path).is_none());
}
