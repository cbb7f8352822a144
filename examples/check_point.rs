//! Check one process point against a pair window from Rust: load the built-in library and the
//! example shop folder beside this file, classify 400 m/s at 11 deg, print the verdict, the
//! binding limit and the reason.
//!
//! Run: `cargo run -p oblique-cli --example check_point`
//!
//! The pair window in `examples/shop/` is INVENTED example data. A screening result is not a
//! guarantee of a weld; pulsed-power banks store lethal energy: follow local codes and licensed
//! practice before any shot.

use oblique_core::units::{Angle, Velocity};
use oblique_core::Collision;
use oblique_window::advice::classify_explained;
use oblique_window::classify::limit_label;
use oblique_window::present::CAUTION;
use oblique_window::Library;
use std::path::PathBuf;

/// The example's body; `main` so that `cargo run --example` runs it, public so that the test
/// suite runs it too.
pub fn main() {
    let shop = PathBuf::from(env!("CARGO_MANIFEST_DIR")).join("../../examples/shop");
    let lib = Library::load(&[shop]).expect("the built-in library and the example shop load");
    let window = lib
        .pair("larchmont-al1100-on-cu")
        .expect("the example pair is in examples/shop");
    let setup = window
        .setup()
        .expect("the pair's materials give a valid set-up");
    let point = Collision::from_impact(
        window.convention,
        Velocity::from_m_s(400.0),
        Angle::from_degrees(11.0),
    )
    .expect("400 m/s at 11 deg is a valid collision");
    let c = classify_explained(window, &setup, &point).expect("the point classifies");
    println!(
        "{} at 400 m/s, 11 deg: {}",
        window.name,
        if c.inside {
            "inside the window"
        } else {
            "outside the window"
        }
    );
    if let Some(limit) = &c.binding {
        println!("binding limit: {}", limit_label(window, limit));
    }
    println!("{}", c.reason);
    println!("{CAUTION}");
    assert!(
        c.inside,
        "the example point lies inside the invented example window"
    );
}
