//! Embeds every `.ron` file of the top-level `windows/` folder (and its `machines/` subfolder)
//! into the binary as the built-in library.
use std::fmt::Write as _;
use std::path::Path;

fn collect(dir: &Path, prefix: &str, out: &mut Vec<(String, String)>) {
    let Ok(entries) = std::fs::read_dir(dir) else {
        return;
    };
    let mut paths: Vec<_> = entries.filter_map(Result::ok).map(|e| e.path()).collect();
    paths.sort();
    for p in paths {
        let name = p
            .file_name()
            .and_then(|n| n.to_str())
            .unwrap_or_default()
            .to_string();
        if name.starts_with('.') {
            continue;
        }
        if p.is_dir() && prefix.is_empty() && name == "machines" {
            collect(&p, "machines/", out);
        } else if p.extension().and_then(|e| e.to_str()) == Some("ron") {
            out.push((
                format!("{prefix}{name}"),
                p.canonicalize().unwrap_or(p).display().to_string(),
            ));
        }
    }
}

fn main() {
    let manifest = std::env::var("CARGO_MANIFEST_DIR").unwrap_or_else(|_| ".".into());
    let windows = Path::new(&manifest).join("../../windows");
    println!("cargo:rerun-if-changed={}", windows.display());
    println!(
        "cargo:rerun-if-changed={}",
        windows.join("machines").display()
    );
    let mut files = Vec::new();
    collect(&windows, "", &mut files);
    let mut code = String::from("/// Built-in library files: (path below windows/, contents).\npub static BUILTIN_FILES: &[(&str, &str)] = &[\n");
    for (rel, abs) in &files {
        println!("cargo:rerun-if-changed={abs}");
        let _ = writeln!(code, "    ({rel:?}, include_str!({abs:?})),");
    }
    code.push_str("];\n");
    let out =
        Path::new(&std::env::var("OUT_DIR").unwrap_or_else(|_| ".".into())).join("builtin.rs");
    if let Err(e) = std::fs::write(&out, code) {
        panic!("cannot write {}: {e}", out.display());
    }
}
