//! The `<rwgt>` block of an event written by one format, read in one pass
//! once a block has shown its layout.
//!
//! Used by [`super::parse`]. A writer prints the named weights of every
//! event with one format: the same `<wgt id='…'>` tags in the same order,
//! each value in the layout `[±]d.dddddddddde±dd` between one blank and
//! ` </wgt>`. The first such block of a chunk records a template: every
//! byte of the tags and line ends as itself, every byte of a value in its
//! canonical form (digits as `0`, `-` as `+`). A later block is compared
//! with the template as a whole, sixteen bytes at a time, and its values
//! are then converted at known places. Equal bytes outside the values
//! imply the same names in the same order; equal canonical bytes of a
//! value imply a real in the fixed layout. A block of any other form is
//! read line by line, with the same result.

use super::number::{fixed_layout, fixed_value_sse2, words};
use super::particle_line::{MAX_LEARNED, canonical};
#[cfg(all(target_arch = "x86_64", target_feature = "sse2"))]
use super::particle_line::{canonical_sse2, load_sse2};

/// Width of a block compared at once [bytes].
const BLOCK: usize = 16;

/// The layout of one `<rwgt>` block.
#[derive(Debug, Clone)]
struct Template {
    /// The block's bytes, each value byte canonical; padded to whole
    /// blocks.
    bytes: Vec<u8>,
    /// Per byte: 0xFF where the byte must be equal as it is, 0 where it
    /// must be equal in canonical form (the values).
    exact: Vec<u8>,
    /// Per byte: 0xFF beyond the block (not compared), else 0.
    beyond: Vec<u8>,
    /// Length of the block with its last newline [bytes].
    len: usize,
    /// Per weight, in declared order: offset of the value's first byte
    /// (its sign or leading digit) and of its leading digit.
    values: Vec<(usize, usize)>,
}

impl Template {
    /// The template of the block at the start of `text` when it is
    /// `<rwgt>\n`, then for each name k in order the line
    /// `OPEN_k VALUE </wgt>\n` with `OPEN_k` one of `open[k]` and VALUE in
    /// the fixed layout, then `</rwgt>\n`; `None` for any other text.
    fn learn(text: &[u8], open: &[[Vec<u8>; 2]]) -> Option<Self> {
        const START: &[u8] = b"<rwgt>\n";
        const END_LINE: &[u8] = b" </wgt>\n";
        if !text.starts_with(START) || open.is_empty() {
            return None;
        }
        let mut i = START.len();
        let mut values = Vec::with_capacity(open.len());
        let mut value_bytes = Vec::with_capacity(open.len());
        for tags in open {
            let tag = tags.iter().find(|t| text[i..].starts_with(t))?;
            i += tag.len();
            if text.get(i) != Some(&b' ') {
                return None;
            }
            i += 1;
            let (_, used) = fixed_layout(text.get(i..)?)?;
            let signed = used == 17;
            values.push((i, i + usize::from(signed)));
            value_bytes.push(i..i + used);
            i += used;
            if !text[i..].starts_with(END_LINE) {
                return None;
            }
            i += END_LINE.len();
        }
        if !text[i..].starts_with(b"</rwgt>\n") {
            return None;
        }
        let len = i + b"</rwgt>\n".len();
        let padded = len.div_ceil(BLOCK) * BLOCK;
        let mut bytes = text[..len].to_vec();
        let mut exact = vec![0xFF; len];
        for r in value_bytes {
            for k in r {
                bytes[k] = canonical(bytes[k]);
                exact[k] = 0;
            }
        }
        bytes.resize(padded, 0);
        exact.resize(padded, 0xFF);
        let mut beyond = vec![0u8; len];
        beyond.resize(padded, 0xFF);
        Some(Self {
            bytes,
            exact,
            beyond,
            len,
            values,
        })
    }

    /// True when `text` starts with a block of this layout.
    #[inline]
    fn matches(&self, text: &[u8]) -> bool {
        let n = self.bytes.len();
        if text.len() < n {
            return self.matches_bytewise(text);
        }
        #[cfg(all(target_arch = "x86_64", target_feature = "sse2"))]
        {
            // SAFETY: `matches_sse2` needs only SSE2, which this build
            // enables (the `cfg` above; every x86-64 target does).
            unsafe { self.matches_sse2(&text[..n]) }
        }
        #[cfg(not(all(target_arch = "x86_64", target_feature = "sse2")))]
        self.matches_bytewise(text)
    }

    /// [`Self::matches`] one byte at a time.
    fn matches_bytewise(&self, text: &[u8]) -> bool {
        text.len() >= self.len
            && (0..self.len).all(|k| {
                let c = text[k];
                let c = if self.exact[k] == 0 { canonical(c) } else { c };
                c == self.bytes[k]
            })
    }

    /// [`Self::matches`] sixteen bytes at a time with SSE2 (part of every
    /// x86-64 processor); `text` has the template's padded length.
    #[cfg(all(target_arch = "x86_64", target_feature = "sse2"))]
    #[target_feature(enable = "sse2")]
    fn matches_sse2(&self, text: &[u8]) -> bool {
        use std::arch::x86_64::{
            _mm_and_si128, _mm_cmpeq_epi8, _mm_movemask_epi8, _mm_or_si128, _mm_set1_epi8,
            _mm_xor_si128,
        };
        let mut all = _mm_set1_epi8(-1);
        let blocks = text
            .chunks_exact(BLOCK)
            .zip(self.bytes.chunks_exact(BLOCK))
            .zip(self.exact.chunks_exact(BLOCK))
            .zip(self.beyond.chunks_exact(BLOCK));
        for (((text, bytes), exact), beyond) in blocks {
            let x = load_sse2(text);
            let canon = canonical_sse2(x);
            // The byte itself where it must be exact, else its canonical form.
            let y = _mm_xor_si128(
                canon,
                _mm_and_si128(_mm_xor_si128(canon, x), load_sse2(exact)),
            );
            let same = _mm_cmpeq_epi8(y, load_sse2(bytes));
            all = _mm_and_si128(all, _mm_or_si128(same, load_sse2(beyond)));
        }
        _mm_movemask_epi8(all) == 0xFFFF
    }

    /// The block's length, with its values in `out` (one per name, in
    /// declared order), when `text` starts with a block of this layout and
    /// every value lies in the exact conversion range; `None` otherwise,
    /// with `out` empty. `out` is empty on entry.
    #[inline]
    fn read(&self, text: &[u8], out: &mut Vec<f64>) -> Option<usize> {
        if !self.matches(text) {
            return None;
        }
        out.resize(self.values.len(), 0.0);
        for (x, &(at, digits_at)) in out.iter_mut().zip(&self.values) {
            let (w0, w1) = words(&text[digits_at..]);
            let Some(v) = fixed_value_sse2(text[at], w0, w1) else {
                out.clear();
                return None;
            };
            *x = v;
        }
        Some(self.len)
    }
}

/// The weight-block template of a chunk's latest events.
#[derive(Debug, Default)]
pub(super) struct WeightMemo {
    template: Option<Template>,
    learned: u32,
}

impl WeightMemo {
    /// False once the chunk's blocks have shown no usable layout
    /// ([`MAX_LEARNED`] attempts), so that the caller can skip the call.
    #[inline]
    pub(super) fn may_read(&self) -> bool {
        self.template.is_some() || self.learned < MAX_LEARNED
    }

    /// Reads the `<rwgt>` block at the start of `text` into `out` (empty
    /// on entry; one value per declared name, `open[k]` the two forms of
    /// the k-th opening tag) by the remembered layout, learning the layout
    /// from this block when there is none or it differs: the block's
    /// length and number of lines, or `None` (with `out` still empty) to
    /// read it line by line.
    #[inline]
    pub(super) fn read(
        &mut self,
        text: &[u8],
        open: &[[Vec<u8>; 2]],
        out: &mut Vec<f64>,
    ) -> Option<(usize, u64)> {
        let lines = open.len() as u64 + 2;
        if let Some(t) = &self.template
            && let Some(len) = t.read(text, out)
        {
            return Some((len, lines));
        }
        if self.learned >= MAX_LEARNED {
            return None;
        }
        self.learned += 1;
        self.template = Template::learn(text, open);
        let len = self.template.as_ref()?.read(text, out)?;
        Some((len, lines))
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    fn open(names: &[&str]) -> Vec<[Vec<u8>; 2]> {
        names
            .iter()
            .map(|n| {
                [
                    format!("<wgt id='{n}'>").into_bytes(),
                    format!("<wgt id=\"{n}\">").into_bytes(),
                ]
            })
            .collect()
    }

    // Values by `str::parse` (correctly rounded); the block forms by hand.
    #[test]
    fn learned_blocks_read_their_values_and_refuse_other_forms() {
        let names = open(&["a", "mu2"]);
        let block = |v1: &str, v2: &str| {
            format!(
                "<rwgt>\n<wgt id='a'> {v1} </wgt>\n<wgt id=\"mu2\"> {v2} </wgt>\n</rwgt>\n</event>\n"
            )
        };
        let first = block("+1.2500000000e+00", "-3.1415926536E-02");
        let mut memo = WeightMemo::default();
        let mut out = Vec::new();
        let (len, lines) = memo
            .read(first.as_bytes(), &names, &mut out)
            .expect("learned");
        assert_eq!(&first[len..], "</event>\n");
        assert_eq!(lines, 4);
        assert_eq!(out, [1.25, "-3.1415926536E-02".parse::<f64>().unwrap()]);
        // Another block of the same form, by the template.
        let second = block("-9.8765432109e+21", "+4.0000000000E-12");
        let mut out = Vec::new();
        memo.read(second.as_bytes(), &names, &mut out)
            .expect("same form");
        assert_eq!(out, [-9.8765432109e+21, 4.0e-12]);
        assert_eq!(memo.learned, 1);
        // Other forms are left to the line reader, with `out` empty.
        for other in [
            block("1.25", "+1.0000000000e+00"),
            block("+1.2500000000e+00", "+1.0000000000e+00").replace("'a'", "'b'"),
            block("+1.2500000000e+00", "+1.0000000000e+00").replace("> +1.25", ">  +1.25"),
            block("+1.2500000000e+00", "+1.0000000000e+00").replace("</rwgt>", "</rwgt >"),
            block("+1.2500000000e-30", "+1.0000000000e+00"),
        ] {
            let mut out = Vec::new();
            assert!(
                memo.read(other.as_bytes(), &names, &mut out).is_none(),
                "{other}"
            );
            assert!(out.is_empty());
        }
        assert!(Template::learn(b"<rwgt>\n</rwgt>\n", &[]).is_none());
    }
}
