//! Classification of one process point against a pair window: every model criterion and user
//! boundary with its margin, the binding limit, a reason in plain words, and the prediction used
//! to compare with trials.

use crate::boundary::BoundaryResult;
use crate::pair::PairWindow;
use oblique_core::{
    evaluate_with_jetting, Collision, CriterionId, LimitKind, PairSetup, PhysicsError,
    PointEvaluation,
};
use serde::Serialize;

/// A limit of either kind.
#[derive(Debug, Clone, PartialEq, Serialize)]
#[serde(tag = "kind", content = "id", rename_all = "kebab-case")]
pub enum LimitRef {
    /// A model criterion.
    Criterion(CriterionId),
    /// A user boundary, by its index in the window.
    Boundary(usize),
}

/// What the window predicts for a point.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash, PartialOrd, Ord, Serialize)]
#[serde(rename_all = "kebab-case")]
pub enum Prediction {
    /// Every decisive limit holds.
    Welded,
    /// A lower limit (or an angle ceiling) fails.
    NotWelded,
    /// Only velocity ceilings fail (melting upper, a left-side boundary).
    Melted,
}

impl Prediction {
    /// All predictions.
    pub const ALL: [Prediction; 3] = [
        Prediction::Welded,
        Prediction::NotWelded,
        Prediction::Melted,
    ];
    /// The word.
    pub fn as_str(self) -> &'static str {
        match self {
            Prediction::Welded => "welded",
            Prediction::NotWelded => "not-welded",
            Prediction::Melted => "melted",
        }
    }
}

/// A point classified against a window.
#[derive(Debug, Clone)]
pub struct Classification {
    /// The model evaluation (criteria, kinematics, pressure, jetting).
    pub evaluation: PointEvaluation,
    /// Every user boundary at the point.
    pub boundaries: Vec<BoundaryResult>,
    /// Every decisive criterion and every in-range boundary satisfied.
    pub inside: bool,
    /// The binding limit: the most violated one, or the closest one when inside.
    pub binding: Option<LimitRef>,
    /// The binding limit's margin relative to its limit.
    pub binding_relative_margin: Option<f64>,
    /// Some boundary does not span the point.
    pub outside_trial_data: bool,
    /// The prediction.
    pub prediction: Prediction,
    /// Failing decisive limits.
    pub failing: Vec<LimitRef>,
    /// A plain-words reason.
    pub reason: String,
}

/// Classify `collision` against `window` (the collision is re-expressed in the window's
/// convention, keeping the geometry Vc and beta).
///
/// # Errors
/// [`PhysicsError`] when the physics cannot be evaluated.
pub fn classify(
    window: &PairWindow,
    setup: &PairSetup,
    collision: &Collision,
) -> Result<Classification, PhysicsError> {
    let collision = if collision.convention == window.convention {
        *collision
    } else {
        collision.with_convention(window.convention)
    };
    let jetting = oblique_core::jetting::critical_angle(
        &setup.flyer.hugoniot,
        &setup.parent.hugoniot,
        collision.flow_velocity,
        collision.collision_velocity,
    )?;
    classify_with_jetting(window, setup, &collision, jetting)
}

/// As [`classify`], with the jetting assessment supplied (e.g. from a table), and the collision
/// already in the window's convention.
///
/// # Errors
/// [`PhysicsError`] when the physics cannot be evaluated.
pub fn classify_with_jetting(
    window: &PairWindow,
    setup: &PairSetup,
    collision: &Collision,
    jetting: oblique_core::jetting::JettingAssessment,
) -> Result<Classification, PhysicsError> {
    let evaluation = evaluate_with_jetting(setup, collision, &window.criteria, jetting)?;
    let boundaries: Vec<BoundaryResult> = window
        .boundaries
        .iter()
        .map(|b| {
            b.evaluate(
                collision.impact_velocity,
                collision.collision_velocity,
                collision.angle,
            )
        })
        .collect();

    let mut decisive: Vec<(LimitRef, f64, bool, bool)> = Vec::new(); // (ref, relative margin, satisfied, velocity ceiling)
    for c in evaluation.criteria.iter().filter(|c| !c.informational) {
        let ceiling = c.kind == LimitKind::Upper;
        decisive.push((
            LimitRef::Criterion(c.id),
            c.relative_margin(),
            c.satisfied,
            ceiling,
        ));
    }
    for (i, (b, r)) in window.boundaries.iter().zip(&boundaries).enumerate() {
        if let (Some(rel), Some(sat)) = (r.relative_margin(), r.satisfied) {
            decisive.push((
                LimitRef::Boundary(i),
                rel,
                sat,
                b.weld_side.is_velocity_ceiling(),
            ));
        }
    }
    let inside = decisive.iter().all(|d| d.2);
    let failing: Vec<LimitRef> = decisive
        .iter()
        .filter(|d| !d.2)
        .map(|d| d.0.clone())
        .collect();
    let binding = decisive.iter().min_by(|a, b| a.1.total_cmp(&b.1));
    let prediction = if inside {
        Prediction::Welded
    } else if decisive.iter().filter(|d| !d.2).all(|d| d.3) {
        Prediction::Melted
    } else {
        Prediction::NotWelded
    };
    let outside_trial_data = boundaries.iter().any(|b| !b.in_range);
    let mut c = Classification {
        evaluation,
        boundaries,
        inside,
        binding: binding.map(|b| b.0.clone()),
        binding_relative_margin: binding.map(|b| b.1),
        outside_trial_data,
        prediction,
        failing,
        reason: String::new(),
    };
    c.reason = reason(window, &c);
    Ok(c)
}

/// The label of a limit.
pub fn limit_label(window: &PairWindow, limit: &LimitRef) -> String {
    match limit {
        LimitRef::Criterion(id) => id.as_str().to_string(),
        LimitRef::Boundary(i) => window.boundaries.get(*i).map_or_else(
            || format!("boundary {i}"),
            |b| format!("boundary \"{}\"", b.label),
        ),
    }
}

/// Plain-words advice for one limit at this point.
pub fn limit_advice(window: &PairWindow, c: &Classification, limit: &LimitRef) -> String {
    match limit {
        LimitRef::Criterion(id) => c
            .evaluation
            .criterion(*id)
            .map(|r| r.advice())
            .unwrap_or_default(),
        LimitRef::Boundary(i) => {
            let (Some(b), Some(r)) = (window.boundaries.get(*i), c.boundaries.get(*i)) else {
                return String::new();
            };
            let m = r.margin.unwrap_or(0.0);
            let axis = if b.plane == crate::boundary::Plane::AngleImpactVelocity {
                "impact"
            } else {
                "collision-point"
            };
            let satisfied = r.satisfied.unwrap_or(true);
            match (b.weld_side, satisfied) {
                (_, true) => format!(
                    "holds with {} of margin",
                    oblique_core::criteria::format_in_unit(m, r.unit)
                ),
                (crate::boundary::WeldSide::Above, false) => format!(
                    "raise the collision angle by at least {:.2} deg to cross boundary \"{}\"",
                    -m, b.label
                ),
                (crate::boundary::WeldSide::Below, false) => format!(
                    "lower the collision angle by at least {:.2} deg to cross boundary \"{}\"",
                    -m, b.label
                ),
                (crate::boundary::WeldSide::Right, false) => format!(
                    "raise the {axis} velocity by at least {:.0} m/s to cross boundary \"{}\"",
                    -m, b.label
                ),
                (crate::boundary::WeldSide::Left, false) => format!(
                    "lower the {axis} velocity by at least {:.0} m/s to cross boundary \"{}\"",
                    -m, b.label
                ),
            }
        }
    }
}

fn reason(window: &PairWindow, c: &Classification) -> String {
    let mut s = if c.inside {
        match &c.binding {
            Some(b) => format!(
                "inside the window; the closest limit is {}: {}",
                limit_label(window, b),
                limit_advice(window, c, b)
            ),
            None => "inside the window (no decisive limit is enabled)".to_string(),
        }
    } else {
        let first = c
            .binding
            .as_ref()
            .map(|b| format!("{}: {}", limit_label(window, b), limit_advice(window, c, b)))
            .unwrap_or_default();
        let others = c.failing.len().saturating_sub(1);
        if others > 0 {
            format!("outside the window; binding limit {first} ({others} more limit(s) also fail)")
        } else {
            format!("outside the window; binding limit {first}")
        }
    };
    if c.outside_trial_data {
        let labels: Vec<String> = c
            .boundaries
            .iter()
            .filter(|b| !b.in_range)
            .map(|b| format!("\"{}\"", b.label))
            .collect();
        s.push_str(&format!(
            "; outside the trial data: boundary {} does not span this point and was not extrapolated",
            labels.join(", ")
        ));
    }
    s
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::library::Library;
    use oblique_core::units::{Angle, Velocity};

    fn demo() -> PairWindow {
        Library::load(&[])
            .expect("built-in library")
            .pair("demo-al6061-on-cu")
            .expect("demo pair")
            .clone()
    }

    fn at(w: &PairWindow, v: f64, deg: f64) -> Classification {
        let setup = w.setup().expect("setup");
        let c = Collision::from_impact(
            w.convention,
            Velocity::from_m_s(v),
            Angle::from_degrees(deg),
        )
        .expect("collision");
        classify(w, &setup, &c).expect("classifies")
    }

    #[test]
    fn predictions_on_the_demo_window() {
        let w = demo();
        let inside = at(&w, 450.0, 10.0);
        assert!(inside.inside);
        assert_eq!(inside.prediction, Prediction::Welded);
        assert_eq!(inside.binding, Some(LimitRef::Boundary(0)));
        assert!(inside.reason.starts_with("inside the window"));

        let slow = at(&w, 300.0, 10.0);
        assert_eq!(slow.prediction, Prediction::NotWelded);
        assert!(slow
            .failing
            .contains(&LimitRef::Criterion(CriterionId::StrengthLower)));
        assert!(slow.failing.contains(&LimitRef::Boundary(0)));

        // Only the melting ceiling fails: predicted melted.
        let hot = at(&w, 650.0, 9.0);
        assert_eq!(hot.prediction, Prediction::Melted);
        assert_eq!(
            hot.failing,
            vec![LimitRef::Criterion(CriterionId::MeltingUpper)]
        );
    }

    #[test]
    fn a_boundary_that_does_not_span_the_point_is_flagged_not_extrapolated() {
        let w = demo();
        let c = at(&w, 700.0, 20.0);
        assert!(c.outside_trial_data);
        assert!(!c.boundaries[1].in_range);
        assert!(!c.failing.contains(&LimitRef::Boundary(1)));
        assert!(c.reason.contains("outside the trial data"));
    }

    #[test]
    fn another_convention_is_converted_keeping_the_geometry() {
        let w = demo();
        let setup = w.setup().expect("setup");
        let nf = Collision::from_impact(
            w.convention,
            Velocity::from_m_s(450.0),
            Angle::from_degrees(10.0),
        )
        .expect("collision");
        let bis = nf.with_convention(oblique_core::Convention::Bisector);
        let a = classify(&w, &setup, &nf).expect("classifies");
        let b = classify(&w, &setup, &bis).expect("classifies");
        assert_eq!(a.inside, b.inside);
        assert!(
            (a.evaluation.collision.impact_velocity.si()
                - b.evaluation.collision.impact_velocity.si())
            .abs()
                < 1e-9
        );
    }

    #[test]
    fn agreement_on_the_demo_window() {
        let a = crate::agreement::agreement(&demo()).expect("agreement");
        assert_eq!(a.observations, 16);
        assert_eq!(a.agreeing, 14);
        let idx: Vec<usize> = a.disagreements.iter().map(|d| d.index).collect();
        assert_eq!(idx, vec![10, 13]);
        assert!(a.disagreements[1]
            .misjudged_by
            .iter()
            .any(|m| m == "deribas-lower"));
        assert_eq!(
            a.table["welded"]["partial"], 1,
            "the partial shot near the edge agrees"
        );
        assert_eq!(a.table["melted"]["melted"], 1);
    }
}
