//! The decision record: one self-contained HTML file (inline CSS and SVG, no script, no external
//! resource) and its JSON twin. It says what was asked, what was chosen and why, every
//! alternative considered and why it was not chosen, the criteria, trials, plots, assumptions
//! and limits of the result, the references cited, and who prepared and checked it from which
//! files (SHA-256). Every user-supplied string is escaped.
//!
//! The HTML is built part by part (`html`): [`html`] assembles the parts; the JSON twin is
//! [`json`]. A weld probability, when a later version computes one, goes in
//! [`ReportInput::probability`] and is shown with the verdict.

mod html;
mod json;
mod style;

pub use json::json;

use crate::error::RenderResult;
use crate::window_plot::ProcessCurve;
use oblique_setup::{Decision, FileUse};
use oblique_window::references::References;
use oblique_window::{Agreement, PairWindow};

/// Escape text for HTML and XML (element content and attribute values).
pub fn esc(s: &str) -> String {
    let mut out = String::with_capacity(s.len());
    for ch in s.chars() {
        match ch {
            '&' => out.push_str("&amp;"),
            '<' => out.push_str("&lt;"),
            '>' => out.push_str("&gt;"),
            '"' => out.push_str("&quot;"),
            '\'' => out.push_str("&#39;"),
            c => out.push(c),
        }
    }
    out
}

/// Who made the record, when, with what, from which files.
#[derive(Debug, Clone, PartialEq, Eq)]
pub struct Provenance {
    /// The tool's version.
    pub version: String,
    /// Date and time of the record, `YYYY-MM-DD HH:MM:SS UTC`.
    pub generated: String,
    /// True when the time comes from `SOURCE_DATE_EPOCH` (a reproducible record).
    pub from_source_date_epoch: bool,
    /// Who prepared it.
    pub prepared_by: Option<String>,
    /// Who checked it.
    pub checked_by: Option<String>,
    /// The command that made it.
    pub command: String,
    /// Every file that entered the computation.
    pub files: Vec<FileUse>,
}

/// A weld probability for the chosen set-up (filled when the capability exists; shown with the
/// verdict and in the JSON).
#[derive(Debug, Clone, PartialEq)]
pub struct Probability {
    /// The probability that the chosen set-up welds, 0 to 1.
    pub value: f64,
    /// A credible or confidence interval, if one is given.
    pub interval: Option<(f64, f64)>,
    /// How it was computed, in words.
    pub method: String,
}

/// Everything a report needs.
pub struct ReportInput<'a> {
    /// The window.
    pub window: &'a PairWindow,
    /// The chosen set-up and the alternatives (the chosen one must have a window check).
    pub decision: &'a Decision<'a>,
    /// Agreement with the trials.
    pub agreement: &'a Agreement,
    /// The question, in the person's words; `None`: built from the chosen set-up.
    pub question: Option<String>,
    /// Process curves to show on the plots.
    pub curves: Vec<ProcessCurve>,
    /// Who, when, with what, from which files.
    pub provenance: Provenance,
    /// The weld probability of the chosen set-up, when computed.
    pub probability: Option<Probability>,
    /// The weld probability of each alternative (the order of `decision.alternatives`), under
    /// the chosen set-up's scatter rule; empty when none was computed.
    pub alternative_probabilities: Vec<Option<f64>>,
    /// The project's reference list.
    pub references: &'a References,
}

/// Assumptions and what is unconfirmed, in words (see docs/theory.md).
pub fn assumptions(window: &PairWindow) -> Vec<String> {
    let mut a = vec![
        format!("Velocity convention: {} (the relation between impact velocity and collision-point velocity is a modelling choice; the other conventions give other collision velocities for the same shot).", window.convention),
        "Steady collision: the relations hold for a collision point moving at constant speed and angle.".into(),
        "Impact pressure from one-dimensional impedance matching of the linear Hugoniots at closing speed Vp [M94]; oblique effects are ignored.".into(),
        "Dissimilar pair: each material-dependent limit is evaluated for both plates and the more demanding one kept; no published rule says whose properties enter each limit.".into(),
        "The Hugoniot intercept C0 stands in for the bulk sound speed (within a few percent for these metals).".into(),
        "Deribas k (0.6 to 1.2) [DKM67] and the Wittman constant N = 0.11 [CW75] are from memory; the exponents of the Wittman melting limit are uncertain and two forms circulate (form used: see the criteria table).".into(),
        "The subsonic jetting condition [CH63] and the shock-polar construction [WSW53] are from memory; the equal-pressure construction for dissimilar plates is derived here.".into(),
        "The wavy-interface transition (Re = 10.6) and the wavelength 26 h sin^2(beta/2) [CBH71] are from memory and informational only.".into(),
        "5 x HEL as the lower pressure limit [K10] is common practice for magnetic pulse welding, not a law.".into(),
    ];
    for rec in [&window.flyer, &window.parent] {
        for (prop, p) in &rec.sources {
            if p.key == "MEM" {
                a.push(format!(
                    "{} {}: {} is from memory [MEM].",
                    rec.material.id, prop, p.as_written
                ));
            }
            if let Some(note) = &p.note {
                if note.starts_with("stand-in") {
                    a.push(format!("{} {}: {}", rec.material.id, prop, note));
                }
            }
        }
    }
    if !window.boundaries.is_empty() {
        a.push("User boundaries are used only over the span of their points; outside it a point is flagged as outside the trial data, never extrapolated.".into());
    }
    a
}

/// What the result does not cover.
pub const DOES_NOT_COVER: [&str; 7] = [
    "It does not simulate the collision: every limit is a steady-state, one-dimensional or shock-polar estimate.",
    "It does not compute the collision angle a tool produces: the angle is an input taken from the geometry (taper, chamfer, preset angle).",
    "The impact velocity of a process set-up is a lumped-model estimate; an uncalibrated efficiency overestimates it.",
    "Scatter from shot to shot, surface preparation, coatings, fit-up and alignment are not modelled; the velocity headroom is the only allowance for them.",
    "Joint strength, fatigue, corrosion, intermetallic growth in service and leak tightness are not assessed.",
    "Equipment safety, fixture strength, part ejection and the site's procedures are not assessed.",
    "A verdict holds only for the materials, thicknesses and convention stated here, and only as far as the material values and trials on file are right.",
];

/// The cautions, in full.
pub const CAUTIONS: [&str; 5] = [
    "This is a screening estimate from published relations and the trials listed here. It is not a guarantee that a joint will weld, nor that it is safe to make.",
    "Magnetic pulse and foil-actuator equipment works at lethal voltages and stores lethal energy: only trained, authorised people may charge or fire a bank, following its interlocks, discharge and earthing procedures.",
    "Explosive welding must be planned, licensed and carried out under the explosives law of the site, by licensed shot-firers, with the exclusion zones it prescribes.",
    "Flyers, fragments and ejected jet material travel at hundreds of metres per second: guard every shot and keep people out of its line.",
    "Follow local codes and licensed practice; confirm every set-up with sectioned and tested trial joints before production.",
];

/// Build the HTML report.
///
/// # Errors
/// Plot errors; [`crate::RenderError::Draw`] when the chosen set-up has no window check.
pub fn html(input: &ReportInput<'_>) -> RenderResult<String> {
    // User text (names, sources, notes) may hold characters HTML forbids (NUL, ESC, ...):
    // shown as visible control pictures, so the page stays well-formed.
    html::page(input).map(|page| oblique_window::present::xml_safe(&page).into_owned())
}

/// The command line as typed, quoted for a POSIX shell.
pub fn command_line() -> String {
    std::env::args()
        .enumerate()
        .map(|(i, a)| {
            let a = if i == 0 { "oblique".to_string() } else { a };
            if !a.is_empty()
                && a.chars()
                    .all(|c| c.is_ascii_alphanumeric() || "-_./:=,+@%".contains(c))
            {
                a
            } else {
                format!("'{}'", a.replace('\'', "'\\''"))
            }
        })
        .collect::<Vec<_>>()
        .join(" ")
}

/// The time of a record: `SOURCE_DATE_EPOCH` (seconds since 1970, for reproducible records)
/// when set, else `now` (seconds since 1970); as `YYYY-MM-DD HH:MM:SS UTC` and whether it came
/// from the variable.
///
/// # Errors
/// A message when `SOURCE_DATE_EPOCH` is set but is not a whole number of seconds.
pub fn record_time(source_date_epoch: Option<&str>, now: i64) -> Result<(String, bool), String> {
    let (secs, fixed) = match source_date_epoch {
        Some(s) => (
            // The reproducible-builds convention: a non-negative whole number of seconds; a
            // year past 9999 would not print as a date either.
            s.trim()
                .parse::<i64>()
                .ok()
                .filter(|v| (0..=253_402_300_799).contains(v))
                .ok_or_else(|| {
                    format!(
                        "SOURCE_DATE_EPOCH='{}' is not a whole number of seconds from 1970-01-01 to 9999-12-31",
                        oblique_window::text::short(s, 40)
                    )
                })?,
            true,
        ),
        None => (now, false),
    };
    let days = secs.div_euclid(86_400);
    let rem = secs.rem_euclid(86_400);
    // Civil-from-days (H. Hinnant's algorithm, public domain).
    let z = days + 719_468;
    let era = z.div_euclid(146_097);
    let doe = z - era * 146_097;
    let yoe = (doe - doe / 1460 + doe / 36_524 - doe / 146_096) / 365;
    let y = yoe + era * 400;
    let doy = doe - (365 * yoe + yoe / 4 - yoe / 100);
    let mp = (5 * doy + 2) / 153;
    let d = doy - (153 * mp + 2) / 5 + 1;
    let m = if mp < 10 { mp + 3 } else { mp - 9 };
    let y = if m <= 2 { y + 1 } else { y };
    Ok((
        format!(
            "{y:04}-{m:02}-{d:02} {:02}:{:02}:{:02} UTC",
            rem / 3600,
            (rem / 60) % 60,
            rem % 60
        ),
        fixed,
    ))
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn record_time_honours_source_date_epoch() {
        assert_eq!(
            record_time(Some("1767225600"), 5),
            Ok(("2026-01-01 00:00:00 UTC".to_string(), true))
        );
        assert_eq!(
            record_time(None, 951_782_400 + 3_661),
            Ok(("2000-02-29 01:01:01 UTC".to_string(), false))
        );
        assert!(record_time(Some("soon"), 0).is_err());
    }
}
