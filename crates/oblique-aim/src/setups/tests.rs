use super::*;

fn demo() -> PairWindow {
    let lib = oblique_window::Library::load(&[]).expect("library");
    lib.pair("demo-al6061-on-cu").expect("demo").clone()
}

fn search_of(w: &PairWindow) -> SetupSearch<'_> {
    SetupSearch {
        window: w,
        bank: BankRequest::machine("harbourside-bank-300uf"),
        coils: CoilFamily {
            file: None,
            bore: Some(Grid::List(vec![21e-3])),
            length: Some(Grid::Range(20e-3, 60e-3)),
            extra_inductance: Some(20e-9),
        },
        tube_outer_radius: 20e-3,
        charge: ChargeGrid::Voltages(Grid::Range(6e3, 14e3)),
        standoffs: Grid::Range(1e-3, 3e-3),
        chamfers: Grid::Range(4f64.to_radians(), 16f64.to_radians()),
        steps: 5,
        efficiency: None,
        max_current: Some(500e3),
        max_energy: None,
        integration: Integration::default(),
        velocity_sd: None,
        angle_sd_deg: None,
        model: true,
        samples: Some(128),
        seed: 1,
        top: 5,
        window_from_file: true,
    }
}

#[test]
fn every_listed_set_up_respects_the_rating_and_matches_a_single_estimate() {
    let w = demo();
    let catalog = Catalog::builtin().expect("catalog");
    let s = search_of(&w);
    let r = search(&catalog, &s).expect("search");
    assert!(!r.ranked.is_empty(), "{:?}", r.left_out);
    // 14 kV is above the bank's 12 kV rating: left out, never listed.
    assert!(r.left_out.above_voltage > 0);
    for x in &r.ranked {
        assert!(x.voltage <= 12e3 && x.peak_current <= 500e3);
        assert!(x.check.inside);
        let req = estimate_request(&s, x);
        let est = resolve_estimate(&catalog, &req, &mut Vec::new())
            .expect("resolves")
            .estimate()
            .expect("runs");
        assert_eq!(est.impact_velocity().map(|v| v.si()), Some(x.velocity));
    }
    for p in r.ranked.windows(2) {
        assert!(!p[1].room.better_than(&p[0].room));
    }
}
