//! What a weld map is asked to do: the input's layout and column names, the output's layout
//! and columns, what happens to bad rows, what the velocity column holds, how the jetting test
//! is solved, and the parallelism.

use crate::classifier::{JettingMode, VelocityKind};
use oblique_core::units::Length;

/// Input or output layout.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Default)]
pub enum Format {
    /// Comma-separated values with a header row.
    #[default]
    Csv,
    /// One JSON object per line.
    Jsonl,
}

/// What happens to a row that cannot be classified (a missing or non-numeric field, a
/// velocity or angle out of range, a record that does not match the header).
#[derive(Debug, Clone, Copy, PartialEq, Eq, Default)]
pub enum BadRows {
    /// Stop at the first one: the map ends there with [`MapError::Input`](crate::MapError).
    #[default]
    Stop,
    /// Skip it and count it in the summary.
    Skip,
    /// Skip it, count it, and write it with its row number, field and reason to the writer
    /// given to [`WeldMap::run`](crate::WeldMap::run).
    Save,
}

impl BadRows {
    /// The policy as the summary names it: `stop`, `skip` or `save`.
    pub fn as_str(self) -> &'static str {
        match self {
            Self::Stop => "stop",
            Self::Skip => "skip",
            Self::Save => "save",
        }
    }
}

/// The names of the columns to read (without their units, which the header carries): the
/// position along the interface, the velocity and the collision angle are required; the time
/// is optional (checked to be a number and passed through).
#[derive(Debug, Clone, PartialEq, Eq)]
pub struct ColumnNames {
    /// Position along the interface (default `position`).
    pub position: String,
    /// Velocity, of the kind [`MapOptions::velocity_kind`] says (default `velocity`).
    pub velocity: String,
    /// Collision angle (default `angle`).
    pub angle: String,
    /// Time, optional (default `time`).
    pub time: String,
}

impl Default for ColumnNames {
    fn default() -> Self {
        Self {
            position: "position".into(),
            velocity: "velocity".into(),
            angle: "angle".into(),
            time: "time".into(),
        }
    }
}

/// The options of a weld map. `MapOptions::default()` reads CSV with the columns
/// `position`, `velocity` (impact velocity) and `angle`, writes CSV with the default columns,
/// stops at the first bad row, and uses one worker per core.
#[derive(Debug, Clone, PartialEq)]
pub struct MapOptions {
    /// The input as messages and the summary name it (a file name, `<stdin>`, ...).
    pub input_name: String,
    /// Input layout.
    pub input_format: Format,
    /// Output layout.
    pub output_format: Format,
    /// The columns to read.
    pub columns: ColumnNames,
    /// What the velocity column holds.
    pub velocity_kind: VelocityKind,
    /// How the jetting critical angle is obtained.
    pub jetting: JettingMode,
    /// What happens to bad rows.
    pub bad_rows: BadRows,
    /// Add Vp, the jetting critical angle and the margin of every limit to each output row.
    pub all_columns: bool,
    /// Accept positions in any order; then no lengths or segments are computed.
    pub unsorted: bool,
    /// Join welded or unwelded runs shorter than this to their neighbours in the segment
    /// statistics (sorted input only).
    pub min_segment: Option<Length>,
    /// Keep what the strip plot along the interface needs (samples, verdict lengths by
    /// position).
    pub collect_strip: bool,
    /// Keep what the plot on the window plane needs (the first points, a histogram of all).
    pub collect_window_plane: bool,
    /// The criterion constants to report in the summary (see [`ConstantNote`]); empty for
    /// none.
    pub constants: Vec<ConstantNote>,
    /// Worker threads; 0 for one per core.
    pub threads: usize,
}

impl Default for MapOptions {
    fn default() -> Self {
        Self {
            input_name: "input".into(),
            input_format: Format::Csv,
            output_format: Format::Csv,
            columns: ColumnNames::default(),
            velocity_kind: VelocityKind::Impact,
            jetting: JettingMode::Table,
            bad_rows: BadRows::Stop,
            all_columns: false,
            unsorted: false,
            min_segment: None,
            collect_strip: false,
            collect_window_plane: false,
            constants: Vec::new(),
            threads: 0,
        }
    }
}

/// A criterion constant as the summary reports it: the value used and the window's own.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct ConstantNote {
    /// Its name in the summary (`deribas_k`).
    pub name: &'static str,
    /// The flag that sets it (`--deribas-k`), named when it differs from the window's.
    pub flag: &'static str,
    /// The value used.
    pub value: f64,
    /// The window's own value.
    pub window: f64,
}

impl MapOptions {
    /// The number of worker threads: [`MapOptions::threads`], or one per core when 0.
    pub fn worker_threads(&self) -> usize {
        if self.threads > 0 {
            self.threads
        } else {
            std::thread::available_parallelism().map_or(1, std::num::NonZeroUsize::get)
        }
    }
}
