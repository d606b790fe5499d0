#!/usr/bin/env bash
# Independent numerical reference check of `doublespar trace` (see tests/reference/README.md).
# Creates a Python venv at target/refenv with numpy (once), builds the release binary and runs
# tests/reference/trace_reference.py. Extra arguments go to the script (e.g. --seed 7 --count 1000).
# Exit status: the script's (0 when every scenario agrees).
set -euo pipefail
cd "$(dirname "$0")/../.."

venv=target/refenv
if [ ! -x "$venv/bin/python" ]; then
    python3 -m venv "$venv"
fi
if ! "$venv/bin/python" -c "import numpy" >/dev/null 2>&1; then
    "$venv/bin/python" -m pip install --quiet --disable-pip-version-check numpy
fi

cargo build --release --quiet --bin doublespar
bin="${CARGO_TARGET_DIR:-target}/release/doublespar"

# The two-wedge splitter, face by face, against the benchmark's numpy implementation of the same
# exact trace (20 incidences, every ray's direction, exit point and power to 1e-9).
DOUBLESPAR_BIN="$bin" env -u OPENBLAS_CORETYPE -u OPENBLAS_L2_SIZE "$venv/bin/python" scripts/bench/splitter_numpy.py --check-only
exec "$venv/bin/python" tests/reference/trace_reference.py --bin "$bin" "$@"
