//! Tests of `classify` and of the explanation `advice` builds on it (kept apart so that
//! classify.rs stays short and needs nothing of `advice`).

use super::*;
use crate::advice::*;

mod basic {
    use super::*;
    use crate::library::Library;
    use oblique_core::units::{Angle, Velocity};

    fn demo() -> PairWindow {
        Library::load(&[])
            .expect("built-in library")
            .pair("demo-al6061-on-cu")
            .expect("demo pair")
            .clone()
    }

    fn at(w: &PairWindow, v: f64, deg: f64) -> Classification {
        let setup = w.setup().expect("setup");
        let c = Collision::from_impact(
            w.convention,
            Velocity::from_m_s(v),
            Angle::from_degrees(deg),
        )
        .expect("collision");
        classify_explained(w, &setup, &c).expect("classifies")
    }

    #[test]
    fn predictions_on_the_demo_window() {
        let w = demo();
        let inside = at(&w, 450.0, 10.0);
        assert!(inside.inside);
        assert_eq!(inside.prediction, Prediction::Welded);
        assert_eq!(inside.binding, Some(LimitRef::Boundary(0)));
        assert!(inside.reason.starts_with("inside the window"));

        let slow = at(&w, 300.0, 10.0);
        assert_eq!(slow.prediction, Prediction::NotWelded);
        assert!(slow
            .failing
            .contains(&LimitRef::Criterion(CriterionId::StrengthLower)));
        assert!(slow.failing.contains(&LimitRef::Boundary(0)));

        // Only the melting ceiling fails: predicted melted.
        let hot = at(&w, 650.0, 9.0);
        assert_eq!(hot.prediction, Prediction::Melted);
        assert_eq!(
            hot.failing,
            vec![LimitRef::Criterion(CriterionId::MeltingUpper)]
        );
    }

    #[test]
    fn a_boundary_that_does_not_span_the_point_is_flagged_not_extrapolated() {
        let w = demo();
        let c = at(&w, 700.0, 20.0);
        assert!(c.outside_trial_data);
        assert!(!c.boundaries[1].in_range);
        assert!(!c.failing.contains(&LimitRef::Boundary(1)));
        assert!(c.reason.contains("outside the trial data"));
    }

    #[test]
    fn another_convention_is_converted_keeping_the_geometry() {
        let w = demo();
        let setup = w.setup().expect("setup");
        let nf = Collision::from_impact(
            w.convention,
            Velocity::from_m_s(450.0),
            Angle::from_degrees(10.0),
        )
        .expect("collision");
        let bis = nf.with_convention(oblique_core::Convention::Bisector);
        let a = classify(&w, &setup, &nf).expect("classifies");
        let b = classify(&w, &setup, &bis).expect("classifies");
        assert_eq!(a.inside, b.inside);
        assert!(
            (a.evaluation.collision.impact_velocity.si()
                - b.evaluation.collision.impact_velocity.si())
            .abs()
                < 1e-9
        );
    }

    #[test]
    fn agreement_on_the_demo_window() {
        let a = crate::agreement::agreement(&demo()).expect("agreement");
        assert_eq!(a.observations, 16);
        // Shot 10 (450 m/s at 3 deg: Vc = 8.6 km/s, 2.2 C0 of the copper) lies outside the
        // validity domain: neither agreement nor disagreement.
        assert_eq!(a.agreeing, 13);
        assert_eq!(
            a.outside_domain.iter().map(|o| o.index).collect::<Vec<_>>(),
            vec![9]
        );
        assert!(a.outside_domain[0].exits.contains("Vc / C0 of the parent"));
        let idx: Vec<usize> = a.disagreements.iter().map(|d| d.index).collect();
        assert_eq!(idx, vec![10, 13]);
        assert!(a.disagreements[1]
            .misjudged_by
            .iter()
            .any(|m| m == "deribas-lower"));
        assert_eq!(
            a.table["welded"]["partial"], 1,
            "the partial shot near the edge agrees"
        );
        assert_eq!(a.table["melted"]["melted"], 1);
    }
}

/// The findings of issue 14 at the edges of the physics, each a test that failed before.
mod edge_tests {
    use super::*;
    use crate::library::Library;
    use oblique_core::units::Length;
    use proptest::prelude::*;
    use std::sync::OnceLock;

    fn lib() -> &'static Library {
        static L: OnceLock<Library> = OnceLock::new();
        L.get_or_init(|| Library::load(&[]).expect("built-in library"))
    }

    /// `check --flyer aa6061-t6 --parent cu-c11000 --flyer-thickness 1mm --convention
    /// normal-to-flyer`, as the issue ran it.
    fn al_on_cu() -> PairWindow {
        lib()
            .ad_hoc_window(
                "aa6061-t6",
                "cu-c11000",
                Length::from_m(1e-3),
                None,
                Convention::NormalToFlyer,
                None,
            )
            .expect("materials")
    }

    fn explained(w: &PairWindow, v: f64, deg: f64) -> Classification {
        let c = Collision::from_impact(
            w.convention,
            Velocity::from_m_s(v),
            Angle::from_degrees(deg),
        )
        .expect("collision");
        classify_explained(w, &w.setup().expect("setup"), &c).expect("classifies")
    }

    fn all_text(w: &PairWindow, c: &Classification) -> String {
        let mut t = c.reason.clone();
        for (l, _) in &c.headroom {
            t.push_str(&limit_advice(w, c, l));
        }
        t.push_str(&inside_stretch_text(c).unwrap_or_default());
        t
    }

    /// Issue 14: at 89.9 deg the point was "INSIDE" and the window's span ran "5.95 to
    /// 89.75 deg". Now it is outside the validity domain and no span reaches past 30 deg.
    #[test]
    fn a_steep_angle_is_outside_the_domain_and_no_span_reaches_it() {
        let w = al_on_cu();
        let c = explained(&w, 420.0, 89.9);
        assert!(!c.inside);
        assert_eq!(c.prediction, Prediction::OutsideDomain);
        assert!(
            c.reason.starts_with(
                "outside the validity domain: collision angle 89.9 deg is above 30 deg"
            ),
            "{}",
            c.reason
        );
        let ok = explained(&w, 420.0, 11.0);
        assert!(ok.inside, "{}", ok.reason);
        let (lo, hi) = ok
            .inside_stretch
            .as_ref()
            .and_then(|s| s.angle_deg)
            .expect("span");
        assert!(hi <= 30.0 && lo > 0.0, "{lo} {hi}");
        assert!(!inside_stretch_text(&ok)
            .unwrap_or_default()
            .contains("89.75"));
    }

    /// Issue 14: at 35000 m/s and 12 deg the melting limit was "not cured by changing the
    /// impact velocity or the angle alone" although the window at 12 deg spans 372-595 m/s
    /// (the search covered only Vp/20 to 20 Vp). Now the searches cover the validity domain.
    #[test]
    fn advice_covers_the_whole_domain() {
        let w = al_on_cu();
        let c = explained(&w, 35_000.0, 12.0);
        assert_eq!(c.prediction, Prediction::OutsideDomain);
        let melt = c
            .headroom
            .iter()
            .find(|(l, _)| *l == LimitRef::Criterion(CriterionId::MeltingUpper))
            .expect("melting")
            .1;
        let v = melt.velocity_m_s.expect("reachable along the velocity");
        assert!((550.0..650.0).contains(&v), "{v}");
        let (a, b) = c
            .inside_stretch
            .as_ref()
            .and_then(|s| s.velocity_m_s)
            .expect("the window at 12 deg");
        assert!(
            (340.0..400.0).contains(&a) && (550.0..650.0).contains(&b),
            "{a} {b}"
        );
        let text = all_text(&w, &c);
        assert!(!text.contains("not cured"), "{text}");
        assert!(text.contains("the impact velocity must fall by"), "{text}");
    }

    /// Issue 14: at 1 m/s and 0.01 deg the advice was "lower the impact velocity to 0 m/s".
    #[test]
    fn no_advice_leads_out_of_the_domain() {
        let w = al_on_cu();
        let c = explained(&w, 1.0, 0.01);
        assert_eq!(c.prediction, Prediction::OutsideDomain);
        let text = all_text(&w, &c);
        assert!(!text.contains(" 0 m/s"), "{text}");
        assert!(
            text.contains("not reachable inside the validity domain"),
            "{text}"
        );
        for (_, h) in &c.headroom {
            assert!(h.velocity_m_s.is_none_or(|v| v >= 50.0), "{h:?}");
        }
    }

    /// Issue 14: a Deribas k of 6 in a pair file was accepted (beta_min = 93 deg: an empty
    /// window). Now the file is refused with the reason.
    #[test]
    fn constants_that_empty_the_window_are_refused() {
        let text = r#"(
    format: "oblique-window/1",
    name: "k6",
    flyer: "aa6061-t6",
    parent: "cu-c11000",
    flyer_thickness: "1 mm",
    convention: "normal-to-flyer",
    maintainer: "test",
    criteria: (deribas_lower: (k: 6.0, reason: "a typo")),
)"#;
        let origin = crate::pair::Origin {
            display: "k6.ron".into(),
            path: None,
            sha256: String::new(),
        };
        let e = crate::pair::parse_pair_file(origin.clone(), text, &lib().materials)
            .expect_err("an empty window is refused");
        let msg = e.to_string();
        assert!(msg.contains("criteria.deribas_lower.k"), "{msg}");
        assert!(msg.contains("the window is empty"), "{msg}");
        assert!(
            msg.contains("deribas-lower with k = 6 fails at every point"),
            "{msg}"
        );
        // k = 1.2, the top of the published range, is fine.
        let ok = text.replace("6.0", "1.2");
        crate::pair::parse_pair_file(origin, &ok, &lib().materials).expect("k 1.2 loads");
    }

    fn parse(text: &str) -> Result<PairWindow, String> {
        let origin = crate::pair::Origin {
            display: "p.ron".into(),
            path: None,
            sha256: String::new(),
        };
        crate::pair::parse_pair_file(origin, text, &lib().materials)
            .map(|(_, w)| w)
            .map_err(|e| e.to_string())
    }

    const HEAD: &str = r#"(
    format: "oblique-window/1",
    name: "p",
    flyer: "aa6061-t6",
    parent: "cu-c11000",
    flyer_thickness: "1 mm",
    convention: "normal-to-flyer",
    maintainer: "test","#;

    /// The mixed jetting rule is chosen in the pair file; a rule other than the default needs
    /// a reason, an unknown one is refused at its field.
    #[test]
    fn the_mixed_rule_is_selectable_in_a_pair_file() {
        let polar = parse(&format!("{HEAD}\n)")).expect("defaults");
        assert_eq!(
            polar.criteria.mixed_jetting,
            oblique_core::MixedRule::SupersonicSidePolar
        );
        let either = parse(&format!(
            "{HEAD}\n criteria: (jetting: (mixed: \"either-subsonic\", reason: \"trials S-3\")),\n)"
        ))
        .expect("either-subsonic with a reason");
        assert_eq!(
            either.criteria.mixed_jetting,
            oblique_core::MixedRule::EitherSubsonic
        );
        // In the mixed case the two rules differ: 382 m/s at 2 deg (Vc 10.9 km/s, both
        // supersonic) is not mixed; 382 m/s at 5 deg is (Vc 4383 m/s > C0 Cu, Vf < C0 Al).
        let a = explained(&polar, 382.0, 5.0);
        let b = explained(&either, 382.0, 5.0);
        assert!(a.evaluation.jetting.critical_angle.degrees() > 0.0);
        assert_eq!(b.evaluation.jetting.critical_angle.degrees(), 0.0);
        let e = parse(&format!(
            "{HEAD}\n criteria: (jetting: (mixed: \"either-subsonic\")),\n)"
        ))
        .expect_err("no reason");
        assert!(
            e.contains("criteria.jetting") && e.contains("gives no reason"),
            "{e}"
        );
        let e = parse(&format!(
            "{HEAD}\n criteria: (jetting: (mixed: \"either-subsonic\", reason: \"   \")),\n)"
        ))
        .expect_err("blank reason");
        assert!(
            e.contains("criteria.jetting") && e.contains("its reason is blank"),
            "{e}"
        );
        let e = parse(&format!(
            "{HEAD}\n criteria: (jetting: (mixed: \"always\", reason: \"x\")),\n)"
        ))
        .expect_err("unknown rule");
        assert!(
            e.contains("criteria.jetting.mixed") && e.contains("unknown rule"),
            "{e}"
        );
    }

    /// The pressure limit follows the window's process: on for magnetic pulse welding (its
    /// source), off for explosive welding; switching it against that default needs a reason.
    #[test]
    fn the_pressure_limit_is_scoped_by_process() {
        let mpw = parse(&format!("{HEAD}\n process: \"magnetic-pulse\",\n)")).expect("mpw");
        assert!(mpw.criteria.pressure_enabled);
        let ex = parse(&format!("{HEAD}\n process: \"explosive\",\n)")).expect("explosive");
        assert!(!ex.criteria.pressure_enabled);
        let none = parse(&format!("{HEAD}\n)")).expect("no process");
        assert!(none.criteria.pressure_enabled);
        let e = parse(&format!(
            "{HEAD}\n process: \"explosive\",\n criteria: (pressure_lower: (enabled: true)),\n)"
        ))
        .expect_err("on for explosive welding without a reason");
        assert!(e.contains("pressure_lower differs from the default"), "{e}");
        let e = parse(&format!("{HEAD}\n process: \"welding\",\n)")).expect_err("unknown");
        assert!(e.contains("unknown process 'welding'"), "{e}");
    }

    /// Wittman form B has no source: every result with it says so.
    #[test]
    fn form_b_is_marked_unsourced() {
        let w = parse(&format!(
            "{HEAD}\n criteria: (melting_upper: (form: \"b\", reason: \"comparison\")),\n)"
        ))
        .expect("form b with a reason");
        let c = explained(&w, 420.0, 11.0);
        assert!(
            c.warnings
                .iter()
                .any(|x| x.contains("form B, for which no source was found")),
            "{:?}",
            c.warnings
        );
        assert!(CriterionId::MeltingUpper
            .source()
            .contains("form B: no source found"));
    }

    /// Inputs no practitioner would type are warned about (issue 14: a 500 mm flyer, Vc of
    /// 60 000 m/s at 0.2 deg).
    #[test]
    fn implausible_inputs_are_warned_about() {
        let mut w = al_on_cu();
        w.flyer_thickness = Length::from_m(0.5);
        let c = explained(&w, 420.0, 11.0);
        assert!(
            c.warnings
                .iter()
                .any(|x| x.contains("flyer thickness 500 mm")),
            "{:?}",
            c.warnings
        );
        let w = al_on_cu();
        let c = explained(&w, 60_000.0 * 0.2f64.to_radians().sin(), 0.2);
        assert!(
            c.warnings
                .iter()
                .any(|x| x.contains("collision-point velocity 60000 m/s")),
            "{:?}",
            c.warnings
        );
    }

    /// Issue 14: at 382 m/s and 5 deg on Al 6061 on Cu, Vc = 4383 m/s is above the parent's
    /// C0 while Vf is below the flyer's: the mixed case is never silent.
    #[test]
    fn the_mixed_jetting_case_is_never_silent() {
        let w = al_on_cu();
        let c = explained(&w, 382.0, 5.0);
        assert!(c.evaluation.jetting.is_mixed());
        assert!(
            c.warnings.iter().any(|x| x.contains("mixed regime")),
            "{:?}",
            c.warnings
        );
        // A fully subsonic point has no such warning.
        let c = explained(&w, 300.0, 15.0);
        assert!(!c.evaluation.jetting.any_supersonic());
        assert!(
            c.warnings.iter().all(|x| !x.contains("supersonic")),
            "{:?}",
            c.warnings
        );
    }

    /// The head-on impact gives its own verdict (not welded), not an error.
    #[test]
    fn head_on_is_not_welded() {
        let w = lib()
            .ad_hoc_window(
                "ti-gr2",
                "cu-c11000",
                Length::from_m(0.127e-3),
                None,
                Convention::NormalToFlyer,
                Some("laser"),
            )
            .expect("materials");
        let h = classify_head_on(&w, &w.setup().expect("setup"), 900.0).expect("head-on");
        assert!(h.impact.pressure.gpa() > 10.0);
        assert!(HEAD_ON_REASON.starts_with("not welded"));
    }

    proptest! {
        #![proptest_config(ProptestConfig::with_cases(300))]
        /// No verdict is "inside" outside the validity domain, over the whole input range the
        /// command line accepts (and beyond the domain on every axis), every convention.
        #[test]
        fn nothing_is_inside_outside_the_domain(
            lv in -3.0f64..5.0, deg in 1e-6f64..89.99, k in 0usize..3, lh in -6.0f64..0.0,
        ) {
            let mut w = al_on_cu();
            w.convention = Convention::ALL[k];
            w.flyer_thickness = Length::from_m(10f64.powf(lh));
            let setup = w.setup().expect("setup");
            let col = Collision::from_impact(w.convention, Velocity::from_m_s(10f64.powf(lv)), Angle::from_degrees(deg)).expect("collision");
            let c = classify(&w, &setup, &col).expect("classifies");
            let in_domain = w.domain.contains(&setup, &col);
            prop_assert_eq!(in_domain, c.domain.inside());
            if !in_domain {
                prop_assert!(!c.inside);
                prop_assert_eq!(c.prediction, Prediction::OutsideDomain);
            }
            if c.inside {
                prop_assert!(in_domain);
                prop_assert_eq!(c.prediction, Prediction::Welded);
            }
            // The jetting critical angle is always physical.
            let j = c.evaluation.jetting;
            prop_assert!(j.none_below_90 || j.critical_angle.degrees() < 90.0);
        }
    }
}
