use oblique_confidence::{weld_probability, Point, Sampling, Scatter, VelocitySpread};
use oblique_core::units::{Angle, Velocity};
use oblique_core::Convention;
fn main() {
    let lib = oblique_window::Library::load(&[]).unwrap();
    let w = lib.pair("demo-al6061-on-cu").unwrap();
    let args: Vec<String> = std::env::args().collect();
    let a: f64 = args.get(1).map_or(10.0, |s| s.parse().unwrap());
    let model = args.get(2).map_or(true, |s| s == "on");
    let reps: usize = args.get(3).map_or(5, |s| s.parse().unwrap());
    let p = Point::impact(Convention::NormalToFlyer, Velocity::from_m_s(450.0), Angle::from_degrees(a));
    let s = Scatter { velocity: Some(VelocitySpread::Relative(0.05)), angle: Some(Angle::from_degrees(1.0)), model };
    for _ in 0..reps {
        let t = std::time::Instant::now();
        let r = weld_probability(w, &p, &s, &Sampling { samples: 100_000, threads: std::num::NonZeroUsize::new(args.get(4).map_or(2, |s| s.parse().unwrap())), ..Sampling::default() }).unwrap();
        eprintln!("{:.1} ms p={}", t.elapsed().as_secs_f64() * 1e3, r.inside);
    }
}
