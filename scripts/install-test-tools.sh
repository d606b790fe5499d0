#!/usr/bin/env bash
# Installs the system tools that scripts/test.sh needs and does not build itself: Chromium and its
# driver (browser tests), binaryen (wasm-opt), Node.js with npm (end-to-end tests) and Python's
# venv module (the numpy reference), all from Debian's packages, plus the Rust components rustfmt
# and clippy. Runs apt-get only for what is missing, and only as root; otherwise it names the
# packages to install and fails. Cargo-installed tools (the pinned wasm-bindgen CLI, cargo-fuzz)
# are installed by the scripts that use them.
set -euo pipefail
rustup component add rustfmt clippy >/dev/null 2>&1 || true
missing=()
command -v chromium >/dev/null 2>&1 || missing+=(chromium)
command -v chromedriver >/dev/null 2>&1 || missing+=(chromium-driver)
command -v wasm-opt >/dev/null 2>&1 || missing+=(binaryen)
command -v node >/dev/null 2>&1 || missing+=(nodejs)
command -v npm >/dev/null 2>&1 || missing+=(npm)
python3 -c 'import ensurepip, venv' >/dev/null 2>&1 || missing+=(python3-venv)
if [ ${#missing[@]} -eq 0 ]; then
  echo "all present: chromium, chromedriver, wasm-opt, node, npm, python3 venv"
  exit 0
fi
if [ "$(id -u)" != 0 ] || ! command -v apt-get >/dev/null 2>&1; then
  echo "missing: ${missing[*]}; install these Debian packages (as root: apt-get install ${missing[*]})" >&2
  exit 1
fi
echo "installing from Debian's packages: ${missing[*]}"
apt-get update -qq
DEBIAN_FRONTEND=noninteractive apt-get install -y -qq "${missing[@]}" >/dev/null
