#!/usr/bin/env python3
"""The white-light colour of `doublespar trace` against an independent colorimetry library.

For plates between polarizers (the interference colours of a quartz plate from 0 to about three
orders, a calcite plate, a two-plate stack and an open set-up) the script asks doublespar for the
scenario's spectrum at the 81 wavelengths of the CIE tables (380-780 nm at 5 nm, given in air, as
the tables are) and for its `spectrum.white_light`, then recomputes the colour from that spectrum
with colour-science (https://www.colour-science.org, pinned in run.sh): CIE XYZ by
`colour.sd_to_XYZ` with the CIE 1931 2 degree observer and illuminant D65 (method "Integration",
the plain 5 nm sum), chromaticity by `colour.XYZ_to_xy`, sRGB by `colour.XYZ_to_sRGB`. The
library's sRGB matrix is derived from the primaries rather than the standard's four-digit one, so
sRGB may differ by one 8-bit step; XYZ and xy must agree to 1e-9.

Exit status 1 on any disagreement; the last line reads "N passed, M failed".
"""
import argparse
import json
import subprocess
import sys
import warnings

import numpy as np

warnings.filterwarnings("ignore")
import colour  # noqa: E402

CASES = []
for d in [0.0, 0.005, 0.01, 0.02, 0.03, 0.04, 0.05, 0.055, 0.06, 0.065, 0.075, 0.09, 0.12, 0.16]:
    CASES.append((f"quartz {d} mm crossed", [
        {"kind": "crystal", "material": "quartz", "optical_activity": False, "thickness_mm": d or 0.0001,
         "axis": {"tilt_deg": 90, "azimuth_deg": 45}},
        {"kind": "polarizer", "transmission_axis_deg": 90}]))
CASES.append(("quartz 0.06 mm parallel", [
    {"kind": "crystal", "material": "quartz", "optical_activity": False, "thickness_mm": 0.06,
     "axis": {"tilt_deg": 90, "azimuth_deg": 45}},
    {"kind": "polarizer", "transmission_axis_deg": 0}]))
CASES.append(("calcite 0.003 mm crossed", [
    {"kind": "crystal", "material": "calcite", "thickness_mm": 0.003, "axis": {"tilt_deg": 90, "azimuth_deg": 45}},
    {"kind": "polarizer", "transmission_axis_deg": 90}]))
CASES.append(("two quartz plates, second at 30 deg", [
    {"kind": "crystal", "material": "quartz", "optical_activity": False, "thickness_mm": 0.04,
     "axis": {"tilt_deg": 90, "azimuth_deg": 45}},
    {"kind": "crystal", "material": "quartz", "optical_activity": False, "thickness_mm": 0.07,
     "axis": {"tilt_deg": 90, "azimuth_deg": 30}},
    {"kind": "polarizer", "transmission_axis_deg": 90}]))
CASES.append(("open set-up", [{"kind": "rotator", "angle_deg": 10}]))


def traced(binary, elements):
    doc = {"version": 2, "wavelength_nm": 550, "wavelength_in": "air",
           "beam": {"polarization": {"kind": "linear", "azimuth_deg": 0}},
           "elements": elements, "spectrum": {"from_nm": 380, "to_nm": 780, "points": 81}}
    out = subprocess.run([binary, "trace", "-"], input=json.dumps(doc), capture_output=True,
                         text=True, check=True).stdout
    return json.loads(out)["spectrum"]


def main():
    p = argparse.ArgumentParser()
    p.add_argument("--bin", required=True)
    a = p.parse_args()
    cmfs = colour.MSDS_CMFS["CIE 1931 2 Degree Standard Observer"]
    d65 = colour.SDS_ILLUMINANTS["D65"]
    shape = colour.SpectralShape(380, 780, 5)
    passed = failed = 0
    worst = 0.0
    for name, elements in CASES:
        s = traced(a.bin, elements)
        wl = np.array(s["wavelength_nm"])
        t = np.array(s["transmission"], dtype=float)
        assert np.allclose(wl, np.arange(380, 781, 5), atol=1e-9), wl
        sd = colour.SpectralDistribution(dict(zip(wl.round(6), t)), name=name)
        xyz = colour.sd_to_XYZ(sd, cmfs.copy().align(shape), d65.copy().align(shape),
                               method="Integration", shape=shape) / 100.0
        ours = s["white_light"]
        dx = float(np.max(np.abs(np.array(ours["xyz"]) - xyz)))
        ok = dx <= 1e-9
        if xyz.sum() > 1e-12:
            xy = colour.XYZ_to_xy(xyz)
            dxy = float(np.max(np.abs(np.array(ours["chromaticity"]) - xy)))
            ok &= dxy <= 1e-9
            dx = max(dx, dxy)
        rgb = np.clip(colour.XYZ_to_sRGB(xyz), 0, 1)
        ref = np.round(rgb * 255).astype(int)
        got = np.array([int(ours["srgb"][i:i + 2], 16) for i in (1, 3, 5)])
        steps = int(np.max(np.abs(got - ref)))
        ok &= steps <= 1
        worst = max(worst, dx)
        print(f"{'ok  ' if ok else 'FAIL'} {name:40s} xy {ours['chromaticity']} srgb {ours['srgb']} "
              f"(library #{ref[0]:02x}{ref[1]:02x}{ref[2]:02x}) largest difference {dx:.1e}")
        passed += ok
        failed += not ok
    print(f"largest XYZ/xy difference {worst:.1e}")
    print(f"{passed} passed, {failed} failed")
    sys.exit(1 if failed else 0)


if __name__ == "__main__":
    main()
