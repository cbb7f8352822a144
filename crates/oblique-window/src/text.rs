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
