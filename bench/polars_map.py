#!/usr/bin/env python3
"""Columnar-dataframe weld map in Python (polars), for benchmarking `oblique map` side by side.

The same classification as `oblique map` and bench/reference_map.py, written the way a careful,
data-minded engineer would with the polars dataframe library: a lazy CSV scan (only the columns
the output needs are parsed), every relation as a polars expression, the query run by polars'
streaming engine into a CSV sink, and the summary from the same lazy query. Only the jetting
critical angle comes from numpy: the shock-polar table and its direct re-solve near the limit
are reference_map.py's `JetTable` (imported, not copied), applied batch by batch.

The pair window comes from `oblique pair show NAME --json`, as for reference_map.py. Relations,
table and tolerances: see reference_map.py and docs/weld-map.md.

Usage:
  polars_map.py INPUT.csv WINDOW.json -o OUT.csv [--summary-json FILE] [--columns SET]
                [--all-columns]

--columns takes the column sets of `oblique map --columns`: `default` (the row number, the input
as written, verdict, binding limit with its margin, unit and relative margin, failing limits,
Vc, Vf, impact pressure, outside_trial_data), `all` (also Vp, the jetting critical angle and
every limit's margin), `verdict-only` (the row number and the verdict), or a comma-separated list of
the column names in docs/weld-map.md. Row numbers count lines as the tool does (header = row 1)
for an input without comment or blank lines, which is what bench/gen_interface.py writes.
Numbers are rounded to the tool's decimals; polars writes them in their shortest form
(`-4.18`, where the tool writes `-4.180`).
"""

import argparse
import json
import math
import os
import resource
import sys
import time

import numpy as np
import polars as pl

sys.path.insert(0, os.path.dirname(os.path.abspath(__file__)))
from reference_map import UNITS, Hug, JetTable, find_column  # noqa: E402

PRESETS = {
    "verdict-only": ["row", "verdict"],
    "default": [
        "row", "input", "verdict", "binding", "binding_margin", "binding_margin_unit",
        "binding_relative_margin", "failing_limits", "collision_velocity", "flow_velocity",
        "impact_pressure", "outside_trial_data",
    ],
}
PRESETS["all"] = PRESETS["default"] + ["impact_velocity", "jetting_critical_angle", "margins"]
ORDER = [
    "row", "input", "verdict", "binding", "binding_margin", "binding_margin_unit",
    "binding_relative_margin", "failing_limits", "impact_velocity", "collision_velocity",
    "flow_velocity", "impact_pressure", "jetting_critical_angle", "margins", "outside_trial_data",
]


def column_set(spec):
    want = set()
    for tok in spec.split(","):
        tok = tok.strip()
        if tok in PRESETS:
            want.update(PRESETS[tok])
        elif tok in ORDER or tok.startswith("margin_"):
            want.add(tok)
        else:
            sys.exit(f"--columns: unknown column '{tok}'")
    return want


def relative(margin, limit):
    """margin / |limit|, +-inf for a zero limit by the margin's sign, +inf for 0 / 0 (as the
    Rust crates: a margin >= 0 over a zero limit is +inf); null (no margin) stays null."""
    return (margin / limit.abs()).fill_nan(float("inf"))


def interp_in_span(x, xs, ys):
    """Linear interpolation inside the span only (null outside), segment by segment as the Rust
    crates do (y0 + (y1 - y0) (x - x0) / (x1 - x0) on the segment found by a left search)."""
    inside = (x >= xs[0]) & (x <= xs[-1])
    # The first segment whose right end is >= x (a left search) holds x.
    chain = None
    for k in range(len(xs) - 1, 0, -1):
        x0, x1, y0, y1 = xs[k - 1], xs[k], ys[k - 1], ys[k]
        seg = pl.lit(y0) if x1 == x0 else y0 + (y1 - y0) * (x - x0) / (x1 - x0)
        chain = seg if chain is None else pl.when(x <= x1).then(seg).otherwise(chain)
    return pl.when(inside).then(chain).otherwise(None)


def main(argv):
    ap = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    ap.add_argument("input")
    ap.add_argument("window")
    ap.add_argument("-o", "--output", required=True)
    ap.add_argument("--summary-json")
    ap.add_argument("--columns", default="default")
    ap.add_argument("--all-columns", action="store_true", help="the same as --columns all")
    a = ap.parse_args(argv)
    t0 = time.perf_counter()
    want = column_set("all" if a.all_columns else a.columns)
    w = json.load(open(a.window))
    F, P = w["flyer_material"], w["parent_material"]
    hf, hp = Hug(F), Hug(P)
    crit = w["criteria"]
    conv = w["convention"]
    h = w["flyer_thickness_m"]

    # The header decides the columns and their units; every cell is read as text, so that
    # the input goes to the map as written, and the three mapped columns are cast to numbers.
    header = pl.scan_csv(a.input, infer_schema=False, n_rows=0).collect_schema().names()
    pos_col, pos_f = find_column(header, "position", "length")
    vel_col, vel_f = find_column(header, "velocity", "velocity")
    ang_col, ang_f = find_column(header, "angle", "angle")
    lf = pl.scan_csv(
        a.input, schema_overrides={c: pl.Float64 for c in (pos_col, vel_col, ang_col)}
    ).with_row_index("row", offset=2)

    def number(col, factor):
        return pl.col(col) * factor

    vp = pl.col("_vp")
    beta = pl.col("_beta")
    deg = pl.col("_deg")
    lf = lf.with_columns(
        number(pos_col, pos_f).alias("_pos"),
        number(vel_col, vel_f).alias("_vp"),
        number(ang_col, ang_f).alias("_beta"),
    ).with_columns((pl.col("_beta") * (180.0 / math.pi)).alias("_deg"))

    # Kinematics (the window's convention).
    if conv == "bisector":
        vc = vp / (2.0 * (beta / 2.0).sin())
        vf = vc
    elif conv == "normal-to-flyer":
        vc = vp / beta.sin()
        vf = vc * beta.cos()
    else:
        vc = vp / beta.tan()
        vf = vc / beta.cos()
    lf = lf.with_columns(vc.alias("_vc")).with_columns(
        (vf if conv != "bisector" else pl.col("_vc")).alias("_vf")
    )
    vc, vf = pl.col("_vc"), pl.col("_vf")

    # 1-D impedance matching.
    r1, c1, s1 = hf.rho, hf.c0, hf.s
    r2, c2, s2 = hp.rho, hp.c0, hp.s
    qa = r2 * s2 - r1 * s1
    qb = r1 * c1 + r2 * c2 + 2.0 * r1 * s1 * vp
    qc = r1 * (c1 * vp + s1 * vp * vp)
    u2 = 2.0 * qc / (qb + (qb * qb + 4.0 * qa * qc).sqrt())
    lf = lf.with_columns((r2 * (c2 + s2 * u2) * u2).alias("_p"))
    pressure = pl.col("_p")

    # Jetting: numpy's table (reference_map.py) batch by batch, elementwise, so it streams.
    table = JetTable(hf, hp) if crit["jetting_enabled"] else None

    def jet(s):
        f = s.struct.unnest()
        c, d = table.critical(f["_vf"].to_numpy(), f["_vc"].to_numpy(), f["_deg"].to_numpy())
        return pl.DataFrame({"crit": np.degrees(c), "direct": d}).to_struct()

    if table is not None:
        lf = lf.with_columns(
            pl.struct("_vf", "_vc", "_deg")
            .map_batches(
                jet,
                return_dtype=pl.Struct({"crit": pl.Float64, "direct": pl.Boolean}),
                is_elementwise=True,
            )
            .alias("_jet")
        ).with_columns(
            pl.col("_jet").struct.field("crit").alias("_jc"),
            pl.col("_jet").struct.field("direct").alias("_jd"),
        )

    # Limits: (id, column, margin, limit, satisfied, ceiling, factor, decimals), in the
    # window's order.
    limits = []

    def add(name, col, margin, limit, sat, ceiling, factor, dec):
        limits.append((name, col, margin, limit, sat, ceiling, factor, dec))

    if crit["deribas_enabled"]:
        k = crit["deribas_k"]
        cf = k * math.sqrt(F["vickers_hardness_pa"] / hf.rho)
        cp = k * math.sqrt(P["vickers_hardness_pa"] / hp.rho)
        lim = (max(cf, cp) / vc) * (180.0 / math.pi)
        add("deribas-lower", "margin_deribas_lower[deg]", deg - lim, lim, deg >= lim, False, 1.0, 3)
    if crit["strength_enabled"]:
        lim = max(
            math.sqrt(F["tensile_strength_pa"] / hf.rho), math.sqrt(P["tensile_strength_pa"] / hp.rho)
        )
        add("strength-lower", "margin_strength_lower[m/s]", vp - lim, pl.lit(lim), vp >= lim, False, 1.0, 1)
    if crit["pressure_enabled"]:
        m = crit["hel_multiple"]

        def hel(M):
            return 0.5 * (M["bulk_modulus_pa"] / M["shear_modulus_pa"] + 4.0 / 3.0) * M["yield_strength_pa"]

        lim = max(m * hel(F), m * hel(P))
        add("pressure-lower", "margin_pressure_lower[GPa]", pressure - lim, pl.lit(lim), pressure >= lim, False, 1e-9, 3)
    if crit["melting_enabled"]:
        n_w = crit["wittman_n"]

        def coeff(M, H):
            diff = (M["thermal_conductivity_w_m_k"] * M["specific_heat_j_kg_k"] * H.c0 / (H.rho * h)) ** 0.25
            lead = math.sqrt(M["melting_temperature_k"] * H.c0) if crit["wittman_form"] == "a" else math.sqrt(M["melting_temperature_k"])
            return lead * diff / n_w

        cm = min(coeff(F, hf), coeff(P, hp))
        lim = cm / vc if crit["wittman_form"] == "a" else cm / vc.sqrt()
        add("melting-upper", "margin_melting_upper[m/s]", lim - vp, lim, vp <= lim, True, 1.0, 1)
    if table is not None:
        lim = pl.col("_jc")
        add("jetting", "margin_jetting[deg]", deg - lim, lim, deg > lim, False, 1.0, 3)
    for i, b in enumerate(w["boundary_list"]):
        x = vp if b["plane"] == "angle-impact-velocity" else vc
        side = b["weld_side"]
        vs = [p["velocity_m_s"] for p in b["points"]]
        # Degrees through radians and back, as the window crate stores angles.
        an = [math.degrees(p["angle_deg"] * (math.pi / 180.0)) for p in b["points"]]
        if side in ("above", "below"):
            lim = interp_in_span(x, vs, an)
            margin = deg - lim if side == "above" else lim - deg
            unit, dec = "deg", 3
        else:
            lim = interp_in_span(deg, an, vs)
            margin = x - lim if side == "right" else lim - x
            unit, dec = "m/s", 1
        # Outside the span: no margin (null), satisfied, not considered for the binding limit.
        add(f"boundary-{i + 1}", f"margin_boundary_{i + 1}[{unit}]", margin, lim, (margin >= 0).fill_null(True), side == "left", 1.0, dec)

    # Every limit's margin and relative margin as columns, then the verdict and binding limit.
    n = len(limits)
    lf = lf.with_columns(
        *[l[2].alias(f"_m{k}") for k, l in enumerate(limits)],
        *[relative(l[2], l[3]).fill_null(float("inf")).alias(f"_r{k}") for k, l in enumerate(limits)],
        *[l[4].alias(f"_s{k}") for k, l in enumerate(limits)],
    )
    rel = [pl.col(f"_r{k}") for k in range(n)]
    sat = [pl.col(f"_s{k}") for k in range(n)]
    # The failing limits as one bit mask per row: the verdict, and the failing-limits text of
    # every combination made once and looked up.
    ceilings = sum(1 << k for k, l in enumerate(limits) if l[5])
    code = pl.sum_horizontal([(~s).cast(pl.UInt32) * (1 << k) for k, s in enumerate(sat)]) if n else pl.lit(0)
    lf = lf.with_columns(code.cast(pl.UInt32).alias("_code"))
    code = pl.col("_code")
    # Welded when nothing fails, melted when only velocity ceilings do, else not welded.
    verdict = pl.when(code == 0).then(0).when((code & (((1 << n) - 1) ^ ceilings)) == 0).then(2).otherwise(1)
    lf = lf.with_columns(verdict.cast(pl.UInt8).alias("_v"))
    # The binding limit: the first with the smallest relative margin; its margin in its own
    # unit (rounded to its decimals) and its relative margin.
    if n:
        rmin = pl.min_horizontal(rel)
        first = pl.when(rel[0] == rmin).then(pl.lit(0, pl.UInt8))
        for k in range(1, n):
            first = first.when(rel[k] == rmin).then(pl.lit(k, pl.UInt8))
        lf = lf.with_columns(first.alias("_b"), rmin.alias("_br"))
        b = pl.col("_b")
        bm = pl.when(b == 0).then((pl.col("_m0") * limits[0][6]).round(limits[0][7]))
        for k in range(1, n):
            bm = bm.when(b == k).then((pl.col(f"_m{k}") * limits[k][6]).round(limits[k][7]))
        lf = lf.with_columns(bm.alias("_bm"))
    b = pl.col("_b")
    ids = list(range(n))

    out = []
    if "row" in want:
        out.append(pl.col("row"))
    if "input" in want:
        out += [pl.col(c) for c in header]
    if "verdict" in want:
        names = ["welded", "not-welded", "melted"]
        out.append(pl.col("_v").replace_strict([0, 1, 2], names, return_dtype=pl.Enum(names)).alias("verdict"))
    if "binding" in want:
        names = [l[0] for l in limits]
        out.append(b.replace_strict(ids, names, default=None, return_dtype=pl.Enum(names)).alias("binding"))
    if "binding_margin" in want:
        out.append(pl.col("_bm").alias("binding_margin"))
    if "binding_margin_unit" in want:
        units = [l[1].split("[")[1].rstrip("]") for l in limits]
        out.append(b.replace_strict(ids, units, default=None, return_dtype=pl.Enum(sorted(set(units)))).alias("binding_margin_unit"))
    if "binding_relative_margin" in want:
        out.append(pl.col("_br").round(4).alias("binding_relative_margin"))
    if "failing_limits" in want:
        combos = list(range(1 << n))
        texts = [";".join(l[0] for k, l in enumerate(limits) if (c >> k) & 1) for c in combos]
        out.append(code.replace_strict(combos, texts, return_dtype=pl.Enum(sorted(set(texts)))).alias("failing_limits"))
    if "impact_velocity" in want:
        out.append(vp.round(1).alias("impact_velocity[m/s]"))
    if "collision_velocity" in want:
        out.append(vc.round(1).alias("collision_velocity[m/s]"))
    if "flow_velocity" in want:
        out.append(vf.round(1).alias("flow_velocity[m/s]"))
    if "impact_pressure" in want:
        out.append((pressure * 1e-9).round(3).alias("impact_pressure[GPa]"))
    if "jetting_critical_angle" in want and table is not None:
        out.append(pl.col("_jc").round(3).alias("jetting_critical_angle[deg]"))
    for k, l in enumerate(limits):
        stem = l[1].split("[")[0]
        if "margins" in want or stem in want:
            out.append((pl.col(f"_m{k}") * l[6]).round(l[7]).alias(l[1]))
    if "outside_trial_data" in want and w["boundary_list"]:
        outside = pl.any_horizontal([pl.col(f"_m{k}").is_null() for k, l in enumerate(limits) if l[0].startswith("boundary-")])
        out.append(outside.alias("outside_trial_data"))
    sink = lf.select(out).sink_csv(a.output, lazy=True)

    # The summary from the same query: counts, welded length (each point owns half the
    # distance to its neighbours), rows solved directly for jetting.
    pos = pl.col("_pos")
    owned = ((pos.shift(-1).fill_null(pos) - pos.shift(1).fill_null(pos)).abs() * 0.5)
    summ = lf.select(
        *[(pl.col("_v") == k).sum().alias(f"n{k}") for k in range(3)],
        owned.filter(pl.col("_v") == 0).sum().alias("welded"),
        owned.sum().alias("total"),
        (pl.col("_jd").sum() if table is not None else pl.lit(0)).alias("direct"),
        pl.len().alias("rows"),
    )
    # One streaming run for both: polars shares the common part of the two queries.
    _, s = pl.collect_all([sink, summ], engine="streaming")
    s = s.row(0, named=True)
    counts = {"welded": s["n0"], "not-welded": s["n1"], "melted": s["n2"]}
    summary = {
        "rows_read": s["rows"],
        "rows_classified": s["rows"],
        "rows_rejected": 0,
        "verdict_counts": counts,
        "jetting_rows_solved_directly": int(s["direct"]),
        "welded_length_m": s["welded"],
        "interface_length_m": s["total"],
        "welded_fraction": s["welded"] / s["total"] if s["total"] > 0 else s["n0"] / max(s["rows"], 1),
    }
    wall = time.perf_counter() - t0
    peak = resource.getrusage(resource.RUSAGE_SELF).ru_maxrss / 1024.0
    summary["wall_s"] = wall
    summary["peak_rss_mib"] = peak
    if a.summary_json:
        with open(a.summary_json, "w") as f:
            json.dump(summary, f, indent=2)
    print(
        f"polars: {summary['rows_classified']} rows classified in {wall:.2f} s, peak RSS {peak:.0f} MiB; "
        f"verdicts {counts}",
        file=sys.stderr,
    )
    return 0


if __name__ == "__main__":
    sys.exit(main(sys.argv[1:]))
