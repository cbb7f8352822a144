//! `oblique check`: output and every class of bad input.

use super::*;
use serde_json::Value;

const BASE: [&str; 9] = [
    "check",
    "--flyer",
    "aa6061-t6",
    "--parent",
    "cu-c11000",
    "--flyer-thickness",
    "1mm",
    "--convention",
    "normal-to-flyer",
];

fn with(extra: &[&'static str]) -> Vec<&'static str> {
    let mut v = BASE.to_vec();
    v.extend_from_slice(extra);
    v
}

#[test]
fn human_output_has_table_verdict_and_caution() {
    let o = run(&with(&["--velocity", "350m/s", "--angle", "12deg"]));
    assert_eq!(o.status.code(), Some(0), "{}", stderr(&o));
    let s = stdout(&o);
    for needle in [
        "collision-point velocity Vc",
        "deribas-lower",
        "melting-upper",
        "verdict: OUTSIDE",
        "velocity shortfall: the impact velocity must rise by 22 m/s (6.1 %) to 372 m/s at this angle to meet deribas-lower",
        "where the window is: at this angle the window spans Vp",
        "velocity headroom",
        "rounded to the safe side",
        "caution:",
    ] {
        assert!(s.contains(needle), "missing '{needle}' in\n{s}");
    }
}

#[test]
fn json_has_the_contract_keys() {
    let o = run(&with(&[
        "--velocity",
        "450m/s",
        "--angle",
        "10deg",
        "--json",
    ]));
    assert_eq!(o.status.code(), Some(0), "{}", stderr(&o));
    let v: Value = serde_json::from_str(&stdout(&o)).expect("json");
    for k in [
        "flyer",
        "parent",
        "convention",
        "impact_velocity_m_s",
        "collision_angle_deg",
        "collision_velocity_m_s",
        "flow_velocity_m_s",
        "impact_pressure_pa",
        "jetting_critical_angle_deg",
        "criteria",
        "inside",
        "binding",
    ] {
        assert!(v.get(k).is_some(), "missing key {k}");
    }
    for k in [
        "id",
        "density_kg_m3",
        "bulk_sound_speed_m_s",
        "hugoniot_slope",
        "vickers_hardness_pa",
        "yield_strength_pa",
        "tensile_strength_pa",
        "bulk_modulus_pa",
        "shear_modulus_pa",
        "melting_temperature_k",
        "thermal_conductivity_w_m_k",
        "specific_heat_j_kg_k",
    ] {
        assert!(
            v["flyer"].get(k).is_some() && v["parent"].get(k).is_some(),
            "missing material key {k}"
        );
    }
    assert!((v["flyer"]["thickness_m"].as_f64().unwrap() - 1e-3).abs() < 1e-12);
    assert_eq!(v["convention"], "normal-to-flyer");
    // 450 m/s at 10 deg normal to flyer: Vc = 450 / sin(10 deg) (independent arithmetic).
    let vc = 450.0 / 10f64.to_radians().sin();
    assert!((v["collision_velocity_m_s"].as_f64().unwrap() - vc).abs() < 1e-3);
    let ids: Vec<&str> = v["criteria"]
        .as_array()
        .unwrap()
        .iter()
        .map(|c| c["id"].as_str().unwrap())
        .collect();
    assert_eq!(
        ids,
        [
            "deribas-lower",
            "strength-lower",
            "pressure-lower",
            "melting-upper",
            "jetting",
            "wavy-transition"
        ]
    );
    for c in v["criteria"].as_array().unwrap() {
        for k in [
            "value",
            "limit",
            "margin",
            "unit",
            "satisfied",
            "informational",
            "governing",
            "constants",
        ] {
            assert!(c.get(k).is_some(), "criterion missing {k}");
        }
    }
    assert_eq!(v["criteria"][0]["constants"]["k"], 0.6);
    assert_eq!(v["criteria"][3]["constants"]["n"], 0.11);
    assert_eq!(v["inside"], true);
}

#[test]
fn constants_are_overridable_and_collision_velocity_input_works() {
    let o = run(&with(&[
        "--collision-velocity",
        "2.4km/s",
        "--angle",
        "10deg",
        "--deribas-k",
        "1.2",
        "--wittman-n",
        "0.2",
        "--json",
    ]));
    assert_eq!(o.status.code(), Some(0), "{}", stderr(&o));
    let v: Value = serde_json::from_str(&stdout(&o)).unwrap();
    assert_eq!(v["criteria"][0]["constants"]["k"], 1.2);
    assert_eq!(v["criteria"][3]["constants"]["n"], 0.2);
    assert!((v["collision_velocity_m_s"].as_f64().unwrap() - 2400.0).abs() < 1e-9);
}

#[test]
fn outside_still_exits_zero() {
    let o = run(&with(&[
        "--velocity",
        "200m/s",
        "--angle",
        "3deg",
        "--json",
    ]));
    assert_eq!(o.status.code(), Some(0));
    let v: Value = serde_json::from_str(&stdout(&o)).unwrap();
    assert_eq!(v["inside"], false);
}

#[test]
fn bad_input_names_the_flag_and_exits_2() {
    fails_with(
        &with(&["--velocity", "350", "--angle", "12deg"]),
        &["--velocity", "has no unit", "m/s"],
    );
    fails_with(
        &with(&["--velocity", "350mph", "--angle", "12deg"]),
        &["--velocity", "unknown unit 'mph'"],
    );
    fails_with(
        &with(&["--velocity", "350m/s", "--angle", "-1deg"]),
        &["--angle", "outside [0, 90) deg"],
    );
    fails_with(
        &with(&["--velocity", "350m/s", "--angle", "95deg"]),
        &["--angle", "outside [0, 90) deg"],
    );
    fails_with(
        &with(&["--velocity", "0m/s", "--angle", "12deg"]),
        &["--velocity", "above zero"],
    );
    fails_with(
        &with(&["--velocity", "-5m/s", "--angle", "12deg"]),
        &["--velocity"],
    );
    fails_with(
        &with(&["--velocity", "NaN m/s", "--angle", "12deg"]),
        &["--velocity", "not a finite number"],
    );
    fails_with(
        &with(&["--velocity", "inf m/s", "--angle", "12deg"]),
        &["--velocity", "not a finite number"],
    );
    fails_with(
        &with(&["--velocity", "1e400m/s", "--angle", "12deg"]),
        &["--velocity", "not a finite number"],
    );
    fails_with(
        &[
            "check",
            "--flyer",
            "aa6061",
            "--parent",
            "cu-c11000",
            "--flyer-thickness",
            "1mm",
            "--convention",
            "bisector",
            "--velocity",
            "350m/s",
            "--angle",
            "12deg",
        ],
        &["--flyer", "unknown material id 'aa6061'", "aa6061-t6"],
    );
    fails_with(
        &[
            "check",
            "--flyer",
            "aa6061-t6",
            "--parent",
            "cu-c11000",
            "--flyer-thickness",
            "0mm",
            "--convention",
            "bisector",
            "--velocity",
            "350m/s",
            "--angle",
            "12deg",
        ],
        &["--flyer-thickness", "above zero"],
    );
    fails_with(
        &[
            "check",
            "--flyer",
            "aa6061-t6",
            "--parent",
            "cu-c11000",
            "--flyer-thickness",
            "1mm",
            "--convention",
            "normal",
            "--velocity",
            "350m/s",
            "--angle",
            "12deg",
        ],
        &["--convention", "normal-to-flyer"],
    );
    fails_with(
        &[
            "check",
            "--flyer",
            "aa6061-t6",
            "--parent",
            "cu-c11000",
            "--flyer-thickness",
            "1mm",
            "--velocity",
            "350m/s",
            "--angle",
            "12deg",
        ],
        &["--convention is required"],
    );
    fails_with(&with(&["--angle", "12deg"]), &["--velocity"]);
    fails_with(
        &with(&["--velocity", "350m/s", "--angle", "12deg", "--deribas-k=-1"]),
        &["--deribas-k"],
    );
}

#[test]
fn help_explains_every_input_with_examples() {
    let o = run(&["check", "--help"]);
    let s = stdout(&o);
    for needle in [
        "--flyer",
        "--parent",
        "--flyer-thickness",
        "--velocity",
        "--collision-velocity",
        "--angle",
        "--convention",
        "--deribas-k",
        "--wittman-n",
        "--json",
        "Examples:",
        "350m/s",
    ] {
        assert!(s.contains(needle), "help lacks {needle}");
    }
}

#[test]
fn check_against_a_pair_adds_boundaries() {
    let o = run(&[
        "check",
        "--pair",
        "demo-al6061-on-cu",
        "--velocity",
        "450m/s",
        "--angle",
        "10deg",
        "--json",
    ]);
    assert_eq!(o.status.code(), Some(0), "{}", stderr(&o));
    let v: Value = serde_json::from_str(&stdout(&o)).unwrap();
    let b = v["boundaries"].as_array().unwrap();
    assert_eq!(b.len(), 2);
    for k in ["label", "margin", "satisfied", "in_range"] {
        assert!(b[0].get(k).is_some());
    }
    // Outside the span of the bounce-back line: flagged, not extrapolated.
    let o = run(&[
        "check",
        "--pair",
        "demo-al6061-on-cu",
        "--velocity",
        "700m/s",
        "--angle",
        "20deg",
        "--json",
    ]);
    let v: Value = serde_json::from_str(&stdout(&o)).unwrap();
    assert_eq!(v["outside_trial_data"], true);
    assert!(v["reason"]
        .as_str()
        .unwrap()
        .contains("outside the trial data"));
}

#[test]
fn closed_pipe_is_not_an_error() {
    use std::io::Read;
    use std::process::{Command, Stdio};
    let mut child = Command::new(env!("CARGO_BIN_EXE_oblique"))
        .args(["material", "list", "--json"])
        .stdout(Stdio::piped())
        .stderr(Stdio::piped())
        .spawn()
        .unwrap();
    drop(child.stdout.take());
    let status = child.wait().unwrap();
    let mut err = String::new();
    child
        .stderr
        .take()
        .unwrap()
        .read_to_string(&mut err)
        .unwrap();
    assert!(!err.contains("panicked"), "{err}");
    assert!(status.code() == Some(0), "{status:?} {err}");
}

const PROBABILITY: [&str; 11] = [
    "check",
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
];

fn probability_json(extra: &[&str]) -> Value {
    let mut args = PROBABILITY.to_vec();
    args.extend_from_slice(&["--samples", "20000", "--json"]);
    args.extend_from_slice(extra);
    let o = run(&args);
    assert_eq!(o.status.code(), Some(0), "{}", stderr(&o));
    let v: Value = serde_json::from_str(&stdout(&o)).expect("json");
    v["probability"].clone()
}

#[test]
fn weld_probability_json_has_the_contract_keys() {
    let p = probability_json(&[]);
    let inside = p["inside"].as_f64().expect("inside");
    assert!(inside > 0.0 && inside < 1.0, "{p}");
    assert!(p["standard_error"].as_f64().expect("se") > 0.0);
    assert_eq!(p["samples"], 20000);
    assert_eq!(p["seed"], 1);
    let failure = p["criteria_failure"].as_object().expect("object");
    for key in [
        "deribas-lower",
        "melting-upper",
        "jetting",
        "tip bounce-back angle (HBW-2026)",
    ] {
        assert!(failure.contains_key(key), "{key} in {p}");
    }
    let shares: Vec<f64> = p["dominant_inputs"]
        .as_array()
        .expect("array")
        .iter()
        .map(|d| {
            assert!(d["input"].is_string());
            d["share"].as_f64().expect("share")
        })
        .collect();
    assert!(!shares.is_empty());
    assert!(shares.windows(2).all(|w| w[0] >= w[1]), "{shares:?}");
    assert!(p["caution"]
        .as_str()
        .expect("caution")
        .contains("not a guarantee"));
    assert!(!p["not_covered"].as_array().expect("list").is_empty());
}

#[test]
fn weld_probability_is_reproducible_and_seeded() {
    assert_eq!(probability_json(&[]), probability_json(&[]));
    assert_eq!(probability_json(&[]), probability_json(&["--seed", "1"]));
    let other = probability_json(&["--seed", "2"]);
    assert_ne!(probability_json(&[])["inside"], other["inside"]);
    assert_eq!(other["seed"], 2);
}

#[test]
fn weld_probability_text_names_the_doubt_and_the_caution() {
    let o = run(&PROBABILITY);
    assert_eq!(o.status.code(), Some(0), "{}", stderr(&o));
    let s = stdout(&o);
    for needle in [
        "weld probability:",
        "standard error",
        "failure probability per limit",
        "inputs that dominate the doubt",
        "accounts for",
        "would narrow it",
        "not covered by this probability",
        "not a guarantee",
    ] {
        assert!(s.contains(needle), "missing '{needle}' in\n{s}");
    }
}

#[test]
fn model_uncertainty_off_samples_only_the_stated_scatter() {
    let p = probability_json(&["--model-uncertainty", "off"]);
    let inputs: Vec<&str> = p["inputs"]
        .as_array()
        .expect("inputs")
        .iter()
        .map(|i| i["input"].as_str().expect("id"))
        .collect();
    assert_eq!(inputs, ["velocity", "angle"]);
}

#[test]
fn bad_scatter_input_exits_2_naming_the_flag() {
    let cases: [(&[&str], &str); 9] = [
        (&["--velocity-sd", "-5%"], "--velocity-sd"),
        (&["--velocity-sd", "5"], "--velocity-sd"),
        (&["--velocity-sd", "nan%"], "--velocity-sd"),
        (&["--velocity-sd", "80%"], "--velocity-sd"),
        (&["--angle-sd", "5%"], "--angle-sd"),
        (&["--angle-sd", "-1deg"], "--angle-sd"),
        (&["--samples", "0"], "--samples"),
        (&["--samples", "20000000"], "--samples"),
        (&["--seed", "1.5"], "--seed"),
    ];
    for (extra, flag) in cases {
        let mut args = vec![
            "check",
            "--pair",
            "demo-al6061-on-cu",
            "--velocity",
            "450m/s",
            "--angle",
            "10deg",
        ];
        args.extend_from_slice(extra);
        fails_with(&args, &[flag]);
    }
}

#[test]
fn plot_probability_draws_contours_and_states_the_scatter() {
    let dir = tempfile::tempdir().expect("tempdir");
    let out = dir.path().join("p.svg");
    let o = run(&[
        "plot",
        "--pair",
        "demo-al6061-on-cu",
        "--probability",
        "--velocity-sd",
        "5%",
        "--angle-sd",
        "1deg",
        "--samples",
        "32",
        "-o",
        out.to_str().expect("path"),
    ]);
    assert_eq!(o.status.code(), Some(0), "{}", stderr(&o));
    let svg = std::fs::read_to_string(&out).expect("svg");
    roxmltree::Document::parse(&svg).expect("well-formed");
    for needle in [
        "weld probability 10 %",
        "weld probability 50 %",
        "weld probability 90 %",
        "under the stated scatter: velocity sd 5",
    ] {
        assert!(svg.contains(needle), "{needle}");
    }
    fails_with(
        &[
            "plot",
            "--pair",
            "demo-al6061-on-cu",
            "--velocity-sd",
            "5%",
            "-o",
            out.to_str().expect("path"),
        ],
        &["need --probability"],
    );
}

/// Issue 14, each finding as the command line shows it.
mod edges {
    use super::*;

    /// At 89.9 deg the verdict was "INSIDE the window" and the span ran to 89.75 deg.
    #[test]
    fn a_steep_angle_gets_no_verdict() {
        let o = run(&with(&["--velocity", "420m/s", "--angle", "89.9deg"]));
        assert_eq!(o.status.code(), Some(0), "{}", stderr(&o));
        let s = stdout(&o);
        assert!(s.contains("verdict: OUTSIDE THE VALIDITY DOMAIN"), "{s}");
        assert!(!s.contains("verdict: INSIDE"), "{s}");
        assert!(!s.contains("89.75"), "{s}");
        let o = run(&with(&[
            "--velocity",
            "420m/s",
            "--angle",
            "89.9deg",
            "--json",
        ]));
        let v: Value = serde_json::from_str(&stdout(&o)).unwrap();
        assert_eq!(v["inside"], false);
        assert_eq!(v["prediction"], "outside-domain");
        assert_eq!(v["domain"]["inside"], false);
        assert_eq!(v["domain"]["exits"][0]["quantity"], "collision_angle");
        assert_eq!(v["domain"]["limits_say"], "welded");
        assert_eq!(v["domain"]["bounds"].as_array().map(Vec::len), Some(5));
        // The Hugoniot intercept under its own name, the old key kept for scripts.
        assert_eq!(
            v["flyer"]["hugoniot_c0_m_s"],
            v["flyer"]["bulk_sound_speed_m_s"]
        );
    }

    /// At 35 000 m/s and 12 deg the melting limit was "not cured by changing the impact
    /// velocity or the angle alone"; at 1 m/s and 0.01 deg the advice was "lower the impact
    /// velocity to 0 m/s".
    #[test]
    fn advice_stays_inside_the_domain() {
        let s = stdout(&run(&with(&["--velocity", "35000m/s", "--angle", "12deg"])));
        assert!(
            s.contains("melting-upper: velocity shortfall: the impact velocity must fall by"),
            "{s}"
        );
        assert!(s.contains("at this angle the window spans Vp"), "{s}");
        assert!(!s.contains("not cured"), "{s}");
        let s = stdout(&run(&with(&["--velocity", "1m/s", "--angle", "0.01deg"])));
        assert!(!s.contains(" 0 m/s at this angle"), "{s}");
        assert!(
            s.contains("not reachable inside the validity domain"),
            "{s}"
        );
    }

    /// The jetting critical angle of Ti grade 2 on Cu, 0.127 mm, at 900 m/s and 1 deg was
    /// 196.78 deg; at 0 deg the check refused the input instead of the head-on verdict
    /// (Abdelmaola et al., Metals 14 (2024) 342: the head-on centre of such a laser impact weld
    /// stayed unwelded).
    #[test]
    fn titanium_on_copper_at_the_edges() {
        let ti = [
            "check",
            "--flyer",
            "ti-gr2",
            "--parent",
            "cu-c11000",
            "--flyer-thickness",
            "0.127mm",
            "--velocity",
            "900m/s",
            "--convention",
            "normal-to-flyer",
            "--json",
        ];
        let mut a = ti.to_vec();
        a.extend(["--angle", "1deg"]);
        let v: Value = serde_json::from_str(&stdout(&run(&a))).unwrap();
        let crit = v["jetting_critical_angle_deg"].as_f64();
        assert!(crit.is_none_or(|d| (0.0..90.0).contains(&d)), "{crit:?}");
        assert_eq!(v["prediction"], "outside-domain");
        let mut a = ti.to_vec();
        a.extend(["--angle", "0deg", "--process", "laser"]);
        let o = run(&a);
        assert_eq!(o.status.code(), Some(0), "{}", stderr(&o));
        let v: Value = serde_json::from_str(&stdout(&o)).unwrap();
        assert_eq!(v["prediction"], "head-on");
        assert_eq!(v["inside"], false);
        assert!(v["collision_velocity_m_s"].is_null());
        assert!(v["impact_pressure_pa"].as_f64().is_some_and(|p| p > 1e10));
        assert!(v["source"]
            .as_str()
            .is_some_and(|s| s.contains("Abdelmaola")));
        let s = stdout(&run(&with(&["--velocity", "400m/s", "--angle", "0deg"])));
        assert!(s.contains("verdict: NOT WELDED (head-on)"), "{s}");
        // Numerically head-on too.
        let s = stdout(&run(&with(&[
            "--velocity",
            "400m/s",
            "--angle",
            "1e-300deg",
        ])));
        assert!(s.contains("verdict: NOT WELDED (head-on)"), "{s}");
        fails_with(
            &with(&["--collision-velocity", "2km/s", "--angle", "0deg"]),
            &["--collision-velocity", "head-on"],
        );
    }

    /// Plausibility warnings at the point of entry.
    #[test]
    fn implausible_inputs_are_warned_about() {
        let mut a = BASE.to_vec();
        a[6] = "500mm";
        a.extend(["--velocity", "420m/s", "--angle", "11deg"]);
        let s = stdout(&run(&a));
        assert!(s.contains("warning: flyer thickness 500 mm"), "{s}");
        let s = stdout(&run(&with(&[
            "--collision-velocity",
            "60000m/s",
            "--angle",
            "0.2deg",
        ])));
        assert!(
            s.contains("warning: collision-point velocity 60000 m/s"),
            "{s}"
        );
    }

    /// The mixed jetting case is never silent (382 m/s, 5 deg: Vc above the copper's C0, Vf
    /// below the aluminium's).
    #[test]
    fn the_mixed_jetting_case_is_warned_about() {
        let s = stdout(&run(&with(&["--velocity", "382m/s", "--angle", "5deg"])));
        assert!(s.contains("warning: jetting in the mixed regime"), "{s}");
        assert!(s.contains("supersonic-side polar rule"), "{s}");
    }

    /// The pressure limit is scoped by process: off for explosive welding.
    #[test]
    fn the_pressure_limit_follows_the_process() {
        let mut a = with(&["--velocity", "420m/s", "--angle", "11deg", "--json"]);
        let v: Value = serde_json::from_str(&stdout(&run(&a))).unwrap();
        assert!(v["criteria"]
            .as_array()
            .unwrap()
            .iter()
            .any(|c| c["id"] == "pressure-lower"));
        a.extend(["--process", "explosive"]);
        let v: Value = serde_json::from_str(&stdout(&run(&a))).unwrap();
        assert!(v["criteria"]
            .as_array()
            .unwrap()
            .iter()
            .all(|c| c["id"] != "pressure-lower"));
        assert_eq!(v["process"], "explosive");
    }

    /// The melting limit's scale uncertainty is shown beside the limit.
    #[test]
    fn the_melting_scale_uncertainty_is_shown() {
        let s = stdout(&run(&with(&["--velocity", "420m/s", "--angle", "11deg"])));
        assert!(s.contains("if Tm in degC"), "{s}");
    }

    /// A Deribas k that leaves its limit unsatisfiable in the domain is refused.
    #[test]
    fn a_constant_that_empties_the_window_is_refused() {
        fails_with(
            &with(&[
                "--velocity",
                "420m/s",
                "--angle",
                "11deg",
                "--deribas-k",
                "5",
            ]),
            &[
                "--deribas-k",
                "the window is empty",
                "deribas-lower with k = 5",
            ],
        );
    }

    /// --help said the bisector convention had "Vp along the bisector of the collision
    /// angle"; Vp bisects the plates' normals (docs/theory.md §2.1).
    #[test]
    fn help_words_the_bisector_convention_right() {
        let s = stdout(&run(&["check", "--help"]));
        assert!(!s.contains("bisector of the collision angle"), "{s}");
        assert!(s.contains("bisects the normals"), "{s}");
    }
}

/// A probability grid whose nodes times samples would run for hours is refused before any
/// work, naming --samples and the most it may be there.
#[test]
fn probability_requests_of_hours_are_refused() {
    fails_with(
        &[
            "plot",
            "--pair",
            "demo-al6061-on-cu",
            "--probability",
            "--velocity-sd",
            "5%",
            "--samples",
            "1000000",
            "-o",
            "never.svg",
        ],
        &["--samples", "40000 nodes", "give at most 5000"],
    );
    assert!(!std::path::Path::new("never.svg").exists());
}

/// Values far outside any real set-up are refused at their flag instead of overflowing into
/// NaN or a search that never converges; a hash is 64 hex digits; SOURCE_DATE_EPOCH is a
/// non-negative whole number.
#[test]
fn absurd_flag_values_are_refused_at_the_flag() {
    let point = [
        "check",
        "--pair",
        "demo-al6061-on-cu",
        "--velocity",
        "400m/s",
        "--angle",
        "10deg",
    ];
    let with = |extra: &[&'static str]| -> Vec<&'static str> {
        point.iter().copied().chain(extra.iter().copied()).collect()
    };
    fails_with(
        &with(&["--wittman-n", "1e-308"]),
        &["--wittman-n", "below 0.01"],
    );
    fails_with(&with(&["--deribas-k", "1e-9"]), &["--deribas-k", "below"]);
    let sd = run(&with(&["--velocity-sd", "1e308%"]));
    assert_eq!(sd.status.code(), Some(2));
    assert!(stderr(&sd).len() < 400, "{}", stderr(&sd));
    fails_with(
        &[
            "estimate",
            "mpw-tube",
            "--coil",
            "harbourside-coil-42mm",
            "--flyer",
            "aa6061-t6",
            "--flyer-thickness",
            "1mm",
            "--tube-outer-radius",
            "20mm",
            "--standoff",
            "2mm",
            "--charge-voltage",
            "1e-300kV",
            "--machine",
            "harbourside-bank-300uf",
        ],
        &["--charge-voltage", "1 V to 1 MV"],
    );
    fails_with(
        &[
            "pair",
            "observe",
            "demo-al6061-on-cu",
            "--velocity",
            "400m/s",
            "--angle",
            "10deg",
            "--outcome",
            "welded",
            "--source",
            "x",
            "--if-unchanged",
            "abc",
        ],
        &["--if-unchanged", "64 hexadecimal digits"],
    );
    let o = std::process::Command::new(env!("CARGO_BIN_EXE_oblique"))
        .args([
            "report",
            "--pair",
            "demo-al6061-on-cu",
            "--velocity",
            "400m/s",
        ])
        .args(["--angle", "10deg", "-o", "-"])
        .env("SOURCE_DATE_EPOCH", "-5")
        .output()
        .expect("run");
    assert_eq!(o.status.code(), Some(2));
    assert!(stderr(&o).contains("SOURCE_DATE_EPOCH"), "{}", stderr(&o));
    assert!(o.stdout.is_empty());
}
