//! Shared helpers for Isoline's end-to-end and reference tests. The tests live in `tests/tests/suite/` (one binary, one module per area).

use std::path::PathBuf;

/// Path of a file under `tests/data/`.
#[must_use]
pub fn data(rel: &str) -> PathBuf {
    PathBuf::from(env!("CARGO_MANIFEST_DIR")).join("data").join(rel)
}

pub mod ludb;
pub mod score;

/// The records with expert beat annotations: (record header, its reference beats as `sample,symbol`), relative
/// to [`data`]. MIT-BIH record 100 (Moody & Mark, IEEE Eng Med Biol 2001;20(3):45-50) and six QT Database records
/// (Laguna et al., Computers in Cardiology 1997;24:673-6).
pub const BEAT_RECORDS: [(&str, &str); 7] = [
    ("mitdb-100/100.hea", "mitdb-100/100.beats.csv"),
    ("qtdb/sel100.hea", "qtdb/sel100.beats.csv"),
    ("qtdb/sel117.hea", "qtdb/sel117.beats.csv"),
    ("qtdb/sel16265.hea", "qtdb/sel16265.beats.csv"),
    ("qtdb/sel803.hea", "qtdb/sel803.beats.csv"),
    ("qtdb/sele0104.hea", "qtdb/sele0104.beats.csv"),
    ("qtdb/sel14046.hea", "qtdb/sel14046.beats.csv"),
];
