//! The pair file's `fitted` section: its RON text, and setting it in a user's file through the
//! safe-write path (folder lock, SHA check, atomic rename).

use super::{edit_parts, ron_string, update_file, WriteError};
use crate::materials::MaterialRecord;
use crate::pair::{parse_pair_file, PairWindow};
use crate::ronpath::RonIndex;
use std::collections::BTreeMap;
use std::path::Path;

/// A number for a RON file: at most `digits` significant digits, written so that it reads back
/// as the same `f64` (the shortest representation of the rounded value).
fn ron_number(x: f64, digits: i32) -> String {
    if x == 0.0 || !x.is_finite() {
        return format!("{x:?}");
    }
    let scale = 10f64.powi(digits - 1 - x.abs().log10().floor() as i32);
    let r = (x * scale).round() / scale;
    format!("{r:?}")
}

/// The RON text of a `fitted` section (the value only, indented for a top-level field), every
/// number rounded to four significant digits.
pub fn render_fitted(f: &crate::pair::Fitted) -> String {
    let mut s = String::from("(\n");
    s.push_str(&format!("        date: {},\n", ron_string(&f.date)));
    s.push_str(&format!("        method: {},\n", ron_string(&f.method)));
    s.push_str(&format!("        observations: {},\n", f.observations));
    s.push_str(&format!("        level: {},\n", ron_number(f.level, 4)));
    for (key, v) in f.constants() {
        s.push_str(&format!(
            "        {key}: (value: {}",
            ron_number(v.value, 4)
        ));
        if let Some(lo) = v.low {
            s.push_str(&format!(", low: {}", ron_number(lo, 4)));
        }
        if let Some(hi) = v.high {
            s.push_str(&format!(", high: {}", ron_number(hi, 4)));
        }
        s.push_str("),\n");
    }
    s.push_str("    )");
    s
}

/// The text of `text` with the top-level field `field` set to `value` (RON text, `\n` line
/// ends): an existing value is replaced, bytes before and after it kept; a missing field is
/// added before the top-level closing parenthesis. A byte-order mark stays first and a file with
/// CRLF line ends gets CRLF.
///
/// # Errors
/// [`WriteError::Structure`] when the file's structure cannot be followed.
pub fn set_top_field(
    path: &Path,
    text: &str,
    field: &str,
    value: &str,
) -> Result<String, WriteError> {
    let (bom, body, nl, value) = edit_parts(text, value);
    let index = RonIndex::scan(body);
    let structure = |message: &str| WriteError::Structure {
        path: path.to_path_buf(),
        message: message.into(),
    };
    let mut out = String::with_capacity(text.len() + value.len() + 64);
    out.push_str(bom);
    if let Some(mut start) = index.start(field) {
        // The value's end: after its closing parenthesis, or after a bare identifier such as
        // `None`. The scanner starts a `Some(..)` value at its inner parenthesis: take the
        // wrapper too.
        let mut end = match index.tail(field) {
            Some(t) => t.close + 1,
            None => {
                let rest = &body[start..];
                start
                    + rest
                        .find(|c: char| !(c.is_ascii_alphanumeric() || c == '_'))
                        .unwrap_or(rest.len())
            }
        };
        let before = body[..start].trim_end();
        if let Some(wrapper) = before.strip_suffix('(').map(str::trim_end) {
            if wrapper.ends_with("Some") {
                start = wrapper.len() - "Some".len();
                let rest = &body[end..];
                let skip = rest.len() - rest.trim_start().len();
                if !rest.trim_start().starts_with(')') {
                    return Err(structure("cannot find the end of the `fitted` value"));
                }
                end += skip + 1;
            }
        }
        out.push_str(&body[..start]);
        out.push_str(&value);
        out.push_str(&body[end..]);
        return Ok(out);
    }
    let t = index
        .tail("")
        .ok_or_else(|| structure("no closing parenthesis found for the top-level structure"))?;
    out.push_str(&body[..t.code_end]);
    if t.needs_comma {
        out.push(',');
    }
    out.push_str(nl);
    out.push_str(&format!("    {field}: "));
    out.push_str(&value);
    out.push(',');
    out.push_str(&body[t.code_end..]);
    Ok(out)
}

/// Write fitted constants into the pair file at `path` (replacing an earlier fit), through the
/// folder lock and the atomic write; every other byte, every observation included, is kept.
/// The new text is validated against `materials` before it is written.
///
/// # Errors
/// [`WriteError`]; the file is untouched on every error.
pub fn save_fitted(
    path: &Path,
    fitted: &crate::pair::Fitted,
    materials: &BTreeMap<String, MaterialRecord>,
    expected_sha256: Option<&str>,
) -> Result<PairWindow, WriteError> {
    let value = render_fitted(fitted);
    update_file(
        path,
        expected_sha256,
        |text| set_top_field(path, text, "fitted", &value),
        |origin, text| parse_pair_file(origin, text, materials).map(|(_, w)| w),
    )
}
