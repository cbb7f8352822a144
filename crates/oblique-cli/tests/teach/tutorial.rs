//! docs/tutorial.md, run: every command of its `console` blocks runs, in order, against the
//! real binary in one temporary folder, and its standard output is compared with the text that
//! follows the command, so the tutorial cannot go stale.
//!
//! The block syntax: a line `$ COMMAND` (continued onto the next lines while it ends in `\`),
//! then the expected standard output. A line `...` stands for any number of lines (the text
//! leaves out what a reader does not need). A command may start with `NAME=value` environment
//! settings and end with `> FILE` (its output then goes to FILE, and the block shows none).
//! Commands: `oblique ...` and `mkdir -p DIR`. Nothing else is normalised but the temporary
//! folder's path, which reads `<tmp>`.
//!
//! `OBLIQUE_BLESS_TUTORIAL=1 cargo test -p oblique-cli --test teach tutorial` rewrites the
//! expected output of every command that does not match (an elided block becomes the full
//! output, to elide again by hand).

use std::path::Path;
use std::process::Command;

/// One command of the tutorial.
struct Step {
    /// The line of the command in the markdown (1-based).
    line: usize,
    /// Its words.
    words: Vec<String>,
    /// The expected output's lines, and where they sit in the markdown (0-based range).
    expected: Vec<String>,
    span: (usize, usize),
}

/// Split a command line into words, honouring single and double quotes.
fn words(s: &str) -> Vec<String> {
    let mut out = Vec::new();
    let mut cur = String::new();
    let mut quote: Option<char> = None;
    let mut any = false;
    for c in s.chars() {
        match (quote, c) {
            (Some(q), c) if c == q => quote = None,
            (Some(_), c) => cur.push(c),
            (None, '\'' | '"') => {
                quote = Some(c);
                any = true;
            }
            (None, c) if c.is_whitespace() => {
                if any || !cur.is_empty() {
                    out.push(std::mem::take(&mut cur));
                    any = false;
                }
            }
            (None, c) => cur.push(c),
        }
    }
    if any || !cur.is_empty() {
        out.push(cur);
    }
    out
}

fn parse(md: &str) -> Vec<Step> {
    let lines: Vec<&str> = md.lines().collect();
    let mut steps = Vec::new();
    let mut i = 0;
    while i < lines.len() {
        if lines[i].trim_end() != "```console" {
            i += 1;
            continue;
        }
        i += 1;
        let mut cur: Option<Step> = None;
        while i < lines.len() && lines[i].trim_end() != "```" {
            let l = lines[i];
            if let Some(cmd) = l.strip_prefix("$ ") {
                if let Some(s) = cur.take() {
                    steps.push(s);
                }
                let start = i;
                let mut text = cmd.trim_end().to_string();
                while text.ends_with('\\') && i + 1 < lines.len() {
                    text.pop();
                    i += 1;
                    text.push(' ');
                    text.push_str(lines[i].trim());
                }
                cur = Some(Step {
                    line: start + 1,
                    words: words(&text),
                    expected: Vec::new(),
                    span: (i + 1, i + 1),
                });
            } else if let Some(s) = cur.as_mut() {
                s.expected.push(l.trim_end().to_string());
                s.span.1 = i + 1;
            }
            i += 1;
        }
        if let Some(s) = cur.take() {
            steps.push(s);
        }
        i += 1;
    }
    steps
}

/// Whether `actual` matches `expected`, where a line `...` in `expected` stands for any number
/// of lines.
fn matches(expected: &[String], actual: &[String]) -> bool {
    match expected.split_first() {
        None => actual.is_empty(),
        Some((e, rest)) if e == "..." => (0..=actual.len()).any(|k| matches(rest, &actual[k..])),
        Some((e, rest)) => actual
            .split_first()
            .is_some_and(|(a, arest)| a == e && matches(rest, arest)),
    }
}

/// Run one step in `dir`: its standard output's lines (normalised).
fn run_step(dir: &Path, s: &Step) -> Vec<String> {
    let mut w: Vec<String> = s.words.clone();
    let mut env = Vec::new();
    while w.first().is_some_and(|x| {
        x.contains('=') && x.chars().next().is_some_and(|c| c.is_ascii_uppercase())
    }) {
        let x = w.remove(0);
        let (k, v) = x.split_once('=').expect("NAME=value");
        env.push((k.to_string(), v.to_string()));
    }
    let mut redirect = None;
    if w.len() >= 2 && w[w.len() - 2] == ">" {
        redirect = w.pop();
        w.pop();
    }
    match w.first().map(String::as_str) {
        Some("mkdir") => {
            assert_eq!(w.get(1).map(String::as_str), Some("-p"), "line {}", s.line);
            for d in &w[2..] {
                std::fs::create_dir_all(dir.join(d)).expect("mkdir");
            }
            return Vec::new();
        }
        Some("oblique") => {}
        other => panic!("docs/tutorial.md:{}: unsupported command {other:?}", s.line),
    }
    let mut cmd = Command::new(env!("CARGO_BIN_EXE_oblique"));
    cmd.args(&w[1..])
        .current_dir(dir)
        .env_remove("OBLIQUE_LIBRARY")
        .env_remove("SOURCE_DATE_EPOCH");
    for (k, v) in env {
        cmd.env(k, v);
    }
    let o = cmd.output().expect("the binary runs");
    assert!(
        o.status.success(),
        "docs/tutorial.md:{}: {:?} failed ({:?}):\n{}",
        s.line,
        s.words,
        o.status.code(),
        String::from_utf8_lossy(&o.stderr)
    );
    if let Some(f) = redirect {
        std::fs::write(dir.join(f), &o.stdout).expect("write");
        return Vec::new();
    }
    let tmp = dir.display().to_string();
    String::from_utf8_lossy(&o.stdout)
        .replace(&tmp, "<tmp>")
        .lines()
        .map(|l| l.trim_end().to_string())
        .collect()
}

#[test]
fn every_command_of_the_tutorial_gives_the_output_it_shows() {
    let path = super::repo().join("docs/tutorial.md");
    let md = std::fs::read_to_string(&path).expect("docs/tutorial.md");
    let steps = parse(&md);
    assert!(
        steps.len() >= 12,
        "the tutorial runs {} commands",
        steps.len()
    );
    let dir = tempfile::tempdir().expect("tmp");
    let bless = std::env::var_os("OBLIQUE_BLESS_TUTORIAL").is_some();
    let mut replace: Vec<((usize, usize), Vec<String>)> = Vec::new();
    let mut failures = Vec::new();
    for s in &steps {
        let actual = run_step(dir.path(), s);
        // Trailing blank lines of a block are not part of the output shown.
        let mut expected = s.expected.clone();
        while expected.last().is_some_and(String::is_empty) {
            expected.pop();
        }
        if !matches(&expected, &actual) {
            if bless {
                replace.push((s.span, actual));
            } else {
                failures.push(format!(
                    "docs/tutorial.md:{}: {}\n--- expected\n{}\n--- actual\n{}",
                    s.line,
                    s.words.join(" "),
                    expected.join("\n"),
                    actual.join("\n")
                ));
            }
        }
    }
    if bless && !replace.is_empty() {
        let mut lines: Vec<String> = md.lines().map(str::to_string).collect();
        for ((a, b), actual) in replace.into_iter().rev() {
            lines.splice(a..b, actual);
        }
        std::fs::write(&path, lines.join("\n") + "\n").expect("bless");
    }
    assert!(failures.is_empty(), "{}", failures.join("\n\n"));
}

#[test]
fn the_harness_reads_blocks_and_elisions() {
    let md = "text\n```console\n$ oblique a \\\n   'b c' d\nout 1\nout 2\n$ mkdir -p x\n```\n";
    let s = parse(md);
    assert_eq!(s.len(), 2);
    assert_eq!(s[0].words, vec!["oblique", "a", "b c", "d"]);
    assert_eq!(s[0].expected, vec!["out 1", "out 2"]);
    let e = |v: &[&str]| v.iter().map(|x| (*x).to_string()).collect::<Vec<_>>();
    assert!(matches(&e(&["a", "...", "d"]), &e(&["a", "b", "c", "d"])));
    assert!(matches(&e(&["a", "...", "d"]), &e(&["a", "d"])));
    assert!(!matches(&e(&["a", "...", "d"]), &e(&["a", "b"])));
    assert!(!matches(&e(&["a"]), &e(&["a", "b"])));
}
