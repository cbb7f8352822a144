//! CSV record splitting: the record's end (quoted line breaks included), the fields of a plain
//! line eight bytes at a time, and quoted fields unescaped.

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
/// byte), then taken lowest first. The reference for [`split_plain_record`] in the tests.
#[cfg(test)]
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

/// The fields of the quote-free record that starts at `start` in `data`, up to its line break
/// (or the end of `data`), in one pass eight bytes at a time for the commas and the line break
/// together (exact per byte, as in `split_plain_line`); the ranges are relative to `start`
/// and the last one runs up to the line break (a `\r` before it included). Returns the index
/// of the line break, or `data.len()`.
///
/// Kept by measurement: the lines of the 2 000 000-row benchmark file, each split this way,
/// 12.3 ns a line, against 22.7 ns for the `csv-core` 0.1 reader (which also copies the fields
/// out), best of 15 passes, one core, 2026-12-04, the VM of `docs/performance.md` (`cd
/// bench/micro && cargo run --release`). For lines that hold a quoted field `csv-core` is the
/// faster (26.2 ns a line against 50.3 ns for [`next_record`] and [`split_fields`]), but it reads
/// a quote after leading spaces as text where these skip the spaces and unquote: that path
/// stays as it is until its rules change.
#[inline]
pub fn split_plain_record(data: &[u8], start: usize, out: &mut Fields) -> usize {
    const LOW7: u64 = 0x7F7F_7F7F_7F7F_7F7F;
    const HIGH: u64 = 0x8080_8080_8080_8080;
    const COMMAS: u64 = 0x2C2C_2C2C_2C2C_2C2C;
    const BREAKS: u64 = 0x0A0A_0A0A_0A0A_0A0A;
    out.ranges.clear();
    out.quoted = false;
    let rest = data.get(start..).unwrap_or(&[]);
    let mut s = 0;
    let mut base = 0;
    let mut words = rest.chunks_exact(8);
    for w in &mut words {
        let mut word = [0u8; 8];
        word.copy_from_slice(w);
        let x = u64::from_le_bytes(word);
        let (c, n) = (x ^ COMMAS, x ^ BREAKS);
        let breaks = !(((n & LOW7) + LOW7) | n) & HIGH;
        let mut m = (!(((c & LOW7) + LOW7) | c) & HIGH) | breaks;
        while m != 0 {
            let k = base + (m.trailing_zeros() / 8) as usize;
            out.ranges.push((s, k));
            if breaks & m & m.wrapping_neg() != 0 {
                return start + k;
            }
            s = k + 1;
            m &= m - 1;
        }
        base += 8;
    }
    for (i, &b) in words.remainder().iter().enumerate() {
        if b == b',' || b == b'\n' {
            out.ranges.push((s, base + i));
            if b == b'\n' {
                return start + base + i;
            }
            s = base + i + 1;
        }
    }
    out.ranges.push((s, rest.len()));
    data.len()
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

#[cfg(test)]
mod tests {
    use super::*;
    use proptest::prelude::*;

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

    proptest! {
        /// One pass for the fields and the line break finds what `memchr` and the line splitter
        /// find, record after record.
        #[test]
        fn record_split_matches_line_split(text in proptest::collection::vec(prop_oneof![Just(b','), Just(b'\n'), Just(b'\r'), 0u8..=255u8], 0..200)) {
            let text: Vec<u8> = text.into_iter().filter(|&b| b != b'"').collect();
            let (mut a, mut b) = (Fields::default(), Fields::default());
            let mut pos = 0;
            loop {
                let end = split_plain_record(&text, pos, &mut a);
                let want = memchr::memchr(b'\n', &text[pos..]).map_or(text.len(), |p| pos + p);
                prop_assert_eq!(end, want);
                split_plain_line(&text[pos..end], &mut b);
                prop_assert_eq!(&a.ranges, &b.ranges);
                if end >= text.len() {
                    break;
                }
                pos = end + 1;
            }
        }

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
}
