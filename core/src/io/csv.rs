//! CSV: a header row of lead names, an optional `time_s` column, values in mV.

use std::path::Path;

use super::{Opened, ReadError};

/// Reads a CSV recording. Without a `time_s` column, `rate_hz` must be given.
///
/// # Errors
/// [`ReadError`] naming the line and column at fault.
pub fn read(path: &Path, rate_hz: Option<f64>) -> Result<Opened, ReadError> {
    let _ = rate_hz;
    Err(ReadError::unsupported(path, "CSV reading is not written yet"))
}
