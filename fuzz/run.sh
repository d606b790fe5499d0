#!/usr/bin/env bash
# Runs both fuzz targets for a bounded time each (FUZZ_SECONDS, default 60), from the seed corpora
# in fuzz/seeds, with the nightly toolchain and cargo-fuzz (installed here if missing).
# Exit status: non-zero when a target finds a crash (its input is saved under fuzz/artifacts).
set -euo pipefail
cd "$(dirname "$0")"
SECONDS_EACH="${FUZZ_SECONDS:-60}"
if ! cargo +nightly --version >/dev/null 2>&1; then
  echo "fuzz: no nightly toolchain on this machine; skipping" >&2
  exit 0
fi
if ! cargo +nightly fuzz --version >/dev/null 2>&1; then
  if ! cargo install cargo-fuzz; then
    echo "fuzz: cargo-fuzz could not be installed here; skipping the fuzzing run" >&2
    exit 0
  fi
fi
for target in scenario design; do
  mkdir -p "corpus/$target"
  cargo +nightly fuzz run "$target" "corpus/$target" "seeds/$target" -- \
    -max_total_time="$SECONDS_EACH" -max_len=4096 -rss_limit_mb=2048 -print_final_stats=1
done
