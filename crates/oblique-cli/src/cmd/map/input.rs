//! Reading an interface export: the header (names and units), record splitting for CSV (quoted
//! fields included) and JSON lines, and number parsing.

use oblique_core::units::{parse_quantity, QuantityKind};
use std::io::Read;

/// Input or output layout.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Format {
    /// Comma-separated values with a header row.
    Csv,
    /// One JSON object per line.
    Jsonl,
}

/// A mapped column: its index and the factor to SI.
#[derive(Debug, Clone)]
pub struct Column {
    /// Index in the record.
    pub index: usize,
    /// The header cell as written (e.g. `velocity[km/s]`).
    pub cell: String,
    /// SI per input unit.
    pub factor: f64,
}

/// The parsed header.
#[derive(Debug, Clone)]
pub struct Header {
    /// Every header cell as written (JSON lines: the keys of the first object, sorted).
    pub cells: Vec<String>,
    /// position, velocity, angle (required) and time (optional).
    pub position: Column,
    /// See `position`.
    pub velocity: Column,
    /// See `position`.
    pub angle: Column,
    /// See `position`.
    pub time: Option<Column>,
}

/// Split a header cell `name[unit]` into its name and unit (both trimmed).
pub fn split_cell(cell: &str) -> (&str, Option<&str>) {
    let c = cell.trim();
    match (c.find('['), c.ends_with(']')) {
        (Some(open), true) => (c[..open].trim(), Some(c[open + 1..c.len() - 1].trim())),
        _ => (c, None),
    }
}

/// The wanted column names (after `--*-column` mapping), for position, velocity, angle, time.
#[derive(Debug, Clone)]
pub struct Wanted {
    /// Names for position, velocity, angle and time, in that order.
    pub names: [String; 4],
    /// Which flag set each name, for messages.
    pub flags: [&'static str; 4],
}

const KINDS: [QuantityKind; 4] = [
    QuantityKind::Length,
    QuantityKind::Velocity,
    QuantityKind::Angle,
    QuantityKind::Time,
];

/// Build the header from its cells. `file` names the input in messages, `header_row` is the
/// header's line number (after any comment lines).
///
/// # Errors
/// A message naming the column: missing required column, missing or unknown unit, duplicate.
pub fn parse_header(
    file: &str,
    header_row: u64,
    cells: Vec<String>,
    wanted: &Wanted,
) -> Result<Header, String> {
    let where_ = |s: &str| format!("{file}: row {header_row} (header): {s}");
    let mut found: [Option<Column>; 4] = [None, None, None, None];
    // Every problem with units, so that one run names them all.
    let mut problems: Vec<String> = Vec::new();
    let mut seen: [Option<usize>; 4] = [None; 4];
    for (i, cell) in cells.iter().enumerate() {
        let (name, unit) = split_cell(cell);
        for r in 0..4 {
            let w = &wanted.names[r];
            if name != w && cell.trim() != w {
                continue;
            }
            if let Some(prev) = seen[r] {
                return Err(where_(&format!(
                    "column '{}' appears twice (columns {} and {})",
                    w,
                    prev + 1,
                    i + 1
                )));
            }
            seen[r] = Some(i);
            let kind = KINDS[r];
            let Some(unit) = unit.filter(|u| !u.is_empty()) else {
                problems.push(format!(
                    "column '{cell}' has no unit: units are never guessed; write it as {name}[UNIT] with one of {}, e.g. {}",
                    kind.accepted_units(),
                    example_cell(r, name)
                ));
                continue;
            };
            match parse_quantity(&format!("1 {unit}"), kind) {
                Ok(factor) => {
                    found[r] = Some(Column {
                        index: i,
                        cell: cell.clone(),
                        factor,
                    })
                }
                Err(_) => problems.push(format!(
                    "column '{cell}': unknown unit '{unit}' for {}: expected one of {}",
                    kind.describe(),
                    kind.accepted_units()
                )),
            }
        }
    }
    let missing: Vec<usize> = (0..3).filter(|&r| seen[r].is_none()).collect();
    if !missing.is_empty() {
        let names: Vec<&str> = missing.iter().map(|&r| wanted.names[r].as_str()).collect();
        let flags: Vec<String> = missing
            .iter()
            .map(|&r| format!("{} NAME", wanted.flags[r]))
            .collect();
        problems.push(format!(
            "no column named '{}'\n  hint: the columns are: {}\n  hint: the default layout is position[mm],velocity[m/s],angle[deg]; name other columns with {}",
            names.join("', '"),
            cells.join(", "),
            flags.join(", ")
        ));
    }
    match problems.len() {
        0 => {}
        1 => return Err(where_(&problems[0])),
        n => {
            let mut m = where_(&format!("{n} problems:"));
            for p in &problems {
                m.push_str("\n  ");
                m.push_str(p);
            }
            return Err(m);
        }
    }
    let [p, v, a, t] = found;
    match (p, v, a) {
        (Some(position), Some(velocity), Some(angle)) => Ok(Header {
            cells,
            position,
            velocity,
            angle,
            time: t,
        }),
        _ => Err(where_("required columns missing")),
    }
}

fn example_cell(role: usize, name: &str) -> String {
    let unit = ["mm", "m/s", "deg", "us"][role];
    format!("{name}[{unit}]")
}

/// One JSON object, refusing a key that appears twice (a plain map would keep the last value
/// and drop the first without a word).
///
/// # Errors
/// Not a JSON object, or a repeated key (the message names it).
pub fn json_object(
    bytes: &[u8],
) -> Result<serde_json::Map<String, serde_json::Value>, serde_json::Error> {
    use serde::de::{Deserializer, Error, MapAccess, Visitor};
    struct Unique;
    impl<'de> Visitor<'de> for Unique {
        type Value = serde_json::Map<String, serde_json::Value>;
        fn expecting(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
            f.write_str("a JSON object")
        }
        fn visit_map<A: MapAccess<'de>>(self, mut a: A) -> Result<Self::Value, A::Error> {
            let mut m = serde_json::Map::new();
            while let Some((k, v)) = a.next_entry::<String, serde_json::Value>()? {
                if m.contains_key(&k) {
                    return Err(A::Error::custom(format!("key '{k}' appears twice")));
                }
                m.insert(k, v);
            }
            Ok(m)
        }
    }
    let mut de = serde_json::Deserializer::from_slice(bytes);
    let m = (&mut de).deserialize_map(Unique)?;
    de.end()?;
    Ok(m)
}

/// A JSON error for a message about one line of a file: serde's "at line 1 column N" counts
/// within that line only, so it becomes "at column N of the line".
pub fn json_reason(e: &serde_json::Error) -> String {
    let t = e.to_string();
    match t.rfind(" at line ") {
        Some(i) => format!("{} (at column {} of the line)", &t[..i], e.column()),
        None => t,
    }
}

/// Parse a decimal number fast; the result is the same as `str::parse::<f64>` (correctly
/// rounded). Surrounding ASCII spaces are allowed. `None` if the text is not a finite number.
#[inline]
pub fn parse_number(bytes: &[u8]) -> Option<f64> {
    let b = trim_spaces(bytes);
    match plain_decimal(b) {
        Some(v) => Some(v),
        None => parse_number_slow(b),
    }
}

/// Everything but the plain shape: exponents, long mantissas, and what is not a number.
#[cold]
#[inline(never)]
fn parse_number_slow(b: &[u8]) -> Option<f64> {
    if let Some(v) = fast_decimal(b) {
        return Some(v);
    }
    let s = std::str::from_utf8(b).ok()?;
    // std accepts "inf", "nan", "infinity": refuse anything not finite.
    let v: f64 = s.parse().ok()?;
    v.is_finite().then_some(v)
}

/// Trim ASCII spaces and tabs.
#[inline]
pub fn trim_spaces(b: &[u8]) -> &[u8] {
    let blank = |c: u8| c == b' ' || c == b'\t';
    match (b.first(), b.last()) {
        // Nothing to trim: the common case, two tests.
        (Some(&f), Some(&l)) if !blank(f) && !blank(l) => b,
        _ => trim_blank_ends(b),
    }
}

fn trim_blank_ends(b: &[u8]) -> &[u8] {
    let mut s = 0;
    let mut e = b.len();
    while s < e && (b[s] == b' ' || b[s] == b'\t') {
        s += 1;
    }
    while e > s && (b[e - 1] == b' ' || b[e - 1] == b'\t') {
        e -= 1;
    }
    &b[s..e]
}

const EXACT_POW10: [f64; 23] = [
    1e0, 1e1, 1e2, 1e3, 1e4, 1e5, 1e6, 1e7, 1e8, 1e9, 1e10, 1e11, 1e12, 1e13, 1e14, 1e15, 1e16,
    1e17, 1e18, 1e19, 1e20, 1e21, 1e22,
];

/// The commonest shape, `[-+]digits[.digits]`, in one pass over the bytes with no index
/// bookkeeping: each byte is a digit, the first point, or the end of this path (an exponent or
/// anything else goes on to [`fast_decimal`] and std). Same limits and the same correctly
/// rounded result as `fast_decimal`.
#[inline]
fn plain_decimal(b: &[u8]) -> Option<f64> {
    let (neg, rest) = match b.split_first() {
        Some((b'-', r)) => (true, r),
        Some((b'+', r)) => (false, r),
        _ => (false, b),
    };
    let mut mant: u64 = 0;
    let mut digits = 0usize;
    let mut point: Option<usize> = None;
    for &c in rest {
        let d = c.wrapping_sub(b'0');
        if d <= 9 {
            mant = mant.wrapping_mul(10).wrapping_add(u64::from(d));
            digits += 1;
        } else if c == b'.' && point.is_none() {
            point = Some(digits);
        } else {
            return None;
        }
    }
    let frac = point.map_or(0, |p| digits - p);
    if digits == 0 || digits > 19 || mant > (1u64 << 53) || frac > 22 {
        return None;
    }
    let v = mant as f64 / EXACT_POW10[frac];
    Some(if neg { -v } else { v })
}

/// Clinger's fast path: a decimal whose digits (leading zeros included, at most 19 so the
/// integer cannot overflow) form an integer of at most 2^53, with a power of ten within +-22,
/// is one exact integer times or divided by one exact power of ten, so one correctly rounded
/// operation gives the correctly rounded result. Anything else: `None` (std's parser).
///
/// The digit loops test one range per byte and nothing else, so the common plain decimal
/// costs about one multiply-add per digit.
#[inline]
fn fast_decimal(b: &[u8]) -> Option<f64> {
    let (neg, mut i) = match b.first() {
        Some(b'-') => (true, 1),
        Some(b'+') => (false, 1),
        _ => (false, 0),
    };
    let start = i;
    let mut mant: u64 = 0;
    while let Some(&c) = b.get(i) {
        let d = c.wrapping_sub(b'0');
        if d > 9 {
            break;
        }
        mant = mant.wrapping_mul(10).wrapping_add(u64::from(d));
        i += 1;
    }
    let int_digits = i - start;
    let mut frac = 0usize;
    if b.get(i) == Some(&b'.') {
        i += 1;
        let fs = i;
        while let Some(&c) = b.get(i) {
            let d = c.wrapping_sub(b'0');
            if d > 9 {
                break;
            }
            mant = mant.wrapping_mul(10).wrapping_add(u64::from(d));
            i += 1;
        }
        frac = i - fs;
    }
    let digits = int_digits + frac;
    if digits == 0 || digits > 19 || mant > (1u64 << 53) {
        return None;
    }
    let mut exp = -(frac as i64);
    if i < b.len() {
        if b[i] != b'e' && b[i] != b'E' {
            return None;
        }
        i += 1;
        let eneg = match b.get(i) {
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
        let es = i;
        let mut e: i64 = 0;
        while let Some(&c) = b.get(i) {
            let d = c.wrapping_sub(b'0');
            if d > 9 || e > 10_000 {
                break;
            }
            e = e * 10 + i64::from(d);
            i += 1;
        }
        if i == es || i != b.len() {
            return None;
        }
        exp += if eneg { -e } else { e };
    }
    let m = mant as f64;
    let v = if mant == 0 {
        0.0
    } else if (0..=22).contains(&exp) {
        m * EXACT_POW10[exp as usize]
    } else if (-22..0).contains(&exp) {
        m / EXACT_POW10[(-exp) as usize]
    } else {
        return None;
    };
    Some(if neg { -v } else { v })
}

/// The fields of one CSV record, as ranges into the line (fast path) or into a scratch buffer
/// (quoted fields, unescaped).
#[derive(Debug, Default)]
pub struct Fields {
    /// (start, end) of each field.
    pub ranges: Vec<(usize, usize)>,
    /// Unescaped text of a quoted record; empty when the ranges point into the line itself.
    pub scratch: Vec<u8>,
    /// Whether the ranges point into `scratch`.
    pub quoted: bool,
}

impl Fields {
    /// The bytes of field `i`.
    #[inline]
    pub fn get<'a>(&'a self, line: &'a [u8], i: usize) -> Option<&'a [u8]> {
        let (s, e) = *self.ranges.get(i)?;
        Some(if self.quoted {
            &self.scratch[s..e]
        } else {
            &line[s..e]
        })
    }
}

/// The end of the next CSV record starting at `start` in `data`: returns (end of the record's
/// content, start of the next record, newlines inside the record, whether it holds a quote).
/// A quoted field may hold commas, doubled quotes and line breaks.
#[inline]
pub fn next_record(data: &[u8], start: usize) -> (usize, usize, usize, bool) {
    let rest = &data[start..];
    let nl = rest.iter().position(|&b| b == b'\n');
    let line_end = nl.map_or(data.len(), |p| start + p);
    if !data[start..line_end].contains(&b'"') {
        let next = nl.map_or(data.len(), |p| start + p + 1);
        return (line_end, next, 0, false);
    }
    // Quote-aware scan.
    let mut in_quotes = false;
    let mut newlines = 0;
    let mut i = start;
    while i < data.len() {
        match data[i] {
            b'"' => in_quotes = !in_quotes,
            b'\n' if !in_quotes => return (i, i + 1, newlines, true),
            b'\n' => newlines += 1,
            _ => {}
        }
        i += 1;
    }
    (data.len(), data.len(), newlines, true)
}

/// One pass over an unquoted record starting at `start`: the field ranges (relative to
/// `start`) go into `out`, and the result is (end of the record's content, start of the next
/// record). `None` as soon as a quote appears: then use [`next_record`] and [`split_fields`].
#[inline]
pub fn scan_plain(data: &[u8], start: usize, out: &mut Fields) -> Option<(usize, usize)> {
    out.ranges.clear();
    out.quoted = false;
    let mut s = 0;
    for (k, &b) in data[start..].iter().enumerate() {
        match b {
            b',' => {
                out.ranges.push((s, k));
                s = k + 1;
            }
            b'\n' => {
                out.ranges.push((s, k));
                return Some((start + k, start + k + 1));
            }
            b'"' => return None,
            _ => {}
        }
    }
    out.ranges.push((s, data.len() - start));
    Some((data.len(), data.len()))
}

/// The field ranges of one line known to hold no quote (its line break excluded), eight bytes
/// at a time: the commas of a word are found at once (exact per byte: no carry crosses a
/// byte), then taken lowest first.
#[inline]
pub fn split_plain_line(line: &[u8], out: &mut Fields) {
    const LOW7: u64 = 0x7F7F_7F7F_7F7F_7F7F;
    const HIGH: u64 = 0x8080_8080_8080_8080;
    const COMMAS: u64 = 0x2C2C_2C2C_2C2C_2C2C;
    out.ranges.clear();
    out.quoted = false;
    let mut s = 0;
    let mut words = line.chunks_exact(8);
    let mut base = 0;
    for w in &mut words {
        let mut word = [0u8; 8];
        word.copy_from_slice(w);
        let x = u64::from_le_bytes(word) ^ COMMAS;
        // High bit set exactly in the bytes of x that are zero (the commas).
        let mut m = !(((x & LOW7) + LOW7) | x) & HIGH;
        while m != 0 {
            let k = base + (m.trailing_zeros() / 8) as usize;
            out.ranges.push((s, k));
            s = k + 1;
            m &= m - 1;
        }
        base += 8;
    }
    for (i, &b) in words.remainder().iter().enumerate() {
        if b == b',' {
            out.ranges.push((s, base + i));
            s = base + i + 1;
        }
    }
    out.ranges.push((s, line.len()));
}

/// Split one record (without its line break; a trailing `\r` already removed) into fields.
pub fn split_fields(line: &[u8], has_quote: bool, out: &mut Fields) {
    out.ranges.clear();
    out.quoted = has_quote;
    if !has_quote {
        let mut s = 0;
        for (i, &b) in line.iter().enumerate() {
            if b == b',' {
                out.ranges.push((s, i));
                s = i + 1;
            }
        }
        out.ranges.push((s, line.len()));
        return;
    }
    out.scratch.clear();
    let mut i = 0;
    loop {
        let start = out.scratch.len();
        // Leading spaces before an opening quote are kept only if the field is not quoted.
        let mut j = i;
        while j < line.len() && line[j] == b' ' {
            j += 1;
        }
        if j < line.len() && line[j] == b'"' {
            j += 1;
            loop {
                match line.get(j) {
                    None => break,
                    Some(b'"') if line.get(j + 1) == Some(&b'"') => {
                        out.scratch.push(b'"');
                        j += 2;
                    }
                    Some(b'"') => {
                        j += 1;
                        break;
                    }
                    Some(&c) => {
                        out.scratch.push(c);
                        j += 1;
                    }
                }
            }
            // Anything after the closing quote up to the comma is kept as written.
            while j < line.len() && line[j] != b',' {
                out.scratch.push(line[j]);
                j += 1;
            }
        } else {
            j = i;
            while j < line.len() && line[j] != b',' {
                out.scratch.push(line[j]);
                j += 1;
            }
        }
        out.ranges.push((start, out.scratch.len()));
        if j < line.len() {
            i = j + 1; // past the comma
        } else {
            break;
        }
    }
}

/// Where the bytes come from, with what has been read but not yet handed out.
pub struct Source {
    reader: Box<dyn Read + Send>,
    pending: Vec<u8>,
    eof: bool,
    /// Bytes handed out so far (for progress).
    pub consumed: u64,
}

impl Source {
    /// Wrap a reader.
    pub fn new(reader: Box<dyn Read + Send>) -> Self {
        Self {
            reader,
            pending: Vec::new(),
            eof: false,
            consumed: 0,
        }
    }

    fn fill_more(&mut self, want: usize) -> std::io::Result<usize> {
        // `take` + `read_to_end` reads into the spare capacity without zeroing it first, and
        // retries interrupted reads; it stops at `want` bytes or the end of the input.
        let old = self.pending.len();
        let r = (&mut self.reader)
            .take(want as u64)
            .read_to_end(&mut self.pending);
        match r {
            Ok(n) => {
                if n == 0 {
                    self.eof = true;
                }
                Ok(n)
            }
            Err(e) => {
                self.pending.truncate(old);
                Err(e)
            }
        }
    }

    /// The first line (a CSV header may have quoted cells with line breaks), without its line
    /// break; a UTF-8 byte-order mark is dropped. With `consume` false the line stays in the
    /// stream (JSON lines: the first object is also the first row). `None` for empty input.
    ///
    /// # Errors
    /// A read error, or a first line longer than `max`.
    pub fn first_line(
        &mut self,
        consume: bool,
        quotes: bool,
        max: usize,
    ) -> std::io::Result<Option<Vec<u8>>> {
        loop {
            if self.pending.starts_with(b"\xEF\xBB\xBF") {
                self.pending.drain(..3);
                self.consumed += 3;
            }
            let cut = if quotes {
                let (end, next, _, _) = next_record(&self.pending, 0);
                (next <= self.pending.len() && end < self.pending.len()).then_some((end, next))
            } else {
                self.pending
                    .iter()
                    .position(|&b| b == b'\n')
                    .map(|p| (p, p + 1))
            };
            if let Some((end, next)) = cut {
                let mut line = self.pending[..end].to_vec();
                if line.last() == Some(&b'\r') {
                    line.pop();
                }
                if consume {
                    self.pending.drain(..next);
                    self.consumed += next as u64;
                }
                return Ok(Some(line));
            }
            if self.eof {
                if self.pending.is_empty() {
                    return Ok(None);
                }
                let mut line = self.pending.clone();
                if line.last() == Some(&b'\r') {
                    line.pop();
                }
                if consume {
                    self.consumed += self.pending.len() as u64;
                    self.pending.clear();
                }
                return Ok(Some(line));
            }
            if self.pending.len() > max {
                return Err(std::io::Error::new(
                    std::io::ErrorKind::InvalidData,
                    format!("the first line is longer than {} MiB", max >> 20),
                ));
            }
            self.fill_more(64 * 1024)?;
        }
    }

    /// Fill `buf` (cleared first) with whole records: about `target` bytes when the input has
    /// them but never more than `max_lines` line breaks, cut after a record break (outside
    /// quotes for CSV). `None` at the end of the input with nothing left; else what the chunk
    /// holds (its line breaks, whether it has a quote), found with one vectorised pass each.
    ///
    /// # Errors
    /// A read error, or a single record longer than `max`.
    pub fn next_chunk(
        &mut self,
        buf: &mut Vec<u8>,
        target: usize,
        max_lines: usize,
        quotes: bool,
        max: usize,
    ) -> std::io::Result<Option<ChunkInfo>> {
        buf.clear();
        std::mem::swap(buf, &mut self.pending);
        // `pending` is now empty with the capacity of the old `buf`; `buf` holds the carry-over.
        loop {
            if buf.len() < target && !self.eof {
                std::mem::swap(buf, &mut self.pending);
                let r = self.fill_more(target.max(64 * 1024));
                std::mem::swap(buf, &mut self.pending);
                r?;
                continue;
            }
            let has_quote = quotes && memchr::memchr(b'"', buf).is_some();
            let cut = if has_quote {
                match nth_break_outside_quotes(buf, max_lines) {
                    Some(c) => Some(c),
                    None if self.eof => (!buf.is_empty()).then_some(buf.len()),
                    None => last_break_outside_quotes(buf),
                }
                .map(|c| (c, memchr::memchr_iter(b'\n', &buf[..c]).count()))
            } else {
                let breaks = memchr::memchr_iter(b'\n', buf).count();
                if max_lines > 0 && breaks >= max_lines {
                    memchr::memchr_iter(b'\n', buf)
                        .nth(max_lines - 1)
                        .map(|p| (p + 1, max_lines))
                } else if self.eof {
                    (!buf.is_empty()).then_some((buf.len(), breaks))
                } else {
                    memchr::memrchr(b'\n', buf).map(|p| (p + 1, breaks))
                }
            };
            match cut {
                Some((c, lines)) => {
                    self.pending.clear();
                    self.pending.extend_from_slice(&buf[c..]);
                    buf.truncate(c);
                    self.consumed += c as u64;
                    return Ok(Some(ChunkInfo {
                        lines: lines as u64,
                        has_quote,
                    }));
                }
                None if self.eof => return Ok(None),
                None => {
                    if buf.len() > max {
                        return Err(std::io::Error::new(
                            std::io::ErrorKind::InvalidData,
                            format!("a record is longer than {} MiB", max >> 20),
                        ));
                    }
                    std::mem::swap(buf, &mut self.pending);
                    let r = self.fill_more(target.max(64 * 1024));
                    std::mem::swap(buf, &mut self.pending);
                    r?;
                }
            }
        }
    }
}

/// What a chunk from [`Source::next_chunk`] holds.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub struct ChunkInfo {
    /// Line breaks in it (inside quotes too: they advance the line numbers).
    pub lines: u64,
    /// Whether it holds a double quote anywhere (else every record is one plain line).
    pub has_quote: bool,
}

/// One past the `n`-th record break outside quotes, if there are that many.
fn nth_break_outside_quotes(buf: &[u8], n: usize) -> Option<usize> {
    if n == 0 {
        return None;
    }
    let mut seen = 0;
    let mut in_quotes = false;
    for (i, &b) in buf.iter().enumerate() {
        match b {
            b'"' => in_quotes = !in_quotes,
            b'\n' if !in_quotes => {
                seen += 1;
                if seen == n {
                    return Some(i + 1);
                }
            }
            _ => {}
        }
    }
    None
}

/// One past the last line break outside quotes (the chunk starts at a record boundary).
fn last_break_outside_quotes(buf: &[u8]) -> Option<usize> {
    let mut in_quotes = false;
    let mut last = None;
    for (i, &b) in buf.iter().enumerate() {
        match b {
            b'"' => in_quotes = !in_quotes,
            b'\n' if !in_quotes => last = Some(i + 1),
            _ => {}
        }
    }
    last
}

#[cfg(test)]
mod tests {
    use super::*;
    use proptest::prelude::*;

    fn wanted() -> Wanted {
        Wanted {
            names: ["position", "velocity", "angle", "time"].map(String::from),
            flags: [
                "--position-column",
                "--velocity-column",
                "--angle-column",
                "--time-column",
            ],
        }
    }

    fn cells(s: &str) -> Vec<String> {
        s.split(',').map(String::from).collect()
    }

    #[test]
    fn header_units_become_factors() {
        let h = parse_header(
            "f.csv",
            1,
            cells("id,position [m],velocity[km/s],angle[rad],time[s],note"),
            &wanted(),
        )
        .unwrap();
        assert_eq!(h.position.index, 1);
        assert_eq!(h.position.factor, 1.0);
        assert_eq!(h.velocity.factor, 1000.0);
        assert_eq!(h.angle.factor, 1.0);
        assert_eq!(h.time.as_ref().map(|t| t.factor), Some(1.0));
        let h = parse_header(
            "f.csv",
            1,
            cells("position[mm],velocity[m/s],angle[deg]"),
            &wanted(),
        )
        .unwrap();
        assert!((h.position.factor - 1e-3).abs() < 1e-18);
        assert!((h.angle.factor - 1f64.to_radians()).abs() < 1e-18);
        assert!(h.time.is_none());
    }

    #[test]
    fn header_errors_name_the_column() {
        let e = parse_header(
            "f.csv",
            1,
            cells("position[mm],velocity,angle[deg]"),
            &wanted(),
        )
        .unwrap_err();
        assert!(
            e.contains("f.csv: row 1 (header): column 'velocity' has no unit"),
            "{e}"
        );
        let e = parse_header(
            "f.csv",
            1,
            cells("position[mm],velocity[mph],angle[deg]"),
            &wanted(),
        )
        .unwrap_err();
        assert!(e.contains("unknown unit 'mph'"), "{e}");
        let e = parse_header(
            "f.csv",
            1,
            cells("x[mm],velocity[m/s],angle[deg]"),
            &wanted(),
        )
        .unwrap_err();
        assert!(e.contains("no column named 'position'"), "{e}");
        assert!(e.contains("--position-column"), "{e}");
        let e = parse_header(
            "f.csv",
            1,
            cells("position[mm],velocity[m/s],angle[deg],angle[rad]"),
            &wanted(),
        )
        .unwrap_err();
        assert!(e.contains("appears twice"), "{e}");
    }

    #[test]
    fn quoted_fields_are_unescaped() {
        let line = br#"1,"a, ""b""",  "c",d"#;
        let mut f = Fields::default();
        split_fields(line, true, &mut f);
        let got: Vec<&[u8]> = (0..f.ranges.len())
            .map(|i| f.get(line, i).unwrap())
            .collect();
        assert_eq!(got, vec![&b"1"[..], b"a, \"b\"", b"c", b"d"]);
        split_fields(b"1,,3", false, &mut f);
        assert_eq!(f.ranges, vec![(0, 1), (2, 2), (3, 4)]);
    }

    #[test]
    fn plain_scan_splits_and_stops_at_quotes() {
        let mut f = Fields::default();
        let data = b"a,b,,c\nx,y\n";
        assert_eq!(scan_plain(data, 0, &mut f), Some((6, 7)));
        assert_eq!(f.ranges, vec![(0, 1), (2, 3), (4, 4), (5, 6)]);
        assert_eq!(scan_plain(data, 7, &mut f), Some((10, 11)));
        assert_eq!(f.ranges, vec![(0, 1), (2, 3)]);
        assert_eq!(scan_plain(b"1,\"2\"\n", 0, &mut f), None);
        assert_eq!(scan_plain(b"1,2", 0, &mut f), Some((3, 3)));
    }

    #[test]
    fn records_may_span_lines_inside_quotes() {
        let data = b"1,\"two\nlines\",3\n4,5,6\n";
        let (end, next, nl, q) = next_record(data, 0);
        assert_eq!(&data[..end], b"1,\"two\nlines\",3");
        assert_eq!((nl, q), (1, true));
        let (end2, next2, _, q2) = next_record(data, next);
        assert_eq!(&data[next..end2], b"4,5,6");
        assert!(!q2);
        assert_eq!(next2, data.len());
    }

    #[test]
    fn chunks_end_on_record_breaks() {
        let text = b"a,b\n1,\"x\ny\",2\n3,4,5\n6,7".to_vec();
        let mut s = Source::new(Box::new(std::io::Cursor::new(text.clone())));
        let head = s.first_line(true, true, 1 << 20).unwrap().unwrap();
        assert_eq!(head, b"a,b");
        let mut all = Vec::new();
        let mut buf = Vec::new();
        while let Some(info) = s.next_chunk(&mut buf, 3, 1000, true, 1 << 20).unwrap() {
            // Every chunk ends after a record break outside quotes, or at the end.
            assert!(buf.ends_with(b"\n") || buf.ends_with(b"6,7"));
            assert_eq!(
                info.lines as usize,
                buf.iter().filter(|&&b| b == b'\n').count()
            );
            assert_eq!(info.has_quote, buf.contains(&b'"'));
            all.extend_from_slice(&buf);
        }
        assert_eq!(all, text[4..]);
        assert_eq!(s.consumed, text.len() as u64);
    }

    #[test]
    fn chunks_hold_at_most_max_lines() {
        let mut text = Vec::new();
        for i in 0..10_000 {
            text.extend_from_slice(format!("{i},1\n").as_bytes());
        }
        text.extend_from_slice(b"last,2");
        let mut s = Source::new(Box::new(std::io::Cursor::new(text.clone())));
        let mut buf = Vec::new();
        let mut all = Vec::new();
        let mut chunks = 0;
        while let Some(info) = s
            .next_chunk(&mut buf, 1 << 20, 700, false, 1 << 20)
            .unwrap()
        {
            let lines = buf.iter().filter(|&&b| b == b'\n').count();
            assert!(lines <= 700, "{lines}");
            assert_eq!(info.lines as usize, lines);
            assert!(!info.has_quote);
            all.extend_from_slice(&buf);
            chunks += 1;
        }
        assert_eq!(all, text);
        assert_eq!(chunks, 15);
        assert_eq!(nth_break_outside_quotes(b"a\nb\nc", 2), Some(4));
        assert_eq!(nth_break_outside_quotes(b"\"a\nb\"\nc\n", 1), Some(6));
        assert_eq!(nth_break_outside_quotes(b"abc", 1), None);
    }

    proptest! {
        /// The word-at-a-time splitter finds the same fields as the byte loop, whatever bytes
        /// sit next to the commas.
        #[test]
        fn plain_split_matches_the_byte_loop(line in proptest::collection::vec(prop_oneof![Just(b','), Just(b'-'), Just(b'+'), 0u8..=255u8], 0..70)) {
            let line: Vec<u8> = line.into_iter().filter(|&b| b != b'"' && b != b'\n').collect();
            let mut a = Fields::default();
            let mut b = Fields::default();
            split_plain_line(&line, &mut a);
            split_fields(&line, false, &mut b);
            prop_assert_eq!(a.ranges, b.ranges);
        }
    }

    #[test]
    fn header_problems_are_named_together() {
        let e =
            parse_header("f.csv", 1, cells("position,velocity[mph],angle"), &wanted()).unwrap_err();
        assert!(e.starts_with("f.csv: row 1 (header): 3 problems:"), "{e}");
        assert!(e.contains("column 'position' has no unit"), "{e}");
        assert!(e.contains("unknown unit 'mph'"), "{e}");
        assert!(e.contains("column 'angle' has no unit"), "{e}");
        let e = parse_header("f.csv", 1, cells("x[mm],vp[m/s],beta[deg]"), &wanted()).unwrap_err();
        assert!(
            e.contains("no column named 'position', 'velocity', 'angle'"),
            "{e}"
        );
        assert!(
            e.contains("--position-column NAME, --velocity-column NAME, --angle-column NAME"),
            "{e}"
        );
    }

    #[test]
    fn json_objects_refuse_repeated_keys() {
        let m = json_object(br#"{"a": 1, "b": [1, {"a": 2}]}"#).unwrap();
        assert_eq!(m.len(), 2);
        let e = json_object(br#"{"angle[deg]": 8, "angle[deg]": 30}"#).unwrap_err();
        assert!(
            e.to_string().contains("key 'angle[deg]' appears twice"),
            "{e}"
        );
        assert!(json_object(b"[1, 2]").is_err());
        assert!(json_object(br#"{"a": 1} x"#).is_err());
    }

    #[test]
    fn numbers() {
        for (t, v) in [
            ("1", 1.0),
            (" 2.5 ", 2.5),
            ("-0.125", -0.125),
            ("1e3", 1000.0),
            ("+.5", 0.5),
            ("5.", 5.0),
            ("1.5E-2", 0.015),
            ("0.000", 0.0),
        ] {
            assert_eq!(parse_number(t.as_bytes()), Some(v), "{t}");
        }
        // Past the fast path's limits (20 digits, 2^53 + 1, a long exponent): std decides.
        for (t, v) in [
            ("12345678901234567890", 12345678901234567890.0),
            ("9007199254740993", 9007199254740993.0),
            ("0.00000000000000000000000001", 1e-26),
            ("1e000000000000000000003", 1000.0),
        ] {
            assert_eq!(parse_number(t.as_bytes()), Some(v), "{t}");
        }
        for t in [
            "", "abc", "1.5 mm", "inf", "NaN", "1e", "--1", "1e400", ".", "1.2.3", "1e+", "e5",
            "-", "1 2",
        ] {
            assert_eq!(parse_number(t.as_bytes()), None, "{t}");
        }
    }

    proptest! {
        /// The fast path gives exactly what std's parser gives.
        #[test]
        fn fast_parse_matches_std(m in 0u64..10_000_000_000_000_000, e in -30i32..30, neg in any::<bool>(), dot in 0usize..20) {
            let mut digits = m.to_string();
            if dot < digits.len() {
                digits.insert(digits.len() - dot, '.');
            }
            let text = format!("{}{}e{}", if neg { "-" } else { "" }, digits, e);
            let want: f64 = text.parse().unwrap();
            prop_assert_eq!(parse_number(text.as_bytes()).map(f64::to_bits), Some(want.to_bits()), "{}", text);
            let plain = format!("{}{}", if neg { "-" } else { "" }, digits);
            let want: f64 = plain.parse().unwrap();
            prop_assert_eq!(parse_number(plain.as_bytes()).map(f64::to_bits), Some(want.to_bits()), "{}", plain);
        }

        #[test]
        fn any_float_round_trips(x in any::<f64>()) {
            prop_assume!(x.is_finite());
            let text = format!("{x}");
            prop_assert_eq!(parse_number(text.as_bytes()), Some(x));
            let text = format!("{x:e}");
            prop_assert_eq!(parse_number(text.as_bytes()), Some(x));
        }
    }
}
