//! The text of pair files as oblique writes and edits it: RON strings, an observation or a
//! boundary rendered, appended to or cut from a top-level list with every other byte kept,
//! and a new pair file's text. Pure text: the safe writing of the result is the parent's.

use super::WriteError;
use crate::pair::{ObservationEntry, WINDOW_FORMAT};
use crate::ronpath::RonIndex;
use oblique_core::Convention;
use std::path::Path;

/// Quote a string for RON.
pub fn ron_string(s: &str) -> String {
    let mut out = String::with_capacity(s.len() + 2);
    out.push('"');
    for ch in s.chars() {
        match ch {
            '"' => out.push_str("\\\""),
            '\\' => out.push_str("\\\\"),
            '\n' => out.push_str("\\n"),
            '\r' => out.push_str("\\r"),
            '\t' => out.push_str("\\t"),
            c if c.is_control() => out.push_str(&format!("\\u{{{:x}}}", c as u32)),
            c => out.push(c),
        }
    }
    out.push('"');
    out
}

/// Render an observation as RON text, indented for a list inside the top-level struct.
pub fn render_observation(o: &ObservationEntry) -> String {
    let mut s = String::from("        (\n");
    let mut field =
        |k: &str, v: &str| s.push_str(&format!("            {k}: {},\n", ron_string(v)));
    field("velocity", &o.velocity);
    field("angle", &o.angle);
    field("outcome", &o.outcome);
    field("process", &o.process);
    field("method", &o.method);
    if let Some(v) = &o.velocity_uncertainty {
        field("velocity_uncertainty", v);
    }
    if let Some(v) = &o.angle_uncertainty {
        field("angle_uncertainty", v);
    }
    if let Some(v) = &o.date {
        field("date", v);
    }
    field("source", &o.source);
    if let Some(v) = &o.note {
        field("note", v);
    }
    s.push_str("        ),\n");
    s
}

/// The text of `text` with `entries` appended to its `observations` list; every other byte kept.
///
/// # Errors
/// [`WriteError::Structure`] when the file has no place to append.
pub fn append_observation_text(
    path: &Path,
    text: &str,
    entries: &[ObservationEntry],
) -> Result<String, WriteError> {
    let rendered: String = entries.iter().map(render_observation).collect();
    append_to_top_list(path, text, "observations", &rendered)
}

/// The text of `text` with `rendered` (already indented list items, `\n` line ends) appended to
/// the top-level list field `list`; the list is created before the top-level closing
/// parenthesis when absent. Every byte of the old text is kept, in order: a missing comma goes
/// right after the last value (found by a scanner that knows strings, raw strings and
/// comments, so nothing inside a string is ever touched), comments after the last value stay
/// where they are, a byte-order mark stays first and a file with CRLF line ends gets CRLF.
///
/// # Errors
/// [`WriteError::Structure`] when the file has no place to append.
pub fn append_to_top_list(
    path: &Path,
    text: &str,
    list: &str,
    rendered: &str,
) -> Result<String, WriteError> {
    let (bom, body, nl, rendered) = edit_parts(text, rendered);
    let index = RonIndex::scan(body);
    let mut out = String::with_capacity(text.len() + rendered.len() + 64);
    out.push_str(bom);
    if let Some(t) = index.tail(list).filter(|_| index.list_end(list).is_some()) {
        out.push_str(&body[..t.code_end]);
        if t.needs_comma {
            out.push(',');
        }
        let line_start = body[..t.close].rfind('\n').map_or(0, |i| i + 1);
        let bracket_on_own_line =
            line_start > t.code_end && body[line_start..t.close].trim().is_empty();
        if bracket_on_own_line {
            out.push_str(&body[t.code_end..line_start]);
            out.push_str(&rendered);
            out.push_str(&body[line_start..]);
        } else {
            out.push_str(&body[t.code_end..t.close]);
            out.push_str(nl);
            out.push_str(&rendered);
            out.push_str("    ");
            out.push_str(&body[t.close..]);
        }
        return Ok(out);
    }
    // No such list yet: add one before the top-level structure's closing parenthesis.
    let t = index.tail("").ok_or_else(|| WriteError::Structure {
        path: path.to_path_buf(),
        message: "no closing parenthesis found for the top-level structure".into(),
    })?;
    out.push_str(&body[..t.code_end]);
    if t.needs_comma {
        out.push(',');
    }
    out.push_str(nl);
    out.push_str(&format!("    {list}: ["));
    out.push_str(nl);
    out.push_str(&rendered);
    out.push_str("    ],");
    out.push_str(&body[t.code_end..]);
    Ok(out)
}

/// A user file's text split for an edit: its byte-order mark (kept first), the rest, the line
/// end the file uses, and `rendered` (written with `\n`) converted to that line end.
pub(super) fn edit_parts<'t>(
    text: &'t str,
    rendered: &str,
) -> (&'static str, &'t str, &'static str, String) {
    let (bom, body) = match text.strip_prefix('\u{feff}') {
        Some(rest) => ("\u{feff}", rest),
        None => ("", text),
    };
    let crlf = body.contains("\r\n");
    let nl = if crlf { "\r\n" } else { "\n" };
    let rendered = if crlf {
        rendered.replace("\r\n", "\n").replace('\n', "\r\n")
    } else {
        rendered.to_string()
    };
    (bom, body, nl, rendered)
}

/// Render a boundary as RON text, indented for a list inside the top-level struct.
pub fn render_boundary(b: &crate::pair::BoundaryEntry) -> String {
    let points: Vec<String> = b
        .points
        .iter()
        .map(|(v, a)| format!("({}, {})", ron_string(v), ron_string(a)))
        .collect();
    format!(
        "        (\n            label: {},\n            plane: {},\n            weld_side: {},\n            points: [{}],\n            provenance: {},\n        ),\n",
        ron_string(&b.label),
        ron_string(&b.plane),
        ron_string(&b.weld_side),
        points.join(", "),
        ron_string(&b.provenance)
    )
}

/// The text of `text` without element `index` of the top-level list field `list`, and the
/// removed text (to show the user, who can add it back). Every other byte is kept in order: an
/// element on lines of its own goes with those whole lines; one sharing a line with others goes
/// alone, up to the next element (the last keeps the comma before it, a trailing comma RON
/// accepts). Comments before the element stay.
///
/// # Errors
/// [`WriteError::Structure`] when the list or the element is not where the scanner looks.
pub fn remove_top_list_item(
    path: &Path,
    text: &str,
    list: &str,
    index: usize,
) -> Result<(String, String), WriteError> {
    let (bom, body) = match text.strip_prefix('\u{feff}') {
        Some(rest) => ("\u{feff}", rest),
        None => ("", text),
    };
    let ix = RonIndex::scan(body);
    let missing = || WriteError::Structure {
        path: path.to_path_buf(),
        message: format!("no element {} in the list `{list}`", index + 1),
    };
    let start = ix.start(&format!("{list}[{index}]")).ok_or_else(missing)?;
    let line_start = |at: usize| body[..at].rfind('\n').map_or(0, |i| i + 1);
    let alone_before = |at: usize| body[line_start(at)..at].trim().is_empty();
    let from = if alone_before(start) {
        line_start(start)
    } else {
        start
    };
    let to = match ix.start(&format!("{list}[{}]", index + 1)) {
        Some(next) if alone_before(next) => line_start(next),
        Some(next) => next,
        None => {
            let end = ix.tail(list).ok_or_else(missing)?.code_end;
            // The rest of the last element's line, when only blank space is left on it.
            match body[end..].find('\n') {
                Some(nl) if body[end..end + nl].trim().is_empty() && from != start => end + nl + 1,
                _ => end,
            }
        }
    };
    if to <= from {
        return Err(missing());
    }
    let mut out = String::with_capacity(text.len());
    out.push_str(bom);
    out.push_str(&body[..from]);
    out.push_str(&body[to..]);
    Ok((out, body[from..to].to_string()))
}

/// What a new pair window file starts with.
#[derive(Debug, Clone)]
pub struct NewPair<'a> {
    /// Pair name.
    pub name: &'a str,
    /// What the window is for (may be empty).
    pub description: &'a str,
    /// Flyer material id.
    pub flyer: &'a str,
    /// Parent material id.
    pub parent: &'a str,
    /// Flyer thickness with unit.
    pub flyer_thickness: &'a str,
    /// Parent thickness with unit, if known.
    pub parent_thickness: Option<&'a str>,
    /// Convention of the observations.
    pub convention: Convention,
    /// The process the window is for (one of `pair::PROCESSES`).
    pub process: &'a str,
    /// Who maintains the file.
    pub maintainer: &'a str,
    /// Creation date, YYYY-MM-DD.
    pub date: &'a str,
}

/// The text of a new pair window file with default criteria and no data yet.
pub fn new_pair_text(p: &NewPair<'_>) -> String {
    let NewPair {
        name,
        description,
        flyer,
        parent,
        flyer_thickness,
        parent_thickness,
        convention,
        process,
        maintainer,
        date,
    } = p;
    let (pressure_on, pressure_why) = crate::pair::pressure_default(Some(process));
    let parent_line = parent_thickness.map_or(String::new(), |t| {
        format!("    parent_thickness: {},\n", ron_string(t))
    });
    format!(
        r#"// Pair window for oblique: {name}. Format described in docs/window-format.md.
// Quantities carry their units inside the strings. Criteria are at their usual defaults (docs/theory.md);
// give a reason when you change one.
(
    format: {format},
    name: {name_q},
    description: {description},
    flyer: {flyer},
    parent: {parent},
    flyer_thickness: {thickness},
{parent_line}    convention: {convention},
    process: {process},
    maintainer: {maintainer},
    revisions: [
        (date: {date}, note: "created with `oblique pair new`"),
    ],
    criteria: (
        deribas_lower: (enabled: true, k: 0.6),
        strength_lower: (enabled: true),
        // pressure_lower {pressure_why}
        pressure_lower: (enabled: {pressure_on}, hel_multiple: 5.0),
        melting_upper: (enabled: true, n: 0.11, form: "a"),
        // mixed: the rule when one plate's inflow is supersonic and the other's subsonic (docs/theory.md §4.3)
        jetting: (enabled: true, mixed: "supersonic-side-polar"),
        wavy_transition: (enabled: true, critical_reynolds: 10.6),
    ),
    boundaries: [
    ],
    observations: [
    ],
)
"#,
        format = ron_string(WINDOW_FORMAT),
        name_q = ron_string(name),
        description = ron_string(description),
        flyer = ron_string(flyer),
        parent = ron_string(parent),
        thickness = ron_string(flyer_thickness),
        convention = ron_string(convention.as_str()),
        process = ron_string(process),
        maintainer = ron_string(maintainer),
        date = ron_string(date),
    )
}
