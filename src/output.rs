//! Writing output files without leaving a partial file behind: the content
//! goes to a temporary file in the target's own folder, is flushed to disk,
//! then renamed over the target, so a reader (or a resumed scan) sees
//! either the old file or the complete new one. Used by every stage that
//! writes files and by the command-line tool.

use std::io::Write;
use std::path::{Path, PathBuf};
use std::sync::atomic::{AtomicU64, Ordering};

static COUNTER: AtomicU64 = AtomicU64::new(0);

/// Writes `bytes` to `path` atomically (temporary file in the same folder,
/// then a rename). The folder must exist. On failure the temporary file is
/// removed and the target is left as it was.
///
/// # Errors
/// The I/O error of creating, writing, flushing or renaming.
pub fn write_atomic(path: &Path, bytes: &[u8]) -> std::io::Result<()> {
    let tmp = temp_path(path);
    let result = (|| {
        let mut file = std::fs::File::create(&tmp)?;
        file.write_all(bytes)?;
        file.sync_all()?;
        std::fs::rename(&tmp, path)
    })();
    if result.is_err() {
        // Best effort: a leftover temporary file is harmless but untidy.
        let _ = std::fs::remove_file(&tmp);
    }
    result
}

/// A temporary name beside `path` (in `.` for a bare file name), unique
/// within this process (a counter) and across processes (the process id).
fn temp_path(path: &Path) -> PathBuf {
    let n = COUNTER.fetch_add(1, Ordering::Relaxed);
    let name = path
        .file_name()
        .map(|s| s.to_string_lossy().into_owned())
        .unwrap_or_default();
    path.with_file_name(format!(".{name}.tmp-{}-{n}", std::process::id()))
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
        assert_eq!(std::fs::read_dir(dir.path()).unwrap().count(), 1);
    }

    #[test]
    fn failure_keeps_the_old_file_and_no_temporary_file() {
        let dir = tempfile::tempdir().unwrap();
        let path = dir.path().join("a.csv");
        write_atomic(&path, b"old").unwrap();
        // A target that is a folder cannot be replaced by a file.
        let folder = dir.path().join("sub");
        std::fs::create_dir(&folder).unwrap();
        std::fs::write(folder.join("x"), b"x").unwrap();
        assert!(write_atomic(&folder, b"new").is_err());
        assert!(folder.is_dir());
        assert_eq!(std::fs::read(&path).unwrap(), b"old");
        assert_eq!(std::fs::read_dir(dir.path()).unwrap().count(), 2);
        // A missing folder: an error, nothing written.
        assert!(write_atomic(&dir.path().join("none/a.csv"), b"x").is_err());
    }
}
