//! The columns of particle lines written by one fixed format, read in one
//! pass once a line has shown their layout.
//!
//! Used by [`super::parse`]. A writer prints every particle line of a file
//! with the same format, so the seven real columns (px py pz E m VTIMUP
//! SPINUP) have the same shape on every line: the same blanks at the same
//! places, each real in the layout `[±]d.dddddddddde±dd`, the newline at
//! the same place. The six integer columns (IDUP ISTUP MOTHUP ICOLUP) keep
//! their shape from one event to the next at the same place in the event,
//! as long as their numbers of digits do not change. The first line read
//! field by field records these shapes ([`RealColumns`], and an
//! [`IntColumns`] per place in the event); each later line is compared
//! with them as a whole, sixteen bytes at a time, and its numbers are then
//! converted at known places without any further scanning. A line of any
//! other shape goes on to the field-by-field reader, so both give the same
//! result for every line.

use super::number::{eight_digits, fixed_layout, fixed_value_sse2, is_blank, word, words};

/// Number of real columns on a particle line.
const N_REALS: usize = 7;

/// Number of integer columns on a particle line.
const N_INTS: usize = 6;

/// Width of a block compared at once [bytes].
const BLOCK: usize = 16;

/// Longest real part remembered [bytes]: ten blocks, room for seven reals
/// with up to four blanks before each (the common writers use one).
const MAX_LEN: usize = 10 * BLOCK;

/// Longest integer part remembered [bytes]: three blocks, room for the
/// usual widths (`%9d%3d%5d%5d%5d%5d`, 32 bytes) and more.
const INT_LEN: usize = 3 * BLOCK;

/// Eight ASCII `0` bytes.
const ASCII_ZEROS: u64 = 0x3030_3030_3030_3030;

/// Most digits of an integer column read by shape: every such number fits
/// an `i32` (longer ones are read field by field).
const MAX_INT_DIGITS: usize = 9;

/// The shape-defining form of a byte: every digit reads as `0`, the two
/// signs as `+`; every other byte as itself. Two texts have the same
/// canonical bytes exactly when they have their digits, signs and all
/// other bytes at the same places (a writer prints one exponent letter,
/// `e` or `E`, so it stays part of the shape).
#[inline]
pub(super) fn canonical(c: u8) -> u8 {
    match c {
        b'0'..=b'9' => b'0',
        b'-' => b'+',
        c => c,
    }
}

/// The canonical bytes of a text of at most `N` bytes, to compare other
/// texts with.
#[derive(Debug, Clone)]
struct Shape<const N: usize> {
    /// Canonical bytes of the text, zero-padded to `N`.
    canon: [u8; N],
    /// Per byte of `canon`: 0xFF beyond the text (not compared), else 0.
    beyond: [u8; N],
    /// Length of the text [bytes], ≤ `N`.
    len: usize,
}

impl<const N: usize> Shape<N> {
    /// The shape of `text`; `None` when it is longer than `N` bytes.
    fn of(text: &[u8]) -> Option<Self> {
        let len = text.len();
        if len > N {
            return None;
        }
        let mut canon = [0u8; N];
        for (t, &c) in canon.iter_mut().zip(text) {
            *t = canonical(c);
        }
        let mut beyond = [0xFFu8; N];
        beyond[..len].fill(0);
        Some(Self { canon, beyond, len })
    }

    /// True when `window` starts with this shape.
    #[inline]
    fn matches_window(&self, window: &[u8; N]) -> bool {
        #[cfg(all(target_arch = "x86_64", target_feature = "sse2"))]
        {
            // SAFETY: `matches_sse2` needs only SSE2, which this build
            // enables (the `cfg` above; every x86-64 target does).
            unsafe { self.matches_sse2(window) }
        }
        #[cfg(not(all(target_arch = "x86_64", target_feature = "sse2")))]
        self.matches_bytewise(window)
    }

    /// True when `text` starts with this shape, one byte at a time.
    fn matches_bytewise(&self, text: &[u8]) -> bool {
        text.len() >= self.len
            && text[..self.len]
                .iter()
                .zip(&self.canon)
                .all(|(&c, &t)| canonical(c) == t)
    }

    /// True when `text` starts with this shape.
    #[cfg(test)]
    fn matches(&self, text: &[u8]) -> bool {
        match text.first_chunk::<N>() {
            Some(w) => self.matches_window(w),
            None => self.matches_bytewise(text),
        }
    }

    /// [`Self::matches_window`] sixteen bytes at a time with SSE2 (part of
    /// every x86-64 processor): each block is made canonical with
    /// byte-wise compares and compared with the shape.
    #[cfg(all(target_arch = "x86_64", target_feature = "sse2"))]
    #[target_feature(enable = "sse2")]
    #[inline]
    fn matches_sse2(&self, window: &[u8; N]) -> bool {
        use std::arch::x86_64::{
            _mm_and_si128, _mm_cmpeq_epi8, _mm_movemask_epi8, _mm_or_si128, _mm_set1_epi8,
        };
        const { assert!(N.is_multiple_of(BLOCK), "a shape is whole blocks") };
        let mut all = _mm_set1_epi8(-1);
        for k in 0..N / BLOCK {
            let at = k * BLOCK;
            let y = canonical_sse2(load_sse2(&window[at..at + BLOCK]));
            let same = _mm_cmpeq_epi8(y, load_sse2(&self.canon[at..at + BLOCK]));
            let skip = load_sse2(&self.beyond[at..at + BLOCK]);
            all = _mm_and_si128(all, _mm_or_si128(same, skip));
        }
        _mm_movemask_epi8(all) == 0xFFFF
    }
}

/// The first sixteen bytes of `b` as an SSE2 register (first byte lowest).
#[cfg(all(target_arch = "x86_64", target_feature = "sse2"))]
#[target_feature(enable = "sse2")]
#[inline]
pub(super) fn load_sse2(b: &[u8]) -> std::arch::x86_64::__m128i {
    let (lo, hi) = words(b);
    std::arch::x86_64::_mm_set_epi64x(hi as i64, lo as i64)
}

/// [`canonical`] of sixteen bytes at once (SSE2).
#[cfg(all(target_arch = "x86_64", target_feature = "sse2"))]
#[target_feature(enable = "sse2")]
#[inline]
pub(super) fn canonical_sse2(x: std::arch::x86_64::__m128i) -> std::arch::x86_64::__m128i {
    use std::arch::x86_64::{
        _mm_and_si128, _mm_cmpeq_epi8, _mm_max_epu8, _mm_set1_epi8, _mm_sub_epi8,
    };
    // Digits: x − '0' ≤ 9 unsigned; they become '0'.
    let d = _mm_sub_epi8(x, _mm_set1_epi8(b'0' as i8));
    let nine = _mm_set1_epi8(9);
    let digit = _mm_cmpeq_epi8(_mm_max_epu8(d, nine), nine);
    let y = _mm_sub_epi8(x, _mm_and_si128(digit, d));
    // '-' becomes '+'.
    let minus = _mm_cmpeq_epi8(x, _mm_set1_epi8(b'-' as i8));
    _mm_sub_epi8(y, _mm_and_si128(minus, _mm_set1_epi8((b'-' - b'+') as i8)))
}

/// The index of the first byte at or after `i` that is not a blank.
fn after_blanks(text: &[u8], mut i: usize) -> usize {
    while text.get(i).is_some_and(|&c| is_blank(c)) {
        i += 1;
    }
    i
}

/// The shape of the real columns of a particle line, from the byte after
/// the sixth integer column to the newline.
#[derive(Debug, Clone)]
pub(super) struct RealColumns {
    shape: Shape<MAX_LEN>,
    /// Offset of each real's first byte (its sign, or its leading digit).
    at: [usize; N_REALS],
    /// Offset of each real's leading digit; at most `MAX_LEN − 16`.
    digits_at: [usize; N_REALS],
}

impl RealColumns {
    /// The shape of `text` (starting just after the sixth integer column)
    /// when it is seven blank-separated reals in the fixed layout, then
    /// optional blanks and the newline, in at most [`MAX_LEN`] bytes;
    /// `None` for any other text.
    pub(super) fn learn(text: &[u8]) -> Option<Self> {
        let mut at = [0usize; N_REALS];
        let mut digits_at = [0usize; N_REALS];
        let mut i = 0;
        for k in 0..N_REALS {
            let start = i;
            i = after_blanks(text, i);
            if i == start {
                return None;
            }
            let (_, used) = fixed_layout(&text[i..])?;
            at[k] = i;
            // The layout is 16 bytes after an optional sign.
            digits_at[k] = i + used - 16;
            i += used;
        }
        i = after_blanks(text, i);
        if text.get(i) != Some(&b'\n') {
            return None;
        }
        Some(Self {
            shape: Shape::of(&text[..=i])?,
            at,
            digits_at,
        })
    }

    /// The seven reals of `text` and the length of its shape (newline
    /// included) when `text` starts with this shape; `None` otherwise, or
    /// when a value lies outside the exact conversion range.
    #[inline]
    pub(super) fn read(&self, text: &[u8]) -> Option<([f64; N_REALS], usize)> {
        let Some(window) = text.first_chunk::<MAX_LEN>() else {
            // Near the end of the text (the last lines of a chunk).
            return self.read_short(text);
        };
        if !self.shape.matches_window(window) {
            return None;
        }
        let mut r = [0.0f64; N_REALS];
        for k in 0..N_REALS {
            // invariant: the shape puts a whole fixed-layout number at
            // `at[k]`, its 16 bytes after the sign at `digits_at[k]` ≤
            // MAX_LEN − 16 (so the `min` changes nothing)
            let o = self.digits_at[k].min(MAX_LEN - 16);
            let (w0, w1) = words(&window[o..]);
            r[k] = fixed_value_sse2(window[self.at[k]], w0, w1)?;
        }
        Some((r, self.shape.len))
    }

    /// [`Self::read`] for a text shorter than [`MAX_LEN`].
    #[inline(never)]
    fn read_short(&self, text: &[u8]) -> Option<([f64; N_REALS], usize)> {
        if !self.shape.matches_bytewise(text) {
            return None;
        }
        let mut window = [0u8; MAX_LEN];
        let n = text.len().min(MAX_LEN);
        window[..n].copy_from_slice(&text[..n]);
        self.read(&window)
    }
}

/// The shape of the six integer columns of a particle line, from the line
/// start to the last digit of the sixth.
#[derive(Debug, Clone)]
pub(super) struct IntColumns {
    shape: Shape<INT_LEN>,
    /// Per column: offset of the first digit; at most `INT_LEN − 9`.
    digits_at: [usize; N_INTS],
    /// Per column: the left shift [bits] that puts the digits, at most
    /// eight, at the top of an 8-byte word, 8·(8 − digits).
    pad_shift: [u32; N_INTS],
    /// Per column: true when it has a ninth digit, after the eight.
    ninth: [bool; N_INTS],
    /// Per column: true when a sign byte precedes the digits.
    signed: [bool; N_INTS],
}

impl IntColumns {
    /// The shape of the start of `text` when it is six blank-separated
    /// integers `[±]digits` of at most [`MAX_INT_DIGITS`] digits, the
    /// sixth followed by a blank or the newline, in at most [`INT_LEN`]
    /// bytes with that byte; `None` otherwise.
    pub(super) fn learn(text: &[u8]) -> Option<Self> {
        let mut digits_at = [0usize; N_INTS];
        let mut n_digits = [0usize; N_INTS];
        let mut signed = [false; N_INTS];
        let mut i = 0;
        for k in 0..N_INTS {
            let start = i;
            i = after_blanks(text, i);
            if k > 0 && i == start {
                return None;
            }
            signed[k] = matches!(text.get(i), Some(b'+' | b'-'));
            i += usize::from(signed[k]);
            digits_at[k] = i;
            while text.get(i).is_some_and(u8::is_ascii_digit) {
                i += 1;
            }
            n_digits[k] = i - digits_at[k];
            if !(1..=MAX_INT_DIGITS).contains(&n_digits[k]) || digits_at[k] + 9 > INT_LEN {
                return None;
            }
        }
        if !text.get(i).is_some_and(|&c| is_blank(c) || c == b'\n') {
            return None;
        }
        // The shape takes in the blank or newline after the sixth column,
        // which ends it as a field.
        Some(Self {
            shape: Shape::of(&text[..=i])?,
            digits_at,
            pad_shift: n_digits.map(|n| 8 * (8 - n.min(8)) as u32),
            ninth: n_digits.map(|n| n == 9),
            signed,
        })
    }

    /// The six integers of `text` and the length of its integer part (up
    /// to the blank or newline after the sixth, which the shape also
    /// covers) when `text` starts with this shape; `None` otherwise.
    #[inline]
    pub(super) fn read(&self, text: &[u8]) -> Option<([i32; N_INTS], usize)> {
        let window = text.first_chunk::<INT_LEN>()?;
        if !self.shape.matches_window(window) {
            return None;
        }
        let mut v = [0i32; N_INTS];
        for (k, out) in v.iter_mut().enumerate() {
            // invariant: the shape puts 1 to 9 digits at `digits_at[k]` ≤
            // INT_LEN − 9 (so the `min` changes nothing), and a sign
            // before them when `signed[k]`
            let o = self.digits_at[k].min(INT_LEN - MAX_INT_DIGITS);
            // The first (up to) eight digits, shifted to the top of the
            // word over ASCII zeros: the value of an 8-digit string.
            let shift = self.pad_shift[k];
            let zeros = ASCII_ZEROS & !(u64::MAX << shift);
            let mut x = eight_digits((word(&window[o..]) << shift) | zeros) as i32;
            if self.ninth[k] {
                x = x * 10 + i32::from(window[o + 8].wrapping_sub(b'0'));
            }
            *out = if self.signed[k] && window[o.saturating_sub(1)] == b'-' {
                -x
            } else {
                x
            };
        }
        Some((v, self.shape.len - 1))
    }
}

/// Shape changes learned at most per chunk and kind (also the weight-block
/// templates of `weight_block.rs`): a file whose lines keep changing shape
/// stops paying for learning and is read field by field.
pub(super) const MAX_LEARNED: u32 = 64;

/// Places in an event with an integer shape of their own; later particles
/// share the last.
const INT_PLACES: usize = 16;

/// The shapes of the latest particle lines read field by field, for the
/// lines of one chunk.
#[derive(Debug, Default)]
pub(super) struct ShapeMemo {
    reals: Option<RealColumns>,
    ints: [Option<IntColumns>; INT_PLACES],
    learned_reals: u32,
    learned_ints: u32,
}

impl ShapeMemo {
    /// [`RealColumns::read`] by the remembered shape; `None` without one.
    #[inline]
    pub(super) fn read_reals(&self, text: &[u8]) -> Option<([f64; N_REALS], usize)> {
        self.reals.as_ref()?.read(text)
    }

    /// [`IntColumns::read`] by the shape remembered for particle `place`
    /// (0-based) of an event; `None` without one.
    #[inline]
    pub(super) fn read_ints(&self, place: usize, text: &[u8]) -> Option<([i32; N_INTS], usize)> {
        self.ints[place.min(INT_PLACES - 1)].as_ref()?.read(text)
    }

    /// Remembers the shape of `text`, the real part of a line that the
    /// field-by-field reader accepted and the remembered shape did not.
    #[inline(never)]
    pub(super) fn learn_reals(&mut self, text: &[u8]) {
        if self.learned_reals < MAX_LEARNED {
            self.learned_reals += 1;
            if let Some(s) = RealColumns::learn(text) {
                self.reals = Some(s);
            }
        }
    }

    /// Remembers the shape of the integer part at the start of `text`, a
    /// particle line at `place` that the field-by-field reader accepted
    /// and the remembered shape did not.
    #[inline(never)]
    pub(super) fn learn_ints(&mut self, place: usize, text: &[u8]) {
        if self.learned_ints < MAX_LEARNED {
            self.learned_ints += 1;
            if let Some(s) = IntColumns::learn(text) {
                self.ints[place.min(INT_PLACES - 1)] = Some(s);
            }
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    /// A particle line's real part as the common writers print it
    /// (`%+.10e` with one space before each column).
    const USUAL: &[u8] = b" +1.1709384069e+01 -9.9358048851e+01 +1.0050395164e+03 +1.4213069905e+03 +1.0000000000e+03 +0.0000000000e+00 +9.0000000000e+00\n";

    /// The seven values by `str::parse` (the reference) when the text is
    /// seven blank-separated numbers and a newline, as the field-by-field
    /// reader takes it.
    fn by_fields(text: &[u8]) -> Option<[f64; N_REALS]> {
        let line = std::str::from_utf8(text.strip_suffix(b"\n")?).ok()?;
        let v: Vec<f64> = line
            .split([' ', '\t', '\r'])
            .filter(|f| !f.is_empty())
            .map(|f| f.parse::<f64>().ok())
            .collect::<Option<_>>()?;
        v.try_into().ok()
    }

    /// True when the signed fixed-layout number at `at` lies in Clinger's
    /// exact range: a zero mantissa, or a decimal exponent q (of the
    /// integer of its eleven digits) with |q| ≤ 22 (Clinger 1990, Sec. 5).
    fn exact_range(text: &[u8], at: usize) -> bool {
        let digits = [&text[at + 1..at + 2], &text[at + 3..at + 13]].concat();
        let zero = digits.iter().all(|&c| c == b'0');
        let e: i32 = std::str::from_utf8(&text[at + 14..at + 17])
            .unwrap()
            .parse()
            .unwrap();
        zero || (-22..=22).contains(&(e - 10))
    }

    /// `read` of `text` by a shape learned from `USUAL`, through both
    /// comparison routes, which must agree.
    fn read_both(shape: &RealColumns, text: &[u8]) -> Option<([f64; N_REALS], usize)> {
        let mut padded = text.to_vec();
        padded.resize(text.len() + MAX_LEN, b'x');
        let fast = shape.read(&padded);
        assert_eq!(
            shape.shape.matches_bytewise(text),
            shape.shape.matches(&padded),
            "the two comparisons disagree on {:?}",
            String::from_utf8_lossy(text)
        );
        let exact = shape.read(text);
        assert_eq!(fast, exact, "padding changed the result");
        fast
    }

    #[test]
    fn the_usual_line_is_learned_and_read_like_str_parse() {
        let shape = RealColumns::learn(USUAL).expect("the usual layout is learned");
        let (v, len) = read_both(&shape, USUAL).expect("a line reads by its own shape");
        assert_eq!(len, USUAL.len());
        let want = by_fields(USUAL).unwrap();
        for (a, b) in v.iter().zip(&want) {
            assert_eq!(a.to_bits(), b.to_bits());
        }
    }

    #[test]
    fn other_values_of_the_same_shape_are_read_exactly() {
        let shape = RealColumns::learn(USUAL).unwrap();
        // Every sign, digits 0–9 at every place:
        // a deterministic walk over values (common practice: a linear
        // congruential generator, Knuth's MMIX constants).
        let mut state: u64 = 0x2545_f491_4f6c_dd1d;
        let mut next = || {
            state = state
                .wrapping_mul(6_364_136_223_846_793_005)
                .wrapping_add(1_442_695_040_888_963_407);
            state >> 33
        };
        for _ in 0..5000 {
            let mut text = USUAL.to_vec();
            for &at in &shape.at {
                text[at] = if next() % 2 == 0 { b'+' } else { b'-' };
                for k in [1, 3, 4, 5, 6, 7, 8, 9, 10, 11, 12] {
                    text[at + k] = b'0' + (next() % 10) as u8;
                }
                text[at + 14] = if next() % 2 == 0 { b'+' } else { b'-' };
                text[at + 15] = b'0' + (next() % 3) as u8;
                text[at + 16] = b'0' + (next() % 10) as u8;
            }
            let want = by_fields(&text).unwrap();
            match read_both(&shape, &text) {
                Some((v, len)) => {
                    assert_eq!(len, text.len());
                    for (a, b) in v.iter().zip(&want) {
                        assert_eq!(
                            a.to_bits(),
                            b.to_bits(),
                            "{}",
                            String::from_utf8_lossy(&text)
                        );
                    }
                }
                // Only outside the exact range may it decline.
                None => assert!(
                    shape.at.iter().any(|&at| !exact_range(&text, at)),
                    "declined a line in range: {}",
                    String::from_utf8_lossy(&text)
                ),
            }
        }
    }

    #[test]
    fn any_byte_at_any_place_is_accepted_exactly_when_the_shape_holds() {
        // Each byte of the line replaced by each value: the shape must
        // accept exactly the lines whose bytes have the same kind at every
        // place (digit, sign, or the same other byte), as
        // judged by this test's own per-byte rule.
        let shape = RealColumns::learn(USUAL).unwrap();
        let kind = |c: u8| -> u16 {
            if c.is_ascii_digit() {
                0
            } else if c == b'+' || c == b'-' {
                1
            } else {
                3 + u16::from(c)
            }
        };
        for place in 0..USUAL.len() {
            for byte in 0..=255u8 {
                let mut text = USUAL.to_vec();
                text[place] = byte;
                let same_kind = kind(byte) == kind(USUAL[place]);
                let got = read_both(&shape, &text);
                assert_eq!(
                    shape.shape.matches_bytewise(&text),
                    same_kind,
                    "byte {byte:#04x} at place {place}: {}",
                    String::from_utf8_lossy(&text)
                );
                // A changed exponent digit may leave the exact range: the
                // shape holds, the reading declines.
                let in_range = !same_kind || shape.at.iter().all(|&at| exact_range(&text, at));
                assert_eq!(
                    got.is_some(),
                    same_kind && in_range,
                    "place {place} byte {byte}"
                );
                if let Some((v, _)) = got {
                    let want = by_fields(&text).unwrap();
                    for (a, b) in v.iter().zip(&want) {
                        assert_eq!(a.to_bits(), b.to_bits());
                    }
                }
            }
        }
    }

    #[test]
    fn shorter_or_shifted_lines_do_not_match() {
        let shape = RealColumns::learn(USUAL).unwrap();
        // Cut short anywhere (the end of the text before the newline).
        for cut in 0..USUAL.len() {
            assert!(read_both(&shape, &USUAL[..cut]).is_none(), "cut at {cut}");
        }
        // One more blank before a column, or a twelfth mantissa digit.
        let wider = [b" ", USUAL].concat();
        assert!(read_both(&shape, &wider).is_none());
        let mut longer = USUAL.to_vec();
        longer.insert(shape.at[6] + 12, b'5');
        assert!(read_both(&shape, &longer).is_none());
    }

    #[test]
    fn other_layouts_are_not_learned_but_blanks_and_crlf_are() {
        for text in [
            &b" 1.5 -2.25 3 4 5 6 7\n"[..],
            b" +1.0000000000e+01 +1.0000000000e+01\n",
            b"+1.1709384069e+01 -9.9358048851e+01 +1.0050395164e+03 +1.4213069905e+03 +1.0000000000e+03 +0.0000000000e+00 +9.0000000000e+00\n",
            b" +1.1709384069e+01 -9.9358048851e+01 +1.0050395164e+03 +1.4213069905e+03 +1.0000000000e+03 +0.0000000000e+00 +9.0000000000e+00 7\n",
            b" +1.1709384069e+01 -9.9358048851e+01 +1.0050395164e+03 +1.4213069905e+03 +1.0000000000e+03 +0.0000000000e+00 +9.0000000000e+00",
        ] {
            assert!(
                RealColumns::learn(text).is_none(),
                "{}",
                String::from_utf8_lossy(text)
            );
        }
        let wide = b"\t 1.1709384069E+01  -9.9358048851e-01 +1.0050395164e+03 +1.4213069905e+03 +1.0000000000e+03 +0.0000000000e+00 9.0000000000e+00 \r\n";
        let shape = RealColumns::learn(wide).expect("blanks, CR and unsigned reals are learned");
        let (v, len) = read_both(&shape, wide).unwrap();
        assert_eq!(len, wide.len());
        let want = by_fields(wide).unwrap();
        for (a, b) in v.iter().zip(&want) {
            assert_eq!(a.to_bits(), b.to_bits());
        }
    }

    /// The usual integer columns (`%9d%3d%5d%5d%5d%5d`) and the start of
    /// the real columns after them.
    const USUAL_INTS: &[u8] =
        b"       21 -1    0    0  501  502 +0.0000000000e+00 +0.0000000000e+00 +1.5857467720e+03\n";

    /// The first six fields by `str::parse` (the reference).
    fn ints_by_fields(text: &[u8]) -> Option<[i32; N_INTS]> {
        let line = std::str::from_utf8(text).ok()?;
        let v: Vec<i32> = line
            .split([' ', '\t', '\r', '\n'])
            .filter(|f| !f.is_empty())
            .take(N_INTS)
            .map(|f| f.parse::<i32>().ok())
            .collect::<Option<_>>()?;
        v.try_into().ok()
    }

    #[test]
    fn integer_columns_accept_any_byte_exactly_when_the_shape_holds() {
        let shape = IntColumns::learn(USUAL_INTS).expect("the usual widths are learned");
        let (v, len) = shape.read(USUAL_INTS).unwrap();
        assert_eq!(Some(v), ints_by_fields(USUAL_INTS));
        assert_eq!(&USUAL_INTS[len..len + 2], b" +");
        // Kinds as in the real columns' test: digits, signs, and every
        // other byte by itself; the blank that
        // ends the sixth column belongs to the shape.
        let kind = |c: u8| -> u16 {
            if c.is_ascii_digit() {
                0
            } else if c == b'+' || c == b'-' {
                1
            } else {
                3 + u16::from(c)
            }
        };
        for place in 0..=len {
            for byte in 0..=255u8 {
                let mut text = USUAL_INTS.to_vec();
                text[place] = byte;
                let same_kind = kind(byte) == kind(USUAL_INTS[place]);
                let got = shape.read(&text);
                assert_eq!(
                    shape.shape.matches_bytewise(&text),
                    shape.shape.matches(&text),
                    "the two comparisons disagree at {place}"
                );
                assert_eq!(
                    got.is_some(),
                    same_kind,
                    "byte {byte:#04x} at place {place}"
                );
                if let Some((v, _)) = got {
                    assert_eq!(
                        Some(v),
                        ints_by_fields(&text),
                        "byte {byte:#04x} at {place}"
                    );
                }
            }
        }
    }

    #[test]
    fn integer_columns_of_other_widths_and_signs() {
        for text in [
            &b"1000022 1 -3 4 -501 +2 +1.0\n"[..],
            b"\t-5\t1\t0\t0\t0\t0\n",
            b"        1  1    1    2    0    0 x",
            b"  999999999 -999999999 0 0 0 0 \n",
        ] {
            let shape = IntColumns::learn(text).expect("learned");
            let mut padded = text.to_vec();
            padded.resize(INT_LEN, b' ');
            let (v, len) = shape.read(&padded).expect("read by its own shape");
            assert_eq!(
                Some(v),
                ints_by_fields(text),
                "{}",
                String::from_utf8_lossy(text)
            );
            assert!(matches!(text[len], b' ' | b'\t' | b'\n'));
        }
        for text in [
            // ten digits, no blank before a column, the sixth column not
            // ended by a blank, five columns, a column too far in
            &b"1234567890 1 0 0 0 0 \n"[..],
            b"21 -1 0 0 501+502 +1.0\n",
            b"21 -1 0 0 501 502+1.0\n",
            b"21 -1 0 0 501\n",
            b"                                       21 -1 0 0 501 502 +1\n",
        ] {
            assert!(
                IntColumns::learn(text).is_none(),
                "{}",
                String::from_utf8_lossy(text)
            );
        }
    }
}
