#!/usr/bin/env bash
# Builds the page's WebAssembly into www/pkg (ignored by git), installing what is missing:
# the wasm32 target, the wasm-bindgen CLI at exactly the version Cargo.toml pins, and (where apt
# is available) Debian's binaryen for wasm-opt. Prints the wasm size and its gzip size.
set -euo pipefail
cd "$(dirname "$0")/.."
WB_VERSION="$(sed -n 's/^wasm-bindgen = "=\(.*\)"/\1/p' Cargo.toml)"
if ! rustup target list --installed | grep -qx wasm32-unknown-unknown; then
  rustup target add wasm32-unknown-unknown
fi
if [ "$(wasm-bindgen --version 2>/dev/null | awk '{print $2}')" != "$WB_VERSION" ]; then
  echo "installing wasm-bindgen-cli $WB_VERSION (a few minutes, once)"
  cargo install wasm-bindgen-cli --version "=$WB_VERSION"
fi
if ! command -v wasm-opt >/dev/null 2>&1 && command -v apt-get >/dev/null 2>&1 && [ "$(id -u)" = 0 ]; then
  (apt-get install -y binaryen >/dev/null 2>&1 || (apt-get update >/dev/null && apt-get install -y binaryen >/dev/null)) || true
fi
# Features the optimizer must accept. The crate is built without reference types so that
# wasm-bindgen emits nothing Debian's wasm-opt 108 cannot read (it predates table.fill), and the
# target-features section is stripped before wasm-bindgen (it would otherwise tell wasm-bindgen
# that std uses them). The flag is set here, not in .cargo/config.toml, so that the browser tests
# keep the toolchain's defaults.
FEATURES="--enable-reference-types --enable-bulk-memory --enable-nontrapping-float-to-int --enable-sign-ext --enable-mutable-globals --enable-multivalue --enable-simd"

# build_module OUT_DIR CARGO_TARGET_DIR PROFILE [cargo feature flags…]: one optimized module in
# www/OUT_DIR.
build_module() {
  local out="$1" tdir="$2" profile="$3" flags="-C target-feature=-reference-types"
  shift 3
  # The speed-tuned module may use WebAssembly SIMD (fixed-width 128-bit), which its loops
  # auto-vectorize into; the size-tuned page module does not vectorize, so it leaves SIMD off.
  if [ "$profile" = web-fast ]; then flags="$flags,+simd128"; fi
  CARGO_TARGET_DIR="$tdir" CARGO_TARGET_WASM32_UNKNOWN_UNKNOWN_RUSTFLAGS="$flags" \
    cargo build --lib --target wasm32-unknown-unknown --profile "$profile" "$@"
  local raw="$tdir/wasm32-unknown-unknown/$profile/doublespar.wasm"
  local work="target/web-build/$out"
  rm -rf "$work" && mkdir -p "$work" "www/$out"
  if command -v wasm-opt >/dev/null 2>&1; then
    # shellcheck disable=SC2086
    wasm-opt $FEATURES --strip-target-features -o "$work/doublespar.wasm" "$raw"
  else
    cp "$raw" "$work/doublespar.wasm"
  fi
  wasm-bindgen --target web --no-typescript --out-dir "$work/pkg" "$work/doublespar.wasm"
  if command -v wasm-opt >/dev/null 2>&1; then
    # shellcheck disable=SC2086
    # Two facts of these modules let the optimizer fold more (about 3.5 KB off the page's):
    # memory starts zeroed (the module defines its own memory, none is imported), and nothing
    # lives in its lowest 1 KiB (Rust places the 1 MiB stack first, growing down to address 0,
    # with the data above it; only a stack already overflowed would reach that KiB).
    wasm-opt -Oz --low-memory-unused --zero-filled-memory $FEATURES -o "www/$out/doublespar_bg.wasm" "$work/pkg/doublespar_bg.wasm"
  else
    echo "warning: wasm-opt not found; the wasm is not size-optimized" >&2
    cp "$work/pkg/doublespar_bg.wasm" "www/$out/doublespar_bg.wasm"
  fi
  cp "$work/pkg/doublespar.js" "www/$out/doublespar.js"
  local size gz
  size=$(wc -c < "www/$out/doublespar_bg.wasm")
  gz=$(gzip -9c "www/$out/doublespar_bg.wasm" | wc -c)
  echo "www/$out/doublespar_bg.wasm: $size bytes ($gz bytes gzipped)"
}

# The page's module, and the design worker's (the solvers and the Monte Carlo run, off the main
# thread), each in its own target folder so that both stay cached.
build_module pkg target web
build_module pkg-design target/design-wasm web-fast --features design-worker
