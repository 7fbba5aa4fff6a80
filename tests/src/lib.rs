//! Shared helpers for Isoline's end-to-end and reference tests. The tests live in `tests/tests/suite/` (one binary, one module per area).

use std::path::PathBuf;

/// Path of a file under `tests/data/`.
#[must_use]
pub fn data(rel: &str) -> PathBuf {
    PathBuf::from(env!("CARGO_MANIFEST_DIR")).join("data").join(rel)
}

pub mod score;
