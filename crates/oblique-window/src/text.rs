//! Text made safe for where it goes: cut for a message, escaped for a terminal, well-formed
//! for XML and HTML. No dependencies on the rest of the crate.

/// `s` cut to at most `max` characters for an error message, with the number left out said.
#[must_use]
pub fn short(s: &str, max: usize) -> String {
    let n = s.chars().count();
    if n <= max {
        return s.to_string();
    }
    let head: String = s.chars().take(max).collect();
    format!("{head}... ({} more characters)", n - max)
}

/// `s` on one line: line breaks and other control characters shown as `\n`, `\r`, `\t` or
/// `\u{..}`, so that a user's text (a source, a label, a note) can never start a line of its
/// own in a table or a message and pass for oblique's output.
#[must_use]
pub fn one_line(s: &str) -> std::borrow::Cow<'_, str> {
    if !s.chars().any(char::is_control) {
        return std::borrow::Cow::Borrowed(s);
    }
    let mut out = String::with_capacity(s.len() + 8);
    for c in s.chars() {
        match c {
            '\n' => out.push_str("\\n"),
            '\r' => out.push_str("\\r"),
            '\t' => out.push_str("\\t"),
            c if c.is_control() => out.push_str(&format!("\\u{{{:x}}}", c as u32)),
            c => out.push(c),
        }
    }
    std::borrow::Cow::Owned(out)
}

/// Why `s` is not a one-line text (a line break or another control character, with the
/// character's position), or `None`.
#[must_use]
pub fn one_line_problem(s: &str) -> Option<String> {
    let (i, c) = s.chars().enumerate().find(|(_, c)| c.is_control())?;
    let what = match c {
        '\n' | '\r' => "a line break".to_string(),
        '\t' => "a tab".to_string(),
        c => format!("the control character U+{:04X}", c as u32),
    };
    Some(format!(
        "must be one line of text: {what} at character {}",
        i + 1
    ))
}

/// `s` made safe for a terminal: control characters other than newline and tab (escape
/// sequences, carriage returns, form feeds, bells) are shown as `\u{..}` escapes instead of
/// acting on the terminal.
#[must_use]
pub fn terminal_safe(s: &str) -> std::borrow::Cow<'_, str> {
    if !s.chars().any(|c| c.is_control() && c != '\n' && c != '\t') {
        return std::borrow::Cow::Borrowed(s);
    }
    let mut out = String::with_capacity(s.len() + 16);
    for c in s.chars() {
        if c.is_control() && c != '\n' && c != '\t' {
            out.push_str(&format!("\\u{{{:x}}}", c as u32));
        } else {
            out.push(c);
        }
    }
    std::borrow::Cow::Owned(out)
}

/// `s` made safe for XML and HTML text: characters XML 1.0 forbids (controls other than tab,
/// newline and carriage return) become the visible Unicode control pictures (U+2400 block) or
/// U+FFFD, so that the document stays well-formed and the reader still sees something was there.
#[must_use]
pub fn xml_safe(s: &str) -> std::borrow::Cow<'_, str> {
    let bad = |c: char| c.is_control() && !matches!(c, '\n' | '\t' | '\r');
    if !s.chars().any(bad) {
        return std::borrow::Cow::Borrowed(s);
    }
    std::borrow::Cow::Owned(
        s.chars()
            .map(|c| match c {
                c if (c as u32) < 0x20 && bad(c) => {
                    char::from_u32(0x2400 + c as u32).unwrap_or('\u{fffd}')
                }
                '\u{7f}' => '\u{2421}',
                c if bad(c) => '\u{fffd}',
                c => c,
            })
            .collect(),
    )
}

/// Round to a sensible number of significant digits for JSON (keeps output stable and readable).
pub fn sig(x: f64) -> serde_json::Value {
    if !x.is_finite() {
        return serde_json::Value::Null;
    }
    if x == 0.0 {
        return serde_json::json!(0.0);
    }
    let digits = 10 - x.abs().log10().floor() as i32;
    let factor = 10f64.powi(digits.clamp(-300, 300));
    serde_json::json!((x * factor).round() / factor)
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn one_line_escapes_every_control_character() {
        assert_eq!(one_line("plain"), "plain");
        assert_eq!(one_line("a\nverdict: INSIDE"), "a\\nverdict: INSIDE");
        assert_eq!(one_line("x\r\t\u{1b}[2J"), "x\\r\\t\\u{1b}[2J");
        assert!(!one_line("a\nb\u{85}c").chars().any(char::is_control));
    }

    #[test]
    fn one_line_problem_names_the_character() {
        assert_eq!(one_line_problem("fine text"), None);
        let p = one_line_problem("log 7\nverdict").expect("problem");
        assert!(p.contains("a line break at character 6"), "{p}");
        assert!(one_line_problem("a\u{7}").expect("bell").contains("U+0007"));
    }
}
