//! A sample of event files: opening and validating the headers, then one
//! streaming pass over all events on all cores, in constant memory.
//!
//! Fed by file paths and [`super::ReadOptions`]; feeds the later stages
//! through [`EventSource::for_each_chunk`].
//!
//! How the pass works: a reading thread of its own, outside the rayon pool,
//! takes each file in blocks of [`BLOCK_BYTES`] (a plain file as a
//! memory-mapped window per block, see [`super::mapped`]; a gzip file or a
//! pipe read into memory, gzip decompressed on a further thread), cuts each
//! block just before the line of its last `<event>` tag (a position that
//! depends only on the file content, never on the number of threads), and
//! hands the chunk to the rayon pool, where it is parsed. A chunk is mapped
//! (detector, selection, …) once the first event index of the chunk within
//! its file is known, that is, once every earlier chunk has been parsed
//! ([`EventBases`]); a chunk parsed before then is mapped by the worker that
//! parses the last of the earlier ones, so no worker waits. Results come
//! back out of order and are consumed strictly in order on the calling
//! thread; at most a fixed window of chunks is in flight, so memory does not
//! grow with the file size.

use super::error::EventError;
use super::gzip::{Input, fill, fill_into, open_input};
use super::init::{FileInfo, HeaderFault, find_init_end, parse_head};
use super::mapped::MappedFile;
use super::parse::{
    BodyFault, ChunkPlace, ParsedChunk, ProcessSums, is_event_tag_line, parse_chunk,
};
use super::weights::{SampleSummary, summarize};
use super::{ChunkContext, Event, FileCombination, ReadOptions};
use std::collections::BTreeMap;
use std::path::{Path, PathBuf};
use std::sync::atomic::{AtomicUsize, Ordering};
use std::sync::{Mutex, mpsc};

/// Target size of a chunk of event text [bytes]. Chunk boundaries depend
/// on this constant and the file content only.
///
/// 1 MiB: a chunk then stays in the cache between the reading thread's
/// copy and the worker's parse (0.92× the wall time of 4 MiB blocks for a
/// recast of 200 000 events on 2 cores, 15 alternating pairs); 256 KiB
/// blocks were slower again (more chunks, each relearning line shapes).
pub const BLOCK_BYTES: usize = 1 << 20;

/// Largest span of text without a new event the reader accepts [bytes].
pub const MAX_EVENT_BYTES: usize = 256 << 20;

/// Largest header (first line to `</init>`) the reader accepts [bytes].
pub const MAX_HEADER_BYTES: usize = 64 << 20;

/// What the headers and `<init>` blocks of a sample's files say.
#[derive(Debug, Clone, PartialEq, Default, serde::Serialize, serde::Deserialize)]
pub struct SampleInfo {
    /// Names of the per-event weight variations, in the order of
    /// [`Event::weights`]; empty when the sample has none.
    pub weight_names: Vec<String>,
    /// Per-file header information, in the order given to
    /// [`EventSource::open`].
    pub files: Vec<FileInfo>,
    /// How the files are combined.
    pub combination: FileCombination,
    /// PDG ids treated as invisible (absolute values, sorted).
    pub invisible_ids: Vec<i32>,
}

/// A sample of one or more event files, opened and validated up to the
/// first event, ready to stream.
#[derive(Debug)]
pub struct EventSource {
    info: SampleInfo,
}

fn io_err(path: &Path, input: Option<&Input>, offset: u64, e: std::io::Error) -> EventError {
    if input.is_some_and(|i| i.gzip) {
        EventError::Gzip {
            path: path.to_path_buf(),
            offset,
            source: e,
        }
    } else {
        EventError::Io {
            path: path.to_path_buf(),
            source: e,
        }
    }
}

/// No event tag in the longest span of text the reader accepts, from byte
/// `offset` of the (decompressed) text on.
fn no_event_within(path: &Path, offset: u64) -> EventError {
    EventError::Sample {
        path: path.to_path_buf(),
        rule: format!(
            "no <event> tag starts a line within {} MiB after byte {offset} of the text",
            MAX_EVENT_BYTES >> 20
        ),
    }
}

/// The text of a chunk: a block read into memory (gzip files, pipes), or a
/// memory-mapped window of a plain file.
enum ChunkText {
    Read(Vec<u8>),
    Mapped(memmap2::Mmap),
}

impl ChunkText {
    fn bytes(&self) -> &[u8] {
        match self {
            ChunkText::Read(b) => b,
            ChunkText::Mapped(m) => m,
        }
    }
}

fn header_err(path: &Path, f: HeaderFault) -> EventError {
    EventError::Header {
        path: path.to_path_buf(),
        line: f.line,
        rule: f.rule,
    }
}

/// Reads and validates the header and `<init>` block of one file.
pub fn read_file_info(path: &Path) -> Result<FileInfo, EventError> {
    let mut input = open_input(path).map_err(|e| io_err(path, None, 0, e))?;
    let mut head = Vec::new();
    let mut want = 1 << 16;
    loop {
        let eof = fill(&mut input.reader, &mut head, want)
            .map_err(|e| io_err(path, Some(&input), head.len() as u64, e))?;
        if head.is_empty() {
            return Err(header_err(
                path,
                HeaderFault {
                    line: 1,
                    rule: "empty file (0 bytes of text)".into(),
                },
            ));
        }
        if let Some(end) = find_init_end(&head, eof) {
            return parse_head(path, input.gzip, &head[..end]).map_err(|f| header_err(path, f));
        }
        if eof || head.len() >= MAX_HEADER_BYTES {
            // Let the header parser name what is missing.
            let err = parse_head(path, input.gzip, &head)
                .err()
                .unwrap_or(HeaderFault {
                    line: 1,
                    rule: format!("no </init> within the first {} MiB", MAX_HEADER_BYTES >> 20),
                });
            return Err(header_err(path, err));
        }
        want *= 2;
    }
}

impl EventSource {
    /// Opens every file, reads and validates its header and `<init>` block.
    pub fn open<P: AsRef<Path>>(paths: &[P], opts: ReadOptions) -> Result<Self, EventError> {
        if paths.is_empty() {
            return Err(EventError::Option("no event files given".into()));
        }
        let mut files = Vec::with_capacity(paths.len());
        for p in paths {
            files.push(read_file_info(p.as_ref())?);
        }
        let weight_names = files[0].weight_names.clone();
        for f in &files[1..] {
            if f.weight_names != weight_names {
                return Err(EventError::Sample {
                    path: f.path.clone(),
                    rule: format!(
                        "its {} weight names differ from the {} of {} (files of one sample must share them)",
                        f.weight_names.len(),
                        weight_names.len(),
                        files[0].path.display()
                    ),
                });
            }
        }
        Ok(Self {
            info: SampleInfo {
                weight_names,
                files,
                combination: opts.combination,
                invisible_ids: opts.invisible.ids().to_vec(),
            },
        })
    }

    /// Header information of the sample.
    pub fn info(&self) -> &SampleInfo {
        &self.info
    }

    /// Streams every event once, in constant memory, on all cores.
    ///
    /// Files are cut into chunks at event boundaries that depend only on the
    /// file content, never on the number of threads. `map` runs on worker
    /// threads, one call per chunk; `consume` receives the results strictly
    /// in file and chunk order. `progress` is called with the number of
    /// bytes read so far (bytes on disk, so compressed bytes for gzip
    /// files). The first error in file order stops the pass.
    ///
    /// A reading thread of its own reads and cuts the files, `map` runs in
    /// the rayon pool of the calling thread (the global pool unless called
    /// inside `ThreadPool::install`), and `consume` runs on the calling
    /// thread. Called from a pool worker, that worker parses chunks while it
    /// waits, so passes nested in parallel work cannot deadlock and every
    /// worker parses.
    pub fn for_each_chunk<T, M, C>(
        self,
        map: M,
        mut consume: C,
        progress: Option<&(dyn Fn(u64) + Sync)>,
    ) -> Result<SampleSummary, EventError>
    where
        T: Send,
        M: Fn(&ChunkContext, &[Event]) -> T + Sync,
        C: FnMut(T),
    {
        let info = &self.info;
        let window = 2 * rayon::current_num_threads() + 2;
        // Sequence number of the earliest failed chunk; later chunks are skipped.
        let first_failure = AtomicUsize::new(usize::MAX);
        let mut sums: Vec<Vec<ProcessSums>> = vec![Vec::new(); info.files.len()];

        // A chunk is parsed without knowing where in its file it starts; a
        // failed chunk comes back with its text, and the consumer, which
        // knows the lines and events of all earlier chunks, parses it again
        // at its place in the file to name the file's line and event.
        type Out<T> = Result<(T, ParsedChunkMeta), ChunkFailure>;
        let mut line_base: Vec<u64> = info.files.iter().map(|f| f.body_line).collect();
        let mut event_base: Vec<u64> = vec![0; info.files.len()];
        // First event indices of parsed chunks, and parsed chunks waiting
        // for theirs.
        let bases: Mutex<EventBases<(usize, ParsedChunk)>> = Mutex::new(EventBases::default());
        let mut done_bytes: u64 = 0;
        let result: Result<(), EventError> = rayon::in_place_scope(|scope| {
            let (tx, rx) = mpsc::channel::<(usize, Out<T>)>();
            let (recycled_tx, recycled_rx) = mpsc::channel::<Vec<u8>>();
            // Parsed events of finished chunks, refilled by later chunks.
            let (spare_tx, spare_rx) = mpsc::channel::<Vec<Event>>();
            // At most `window` chunks in flight: the reader puts a token in
            // before it issues a chunk (waiting while the channel is full),
            // the consumer takes one out per chunk consumed; a dropped
            // receiver tells the reader that the consumer has stopped.
            let (slot_tx, slot_rx) = mpsc::sync_channel::<()>(window);
            let mut pending: BTreeMap<usize, Out<T>> = BTreeMap::new();
            let mut consumed = 0usize;
            // The file-order state of the consumer: did the previous chunk
            // of this file end with </LesHouchesEvents>?
            let mut after_end_tag: Option<(usize, PathBuf)> = None;

            // Consumes every result that is next in order; stops at the first error.
            let mut drain = |pending: &mut BTreeMap<usize, Out<T>>,
                             consumed: &mut usize,
                             sums: &mut Vec<Vec<ProcessSums>>|
             -> Result<(), EventError> {
                while let Some(out) = pending.remove(consumed) {
                    *consumed += 1;
                    let (value, meta) = match out {
                        Ok(x) => x,
                        Err(failure) => {
                            let fi = failure.file_index;
                            let path = info.files[fi].path.clone();
                            let f =
                                failure.at_place(&info.files[fi], line_base[fi], event_base[fi]);
                            return Err(match f.event {
                                Some(event) => EventError::Event {
                                    path,
                                    event,
                                    line: f.line,
                                    rule: f.rule,
                                },
                                None => EventError::Body {
                                    path,
                                    line: f.line,
                                    rule: f.rule,
                                },
                            });
                        }
                    };
                    if let Some((fi, path)) = &after_end_tag
                        && *fi == meta.file_index
                        && meta.n_events > 0
                    {
                        return Err(EventError::Body {
                            path: path.clone(),
                            line: line_base[meta.file_index],
                            rule: "events after </LesHouchesEvents>".into(),
                        });
                    }
                    line_base[meta.file_index] += meta.n_lines;
                    event_base[meta.file_index] += meta.n_events;
                    if meta.end_tag {
                        after_end_tag =
                            Some((meta.file_index, info.files[meta.file_index].path.clone()));
                    }
                    merge_sums(&mut sums[meta.file_index], &meta.sums);
                    consume(value);
                }
                Ok(())
            };

            // The reading loop, on a thread of its own outside the pool, so
            // that every worker (the calling thread too, when it is one)
            // parses: chunks spawned from outside the pool go to its shared
            // queue. Returns the bytes read, or the reading error (chunks
            // issued before it still count).
            let first_failure = &first_failure;
            let map = &map;
            let bases = &bases;
            let run = move || -> Result<u64, EventError> {
                let mut issued = 0usize;
                let mut done_bytes: u64 = 0;
                // Hands the chunk `text[..cut]` of file `file_index` to the
                // pool; false when the consumer has stopped.
                let mut issue = |text: ChunkText,
                                 cut: usize,
                                 eof: bool,
                                 file_index: usize,
                                 starts_file: bool|
                 -> bool {
                    let file = &info.files[file_index];
                    if slot_tx.send(()).is_err() {
                        return false;
                    }
                    let seq = issued;
                    issued += 1;
                    let spare = spare_rx.try_recv().unwrap_or_default();
                    let tx = tx.clone();
                    let recycled_tx = recycled_tx.clone();
                    let spare_tx = spare_tx.clone();
                    scope.spawn(move |_| {
                        if seq > first_failure.load(Ordering::Relaxed) {
                            let skipped = BodyFault {
                                event: None,
                                line: 1,
                                rule: "skipped after an earlier error".into(),
                            };
                            let failure = ChunkFailure {
                                file_index,
                                fault: skipped,
                                text: None,
                            };
                            let _ = tx.send((seq, Err(failure)));
                            return;
                        }
                        // Line and event numbers from the chunk's start; the
                        // consumer places a fault in the file.
                        let place = ChunkPlace {
                            first_line: 1,
                            first_event: 0,
                            last: eof,
                        };
                        let parsed = match parse_chunk(&text.bytes()[..cut], file, &place, spare) {
                            Ok(parsed) => parsed,
                            Err(fault) => {
                                first_failure.fetch_min(seq, Ordering::Relaxed);
                                let failure = ChunkFailure {
                                    file_index,
                                    fault,
                                    text: Some((text, cut, eof)),
                                };
                                let _ = tx.send((seq, Err(failure)));
                                return;
                            }
                        };
                        // The events are owned: a read block is reused now, a
                        // mapped window unmapped.
                        if let ChunkText::Read(buf) = text {
                            let _ = recycled_tx.send(buf);
                        }
                        let n_events = parsed.events.len() as u64;
                        // Map this chunk, when every earlier chunk of its file
                        // has been parsed, and the later chunks that waited
                        // for it; otherwise leave it to the worker that
                        // parses the last earlier chunk.
                        let ready = bases
                            .lock()
                            .unwrap_or_else(std::sync::PoisonError::into_inner)
                            .parsed(seq, starts_file, n_events, (file_index, parsed));
                        for (seq, first_event_index, (file_index, parsed)) in ready {
                            let ctx = ChunkContext {
                                file_index,
                                first_event_index,
                            };
                            let value = map(&ctx, &parsed.events);
                            let meta = ParsedChunkMeta {
                                file_index,
                                n_lines: parsed.n_lines,
                                n_events: parsed.events.len() as u64,
                                end_tag: parsed.end_tag,
                                sums: parsed.sums,
                            };
                            let _ = spare_tx.send(parsed.events);
                            let _ = tx.send((seq, Ok((value, meta))));
                        }
                    });
                    true
                };
                for (file_index, file) in info.files.iter().enumerate() {
                    let path = &file.path;
                    let mut starts_file = true;
                    // Plain files: one memory-mapped window per chunk (gzip
                    // was detected when the header was read).
                    let mapped = if file.gzip {
                        None
                    } else {
                        MappedFile::open(path).map_err(|e| io_err(path, None, 0, e))?
                    }
                    .filter(|m| m.len >= file.body_offset);
                    if let Some(m) = mapped {
                        // The same cuts as the reading loop below: each
                        // window starts at the previous cut and holds at
                        // least `BLOCK_BYTES` and one byte more than the
                        // text already looked at beyond that cut.
                        let mut pos = file.body_offset;
                        let mut seen_end = pos;
                        let mut eof = false;
                        while !eof {
                            let mut want = BLOCK_BYTES.max((seen_end - pos) as usize + 1);
                            let (window, cut) = loop {
                                let left = m.len - pos;
                                eof = left < want as u64;
                                let filled = if eof { left as usize } else { want };
                                let window = m
                                    .window(pos, filled)
                                    .map_err(|e| io_err(path, None, pos, e))?;
                                seen_end = pos + filled as u64;
                                if eof {
                                    break (window, filled);
                                }
                                match last_event_start(&window) {
                                    Some(c) if c > 0 => break (window, c),
                                    _ if filled >= MAX_EVENT_BYTES => {
                                        return Err(no_event_within(path, pos));
                                    }
                                    _ => want = filled * 2,
                                }
                            };
                            pos += cut as u64;
                            let text = ChunkText::Mapped(window);
                            if !issue(text, cut, eof, file_index, std::mem::take(&mut starts_file))
                            {
                                return Ok(done_bytes);
                            }
                            if let Some(p) = progress {
                                p(done_bytes + pos);
                            }
                        }
                        done_bytes += m.len;
                        continue;
                    }
                    // Gzip files, pipes and devices: blocks read into memory.
                    let mut input = open_input(path).map_err(|e| io_err(path, None, 0, e))?;
                    // Skip the header.
                    let mut skip = Vec::new();
                    let offset = usize::try_from(file.body_offset).unwrap_or(usize::MAX);
                    fill(&mut input.reader, &mut skip, offset)
                        .map_err(|e| io_err(path, Some(&input), 0, e))?;
                    if skip.len() != offset {
                        return Err(EventError::Sample {
                            path: path.clone(),
                            rule: "the file changed since it was opened (header shorter)".into(),
                        });
                    }
                    drop(skip);
                    let mut text_offset = file.body_offset;
                    let mut carry: Vec<u8> = Vec::new();
                    let mut eof = false;
                    while !eof {
                        // Reuse a buffer a worker has finished with: its
                        // memory is already initialised, so reading into it
                        // costs no clearing and no allocation.
                        let mut buf = recycled_rx.try_recv().unwrap_or_default();
                        if buf.len() < carry.len() {
                            buf.resize(carry.len(), 0);
                        }
                        buf[..carry.len()].copy_from_slice(&carry);
                        let mut filled = carry.len();
                        let mut want = BLOCK_BYTES.max(filled + 1);
                        let cut = loop {
                            eof = fill_into(&mut input.reader, &mut buf, &mut filled, want)
                                .map_err(|e| {
                                    io_err(path, Some(&input), text_offset + filled as u64, e)
                                })?;
                            if eof {
                                break filled;
                            }
                            match last_event_start(&buf[..filled]) {
                                Some(c) if c > 0 => break c,
                                _ if filled >= MAX_EVENT_BYTES => {
                                    return Err(no_event_within(path, text_offset));
                                }
                                _ => want = filled * 2,
                            }
                        };
                        carry.clear();
                        carry.extend_from_slice(&buf[cut..filled]);
                        text_offset += cut as u64;
                        let text = ChunkText::Read(buf);
                        if !issue(text, cut, eof, file_index, std::mem::take(&mut starts_file)) {
                            return Ok(done_bytes);
                        }
                        if let Some(p) = progress {
                            p(done_bytes + input.disk_bytes.load(Ordering::Relaxed));
                        }
                    }
                    done_bytes += input.disk_bytes.load(Ordering::Relaxed);
                }
                Ok(done_bytes)
            };
            std::thread::scope(|threads| -> Result<(), EventError> {
                // Owned here, so that an early return (a failed chunk) drops
                // it before the reader is joined, and the reader stops.
                let slot_rx = slot_rx;
                let reader = std::thread::Builder::new()
                    .name("recoil-reader".into())
                    .spawn_scoped(threads, run)
                    .map_err(|e| {
                        EventError::Format(format!("cannot start the reading thread: {e}"))
                    })?;
                // Consume in order until every sender (the reader and the
                // chunks it spawned) is gone; stop at the first error in
                // file order, which wins over a later reading error.
                while let Some((seq, out)) = receive(&rx) {
                    pending.insert(seq, out);
                    let before = consumed;
                    drain(&mut pending, &mut consumed, &mut sums)?;
                    for _ in before..consumed {
                        // invariant: the reader put this chunk's token in
                        // before issuing it, so this never waits.
                        let _ = slot_rx.recv();
                    }
                }
                match reader.join() {
                    Ok(Ok(bytes)) => {
                        done_bytes = bytes;
                        Ok(())
                    }
                    Ok(Err(read_error)) => Err(read_error),
                    Err(_) => Err(EventError::Format(
                        "internal: the reading thread failed".into(),
                    )),
                }
            })
        });
        result?;
        if let Some(p) = progress {
            p(done_bytes);
        }
        summarize(&info.files, &sums, info.combination, &info.weight_names).map_err(|f| {
            EventError::Sample {
                path: info.files[f.file_index].path.clone(),
                rule: f.rule,
            }
        })
    }
}

/// Receives the next result. On a rayon worker thread (when the caller
/// runs inside a pool) it runs queued pool tasks while waiting, so a pool
/// of one thread cannot deadlock; elsewhere it blocks.
fn receive<X>(rx: &mpsc::Receiver<X>) -> Option<X> {
    loop {
        match rayon::yield_now() {
            None => return rx.recv().ok(),
            Some(rayon::Yield::Executed) => match rx.try_recv() {
                Ok(x) => return Some(x),
                Err(mpsc::TryRecvError::Empty) => {}
                Err(mpsc::TryRecvError::Disconnected) => return None,
            },
            Some(rayon::Yield::Idle) => {
                match rx.recv_timeout(std::time::Duration::from_micros(200)) {
                    Ok(x) => return Some(x),
                    Err(mpsc::RecvTimeoutError::Timeout) => {}
                    Err(mpsc::RecvTimeoutError::Disconnected) => return None,
                }
            }
        }
    }
}

/// What the consumer needs from a parsed chunk besides the mapped value.
struct ParsedChunkMeta {
    file_index: usize,
    n_lines: u64,
    n_events: u64,
    end_tag: bool,
    sums: Vec<ProcessSums>,
}

/// A chunk that failed: its file, the fault with line and event numbers
/// counted from the chunk's start, and, when it was parsed, its text, the
/// length of the chunk and whether it is the file's last chunk.
struct ChunkFailure {
    file_index: usize,
    fault: BodyFault,
    text: Option<(ChunkText, usize, bool)>,
}

impl ChunkFailure {
    /// The fault placed in the file, for a chunk whose first line is line
    /// `first_line` of the file and whose first event is the file's event
    /// `first_event` (0-based): the chunk is parsed again there, so that
    /// every line and event number in the fault, its message included, is
    /// the file's.
    fn at_place(self, file: &FileInfo, first_line: u64, first_event: u64) -> BodyFault {
        let place_fault = |f: BodyFault| BodyFault {
            event: f.event.map(|e| first_event + e),
            line: first_line + f.line - 1,
            rule: f.rule,
        };
        let Some((text, cut, last)) = self.text else {
            return place_fault(self.fault);
        };
        let place = ChunkPlace {
            first_line,
            first_event,
            last,
        };
        match parse_chunk(&text.bytes()[..cut], file, &place, Vec::new()) {
            Err(fault) => fault,
            // Parsing is deterministic; this keeps the first fault if not.
            Ok(_) => place_fault(self.fault),
        }
    }
}

/// First event indices of chunks within their files, learnt as chunks are
/// parsed in any order: chunk k's index is known once chunks 0…k−1 have
/// been parsed (the sum of the events of the earlier chunks of its file).
/// A chunk parsed before that waits here with its payload `W`.
#[derive(Debug)]
struct EventBases<W> {
    /// Chunks before this sequence number have known indices.
    known: usize,
    /// Index of the first event of chunk `known` unless it starts a file.
    next: u64,
    /// Parsed chunks from `known` on: starts its file, number of events,
    /// payload.
    waiting: BTreeMap<usize, (bool, u64, W)>,
}

impl<W> Default for EventBases<W> {
    fn default() -> Self {
        Self {
            known: 0,
            next: 0,
            waiting: BTreeMap::new(),
        }
    }
}

impl<W> EventBases<W> {
    /// Records chunk `seq` as parsed, with `n_events` events; returns the
    /// chunks whose first event index is now known, in order, with that
    /// index: `payload` itself first when chunk `seq` is among them.
    fn parsed(
        &mut self,
        seq: usize,
        starts_file: bool,
        n_events: u64,
        payload: W,
    ) -> Vec<(usize, u64, W)> {
        self.waiting.insert(seq, (starts_file, n_events, payload));
        let mut ready = Vec::new();
        while let Some((starts_file, n, w)) = self.waiting.remove(&self.known) {
            let first = if starts_file { 0 } else { self.next };
            ready.push((self.known, first, w));
            self.next = first + n;
            self.known += 1;
        }
        ready
    }
}

fn merge_sums(into: &mut Vec<ProcessSums>, from: &[ProcessSums]) {
    for s in from {
        match into.iter_mut().find(|t| t.process_id == s.process_id) {
            Some(t) => {
                t.n += s.n;
                t.sum_w += s.sum_w;
                t.sum_w2 += s.sum_w2;
                t.n_negative += s.n_negative;
            }
            None => into.push(s.clone()),
        }
    }
}

/// Byte offset of the start of the line holding the last event tag (by
/// the rule of [`is_event_tag_line`]).
fn last_event_start(buf: &[u8]) -> Option<usize> {
    memchr::memmem::rfind_iter(buf, b"<event").find_map(|pos| {
        let start = memchr::memrchr(b'\n', &buf[..pos]).map_or(0, |i| i + 1);
        is_event_tag_line(&buf[start..]).then_some(start)
    })
}

#[cfg(test)]
mod tests {
    use super::{EventBases, is_event_tag_line, last_event_start};

    // Expected counts by hand (common practice, no source): an event tag
    // counts when only blanks precede it on its line and `>`, a blank,
    // `\r` or `/` follows `<event`.
    #[test]
    fn event_tags_are_found_at_line_starts_only() {
        let text = b"<event>\n  <event x='1'>\n<events>\nfoo <event>\n</event>\n\t<event/>\n<event\r\nv<event>\n<eventv";
        let lines = |t: &[u8]| {
            t.split(|&b| b == b'\n')
                .filter(|l| is_event_tag_line(l))
                .count()
        };
        assert_eq!(lines(text), 4);
        assert_eq!(lines(b""), 0);
        assert_eq!(lines(b"v"), 0);
        assert_eq!(lines(b"<event"), 0);
        assert_eq!(last_event_start(text), Some(64));
    }

    // Expected indices by hand: chunks of 3, 2 | 4 | 1 events, the third
    // chunk starting the second file; parsed in the order 2, 0, 3, 1.
    #[test]
    fn first_event_indices_are_known_once_earlier_chunks_are_parsed() {
        let mut b = EventBases::default();
        assert!(b.parsed(2, true, 4, 'c').is_empty());
        assert_eq!(b.parsed(0, true, 3, 'a'), vec![(0, 0, 'a')]);
        assert!(b.parsed(3, false, 1, 'd').is_empty());
        assert_eq!(
            b.parsed(1, false, 2, 'b'),
            vec![(1, 3, 'b'), (2, 0, 'c'), (3, 4, 'd')]
        );
        assert!(b.waiting.is_empty());
    }
}
