//! The worked example of one classification: every step from the inputs to the verdict, in
//! order, each with the relation in words and as a formula, the numbers substituted with their
//! units, the result, and its source or its mark ("from memory", "derived here", ...). For the
//! kinematics it also says what the other two velocity conventions give for the same geometry.
//!
//! The steps are read off a [`Classification`] that [`crate::classify::classify`] and
//! [`crate::advice::explain_in`] produced, the same evaluation `oblique check` prints: every
//! result shown is a value of that evaluation, formatted as `check` formats it, so the two agree
//! digit for digit. The substituted numbers are the inputs of each relation as the evaluation
//! used them; nothing here evaluates a criterion a second time.
//!
//! [`Derivation::text`] reads top to bottom like a worked example in a textbook;
//! [`Derivation::json`] carries the same steps as data (results under the keys `check --json`
//! uses). Every derivation carries the caution.

mod limits;
mod physics;

use crate::classify::Classification;
use crate::present::{sig, table, CAUTION};
use crate::PairWindow;
use oblique_core::{Collision, PairSetup};
use serde_json::{json, Map, Value};

/// How the user gave the point's velocity.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum GivenVelocity {
    /// The impact velocity Vp (`--velocity`).
    Impact,
    /// The collision-point velocity Vc (`--collision-velocity`).
    Collision,
}

/// One number a step produces: its key (as in `check --json`: SI, unit suffix), its value in
/// SI (`None` for a word such as "none below 90 deg"), or a yes/no fact (`satisfied`, `inside`:
/// a boolean in the JSON, as in `check --json`), and the text `check` prints for it.
#[derive(Debug, Clone, PartialEq, Default)]
pub struct Figure {
    /// The key.
    pub key: String,
    /// The value, SI.
    pub value: Option<f64>,
    /// A yes/no fact (its JSON value is this boolean, not the text).
    pub flag: Option<bool>,
    /// As printed.
    pub text: String,
}

impl Figure {
    fn new(key: impl Into<String>, value: f64, text: impl Into<String>) -> Self {
        Figure {
            key: key.into(),
            value: Some(value),
            flag: None,
            text: text.into(),
        }
    }

    fn word(key: impl Into<String>, text: impl Into<String>) -> Self {
        Figure {
            key: key.into(),
            value: None,
            flag: None,
            text: text.into(),
        }
    }

    /// A yes/no fact, printed as `text` (e.g. "holds", "FAILS").
    fn flag(key: impl Into<String>, flag: bool, text: impl Into<String>) -> Self {
        Figure {
            key: key.into(),
            value: None,
            flag: Some(flag),
            text: text.into(),
        }
    }

    /// Its JSON value: the boolean of a yes/no fact, the SI number, or else the text.
    #[must_use]
    pub fn json(&self) -> Value {
        match (self.flag, self.value) {
            (Some(b), _) => json!(b),
            (None, Some(v)) => sig(v),
            (None, None) => json!(self.text),
        }
    }
}

/// One step of the worked example.
#[derive(Debug, Clone, PartialEq, Default)]
pub struct Step {
    /// A short key: `given`, `materials`, `kinematics`, `deribas-lower`, `verdict`, ...
    pub key: String,
    /// The heading.
    pub title: String,
    /// The relation in words.
    pub relation: String,
    /// The relation as formulas.
    pub formula: Vec<String>,
    /// The numbers substituted, one line each, ending in the result.
    pub numbers: Vec<String>,
    /// A table, when the step is best read as one: header and rows.
    pub table: Option<(Vec<String>, Vec<Vec<String>>)>,
    /// The results.
    pub results: Vec<Figure>,
    /// Where the relation comes from.
    pub source: String,
    /// How sure the relation is: `from memory`, `derived here`, `confirmed`, `common practice`,
    /// `given`, ...
    pub mark: String,
    /// What the physics does not know here, and other remarks.
    pub notes: Vec<String>,
    /// Print the table before the numbers (a table the numbers conclude from).
    pub table_first: bool,
}

impl Step {
    fn new(key: &str, title: impl Into<String>) -> Self {
        Step {
            key: key.to_string(),
            title: title.into(),
            ..Step::default()
        }
    }

    /// The step as text, numbered `n`.
    #[must_use]
    pub fn text(&self, n: usize) -> String {
        let mut s = format!("Step {n}. {}\n", self.title);
        let block = |s: &mut String, label: &str, lines: &[String]| {
            for (i, l) in lines.iter().enumerate() {
                let head = if i == 0 { label } else { "" };
                s.push_str(&format!("  {head:<10}{l}\n"));
            }
        };
        if !self.relation.is_empty() {
            block(&mut s, "relation:", &wrap(&self.relation, 88));
        }
        block(&mut s, "formula:", &self.formula);
        let tab = |s: &mut String| {
            if let Some((h, rows)) = &self.table {
                let header: Vec<&str> = h.iter().map(String::as_str).collect();
                for l in table(&header, rows).lines() {
                    s.push_str(&format!("  {l}\n"));
                }
            }
        };
        if self.table_first {
            tab(&mut s);
        }
        block(&mut s, "numbers:", &self.numbers);
        if !self.table_first {
            tab(&mut s);
        }
        if !self.source.is_empty() {
            block(&mut s, "source:", &wrap(&self.source, 88));
        }
        if !self.mark.is_empty() {
            block(&mut s, "status:", std::slice::from_ref(&self.mark));
        }
        for n in &self.notes {
            block(&mut s, "note:", &wrap(n, 88));
        }
        s
    }

    /// The step as JSON, numbered `n`.
    #[must_use]
    pub fn json(&self, n: usize) -> Value {
        let results: Map<String, Value> = self
            .results
            .iter()
            .map(|f| (f.key.clone(), f.json()))
            .collect();
        let texts: Map<String, Value> = self
            .results
            .iter()
            .map(|f| (f.key.clone(), json!(f.text)))
            .collect();
        json!({
            "step": n,
            "key": self.key,
            "title": self.title,
            "relation": self.relation,
            "formula": self.formula,
            "substituted": self.numbers,
            "table": self.table.as_ref().map(|(h, r)| json!({"header": h, "rows": r})),
            "results": results,
            "results_text": texts,
            "source": self.source,
            "status": self.mark,
            "notes": self.notes,
        })
    }
}

/// Words in lines of at most `width` characters.
fn wrap(text: &str, width: usize) -> Vec<String> {
    let mut lines = Vec::new();
    let mut cur = String::new();
    for w in text.split_whitespace() {
        if !cur.is_empty() && cur.chars().count() + 1 + w.chars().count() > width {
            lines.push(std::mem::take(&mut cur));
        }
        if !cur.is_empty() {
            cur.push(' ');
        }
        cur.push_str(w);
    }
    if !cur.is_empty() {
        lines.push(cur);
    }
    lines
}

/// A number with four significant digits for the substituted lines (no exponent from 0.001 to
/// 1e6, trailing zeros dropped).
#[must_use]
pub fn g(x: f64) -> String {
    if x == 0.0 {
        return "0".into();
    }
    let a = x.abs();
    if !(1e-3..1e6).contains(&a) {
        return format!("{x:.3e}");
    }
    let d = (3 - a.log10().floor() as i32).max(0) as usize;
    let s = format!("{x:.d$}");
    if s.contains('.') {
        s.trim_end_matches('0').trim_end_matches('.').to_string()
    } else {
        s
    }
}

/// The worked example of one point.
#[derive(Debug, Clone, PartialEq)]
pub struct Derivation {
    /// The heading: the pair, the thickness, the convention.
    pub heading: String,
    /// The pair window's name, `None` for a window made on the command line.
    pub pair: Option<String>,
    /// The steps, in order.
    pub steps: Vec<Step>,
    /// Inside the window (and the validity domain).
    pub inside: bool,
    /// The prediction's word.
    pub prediction: String,
    /// The binding limit's label.
    pub binding: Option<String>,
    /// The reason in words.
    pub reason: String,
}

impl Derivation {
    /// Add a step at the end (before the caution), e.g. the weld probability.
    pub fn push(&mut self, step: Step) {
        self.steps.push(step);
    }

    /// The worked example as text.
    #[must_use]
    pub fn text(&self) -> String {
        let mut s = format!("Worked example: {}\n", self.heading);
        s.push_str("(every result below is the value `oblique check` computes and prints for this point)\n\n");
        for (i, st) in self.steps.iter().enumerate() {
            s.push_str(&st.text(i + 1));
            s.push('\n');
        }
        s.push_str(CAUTION);
        s.push('\n');
        s
    }

    /// The worked example as JSON.
    #[must_use]
    pub fn json(&self) -> Value {
        json!({
            "heading": self.heading,
            "pair": self.pair,
            "steps": self.steps.iter().enumerate().map(|(i, s)| s.json(i + 1)).collect::<Vec<_>>(),
            "inside": self.inside,
            "prediction": self.prediction,
            "binding": self.binding,
            "reason": self.reason,
            "rounding": crate::margin::ROUNDING_RULE,
            "caution": CAUTION,
        })
    }
}

/// The worked example of classification `c` (after [`crate::advice::explain_in`]) of the
/// point `given` (as the user gave it, in its convention; `how` says which velocity was typed)
/// against `window`. `is_pair` is false for a window made on the command line.
///
/// # Errors
/// [`oblique_core::PhysicsError`] when the window's materials are invalid.
pub fn derive(
    window: &PairWindow,
    given: &Collision,
    how: GivenVelocity,
    c: &Classification,
    is_pair: bool,
) -> Result<Derivation, oblique_core::PhysicsError> {
    let setup: PairSetup = window.setup()?;
    let col = &c.evaluation.collision;
    let pair_note = if is_pair {
        format!(" (pair window '{}')", window.name)
    } else {
        String::new()
    };
    let heading = format!(
        "{} flyer, {:.2} mm, on {} parent{}; convention {}",
        window.flyer.material.id,
        window.flyer_thickness.mm(),
        window.parent.material.id,
        pair_note,
        col.convention
    );
    let mut steps = vec![
        physics::given(window, given, how, is_pair),
        physics::materials(window),
    ];
    if given.convention != col.convention {
        steps.push(physics::convention(given, col));
    }
    steps.push(physics::kinematics(
        col,
        how,
        given.convention == col.convention,
    ));
    steps.push(physics::domain(window, &setup, c));
    steps.push(physics::pressure(
        window,
        col.impact_velocity.si(),
        &c.evaluation.impact,
    ));
    steps.push(physics::jetting(window, c));
    for r in &c.evaluation.criteria {
        steps.push(limits::criterion(window, c, r));
    }
    for (i, b) in window.boundaries.iter().enumerate() {
        steps.push(limits::boundary(window, c, i, b));
    }
    steps.push(limits::binding(window, c));
    steps.push(limits::headroom(window, c));
    steps.push(physics::interface(window, c));
    steps.push(limits::verdict(window, c));
    Ok(Derivation {
        heading,
        pair: is_pair.then(|| window.name.clone()),
        steps,
        inside: c.inside,
        prediction: c.prediction.as_str().to_string(),
        binding: c
            .binding
            .as_ref()
            .map(|b| crate::classify::limit_label(window, b)),
        reason: c.reason.clone(),
    })
}

/// The worked example of a head-on impact (collision angle 0): what is given, the material
/// values, the 1-D impact state and the verdict (not welded), as `check --angle 0deg` gives it.
///
/// # Errors
/// None today; the signature matches [`derive`].
pub fn derive_head_on(
    window: &PairWindow,
    h: &crate::classify::HeadOn,
    is_pair: bool,
) -> Result<Derivation, oblique_core::PhysicsError> {
    let pair_note = if is_pair {
        format!(" (pair window '{}')", window.name)
    } else {
        String::new()
    };
    let heading = format!(
        "{} flyer, {:.2} mm, on {} parent{}; head-on impact (collision angle 0)",
        window.flyer.material.id,
        window.flyer_thickness.mm(),
        window.parent.material.id,
        pair_note,
    );
    let mut given = Step::new("given", "What is given");
    given.numbers = vec![
        format!("flyer {}, parent {}, flyer thickness h = {:.2} mm", window.flyer.material.id, window.parent.material.id, window.flyer_thickness.mm()),
        format!("impact velocity Vp = {:.1} m/s at a collision angle of 0: the flyer meets the parent face to face (every convention agrees that Vp is normal to both plates)", h.impact_velocity_m_s),
    ];
    given.results.push(Figure::new(
        "impact_velocity_m_s",
        h.impact_velocity_m_s,
        format!("{:.1} m/s", h.impact_velocity_m_s),
    ));
    given.mark = "given".into();
    let mut verdict = Step::new("verdict", "Verdict");
    verdict.relation = "no collision point sweeps the interface, so no jet forms and the surfaces are not cleaned: nothing welds".into();
    verdict.numbers = vec![
        "verdict: NOT WELDED (head-on)".into(),
        format!("why: {}", crate::classify::HEAD_ON_REASON),
    ];
    verdict.notes = h.warnings.clone();
    verdict.results.push(Figure::word(
        "prediction",
        crate::classify::Prediction::HeadOn.as_str(),
    ));
    verdict.source = crate::classify::HEAD_ON_SOURCE.into();
    verdict.mark = "published case".into();
    Ok(Derivation {
        heading,
        pair: is_pair.then(|| window.name.clone()),
        steps: vec![
            given,
            physics::materials(window),
            physics::pressure(window, h.impact_velocity_m_s, &h.impact),
            verdict,
        ],
        inside: false,
        prediction: crate::classify::Prediction::HeadOn.as_str().into(),
        binding: None,
        reason: crate::classify::HEAD_ON_REASON.into(),
    })
}

#[cfg(test)]
mod tests;
