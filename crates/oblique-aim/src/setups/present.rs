//! The set-up search as text for people and as JSON.

use super::{SetupResult, SetupSearchResult};
use crate::aim::present_support::{nearest, pct, z_text};
use oblique_setup::human;
use oblique_window::margin::verdict_velocity_headroom;
use oblique_window::present::{sig, table, CAUTION};
use serde_json::{json, Value};

/// A set-up using at least this share of a rating gets a caution (common practice: banks are
/// run with a margin below the maker's ratings).
const NEAR_RATING: f64 = 0.9;

/// What the angle of every set-up is, and what that assumes.
pub const ANGLE_NOTE: &str = "the collision angle is the rod's chamfer: the lumped tube model moves the wall inward as one ring, parallel to the axis, so it meets a rod chamfered at alpha at a collision angle of alpha (normal-to-flyer). The real wall bends at the coil ends and the dynamic angle grows along the joint, which the model does not compute (docs/process-models.md §11); the angle's scatter stands for that difference. The angle is never computed from the set-up: it is the chamfer you machine";

fn verdict(r: &SetupResult) -> &'static str {
    if r.check.inside && r.check.outside_trial_data {
        "welded*"
    } else {
        r.check.prediction.as_str()
    }
}

impl SetupSearchResult<'_> {
    /// The ranked set-ups for people, with the best one spelled out.
    #[must_use]
    pub fn text(&self) -> String {
        let w = self.window;
        let mut s = format!(
            "Set-up search (mpw-tube model): {} tube, wall {:.2} mm, outer radius {}, onto a {} rod; pair window '{}'\n",
            w.flyer.material.id,
            w.flyer_thickness.mm(),
            human::mm(self.tube_outer_radius),
            w.parent.material.id,
            w.name
        );
        s.push_str(&format!(
            "bank: {}{}; current rating {}; energy rating {}\n",
            self.bank,
            self.rating
                .as_ref()
                .map_or(String::new(), |(u, from)| format!(
                    ", rated {}, from {from}",
                    human::kv(*u)
                )),
            self.ratings
                .current
                .as_ref()
                .map_or("none given".into(), |(i, from)| format!(
                    "{} kA, from {from}",
                    human::g(i / 1e3)
                )),
            self.ratings
                .energy
                .as_ref()
                .map_or("none given".into(), |(e, from)| format!(
                    "{}, from {from}",
                    human::kj(*e)
                )),
        ));
        s.push_str(&format!(
            "coils: {}leads {}; efficiency {} ({})\n",
            self.coil_file
                .as_ref()
                .map_or(String::new(), |f| format!("file {f}, ")),
            human::nh(self.extra_inductance),
            human::g(self.efficiency.0),
            self.efficiency.1
        ));
        let l = &self.left_out;
        s.push_str(&format!(
            "searched: {} set-ups with an impact (left out before that: {} above the rated voltage, {} above the energy rating, {} above the current rating with the workpiece held still, {} without an impact); {} outside the window, {} inside the model limits but outside the trial data, {} inside\n",
            self.evaluated, l.above_voltage, l.above_energy, l.above_current, l.no_impact, l.outside_window, l.outside_trial_data, self.inside
        ));
        s.push_str(&format!("angle: {ANGLE_NOTE}\n"));
        s.push_str(&format!(
            "scatter: {} ({})\n",
            self.spread.text(),
            self.basis
        ));
        s.push_str(&format!(
            "measure: {}\n\n",
            crate::aim::present_support::MEASURE
        ));
        for n in &self.notes {
            s.push_str(&format!("note: {n}\n"));
        }
        if self.ranked.is_empty() {
            s.push_str("no set-up of this family lands inside the window; `oblique sweep` and `oblique trade` show where the window is\n");
            s.push_str(CAUTION);
            s.push('\n');
            return s;
        }
        let rows: Vec<Vec<String>> = self
            .ranked
            .iter()
            .enumerate()
            .map(|(i, r)| {
                vec![
                    format!("{}", i + 1),
                    format!("{} x {}", human::g(r.bore * 1e3), human::g(r.length * 1e3)),
                    human::g(r.voltage / 1e3),
                    human::g(r.energy / 1e3),
                    human::g(r.standoff * 1e3),
                    human::g(r.chamfer_deg),
                    format!("{:.0}", r.velocity),
                    z_text(r.room.z_min),
                    nearest(&r.room),
                    r.probability.map_or("-".into(), pct),
                    verdict(r).into(),
                    format!("{:.0}", r.peak_current / 1e3),
                ]
            })
            .collect();
        s.push_str(&table(
            &[
                "rank",
                "coil bore x length [mm]",
                "U0 [kV]",
                "E0 [kJ]",
                "standoff [mm]",
                "chamfer [deg]",
                "Vp [m/s]",
                "z min",
                "nearest limit",
                "P(weld)",
                "verdict",
                "I peak held [kA]",
            ],
            &rows,
        ));
        s.push_str("  (Vp: the tube model's impact velocity, estimated again on its own for each listed set-up as `oblique estimate` does; z min: the nearest limit in standard deviations; P(weld): sampled, the same draws for each; I peak held: first current peak with the workpiece held still; welded*: outside the trial data)\n\n");
        let b = &self.ranked[0];
        s.push_str(&format!(
            "best set-up: coil of bore radius {} and length {} (leads {}), charge {} ({}), standoff {}, rod chamfer {} deg\n",
            human::mm(b.bore),
            human::mm(b.length),
            human::nh(self.extra_inductance),
            human::kv(b.voltage),
            human::kj(b.energy),
            human::mm(b.standoff),
            human::g(b.chamfer_deg)
        ));
        s.push_str(&format!(
            "  gives Vp {:.0} m/s at {} deg: {}; nearest limit {} ({} standard deviations); binding limit (the smallest relative margin, as check names it) {}\n",
            b.velocity,
            human::g(b.chamfer_deg),
            verdict(b),
            nearest(&b.room),
            z_text(b.room.z_min),
            b.binding(w)
        ));
        if let Some(v) = verdict_velocity_headroom(w, &b.check) {
            s.push_str(&format!("  {}\n", v.sentence()));
        }
        let uses = self.rating_use(b);
        if !uses.is_empty() {
            let words: Vec<String> = uses
                .iter()
                .map(|(what, frac)| format!("{what} {:.0} %", 100.0 * frac))
                .collect();
            s.push_str(&format!(
                "  of the bank's ratings it uses: {}\n",
                words.join(", ")
            ));
            if uses.iter().any(|(_, f)| *f >= NEAR_RATING) {
                s.push_str(&format!(
                    "  caution: within {:.0} % of a rating; pulsed-power practice keeps a margin below the maker's ratings (common practice): confirm with the bank's maker and your site's rules before firing it\n",
                    100.0 * (1.0 - NEAR_RATING)
                ));
            }
        }
        if let Some(cmd) = self.estimate_command(b) {
            s.push_str(&format!("  the same set-up on its own: {cmd}\n"));
        }
        if self.uncalibrated {
            s.push_str("The efficiency is not calibrated on this workpiece: the velocities are upper estimates with a wide scatter; calibrate on a measured shot (oblique calibrate) before trusting them.\n");
        }
        s.push_str("These are screening estimates, never a guarantee: confirm the set-up with sectioned trial joints.\n");
        s.push_str(CAUTION);
        s.push('\n');
        s
    }

    /// How much of each known rating a set-up uses: (what, fraction), for the rated voltage, the
    /// current rating (first peak with the workpiece held still) and the energy rating.
    #[must_use]
    pub fn rating_use(&self, r: &SetupResult) -> Vec<(&'static str, f64)> {
        let mut out = Vec::new();
        if let Some((u, _)) = &self.rating {
            out.push(("charging voltage", r.voltage / u));
        }
        if let Some((i, _)) = &self.ratings.current {
            out.push(("peak current (held still)", r.peak_current / i));
        }
        if let Some((e, _)) = &self.ratings.energy {
            out.push(("stored energy", r.energy / e));
        }
        out
    }

    /// The `oblique estimate` command line of a listed set-up (when the bank is a file): the
    /// same bank, coil (file and the dimensions searched), leads, efficiency, window, standoff,
    /// charge and angle.
    #[must_use]
    pub fn estimate_command(&self, r: &SetupResult) -> Option<String> {
        if self.bank.starts_with("the bank given by flags") {
            return None;
        }
        let p = &self.reproduce;
        let w = self.window;
        let mut c = format!("oblique estimate mpw-tube --machine {}", self.bank);
        if let Some(f) = &p.coil_file {
            c.push_str(&format!(" --coil {f}"));
        }
        if p.bore_given || p.coil_file.is_none() {
            c.push_str(&format!(" --coil-bore {}mm", human::g(r.bore * 1e3)));
        }
        if p.length_given || p.coil_file.is_none() {
            c.push_str(&format!(" --coil-length {}mm", human::g(r.length * 1e3)));
        }
        if let Some(x) = p.extra_inductance {
            c.push_str(&format!(" --coil-inductance {}nH", human::g(x * 1e9)));
        }
        if let Some(e) = p.efficiency {
            c.push_str(&format!(" --efficiency {e}"));
        }
        if p.window_from_file {
            c.push_str(&format!(" --pair {}", w.name));
        } else {
            c.push_str(&format!(
                " --flyer {} --flyer-thickness {}mm --parent {} --convention {}",
                w.flyer.material.id,
                human::g(w.flyer_thickness.si() * 1e3),
                w.parent.material.id,
                w.convention
            ));
        }
        c.push_str(&format!(
            " --tube-outer-radius {}mm --standoff {}mm --charge-voltage {}kV --angle {}deg",
            human::g(self.tube_outer_radius * 1e3),
            human::g(r.standoff * 1e3),
            human::g(r.voltage / 1e3),
            human::g(r.chamfer_deg),
        ));
        Some(c)
    }

    /// The search as JSON: `best`, then `ranked`, the counts, the rating, the caution.
    #[must_use]
    pub fn json(&self) -> Value {
        let w = self.window;
        let one = |r: &SetupResult| {
            let uses = self.rating_use(r);
            json!({
                "coil_bore_radius_m": sig(r.bore),
                "coil_length_m": sig(r.length),
                "charge_voltage_v": sig(r.voltage),
                "stored_energy_j": sig(r.energy),
                "standoff_m": sig(r.standoff),
                "chamfer_deg": sig(r.chamfer_deg),
                "impact_velocity_m_s": sig(r.velocity),
                "collision_angle_deg": sig(r.chamfer_deg),
                "prediction": r.check.prediction.as_str(),
                "inside": r.check.inside,
                "outside_trial_data": r.check.outside_trial_data,
                "binding": r.binding(w),
                "z_min": sig(r.room.z_min),
                "nearest_limit": nearest(&r.room),
                "first_order_probability": sig(r.room.p1()),
                "weld_probability": r.probability,
                "peak_current_held_a": sig(r.peak_current),
                "rating_use": uses.iter().map(|(what, f)| json!({"rating": what, "fraction": sig(*f)})).collect::<Vec<_>>(),
                "near_a_rating": uses.iter().any(|(_, f)| *f >= NEAR_RATING),
                "velocity_headroom": verdict_velocity_headroom(w, &r.check).map_or(Value::Null, |x| x.json()),
                "margins": r.room.limits.iter().map(|l| json!({
                    "limit": l.label, "margin": sig(l.margin), "unit": l.unit, "sd": sig(l.sd),
                    "z": if l.z.is_finite() { sig(l.z) } else { Value::Null },
                })).collect::<Vec<_>>(),
                "estimate_command": self.estimate_command(r),
            })
        };
        json!({
            "pair": w.name,
            "model": "mpw-tube",
            "bank": self.bank,
            "rated_voltage_v": self.rating.as_ref().map(|r| sig(r.0)),
            "max_current_a": self.ratings.current.as_ref().map(|x| sig(x.0)),
            "max_current_from": self.ratings.current.as_ref().map(|x| x.1.clone()),
            "max_energy_j": self.ratings.energy.as_ref().map(|x| sig(x.0)),
            "max_energy_from": self.ratings.energy.as_ref().map(|x| x.1.clone()),
            "coil_file": self.coil_file,
            "coil_extra_inductance_h": sig(self.extra_inductance),
            "tube_outer_radius_m": sig(self.tube_outer_radius),
            "efficiency": {"value": self.efficiency.0, "from": self.efficiency.1},
            "angle": ANGLE_NOTE,
            "scatter": {
                "velocity_sd": self.spread.velocity,
                "angle_sd_deg": self.spread.angle_deg,
                "model_uncertainty": self.spread.model,
                "basis": self.basis,
            },
            "measure": crate::aim::present_support::MEASURE,
            "evaluated": self.evaluated,
            "inside": self.inside,
            "left_out": {
                "above_rated_voltage": self.left_out.above_voltage,
                "above_energy_rating": self.left_out.above_energy,
                "above_current_rating": self.left_out.above_current,
                "no_impact": self.left_out.no_impact,
                "outside_window": self.left_out.outside_window,
                "outside_trial_data": self.left_out.outside_trial_data,
            },
            "best": self.ranked.first().map(one),
            "ranked": self.ranked.iter().map(one).collect::<Vec<_>>(),
            "notes": self.notes,
            "caution": CAUTION,
        })
    }
}
