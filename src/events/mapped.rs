//! Plain (uncompressed) event files read through memory maps, one window
//! per chunk, instead of being copied into a buffer by `read`.
//!
//! The page cache already holds the text; a read-only map of a window of
//! it lets the chunk's parser read it in place, so the kernel's copy (a
//! tenth of the CPU time of a recast) goes away. The text still has to
//! come from memory into the cache once: that is paid by the first reader
//! of a chunk, which is why the reading thread only looks for the cut
//! and leaves the rest of the chunk to the worker (see [`super::source`]);
//! with the reading thread still counting events, maps gained nothing.
//! Each window is unmapped when its chunk has been parsed, so the memory
//! in use stays bounded by the chunks in flight.
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
    /// Opens `path` for mapping when it is a regular, non-empty file;
    /// `None` otherwise (pipes, devices), which are streamed. The caller
    /// maps only files whose header showed no gzip compression
    /// ([`super::FileInfo::gzip`]).
    pub fn open(path: &Path) -> io::Result<Option<Self>> {
        let file = File::open(path)?;
        let meta = file.metadata()?;
        if !meta.is_file() || meta.len() == 0 {
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
