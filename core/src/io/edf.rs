//! EDF and EDF+ (Kemp et al. 1992; Kemp & Olivan 2003): read and write.

use std::path::Path;

use super::{Opened, ReadError};

/// Reads an EDF or EDF+ file.
///
/// # Errors
/// [`ReadError`] naming the header field or byte offset at fault.
pub fn read(path: &Path) -> Result<Opened, ReadError> {
    Err(ReadError::unsupported(path, "EDF reading is not written yet"))
}
