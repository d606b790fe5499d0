#!/usr/bin/env python3
"""Independent evaluation of the crystal catalogue's indices and group indices.

Runs `doublespar materials --json --at NM` at several wavelengths and compares every principal
index and group index it lists with the same published formula as implemented by the ndispers
library (PyPI, version pinned in run.sh), which evaluates the formulas symbolically (sympy) and
takes the group index from its own symbolic derivative. What is shared is only the published
formula: the coefficients were compared by hand, class by class, with the catalogue's
(tests/reference/README.md lists them).

Crystals compared (catalogue key: ndispers class, formula):
  ktp      KTP_xy                  Kato & Takaoka, Appl. Opt. 41, 5040 (2002)
  lbo      LBO_KK1994_xy           Kato, IEEE J. Quantum Electron. 30, 2950 (1994)
  bibo     BiBO_Miyata2009_xy      Miyata, Umemura & Kato, Opt. Lett. 34, 500 (2009)
  sapphire Sapphire                Malitson & Dodge (1972)
  mgf2     MgF2                    Dodge, Appl. Opt. 23, 1980 (1984)
  linbo3   CLN_Zelmon1997          Zelmon, Small & Jundt, JOSA B 14, 3319 (1997)
  yvo4     YVO4                    Shi, Zhang & Shen, J. Synth. Cryst. 30, 85 (2001)
  alpha-bbo AlphaBBO               the supplier formula (no journal source, in both)
Calcite, quartz and rutile are not compared here: the library holds other formulas for calcite
and quartz (and its quartz n_e has a mistyped coefficient), and none for rutile.

Principal axes from the library's principal-plane classes: in the xy plane the o-wave is
polarized along z (n_z), and the e-wave has n_y at phi = 0 and n_x at phi = pi/2. For a uniaxial
crystal n_o is the o-wave and n_e the e-wave at theta = pi/2. The group index is the library's
`ng` at the same angle and polarization. Temperature 20 degC, where the library's thermo-optic
terms for KTP and LBO vanish.

Usage: material_reference.py [--bin PATH] [--verbose]
Exit status 0 when every value agrees to TOL, 1 otherwise. The last line is "N passed, M failed"
(counted in compared values).
"""

import argparse
import json
import math
import subprocess
import sys
import warnings

import ndispers

TOL = 1e-9  # absolute, on indices and group indices (both formulas are the same; rounding ~1e-15)
WAVELENGTHS_NM = [350.0, 450.0, 532.0, 632.8, 800.0, 1064.0, 1300.0, 1550.0, 2000.0, 2500.0, 3000.0]
T_DEGC = 20.0

C = ndispers.media.crystals
BIAXIAL = {"ktp": C.KTP_xy, "lbo": C.LBO_KK1994_xy, "bibo": C.BiBO_Miyata2009_xy}
UNIAXIAL = {
    "sapphire": C.Sapphire,
    "mgf2": C.MgF2,
    "linbo3": C.CLN_Zelmon1997,
    "yvo4": C.YVO4,
    "alpha-bbo": C.AlphaBBO,
}


def library_values(key, um):
    """(names, indices, group indices) of the library for catalogue key `key` at `um` µm."""
    if key in BIAXIAL:
        c = BIAXIAL[key]()
        args = [(math.pi / 2, "e"), (0.0, "e"), (0.0, "o")]  # n_x, n_y, n_z in the xy plane
        names = ["nx", "ny", "nz"]
    else:
        c = UNIAXIAL[key]()
        args = [(math.pi / 2, "o"), (math.pi / 2, "e")]  # n_o, n_e (theta = 90 deg)
        names = ["no", "ne"]
    n = [float(c.n(um, a, T_DEGC, pol=p)) for a, p in args]
    ng = [float(c.ng(um, a, T_DEGC, pol=p)) for a, p in args]
    return names, n, ng


def listing(binary, nm):
    out = subprocess.run(
        [binary, "materials", "--json", "--at", repr(nm)], capture_output=True, text=True, check=True
    )
    return {row["key"]: row for row in json.loads(out.stdout)["materials"]}


def main():
    ap = argparse.ArgumentParser(description=__doc__.split("\n")[0])
    ap.add_argument("--bin", default="target/release/doublespar")
    ap.add_argument("--verbose", action="store_true")
    opts = ap.parse_args()
    warnings.simplefilter("ignore")  # the library warns that BiBO has no thermo-optic terms

    passed = failed = 0
    worst = {}  # key -> (largest |difference| of an index, of a group index)
    for nm in WAVELENGTHS_NM:
        rows = listing(opts.bin, nm)
        for key in list(BIAXIAL) + list(UNIAXIAL):
            row = rows[key]
            lo, hi = row["range_nm"]
            if not lo <= nm <= hi:
                continue
            names, n, ng = library_values(key, nm * 1e-3)
            ours_n = [row[name] for name in names]
            ours_ng = row["group_indices"]
            w = worst.setdefault(key, [0.0, 0.0, 0])
            w[2] += 1
            for what, ours, theirs, slot in [("index", ours_n, n, 0), ("group index", ours_ng, ng, 1)]:
                for name, a, b in zip(names, ours, theirs):
                    d = abs(a - b)
                    w[slot] = max(w[slot], d)
                    if d <= TOL:
                        passed += 1
                    else:
                        failed += 1
                        print(f"MISMATCH {key} {name} {what} at {nm} nm: doublespar {a!r}, ndispers {b!r}, "
                              f"difference {d:.3e}")
                    if opts.verbose:
                        print(f"{key:9} {nm:7.1f} nm {name} {what:11}: {a:.12f} {b:.12f} {d:.1e}")

    print(f"ndispers {getattr(ndispers, '__version__', '?')}; largest difference per crystal "
          f"(tolerance {TOL:g}):")
    for key, (dn, dng, count) in worst.items():
        print(f"  {key:9} {count:2} wavelengths  index {dn:.1e}  group index {dng:.1e}")
    print(f"{passed} passed, {failed} failed")
    return 0 if failed == 0 and passed > 0 else 1


if __name__ == "__main__":
    sys.exit(main())
