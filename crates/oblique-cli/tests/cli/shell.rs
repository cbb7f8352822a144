//! Shell completions (sourced by bash, completing a subcommand, a material id and a pair name)
//! and man pages (one per command, readable by `man` where it is installed).

use super::*;

fn bash_complete(script: &std::path::Path, words: &[&str]) -> String {
    let bin_dir = Path::new(env!("CARGO_BIN_EXE_oblique"))
        .parent()
        .expect("the binary's folder")
        .to_path_buf();
    let path = format!(
        "{}:{}",
        bin_dir.display(),
        std::env::var("PATH").unwrap_or_default()
    );
    let quoted: Vec<String> = words.iter().map(|w| format!("'{w}'")).collect();
    let body = format!(
        "source '{}'; COMP_WORDS=({}); COMP_CWORD={}; COMP_LINE='{}'; COMP_POINT=${{#COMP_LINE}}; _oblique_dynamic oblique '{}' '{}'; printf '%s\\n' \"${{COMPREPLY[@]}}\"",
        script.display(),
        quoted.join(" "),
        words.len() - 1,
        words.join(" "),
        words[words.len() - 1],
        words[words.len().saturating_sub(2)],
    );
    let o = std::process::Command::new("bash")
        .args(["--norc", "--noprofile", "-c", &body])
        .env("PATH", path)
        .env_remove("OBLIQUE_LIBRARY")
        .output()
        .expect("bash runs");
    assert!(o.status.success(), "{}", String::from_utf8_lossy(&o.stderr));
    String::from_utf8_lossy(&o.stdout).into_owned()
}

#[test]
fn bash_completion_completes_subcommands_material_ids_and_pairs() {
    let dir = tempfile::tempdir().expect("temp dir");
    let script = dir.path().join("oblique.bash");
    let o = run(&["completions", "bash"]);
    assert_eq!(o.status.code(), Some(0), "{}", stderr(&o));
    std::fs::write(&script, &o.stdout).expect("script");
    assert!(bash_complete(&script, &["oblique", "ch"])
        .lines()
        .any(|l| l == "check"));
    let ids = bash_complete(&script, &["oblique", "check", "--flyer", "aa6"]);
    assert!(ids.lines().any(|l| l == "aa6061-t6"), "{ids}");
    let ids = bash_complete(&script, &["oblique", "material", "show", "cu"]);
    assert!(ids.lines().any(|l| l == "cu-c11000"), "{ids}");
    let pairs = bash_complete(&script, &["oblique", "check", "--pair", "de"]);
    assert!(pairs.lines().any(|l| l == "demo-al6061-on-cu"), "{pairs}");
    // A shop's own pair completes when its folder is on the line, for every pair subcommand
    // that takes a name.
    let shop = tempfile::tempdir().expect("shop");
    let lib = shop.path().to_str().expect("utf-8");
    let o = new_pair(shop.path(), "shop-al-on-cu");
    assert_eq!(o.status.code(), Some(0), "{}", stderr(&o));
    for words in [
        vec!["oblique", "--library", lib, "check", "--pair", "sho"],
        vec!["oblique", "--library", lib, "pair", "fit", "sho"],
        vec!["oblique", "--library", lib, "pair", "next-shot", "sho"],
        vec![
            "oblique",
            "--library",
            lib,
            "pair",
            "boundary",
            "add",
            "sho",
        ],
        vec!["oblique", "--library", lib, "pair", "show", "sho"],
    ] {
        let got = bash_complete(&script, &words);
        assert!(
            got.lines().any(|l| l == "shop-al-on-cu"),
            "{words:?}: {got}"
        );
    }
    // Without the folder, the shop's pair is unknown.
    let got = bash_complete(&script, &["oblique", "pair", "fit", "sho"]);
    assert!(!got.lines().any(|l| l == "shop-al-on-cu"), "{got}");
}

#[test]
fn every_shell_gets_a_script() {
    for shell in ["bash", "zsh", "fish", "powershell"] {
        let o = run(&["completions", shell]);
        assert_eq!(o.status.code(), Some(0), "{shell}: {}", stderr(&o));
        let s = stdout(&o);
        assert!(s.contains("oblique") && s.contains("check"), "{shell}");
    }
    let o = run(&["completions", "tcsh"]);
    assert_eq!(o.status.code(), Some(2));
}

#[test]
fn man_pages_cover_every_command_with_exit_codes_and_the_caution() {
    let dir = tempfile::tempdir().expect("temp dir");
    let out = dir.path().join("man1");
    let o = run(&["manpage", "--out", out.to_str().expect("utf-8")]);
    assert_eq!(o.status.code(), Some(0), "{}", stderr(&o));
    for page in [
        "oblique.1",
        "oblique-check.1",
        "oblique-pair-observe.1",
        "oblique-map.1",
        "oblique-estimate-mpw-tube.1",
    ] {
        let text = std::fs::read_to_string(out.join(page)).unwrap_or_else(|_| panic!("{page}"));
        assert!(text.contains(".SH \"EXIT STATUS\""), "{page}");
        assert!(text.contains(".SH CAUTION"), "{page}");
    }
    let check = std::fs::read_to_string(out.join("oblique-check.1")).expect("page");
    assert!(check.contains("deribas\\-k"), "the flags are in the page");
    // Where `man` is installed, it reads the page.
    if let Ok(o) = std::process::Command::new("man")
        .args(["-l", out.join("oblique-check.1").to_str().expect("utf-8")])
        .env("MANPAGER", "cat")
        .env("MANWIDTH", "100")
        .output()
    {
        if o.status.success() {
            let text = String::from_utf8_lossy(&o.stdout);
            assert!(text.contains("EXIT STATUS"), "{text}");
        }
    }
}
