use super::*;

fn demo() -> PairWindow {
    let lib = oblique_window::Library::load(&[]).expect("library");
    lib.pair("demo-al6061-on-cu").expect("demo").clone()
}

#[test]
fn vc_falls_as_the_angle_rises_and_the_window_is_entered_and_left() {
    let w = demo();
    let t = trade(&TradeRequest {
        window: &w,
        convention: w.convention,
        control: Control::Angle {
            velocity: 450.0,
            from_deg: 2.0,
            to_deg: 30.0,
        },
        steps: 57,
        probability: None,
    })
    .expect("trade");
    assert_eq!(t.rows.len(), 57);
    for p in t.rows.windows(2) {
        assert!(
            p[1].check.evaluation.collision.collision_velocity.si()
                < p[0].check.evaluation.collision.collision_velocity.si()
        );
    }
    let stretches = t.inside_stretches();
    assert_eq!(stretches.len(), 1, "{:?}", t.crossings);
    let (a, b) = stretches[0];
    // check at 450 m/s, 10 deg: melting-upper reached at 6.17 deg, the tip bounce-back
    // boundary at 25.00 deg.
    assert_eq!(a, Some(6.17));
    assert_eq!(b, Some(25.0));
    let text = t.text();
    assert!(
        text.contains(
            "enters the window at a collision angle of 6.17 deg: melting-upper is met there"
        ),
        "{text}"
    );
    assert!(text.contains(oblique_window::present::CAUTION));
    let csv = t.csv();
    assert_eq!(csv.lines().count(), 58);
}

#[test]
fn bad_ranges_and_steps_name_their_flag() {
    let bad = [
        (
            Control::Angle {
                velocity: 400.0,
                from_deg: 5.0,
                to_deg: 5.0,
            },
            10,
            "--angle-range",
            "empty",
        ),
        (
            Control::Angle {
                velocity: 400.0,
                from_deg: 20.0,
                to_deg: 5.0,
            },
            10,
            "--angle-range",
            "reversed",
        ),
        (
            Control::Angle {
                velocity: 400.0,
                from_deg: 0.0,
                to_deg: 5.0,
            },
            10,
            "--angle-range",
            "(0, 90)",
        ),
        (
            Control::Velocity {
                angle_deg: 10.0,
                from: 800.0,
                to: 200.0,
            },
            10,
            "--velocity-range",
            "reversed",
        ),
        (
            Control::Velocity {
                angle_deg: 10.0,
                from: 200.0,
                to: 800.0,
            },
            0,
            "--steps",
            "outside",
        ),
        (
            Control::Velocity {
                angle_deg: 10.0,
                from: 200.0,
                to: 800.0,
            },
            2001,
            "--steps",
            "outside",
        ),
    ];
    for (c, steps, flag, word) in bad {
        let e = validate(&c, steps).expect_err("refused").to_string();
        assert!(e.starts_with(flag) && e.contains(word), "{e}");
    }
}
