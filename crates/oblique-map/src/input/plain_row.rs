//! The commonest CSV record read in one pass: a record with no quote, exactly the header's
//! field count, whose position, velocity, angle (and time, if any) are plain decimals
//! (`[-+]digits[.digits]`), read straight into values with no field ranges stored.
//!
//! Two tiers. [`PlainRow::read_blocks`] classifies the line sixteen bytes at a time (commas,
//! digits and the line break as bit masks: SSE2 compares on x86-64, a byte loop elsewhere),
//! then cuts each field and reads each number from the masks with a few bit operations and
//! two eight-digit multiplications; the time column, only checked, is never converted.
//! [`PlainRow::read_words`] takes the records that one leaves undecided (longer than 63 bytes,
//! the last record of a chunk, a digit run longer than 16): field after field, eight bytes at a
//! time. Anything else (spaces, exponents, a comment, a blank line, a field too many or too
//! few, a line break inside a number) is no plain record: `None`, and the general path
//! ([`super::split_plain_record`], [`super::parse_number`]) reads it or words its fault. Both
//! tiers accept only what that path accepts, with the same bits (tested).
//!
//! Kept by measurement: the 2 000 000 records of the benchmark file read into position,
//! velocity and angle (time checked), best of 15 passes, one core, 2026-12-05, the VM of
//! docs/performance.md (`cd bench/micro && cargo run --release`): this reader 24.2 ns a record,
//! the map's previous path (`split_plain_record`, `parse_number`) 30.7 ns, `csv-core` 0.1 with
//! `fast-float2` 0.2 45.5 ns. In the whole map (verdict-only, 500 000-row sample, one worker)
//! 9 % fewer instructions than the previous path; the block tier against the word tier alone,
//! the same instructions but about 10 % less CPU in interleaved runs (fewer mispredicted
//! branches on fields of varying length). Details: docs/performance.md, "One pass over a plain
//! record".

use super::header::Header;
use super::number::EXACT_POW10;
use crate::format::POW10_U64;

/// Eight copies of a byte.
const fn splat(b: u8) -> u64 {
    0x0101_0101_0101_0101 * b as u64
}

/// What the reader does with a field.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
enum Role {
    /// Passed through: only its end is found.
    Skip,
    /// Parsed, times its column's factor: the position.
    Position,
    /// The velocity.
    Velocity,
    /// The angle.
    Angle,
    /// Checked to be a plain decimal (the time), never converted.
    Check,
}

/// The values read so far, each in its own variable: an array indexed by the field's role
/// would live in memory, and copying it out whole after storing it element by element stalls
/// on store forwarding (measured: a quarter of the worker's samples).
#[derive(Debug, Clone, Copy, Default)]
struct Values {
    position: f64,
    velocity: f64,
    angle: f64,
}

impl Values {
    /// Set the value of `role` (a no-op for the others).
    #[inline(always)]
    fn set(&mut self, role: Role, v: f64, f: &PlainRow) {
        match role {
            Role::Position => self.position = v * f.factors.0,
            Role::Velocity => self.velocity = v * f.factors.1,
            Role::Angle => self.angle = v * f.factors.2,
            Role::Skip | Role::Check => {}
        }
    }

    #[inline(always)]
    fn array(self) -> [f64; 3] {
        [self.position, self.velocity, self.angle]
    }
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
    factors: (f64, f64, f64),
}

impl PlainRow {
    /// The reader for `header`'s fields.
    pub fn new(header: &Header) -> Self {
        let mut roles = vec![Role::Skip; header.cells.len()];
        for (role, col) in [
            (Role::Position, &header.position),
            (Role::Velocity, &header.velocity),
            (Role::Angle, &header.angle),
        ] {
            if let Some(r) = roles.get_mut(col.index) {
                *r = role;
            }
        }
        if let Some(t) = &header.time {
            if let Some(r) = roles.get_mut(t.index) {
                *r = Role::Check;
            }
        }
        Self {
            roles,
            factors: (
                header.position.factor,
                header.velocity.factor,
                header.angle.factor,
            ),
        }
    }

    /// Read the record that starts at `start` in `data` (a chunk with no quote in it), or
    /// `None` when it is not of the plain kind (see the module's note).
    #[inline(always)]
    pub fn read(&self, data: &[u8], start: usize) -> Option<PlainRecord> {
        match self.read_blocks(data, start) {
            Blocks::Record(r) => Some(r),
            Blocks::NotPlain => None,
            Blocks::Unsure => self.read_words(data, start),
        }
    }

    /// The record classified sixteen bytes at a time (commas, digits and line breaks as bit
    /// masks, [`block_masks`]), then each field cut and each number read from the masks: one
    /// pass of compares over the line and a few bit operations per field. `Unsure` where the
    /// masks cannot decide (a record of 64 bytes or more with its line break, a record too near
    /// the end of the data for whole blocks, a digit run longer than 16):
    /// [`Self::read_words`] decides.
    #[inline(always)]
    fn read_blocks(&self, data: &[u8], start: usize) -> Blocks {
        // A blank line, a comment, or leading spaces: the general path.
        match data.get(start) {
            None | Some(b'\n' | b'\r' | b'#' | b' ' | b'\t') => return Blocks::NotPlain,
            Some(_) => {}
        }
        // The masks up to the block that holds the line break.
        let (mut commas, mut digits, mut nl) = (0u64, 0u64, 0u64);
        let mut covered = 0;
        while nl == 0 {
            let Some(block) = data
                .get(start + covered..start + covered + 16)
                .and_then(|b| <&[u8; 16]>::try_from(b).ok())
            else {
                return Blocks::Unsure;
            };
            let (c, d, n) = block_masks(block);
            commas |= u64::from(c) << covered;
            digits |= u64::from(d) << covered;
            nl |= u64::from(n) << covered;
            covered += 16;
            if covered == 64 && nl == 0 {
                return Blocks::Unsure;
            }
        }
        let end_nl = nl.trailing_zeros() as usize;
        // The fields' commas before the line break: exactly one fewer than the fields.
        let mut commas = commas & ((1u64 << end_nl) - 1);
        if commas.count_ones() as usize + 1 != self.roles.len() {
            return Blocks::NotPlain;
        }
        // The record's content ends before the line break, and before a `\r` ahead of it.
        let end = if end_nl > 0 && data[start + end_nl - 1] == b'\r' {
            end_nl - 1
        } else {
            end_nl
        };
        let mut values = Values::default();
        let mut s = 0;
        for &role in &self.roles {
            let t = if commas == 0 {
                end
            } else {
                commas.trailing_zeros() as usize
            };
            commas &= commas.wrapping_sub(1);
            match role {
                Role::Skip => {}
                Role::Position | Role::Velocity | Role::Angle => {
                    match decimal_from_masks(data, start, s, t, digits) {
                        BlockNumber::Value(v) => values.set(role, v, self),
                        BlockNumber::NotPlain => return Blocks::NotPlain,
                        BlockNumber::Unsure => return Blocks::Unsure,
                    }
                }
                Role::Check => {
                    if !plain_shape_from_masks(data, start, s, t, digits) {
                        return Blocks::NotPlain;
                    }
                }
            }
            s = t + 1;
        }
        Blocks::Record(PlainRecord {
            values: values.array(),
            end: start + end,
            next: start + end_nl + 1,
        })
    }

    /// [`Self::read`] eight bytes at a time, field after field: the path for records the
    /// block masks leave undecided.
    #[inline(never)]
    fn read_words(&self, data: &[u8], start: usize) -> Option<PlainRecord> {
        // A blank line, a comment, or leading spaces: the general path.
        match data.get(start) {
            None | Some(b'\n' | b'\r' | b'#' | b' ' | b'\t') => return None,
            Some(_) => {}
        }
        let mut values = Values::default();
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
                Role::Position | Role::Velocity | Role::Angle => {
                    let (v, t) = plain_decimal_at(data, p)?;
                    values.set(role, v, self);
                    t
                }
                Role::Check => plain_shape_at(data, p)?,
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
            let next = match data.get(term) {
                None => term,
                Some(b'\n') => term + 1,
                Some(b'\r') => match data.get(term + 1) {
                    None => term + 1,
                    Some(b'\n') => term + 2,
                    Some(_) => return None,
                },
                Some(_) => return None,
            };
            // A pass-through last field runs up to the line break: one `\r` before it is not
            // part of the record, as the general path has it (a number stops before it).
            let end = if role == Role::Skip && term > start && data[term - 1] == b'\r' {
                term - 1
            } else {
                term
            };
            return Some(PlainRecord {
                values: values.array(),
                end,
                next,
            });
        }
        None
    }
}

/// What the block reader found.
enum Blocks {
    /// A plain record.
    Record(PlainRecord),
    /// Not a plain record: the general path reads it (or words its fault).
    NotPlain,
    /// Not decided here: the word reader decides.
    Unsure,
}

/// What the block reader found for one number.
enum BlockNumber {
    Value(f64),
    NotPlain,
    Unsure,
}

/// The field `[s, t)` of the record at `start` (offsets from `start`) as a plain decimal,
/// from the record's digit mask (bit i: byte `start + i` is an ASCII digit): the same
/// conditions and the same division as `number::plain_decimal`. Digit runs longer than 16
/// are left to the word reader.
#[inline(always)]
fn decimal_from_masks(data: &[u8], start: usize, s: usize, t: usize, digits: u64) -> BlockNumber {
    if t <= s {
        return BlockNumber::NotPlain;
    }
    let (neg, s) = match data[start + s] {
        b'-' => (true, s + 1),
        b'+' => (false, s + 1),
        _ => (false, s),
    };
    if t <= s {
        return BlockNumber::NotPlain;
    }
    let len = t - s;
    // The field's bytes that are not digits: none, or one point.
    let others = !(digits >> s) & ((1u64 << len) - 1);
    let (int, frac) = if others == 0 {
        (len, 0)
    } else {
        let k = others.trailing_zeros() as usize;
        if others & others.wrapping_sub(1) != 0 || data[start + s + k] != b'.' {
            return BlockNumber::NotPlain;
        }
        (k, len - k - 1)
    };
    let n = int + frac;
    if n == 0 || n > 19 {
        return BlockNumber::NotPlain;
    }
    if int > 16 || frac > 16 {
        return BlockNumber::Unsure;
    }
    let (Some(i), Some(f)) = (
        digits_value(data, start + s, int),
        digits_value(data, start + s + int + 1, frac),
    ) else {
        return BlockNumber::Unsure;
    };
    let mant = i.wrapping_mul(POW10_U64[frac]).wrapping_add(f);
    if mant > (1u64 << 53) {
        return BlockNumber::NotPlain;
    }
    let v = mant as f64 / EXACT_POW10[frac];
    BlockNumber::Value(if neg { -v } else { v })
}

/// Whether the field `[s, t)` of the record at `start` has the plain shape with 1 to 19
/// digits: then it is a number `parse_number` reads (below 10^19, so finite), and a column
/// that is only checked needs no conversion.
#[inline(always)]
fn plain_shape_from_masks(data: &[u8], start: usize, s: usize, t: usize, digits: u64) -> bool {
    if t <= s {
        return false;
    }
    let s = match data[start + s] {
        b'-' | b'+' => s + 1,
        _ => s,
    };
    if t <= s {
        return false;
    }
    let len = t - s;
    let others = !(digits >> s) & ((1u64 << len) - 1);
    let n = if others == 0 {
        len
    } else {
        let k = others.trailing_zeros() as usize;
        if others & others.wrapping_sub(1) != 0 || data[start + s + k] != b'.' {
            return false;
        }
        len - 1
    };
    (1..=19).contains(&n)
}

/// The value of the `k` (at most 16) ASCII digits at `p`, known to be digits; `None` when the
/// eight-byte reads would run past the data.
#[inline(always)]
fn digits_value(data: &[u8], p: usize, k: usize) -> Option<u64> {
    match k {
        0 => Some(0),
        1..=8 => Some(eight_digits(data, p, k)?),
        _ => Some(eight_digits(data, p, k - 8)? * 100_000_000 + eight_digits(data, p + k - 8, 8)?),
    }
}

/// The first `k` (1 to 8) bytes at `p`, digits, as a number; `None` when fewer than eight
/// bytes remain.
#[inline(always)]
fn eight_digits(data: &[u8], p: usize, k: usize) -> Option<u64> {
    let w = data.get(p..p + 8)?;
    let mut word = [0u8; 8];
    word.copy_from_slice(w);
    Some(leading_digits(u64::from_le_bytes(word), k))
}

/// The value of the first `k` (1 to 8) bytes of the little-endian word `x`, digits: moved to
/// the top of the word (the bytes below become zeros, leading zeros of an eight-digit number)
/// and combined by three multiplications. Borrows of the subtraction arise only in the bytes
/// after the k digits and run upwards, out of the shifted word.
#[inline(always)]
fn leading_digits(x: u64, k: usize) -> u64 {
    let d = x.wrapping_sub(splat(b'0')) << (8 * (8 - k));
    let d = d.wrapping_mul(10).wrapping_add(d >> 8);
    ((d & 0x0000_00FF_0000_00FF).wrapping_mul(100 + (1_000_000 << 32)))
        .wrapping_add(((d >> 16) & 0x0000_00FF_0000_00FF).wrapping_mul(1 + (10_000 << 32)))
        >> 32
}

/// Bit masks of sixteen bytes (bit i for byte i): commas, ASCII digits, line breaks. SSE2
/// compares on x86-64 (part of every x86-64 processor); a byte loop elsewhere, tested equal.
#[inline(always)]
fn block_masks(block: &[u8; 16]) -> (u16, u16, u16) {
    #[cfg(target_arch = "x86_64")]
    {
        block_masks_sse2(block)
    }
    #[cfg(not(target_arch = "x86_64"))]
    {
        block_masks_bytes(block)
    }
}

#[cfg(target_arch = "x86_64")]
#[inline(always)]
fn block_masks_sse2(block: &[u8; 16]) -> (u16, u16, u16) {
    use std::arch::x86_64::{
        _mm_and_si128, _mm_cmpeq_epi8, _mm_cmpgt_epi8, _mm_cmplt_epi8, _mm_loadu_si128,
        _mm_movemask_epi8, _mm_set1_epi8,
    };
    // SAFETY: SSE2 is part of the x86-64 baseline, so these instructions exist on every
    // processor this code is compiled for; the load reads exactly the sixteen bytes of
    // `block` (an unaligned load, which `_mm_loadu_si128` allows).
    unsafe {
        let x = _mm_loadu_si128(block.as_ptr().cast());
        let commas = _mm_cmpeq_epi8(x, _mm_set1_epi8(b',' as i8));
        let breaks = _mm_cmpeq_epi8(x, _mm_set1_epi8(b'\n' as i8));
        // Bytes of 0x80 and above are negative as i8, so never digits here.
        let digits = _mm_and_si128(
            _mm_cmpgt_epi8(x, _mm_set1_epi8(b'0' as i8 - 1)),
            _mm_cmplt_epi8(x, _mm_set1_epi8(b'9' as i8 + 1)),
        );
        (
            _mm_movemask_epi8(commas) as u16,
            _mm_movemask_epi8(digits) as u16,
            _mm_movemask_epi8(breaks) as u16,
        )
    }
}

/// [`block_masks`] a byte at a time.
#[cfg_attr(target_arch = "x86_64", allow(dead_code))]
fn block_masks_bytes(block: &[u8; 16]) -> (u16, u16, u16) {
    let (mut c, mut d, mut n) = (0u16, 0u16, 0u16);
    for (i, &b) in block.iter().enumerate() {
        c |= u16::from(b == b',') << i;
        d |= u16::from(b.is_ascii_digit()) << i;
        n |= u16::from(b == b'\n') << i;
    }
    (c, d, n)
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

/// The index after the plain decimal `[-+]digits[.digits]` with 1 to 19 digits at `p` (a
/// number `parse_number` reads, below 10^19), without converting it; `None` when the shape is
/// not there.
#[inline(always)]
fn plain_shape_at(data: &[u8], p: usize) -> Option<usize> {
    let p = match data.get(p) {
        Some(b'-' | b'+') => p + 1,
        _ => p,
    };
    let int = digit_count(data, p);
    let mut q = p + int;
    let frac = if data.get(q) == Some(&b'.') {
        let n = digit_count(data, q + 1);
        q += 1 + n;
        n
    } else {
        0
    };
    (1..=19).contains(&(int + frac)).then_some(q)
}

/// The number of ASCII digits at `p`, eight bytes at a time where eight remain.
#[inline(always)]
fn digit_count(data: &[u8], start: usize) -> usize {
    let mut p = start;
    while let Some(w) = data.get(p..p + 8) {
        let mut word = [0u8; 8];
        word.copy_from_slice(w);
        let k = leading_digit_count(u64::from_le_bytes(word));
        p += k;
        if k < 8 {
            return p - start;
        }
    }
    while data.get(p).is_some_and(u8::is_ascii_digit) {
        p += 1;
    }
    p - start
}

/// How many of the little-endian word's bytes, from the first, are ASCII digits (0 to 8). A
/// byte is a digit when its high nibble is 3 and adding 6 keeps it so; a carry out of a byte
/// (0xFA and above, no digit) can only spoil the bytes after it, which the count never reaches.
#[inline(always)]
fn leading_digit_count(x: u64) -> usize {
    let hi = x & splat(0xF0);
    let hi6 = x.wrapping_add(splat(0x06)) & splat(0xF0);
    let not_digit = (hi ^ splat(0x30)) | (hi6 ^ splat(0x30));
    (not_digit.trailing_zeros() / 8) as usize
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
        let k = leading_digit_count(x);
        if k == 0 {
            return (acc, p - start, p);
        }
        acc = acc
            .wrapping_mul(POW10_U64[k])
            .wrapping_add(leading_digits(x, k));
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

    /// A pass-through last column: the record ends before a `\r` ahead of its line break (or
    /// at the end of the data), in both tiers, as the general path has it.
    #[test]
    fn pass_through_last_field_loses_its_carriage_return() {
        let h = header("position[mm],velocity[m/s],angle[deg],note");
        let r = PlainRow::new(&h);
        let long = format!("1,400,10,{}", "x".repeat(70));
        for (text, content, next) in [
            ("1,400,10,x\r\n2,400,10,x\r\n", "1,400,10,x", 12),
            ("1,400,10,x\r", "1,400,10,x", 11),
            ("1,400,10,\r\n", "1,400,10,", 11),
            ("1,400,10,x\n", "1,400,10,x", 11),
            ("1,400,10,x", "1,400,10,x", 10),
            (&format!("{long}\r\n"), long.as_str(), long.len() + 2),
            (
                "0.00000000000000001,400,10,x\r\n",
                "0.00000000000000001,400,10,x",
                30,
            ),
        ] {
            let rec = r.read(text.as_bytes(), 0).expect("a plain record");
            assert_eq!(&text.as_bytes()[..rec.end], content.as_bytes(), "{text:?}");
            assert_eq!(rec.next, next, "{text:?}");
            let words = r
                .read_words(text.as_bytes(), 0)
                .expect("the word tier reads it");
            assert_eq!((words.end, words.next), (rec.end, rec.next), "{text:?}");
        }
    }

    #[test]
    fn block_masks_agree() {
        let mut block = [0u8; 16];
        for seed in 0u32..4096 {
            for (i, b) in block.iter_mut().enumerate() {
                let v =
                    seed.wrapping_mul(2_654_435_761).rotate_left(i as u32 * 3) ^ (i as u32 * 37);
                *b = match v % 7 {
                    0 => b',',
                    1 => b'\n',
                    2 => b'.',
                    3 => (v >> 8) as u8,
                    _ => b'0' + (v >> 4) as u8 % 10,
                };
            }
            assert_eq!(block_masks(&block), block_masks_bytes(&block), "{block:?}");
        }
        let all: Vec<u8> = (0..=255).collect();
        for chunk in all.chunks_exact(16) {
            let b: &[u8; 16] = chunk.try_into().expect("16");
            assert_eq!(block_masks(b), block_masks_bytes(b));
        }
    }

    proptest! {
        /// The block reader and the word reader agree wherever the block reader decides.
        #[test]
        fn blocks_agree_with_words(
            line in "[-+0-9.,\r#e ]{0,60}\n?[0-9,.\n]{0,40}",
            last_passes in any::<bool>(),
        ) {
            let h = if last_passes {
                header("position[m],velocity[m/s],angle[rad],a")
            } else {
                header("a,position[m],velocity[m/s],angle[rad]")
            };
            let r = PlainRow::new(&h);
            let data = line.as_bytes();
            let words = r.read_words(data, 0);
            match r.read_blocks(data, 0) {
                Blocks::Record(b) => {
                    let w = words.expect("the word reader reads what the block reader reads");
                    prop_assert_eq!((b.end, b.next), (w.end, w.next));
                    for k in 0..3 {
                        prop_assert_eq!(b.values[k].to_bits(), w.values[k].to_bits());
                    }
                }
                Blocks::NotPlain => prop_assert!(words.is_none(), "{:?}", line),
                Blocks::Unsure => {}
            }
        }

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
        fn records_end_where_the_general_path_ends(
            numbers in proptest::collection::vec("[-+]?[0-9]{0,20}(\\.[0-9]{0,20})?", 3),
            text in "[a-z\r ]{0,3}",
            pad in 0usize..80,
            ending in "(\r\n|\n|\r|)",
            text_last in any::<bool>(),
        ) {
            let fields = if text_last {
                format!("{},{},{},{}{}", numbers[0], numbers[1], numbers[2], "p".repeat(pad), text)
            } else {
                format!("{}{},{},{},{}", "p".repeat(pad), text, numbers[0], numbers[1], numbers[2])
            };
            let line = format!("{fields}{ending}1,1,1,1\n");
            let h = if text_last {
                header("position[m],velocity[m/s],angle[rad],a")
            } else {
                header("a,position[m],velocity[m/s],angle[rad]")
            };
            let data = line.as_bytes();
            let mut split = crate::input::Fields::default();
            let brk = crate::input::split_plain_record(data, 0, &mut split);
            let end = if brk > 0 && data[brk - 1] == b'\r' { brk - 1 } else { brk };
            let next = (brk + 1).min(data.len());
            let r = PlainRow::new(&h);
            for got in [r.read(data, 0), r.read_words(data, 0)].into_iter().flatten() {
                prop_assert_eq!((got.end, got.next), (end, next), "{:?}", line);
            }
        }

        #[test]
        fn only_what_the_general_path_reads(
            line in "[-+0-9., \r#e]{0,40}\n?[0-9,]{0,8}",
            last_passes in any::<bool>(),
        ) {
            let (h, numbers) = if last_passes {
                (header("position[m],velocity[m/s],angle[rad],a"), 0..3)
            } else {
                (header("a,position[m],velocity[m/s],angle[rad]"), 1..4)
            };
            if let Some(rec) = PlainRow::new(&h).read(line.as_bytes(), 0) {
                // Where the general path puts the record: up to the line break, one `\r`
                // before it cut.
                let data = line.as_bytes();
                let mut fields = crate::input::Fields::default();
                let brk = crate::input::split_plain_record(data, 0, &mut fields);
                let end = if brk > 0 && data[brk - 1] == b'\r' { brk - 1 } else { brk };
                prop_assert_eq!((rec.end, rec.next), (end, (brk + 1).min(data.len())), "{:?}", line);
                let fields: Vec<&[u8]> = data[..end].split(|&b| b == b',').collect();
                prop_assert_eq!(fields.len(), 4);
                for (k, f) in fields[numbers].iter().enumerate() {
                    prop_assert_eq!(parse_number(f).map(f64::to_bits), Some(rec.values[k].to_bits()));
                }
            }
        }
    }
}
