//! Output files shared by every subcommand: written through a temporary file
//! in the same folder and a rename, so no partial file is left behind.

use anyhow::Context;
use std::io::Write;
use std::path::Path;

/// Writes `bytes` to `path` atomically (temporary file in the same folder,
/// then a rename); on failure the temporary file is removed.
pub fn write_atomically(path: &Path, bytes: impl AsRef<[u8]>) -> anyhow::Result<()> {
    let dir = path
        .parent()
        .filter(|d| !d.as_os_str().is_empty())
        .unwrap_or(Path::new("."));
    let name = path
        .file_name()
        .with_context(|| format!("{}: not a file name", path.display()))?;
    let tmp = dir.join(format!(
        ".{}.tmp{}",
        name.to_string_lossy(),
        std::process::id()
    ));
    let result = (|| -> std::io::Result<()> {
        let mut f = std::fs::File::create(&tmp)?;
        f.write_all(bytes.as_ref())?;
        f.sync_all()?;
        std::fs::rename(&tmp, path)
    })();
    if let Err(err) = result {
        let _ = std::fs::remove_file(&tmp);
        return Err(err).with_context(|| format!("{}: cannot write", path.display()));
    }
    Ok(())
}
