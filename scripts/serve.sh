#!/usr/bin/env bash
# Builds Doublespar and shows the demo scenario.
# Until the page exists (issue 3), this runs the command line on the demo scenario and prints the
# readable table; the JSON form is one flag away (drop --table).
set -euo pipefail
cd "$(dirname "$0")/.."
cargo build --release --bin doublespar
./target/release/doublespar trace examples/demo.json --table
