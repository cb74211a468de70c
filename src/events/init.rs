//! The first line, the header and the `<init>` block of one LHEF file.
//!
//! Fed by the first bytes of a (decompressed) file; feeds
//! [`super::SampleInfo`] and the body reader in [`super::source`].
//!
//! Format: J. Alwall et al., "A standard format for Les Houches Event
//! Files", Comput. Phys. Commun. 176 (2007) 300, hep-ph/0609017 (LHEF 1.0);
//! the `<initrwgt>`/`<weight id=…>` names of LHEF 3.0, J. R. Andersen et
//! al., "Les Houches 2013: Physics at TeV Colliders: Standard Model Working
//! Group Report", arXiv:1405.1067, Sec. 23.

use super::number::{fields, parse_f64, parse_i32, trim};
use std::path::{Path, PathBuf};

/// One process of the `<init>` block.
#[derive(Debug, Clone, PartialEq, serde::Serialize, serde::Deserialize)]
pub struct ProcessInfo {
    /// Process id (LPRUP), matched against each event's IDPRUP.
    pub id: i32,
    /// Cross-section XSECUP [pb].
    pub xsec_pb: f64,
    /// Statistical uncertainty of XSECUP, XERRUP [pb].
    pub xsec_err_pb: f64,
    /// Maximum event weight XMAXUP (units of XWGTUP).
    pub xmax: f64,
}

/// What the first line, header and `<init>` block of one file say.
#[derive(Debug, Clone, PartialEq, serde::Serialize, serde::Deserialize)]
pub struct FileInfo {
    /// The file.
    pub path: PathBuf,
    /// True when the file is gzip-compressed (detected by magic bytes).
    pub gzip: bool,
    /// LHEF version from the first line: "1.0", "2.0" or "3.0".
    pub version: String,
    /// Beam particle ids (IDBMUP).
    pub beam_ids: [i32; 2],
    /// Beam energies (EBMUP) [GeV].
    pub beam_energies_gev: [f64; 2],
    /// Centre-of-mass energy √s [GeV], see [`sqrt_s_gev`].
    pub sqrt_s_gev: f64,
    /// PDF author groups (PDFGUP).
    pub pdf_groups: [i32; 2],
    /// PDF set ids (PDFSUP; LHAPDF ids in current practice).
    pub pdf_sets: [i32; 2],
    /// Weight strategy IDWTUP (±1, ±2, ±3, ±4).
    pub idwtup: i32,
    /// Processes (NPRUP of them), in file order.
    pub processes: Vec<ProcessInfo>,
    /// Names of per-event weight variations: the `id` of every
    /// `<weight>` in `<initrwgt>` (LHEF 3.0), else the `name` of every
    /// `<weightinfo>` in `<init>` (LHEF 2.0), else empty.
    pub weight_names: Vec<String>,
    /// Byte offset (in the decompressed text) of the line after `</init>`.
    #[serde(skip)]
    pub body_offset: u64,
    /// Line number (1-based) of the line after `</init>`.
    #[serde(skip)]
    pub body_line: u64,
}

impl FileInfo {
    /// The process with id `lprup`, if the `<init>` block declares it.
    pub fn process(&self, lprup: i32) -> Option<&ProcessInfo> {
        self.processes.iter().find(|p| p.id == lprup)
    }
}

/// Centre-of-mass energy of two head-on beams of negligible mass.
///
/// # Formula
/// √s = 2 √(E₁ E₂), from s = (p₁ + p₂)² with p₁ = (E₁, 0, 0, E₁) and
/// p₂ = (E₂, 0, 0, −E₂).
///
/// # Units
/// Beam energies E₁, E₂ and the result in GeV.
///
/// # References
/// PDG Review of Particle Physics, "Kinematics", Sec. 49.4.2 (edition
/// 2024), with the beam masses neglected.
pub fn sqrt_s_gev(e1_gev: f64, e2_gev: f64) -> f64 {
    2.0 * (e1_gev * e2_gev).sqrt()
}

/// Why a header could not be read (converted into
/// [`super::EventError::Header`] with the file name).
#[derive(Debug)]
pub(crate) struct HeaderFault {
    pub line: u64,
    pub rule: String,
}

fn fault<T>(line: u64, rule: impl Into<String>) -> Result<T, HeaderFault> {
    Err(HeaderFault {
        line,
        rule: rule.into(),
    })
}

/// Position of `</init>` ending a line in `head`, or `None` when the
/// header is not complete yet. Returns the byte offset just past the
/// newline of the `</init>` line (or the end of `head` if the line is the
/// last and `complete` is true).
pub(crate) fn find_init_end(head: &[u8], complete: bool) -> Option<usize> {
    let finder = memchr::memmem::Finder::new(b"</init>");
    let pos = finder.find(head)?;
    match memchr::memchr(b'\n', &head[pos..]) {
        Some(nl) => Some(pos + nl + 1),
        None if complete => Some(head.len()),
        None => None,
    }
}

/// The value of attribute `name` in an XML start tag text (quoted with ' or
/// "), if present.
pub(crate) fn attribute<'a>(tag: &'a [u8], name: &[u8]) -> Option<&'a [u8]> {
    let mut rest = tag;
    // Tags are short: a plain scan beats building a substring searcher.
    while let Some(pos) = rest.windows(name.len()).position(|w| w == name) {
        let before_ok = pos == 0 || rest[pos - 1].is_ascii_whitespace();
        let after = rest[pos + name.len()..].trim_ascii_start();
        if before_ok && let Some(after_eq) = after.strip_prefix(b"=") {
            let after_eq = after_eq.trim_ascii_start();
            let quote = *after_eq.first()?;
            if quote == b'"' || quote == b'\'' {
                let body = &after_eq[1..];
                let end = memchr::memchr(quote, body)?;
                return Some(&body[..end]);
            }
            return None;
        }
        rest = &rest[pos + name.len()..];
    }
    None
}

/// True when `line` (already trimmed) opens tag `tag` (given without `<`),
/// i.e. `<tag` followed by `>`, `/` or a blank.
pub(crate) fn opens_tag(line: &[u8], tag: &[u8]) -> bool {
    line.len() > tag.len() + 1
        && line[0] == b'<'
        && line[1..].starts_with(tag)
        && matches!(line[1 + tag.len()], b'>' | b'/' | b' ' | b'\t' | b'\r')
}

/// `b` as text for an error message, cut after 80 characters.
pub(crate) fn lossy(b: &[u8]) -> String {
    let s = String::from_utf8_lossy(b);
    if s.chars().count() > 80 {
        format!("{}…", s.chars().take(80).collect::<String>())
    } else {
        s.into_owned()
    }
}

/// Parses the first line, header and `<init>` block from `head` (the
/// decompressed start of the file, up to and including the `</init>` line).
pub(crate) fn parse_head(path: &Path, gzip: bool, head: &[u8]) -> Result<FileInfo, HeaderFault> {
    let mut lines = head.split_inclusive(|&c| c == b'\n');
    let mut line_no: u64 = 0;
    let mut offset: u64 = 0;
    let mut next = |line_no: &mut u64, offset: &mut u64| {
        let l = lines.next()?;
        *line_no += 1;
        *offset += l.len() as u64;
        Some(trim(l))
    };

    // First line: <LesHouchesEvents version="X">
    let Some(first) = next(&mut line_no, &mut offset) else {
        return fault(
            1,
            "empty file: expected a first line <LesHouchesEvents version=\"…\">",
        );
    };
    if !opens_tag(first, b"LesHouchesEvents") {
        return fault(
            1,
            format!(
                "first line must be <LesHouchesEvents version=\"1.0|2.0|3.0\">, got '{}'",
                lossy(first)
            ),
        );
    }
    let version = match attribute(first, b"version") {
        Some(b"1.0") => "1.0",
        Some(b"2.0") => "2.0",
        Some(b"3.0") => "3.0",
        Some(v) => {
            return fault(
                1,
                format!(
                    "unsupported LHEF version '{}' (supported: 1.0, 2.0, 3.0)",
                    lossy(v)
                ),
            );
        }
        None => return fault(1, "first line lacks the version attribute"),
    };

    // Header: everything up to the <init> line; collect weight names.
    let mut weight_names: Vec<String> = Vec::new();
    let mut in_comment = false;
    let mut in_initrwgt = false;
    let init_line = loop {
        let Some(line) = next(&mut line_no, &mut offset) else {
            return fault(
                line_no,
                "missing <init> block: the header ends without <init>",
            );
        };
        if in_comment {
            if memchr::memmem::find(line, b"-->").is_some() {
                in_comment = false;
            }
            continue;
        }
        if let Some(pos) = memchr::memmem::find(line, b"<!--")
            && memchr::memmem::find(&line[pos..], b"-->").is_none()
        {
            in_comment = true;
            continue;
        }
        if opens_tag(line, b"init") {
            break line_no;
        }
        if opens_tag(line, b"event") || line.starts_with(b"</LesHouchesEvents") {
            return fault(line_no, "missing <init> block: found events before <init>");
        }
        if opens_tag(line, b"initrwgt") {
            in_initrwgt = true;
        }
        if in_initrwgt {
            collect_weight_ids(line, &mut weight_names);
            if memchr::memmem::find(line, b"</initrwgt>").is_some() {
                in_initrwgt = false;
            }
        }
    };

    // <init> line 1: IDBMUP(2) EBMUP(2) PDFGUP(2) PDFSUP(2) IDWTUP NPRUP
    let Some(l1) = next(&mut line_no, &mut offset) else {
        return fault(init_line, "<init> block is empty (expected 10 numbers)");
    };
    let f: Vec<&[u8]> = fields(l1).collect();
    if f.len() != 10 {
        return fault(
            line_no,
            format!(
                "first <init> line has {} columns, expected 10 (IDBMUP×2 EBMUP×2 PDFGUP×2 PDFSUP×2 IDWTUP NPRUP)",
                f.len()
            ),
        );
    }
    let names = [
        "IDBMUP(1)",
        "IDBMUP(2)",
        "EBMUP(1)",
        "EBMUP(2)",
        "PDFGUP(1)",
        "PDFGUP(2)",
        "PDFSUP(1)",
        "PDFSUP(2)",
        "IDWTUP",
        "NPRUP",
    ];
    let int = |i: usize| -> Result<i32, HeaderFault> {
        parse_i32(f[i]).ok_or_else(|| HeaderFault {
            line: line_no,
            rule: format!("{} must be an integer, got '{}'", names[i], lossy(f[i])),
        })
    };
    let real = |i: usize| -> Result<f64, HeaderFault> {
        match parse_f64(f[i]) {
            Some(v) if v.is_finite() && v >= 0.0 => Ok(v),
            _ => fault(
                line_no,
                format!(
                    "{} must be a finite energy ≥ 0 GeV, got '{}'",
                    names[i],
                    lossy(f[i])
                ),
            ),
        }
    };
    let beam_ids = [int(0)?, int(1)?];
    let beam_energies_gev = [real(2)?, real(3)?];
    let pdf_groups = [int(4)?, int(5)?];
    let pdf_sets = [int(6)?, int(7)?];
    let idwtup = int(8)?;
    if !matches!(idwtup.abs(), 1..=4) {
        return fault(
            line_no,
            format!("IDWTUP must be ±1, ±2, ±3 or ±4, got {idwtup}"),
        );
    }
    let nprup = int(9)?;
    if nprup < 1 {
        return fault(line_no, format!("NPRUP must be ≥ 1, got {nprup}"));
    }

    let mut processes: Vec<ProcessInfo> = Vec::new();
    for i in 0..nprup {
        let Some(l) = next(&mut line_no, &mut offset) else {
            return fault(
                line_no,
                format!("<init> ends after {i} of NPRUP = {nprup} process lines"),
            );
        };
        let f: Vec<&[u8]> = fields(l).collect();
        if f.len() != 4 {
            return fault(
                line_no,
                format!(
                    "process line {} of <init> has {} columns, expected 4 (XSECUP XERRUP XMAXUP LPRUP)",
                    i + 1,
                    f.len()
                ),
            );
        }
        let real = |k: usize, what: &str| -> Result<f64, HeaderFault> {
            match parse_f64(f[k]) {
                Some(v) if v.is_finite() => Ok(v),
                _ => fault(
                    line_no,
                    format!(
                        "{what}({}) must be a finite number, got '{}'",
                        i + 1,
                        lossy(f[k])
                    ),
                ),
            }
        };
        let xsec_pb = real(0, "XSECUP")?;
        let xsec_err_pb = real(1, "XERRUP")?;
        let xmax = real(2, "XMAXUP")?;
        let Some(id) = parse_i32(f[3]) else {
            return fault(
                line_no,
                format!("LPRUP({}) must be an integer, got '{}'", i + 1, lossy(f[3])),
            );
        };
        if xsec_err_pb < 0.0 {
            return fault(
                line_no,
                format!("XERRUP({}) must be ≥ 0 pb, got {xsec_err_pb} pb", i + 1),
            );
        }
        if processes.iter().any(|p| p.id == id) {
            return fault(line_no, format!("LPRUP {id} appears twice in <init>"));
        }
        processes.push(ProcessInfo {
            id,
            xsec_pb,
            xsec_err_pb,
            xmax,
        });
    }

    // Optional information up to </init>.
    let mut info_names: Vec<String> = Vec::new();
    loop {
        let Some(l) = next(&mut line_no, &mut offset) else {
            return fault(line_no, "<init> block has no closing </init>");
        };
        if l.starts_with(b"</init>") {
            break;
        }
        if opens_tag(l, b"event") {
            return fault(
                line_no,
                "<init> block has no closing </init> before the first <event>",
            );
        }
        if let Some(pos) = memchr::memmem::find(l, b"<weightinfo")
            && let Some(name) = attribute(&l[pos..], b"name")
        {
            info_names.push(String::from_utf8_lossy(name).into_owned());
        }
    }
    if weight_names.is_empty() {
        weight_names = info_names;
    }
    if let Some(dup) = first_duplicate(&weight_names) {
        return fault(init_line, format!("weight name '{dup}' is declared twice"));
    }

    Ok(FileInfo {
        path: path.to_path_buf(),
        gzip,
        version: version.to_string(),
        beam_ids,
        sqrt_s_gev: sqrt_s_gev(beam_energies_gev[0], beam_energies_gev[1]),
        beam_energies_gev,
        pdf_groups,
        pdf_sets,
        idwtup,
        processes,
        weight_names,
        body_offset: offset,
        body_line: line_no + 1,
    })
}

fn first_duplicate(names: &[String]) -> Option<&str> {
    let mut sorted: Vec<&str> = names.iter().map(String::as_str).collect();
    sorted.sort_unstable();
    sorted.windows(2).find(|w| w[0] == w[1]).map(|w| w[0])
}

/// Appends the `id` of every `<weight …>` tag on `line`.
fn collect_weight_ids(line: &[u8], out: &mut Vec<String>) {
    let finder = memchr::memmem::Finder::new(b"<weight");
    let mut rest = line;
    while let Some(pos) = finder.find(rest) {
        let tag = &rest[pos..];
        let end = memchr::memchr(b'>', tag).unwrap_or(tag.len());
        let is_weight = matches!(tag.get(7), Some(b' ' | b'\t' | b'>'));
        if is_weight && let Some(id) = attribute(&tag[..end], b"id") {
            out.push(String::from_utf8_lossy(id).trim().to_string());
        }
        rest = &tag[end.min(tag.len())..];
        if rest.len() == tag.len() {
            rest = &rest[1..];
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn attributes() {
        assert_eq!(attribute(b"<wgt id='1001'>", b"id"), Some(&b"1001"[..]));
        assert_eq!(
            attribute(b"<w xid=\"a\" id = \"b\">", b"id"),
            Some(&b"b"[..])
        );
        assert_eq!(attribute(b"<w>", b"id"), None);
    }

    // √s = 2√(E₁E₂): 6500 GeV beams give 13000 GeV; 6800 GeV give 13600 GeV
    // (LHC Run 2 and Run 3 energies, common practice).
    #[test]
    fn centre_of_mass_energy() {
        assert_eq!(sqrt_s_gev(6500.0, 6500.0), 13000.0);
        assert_eq!(sqrt_s_gev(6800.0, 6800.0), 13600.0);
        // Asymmetric HERA-like beams 27.5 GeV e × 920 GeV p: √s = 318.1 GeV
        // (HERA design figure, from memory; 2√(27.5·920) = 318.12).
        assert!((sqrt_s_gev(27.5, 920.0) - 318.12).abs() < 0.01);
    }
}
