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
# Built without reference types so that wasm-bindgen emits nothing Debian's wasm-opt 108 cannot
# read (it predates table.fill); the flag is set here, not in .cargo/config.toml, so that the
# browser tests keep the toolchain's defaults.
CARGO_TARGET_WASM32_UNKNOWN_UNKNOWN_RUSTFLAGS="-C target-feature=-reference-types" \
  cargo build --lib --target wasm32-unknown-unknown --release
RAW=target/wasm32-unknown-unknown/release/doublespar.wasm
WORK=target/web-build
rm -rf "$WORK" && mkdir -p "$WORK" www/pkg
# Features the optimizer must accept. The target-features section is stripped first: the crate is
# built without reference types (above) so that wasm-bindgen emits nothing that
# Debian's wasm-opt 108 cannot read (its section would otherwise tell wasm-bindgen that std uses them).
FEATURES="--enable-reference-types --enable-bulk-memory --enable-nontrapping-float-to-int --enable-sign-ext --enable-mutable-globals --enable-multivalue"
if command -v wasm-opt >/dev/null 2>&1; then
  # shellcheck disable=SC2086
  wasm-opt $FEATURES --strip-target-features -o "$WORK/doublespar.wasm" "$RAW"
else
  cp "$RAW" "$WORK/doublespar.wasm"
fi
wasm-bindgen --target web --no-typescript --out-dir "$WORK/pkg" "$WORK/doublespar.wasm"
if command -v wasm-opt >/dev/null 2>&1; then
  # shellcheck disable=SC2086
  wasm-opt -Oz $FEATURES -o www/pkg/doublespar_bg.wasm "$WORK/pkg/doublespar_bg.wasm"
else
  echo "warning: wasm-opt not found; the wasm is not size-optimized" >&2
  cp "$WORK/pkg/doublespar_bg.wasm" www/pkg/doublespar_bg.wasm
fi
cp "$WORK/pkg/doublespar.js" www/pkg/doublespar.js
SIZE=$(wc -c < www/pkg/doublespar_bg.wasm)
GZ=$(gzip -9c www/pkg/doublespar_bg.wasm | wc -c)
echo "www/pkg/doublespar_bg.wasm: $SIZE bytes ($GZ bytes gzipped)"
