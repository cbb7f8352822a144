//! The map crate through its public API only, as another program would use it: the built-in
//! demo pair (an invented window), small inputs written here. Verdicts checked against the
//! `oblique map` command on the same rows: 250 m/s at 12 deg is not welded (below the lowest
//! welding velocity seen), 450/10 and 460/11 weld, 900/12 melts.

use oblique_map::{classify_stream, BadRows, Format, MapError, MapOptions, VelocityKind, WeldMap};
use oblique_window::{Library, PairWindow};
use std::sync::OnceLock;

const ROWS: &str =
    "position[mm],velocity[m/s],angle[deg]\n0.0,250,12\n0.5,450,10\n1.0,460,11\n1.5,900,12\n";

fn demo() -> &'static PairWindow {
    static LIB: OnceLock<Library> = OnceLock::new();
    LIB.get_or_init(|| Library::load(&[]).expect("the built-in library loads"))
        .pair("demo-al6061-on-cu")
        .expect("the demo pair")
}

/// The values of column `name` in a CSV map without quoted fields.
fn column<'a>(map: &'a str, name: &str) -> Vec<&'a str> {
    let mut lines = map.lines();
    let header: Vec<&str> = lines.next().expect("a header").split(',').collect();
    let k = header.iter().position(|h| *h == name).expect("the column");
    lines
        .map(|l| l.split(',').nth(k).expect("the field"))
        .collect()
}

#[test]
fn a_csv_text_is_mapped_and_summarised() {
    let mut map = Vec::new();
    let s = classify_stream(demo(), ROWS.as_bytes(), &mut map, &MapOptions::default())
        .expect("four good rows");
    let map = String::from_utf8(map).expect("UTF-8");
    assert_eq!(
        column(&map, "verdict"),
        ["not-welded", "welded", "welded", "melted"]
    );
    assert_eq!(column(&map, "row"), ["2", "3", "4", "5"]);
    assert_eq!(
        (s.rows_read, s.rows_classified, s.counts),
        (4, 4, [2, 1, 1, 0, 0])
    );
    // Each point owns half the distance to its neighbours: 0.5 + 0.5 mm of 1.5 mm welded.
    let (fraction, basis) = s.welded_fraction();
    assert_eq!(basis, "length");
    assert!((fraction.expect("a fraction") - 1.0 / 1.5).abs() < 1e-12);
    assert_eq!(s.segments_total, [1, 2]);
    assert_eq!(s.info.pair, "demo-al6061-on-cu");
    let text = s.to_text();
    assert!(
        text.starts_with("weld map: pair demo-al6061-on-cu"),
        "{text}"
    );
    assert!(
        text.trim_end()
            .ends_with("licensed practice before any shot"),
        "{text}"
    );
    let json = s.to_json();
    assert_eq!(json["rows_classified"], 4);
    assert_eq!(json["welded_segments"], 1);
    assert!(json["caution"]
        .as_str()
        .is_some_and(|c| c.contains("not a guarantee")));
}

#[test]
fn json_lines_in_and_out_with_every_column() {
    let input = r#"{"position[mm]": 0.5, "velocity[km/s]": 0.45, "angle[deg]": 10, "note": "a"}
{"position[mm]": 1.0, "velocity[km/s]": 0.46, "angle[deg]": 11, "note": "b"}
"#;
    let opts = MapOptions {
        input_format: Format::Jsonl,
        output_format: Format::Jsonl,
        all_columns: true,
        threads: 1,
        ..MapOptions::default()
    };
    let mut map = Vec::new();
    let s = classify_stream(demo(), input.as_bytes(), &mut map, &opts).expect("two good rows");
    assert_eq!(s.counts, [2, 0, 0, 0, 0]);
    let rows: Vec<serde_json::Value> = String::from_utf8(map)
        .expect("UTF-8")
        .lines()
        .map(|l| serde_json::from_str(l).expect("one JSON object per line"))
        .collect();
    assert_eq!(rows.len(), 2);
    assert_eq!(rows[0]["row"], 1);
    assert_eq!(rows[1]["note"], "b");
    assert_eq!(rows[1]["verdict"], "welded");
    assert!(rows[0]["impact_velocity[m/s]"].is_number());
    assert!(rows[0]["margin_melting_upper[m/s]"].is_number());
}

#[test]
fn rejected_rows_are_saved_with_their_reasons_and_progress_is_heard() {
    let input = "position[mm],velocity[m/s],angle[deg]\n0.0,250,12\n0.5,abc,10\n1.0,460,11\n";
    let opts = MapOptions {
        bad_rows: BadRows::Save,
        ..MapOptions::default()
    };
    let window = demo();
    let mut weld_map = WeldMap::open(window, input.as_bytes(), &opts).expect("a good header");
    assert_eq!(weld_map.header().velocity.cell, "velocity[m/s]");
    assert_eq!(weld_map.classifier().limits.len(), 7);
    let (mut map, mut bad) = (Vec::new(), Vec::new());
    let mut heard = 0;
    let s = weld_map
        .run(&mut map, Some(&mut bad), &mut |bytes| heard = bytes)
        .expect("a bad row is set aside");
    assert_eq!((s.rows_read, s.rows_classified, s.rows_rejected), (3, 2, 1));
    assert_eq!(heard as usize, input.len() - input.find('\n').unwrap() - 1);
    let bad = String::from_utf8(bad).expect("UTF-8");
    assert!(bad.starts_with("row,field,reason,position[mm]"), "{bad}");
    assert!(
        bad.contains("3,velocity[m/s],'abc' is not a finite number"),
        "{bad}"
    );
    assert_eq!(s.examples[0].row, 3);
    // The input has been read: a second run is refused.
    let again = weld_map.run(&mut map, Some(&mut bad.into_bytes()), &mut |_| {});
    assert!(matches!(again, Err(MapError::Misuse(_))));
}

#[test]
fn errors_say_whether_the_input_is_at_fault() {
    let window = demo();
    let mut out = Vec::new();
    // A header without units.
    let e = classify_stream(
        window,
        "position,velocity,angle\n".as_bytes(),
        &mut out,
        &MapOptions::default(),
    )
    .expect_err("no units");
    assert!(e.is_input());
    assert!(e.to_string().contains("has no unit"), "{e}");
    // The first bad row stops the map.
    let input = "position[mm],velocity[m/s],angle[deg]\n0.0,250,12\n0.5,-3,10\n";
    let e = classify_stream(window, input.as_bytes(), &mut out, &MapOptions::default())
        .expect_err("a negative velocity");
    assert!(e.is_input());
    assert!(
        e.to_string().contains("row 3, field 'velocity[m/s]'"),
        "{e}"
    );
    // Every row rejected.
    let opts = MapOptions {
        bad_rows: BadRows::Skip,
        ..MapOptions::default()
    };
    let input = "position[mm],velocity[m/s],angle[deg]\n0.0,x,12\n";
    let e = classify_stream(window, input.as_bytes(), &mut out, &opts).expect_err("nothing to map");
    assert!(matches!(e, MapError::NothingClassified(_)), "{e}");
    // Save needs a writer for the rejected rows.
    let opts = MapOptions {
        bad_rows: BadRows::Save,
        ..MapOptions::default()
    };
    let e = classify_stream(window, ROWS.as_bytes(), &mut out, &opts).expect_err("no writer");
    assert!(matches!(e, MapError::Misuse(_)) && !e.is_input(), "{e}");
}

#[test]
fn collision_velocity_input_reports_the_impact_velocity() {
    let opts = MapOptions {
        velocity_kind: VelocityKind::Collision,
        ..MapOptions::default()
    };
    let input = "position[mm],velocity[m/s],angle[deg]\n0.5,2591.4,10\n";
    let mut map = Vec::new();
    let s = classify_stream(demo(), input.as_bytes(), &mut map, &opts).expect("one good row");
    assert_eq!(s.info.velocity_kind, "collision");
    let map = String::from_utf8(map).expect("UTF-8");
    let vp: f64 = column(&map, "impact_velocity[m/s]")[0]
        .parse()
        .expect("a number");
    assert!((vp - 450.0).abs() < 0.1, "{vp}");
}
