//! Text tables and JSON of the typed results, as `oblique` prints them: pure functions from a
//! result to a `String` or a `serde_json::Value`; nothing here parses flags or writes files.
//! JSON values are SI, under keys with unit suffixes; every result carries the caution.

mod calibrate;
mod estimate;
mod sweep;

pub use calibrate::{calibration_json, calibration_text, ring_down_json, ring_down_text};
pub use estimate::{
    estimate_json, estimate_text, explosive_json, explosive_text, history_csv, pulse_table,
    verdict_lines,
};
pub use sweep::{curve_csvs, sweep_json, sweep_text};

use crate::inputs::{InputValue, Inputs};
use oblique_window::present::{sig, table};
use serde_json::{json, Map, Value};

/// The assumptions of the tube model, in one line.
pub const ASSUMPTIONS_TUBE: &str = "assumptions: lumped one-degree-of-freedom model (docs/process-models.md): series RLC bank with constant R, long-solenoid field in the gap (no coil end effects, no field leakage), thin rigid-plastic ring resisted by the quasi-static yield strength, skin-depth factor 1-exp(-2h/delta) at the instantaneous frequency, pressure scaled by the efficiency eta; the collision angle is not computed";
/// The assumptions of the sheet model, in one line.
pub const ASSUMPTIONS_SHEET: &str = "assumptions: lumped one-degree-of-freedom model (docs/process-models.md): series RLC bank with constant R, parallel-plate field over the bar (no fringing at the edges), the driven strip moves as one flat unresisted plate, skin-depth factor 1-exp(-2h/delta) at the instantaneous frequency, pressure scaled by the efficiency eta; the collision angle is not computed";
/// The assumptions of the explosive model, in one line.
pub const ASSUMPTIONS_EXPLOSIVE: &str = "assumptions: Gurney open-faced sandwich (terminal flyer velocity; a flyer that meets the parent before it has finished accelerating is slower), steady collision kinematics of the parallel or inclined set-up in the bisector convention (docs/process-models.md section 9); the Gurney velocity is the user's, none is shipped";

/// The inputs table: quantity, value, where it came from.
#[must_use]
pub fn inputs_table(inputs: &Inputs) -> String {
    let rows: Vec<Vec<String>> = inputs
        .entries
        .iter()
        .map(|i| vec![i.label.to_string(), i.value.shown(), i.from.to_string()])
        .collect();
    format!("inputs\n{}", table(&["quantity", "value", "from"], &rows))
}

/// The inputs as JSON into `o`: `inputs` (SI values under unit-suffixed keys) and
/// `input_sources`.
pub fn inputs_json(inputs: &Inputs, o: &mut Map<String, Value>) {
    let mut vals = Map::new();
    let mut from = Map::new();
    for i in &inputs.entries {
        let v = match &i.value {
            InputValue::Quantity { si, .. } => sig(*si),
            InputValue::Text(t) => json!(t),
            InputValue::Unknown => Value::Null,
        };
        vals.insert(i.key.to_string(), v);
        from.insert(i.key.to_string(), json!(i.from.to_string()));
    }
    o.insert("inputs".into(), Value::Object(vals));
    o.insert("input_sources".into(), Value::Object(from));
}

/// The assumptions line without its `assumptions: ` lead, for JSON.
fn assumptions_value(assumptions: &str) -> Value {
    json!(assumptions.trim_start_matches("assumptions: "))
}
