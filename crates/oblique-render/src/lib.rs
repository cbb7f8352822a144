//! # oblique-render
//!
//! Pictures and documents from typed results: the weldability-window plot (SVG and PNG) with
//! trials, proposed points and process curves, the window plot of a sweep (one process curve
//! per standoff or voltage, from `oblique_setup::SweepRanking`), the weld map's strip along the
//! interface and its points on the window plane, and the self-contained HTML and JSON decision
//! report. Nothing here parses flags or reads files; every function takes the window, the
//! classification, the ranking or the map summary it draws, and returns a `String` or bytes.
//!
//! ```
//! use oblique_render::window_plot::{render_svg, PlotRequest, ProposedPoint};
//! use oblique_window::{boundary::Plane, Library};
//!
//! let lib = Library::load(&[]).expect("the built-in library loads");
//! let window = lib.pair("demo-al6061-on-cu").expect("the demo pair");
//! let mut request = PlotRequest::new(window, Plane::AngleImpactVelocity);
//! request.points.push(ProposedPoint::new("proposed", 450.0, 10f64.to_radians()));
//! let svg = render_svg(&request).expect("the demo window plots");
//! assert!(svg.starts_with("<svg"));
//! ```
// Negated comparisons such as `!(x > 0.0)` are deliberate: they reject NaN together with
// out-of-range values, which the suggested rewrite would let through.
#![allow(clippy::neg_cmp_op_on_partial_ord)]
#![deny(missing_docs)]

pub mod error;
pub mod png;
pub mod probability;
pub mod report;
pub mod sweep_plot;
pub mod trade_plot;
pub mod weld_map;
pub mod window_plot;

pub use error::{RenderError, RenderResult};
