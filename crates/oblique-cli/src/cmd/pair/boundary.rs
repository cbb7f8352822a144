//! `oblique pair boundary add` and `remove`: a user boundary from the command line, or out of
//! the file, through the safe-write path (validated with the whole file, under the folder's
//! lock, every other byte kept).

use super::*;

/// How a boundary's side is given.
#[derive(Debug, Clone, Copy, PartialEq, Eq, ValueEnum)]
pub enum SideArg {
    /// Welds at larger velocities (right of the line).
    Right,
    /// Welds at smaller velocities.
    Left,
    /// Welds at larger angles (above the line).
    Above,
    /// Welds at smaller angles.
    Below,
}

/// The plane a boundary is drawn in.
#[derive(Debug, Clone, Copy, PartialEq, Eq, ValueEnum)]
pub enum PlaneArg {
    /// Angle against the impact velocity Vp (in the pair's convention).
    AngleImpactVelocity,
    /// Angle against the collision-point velocity Vc.
    AngleCollisionVelocity,
}

/// Subcommands of `oblique pair boundary`.
#[derive(Debug, Subcommand)]
pub enum BoundaryCommand {
    /// Add a user boundary (a line drawn through trials) to a pair window.
    #[command(after_help = "Example:
  oblique --library ./shop pair boundary add al-on-cu --label \"lowest welding velocity (series S-11)\" \\
      --plane angle-impact-velocity --point 395m/s,5deg --point 372m/s,12deg --point 365m/s,18deg \\
      --weld-side right --provenance \"drawn between the welded and not-welded shots of S-11\"
The points are velocity,angle pairs along the line, in the plane's velocity (Vp in the pair's
convention, or Vc); the side is where welds lie. The file keeps every other byte.")]
    Add(BoundaryAddArgs),
    /// Remove a user boundary, named by its label, from a pair window (the removed text is
    /// printed, so it can be added back; every other byte of the file is kept).
    #[command(after_help = "Example:
  oblique --library ./shop pair boundary remove al-on-cu --label \"lowest welding velocity (series S-11)\"")]
    Remove(BoundaryRemoveArgs),
}

/// Flags of `oblique pair boundary remove`.
#[derive(Debug, Args)]
pub struct BoundaryRemoveArgs {
    /// Pair name.
    pub name: String,
    /// The boundary's label (`oblique pair show NAME` lists them).
    #[arg(long, value_name = "TEXT")]
    pub label: String,
    /// Refuse to write unless the file still has this SHA-256 (from `pair show --json`).
    #[arg(long = "if-unchanged", value_name = "SHA256", value_parser = crate::qarg::sha256)]
    pub if_unchanged: Option<String>,
    /// Print JSON.
    #[arg(long)]
    pub json: bool,
}

/// Flags of `oblique pair boundary add`.
#[derive(Debug, Args)]
pub struct BoundaryAddArgs {
    /// Pair name.
    pub name: String,
    /// What the line is, e.g. "lowest welding velocity (series S-11)".
    #[arg(long, value_name = "TEXT", value_parser = crate::qarg::one_line_text)]
    pub label: String,
    /// The plane the points are in.
    #[arg(long, value_enum, ignore_case = true)]
    pub plane: PlaneArg,
    /// A point of the line, VELOCITY,ANGLE (at least two; repeat the flag).
    #[arg(long = "point", value_name = "V,ANGLE", required = true, allow_hyphen_values = true, value_parser = qarg::point)]
    pub points: Vec<(f64, f64)>,
    /// Where welds lie relative to the line.
    #[arg(long = "weld-side", alias = "welds", value_enum, ignore_case = true)]
    pub weld_side: SideArg,
    /// Who drew the line, from which trials or paper.
    #[arg(long, alias = "source", value_name = "TEXT", value_parser = crate::qarg::one_line_text)]
    pub provenance: String,
    /// Refuse to write unless the file still has this SHA-256 (from `pair show --json`).
    #[arg(long = "if-unchanged", value_name = "SHA256", value_parser = crate::qarg::sha256)]
    pub if_unchanged: Option<String>,
    /// Print JSON.
    #[arg(long)]
    pub json: bool,
}

/// Run `oblique pair boundary ...`.
pub(super) fn run_boundary(dirs: &[PathBuf], c: BoundaryCommand) -> CmdResult {
    let a = match c {
        BoundaryCommand::Add(a) => a,
        BoundaryCommand::Remove(r) => return remove(dirs, r),
    };
    let lib = load_library(dirs)?;
    let w = lib.pair(&a.name).map_err(Fail::input)?;
    let path = user_file(w)?;
    if a.points.len() < 2 {
        return Err(Fail::input("--point: a boundary needs at least two points"));
    }
    if a.label.trim().is_empty() {
        return Err(Fail::input(
            "--label is empty: say what the line is, e.g. --label \"lowest welding velocity (series S-11)\"",
        ));
    }
    if a.provenance.trim().is_empty() {
        return Err(Fail::input(
            "--provenance is empty: say where the line comes from (who drew it, from which trials)",
        ));
    }
    let entry = oblique_window::pair::BoundaryEntry {
        label: a.label.clone(),
        plane: match a.plane {
            PlaneArg::AngleImpactVelocity => "angle-impact-velocity",
            PlaneArg::AngleCollisionVelocity => "angle-collision-velocity",
        }
        .into(),
        weld_side: match a.weld_side {
            SideArg::Right => "right",
            SideArg::Left => "left",
            SideArg::Above => "above",
            SideArg::Below => "below",
        }
        .into(),
        points: a
            .points
            .iter()
            .map(|(v, ang)| {
                (
                    format!("{v} m/s"),
                    format!("{} deg", round_deg(ang.to_degrees())),
                )
            })
            .collect(),
        provenance: a.provenance.clone(),
    };
    note_target(&path);
    let updated = oblique_window::write::append_boundary(
        &path,
        &entry,
        &lib.materials,
        a.if_unchanged.as_deref(),
    )
    .map_err(write_fail)?;
    let agr = agreement(&updated)?;
    if a.json {
        return emit_json(&json!({
            "name": updated.name,
            "file": path.display().to_string(),
            "boundaries": updated.boundaries.len(),
            "agreement": {"observations": agr.observations, "agreeing": agr.agreeing},
            "sha256": updated.origin.sha256,
        }));
    }
    emit(&format!(
        "added boundary \"{}\" to '{}' ({}); it now has {} boundary(ies)\nagreement with its {} trial(s) now: {} agree\n",
        entry.label,
        updated.name,
        path.display(),
        updated.boundaries.len(),
        agr.observations,
        agr.agreeing
    ))
}

/// `pair boundary remove`: the boundary with that label out of the file.
fn remove(dirs: &[PathBuf], r: BoundaryRemoveArgs) -> CmdResult {
    let lib = load_library(dirs)?;
    let w = lib.pair(&r.name).map_err(Fail::input)?;
    let path = user_file(w)?;
    if !w.boundaries.iter().any(|b| b.label == r.label.trim()) {
        let labels: Vec<String> = w
            .boundaries
            .iter()
            .map(|b| format!("\"{}\"", oblique_window::text::one_line(&b.label)))
            .collect();
        return Err(Fail::input(format!(
            "--label: pair '{}' has no boundary labelled \"{}\"; its boundaries: {}",
            w.name,
            oblique_window::text::one_line(&r.label),
            if labels.is_empty() {
                "none".to_string()
            } else {
                labels.join(", ")
            }
        )));
    }
    // The label is looked up again under the folder's lock (other writers may append meanwhile).
    note_target(&path);
    let (updated, cut) = oblique_window::write::remove_boundary(
        &path,
        r.label.trim(),
        &lib.materials,
        r.if_unchanged.as_deref(),
    )
    .map_err(write_fail)?;
    let agr = agreement(&updated)?;
    if r.json {
        return emit_json(&json!({
            "name": updated.name,
            "file": path.display().to_string(),
            "removed": r.label.trim(),
            "removed_text": cut,
            "boundaries": updated.boundaries.len(),
            "agreement": {"observations": agr.observations, "agreeing": agr.agreeing},
            "sha256": updated.origin.sha256,
        }));
    }
    emit(&format!(
        "removed boundary \"{}\" from '{}' ({}); it now has {} boundary(ies)\nagreement with its {} trial(s) now: {} agree\nthe removed text (to add it back, paste it into the boundaries list):\n{}",
        oblique_window::text::one_line(r.label.trim()),
        updated.name,
        path.display(),
        updated.boundaries.len(),
        agr.observations,
        agr.agreeing,
        cut
    ))
}
