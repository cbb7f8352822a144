#!/usr/bin/env bash
# Per-core throughput of `oblique map` (release build) on one synthetic interface file, the
# figure issue 6 sets a floor for (150 MB/s of input CSV per core). Runs the map RUNS times in
# each of four set-ups (1 or 2 worker threads; map written to a file or discarded) and prints,
# per set-up, the best and the median of:
#   wall MB/s per core = input MB / (wall seconds x cores used), cores used = min(threads, cores)
#   CPU  MB/s          = input MB / (user + system CPU seconds of the whole process, every thread)
# The CPU figure charges the reader and writer threads and the kernel's copy of the map into
# the page cache to the run; it is the stricter of the two when the machine has spare cores.
# Host noise on shared virtual machines moves single runs by 10-40 %: compare medians, and
# note the load average and the steal time printed around the runs.
#
# Usage: bench/per_core.sh               (5 000 000 rows, RUNS=7)
#        ROWS=1000000 RUNS=3 bench/per_core.sh
# Needs: cargo, python3 with venv (bench/common.sh installs the generator's numpy, with pandas
# and pyarrow for compare.sh, into bench/.venv on first use), /usr/bin/time.
set -euo pipefail

RUNS="${RUNS:-7}"
# shellcheck source=bench/common.sh
source "$(dirname "${BASH_SOURCE[0]}")/common.sh"
CORES=$(nproc)
steal() { awk '/^cpu / {print $9}' /proc/stat; }

echo "input: $ROWS rows, $(awk -v b="$BYTES" 'BEGIN{printf "%.1f", b/1e6}') MB; $CORES cores; $(uname -m)"
echo "load before: $(cut -d' ' -f1-3 /proc/loadavg); steal ticks before: $(steal)"
printf '%-22s %24s %24s %10s\n' "set-up" "wall MB/s/core best|med" "CPU MB/s best|med" "max RSS"
for threads in 1 2; do
    for sink in file null; do
        target="$OUT/per-core-map.csv"
        [ "$sink" = null ] && target=/dev/null
        : > "$OUT/per-core.times"
        for _ in $(seq "$RUNS"); do
            rm -f "$OUT/per-core-map.csv"
            /usr/bin/time -f "%e %U %S %M" -a -o "$OUT/per-core.times" \
                "$BIN" map "$INPUT" --pair "$PAIR" -o "$target" --threads "$threads" \
                --no-progress > /dev/null
        done
        rm -f "$OUT/per-core-map.csv"
        used=$((threads < CORES ? threads : CORES))
        awk -v b="$BYTES" -v used="$used" -v name="$threads thread(s), $sink" '
            { w[NR] = b / 1e6 / ($1 * used); c[NR] = b / 1e6 / ($2 + $3); if ($4 > rss) rss = $4 }
            function sortv(a, n,   i, j, t) { for (i = 2; i <= n; i++) for (j = i; j > 1 && a[j-1] > a[j]; j--) { t = a[j]; a[j] = a[j-1]; a[j-1] = t } }
            END {
                n = NR; sortv(w, n); sortv(c, n)
                mid = int((n + 1) / 2)
                printf "%-22s %11.0f | %-10.0f %11.0f | %-10.0f %7.0f MiB\n", name, w[n], w[mid], c[n], c[mid], rss / 1024
            }' "$OUT/per-core.times"
    done
done
echo "load after: $(cut -d' ' -f1-3 /proc/loadavg); steal ticks after: $(steal)"
