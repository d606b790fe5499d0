#!/usr/bin/env bash
# Builds the page (installing the wasm target and the pinned wasm-bindgen CLI if missing) and
# serves www/ on 127.0.0.1 with Python's static file server, which needs no network.
# PORT=9000 scripts/serve.sh picks another port.
set -euo pipefail
cd "$(dirname "$0")/.."
scripts/build-web.sh
PORT="${PORT:-8080}"
echo
echo "Doublespar is at http://127.0.0.1:${PORT}/  (Ctrl-C stops the server)"
exec python3 -m http.server "$PORT" --bind 127.0.0.1 --directory www
