#!/bin/sh
# Whole-process timings of the teaching and aiming commands (issue 16), against `check`.
# Runs each command RUNS times (default 15) after 3 warm-up runs and prints the best, the median
# and the mean wall time in ms, with the load average before and after. Release build.
# Figures and the machine: docs/performance.md. On a shared VM single runs move by 10-40 %.
set -eu
cd "$(dirname "$0")/.."
RUNS=${RUNS:-15}
cargo build --release -q -p oblique-cli
O=target/release/oblique
LIB=$(mktemp -d)
cp crates/oblique-cli/tests/data/two-pairs.ron "$LIB"/
t() {
  label=$1; shift
  i=0; while [ $i -lt 3 ]; do "$@" >/dev/null 2>&1; i=$((i + 1)); done
  i=0; : > "$LIB/times"
  while [ $i -lt "$RUNS" ]; do
    a=$(date +%s%N); "$@" >/dev/null 2>&1; b=$(date +%s%N)
    echo $(( (b - a) / 1000 )) >> "$LIB/times"; i=$((i + 1))
  done
  sort -n "$LIB/times" | awk -v l="$label" '{v[NR]=$1; s+=$1} END {printf "%-58s best %7.1f ms  median %7.1f ms  mean %7.1f ms\n", l, v[1]/1000, v[int((NR+1)/2)]/1000, s/NR/1000}'
}
echo "load before: $(cut -d' ' -f1-3 /proc/loadavg)"
t "check --pair demo (450 m/s, 10 deg) --json" $O check --pair demo-al6061-on-cu --velocity 450m/s --angle 10deg --json
t "explain --pair demo (450 m/s, 10 deg) --json" $O explain --pair demo-al6061-on-cu --velocity 450m/s --angle 10deg --json
t "check, supersonic Cu on Cu (5000 m/s Vc, 6 deg)" $O check --flyer cu-c11000 --parent cu-c11000 --flyer-thickness 2mm --collision-velocity 5000m/s --angle 6deg --convention bisector --json
t "explain, supersonic Cu on Cu (5000 m/s Vc, 6 deg)" $O explain --flyer cu-c11000 --parent cu-c11000 --flyer-thickness 2mm --collision-velocity 5000m/s --angle 6deg --convention bisector --json
t "trade, 200 angles at 450 m/s, table" $O trade --pair demo-al6061-on-cu --velocity 450m/s --angle-range 2deg..30deg --steps 200
t "trade, 200 angles at 450 m/s, --json" $O trade --pair demo-al6061-on-cu --velocity 450m/s --angle-range 2deg..30deg --steps 200 --json
t "trade, 200 velocities at 10 deg, SVG plot" $O trade --pair demo-al6061-on-cu --angle 10deg --velocity-range 200m/s..800m/s --steps 200 --plot "$LIB/t.svg"
t "aim --pair demo (window)" $O aim --pair demo-al6061-on-cu
t "aim, constructed two-pair window" $O --library "$LIB" aim --pair constructed-two-pairs --velocity-sd 20m/s --angle-sd 1deg --model-uncertainty off
t "aim, 10^4 set-ups (10 coils x 10 U0 x 10 g x 10 chamfers)" $O aim --pair demo-al6061-on-cu --machine harbourside-bank-300uf --coil-bore 21mm --coil-length 20mm..60mm --coil-inductance 20nH --tube-outer-radius 20mm --charge-voltage 6kV..12kV --standoff 1mm..3mm --chamfer 4deg..22deg --steps 10
t "aim, 10^4 set-ups (10 bores x 10 U0 x 10 g x 10 chamfers)" $O aim --pair demo-al6061-on-cu --machine harbourside-bank-300uf --coil-bore 20.5mm..25mm --coil-length 20mm --coil-inductance 20nH --tube-outer-radius 20mm --charge-voltage 6kV..12kV --standoff 1mm..3mm --chamfer 4deg..22deg --steps 10
echo "load after: $(cut -d' ' -f1-3 /proc/loadavg)"
rm -rf "$LIB"
