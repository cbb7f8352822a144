//! Text output: fast fixed-decimal numbers, CSV and JSON string escaping, and numbers for
//! messages and summaries.

const POW10: [f64; 10] = [1e0, 1e1, 1e2, 1e3, 1e4, 1e5, 1e6, 1e7, 1e8, 1e9];
/// Powers of ten that fit a `u64` exactly, up to 10^16 (the decimals of a fixed number here,
/// the digit runs of a number read in `input::plain_row`).
pub(crate) const POW10_U64: [u64; 17] = [
    1,
    10,
    100,
    1_000,
    10_000,
    100_000,
    1_000_000,
    10_000_000,
    100_000_000,
    1_000_000_000,
    10_000_000_000,
    100_000_000_000,
    1_000_000_000_000,
    10_000_000_000_000,
    100_000_000_000_000,
    1_000_000_000_000_000,
    10_000_000_000_000_000,
];

/// Append an unsigned integer in decimal (the `itoa` crate).
#[inline]
pub fn push_u64(out: &mut Vec<u8>, n: u64) {
    out.extend_from_slice(itoa::Buffer::new().format(n).as_bytes());
}

/// Append `x` with exactly `dec` decimals (at most 9), rounded half up in magnitude. Nothing
/// for a non-finite value (an empty CSV field); very large values fall back to `format!`.
#[inline]
pub fn push_fixed(out: &mut Vec<u8>, x: f64, dec: usize) {
    // One instance per decimal count, so that every division is by a constant.
    match dec {
        0 => fixed::<0>(out, x),
        1 => fixed::<1>(out, x),
        2 => fixed::<2>(out, x),
        3 => fixed::<3>(out, x),
        4 => fixed::<4>(out, x),
        5 => fixed::<5>(out, x),
        6 => fixed::<6>(out, x),
        7 => fixed::<7>(out, x),
        8 => fixed::<8>(out, x),
        _ => fixed::<9>(out, x),
    }
}

/// The rounding of the map's numbers (|x| 10^d + 0.5 truncated, the sign kept), the digits by
/// `itoa`: the integer part, then the fraction zero-padded to DEC digits (the digits of
/// fraction + 10^DEC but its leading 1).
#[inline]
fn fixed<const DEC: usize>(out: &mut Vec<u8>, x: f64) {
    if !x.is_finite() {
        return;
    }
    // Truncating |x| 10^d + 0.5 rounds half up without a libm call.
    let scaled = x.abs() * POW10[DEC] + 0.5;
    if scaled >= 9.0e15 {
        use std::io::Write;
        let _ = write!(out, "{x:.DEC$}");
        return;
    }
    let n = scaled as u64;
    // A negative value keeps its sign even where it rounds to zero: a failing margin of
    // -0.04 m/s is written -0.0, never as a zero margin.
    if x < 0.0 {
        out.push(b'-');
    }
    let mut digits = itoa::Buffer::new();
    out.extend_from_slice(digits.format(n / POW10_U64[DEC]).as_bytes());
    if DEC > 0 {
        out.push(b'.');
        let frac = digits
            .format(n % POW10_U64[DEC] + POW10_U64[DEC])
            .as_bytes();
        out.extend_from_slice(&frac[1..]);
    }
}

/// The eight decimal digits of `n` (below 10^8) as one word: byte `i` in memory order
/// (little-endian) is digit `i` counted from the most significant, each 0..=9. Two lanes of four
/// digits, then four of two, then eight of one, each split by a multiply-and-shift that is
/// exact in its range (x * 10486 >> 20 = x / 100 for x < 10^4; x * 103 >> 10 = x / 10 for
/// x < 100); checked against `to_string` for every magnitude in the tests.
#[inline(always)]
fn eight_digits(n: u32) -> u64 {
    let n = u64::from(n);
    let merged = (n / 10_000) | ((n % 10_000) << 32);
    let top = ((merged * 10_486) >> 20) & ((0x7F << 32) | 0x7F);
    let bot = merged - 100 * top;
    let hundreds = (bot << 16) | top;
    let mut tens = ((hundreds * 103) >> 10) & ((0xF << 48) | (0xF << 32) | (0xF << 16) | 0xF);
    tens += (hundreds - 10 * tens) << 8;
    tens
}

/// The most bytes one number can touch: the digit loop's fallback writes every integer digit of
/// the largest f64 (309), a sign, a point and up to 9 decimals, and the word stores of the fast
/// path reach up to 8 bytes past the end of the text.
pub const NUMBER_MAX: usize = 340;

/// Bytes in a [`Word`].
pub const WORD: usize = 32;

/// A short text padded to a fixed size, so that writing it is one fixed-size copy.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub struct Word {
    bytes: [u8; WORD],
    len: usize,
}

impl Word {
    /// `text` padded; `None` if it does not fit.
    pub fn new(text: &[u8]) -> Option<Self> {
        let mut bytes = [0u8; WORD];
        bytes.get_mut(..text.len())?.copy_from_slice(text);
        Some(Self {
            bytes,
            len: text.len(),
        })
    }
}

/// Writes one stretch of text (a row) into scratch that is known to be long enough, with the
/// cursor in a local: no length bookkeeping in memory between writes, so consecutive writes do
/// not wait on each other. Every write is still bounds-checked (a wrong bound panics, it never
/// writes outside); [`TextBuf::writer`] sizes it and [`TextBuf::commit`] keeps what it wrote.
pub struct RowWriter<'a> {
    buf: &'a mut [u8],
    pos: usize,
}

impl RowWriter<'_> {
    /// Bytes written so far.
    #[inline]
    pub fn written(&self) -> usize {
        self.pos
    }

    /// Append one byte.
    #[inline]
    pub fn push(&mut self, b: u8) {
        self.buf[self.pos] = b;
        self.pos += 1;
    }

    /// Append bytes.
    #[inline]
    pub fn extend(&mut self, s: &[u8]) {
        self.buf[self.pos..self.pos + s.len()].copy_from_slice(s);
        self.pos += s.len();
    }

    /// Append the first `word.len` bytes of a padded word with one fixed-size copy (the
    /// padding lands in the scratch past the text and is overwritten by what follows).
    #[inline(always)]
    pub fn word(&mut self, word: &Word) {
        self.buf[self.pos..self.pos + WORD].copy_from_slice(&word.bytes);
        self.pos += word.len;
    }

    /// Append an unsigned integer in decimal: below 10^8 (every row number of an export of
    /// up to a hundred million lines) one SWAR conversion and one store, computed in registers;
    /// else the `itoa` crate. Kept by measurement: 1 000 000 consecutive row numbers written
    /// with their separator 3.5 ns a row, against 5.4 ns for `itoa` 1.0 and 4.6 ns for
    /// counting the digits up in memory (its byte stores stall the word that copies them
    /// out), best of 15 passes, one core, 2026-12-04, the VM of `docs/performance.md` (`cd
    /// bench/micro && cargo run --release`).
    #[inline(always)]
    pub fn u64(&mut self, n: u64) {
        match u32::try_from(n) {
            Ok(m) if m < 100_000_000 => {
                let d = eight_digits(m);
                let skip = ((d.trailing_zeros() / 8) as usize).min(7);
                let word = (d | 0x3030_3030_3030_3030) >> (8 * skip);
                self.buf[self.pos..self.pos + 8].copy_from_slice(&word.to_le_bytes());
                self.pos += 8 - skip;
            }
            _ => self.extend(itoa::Buffer::new().format(n).as_bytes()),
        }
    }

    /// Append `x` with exactly `dec` decimals, exactly as [`push_fixed`] writes it (nothing for
    /// a non-finite value).
    #[inline]
    pub fn fixed(&mut self, x: f64, dec: usize) {
        match dec {
            0 => self.fixed_n::<0>(x),
            1 => self.fixed_n::<1>(x),
            2 => self.fixed_n::<2>(x),
            3 => self.fixed_n::<3>(x),
            4 => self.fixed_n::<4>(x),
            5 => self.fixed_n::<5>(x),
            6 => self.fixed_n::<6>(x),
            _ => {
                let mut v = Vec::with_capacity(32);
                push_fixed(&mut v, x, dec);
                self.extend(&v);
            }
        }
    }

    /// Up to eight significant digits with one SWAR conversion and three stores: the digits
    /// from the first significant one (at least one before the point), the point, the
    /// decimals. Same rounding as `fixed` (|x| 10^d + 0.5 truncated); a NaN or anything from
    /// 10^8 / 10^d up takes `fixed` (`itoa`).
    ///
    /// Kept by measurement: the map's numbers (Vc with 1 decimal, a pressure with 3, a relative
    /// margin with 4) 5.6 ns a number, against 8.4 ns for the same rounding with the digits
    /// by `itoa` 1.0 (integer part, then the fraction zero-padded), best of 15 passes over
    /// 1 000 000 rows, one core, 2026-12-04, the VM of `docs/performance.md` (`cd bench/micro
    /// && cargo run --release`). `ryu` and `lexical-core` write the shortest or a significant-digit form,
    /// not a fixed count of decimals rounded half up, so they would change the map's bytes.
    #[inline(always)]
    pub fn fixed_n<const DEC: usize>(&mut self, x: f64) {
        let scaled = x.abs() * POW10[DEC] + 0.5;
        if !(scaled < 1e8) {
            if x.is_finite() {
                let mut v = Vec::with_capacity(32);
                fixed::<DEC>(&mut v, x);
                self.extend(&v);
            }
            return;
        }
        let n = scaled as u32;
        let neg = usize::from(x < 0.0);
        let d = eight_digits(n);
        let skip = ((d.trailing_zeros() / 8) as usize).min(7 - DEC);
        let ascii = d | 0x3030_3030_3030_3030;
        let int_len = 8 - DEC - skip;
        let buf = &mut self.buf[self.pos..self.pos + 18];
        buf[0] = b'-';
        buf[neg..neg + 8].copy_from_slice(&(ascii >> (8 * skip)).to_le_bytes());
        let mut len = neg + int_len;
        if DEC > 0 {
            buf[len] = b'.';
            buf[len + 1..len + 9].copy_from_slice(&(ascii >> (8 * (8 - DEC))).to_le_bytes());
            len += 1 + DEC;
        }
        self.pos += len;
    }
}

/// An output buffer written through a cursor. The bytes past the cursor are scratch, zeroed
/// once when the buffer grows, so numbers go in with a few whole-word stores and no
/// per-number zeroing or length bookkeeping; [`TextBuf::as_bytes`] is the text so far.
#[derive(Debug, Default)]
pub struct TextBuf {
    bytes: Vec<u8>,
    len: usize,
}

impl TextBuf {
    /// Forget the text (the scratch stays).
    pub fn clear(&mut self) {
        self.len = 0;
    }

    /// Bytes of text.
    pub fn len(&self) -> usize {
        self.len
    }

    /// Whether there is no text.
    pub fn is_empty(&self) -> bool {
        self.len == 0
    }

    /// The text.
    pub fn as_bytes(&self) -> &[u8] {
        &self.bytes[..self.len]
    }

    /// The scratch past the cursor, at least `n` bytes of it.
    #[inline]
    fn room(&mut self, n: usize) -> &mut [u8] {
        if self.bytes.len() < self.len + n {
            self.grow(n);
        }
        &mut self.bytes[self.len..]
    }

    #[cold]
    fn grow(&mut self, n: usize) {
        let want = (self.len + n).max(2 * self.bytes.len()).max(4096);
        self.bytes.resize(want, 0);
    }

    /// Append one byte.
    #[inline]
    pub fn push(&mut self, b: u8) {
        self.room(1)[0] = b;
        self.len += 1;
    }

    /// Append bytes.
    #[inline]
    pub fn extend(&mut self, s: &[u8]) {
        self.room(s.len())[..s.len()].copy_from_slice(s);
        self.len += s.len();
    }

    /// A writer over the scratch past the cursor, at least `n` bytes of it; pass what it
    /// wrote to [`TextBuf::commit`].
    #[inline]
    pub fn writer(&mut self, n: usize) -> RowWriter<'_> {
        self.room(n);
        RowWriter {
            buf: &mut self.bytes[self.len..],
            pos: 0,
        }
    }

    /// Keep `n` bytes written by the last [`TextBuf::writer`].
    #[inline]
    pub fn commit(&mut self, n: usize) {
        self.len = (self.len + n).min(self.bytes.len());
    }

    /// Keep the `n` bytes written by the last [`TextBuf::writer`] but their first `skip` (0
    /// or 1: a leading separator).
    #[inline]
    pub fn commit_from(&mut self, skip: usize, n: usize) {
        if skip > 0 && n >= skip {
            let end = (self.len + n).min(self.bytes.len());
            self.bytes.copy_within(self.len + skip..end, self.len);
            self.commit(n - skip);
        } else {
            self.commit(n);
        }
    }

    /// Append an unsigned integer in decimal.
    #[inline]
    pub fn u64(&mut self, n: u64) {
        let mut w = self.writer(NUMBER_MAX);
        w.u64(n);
        let k = w.written();
        self.commit(k);
    }

    /// Append `x` with exactly `dec` decimals, exactly as [`push_fixed`] writes it (nothing for
    /// a non-finite value).
    #[inline]
    pub fn fixed(&mut self, x: f64, dec: usize) {
        let mut w = self.writer(NUMBER_MAX);
        w.fixed(x, dec);
        let k = w.written();
        self.commit(k);
    }

    /// Append `x` with `dec` decimals, or `null` when not finite (JSON).
    #[inline]
    pub fn json_number(&mut self, x: f64, dec: usize) {
        if x.is_finite() {
            self.fixed(x, dec);
        } else {
            self.extend(b"null");
        }
    }

    /// Append a CSV field, quoted when it needs to be (see [`push_csv_field`]).
    pub fn csv_field(&mut self, s: &[u8]) {
        if s.iter()
            .any(|&b| b == b',' || b == b'"' || b == b'\n' || b == b'\r')
        {
            let mut v = Vec::with_capacity(s.len() + 8);
            push_csv_field(&mut v, s);
            self.extend(&v);
        } else {
            self.extend(s);
        }
    }

    /// Append a JSON string with its quotes (see [`push_json_string`]).
    pub fn json_string(&mut self, s: &[u8]) {
        let mut v = Vec::with_capacity(s.len() + 8);
        push_json_string(&mut v, s);
        self.extend(&v);
    }
}

/// Append a CSV field, quoted when it holds a comma, quote or line break.
pub fn push_csv_field(out: &mut Vec<u8>, s: &[u8]) {
    if s.iter()
        .any(|&b| b == b',' || b == b'"' || b == b'\n' || b == b'\r')
    {
        out.push(b'"');
        for &b in s {
            if b == b'"' {
                out.push(b'"');
            }
            out.push(b);
        }
        out.push(b'"');
    } else {
        out.extend_from_slice(s);
    }
}

/// Append a JSON string (with its quotes). Invalid UTF-8 is replaced.
pub fn push_json_string(out: &mut Vec<u8>, s: &[u8]) {
    let text = String::from_utf8_lossy(s);
    out.push(b'"');
    for c in text.chars() {
        match c {
            '"' => out.extend_from_slice(b"\\\""),
            '\\' => out.extend_from_slice(b"\\\\"),
            '\n' => out.extend_from_slice(b"\\n"),
            '\r' => out.extend_from_slice(b"\\r"),
            '\t' => out.extend_from_slice(b"\\t"),
            c if (c as u32) < 0x20 => {
                use std::io::Write;
                let _ = write!(out, "\\u{:04x}", c as u32);
            }
            c => {
                let mut b = [0u8; 4];
                out.extend_from_slice(c.encode_utf8(&mut b).as_bytes());
            }
        }
    }
    out.push(b'"');
}

/// Whether `s` is a number in JSON's grammar (so it may be copied into JSON as is).
#[inline]
pub fn is_json_number(s: &[u8]) -> bool {
    let mut i = 0;
    if s.first() == Some(&b'-') {
        i = 1;
    }
    match s.get(i) {
        Some(b'0') => i += 1,
        Some(b'1'..=b'9') => {
            while i < s.len() && s[i].is_ascii_digit() {
                i += 1;
            }
        }
        _ => return false,
    }
    if s.get(i) == Some(&b'.') {
        i += 1;
        let st = i;
        while i < s.len() && s[i].is_ascii_digit() {
            i += 1;
        }
        if i == st {
            return false;
        }
    }
    if matches!(s.get(i), Some(b'e' | b'E')) {
        i += 1;
        if matches!(s.get(i), Some(b'+' | b'-')) {
            i += 1;
        }
        let st = i;
        while i < s.len() && s[i].is_ascii_digit() {
            i += 1;
        }
        if i == st {
            return false;
        }
    }
    i == s.len()
}

/// A number in the shortest form that reads back the same.
pub fn fmt_g(x: f64) -> String {
    format!("{x}")
}

/// A number for a message: at most 6 significant digits, no trailing zeros.
pub fn fmt_short(x: f64) -> String {
    if !x.is_finite() {
        return format!("{x}");
    }
    if x != 0.0 && !(1e-4..1e9).contains(&x.abs()) {
        return format!("{x:.5e}");
    }
    let digits = if x == 0.0 {
        0
    } else {
        (5 - x.abs().log10().floor() as i32).clamp(0, 12) as usize
    };
    let t = format!("{x:.digits$}");
    if t.contains('.') {
        t.trim_end_matches('0').trim_end_matches('.').to_string()
    } else {
        t
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use proptest::prelude::*;

    #[test]
    fn short_numbers_for_messages() {
        assert_eq!(fmt_short(167.475_563_516_739_64), "167.476");
        assert_eq!(fmt_short(-450.0), "-450");
        assert_eq!(fmt_short(0.5), "0.5");
        assert_eq!(fmt_short(0.0), "0");
        assert_eq!(fmt_short(12.000_01), "12");
        assert_eq!(fmt_short(1e-7), "1.00000e-7");
        assert_eq!(fmt_short(-2.5e12), "-2.50000e12");
    }

    fn fixed(x: f64, d: usize) -> String {
        let mut v = Vec::new();
        push_fixed(&mut v, x, d);
        String::from_utf8(v).unwrap()
    }

    #[test]
    fn fixed_decimals() {
        assert_eq!(fixed(1.5, 2), "1.50");
        // A negative value keeps its sign where it rounds to zero (as std's `{:.2}` does).
        assert_eq!(fixed(-0.004, 2), "-0.00");
        assert_eq!(fixed(-0.004, 2), format!("{:.2}", -0.004));
        assert_eq!(fixed(-0.005, 0), "-0");
        assert_eq!(fixed(123456789.5, 9).len(), "123456789.500000000".len());
        assert_eq!(fixed(-0.006, 2), "-0.01");
        assert_eq!(fixed(12345.678, 0), "12346");
        assert_eq!(fixed(0.0001234, 4), "0.0001");
        assert_eq!(fixed(f64::NAN, 3), "");
        assert_eq!(fixed(1e300, 2).len(), 304);
    }

    #[test]
    fn escaping() {
        let mut v = Vec::new();
        push_csv_field(&mut v, b"a,\"b\"");
        assert_eq!(v, b"\"a,\"\"b\"\"\"");
        let mut v = Vec::new();
        push_json_string(&mut v, "tab\tq\"\u{1}é".as_bytes());
        assert_eq!(String::from_utf8(v).unwrap(), "\"tab\\tq\\\"\\u0001é\"");
        assert!(is_json_number(b"-1.5e3"));
        assert!(!is_json_number(b"01"));
        assert!(!is_json_number(b"1."));
        assert!(!is_json_number(b"+1"));
    }

    fn text_fixed(x: f64, d: usize) -> String {
        let mut t = TextBuf::default();
        t.fixed(x, d);
        String::from_utf8(t.as_bytes().to_vec()).unwrap()
    }

    #[test]
    fn eight_digits_every_length() {
        for n in [
            0u32, 7, 10, 99, 100, 1234, 9999, 10_000, 54_321, 99_999_999, 10_000_001,
        ] {
            let d = eight_digits(n);
            let text: String = d
                .to_le_bytes()
                .iter()
                .map(|b| char::from(b'0' + b))
                .collect();
            assert_eq!(text, format!("{n:08}"));
        }
    }

    /// The word-store writer and the digit-loop writer give the same text at every magnitude,
    /// sign and decimal count, across the 10^8 switch between them and at rounding ties.
    #[test]
    fn text_buf_matches_the_digit_loop() {
        for d in 0..=9usize {
            for e in -12..=17 {
                for m in [1.0, 1.5, 4.499_999, 5.0, 9.999_999_9, 9.999_999_949] {
                    for sign in [1.0, -1.0] {
                        let x = sign * m * 10f64.powi(e);
                        assert_eq!(text_fixed(x, d), fixed(x, d), "{x} with {d} decimals");
                    }
                }
            }
            for n in [99_999_999.0, 99_999_999.4, 99_999_999.5, 100_000_000.0] {
                let x = n / 10f64.powi(d as i32);
                assert_eq!(text_fixed(x, d), fixed(x, d), "{x} with {d} decimals");
            }
        }
        assert_eq!(text_fixed(f64::NAN, 2), "");
        assert_eq!(text_fixed(f64::INFINITY, 2), "");
        // The sign survives rounding to zero; a negative zero has none.
        assert_eq!(text_fixed(-0.04, 1), "-0.0");
        assert_eq!(fixed(-0.04, 1), "-0.0");
        assert_eq!(text_fixed(-0.0, 1), "0.0");
        assert_eq!(text_fixed(0.04, 1), "0.0");
        assert_eq!(text_fixed(-0.06, 1), "-0.1");
        assert_eq!(text_fixed(7157.06, 1), "7157.1");
    }

    /// Many writes in a row, across buffer growth: the text is the concatenation.
    #[test]
    fn text_buf_appends_across_growth() {
        let mut t = TextBuf::default();
        let mut want = Vec::new();
        for i in 0..3000u64 {
            let x = (i as f64) * 1.37 - 2000.0;
            t.u64(i * 999_983);
            push_u64(&mut want, i * 999_983);
            t.push(b',');
            want.push(b',');
            t.fixed(x, (i % 5) as usize);
            push_fixed(&mut want, x, (i % 5) as usize);
            t.extend(b",x");
            want.extend_from_slice(b",x");
            t.json_number(f64::NAN, 1);
            want.extend_from_slice(b"null");
            t.csv_field(b"a,b");
            push_csv_field(&mut want, b"a,b");
        }
        assert_eq!(t.as_bytes(), &want[..]);
        assert_eq!(t.len(), want.len());
        t.clear();
        assert!(t.is_empty());
    }

    #[test]
    fn row_numbers_like_to_string() {
        let rows: Vec<u64> = (0..2000u64)
            .chain(9_990..10_010)
            .chain([42, 43, 99_999_999, 100_000_000, 7, u64::MAX - 1, u64::MAX])
            .collect();
        let mut t = TextBuf::default();
        for &n in &rows {
            let mut w = t.writer(64);
            w.u64(n);
            let k = w.written();
            t.commit(k);
            t.push(b',');
        }
        let want: Vec<String> = rows.iter().map(u64::to_string).collect();
        assert_eq!(
            String::from_utf8(t.as_bytes().to_vec()).unwrap(),
            want.join(",") + ","
        );
        assert!(Word::new(&[b'x'; WORD]).is_some());
        assert!(Word::new(&[b'x'; WORD + 1]).is_none());
    }

    proptest! {
        /// Agrees with std's formatting to the last decimal (both round the same value; std
        /// rounds the exact binary value half to even, this rounds x * 10^d, so allow one unit).
        #[test]
        fn fixed_matches_std(x in -1e9f64..1e9, d in 0usize..7) {
            let ours: f64 = fixed(x, d).parse().unwrap();
            let std: f64 = format!("{x:.d$}").parse().unwrap();
            let tol = 1.0 / 10f64.powi(d as i32) + 8.0 * f64::EPSILON * x.abs();
            prop_assert!((ours - std).abs() <= tol, "{} vs {}", ours, std);
        }

        #[test]
        fn text_buf_fixed(x in -2e9f64..2e9, d in 0usize..10) {
            prop_assert_eq!(text_fixed(x, d), fixed(x, d));
        }

        #[test]
        fn text_buf_integers(n in prop_oneof![0u64..200_000_000, any::<u64>()]) {
            let mut t = TextBuf::default();
            t.u64(n);
            let want = n.to_string();
            prop_assert_eq!(t.as_bytes(), want.as_bytes());
        }

        #[test]
        fn integers(n in any::<u64>()) {
            let mut v = Vec::new();
            push_u64(&mut v, n);
            prop_assert_eq!(String::from_utf8(v).unwrap(), n.to_string());
        }
    }
}
