#!/usr/bin/env python3
"""The output Stokes vector of a traced spectrum against two independent polarization calculi.

For four set-ups of plane-parallel plates at normal incidence (a quartz plate between polarizers,
a calcite and a quartz plate with an ideal rotator between them and partially polarized input,
right-circular input through a sapphire and an MgF2 plate, an uncoated YVO4 plate lit by
elliptical light) the script asks `doublespar trace` for the scenario's `spectrum` and recomputes
every wavelength's output Stokes vector [S0, S1, S2, S3] and degree of polarization twice:

* plain numpy Jones calculus in the project's conventions (shared/CONVENTIONS.md: time
  dependence exp(i(k.r - wt)), S3 = 2 Im(Ex Ey*), right-handed when S3 > 0): each crystal is
  R(phi) diag(t_e e^{i Gamma}, t_o) R(-phi), the e-mode along the optic axis' azimuth phi,
  Gamma = 2 pi (n_e - n_o) d / lambda (the slow mode lags: Yariv & Yeh, Optical Waves in
  Crystals, ch. 5), the output coherency matrix M C M^H of the input's;
* py-pol (https://pypi.org/project/py-pol/, pinned in run.sh), whose own Jones convention is the
  complex conjugate of the project's: its Mueller matrices of a linear retarder
  (`retarder_linear`, fast axis = the o-mode's direction), a linear diattenuator-retarder for the
  uncoated faces, a perfect polarizer (`diattenuator_perfect`) and a circular retarder for the
  rotator, multiplied onto its own Stokes vector of the input (`linear_light`,
  `circular_light`, `general_azimuth_ellipticity`, `from_components`). Only its construction
  functions are used: its ellipse-angle functions fail under numpy 2.4.

The indices n_o(lambda), n_e(lambda) are the published dispersion formulas (Ghosh 1999 for quartz
and calcite, Malitson & Dodge for sapphire, Dodge 1984 for MgF2, Shi et al. 2001 for YVO4),
evaluated in their textbook form by trace_reference.py's `material_indices`, the one input shared
with the crate; they are checked against the indices the command line reports at the scenario's
own wavelength. Uncoated faces pass each mode with the normal-incidence Fresnel power
transmission 4n/(1+n)^2 per face (Born & Wolf, Principles of Optics, sec. 1.5.3), ghosts not
traced, as the contract states.

Each Stokes component must agree to 1e-10 (absolute; the input power is 1) with both methods.
Exit status 1 on any disagreement; the last line reads "N passed, M failed" (in set-ups) after a
line with the worst difference of each method.
"""
import argparse
import json
import math
import subprocess
import sys
import warnings

import numpy as np

from trace_reference import material_indices

warnings.filterwarnings("ignore")
from py_pol.mueller import Mueller  # noqa: E402
from py_pol.stokes import Stokes  # noqa: E402

TOL = 1e-10


def crystal(material, thickness_mm, azimuth_deg):
    """An a-cut plate (optic axis in the face, at `azimuth_deg`), optical activity off."""
    el = {"kind": "crystal", "material": material, "thickness_mm": thickness_mm,
          "axis": {"tilt_deg": 90, "azimuth_deg": azimuth_deg}}
    if material == "quartz":
        el["optical_activity"] = False
    return el


# (name, input polarization, interface losses, elements, spectrum)
SETUPS = [
    ("quartz 0.5 mm at 22.5 deg between polarizers at 0 and 45 deg",
     {"kind": "linear", "azimuth_deg": 0}, "ideal",
     [crystal("quartz", 0.5, 22.5), {"kind": "polarizer", "transmission_axis_deg": 45}],
     {"from_nm": 400, "to_nm": 800, "points": 201}),
    ("calcite 0.02 mm, rotator 30 deg, quartz 0.3 mm; partially polarized input",
     {"kind": "stokes", "stokes": [1.0, 0.3, -0.2, 0.4]}, "ideal",
     [crystal("calcite", 0.02, 30), {"kind": "rotator", "angle_deg": 30}, crystal("quartz", 0.3, -15)],
     {"from_nm": 450, "to_nm": 700, "points": 126}),
    ("right circular through sapphire 0.2 mm and MgF2 0.5 mm",
     {"kind": "circular", "handedness": "right"}, "ideal",
     [crystal("sapphire", 0.2, 60), crystal("mgf2", 0.5, 0)],
     {"from_nm": 300, "to_nm": 900, "points": 121}),
    ("uncoated YVO4 0.1 mm at 40 deg, elliptical input",
     {"kind": "elliptical", "azimuth_deg": 20, "ellipticity_deg": 10}, "uncoated",
     [crystal("yvo4", 0.1, 40)],
     {"from_nm": 500, "to_nm": 1300, "points": 161}),
]


def traced(binary, pol, losses, elements, spectrum):
    doc = {"version": 2, "wavelength_nm": 0.5 * (spectrum["from_nm"] + spectrum["to_nm"]),
           "interface_losses": losses, "beam": {"polarization": pol},
           "elements": elements, "spectrum": spectrum}
    out = subprocess.run([binary, "trace", "-"], input=json.dumps(doc), capture_output=True,
                         text=True, check=True).stdout
    return doc, json.loads(out)


def input_stokes(pol):
    """The input's Stokes vector from its description (conventions: chi > 0 right-handed)."""
    if pol["kind"] == "stokes":
        return np.array(pol["stokes"], dtype=float)
    if pol["kind"] == "circular":
        return np.array([1.0, 0.0, 0.0, 1.0 if pol["handedness"] == "right" else -1.0])
    psi = math.radians(pol["azimuth_deg"])
    chi = math.radians(pol.get("ellipticity_deg", 0.0))
    return np.array([1.0, math.cos(2 * chi) * math.cos(2 * psi), math.cos(2 * chi) * math.sin(2 * psi),
                     math.sin(2 * chi)])


def fresnel_amplitude(n, losses):
    """A mode's field factor through both faces: the square root of 4n/(1+n)^2, twice."""
    return 4 * n / (1 + n) ** 2 if losses == "uncoated" else 1.0


def plate(el, nm):
    """(n_o, n_e, Gamma, azimuth in rad) of a crystal element at `nm` (a number or an array)."""
    no, ne = np.vectorize(lambda x: material_indices(el["material"], x))(nm)
    gamma = 2 * np.pi * (ne - no) * el["thickness_mm"] * 1e6 / nm
    return no, ne, gamma, math.radians(el["axis"]["azimuth_deg"])


def rot(a):
    c, s = math.cos(a), math.sin(a)
    return np.array([[c, -s], [s, c]], dtype=complex)


def numpy_stokes(pol, losses, elements, nm):
    """The output Stokes vector by plain Jones calculus: M C M^H."""
    m = np.eye(2, dtype=complex)
    for el in elements:
        if el["kind"] == "crystal":
            no, ne, gamma, phi = plate(el, nm)
            d = np.diag([fresnel_amplitude(ne, losses) * np.exp(1j * gamma), fresnel_amplitude(no, losses)])
            j = rot(phi) @ d @ rot(-phi)
        elif el["kind"] == "polarizer":
            a = math.radians(el["transmission_axis_deg"])
            j = rot(a) @ np.diag([1.0, 0.0]).astype(complex) @ rot(-a)
        else:  # rotator: the azimuth turns from x toward y by the angle
            j = rot(math.radians(el["angle_deg"]))
        m = j @ m
    s = input_stokes(pol)
    # C = <E E^H>: C_xy = <Ex Ey*> = (S2 + i S3) / 2.
    c = 0.5 * np.array([[s[0] + s[1], s[2] + 1j * s[3]], [s[2] - 1j * s[3], s[0] - s[1]]])
    o = m @ c @ m.conj().T
    return np.array([(o[0, 0] + o[1, 1]).real, (o[0, 0] - o[1, 1]).real, 2 * o[0, 1].real, 2 * o[0, 1].imag])


def pypol_input(pol):
    if pol["kind"] == "linear":
        return Stokes("in").linear_light(azimuth=math.radians(pol["azimuth_deg"]))
    if pol["kind"] == "circular":
        return Stokes("in").circular_light(kind="d" if pol["handedness"] == "right" else "l")
    if pol["kind"] == "elliptical":
        return Stokes("in").general_azimuth_ellipticity(azimuth=math.radians(pol["azimuth_deg"]),
                                                        ellipticity=math.radians(pol["ellipticity_deg"]))
    return Stokes("in").from_components(pol["stokes"])


def pypol_stokes(pol, losses, elements, nm):
    """The output Stokes vectors at the wavelengths `nm` (an array) by py-pol's Mueller
    matrices, one row per wavelength."""
    s = pypol_input(pol)
    for el in elements:
        if el["kind"] == "crystal":
            no, ne, gamma, phi = plate(el, nm)
            # Fast axis: the o-mode's direction, phi + 90 deg; the e-mode lags it by Gamma.
            if losses == "uncoated":
                m = Mueller("plate").diattenuator_retarder_linear(
                    p1=fresnel_amplitude(no, losses), p2=fresnel_amplitude(ne, losses), R=gamma,
                    azimuth=phi + math.pi / 2)
            else:
                m = Mueller("plate").retarder_linear(R=gamma, azimuth=phi + math.pi / 2)
        elif el["kind"] == "polarizer":
            m = Mueller("polarizer").diattenuator_perfect(azimuth=math.radians(el["transmission_axis_deg"]))
        else:
            # py-pol's circular retarder of the left kind turns the azimuth from x toward y by
            # half its retardance (checked in `self_check`).
            m = Mueller("rotator").retarder_circular(R=2 * math.radians(el["angle_deg"]), kind="l")
        s = m * s
    return np.asarray(s.M, dtype=float).reshape(4, -1).T * np.ones((len(nm), 1))


def self_check():
    """What the py-pol calls above mean, on states whose answer is known by hand."""
    x = Stokes("x").linear_light(azimuth=0)
    turned = np.asarray((Mueller("r").retarder_circular(R=math.radians(60), kind="l") * x).M).ravel()
    assert np.allclose(turned, [1, math.cos(math.radians(60)), math.sin(math.radians(60)), 0], atol=1e-12), turned
    # The conventions' worked example: +45 deg linear through a quarter-wave retarder with its
    # fast axis along x leaves left-handed circular, S3 = -S0.
    q = Mueller("q").retarder_linear(R=math.pi / 2, azimuth=0) * Stokes("d").linear_light(azimuth=math.pi / 4)
    assert np.allclose(np.asarray(q.M).ravel(), [1, 0, 0, -1], atol=1e-12), q.M
    right = np.asarray(Stokes("r").circular_light(kind="d").M).ravel()
    assert right[3] > 0.99, right
    for pol in [{"kind": "elliptical", "azimuth_deg": 20, "ellipticity_deg": 10}, {"kind": "linear", "azimuth_deg": 0}]:
        assert np.allclose(np.asarray(pypol_input(pol).M).ravel(), input_stokes(pol), atol=1e-12), pol


def main():
    p = argparse.ArgumentParser()
    p.add_argument("--bin", required=True)
    a = p.parse_args()
    self_check()
    passed = failed = compared = 0
    worst = {"numpy": 0.0, "py-pol": 0.0, "dop": 0.0, "indices": 0.0}
    for name, pol, losses, elements, spectrum in SETUPS:
        doc, r = traced(a.bin, pol, losses, elements, spectrum)
        s = r["spectrum"]
        wl = np.array(s["wavelength_nm"], dtype=float)
        ok = np.allclose(wl, np.linspace(spectrum["from_nm"], spectrum["to_nm"], spectrum["points"]),
                         rtol=0, atol=1e-9)
        # The shared input: the indices at the scenario's own wavelength, as the command line
        # reports them, against the formula evaluated here.
        for el, rep in zip(elements, r["elements"]):
            if el["kind"] == "crystal":
                no, ne = material_indices(el["material"], doc["wavelength_nm"])
                worst["indices"] = max(worst["indices"], abs(rep["no"] - no), abs(rep["ne"] - ne))
        diff = {"numpy": 0.0, "py-pol": 0.0, "dop": 0.0}
        by_pypol = pypol_stokes(pol, losses, elements, wl)
        for i, nm in enumerate(wl):
            got = s["stokes"][i]
            if got is None:
                ok = False
                continue
            got = np.array(got, dtype=float)
            ref = numpy_stokes(pol, losses, elements, nm)
            diff["numpy"] = max(diff["numpy"], float(np.max(np.abs(got - ref))))
            diff["py-pol"] = max(diff["py-pol"], float(np.max(np.abs(got - by_pypol[i]))))
            ok &= abs(s["transmission"][i] - got[0]) <= TOL
            if ref[0] > 1e-9:
                dop = math.sqrt(ref[1] ** 2 + ref[2] ** 2 + ref[3] ** 2) / ref[0]
                diff["dop"] = max(diff["dop"], abs(s["degree_of_polarization"][i] - dop))
            compared += 1
        ok &= max(diff.values()) <= TOL
        for k, v in diff.items():
            worst[k] = max(worst[k], v)
        print(f"{'ok  ' if ok else 'FAIL'} {name:72s} {len(wl):3d} wavelengths, largest difference "
              f"numpy {diff['numpy']:.1e}, py-pol {diff['py-pol']:.1e}, degree of polarization {diff['dop']:.1e}")
        passed += ok
        failed += not ok
    ok_indices = worst["indices"] <= 1e-12
    if not ok_indices:
        failed += 1
    print(f"{compared} wavelengths: largest Stokes difference numpy {worst['numpy']:.1e}, py-pol "
          f"{worst['py-pol']:.1e} (tolerance {TOL:.0e}); degree of polarization {worst['dop']:.1e}; "
          f"indices at the set-ups' own wavelengths {worst['indices']:.1e}{'' if ok_indices else ' FAIL'}")
    print(f"{passed} passed, {failed} failed")
    sys.exit(1 if failed else 0)


if __name__ == "__main__":
    main()
