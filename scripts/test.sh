#!/usr/bin/env bash
# Runs every test of Doublespar: formatting, lints, unit, integration and property tests, and the
# command line's golden outputs, and the independent numpy reference (which makes a Python venv
# under target/ and installs numpy into it from the registry).
set -euo pipefail
cd "$(dirname "$0")/.."
echo "== format"
cargo fmt --all -- --check
echo "== clippy"
cargo clippy --all-targets -- -D warnings
echo "== tests"
cargo test --all-targets
echo "== doc tests"
cargo test --doc
echo "== independent numpy reference"
tests/reference/run.sh
