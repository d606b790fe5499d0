#!/usr/bin/env bash
# Runs every test of Doublespar: formatting and lints (native and wasm), the native unit,
# integration, property and golden tests, the independent numpy reference, the wasm size budget,
# the bindings in headless Chromium, the design worker's lanes under Node, the page end to end,
# and a bounded fuzzing run. Installs what it needs on the way
# (the wasm target and pinned wasm-bindgen CLI through scripts/build-web.sh, numpy in a venv under
# target/, playwright-core under tests/e2e/node_modules); Chromium, its driver, binaryen, Node.js
# with npm and Python's venv come from Debian's packages through scripts/install-test-tools.sh,
# which installs them as root when they are missing (and says what to install otherwise).
set -euo pipefail
cd "$(dirname "$0")/.."
# Raised from 300,000 when the page gained the face-by-face tracer (faces at any angle, +51 KB);
# see README, "Wasm size".
WASM_BUDGET=500000
echo "== tools"
scripts/install-test-tools.sh
echo "== format"
cargo fmt --all -- --check
echo "== clippy (native)"
cargo clippy --all-targets -- -D warnings
echo "== web build"
scripts/build-web.sh
echo "== clippy (wasm)"
cargo clippy --lib --target wasm32-unknown-unknown -- -D warnings
cargo clippy --lib --target wasm32-unknown-unknown --features design-worker -- -D warnings
# The design worker as built (128-bit SIMD on, as scripts/build-web.sh builds it): only then is
# the lane kernel's f64x2 code (src/optics/planned_trace.rs, module `pairs`) compiled.
CARGO_TARGET_DIR=target/design-wasm CARGO_TARGET_WASM32_UNKNOWN_UNKNOWN_RUSTFLAGS="-C target-feature=-reference-types,+simd128" \
  cargo clippy --lib --target wasm32-unknown-unknown --features design-worker -- -D warnings
echo "== wasm size budget"
SIZE=$(wc -c < www/pkg/doublespar_bg.wasm)
if [ "$SIZE" -gt "$WASM_BUDGET" ]; then
  echo "www/pkg/doublespar_bg.wasm is $SIZE bytes, over the budget of $WASM_BUDGET" >&2
  exit 1
fi
echo "$SIZE bytes (budget $WASM_BUDGET)"
echo "== native tests"
cargo test --all-targets
echo "== property tests at scale"
PROPTEST_CASES="${PROPTEST_CASES:-4000}" cargo test --test invariants
echo "== doc tests and documentation"
cargo test --doc
RUSTDOCFLAGS="-D warnings" cargo doc --no-deps --quiet
echo "== independent numpy reference"
tests/reference/run.sh
echo "== bindings in headless Chromium"
CHROMEDRIVER="${CHROMEDRIVER:-/usr/bin/chromedriver}" cargo test --target wasm32-unknown-unknown --test wasm
echo "== the design worker's lanes in WebAssembly (Node)"
node tests/worker_lanes.mjs
echo "== page end to end"
tests/e2e/run.sh
echo "== budgets: page load to first render and wasm size (the benchmark, enforcing those two)"
node scripts/bench-web.mjs --iterations 200 --mc-runs 5
echo "== fuzzing (bounded: FUZZ_SECONDS per target, default 45)"
FUZZ_SECONDS="${FUZZ_SECONDS:-45}" fuzz/run.sh
# Every suite above stops the script on failure (set -e), so reaching here means all passed.
echo "suites: $(grep -c '^echo "== ' "$0") passed, 0 failed"
