fn main() {
    let lib = oblique_window::Library::load(&[]).unwrap();
    let w = lib.pair("demo-al6061-on-cu").unwrap();
    let n: usize = std::env::args().nth(1).map_or(500, |s| s.parse().unwrap());
    let syn = oblique_confidence::fit::synthetic_trials(w, [0.8, 0.13, 5.0], n, (250.0, 900.0), (2.0, 30.0), 0.03, 1.0, 7).unwrap();
    let t = std::time::Instant::now();
    let r = oblique_confidence::fit::fit(&syn, &Default::default()).unwrap();
    eprintln!("{:.1} ms", t.elapsed().as_secs_f64() * 1e3);
    print!("{}", r.text());
}
