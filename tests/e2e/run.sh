#!/usr/bin/env bash
# Builds the page and the release command line, installs playwright-core (from the lock file),
# and runs the end-to-end tests in headless Chromium. Exit status: node --test's.
set -euo pipefail
cd "$(dirname "$0")/../.."
scripts/build-web.sh
scripts/build-single.sh
cargo build --release --bin doublespar
cd tests/e2e
if [ -f package-lock.json ]; then
  npm ci --no-audit --no-fund --loglevel=error
else
  npm install --no-audit --no-fund --loglevel=error
fi
exec node --test
