//! Tests of the parent module.

use super::*;
use crate::process::circuit::RlcCircuit;
use crate::units::Capacitance;
use approx::assert_relative_eq;
use proptest::prelude::*;

/// Aluminium alloy 6061-T6 as the tests use it. Density 2700 kg/m^3 (Marsh 1980, as in
/// `physics-notes.md` §2); flow stress 276 MPa (the Y0 quoted from Kore et al. 2010 in
/// `physics-notes.md` §4); conductivity 2.5e7 S/m (about 43 %IACS, from memory).
pub(crate) fn al6061() -> Workpiece {
    Workpiece::new(
        Density::from_kg_m3(2700.0),
        Pressure::from_pa(276e6),
        ElectricalConductivity::from_s_m(2.5e7),
    )
    .expect("valid")
}

/// A plausible bank invented for the tests: 300 uF rated 12 kV, 40 nH, 4 mohm.
pub(crate) fn bank() -> CapacitorBank {
    CapacitorBank::new(
        Capacitance::from_f(300e-6),
        Some(Voltage::from_v(12e3)),
        Inductance::from_h(40e-9),
        Resistance::from_ohm(4e-3),
    )
    .expect("valid")
}

/// A plausible tube set-up invented for the tests (numbers not from any one paper): the
/// bank above at 8 kV (9.6 kJ), a single-turn coil of 21 mm bore radius and 20 mm length
/// with 20 nH of terminals and leads, an Al 6061-T6 tube of 20 mm outer radius and 1 mm wall, 2.5 mm
/// standoff.
pub(crate) fn tube_setup() -> TubeSetup {
    TubeSetup::new(
        bank(),
        CompressionCoil {
            bore_radius: Length::from_m(21e-3),
            length: Length::from_m(20e-3),
            extra_inductance: Inductance::from_h(20e-9),
        },
        Tube {
            outer_radius: Length::from_m(20e-3),
            wall_thickness: Length::from_m(1e-3),
            material: al6061(),
        },
        Length::from_m(2.5e-3),
        Voltage::from_v(8e3),
    )
    .expect("valid")
}

/// A plausible sheet set-up invented for the tests: the bank above at 6 kV (5.4 kJ), a bar
/// coil 100 mm long and 20 mm wide with 20 nH of return conductor and leads, 0.5 mm insulation gap, a 1 mm
/// Al 6061-T6 sheet, 2 mm standoff.
pub(crate) fn sheet_setup() -> SheetSetup {
    SheetSetup::new(
        bank(),
        BarCoil {
            length: Length::from_m(0.1),
            width: Length::from_m(20e-3),
            extra_inductance: Inductance::from_h(20e-9),
        },
        Sheet {
            thickness: Length::from_m(1e-3),
            material: al6061(),
        },
        Length::from_m(0.5e-3),
        Length::from_m(2e-3),
        Voltage::from_v(6e3),
    )
    .expect("valid")
}

/// With the wall held still (a flow stress far above any magnetic pressure, so it never
/// yields), the integrated current must match the closed-form damped RLC discharge
/// (elementary circuit theory, `physics-notes.md` §6) with L = L_fixed + L_gap(0), to
/// 0.1 % of the peak over the first period.
#[test]
fn held_wall_reproduces_the_closed_form_discharge() {
    let s = tube_setup();
    let plant = Plant::tube(&s).unwrap().held();
    let run = run(&plant, &[s.standoff.si()], &IntegrationOptions::default()).unwrap();
    assert!(matches!(
        run.outcomes[0],
        ImpactOutcome::NoImpact {
            reason: NoImpactReason::NeverMoved,
            ..
        }
    ));
    let l0 = s.bank.inductance.si() + s.coil.extra_inductance.si() + s.gap_inductance().si();
    assert_relative_eq!(plant.inductance(0.0), l0, max_relative = 1e-12);
    let circuit = RlcCircuit::new(
        s.bank.capacitance,
        Inductance::from_h(l0),
        s.bank.resistance,
    )
    .unwrap();
    let period = circuit.ring_period().unwrap().si();
    let peak = circuit.first_peak(s.charging_voltage).unwrap().1.si();
    let mut worst: f64 = 0.0;
    let mut n = 0;
    for sample in run.history.iter().filter(|x| x.time.si() <= period) {
        let exact = circuit
            .current(s.charging_voltage, sample.time)
            .unwrap()
            .si();
        worst = worst.max((sample.current.si() - exact).abs() / peak);
        n += 1;
    }
    assert!(n >= 400, "{n} samples");
    assert!(worst < 1e-3, "worst relative deviation {worst}");
    assert_relative_eq!(run.peak_current, peak, max_relative = 1e-3);
    assert!(plant.energy_balance(&run.final_state).relative_error < 1e-6);
}

/// A flow stress far above any magnetic pressure: the wall never moves, and the run stops
/// at once (the rigorous energy bound of `cannot_restart`).
#[test]
fn immovable_wall_never_moves() {
    let mut s = tube_setup();
    s.tube.material.flow_stress = Pressure::from_pa(1e15);
    let est = s.estimate(&IntegrationOptions::default()).unwrap();
    assert!(matches!(
        est.outcome,
        ImpactOutcome::NoImpact {
            reason: NoImpactReason::NeverMoved,
            ..
        }
    ));
    assert!(est.energy.relative_error < 1e-6);
}

/// Energy bookkeeping closes to 1 % over the whole pulse for the tube: to impact, and over
/// the full window when the wall stops short (standoff beyond reach at low voltage).
#[test]
fn tube_energy_balance_closes() {
    let s = tube_setup();
    let est = s.estimate(&IntegrationOptions::default()).unwrap();
    assert!(est.impact_velocity().is_some());
    let e = est.energy;
    assert!(e.relative_error < 0.01, "{e:?}");
    assert!(e.kinetic.si() > 0.0 && e.plastic.si() > 0.0 && e.withheld.si() > 0.0);
    assert!(e.resistive.si() > 0.0);
    // Plastic work equals the hoop-strain work 2 pi l h0 r0 sigma_y ln(r0 / (r0 - g))
    // (derived in the module documentation).
    let (r0, h0, l) = (20e-3, 1e-3, 20e-3);
    let wp = 2.0 * PI * l * h0 * r0 * 276e6 * (r0 / (r0 - 2.5e-3)).ln();
    assert_relative_eq!(e.plastic.si(), wp, max_relative = 1e-6);

    let mut weak = s;
    weak.charging_voltage = Voltage::from_v(1.5e3);
    weak.standoff = Length::from_m(10e-3);
    let est = weak.estimate(&IntegrationOptions::default()).unwrap();
    assert!(est.impact_velocity().is_none(), "{:?}", est.outcome);
    assert!(est.energy.relative_error < 0.01, "{:?}", est.energy);
}

/// Energy bookkeeping closes to 1 % over the whole pulse for the sheet.
#[test]
fn sheet_energy_balance_closes() {
    let est = sheet_setup()
        .estimate(&IntegrationOptions::default())
        .unwrap();
    assert!(est.impact_velocity().is_some(), "{:?}", est.outcome);
    assert!(est.energy.relative_error < 0.01, "{:?}", est.energy);
    assert_eq!(est.energy.plastic.si(), 0.0);
}

/// Order of magnitude against the published range: magnetic pulse collision speeds are
/// usually 200-500 m/s for 5-20 kJ on about 1 mm aluminium over a few mm (review in
/// Proc. IMechE Part B, 2021, as recorded in `physics-notes.md` §6). The set-up is the
/// invented but plausible [`tube_setup`] (9.6 kJ, Al 6061 tube of 20 mm radius, 1 mm wall,
/// 2.5 mm standoff); the check is a wide band, 150-700 m/s, since the bank, coil and leads
/// are not those of any published shot.
#[test]
fn tube_impact_velocity_is_in_the_published_range() {
    let s = tube_setup();
    let est = s.estimate(&IntegrationOptions::default()).unwrap();
    let v = est.impact_velocity().unwrap().si();
    assert!((150.0..=700.0).contains(&v), "impact velocity {v} m/s");
    let e = s.stored_energy().unwrap().si();
    assert!((5e3..=20e3).contains(&e));
    // Peak field of tens of tesla, as expected for such banks (Kumar et al. 2020 quote
    // 27 T for steel tubes, `physics-notes.md` §6): a loose 5-100 T band.
    let b = est.peak_field.si();
    assert!((5.0..=100.0).contains(&b), "peak field {b} T");
}

/// The same band for the invented sheet set-up.
#[test]
fn sheet_impact_velocity_is_in_the_published_range() {
    let est = sheet_setup()
        .estimate(&IntegrationOptions::default())
        .unwrap();
    let v = est.impact_velocity().unwrap().si();
    assert!((150.0..=700.0).contains(&v), "impact velocity {v} m/s");
}

/// Magnetic pressure from the history equals (1/2) I^2 (dL/dx) / area at rest: the force
/// and the circuit use the same L(x) (`physics-notes.md` §6).
#[test]
fn pressure_is_the_inductance_gradient_force() {
    for (setup, area) in [
        (PulseSetup::Tube(tube_setup()), 2.0 * PI * 20e-3 * 20e-3),
        (PulseSetup::Sheet(sheet_setup()), 0.1 * 20e-3),
    ] {
        let plant = Plant::from_setup(&setup).unwrap();
        let i = 5e5;
        let (_, dl) = plant.gap(0.0);
        let b = plant.b_per_amp * i;
        assert_relative_eq!(
            0.5 * i * i * dl / area,
            b * b / (2.0 * MU0),
            max_relative = 1e-12
        );
    }
}

#[test]
fn bad_geometry_and_inputs_are_errors() {
    let good = tube_setup();
    let mut s = good;
    s.coil.bore_radius = Length::from_m(19e-3);
    assert!(matches!(s.validate(), Err(ProcessError::Geometry { .. })));
    let mut s = good;
    s.standoff = Length::from_m(0.0);
    assert!(matches!(s.validate(), Err(ProcessError::Physics(_))));
    let mut s = good;
    s.standoff = Length::from_m(19e-3);
    assert!(matches!(s.validate(), Err(ProcessError::Geometry { .. })));
    let mut s = good;
    s.tube.wall_thickness = Length::from_m(25e-3);
    assert!(matches!(s.validate(), Err(ProcessError::Geometry { .. })));
    let mut s = good;
    s.charging_voltage = Voltage::from_v(15e3);
    assert!(matches!(
        s.estimate(&IntegrationOptions::default()),
        Err(ProcessError::VoltageAboveRating { .. })
    ));
    let mut s = good;
    s.bank.capacitance = Capacitance::from_f(-1e-4);
    assert!(s.validate().is_err());
    let mut s = good;
    s.efficiency = 1.5;
    assert!(s.validate().is_err());
    let mut s = good;
    s.efficiency = f64::NAN;
    assert!(s.validate().is_err());
    let mut s = good;
    s.bank.resistance = Resistance::from_ohm(1.0);
    assert!(matches!(
        s.validate(),
        Err(ProcessError::NotUnderdamped { .. })
    ));
    let mut s = sheet_setup();
    s.standoff = Length::from_m(-1e-3);
    assert!(s.validate().is_err());
    let opts = IntegrationOptions {
        steps_per_period: 10,
        ..IntegrationOptions::default()
    };
    assert!(good.estimate(&opts).is_err());
}

/// A stainless-steel-like conductor (1.4e6 S/m, from memory) of 0.5 mm triggers the
/// skin-depth warning; aluminium of 1 mm does not.
#[test]
fn skin_depth_warning() {
    let mut s = tube_setup();
    s.tube.wall_thickness = Length::from_m(0.5e-3);
    s.tube.material.conductivity = ElectricalConductivity::from_s_m(1.4e6);
    let est = s.estimate(&IntegrationOptions::default()).unwrap();
    assert!(est
        .warnings
        .iter()
        .any(|w| matches!(w, ProcessWarning::SkinDepthExceedsThickness { .. })));
    let est = tube_setup()
        .estimate(&IntegrationOptions::default())
        .unwrap();
    assert!(!est
        .warnings
        .iter()
        .any(|w| matches!(w, ProcessWarning::SkinDepthExceedsThickness { .. })));
}

/// A long standoff at moderate voltage reaches the parent only after the current reversed.
#[test]
fn late_impact_is_warned() {
    let mut s = sheet_setup();
    s.charging_voltage = Voltage::from_v(4e3);
    s.standoff = Length::from_m(10e-3);
    let est = s
        .estimate(&IntegrationOptions {
            max_periods: 10.0,
            ..IntegrationOptions::default()
        })
        .unwrap();
    assert!(matches!(
        est.outcome,
        ImpactOutcome::Impact {
            after_first_half_wave: true,
            ..
        }
    ));
    assert!(est
        .warnings
        .iter()
        .any(|w| matches!(w, ProcessWarning::ImpactAfterFirstHalfWave { .. })));
}

/// Halving the step changes the impact velocity by far less than 0.1 % (RK4 convergence).
#[test]
fn step_refinement_converges() {
    let s = tube_setup();
    let coarse = s.estimate(&IntegrationOptions::default()).unwrap();
    let fine = s
        .estimate(&IntegrationOptions {
            steps_per_period: 1600,
            ..IntegrationOptions::default()
        })
        .unwrap();
    let (a, b) = (
        coarse.impact_velocity().unwrap().si(),
        fine.impact_velocity().unwrap().si(),
    );
    assert_relative_eq!(a, b, max_relative = 1e-3);
}

proptest! {
    #![proptest_config(ProptestConfig::with_cases(48))]

    /// Over a broad range of plausible tube set-ups the integration stays finite and the
    /// energy balance closes to 1 %.
    #[test]
    fn tube_balance_closes_everywhere(
        c_uf in 50.0f64..1000.0, u_kv in 2.0f64..12.0, lb_nh in 10.0f64..100.0,
        r_mohm in 0.5f64..8.0, gap_mm in 0.3f64..4.0, h_mm in 0.3f64..3.0,
        g_mm in 0.5f64..5.0, eta in 0.05f64..1.0,
    ) {
        let mut s = tube_setup();
        s.bank.capacitance = Capacitance::from_f(c_uf * 1e-6);
        s.bank.inductance = Inductance::from_h(lb_nh * 1e-9);
        s.bank.resistance = Resistance::from_ohm(r_mohm * 1e-3);
        s.charging_voltage = Voltage::from_v(u_kv * 1e3);
        s.coil.bore_radius = Length::from_m(20e-3 + gap_mm * 1e-3);
        s.tube.wall_thickness = Length::from_m(h_mm * 1e-3);
        s.standoff = Length::from_m(g_mm * 1e-3);
        s.efficiency = eta;
        let est = s.estimate(&IntegrationOptions::default()).unwrap();
        prop_assert!(est.energy.relative_error < 0.01, "{:?}", est.energy);
        if let Some(v) = est.impact_velocity() {
            prop_assert!(v.si().is_finite() && v.si() > 0.0);
        }
    }

    /// More voltage never gives a slower impact (same set-up otherwise).
    #[test]
    fn velocity_rises_with_voltage(u_kv in 4.0f64..10.0, du in 0.2f64..2.0) {
        let mut lo = sheet_setup();
        lo.charging_voltage = Voltage::from_v(u_kv * 1e3);
        let mut hi = lo;
        hi.charging_voltage = Voltage::from_v((u_kv + du) * 1e3);
        let opts = IntegrationOptions { sample_every: None, ..IntegrationOptions::default() };
        let vl = lo.estimate(&opts).unwrap().impact_velocity();
        let vh = hi.estimate(&opts).unwrap().impact_velocity();
        if let (Some(a), Some(b)) = (vl, vh) {
            prop_assert!(b.si() >= a.si());
        } else {
            prop_assert!(vl.is_none() || vh.is_some());
        }
    }
}
