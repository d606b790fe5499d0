#!/usr/bin/env bash
# Builds the page and runs the web benchmark (scripts/bench-web.mjs) in headless Chromium.
# Arguments go to the benchmark, e.g. --iterations 500. Exit status: the benchmark's (1 when the
# wasm is over its size budget).
set -euo pipefail
cd "$(dirname "$0")/.."
scripts/build-web.sh
if [ ! -d tests/e2e/node_modules/playwright-core ]; then
  (cd tests/e2e && npm ci --no-audit --no-fund --loglevel=error)
fi
exec node scripts/bench-web.mjs "$@"
