//! The report's style sheet: readable on screen from 1000 px wide (no word broken inside; long
//! paths break only after a slash), and printed on A4 or Letter with each part on a new page,
//! table rows and figures never split, table headers repeated; every figure fits the width it is
//! given, border included.

/// The CSS, inlined in the page.
pub const CSS: &str = r#"
@page { margin: 14mm 12mm 15mm 12mm; }
body { font-family: "DejaVu Sans", Arial, sans-serif; margin: 1.5em auto; max-width: 1100px; color: #1a1a1a; line-height: 1.45; padding: 0 1.2em; font-size: 15px; }
h1 { font-size: 1.55em; margin: 0 0 0.25em 0; }
h2 { font-size: 1.22em; border-bottom: 2px solid #d0d7de; padding-bottom: 0.2em; margin-top: 1.5em; break-after: avoid; page-break-after: avoid; }
h3 { font-size: 1.02em; margin: 1.1em 0 0.3em 0; break-after: avoid; page-break-after: avoid; }
p, li { overflow-wrap: normal; }
table { border-collapse: collapse; margin: 0.5em 0 0.9em 0; font-size: 0.86em; width: 100%; }
th, td { border: 1px solid #c8ccd0; padding: 0.28em 0.5em; text-align: left; vertical-align: top; overflow-wrap: normal; word-break: normal; hyphens: manual; }
th { background: #eef2f6; font-weight: bold; }
td.num { text-align: right; font-variant-numeric: tabular-nums; white-space: nowrap; }
td.fig { text-align: right; font-variant-numeric: tabular-nums; }
thead { display: table-header-group; }
tr { break-inside: avoid; page-break-inside: avoid; }
.nw { white-space: nowrap; }
code { font-family: "DejaVu Sans Mono", monospace; font-size: 0.9em; background: #f3f3f3; padding: 0 0.15em; }
code.hash { font-size: 0.74em; background: none; white-space: nowrap; }
.meta { width: auto; min-width: 60%; }
.meta th { width: 11em; }
.verdict { border: 3px solid #1b4f8a; padding: 0.7em 1.1em; border-radius: 6px; background: #f2f7fc; break-inside: avoid; page-break-inside: avoid; }
.verdict.outside { border-color: #a50f15; background: #fcf2f2; }
.verdict .big { font-size: 1.35em; font-weight: bold; }
.probability { border-top: 1px solid #b8c4d0; margin-top: 0.6em; padding-top: 0.4em; }
.caution { border-left: 6px solid #b35806; background: #fff6ec; padding: 0.5em 1em; break-inside: avoid; page-break-inside: avoid; }
.keep { break-inside: avoid; page-break-inside: avoid; }
.invented { border-left: 6px solid #a50f15; background: #fdf0f0; padding: 0.5em 1em; font-weight: bold; }
.warning { border-left: 6px solid #b35806; background: #fff6ec; padding: 0.4em 0.8em; }
.fail { color: #a50f15; font-weight: bold; }
.ok { color: #1b5e20; }
.chosen td { background: #f2f7fc; }
.small { font-size: 0.86em; }
figure { margin: 0.6em 0 1em 0; break-inside: avoid; page-break-inside: avoid; }
figure svg { box-sizing: border-box; width: 100%; max-width: 100%; height: auto; border: 1px solid #e0e0e0; }
figcaption { font-size: 0.86em; color: #333; }
footer { margin-top: 2em; font-size: 0.85em; color: #444; border-top: 1px solid #ccc; padding-top: 0.6em; }
@media print {
  body { max-width: none; margin: 0; padding: 0; font-size: 9.5pt; }
  .part { break-before: page; page-break-before: always; }
  .part.first { break-before: auto; page-break-before: auto; }
  h2 { margin-top: 0.6em; }
  table { font-size: 0.84em; }
  img, svg, object { box-sizing: border-box; max-width: 100% !important; height: auto !important; }
}
"#;
