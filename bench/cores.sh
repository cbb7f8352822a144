#!/usr/bin/env bash
# How the weld map and the polars comparator use a second core: both run pinned to one core
# (`taskset -c 0`; `oblique map --threads 1`, `POLARS_MAX_THREADS=1`) and to two cores (`taskset
# -c 0,1`; `--threads 2`, `POLARS_MAX_THREADS=2`), REPEAT times each (5 by default), all four
# alternating, on the same input and column set. Prints best and median wall time and user +
# system CPU of each, and the ratio polars / oblique of the best wall times on one core and on
# two. A ratio that grows from one core to two means the map gains more from the second core
# than the script does.
#
# Usage: bench/cores.sh                        (5 000 000 rows, --columns verdict-only)
#        SET=default REPEAT=3 bench/cores.sh
# Needs what compare.sh needs, taskset (util-linux) and a machine with at least two cores.
set -euo pipefail

REPEAT="${REPEAT:-5}"
SET="${SET:-verdict-only}"
# shellcheck source=bench/common.sh
source "$(dirname "${BASH_SOURCE[0]}")/common.sh"
if [ "$(nproc)" -lt 2 ]; then
    echo "cores.sh needs two cores; this machine has $(nproc)" >&2
    exit 2
fi
"$BIN" pair show "$PAIR" --json > "$OUT/window.json"

rm -f "$OUT"/cores-*.runs
# once NAME CPUS CMD...: one run pinned to CPUS, its wall and user + system CPU seconds appended.
once() {
    local name="$1" cpus="$2"
    shift 2
    rm -f "$OUT/cores-map.csv"
    /usr/bin/time -f "%e %U %S" -o "$OUT/cores-$name.time" taskset -c "$cpus" "$@" > /dev/null 2> "$OUT/cores-$name.err" || {
        cat "$OUT/cores-$name.err" >&2
        exit 1
    }
    awk '{print $1, $2 + $3}' "$OUT/cores-$name.time" >> "$OUT/cores-$name.runs"
}

echo "machine: $(nproc) cores, $(uname -m); $(date -u +%Y-%m-%dT%H:%MZ); $ROWS rows, columns $SET; load $(cut -d' ' -f1-3 /proc/loadavg)"
for _ in $(seq "$REPEAT"); do
    for n in 1 2; do
        cpus=0
        [ "$n" = 2 ] && cpus=0,1
        once "oblique$n" "$cpus" "$BIN" map "$INPUT" --pair "$PAIR" --no-progress --columns "$SET" \
            --threads "$n" -o "$OUT/cores-map.csv"
        POLARS_MAX_THREADS=$n once "polars$n" "$cpus" "$PY" "$HERE/polars_map.py" "$INPUT" \
            "$OUT/window.json" -o "$OUT/cores-map.csv" --summary-json "$OUT/cores-summary.json" \
            --columns "$SET"
    done
done
rm -f "$OUT/cores-map.csv"
echo "load after: $(cut -d' ' -f1-3 /proc/loadavg)"
python3 - "$OUT" <<'PY'
import statistics, sys
out = sys.argv[1]
runs = {p: [tuple(map(float, l.split())) for l in open(f"{out}/cores-{p}.runs")]
        for p in ("oblique1", "polars1", "oblique2", "polars2")}
print(f"{'':9} {'best s':>7} {'median s':>9} {'CPU best s':>11} {'CPU median s':>13}")
for p, r in runs.items():
    w, c = [x[0] for x in r], [x[1] for x in r]
    print(f"{p:9} {min(w):7.2f} {statistics.median(w):9.2f} {min(c):11.2f} {statistics.median(c):13.2f}")
for n in "12":
    o, p = min(x[0] for x in runs[f"oblique{n}"]), min(x[0] for x in runs[f"polars{n}"])
    print(f"{n} core{'s' if n == '2' else ''}: polars / oblique {p / o:.2f}x (best wall times)")
for name in ("oblique", "polars"):
    a, b = min(x[0] for x in runs[f"{name}1"]), min(x[0] for x in runs[f"{name}2"])
    print(f"{name}: the second core makes it {a / b:.2f}x faster")
PY
