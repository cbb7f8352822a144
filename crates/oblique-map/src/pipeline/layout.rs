//! What the workers share: the output's computed columns and every piece of output text that
//! can be made once (escaped ids, padded words, the failing-limits texts, the CSV plan).

use crate::classifier::{Classifier, LimitInfo, MarginUnit, VelocityKind};
use crate::format::{push_csv_field, push_json_string, Word, NUMBER_MAX, WORD};
use crate::input::{Header, PlainRow};
use crate::options::{BadRows, ColumnSelection, Format};
use oblique_window::classify::Prediction;

/// Everything the workers share.
pub struct Ctx<'a> {
    /// Input as shown in messages.
    pub file: &'a str,
    /// Input layout.
    pub in_format: Format,
    /// Output layout.
    pub out_format: Format,
    /// The header.
    pub header: &'a Header,
    /// The classifier.
    pub classifier: &'a Classifier,
    /// Bad-row policy.
    pub policy: BadRows,
    /// Whether the map has the row number.
    pub row: bool,
    /// Whether the map has the input cells.
    pub input: bool,
    /// Output names of the input cells (renamed when they clash with computed columns).
    pub out_cells: Vec<String>,
    /// JSON keys of the input cells, `"name":` ready to copy.
    pub json_cell_keys: Vec<Vec<u8>>,
    /// Role (0 position, 1 velocity, 2 angle, 3 time) of each input cell.
    pub cell_role: Vec<Option<usize>>,
    /// Binding limit ids (criterion id or `boundary-N`), CSV-escaped and as JSON strings.
    pub binding_csv: Vec<Vec<u8>>,
    /// See `binding_csv`.
    pub binding_json: Vec<Vec<u8>>,
    /// Computed column names (with units), in order.
    pub computed: Vec<String>,
    /// Computed column kinds, in order.
    pub cols: Vec<Col>,
    /// JSON keys of the computed columns.
    pub computed_keys: Vec<Vec<u8>>,
    /// Most bytes of a CSV row besides the input line: row number, separators, every
    /// computed column at its widest, line break.
    pub row_bound: usize,
    /// The computed CSV columns as straight-line writes.
    pub csv_plan: CsvPlan,
    /// The output unit of each limit's margin (for the binding margin).
    pub margin_units: Vec<MarginUnit>,
    /// `,m/s`, `,deg`, `,GPa` (in `MarginUnit` order), padded.
    pub unit_words: Vec<Word>,
    /// For a window of at most eight limits, the `failing_limits` text of every failing set,
    /// indexed by its bit mask (`Point::failing`); empty otherwise.
    pub failing_texts: Vec<Vec<u8>>,
    /// `,verdict` for each verdict (in `Prediction::ALL` order), padded.
    pub verdict_words: Vec<Word>,
    /// Binding limit ids as CSV fields, padded (`None` if one is too long to pad).
    pub binding_words: Option<Vec<Word>>,
    /// `,true` and `,false`, padded.
    pub outside_words: Vec<Word>,
    /// The one-pass reader of plain CSV records, when the input and the map are both CSV (a
    /// JSON-lines map needs every field's range).
    pub plain_row: Option<PlainRow>,
}

/// One computed output column.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Col {
    /// welded / not-welded / melted.
    Verdict,
    /// Label of the binding limit.
    Binding,
    /// Impact velocity Vp, m/s.
    ImpactVelocity,
    /// Collision-point velocity Vc, m/s.
    CollisionVelocity,
    /// Flow velocity Vf, m/s.
    FlowVelocity,
    /// Impact pressure, GPa.
    Pressure,
    /// Jetting critical angle, deg.
    JettingAngle,
    /// Margin of the binding limit, in that limit's output unit (see `MarginUnit`).
    BindingMargin,
    /// The unit of `BindingMargin`.
    BindingUnit,
    /// Relative margin of the binding limit.
    BindingRelative,
    /// Every failing limit.
    Failing,
    /// Margin of limit k, in its output unit.
    Margin(usize, MarginUnit),
    /// Outside the span of a user boundary.
    Outside,
}

/// The output unit of each limit's margin.
pub fn margin_units(c: &Classifier) -> Vec<MarginUnit> {
    c.limits.iter().map(LimitInfo::margin_unit).collect()
}

/// The computed columns for a classifier and a column selection, in the map's order: names
/// (with units) and kinds. The default set has the verdict, the binding limit with its margin
/// (in that limit's unit), unit and relative margin, every failing limit, Vc, Vf and the impact
/// pressure (and Vp for collision-velocity input); every set has the jetting critical angle only
/// when jetting is on and `outside_trial_data` only when the window has boundaries.
pub fn computed_columns(c: &Classifier, sel: &ColumnSelection) -> (Vec<String>, Vec<Col>) {
    let mut out: Vec<(String, Col)> = Vec::new();
    let mut push = |on: bool, name: &str, col: Col| {
        if on {
            out.push((name.to_string(), col));
        }
    };
    push(sel.verdict(), "verdict", Col::Verdict);
    push(sel.binding(), "binding", Col::Binding);
    push(sel.binding_margin(), "binding_margin", Col::BindingMargin);
    push(
        sel.binding_margin_unit(),
        "binding_margin_unit",
        Col::BindingUnit,
    );
    push(
        sel.binding_relative_margin(),
        "binding_relative_margin",
        Col::BindingRelative,
    );
    push(sel.failing_limits(), "failing_limits", Col::Failing);
    push(
        sel.impact_velocity(c.kind() == VelocityKind::Collision),
        "impact_velocity[m/s]",
        Col::ImpactVelocity,
    );
    push(
        sel.collision_velocity(),
        "collision_velocity[m/s]",
        Col::CollisionVelocity,
    );
    push(sel.flow_velocity(), "flow_velocity[m/s]", Col::FlowVelocity);
    push(sel.impact_pressure(), "impact_pressure[GPa]", Col::Pressure);
    push(
        sel.jetting_critical_angle() && c.jetting_enabled(),
        "jetting_critical_angle[deg]",
        Col::JettingAngle,
    );
    for (k, (l, mu)) in c.limits.iter().zip(margin_units(c)).enumerate() {
        push(sel.margin(&l.column), &l.map_column(), Col::Margin(k, mu));
    }
    push(
        sel.outside_trial_data() && c.has_boundaries(),
        "outside_trial_data",
        Col::Outside,
    );
    out.into_iter().unzip()
}

/// The computed CSV columns as a straight line of writes, each behind its own (well
/// predicted) test, in the order [`computed_columns`] lays them out. (A loop over the columns
/// with a match lets the compiler hoist and run every number conversion any column might need,
/// on every row, needed or not.)
#[derive(Debug, Clone, Default, PartialEq)]
pub struct CsvPlan {
    pub(crate) verdict: bool,
    pub(crate) binding: bool,
    pub(crate) binding_margin: bool,
    pub(crate) binding_unit: bool,
    pub(crate) binding_relative: bool,
    pub(crate) failing: bool,
    /// Write Vp.
    pub(crate) vp: bool,
    pub(crate) vc: bool,
    pub(crate) vf: bool,
    pub(crate) pressure: bool,
    /// Write the jetting critical angle.
    pub(crate) jetting: bool,
    /// Write these limits' margins, in these units.
    pub(crate) margins: Vec<(usize, MarginUnit)>,
    /// Write `outside_trial_data`.
    pub(crate) outside: bool,
}

impl CsvPlan {
    fn new(cols: &[Col]) -> Self {
        let mut plan = Self::default();
        for c in cols {
            match *c {
                Col::Verdict => plan.verdict = true,
                Col::Binding => plan.binding = true,
                Col::BindingMargin => plan.binding_margin = true,
                Col::BindingUnit => plan.binding_unit = true,
                Col::BindingRelative => plan.binding_relative = true,
                Col::Failing => plan.failing = true,
                Col::ImpactVelocity => plan.vp = true,
                Col::CollisionVelocity => plan.vc = true,
                Col::FlowVelocity => plan.vf = true,
                Col::Pressure => plan.pressure = true,
                Col::JettingAngle => plan.jetting = true,
                Col::Margin(k, u) => plan.margins.push((k, u)),
                Col::Outside => plan.outside = true,
            }
        }
        plan
    }

    /// The columns this plan writes, in its order (checked against `computed_columns`).
    fn columns(&self) -> Vec<Col> {
        let mut v = Vec::new();
        for (on, c) in [
            (self.verdict, Col::Verdict),
            (self.binding, Col::Binding),
            (self.binding_margin, Col::BindingMargin),
            (self.binding_unit, Col::BindingUnit),
            (self.binding_relative, Col::BindingRelative),
            (self.failing, Col::Failing),
            (self.vp, Col::ImpactVelocity),
            (self.vc, Col::CollisionVelocity),
            (self.vf, Col::FlowVelocity),
            (self.pressure, Col::Pressure),
            (self.jetting, Col::JettingAngle),
        ] {
            if on {
                v.push(c);
            }
        }
        v.extend(self.margins.iter().map(|&(k, u)| Col::Margin(k, u)));
        if self.outside {
            v.push(Col::Outside);
        }
        v
    }
}

impl<'a> Ctx<'a> {
    /// Precompute the output pieces.
    pub fn new(
        file: &'a str,
        in_format: Format,
        out_format: Format,
        header: &'a Header,
        classifier: &'a Classifier,
        policy: BadRows,
        sel: &ColumnSelection,
    ) -> Self {
        let (computed, cols) = computed_columns(classifier, sel);
        let taken: Vec<&str> = std::iter::once("row")
            .chain(computed.iter().map(String::as_str))
            .collect();
        let out_cells: Vec<String> = header
            .cells
            .iter()
            .map(|c| {
                if taken.contains(&c.trim()) {
                    format!("input_{}", c.trim())
                } else {
                    c.clone()
                }
            })
            .collect();
        let key = |s: &str| {
            let mut v = Vec::new();
            push_json_string(&mut v, s.as_bytes());
            v.push(b':');
            v
        };
        let mut cell_role = vec![None; header.cells.len()];
        for (r, col) in [
            Some(&header.position),
            Some(&header.velocity),
            Some(&header.angle),
            header.time.as_ref(),
        ]
        .into_iter()
        .enumerate()
        {
            if let Some(col) = col {
                cell_role[col.index] = Some(r);
            }
        }
        // The binding limit ids, escaped once for each output layout.
        let ids = |escape: fn(&mut Vec<u8>, &[u8])| -> Vec<Vec<u8>> {
            classifier
                .limits
                .iter()
                .map(|l| {
                    let mut v = Vec::new();
                    escape(&mut v, l.id.as_bytes());
                    v
                })
                .collect()
        };
        let binding_csv = ids(push_csv_field);
        let binding_json = ids(push_json_string);
        let binding_max = binding_csv.iter().map(Vec::len).max().unwrap_or(0);
        // Short constants: they always fit a word.
        let verdict_words: Vec<Word> = Prediction::ALL
            .iter()
            .filter_map(|v| Word::new(format!(",{}", v.as_str()).as_bytes()))
            .collect();
        let outside_words: Vec<Word> = [b",true".as_slice(), b",false"]
            .iter()
            .filter_map(|t| Word::new(t))
            .collect();
        let binding_words: Option<Vec<Word>> = binding_csv.iter().map(|b| Word::new(b)).collect();
        let row_bound = WORD * 4
            + NUMBER_MAX
            + 2
            + cols
                .iter()
                .map(|c| {
                    1 + match c {
                        Col::Verdict => 16,
                        Col::Binding => binding_max,
                        // Every limit's id and a separator (the word stores' overrun is in
                        // the `WORD * 4` above).
                        Col::Failing => binding_csv.iter().map(|b| b.len() + 1).sum::<usize>(),
                        Col::Outside => 5,
                        _ => NUMBER_MAX,
                    }
                })
                .sum::<usize>();
        let csv_plan = CsvPlan::new(&cols);
        assert_eq!(
            csv_plan.columns(),
            cols,
            "the CSV plan must write the columns in header order"
        );
        let failing_texts = if binding_csv.len() <= 8 {
            (0..1usize << binding_csv.len())
                .map(|mask| {
                    let ids: Vec<&[u8]> = (0..binding_csv.len())
                        .filter(|k| mask & (1 << k) != 0)
                        .map(|k| binding_csv[k].as_slice())
                        .collect();
                    ids.join(&b';')
                })
                .collect()
        } else {
            Vec::new()
        };
        Self {
            plain_row: (in_format == Format::Csv && out_format == Format::Csv)
                .then(|| PlainRow::new(header)),
            failing_texts,
            margin_units: margin_units(classifier),
            unit_words: [
                MarginUnit::MetresPerSecond,
                MarginUnit::Degrees,
                MarginUnit::Gigapascals,
            ]
            .iter()
            .filter_map(|u| Word::new(format!(",{}", u.as_str()).as_bytes()))
            .collect(),
            verdict_words,
            binding_words,
            row: sel.row(),
            input: sel.input(),
            outside_words,
            csv_plan,
            row_bound,
            file,
            in_format,
            out_format,
            header,
            classifier,
            policy,
            json_cell_keys: out_cells.iter().map(|c| key(c)).collect(),
            out_cells,
            cell_role,
            binding_csv,
            binding_json,
            computed_keys: computed.iter().map(|c| key(c)).collect(),
            computed,
            cols,
        }
    }

    /// Line breaks per chunk: [`super::CHUNK_LINES`], or fewer when the output's rows are wide,
    /// so that a chunk's output stays about [`super::CHUNK_OUTPUT`] (an estimate per row: an
    /// input line of 64 bytes where it is passed through, 16 bytes a computed value, the keys
    /// of JSON lines).
    pub fn chunk_lines(&self) -> usize {
        let values = self.cols.len() + usize::from(self.row);
        let mut row = 16 * values + 2;
        if self.input {
            row += 64;
        }
        if self.out_format == Format::Jsonl {
            row += self.computed_keys.iter().map(Vec::len).sum::<usize>() + 8;
            if self.input {
                row += self
                    .json_cell_keys
                    .iter()
                    .map(|k| k.len() + 16)
                    .sum::<usize>();
            }
        }
        (super::CHUNK_OUTPUT / row).clamp(256, super::CHUNK_LINES)
    }

    /// The output header line (CSV only; JSON lines have none).
    pub fn csv_header(&self) -> Vec<u8> {
        let mut v = Vec::new();
        let row = self.row.then_some("row");
        let cells = self.out_cells.iter().filter(|_| self.input);
        for (i, c) in row
            .into_iter()
            .chain(cells.chain(&self.computed).map(String::as_str))
            .enumerate()
        {
            if i > 0 {
                v.push(b',');
            }
            push_csv_field(&mut v, c.as_bytes());
        }
        v.push(b'\n');
        v
    }

    /// The side-file header for bad rows (CSV input only).
    pub fn bad_header(&self) -> Vec<u8> {
        let mut v = b"row,field,reason".to_vec();
        for c in &self.header.cells {
            v.push(b',');
            push_csv_field(&mut v, c.as_bytes());
        }
        v.push(b'\n');
        v
    }
}
