#!/usr/bin/env bash
# Writes target/single/doublespar.html: the whole page (style, script, both wasm uses, the design
# worker) in one file that works when opened from disk, with no server and no network. Needs
# www/pkg-design built by scripts/build-web.sh (run that first) and Node 18 or later.
# Prints the file's size; fails if it is over its budget (see BUDGET in build-single.mjs).
set -euo pipefail
cd "$(dirname "$0")/.."
if [ ! -f www/pkg-design/doublespar_bg.wasm ] || [ ! -f www/pkg-design/doublespar.js ]; then
  echo "build-single: www/pkg-design is missing; run scripts/build-web.sh first" >&2
  exit 1
fi
exec node scripts/build-single.mjs
