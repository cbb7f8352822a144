# Shared set-up of the bench scripts (sourced by compare.sh and per_core.sh, not run): paths,
# the release build, the Python venv (pandas, numpy, pyarrow and polars in bench/.venv,
# git-ignored, installed on first use; VENV=DIR uses another) and the synthetic input of ROWS
# rows (make_input N makes another).
# Sets HERE ROOT ROWS PAIR OUT VENV PY BIN INPUT BYTES.
HERE="$(cd "$(dirname "${BASH_SOURCE[0]}")" && pwd)"
ROOT="$(cd "$HERE/.." && pwd)"
ROWS="${ROWS:-5000000}"
PAIR="${PAIR:-demo-al6061-on-cu}"
OUT="$HERE/out"
VENV="${VENV:-$HERE/.venv}"
mkdir -p "$OUT"

if ! "$VENV/bin/python" -c 'import numpy, pandas, pyarrow, polars' 2> /dev/null; then
    python3 -m venv "$VENV"
    "$VENV/bin/pip" install --quiet pandas numpy pyarrow polars
fi
PY="$VENV/bin/python"

(cd "$ROOT" && cargo build --release -p oblique-cli --quiet)
BIN="$ROOT/target/release/oblique"

# make_input N: the synthetic input of N rows (generated once), into INPUT and BYTES.
make_input() {
    INPUT="$OUT/interface-$1.csv"
    if [ ! -s "$INPUT" ]; then
        echo "generating $1 rows ..." >&2
        "$PY" "$HERE/gen_interface.py" "$1" "$INPUT"
    fi
    BYTES=$(stat -c %s "$INPUT")
}
make_input "$ROWS"
