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
    /// Add Vp, the jetting critical angle and the margin of every limit to each output row
    /// (the column set [`ColumnSelection::all`]); ignored when `output_columns` is set.
    pub all_columns: bool,
    /// The output's columns; `None` for the default set ([`ColumnSelection::default_set`]),
    /// or every column with `all_columns`.
    pub output_columns: Option<ColumnSelection>,
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
            output_columns: None,
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
    /// The output's columns: `output_columns`, else the default set or, with `all_columns`,
    /// every column.
    pub fn selected_columns(&self) -> ColumnSelection {
        match &self.output_columns {
            Some(c) => c.clone(),
            None if self.all_columns => ColumnSelection::all(),
            None => ColumnSelection::default_set(),
        }
    }

    /// The number of worker threads: [`MapOptions::threads`], or one per core when 0.
    pub fn worker_threads(&self) -> usize {
        if self.threads > 0 {
            self.threads
        } else {
            std::thread::available_parallelism().map_or(1, std::num::NonZeroUsize::get)
        }
    }
}

/// Whether the map has the impact velocity Vp.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
enum ImpactColumn {
    /// No.
    No,
    /// Yes.
    Yes,
    /// Only when the input holds the collision velocity (Vp is then computed, not read): the
    /// default set.
    WhenComputed,
}

/// Which limits' margins the map has.
#[derive(Debug, Clone, PartialEq, Eq)]
enum MarginColumns {
    /// None.
    None,
    /// Every decisive limit's.
    All,
    /// These, by column stem (`margin_jetting`, `margin_boundary_1`), checked against the
    /// window when the map is opened.
    Some(Vec<String>),
}

/// The output columns of a weld map, as `oblique map --columns` names them: a comma-separated
/// list of column names and named sets, written in the map's own order (the order of the list
/// does not matter). See `docs/weld-map.md`, section Output.
///
/// | name | columns |
/// |---|---|
/// | `default` | `row`, `input`, `verdict`, `binding`, `binding_margin`, `binding_margin_unit`, `binding_relative_margin`, `failing_limits`, `collision_velocity`, `flow_velocity`, `impact_pressure`, `outside_trial_data`, and `impact_velocity` when the input holds the collision velocity |
/// | `all` | `default` with `impact_velocity`, `jetting_critical_angle` and `margins` |
/// | `verdict-only` | `row`, `verdict` |
/// | `input` | every input column as written |
/// | `margins` | every decisive limit's margin; `margin_<limit>` one of them (`margin_jetting`, `margin_boundary_1`, ...) |
///
/// `jetting_critical_angle` is left out when the window's jetting criterion is off, and
/// `outside_trial_data` when the window has no user boundary, as in the default set.
#[derive(Debug, Clone, PartialEq, Eq)]
pub struct ColumnSelection {
    row: bool,
    input: bool,
    verdict: bool,
    binding: bool,
    binding_margin: bool,
    binding_margin_unit: bool,
    binding_relative_margin: bool,
    failing_limits: bool,
    impact_velocity: ImpactColumn,
    collision_velocity: bool,
    flow_velocity: bool,
    impact_pressure: bool,
    jetting_critical_angle: bool,
    margins: MarginColumns,
    outside_trial_data: bool,
}

/// The names `--columns` takes, sets first, for messages and help.
pub const COLUMN_NAMES: &str = "default, all, verdict-only (sets); row, input, verdict, binding, binding_margin, binding_margin_unit, binding_relative_margin, failing_limits, impact_velocity, collision_velocity, flow_velocity, impact_pressure, jetting_critical_angle, margins, margin_<limit>, outside_trial_data";

impl ColumnSelection {
    fn none() -> Self {
        Self {
            row: false,
            input: false,
            verdict: false,
            binding: false,
            binding_margin: false,
            binding_margin_unit: false,
            binding_relative_margin: false,
            failing_limits: false,
            impact_velocity: ImpactColumn::No,
            collision_velocity: false,
            flow_velocity: false,
            impact_pressure: false,
            jetting_critical_angle: false,
            margins: MarginColumns::None,
            outside_trial_data: false,
        }
    }

    /// The default set: the row number, the input as written, the verdict with the binding
    /// limit, its margin, unit and relative margin, every failing limit, Vc, Vf, the impact
    /// pressure, `outside_trial_data` (windows with boundaries) and Vp when it is computed
    /// from collision-velocity input.
    pub fn default_set() -> Self {
        Self {
            row: true,
            input: true,
            verdict: true,
            binding: true,
            binding_margin: true,
            binding_margin_unit: true,
            binding_relative_margin: true,
            failing_limits: true,
            impact_velocity: ImpactColumn::WhenComputed,
            collision_velocity: true,
            flow_velocity: true,
            impact_pressure: true,
            jetting_critical_angle: false,
            margins: MarginColumns::None,
            outside_trial_data: true,
        }
    }

    /// Every column: the default set with Vp, the jetting critical angle and every limit's
    /// margin (`--all-columns`).
    pub fn all() -> Self {
        Self {
            impact_velocity: ImpactColumn::Yes,
            jetting_critical_angle: true,
            margins: MarginColumns::All,
            ..Self::default_set()
        }
    }

    /// The row number and the verdict: what a user who needs the verdict alone pays for.
    pub fn verdict_only() -> Self {
        Self {
            row: true,
            verdict: true,
            ..Self::none()
        }
    }

    /// Parse a `--columns` list (names and sets, comma-separated, spaces allowed).
    ///
    /// # Errors
    /// An unknown name (the message lists the known ones), or an empty list.
    pub fn parse(spec: &str) -> Result<Self, String> {
        let mut s = Self::none();
        let mut any = false;
        for name in spec.split(',').map(str::trim) {
            if name.is_empty() {
                continue;
            }
            any = true;
            s.add(name)?;
        }
        if !any {
            return Err(format!("no column named: expected some of {COLUMN_NAMES}"));
        }
        Ok(s)
    }

    fn add(&mut self, name: &str) -> Result<(), String> {
        let set = |s: &mut Self, other: Self| {
            s.row |= other.row;
            s.input |= other.input;
            s.verdict |= other.verdict;
            s.binding |= other.binding;
            s.binding_margin |= other.binding_margin;
            s.binding_margin_unit |= other.binding_margin_unit;
            s.binding_relative_margin |= other.binding_relative_margin;
            s.failing_limits |= other.failing_limits;
            s.impact_velocity = match (s.impact_velocity, other.impact_velocity) {
                (ImpactColumn::Yes, _) | (_, ImpactColumn::Yes) => ImpactColumn::Yes,
                (ImpactColumn::WhenComputed, _) | (_, ImpactColumn::WhenComputed) => {
                    ImpactColumn::WhenComputed
                }
                _ => ImpactColumn::No,
            };
            s.collision_velocity |= other.collision_velocity;
            s.flow_velocity |= other.flow_velocity;
            s.impact_pressure |= other.impact_pressure;
            s.jetting_critical_angle |= other.jetting_critical_angle;
            if other.margins == MarginColumns::All {
                s.margins = MarginColumns::All;
            }
            s.outside_trial_data |= other.outside_trial_data;
        };
        match name {
            "default" => set(self, Self::default_set()),
            "all" => set(self, Self::all()),
            "verdict-only" => set(self, Self::verdict_only()),
            "row" => self.row = true,
            "input" => self.input = true,
            "verdict" => self.verdict = true,
            "binding" => self.binding = true,
            "binding_margin" => self.binding_margin = true,
            "binding_margin_unit" => self.binding_margin_unit = true,
            "binding_relative_margin" => self.binding_relative_margin = true,
            "failing_limits" => self.failing_limits = true,
            "impact_velocity" => self.impact_velocity = ImpactColumn::Yes,
            "collision_velocity" => self.collision_velocity = true,
            "flow_velocity" => self.flow_velocity = true,
            "impact_pressure" => self.impact_pressure = true,
            "jetting_critical_angle" => self.jetting_critical_angle = true,
            "margins" => self.margins = MarginColumns::All,
            "outside_trial_data" => self.outside_trial_data = true,
            m if m.starts_with("margin_") && m.len() > "margin_".len() => match &mut self.margins {
                MarginColumns::All => {}
                MarginColumns::Some(v) => {
                    if !v.iter().any(|x| x == m) {
                        v.push(m.to_string());
                    }
                }
                MarginColumns::None => self.margins = MarginColumns::Some(vec![m.to_string()]),
            },
            other => {
                return Err(format!(
                    "'{other}' is not a column of the map: expected some of {COLUMN_NAMES}"
                ))
            }
        }
        Ok(())
    }

    /// The row number.
    pub fn row(&self) -> bool {
        self.row
    }

    /// The input columns as written.
    pub fn input(&self) -> bool {
        self.input
    }

    /// The verdict.
    pub fn verdict(&self) -> bool {
        self.verdict
    }

    /// The binding limit's id.
    pub fn binding(&self) -> bool {
        self.binding
    }

    /// The binding limit's margin.
    pub fn binding_margin(&self) -> bool {
        self.binding_margin
    }

    /// The unit of the binding limit's margin.
    pub fn binding_margin_unit(&self) -> bool {
        self.binding_margin_unit
    }

    /// The binding limit's relative margin.
    pub fn binding_relative_margin(&self) -> bool {
        self.binding_relative_margin
    }

    /// Every failing limit.
    pub fn failing_limits(&self) -> bool {
        self.failing_limits
    }

    /// Vp, given whether the input holds the collision velocity (Vp computed).
    pub fn impact_velocity(&self, computed: bool) -> bool {
        match self.impact_velocity {
            ImpactColumn::No => false,
            ImpactColumn::Yes => true,
            ImpactColumn::WhenComputed => computed,
        }
    }

    /// Vc.
    pub fn collision_velocity(&self) -> bool {
        self.collision_velocity
    }

    /// Vf.
    pub fn flow_velocity(&self) -> bool {
        self.flow_velocity
    }

    /// The impact pressure.
    pub fn impact_pressure(&self) -> bool {
        self.impact_pressure
    }

    /// The jetting critical angle (when the window's jetting criterion is on).
    pub fn jetting_critical_angle(&self) -> bool {
        self.jetting_critical_angle
    }

    /// Whether the margin of the limit whose column stem is `stem` (`margin_jetting`) is
    /// asked for.
    pub fn margin(&self, stem: &str) -> bool {
        match &self.margins {
            MarginColumns::None => false,
            MarginColumns::All => true,
            MarginColumns::Some(v) => v.iter().any(|m| m == stem),
        }
    }

    /// The margins asked for by name that are not among `stems` (the window's limits).
    pub fn unknown_margins<'s>(&'s self, stems: &[String]) -> Vec<&'s str> {
        match &self.margins {
            MarginColumns::Some(v) => v
                .iter()
                .filter(|m| !stems.contains(m))
                .map(String::as_str)
                .collect(),
            _ => Vec::new(),
        }
    }

    /// `outside_trial_data` (when the window has user boundaries).
    pub fn outside_trial_data(&self) -> bool {
        self.outside_trial_data
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn sets_and_names() {
        assert_eq!(
            ColumnSelection::parse("default"),
            Ok(ColumnSelection::default_set())
        );
        assert_eq!(ColumnSelection::parse(" all "), Ok(ColumnSelection::all()));
        assert_eq!(
            ColumnSelection::parse("verdict-only"),
            Ok(ColumnSelection::verdict_only())
        );
        assert_eq!(
            ColumnSelection::parse("verdict,row"),
            Ok(ColumnSelection::verdict_only())
        );
        let s = ColumnSelection::parse("verdict-only,margin_jetting,margin_jetting").unwrap();
        assert!(s.margin("margin_jetting") && !s.margin("margin_deribas_lower"));
        assert_eq!(
            s.unknown_margins(&["margin_jetting".into()]),
            Vec::<&str>::new()
        );
        let s = ColumnSelection::parse("margin_x,margins").unwrap();
        assert!(s.margin("margin_deribas_lower"));
        let d = ColumnSelection::parse("default").unwrap();
        assert!(d.impact_velocity(true) && !d.impact_velocity(false));
        assert!(ColumnSelection::parse("default,impact_velocity")
            .unwrap()
            .impact_velocity(false));
        assert!(ColumnSelection::parse("").is_err());
        assert!(ColumnSelection::parse(" , ").is_err());
        let e = ColumnSelection::parse("row,verdicts").unwrap_err();
        assert!(
            e.contains("'verdicts'") && e.contains("verdict-only"),
            "{e}"
        );
        assert!(ColumnSelection::parse("margin_").is_err());
    }
}
