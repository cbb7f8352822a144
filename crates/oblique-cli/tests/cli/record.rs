//! The decision record of a process set-up: alternatives with reasons, provenance hashes that
//! match the files, byte-identical records under SOURCE_DATE_EPOCH, one margin with the same
//! digits in check, estimate, sweep and report (text and JSON), and one rule for output files.

use super::*;
use serde_json::Value;
use sha2::{Digest, Sha256};

const BANK: &str = "harbourside-bank-300uf";
const COIL: &str = "harbourside-coil-42mm";
const PAIR: &str = "demo-al6061-on-cu";

fn sha(bytes: &[u8]) -> String {
    Sha256::digest(bytes)
        .iter()
        .map(|b| format!("{b:02x}"))
        .collect()
}

/// A user library with copies of the built-in bank and coil under their own names, so that the
/// machine files of the record are files on disk.
fn shop() -> tempfile::TempDir {
    let d = tempfile::tempdir().unwrap();
    let m = d.path().join("machines");
    std::fs::create_dir(&m).unwrap();
    for (from, to) in [(BANK, "shop-bank"), (COIL, "shop-coil")] {
        let text = std::fs::read_to_string(repo().join(format!("windows/machines/{from}.ron")))
            .unwrap()
            .replace(&format!("name: \"{from}\""), &format!("name: \"{to}\""));
        std::fs::write(m.join(format!("{to}.ron")), text).unwrap();
    }
    d
}

fn tube_record<'a>(lib: &'a str, out: &'a str, extra: &[&'a str]) -> Vec<&'a str> {
    let mut v = vec![
        "--library",
        lib,
        "report",
        "mpw-tube",
        "--machine",
        "shop-bank",
        "--coil",
        "shop-coil",
        "--pair",
        PAIR,
        "--tube-outer-radius",
        "20mm",
        "--charge-voltage",
        "7kV",
        "--standoff",
        "2mm",
        "--angle",
        "10deg",
        "--label",
        "A",
        "--alternative",
        "B: charge-voltage=8kV, standoff=1mm, angle=6deg",
        "--alternative",
        "C: charge-voltage=9kV, because=the bank is kept below 8.5 kV, by the shop's rule",
        "--prepared-by",
        "P. Preparer",
        "--checked-by",
        "C. Checker",
        "-o",
        out,
    ];
    v.extend_from_slice(extra);
    v
}

#[test]
fn a_process_record_names_each_alternative_and_its_reason_and_hashes_its_files() {
    let lib = shop();
    let l = lib.path().to_str().unwrap();
    let out = lib.path().join("r.json");
    let o = run(&tube_record(l, out.to_str().unwrap(), &[]));
    assert_eq!(o.status.code(), Some(0), "{}", stderr(&o));
    let v: Value = serde_json::from_slice(&std::fs::read(&out).unwrap()).unwrap();
    assert_eq!(v["chosen"]["label"], "A");
    assert_eq!(v["verdict"]["inside"], true);
    let alts = v["alternatives"].as_array().unwrap();
    assert_eq!(alts.len(), 2);
    let reason = |i: usize| alts[i]["not_chosen_because"].as_str().unwrap().to_string();
    assert_eq!(alts[0]["label"], "B");
    assert!(
        reason(0).contains("less velocity headroom"),
        "{}",
        reason(0)
    );
    assert_eq!(alts[1]["label"], "C");
    assert!(
        reason(1).starts_with("outside the window: melting-upper fails"),
        "{}",
        reason(1)
    );
    assert!(reason(1).contains("noted by the person preparing this record: the bank is kept below 8.5 kV, by the shop's rule"));
    assert_eq!(v["provenance"]["prepared_by"], "P. Preparer");
    assert_eq!(v["provenance"]["checked_by"], "C. Checker");
    // The efficiency and where it came from.
    assert_eq!(
        v["setup"]["input_sources"]["efficiency"],
        "default 1, uncalibrated"
    );
    // Every file that entered the computation, with the SHA-256 of its bytes.
    let files = v["provenance"]["files"].as_array().unwrap();
    let roles: Vec<&str> = files.iter().map(|f| f["role"].as_str().unwrap()).collect();
    for r in [
        "pair window",
        "materials",
        "capacitor bank",
        "compression coil",
    ] {
        assert!(roles.contains(&r), "{r} missing from {roles:?}");
    }
    for f in files {
        let name = f["file"].as_str().unwrap();
        let bytes = match name.strip_prefix("built-in:") {
            Some(rel) => std::fs::read(repo().join(rel)).unwrap(),
            None => std::fs::read(name).unwrap(),
        };
        assert_eq!(f["sha256"].as_str().unwrap(), sha(&bytes), "{name}");
    }
    // The HTML names every alternative with its reason, and the people.
    let html_out = lib.path().join("r.html");
    let o = run(&tube_record(l, html_out.to_str().unwrap(), &[]));
    assert_eq!(o.status.code(), Some(0), "{}", stderr(&o));
    let html = std::fs::read_to_string(&html_out).unwrap();
    for needle in [
        "The chosen set-up: A",
        "Alternatives considered",
        "less velocity headroom",
        "the bank is kept below 8.5 kV, by the shop&#39;s rule",
        "P. Preparer",
        "C. Checker",
        "default 1, uncalibrated",
    ] {
        assert!(html.contains(needle), "missing {needle}");
    }
}

#[test]
fn with_source_date_epoch_two_records_are_byte_identical() {
    let lib = shop();
    let l = lib.path().to_str().unwrap();
    let mut texts = Vec::new();
    for _ in 0..2 {
        let o = Command::new(env!("CARGO_BIN_EXE_oblique"))
            .args(tube_record(l, "r.html", &[]))
            .current_dir(lib.path())
            .env_remove("OBLIQUE_LIBRARY")
            .env("SOURCE_DATE_EPOCH", "1767225600")
            .output()
            .unwrap();
        assert_eq!(o.status.code(), Some(0), "{}", stderr(&o));
        texts.push(std::fs::read(lib.path().join("r.html")).unwrap());
    }
    assert_eq!(texts[0], texts[1]);
    let html = String::from_utf8(texts.remove(0)).unwrap();
    assert!(html.contains("2026-01-01 00:00:00 UTC (from SOURCE_DATE_EPOCH)"));
    // A malformed value is refused, naming it.
    let o = Command::new(env!("CARGO_BIN_EXE_oblique"))
        .args(tube_record(l, "r2.html", &[]))
        .current_dir(lib.path())
        .env("SOURCE_DATE_EPOCH", "yesterday")
        .output()
        .unwrap();
    assert_eq!(o.status.code(), Some(2));
    assert!(stderr(&o).contains("SOURCE_DATE_EPOCH='yesterday'"));
}

#[test]
fn from_sweep_chooses_the_best_setting_and_lists_the_others() {
    let d = tempfile::tempdir().unwrap();
    let sweep = d.path().join("sweep.json");
    let o = run(&[
        "sweep",
        "mpw-tube",
        "--machine",
        BANK,
        "--coil",
        COIL,
        "--pair",
        PAIR,
        "--tube-outer-radius",
        "20mm",
        "--charge-voltage",
        "6kV..10kV",
        "--steps",
        "5",
        "--standoff",
        "1mm,2mm,3mm",
        "--angle-per-standoff",
        "6deg,10deg,14deg",
        "--json",
    ]);
    assert_eq!(o.status.code(), Some(0), "{}", stderr(&o));
    std::fs::write(&sweep, &o.stdout).unwrap();
    let sv: Value = serde_json::from_slice(&o.stdout).unwrap();
    let best = &sv["inside_ranked"][0];
    let out = d.path().join("r.json");
    let o = run(&[
        "report",
        "mpw-tube",
        "--machine",
        BANK,
        "--coil",
        COIL,
        "--pair",
        PAIR,
        "--tube-outer-radius",
        "20mm",
        "--from-sweep",
        sweep.to_str().unwrap(),
        "-o",
        out.to_str().unwrap(),
    ]);
    assert_eq!(o.status.code(), Some(0), "{}", stderr(&o));
    let v: Value = serde_json::from_slice(&std::fs::read(&out).unwrap()).unwrap();
    assert_eq!(v["chosen"]["label"], "S1");
    assert_eq!(
        v["chosen"]["velocity_headroom"]["headroom_m_s"],
        best["velocity_headroom"]["headroom_m_s"]
    );
    assert_eq!(v["alternatives"].as_array().unwrap().len(), 14);
    for a in v["alternatives"].as_array().unwrap() {
        assert!(!a["not_chosen_because"].as_str().unwrap().is_empty());
    }
    let files = v["provenance"]["files"].as_array().unwrap();
    let sw = files
        .iter()
        .find(|f| f["role"] == "sweep (--from-sweep)")
        .expect("the sweep file");
    assert_eq!(
        sw["sha256"].as_str().unwrap(),
        sha(&std::fs::read(&sweep).unwrap())
    );
    // A sweep setting equal to the chosen set-up or to an --alternative is listed once.
    let o = run(&[
        "report",
        "mpw-tube",
        "--machine",
        BANK,
        "--coil",
        COIL,
        "--pair",
        PAIR,
        "--tube-outer-radius",
        "20mm",
        "--charge-voltage",
        "7kV",
        "--standoff",
        "2mm",
        "--angle",
        "10deg",
        "--alternative",
        "B: charge-voltage=8kV, standoff=1mm, angle=6deg",
        "--from-sweep",
        sweep.to_str().unwrap(),
        "-o",
        out.to_str().unwrap(),
    ]);
    assert_eq!(o.status.code(), Some(0), "{}", stderr(&o));
    assert!(
        stderr(&o).contains("is the set-up 'B' already listed"),
        "{}",
        stderr(&o)
    );
    let v: Value = serde_json::from_slice(&std::fs::read(&out).unwrap()).unwrap();
    let labels: Vec<&str> = v["alternatives"]
        .as_array()
        .unwrap()
        .iter()
        .filter_map(|a| a["label"].as_str())
        .collect();
    assert_eq!(labels.len(), 14, "{labels:?}");
    assert!(labels.contains(&"B"), "{labels:?}");
}

/// One margin, the same digits everywhere: 8 kV, 2 mm, 10 deg on the demo bank and coil.
#[test]
fn the_same_margin_has_the_same_digits_in_check_estimate_sweep_and_report() {
    let est = [
        "estimate",
        "mpw-tube",
        "--machine",
        BANK,
        "--coil",
        COIL,
        "--pair",
        PAIR,
        "--tube-outer-radius",
        "20mm",
        "--standoff",
        "2mm",
        "--charge-voltage",
        "8kV",
        "--angle",
        "10deg",
    ];
    let sentence = "velocity headroom: the impact velocity can rise by 41 m/s (7.8 %) to 572 m/s at this angle before melting-upper is reached";
    let cell = "572 m/s (+41 m/s, +7.8 %)";
    let o = run(&est);
    assert!(stdout(&o).contains(sentence), "{}", stdout(&o));
    let mut j = est.to_vec();
    j.push("--json");
    let ej: Value = serde_json::from_slice(&run(&j).stdout).unwrap();
    // The rounded figures (the digits printed); the unrounded value is the search's own.
    let strip = |v: &Value| {
        let mut v = v.clone();
        v.as_object_mut()
            .unwrap()
            .remove("reached_at_unrounded_m_s");
        v
    };
    let want = &strip(&ej["window_check"]["velocity_headroom"]);
    assert_eq!(want["headroom_m_s"], 41.0);
    assert_eq!(want["headroom_percent"], 7.8);
    assert_eq!(want["reached_at_impact_velocity_m_s"], 572.0);
    // check at the estimate's impact velocity.
    let vp = format!("{}m/s", ej["impact_velocity_m_s"]);
    let o = run(&[
        "check",
        "--pair",
        PAIR,
        "--velocity",
        &vp,
        "--angle",
        "10deg",
    ]);
    assert!(stdout(&o).contains(sentence), "{}", stdout(&o));
    assert!(stdout(&o).contains(cell), "{}", stdout(&o));
    let cj: Value = serde_json::from_slice(
        &run(&[
            "check",
            "--pair",
            PAIR,
            "--velocity",
            &vp,
            "--angle",
            "10deg",
            "--json",
        ])
        .stdout,
    )
    .unwrap();
    assert_eq!(&strip(&cj["velocity_headroom"]), want);
    // sweep: the same setting's row and JSON.
    let sw = [
        "sweep",
        "mpw-tube",
        "--machine",
        BANK,
        "--coil",
        COIL,
        "--pair",
        PAIR,
        "--tube-outer-radius",
        "20mm",
        "--charge-voltage",
        "8kV",
        "--standoff",
        "2mm",
        "--angle",
        "10deg",
    ];
    let o = run(&sw);
    assert!(stdout(&o).contains(cell), "{}", stdout(&o));
    let mut j = sw.to_vec();
    j.push("--json");
    let sj: Value = serde_json::from_slice(&run(&j).stdout).unwrap();
    assert_eq!(&strip(&sj["inside_ranked"][0]["velocity_headroom"]), want);
    // report: the same sentence and JSON.
    let d = tempfile::tempdir().unwrap();
    let out = d.path().join("r.html");
    let mut rep = vec!["report"];
    rep.extend_from_slice(&est[1..]);
    rep.extend_from_slice(&["-o", out.to_str().unwrap(), "--json"]);
    let o = run(&rep);
    assert_eq!(o.status.code(), Some(0), "{}", stderr(&o));
    let rj: Value = serde_json::from_slice(&o.stdout).unwrap();
    assert_eq!(&strip(&rj["verdict"]["velocity_headroom"]), want);
    assert!(std::fs::read_to_string(&out).unwrap().contains(sentence));
}

/// Every command that writes a file refuses an extension it does not write, before any work,
/// with the supported list.
#[test]
fn unsupported_output_extensions_are_refused_by_every_command() {
    let d = tempfile::tempdir().unwrap();
    let p = |n: &str| d.path().join(n).to_str().unwrap().to_string();
    let input = p("in.csv");
    std::fs::write(&input, "position[mm],velocity[m/s],angle[deg]\n0,400,10\n").unwrap();
    let tube = [
        "--machine",
        BANK,
        "--coil",
        COIL,
        "--pair",
        PAIR,
        "--tube-outer-radius",
        "20mm",
    ];
    let (pdf, gif, xlsx, txt) = (p("x.pdf"), p("x.gif"), p("x.xlsx"), p("x.txt"));
    let save = format!("save:{txt}");
    let cases: Vec<(Vec<&str>, &str)> = vec![
        (vec!["plot", "--pair", PAIR, "-o", &pdf], ".svg, .png"),
        (
            vec![
                "report",
                "--pair",
                PAIR,
                "--velocity",
                "450m/s",
                "--angle",
                "10deg",
                "-o",
                &pdf,
            ],
            ".html, .htm, .json",
        ),
        (
            [
                &["sweep", "mpw-tube"][..],
                &tube,
                &[
                    "--charge-voltage",
                    "8kV",
                    "--standoff",
                    "2mm",
                    "--angle",
                    "10deg",
                    "--plot",
                    &gif,
                ],
            ]
            .concat(),
            ".svg, .png",
        ),
        (
            [
                &["estimate", "mpw-tube"][..],
                &tube,
                &[
                    "--charge-voltage",
                    "8kV",
                    "--standoff",
                    "2mm",
                    "--history",
                    &txt,
                ],
            ]
            .concat(),
            ".csv",
        ),
        (
            vec!["map", &input, "--pair", PAIR, "-o", &xlsx],
            ".csv, .jsonl, .ndjson",
        ),
        (
            vec!["map", &input, "--pair", PAIR, "--summary-json", &txt],
            ".json",
        ),
        (
            vec!["map", &input, "--pair", PAIR, "--strip-svg", &pdf],
            ".svg, .png",
        ),
        (
            vec!["map", &input, "--pair", PAIR, "--window-svg", &gif],
            ".svg, .png",
        ),
        (
            vec!["map", &input, "--pair", PAIR, "--bad-rows", &save],
            ".csv, .jsonl, .ndjson",
        ),
    ];
    for (args, list) in cases {
        let o = run(&args);
        assert_eq!(o.status.code(), Some(2), "{args:?}: {}", stderr(&o));
        let err = stderr(&o);
        assert!(
            err.contains("is not a format it writes") && err.contains(list),
            "{args:?}: {err}"
        );
        for f in [&pdf, &gif, &xlsx, &txt] {
            assert!(!Path::new(f).exists(), "{args:?} wrote {f}");
        }
    }
    // A supported extension picks the format: PNG bytes for .png.
    let png = p("s.png");
    let o = run(&[
        &["sweep", "mpw-tube"][..],
        &tube,
        &[
            "--charge-voltage",
            "8kV",
            "--standoff",
            "2mm",
            "--angle",
            "10deg",
            "--plot",
            &png,
        ],
    ]
    .concat());
    assert_eq!(o.status.code(), Some(0), "{}", stderr(&o));
    assert_eq!(&std::fs::read(&png).unwrap()[..4], b"\x89PNG");
}

/// An explosive set-up as the chosen one, alternatives with explosive keys; keys of another
/// kind are refused, naming them.
#[test]
fn an_explosive_record_with_alternatives() {
    let d = tempfile::tempdir().unwrap();
    let out = d.path().join("x.json");
    let base = [
        "report",
        "explosive",
        "--gurney-velocity",
        "1500m/s",
        "--detonation-velocity",
        "2500m/s",
        "--mass-ratio",
        "2",
        "--preset-angle",
        "0deg",
        "--pair",
        PAIR,
    ];
    let mut args = base.to_vec();
    args.extend_from_slice(&[
        "--alternative",
        "thin: mass-ratio=3",
        "-o",
        out.to_str().unwrap(),
    ]);
    let o = run(&args);
    assert_eq!(o.status.code(), Some(0), "{}", stderr(&o));
    let v: Value = serde_json::from_slice(&std::fs::read(&out).unwrap()).unwrap();
    assert_eq!(v["setup"]["model"], "explosive");
    assert_eq!(v["alternatives"][0]["label"], "thin");
    assert!(v["alternatives"][0]["not_chosen_because"]
        .as_str()
        .unwrap()
        .starts_with("outside the window"));
    let mut args = base.to_vec();
    args.extend_from_slice(&["--alternative", "standoff=2mm", "-o", out.to_str().unwrap()]);
    fails_with(
        &args,
        &[
            "--alternative: standoff do(es) not apply here",
            "mass-ratio",
        ],
    );
}

#[test]
fn a_record_states_the_weld_probability_and_the_scatter_when_asked() {
    let dir = tempfile::tempdir().expect("temp dir");
    let out = dir.path().join("r.json");
    let o = run(&[
        "report",
        "--pair",
        "demo-al6061-on-cu",
        "--velocity",
        "450m/s",
        "--angle",
        "10deg",
        "--velocity-sd",
        "5%",
        "--angle-sd",
        "1deg",
        "--samples",
        "4000",
        "-o",
        out.to_str().expect("utf-8"),
    ]);
    assert_eq!(o.status.code(), Some(0), "{}", stderr(&o));
    let v: serde_json::Value =
        serde_json::from_str(&std::fs::read_to_string(&out).expect("record")).expect("JSON");
    let p = &v["probability"];
    let value = p["value"].as_f64().expect("a probability");
    assert!(value > 0.5 && value < 1.0, "{p}");
    let method = p["method"].as_str().expect("method");
    assert!(method.contains("velocity sd 5 %"), "{method}");
    assert!(method.contains("4000 draws"), "{method}");
    // Without the flags the record says no probability was computed.
    let o = run(&[
        "report",
        "--pair",
        "demo-al6061-on-cu",
        "--velocity",
        "450m/s",
        "--angle",
        "10deg",
        "-o",
        out.to_str().expect("utf-8"),
    ]);
    assert_eq!(o.status.code(), Some(0), "{}", stderr(&o));
    let v: serde_json::Value =
        serde_json::from_str(&std::fs::read_to_string(&out).expect("record")).expect("JSON");
    assert!(v["probability"].is_null());
    // A process set-up's record states one without the flags, as estimate does, under the
    // scatter its efficiency implies (uncalibrated here: 25 %).
    let shop = shop();
    let lib = shop.path().to_str().expect("utf-8");
    let o = run(&tube_record(lib, out.to_str().expect("utf-8"), &[]));
    assert_eq!(o.status.code(), Some(0), "{}", stderr(&o));
    let v: serde_json::Value =
        serde_json::from_str(&std::fs::read_to_string(&out).expect("record")).expect("JSON");
    let method = v["probability"]["method"].as_str().expect("a probability");
    assert!(method.contains("velocity sd 25 %"), "{method}");
    // And every alternative's, under the same rule, so a reviewer can compare them.
    for a in v["alternatives"].as_array().expect("alternatives") {
        let p = a["weld_probability"].as_f64().expect("a probability");
        assert!((0.0..=1.0).contains(&p), "{a}");
    }
    let html_out = dir.path().join("r.html");
    let o = run(&tube_record(lib, html_out.to_str().expect("utf-8"), &[]));
    assert_eq!(o.status.code(), Some(0), "{}", stderr(&o));
    let html = std::fs::read_to_string(&html_out).expect("record");
    assert!(
        html.contains("<th>P(weld)</th>"),
        "the alternatives table has the column"
    );
}
