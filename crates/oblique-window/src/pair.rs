//! Pair window files: one material pair and flyer thickness, the model criteria in use, the
//! user's boundaries and the trial observations, with provenance. See `docs/window-format.md`.

use crate::boundary::{self_crossing, Boundary, Plane, WeldSide};
use crate::diag::{close_matches, parse_ron, Collector, Diagnostics};
use crate::materials::{validate_entries, MaterialEntry, MaterialRecord, Revision};
use oblique_core::units::{Angle, Length, QuantityKind, Velocity};
use oblique_core::{
    Convention, CriteriaConfig, CriterionId, MixedRule, ValidityDomain, WittmanForm,
};
use serde::{Deserialize, Serialize};
use std::collections::BTreeMap;

mod validate;

/// The format tag every pair window file carries.
pub const WINDOW_FORMAT: &str = "oblique-window/1";

fn yes() -> bool {
    true
}

/// A criterion that has only a switch.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct Switch {
    /// On or off.
    #[serde(default = "yes")]
    pub enabled: bool,
    /// Why it was changed from the default, if it was.
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub reason: Option<String>,
}

impl Default for Switch {
    fn default() -> Self {
        Self {
            enabled: true,
            reason: None,
        }
    }
}

/// Deribas settings.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct DeribasEntry {
    /// On or off.
    #[serde(default = "yes")]
    pub enabled: bool,
    /// Constant k.
    #[serde(default = "default_k")]
    pub k: f64,
    /// Why it was changed from the default, if it was.
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub reason: Option<String>,
}
fn default_k() -> f64 {
    0.6
}
impl Default for DeribasEntry {
    fn default() -> Self {
        Self {
            enabled: true,
            k: default_k(),
            reason: None,
        }
    }
}

/// Pressure-limit settings.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct PressureEntry {
    /// On or off; absent: the default of the window's process ([`pressure_default`]).
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub enabled: Option<bool>,
    /// Multiple of the Hugoniot elastic limit.
    #[serde(default = "default_hel")]
    pub hel_multiple: f64,
    /// Why it was changed from the default, if it was.
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub reason: Option<String>,
}
fn default_hel() -> f64 {
    5.0
}
impl Default for PressureEntry {
    fn default() -> Self {
        Self {
            enabled: None,
            hel_multiple: default_hel(),
            reason: None,
        }
    }
}

/// Whether the pressure limit (p >= m HEL) is on by default for a process (`None`: the file
/// names no process), and why (docs/theory.md §5.4). Its source, Kore et al. 2010 as quoted,
/// states it for magnetic pulse welding; the classical explosive-welding windows are drawn
/// without it, so it is off for explosive welding; for the other processes, and when the
/// process is not given, it stays on as the conservative choice (a lower limit can only remove
/// points from the window).
#[must_use]
pub fn pressure_default(process: Option<&str>) -> (bool, &'static str) {
    match process {
        Some("magnetic-pulse") => (
            true,
            "on: stated for magnetic pulse welding (Kore et al. 2010, as quoted)",
        ),
        Some("explosive") => (
            false,
            "off for explosive welding: its source states it for magnetic pulse welding, and the classical explosive-welding windows are drawn without it",
        ),
        Some(_) => (
            true,
            "on as the conservative choice (common practice): its source states it for magnetic pulse welding only",
        ),
        None => (
            true,
            "on as the conservative choice: stated for magnetic pulse welding, and no process is given",
        ),
    }
}

/// Melting-limit settings.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct MeltingEntry {
    /// On or off.
    #[serde(default = "yes")]
    pub enabled: bool,
    /// Wittman constant N.
    #[serde(default = "default_n")]
    pub n: f64,
    /// `"a"` or `"b"` (see docs/theory.md).
    #[serde(default = "default_form")]
    pub form: String,
    /// Why it was changed from the default, if it was.
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub reason: Option<String>,
}
fn default_n() -> f64 {
    0.11
}
fn default_form() -> String {
    "a".into()
}
impl Default for MeltingEntry {
    fn default() -> Self {
        Self {
            enabled: true,
            n: default_n(),
            form: default_form(),
            reason: None,
        }
    }
}

/// Jetting settings.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct JettingEntry {
    /// On or off.
    #[serde(default = "yes")]
    pub enabled: bool,
    /// The rule of the mixed case (one plate supersonic, the other subsonic):
    /// `"supersonic-side-polar"` (the default, conservative) or `"either-subsonic"`
    /// (docs/theory.md §4.3).
    #[serde(default = "default_mixed")]
    pub mixed: String,
    /// Why it was changed from the default, if it was.
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub reason: Option<String>,
}
fn default_mixed() -> String {
    MixedRule::default().as_str().into()
}
impl Default for JettingEntry {
    fn default() -> Self {
        Self {
            enabled: true,
            mixed: default_mixed(),
            reason: None,
        }
    }
}

/// Wavy-transition settings.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct WavyEntry {
    /// On or off.
    #[serde(default = "yes")]
    pub enabled: bool,
    /// Critical Reynolds number.
    #[serde(default = "default_re")]
    pub critical_reynolds: f64,
    /// Why it was changed from the default, if it was.
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub reason: Option<String>,
}
fn default_re() -> f64 {
    10.6
}
impl Default for WavyEntry {
    fn default() -> Self {
        Self {
            enabled: true,
            critical_reynolds: default_re(),
            reason: None,
        }
    }
}

/// The model criteria section.
#[derive(Debug, Clone, PartialEq, Default, Serialize, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct CriteriaSection {
    /// Deribas lower angle.
    #[serde(default)]
    pub deribas_lower: DeribasEntry,
    /// Strength lower velocity.
    #[serde(default)]
    pub strength_lower: Switch,
    /// Pressure lower.
    #[serde(default)]
    pub pressure_lower: PressureEntry,
    /// Wittman melting upper.
    #[serde(default)]
    pub melting_upper: MeltingEntry,
    /// Jetting.
    #[serde(default)]
    pub jetting: JettingEntry,
    /// Wavy transition (informational).
    #[serde(default)]
    pub wavy_transition: WavyEntry,
}

/// A boundary as written.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct BoundaryEntry {
    /// Label.
    pub label: String,
    /// `angle-impact-velocity` or `angle-collision-velocity`.
    pub plane: String,
    /// `above`, `below`, `left` or `right`.
    pub weld_side: String,
    /// Points as (velocity, angle), units in the strings.
    pub points: Vec<(String, String)>,
    /// Where the line comes from.
    pub provenance: String,
}

/// An observation as written.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct ObservationEntry {
    /// Impact velocity in the file's convention, with unit.
    pub velocity: String,
    /// Collision angle, with unit.
    pub angle: String,
    /// `welded`, `not-welded`, `partial` or `melted`.
    pub outcome: String,
    /// `magnetic-pulse`, `explosive`, `foil-actuator`, `laser`, `gas-gun` or `other`.
    pub process: String,
    /// How velocity and angle were obtained: `measured`, `simulated` or `estimated`.
    pub method: String,
    /// Standard uncertainty of the velocity, with unit.
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub velocity_uncertainty: Option<String>,
    /// Standard uncertainty of the angle, with unit.
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub angle_uncertainty: Option<String>,
    /// ISO date of the shot.
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub date: Option<String>,
    /// Source or report reference.
    pub source: String,
    /// Free note.
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub note: Option<String>,
}

/// One fitted constant: the estimate and its interval (either end absent when the trials do
/// not bound the constant on that side).
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct FittedValue {
    /// The estimate.
    pub value: f64,
    /// Lower end of the interval, if the trials bound the constant from below.
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub low: Option<f64>,
    /// Upper end of the interval, if the trials bound the constant from above.
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub high: Option<f64>,
}

/// Criterion constants fitted to the pair's own trials (written by `oblique pair fit --save`),
/// with their provenance. When present, the fitted values replace the `criteria` section's
/// constants for every use of the window.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct Fitted {
    /// ISO date of the fit.
    pub date: String,
    /// How the constants were fitted, in words.
    pub method: String,
    /// Number of observations the fit used.
    pub observations: usize,
    /// Confidence level of the intervals (0.95 for 95 %).
    #[serde(default = "default_level")]
    pub level: f64,
    /// Deribas k.
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub deribas_k: Option<FittedValue>,
    /// Wittman N.
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub wittman_n: Option<FittedValue>,
    /// HEL multiple m.
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub hel_multiple: Option<FittedValue>,
}

/// Four significant digits, trailing zeros dropped (as the fit's table prints constants).
fn four_digits(x: f64) -> String {
    if x == 0.0 || !x.is_finite() {
        return format!("{x}");
    }
    let digits = (3 - x.abs().log10().floor() as i32).clamp(0, 9) as usize;
    let s = format!("{x:.digits$}");
    if s.contains('.') {
        s.trim_end_matches('0').trim_end_matches('.').to_string()
    } else {
        s
    }
}

fn default_level() -> f64 {
    0.95
}

impl Fitted {
    /// The names of the constants a fit may carry, with the largest value accepted for each
    /// (the command line's bounds, docs/theory.md).
    pub const CONSTANTS: [(&'static str, f64); 3] = [
        ("deribas_k", 5.0),
        ("wittman_n", 10.0),
        ("hel_multiple", 100.0),
    ];

    /// A fitted constant by name (`deribas_k`, `wittman_n`, `hel_multiple`).
    pub fn constant(&self, key: &str) -> Option<&FittedValue> {
        match key {
            "deribas_k" => self.deribas_k.as_ref(),
            "wittman_n" => self.wittman_n.as_ref(),
            "hel_multiple" => self.hel_multiple.as_ref(),
            _ => None,
        }
    }

    /// Each fitted constant with its name, in file order.
    pub fn constants(&self) -> impl Iterator<Item = (&'static str, &FittedValue)> {
        [
            ("deribas_k", self.deribas_k.as_ref()),
            ("wittman_n", self.wittman_n.as_ref()),
            ("hel_multiple", self.hel_multiple.as_ref()),
        ]
        .into_iter()
        .filter_map(|(k, v)| v.map(|v| (k, v)))
    }

    /// Put the fitted values into a criteria configuration.
    pub fn apply(&self, criteria: &mut CriteriaConfig) {
        if let Some(v) = &self.deribas_k {
            criteria.deribas_k = v.value;
        }
        if let Some(v) = &self.wittman_n {
            criteria.wittman_n = v.value;
        }
        if let Some(v) = &self.hel_multiple {
            criteria.hel_multiple = v.value;
        }
    }

    /// "fitted to N trials on DATE", for outputs.
    pub fn summary(&self) -> String {
        format!("fitted to {} trials on {}", self.observations, self.date)
    }

    /// What a user of the fitted constants must know, one sentence each: the file now holds
    /// another number of trials than the fit used (`observations_now`); a constant sits at the
    /// end of a one-sided interval (the trials bound it on that side only, so its spread there
    /// is not measured); a Deribas k outside 0.6 to 1.2, the published range (from memory,
    /// docs/theory.md).
    #[must_use]
    pub fn cautions(&self, pair: &str, observations_now: usize) -> Vec<String> {
        let mut out = Vec::new();
        if observations_now != self.observations {
            out.push(format!(
                "the constants were fitted to {} trials, the file now holds {observations_now}: run `oblique pair fit {pair} --save` again",
                self.observations
            ));
        }
        for (key, v) in self.constants() {
            let at =
                |end: Option<f64>| end.is_some_and(|e| (e - v.value).abs() <= 1e-3 * v.value.abs());
            let side = match (v.low, v.high) {
                (None, Some(_)) if at(v.high) => Some("upper"),
                (Some(_), None) if at(v.low) => Some("lower"),
                _ => None,
            };
            if let Some(side) = side {
                out.push(format!(
                    "{key} {} is the {side} end of a one-sided interval: the trials bound it on that side only, so the value is where the trials stop, not a best estimate (the weld probability takes the prior spread on both sides)",
                    four_digits(v.value)
                ));
            }
        }
        if let Some(k) = &self.deribas_k {
            if !(0.6..=1.2).contains(&k.value) {
                out.push(format!(
                    "fitted deribas_k {} is outside 0.6 (carefully cleaned surfaces) to 1.2, the published range (from memory, docs/theory.md): read the fit with suspicion (few trials, another process, or a limit that is not the Deribas one)",
                    four_digits(k.value)
                ));
            }
        }
        out
    }
}

/// The whole pair window file.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct PairFile {
    /// Must be [`WINDOW_FORMAT`].
    pub format: String,
    /// Unique pair name.
    pub name: String,
    /// What the window is for.
    #[serde(default)]
    pub description: String,
    /// Set when the data are invented (demo): says so in words.
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub invented: Option<String>,
    /// Flyer material id.
    pub flyer: String,
    /// Parent material id.
    pub parent: String,
    /// Flyer thickness with unit.
    pub flyer_thickness: String,
    /// Parent thickness with unit, if known.
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub parent_thickness: Option<String>,
    /// Velocity convention of the observations and of `angle-impact-velocity` boundaries.
    pub convention: String,
    /// The process the window is for (one of [`PROCESSES`]); sets the default of the pressure
    /// limit ([`pressure_default`]). Absent: not given.
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub process: Option<String>,
    /// Who maintains the file.
    pub maintainer: String,
    /// Revision notes.
    #[serde(default)]
    pub revisions: Vec<Revision>,
    /// Model criteria in use.
    #[serde(default)]
    pub criteria: CriteriaSection,
    /// User boundaries.
    #[serde(default)]
    pub boundaries: Vec<BoundaryEntry>,
    /// Source keys for inline materials.
    #[serde(default)]
    pub sources: BTreeMap<String, String>,
    /// Inline materials; for this file they take precedence over library materials of the same id.
    #[serde(default)]
    pub materials: Vec<MaterialEntry>,
    /// Trial observations.
    #[serde(default)]
    pub observations: Vec<ObservationEntry>,
    /// Criterion constants fitted to the observations (`oblique pair fit --save`).
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub fitted: Option<Fitted>,
}

/// Observed result of a trial.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash, PartialOrd, Ord, Serialize)]
#[serde(rename_all = "kebab-case")]
pub enum Outcome {
    /// Sound weld.
    Welded,
    /// No bond.
    NotWelded,
    /// Bond over part of the interface.
    Partial,
    /// Melted or brittle interface.
    Melted,
}

impl Outcome {
    /// All outcomes.
    pub const ALL: [Outcome; 4] = [
        Outcome::Welded,
        Outcome::NotWelded,
        Outcome::Partial,
        Outcome::Melted,
    ];
    /// The word in files and flags.
    pub fn as_str(self) -> &'static str {
        match self {
            Outcome::Welded => "welded",
            Outcome::NotWelded => "not-welded",
            Outcome::Partial => "partial",
            Outcome::Melted => "melted",
        }
    }
    /// Parse the word.
    pub fn parse(s: &str) -> Option<Self> {
        Self::ALL.into_iter().find(|o| o.as_str() == s)
    }

    /// As [`Outcome::parse`], in any letter case and with `_` or a space for `-`
    /// (`Welded`, `NOT_WELDED`, `not welded`), for text typed by people.
    #[must_use]
    pub fn parse_loose(s: &str) -> Option<Self> {
        Self::parse(&canonical_word(s))
    }
}

/// A word as the files store it: trimmed, lower case, `-` for `_` and spaces.
#[must_use]
pub fn canonical_word(s: &str) -> String {
    s.trim()
        .to_lowercase()
        .split(|c: char| c == '_' || c.is_whitespace() || c == '-')
        .filter(|p| !p.is_empty())
        .collect::<Vec<_>>()
        .join("-")
}

/// The process of a trial.
pub const PROCESSES: [&str; 6] = [
    "magnetic-pulse",
    "explosive",
    "foil-actuator",
    "laser",
    "gas-gun",
    "other",
];
/// How a trial's velocity and angle were obtained.
pub const METHODS: [&str; 3] = ["measured", "simulated", "estimated"];

/// Observed impact velocities above this are refused (m/s): no impact-welding process reaches
/// them (common practice bound; two-stage light-gas guns reach about 8 km/s).
pub const MAX_OBSERVED_VELOCITY_M_S: f64 = 10_000.0;

/// A validated observation.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct Observation {
    /// Position in the file's list.
    pub index: usize,
    /// Impact velocity (file's convention).
    pub velocity: Velocity,
    /// Collision angle.
    pub angle: Angle,
    /// Observed outcome.
    pub outcome: Outcome,
    /// Process word.
    pub process: String,
    /// Method word.
    pub method: String,
    /// Velocity uncertainty.
    pub velocity_uncertainty: Option<Velocity>,
    /// Angle uncertainty.
    pub angle_uncertainty: Option<Angle>,
    /// Date.
    pub date: Option<String>,
    /// Source.
    pub source: String,
    /// Note.
    pub note: Option<String>,
}

impl Observation {
    /// The same shot as far as a record can tell: the same velocity, angle, outcome and source
    /// (a repeated import; the shot a removal was asked for).
    #[must_use]
    pub fn same_shot(&self, other: &Observation) -> bool {
        self.velocity.si() == other.velocity.si()
            && self.angle.degrees() == other.angle.degrees()
            && self.outcome == other.outcome
            && self.source == other.source
    }
}

/// Where a pair window was loaded from.
#[derive(Debug, Clone, PartialEq)]
pub struct Origin {
    /// The name used in messages: a path, or `built-in:windows/NAME.ron`.
    pub display: String,
    /// The file on disk, for user files.
    pub path: Option<std::path::PathBuf>,
    /// SHA-256 of the file's bytes, hex.
    pub sha256: String,
}

/// A validated pair window.
#[derive(Debug, Clone)]
pub struct PairWindow {
    /// Unique name.
    pub name: String,
    /// Description.
    pub description: String,
    /// Invented-data statement, if any.
    pub invented: Option<String>,
    /// Flyer.
    pub flyer: MaterialRecord,
    /// Parent.
    pub parent: MaterialRecord,
    /// Flyer thickness.
    pub flyer_thickness: Length,
    /// Parent thickness.
    pub parent_thickness: Option<Length>,
    /// Convention of the observations.
    pub convention: Convention,
    /// The process the window is for, if given.
    pub process: Option<String>,
    /// Where the window's relations are claimed to hold (docs/theory.md §7.1).
    pub domain: ValidityDomain,
    /// Maintainer.
    pub maintainer: String,
    /// Revisions.
    pub revisions: Vec<Revision>,
    /// Criteria configuration.
    pub criteria: CriteriaConfig,
    /// Reasons recorded for changed criteria.
    pub criteria_reasons: BTreeMap<CriterionId, String>,
    /// Boundaries.
    pub boundaries: Vec<Boundary>,
    /// Observations.
    pub observations: Vec<Observation>,
    /// Constants fitted to the observations, when the file has them (already applied to
    /// `criteria`).
    pub fitted: Option<Fitted>,
    /// Origin.
    pub origin: Origin,
}

pub use crate::diag::is_iso_date;
pub use validate::empty_window;

/// Resolve a material id against the library, falling back to the file's inline materials.
fn resolve(
    c: &mut Collector<'_>,
    field: &str,
    id: &str,
    inline: &[MaterialRecord],
    library: &BTreeMap<String, MaterialRecord>,
) -> Option<MaterialRecord> {
    if let Some(m) = inline.iter().find(|m| m.material.id == id) {
        return Some(m.clone());
    }
    if let Some(m) = library.get(id) {
        return Some(m.clone());
    }
    let near = close_matches(
        id,
        library
            .keys()
            .map(String::as_str)
            .chain(inline.iter().map(|m| m.material.id.as_str())),
    );
    let hint = if near.is_empty() {
        "run `oblique material list` for the ids, or add the material to the file's `materials` list".to_string()
    } else {
        format!("close ids: {}", near.join(", "))
    };
    c.push(field, format!("unknown material id '{id}'"), Some(hint));
    None
}

fn check_constant(c: &mut Collector<'_>, field: &str, value: f64) {
    if !(value.is_finite() && value > 0.0) {
        c.push(
            field,
            format!("constant {value} must be a finite number above zero"),
            None,
        );
    }
}

/// Parse and validate a pair window file. `materials` is the material library to resolve ids.
///
/// # Errors
/// Every problem found, each with file, line, column and field.
pub fn parse_pair_file(
    origin: Origin,
    text: &str,
    materials: &BTreeMap<String, MaterialRecord>,
) -> Result<(PairFile, PairWindow), Diagnostics> {
    let file = origin.display.clone();
    // A byte-order mark (some editors write one) is not RON: read past it.
    let text = text.strip_prefix('\u{feff}').unwrap_or(text);
    let parsed: PairFile = parse_ron(&file, text)?;
    let mut c = Collector::new(&file, text);
    c.check_format(&parsed.format, WINDOW_FORMAT);
    c.check_name(&parsed.name, "pair name", "al6061-on-cu");
    if parsed.name.starts_with('.') {
        c.push(
            "name",
            format!(
                "pair name '{}' must not start with a dot (pair new refuses it: its file would be hidden)",
                parsed.name
            ),
            None,
        );
    }
    for (i, r) in parsed.revisions.iter().enumerate() {
        if let Some(problem) = crate::diag::date_problem(&r.date) {
            c.push(
                &format!("revisions[{i}].date"),
                problem,
                Some("write it like \"2026-11-30\"".into()),
            );
        }
    }
    let inline = validate_entries(
        &mut c,
        "materials",
        &parsed.materials,
        &parsed.sources,
        &file,
    );
    let flyer = resolve(&mut c, "flyer", &parsed.flyer, &inline, materials);
    let parent = resolve(&mut c, "parent", &parsed.parent, &inline, materials);
    let flyer_thickness = c.quantity(
        "flyer_thickness",
        &parsed.flyer_thickness,
        QuantityKind::Length,
    );
    if let Some(t) = flyer_thickness {
        if !(t > 0.0) {
            c.push(
                "flyer_thickness",
                "flyer thickness must be above zero",
                None,
            );
        }
    }
    let parent_thickness = match &parsed.parent_thickness {
        Some(t) => {
            let v = c.quantity("parent_thickness", t, QuantityKind::Length);
            if let Some(v) = v {
                if !(v > 0.0) {
                    c.push(
                        "parent_thickness",
                        "parent thickness must be above zero",
                        None,
                    );
                }
            }
            v
        }
        None => None,
    };
    let convention = match parsed.convention.parse::<Convention>() {
        Ok(cv) => Some(cv),
        Err(e) => {
            c.push("convention", e.to_string(), None);
            None
        }
    };
    if let Some(p) = &parsed.process {
        if !PROCESSES.contains(&p.as_str()) {
            c.push(
                "process",
                format!("unknown process '{}'", crate::text::short(p, 40)),
                Some(format!("use one of {}", PROCESSES.join(", "))),
            );
        }
    }

    let (mut criteria, criteria_reasons) = validate::criteria(&mut c, &parsed);
    let boundaries = validate::boundaries(&mut c, &parsed);
    let observations = validate::observations(&mut c, &parsed);
    let fitted = validate::fitted(&mut c, &parsed);
    if let Some(f) = &fitted {
        f.apply(&mut criteria);
    }

    let problems = c.problems.len();
    let (Some(flyer), Some(parent), Some(ft), Some(convention)) =
        (flyer, parent, flyer_thickness, convention)
    else {
        c.finish()?;
        // Unreachable when there were no problems; kept as an error rather than a panic.
        return Err(Diagnostics(vec![crate::diag::Diagnostic {
            file,
            line: 1,
            col: 1,
            field: String::new(),
            message: format!("pair window incomplete ({problems} problems)"),
            hint: None,
        }]));
    };
    let window = PairWindow {
        name: parsed.name.clone(),
        description: parsed.description.clone(),
        invented: parsed.invented.clone(),
        flyer,
        parent,
        flyer_thickness: Length::from_m(ft),
        parent_thickness: parent_thickness.map(Length::from_m),
        convention,
        process: parsed.process.clone(),
        domain: ValidityDomain::default(),
        maintainer: parsed.maintainer.clone(),
        revisions: parsed.revisions.clone(),
        criteria,
        criteria_reasons,
        boundaries,
        observations,
        fitted,
        origin,
    };
    // Constants changed from their defaults must leave a window: refuse, with the reason,
    // those that leave no point of the validity domain inside the model limits.
    if problems == 0 && validate::constants_changed(&parsed) {
        if let Some(why) = validate::empty_window(&window) {
            c.push(
                &validate::changed_constant_field(&parsed),
                format!("with these criterion constants the window is empty: {why}"),
                Some("a constant this far from its published range leaves no weld anywhere in the validity domain (docs/theory.md §7.1); check the value and its reason".into()),
            );
        }
    }
    c.finish()?;
    Ok((parsed, window))
}

impl PairWindow {
    /// The core's view of the pair.
    ///
    /// # Errors
    /// Only if the validated materials were somehow not physical.
    pub fn setup(&self) -> Result<oblique_core::PairSetup, oblique_core::PhysicsError> {
        oblique_core::PairSetup::new(
            self.flyer.material.clone(),
            self.parent.material.clone(),
            self.flyer_thickness,
            self.parent_thickness,
        )
    }
}

#[cfg(test)]
mod tests {
    use super::is_iso_date;

    #[test]
    fn calendar_dates() {
        for ok in ["2026-11-30", "2024-02-29", "2000-02-29", "1999-12-31"] {
            assert!(is_iso_date(ok), "{ok}");
        }
        for bad in [
            "yesterday",
            "2026-13-01",
            "2026-02-31",
            "2023-02-29",
            "1900-02-29",
            "2026-1-1",
            "26-11-30",
            "2026/11/30",
            "2026-00-10",
            "2026-11-00",
        ] {
            assert!(!is_iso_date(bad), "{bad}");
        }
    }

    #[test]
    fn fit_cautions() {
        use super::{Fitted, FittedValue};
        let f = Fitted {
            date: "2026-12-01".into(),
            method: "test".into(),
            observations: 10,
            level: 0.95,
            deribas_k: Some(FittedValue {
                value: 1.5,
                low: None,
                high: Some(1.5),
            }),
            wittman_n: Some(FittedValue {
                value: 0.1,
                low: Some(0.07),
                high: Some(0.15),
            }),
            hel_multiple: None,
        };
        assert!(f.cautions("p", 10).iter().all(|c| !c.contains("now holds")));
        let c = f.cautions("p", 12);
        assert!(c
            .iter()
            .any(|c| c.contains("fitted to 10 trials, the file now holds 12")));
        assert!(c
            .iter()
            .any(|c| c.contains("deribas_k 1.5 is the upper end")));
        assert!(c.iter().any(|c| c.contains("outside 0.6")));
        assert!(c.iter().all(|c| !c.starts_with("wittman_n")));
    }
}
