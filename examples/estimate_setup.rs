//! A process set-up from Rust: the example shop's bank and coil (invented), an Al 1100-O tube
//! and three charging voltages; each estimate checked against the example pair window.
//!
//! Run: `cargo run -p oblique-cli --example estimate_setup`
//!
//! Every number is a screening estimate, not a guarantee. Capacitor banks store lethal energy:
//! only trained, authorised people charge or fire a bank; follow local codes and licensed
//! practice.

use oblique_core::units::{Length, Voltage};
use oblique_setup::{
    resolve_estimate, BankRequest, Catalog, Charge, EstimateRequest, MagneticRequest, TubeRequest,
};
use oblique_window::machine::Machines;
use oblique_window::Library;
use std::path::Path;

/// The example's body (public so that the test suite runs it).
pub fn main() {
    let shop = Path::new(env!("CARGO_MANIFEST_DIR")).join("../../examples/shop");
    let catalog = Catalog::new(
        Library::load(std::slice::from_ref(&shop)).expect("the library loads"),
        Machines::load(&[shop]).expect("the machine files load"),
    );
    let window = catalog
        .pair(Some("larchmont-al1100-on-cu"))
        .expect("the example pair")
        .expect("named");
    for kv in [5.0, 7.0, 9.0] {
        let tube = TubeRequest {
            bank: BankRequest::machine("larchmont-bank-200uf"),
            coil: Some("larchmont-coil-30mm".into()),
            flyer: Some("aa1100-o".into()),
            flyer_thickness: Some(Length::from_m(1.5e-3)),
            tube_outer_radius: Some(Length::from_m(13e-3)),
            ..TubeRequest::default()
        };
        let request = EstimateRequest::new(
            MagneticRequest::Tube(tube),
            Charge::Voltage(Voltage::from_v(kv * 1e3)),
            Length::from_m(2e-3),
        );
        let mut notes = Vec::new();
        let setup = resolve_estimate(&catalog, &request, &mut notes).expect("a complete set-up");
        let report = setup.run().expect("the model runs");
        let vp = report
            .estimate
            .impact_velocity()
            .expect("the tube reaches the rod");
        let check = oblique_setup::classify_impact(window, vp.si(), 10f64.to_radians())
            .expect("the point classifies");
        println!(
            "{kv} kV: impact velocity {:.0} m/s (upper estimate: efficiency not calibrated), at 10 deg {}",
            vp.si(),
            if check.inside { "inside the window" } else { "outside the window" }
        );
    }
    println!("{}", oblique_window::present::CAUTION);
}
