//! A small structural scanner for RON text: it finds where each field and list element starts
//! (line and column, for messages that point into the user's file) and where each list closes
//! (so that an observation can be appended without rewriting the rest of the file).
//!
//! It does not deserialise anything; serde + ron do that. It only needs to agree with ron on
//! where values begin and end, which holds for the subset used by oblique's files: structs with
//! or without a name, tuples, lists, maps, strings (with escapes), raw strings, numbers,
//! identifiers, `Some(..)`, and `//` and `/* */` comments.

use std::collections::HashMap;

/// Where things are in a RON text, by path (`observations[2].angle`, `sources.S96`).
#[derive(Debug, Default, Clone)]
pub struct RonIndex {
    starts: HashMap<String, usize>,
    list_ends: HashMap<String, usize>,
    tails: HashMap<String, Tail>,
    line_starts: Vec<usize>,
}

/// The end of a list's or a structure's contents: where its last piece of code (a value or a
/// comma, not a comment) ends, and where it closes.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub struct Tail {
    /// Byte offset just after the last value or comma inside (just after the opening bracket
    /// when empty). Comments and blank space after it belong to the tail.
    pub code_end: usize,
    /// True when the last thing inside is a value with no comma after it.
    pub needs_comma: bool,
    /// Byte offset of the closing `]` or `)`.
    pub close: usize,
}

impl RonIndex {
    /// Scan `text`. Scanning never fails: on text it cannot follow it stops and keeps what it
    /// found so far (ron's own parser reports the syntax error).
    pub fn scan(text: &str) -> Self {
        let mut line_starts = vec![0];
        for (i, b) in text.bytes().enumerate() {
            if b == b'\n' {
                line_starts.push(i + 1);
            }
        }
        let mut s = Scanner {
            b: text.as_bytes(),
            i: 0,
            index: RonIndex {
                line_starts,
                ..Default::default()
            },
            depth: 0,
        };
        let _ = s.value(String::new());
        s.index
    }

    /// Byte offset where the value at `path` starts.
    pub fn start(&self, path: &str) -> Option<usize> {
        self.starts.get(path).copied()
    }

    /// Byte offset of the closing `]` of the list at `path`.
    pub fn list_end(&self, path: &str) -> Option<usize> {
        self.list_ends.get(path).copied()
    }

    /// The tail of the list or structure at `path` (`""` is the top-level structure).
    pub fn tail(&self, path: &str) -> Option<Tail> {
        self.tails.get(path).copied()
    }

    /// 1-based (line, column) of a byte offset; the column counts characters.
    pub fn line_col(&self, text: &str, offset: usize) -> (usize, usize) {
        let line = match self.line_starts.binary_search(&offset) {
            Ok(l) => l,
            Err(l) => l.saturating_sub(1),
        };
        let start = self.line_starts.get(line).copied().unwrap_or(0);
        let col = text
            .get(start..offset.min(text.len()))
            .map_or(1, |s| s.chars().count() + 1);
        (line + 1, col)
    }

    /// 1-based (line, column) of the value at `path`, or of its nearest scanned ancestor.
    pub fn locate(&self, text: &str, path: &str) -> (usize, usize) {
        let mut p = path.to_string();
        loop {
            if let Some(off) = self.start(&p) {
                return self.line_col(text, off);
            }
            match p.rfind(['.', '[']) {
                Some(cut) => p.truncate(cut),
                None => return (1, 1),
            }
        }
    }
}

struct Scanner<'a> {
    b: &'a [u8],
    i: usize,
    index: RonIndex,
    depth: usize,
}

const MAX_DEPTH: usize = 64;

impl Scanner<'_> {
    fn peek(&self) -> Option<u8> {
        self.b.get(self.i).copied()
    }

    fn skip_ws(&mut self) {
        loop {
            match self.peek() {
                Some(c) if c.is_ascii_whitespace() => self.i += 1,
                Some(b'/') if self.b.get(self.i + 1) == Some(&b'/') => {
                    while let Some(c) = self.peek() {
                        if c == b'\n' {
                            break;
                        }
                        self.i += 1;
                    }
                }
                Some(b'/') if self.b.get(self.i + 1) == Some(&b'*') => {
                    self.i += 2;
                    let mut level = 1;
                    while self.i < self.b.len() && level > 0 {
                        if self.b[self.i] == b'*' && self.b.get(self.i + 1) == Some(&b'/') {
                            level -= 1;
                            self.i += 2;
                        } else if self.b[self.i] == b'/' && self.b.get(self.i + 1) == Some(&b'*') {
                            level += 1;
                            self.i += 2;
                        } else {
                            self.i += 1;
                        }
                    }
                }
                _ => return,
            }
        }
    }

    fn ident(&mut self) -> Option<String> {
        let start = self.i;
        while let Some(c) = self.peek() {
            if c.is_ascii_alphanumeric() || c == b'_' || c == b'#' {
                self.i += 1;
            } else {
                break;
            }
        }
        (self.i > start).then(|| String::from_utf8_lossy(&self.b[start..self.i]).into_owned())
    }

    fn string(&mut self) -> Option<String> {
        // At the opening quote.
        self.i += 1;
        let mut out = Vec::new();
        while let Some(c) = self.peek() {
            self.i += 1;
            match c {
                b'\\' => {
                    if let Some(n) = self.peek() {
                        out.push(n);
                        self.i += 1;
                    }
                }
                b'"' => return Some(String::from_utf8_lossy(&out).into_owned()),
                _ => out.push(c),
            }
        }
        None
    }

    fn raw_string(&mut self) -> Option<()> {
        // At `r`, followed by hashes and a quote.
        self.i += 1;
        let mut hashes = 0;
        while self.peek() == Some(b'#') {
            hashes += 1;
            self.i += 1;
        }
        if self.peek() != Some(b'"') {
            return None;
        }
        self.i += 1;
        loop {
            let c = self.peek()?;
            self.i += 1;
            if c == b'"'
                && self.b[self.i..]
                    .iter()
                    .take(hashes)
                    .filter(|&&h| h == b'#')
                    .count()
                    == hashes
            {
                self.i += hashes;
                return Some(());
            }
        }
    }

    fn value(&mut self, path: String) -> Option<()> {
        self.depth += 1;
        if self.depth > MAX_DEPTH {
            return None;
        }
        self.skip_ws();
        self.index.starts.insert(path.clone(), self.i);
        let r = match self.peek()? {
            b'(' => self.paren(path),
            b'[' => self.list(path),
            b'{' => self.map(path),
            b'"' => self.string().map(|_| ()),
            b'r' if matches!(self.b.get(self.i + 1), Some(b'#') | Some(b'"')) => self.raw_string(),
            c if c.is_ascii_alphabetic() || c == b'_' => {
                let name = self.ident()?;
                self.skip_ws();
                if self.peek() == Some(b'(') {
                    if name == "Some" {
                        self.i += 1;
                        self.value(path)?;
                        self.skip_ws();
                        if self.peek() == Some(b')') {
                            self.i += 1;
                        }
                        Some(())
                    } else {
                        self.paren(path)
                    }
                } else {
                    Some(())
                }
            }
            _ => {
                let start = self.i;
                while let Some(c) = self.peek() {
                    if matches!(c, b',' | b')' | b']' | b'}') || c.is_ascii_whitespace() {
                        break;
                    }
                    self.i += 1;
                }
                // A closing bracket where a value should be (`(}` or `[)`): stop here, or the
                // enclosing list would ask for a value at the same place for ever.
                if self.i == start {
                    None
                } else {
                    Some(())
                }
            }
        };
        self.depth -= 1;
        r
    }

    /// A struct `(a: 1, b: 2)` or a tuple `(1, 2)`.
    fn paren(&mut self, path: String) -> Option<()> {
        self.i += 1;
        let mut n = 0;
        let mut code_end = self.i;
        let mut needs_comma = false;
        loop {
            self.skip_ws();
            match self.peek()? {
                b')' => {
                    self.index.tails.insert(
                        path,
                        Tail {
                            code_end,
                            needs_comma,
                            close: self.i,
                        },
                    );
                    self.i += 1;
                    return Some(());
                }
                b',' => {
                    self.i += 1;
                    code_end = self.i;
                    needs_comma = false;
                    continue;
                }
                _ => {}
            }
            // A field name followed by ':' makes this a struct field.
            let save = self.i;
            if let Some(name) = self.ident() {
                self.skip_ws();
                if self.peek() == Some(b':') {
                    self.i += 1;
                    let child = if path.is_empty() {
                        name
                    } else {
                        format!("{path}.{name}")
                    };
                    self.value(child)?;
                    code_end = self.i;
                    needs_comma = true;
                    continue;
                }
            }
            self.i = save;
            self.value(format!("{path}[{n}]"))?;
            code_end = self.i;
            needs_comma = true;
            n += 1;
        }
    }

    fn list(&mut self, path: String) -> Option<()> {
        self.i += 1;
        let mut n = 0;
        let mut code_end = self.i;
        let mut needs_comma = false;
        loop {
            self.skip_ws();
            match self.peek()? {
                b']' => {
                    self.index.list_ends.insert(path.clone(), self.i);
                    self.index.tails.insert(
                        path,
                        Tail {
                            code_end,
                            needs_comma,
                            close: self.i,
                        },
                    );
                    self.i += 1;
                    return Some(());
                }
                b',' => {
                    self.i += 1;
                    code_end = self.i;
                    needs_comma = false;
                }
                _ => {
                    self.value(format!("{path}[{n}]"))?;
                    code_end = self.i;
                    needs_comma = true;
                    n += 1;
                }
            }
        }
    }

    fn map(&mut self, path: String) -> Option<()> {
        self.i += 1;
        loop {
            self.skip_ws();
            match self.peek()? {
                b'}' => {
                    self.i += 1;
                    return Some(());
                }
                b',' => {
                    self.i += 1;
                }
                b'"' => {
                    let key_start = self.i;
                    let key = self.string()?;
                    let child = format!("{path}.{key}");
                    self.index.starts.insert(format!("{child}#key"), key_start);
                    self.skip_ws();
                    if self.peek() != Some(b':') {
                        return None;
                    }
                    self.i += 1;
                    self.value(child)?;
                }
                _ => {
                    let key = self.ident()?;
                    self.skip_ws();
                    if self.peek() != Some(b':') {
                        return None;
                    }
                    self.i += 1;
                    self.value(format!("{path}.{key}"))?;
                }
            }
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    const TEXT: &str = r#"// header
(
    format: "x/1", // trailing
    name: "a \"quoted\" name",
    limits: Some((k: 0.6)),
    /* block
       comment */
    observations: [
        (velocity: "320 m/s", angle: "9 deg"),
        (velocity: "350 m/s", angle: "95 deg"),
    ],
    sources: { "S96": "Steinberg", "M94": "Meyers" },
)
"#;

    #[test]
    fn finds_fields_elements_and_list_ends() {
        let idx = RonIndex::scan(TEXT);
        assert_eq!(idx.locate(TEXT, "format"), (3, 13));
        assert_eq!(idx.locate(TEXT, "observations[1].angle"), (10, 38));
        assert_eq!(idx.locate(TEXT, "limits.k"), (5, 22));
        assert_eq!(idx.locate(TEXT, "sources.M94"), (12, 43));
        let end = idx.list_end("observations").unwrap();
        assert_eq!(&TEXT[end..=end], "]");
        assert_eq!(idx.line_col(TEXT, end), (11, 5));
    }

    #[test]
    fn unknown_paths_fall_back_to_the_nearest_ancestor() {
        let idx = RonIndex::scan(TEXT);
        assert_eq!(
            idx.locate(TEXT, "observations[1].outcome"),
            idx.locate(TEXT, "observations[1]")
        );
        assert_eq!(idx.locate(TEXT, "nothing.at.all"), (1, 1));
    }

    #[test]
    fn never_panics_on_garbage() {
        for t in [
            "",
            "(",
            "([{",
            "\"unterminated",
            "(a: [1, 2",
            "r#\"x",
            "/* open",
            "(((((((((((((((((((((((((((((((((((((((((((((((((((((((((((((((((((((((((((",
            "(}",
            "[)",
            "(a: [1, }])",
            "{ a: ] }",
        ] {
            let _ = RonIndex::scan(t);
        }
    }
}
