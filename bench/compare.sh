#!/usr/bin/env bash
# Side-by-side benchmark of `oblique map` (release build) and the Python reference
# (bench/reference_map.py: pandas C reader, vectorised numpy, pyarrow CSV writer) on one
# synthetic interface file. Checks that the verdict counts agree and prints wall time, MB/s of
# input CSV, the ratio and the peak memory of each (from /usr/bin/time -v).
#
# Usage: bench/compare.sh            (5 000 000 rows, each program run REPEAT=2 times, best kept)
#        ROWS=1000000 REPEAT=1 bench/compare.sh
#        ROWCHECK=1 bench/compare.sh  (also compare verdict, binding limit and margin row by row)
# Needs: cargo, python3 with venv, /usr/bin/time. Installs pandas, numpy and pyarrow into
# bench/.venv (git-ignored) on first use.
set -euo pipefail

REPEAT="${REPEAT:-2}"
# shellcheck source=bench/common.sh
source "$(dirname "${BASH_SOURCE[0]}")/common.sh"
"$BIN" pair show "$PAIR" --json > "$OUT/window.json"

# run NAME CMD...: best wall time and its peak RSS over REPEAT runs, into $OUT/NAME.best
run() {
    local name="$1"
    shift
    local best=""
    for _ in $(seq "$REPEAT"); do
        rm -f "$OUT/map-$name.csv"
        /usr/bin/time -v -o "$OUT/$name.time" "$@" > /dev/null 2> "$OUT/$name.err" || {
            cat "$OUT/$name.err" >&2
            exit 1
        }
        local wall rss
        wall=$(awk -F': ' '/Elapsed \(wall clock\)/ {n=split($2,t,":"); s=0; for(i=1;i<=n;i++) s=s*60+t[i]; print s}' "$OUT/$name.time")
        rss=$(awk -F': ' '/Maximum resident set size/ {print $2}' "$OUT/$name.time")
        if [ -z "$best" ] || awk -v a="$wall" -v b="${best%% *}" 'BEGIN{exit !(a<b)}'; then
            best="$wall $rss"
        fi
    done
    echo "$best" > "$OUT/$name.best"
}

echo "load before the runs: $(cut -d' ' -f1-3 /proc/loadavg)" >&2
run rust "$BIN" map "$INPUT" --pair "$PAIR" -o "$OUT/map-rust.csv" \
    --summary-json "$OUT/summary-rust.json" --no-progress
run python "$PY" "$HERE/reference_map.py" "$INPUT" "$OUT/window.json" \
    -o "$OUT/map-python.csv" --summary-json "$OUT/summary-python.json"
echo "load after the runs: $(cut -d' ' -f1-3 /proc/loadavg)" >&2

"$PY" - "$OUT" "$BYTES" "$ROWS" <<'EOF'
import json, sys
out, nbytes, rows = sys.argv[1], int(sys.argv[2]), int(sys.argv[3])
rs = json.load(open(f"{out}/summary-rust.json"))
py = json.load(open(f"{out}/summary-python.json"))
def best(name):
    wall, rss = open(f"{out}/{name}.best").read().split()
    return float(wall), int(rss) / 1024.0
rw, rm = best("rust")
pw, pm = best("python")
mb = nbytes / 1e6
print(f"input: {rows} rows, {mb:.1f} MB of CSV; pair {rs['pair']} ({rs['convention']})")
print(f"{'':10} {'wall s':>8} {'MB/s':>8} {'peak RSS MiB':>13}")
print(f"{'oblique':10} {rw:8.2f} {mb / rw:8.1f} {rm:13.1f}")
print(f"{'python':10} {pw:8.2f} {mb / pw:8.1f} {pm:13.1f}")
print(f"speed-up: {pw / rw:.2f}x")
ok = rs["verdict_counts"] == py["verdict_counts"] and rs["rows_classified"] == py["rows_classified"]
print(f"verdict counts: oblique {rs['verdict_counts']}, python {py['verdict_counts']}: {'AGREE' if ok else 'DIFFER'}")
print(f"welded length: oblique {rs['welded_length_m']:.9f} m, python {py['welded_length_m']:.9f} m")
print(f"jetting rows solved directly: oblique {rs['jetting']['rows_solved_directly']}, python {py['jetting_rows_solved_directly']}")
sys.exit(0 if ok else 1)
EOF

# ROWCHECK=1: also compare every row's verdict, binding limit, binding margin and unit, and
# failing limits (reads both maps back; slow, memory-hungry).
if [ "${ROWCHECK:-0}" = 1 ]; then
    "$PY" - "$OUT" <<'EOF'
import sys
import pandas as pd
out = sys.argv[1]
cols = ["row", "verdict", "binding", "binding_margin", "binding_margin_unit", "failing_limits"]
a = pd.read_csv(f"{out}/map-rust.csv", usecols=cols, dtype={"binding_margin": str}, keep_default_na=False)
b = pd.read_csv(f"{out}/map-python.csv", usecols=cols, keep_default_na=False)
same_rows = bool((a["row"].to_numpy() == b["row"].to_numpy()).all())
diff = int((a["verdict"].to_numpy() != b["verdict"].to_numpy()).sum())
bdiff = int(((a["binding"].to_numpy() != b["binding"].to_numpy())
             | (a["binding_margin_unit"].to_numpy() != b["binding_margin_unit"].to_numpy())
             | (a["failing_limits"].to_numpy() != b["failing_limits"].to_numpy())).sum())
# The binding margin within one unit of its last written decimal (the two round alike but for
# ties and the last bit of a division).
dec = a["binding_margin"].str.split(".").str[1].str.len().fillna(0).to_numpy()
gap = (a["binding_margin"].astype(float) - b["binding_margin"].astype(float)).abs().to_numpy()
mdiff = int((gap > 1.0001 * 10.0 ** (-dec)).sum())
print(f"row by row: {len(a)} rows, {diff} verdicts differ, {bdiff} binding limits, units or failing limits differ, "
      f"{mdiff} binding margins differ by more than their last decimal, rows aligned: {same_rows}")
sys.exit(0 if diff == 0 and bdiff == 0 and mdiff == 0 and same_rows else 1)
EOF
fi
