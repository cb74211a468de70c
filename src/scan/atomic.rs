//! Atomic file writes for the scan (see [`crate::output`]), with the scan's
//! error type, and output folders.

use std::path::Path;

use super::ScanError;

/// Writes `bytes` to `path` atomically ([`crate::output::write_atomic`]).
/// The folder must exist.
pub fn write_atomic(path: &Path, bytes: &[u8]) -> Result<(), ScanError> {
    crate::output::write_atomic(path, bytes).map_err(|e| ScanError::io(path, e))
}

/// Creates `dir` and its parents when missing.
pub fn ensure_dir(dir: &Path) -> Result<(), ScanError> {
    std::fs::create_dir_all(dir).map_err(|e| ScanError::io(dir, e))
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn missing_folder_is_an_error_naming_the_file() {
        let dir = tempfile::tempdir().unwrap();
        let path = dir.path().join("no/such/a.csv");
        let err = write_atomic(&path, b"x").unwrap_err().to_string();
        assert!(err.contains("a.csv"), "{err}");
    }
}
