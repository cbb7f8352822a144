//! The aim as text for people and as JSON.

use super::{Aim, Candidate};
use crate::measure::{Kind, LimitRoom, Room};
use oblique_core::criteria::format_in_unit;
use oblique_window::advice::inside_stretch_text;
use oblique_window::classify::{limit_label, LimitRef};
use oblique_window::margin::{angle_headroom, velocity_headroom, verdict_velocity_headroom, Along};
use oblique_window::present::{fmt_margin, sig, table, CAUTION};
use serde_json::{json, Value};

/// Helpers the set-up search prints with too.
pub(crate) mod support {
    pub(crate) use super::{nearest, pct, z_text, MEASURE};
}

/// The measure in words, printed with every aim.
pub const MEASURE: &str = "the smallest margin to any limit (the criteria, the user boundaries, the validity domain's bounds), in standard deviations of the stated scatter to first order (z = margin / sd), among points inside the window and the trial data; ties broken by the next smallest; docs/theory.md §16";

pub(crate) fn pct(p: f64) -> String {
    if p > 0.999 && p < 1.0 {
        format!("{:.2} %", 100.0 * p)
    } else {
        format!("{:.1} %", 100.0 * p)
    }
}

pub(crate) fn z_text(z: f64) -> String {
    if z.is_infinite() {
        if z > 0.0 {
            "inf".into()
        } else {
            "-inf".into()
        }
    } else {
        format!("{z:.2}")
    }
}

fn margin_text(l: &LimitRoom) -> String {
    fmt_margin(l.margin, l.unit)
}

fn sd_text(l: &LimitRoom) -> String {
    format_in_unit(l.sd, l.unit)
}

/// The headroom cells of a limit of the best point (its classification explained).
fn cells(a: &Aim<'_>, c: &Candidate, l: &LimitRoom) -> (String, String) {
    match &l.kind {
        Kind::Limit(r) => (
            velocity_headroom(a.window, &c.check, r).map_or("-".into(), |x| x.cell()),
            angle_headroom(a.window, &c.check, r).map_or("-".into(), |x| x.cell()),
        ),
        _ => ("-".into(), "-".into()),
    }
}

fn verdict(c: &Candidate) -> &'static str {
    if c.check.inside && c.check.outside_trial_data {
        "welded, outside the trial data"
    } else {
        c.check.prediction.as_str()
    }
}

pub(crate) fn nearest(r: &Room) -> String {
    r.nearest().map_or("-".into(), |l| l.label.clone())
}

impl Aim<'_> {
    /// The aim for people: the best point with its margins, the ranked list, the region.
    #[must_use]
    pub fn text(&self) -> String {
        let w = self.window;
        let mut s = format!(
            "Aim: the point of pair window '{}' ({} flyer {:.2} mm on {}; convention {}) that keeps the most room to every limit\n",
            w.name,
            w.flyer.material.id,
            w.flyer_thickness.mm(),
            w.parent.material.id,
            w.convention
        );
        s.push_str(&format!(
            "scatter: {}\n  ({})\n",
            self.spread.text(),
            self.basis
        ));
        s.push_str(&format!("measure: {MEASURE}\n\n"));
        let Some(best) = self.best() else {
            s.push_str(&format!(
                "no point of the searched grid ({} nodes over the validity domain: angles 0.5 deg apart, velocities 6 % apart) is inside the window; `oblique trade` and `oblique check` show which limits close it\n",
                self.nodes_inside.1
            ));
            s.push_str(CAUTION);
            s.push('\n');
            return s;
        };
        s.push_str(&self.best_text(best));
        s.push_str(&self.ranked_text());
        s.push_str(&self.region_text());
        s.push_str("These are screening estimates: the best point is where the model keeps the most room, not a guarantee of a weld; confirm it with sectioned trial joints.\n");
        s.push_str(CAUTION);
        s.push('\n');
        s
    }

    /// The best point: where, its nearest limit, its probabilities, its margins.
    fn best_text(&self, best: &Candidate) -> String {
        let w = self.window;
        let mut s = String::new();
        let (uv, ub) = self.unrounded.unwrap_or((best.velocity, best.angle_deg));
        s.push_str(&format!(
            "best point: Vp {:.0} m/s, collision angle {:.1} deg ({}; found at {uv:.1} m/s, {ub:.2} deg, rounded to what a set-up is set to)\n",
            best.velocity, best.angle_deg, w.convention
        ));
        s.push_str(&format!(
            "  nearest limit: {}, {} standard deviations away\n",
            nearest(&best.room),
            z_text(best.room.z_min)
        ));
        s.push_str(&format!(
            "  first-order probability of keeping every limit (limits taken as independent): {}\n",
            pct(best.room.p1())
        ));
        if let Some(p) = &self.best_probability {
            s.push_str(&format!(
                "  weld probability (sampled, {}): {} (standard error {}, {} samples, seed {})\n",
                self.scatter.text(),
                pct(p.inside),
                pct(p.standard_error),
                p.samples,
                p.seed
            ));
        }
        let rows: Vec<Vec<String>> = best
            .room
            .limits
            .iter()
            .map(|l| {
                let (v, a) = cells(self, best, l);
                vec![
                    l.label.clone(),
                    margin_text(l),
                    sd_text(l),
                    z_text(l.z),
                    v,
                    a,
                ]
            })
            .collect();
        s.push_str("  margins at the best point:\n");
        for line in table(
            &[
                "limit",
                "margin at this point",
                "sd",
                "z",
                "velocity headroom",
                "angle headroom",
            ],
            &rows,
        )
        .lines()
        {
            s.push_str(&format!("  {line}\n"));
        }
        s.push_str("    (z: margin / sd, the standard deviations of the stated scatter between the point and the limit, to first order; the headroom columns as `check` prints them)\n");
        if let Some(v) = verdict_velocity_headroom(w, &best.check) {
            s.push_str(&format!("  {}\n", v.sentence()));
        }
        if let Some(t) = inside_stretch_text(&best.check) {
            s.push_str(&format!("  where the window is: {t}\n"));
        }
        for warn in &best.check.warnings {
            s.push_str(&format!("  warning: {warn}\n"));
        }
        s.push('\n');
        s
    }

    /// The ranked list.
    fn ranked_text(&self) -> String {
        let mut s = String::new();
        if self.ranked.len() > 1 {
            s.push_str(&format!(
                "ranked (each point at least {} standard deviations from those above it):\n",
                super::RANK_SEPARATION
            ));
            let rows: Vec<Vec<String>> = self
                .ranked
                .iter()
                .enumerate()
                .map(|(i, c)| {
                    vec![
                        format!("{}", i + 1),
                        format!("{:.0}", c.velocity),
                        format!("{:.1}", c.angle_deg),
                        z_text(c.room.z_min),
                        nearest(&c.room),
                        pct(c.room.p1()),
                        c.probability.map_or("-".into(), pct),
                        verdict(c).into(),
                    ]
                })
                .collect();
            for line in table(
                &[
                    "rank",
                    "Vp [m/s]",
                    "beta [deg]",
                    "z min",
                    "nearest limit",
                    "P1",
                    "P(weld)",
                    "verdict",
                ],
                &rows,
            )
            .lines()
            {
                s.push_str(&format!("{line}\n"));
            }
            s.push_str(&format!(
                "  (P1: first-order probability of keeping every limit; P(weld): sampled weld probability, the same draws for every point, {} samples)\n\n",
                self.rank_samples
            ));
        }
        s
    }

    /// The region keeping the requested probability, row by row.
    fn region_text(&self) -> String {
        let mut s = String::new();
        if let Some(r) = &self.region {
            s.push_str(&format!(
                "region keeping a weld probability of at least {} ({} x {} grid, {} draws per node, the same at every node; nodes outside the validity domain or the trial data left out):\n",
                pct(r.level),
                r.grid.xs.len(),
                r.grid.ys_deg.len(),
                r.grid.samples
            ));
            if r.is_empty() {
                s.push_str(
                    "  none: no node of the grid reaches this probability under this scatter\n",
                );
            }
            for (b, st) in &r.rows {
                if st.is_empty() {
                    continue;
                }
                let parts: Vec<String> = st
                    .iter()
                    .map(|(lo, hi)| format!("{:.0}-{:.0} m/s", lo.ceil(), hi.floor()))
                    .collect();
                s.push_str(&format!("  {b:5.2} deg: {}\n", parts.join(", ")));
            }
            s.push('\n');
        }
        s
    }

    /// The aim as JSON: `best` (velocity, angle, margins), then `ranked`, the region, the
    /// scatter, the measure and the caution.
    #[must_use]
    pub fn json(&self) -> Value {
        let w = self.window;
        let best = self.best().map(|b| {
            let margins: Vec<Value> = b
                .room
                .limits
                .iter()
                .map(|l| {
                    let along = |x: Option<Along>| x.map_or(Value::Null, |a| a.json());
                    let (vh, ah) = match &l.kind {
                        Kind::Limit(r) => (
                            along(velocity_headroom(w, &b.check, r)),
                            along(angle_headroom(w, &b.check, r)),
                        ),
                        _ => (Value::Null, Value::Null),
                    };
                    json!({
                        "limit": l.label,
                        "kind": match &l.kind {
                            Kind::Limit(LimitRef::Criterion(_)) => "criterion",
                            Kind::Limit(LimitRef::Boundary(_)) => "boundary",
                            Kind::Domain(..) => "validity-domain",
                        },
                        "margin": sig(l.margin),
                        "unit": l.unit,
                        "sd": sig(l.sd),
                        "z": if l.z.is_finite() { sig(l.z) } else { Value::Null },
                        "velocity_headroom": vh,
                        "angle_headroom": ah,
                    })
                })
                .collect();
            let (uv, ub) = self.unrounded.unwrap_or((b.velocity, b.angle_deg));
            json!({
                "impact_velocity_m_s": sig(b.velocity),
                "collision_angle_deg": sig(b.angle_deg),
                "convention": w.convention.as_str(),
                "unrounded": {"impact_velocity_m_s": sig(uv), "collision_angle_deg": sig(ub)},
                "z_min": sig(b.room.z_min),
                "nearest_limit": nearest(&b.room),
                "first_order_probability": sig(b.room.p1()),
                "weld_probability": self.best_probability.as_ref().map(|p| json!({
                    "inside": p.inside, "standard_error": p.standard_error, "samples": p.samples, "seed": p.seed,
                })),
                "margins": margins,
                "velocity_headroom": verdict_velocity_headroom(w, &b.check).map_or(Value::Null, |x| x.json()),
                "inside": b.check.inside,
                "prediction": b.check.prediction.as_str(),
                "binding": b.check.binding.as_ref().map(|l| limit_label(w, l)),
                "warnings": b.check.warnings,
            })
        });
        let ranked: Vec<Value> = self
            .ranked
            .iter()
            .map(|c| {
                json!({
                    "impact_velocity_m_s": sig(c.velocity),
                    "collision_angle_deg": sig(c.angle_deg),
                    "z_min": sig(c.room.z_min),
                    "nearest_limit": nearest(&c.room),
                    "first_order_probability": sig(c.room.p1()),
                    "weld_probability": c.probability,
                    "prediction": c.check.prediction.as_str(),
                    "inside": c.check.inside,
                    "outside_trial_data": c.check.outside_trial_data,
                })
            })
            .collect();
        let region = self.region.as_ref().map(|r| {
            json!({
                "level": r.level,
                "samples_per_node": r.grid.samples,
                "seed": r.grid.seed,
                "rows": r.rows.iter().map(|(b, st)| json!({
                    "collision_angle_deg": sig(*b),
                    "impact_velocity_m_s": st.iter().map(|(lo, hi)| json!([sig(*lo), sig(*hi)])).collect::<Vec<_>>(),
                })).collect::<Vec<_>>(),
                "grid": {
                    "impact_velocity_m_s": r.grid.xs.iter().map(|x| sig(*x)).collect::<Vec<_>>(),
                    "collision_angle_deg": r.grid.ys_deg.iter().map(|x| sig(*x)).collect::<Vec<_>>(),
                    "probability": r.grid.values.iter().map(|x| if x.is_nan() { Value::Null } else { json!(x) }).collect::<Vec<_>>(),
                },
            })
        });
        json!({
            "pair": w.name,
            "convention": w.convention.as_str(),
            "scatter": {
                "velocity_sd": self.spread.velocity,
                "angle_sd_deg": self.spread.angle_deg,
                "model_uncertainty": self.spread.model,
                "basis": self.basis,
            },
            "measure": MEASURE,
            "best": best,
            "ranked": ranked,
            "region": region,
            "grid_nodes_inside": self.nodes_inside.0,
            "grid_nodes": self.nodes_inside.1,
            "caution": CAUTION,
        })
    }
}
