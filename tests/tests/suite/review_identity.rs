//! Recording identity: the SHA-256 of the signal content ties a review to its recording; one changed byte
//! in a copy of the recording makes `load_for` report the mismatch.

#![allow(clippy::unwrap_used)] // a test fails by panicking

use std::fs;
use std::path::Path;

use isoline_core::io::{OpenOptions, open};
use isoline_core::review::{RecordingIdentity, Review, ReviewError, load_for, signal_sha256};
use isoline_tests::data;

fn copy_record(dir: &Path, record: &str) -> std::path::PathBuf {
    for ext in ["hea", "dat"] {
        fs::copy(data(&format!("{record}.{ext}")), dir.join(format!("{}.{ext}", record.rsplit('/').next().unwrap())))
            .unwrap();
    }
    dir.join(format!("{}.hea", record.rsplit('/').next().unwrap()))
}

#[test]
fn sha256_matches_an_independent_tool() {
    // Source: GNU coreutils `sha256sum tests/data/qtdb/sel100.dat`, run once when the test was written.
    let expect = "ce8ebe4f797decbec93d3aa6e0d0f13310529dcc3dd9a1a25debe94d7ea9d8b8";
    assert_eq!(signal_sha256(&data("qtdb/sel100.hea")).unwrap(), expect);
    // The record path without extension names the same record.
    assert_eq!(signal_sha256(&data("qtdb/sel100")).unwrap(), expect);
}

#[test]
fn one_changed_byte_is_a_mismatch() {
    let dir = tempfile::tempdir().unwrap();
    let hea = copy_record(dir.path(), "qtdb/sel100");
    let opened = open(&hea, &OpenOptions::default()).unwrap();
    let review_path = dir.path().join("sel100.review.ron");
    let id = RecordingIdentity::of(&hea, &opened.recording, &review_path).unwrap();
    assert_eq!(id.file_name, "sel100.hea");
    assert_eq!(id.relative_path, "sel100.hea");
    assert_eq!(id.sample_rate_hz, 250.0);
    assert_eq!(id.leads, ["MLII", "V5"]);
    Review::new(id.clone(), "AB").save(&review_path).unwrap();
    assert_eq!(load_for(&review_path, &hea).unwrap().recording, id);

    // Editing the header's comments does not change the signal content.
    let mut header = fs::read_to_string(&hea).unwrap();
    header.push_str("# a comment added later\n");
    fs::write(&hea, header).unwrap();
    assert!(load_for(&review_path, &hea).is_ok());

    // One byte of the signal changed.
    let dat = dir.path().join("sel100.dat");
    let mut bytes = fs::read(&dat).unwrap();
    let mid = bytes.len() / 2;
    bytes[mid] ^= 0x01;
    fs::write(&dat, &bytes).unwrap();
    match load_for(&review_path, &hea) {
        Err(ReviewError::RecordingMismatch { expected, found }) => {
            assert_eq!(expected, id.sha256);
            assert_ne!(found, expected);
            assert_eq!(found.len(), 64);
        }
        other => panic!("expected a mismatch, got {other:?}"),
    }
}

#[test]
fn multi_file_record_hashes_each_signal_file_once() {
    // LUDB record 1: twelve signals in one .dat file, which is hashed once.
    let one = signal_sha256(&data("ludb/1.hea")).unwrap();
    let dir = tempfile::tempdir().unwrap();
    let hea = copy_record(dir.path(), "ludb/1");
    assert_eq!(signal_sha256(&hea).unwrap(), one);
    assert_ne!(one, signal_sha256(&data("ludb/2.hea")).unwrap());
}

#[test]
fn edf_identity_covers_data_records_not_header() {
    // A minimal file with the EDF header layout: 256 bytes of header (byte count at offset 184), then data.
    // Source: Kemp et al. 1992, Electroencephalogr Clin Neurophysiol 82:391-393 (header layout). From memory.
    let dir = tempfile::tempdir().unwrap();
    let path = dir.path().join("ward7.edf");
    let mut header = vec![b' '; 256];
    header[..8].copy_from_slice(b"0       ");
    header[8..20].copy_from_slice(b"DEMO PATIENT");
    header[184..192].copy_from_slice(b"256     ");
    let data_records: Vec<u8> = (0..1000u32).map(|i| (i % 251) as u8).collect();
    fs::write(&path, [header.clone(), data_records.clone()].concat()).unwrap();
    let first = signal_sha256(&path).unwrap();
    // De-identifying the header keeps the identity.
    header[8..20].copy_from_slice(b"X           ");
    fs::write(&path, [header.clone(), data_records.clone()].concat()).unwrap();
    assert_eq!(signal_sha256(&path).unwrap(), first);
    // A changed data byte does not.
    let mut changed = data_records;
    changed[500] ^= 0x80;
    fs::write(&path, [header.clone(), changed].concat()).unwrap();
    assert_ne!(signal_sha256(&path).unwrap(), first);
    // A header whose byte count is not a number is refused with the offset named.
    header[184..192].copy_from_slice(b"abc     ");
    fs::write(&path, &header).unwrap();
    let e = signal_sha256(&path).unwrap_err().to_string();
    assert!(e.contains("184") && e.contains("ward7.edf"), "{e}");
}

#[test]
fn missing_recording_is_an_error_not_a_match() {
    let dir = tempfile::tempdir().unwrap();
    let review_path = dir.path().join("x.review.ron");
    let id = RecordingIdentity {
        file_name: "gone.hea".into(),
        relative_path: "gone.hea".into(),
        sha256: "0".repeat(64),
        leads: vec![],
        sample_rate_hz: 250.0,
    };
    Review::new(id, "AB").save(&review_path).unwrap();
    assert!(matches!(load_for(&review_path, &dir.path().join("gone.hea")), Err(ReviewError::Recording(_))));
}
