//! `oblique plot`, `oblique report`, `oblique demo`: well-formed, self-contained, escaped,
//! deterministic, and rendered by a real browser where one is installed.

use super::*;

fn parse_xml(text: &str) {
    let opt = roxmltree::ParsingOptions {
        allow_dtd: true,
        ..Default::default()
    };
    if let Err(e) = roxmltree::Document::parse_with_options(text, opt) {
        panic!("not well-formed: {e}");
    }
}

fn no_external_resources(text: &str) {
    let lower = text.to_ascii_lowercase();
    for bad in [
        "<script", "src=", "href=", "url(", "@import", "<link", "<iframe", "<img",
    ] {
        assert!(!lower.contains(bad), "found '{bad}'");
    }
}

/// A library with a pair whose label and notes carry markup, to prove escaping.
fn hostile_library() -> tempfile::TempDir {
    let d = tempfile::tempdir().unwrap();
    let text = std::fs::read_to_string(repo().join("windows/demo-al6061-on-cu.ron"))
        .unwrap()
        .replace("name: \"demo-al6061-on-cu\"", "name: \"hostile\"")
        .replace(
            "lowest welding velocity seen (HBW-2026)",
            "<script>alert(1)</script> & co",
        )
        .replace("HBW-2026 shot 01 (invented)", "<b onmouseover=x>shot</b>");
    std::fs::write(d.path().join("hostile.ron"), text).unwrap();
    d
}

#[test]
fn report_is_well_formed_self_contained_and_escapes_user_text() {
    let d = hostile_library();
    let out = d.path().join("r.html");
    let o = run(&[
        "--library",
        d.path().to_str().unwrap(),
        "report",
        "--pair",
        "hostile",
        "--velocity",
        "450m/s",
        "--angle",
        "10deg",
        "-o",
        out.to_str().unwrap(),
    ]);
    assert_eq!(o.status.code(), Some(0), "{}", stderr(&o));
    let html = std::fs::read_to_string(&out).unwrap();
    parse_xml(&html);
    no_external_resources(&html);
    assert!(html.contains("&lt;script&gt;alert(1)&lt;/script&gt; &amp; co"));
    assert!(html.contains("&lt;b onmouseover=x&gt;shot&lt;/b&gt;"));
    for section in [
        "The question",
        "Verdict",
        "The chosen set-up",
        "Alternatives considered",
        "Limits at the chosen point",
        "Headroom along the two controls",
        "Material properties and sources",
        "Trials and agreement",
        "Window plots",
        "Assumptions and what is unconfirmed",
        "What this result does not cover",
        "Cautions",
        "References",
        "Provenance",
        "SHA-256",
    ] {
        assert!(html.contains(section), "missing section {section}");
    }
    assert_eq!(html.matches("<svg").count(), 2);
    // The default label is the role's own word: the heading does not repeat it.
    assert!(
        html.contains("<h2 id=\"chosen\">The chosen set-up</h2>"),
        "the chosen set-up's heading"
    );
    assert!(!html.contains("The chosen set-up: chosen"));
}

#[test]
fn report_json_twin() {
    let d = tempfile::tempdir().unwrap();
    let out = d.path().join("r.html");
    let o = run(&[
        "report",
        "--pair",
        "demo-al6061-on-cu",
        "--velocity",
        "450m/s",
        "--angle",
        "10deg",
        "-o",
        out.to_str().unwrap(),
        "--json",
    ]);
    assert_eq!(o.status.code(), Some(0), "{}", stderr(&o));
    let v: serde_json::Value = serde_json::from_str(&stdout(&o)).unwrap();
    for k in [
        "check",
        "agreement",
        "materials",
        "assumptions",
        "cautions",
        "provenance",
        "chosen",
        "alternatives",
        "references",
        "margin_definitions",
        "rounding",
        "does_not_cover",
    ] {
        assert!(v.get(k).is_some(), "missing {k}");
    }
    assert!(v["provenance"]["command"]
        .as_str()
        .unwrap()
        .starts_with("oblique report"));
    assert!(!v["provenance"]["files"].as_array().unwrap().is_empty());
    assert_eq!(v["check"]["inside"], true);
}

/// The HTML record states, in its verdict, every warning its JSON twin carries (the mixed
/// jetting regime at 382 m/s, 5 deg: the parent plate supersonic, the flyer subsonic).
#[test]
fn report_html_verdict_shows_the_json_warnings() {
    let d = tempfile::tempdir().unwrap();
    let out = d.path().join("r.html");
    let args = [
        "report",
        "--pair",
        "demo-al6061-on-cu",
        "--velocity",
        "382m/s",
        "--angle",
        "5deg",
        "-o",
        out.to_str().unwrap(),
    ];
    let o = run(&[&args[..], &["--json"]].concat());
    assert_eq!(o.status.code(), Some(0), "{}", stderr(&o));
    let v: serde_json::Value = serde_json::from_str(&stdout(&o)).unwrap();
    let warnings: Vec<&str> = v["check"]["warnings"]
        .as_array()
        .expect("warnings")
        .iter()
        .map(|w| w.as_str().expect("a warning is text"))
        .collect();
    assert!(
        warnings.iter().any(|w| w.contains("mixed regime")),
        "{warnings:?}"
    );
    let o = run(&args);
    assert_eq!(o.status.code(), Some(0), "{}", stderr(&o));
    let html = std::fs::read_to_string(&out).unwrap();
    parse_xml(&html);
    let start = html.find("id=\"verdict\"").expect("verdict");
    let end = html.find("id=\"chosen\"").expect("chosen set-up");
    let verdict = &html[start..end];
    for w in &warnings {
        let escaped = w
            .replace('&', "&amp;")
            .replace('<', "&lt;")
            .replace('>', "&gt;")
            .replace('"', "&quot;")
            .replace('\'', "&#39;");
        assert!(
            verdict.contains(&escaped),
            "{w} not in the verdict: {verdict}"
        );
    }
}

#[test]
fn plots_are_well_formed_deterministic_and_escaped() {
    let d = hostile_library();
    let a = d.path().join("a.svg");
    let b = d.path().join("b.svg");
    for out in [&a, &b] {
        let o = run(&[
            "--library",
            d.path().to_str().unwrap(),
            "plot",
            "--pair",
            "hostile",
            "--plane",
            "angle-collision-velocity",
            "--point",
            "450m/s,10deg",
            "-o",
            out.to_str().unwrap(),
        ]);
        assert_eq!(o.status.code(), Some(0), "{}", stderr(&o));
    }
    let sa = std::fs::read_to_string(&a).unwrap();
    assert_eq!(
        sa,
        std::fs::read_to_string(&b).unwrap(),
        "same input, different bytes"
    );
    parse_xml(&sa);
    assert!(sa.contains("&lt;script&gt;"));
    assert!(!sa.contains("<script"));
    // PNG for slides: a real PNG file, text drawn with the bundled font.
    let png = d.path().join("w.png");
    let o = run(&[
        "plot",
        "--pair",
        "demo-al6061-on-cu",
        "--point",
        "450m/s,10deg",
        "-o",
        png.to_str().unwrap(),
    ]);
    assert_eq!(o.status.code(), Some(0), "{}", stderr(&o));
    let bytes = std::fs::read(&png).unwrap();
    assert_eq!(&bytes[..8], b"\x89PNG\r\n\x1a\n");
    assert!(
        bytes.len() > 50_000,
        "PNG looks empty: {} bytes",
        bytes.len()
    );
    fails_with(
        &["plot", "--pair", "demo-al6061-on-cu", "-o", "w.gif"],
        &[
            "-o w.gif",
            "'.gif' is not a format it writes; supported: .svg, .png",
        ],
    );
    fails_with(
        &[
            "plot",
            "--pair",
            "demo-al6061-on-cu",
            "--point",
            "450,10deg",
            "-o",
            "w.svg",
        ],
        &["--point", "has no unit"],
    );
}

/// The number in `attr="..."` of an SVG element's line.
fn svg_attr(line: &str, attr: &str) -> f64 {
    let at = line.find(&format!(" {attr}=\"")).expect(attr) + attr.len() + 3;
    line[at..].split('"').next().unwrap().parse().expect(attr)
}

/// The distance in pixels from the box (x0, y0, x1, y1) to the segment a-b (0 when they meet;
/// sampled along the segment, to a tenth of its length).
fn box_to_segment(b: (f64, f64, f64, f64), a: (f64, f64), c: (f64, f64)) -> f64 {
    (0..=10)
        .map(|k| {
            let t = f64::from(k) / 10.0;
            let p = (a.0 + t * (c.0 - a.0), a.1 + t * (c.1 - a.1));
            let dx = (b.0 - p.0).max(0.0).max(p.0 - b.2);
            let dy = (b.1 - p.1).max(0.0).max(p.1 - b.3);
            dx.hypot(dy)
        })
        .fold(f64::INFINITY, f64::min)
}

/// The probability plot with a proposed point (the demo pair, invented data): the legend makes
/// room for every entry (the picture grows below it) instead of leaving one out; each user
/// boundary's label sits beside its own line (its halo within 24 px of the line through the
/// boundary's points); and the two boundaries are drawn, and shown in the legend, with
/// different dashes (the first solid: one piece in the legend; the second dashed: several).
#[test]
fn the_probability_plot_shows_every_legend_entry_and_labels_each_boundary_at_its_line() {
    let d = tempfile::tempdir().unwrap();
    let out = d.path().join("p.svg");
    let o = run(&[
        "plot",
        "--pair",
        "demo-al6061-on-cu",
        "--probability",
        "--velocity-sd",
        "5%",
        "--angle-sd",
        "1deg",
        "--point",
        "450m/s,10deg",
        "-o",
        out.to_str().unwrap(),
    ]);
    assert_eq!(o.status.code(), Some(0), "{}", stderr(&o));
    let svg = std::fs::read_to_string(&out).unwrap();
    parse_xml(&svg);
    assert!(!svg.contains("more entries not shown"), "an entry left out");
    for entry in [
        "proposed point",
        "weld probability 90 %",
        "melted",
        "Points",
    ] {
        assert!(svg.contains(entry), "missing legend entry '{entry}'");
    }
    let head = svg.lines().find(|l| l.starts_with("<svg")).unwrap();
    let height = svg_attr(head, "height");
    assert!(height > 680.0, "the picture did not grow: {head}");
    assert!(svg.contains(&format!("viewBox=\"0 0 1100 {height}\"")));
    // The caution line is inside the picture.
    let lines: Vec<&str> = svg.lines().collect();
    let caution = lines
        .iter()
        .position(|l| l.starts_with("Screening estimate from published relations"))
        .unwrap();
    assert!(svg_attr(lines[caution - 1], "y") < height);
    // The boundaries' points (black dots of radius 3), in the order of the pair file.
    let dots: Vec<(f64, f64)> = lines
        .iter()
        .filter(|l| {
            l.starts_with("<circle") && l.contains(" r=\"3\"") && l.contains("fill=\"#000000\"")
        })
        .map(|l| (svg_attr(l, "cx"), svg_attr(l, "cy")))
        .collect();
    assert_eq!(dots.len(), 7, "4 + 3 boundary points");
    for (label, own) in [
        ("lowest welding velocity seen (HBW-2026)", &dots[..4]),
        ("tip bounce-back angle (HBW-2026)", &dots[4..]),
    ] {
        let at = lines.iter().position(|l| *l == label).expect(label);
        // The halo drawn just before the text.
        let halo = lines[at - 2];
        assert!(halo.starts_with("<rect"), "{halo}");
        let (x, y) = (svg_attr(halo, "x"), svg_attr(halo, "y"));
        let b = (
            x,
            y,
            x + svg_attr(halo, "width"),
            y + svg_attr(halo, "height"),
        );
        let gap = own
            .windows(2)
            .map(|s| box_to_segment(b, s[0], s[1]))
            .fold(f64::INFINITY, f64::min);
        assert!(gap <= 24.0, "'{label}' is {gap:.0} px from its line");
    }
    // The legend's boundary samples (black, 3 px, right of the plot): a solid and a dashed one.
    let mut pieces: std::collections::BTreeMap<i64, usize> = std::collections::BTreeMap::new();
    for l in &lines {
        if l.starts_with("<polyline") && l.contains("stroke=\"#000000\" stroke-width=\"3\"") {
            let pts: Vec<(f64, f64)> = l
                .split("points=\"")
                .nth(1)
                .unwrap()
                .split('"')
                .next()
                .unwrap()
                .split_whitespace()
                .map(|p| {
                    let (a, b) = p.split_once(',').unwrap();
                    (a.parse().unwrap(), b.parse().unwrap())
                })
                .collect();
            if pts.iter().all(|p| p.0 >= 800.0) {
                *pieces.entry(pts[0].1 as i64).or_default() += 1;
            }
        }
    }
    let counts: Vec<usize> = pieces.values().copied().collect();
    assert_eq!(counts.len(), 2, "{pieces:?}");
    assert_eq!(counts[0], 1, "the first boundary is solid: {pieces:?}");
    assert!(counts[1] > 1, "the second boundary is dashed: {pieces:?}");
}

#[test]
fn many_points_are_binned_and_the_plot_says_so() {
    let d = tempfile::tempdir().unwrap();
    let csv = d.path().join("p.csv");
    let mut s = String::from("velocity[m/s],angle[deg]\n");
    for i in 0..2000 {
        s.push_str(&format!("{},{}\n", 300 + (i * 7) % 400, 3 + (i * 13) % 25));
    }
    std::fs::write(&csv, s).unwrap();
    let out = d.path().join("p.svg");
    let o = run(&[
        "plot",
        "--pair",
        "demo-al6061-on-cu",
        "--points",
        csv.to_str().unwrap(),
        "-o",
        out.to_str().unwrap(),
    ]);
    assert_eq!(o.status.code(), Some(0), "{}", stderr(&o));
    let svg = std::fs::read_to_string(&out).unwrap();
    assert!(svg.contains("2000 proposed points, binned"));
    assert!(svg.len() < 600_000, "svg is {} bytes", svg.len());
}

#[test]
fn demo_writes_plots_and_report_and_names_the_paths() {
    let d = tempfile::tempdir().unwrap();
    let o = run_in(d.path(), &["demo", "--out", "out"]);
    assert_eq!(o.status.code(), Some(0), "{}", stderr(&o));
    let s = stdout(&o);
    assert!(s.contains("INVENTED"));
    // The probability line says what it assumes and that it did not make the choice.
    assert!(
        s.contains("weld probability of the chosen set-up: ")
            && s.contains("the choice above is by headroom, not by this number"),
        "{s}"
    );
    for f in [
        "window-angle-velocity.svg",
        "window-angle-collision-velocity.svg",
        "report.html",
        "report.json",
    ] {
        assert!(d.path().join("out").join(f).is_file(), "missing {f}");
        assert!(s.contains(f));
    }
    // The record holds the choice: A chosen, B and C with the reasons they were not.
    let v: serde_json::Value =
        serde_json::from_slice(&std::fs::read(d.path().join("out/report.json")).unwrap()).unwrap();
    assert_eq!(v["chosen"]["label"], "A");
    let alts = v["alternatives"].as_array().unwrap();
    let labels: Vec<&str> = alts.iter().map(|a| a["label"].as_str().unwrap()).collect();
    assert_eq!(labels, ["B", "C"]);
    assert!(alts[0]["not_chosen_because"]
        .as_str()
        .unwrap()
        .contains("less velocity headroom"));
    assert!(alts[1]["not_chosen_because"]
        .as_str()
        .unwrap()
        .starts_with("outside the window"));
    let html = std::fs::read_to_string(d.path().join("out/report.html")).unwrap();
    for needle in [
        "The chosen set-up: A",
        "Alternatives considered",
        "less velocity headroom",
        "outside the window: melting-upper fails",
    ] {
        assert!(html.contains(needle), "missing {needle}");
    }
    assert!(
        s.contains("candidate A is chosen")
            && s.contains("B not chosen")
            && s.contains("C not chosen"),
        "{s}"
    );
    // Every citation key the record uses is in its reference list (the JSON twin's references).
    let refs = v["references"].as_object().unwrap();
    let mut rest = html.as_str();
    let mut n = 0;
    while let Some(i) = rest.find('[') {
        rest = &rest[i + 1..];
        let Some(j) = rest.find(']') else { break };
        let key = &rest[..j];
        let shaped = !key.is_empty()
            && key.len() <= 16
            && key.chars().all(|c| c.is_ascii_alphanumeric() || c == '-')
            && !key.chars().all(|c| c.is_ascii_digit());
        if shaped && key != "deg" {
            assert!(
                refs.contains_key(key),
                "[{key}] is cited but not in the references"
            );
            n += 1;
        }
    }
    assert!(n > 20, "only {n} citations");
}

/// Renders the demo report in headless Chromium (Debian's `chromium`, installed by .ci/run):
/// the screenshot must not be blank and the browser must log no failed resource or console error.
#[test]
fn report_renders_in_headless_chromium() {
    let Some(chromium) = ["/usr/bin/chromium", "/usr/bin/chromium-browser"]
        .into_iter()
        .find(|p| std::path::Path::new(p).exists())
    else {
        eprintln!("chromium is not installed: browser rendering not checked (install Debian's chromium to run it)");
        return;
    };
    let d = tempfile::tempdir().unwrap();
    let out = d.path().join("r.html");
    let o = run(&[
        "report",
        "--pair",
        "demo-al6061-on-cu",
        "--velocity",
        "450m/s",
        "--angle",
        "10deg",
        "-o",
        out.to_str().unwrap(),
    ]);
    assert_eq!(o.status.code(), Some(0));
    let shot = d.path().join("shot.png");
    let profile = d.path().join("profile");
    let r = std::process::Command::new(chromium)
        .args([
            "--headless",
            "--no-sandbox",
            "--disable-gpu",
            "--disable-quic",
            "--no-first-run",
            "--disable-background-networking",
            "--disable-component-update",
            "--disable-sync",
            "--enable-logging=stderr",
            "--v=0",
            &format!("--user-data-dir={}", profile.display()),
            &format!("--screenshot={}", shot.display()),
            "--window-size=1200,1600",
            &format!("file://{}", out.display()),
        ])
        .output()
        .expect("chromium runs");
    let log = String::from_utf8_lossy(&r.stderr);
    let png = std::fs::read(&shot)
        .unwrap_or_else(|e| panic!("no screenshot ({e}); chromium said:\n{log}"));
    // A blank 1200x1600 page compresses to a few kB; the report with tables and plots is far larger.
    assert!(
        png.len() > 40_000,
        "screenshot looks blank ({} bytes)",
        png.len()
    );
    for bad in ["Failed to load resource", "Uncaught", "CONSOLE"] {
        assert!(!log.contains(bad), "browser reported '{bad}':\n{log}");
    }
}

fn chromium() -> Option<&'static str> {
    ["/usr/bin/chromium", "/usr/bin/chromium-browser"]
        .into_iter()
        .find(|p| std::path::Path::new(p).exists())
}

/// Headless Chromium with a fresh profile; returns its standard output.
fn run_chromium(browser: &str, profile: &std::path::Path, args: &[&str]) -> String {
    let o = std::process::Command::new(browser)
        .args([
            "--headless",
            "--no-sandbox",
            "--disable-gpu",
            "--no-first-run",
            "--disable-background-networking",
            "--disable-component-update",
            "--disable-sync",
            &format!("--user-data-dir={}", profile.display()),
        ])
        .args(args)
        .output()
        .expect("chromium runs");
    String::from_utf8_lossy(&o.stdout).into_owned()
}

/// The demo's decision record laid out by headless Chromium at 1000 px (and 1300 px, and 700 px,
/// narrower than the printable width of A4 and Letter), and with its print rules at the printable
/// widths of Letter and A4: no table or figure overflows its container or the window, and no
/// word is broken across lines except after a hyphen or a slash (checked on every text node by
/// tests/data/layout-check.js, injected into a copy of the page; the result is read from the DOM
/// --dump-dom prints). Then printed to PDF on Letter and A4: every section is in the
/// PDF's text (pdftotext, poppler-utils, where installed).
#[test]
fn record_layout_on_screen_and_on_paper() {
    let Some(browser) = chromium() else {
        eprintln!("chromium is not installed: the record's layout was not checked (install Debian's chromium)");
        return;
    };
    let d = tempfile::tempdir().unwrap();
    let o = run_in(d.path(), &["demo", "--out", "out"]);
    assert_eq!(o.status.code(), Some(0), "{}", stderr(&o));
    let page = d.path().join("out/report.html");
    let html = std::fs::read_to_string(&page).unwrap();
    let script =
        std::fs::read_to_string(repo().join("crates/oblique-cli/tests/data/layout-check.js"))
            .unwrap();
    let check = d.path().join("check.html");
    std::fs::write(
        &check,
        html.replace("</body>", &format!("<script>{script}</script></body>")),
    )
    .unwrap();
    // The print rules laid out on screen at the printable width of Letter (8.5 in less the
    // 12 mm side margins of the record's @page: 725 px) and of A4 (210 mm less 24 mm: 703 px).
    let print = d.path().join("check-print.html");
    std::fs::write(
        &print,
        std::fs::read_to_string(&check)
            .unwrap()
            .replace("@media print", "@media all"),
    )
    .unwrap();
    for (width, page) in [
        (1000, &check),
        (1300, &check),
        (700, &check),
        (725, &print),
        (703, &print),
    ] {
        let profile = d.path().join(format!("profile-{width}"));
        let dom = run_chromium(
            browser,
            &profile,
            &[
                &format!("--window-size={width},900"),
                "--dump-dom",
                &format!("file://{}", page.display()),
            ],
        );
        // The last one: the script's own comment names the element too.
        let start = dom
            .rfind("<pre id=\"layout-check\">")
            .expect("the check ran")
            + 23;
        let end = start + dom[start..].find("</pre>").expect("end");
        let json = dom[start..end]
            .replace("&quot;", "\"")
            .replace("&lt;", "<")
            .replace("&gt;", ">")
            .replace("&amp;", "&");
        let v: serde_json::Value = serde_json::from_str(&json).expect("the check's JSON");
        assert!(v["tables"].as_u64().unwrap() >= 10, "{v}");
        assert!(v["words"].as_u64().unwrap() >= 1000, "{v}");
        assert!(v["figures"].as_u64().unwrap() >= 2, "{v}");
        assert_eq!(
            v["overflow"].as_array().unwrap().len(),
            0,
            "at {width} px: {v}"
        );
        assert_eq!(
            v["broken"].as_array().unwrap().len(),
            0,
            "at {width} px: {v}"
        );
    }
    let a4 = d.path().join("a4.html");
    std::fs::write(
        &a4,
        html.replacen("<style>", "<style>@page { size: A4; }", 1),
    )
    .unwrap();
    for (name, src) in [("letter", &page), ("a4", &a4)] {
        let pdf = d.path().join(format!("{name}.pdf"));
        let profile = d.path().join(format!("profile-{name}"));
        run_chromium(
            browser,
            &profile,
            &[
                "--no-pdf-header-footer",
                &format!("--print-to-pdf={}", pdf.display()),
                &format!("file://{}", src.display()),
            ],
        );
        let bytes = std::fs::read(&pdf).unwrap_or_else(|e| panic!("no {name} PDF: {e}"));
        assert!(
            bytes.starts_with(b"%PDF") && bytes.len() > 100_000,
            "{name}: {} bytes",
            bytes.len()
        );
        let Ok(t) = std::process::Command::new("pdftotext")
            .args(["-layout"])
            .arg(&pdf)
            .arg("-")
            .output()
        else {
            eprintln!("pdftotext is not installed: the PDF's sections were not checked (install poppler-utils)");
            continue;
        };
        let text = String::from_utf8_lossy(&t.stdout);
        for section in [
            "Decision record: demo-al6061-on-cu",
            "The question",
            "Verdict",
            "The chosen set-up: A",
            "Alternatives considered",
            "The window at the chosen point",
            "Headroom along the two controls",
            "Criteria: relations and sources",
            "User boundaries",
            "Window plots",
            "Trials and agreement",
            "Material properties and sources",
            "Assumptions and what is unconfirmed",
            "What this result does not cover",
            "Cautions",
            "References",
            "Provenance",
            "Files that entered the computation",
        ] {
            assert!(text.contains(section), "{name} PDF: missing '{section}'");
        }
        assert!(text.matches('\u{c}').count() >= 8, "{name}: too few pages");
    }
}

/// A boundary drawn in the impact-velocity plane is a curve in the collision-velocity plane:
/// drawn through points taken along each of its segments (32 a segment), not as chords
/// between its converted corners, which put an inside point on the wrong side of it.
#[test]
fn a_boundary_is_drawn_as_a_curve_in_the_other_plane() {
    let dir = tempfile::tempdir().expect("temp dir");
    let out = dir.path().join("vc.svg");
    let o = run(&[
        "plot",
        "--pair",
        "demo-al6061-on-cu",
        "--plane",
        "angle-collision-velocity",
        "-o",
        out.to_str().expect("utf-8"),
    ]);
    assert_eq!(o.status.code(), Some(0), "{}", stderr(&o));
    let svg = std::fs::read_to_string(&out).expect("svg");
    // The solid boundary (the demo's lowest welding velocity line, 4 corners: 3 segments).
    let most = svg
        .split("<polyline ")
        .filter(|p| p.contains("stroke=\"#000000\" stroke-width=\"3\""))
        .filter_map(|p| p.split("points=\"").nth(1))
        .map(|pts| {
            pts.split('"')
                .next()
                .unwrap_or("")
                .split_whitespace()
                .count()
        })
        .max()
        .expect("a boundary line");
    assert!(
        most > 3 * 16,
        "the longest boundary line has only {most} vertices"
    );
}
