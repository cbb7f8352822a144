#!/usr/bin/env python3
"""Reference weld map in Python, for benchmarking `oblique map` side by side.

The same classification as `oblique map`, written the way a careful engineer would in the
scientific Python stack: pandas' C reader, vectorised numpy (no loops over rows), pyarrow's CSV
writer. The pair window comes from `oblique pair show NAME --json` (materials, thickness,
convention, criteria constants, user boundaries, all in SI).

Relations (the same as the Rust crates; see physics-notes.md, sections 1-4):
- kinematics per convention (bisector, normal-to-flyer, normal-to-parent);
- 1-D impedance matching with linear Hugoniots, p = rho0 (C0 + s up) up;
- Deribas lower angle, strength lower velocity, pressure lower (m x HEL), Wittman melting upper
  (form A or B), each evaluated for both plates keeping the more demanding one;
- jetting: exactly zero when either inflow is subsonic; otherwise the shock-polar construction,
  taken from a table over sqrt(V - C0) for both inflows (bilinear, 192 x 192 nodes up to
  20 km/s, cells with a corner above 60 deg left to the direct solve), re-solved directly for
  rows within 0.05 deg of the critical angle and outside the table, as in Rust;
- user boundaries: linear interpolation inside their span only;
- verdict: welded if every decisive limit holds; melted if only velocity ceilings fail; else
  not welded. Binding limit: smallest relative margin (first of equals).

Usage:
  reference_map.py INPUT.csv WINDOW.json -o OUT.csv [--summary-json FILE] [--bad-rows stop|skip]
                   [--all-columns | --columns default|all|verdict-only]

The map has the same columns as `oblique map`: the binding limit with its margin (in that
limit's unit) and relative margin by default, every limit's margin with --all-columns (or
--columns all), the row number and the verdict alone with --columns verdict-only.
"""

import argparse
import json
import math
import resource
import sys
import time

import numpy as np
import pandas as pd
import pyarrow as pa
import pyarrow.csv as pacsv

TABLE_NODES = 192
TABLE_MAX = 20_000.0
CAP_RAD = math.radians(60.0)
BOUND_DEG = 0.05

UNITS = {
    "length": {"m": 1.0, "cm": 1e-2, "mm": 1e-3, "um": 1e-6, "µm": 1e-6, "in": 0.0254},
    "velocity": {"m/s": 1.0, "km/s": 1000.0, "mm/us": 1000.0, "mm/µs": 1000.0, "m/us": 1e6},
    "angle": {"deg": math.pi / 180.0, "°": math.pi / 180.0, "rad": 1.0, "mrad": 1e-3},
    "time": {"s": 1.0, "ms": 1e-3, "us": 1e-6, "µs": 1e-6, "ns": 1e-9},
}


class Hug:
    def __init__(self, m):
        self.rho = m["density_kg_m3"]
        self.c0 = m["bulk_sound_speed_m_s"]
        self.s = m["hugoniot_slope"]


def split_cell(cell):
    c = cell.strip()
    if "[" in c and c.endswith("]"):
        i = c.index("[")
        return c[:i].strip(), c[i + 1 : -1].strip()
    return c, None


def find_column(columns, name, kind):
    for col in columns:
        n, unit = split_cell(col)
        if n == name:
            if unit is None or unit not in UNITS[kind]:
                sys.exit(f"column '{col}': missing or unknown unit")
            return col, UNITS[kind][unit]
    sys.exit(f"no column named '{name}'")


# ---- jetting: shock polars (vectorised) -------------------------------------------------


def deflection(V, c0, s, up):
    un = np.minimum(c0 + s * up, V)
    sphi = un / V
    phi = np.arcsin(sphi)
    vt = V * np.sqrt(np.maximum(1.0 - sphi * sphi, 0.0))
    with np.errstate(divide="ignore", invalid="ignore"):
        th = phi - np.arctan((un - up) / vt)
    th = np.where(vt > 0.0, th, 0.0)
    return np.maximum(th, 0.0)


def up_at(h, p):
    rc = h.rho * h.c0
    return 2.0 * p / (rc + np.sqrt(rc * rc + 4.0 * h.rho * h.s * p))


def up_max(h, V):
    return (V - h.c0) / h.s if h.s > 0 else V


def critical_direct(f, pm, vf, vc):
    """max over p of theta_flyer(p) + theta_parent(p), both inflows supersonic (arrays)."""
    vf = np.asarray(vf, float)
    vc = np.asarray(vc, float)
    if vf.size == 0:
        return vf.copy()
    umf = up_max(f, vf)
    ump = up_max(pm, vc)
    pend = np.minimum(f.rho * (f.c0 + f.s * umf) * umf, pm.rho * (pm.c0 + pm.s * ump) * ump)

    def g(p, vf_, vc_, umf_, ump_):
        return deflection(vf_, f.c0, f.s, np.minimum(up_at(f, p), umf_)) + deflection(
            vc_, pm.c0, pm.s, np.minimum(up_at(pm, p), ump_)
        )

    n = 24
    k = np.arange(n + 1)
    grid = pend[:, None] * k[None, :] / n
    vals = g(grid, vf[:, None], vc[:, None], umf[:, None], ump[:, None])
    bi = np.argmax(vals, axis=1)
    best = vals[np.arange(vals.shape[0]), bi]
    h = pend / n
    lo = h * np.maximum(bi - 1, 0)
    hi = np.minimum(h * (bi + 1), pend)
    gr = 0.5 * (math.sqrt(5.0) - 1.0)
    x1 = hi - gr * (hi - lo)
    x2 = lo + gr * (hi - lo)
    f1 = g(x1, vf, vc, umf, ump)
    f2 = g(x2, vf, vc, umf, ump)
    for _ in range(60):
        left = f1 < f2
        lo = np.where(left, x1, lo)
        hi = np.where(left, hi, x2)
        nx1 = np.where(left, x2, hi - gr * (hi - lo))
        nx2 = np.where(left, lo + gr * (hi - lo), x1)
        nf1 = np.where(left, f2, np.nan)
        nf2 = np.where(left, np.nan, f1)
        ev = np.where(left, nx2, nx1)
        fe = g(ev, vf, vc, umf, ump)
        f1 = np.where(left, nf1, fe)
        f2 = np.where(left, fe, nf2)
        x1, x2 = nx1, nx2
    out = np.maximum(best, np.maximum(f1, f2))
    return np.where(pend > 0.0, out, np.maximum(g(np.zeros_like(pend), vf, vc, umf, ump), 0.0))


class JetTable:
    def __init__(self, f, pm):
        self.f, self.pm = f, pm
        n = TABLE_NODES
        self.duf = math.sqrt(max(TABLE_MAX - f.c0, 0.0)) / (n - 1)
        self.dup = math.sqrt(max(TABLE_MAX - pm.c0, 0.0)) / (n - 1)
        i = np.arange(n)
        uf, up = np.meshgrid(self.duf * i, self.dup * i, indexing="ij")
        vf = f.c0 + uf**2
        vc = pm.c0 + up**2
        vals = np.zeros((n, n))
        inner = (uf > 0) & (up > 0)
        vals[inner] = critical_direct(f, pm, vf[inner], vc[inner])
        self.vals = vals

    def critical(self, vf, vc, beta_deg):
        """Critical angle (rad) per row and whether it was solved directly."""
        f, pm, n = self.f, self.pm, TABLE_NODES
        crit = np.zeros_like(vf)
        sup = (vc > pm.c0) & (vf > f.c0)
        inside = sup & (vf <= TABLE_MAX) & (vc <= TABLE_MAX)
        xf = np.sqrt(np.maximum(vf - f.c0, 0.0)) / self.duf
        xp = np.sqrt(np.maximum(vc - pm.c0, 0.0)) / self.dup
        fi = np.minimum(np.floor(xf), n - 2)
        fj = np.minimum(np.floor(xp), n - 2)
        fi = np.where(inside, fi, 0).astype(np.int64)
        fj = np.where(inside, fj, 0).astype(np.int64)
        tf = xf - fi
        tp = xp - fj
        a = self.vals[fi, fj]
        b = self.vals[fi, fj + 1]
        c = self.vals[fi + 1, fj]
        d = self.vals[fi + 1, fj + 1]
        capped = np.maximum(np.maximum(a, b), np.maximum(c, d)) > CAP_RAD
        lo = a + (b - a) * tp
        hi = c + (d - c) * tp
        tab = lo + (hi - lo) * tf
        use_table = inside & ~capped
        crit = np.where(use_table, tab, crit)
        near = use_table & (np.abs(beta_deg - np.degrees(tab)) <= BOUND_DEG)
        direct = (sup & ~use_table) | near
        idx = np.nonzero(direct)[0]
        if idx.size:
            crit[idx] = critical_direct(f, pm, vf[idx], vc[idx])
        return crit, direct


# ---- the map --------------------------------------------------------------------------


def interp_in_span(x, xs, ys):
    """Linear interpolation inside the span only (NaN outside), with the same floating-point
    operations as the Rust crates (y0 + (y1 - y0) (x - x0) / (x1 - x0) on the segment found by
    a left binary search), so that points exactly on a boundary get the same verdict."""
    xs = np.asarray(xs, float)
    ys = np.asarray(ys, float)
    inside = (x >= xs[0]) & (x <= xs[-1])
    k = np.clip(np.searchsorted(xs, x, side="left"), 1, len(xs) - 1)
    x0, x1, y0, y1 = xs[k - 1], xs[k], ys[k - 1], ys[k]
    with np.errstate(divide="ignore", invalid="ignore"):
        y = y0 + (y1 - y0) * (x - x0) / (x1 - x0)
    y = np.where(x1 == x0, y0, y)
    return np.where(inside, y, np.nan)


def relative(margin, limit):
    with np.errstate(divide="ignore", invalid="ignore"):
        r = margin / np.abs(limit)
    return np.where(np.abs(limit) > 0, r, np.where(margin >= 0, np.inf, -np.inf))


def main(argv):
    ap = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    ap.add_argument("input")
    ap.add_argument("window")
    ap.add_argument("-o", "--output", required=True)
    ap.add_argument("--summary-json")
    ap.add_argument("--bad-rows", choices=["stop", "skip"], default="stop")
    ap.add_argument("--all-columns", action="store_true", help="also write every limit's margin")
    ap.add_argument("--columns", choices=["default", "all", "verdict-only"], default="default")
    a = ap.parse_args(argv)
    if a.columns == "all":
        a.all_columns = True
    t0 = time.perf_counter()
    w = json.load(open(a.window))
    F, P = w["flyer_material"], w["parent_material"]
    hf, hp = Hug(F), Hug(P)
    crit = w["criteria"]
    conv = w["convention"]
    h = w["flyer_thickness_m"]

    df = pd.read_csv(a.input, engine="c")
    pos_col, pos_f = find_column(df.columns, "position", "length")
    vel_col, vel_f = find_column(df.columns, "velocity", "velocity")
    ang_col, ang_f = find_column(df.columns, "angle", "angle")
    pos = pd.to_numeric(df[pos_col], errors="coerce").to_numpy(float) * pos_f
    vp = pd.to_numeric(df[vel_col], errors="coerce").to_numpy(float) * vel_f
    beta = pd.to_numeric(df[ang_col], errors="coerce").to_numpy(float) * ang_f
    deg = np.degrees(beta)
    rows = np.arange(len(df), dtype=np.int64) + 2
    ok = np.isfinite(pos) & np.isfinite(vp) & (vp > 0) & (deg > 0) & (deg < 90)
    rows_read = len(df)
    rejected = int((~ok).sum())
    if rejected and a.bad_rows == "stop":
        first = int(rows[~ok][0])
        sys.exit(f"{a.input}: row {first}: bad value")
    if rejected:
        df = df[ok]
        pos, vp, beta, deg, rows = pos[ok], vp[ok], beta[ok], deg[ok], rows[ok]

    # Kinematics (the window's convention).
    if conv == "bisector":
        vc = vp / (2.0 * np.sin(beta / 2.0))
        vf = vc
    elif conv == "normal-to-flyer":
        vc = vp / np.sin(beta)
        vf = vc * np.cos(beta)
    else:
        vc = vp / np.tan(beta)
        vf = vc / np.cos(beta)

    # 1-D impedance matching.
    r1, c1, s1 = hf.rho, hf.c0, hf.s
    r2, c2, s2 = hp.rho, hp.c0, hp.s
    qa = r2 * s2 - r1 * s1
    qb = r1 * c1 + r2 * c2 + 2.0 * r1 * s1 * vp
    qc = r1 * (c1 * vp + s1 * vp * vp)
    u2 = 2.0 * qc / (qb + np.sqrt(qb * qb + 4.0 * qa * qc))
    pressure = r2 * (c2 + s2 * u2) * u2

    limits = []  # (name, column, margin, relative, satisfied, ceiling, out_unit_factor, decimals)

    def add(name, col, margin, limit, sat, ceiling, factor, dec):
        limits.append((name, col, margin, relative(margin, limit), sat, ceiling, factor, dec))

    if crit["deribas_enabled"]:
        k = crit["deribas_k"]
        lf = np.degrees(k * np.sqrt(F["vickers_hardness_pa"] / (hf.rho * vc * vc)))
        lp = np.degrees(k * np.sqrt(P["vickers_hardness_pa"] / (hp.rho * vc * vc)))
        lim = np.where(lf >= lp, lf, lp)
        add("deribas-lower", "margin_deribas_lower[deg]", deg - lim, lim, deg >= lim, False, 1.0, 3)
    if crit["strength_enabled"]:
        lim = max(
            math.sqrt(F["tensile_strength_pa"] / hf.rho), math.sqrt(P["tensile_strength_pa"] / hp.rho)
        )
        add("strength-lower", "margin_strength_lower[m/s]", vp - lim, lim, vp >= lim, False, 1.0, 1)
    if crit["pressure_enabled"]:
        m = crit["hel_multiple"]

        def hel(M):
            return 0.5 * (M["bulk_modulus_pa"] / M["shear_modulus_pa"] + 4.0 / 3.0) * M["yield_strength_pa"]

        lim = max(m * hel(F), m * hel(P))
        add("pressure-lower", "margin_pressure_lower[GPa]", pressure - lim, lim, pressure >= lim, False, 1e-9, 3)
    if crit["melting_enabled"]:
        n_w = crit["wittman_n"]

        def melt(M, H):
            tm, c0 = M["melting_temperature_k"], H.c0
            diff = (M["thermal_conductivity_w_m_k"] * M["specific_heat_j_kg_k"] * c0 / (H.rho * h)) ** 0.25
            lead = math.sqrt(tm * c0) / vc if crit["wittman_form"] == "a" else np.sqrt(tm / vc)
            return lead * diff / n_w

        lf, lp = melt(F, hf), melt(P, hp)
        lim = np.where(lf <= lp, lf, lp)
        add("melting-upper", "margin_melting_upper[m/s]", lim - vp, lim, vp <= lim, True, 1.0, 1)
    direct_rows = 0
    if crit["jetting_enabled"]:
        table = JetTable(hf, hp)
        jc, direct = table.critical(vf, vc, deg)
        direct_rows = int(direct.sum())
        lim = np.degrees(jc)
        add("jetting", "margin_jetting[deg]", deg - lim, lim, deg > lim, False, 1.0, 3)
    outside = np.zeros(len(vp), bool)
    for i, b in enumerate(w["boundary_list"]):
        x = vp if b["plane"] == "angle-impact-velocity" else vc
        side = b["weld_side"]
        vs = [p["velocity_m_s"] for p in b["points"]]
        # Degrees through radians and back, as the window crate stores angles.
        an = np.degrees(np.array([p["angle_deg"] for p in b["points"]]) * (math.pi / 180.0))
        if side in ("above", "below"):
            lim = interp_in_span(x, vs, an)
            margin = deg - lim if side == "above" else lim - deg
            unit, dec = "deg", 3
        else:
            lim = interp_in_span(deg, an, vs)
            margin = x - lim if side == "right" else lim - x
            unit, dec = "m/s", 1
        inr = np.isfinite(lim)
        outside |= ~inr
        label = f"boundary-{i + 1}"  # the map's id for the window's (i+1)-th boundary
        add(label, f"margin_boundary_{i + 1}[{unit}]", margin, lim, np.where(inr, margin >= 0, True), side == "left", 1.0, dec)

    # Verdict and binding limit.
    if limits:
        rel = np.vstack([np.where(np.isnan(l[2]), np.inf, l[3]) for l in limits])
        sat = np.vstack([l[4] for l in limits])
        ceil = np.array([l[5] for l in limits])[:, None]
        inside = sat.all(axis=0)
        only_ceilings = (sat | ceil).all(axis=0)
        binding = np.argmin(rel, axis=0)
    else:
        inside = np.ones(len(vp), bool)
        only_ceilings = inside
        binding = np.zeros(len(vp), np.int64)
    verdict = np.where(inside, 0, np.where(only_ceilings, 2, 1))
    names = np.array([l[0] for l in limits] or [""], dtype=object)

    # Output table: row, the input columns as read, then the computed columns.
    cols = {"row": pa.array(rows)}
    for c in df.columns:
        cols[c] = pa.array(df[c].to_numpy())
    vnames = np.array(["welded", "not-welded", "melted"], dtype=object)
    cols["verdict"] = pa.array(vnames[verdict])
    cols["binding"] = pa.array(names[binding])
    # The binding limit's margin in its own output unit (rounded to its decimals), and its
    # relative margin.
    if limits:
        at = np.arange(len(vp))
        bm = np.full(len(vp), np.nan)
        for k, (_, _, margin, _, _, _, factor, dec) in enumerate(limits):
            pick = binding == k
            bm[pick] = np.round(margin[pick] * factor, dec)
        brel = np.vstack([l[3] for l in limits])[binding, at]
        # The unit of each limit's margin column, e.g. margin_jetting[deg] -> deg.
        units = np.array([l[1].split("[")[1].rstrip("]") for l in limits], dtype=object)
        cols["binding_margin"] = pa.array(bm, from_pandas=True)
        cols["binding_margin_unit"] = pa.array(units[binding])
        cols["binding_relative_margin"] = pa.array(np.round(brel, 4), from_pandas=True)
        # Every failing limit, ';'-separated in limit order: one bit per limit, then one text
        # per distinct combination (few), looked up for every row.
        code = np.zeros(len(vp), np.int64)
        for k in range(len(limits)):
            code |= (~sat[k]).astype(np.int64) << k
        combos, inverse = np.unique(code, return_inverse=True)
        texts = np.array([";".join(l[0] for k, l in enumerate(limits) if (c >> k) & 1) for c in combos], dtype=object)
        cols["failing_limits"] = pa.array(texts[inverse.reshape(-1)])
    cols["collision_velocity[m/s]"] = pa.array(np.round(vc, 1))
    cols["flow_velocity[m/s]"] = pa.array(np.round(vf, 1))
    cols["impact_pressure[GPa]"] = pa.array(np.round(pressure * 1e-9, 3))
    if a.all_columns:
        for name, col, margin, _, _, _, factor, dec in limits:
            cols[col] = pa.array(np.round(margin * factor, dec), from_pandas=True)
    if w["boundary_list"]:
        cols["outside_trial_data"] = pa.array(outside)
    if a.columns == "verdict-only":
        cols = {"row": cols["row"], "verdict": cols["verdict"]}
    pacsv.write_csv(pa.table(cols), a.output, write_options=pacsv.WriteOptions(quoting_style="needed"))

    # Summary: counts; length-weighted welded length (each point owns half the distance to
    # its neighbours); welded/unwelded segments.
    counts = np.bincount(verdict, minlength=3)
    summary = {
        "rows_read": rows_read,
        "rows_classified": int(len(vp)),
        "rows_rejected": rejected,
        "verdict_counts": {"welded": int(counts[0]), "not-welded": int(counts[1]), "melted": int(counts[2])},
        "jetting_rows_solved_directly": direct_rows,
    }
    if len(pos) > 0:
        mids = 0.5 * (pos[1:] + pos[:-1])
        edges = np.concatenate([[pos[0]], mids, [pos[-1]]])
        owned = np.abs(np.diff(edges))
        welded = verdict == 0
        wl = float(owned[welded].sum())
        total = float(owned.sum())
        changes = int(np.count_nonzero(welded[1:] != welded[:-1]))
        summary.update(
            {
                "welded_length_m": wl,
                "interface_length_m": total,
                "welded_fraction": wl / total if total > 0 else float(welded.mean()),
                "segments_total": changes + 1,
            }
        )
    wall = time.perf_counter() - t0
    peak = resource.getrusage(resource.RUSAGE_SELF).ru_maxrss / 1024.0
    summary["wall_s"] = wall
    summary["peak_rss_mib"] = peak
    if a.summary_json:
        with open(a.summary_json, "w") as f:
            json.dump(summary, f, indent=2)
    print(
        f"reference: {summary['rows_classified']} rows classified in {wall:.2f} s, peak RSS {peak:.0f} MiB; "
        f"verdicts {summary['verdict_counts']}",
        file=sys.stderr,
    )
    return 0


if __name__ == "__main__":
    sys.exit(main(sys.argv[1:]))
