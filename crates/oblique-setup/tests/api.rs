//! The library's API on the built-in INVENTED demo files (bank `harbourside-bank-300uf`, coil
//! `harbourside-coil-42mm`, pair `demo-al6061-on-cu`): resolution and provenance, errors naming
//! their field, a sweep against single estimates, a calibration stored and used again.

use oblique_core::process::{estimate, PulseSetup, TubeSetup, Workpiece};
use oblique_core::units::{Angle, Capacitance, Length, Velocity, Voltage};
use oblique_setup::{
    calibrate, estimate_explosive, resolve_estimate, run_sweep, AngleGrid, BankRequest,
    CalibrationRequest, Catalog, Charge, ChargeGrid, EstimateRequest, ExplosiveRequest, Grid,
    Integration, MagneticRequest, Provenance, SetupError, SweepRequest, TubeRequest,
};
use oblique_window::machine::Machines;
use oblique_window::Library;

const BANK: &str = "harbourside-bank-300uf";
const COIL: &str = "harbourside-coil-42mm";

fn tube() -> TubeRequest {
    TubeRequest {
        bank: BankRequest::machine(BANK),
        coil: Some(COIL.into()),
        flyer: Some("aa6061-t6".into()),
        flyer_thickness: Some(Length::from_m(1e-3)),
        tube_outer_radius: Some(Length::from_m(20e-3)),
        ..TubeRequest::default()
    }
}

fn request(t: TubeRequest, kv: f64, mm: f64) -> EstimateRequest {
    EstimateRequest::new(
        MagneticRequest::Tube(t),
        Charge::Voltage(Voltage::from_v(kv * 1e3)),
        Length::from_m(mm * 1e-3),
    )
}

#[test]
fn the_resolved_set_up_is_the_one_built_from_the_files_by_hand() {
    let catalog = Catalog::builtin().expect("built-in library");
    let mut notes = Vec::new();
    let setup = resolve_estimate(&catalog, &request(tube(), 8.0, 2.0), &mut notes).expect("set-up");
    assert!(notes.is_empty());
    // The same set-up assembled directly from the machine specs and the material.
    let (_, bank) = catalog.machines.bank(BANK).expect("bank");
    let (_, coil) = catalog.machines.compression_coil(COIL).expect("coil");
    let al = catalog.library.material("aa6061-t6").expect("material");
    let by_hand = PulseSetup::Tube(TubeSetup {
        bank: bank.bank(),
        coil: coil.coil(),
        tube: oblique_core::process::Tube {
            outer_radius: Length::from_m(20e-3),
            wall_thickness: Length::from_m(1e-3),
            material: Workpiece::from_material(&al.material).expect("workpiece"),
        },
        standoff: Length::from_m(2e-3),
        charging_voltage: Voltage::from_v(8e3),
        efficiency: 1.0,
    });
    assert_eq!(setup.setup, by_hand);
    // Provenance: file values name the file, given ones the field, the efficiency its default.
    let from = |key: &str| setup.inputs.get(key).expect(key).from.clone();
    assert!(matches!(from("capacitance_f"), Provenance::File { name, .. } if name == BANK));
    assert!(
        matches!(from("coil_extra_inductance_h"), Provenance::File { name, .. } if name == COIL)
    );
    assert_eq!(from("flyer").to_string(), "flag --flyer");
    assert!(matches!(from("flyer_density_kg_m3"), Provenance::Material(id) if id == "aa6061-t6"));
    assert_eq!(from("efficiency").to_string(), "default 1, uncalibrated");
    assert!(setup.inputs.uncalibrated());
    // Running it gives what the core gives for the hand-built set-up.
    let direct = estimate(&by_hand, &setup.options).expect("core estimate");
    let report = setup.run().expect("estimate");
    assert_eq!(report.estimate.outcome, direct.outcome);
    assert!(report.check.is_none(), "no window named");
}

#[test]
fn given_values_override_the_file_and_missing_ones_name_their_field() {
    let catalog = Catalog::builtin().expect("built-in library");
    let mut t = tube();
    t.bank.capacitance = Some(Capacitance::from_f(250e-6));
    let s = resolve_estimate(&catalog, &request(t, 8.0, 2.0), &mut Vec::new()).expect("set-up");
    assert_eq!(
        s.inputs.get("capacitance_f").expect("c").from.to_string(),
        format!("flag --capacitance (overrides {BANK})")
    );
    let mut t = tube();
    t.bank = BankRequest::default();
    let e =
        resolve_estimate(&catalog, &request(t, 8.0, 2.0), &mut Vec::new()).expect_err("no bank");
    assert!(matches!(
        e,
        SetupError::Missing {
            field: "--capacitance",
            ..
        }
    ));
    assert!(e.is_input());
    assert_eq!(
        e.to_string(),
        "--capacitance is required here (bank capacitance): give it, or name a bank file with --machine"
    );
    let e = resolve_estimate(&catalog, &request(tube(), 13.0, 2.0), &mut Vec::new())
        .expect_err("above the rating");
    assert_eq!(e.field(), Some("--charge-voltage"));
    assert!(e
        .to_string()
        .contains("exceeds the bank's rated voltage 12 kV"));
}

#[test]
fn a_sweep_gives_the_single_estimates_and_ranks_by_headroom() {
    let catalog = Catalog::builtin().expect("built-in library");
    let mut t = tube();
    t.flyer = None;
    t.flyer_thickness = None;
    let req = SweepRequest {
        process: MagneticRequest::Tube(t.clone()),
        charge: ChargeGrid::Voltages(Grid::Range(6e3, 10e3)),
        steps: 3,
        standoffs: Grid::List(vec![1e-3, 2e-3]),
        standoff_steps: 5,
        angles: Some(AngleGrid::Same(Angle::from_degrees(8.0))),
        pair: Some("demo-al6061-on-cu".into()),
        efficiency: None,
        integration: Integration::default(),
        threads: None,
    };
    let r = run_sweep(&catalog, &req, &mut Vec::new()).expect("sweep");
    assert_eq!(r.settings.len(), 6);
    for s in &r.settings {
        let mut single = request(
            t.clone(),
            r.grid.voltages[s.voltage_index] / 1e3,
            r.grid.standoffs[s.standoff_index] * 1e3,
        );
        single.pair = Some("demo-al6061-on-cu".into());
        let one = resolve_estimate(&catalog, &single, &mut Vec::new())
            .and_then(|x| x.run())
            .expect("single estimate");
        let (a, b) = (
            r.velocity(s).expect("impact"),
            one.estimate.impact_velocity().expect("impact").si(),
        );
        assert!((a / b - 1.0).abs() < 1e-12, "{a} vs {b}");
    }
    let headroom: Vec<f64> = r
        .inside_ranked()
        .map(|s| {
            assert!(s.inside());
            s.relative_headroom(r.velocity(s).expect("impact"))
        })
        .collect();
    assert!(headroom.windows(2).all(|w| w[0] >= w[1]), "{headroom:?}");
    // A window check without angles is refused, naming the field.
    let e = run_sweep(
        &catalog,
        &SweepRequest {
            angles: None,
            ..req
        },
        &mut Vec::new(),
    )
    .expect_err("no angle");
    assert_eq!(e.field(), Some("--angle"));
}

/// Gurney's open-faced sandwich, V / sqrt(2E) = [((1 + 2r)^3 + 1) / (6 (1 + r)) + r]^(-1/2)
/// with r = M/C (Gurney 1943; the form as in Cooper, Explosives Engineering, 1996, from
/// memory): r = 2 gives exactly 1/3.
#[test]
fn an_explosive_set_up_from_values() {
    let catalog = Catalog::builtin().expect("built-in library");
    let r = estimate_explosive(
        &catalog,
        &ExplosiveRequest {
            gurney_velocity: Some(Velocity::from_m_s(1500.0)),
            detonation_velocity: Some(Velocity::from_m_s(2500.0)),
            mass_ratio: Some(2.0),
            preset_angle: Some(Angle::from_degrees(0.0)),
            ..ExplosiveRequest::default()
        },
    )
    .expect("estimate");
    assert!((r.estimate.impact_velocity.si() - 500.0).abs() < 1e-9);
    let e = estimate_explosive(&catalog, &ExplosiveRequest::default()).expect_err("nothing given");
    assert_eq!(e.field(), Some("--gurney-velocity"));
}

#[test]
fn a_calibration_is_stored_in_a_user_bank_and_used_by_the_next_estimate() {
    let dir = tempfile::tempdir().expect("temp dir");
    let text = oblique_window::machine::builtin_text(BANK)
        .expect("built-in text")
        .replace(&format!("name: \"{BANK}\""), "name: \"shop-bank\"");
    std::fs::create_dir_all(dir.path().join("machines")).expect("folder");
    std::fs::write(dir.path().join("machines/shop-bank.ron"), text).expect("write");
    let dirs = vec![dir.path().to_path_buf()];
    let load = || {
        Catalog::new(
            Library::load(&dirs).expect("library"),
            Machines::load(&dirs).expect("machines"),
        )
    };
    let mut t = tube();
    t.bank = BankRequest::machine("shop-bank");
    let catalog = load();
    // The measured velocity is the model's at eta = 0.7: the fit must find 0.7 again.
    let mut at = request(t.clone(), 8.0, 2.5);
    at.efficiency = Some(0.7);
    let v07 = resolve_estimate(&catalog, &at, &mut Vec::new())
        .and_then(|s| s.run())
        .expect("estimate")
        .estimate
        .impact_velocity()
        .expect("impact");
    let cal = CalibrationRequest {
        process: MagneticRequest::Tube(t.clone()),
        charge: Charge::Voltage(Voltage::from_v(8e3)),
        standoff: Length::from_m(2.5e-3),
        measured_velocity: v07,
        velocity_uncertainty: Some(0.03),
        source: "constructed in a test (invented)".into(),
        date: "2026-12-01".into(),
        save: true,
        pair: None,
        integration: Integration::default(),
    };
    let fit = calibrate(&catalog, &cal, &mut Vec::new()).expect("fit");
    assert!(
        (fit.fit.efficiency - 0.7).abs() < 1e-6,
        "{}",
        fit.fit.efficiency
    );
    assert_eq!(fit.entry().model, "mpw-tube");
    fit.save().expect("saved");
    let catalog = load();
    let s = resolve_estimate(&catalog, &request(t, 8.0, 2.5), &mut Vec::new()).expect("set-up");
    assert!(matches!(
        s.inputs.get("efficiency").expect("eta").from,
        Provenance::Calibration(_)
    ));
    // The calibration shot's own spread (3 %) is the velocity spread of estimates that use it.
    let (spread, basis) = oblique_setup::uncertainty::velocity_spread(&s.inputs);
    assert!((spread - 0.03).abs() < 1e-12, "{spread} {basis}");
    assert!(basis.contains("its calibration shot"), "{basis}");
    // A built-in bank is read-only, refused before the fit.
    let e = calibrate(
        &Catalog::builtin().expect("built-in library"),
        &CalibrationRequest {
            process: MagneticRequest::Tube(tube()),
            ..cal
        },
        &mut Vec::new(),
    )
    .expect_err("read-only");
    assert_eq!(e.field(), Some("--save"));
}
