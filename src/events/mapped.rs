//! Plain (uncompressed) event files read through memory maps, one window
//! per chunk, instead of being copied into a buffer by `read`.
//!
//! The page cache already holds the text; a read-only map of a window of
//! it lets the chunk's parser read it in place. Copying 286 MB from the
//! page cache costs about 60 ms of CPU on this project's benchmark
//! machine, mapping and touching the same pages about 5 ms (whole-process
//! figures, nine runs each, 2026-12-03), and the copy was a tenth of the
//! CPU time of a recast. Each window is unmapped when its chunk has been
//! parsed, so the memory in use stays bounded by the chunks in flight.
//!
//! Fed by [`super::source`] (file and window); feeds the chunk parser.

use memmap2::{Mmap, MmapOptions};
use std::fs::File;
use std::io;
use std::path::Path;

/// A plain event file opened for windowed mapping, with its length when
/// it was opened.
pub(crate) struct MappedFile {
    file: File,
    /// Length of the file when it was opened [bytes]; windows never reach
    /// beyond it.
    pub len: u64,
}

impl MappedFile {
    /// Opens `path` for mapping when it is a regular, non-empty file that
    /// is not gzip-compressed (first bytes other than 1f 8b); `None`
    /// otherwise (pipes, devices, gzip files), which are streamed.
    pub fn open(path: &Path) -> io::Result<Option<Self>> {
        let file = File::open(path)?;
        let meta = file.metadata()?;
        if !meta.is_file() || meta.len() < 2 {
            return Ok(None);
        }
        let mut magic = [0u8; 2];
        std::io::Read::read_exact(&mut &file, &mut magic)?;
        if magic == [0x1f, 0x8b] {
            return Ok(None);
        }
        Ok(Some(Self {
            file,
            len: meta.len(),
        }))
    }

    /// A read-only map of `len` bytes from byte `offset`; `offset + len`
    /// must not exceed [`Self::len`].
    pub fn window(&self, offset: u64, len: usize) -> io::Result<Mmap> {
        if offset.saturating_add(len as u64) > self.len {
            return Err(io::Error::new(
                io::ErrorKind::InvalidInput,
                format!(
                    "internal: window {offset}+{len} beyond the file's {} bytes",
                    self.len
                ),
            ));
        }
        // SAFETY: the map is read-only and private, and lies within the
        // length the file had when it was opened. What the type system
        // cannot promise is that no other process truncates or rewrites
        // the file while it is mapped: a read beyond a new, shorter end
        // stops the process (SIGBUS) instead of returning an error. The
        // README says so (plain files must not be truncated while recoil
        // reads them; gzip files and pipes are read by copying).
        unsafe { MmapOptions::new().offset(offset).len(len).map(&self.file) }
    }
}
