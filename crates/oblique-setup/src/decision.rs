//! A decision record's content: the chosen set-up and every alternative considered, each
//! evaluated the same way (the process estimate, the window check at its angle and its velocity
//! headroom), the reason each alternative was not chosen, and the files every value came from.
//!
//! Candidates are built from a point ([`point_candidate`]), a magnetic pulse request
//! ([`magnetic_candidate`]) or the settings of a `sweep --json` file ([`SweepFile`]); [`decide`]
//! picks the chosen one (given, or the one inside the window with the most velocity headroom)
//! and words why each other was not chosen. Screening estimates, not guarantees.

use crate::error::{SetupError, SetupResult};
use crate::estimate::{resolve_estimate, PulseReport};
use crate::explosive::{estimate_explosive, ExplosiveReport};
use crate::human;
use crate::inputs::Provenance;
use crate::request::ExplosiveRequest;
use crate::request::{Charge, EstimateRequest};
use crate::resolve::Catalog;
use oblique_core::process::ImpactOutcome;
use oblique_core::units::{Angle, Length, Voltage};
use oblique_core::Collision;
use oblique_window::advice::explain_in;
use oblique_window::classify::{classify, Classification};
use oblique_window::margin::{verdict_velocity_headroom, Along};
use oblique_window::PairWindow;
use serde_json::Value;

/// What produced a candidate's impact.
#[derive(Debug, Clone)]
pub enum Produced<'a> {
    /// A point given directly (velocity and angle).
    Point,
    /// A magnetic pulse estimate.
    Magnetic(Box<PulseReport<'a>>),
    /// An explosive (Gurney) estimate.
    Explosive(Box<ExplosiveReport<'a>>),
}

/// One set-up considered.
#[derive(Debug, Clone)]
pub struct Candidate<'a> {
    /// Its name (`A`, `chosen`, `sweep 3`).
    pub label: String,
    /// The settings that define it, as (flag, value shown): `--charge-voltage 8 kV`.
    pub settings: Vec<(String, String)>,
    /// The estimate behind it.
    pub produced: Produced<'a>,
    /// The window check at its angle, explained (none without an impact).
    pub check: Option<Classification>,
    /// Why it has no check (no impact: the model's reason).
    pub no_check: Option<String>,
    /// A reason the person gave for not choosing it, if any.
    pub given_reason: Option<String>,
}

impl Candidate<'_> {
    /// The settings in one line: `--charge-voltage 8 kV, --standoff 2 mm, --angle 10 deg`.
    #[must_use]
    pub fn settings_text(&self) -> String {
        self.settings
            .iter()
            .map(|(k, v)| format!("{k} {v}"))
            .collect::<Vec<_>>()
            .join(", ")
    }

    /// Impact velocity (m/s) in the window's convention and angle (rad), for plots.
    #[must_use]
    pub fn point(&self) -> Option<(f64, f64)> {
        self.check.as_ref().map(|c| {
            let col = &c.evaluation.collision;
            (col.impact_velocity.si(), col.angle.radians())
        })
    }

    /// The verdict's velocity headroom (inside: the limit reached first; outside: the binding
    /// limit's shortfall).
    #[must_use]
    pub fn headroom(&self, w: &PairWindow) -> Option<Along> {
        self.check
            .as_ref()
            .and_then(|c| verdict_velocity_headroom(w, c))
    }

    /// The share of Vp the impact velocity can move before the verdict changes: the ranking key
    /// (infinite when no limit is reached; minus infinity when not inside).
    #[must_use]
    pub fn rank_key(&self, w: &PairWindow) -> f64 {
        match &self.check {
            Some(c) if c.inside && !c.outside_trial_data => self
                .headroom(w)
                .map_or(f64::INFINITY, |a| (a.unrounded - a.at).abs() / a.at),
            _ => f64::NEG_INFINITY,
        }
    }

    /// The verdict in a few words.
    #[must_use]
    pub fn verdict(&self, w: &PairWindow) -> String {
        match &self.check {
            None => self
                .no_check
                .clone()
                .unwrap_or_else(|| "not checked".into()),
            Some(c) if c.inside && c.outside_trial_data => {
                "inside the model limits, outside the trial data".into()
            }
            Some(c) if c.inside => "inside the window".into(),
            Some(c) if !c.domain.inside() => {
                "outside the validity domain: no verdict claimed".into()
            }
            Some(c) => format!(
                "outside the window (binding {})",
                c.binding
                    .as_ref()
                    .map_or_else(String::new, |b| oblique_window::classify::limit_label(w, b))
            ),
        }
    }
}

/// How the chosen set-up was chosen.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum ChoiceRule {
    /// Named by the person preparing the report.
    Given,
    /// The candidate inside the window (and the trial data) with the most velocity headroom, in
    /// % of its impact velocity.
    MostHeadroom,
}

impl ChoiceRule {
    /// The rule in words.
    #[must_use]
    pub fn text(self) -> &'static str {
        match self {
            ChoiceRule::Given => "the chosen set-up was named by the person preparing this record; every alternative is evaluated the same way and compared with it",
            ChoiceRule::MostHeadroom => "the chosen set-up is the candidate inside the window and the trial data with the most velocity headroom (the share of its impact velocity that can be lost or gained at its angle before the limit reached first), so that it tolerates the most shot-to-shot scatter",
        }
    }
}

/// An alternative and why it was not chosen.
#[derive(Debug, Clone)]
pub struct Alternative<'a> {
    /// The alternative.
    pub candidate: Candidate<'a>,
    /// Why it was not chosen.
    pub reason: String,
}

/// The chosen set-up and the alternatives.
#[derive(Debug, Clone)]
pub struct Decision<'a> {
    /// The chosen set-up.
    pub chosen: Candidate<'a>,
    /// Every alternative, in the order given (a sweep's in its ranking order).
    pub alternatives: Vec<Alternative<'a>>,
    /// How the choice was made.
    pub rule: ChoiceRule,
}

/// Choose among `candidates`: `chosen` (an index) when given, else the one with the most
/// velocity headroom; word why each other one was not chosen.
///
/// # Errors
/// [`SetupError::Invalid`] when no candidate is given, or none lies inside the window and the
/// trial data while the choice is left to the rule.
pub fn decide<'a>(
    w: &PairWindow,
    mut candidates: Vec<Candidate<'a>>,
    chosen: Option<usize>,
) -> SetupResult<Decision<'a>> {
    let (index, rule) = match chosen {
        Some(i) if i < candidates.len() => (i, ChoiceRule::Given),
        Some(_) | None => {
            let best = candidates
                .iter()
                .enumerate()
                .filter(|(_, c)| c.rank_key(w) > f64::NEG_INFINITY)
                .max_by(|a, b| {
                    a.1.rank_key(w)
                        .total_cmp(&b.1.rank_key(w))
                        .then(b.0.cmp(&a.0))
                })
                .map(|(i, _)| i);
            match best {
                Some(i) => (i, ChoiceRule::MostHeadroom),
                None => {
                    return Err(SetupError::Invalid {
                        field: "alternatives",
                        message: if candidates.is_empty() {
                            "no set-up to choose from".into()
                        } else {
                            "no candidate lies inside the window and the trial data: name the chosen set-up (its settings) to record why it is chosen anyway".into()
                        },
                    })
                }
            }
        }
    };
    let chosen = candidates.remove(index);
    let alternatives = candidates
        .into_iter()
        .map(|c| {
            let reason = why_not(w, &chosen, &c, rule);
            Alternative {
                candidate: c,
                reason,
            }
        })
        .collect();
    Ok(Decision {
        chosen,
        alternatives,
        rule,
    })
}

/// The headroom in a phrase: "83 m/s (18.4 %) before deribas-lower is reached".
fn phrase(a: &Along) -> String {
    let pct = a.percent.unwrap_or(0.0).abs();
    if a.holds {
        format!(
            "{:.0} m/s ({pct:.1} %) before {} is reached",
            a.change.abs(),
            a.label
        )
    } else {
        format!(
            "short by {:.0} m/s ({pct:.1} %) of {}",
            a.change.abs(),
            a.label
        )
    }
}

/// Why `alt` was not chosen over `chosen`.
#[must_use]
pub fn why_not(
    w: &PairWindow,
    chosen: &Candidate<'_>,
    alt: &Candidate<'_>,
    rule: ChoiceRule,
) -> String {
    let mut s = match &alt.check {
        None => format!(
            "{}: it cannot be checked against the window",
            alt.no_check.clone().unwrap_or_else(|| "no impact".into())
        ),
        Some(c) if !c.inside => {
            let b = c
                .binding
                .as_ref()
                .map_or_else(String::new, |b| oblique_window::classify::limit_label(w, b));
            let more = c.failing.len().saturating_sub(1);
            let mut t = format!("outside the window: {b} fails");
            if more > 0 {
                t.push_str(&format!(" ({more} more limit(s) fail too)"));
            }
            if let Some(a) = alt.headroom(w) {
                t.push_str(&format!("; {}", a.sentence()));
            }
            t
        }
        Some(c) if c.outside_trial_data => "inside the model limits but outside the trial data: a user boundary does not span it and was not extrapolated".into(),
        Some(_) => {
            let (ka, kc) = (alt.rank_key(w), chosen.rank_key(w));
            let a = alt.headroom(w).map_or("no limit within Vp/20 to 20 Vp".into(), |a| phrase(&a));
            let c = chosen
                .headroom(w)
                .map_or("no limit within Vp/20 to 20 Vp".into(), |a| phrase(&a));
            if ka < kc {
                format!("inside the window, but less velocity headroom: {a}, against {c} for the chosen set-up")
            } else if rule == ChoiceRule::Given {
                format!("inside the window with at least as much velocity headroom ({a}; chosen set-up: {c}); not chosen by the person preparing this record, who gives no reason for it here: a reviewer should ask for one")
            } else {
                format!("inside the window with as much velocity headroom ({a}) as the chosen set-up; listed after it")
            }
        }
    };
    if let Some(r) = &alt.given_reason {
        s.push_str(&format!("; noted by the person preparing this record: {r}"));
    }
    s
}

/// A point given directly: `vp` (m/s) in `convention` at `angle`, checked against `w` with its
/// advice in that convention.
///
/// # Errors
/// [`SetupError::Physics`] for a point the physics refuses.
pub fn point_candidate<'a>(
    w: &PairWindow,
    label: &str,
    collision: &Collision,
) -> SetupResult<Candidate<'a>> {
    let setup = w.setup()?;
    let mut c = classify(w, &setup, collision)?;
    explain_in(w, &setup, &mut c, collision.convention);
    let mut settings = vec![
        (
            "--velocity".to_string(),
            format!("{} m/s", human::g(collision.impact_velocity.si())),
        ),
        (
            "--angle".to_string(),
            format!("{} deg", human::g(collision.angle.degrees())),
        ),
    ];
    if collision.convention != w.convention {
        settings.push(("--convention".into(), collision.convention.to_string()));
    }
    Ok(Candidate {
        label: label.to_string(),
        settings,
        produced: Produced::Point,
        check: Some(c),
        no_check: None,
        given_reason: None,
    })
}

/// A magnetic pulse set-up: the request resolved and estimated, its impact checked at its angle
/// (explained, velocities normal to the flyer as the model gives them). `notes` receives the
/// warnings for the person.
///
/// # Errors
/// As [`resolve_estimate`] and the model.
pub fn magnetic_candidate<'a>(
    catalog: &'a Catalog,
    label: &str,
    request: &EstimateRequest,
    notes: &mut Vec<String>,
) -> SetupResult<Candidate<'a>> {
    let setup = resolve_estimate(catalog, request, notes)?;
    let report = setup.run()?;
    let mut settings = vec![match request.charge {
        Charge::Voltage(u) => ("--charge-voltage".to_string(), human::kv(u.si())),
        Charge::Energy(e) => ("--energy".to_string(), human::kj(e.si())),
    }];
    settings.push(("--standoff".into(), human::mm(request.standoff.si())));
    if let Some(a) = request.angle {
        settings.push(("--angle".into(), format!("{} deg", human::g(a.degrees()))));
    }
    if let Some(e) = request.efficiency {
        settings.push(("--efficiency".into(), human::g(e)));
    }
    let no_check = match report.estimate.outcome {
        ImpactOutcome::NoImpact { reason, .. } => Some(format!("no impact ({reason})")),
        ImpactOutcome::Impact { .. } if report.check.is_none() => {
            Some("no window check (no angle or no pair window)".into())
        }
        ImpactOutcome::Impact { .. } => None,
    };
    Ok(Candidate {
        label: label.to_string(),
        settings,
        check: report.check.clone(),
        no_check,
        produced: Produced::Magnetic(Box::new(report)),
        given_reason: None,
    })
}

/// An explosive set-up: the request estimated (Gurney, then the collision kinematics), its
/// collision checked against the pair window (explained).
///
/// # Errors
/// As [`estimate_explosive`].
pub fn explosive_candidate<'a>(
    catalog: &'a Catalog,
    label: &str,
    request: &ExplosiveRequest,
) -> SetupResult<Candidate<'a>> {
    let report = estimate_explosive(catalog, request)?;
    let mut settings = Vec::new();
    if let Some(n) = &request.setup {
        settings.push(("--setup".to_string(), n.clone()));
    }
    let v = |x: &oblique_core::units::Velocity| format!("{} m/s", human::g(x.si()));
    if let Some(g) = &request.gurney_velocity {
        settings.push(("--gurney-velocity".into(), v(g)));
    }
    if let Some(d) = &request.detonation_velocity {
        settings.push(("--detonation-velocity".into(), v(d)));
    }
    if let Some(m) = request.mass_ratio {
        settings.push(("--mass-ratio".into(), human::g(m)));
    }
    if let Some(c) = request.charge_ratio {
        settings.push(("--charge-ratio".into(), human::g(c)));
    }
    if let Some(a) = request.preset_angle {
        settings.push((
            "--preset-angle".into(),
            format!("{} deg", human::g(a.degrees())),
        ));
    }
    let no_check = report
        .check
        .is_none()
        .then(|| "no window check (no pair window)".to_string());
    Ok(Candidate {
        label: label.to_string(),
        settings,
        check: report.check.clone(),
        no_check,
        produced: Produced::Explosive(Box::new(report)),
        given_reason: None,
    })
}

/// One setting of a `sweep --json` file.
#[derive(Debug, Clone, PartialEq)]
pub struct SweepSetting {
    /// Charging voltage (V).
    pub voltage: f64,
    /// Standoff (m).
    pub standoff: f64,
    /// Angle (rad).
    pub angle: Option<f64>,
    /// The impact velocity the sweep found (m/s), if any.
    pub velocity: Option<f64>,
    /// Its rank among the settings inside (1 = best), if inside.
    pub rank: Option<usize>,
}

/// The settings of a `sweep --json` file, ranked ones first in their order, then the others in
/// grid order.
#[derive(Debug, Clone, PartialEq)]
pub struct SweepFile {
    /// The model (`mpw-tube`, `mpw-sheet`).
    pub model: String,
    /// The pair window it was checked against.
    pub pair: Option<String>,
    /// The settings.
    pub settings: Vec<SweepSetting>,
}

impl SweepFile {
    /// Read the JSON `oblique sweep --json` prints.
    ///
    /// # Errors
    /// A message naming the key that is missing or of the wrong type.
    pub fn from_json(v: &Value) -> Result<SweepFile, String> {
        let model = v
            .get("model")
            .and_then(Value::as_str)
            .ok_or("key 'model' missing: not the output of `oblique sweep --json`")?
            .to_string();
        let pair = v.get("pair").and_then(Value::as_str).map(str::to_string);
        let setting = |p: &Value| -> Result<SweepSetting, String> {
            let num = |k: &str| p.get(k).and_then(Value::as_f64);
            Ok(SweepSetting {
                voltage: num("charge_voltage_v").ok_or("a point has no 'charge_voltage_v'")?,
                standoff: num("standoff_m").ok_or("a point has no 'standoff_m'")?,
                angle: num("angle_deg").map(f64::to_radians),
                velocity: num("impact_velocity_m_s"),
                rank: None,
            })
        };
        let ranked = v
            .get("inside_ranked")
            .and_then(Value::as_array)
            .ok_or("key 'inside_ranked' missing")?;
        let points = v
            .get("points")
            .and_then(Value::as_array)
            .ok_or("key 'points' missing")?;
        let mut settings = Vec::new();
        for (n, p) in ranked.iter().enumerate() {
            let mut s = setting(p)?;
            s.rank = Some(n + 1);
            settings.push(s);
        }
        for p in points {
            let s = setting(p)?;
            let same = |t: &SweepSetting| {
                (t.voltage - s.voltage).abs() <= 1e-9 * s.voltage.abs().max(1.0)
                    && (t.standoff - s.standoff).abs() <= 1e-12
            };
            if !settings.iter().any(same) {
                settings.push(s);
            }
        }
        Ok(SweepFile {
            model,
            pair,
            settings,
        })
    }

    /// The estimate request of one setting, on `base` (the bank, coil and workpiece).
    #[must_use]
    pub fn request(&self, base: &EstimateRequest, s: &SweepSetting) -> EstimateRequest {
        let mut r = base.clone();
        r.charge = Charge::Voltage(Voltage::from_v(s.voltage));
        r.standoff = Length::from_m(s.standoff);
        r.angle = s.angle.map(Angle::from_radians).or(base.angle);
        r
    }
}

/// A file that entered the computation.
#[derive(Debug, Clone, PartialEq, Eq)]
pub struct FileUse {
    /// What it gave (pair window, materials, bank, coil, sweep, curve).
    pub role: String,
    /// As shown in messages (`built-in:windows/...` or the path).
    pub file: String,
    /// SHA-256 of its bytes, hex.
    pub sha256: String,
}

/// The files a decision's candidates were computed from: the pair window, the materials file of
/// each material used, and every machine, coil or set-up file a value came from. Each once.
#[must_use]
pub fn files_used(catalog: &Catalog, w: &PairWindow, d: &Decision<'_>) -> Vec<FileUse> {
    let mut out: Vec<FileUse> = Vec::new();
    let mut add = |role: &str, file: &str, sha: &str| {
        if !out.iter().any(|f| f.file == file) {
            out.push(FileUse {
                role: role.into(),
                file: file.into(),
                sha256: sha.into(),
            });
        }
    };
    add("pair window", &w.origin.display, &w.origin.sha256);
    let lib = &catalog.library;
    let material_file = |origin: &str| {
        lib.files
            .iter()
            .find(|f| f.display == origin)
            .map(|f| f.sha256.clone())
    };
    let mut ids = vec![w.flyer.material.id.clone(), w.parent.material.id.clone()];
    for c in std::iter::once(&d.chosen).chain(d.alternatives.iter().map(|a| &a.candidate)) {
        let inputs = match &c.produced {
            Produced::Magnetic(r) => Some(&r.setup.inputs),
            Produced::Explosive(r) => Some(&r.inputs),
            Produced::Point => None,
        };
        if let Some(inputs) = inputs {
            for i in &inputs.entries {
                let machine = match &i.from {
                    Provenance::File { name, .. } => Some(name.as_str()),
                    Provenance::Calibration(c) => Some(c.bank.as_str()),
                    Provenance::Material(id) => {
                        ids.push(id.clone());
                        None
                    }
                    _ => None,
                };
                if let Some(rec) = machine.and_then(|n| catalog.machines.get(n).ok()) {
                    add(rec.item.kind(), &rec.origin.display, &rec.origin.sha256);
                }
            }
        }
    }
    for id in ids {
        if let Some(rec) = lib.materials.get(&id) {
            if let Some(sha) = material_file(&rec.origin) {
                add("materials", &rec.origin, &sha);
            }
        }
    }
    out
}
