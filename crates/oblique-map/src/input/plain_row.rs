//! The commonest CSV record read in one pass: a record with no quote, exactly the header's
//! field count, whose position, velocity, angle (and time, if any) are plain decimals
//! (`[-+]digits[.digits]`). Each field is either skipped to its comma or parsed as it is
//! scanned, eight bytes at a time, so that no field ranges are stored and no byte is read
//! twice. Anything else (spaces, exponents, a comment, a blank line, a field too many or too
//! few, a quote, a line break inside a number) returns `None` and the record takes the general
//! path ([`super::split_plain_record`], [`super::parse_number`]), which reads it or words its
//! fault: this path only accepts what that one accepts, with the same bits (tested).
//!
//! Kept by measurement (instructions, `valgrind --tool=cachegrind`, one worker, the 500 000-row
//! sample of `bench/README.md`, `--columns verdict-only`): see docs/performance.md, section
//! "One pass over a plain record".

use super::header::Header;

/// Eight copies of a byte.
const fn splat(b: u8) -> u64 {
    0x0101_0101_0101_0101 * b as u64
}

/// Powers of ten for appending a run of at most eight digits.
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

/// Exact powers of ten, as [`super::number`]'s plain decimals use them (the same division).
const EXACT_POW10: [f64; 23] = [
    1e0, 1e1, 1e2, 1e3, 1e4, 1e5, 1e6, 1e7, 1e8, 1e9, 1e10, 1e11, 1e12, 1e13, 1e14, 1e15, 1e16,
    1e17, 1e18, 1e19, 1e20, 1e21, 1e22,
];

/// What the reader does with a field.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
enum Role {
    /// Passed through: only its end is found.
    Skip,
    /// Parsed into value `k` (0 position, 1 velocity, 2 angle), times its column's factor.
    Value(usize),
    /// Checked to be a plain decimal (the time), never converted.
    Check,
}

/// A record read by [`PlainRow::read`].
#[derive(Debug, Clone, Copy)]
pub struct PlainRecord {
    /// Position, velocity, angle, in SI (the header's factors applied).
    pub values: [f64; 3],
    /// End of the record's content (before its line break, and before a `\r` ahead of it).
    pub end: usize,
    /// Start of the next record.
    pub next: usize,
}

/// The one-pass reader for a header's layout.
#[derive(Debug, Clone)]
pub struct PlainRow {
    roles: Vec<Role>,
    factors: [f64; 3],
}

impl PlainRow {
    /// The reader for `header`'s fields.
    pub fn new(header: &Header) -> Self {
        let mut roles = vec![Role::Skip; header.cells.len()];
        for (k, col) in [&header.position, &header.velocity, &header.angle]
            .into_iter()
            .enumerate()
        {
            if let Some(r) = roles.get_mut(col.index) {
                *r = Role::Value(k);
            }
        }
        if let Some(t) = &header.time {
            if let Some(r) = roles.get_mut(t.index) {
                *r = Role::Check;
            }
        }
        Self {
            roles,
            factors: [
                header.position.factor,
                header.velocity.factor,
                header.angle.factor,
            ],
        }
    }

    /// Read the record that starts at `start` in `data` (a chunk with no quote in it), or
    /// `None` when it is not of the plain kind (see the module's note).
    #[inline(always)]
    pub fn read(&self, data: &[u8], start: usize) -> Option<PlainRecord> {
        // A blank line, a comment, or leading spaces: the general path.
        match data.get(start) {
            None | Some(b'\n' | b'\r' | b'#' | b' ' | b'\t') => return None,
            Some(_) => {}
        }
        let mut values = [0.0; 3];
        let mut p = start;
        let last = self.roles.len().checked_sub(1)?;
        for (i, &role) in self.roles.iter().enumerate() {
            let at_last = i == last;
            let term = match role {
                Role::Skip => {
                    let (t, byte) = find_separator(data, p);
                    // A comma in the last field is a field too many; a line break before the
                    // last field is one too few.
                    if at_last != (byte != Some(b',')) {
                        return None;
                    }
                    t
                }
                Role::Value(k) => {
                    let (v, t) = plain_decimal_at(data, p)?;
                    values[k] = v * self.factors[k];
                    t
                }
                Role::Check => plain_decimal_at(data, p)?.1,
            };
            if !at_last {
                if data.get(term) != Some(&b',') {
                    return None;
                }
                p = term + 1;
                continue;
            }
            // The record's end: a line break, `\r` and a line break, `\r` at the end, or the
            // end of the data.
            return match data.get(term) {
                None => Some(PlainRecord {
                    values,
                    end: term,
                    next: term,
                }),
                Some(b'\n') => Some(PlainRecord {
                    values,
                    end: term,
                    next: term + 1,
                }),
                Some(b'\r') => match data.get(term + 1) {
                    None => Some(PlainRecord {
                        values,
                        end: term,
                        next: term + 1,
                    }),
                    Some(b'\n') => Some(PlainRecord {
                        values,
                        end: term,
                        next: term + 2,
                    }),
                    Some(_) => None,
                },
                Some(_) => None,
            };
        }
        None
    }
}

/// The index of the first comma or line break at or after `p` (`data.len()` if none) and
/// that byte; a `\r` before a line break stays inside the field (it is cut from the record
/// by the caller's end).
#[inline(always)]
fn find_separator(data: &[u8], mut p: usize) -> (usize, Option<u8>) {
    const LOW7: u64 = splat(0x7F);
    const HIGH: u64 = splat(0x80);
    while let Some(w) = data.get(p..p + 8) {
        let mut word = [0u8; 8];
        word.copy_from_slice(w);
        let x = u64::from_le_bytes(word);
        let (c, n) = (x ^ splat(b','), x ^ splat(b'\n'));
        // High bit set exactly in the bytes that are zero (a comma, a line break).
        let m = (!(((c & LOW7) + LOW7) | c) & HIGH) | (!(((n & LOW7) + LOW7) | n) & HIGH);
        if m != 0 {
            let k = p + (m.trailing_zeros() / 8) as usize;
            return (k, data.get(k).copied());
        }
        p += 8;
    }
    while let Some(&b) = data.get(p) {
        if b == b',' || b == b'\n' {
            return (p, Some(b));
        }
        p += 1;
    }
    (p, None)
}

/// The plain decimal `[-+]digits[.digits]` at `p` and the index of the byte after it; `None`
/// when the shape is not there or the conversion would not be exact (more than 19 digits, a
/// mantissa above 2^53, more than 22 decimals): the same conditions and the same division as
/// `number::plain_decimal`.
#[inline(always)]
fn plain_decimal_at(data: &[u8], p: usize) -> Option<(f64, usize)> {
    let (neg, p) = match data.get(p) {
        Some(b'-') => (true, p + 1),
        Some(b'+') => (false, p + 1),
        _ => (false, p),
    };
    let (mant, int_digits, mut q) = digit_run(data, p, 0);
    let (mant, frac) = if data.get(q) == Some(&b'.') {
        let (m, n, after) = digit_run(data, q + 1, mant);
        q = after;
        (m, n)
    } else {
        (mant, 0)
    };
    let digits = int_digits + frac;
    if digits == 0 || digits > 19 || mant > (1u64 << 53) || frac > 22 {
        return None;
    }
    let v = mant as f64 / EXACT_POW10[frac];
    Some((if neg { -v } else { v }, q))
}

/// The run of ASCII digits at `p`, appended to `acc`: (value, digit count, index after the
/// run). Eight bytes at a time where eight remain: the first non-digit byte found by nibble
/// tests, the run's digits (at most eight) combined by three multiplications. Exact while the
/// whole number has at most 19 digits (the caller refuses more; beyond, the value wraps).
#[inline(always)]
fn digit_run(data: &[u8], mut p: usize, mut acc: u64) -> (u64, usize, usize) {
    let start = p;
    while let Some(w) = data.get(p..p + 8) {
        let mut word = [0u8; 8];
        word.copy_from_slice(w);
        let x = u64::from_le_bytes(word);
        // A byte is a digit when its high nibble is 3 and adding 6 keeps it so. A carry out
        // of a byte (0xFA and above, no digit) can only spoil the bytes after it, which the
        // count below never reaches.
        let hi = x & splat(0xF0);
        let hi6 = x.wrapping_add(splat(0x06)) & splat(0xF0);
        let not_digit = (hi ^ splat(0x30)) | (hi6 ^ splat(0x30));
        let k = (not_digit.trailing_zeros() / 8) as usize;
        if k == 0 {
            return (acc, p - start, p);
        }
        // The k digits as values 0-9 (borrows only arise at or after the first non-digit and
        // run upwards, out of the shifted word), moved to the top: the bytes below are zeros,
        // that is, leading zeros of an eight-digit number.
        let d = x.wrapping_sub(splat(b'0')) << (8 * (8 - k));
        let d = d.wrapping_mul(10).wrapping_add(d >> 8);
        let d = ((d & 0x0000_00FF_0000_00FF).wrapping_mul(100 + (1_000_000 << 32)))
            .wrapping_add(((d >> 16) & 0x0000_00FF_0000_00FF).wrapping_mul(1 + (10_000 << 32)))
            >> 32;
        acc = acc.wrapping_mul(POW10_U64[k]).wrapping_add(d);
        p += k;
        if k < 8 {
            return (acc, p - start, p);
        }
    }
    while let Some(&c) = data.get(p) {
        let d = c.wrapping_sub(b'0');
        if d > 9 {
            break;
        }
        acc = acc.wrapping_mul(10).wrapping_add(u64::from(d));
        p += 1;
    }
    (acc, p - start, p)
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::input::{parse_header, parse_number, Wanted};
    use proptest::prelude::*;

    fn header(line: &str) -> Header {
        let wanted = Wanted {
            names: ["position", "velocity", "angle", "time"].map(String::from),
            flags: ["p", "v", "a", "t"],
        };
        parse_header(
            "t.csv",
            1,
            line.split(',').map(String::from).collect(),
            &wanted,
        )
        .expect("header")
    }

    #[test]
    fn digit_runs() {
        for (t, v, n) in [
            ("", 0, 0),
            ("x", 0, 0),
            ("7", 7, 1),
            ("12345678", 12_345_678, 8),
            ("123456789", 123_456_789, 9),
            ("0000000000000000012,", 12, 19),
            ("98765432109876543,1", 98_765_432_109_876_543, 17),
            ("1\u{ff}99", 1, 1),
            ("12/45678", 12, 2),
            ("12:45678", 12, 2),
        ] {
            let (got, count, after) = digit_run(t.as_bytes(), 0, 0);
            assert_eq!((got, count, after), (v, n, n), "{t:?}");
        }
    }

    #[test]
    fn records() {
        let h = header("id,position[mm],time[us],velocity[m/s],angle[deg]");
        let r = PlainRow::new(&h);
        let data = b"1,0.5,0,249.78,2\n2,1.5,0.1,250,12.25\r\nx,2,3,4,5";
        let a = r.read(data, 0).expect("first");
        assert_eq!((a.end, a.next), (16, 17));
        assert_eq!(a.values[1], 249.78);
        assert_eq!(a.values[0], 0.5 * 1e-3);
        let b = r.read(data, a.next).expect("second");
        assert_eq!(&data[a.next..b.end], b"2,1.5,0.1,250,12.25");
        assert_eq!(b.next, b.end + 2);
        let c = r.read(data, b.next).expect("third");
        assert_eq!((c.end, c.next), (data.len(), data.len()));
        // Not of the plain kind: the general path decides.
        for bad in [
            "1,0.5,0,249.78\n",
            "1,0.5,0,249.78,2,9\n",
            "1, 0.5,0,249.78,2\n",
            "1,0.5,0,2.5e2,2\n",
            "#1,0.5,0,249.78,2\n",
            "\n",
            " 1,0.5,0,249.78,2\n",
            "1,0.5,0,249.78,2\r\r\n",
            "1,0.5,t,249.78,2\n",
            "1,0.5,0,249.78,\n",
            "1,.,0,249.78,2\n",
            "1,0.5,0,249.78,2 \n",
            "1,0.5,0,12345678901234567890,2\n",
        ] {
            assert!(r.read(bad.as_bytes(), 0).is_none(), "{bad:?}");
        }
    }

    proptest! {
        /// Every number field the reader accepts has the bits `parse_number` gives, and it
        /// accepts every plain decimal of up to 19 digits with an exact mantissa.
        #[test]
        fn same_bits_as_parse_number(
            int in "[0-9]{0,12}", frac in proptest::option::of("[0-9]{0,12}"),
            sign in "[-+]?", tail in "(\n|\r\n|\r|)",
        ) {
            let number = format!("{sign}{int}{}", frac.as_ref().map_or(String::new(), |f| format!(".{f}")));
            let line = format!("x,0,0,1,{number}{tail}");
            let h = header("id,position[mm],time[us],velocity[m/s],angle[rad]");
            let got = PlainRow::new(&h).read(line.as_bytes(), 0);
            let want = parse_number(number.as_bytes());
            match got {
                Some(rec) => {
                    prop_assert_eq!(Some(rec.values[2].to_bits()), want.map(f64::to_bits));
                    prop_assert_eq!(rec.end, 8 + number.len());
                }
                None => {
                    let digits = int.len() + frac.as_ref().map_or(0, String::len);
                    prop_assert!(want.is_none() || digits == 0 || digits > 15, "{:?} refused", line);
                }
            }
        }

        /// Any line of number-like bytes: accepted only with the values the general path
        /// reads from the same fields.
        #[test]
        fn only_what_the_general_path_reads(line in "[-+0-9., \r#e]{0,40}\n?") {
            let h = header("a,position[m],velocity[m/s],angle[rad]");
            if let Some(rec) = PlainRow::new(&h).read(line.as_bytes(), 0) {
                let content = &line.as_bytes()[..rec.end];
                let fields: Vec<&[u8]> = content.split(|&b| b == b',').collect();
                prop_assert_eq!(fields.len(), 4);
                for (k, f) in fields[1..].iter().enumerate() {
                    prop_assert_eq!(parse_number(f).map(f64::to_bits), Some(rec.values[k].to_bits()));
                }
            }
        }
    }
}
