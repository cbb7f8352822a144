fn main() {
    let lib = oblique_window::Library::load(&[]).unwrap();
    let w = lib.pair("demo-al6061-on-cu").unwrap();
    let t = std::time::Instant::now();
    let r = oblique_confidence::next_shot::next_shots(w, &Default::default()).unwrap();
    eprintln!("{:.1} ms", t.elapsed().as_secs_f64() * 1e3);
    print!("{}", r.text());
}
