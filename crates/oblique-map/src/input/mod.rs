//! Reading an interface export: the header (names and units), record splitting for CSV (quoted
//! fields included) and JSON lines, number parsing, and the source that cuts the input into
//! chunks of whole records.

mod fields;
mod header;
mod number;
mod plain_row;
mod source;

pub use fields::{next_record, scan_plain, split_fields, split_plain_record, Fields};
pub use header::{json_object, json_reason, parse_header, split_cell, Column, Header, Wanted};
pub use number::{is_number, number_reason, parse_number, trim_spaces};
pub use plain_row::PlainRow;
pub use source::{cut_chunk, ChunkInfo, Source, MAX_RECORD};

use crate::error::MapError;
use crate::options::Format;

/// The header as read from the start of the input.
pub struct HeaderRead {
    /// The parsed header.
    pub header: Header,
    /// Line number of the first record after it.
    pub first_line: u64,
    /// Lines starting with '#' before it (skipped).
    pub comment_lines: u64,
}

/// Read the header from the start of `source`: for CSV the header row, for JSON lines the keys
/// of the first object (which stays in the stream: it is also the first row). Lines starting
/// with '#' before it are a preamble (an export's notes, provenance, an "invented data"
/// label): skipped and counted.
///
/// # Errors
/// A read error, empty input, or a header that does not give the wanted columns with units.
pub fn read_header(
    source: &mut Source,
    format: Format,
    file_name: &str,
    wanted: &Wanted,
) -> Result<HeaderRead, MapError> {
    let (cells, first_line, comment_lines) = match format {
        Format::Csv => csv_header_cells(source, file_name)?,
        Format::Jsonl => json_header_keys(source, file_name)?,
    };
    let header = parse_header(file_name, 1 + comment_lines, cells, wanted).map_err(|m| {
        // A JSON object read as a CSV header: say which flag reads it.
        if format == Format::Csv && m.contains("no column named") && m.contains('{') {
            MapError::Input(format!(
                "{m}\n  hint: the first line looks like a JSON object: read the file as JSON lines with --format jsonl"
            ))
        } else if format == Format::Jsonl {
            // JSON lines have no header row: the columns are the first object's keys.
            let row = 1 + comment_lines;
            MapError::Input(m.replacen(
                &format!("row {row} (header)"),
                &format!("line {row} (the keys of the first object)"),
                1,
            ))
        } else {
            MapError::Input(m)
        }
    })?;
    Ok(HeaderRead {
        header,
        first_line,
        comment_lines,
    })
}

fn read_error(file_name: &str) -> impl Fn(std::io::Error) -> MapError + '_ {
    move |e| MapError::Input(format!("{file_name}: cannot read: {e}"))
}

/// The cells of a CSV header row, the line number of the first record, the comment lines.
fn csv_header_cells(
    source: &mut Source,
    file_name: &str,
) -> Result<(Vec<String>, u64, u64), MapError> {
    let mut comment_lines = 0u64;
    let head = loop {
        let Some(line) = source
            .first_line(true, true, MAX_RECORD)
            .map_err(read_error(file_name))?
        else {
            return Err(MapError::Input(if comment_lines > 0 {
                format!(
                    "{file_name}: no header row after {comment_lines} comment or blank line(s): expected a header such as position[mm],velocity[m/s],angle[deg]"
                )
            } else {
                format!(
                    "{file_name}: empty input: expected a header row such as position[mm],velocity[m/s],angle[deg]"
                )
            }));
        };
        // A comment, or a blank line (or a line holding only a byte-order mark), before the
        // header is skipped and counted.
        let bare = line.strip_prefix(b"\xef\xbb\xbf").unwrap_or(&line);
        if !bare.trim_ascii_start().starts_with(b"#") && !bare.trim_ascii().is_empty() {
            break line;
        }
        comment_lines += 1 + line.iter().filter(|&&b| b == b'\n').count() as u64;
    };
    let mut f = Fields::default();
    let quoted = head.contains(&b'"');
    split_fields(&head, quoted, &mut f);
    let cells: Vec<String> = (0..f.ranges.len())
        .map(|i| {
            String::from_utf8_lossy(f.get(&head, i).unwrap_or(b""))
                .trim()
                .to_string()
        })
        .collect();
    let inside = head.iter().filter(|&&b| b == b'\n').count() as u64;
    Ok((cells, 2 + inside + comment_lines, comment_lines))
}

/// The keys of the first JSON object (left in the stream), the line number of the first
/// record, the comment lines.
fn json_header_keys(
    source: &mut Source,
    file_name: &str,
) -> Result<(Vec<String>, u64, u64), MapError> {
    let mut comment_lines = 0u64;
    let first = loop {
        let Some(line) = source
            .first_line(false, false, MAX_RECORD)
            .map_err(read_error(file_name))?
        else {
            return Err(MapError::Input(format!(
                "{file_name}: empty input: expected JSON lines such as {{\"position[mm]\": 0.5, \"velocity[m/s]\": 420, \"angle[deg]\": 8}}"
            )));
        };
        if !line.trim_ascii_start().starts_with(b"#") && !line.trim_ascii().is_empty() {
            break line;
        }
        source
            .first_line(true, false, MAX_RECORD)
            .map_err(read_error(file_name))?;
        comment_lines += 1;
    };
    let obj = json_object(&first).map_err(|e| {
        MapError::Input(format!(
            "{file_name}: row {}: not a JSON object: {} (the first object sets the columns)",
            1 + comment_lines,
            json_reason(&e)
        ))
    })?;
    Ok((
        keys_in_order(&first).unwrap_or_else(|| obj.keys().cloned().collect()),
        1 + comment_lines,
        comment_lines,
    ))
}

/// The keys of a JSON object line in the order they are written (the parsed map sorts them),
/// so that a CSV map made from JSON lines keeps the input's column order.
fn keys_in_order(line: &[u8]) -> Option<Vec<String>> {
    use serde::de::{Deserializer, IgnoredAny, MapAccess, Visitor};
    struct Keys;
    impl<'de> Visitor<'de> for Keys {
        type Value = Vec<String>;
        fn expecting(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
            f.write_str("a JSON object")
        }
        fn visit_map<A: MapAccess<'de>>(self, mut map: A) -> Result<Vec<String>, A::Error> {
            let mut keys = Vec::new();
            while let Some(k) = map.next_key::<String>()? {
                map.next_value::<IgnoredAny>()?;
                keys.push(k);
            }
            Ok(keys)
        }
    }
    let mut de = serde_json::Deserializer::from_slice(line);
    de.deserialize_map(Keys).ok()
}
