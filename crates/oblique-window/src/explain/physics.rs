//! The steps before the limits: what is given, the material values and their sources, the
//! convention, the kinematics (with the other two conventions), the validity domain, the impact
//! pressure, the jetting condition, and the interface features.

use super::{g, Figure, GivenVelocity, Step};
use crate::classify::Classification;
use crate::materials::MaterialRecord;
use crate::PairWindow;
use oblique_core::hugoniot::ImpactState;
use oblique_core::{Collision, Convention, PairSetup, ValidityDomain};

/// The formulas of a convention: (Vc from Vp, Vf from Vc, Vp from Vc, words).
fn convention_formulas(c: Convention) -> (&'static str, &'static str, &'static str, &'static str) {
    match c {
        Convention::Bisector => (
            "Vc = Vp / (2 sin(beta/2))",
            "Vf = Vc",
            "Vp = 2 Vc sin(beta/2)",
            "the impact velocity Vp bisects the normals of the two plates (beta/2 from each; Birkhoff-Taylor), so the flyer flows into the collision point as fast as the parent does",
        ),
        Convention::NormalToFlyer => (
            "Vc = Vp / sin(beta)",
            "Vf = Vc cos(beta)",
            "Vp = Vc sin(beta)",
            "the impact velocity Vp is normal to the flyer's surface (as a magnetic pressure pushes it), so the collision point runs along the parent at Vc = Vp / sin(beta) and the flyer flows into it at Vf = Vc cos(beta)",
        ),
        Convention::NormalToParent => (
            "Vc = Vp / tan(beta)",
            "Vf = Vc / cos(beta)",
            "Vp = Vc tan(beta)",
            "the impact velocity Vp is normal to the parent (the flyer is driven straight down), so Vc = Vp / tan(beta) and the flyer flows in at Vf = Vc / cos(beta)",
        ),
    }
}

/// The source of a convention's relations (docs/theory.md §2.1).
fn convention_source(c: Convention) -> (&'static str, &'static str) {
    match c {
        Convention::Bisector => (
            "Crossland & Bahrani 1968 (cited); the relation from memory; docs/theory.md §2.1",
            "from memory",
        ),
        Convention::NormalToFlyer => (
            "physics-notes.md §1 and docs/theory.md §2.1: geometry of the steady collision",
            "from memory, derived here",
        ),
        Convention::NormalToParent => (
            "physics-notes.md §1 and docs/theory.md §2.1: geometry of the steady collision",
            "derived here",
        ),
    }
}

/// The number under the sine/tangent of a convention at `beta` (for the substituted line).
fn factor_text(c: Convention, beta_deg: f64) -> (String, f64) {
    let b = beta_deg.to_radians();
    match c {
        Convention::Bisector => (
            format!("2 sin({:.2} deg / 2)", beta_deg),
            2.0 * (b / 2.0).sin(),
        ),
        Convention::NormalToFlyer => (format!("sin({beta_deg:.2} deg)"), b.sin()),
        Convention::NormalToParent => (format!("tan({beta_deg:.2} deg)"), b.tan()),
    }
}

fn v1(x: f64) -> String {
    format!("{x:.1} m/s")
}

/// Step: what is given.
pub(super) fn given(
    window: &PairWindow,
    given: &Collision,
    how: GivenVelocity,
    is_pair: bool,
) -> Step {
    let mut s = Step::new("given", "What is given");
    s.relation = if is_pair {
        format!(
            "the pair window '{}' fixes the plates, the flyer thickness, its convention ({}) and its criteria; the point is given by its velocity and collision angle",
            window.name, window.convention
        )
    } else {
        "the plates, the flyer thickness and the convention are given on the command line; the criteria are the published defaults (docs/theory.md §5.1)".to_string()
    };
    let name = |r: &MaterialRecord| {
        if r.condition.is_empty() {
            format!("{} ({})", r.material.id, r.material.name)
        } else {
            format!("{} ({}, {})", r.material.id, r.material.name, r.condition)
        }
    };
    s.numbers.push(format!("flyer:  {}", name(&window.flyer)));
    s.numbers.push(format!("parent: {}", name(&window.parent)));
    s.numbers.push(format!(
        "flyer thickness h = {:.2} mm; parent thickness {}",
        window.flyer_thickness.mm(),
        window
            .parent_thickness
            .map_or("not given (a massive parent)".to_string(), |t| format!(
                "{:.2} mm",
                t.mm()
            ))
    ));
    let beta = given.angle.degrees();
    match how {
        GivenVelocity::Impact => s.numbers.push(format!(
            "impact velocity Vp = {} ({} convention), collision angle beta = {beta:.2} deg",
            v1(given.impact_velocity.si()),
            given.convention
        )),
        GivenVelocity::Collision => s.numbers.push(format!(
            "collision-point velocity Vc = {} ({} convention), collision angle beta = {beta:.2} deg",
            v1(given.collision_velocity.si()),
            given.convention
        )),
    }
    let cfg = &window.criteria;
    s.numbers.push(format!(
        "process: {}; constants: Deribas k = {}, HEL multiple m = {}, Wittman N = {} (form {}), wavy Re_crit = {}{}",
        window.process.as_deref().unwrap_or("not given"),
        cfg.deribas_k,
        cfg.hel_multiple,
        cfg.wittman_n,
        if cfg.wittman_form == oblique_core::WittmanForm::A { "A" } else { "B" },
        cfg.wavy_critical_reynolds,
        window
            .fitted
            .as_ref()
            .map_or(String::new(), |f| format!(" ({})", f.summary()))
    ));
    s.results
        .push(Figure::word("input_convention", given.convention.as_str()));
    s.results.push(Figure::new(
        "input_impact_velocity_m_s",
        given.impact_velocity.si(),
        v1(given.impact_velocity.si()),
    ));
    s.results.push(Figure::new(
        "collision_angle_deg",
        beta,
        format!("{beta:.2} deg"),
    ));
    s.source = if is_pair {
        format!("pair window file {}", window.origin.display)
    } else {
        "command line".into()
    };
    s.mark = "given".into();
    s
}

/// (file field, symbol, what uses it, display of the SI value).
type PropertyRow = (&'static str, &'static str, &'static str, fn(f64) -> String);

const PROPERTIES: [PropertyRow; 11] = [
    ("density", "rho0", "pressure, all limits", |v| {
        format!("{} kg/m^3", g(v))
    }),
    ("hugoniot_c0", "C0", "pressure, jetting, melting", |v| {
        format!("{} m/s", g(v))
    }),
    ("hugoniot_s", "s", "pressure, jetting", g),
    ("vickers_hardness", "Hv", "Deribas, wavy", |v| {
        format!("{} HV ({} GPa)", g(v / 9.80665e6), g(v / 1e9))
    }),
    ("yield_strength", "Y0", "pressure (HEL)", |v| {
        format!("{} MPa", g(v / 1e6))
    }),
    ("tensile_strength", "sigma_UTS", "strength", |v| {
        format!("{} MPa", g(v / 1e6))
    }),
    ("bulk_modulus", "K", "pressure (HEL)", |v| {
        format!("{} GPa", g(v / 1e9))
    }),
    ("shear_modulus", "G", "pressure (HEL)", |v| {
        format!("{} GPa", g(v / 1e9))
    }),
    ("melting_temperature", "Tm", "melting", |v| {
        format!("{} K", g(v))
    }),
    ("thermal_conductivity", "k", "melting", |v| {
        format!("{} W/(m K)", g(v))
    }),
    ("specific_heat", "Cp", "melting", |v| {
        format!("{} J/(kg K)", g(v))
    }),
];

fn property_value(r: &MaterialRecord, field: &str) -> f64 {
    let m = &r.material;
    match field {
        "density" => m.density().si(),
        "hugoniot_c0" => m.hugoniot.c0.si(),
        "hugoniot_s" => m.hugoniot.s,
        "vickers_hardness" => m.vickers_hardness.si(),
        "yield_strength" => m.yield_strength.si(),
        "tensile_strength" => m.tensile_strength.si(),
        "bulk_modulus" => m.bulk_modulus.si(),
        "shear_modulus" => m.shear_modulus.si(),
        "melting_temperature" => m.melting_temperature.si(),
        "thermal_conductivity" => m.thermal_conductivity.si(),
        _ => m.specific_heat.si(),
    }
}

fn source_cell(r: &MaterialRecord, field: &str) -> String {
    r.sources
        .get(field)
        .map_or("-".into(), |p| match p.key.as_str() {
            "MEM" => "MEM (from memory)".into(),
            "DER" => "DER (derived)".into(),
            k => k.to_string(),
        })
}

/// Step: the material values used, each with its source key.
pub(super) fn materials(window: &PairWindow) -> Step {
    let mut s = Step::new("materials", "Material values used");
    s.relation = "every limit that depends on the material is evaluated with the flyer's values and with the parent's, and the more demanding result is kept (no published rule says whose values enter; the conservative choice, physics-notes.md §4)".into();
    let (f, p) = (&window.flyer, &window.parent);
    let rows: Vec<Vec<String>> = PROPERTIES
        .iter()
        .map(|(field, sym, used, show)| {
            vec![
                (*sym).to_string(),
                show(property_value(f, field)),
                source_cell(f, field),
                show(property_value(p, field)),
                source_cell(p, field),
                (*used).to_string(),
            ]
        })
        .collect();
    s.table = Some((
        vec![
            "property".into(),
            format!("flyer {}", f.material.id),
            "source".into(),
            format!("parent {}", p.material.id),
            "source".into(),
            "used by".into(),
        ],
        rows,
    ));
    let mut keys: Vec<(String, String)> = Vec::new();
    for r in [f, p] {
        for (field, ..) in PROPERTIES {
            if let Some(pr) = r.sources.get(field) {
                if !keys.iter().any(|(k, _)| *k == pr.key) {
                    keys.push((pr.key.clone(), pr.reference.clone()));
                }
            }
        }
    }
    keys.sort();
    for (k, r) in keys {
        s.notes.push(format!("{k}: {r}"));
    }
    s.source = "the material library (docs/material-data.md says where each value comes from; `oblique material show ID` lists the notes)".into();
    s.mark = "per value, as its source key says (MEM: from memory)".into();
    s
}

/// Step: the point re-expressed in the window's convention.
pub(super) fn convention(given: &Collision, col: &Collision) -> Step {
    let mut s = Step::new(
        "convention",
        format!("The point in the window's convention ({})", col.convention),
    );
    s.relation = format!(
        "the point was given in the {} convention; the window's limits are written in its {} convention; the same collision (the same collision-point velocity Vc and angle beta) is kept and its impact velocity re-expressed",
        given.convention, col.convention
    );
    let (gf, ..) = convention_formulas(given.convention);
    let (_, _, inv, _) = convention_formulas(col.convention);
    s.formula = vec![
        format!("as given ({}): {gf}", given.convention),
        format!("in the window's convention ({}): {inv}", col.convention),
    ];
    let beta = col.angle.degrees();
    let (ft, fv) = factor_text(col.convention, beta);
    s.numbers.push(format!(
        "given: Vp {} at {beta:.2} deg gives Vc = {}",
        v1(given.impact_velocity.si()),
        v1(given.collision_velocity.si())
    ));
    s.numbers.push(format!(
        "Vp = {} x {ft} = {} x {} = {}",
        v1(col.collision_velocity.si()),
        v1(col.collision_velocity.si()),
        g(fv),
        v1(col.impact_velocity.si())
    ));
    s.results.push(Figure::new(
        "impact_velocity_m_s",
        col.impact_velocity.si(),
        v1(col.impact_velocity.si()),
    ));
    s.source = "docs/theory.md §2.1 (re-expression between conventions)".into();
    s.mark = "derived here".into();
    s.notes
        .push("the limits below see this impact velocity, not the one typed".into());
    s
}

/// Step: Vc and Vf under the window's convention, and what the other conventions give.
pub(super) fn kinematics(col: &Collision, how: GivenVelocity, same_convention: bool) -> Step {
    let conv = col.convention;
    let mut s = Step::new("kinematics", format!("Collision kinematics ({conv})"));
    let (fvc, fvf, fvp, words) = convention_formulas(conv);
    s.relation = format!(
        "in a steady oblique collision over a stationary parent the flyer's velocity in the lab is (Vc - Vf cos beta, -Vf sin beta), of size Vp; one more assumption closes it, the convention: {words}"
    );
    let beta = col.angle.degrees();
    let (ft, fv) = factor_text(conv, beta);
    let (vp, vc, vf) = (
        col.impact_velocity.si(),
        col.collision_velocity.si(),
        col.flow_velocity.si(),
    );
    if how == GivenVelocity::Collision && same_convention {
        s.formula = vec![fvp.into(), fvf.into()];
        s.numbers.push(format!(
            "Vp = {} x {ft} = {} x {} = {}",
            v1(vc),
            v1(vc),
            g(fv),
            v1(vp)
        ));
    } else {
        s.formula = vec![fvc.into(), fvf.into()];
        s.numbers.push(format!(
            "Vc = {} / {ft} = {} / {} = {}",
            v1(vp),
            v1(vp),
            g(fv),
            v1(vc)
        ));
    }
    let b = col.angle.radians();
    match conv {
        Convention::Bisector => s.numbers.push(format!("Vf = Vc = {}", v1(vf))),
        Convention::NormalToFlyer => s.numbers.push(format!(
            "Vf = {} x cos({beta:.2} deg) = {} x {} = {}",
            v1(vc),
            v1(vc),
            g(b.cos()),
            v1(vf)
        )),
        Convention::NormalToParent => s.numbers.push(format!(
            "Vf = {} / cos({beta:.2} deg) = {} / {} = {}",
            v1(vc),
            v1(vc),
            g(b.cos()),
            v1(vf)
        )),
    }
    for (k, v) in [
        ("impact_velocity_m_s", vp),
        ("collision_velocity_m_s", vc),
        ("flow_velocity_m_s", vf),
    ] {
        s.results.push(Figure::new(k, v, v1(v)));
    }
    // The other two conventions for the same geometry.
    let mut rows = Vec::new();
    for other in Convention::ALL {
        let same_vp = Collision::from_impact(other, col.impact_velocity, col.angle).ok();
        let same_vc = col.with_convention(other);
        rows.push(vec![
            format!("{other}{}", if other == conv { " (used)" } else { "" }),
            same_vp.map_or("-".into(), |x| v1(x.collision_velocity.si())),
            same_vp.map_or("-".into(), |x| v1(x.flow_velocity.si())),
            v1(same_vc.impact_velocity.si()),
            v1(same_vc.flow_velocity.si()),
        ]);
    }
    s.table = Some((
        vec![
            "convention".into(),
            format!("Vc at Vp {}", v1(vp)),
            "Vf".into(),
            format!("Vp at Vc {}", v1(vc)),
            "Vf".into(),
        ],
        rows,
    ));
    s.notes.push(format!(
        "the conventions agree to first order in beta and drift apart as it grows; at {beta:.2} deg the table shows how much the choice moves Vc (same impact velocity) or Vp (same collision point). oblique never guesses the convention: a pair window states it, `check` without --pair needs --convention"
    ));
    let (src, mark) = convention_source(conv);
    s.source = src.into();
    s.mark = mark.into();
    s
}

/// Step: the validity domain, bound by bound.
pub(super) fn domain(window: &PairWindow, setup: &PairSetup, c: &Classification) -> Step {
    let col = &c.evaluation.collision;
    let mut s = Step::new("validity-domain", "Validity domain");
    s.relation = "the window's relations are claimed only where published windows reach; a point outside any bound gets no verdict (the limits would be extrapolated)".into();
    s.formula = vec!["inside iff every bound holds: min <= value <= max".into()];
    s.table_first = true;
    let mut rows = Vec::new();
    let mut sources: Vec<&str> = Vec::new();
    for b in &window.domain.bounds {
        let v = ValidityDomain::value(b.quantity, setup, col);
        let ok = ValidityDomain::meets(b, setup, col);
        rows.push(vec![
            b.quantity.label().to_string(),
            b.quantity.format(v),
            b.range_text(),
            if ok { "yes".into() } else { "NO".into() },
            b.limits
                .iter()
                .map(|l| l.as_str())
                .collect::<Vec<_>>()
                .join(", "),
        ]);
        if !sources.contains(&b.source) {
            sources.push(b.source);
        }
    }
    s.table = Some((
        vec![
            "quantity".into(),
            "at this point".into(),
            "domain".into(),
            "inside".into(),
            "bounds".into(),
        ],
        rows,
    ));
    s.numbers.push(if c.domain.inside() {
        "the point lies inside every bound: the limits below are claimed here".into()
    } else {
        format!(
            "outside: {}; the limits below are extrapolations and no verdict is claimed",
            c.domain.exits_text()
        )
    });
    s.results.push(Figure::flag(
        "domain_inside",
        c.domain.inside(),
        if c.domain.inside() { "yes" } else { "no" },
    ));
    for src in sources {
        s.notes.push(src.to_string());
    }
    s.source = "docs/theory.md §7.1 (each bound's basis in the notes below)".into();
    s.mark = "common practice".into();
    s
}

/// Step: the impact pressure by 1-D impedance matching.
pub(super) fn pressure(window: &PairWindow, vp: f64, impact: &ImpactState) -> Step {
    let (f, p) = (
        &window.flyer.material.hugoniot,
        &window.parent.material.hugoniot,
    );
    let mut s = Step::new(
        "impact-pressure",
        "Impact pressure (1-D impedance matching)",
    );
    s.relation = "the flyer strikes the stationary parent head-on at the closing speed Vp (the full impact velocity of the convention, treated as a normal impact); behind both shocks the pressure and the interface velocity are the same; each plate follows its linear Hugoniot Us = C0 + s up and the momentum jump p = rho0 Us up".into();
    s.formula = vec![
        "rho_f (C0_f + s_f u1) u1 = rho_p (C0_p + s_p u2) u2,   u1 + u2 = Vp".into(),
        "p = rho_p (C0_p + s_p u2) u2".into(),
    ];
    let (u1, u2) = (
        impact.flyer_particle_velocity.si(),
        impact.target_particle_velocity.si(),
    );
    s.numbers.push(format!(
        "the root in (0, Vp) of the quadratic in u2 (docs/theory.md §3) at Vp = {}: u2 = {}, u1 = Vp - u2 = {}",
        v1(vp),
        v1(u2),
        v1(u1)
    ));
    s.numbers.push(format!(
        "p = {} kg/m^3 x ({} m/s + {} x {}) x {} = {:.2} GPa",
        g(p.density.si()),
        g(p.c0.si()),
        g(p.s),
        v1(u2),
        v1(u2),
        impact.pressure.gpa()
    ));
    s.numbers.push(format!(
        "flyer side, the same pressure: {} kg/m^3 x ({} m/s + {} x {}) x {} = {:.2} GPa",
        g(f.density.si()),
        g(f.c0.si()),
        g(f.s),
        v1(u1),
        v1(u1),
        f.pressure(u1) / 1e9
    ));
    s.results.push(Figure::new(
        "impact_pressure_pa",
        impact.pressure.si(),
        format!("{:.2} GPa", impact.pressure.gpa()),
    ));
    s.results
        .push(Figure::new("flyer_particle_velocity_m_s", u1, v1(u1)));
    s.results
        .push(Figure::new("parent_particle_velocity_m_s", u2, v1(u2)));
    s.source = "Meyers, Dynamic Behavior of Materials (1994) sec. 4.3 (confirmed); impedance matching physics-notes.md §2; the closing speed Vp of the convention is the code's assumption (docs/theory.md §12)".into();
    s.mark = "confirmed (Hugoniot jump); derived here (the root)".into();
    s
}

/// Step: the jetting condition: inflow Mach numbers, regime, critical angle.
pub(super) fn jetting(window: &PairWindow, c: &Classification) -> Step {
    let e = &c.evaluation;
    let col = &e.collision;
    let j = &e.jetting;
    let mut s = Step::new("jetting-condition", "Jetting condition");
    s.relation = "a weld needs the surface-cleaning jet; it forms at any angle when either stream flows into the collision point below its sound speed C0; when both are supersonic it forms only above the critical angle where attached oblique shocks can no longer turn both streams (shock polars); a collision supersonic in one plate only has no source and is decided by the pair's rule".into();
    s.formula = vec![
        "subsonic: Vc <= C0(parent) or Vf <= C0(flyer): jet at any angle".into(),
        "supersonic: jet iff beta > beta_crit = max over p of [theta_flyer(p) + theta_parent(p)]"
            .into(),
    ];
    let (c0p, c0f) = (
        window.parent.material.hugoniot.c0.si(),
        window.flyer.material.hugoniot.c0.si(),
    );
    s.numbers.push(format!(
        "Vc / C0(parent) = {} / {} m/s = {:.2} ({})",
        v1(col.collision_velocity.si()),
        g(c0p),
        col.collision_velocity.si() / c0p,
        if j.parent_supersonic {
            "supersonic"
        } else {
            "subsonic"
        }
    ));
    s.numbers.push(format!(
        "Vf / C0(flyer)  = {} / {} m/s = {:.2} ({})",
        v1(col.flow_velocity.si()),
        g(c0f),
        col.flow_velocity.si() / c0f,
        if j.flyer_supersonic {
            "supersonic"
        } else {
            "subsonic"
        }
    ));
    let crit = j.critical_angle_deg().map_or_else(
        || "none below 90 deg".to_string(),
        |d| format!("{d:.2} deg"),
    );
    s.numbers.push(format!(
        "{}: critical angle {crit}",
        crate::present::jetting_note(j)
    ));
    s.results.push(match j.critical_angle_deg() {
        Some(d) => Figure::new("jetting_critical_angle_deg", d, crit.clone()),
        None => Figure::word("jetting_critical_angle_deg", crit.clone()),
    });
    let regime = serde_json::to_value(j.regime)
        .ok()
        .and_then(|v| v.as_str().map(str::to_string))
        .unwrap_or_default();
    s.results.push(Figure::word("jetting_regime", regime));
    s.results
        .push(Figure::word("jetting.inflow", j.inflow_text()));
    if j.is_mixed() {
        s.notes.push(format!(
            "mixed regime: no source covers a collision supersonic in one plate only; this pair uses the {} rule (docs/theory.md §4.3)",
            window.criteria.mixed_jetting.as_str()
        ));
    } else if j.any_supersonic() {
        s.notes.push("both supersonic: the limit rests on the shock-polar criterion (Walsh et al. 1953, from memory) and on linear Hugoniot fits; read points near it with that uncertainty".into());
    }
    s.source = oblique_core::CriterionId::Jetting.source().into();
    s.mark =
        "from memory (subsonic rule and polars); derived here (dissimilar construction)".into();
    s
}

/// Step: the interface features (informational).
pub(super) fn interface(window: &PairWindow, c: &Classification) -> Step {
    let e = &c.evaluation;
    let mut s = Step::new("interface", "Interface features (informational)");
    s.relation = "two estimates that do not decide the verdict: the wavelength of a wavy interface and the energy the collision dissipates per unit area".into();
    s.formula = vec![
        "lambda = 26 h sin^2(beta/2)".into(),
        "E_d = m_f m_p Vp^2 / (2 (m_f + m_p)), m = rho h (a massive parent: m_f Vp^2 / 2)".into(),
    ];
    let h = window.flyer_thickness;
    let beta = e.collision.angle.degrees();
    s.numbers.push(format!(
        "lambda = 26 x {:.2} mm x sin^2({beta:.2} deg / 2) = {:.3} mm",
        h.mm(),
        e.wavelength.mm()
    ));
    s.numbers.push(format!(
        "E_d = {:.3e} J/m^2 ({})",
        e.dissipated_energy.si(),
        if window.parent_thickness.is_some() {
            "inelastic normal collision"
        } else {
            "massive parent assumed"
        }
    ));
    s.results.push(Figure::new(
        "interface_wavelength_m",
        e.wavelength.si(),
        format!("{:.3} mm", e.wavelength.mm()),
    ));
    s.results.push(Figure::new(
        "dissipated_energy_j_m2",
        e.dissipated_energy.si(),
        format!("{:.3e} J/m^2", e.dissipated_energy.si()),
    ));
    s.source = "wavelength: Cowan, Bergmann & Holtzman 1971 or the Belfast group; energy: physics-notes.md §5".into();
    s.mark = "from memory".into();
    s
}
