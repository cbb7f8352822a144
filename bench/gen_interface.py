#!/usr/bin/env python3
"""Synthetic interface exports for benchmarking `oblique map`.

Writes N rows of one joint in oblique's neutral layout:

    id,position[mm],time[us],velocity[m/s],angle[deg]

along a magnetic-pulse-like interface: the collision angle rises from a few degrees where the
flyer first touches to steep at the tip, and the impact velocity rises and then falls as the
collision point runs along the joint, with small noise on both. The numbers are invented to
look plausible for an Al tube on a Cu rod (`demo-al6061-on-cu`); they are not measurements.

Usage: gen_interface.py ROWS OUT.csv [--length-mm 40] [--seed 7] [--bad-every K]
  --bad-every K  make every K-th row bad (negative velocity, empty angle or a word), for the
                 bad-row paths; 0 (default) writes a clean file.
"""

import argparse
import sys

import numpy as np
import pyarrow as pa
import pyarrow.csv as pacsv

CHUNK = 1_000_000


def profile(x, rng):
    """Velocity (m/s) and angle (deg) at fractional positions x in [0, 1]."""
    # Angle: a few degrees at the start, steep at the tip (a power-law rise), common practice
    # for the shape of a closing gap in tube crimping; values invented.
    angle = 2.0 + 26.0 * x**1.6
    # Velocity: rises while the flyer accelerates, falls as the pulse decays; invented values.
    velocity = 250.0 + 300.0 * np.sin(np.pi * np.clip(x, 0.0, 1.0) ** 0.8) - 60.0 * x
    angle = angle * (1.0 + 0.02 * rng.standard_normal(x.size))
    velocity = velocity * (1.0 + 0.02 * rng.standard_normal(x.size))
    return velocity, np.clip(angle, 0.5, 89.0)


def main(argv):
    ap = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    ap.add_argument("rows", type=int)
    ap.add_argument("out")
    ap.add_argument("--length-mm", type=float, default=40.0)
    ap.add_argument("--seed", type=int, default=7)
    ap.add_argument("--bad-every", type=int, default=0)
    a = ap.parse_args(argv)
    rng = np.random.default_rng(a.seed)
    n = a.rows
    opts = pacsv.WriteOptions(include_header=False, quoting_style="none")
    with open(a.out, "wb") as f:
        f.write(b"id,position[mm],time[us],velocity[m/s],angle[deg]\n")
        for start in range(0, n, CHUNK):
            stop = min(n, start + CHUNK)
            i = np.arange(start, stop)
            x = i / max(n - 1, 1)
            v, b = profile(x, rng)
            cols = {
                "id": pa.array(i + 1),
                "position": pa.array(np.round(x * a.length_mm, 7)),
                # The collision point runs at a few km/s: time = position / 2.5 mm/us.
                "time": pa.array(np.round(x * a.length_mm / 2.5, 4)),
                "velocity": pa.array(np.round(v, 2)),
                "angle": pa.array(np.round(b, 3)),
            }
            if a.bad_every > 0:
                bad = (i + 1) % a.bad_every == 0
                vs = pa.array(np.round(v, 2)).cast(pa.string()).to_numpy(zero_copy_only=False)
                vs = np.where(bad, "-1", vs)
                cols["velocity"] = pa.array(vs)
            table = pa.table(cols)
            buf = pa.BufferOutputStream()
            pacsv.write_csv(table, buf, write_options=opts)
            f.write(buf.getvalue().to_pybytes())
    return 0


if __name__ == "__main__":
    sys.exit(main(sys.argv[1:]))
