//! Problems found in a user's file, each with its place: `file:line:col: field: message`.

use crate::ronpath::RonIndex;
use oblique_core::units::{parse_quantity, QuantityKind};
use std::fmt;

/// One problem in one file.
#[derive(Debug, Clone, PartialEq, Eq)]
pub struct Diagnostic {
    /// The file as the user named it (or `built-in:NAME`).
    pub file: String,
    /// 1-based line; 0 for a problem with a whole file or folder (cannot read it).
    pub line: usize,
    /// 1-based column.
    pub col: usize,
    /// The field path, e.g. `observations[2].angle` (empty for syntax errors).
    pub field: String,
    /// What is wrong, lowercase, no trailing period.
    pub message: String,
    /// How to fix it, when obvious.
    pub hint: Option<String>,
}

impl Diagnostic {
    /// The first line: position, field and message, without the hint.
    #[must_use]
    pub fn headline(&self) -> String {
        let mut s = if self.line == 0 {
            format!("{}: ", self.file)
        } else {
            format!("{}:{}:{}: ", self.file, self.line, self.col)
        };
        if !self.field.is_empty() {
            s.push_str(&format!("field `{}`: ", self.field));
        }
        s.push_str(self.message.lines().next().unwrap_or(""));
        s
    }
}

impl fmt::Display for Diagnostic {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        if self.line == 0 {
            // A problem with a whole file or folder: no position to give.
            write!(f, "{}: ", self.file)?;
        } else {
            write!(f, "{}:{}:{}: ", self.file, self.line, self.col)?;
        }
        if !self.field.is_empty() {
            write!(f, "field `{}`: ", self.field)?;
        }
        write!(f, "{}", self.message)?;
        if let Some(h) = &self.hint {
            write!(f, "\n  hint: {h}")?;
        }
        Ok(())
    }
}

/// All problems of a load, reported together.
#[derive(Debug, Clone, PartialEq, Eq, thiserror::Error)]
pub struct Diagnostics(pub Vec<Diagnostic>);

impl fmt::Display for Diagnostics {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        for (i, d) in self.0.iter().enumerate() {
            if i > 0 {
                writeln!(f)?;
            }
            write!(f, "{d}")?;
        }
        Ok(())
    }
}

/// Collects diagnostics for one file while it is validated.
pub(crate) struct Collector<'a> {
    pub file: &'a str,
    pub text: &'a str,
    pub index: RonIndex,
    pub problems: Vec<Diagnostic>,
}

impl<'a> Collector<'a> {
    pub fn new(file: &'a str, text: &'a str) -> Self {
        Self {
            file,
            text,
            index: RonIndex::scan(text),
            problems: Vec::new(),
        }
    }

    pub fn push(&mut self, field: &str, message: impl Into<String>, hint: Option<String>) {
        let (line, col) = self.index.locate(self.text, field);
        self.problems.push(Diagnostic {
            file: self.file.to_string(),
            line,
            col,
            field: field.to_string(),
            message: message.into(),
            hint,
        });
    }

    /// Parse a quantity field, recording a problem (and returning None) when it is bad.
    pub fn quantity(&mut self, field: &str, text: &str, kind: QuantityKind) -> Option<f64> {
        match parse_quantity(text, kind) {
            Ok(v) => Some(v),
            Err(e) => {
                self.push(
                    field,
                    e.to_string(),
                    Some(format!("write it like \"{}\"", kind.example())),
                );
                None
            }
        }
    }

    /// Record a problem when a file's `format` tag is not the one this version reads.
    pub fn check_format(&mut self, found: &str, expected: &str) {
        if found != expected {
            self.push(
                "format",
                format!("unsupported format '{found}'"),
                Some(format!("this version reads \"{expected}\"")),
            );
        }
    }

    /// Record a problem when a file's `name` is empty or holds spaces or slashes; `what` names
    /// it in the message ("pair name", "name"), `example` shows a good one.
    pub fn check_name(&mut self, name: &str, what: &str, example: &str) {
        if name.trim().is_empty()
            || name
                .chars()
                .any(|ch| ch.is_whitespace() || ch == '/' || ch == '\\')
        {
            self.push(
                "name",
                format!("{what} '{name}' must be non-empty, without spaces or slashes"),
                Some(format!("use names like \"{example}\"")),
            );
        }
    }

    /// Record a problem for every string of the file that still starts with a template's
    /// placeholder `"FILL IN:` (a source, a description), at its own line and column. A value
    /// or date left as `"FILL IN"` fails its own parse, with its field named.
    pub fn check_placeholders(&mut self) {
        const MARK: &str = "\"FILL IN:";
        for (at, _) in self.text.match_indices(MARK) {
            let before = &self.text[..at];
            let line_start = before.rfind('\n').map_or(0, |i| i + 1);
            // A placeholder inside a comment is the template's explanation, not a value.
            if before[line_start..].contains("//") {
                continue;
            }
            let line = before.matches('\n').count() + 1;
            let col = before[line_start..].chars().count() + 1;
            self.problems.push(Diagnostic {
                file: self.file.to_string(),
                line,
                col,
                field: String::new(),
                message: "still the template's placeholder \"FILL IN\"".into(),
                hint: Some(
                    "replace it with the value, date or source from your own nameplate, drawing or record"
                        .into(),
                ),
            });
        }
    }

    pub fn finish(self) -> Result<(), Diagnostics> {
        if self.problems.is_empty() {
            Ok(())
        } else {
            Err(Diagnostics(self.problems))
        }
    }
}

/// Deserialise RON text with the options every oblique file uses (implicit `Some`, so optional
/// fields are written plainly).
///
/// # Errors
/// The syntax or structure problem, with its place.
pub fn parse_ron<T: serde::de::DeserializeOwned>(file: &str, text: &str) -> Result<T, Diagnostics> {
    ron::Options::default()
        .with_default_extension(ron::extensions::Extensions::IMPLICIT_SOME)
        .from_str(text)
        .map_err(|e| Diagnostics(vec![from_ron(file, text, &e)]))
}

/// Byte offset of a 1-based (line, column) in `text`.
fn offset_of(text: &str, line: usize, col: usize) -> usize {
    let mut off = 0;
    for (i, l) in text.split_inclusive('\n').enumerate() {
        if i + 1 == line {
            return off
                + l.char_indices()
                    .nth(col.saturating_sub(1))
                    .map_or(l.len(), |(b, _)| b);
        }
        off += l.len();
    }
    text.len()
}

/// Turn a ron deserialisation error into a diagnostic, with a suggestion for misspelt keys.
pub(crate) fn from_ron(file: &str, text: &str, err: &ron::error::SpannedError) -> Diagnostic {
    // ron names the program's own type (`in `JettingEntry``): say what the user can act on.
    let allowed = |expected: &[&str]| {
        expected
            .iter()
            .map(|e| format!("`{e}`"))
            .collect::<Vec<_>>()
            .join(", ")
    };
    let message = match &err.code {
        ron::Error::NoSuchStructField {
            expected, found, ..
        } => format!(
            "unexpected field `{found}` here; the fields allowed here are {}",
            allowed(expected)
        ),
        ron::Error::NoSuchEnumVariant {
            expected, found, ..
        } => format!(
            "unexpected value `{found}` here; the values allowed here are {}",
            allowed(expected)
        ),
        ron::Error::MissingStructField { field, .. } => {
            format!("missing field `{field}` in the block that ends here")
        }
        ron::Error::DuplicateStructField { field, .. } => {
            format!("field `{field}` is given twice here")
        }
        code => code.to_string(),
    };
    let hint = match &err.code {
        ron::Error::NoSuchStructField {
            expected, found, ..
        } => closest(found, expected.iter().copied()).map(|c| format!("did you mean `{c}`?")),
        ron::Error::NoSuchEnumVariant {
            expected, found, ..
        } => closest(found, expected.iter().copied()).map(|c| format!("did you mean `{c}`?")),
        ron::Error::MissingStructField { field, .. } => Some(format!("add `{field}: ...`")),
        _ => None,
    };
    let (mut line, mut col) = (err.span.start.line, err.span.start.col);
    // ron points after an unknown key; point at the key itself, the last one of that name
    // before the reported place.
    if let ron::Error::NoSuchStructField { found, .. } = &err.code {
        let here = offset_of(text, line, col).min(text.len());
        let mut search = &text[..here];
        while let Some(pos) = search.rfind(found.as_str()) {
            let after = text[pos + found.len()..].trim_start();
            let boundary_before = pos == 0
                || !text.as_bytes()[pos - 1].is_ascii_alphanumeric()
                    && text.as_bytes()[pos - 1] != b'_';
            if after.starts_with(':') && boundary_before {
                let before = &text[..pos];
                line = before.matches('\n').count() + 1;
                col = before.rsplit('\n').next().map_or(0, |l| l.chars().count()) + 1;
                break;
            }
            search = &text[..pos];
        }
    }
    // The usual cause of a confusing message (a field "unknown" in the struct before it, an
    // unexpected character) is a bracket left open on an earlier line: point there.
    let here = offset_of(text, line, col).min(text.len());
    if let Some((ch, l, c)) = unclosed_before(text, here) {
        if l < line {
            return Diagnostic {
                file: file.to_string(),
                line: l,
                col: c,
                field: String::new(),
                message: format!(
                    "this `{ch}` is never closed: the reader went on past the end of its line and then failed at line {line}, column {col} ({})",
                    lowercase_first(&message)
                ),
                hint: Some(format!(
                    "add the missing `{}` before the end of line {l}",
                    closer(ch)
                )),
            };
        }
    }
    // A value of the wrong kind (`enabled: maybe`): ron does not say whose value it is; the
    // key just before it on its line does.
    let wrong_value = matches!(
        err.code,
        ron::Error::ExpectedBoolean
            | ron::Error::ExpectedString
            | ron::Error::ExpectedInteger
            | ron::Error::ExpectedFloat
            | ron::Error::ExpectedArray
            | ron::Error::ExpectedStructLike
    );
    let field = if wrong_value {
        key_before(text, here).unwrap_or_default()
    } else {
        String::new()
    };
    Diagnostic {
        file: file.to_string(),
        line,
        col,
        field,
        message: lowercase_first(&message),
        hint,
    }
}

/// The key of the `key: value` whose value starts at byte `at`, when the key is on the same
/// line just before it.
fn key_before(text: &str, at: usize) -> Option<String> {
    let line_start = text[..at].rfind('\n').map_or(0, |p| p + 1);
    let before = text[line_start..at].trim_end();
    let before = before.strip_suffix(':')?.trim_end();
    let rest = before.trim_end_matches(|c: char| c.is_ascii_alphanumeric() || c == '_');
    let key = &before[rest.len()..];
    (!key.is_empty() && !key.starts_with(|c: char| c.is_ascii_digit())).then(|| key.to_string())
}

fn closer(open: char) -> char {
    match open {
        '(' => ')',
        '[' => ']',
        _ => '}',
    }
}

/// The innermost bracket still open at byte `upto` whose own line ends as a complete item
/// would (with `,` or its last value), while the brackets opened on later lines all closed: the
/// likely place of a missing closing bracket. Strings, raw strings and comments are skipped.
fn unclosed_before(text: &str, upto: usize) -> Option<(char, usize, usize)> {
    let &(ch, at, l) = open_brackets(text, upto).last()?;
    // Only when some bracket is left open at the end of the text (in a text whose brackets all
    // close, `(name: "x",` on line 1 with its `)` on the last line, a bad value between is the
    // cause, not the bracket; with one missing, a later closer pairs with the wrong opener, so
    // which one is open at the end says nothing of which was left open).
    if open_brackets(text, text.len()).is_empty() {
        return None;
    }
    // Only a bracket whose line holds more after it and ends like a finished item.
    let line_end = text[at..].find('\n').map_or(text.len(), |e| at + e);
    let rest = text[at + 1..line_end].trim_end();
    let rest = rest.split("//").next().unwrap_or(rest).trim_end();
    if rest.is_empty() || !(rest.ends_with(',') || rest.ends_with('"')) {
        return None;
    }
    let line_start = text[..at].rfind('\n').map_or(0, |p| p + 1);
    let col = text[line_start..at].chars().count() + 1;
    Some((ch, l, col))
}

/// The brackets open at byte `upto` (bracket, byte, line), outermost first; strings and
/// comments skipped.
fn open_brackets(text: &str, upto: usize) -> Vec<(char, usize, usize)> {
    let b = text.as_bytes();
    let mut stack: Vec<(char, usize, usize)> = Vec::new(); // (bracket, byte, line)
    let (mut i, mut line) = (0usize, 1usize);
    while i < upto.min(b.len()) {
        match b[i] {
            b'\n' => line += 1,
            b'"' => {
                i += 1;
                while i < b.len() && b[i] != b'"' {
                    if b[i] == b'\\' {
                        i += 1;
                    } else if b[i] == b'\n' {
                        line += 1;
                    }
                    i += 1;
                }
            }
            b'/' if b.get(i + 1) == Some(&b'/') => {
                while i < b.len() && b[i] != b'\n' {
                    i += 1;
                }
                continue;
            }
            b'/' if b.get(i + 1) == Some(&b'*') => {
                let mut depth = 0;
                while i < b.len() {
                    if b[i] == b'/' && b.get(i + 1) == Some(&b'*') {
                        depth += 1;
                        i += 2;
                        continue;
                    }
                    if b[i] == b'*' && b.get(i + 1) == Some(&b'/') {
                        depth -= 1;
                        i += 2;
                        if depth == 0 {
                            break;
                        }
                        continue;
                    }
                    if b[i] == b'\n' {
                        line += 1;
                    }
                    i += 1;
                }
                continue;
            }
            c @ (b'(' | b'[' | b'{') => stack.push((c as char, i, line)),
            b')' | b']' | b'}' => {
                stack.pop();
            }
            _ => {}
        }
        i += 1;
    }
    stack
}

fn lowercase_first(s: &str) -> String {
    let mut c = s.chars();
    match c.next() {
        Some(f) => f.to_lowercase().collect::<String>() + c.as_str(),
        None => String::new(),
    }
}

/// The candidate closest to `word` by edit distance, if it is close enough to be a typo.
pub fn closest<'b>(word: &str, candidates: impl IntoIterator<Item = &'b str>) -> Option<&'b str> {
    candidates
        .into_iter()
        .map(|c| (edit_distance(word, c), c))
        .filter(|(d, c)| *d <= (c.len().max(word.len()) / 3).max(2))
        .min_by_key(|(d, _)| *d)
        .map(|(_, c)| c)
}

/// All candidates within a typo's distance of `word`, or sharing a prefix with it, best first.
pub fn close_matches<'b>(
    word: &str,
    candidates: impl IntoIterator<Item = &'b str>,
) -> Vec<&'b str> {
    let w = word.to_ascii_lowercase();
    let mut scored: Vec<(usize, &str)> = candidates
        .into_iter()
        .filter_map(|c| {
            let d = edit_distance(&w, &c.to_ascii_lowercase());
            let prefix = w.len() >= 2 && c.to_ascii_lowercase().contains(&w);
            (d <= (c.len().max(w.len()) / 3).max(2) || prefix).then_some((d, c))
        })
        .collect();
    scored.sort();
    scored.into_iter().map(|(_, c)| c).take(5).collect()
}

/// Levenshtein distance over characters.
pub fn edit_distance(a: &str, b: &str) -> usize {
    let a: Vec<char> = a.chars().collect();
    let b: Vec<char> = b.chars().collect();
    let mut prev: Vec<usize> = (0..=b.len()).collect();
    let mut cur = vec![0; b.len() + 1];
    for i in 1..=a.len() {
        cur[0] = i;
        for j in 1..=b.len() {
            let cost = usize::from(a[i - 1] != b[j - 1]);
            cur[j] = (prev[j] + 1).min(cur[j - 1] + 1).min(prev[j - 1] + cost);
        }
        std::mem::swap(&mut prev, &mut cur);
    }
    prev[b.len()]
}

/// Whether `s` is a calendar date written YYYY-MM-DD (Gregorian, years 1900 to 2999).
pub fn is_iso_date(s: &str) -> bool {
    date_problem(s).is_none()
}

/// What is wrong with a date that should be `YYYY-MM-DD` between 1900 and 2999, if anything.
#[must_use]
pub fn date_problem(s: &str) -> Option<String> {
    let shown = crate::text::short(s, 40);
    let b = s.as_bytes();
    if b.len() != 10 || b[4] != b'-' || b[7] != b'-' {
        return Some(format!("date '{shown}' is not written YYYY-MM-DD"));
    }
    let num = |r: std::ops::Range<usize>| {
        s.get(r)
            .filter(|t| t.bytes().all(|c| c.is_ascii_digit()))
            .and_then(|t| t.parse::<u32>().ok())
    };
    let (Some(y), Some(m), Some(d)) = (num(0..4), num(5..7), num(8..10)) else {
        return Some(format!("date '{shown}' is not written YYYY-MM-DD"));
    };
    let leap = (y % 4 == 0 && y % 100 != 0) || y % 400 == 0;
    let days = match m {
        1 | 3 | 5 | 7 | 8 | 10 | 12 => 31,
        4 | 6 | 9 | 11 => 30,
        2 if leap => 29,
        2 => 28,
        _ => return Some(format!("date '{shown}': there is no month {m}")),
    };
    if d < 1 || d > days {
        return Some(format!("date '{shown}': month {m} of {y} has no day {d}"));
    }
    if !(1900..=2999).contains(&y) {
        return Some(format!(
            "date '{shown}' is a calendar date, but outside the accepted years 1900-2999"
        ));
    }
    None
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn suggestions() {
        assert_eq!(
            closest("velocty", ["velocity", "angle", "outcome"]),
            Some("velocity")
        );
        assert_eq!(closest("zzz", ["velocity", "angle"]), None);
        assert_eq!(
            close_matches("aa6061", ["aa6061-t6", "aa1100-o", "cu-c11000"]),
            vec!["aa6061-t6"]
        );
        assert_eq!(edit_distance("kitten", "sitting"), 3);
    }

    /// ron's messages name the program's own types (`in `Entry``); ours name only what the
    /// file holds.
    #[test]
    fn messages_name_no_internal_type() {
        #[derive(serde::Deserialize, Debug)]
        #[serde(deny_unknown_fields)]
        #[allow(dead_code)]
        struct InternalEntry {
            enabled: bool,
            reason: String,
        }
        let e = parse_ron::<InternalEntry>("f.ron", "(enabled: true, reasn: \"x\")").unwrap_err();
        let d = &e.0[0];
        assert_eq!(
            d.message,
            "unexpected field `reasn` here; the fields allowed here are `enabled`, `reason`"
        );
        assert_eq!(d.hint.as_deref(), Some("did you mean `reason`?"));
        let e = parse_ron::<InternalEntry>("f.ron", "(enabled: true)").unwrap_err();
        assert_eq!(
            e.0[0].message,
            "missing field `reason` in the block that ends here"
        );
        // A value of the wrong kind names its key.
        let e = parse_ron::<InternalEntry>("f.ron", "(reason: \"x\", enabled: maybe)").unwrap_err();
        assert_eq!(e.0[0].field, "enabled", "{e}");
        assert_eq!(e.0[0].message, "expected boolean");
        for e in [
            parse_ron::<InternalEntry>("f.ron", "(enabled: true, reasn: \"x\")"),
            parse_ron::<InternalEntry>("f.ron", "(enabled: true)"),
            parse_ron::<InternalEntry>("f.ron", "(enabled: true, enabled: false, reason: \"x\")"),
        ] {
            let text = e.unwrap_err().to_string();
            assert!(!text.contains("InternalEntry"), "{text}");
        }
    }
}
