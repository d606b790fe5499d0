"""The numpy baseline of the convergent-light benchmark: a 256 x 256 conoscopic figure.

Workload (scripts/bench/conoscope.json, benches/conoscope.rs): a 10 mm c-cut quartz plate (optic
axis along z, optical activity off) between crossed polarizers (input linear along x, the
analyser at 90 deg), 589.3 nm in vacuum, outside index 1, ideal (anti-reflection) faces; the
transmission at every pixel centre of a 256 x 256 grid over the unit disc, each pixel the
direction at polar angle asin(r sin 30 deg) and azimuth atan2(y, x) (the sine condition).
Checksum = the sum of the transmissions inside the cone.

Physics, the same computation as the core's (src/optics/conoscope.rs, interface.rs, modes.rs):
each direction is one plane wave at the tangential wave vector q_t = n sin(theta)(cos phi,
sin phi) (in units of k0). Its modes: in the outside medium the two fields along e1 and e2 of the
beam basis (x and y carried by the smallest rotation taking z onto the direction; reflected
waves mirrored in the face); in the crystal the ordinary wave (E along z x q, q_z^2 = n_o^2 -
q_t^2) and the extraordinary one (D in the plane of q and the axis, E = eps^-1 D, q_t^2/n_e^2 +
q_z^2/n_o^2 = 1), H = q x E, every field normalized to unit power flux across the face. At each
face the continuity of (E_x, E_y, Z0 H_x, Z0 H_y) is a 4 x 4 system for the two reflected and two
transmitted amplitudes (P. Yeh, Optical Waves in Layered Media (1988), ch. 9; D. W. Berreman,
J. Opt. Soc. Am. 62, 502 (1972)); an ideal face keeps the unitary polar factor of the
transmission, U = M sqrt(2)/|M|_F with M = T + |det T| T^-H for T scaled to unit norm. The plate
is U_exit diag(exp(i k0 q_z L)) U_entry on the beam basis; the analyser is the projector on its
axis; the transmission is |M (1, 0)|^2 (input power 1). The phases of the crystal's mode fields
cancel between U_entry and U_exit, so only the outside basis must be the core's.
Quartz: n_o, n_e of G. Ghosh, Opt. Commun. 163, 95 (1999), the core's formula, written out.

Vectorized over the 51,000-odd directions inside the cone: modes, faces (one batched 4 x 4
solve per face) and products are array expressions. Prints one JSON line: conoscope_256_ms
(median of 7 runs), conoscope_checksum. With --check: compares several directions with
`doublespar trace` of the same set-up lit at that incidence by a beam so wide that its o and e
spots overlap (its total power is the plane wave's transmission, to the spots' overlap) to 1e-8,
and every pixel with the core's own map (convergentMap of the page worker's build, www/pkg-design,
under Node) to 1e-10 (the rounding of phases of 1.6e5 rad); exits 1 on a disagreement.
"""

import json
import subprocess
import sys
import time

import numpy as np

QUARTZ_O = (1.28604141, 1.07044083, 1.00585997e-2, 1.10202242, 100.0)
QUARTZ_E = (1.28851804, 1.09509924, 1.02101864e-2, 1.15662475, 100.0)
WAVELENGTH_NM = 589.3
THICKNESS_MM = 10.0
CONE_DEG = 30.0
PIXELS = 256
ANALYSER_DEG = 90.0


def index(c, um):
    a, b, c1, d, e = c
    l2 = um * um
    return np.sqrt(a + b * l2 / (l2 - c1) + d * l2 / (l2 - e))


def grid(pixels, cone_deg):
    """The directions (polar, azimuth) of the pixel centres inside the disc, and where they sit."""
    c = np.arange(pixels)
    x = 2.0 * (c + 0.5) / pixels - 1.0
    y = 1.0 - 2.0 * (c + 0.5) / pixels
    xx, yy = np.meshgrid(x, y)
    r = np.hypot(xx, yy)
    inside = r <= 1.0
    polar = np.arcsin(r[inside] * np.sin(np.radians(cone_deg)))
    azimuth = np.arctan2(yy[inside], xx[inside])
    return polar, azimuth, inside


def normalized(q, e):
    """(E, H) of a propagating mode with H = q x E, scaled to unit power flux across z."""
    h = np.cross(q, e)
    sz = np.abs(np.real(e[:, 0] * np.conj(h[:, 1]) - e[:, 1] * np.conj(h[:, 0])))
    s = 1.0 / np.sqrt(sz)
    return e * s[:, None], h * s[:, None]


def tangential(mode):
    e, h = mode
    return np.stack([e[:, 0], e[:, 1], h[:, 0], h[:, 1]], axis=1)


def outside_modes(qt, n, sign):
    qz = np.sqrt((n - np.hypot(qt[:, 0], qt[:, 1])) * (n + np.hypot(qt[:, 0], qt[:, 1])))
    u = np.stack([qt[:, 0] / n, qt[:, 1] / n, qz / n], axis=1)
    w = 1.0 + u[:, 2]
    e1 = np.stack([1.0 - u[:, 0] ** 2 / w, -u[:, 0] * u[:, 1] / w, -u[:, 0]], axis=1)
    e2 = np.stack([-u[:, 0] * u[:, 1] / w, 1.0 - u[:, 1] ** 2 / w, -u[:, 1]], axis=1)
    e1[:, 2] *= sign
    e2[:, 2] *= sign
    q = np.stack([qt[:, 0], qt[:, 1], sign * qz], axis=1).astype(complex)
    return [normalized(q, e1.astype(complex)), normalized(q, e2.astype(complex))]


def crystal_modes(qt, no, ne, sign):
    qt2 = qt[:, 0] ** 2 + qt[:, 1] ** 2
    qo = np.stack([qt[:, 0], qt[:, 1], sign * np.sqrt(no * no - qt2)], axis=1)
    qe = np.stack([qt[:, 0], qt[:, 1], sign * no * np.sqrt(1.0 - qt2 / (ne * ne))], axis=1)
    eo = np.stack([-qt[:, 1], qt[:, 0], np.zeros(len(qt))], axis=1) / np.sqrt(qt2)[:, None]
    # D along z|q|^2 - q q_z (in the plane of q and the axis, across q); E = eps^-1 D.
    d = -qe * qe[:, 2:3]
    d[:, 2] += np.sum(qe * qe, axis=1)
    ee = d / np.array([no * no, no * no, ne * ne])
    return [normalized(qo.astype(complex), eo.astype(complex)), normalized(qe.astype(complex), ee.astype(complex))], np.stack([qo[:, 2], qe[:, 2]], axis=1)


def face(incident, reflected, transmitted):
    """The transmission matrices (rows: transmitted mode, columns: incident mode) of a bare face."""
    a = np.stack([-tangential(reflected[0]), -tangential(reflected[1]),
                  tangential(transmitted[0]), tangential(transmitted[1])], axis=2)
    b = np.stack([tangential(incident[0]), tangential(incident[1])], axis=2)
    return np.linalg.solve(a, b)[:, 2:4, :]


def lossless(t):
    norm = np.sqrt(np.sum(np.abs(t) ** 2, axis=(1, 2)))
    t = t / norm[:, None, None]
    det = t[:, 0, 0] * t[:, 1, 1] - t[:, 0, 1] * t[:, 1, 0]
    adj_h = np.empty_like(t)
    adj_h[:, 0, 0] = np.conj(t[:, 1, 1])
    adj_h[:, 0, 1] = -np.conj(t[:, 1, 0])
    adj_h[:, 1, 0] = -np.conj(t[:, 0, 1])
    adj_h[:, 1, 1] = np.conj(t[:, 0, 0])
    m = t + adj_h * (np.abs(det) / np.conj(det))[:, None, None]
    return m * (np.sqrt(2.0) / np.sqrt(np.sum(np.abs(m) ** 2, axis=(1, 2))))[:, None, None]


def figure(polar, azimuth):
    um = WAVELENGTH_NM * 1e-3
    no, ne = index(QUARTZ_O, um), index(QUARTZ_E, um)
    qt = np.stack([np.sin(polar) * np.cos(azimuth), np.sin(polar) * np.sin(azimuth)], axis=1)
    out_fwd, out_back = outside_modes(qt, 1.0, 1.0), outside_modes(qt, 1.0, -1.0)
    (cr_fwd, qz), (cr_back, _) = crystal_modes(qt, no, ne, 1.0), crystal_modes(qt, no, ne, -1.0)
    u_in = lossless(face(out_fwd, out_back, cr_fwd))
    u_out = lossless(face(cr_fwd, cr_back, out_fwd))
    k0 = 2.0 * np.pi / (WAVELENGTH_NM * 1e-6)
    phase = np.exp(1j * k0 * qz * THICKNESS_MM)
    m = u_out @ (phase[:, :, None] * u_in)
    c, s = np.cos(np.radians(ANALYSER_DEG)), np.sin(np.radians(ANALYSER_DEG))
    analyser = np.array([[c * c, c * s], [c * s, s * s]])
    out = analyser @ m[:, :, 0:1]
    return np.sum(np.abs(out[:, :, 0]) ** 2, axis=1)


CORE_MAP = """
import { readFileSync } from 'node:fs';
const glue = await import(process.cwd() + '/www/pkg-design/doublespar.js');
glue.initSync({ module: readFileSync('www/pkg-design/doublespar_bg.wasm') });
const doc = readFileSync('scripts/bench/conoscope.json', 'utf8');
console.log(JSON.stringify(Array.from(glue.convergentMap(doc, 'conoscope', %d), (v) => (Number.isNaN(v) ? null : v))));
"""


def check(polar, azimuth, values, inside):
    """Every pixel against the core's map (the page worker's convergentMap under Node, www/pkg-design),
    and 13 directions against `doublespar trace`."""
    ok = True
    r = subprocess.run(["node", "--input-type=module", "-e", CORE_MAP % PIXELS], capture_output=True, text=True, check=True)
    core = json.loads(r.stdout)
    core_inside = np.array([v for v in core if v is not None])
    same_disc = np.array_equal(np.array([v is not None for v in core]), inside.ravel())
    worst = float(np.max(np.abs(core_inside - values))) if same_disc else float("inf")
    # The phases k0 q_z L reach 1.6e5 rad, where one rounding is 3e-11 rad: the two sums of the
    # same terms in another order agree to about that, hence this tolerance.
    print(f"largest difference from the core's map, {len(values)} pixels: {worst:.2e} (tolerance 1e-10)")
    ok &= worst <= 1e-10
    # The trace's beam, 1000 mm wide (the contract's largest), still parts the o and e spots by the
    # walk-off, up to about 0.04 mm here: their overlap exp(-d^2/(2 w^2)) falls short of 1 by up to
    # 3e-9 (the core's Gaussian overlap), hence this tolerance.
    doc = json.load(open("scripts/bench/conoscope.json"))
    worst = 0.0
    for k in np.linspace(0, len(values) - 1, 13).astype(int):
        doc["beam"]["incidence"] = {"polar_deg": float(np.degrees(polar[k])), "azimuth_deg": float(np.degrees(azimuth[k]))}
        doc["beam"]["diameter_mm"] = 1000
        r = subprocess.run(["target/release/doublespar", "trace", "-"], input=json.dumps(doc),
                           capture_output=True, text=True, check=True)
        worst = max(worst, abs(json.loads(r.stdout)["total_power"] - values[k]))
    print(f"largest difference from doublespar trace at 13 directions: {worst:.2e} (tolerance 1e-8)")
    return ok and worst <= 1e-8


def main():
    times, values = [], None
    for _ in range(7):
        start = time.perf_counter()
        polar, azimuth, inside = grid(PIXELS, CONE_DEG)
        values = figure(polar, azimuth)
        times.append(time.perf_counter() - start)
    if "--check" in sys.argv[1:] and not check(polar, azimuth, values, inside):
        sys.exit(1)
    print(json.dumps({"bench": "numpy-conoscope", "conoscope_256_ms": float(np.median(times)) * 1e3,
                      "conoscope_checksum": float(np.sum(values))}))


if __name__ == "__main__":
    main()
