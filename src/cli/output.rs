//! Output files shared by every subcommand: written through a temporary file
//! in the same folder and a rename ([`recoil::output::write_atomic`]), so no
//! partial file is left behind.

use anyhow::Context;
use std::path::Path;

/// Writes `bytes` to `path` atomically; on failure the temporary file is
/// removed and the error names the file.
pub fn write_atomically(path: &Path, bytes: impl AsRef<[u8]>) -> anyhow::Result<()> {
    recoil::output::write_atomic(path, bytes.as_ref())
        .with_context(|| format!("{}: cannot write", path.display()))
}
