//! Opening an event file as a byte stream: plain files are read directly,
//! gzip files (recognised by the magic bytes 1f 8b, RFC 1952 Sec. 2.3.1,
//! whatever the file name) are decompressed on a thread of their own, so
//! that decompression and parsing overlap. Multi-member gzip files (several
//! gzip streams one after the other, as `cat a.gz b.gz` makes) are read as
//! one text.
//!
//! Fed by file paths; feeds [`super::source`].

use std::fs::File;
use std::io::{self, BufReader, Read};
use std::path::Path;
use std::sync::Arc;
use std::sync::atomic::{AtomicU64, Ordering};
use std::sync::mpsc::{Receiver, Sender, channel, sync_channel};

/// Size of the blocks the decompression thread hands on [bytes].
const GZIP_BLOCK: usize = 1 << 20;
/// Blocks in flight between the decompression thread and the reader.
const GZIP_QUEUE: usize = 8;

/// An opened event file.
pub(crate) struct Input {
    /// The decompressed text.
    pub reader: Box<dyn Read + Send>,
    /// True for a gzip file.
    pub gzip: bool,
    /// Bytes of the file on disk consumed so far (compressed bytes for gzip).
    pub disk_bytes: Arc<AtomicU64>,
}

struct Counting<R> {
    inner: R,
    count: Arc<AtomicU64>,
}

impl<R: Read> Read for Counting<R> {
    fn read(&mut self, buf: &mut [u8]) -> io::Result<usize> {
        let n = self.inner.read(buf)?;
        self.count.fetch_add(n as u64, Ordering::Relaxed);
        Ok(n)
    }
}

/// Receives decompressed blocks from the decompression thread.
struct ChannelReader {
    rx: Receiver<io::Result<Vec<u8>>>,
    /// Returns emptied blocks to the decompression thread for reuse.
    back: Sender<Vec<u8>>,
    block: Vec<u8>,
    pos: usize,
    done: bool,
}

impl Read for ChannelReader {
    fn read(&mut self, buf: &mut [u8]) -> io::Result<usize> {
        while self.pos == self.block.len() {
            if self.done {
                return Ok(0);
            }
            match self.rx.recv() {
                Ok(Ok(b)) => {
                    let old = std::mem::replace(&mut self.block, b);
                    if old.capacity() > 0 {
                        let _ = self.back.send(old);
                    }
                    self.pos = 0;
                }
                Ok(Err(e)) => {
                    self.done = true;
                    return Err(e);
                }
                // The sender finished: end of the stream.
                Err(_) => {
                    self.done = true;
                    return Ok(0);
                }
            }
        }
        let n = buf.len().min(self.block.len() - self.pos);
        buf[..n].copy_from_slice(&self.block[self.pos..self.pos + n]);
        self.pos += n;
        Ok(n)
    }
}

/// Opens `path`, detecting gzip by its first two bytes.
pub(crate) fn open_input(path: &Path) -> io::Result<Input> {
    let mut file = File::open(path)?;
    let mut magic = [0u8; 2];
    let mut got = 0;
    while got < 2 {
        let n = file.read(&mut magic[got..])?;
        if n == 0 {
            break;
        }
        got += n;
    }
    let disk_bytes = Arc::new(AtomicU64::new(0));
    let file = File::open(path)?;
    let counted = Counting {
        inner: file,
        count: Arc::clone(&disk_bytes),
    };
    if got == 2 && magic == [0x1f, 0x8b] {
        let (tx, rx) = sync_channel::<io::Result<Vec<u8>>>(GZIP_QUEUE);
        let (back, returned) = channel::<Vec<u8>>();
        std::thread::Builder::new()
            .name("recoil-gunzip".into())
            .spawn(move || {
                let mut dec =
                    flate2::read::MultiGzDecoder::new(BufReader::with_capacity(1 << 16, counted));
                loop {
                    let mut block = returned.try_recv().unwrap_or_default();
                    block.resize(GZIP_BLOCK, 0);
                    let mut filled = 0;
                    let res = loop {
                        match dec.read(&mut block[filled..]) {
                            Ok(0) => break Ok(()),
                            Ok(n) => {
                                filled += n;
                                if filled == block.len() {
                                    break Ok(());
                                }
                            }
                            Err(e) if e.kind() == io::ErrorKind::Interrupted => {}
                            Err(e) => break Err(e),
                        }
                    };
                    block.truncate(filled);
                    let end = filled < GZIP_BLOCK;
                    if filled > 0 && tx.send(Ok(block)).is_err() {
                        return;
                    }
                    if let Err(e) = res {
                        let _ = tx.send(Err(e));
                        return;
                    }
                    if end {
                        return;
                    }
                }
            })?;
        Ok(Input {
            reader: Box::new(ChannelReader {
                rx,
                back,
                block: Vec::new(),
                pos: 0,
                done: false,
            }),
            gzip: true,
            disk_bytes,
        })
    } else {
        Ok(Input {
            reader: Box::new(counted),
            gzip: false,
            disk_bytes,
        })
    }
}

/// Reads from `r` until `buf` holds `want` bytes or the stream ends;
/// returns true at the end of the stream.
pub(crate) fn fill(r: &mut dyn Read, buf: &mut Vec<u8>, want: usize) -> io::Result<bool> {
    if buf.len() >= want {
        return Ok(false);
    }
    let need = (want - buf.len()) as u64;
    buf.reserve(want - buf.len());
    let got = r.take(need).read_to_end(buf)? as u64;
    Ok(got < need)
}

/// Reads from `r` into `buf[*filled..want]` (growing `buf` to `want`
/// bytes when shorter) until `want` bytes are filled or the stream ends;
/// returns true at the end of the stream. Bytes of `buf` beyond `*filled`
/// are scratch space.
pub(crate) fn fill_into(
    r: &mut dyn Read,
    buf: &mut Vec<u8>,
    filled: &mut usize,
    want: usize,
) -> io::Result<bool> {
    if buf.len() < want {
        buf.resize(want, 0);
    }
    while *filled < want {
        match r.read(&mut buf[*filled..want]) {
            Ok(0) => return Ok(true),
            Ok(n) => *filled += n,
            Err(e) if e.kind() == io::ErrorKind::Interrupted => {}
            Err(e) => return Err(e),
        }
    }
    Ok(false)
}
