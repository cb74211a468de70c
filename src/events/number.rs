//! Number parsing for the event hot path: correctly rounded decimal → `f64`
//! with a fast path for the fixed notation LHEF writers use, and integers.
//!
//! Used by [`super::parse`] and [`super::init`].

/// Exact powers of ten representable in an `f64` (10⁰ … 10²²).
const POW10: [f64; 23] = [
    1e0, 1e1, 1e2, 1e3, 1e4, 1e5, 1e6, 1e7, 1e8, 1e9, 1e10, 1e11, 1e12, 1e13, 1e14, 1e15, 1e16,
    1e17, 1e18, 1e19, 1e20, 1e21, 1e22,
];

/// Largest integer below which every integer is exact in an `f64` (2⁵³).
const MAX_EXACT_MANTISSA: u64 = 1 << 53;

/// Parses a decimal number, correctly rounded to the nearest `f64`.
///
/// Fast path: a number `[±]digits[.digits][(e|E)[±]digits]` whose
/// significant digits form an integer w < 2⁵³ and whose decimal exponent q
/// satisfies |q| ≤ 22 is computed as w·10^q or w/10^−q in one floating-point
/// operation on two exact operands, which IEEE 754 rounds correctly.
/// Everything else falls back to `str::parse::<f64>`, which is correctly
/// rounded for every input. Returns `None` for text that is not a number;
/// `inf`/`nan` spellings are returned as such (callers reject non-finite
/// values with their own message).
///
/// # References
/// W. D. Clinger, "How to read floating point numbers accurately",
/// PLDI 1990, ACM SIGPLAN Notices 25(6) 92, the fast path of Sec. 5.
#[inline]
pub fn parse_f64(s: &[u8]) -> Option<f64> {
    if let Some((v, used)) = fast_f64(s)
        && used == s.len()
    {
        return Some(v);
    }
    std::str::from_utf8(s).ok()?.parse::<f64>().ok()
}

/// The first 8 bytes of `b` as a little-endian word (first byte lowest);
/// `b` has at least 8 bytes.
#[inline(always)]
pub(super) fn word(b: &[u8]) -> u64 {
    // invariant: callers pass at least 8 bytes
    u64::from_le_bytes(*b.first_chunk().unwrap())
}

/// The first two 8-byte words of `b` (see [`word`]); `b` has at least 16
/// bytes.
#[inline(always)]
pub(super) fn words(b: &[u8]) -> (u64, u64) {
    // invariant: callers pass at least 16 bytes
    let b: &[u8; 16] = b.first_chunk().unwrap();
    (word(b), word(&b[8..]))
}

/// Value of 8 ASCII digits (little-endian in `x`, first digit lowest),
/// by the SWAR reduction of pairs, quads and octets (common practice;
/// the well-known trick used by fast decimal parsers).
#[inline]
pub(super) fn eight_digits(x: u64) -> u64 {
    let x = x.wrapping_sub(0x3030_3030_3030_3030);
    let x = (x.wrapping_mul(10)).wrapping_add(x >> 8);
    let lo = x & 0x0000_00FF_0000_00FF;
    let hi = (x >> 16) & 0x0000_00FF_0000_00FF;
    (lo.wrapping_mul(100 + (1_000_000 << 32))).wrapping_add(hi.wrapping_mul(1 + (10_000 << 32)))
        >> 32
}

/// w·10^q for an exact mantissa w < 2⁵³ and |q| ≤ 22: one correctly
/// rounded operation on two exact operands (Clinger 1990, Sec. 5); `None`
/// outside that range unless w = 0.
///
/// Zero needs no case of its own inside the range (0·10^q = 0/10^q = +0),
/// and the one branch left, on the sign of q, follows the exponent, which
/// rarely changes sign from one number to the next.
#[inline(always)]
fn clinger(mant: u64, q: i32) -> Option<f64> {
    let w = mant as f64; // exact: callers ensure mant < 2^53
    let Some(&p) = POW10.get(q.unsigned_abs() as usize) else {
        return (mant == 0).then_some(0.0);
    };
    Some(if q < 0 { w / p } else { w * p })
}

/// `v` (≥ +0) with its sign bit set when `negative`, without a branch:
/// the signs of momentum components are as good as random, and a branch
/// on them is mispredicted about every other time.
#[inline(always)]
fn with_sign(v: f64, negative: bool) -> f64 {
    f64::from_bits(v.to_bits() | (u64::from(negative) << 63))
}

/// Per byte of `x`: zero exactly where the byte is an ASCII digit, for
/// the bytes up to the first non-digit (a carry out of a byte ≥ 0xFA can
/// only make the next byte look like a non-digit, never the reverse).
#[inline(always)]
fn non_digit_bytes(x: u64) -> u64 {
    ((x & 0xF0F0_F0F0_F0F0_F0F0) ^ 0x3030_3030_3030_3030)
        | ((x.wrapping_add(0x0606_0606_0606_0606) & 0xF0F0_F0F0_F0F0_F0F0) ^ 0x3030_3030_3030_3030)
}

/// The layout `[±]d.dddddddddde±dd` (17 bytes with the sign, 16 without)
/// that the common LHEF writers use for every real, checked and read as
/// two 8-byte words without loops or per-byte branches; the value and the
/// bytes used, or `None`.
///
/// Word 0 holds `d.dddddd`, word 1 `dddde±dd`: the digit bytes are tested
/// together against a mask of the digit positions, the `.`, the `e`/`E`
/// and the exponent sign against a template.
#[inline(always)]
pub(super) fn fixed_layout(s: &[u8]) -> Option<(f64, usize)> {
    let first = *s.first()?;
    let signed = first == b'+' || first == b'-';
    let o = usize::from(signed);
    let (w0, w1) = words(s.get(o..o + 16)?);
    // Digit positions: bytes 0 and 2–7 of word 0; 0–3, 6, 7 of word 1.
    const DIGITS_0: u64 = 0xFFFF_FFFF_FFFF_00FF;
    const DIGITS_1: u64 = 0xFFFF_0000_FFFF_FFFF;
    // Byte 1 of word 0 is '.'; byte 4 of word 1 is 'e' or 'E' (bit 5
    // ignored); byte 5 of word 1 is '+' (0x2B) or '-' (0x2D): of the bytes
    // matching 0x29 outside bits 1 and 2, exactly those two have bits 1
    // and 2 different.
    let e_sign = w1 >> 40;
    let bad = (non_digit_bytes(w0) & DIGITS_0)
        | ((w0 ^ 0x2E00) & 0xFF00)
        | (non_digit_bytes(w1) & DIGITS_1)
        | ((w1 ^ (0x65 << 32)) & (0xDF << 32))
        | ((w1 ^ (0x29 << 40)) & (0xF9 << 40))
        | (((e_sign >> 1) ^ (e_sign >> 2) ^ 1) & 1);
    if bad != 0 {
        return None;
    }
    Some((fixed_value(first, w0, w1)?, 16 + o))
}

/// The value of a number in the fixed layout `[±]d.dddddddddde±dd`, from
/// its first byte (the sign or the leading digit) and the two 8-byte words
/// after the sign, once the layout has been checked (by [`fixed_layout`],
/// or by a line shape that implies it); `None` outside Clinger's exact
/// range.
#[inline(always)]
pub(super) fn fixed_value(first: u8, w0: u64, w1: u64) -> Option<f64> {
    value_of_digits(first, w1, fixed_digits(w0, w1))
}

/// [`fixed_value`] with the digits read by SSE2 where the build has it
/// ([`fixed_digits_sse2`]), for the particle-line shapes, which convert
/// seven numbers in a row; the same value for every input.
///
/// (The generic number reader keeps the scalar digits: the SSE2 function
/// cannot be forced inline, and a call per number there costs more than
/// it saves.)
#[inline(always)]
pub(super) fn fixed_value_sse2(first: u8, w0: u64, w1: u64) -> Option<f64> {
    // SAFETY: `fixed_digits_sse2` needs only SSE2, which this build
    // enables (the `cfg`; every x86-64 target does).
    #[cfg(all(target_arch = "x86_64", target_feature = "sse2"))]
    let digits = unsafe { fixed_digits_sse2(w0, w1) };
    #[cfg(not(all(target_arch = "x86_64", target_feature = "sse2")))]
    let digits = fixed_digits(w0, w1);
    value_of_digits(first, w1, digits)
}

/// The value from the first byte, the second word (for the exponent sign)
/// and the (mantissa, exponent digits) of a fixed-layout number.
#[inline(always)]
fn value_of_digits(first: u8, w1: u64, (mant, exp): (u64, i32)) -> Option<f64> {
    // '-' has bit 1 clear, '+' has it set.
    let e_sign = w1 >> 40;
    let q = if e_sign & 2 == 0 { -exp } else { exp } - 10;
    Some(with_sign(clinger(mant, q)?, first == b'-'))
}

/// The 11-digit mantissa (the digits without the point, < 10¹¹) and the
/// exponent's two digits of a checked fixed-layout number, from the two
/// words after its sign (see [`fixed_value`]).
#[inline(always)]
fn fixed_digits(w0: u64, w1: u64) -> (u64, i32) {
    // The eight digits after the point: bytes 2–7 of word 0, 0–1 of word 1.
    let d1_8 = eight_digits((w0 >> 16) | (w1 << 48));
    let d0 = w0 & 0xF;
    let d9 = (w1 >> 16) & 0xF;
    let d10 = (w1 >> 24) & 0xF;
    // 11 significant digits < 2^53: exact in an f64.
    let mant = d0 * 10_000_000_000 + d1_8 * 100 + d9 * 10 + d10;
    let exp = (((w1 >> 48) & 0xF) * 10 + ((w1 >> 56) & 0xF)) as i32;
    (mant, exp)
}

/// [`fixed_digits`] with SSE2 (part of every x86-64 processor), by the
/// multiply-add reduction of SIMD decimal parsers (common practice): the
/// sixteen bytes `d.dddddd` `dddde±dd` are widened to 16-bit digits and
/// combined by three multiply-add steps (pairs, then groups of three or
/// four digits, then seven), with weight 0 on the point, the `e` and the
/// exponent sign; the last step leaves the first seven digits, the last
/// four and the exponent in separate lanes.
#[cfg(all(target_arch = "x86_64", target_feature = "sse2"))]
#[target_feature(enable = "sse2")]
#[inline]
fn fixed_digits_sse2(w0: u64, w1: u64) -> (u64, i32) {
    use std::arch::x86_64::{
        _mm_cvtsi128_si64, _mm_extract_epi16, _mm_madd_epi16, _mm_packs_epi32, _mm_set_epi64x,
        _mm_set1_epi8, _mm_setr_epi16, _mm_setzero_si128, _mm_sub_epi8, _mm_unpackhi_epi8,
        _mm_unpacklo_epi8,
    };
    let x = _mm_sub_epi8(
        _mm_set_epi64x(w1 as i64, w0 as i64),
        _mm_set1_epi8(b'0' as i8),
    );
    // Digits as 16-bit lanes: d0 . d1 … d6 | d7 … d10 e ± e1 e2 (the
    // bytes that are not digits are weighted 0 below).
    let lo = _mm_unpacklo_epi8(x, _mm_setzero_si128());
    let hi = _mm_unpackhi_epi8(x, _mm_setzero_si128());
    // [d0, d1d2, d3d4, d5d6] and [d7d8, d9d10, 0, e1e2], each < 100.
    let lo = _mm_madd_epi16(lo, _mm_setr_epi16(1, 0, 10, 1, 10, 1, 10, 1));
    let hi = _mm_madd_epi16(hi, _mm_setr_epi16(10, 1, 10, 1, 0, 0, 10, 1));
    // [d0d1d2, d3…d6, d7…d10, e1e2], each < 10⁴ (fits the 16-bit packing).
    let g = _mm_madd_epi16(
        _mm_packs_epi32(lo, hi),
        _mm_setr_epi16(100, 1, 100, 1, 100, 1, 0, 1),
    );
    // [d0…d6, d7…d10, 0, e1e2].
    let r = _mm_madd_epi16(
        _mm_packs_epi32(g, g),
        _mm_setr_epi16(10_000, 1, 1, 0, 0, 0, 0, 1),
    );
    let first_two = _mm_cvtsi128_si64(r) as u64;
    let mant = (first_two & 0xFFFF_FFFF) * 10_000 + (first_two >> 32);
    (mant, _mm_extract_epi16::<6>(r))
}

/// 10⁰ … 10⁸ as integers.
const POW10_U64: [u64; 9] = [
    1,
    10,
    100,
    1_000,
    10_000,
    100_000,
    1_000_000,
    10_000_000,
    100_000_000,
];

/// Index (0–8) of the lowest non-zero byte of `x` (8 when all are zero):
/// the high bit of each non-zero byte is set exactly, without carries
/// between bytes (common practice, the "has a non-zero byte" bit trick).
#[inline(always)]
fn first_nonzero_byte(x: u64) -> usize {
    let t = ((x & 0x7F7F_7F7F_7F7F_7F7F).wrapping_add(0x7F7F_7F7F_7F7F_7F7F) | x)
        & 0x8080_8080_8080_8080;
    (t.trailing_zeros() / 8) as usize
}

/// Number of leading ASCII digits (0–8) among the 8 bytes of `x`
/// (little-endian, first byte lowest). Exact up to the first non-digit:
/// a carry out of a non-digit byte only disturbs the bytes after it.
#[inline(always)]
fn leading_digits(x: u64) -> usize {
    first_nonzero_byte(non_digit_bytes(x))
}

/// Reads a run of decimal digits at `s[*i..]` into `mant` (as more
/// significant digits followed by these), eight at a time. Returns the
/// number of digits, or `None` when the total would exceed 19 (which
/// could overflow a `u64`).
#[inline(always)]
fn digit_run(s: &[u8], i: &mut usize, mant: &mut u64, n_before: usize) -> Option<usize> {
    let start = *i;
    while let Some(w) = s.get(*i..*i + 8) {
        let x = word(w);
        let n = leading_digits(x);
        if n == 0 {
            return Some(*i - start);
        }
        if n_before + (*i - start) + n > 19 {
            return None;
        }
        // The n digits, padded in front with '0' bytes to eight.
        let padded = if n == 8 {
            x
        } else {
            (x << (8 * (8 - n))) | (0x3030_3030_3030_3030 >> (8 * n))
        };
        *mant = *mant * POW10_U64[n] + eight_digits(padded);
        *i += n;
        if n < 8 {
            return Some(*i - start);
        }
    }
    while let Some(&c) = s.get(*i) {
        let d = c.wrapping_sub(b'0');
        if d > 9 {
            break;
        }
        if n_before + (*i - start) + 1 > 19 {
            return None;
        }
        *mant = *mant * 10 + u64::from(d);
        *i += 1;
    }
    Some(*i - start)
}

/// The fast path on a prefix of `s`: the value and the number of bytes
/// used, or `None` when the prefix is not in the fast-path form.
#[inline(always)]
fn fast_f64(s: &[u8]) -> Option<(f64, usize)> {
    fixed_layout(s).or_else(|| general_f64(s))
}

/// The fast path for any `[±]digits[.digits][(e|E)[±]digits]` prefix (the
/// fixed layout is tried first by [`fast_f64`]).
#[inline(never)]
fn general_f64(s: &[u8]) -> Option<(f64, usize)> {
    let n = s.len();
    let neg = s.first() == Some(&b'-');
    let mut i = usize::from(neg || s.first() == Some(&b'+'));
    let mut mant: u64 = 0;
    let mut n_digits = digit_run(s, &mut i, &mut mant, 0)?;
    let mut frac_digits: i32 = 0;
    if i < n && s[i] == b'.' {
        i += 1;
        let f = digit_run(s, &mut i, &mut mant, n_digits)?;
        n_digits += f;
        frac_digits = f as i32;
    }
    if n_digits == 0 {
        return None;
    }
    let mut exp: i32 = 0;
    if i < n && s[i] | 0x20 == b'e' {
        i += 1;
        let eneg = match s.get(i) {
            Some(b'-') => {
                i += 1;
                true
            }
            Some(b'+') => {
                i += 1;
                false
            }
            _ => false,
        };
        let start = i;
        while i < n && s[i].is_ascii_digit() {
            if i - start >= 4 {
                return None;
            }
            exp = exp * 10 + i32::from(s[i] - b'0');
            i += 1;
        }
        if i == start {
            return None;
        }
        if eneg {
            exp = -exp;
        }
    }
    if mant >= MAX_EXACT_MANTISSA {
        return None;
    }
    let q = exp - frac_digits;
    Some((with_sign(clinger(mant, q)?, neg), i))
}

/// A position in event text, for reading the fields of one line in the
/// usual case in one scan, without finding the end of the line first.
/// Fields are separated by blanks (space, tab, CR); a newline ends the
/// line. Every method returns `None` when the next field is not in the
/// fast form (or is missing); callers then re-read the line field by field
/// to report the exact problem.
pub struct Cursor<'a> {
    s: &'a [u8],
    i: usize,
}

/// True for a byte that ends a field: a blank or the newline.
#[inline(always)]
fn ends_a_field(c: u8) -> bool {
    is_blank(c) || c == b'\n'
}

impl<'a> Cursor<'a> {
    /// A cursor at the start of `s`.
    #[inline]
    pub fn new(s: &'a [u8]) -> Self {
        Self { s, i: 0 }
    }

    /// Skips blanks (not the newline), eight bytes at a time while they are
    /// spaces.
    #[inline(always)]
    fn skip_blanks(&mut self) {
        // Most fields follow one space: settle that without the wide test.
        match self.s.get(self.i..self.i + 2) {
            Some(&[b' ', c]) if !is_blank(c) => {
                self.i += 1;
                return;
            }
            Some(&[c, _]) if !is_blank(c) => return,
            _ => {}
        }
        loop {
            if let Some(w) = self.s.get(self.i..self.i + 8) {
                let y = word(w) ^ 0x2020_2020_2020_2020;
                // The spaces are the zero bytes of `y`.
                self.i += first_nonzero_byte(y);
                if y == 0 {
                    continue;
                }
            }
            match self.s.get(self.i) {
                Some(&c) if is_blank(c) => self.i += 1,
                _ => return,
            }
        }
    }

    #[inline(always)]
    fn ends_field(&self, at: usize) -> bool {
        self.s.get(at).is_none_or(|&c| ends_a_field(c))
    }

    /// The next field as a number in the fast-path form.
    #[inline(always)]
    pub fn f64(&mut self) -> Option<f64> {
        self.number(false)
    }

    /// The next field as a number in the fast-path form that may also be
    /// followed directly by `<` (as in `<wgt id='1'>1.5</wgt>`).
    #[inline]
    pub fn f64_before_tag(&mut self) -> Option<f64> {
        self.number(true)
    }

    #[inline(always)]
    fn number(&mut self, tag_may_follow: bool) -> Option<f64> {
        // The usual field: one space, the fixed layout, a blank or the
        // newline; 19 bytes hold the space, at most 17 bytes of number and
        // the byte that must end it.
        if let Some(b) = self.s.get(self.i..self.i + 19)
            && b[0] == b' '
            && let Some((v, used)) = fixed_layout(&b[1..])
            && ends_a_field(b[1 + used])
        {
            self.i += 1 + used;
            return Some(v);
        }
        self.skip_blanks();
        let (v, used) = fast_f64(self.s.get(self.i..)?)?;
        let end = self.i + used;
        if !(self.ends_field(end) || (tag_may_follow && self.s.get(end) == Some(&b'<'))) {
            return None;
        }
        self.i = end;
        Some(v)
    }

    /// The next field as an integer that fits an `i32`.
    #[inline(always)]
    pub fn i32(&mut self) -> Option<i32> {
        self.skip_blanks();
        let r = self.s.get(self.i..)?;
        let neg = r.first() == Some(&b'-');
        let mut k = usize::from(neg || r.first() == Some(&b'+'));
        let start = k;
        let mut v: i64 = 0;
        while let Some(&c) = r.get(k) {
            let d = c.wrapping_sub(b'0');
            if d > 9 {
                break;
            }
            if k - start >= 10 {
                return None;
            }
            v = v * 10 + i64::from(d);
            k += 1;
        }
        if k == start || !self.ends_field(self.i + k) {
            return None;
        }
        self.i += k;
        i32::try_from(if neg { -v } else { v }).ok()
    }

    /// Expects `lit` after optional blanks and consumes it.
    #[inline]
    pub fn literal(&mut self, lit: &[u8]) -> Option<()> {
        self.skip_blanks();
        if self.s.get(self.i..)?.starts_with(lit) {
            self.i += lit.len();
            Some(())
        } else {
            None
        }
    }

    /// The text after the cursor.
    #[inline]
    pub fn rest_bytes(&self) -> &'a [u8] {
        self.s.get(self.i..).unwrap_or_default()
    }

    /// Bytes read so far.
    #[inline]
    pub fn position(&self) -> usize {
        self.i
    }

    /// Moves the cursor `n` bytes on (to at most the end of the text).
    #[inline]
    pub fn advance(&mut self, n: usize) {
        self.i = (self.i + n).min(self.s.len());
    }

    /// When only blanks remain on the line: the number of bytes read,
    /// including the newline if there is one.
    #[inline(always)]
    pub fn line_end(&mut self) -> Option<usize> {
        self.skip_blanks();
        match self.s.get(self.i) {
            None => Some(self.i),
            Some(b'\n') => Some(self.i + 1),
            Some(_) => None,
        }
    }
}

/// Parses a decimal integer `[±]digits` into an `i64`; `None` on any other
/// text or on overflow.
#[inline]
pub fn parse_i64(s: &[u8]) -> Option<i64> {
    let (neg, digits) = match s.first()? {
        b'-' => (true, &s[1..]),
        b'+' => (false, &s[1..]),
        _ => (false, s),
    };
    if digits.is_empty() || digits.len() > 18 {
        return None;
    }
    let mut v: i64 = 0;
    for &c in digits {
        if !c.is_ascii_digit() {
            return None;
        }
        v = v * 10 + i64::from(c - b'0');
    }
    Some(if neg { -v } else { v })
}

/// Parses a decimal integer that must fit an `i32`.
#[inline]
pub fn parse_i32(s: &[u8]) -> Option<i32> {
    parse_i64(s).and_then(|v| i32::try_from(v).ok())
}

/// Splits a line into fields separated by ASCII blanks (space, tab, CR).
#[inline]
pub fn fields(line: &[u8]) -> Fields<'_> {
    Fields { rest: line }
}

/// Iterator over the blank-separated fields of a line.
pub struct Fields<'a> {
    rest: &'a [u8],
}

/// True for a field separator within a line: space, tab, CR.
#[inline(always)]
pub(super) fn is_blank(c: u8) -> bool {
    c == b' ' || c == b'\t' || c == b'\r'
}

impl<'a> Iterator for Fields<'a> {
    type Item = &'a [u8];
    #[inline]
    fn next(&mut self) -> Option<&'a [u8]> {
        let r = self.rest;
        let mut i = 0;
        while i < r.len() && is_blank(r[i]) {
            i += 1;
        }
        if i == r.len() {
            self.rest = &r[i..];
            return None;
        }
        let start = i;
        // Eight bytes at a time: flag bytes below 0x21 (blanks are among
        // them); the lowest flagged byte is exact (the classic
        // "has a byte less than n" bit trick, common practice).
        while i + 8 <= r.len() {
            let x = word(&r[i..]);
            let t = x.wrapping_sub(0x2121_2121_2121_2121) & !x & 0x8080_8080_8080_8080;
            if t == 0 {
                i += 8;
                continue;
            }
            i += (t.trailing_zeros() / 8) as usize;
            if is_blank(r[i]) {
                break;
            }
            i += 1;
        }
        while i < r.len() && !is_blank(r[i]) {
            i += 1;
        }
        self.rest = &r[i..];
        Some(&r[start..i])
    }
}

/// Removes leading and trailing ASCII whitespace.
#[inline]
pub fn trim(line: &[u8]) -> &[u8] {
    line.trim_ascii()
}

#[cfg(test)]
mod tests {
    use super::*;

    fn check(s: &str) {
        let want = s.parse::<f64>().unwrap();
        let got = parse_f64(s.as_bytes()).unwrap();
        assert_eq!(got.to_bits(), want.to_bits(), "{s}");
    }

    // Reference: the standard library's correctly rounded parser (every
    // value below must give the same bits through the fast path).
    #[test]
    fn fast_path_agrees_with_std() {
        for s in [
            "0",
            "-0",
            "-0.0000000000e+00",
            "+0.0000000000e+00",
            "-9.9999999999e-99",
            "+1.2345678901e+30",
            "+1.2345678901e+100",
            "+1.2345678901e+03",
            "-9.8765432109E-05",
            "6.5000000000e+03",
            "1e-5",
            "123.0",
            "0.1",
            "91.188",
            "0.007546771",
            "4.7789443449",
            "-1240.3761329",
            "9007199254740991",
            "9007199254740993",
            "1.7976931348623157e308",
            "4.9e-324",
            "2.2250738585072014e-308",
            "123456789012345678901234567890",
            "1e22",
            "1e23",
            "0.000000000000000000000000001",
            "1.",
            ".5",
            // Unsigned fixed layout, digit runs of every length around 8.
            "5.1517859143e+02",
            "0.0000e+00",
            "9.0000e+00",
            "12345678",
            "123456789",
            "1234567.1234567",
            "12345678.12345678",
            "123456789.0123456789",
            "9999999999999999999",
            "99999999999999999999",
            "0.00000000000000000001",
            "-00000012.50",
            "7.5467710000e-03",
            "1.23456789012E+4",
        ] {
            check(s);
        }
    }

    /// The fixed layout `[±]d.dddddddddde±dd`, checked byte by byte.
    fn is_fixed_layout(b: &[u8]) -> bool {
        let b = match b.first() {
            Some(b'+' | b'-') => &b[1..],
            _ => b,
        };
        b.len() == 16
            && b.iter().enumerate().all(|(k, &c)| match k {
                1 => c == b'.',
                12 => c == b'e' || c == b'E',
                13 => c == b'+' || c == b'-',
                _ => c.is_ascii_digit(),
            })
    }

    // Every byte value at every position of a signed and an unsigned
    // fixed-layout number: the word-wise reader accepts exactly the
    // strings a byte-by-byte check accepts, with the bits of `str::parse`.
    #[test]
    fn fixed_layout_accepts_exactly_the_layout() {
        for base in ["+1.2345678901e+03", "-9.8765432109E-05", "5.1517859143e+02"] {
            for k in 0..base.len() {
                for c in 0..=255u8 {
                    let mut s = base.as_bytes().to_vec();
                    s[k] = c;
                    let n = if matches!(s[0], b'+' | b'-') { 17 } else { 16 };
                    let n = n.min(s.len());
                    // Clinger's exact range (|q| ≤ 22 for w·10^q, the 11
                    // digits read as an integer w) bounds the fast path too.
                    let in_range = || {
                        let t = std::str::from_utf8(&s[n - 3..n]).unwrap();
                        let zero = s[n - 16..n - 4].iter().all(|&c| c == b'0' || c == b'.');
                        zero || (t.parse::<i32>().unwrap() - 10).abs() <= 22
                    };
                    let want = is_fixed_layout(&s[..n]) && in_range();
                    match fixed_layout(&s) {
                        Some((v, used)) => {
                            assert!(want, "accepted {:?}", String::from_utf8_lossy(&s));
                            assert_eq!(used, n);
                            let text = std::str::from_utf8(&s[..n]).unwrap();
                            assert_eq!(v.to_bits(), text.parse::<f64>().unwrap().to_bits());
                        }
                        None => assert!(!want, "rejected {:?}", String::from_utf8_lossy(&s)),
                    }
                }
            }
        }
    }

    /// The two words after the sign of the fixed-layout number with the
    /// eleven digits `digits` and exponent `exp` (0–99, sign `+`).
    fn fixed_words(digits: &[u8; 11], exp: u8) -> (u64, u64) {
        let mut b = Vec::with_capacity(16);
        b.push(digits[0]);
        b.push(b'.');
        b.extend_from_slice(&digits[1..]);
        b.extend_from_slice(format!("e+{exp:02}").as_bytes());
        words(&b)
    }

    // The mantissa and exponent digits of the fixed layout, by the scalar
    // reader and (on x86-64) the SSE2 one, against `str::parse` of the
    // same digits: every digit value at every place over all-0 and all-9
    // backgrounds, every exponent, and pseudo-random digit strings.
    #[test]
    fn fixed_digits_agree_with_str_parse() {
        let check = |digits: &[u8; 11], exp: u8| {
            let (w0, w1) = fixed_words(digits, exp);
            let want = (
                std::str::from_utf8(digits).unwrap().parse::<u64>().unwrap(),
                i32::from(exp),
            );
            assert_eq!(fixed_digits(w0, w1), want, "{digits:?} e{exp}");
            #[cfg(all(target_arch = "x86_64", target_feature = "sse2"))]
            // SAFETY: SSE2 is enabled in this build (the `cfg`).
            assert_eq!(
                unsafe { fixed_digits_sse2(w0, w1) },
                want,
                "{digits:?} e{exp}"
            );
        };
        for background in [b'0', b'9'] {
            for k in 0..11 {
                for d in b'0'..=b'9' {
                    let mut digits = [background; 11];
                    digits[k] = d;
                    check(&digits, 7);
                }
            }
            for exp in 0..=99 {
                check(&[background; 11], exp);
            }
        }
        // Deterministic LCG (Knuth MMIX constants, common practice).
        let mut x: u64 = 0x9E37_79B9;
        for _ in 0..100_000 {
            let mut digits = [0u8; 11];
            for d in &mut digits {
                x = x
                    .wrapping_mul(6_364_136_223_846_793_005)
                    .wrapping_add(1_442_695_040_888_963_407);
                *d = b'0' + ((x >> 33) % 10) as u8;
            }
            check(&digits, ((x >> 20) % 100) as u8);
        }
    }

    #[test]
    fn splits_fields() {
        let line = b"  21 -1 0 0 +1.2345678901e+03\t-0.5e-2\r\x01x  abcdefghijklmnopq ";
        let f: Vec<&[u8]> = fields(line).collect();
        assert_eq!(
            f,
            [
                &b"21"[..],
                b"-1",
                b"0",
                b"0",
                b"+1.2345678901e+03",
                b"-0.5e-2",
                b"\x01x",
                b"abcdefghijklmnopq"
            ]
        );
        assert_eq!(fields(b"   ").count(), 0);
    }

    #[test]
    fn cursor_reads_fields() {
        let mut c = Cursor::new(b" 21 -1 +1.5e+01\t-2.25 7x 1e2");
        assert_eq!(c.i32(), Some(21));
        assert_eq!(c.i32(), Some(-1));
        assert_eq!(c.f64(), Some(15.0));
        assert_eq!(c.f64(), Some(-2.25));
        assert_eq!(c.i32(), None); // "7x" is not an integer
        let mut c = Cursor::new(b"1e2 ");
        assert_eq!(c.f64(), Some(100.0));
        assert_eq!(c.line_end(), Some(4));
        assert_eq!(Cursor::new(b"3000000000").i32(), None);
        assert_eq!(Cursor::new(b"-2147483648").i32(), Some(i32::MIN));
        assert_eq!(Cursor::new(b"1.0").i32(), None);
        // A newline ends a field and the line; blanks are not skipped past it.
        let text = b"        21 -1\t+1.0000000000e+00 \r\n  7\n";
        let mut c = Cursor::new(text);
        assert_eq!(c.i32(), Some(21));
        assert_eq!(c.i32(), Some(-1));
        assert_eq!(c.f64(), Some(1.0));
        assert_eq!(c.line_end(), Some(text.len() - 4));
        let mut c = Cursor::new(b"  5\n6");
        assert_eq!(c.i32(), Some(5));
        assert_eq!(c.i32(), None);
        assert_eq!(Cursor::new(b"5 x\n").line_end(), None);
        let mut c = Cursor::new(b"> 1.5</wgt> \n");
        assert_eq!(c.literal(b">"), Some(()));
        assert_eq!(c.f64_before_tag(), Some(1.5));
        assert_eq!(c.literal(b"</wgt>"), Some(()));
        assert_eq!(c.line_end(), Some(13));
        assert_eq!(Cursor::new(b"1.5</wgt>").f64(), None);
    }

    #[test]
    fn rejects_garbage() {
        for s in [
            "", "-", "+", ".", "e5", "1e", "1e+", "1.2.3", "abc", "1x", "--1",
        ] {
            assert!(parse_f64(s.as_bytes()).is_none(), "{s}");
        }
        assert_eq!(parse_i32(b"-12"), Some(-12));
        assert_eq!(parse_i32(b"3000000000"), None);
        assert_eq!(parse_i32(b"1.0"), None);
        assert_eq!(parse_i32(b""), None);
    }

    #[test]
    fn pseudo_random_values_round_trip() {
        // Deterministic LCG (Knuth MMIX constants, common practice): the
        // formatted value must parse back to the same bits.
        let mut x: u64 = 0x1234_5678;
        for _ in 0..20_000 {
            x = x
                .wrapping_mul(6_364_136_223_846_793_005)
                .wrapping_add(1_442_695_040_888_963_407);
            let v = f64::from_bits(x >> 2) % 1e6;
            if !v.is_finite() {
                continue;
            }
            let signed = format!("{v:+.10e}");
            let (m, e) = signed.split_once('e').unwrap();
            let e: i32 = e.parse().unwrap();
            // The ±d.dddddddddde±dd layout of LHEF writers.
            let lhef = format!("{m}e{}{:02}", if e < 0 { '-' } else { '+' }, e.abs());
            for s in [format!("{v:.10e}"), format!("{v:e}"), format!("{v}"), lhef] {
                check(&s);
            }
        }
    }
}
