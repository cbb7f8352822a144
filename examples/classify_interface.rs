//! The weld map from Rust in ten lines: classify the example interface export (invented data)
//! against the example shop's pair window and print the summary.
//!
//! Run: `cargo run -p oblique-cli --example classify_interface`
//!
//! A screening estimate, not a guarantee of a weld: pulsed power, stored energy and flying
//! parts are dangerous; follow local codes and licensed practice before any shot.

use oblique_map::{classify_stream, MapOptions};
use oblique_window::Library;
use std::path::Path;

/// The example's body (public so that the test suite runs it).
pub fn main() {
    let here = Path::new(env!("CARGO_MANIFEST_DIR")).join("../../examples");
    let lib = Library::load(&[here.join("shop")]).expect("the library loads");
    let window = lib
        .pair("larchmont-al1100-on-cu")
        .expect("the example pair");
    let input = std::fs::File::open(here.join("interface.csv")).expect("the example export");
    let mut map = Vec::new(); // any Write: a file, a socket, a buffer
    let summary = classify_stream(window, input, &mut map, &MapOptions::default())
        .expect("the export classifies");
    print!("{}", summary.to_text());
    assert_eq!(summary.rows_classified, 64);
    let (fraction, _weighting) = summary.welded_fraction();
    assert!(
        fraction.is_some_and(|f| f > 0.5),
        "most of the example interface welds"
    );
}
