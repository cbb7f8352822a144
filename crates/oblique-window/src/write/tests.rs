//! Tests of the parent module.

use super::*;
use oblique_core::Convention;

fn obs(v: &str) -> ObservationEntry {
    ObservationEntry {
        velocity: v.into(),
        angle: "9 deg".into(),
        outcome: "welded".into(),
        process: "magnetic-pulse".into(),
        method: "measured".into(),
        velocity_uncertainty: None,
        angle_uncertainty: None,
        date: None,
        source: "shot \"7\"".into(),
        note: None,
    }
}

/// A new pair file's text, as `pair new` writes it.
fn small_pair() -> String {
    new_pair_text(&NewPair {
        name: "p",
        description: "",
        flyer: "a",
        parent: "b",
        flyer_thickness: "1 mm",
        parent_thickness: None,
        convention: Convention::NormalToFlyer,
        process: "magnetic-pulse",
        maintainer: "me",
        date: "2026-12-01",
    })
}

#[test]
fn append_keeps_every_other_byte() {
    let text = small_pair();
    let once = append_observation_text(Path::new("p.ron"), &text, &[obs("300 m/s")]).unwrap();
    let twice = append_observation_text(Path::new("p.ron"), &once, &[obs("310 m/s")]).unwrap();
    assert!(twice.starts_with(&text[..text.find("observations: [").unwrap()]));
    assert!(twice.ends_with("    ],\n)\n"));
    assert_eq!(twice.matches("velocity:").count(), 2);
    let parsed: crate::pair::PairFile = crate::diag::parse_ron("p.ron", &twice).unwrap();
    assert_eq!(parsed.observations[1].velocity, "310 m/s");
    assert_eq!(parsed.observations[0].source, "shot \"7\"");
}

#[test]
fn append_after_an_entry_without_trailing_comma_and_with_a_comment() {
    let text = "(\n    format: \"x\",\n    observations: [\n        (velocity: \"1 m/s\") // last\n    ],\n)\n";
    let out = append_observation_text(Path::new("p.ron"), text, &[obs("2 m/s")]).unwrap();
    assert!(out.contains("(velocity: \"1 m/s\"),"), "{out}");
    assert!(out.contains("// last"), "{out}");
}

#[test]
fn adds_a_list_when_there_is_none() {
    let text = "(\n    format: \"x\",\n    name: \"n\"\n)\n";
    let out = append_observation_text(Path::new("p.ron"), text, &[obs("2 m/s")]).unwrap();
    assert!(out.contains("name: \"n\",\n    observations: ["), "{out}");
}

#[test]
fn atomic_write_refuses_on_conflict_and_leaves_the_file() {
    let dir = tempfile::tempdir().unwrap();
    let p = dir.path().join("f.ron");
    std::fs::write(&p, "old").unwrap();
    let err = atomic_write(&p, b"new", Some("0000")).unwrap_err();
    assert!(matches!(err, WriteError::Conflict { .. }));
    assert_eq!(std::fs::read_to_string(&p).unwrap(), "old");
    assert_eq!(
        std::fs::read_dir(dir.path()).unwrap().count(),
        1,
        "temporary file left behind"
    );
    atomic_write(&p, b"new", Some(&sha256_hex(b"old"))).unwrap();
    assert_eq!(std::fs::read_to_string(&p).unwrap(), "new");
}

#[test]
fn ron_strings_round_trip() {
    for s in [
        "plain",
        "quote \" and \\ backslash",
        "line\nbreak",
        "<script>alert(1)</script>",
    ] {
        let back: String = ron::from_str(&ron_string(s)).unwrap();
        assert_eq!(back, s);
    }
}
/// What an append adds is one contiguous insertion of new text (plus at most a comma right
/// after the last value): every old byte is kept, in order.
fn only_inserted(old: &str, new: &str, rendered: &str) {
    let mut i = 0;
    let (o, n) = (old.as_bytes(), new.as_bytes());
    while i < o.len() && o[i] == n[i] {
        i += 1;
    }
    let mut j = 0;
    while j < o.len() - i && o[o.len() - 1 - j] == n[n.len() - 1 - j] {
        j += 1;
    }
    let inserted = &new[i..new.len() - j];
    let core = inserted.trim_start_matches(',');
    assert!(
        core.replace("\r\n", "\n").contains(rendered.trim()),
        "the insertion is not the new entry:\n---\n{inserted}\n---"
    );
    assert!(
        !core.trim_start().starts_with(',')
            && core.matches(',').count() >= rendered.matches(',').count(),
        "{inserted}"
    );
}

/// Hand-written pair-like files an append must not damage: multi-line strings whose last
/// line holds `//` or `/*`, comments with brackets, raw strings, CRLF, a byte-order mark,
/// no trailing comma, the list's bracket on the last entry's line.
const CORPUS: &[&str] = &[
        "(\n    observations: [\n        (velocity: \"1 m/s\", source: \"first line\nsee http://example.org/log\"),\n    ],\n)\n",
        "(\n    observations: [\n        (velocity: \"1 m/s\", source: \"a\nb // not a comment\")\n    ],\n)\n",
        "(\n    observations: [\n        (velocity: \"1 m/s\", source: \"x /* not a block\"), // a ] in a comment\n        /* and ( here */\n    ],\n)\n",
        "(\n    observations: [\n        (velocity: \"1 m/s\", source: r#\"raw \"quoted\" // text\"#)\n    ],\n)\n",
        "(\r\n    observations: [\r\n        (velocity: \"1 m/s\", source: \"crlf\"),\r\n    ],\r\n)\r\n",
        "\u{feff}(\n    observations: [\n        (velocity: \"1 m/s\", source: \"bom\"),\n    ],\n)\n",
        "(\n    observations: [(velocity: \"1 m/s\", source: \"same line\")],\n)\n",
        "(\n    observations: [\n    ],\n    // trailing comment with \"quote\n)\n",
        "(\n    name: \"n\" // no list yet, no comma\n)\n",
        "(\n    observations: [\n        (velocity: \"1 m/s\", source: \"escaped \\\" quote // x\"),\n    ],\n)\n",
    ];

#[test]
fn appends_keep_every_old_byte_on_the_corpus() {
    let rendered = render_observation(&obs("2 m/s"));
    for text in CORPUS {
        let out = append_observation_text(Path::new("p.ron"), text, &[obs("2 m/s")])
            .unwrap_or_else(|e| panic!("{e}\n{text}"));
        only_inserted(text, &out, &rendered);
        let body = out.trim_start_matches('\u{feff}');
        let v: ron::Value = ron::from_str(body).unwrap_or_else(|e| panic!("{e}\n{out}"));
        let dump = format!("{v:?}");
        assert!(dump.contains("2 m/s"), "{out}");
        if text.contains("\r\n") {
            assert!(
                !out.replace("\r\n", "").contains('\n'),
                "mixed line ends:\n{out:?}"
            );
        }
        if text.starts_with('\u{feff}') {
            assert!(out.starts_with('\u{feff}'));
        }
        // Appending again keeps the first append whole.
        let again = append_observation_text(Path::new("p.ron"), &out, &[obs("3 m/s")]).unwrap();
        only_inserted(&out, &again, &render_observation(&obs("3 m/s")));
    }
}

#[test]
fn an_append_never_alters_a_string_with_slashes_on_its_last_line() {
    let text = CORPUS[0];
    let out = append_observation_text(Path::new("p.ron"), text, &[obs("2 m/s")]).unwrap();
    assert!(out.contains("see http://example.org/log\"),"), "{out}");
    assert!(!out.contains("http:,//"), "{out}");
}

/// Setting the `fitted` field inserts it, replaces an earlier value (also one written as
/// `Some(..)` or `None`), and keeps every other byte, a byte-order mark and CRLF line ends.
#[test]
fn set_top_field_inserts_and_replaces_keeping_the_rest() {
    let p = Path::new("p.ron");
    let base = "(\n    name: \"x\",\n    observations: [\n        (velocity: \"1 m/s\"), // keep\n    ],\n)\n";
    let one = set_top_field(p, base, "fitted", "(a: 1)").expect("insert");
    assert_eq!(
        one,
        "(\n    name: \"x\",\n    observations: [\n        (velocity: \"1 m/s\"), // keep\n    ],\n    fitted: (a: 1),\n)\n"
    );
    let two = set_top_field(p, &one, "fitted", "(b: 2)").expect("replace");
    assert_eq!(two, one.replace("(a: 1)", "(b: 2)"));
    let some = one.replace("fitted: (a: 1)", "fitted: Some((a: 1))");
    assert_eq!(
        set_top_field(p, &some, "fitted", "(b: 2)").expect("some"),
        two
    );
    let none = one.replace("fitted: (a: 1)", "fitted: None");
    assert_eq!(
        set_top_field(p, &none, "fitted", "(b: 2)").expect("none"),
        two
    );
    let crlf = format!("\u{feff}{}", base.replace('\n', "\r\n"));
    let out = set_top_field(p, &crlf, "fitted", "(\n        a: 1,\n    )").expect("crlf");
    assert!(out.starts_with('\u{feff}'));
    assert!(!out.replace("\r\n", "").contains('\n'), "{out:?}");
    assert!(out.contains("observations: [\r\n        (velocity: \"1 m/s\"), // keep\r\n    ],"));
}

#[test]
fn removing_an_appended_shot_gives_the_file_without_it_byte_for_byte() {
    let text = small_pair();
    let p = Path::new("p.ron");
    let all =
        append_observation_text(p, &text, &[obs("1 m/s"), obs("2 m/s"), obs("3 m/s")]).unwrap();
    for (i, kept) in [
        (0, ["2 m/s", "3 m/s"]),
        (1, ["1 m/s", "3 m/s"]),
        (2, ["1 m/s", "2 m/s"]),
    ] {
        let (out, cut) = remove_top_list_item(p, &all, "observations", i).unwrap();
        let expected = append_observation_text(p, &text, &[obs(kept[0]), obs(kept[1])]).unwrap();
        assert_eq!(out, expected, "removing #{}", i + 1);
        assert_eq!(
            cut,
            render_observation(&obs(["1 m/s", "2 m/s", "3 m/s"][i]))
        );
    }
    // No such element: refused.
    assert!(remove_top_list_item(p, &all, "observations", 3).is_err());
    assert!(remove_top_list_item(p, &all, "boundaries", 0).is_err());
}

#[test]
fn removing_keeps_every_other_byte_on_the_corpus() {
    for text in CORPUS.iter().filter(|t| t.contains("(velocity")) {
        let two = append_observation_text(Path::new("p.ron"), text, &[obs("2 m/s")]).unwrap();
        // Remove the first (hand-written) element: the appended one stays whole.
        let (out, cut) = remove_top_list_item(Path::new("p.ron"), &two, "observations", 0)
            .unwrap_or_else(|e| panic!("{e}\n{two}"));
        assert!(
            cut.contains("1 m/s") && !cut.contains("2 m/s"),
            "{cut:?}\n{two}"
        );
        let at = two.find(&cut).expect("the cut is a piece of the text");
        assert_eq!(format!("{}{}", &two[..at], &two[at + cut.len()..]), out);
        let body = out.trim_start_matches('\u{feff}');
        let v: ron::Value = ron::from_str(body).unwrap_or_else(|e| panic!("{e}\n{out}"));
        let dump = format!("{v:?}");
        assert!(dump.contains("2 m/s") && !dump.contains("1 m/s"), "{out}");
        // And the last one: the hand-written one stays.
        let (out, cut) = remove_top_list_item(Path::new("p.ron"), &two, "observations", 1).unwrap();
        assert!(cut.contains("2 m/s") && !cut.contains("1 m/s"), "{cut:?}");
        let v: ron::Value = ron::from_str(out.trim_start_matches('\u{feff}'))
            .unwrap_or_else(|e| panic!("{e}\n{out}"));
        assert!(format!("{v:?}").contains("1 m/s"), "{out}");
    }
}
