# Shared set-up of the bench scripts (sourced by compare.sh and per_core.sh, not run): paths,
# the release build, the Python venv (pandas, numpy, pyarrow in bench/.venv, git-ignored,
# installed on first use) and the synthetic input of ROWS rows.
# Sets HERE ROOT ROWS PAIR OUT VENV PY BIN INPUT BYTES.
HERE="$(cd "$(dirname "${BASH_SOURCE[0]}")" && pwd)"
ROOT="$(cd "$HERE/.." && pwd)"
ROWS="${ROWS:-5000000}"
PAIR="${PAIR:-demo-al6061-on-cu}"
OUT="$HERE/out"
VENV="$HERE/.venv"
mkdir -p "$OUT"

if ! "$VENV/bin/python" -c 'import numpy, pandas, pyarrow' 2> /dev/null; then
    python3 -m venv "$VENV"
    "$VENV/bin/pip" install --quiet pandas numpy pyarrow
fi
PY="$VENV/bin/python"

(cd "$ROOT" && cargo build --release -p oblique-cli --quiet)
BIN="$ROOT/target/release/oblique"

INPUT="$OUT/interface-$ROWS.csv"
if [ ! -s "$INPUT" ]; then
    echo "generating $ROWS rows ..." >&2
    "$PY" "$HERE/gen_interface.py" "$ROWS" "$INPUT"
fi
BYTES=$(stat -c %s "$INPUT")
