//! What a worker hands back for each row besides its output text: a compact record of each
//! classified point and the reason for each rejected row. Both the pipeline (which makes them)
//! and the summary (which takes them in file order) use these, so they sit below both.

/// What the summary needs of one classified point.
#[derive(Debug, Clone, Copy)]
pub(crate) struct Lite {
    /// Row (line number).
    pub row: u64,
    /// Position, m.
    pub pos: f64,
    /// Impact velocity, m/s.
    pub vp: f32,
    /// Collision angle, deg.
    pub beta: f32,
    /// Binding limit index, `u16::MAX` for none.
    pub binding: u16,
    /// Verdict index in `Prediction::ALL`.
    pub verdict: u8,
    /// Start of this row's text in the chunk's output.
    pub out_start: u32,
    /// Binding margin in its unit.
    pub margin: f64,
    /// Binding relative margin.
    pub rel: f64,
}

/// A rejected row.
#[derive(Debug, Clone)]
pub struct Rejected {
    /// Row (line number).
    pub row: u64,
    /// The field (header cell), or a word in parentheses for the whole row.
    pub field: String,
    /// Why.
    pub reason: String,
    /// Its position, m, when that cell could be read (it places the row along the interface).
    pub pos: Option<f64>,
}
