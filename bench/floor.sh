#!/usr/bin/env bash
# The weld map's floor: how fast `oblique map` would be if the classification cost nothing.
# A copy of the workspace with bench/floor.patch applied (the classification of each row
# replaced by a fixed point; reading, the one-pass record reader, the output, the per-row
# records and the summary all unchanged) is built beside the real release binary, and both run
# on the same input, with the polars comparator, REPEAT times each (5 by default), alternating:
#   oblique   the real map, written to a file;
#   floor     the patched map, written to a file (the same column set);
#   floor0    the patched map, written to /dev/null;
#   polars    bench/polars_map.py (POLARS=0 leaves it out).
# Prints best and median wall time, user + system CPU, and the time issue 18's target allows
# (the polars script's best divided by 5 for verdict-only, by 3 for other column sets). The
# patched build is a measuring device only: its maps are wrong on purpose and it is never
# installed.
#
# Usage: bench/floor.sh                        (5 000 000 rows, --columns verdict-only)
#        ROWS=2000000 SET=default bench/floor.sh
# Needs what compare.sh needs, and tar and patch.
set -euo pipefail

REPEAT="${REPEAT:-5}"
SET="${SET:-verdict-only}"
POLARS="${POLARS:-1}"
# shellcheck source=bench/common.sh
source "$(dirname "${BASH_SOURCE[0]}")/common.sh"
"$BIN" pair show "$PAIR" --json > "$OUT/window.json"

COPY="$OUT/floor-src"
rm -rf "$COPY"
mkdir -p "$COPY"
tar -C "$ROOT" --exclude=./target --exclude=./bench/out --exclude=./bench/.venv --exclude=./.git -cf - . | tar -C "$COPY" -xf -
(cd "$COPY" && patch -s -p1 < "$HERE/floor.patch")
(cd "$COPY" && CARGO_TARGET_DIR="$OUT/floor-target" cargo build --release -p oblique-cli --quiet)
FLOOR="$OUT/floor-target/release/oblique"

rm -f "$OUT"/floor-*.runs
# once NAME CMD...: one run, its wall seconds and user + system CPU seconds appended.
once() {
    local name="$1"
    shift
    rm -f "$OUT/floor-map.csv"
    /usr/bin/time -f "%e %U %S" -o "$OUT/floor-$name.time" "$@" > /dev/null 2> "$OUT/floor-$name.err" || {
        cat "$OUT/floor-$name.err" >&2
        exit 1
    }
    awk '{print $1, $2 + $3}' "$OUT/floor-$name.time" >> "$OUT/floor-$name.runs"
}

echo "machine: $(nproc) cores, $(uname -m); $(date -u +%Y-%m-%dT%H:%MZ); $ROWS rows, columns $SET; load $(cut -d' ' -f1-3 /proc/loadavg)"
args=(--pair "$PAIR" --no-progress --columns "$SET")
progs="oblique floor floor0"
[ "$POLARS" = 1 ] && progs="$progs polars"
for _ in $(seq "$REPEAT"); do
    once oblique "$BIN" map "$INPUT" "${args[@]}" -o "$OUT/floor-map.csv"
    once floor "$FLOOR" map "$INPUT" "${args[@]}" -o "$OUT/floor-map.csv"
    once floor0 "$FLOOR" map "$INPUT" "${args[@]}" -o /dev/null
    if [ "$POLARS" = 1 ]; then
        once polars "$PY" "$HERE/polars_map.py" "$INPUT" "$OUT/window.json" \
            -o "$OUT/floor-map.csv" --summary-json "$OUT/floor-summary.json" --columns "$SET"
    fi
done
rm -f "$OUT/floor-map.csv"
echo "load after: $(cut -d' ' -f1-3 /proc/loadavg)"
python3 - "$OUT" "$SET" $progs <<'EOF'
import statistics, sys
out, cset, progs = sys.argv[1], sys.argv[2], sys.argv[3:]
runs = {p: [tuple(map(float, l.split())) for l in open(f"{out}/floor-{p}.runs")] for p in progs}
print(f"{'':8} {'best s':>7} {'median s':>9} {'CPU best s':>11} {'CPU median s':>13}")
for p in progs:
    w = [r[0] for r in runs[p]]
    c = [r[1] for r in runs[p]]
    print(f"{p:8} {min(w):7.2f} {statistics.median(w):9.2f} {min(c):11.2f} {statistics.median(c):13.2f}")
if "polars" in runs:
    # Issue 18's targets at 5 million rows: 5x for verdict-only, 3x for the default columns.
    factor = 5 if cset == "verdict-only" else 3
    budget = min(r[0] for r in runs["polars"]) / factor
    print(f"{factor}x the polars script's best allows {budget:.3f} s; the floor (no classification at all) "
          f"takes {min(r[0] for r in runs['floor']):.2f} s to a file, "
          f"{min(r[0] for r in runs['floor0']):.2f} s to /dev/null")
EOF
