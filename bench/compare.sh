#!/usr/bin/env bash
# Side-by-side benchmark of `oblique map` (release build) and two Python comparators on the
# synthetic interface files of bench/gen_interface.py:
#   pandas  bench/reference_map.py: pandas C reader, vectorised numpy, pyarrow CSV writer;
#   polars  bench/polars_map.py: polars lazy CSV scan, expressions, streaming CSV sink.
# For each size (2 and 5 million rows by default) and each column set (the default map, and
# verdict-only: the row number and the verdict), the programs run REPEAT times each (3 by
# default), alternating (oblique, pandas, polars, oblique, ...), every output file removed
# before its run; the best wall time of each, with its peak memory (/usr/bin/time -v), gives the
# MB/s of input CSV and the ratios. Checks, every time: the same verdict counts, the same
# welded fraction (to 1e-9), and the same verdict in every row (the maps read back with
# polars); ROWCHECK=1 also compares the binding limit, its margin, unit and the failing limits.
#
# Usage: bench/compare.sh                         (2 000 000 and 5 000 000 rows, REPEAT=3)
#        SIZES=1000000 REPEAT=1 bench/compare.sh  (quicker)
#        SETS=default PANDAS=0 bench/compare.sh   (one column set, polars only)
#        ROWCHECK=1 bench/compare.sh
# Needs: cargo, python3 with venv, /usr/bin/time. Installs pandas, numpy, pyarrow and polars
# into bench/.venv (git-ignored) on first use (VENV=DIR: another venv).
set -euo pipefail

REPEAT="${REPEAT:-3}"
SIZES="${SIZES:-2000000 5000000}"
SETS="${SETS:-default verdict-only}"
PANDAS="${PANDAS:-1}"
# shellcheck source=bench/common.sh
ROWS="${SIZES%% *}" source "$(dirname "${BASH_SOURCE[0]}")/common.sh"
"$BIN" pair show "$PAIR" --json > "$OUT/window.json"

# once NAME MAP CMD...: one run of CMD (its map MAP removed first), its wall seconds and peak
# RSS (KiB) appended to $OUT/NAME.runs.
once() {
    local name="$1" map="$2"
    shift 2
    rm -f "$map"
    /usr/bin/time -v -o "$OUT/$name.time" "$@" > /dev/null 2> "$OUT/$name.err" || {
        cat "$OUT/$name.err" >&2
        exit 1
    }
    awk -F': ' '/Elapsed \(wall clock\)/ {n=split($2,t,":"); s=0; for(i=1;i<=n;i++) s=s*60+t[i]; w=s}
                /Maximum resident set size/ {r=$2} END {print w, r}' "$OUT/$name.time" >> "$OUT/$name.runs"
}

echo "machine: $(nproc) cores, $(awk '/MemTotal/ {printf "%.0f GiB", $2/1048576}' /proc/meminfo), $(uname -m); $(date -u +%Y-%m-%dT%H:%MZ)"
for rows in $SIZES; do
    make_input "$rows"
    for set in $SETS; do
        progs="oblique polars"
        [ "$PANDAS" = 1 ] && progs="oblique pandas polars"
        for p in $progs; do rm -f "$OUT/$p.runs"; done
        load_before=$(cut -d' ' -f1-3 /proc/loadavg)
        for _ in $(seq "$REPEAT"); do
            once oblique "$OUT/map-oblique.csv" "$BIN" map "$INPUT" --pair "$PAIR" \
                -o "$OUT/map-oblique.csv" --summary-json "$OUT/summary-oblique.json" \
                --no-progress --columns "$set"
            if [ "$PANDAS" = 1 ]; then
                once pandas "$OUT/map-pandas.csv" "$PY" "$HERE/reference_map.py" "$INPUT" \
                    "$OUT/window.json" -o "$OUT/map-pandas.csv" \
                    --summary-json "$OUT/summary-pandas.json" --columns "$set"
            fi
            once polars "$OUT/map-polars.csv" "$PY" "$HERE/polars_map.py" "$INPUT" \
                "$OUT/window.json" -o "$OUT/map-polars.csv" \
                --summary-json "$OUT/summary-polars.json" --columns "$set"
        done
        echo
        echo "== $rows rows ($(awk -v b="$BYTES" 'BEGIN{printf "%.1f", b/1e6}') MB of CSV), columns: $set, best of $REPEAT runs each, alternating; load $load_before -> $(cut -d' ' -f1-3 /proc/loadavg)"
        "$PY" - "$OUT" "$BYTES" "$rows" "$set" "${ROWCHECK:-0}" $progs <<'EOF'
import json, statistics, sys
import polars as pl
out, nbytes, rows, cset, rowcheck = sys.argv[1], int(sys.argv[2]), int(sys.argv[3]), sys.argv[4], sys.argv[5] == "1"
progs = sys.argv[6:]
mb = nbytes / 1e6
runs = {}
for p in progs:
    r = [tuple(map(float, l.split())) for l in open(f"{out}/{p}.runs")]
    runs[p] = r
best = {p: min(r) for p, r in runs.items()}
print(f"{'':10} {'best s':>8} {'median s':>9} {'MB/s':>8} {'peak MiB':>9} {'vs oblique':>11}")
for p in progs:
    w, rss = best[p]
    med = statistics.median(x[0] for x in runs[p])
    ratio = w / best["oblique"][0]
    print(f"{p:10} {w:8.2f} {med:9.2f} {mb / w:8.1f} {rss / 1024:9.1f} {ratio:10.2f}x")
ok = True
rs = json.load(open(f"{out}/summary-oblique.json"))
for p in progs[1:]:
    py = json.load(open(f"{out}/summary-{p}.json"))
    same_counts = rs["verdict_counts"] == py["verdict_counts"] and rs["rows_classified"] == py["rows_classified"]
    frac = abs(rs["welded_fraction"] - py["welded_fraction"]) <= 1e-9
    a = pl.read_csv(f"{out}/map-oblique.csv", columns=["row", "verdict"])
    b = pl.read_csv(f"{out}/map-{p}.csv", columns=["row", "verdict"])
    rows_same = a.height == b.height and bool((a["row"] == b["row"]).all())
    differ = int((a["verdict"] != b["verdict"]).sum()) if rows_same else -1
    print(f"{p}: verdict counts {'agree' if same_counts else 'DIFFER'}, welded fraction "
          f"{rs['welded_fraction']:.9f} vs {py['welded_fraction']:.9f} {'agree' if frac else 'DIFFER'}, "
          f"rows aligned {rows_same}, {differ} of {a.height} row verdicts differ")
    ok &= same_counts and frac and rows_same and differ == 0
    if rowcheck and cset == "default":
        cols = ["binding", "binding_margin", "binding_margin_unit", "failing_limits"]
        a = pl.read_csv(f"{out}/map-oblique.csv", columns=cols, schema_overrides={"binding_margin": pl.String})
        b = pl.read_csv(f"{out}/map-{p}.csv", columns=cols)
        txt = ["binding", "binding_margin_unit", "failing_limits"]
        bdiff = sum(int((a[c].fill_null("") != b[c].fill_null("")).sum()) for c in txt)
        # The binding margin within one unit of its last written decimal.
        dec = a["binding_margin"].str.split(".").list.get(1, null_on_oob=True).str.len_chars().fill_null(0)
        gap = (a["binding_margin"].cast(pl.Float64) - b["binding_margin"].cast(pl.Float64)).abs()
        mdiff = int((gap > 1.0001 * (10.0 ** (-dec.cast(pl.Float64)))).sum())
        print(f"  row by row: {bdiff} binding limits, units or failing limits differ, "
              f"{mdiff} binding margins differ by more than their last decimal")
        ok &= bdiff == 0 and mdiff == 0
sys.exit(0 if ok else 1)
EOF
    done
done
