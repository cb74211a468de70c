//! Atomic file writes: the content goes to a temporary file in the target's
//! own folder, is flushed to disk, then renamed over the target, so a reader
//! (or a resumed scan) sees either the old file or the complete new one,
//! never a partial write.

use std::io::Write;
use std::path::{Path, PathBuf};
use std::sync::atomic::{AtomicU64, Ordering};

use super::ScanError;

static COUNTER: AtomicU64 = AtomicU64::new(0);

/// Writes `bytes` to `path` atomically (temporary file in the same folder,
/// then rename). The folder must exist.
pub fn write_atomic(path: &Path, bytes: &[u8]) -> Result<(), ScanError> {
    let tmp = temp_path(path);
    let result = (|| {
        let mut file = std::fs::File::create(&tmp)?;
        file.write_all(bytes)?;
        file.sync_all()?;
        std::fs::rename(&tmp, path)
    })();
    if let Err(err) = result {
        // Best effort: a leftover temporary file is harmless but untidy.
        let _ = std::fs::remove_file(&tmp);
        return Err(ScanError::io(path, err));
    }
    Ok(())
}

/// A temporary name beside `path`, unique within this process and across
/// processes (the process id is part of it).
fn temp_path(path: &Path) -> PathBuf {
    let n = COUNTER.fetch_add(1, Ordering::Relaxed);
    let name = path
        .file_name()
        .map(|s| s.to_string_lossy().into_owned())
        .unwrap_or_default();
    path.with_file_name(format!(".{name}.tmp-{}-{n}", std::process::id()))
}

/// Creates `dir` and its parents when missing.
pub fn ensure_dir(dir: &Path) -> Result<(), ScanError> {
    std::fs::create_dir_all(dir).map_err(|e| ScanError::io(dir, e))
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn replaces_content_and_leaves_no_temporary_file() {
        let dir = tempfile::tempdir().unwrap();
        let path = dir.path().join("a.csv");
        write_atomic(&path, b"one").unwrap();
        write_atomic(&path, b"two").unwrap();
        assert_eq!(std::fs::read(&path).unwrap(), b"two");
        let names: Vec<_> = std::fs::read_dir(dir.path()).unwrap().collect();
        assert_eq!(names.len(), 1);
    }

    #[test]
    fn missing_folder_is_an_error_naming_the_file() {
        let dir = tempfile::tempdir().unwrap();
        let path = dir.path().join("no/such/a.csv");
        let err = write_atomic(&path, b"x").unwrap_err().to_string();
        assert!(err.contains("a.csv"), "{err}");
    }
}
