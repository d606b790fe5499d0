#!/usr/bin/env bash
# Native benchmarks of the core beside the numpy baseline and the same sweep in WebAssembly (under
# Node), measured side by side in one run, with the ratios. (The page's figures come from scripts/bench-web.sh.) Figures are reported, never
# asserted. numpy is installed into the venv under target/ (as the reference tests do).
set -euo pipefail
cd "$(dirname "$0")/.."
venv=target/refenv
[ -x "$venv/bin/python" ] || python3 -m venv "$venv"
"$venv/bin/python" -c "import numpy" 2>/dev/null || "$venv/bin/python" -m pip install --quiet numpy
native=$(cargo bench --quiet --bench core 2>/dev/null | tee /dev/stderr | tail -1)
# OPENBLAS_* slow numpy down on some processors here; unset for this command only.
baseline=$(env -u OPENBLAS_CORETYPE -u OPENBLAS_L2_SIZE "$venv/bin/python" scripts/bench/walkoff_numpy.py)
echo "$baseline"
[ -f www/pkg-design/doublespar_bg.wasm ] || scripts/build-web.sh >/dev/null
wasm=$(node scripts/bench/wasm_sweep.mjs)
echo "$wasm"
python3 - "$native" "$baseline" "$wasm" <<'PY'
import json, sys
n, b, w = json.loads(sys.argv[1]), json.loads(sys.argv[2]), json.loads(sys.argv[3])
one = n["walkoff_sweep_one_thread_1e6_ms"]
print(f"walk-off sweep, 10^6 points, one thread: native {one:.2f} ms, WebAssembly under Node {w['walkoff_sweep_1e6_ms']:.2f} ms: wasm takes {w['walkoff_sweep_1e6_ms'] / one:.2f}x the native time")
assert abs(n["walkoff_sweep_checksum"] - b["walkoff_sweep_checksum"]) < 1e-6 * abs(b["walkoff_sweep_checksum"]), "the two sweeps disagree"
base = b["walkoff_sweep_1e6_ms"]
for label, ms in (("2 threads", n["walkoff_sweep_1e6_ms"]), ("one thread", one)):
    print(f"walk-off sweep, 10^6 points: native on {label} {ms:.2f} ms, numpy {base:.2f} ms: native is {base / ms:.1f}x as fast (target 5x)")
PY
