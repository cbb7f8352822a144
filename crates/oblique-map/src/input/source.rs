//! Where the bytes come from: the first line, then chunks of whole records cut after a record
//! break (outside quotes for CSV), with one vectorised pass for their line breaks and quotes.

use super::fields::next_record;
use std::io::Read;

/// A single record longer than this is refused.
pub const MAX_RECORD: usize = 16 * 1024 * 1024;

/// Where the bytes come from, with what has been read but not yet handed out.
pub struct Source<'r> {
    reader: Box<dyn Read + Send + 'r>,
    pending: Vec<u8>,
    eof: bool,
    /// Bytes handed out so far (for progress).
    pub consumed: u64,
}

impl<'r> Source<'r> {
    /// Wrap a reader.
    pub fn new(reader: Box<dyn Read + Send + 'r>) -> Self {
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
            let cut = cut_chunk(buf, self.eof, max_lines, quotes);
            match cut {
                Some(info) => {
                    let c = info.len;
                    self.pending.clear();
                    self.pending.extend_from_slice(&buf[c..]);
                    buf.truncate(c);
                    self.consumed += c as u64;
                    return Ok(Some(info));
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

/// Where a chunk of whole records starting at the front of `buf` ends: after the `max_lines`-th
/// record break, or after the last one; at the end of the input (`at_end`) everything left. The
/// line breaks and quotes are found with one vectorised pass each (memchr). `None` when `buf`
/// holds no record break (and is not the end of the input), or is empty.
pub fn cut_chunk(buf: &[u8], at_end: bool, max_lines: usize, quotes: bool) -> Option<ChunkInfo> {
    let has_quote = quotes && memchr::memchr(b'"', buf).is_some();
    let cut = if has_quote {
        match nth_break_outside_quotes(buf, max_lines) {
            Some(c) => Some(c),
            None if at_end => (!buf.is_empty()).then_some(buf.len()),
            None => last_break_outside_quotes(buf),
        }
        .map(|c| (c, memchr::memchr_iter(b'\n', &buf[..c]).count()))
    } else {
        let breaks = memchr::memchr_iter(b'\n', buf).count();
        if max_lines > 0 && breaks >= max_lines {
            memchr::memchr_iter(b'\n', buf)
                .nth(max_lines - 1)
                .map(|p| (p + 1, max_lines))
        } else if at_end {
            (!buf.is_empty()).then_some((buf.len(), breaks))
        } else {
            memchr::memrchr(b'\n', buf).map(|p| (p + 1, breaks))
        }
    };
    cut.map(|(len, lines)| ChunkInfo {
        len,
        lines: lines as u64,
        has_quote,
    })
}

/// What a chunk from [`Source::next_chunk`] or [`cut_chunk`] holds.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub struct ChunkInfo {
    /// Its length in bytes.
    pub len: usize,
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
}
