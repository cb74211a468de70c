//! The zero-copy hot path: parses a chunk of event text (whole `<event>`
//! blocks, cut at event boundaries by [`super::source`]) into [`Event`]s,
//! checking every rule of the event body.
//!
//! Event layout (hep-ph/0609017, Sec. 2): a line `NUP IDPRUP XWGTUP SCALUP
//! AQEDUP AQCDUP`, then NUP particle lines of 13 columns `IDUP ISTUP
//! MOTHUP(1) MOTHUP(2) ICOLUP(1) ICOLUP(2) PUP(1..5) VTIMUP SPINUP`, then
//! optional information, which may hold the LHEF 3.0 weights `<rwgt>` with
//! `<wgt id=…>` lines or a `<weights>` list.

use super::init::{FileInfo, attribute, lossy as show, opens_tag};
use super::number::{Cursor, fields, parse_f64, parse_i32, trim, word};
use super::particle_line::ShapeMemo;
use super::weight_block::WeightMemo;
use super::{Event, Particle};
use crate::kinematics::P4;

/// Per-process weight sums of a chunk, in order of first appearance.
#[derive(Debug, Clone, Default, PartialEq)]
pub(crate) struct ProcessSums {
    pub process_id: i32,
    pub n: u64,
    pub sum_w: f64,
    pub sum_w2: f64,
    pub n_negative: u64,
}

/// Result of parsing one chunk.
#[derive(Debug, Default)]
pub(crate) struct ParsedChunk {
    pub events: Vec<Event>,
    pub sums: Vec<ProcessSums>,
    /// True when the chunk holds `</LesHouchesEvents>`.
    pub end_tag: bool,
    /// Lines in the chunk.
    pub n_lines: u64,
}

/// Where a chunk sits in its file, for error messages.
pub(crate) struct ChunkPlace {
    /// Line number (1-based) of the chunk's first line.
    pub first_line: u64,
    /// Number (0-based) of the chunk's first event within the file.
    pub first_event: u64,
    /// True for the file's last chunk (the end tag must be in it).
    pub last: bool,
}

/// A rule broken inside a chunk.
#[derive(Debug)]
pub(crate) struct BodyFault {
    /// Event number (1-based, within the file), if inside an event.
    pub event: Option<u64>,
    pub line: u64,
    pub rule: String,
}

struct Lines<'a> {
    rest: &'a [u8],
    line: u64,
}

impl<'a> Lines<'a> {
    #[inline]
    fn next_line(&mut self) -> Option<&'a [u8]> {
        if self.rest.is_empty() {
            return None;
        }
        let (l, r) = match memchr::memchr(b'\n', self.rest) {
            Some(i) => (&self.rest[..i], &self.rest[i + 1..]),
            None => (self.rest, &self.rest[self.rest.len()..]),
        };
        self.rest = r;
        self.line += 1;
        Some(l)
    }

    /// The text from the start of the next line to the end of the chunk.
    #[inline]
    fn rest(&self) -> &'a [u8] {
        self.rest
    }

    /// Steps over the next line, read in place as its first `len` bytes
    /// (newline included when there is one).
    #[inline]
    fn step_over(&mut self, len: usize) {
        self.step_over_lines(len, 1);
    }

    /// Steps over the next `n` lines, read in place as the first `len`
    /// bytes.
    #[inline]
    fn step_over_lines(&mut self, len: usize, n: u64) {
        self.rest = &self.rest[len..];
        self.line += n;
    }
}

/// Parses a chunk. `data` starts at a line start outside any event.
///
/// `spare` holds events of an earlier chunk whose particle and weight
/// vectors are refilled in place, so a pass over a file allocates only
/// while the first chunks are parsed; pass an empty vector when there is
/// none.
pub(crate) fn parse_chunk(
    data: &[u8],
    file: &FileInfo,
    place: &ChunkPlace,
    spare: Vec<Event>,
) -> Result<ParsedChunk, BodyFault> {
    let mut out = ParsedChunk {
        events: spare,
        ..Default::default()
    };
    let mut n_events = 0usize;
    let mut lines = Lines {
        rest: data,
        line: place.first_line - 1,
    };
    let mut event_no = place.first_event;
    let mut in_comment = false;
    let mut comment_line = 0;
    let tags = WeightTags::new(file);
    let mut shapes = ShapeMemo::default();
    let mut blocks = WeightMemo::default();
    while let Some(raw) = lines.next_line() {
        let line = trim(raw);
        if line.is_empty() {
            continue;
        }
        if in_comment {
            // Chunks are cut before every such line, so a comment must
            // not hold one.
            if is_event_tag_line(raw) {
                return Err(event_tag_in_comment(lines.line, comment_line));
            }
            if memchr::memmem::find(line, b"-->").is_some() {
                in_comment = false;
            }
            continue;
        }
        if out.end_tag {
            return Err(BodyFault {
                event: None,
                line: lines.line,
                rule: format!("text after </LesHouchesEvents>: '{}'", show(line)),
            });
        }
        if opens_tag(line, b"event") {
            event_no += 1;
            if n_events == out.events.len() {
                out.events.push(Event::default());
            }
            let ev = &mut out.events[n_events];
            parse_event(
                &mut lines,
                file,
                &tags,
                &mut shapes,
                &mut blocks,
                event_no,
                ev,
            )?;
            add_sums(&mut out.sums, ev);
            n_events += 1;
        } else if line.starts_with(b"</LesHouchesEvents>") {
            out.end_tag = true;
        } else if line.starts_with(b"<!--") {
            in_comment = memchr::memmem::find(line, b"-->").is_none();
            comment_line = lines.line;
        } else {
            return Err(BodyFault {
                event: None,
                line: lines.line,
                rule: format!(
                    "expected <event> or </LesHouchesEvents> after event {event_no}, got '{}'",
                    show(line)
                ),
            });
        }
    }
    if in_comment && !place.last {
        // The chunk was cut before an event tag line inside the comment.
        return Err(event_tag_in_comment(lines.line + 1, comment_line));
    }
    out.events.truncate(n_events);
    out.n_lines = lines.line + 1 - place.first_line;
    if place.last && !out.end_tag {
        return Err(BodyFault {
            event: None,
            line: lines.line,
            rule: format!(
                "file is truncated: it ends after event {event_no} without </LesHouchesEvents>"
            ),
        });
    }
    Ok(out)
}

/// True when `line` (without its newline) opens an event by the rule the
/// chunks are cut by: only blanks before `<event`, and `>`, a blank, `\r`
/// or `/` after it.
pub(crate) fn is_event_tag_line(line: &[u8]) -> bool {
    let start = line
        .iter()
        .position(|&b| b != b' ' && b != b'\t')
        .unwrap_or(line.len());
    let tag = &line[start..];
    tag.starts_with(b"<event") && matches!(tag.get(6), Some(b'>' | b' ' | b'\t' | b'\r' | b'/'))
}

fn event_tag_in_comment(line: u64, comment_line: u64) -> BodyFault {
    BodyFault {
        event: None,
        line,
        rule: format!(
            "an <event> tag inside the comment opened on line {comment_line} (close the comment with --> before it)"
        ),
    }
}

fn add_sums(sums: &mut Vec<ProcessSums>, ev: &Event) {
    let i = match sums.iter().position(|s| s.process_id == ev.process_id) {
        Some(i) => i,
        None => {
            sums.push(ProcessSums {
                process_id: ev.process_id,
                ..Default::default()
            });
            sums.len() - 1
        }
    };
    let s = &mut sums[i];
    s.n += 1;
    s.sum_w += ev.weight;
    s.sum_w2 += ev.weight * ev.weight;
    s.n_negative += u64::from(ev.weight < 0.0);
}

static WGT_FINDER: std::sync::LazyLock<memchr::memmem::Finder<'static>> =
    std::sync::LazyLock::new(|| memchr::memmem::Finder::new(b"<wgt"));

const PARTICLE_COLUMNS: [&str; 13] = [
    "IDUP",
    "ISTUP",
    "MOTHUP(1)",
    "MOTHUP(2)",
    "ICOLUP(1)",
    "ICOLUP(2)",
    "px",
    "py",
    "pz",
    "E",
    "m",
    "VTIMUP",
    "SPINUP",
];
const EVENT_COLUMNS: [&str; 6] = ["NUP", "IDPRUP", "XWGTUP", "SCALUP", "AQEDUP", "AQCDUP"];

/// Parses one event into `ev`, reusing the capacity of its vectors.
fn parse_event(
    lines: &mut Lines<'_>,
    file: &FileInfo,
    tags: &WeightTags,
    shapes: &mut ShapeMemo,
    blocks: &mut WeightMemo,
    event_no: u64,
    ev: &mut Event,
) -> Result<(), BodyFault> {
    let err = |line: u64, rule: String| BodyFault {
        event: Some(event_no),
        line,
        rule,
    };
    let truncated = |line: u64| {
        err(
            line,
            "file is truncated in the middle of the event (no </event>)".to_string(),
        )
    };
    // Event line.
    let (nup, process_id, reals, line_no) = match fast_event_line(lines.rest()) {
        Some((nup, process_id, reals, len)) => {
            lines.step_over(len);
            (nup, process_id, reals, lines.line)
        }
        None => {
            let Some(raw) = lines.next_line() else {
                return Err(truncated(lines.line));
            };
            let line_no = lines.line;
            let mut cols = [&b""[..]; 6];
            let n = split_into(raw, &mut cols);
            if n != 6 {
                return Err(err(
                    line_no,
                    format!(
                        "event line has {n} columns, expected 6 (NUP IDPRUP XWGTUP SCALUP AQEDUP AQCDUP)"
                    ),
                ));
            }
            let nup = parse_i32(cols[0]).filter(|&v| v >= 0).ok_or_else(|| {
                err(
                    line_no,
                    format!("NUP must be an integer ≥ 0, got '{}'", show(cols[0])),
                )
            })?;
            let process_id = parse_i32(cols[1]).ok_or_else(|| {
                err(
                    line_no,
                    format!("IDPRUP must be an integer, got '{}'", show(cols[1])),
                )
            })?;
            let mut reals = [0.0f64; 4];
            for k in 0..4 {
                reals[k] =
                    real(cols[k + 2], EVENT_COLUMNS[k + 2], "").map_err(|r| err(line_no, r))?;
            }
            (nup, process_id, reals, line_no)
        }
    };
    if file.process(process_id).is_none() {
        let ids: Vec<String> = file.processes.iter().map(|p| p.id.to_string()).collect();
        return Err(err(
            line_no,
            format!(
                "IDPRUP {process_id} is not among the LPRUP of <init> ({})",
                ids.join(", ")
            ),
        ));
    }
    ev.process_id = process_id;
    ev.weight = reals[0];
    ev.scale_gev = reals[1];
    ev.alpha_qed = reals[2];
    ev.alpha_qcd = reals[3];
    ev.particles
        .reserve((nup as usize).saturating_sub(ev.particles.len()));
    ev.weights.clear();

    // Particle lines, read into the slots of the reused vector (cut to NUP
    // at the end): the fast path writes each field into its place, so no
    // particle is built elsewhere and copied (a copy of the particle a
    // call returned was a store-forwarding stall, 1/10 of this function).
    for i in 0..nup as usize {
        if i == ev.particles.len() {
            ev.particles.push(BLANK_PARTICLE);
        }
        if let Some(len) = fast_particle(lines.rest(), i, shapes, &mut ev.particles[i]) {
            lines.step_over(len);
            continue;
        }
        let Some(raw) = lines.next_line() else {
            return Err(truncated(lines.line));
        };
        // Slow path: read field by field to name the problem exactly.
        let line_no = lines.line;
        let mut c = [&b""[..]; 13];
        let n = split_into(raw, &mut c);
        if n != 13 {
            let t = trim(raw);
            if t.starts_with(b"<") {
                return Err(err(
                    line_no,
                    format!(
                        "NUP = {nup} but the event has only {i} particle lines (found '{}')",
                        show(t)
                    ),
                ));
            }
            return Err(err(
                line_no,
                format!("particle line {} has {n} columns, expected 13", i + 1),
            ));
        }
        let int = |k: usize| -> Result<i32, BodyFault> {
            parse_i32(c[k]).ok_or_else(|| {
                err(
                    line_no,
                    format!(
                        "particle {}: {} must be an integer, got '{}'",
                        i + 1,
                        PARTICLE_COLUMNS[k],
                        show(c[k])
                    ),
                )
            })
        };
        let mother = |k: usize| -> Result<u32, BodyFault> {
            let v = int(k)?;
            u32::try_from(v).map_err(|_| {
                err(
                    line_no,
                    format!(
                        "particle {}: {} must be ≥ 0, got {v}",
                        i + 1,
                        PARTICLE_COLUMNS[k]
                    ),
                )
            })
        };
        let id = int(0)?;
        let status = int(1)?;
        let mothers = [mother(2)?, mother(3)?];
        let colour = [int(4)?, int(5)?];
        let mut r = [0.0f64; 7];
        for k in 0..7 {
            let unit = if k < 5 {
                " GeV"
            } else if k == 5 {
                " mm"
            } else {
                ""
            };
            r[k] = real(c[k + 6], PARTICLE_COLUMNS[k + 6], unit)
                .map_err(|rule| err(line_no, format!("particle {}: {rule}", i + 1)))?;
        }
        ev.particles[i] = Particle {
            id,
            status,
            mothers,
            colour,
            p4: P4::new(r[3], r[0], r[1], r[2]),
            mass_gev: r[4],
            lifetime_mm: r[5],
            spin: r[6],
        };
    }
    ev.particles.truncate(nup as usize);

    // Optional information up to </event>.
    let n_names = file.weight_names.len();
    // Named `<wgt>` values go straight into `ev.weights` (see
    // `store_named`); it stays empty for an event without them.
    let mut positional: Vec<f64> = Vec::new();
    let mut in_weights = false;
    let mut saw_weights = false;
    let mut n_named = 0usize;
    loop {
        // Fast paths, for the usual layout only; anything else is read and
        // checked below, with the same result for every line these accept.
        if !in_weights {
            // The whole `<rwgt>` block, by the layout of an earlier one.
            if n_named == 0
                && !saw_weights
                && n_names > 0
                && blocks.may_read()
                && lines.rest().starts_with(b"<rwgt>\n")
                && let Some((len, n)) = blocks.read(lines.rest(), &tags.open, &mut ev.weights)
            {
                lines.step_over_lines(len, n);
                saw_weights = true;
                n_named = n_names;
                continue;
            }
            // The `<wgt>` line of the next declared name.
            if let Some(tag) = tags.open.get(n_named)
                && let Some((v, len)) = fast_named_weight(lines.rest(), tag)
            {
                lines.step_over(len);
                saw_weights = true;
                if !store_named(&mut ev.weights, n_names, n_named, v) {
                    let name = &file.weight_names[n_named];
                    return Err(err(lines.line, format!("weight id '{name}' appears twice")));
                }
                n_named += 1;
                continue;
            }
            // The lines around the weights, and the end of the event.
            let rest = lines.rest();
            if rest.starts_with(b"<rwgt>\n") {
                lines.step_over(b"<rwgt>\n".len());
                continue;
            }
            if rest.starts_with(b"</rwgt>\n") {
                lines.step_over(b"</rwgt>\n".len());
                continue;
            }
            if rest.starts_with(b"</event>\n") {
                lines.step_over(b"</event>\n".len());
                break;
            }
        }
        let Some(raw) = lines.next_line() else {
            return Err(truncated(lines.line));
        };
        let line_no = lines.line;
        let line = trim(raw);
        if line.starts_with(b"</event>") {
            break;
        }
        if opens_tag(line, b"event") || line.starts_with(b"</LesHouchesEvents") {
            return Err(truncated(line_no));
        }
        if in_weights || opens_tag(line, b"weights") {
            let body = if in_weights {
                line
            } else {
                saw_weights = true;
                // invariant: opens_tag found '<weights' so a '>' may follow
                match memchr::memchr(b'>', line) {
                    Some(p) => &line[p + 1..],
                    None => &line[line.len()..],
                }
            };
            let (body, closed) = match memchr::memmem::find(body, b"</weights>") {
                Some(p) => (&body[..p], true),
                None => (body, false),
            };
            for f in fields(body) {
                positional.push(real(f, "<weights> entry", "").map_err(|r| err(line_no, r))?);
            }
            in_weights = !closed;
            continue;
        }
        let wgt_pos = if line.starts_with(b"<wgt") {
            Some(0)
        } else if memchr::memchr(b'<', line).is_some() {
            WGT_FINDER.find(line)
        } else {
            None
        };
        if let Some(pos) = wgt_pos {
            saw_weights = true;
            let tag = &line[pos..];
            let Some(gt) = memchr::memchr(b'>', tag) else {
                return Err(err(
                    line_no,
                    format!("unterminated <wgt> tag '{}'", show(line)),
                ));
            };
            let Some(id) = attribute(&tag[..gt], b"id") else {
                return Err(err(line_no, format!("<wgt> without id: '{}'", show(line))));
            };
            let id = trim(id);
            let rest = &tag[gt + 1..];
            let close = memchr::memrchr(b'<', rest).filter(|&p| rest[p..].starts_with(b"</wgt>"));
            let val = match close {
                Some(p) => trim(&rest[..p]),
                None => {
                    return Err(err(
                        line_no,
                        format!("<wgt> without </wgt> on its line: '{}'", show(line)),
                    ));
                }
            };
            let v = real(val, "<wgt> value", "").map_err(|r| err(line_no, r))?;
            if n_names == 0 {
                return Err(err(
                    line_no,
                    format!(
                        "<wgt id='{}'> but the header declares no weight names (<initrwgt>)",
                        show(id)
                    ),
                ));
            }
            let guess = n_named;
            n_named += 1;
            let k = if file.weight_names.get(guess).map(String::as_bytes) == Some(id) {
                guess
            } else {
                match file.weight_names.iter().position(|n| n.as_bytes() == id) {
                    Some(k) => k,
                    None => {
                        return Err(err(
                            line_no,
                            format!("<wgt id='{}'> is not declared in <initrwgt>", show(id)),
                        ));
                    }
                }
            };
            if !store_named(&mut ev.weights, n_names, k, v) {
                return Err(err(
                    line_no,
                    format!("weight id '{}' appears twice", show(id)),
                ));
            }
            continue;
        }
        if !line.starts_with(b"<") && !line.starts_with(b"#") && looks_like_particle(line) {
            return Err(err(
                line_no,
                format!("NUP = {nup} but the event has more particle lines"),
            ));
        }
    }
    if in_weights {
        return Err(err(
            lines.line,
            "<weights> block without </weights>".to_string(),
        ));
    }
    if !ev.weights.is_empty() {
        if !positional.is_empty() {
            return Err(err(
                lines.line,
                "event has both <rwgt> and <weights>".to_string(),
            ));
        }
        if let Some(k) = ev.weights.iter().position(|w| w.is_nan()) {
            return Err(err(
                lines.line,
                format!(
                    "event lacks weight '{}' declared in <initrwgt>",
                    file.weight_names[k]
                ),
            ));
        }
    } else if saw_weights {
        if n_names > 0 && positional.len() != n_names {
            return Err(err(
                lines.line,
                format!(
                    "<weights> has {} values, the header declares {n_names} weight names",
                    positional.len()
                ),
            ));
        }
        ev.weights = positional;
    } else if n_names > 0 {
        return Err(err(
            lines.line,
            format!("event has no weights but the header declares {n_names} weight names"),
        ));
    }
    Ok(())
}

/// Stores the named weight number `k` (< `n_names`) of an event: the
/// slots are made at the first one, NaN marking a weight not yet seen
/// (`real` and the fast path give finite values only). False, storing
/// nothing, when weight `k` was already set.
#[inline]
fn store_named(weights: &mut Vec<f64>, n_names: usize, k: usize, v: f64) -> bool {
    if weights.is_empty() {
        weights.resize(n_names, f64::NAN);
    }
    // invariant: k < n_names == weights.len()
    let slot = &mut weights[k];
    if !slot.is_nan() {
        return false;
    }
    *slot = v;
    true
}

/// Reads the event line `NUP IDPRUP XWGTUP SCALUP AQEDUP AQCDUP` at the
/// start of `text` in one scan when every field is in the usual form and
/// NUP ≥ 0: the fields and the length of the line with its newline.
/// `None` sends the line to the checking slow path.
#[inline]
fn fast_event_line(text: &[u8]) -> Option<(i32, i32, [f64; 4], usize)> {
    let mut c = Cursor::new(text);
    let nup = c.i32().filter(|&n| n >= 0)?;
    let process_id = c.i32()?;
    let reals = [c.f64()?, c.f64()?, c.f64()?, c.f64()?];
    Some((nup, process_id, reals, c.line_end()?))
}

/// The opening tags `<wgt id='NAME'>` of the declared weight names, in
/// declaration order, with single and with double quotes.
pub(crate) struct WeightTags {
    open: Vec<[Vec<u8>; 2]>,
}

impl WeightTags {
    fn new(file: &FileInfo) -> Self {
        let tag = |name: &str, q: char| format!("<wgt id={q}{name}{q}>").into_bytes();
        WeightTags {
            open: file
                .weight_names
                .iter()
                .map(|n| [tag(n, '\''), tag(n, '"')])
                .collect(),
        }
    }
}

/// True when `text` starts with `prefix`; for prefixes of 8 to 16 bytes
/// (the usual weight tags) by two overlapping 8-byte comparisons.
#[inline(always)]
fn has_prefix(text: &[u8], prefix: &[u8]) -> bool {
    let n = prefix.len();
    if (8..=16).contains(&n) && text.len() >= n {
        // Both have n ≥ 8 bytes, so both words exist at 0 and at n − 8.
        word(text) == word(prefix) && word(&text[n - 8..]) == word(&prefix[n - 8..])
    } else {
        text.starts_with(prefix)
    }
}

/// Reads `<wgt id='NAME'> value </wgt>` (either quote, blanks optional
/// around the value) at the start of `text` when the tag is one of `tag`
/// (the single- and double-quoted forms of the expected name) and the value
/// is in the fast-path form, with nothing else on the line: the value and
/// the length of the line with its newline. `None` sends the line to the
/// checking slow path, which accepts everything this accepts with the same
/// result.
#[inline]
fn fast_named_weight(text: &[u8], tag: &[Vec<u8>; 2]) -> Option<(f64, usize)> {
    let quoted = usize::from(text.get(b"<wgt id=".len()) == Some(&b'"'));
    let open = &tag[quoted];
    if !has_prefix(text, open) {
        return None;
    }
    let mut c = Cursor::new(text);
    c.advance(open.len());
    let v = c.f64_before_tag()?;
    // The usual ending, one blank then the closing tag and the newline.
    if c.rest_bytes().starts_with(b" </wgt>\n") {
        return Some((v, c.position() + b" </wgt>\n".len()));
    }
    c.literal(b"</wgt>")?;
    Some((v, c.line_end()?))
}

/// A particle of zeros, for a slot that is filled right after.
const BLANK_PARTICLE: Particle = Particle {
    id: 0,
    status: 0,
    mothers: [0, 0],
    colour: [0, 0],
    p4: P4::new(0.0, 0.0, 0.0, 0.0),
    mass_gev: 0.0,
    lifetime_mm: 0.0,
    spin: 0.0,
};

/// Reads a particle line at the start of `text` into `out` in one scan
/// when every field is in the usual form and finite: the length of the
/// line with its newline. `None` sends the line to the checking slow path
/// (which overwrites `out`).
#[inline]
fn fast_particle(
    text: &[u8],
    place: usize,
    memo: &mut ShapeMemo,
    out: &mut Particle,
) -> Option<usize> {
    // Each part by the shape of an earlier line, else field by field (and
    // its shape is remembered for the next line).
    let ([id, status, m1, m2, c1, c2], ints) = match memo.read_ints(place, text) {
        Some(x) => x,
        None => {
            let mut c = Cursor::new(text);
            let v = [c.i32()?, c.i32()?, c.i32()?, c.i32()?, c.i32()?, c.i32()?];
            memo.learn_ints(place, text);
            (v, c.position())
        }
    };
    let m1 = u32::try_from(m1).ok()?;
    let m2 = u32::try_from(m2).ok()?;
    let colour = [c1, c2];
    let rest = &text[ints..];
    let ([px, py, pz, e, mass_gev, lifetime_mm, spin], len) = match memo.read_reals(rest) {
        Some((r, len)) => (r, ints + len),
        None => {
            let mut c = Cursor::new(rest);
            let r = [
                c.f64()?,
                c.f64()?,
                c.f64()?,
                c.f64()?,
                c.f64()?,
                c.f64()?,
                c.f64()?,
            ];
            let len = c.line_end()?;
            memo.learn_reals(rest);
            (r, ints + len)
        }
    };
    *out = Particle {
        id,
        status,
        mothers: [m1, m2],
        colour,
        p4: P4::new(e, px, py, pz),
        mass_gev,
        lifetime_mm,
        spin,
    };
    Some(len)
}

/// Splits `line` into at most `out.len()` fields; returns the number of
/// fields found (which exceeds `out.len()` by one when there are more).
#[inline]
fn split_into<'a>(line: &'a [u8], out: &mut [&'a [u8]]) -> usize {
    let mut n = 0;
    for f in fields(line) {
        if n == out.len() {
            return n + 1;
        }
        out[n] = f;
        n += 1;
    }
    n
}

#[inline]
fn real(s: &[u8], what: &str, unit: &str) -> Result<f64, String> {
    match parse_f64(s) {
        Some(v) if v.is_finite() => Ok(v),
        Some(v) => Err(format!("{what} must be finite, got {v}{unit}")),
        None => Err(format!("{what} must be a number, got '{}'", show(s))),
    }
}

fn looks_like_particle(line: &[u8]) -> bool {
    let mut n = 0;
    for f in fields(line) {
        if parse_f64(f).is_none() {
            return false;
        }
        n += 1;
    }
    n == 13
}

#[cfg(test)]
mod tests {
    use super::*;

    /// Particle lines of the shape the common writers print, and others;
    /// each read by a memo primed with every other line (so the shape of
    /// the line before is sometimes the same, sometimes not) must give what
    /// the field-by-field reader gives with a fresh memo.
    #[test]
    fn remembered_shapes_read_like_the_field_reader() {
        let lines: [&[u8]; 8] = [
            b"       21 -1    0    0  501  502 +0.0000000000e+00 +0.0000000000e+00 +1.5857467720e+03 +1.5857467720e+03 +0.0000000000e+00 +0.0000000000e+00 +9.0000000000e+00\n",
            b"        2 -1    0    0  503    0 -1.1709384069e+01 +9.9358048851e+01 -2.1484994942e+02 +2.1484994942e+02 +3.3000000000e-01 +0.0000000000e+00 -1.0000000000e+00\n",
            b"  1000022  1    4    4    0    0 -4.1319258546E+02 -2.2472927203E+02 +4.7746549199E+02 +6.7030191289E+02 +1.0000000000E+01 +0.0000000000E+00 +9.0000000000E+00\n",
            b"-11 1 3 3 0 0 1.5 -2.25 30 40 0.000511 0 -1\n",
            b"       -5  1    3    3    0  501 +4.2490196953e+02 +3.2408732088e+02 +5.2757402443e+02 +7.5100507756e+02 +4.7000000000e+00 +0.0000000000e+00 +1.0000000000e+00 \r\n",
            b"       -5  1    3    3    0  501 +4.2490196953e+02 +3.2408732088e+02 +5.2757402443e+02 +7.5100507756e+02 +4.7000000000e+00 +1.0000000000e-30 +1.0000000000e+00\n",
            b"       22  1    1    2    0    0  1.2345678901e+02 -6.5432109876e-01  2.0000000000e+00  1.2345678901e+02  0.0000000000e+00  0.0000000000e+00  9.0000000000e+00\n",
            b"       22  1    1    2    0    0 +1.2345678901e+02 -6.5432109876e-01 +2.0000000000e+00 +1.2345678901e+02 +0.0000000000e+00 +0.0000000000e+00 +9.0000000000e+00 <\n",
        ];
        // Debug text of the particle: every f64 in its shortest round-trip
        // form, which tells apart any two different values, -0 and +0 too.
        let key = |r: Option<(Particle, usize)>| format!("{r:?}");
        let read = |text: &[u8], memo: &mut ShapeMemo| {
            let mut p = BLANK_PARTICLE;
            fast_particle(text, 0, memo, &mut p).map(|len| (p, len))
        };
        // Reference values by `str::parse` for the line read by both.
        let want_px = -1.1709384069e+01f64;
        for primer in &lines {
            for line in &lines {
                let mut text = line.to_vec();
                // The next line of the text, as in a real event.
                text.extend_from_slice(b"</event>\n");
                let mut memo = ShapeMemo::default();
                let _ = read(primer, &mut memo);
                let primed = key(read(&text, &mut memo));
                let fresh = key(read(&text, &mut ShapeMemo::default()));
                assert_eq!(
                    primed,
                    fresh,
                    "primer {:?}, line {:?}",
                    String::from_utf8_lossy(primer),
                    String::from_utf8_lossy(line)
                );
            }
        }
        let (p, _) = read(lines[1], &mut ShapeMemo::default()).unwrap();
        assert_eq!(p.p4.px.to_bits(), want_px.to_bits());
    }
}
