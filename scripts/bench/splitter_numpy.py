"""The numpy baseline of the two-wedge splitter benchmark: 10^5 exact traces, vectorized.

Workload. The splitter of scripts/bench/two-wedge-splitter.json (two wedges of a uniaxial crystal
with crossed optic axes, x then y, in optical contact on a face tilted by alpha about y), lit at
N = 10^5 incidences: sample i has polar angle 5 deg * (i + 0.5) / N and azimuth
(137.50776405 deg * i) mod 360 (a golden-angle spiral), everything else as in the file.
- trace: the four rays oo, oe, eo, ee, each with its direction in air, exit point on the last face
  (mm) and power for the file's 45 deg linear input. Checksum
  S = sum over samples and over rays that leave forward of
      power + d_x + 2 d_y + 3 d_z + 0.001 (x_exit + y_exit).
  Rays rejected (total internal reflection, outside an aperture) count nothing.
- split: wave vectors only, for the rays oe and eo, and the angle between them in air (what a
  Monte Carlo of the split angle needs; no positions, hence no apertures). Checksum = sum over
  samples of the split angle (deg), a sample where oe or eo is evanescent counting 0.

Physics, as the core does it (CONVENTIONS.md, version 2; src/optics/{modes,interface,planar}.rs).
At each face, in the face's own frame (z along the downstream normal n, x and y carried by the
smallest rotation taking z onto n) the tangential wave vector q_t (q = k/k0) is conserved and the
modes beyond are solved in closed form:
- isotropic / ordinary: q_z = +-sqrt(n^2 - |q_t|^2); ordinary D along q x c, E = eps^-1 D;
- extraordinary: q.A.q = 1 with A = I/ne^2 + (1/no^2 - 1/ne^2) c c^T, a quadratic in q_z whose
  root (-b + s sqrt(b^2 - a c0))/a carries energy (ray A.q) along s; D = (q x c) x q;
- a negative discriminant makes the mode evanescent (complex q_z decaying along its travel): it
  carries no power and a ray in it ends (total internal reflection).
  (Born & Wolf, Principles of Optics, 7th ed., sections 15.2-15.3.)
Z0 H = q x E; propagating modes are scaled to unit |Re(E x H*)_z|, so |amplitude|^2 is power.
The 4x4 boundary problem (E_x, E_y, Z0 H_x, Z0 H_y continuous; incident, two reflected and two
transmitted modes) gives the transmission T (P. Yeh, Optical Waves in Layered Media, 1988, ch. 9;
D. W. Berreman, J. Opt. Soc. Am. 62, 502 (1972)); the ideal faces of `interface_losses` "ideal"
take its lossless part, the unitary polar factor U = (T + |det T| T^-H) sqrt2 / ||.||_F (T/||T||
when one mode is evanescent; K. Fan and A. J. Hoffman, Proc. AMS 6, 111 (1955)). Rays follow the
Poynting direction from plane to plane: the beam starts at the origin, the first face is z = gap,
each face passes through its element's axis point (0, 0, z_i) or (0, 0, z_i + thickness).
Jones basis of the input: x and y carried by the smallest rotation taking z onto the beam (the
core's beam basis). Between faces a ray is one mode with one scalar amplitude; the unit-modulus
phase by which the core re-projects it onto the next face's incident mode does not change its
power, so after the first face only powers are carried: power(jk) = |(U1 P J)_j|^2 |U2[k, j]|^2
sum_i |U3[i, k]|^2. Apertures (clear diameter, seen along z) are applied as the core does.

Run with `env -u OPENBLAS_CORETYPE -u OPENBLAS_L2_SIZE` (as scripts/bench.sh does): OpenBLAS
tuning variables that a machine may export force kernels that slow numpy down on some processors,
and the baseline is numpy as installed. `--check` first compares 20 samples ray by ray with `doublespar trace` (binary from
$DOUBLESPAR_BIN or ./target/release/doublespar) to 1e-9; the check is never timed.
`--check-only` runs the check alone (tests/reference/run.sh does, so the test suite holds the
face-by-face trace of a two-wedge splitter to this independent implementation). Prints one
JSON line (median of 7 runs of each workload) for scripts/bench.sh.
"""
import json
import os
import subprocess
import sys
import time
from collections import namedtuple
from pathlib import Path

import numpy as np

SCENARIO = Path(__file__).with_name("two-wedge-splitter.json")
N, RUNS, TOL = 100_000, 7, 1e-9
# Samples go through in blocks, each one fully vectorized (`--block K` to change): blocks of a
# few thousand keep numpy's temporaries in cache and took a third of the CPU time of one block of
# 10^5, whose large temporaries are fresh memory (page faults) at every step.
BLOCK = 2000

# Vectors are arrays of shape (3, ...), components first, so that each component is one
# contiguous array; small matrices act by explicit sums (numpy's matmul of (m, 3) complex arrays
# by a 3x3 matrix took several times longer here than these elementwise operations).


def unit(tilt_deg, azimuth_deg):
    """(sin t cos a, sin t sin a, cos t), the contract's direction of a polar angle and azimuth."""
    t, a = np.radians(tilt_deg), np.radians(azimuth_deg)
    return np.array([np.sin(t) * np.cos(a), np.sin(t) * np.sin(a), np.cos(t)])


def dot(a, b):
    return a[0] * b[0] + a[1] * b[1] + a[2] * b[2]


def cross(a, b):
    return np.array([a[1] * b[2] - a[2] * b[1], a[2] * b[0] - a[0] * b[2], a[0] * b[1] - a[1] * b[0]])


def apply(M, v):
    """M·v for a constant 3x3 matrix M and a batch of vectors v (3, ...)."""
    return np.array([M[i, 0] * v[0] + M[i, 1] * v[1] + M[i, 2] * v[2] for i in range(3)])


def basis(u):
    """x and y carried by the smallest rotation taking z onto unit u (u_z > -1)."""
    w = 1.0 + u[2]
    return (np.array([1.0 - u[0] * u[0] / w, -u[0] * u[1] / w, -u[0]]),
            np.array([-u[0] * u[1] / w, 1.0 - u[1] * u[1] / w, -u[1]]))


def face_frame(normal):
    """Rotation R whose columns are the face frame's axes in the lab: v_lab = R v_face."""
    return np.column_stack([*basis(normal), normal])


def load(path):
    """The fixed set-up: outside index, input Jones vector, and per crystal its faces and axis."""
    doc = json.loads(path.read_text())
    pol = doc["beam"]["polarization"]
    assert pol["kind"] == "linear" and doc.get("interface_losses", "ideal") == "ideal"
    crystals, z = [], 0.0
    for el in doc["elements"]:
        z += el.get("gap_mm", 0.0)
        f, ax = el["faces"], el["axis"]
        crystals.append({"no": el["no"], "ne": el["ne"], "c": unit(ax["tilt_deg"], ax["azimuth_deg"]),
                         "front": (unit(f["front"]["tilt_deg"], f["front"]["azimuth_deg"]), z),
                         "back": (unit(f["back"]["tilt_deg"], f["back"]["azimuth_deg"]), z + el["thickness_mm"]),
                         "radius": el["aperture_mm"] / 2})
        z += el["thickness_mm"]
    assert len(crystals) == 2 and doc["elements"][1].get("contact") == "optical"
    a = np.radians(pol["azimuth_deg"])
    return doc, doc.get("outside_index", 1.0), np.array([np.cos(a), np.sin(a)]), crystals


def samples(n):
    i = np.arange(n)
    return 5.0 * (i + 0.5) / n, np.mod(137.50776405 * i, 360.0)


# --- Modes of one medium at tangential wave vector (qx, qy), travelling along s = +-1 -----------

Mode = namedtuple("Mode", "q e h prop ray")  # face frame; E, Z0 H scaled; unit ray


def root(x, s):
    """The root of q_z^2 = x along s: real and signed if x > 0, else imaginary and decaying."""
    r = np.sqrt(np.abs(x))
    return np.where(x > 0, s * r + 0j, 1j * s * r), x > 0


def e_surface(no, ne, c):
    """The e-wave's normal-surface matrix A (q.A.q = 1, ray along A.q) for the optic axis c."""
    return np.eye(3) / ne**2 + np.outer(c, c) * (1 / no**2 - 1 / ne**2)


def e_root(A, qx, qy, s):
    """q_z of the e-wave (q.A.q = 1) whose energy flows along s, computed without cancellation."""
    a, b = A[2, 2], A[2, 0] * qx + A[2, 1] * qy
    c0 = A[0, 0] * qx * qx + 2 * A[0, 1] * qx * qy + A[1, 1] * qy * qy - 1.0
    disc = b * b - a * c0
    r = np.sqrt(np.abs(disc))
    real = np.where(s * b <= 0, (-b + s * r) / a, c0 / (-b - s * r))
    return np.where(disc > 0, real + 0j, -b / a + 1j * s * r / a), disc > 0


def mode(q, e, prop, ray):
    """A mode with E scaled to unit power flux |S_z| = |Re(E x H*)_z| (to |E| = 1 if evanescent)."""
    h = cross(q, e)
    sz = np.abs((e[0] * h[1].conj() - e[1] * h[0].conj()).real)
    scale = np.where(prop, 1 / np.sqrt(sz), 1 / np.sqrt(dot(e, e.conj()).real))
    return Mode(q, e * scale, h * scale, prop, ray / np.sqrt(dot(ray, ray)))


def modes(body, R, qx, qy, s):
    """Both modes (o then e; e1 then e2 for an isotropic body) in the face frame R."""
    if body[0] == "iso":
        n = body[1]
        qn = np.hypot(qx, qy)
        qz, prop = root((n - qn) * (n + qn), s)
        e1, e2 = basis(np.array([qx / n, qy / n, np.where(prop, np.abs(qz.real) / n, 0.0)]))
        e1[2], e2[2] = s * e1[2], s * e2[2]  # backward waves: mirror images in the face
        q = np.array([qx + 0j, qy + 0j, qz])
        return [mode(q, e + 0j, prop, q.real) for e in (e1, e2)]
    _, no, ne, c_lab = body
    c = R.T @ c_lab  # optic axis in the face frame
    inv_eps = np.eye(3) / no**2 + np.outer(c, c) * (1 / ne**2 - 1 / no**2)
    A = e_surface(no, ne, c)
    qn = np.hypot(qx, qy)
    qz_o, prop_o = root((no - qn) * (no + qn), s)
    qz_e, prop_e = e_root(A, qx, qy, s)
    q_o, q_e = np.array([qx + 0j, qy + 0j, qz_o]), np.array([qx + 0j, qy + 0j, qz_e])
    # D_o along q x c, D_e along (q x c) x q; the beam stays far from both optic axes, so q x c
    # never degenerates here (the core has a fallback for that case).
    d_o = cross(q_o, c)
    d_e = cross(cross(q_e, c), q_e)
    return [mode(q_o, apply(inv_eps, d_o), prop_o, q_o.real),
            mode(q_e, apply(inv_eps, d_e), prop_e, apply(A, q_e.real))]


def tangential(md):
    """The quantities continuous across a face, (E_x, E_y, Z0 H_x, Z0 H_y), shape (4, m)."""
    return np.array([md.e[0], md.e[1], md.h[0], md.h[1]])


def lossless(T):
    """Unitary polar factor of each 2x2 T (m, 2, 2); T/||T|| when rank one; 0 when T = 0."""
    norm = np.sqrt((np.abs(T) ** 2).sum(axis=(1, 2)))
    t = T / np.where(norm > 0, norm, 1.0)[:, None, None]
    a, b, c, d = t[:, 0, 0], t[:, 0, 1], t[:, 1, 0], t[:, 1, 1]
    det = a * d - b * c
    f = np.abs(det) / det.conj()  # |det T| T^-H = |det T| / conj(det T) adj(T)^H
    m = t + np.stack([d.conj() * f, -c.conj() * f, -b.conj() * f, a.conj() * f], 1).reshape(-1, 2, 2)
    u = m * (np.sqrt(2) / np.sqrt((np.abs(m) ** 2).sum(axis=(1, 2))))[:, None, None]
    u = np.where((np.abs(det) <= 1e-14)[:, None, None], t, u)
    return np.where((norm > 0)[:, None, None], u, 0)


def refract(q_lab, normal, src, dst):
    """One face for a batch of rays of wave vectors q_lab (3, m) coming from body `src` into
    `dst`: the ideal transmission U (m, 2, 2) (entry [k, j]: into mode k of dst from incident
    mode j of src), the incident and transmitted modes (face frame) and the frame R."""
    R = face_frame(normal)
    qx, qy = R[:, 0] @ q_lab, R[:, 1] @ q_lab
    inc, back, fwd = modes(src, R, qx, qy, 1.0), modes(src, R, qx, qy, -1.0), modes(dst, R, qx, qy, 1.0)
    # Columns: the unknown amplitudes (r1, r2, t1, t2); rows: (E_x, E_y, Z0 H_x, Z0 H_y).
    M = np.stack([-tangential(back[0]), -tangential(back[1]), tangential(fwd[0]), tangential(fwd[1])], 1)
    rhs = np.stack([tangential(inc[0]), tangential(inc[1])], 1)
    T = np.linalg.solve(np.moveaxis(M, 2, 0), np.moveaxis(rhs, 2, 0))[:, 2:, :]
    T = T * np.stack([fwd[0].prop, fwd[1].prop], axis=1)[:, :, None]  # evanescent rows carry nothing
    return lossless(T), inc, fwd, R


def meet(r, d, plane):
    """Where rays from r along d (both (3, ...)) meet the plane (n, z0) through (0, 0, z0).
    Every ray here meets each plane ahead of it, so a plane behind a ray is not tested for."""
    n, z0 = plane
    s = (z0 * n[2] - (n[0] * r[0] + n[1] * r[1] + n[2] * r[2])) / (n[0] * d[0] + n[1] * d[1] + n[2] * d[2])
    return r + s * d


def inside(r, radius):
    return r[0] ** 2 + r[1] ** 2 <= (radius * (1 + 1e-12)) ** 2


def trace(setup, theta, phi):
    """Every ray of every sample, labels in order oo, oe, eo, ee (index 2j + k): direction
    (3, 4, m), exit point (3, 4, m), power (4, m) and whether it leaves forward (4, m)."""
    _, n_out, J, (c1, c2) = setup
    m = theta.size
    u0 = unit(theta, phi)
    air, b1, b2 = ("iso", n_out), ("crystal", c1["no"], c1["ne"], c1["c"]), ("crystal", c2["no"], c2["ne"], c2["c"])
    # Face 1, air -> crystal 1. J is on the beam basis of u0: project it on the face's incident
    # air modes, P[j, c] = e_j . basis_c (the identity when the face is normal to z).
    U1, inc, out1, R1 = refract(n_out * u0, c1["front"][0], air, b1)
    e_in = [apply(R1, md.e.real) / np.sqrt(dot(md.e.real, md.e.real)) for md in inc]
    P = np.array([[dot(e, b) for b in basis(u0)] for e in e_in])  # (j, c, m)
    a_in = P[:, 0] * J[0] + P[:, 1] * J[1]  # (j, m)
    p1 = np.abs(U1[:, :, 0] * a_in[0][:, None] + U1[:, :, 1] * a_in[1][:, None]).T ** 2  # (j, m)
    r1 = meet(np.zeros((3, 1)), u0, c1["front"])
    S1 = np.stack([apply(R1, md.ray) for md in out1], 1)  # (3, j, m)
    ok1 = inside(r1, c1["radius"]) & np.array([md.prop for md in out1])
    r2 = meet(r1[:, None], S1, c1["back"])  # (3, j, m)
    # Face 2, crystal 1 -> crystal 2 (optical contact), both crystal-1 rays in one batch.
    q1 = np.concatenate([apply(R1, md.q.real) for md in out1], axis=1)
    U2, _, out2, R2 = refract(q1, c2["front"][0], b1, b2)
    U2 = U2.reshape(2, m, 2, 2)
    p2 = np.array([[np.abs(U2[j, :, k, j]) ** 2 * p1[j] for k in (0, 1)] for j in (0, 1)])  # (j, k, m)
    ok2 = (ok1 & inside(r2, c1["radius"]))[:, None] & np.stack([md.prop.reshape(2, m) for md in out2], 1)
    S2 = np.stack([apply(R2, md.ray).reshape(3, 2, m) for md in out2], 2)  # (3, j, k, m)
    r3 = meet(r2[:, :, None], S2, c2["back"])
    # Face 3, crystal 2 -> air, the four rays in one batch.
    q2 = np.stack([apply(R2, md.q.real).reshape(3, 2, m) for md in out2], 2).reshape(3, 4 * m)
    U3, _, out3, R3 = refract(q2, c2["back"][0], b2, air)
    U3 = U3.reshape(2, 2, m, 2, 2)
    p3 = np.array([[p2[j, k] * (np.abs(U3[j, k, :, :, k]) ** 2).sum(1) for k in (0, 1)] for j in (0, 1)])
    ok3 = ok2 & inside(r3, c2["radius"]) & out3[0].prop.reshape(2, 2, m)
    return apply(R3, out3[0].ray).reshape(3, 4, m), r3.reshape(3, 4, m), p3.reshape(4, m), ok3.reshape(4, m)


def trace_checksum(setup, theta, phi):
    d, x, p, ok = trace(setup, theta, phi)
    return float(np.where(ok, p + d[0] + 2 * d[1] + 3 * d[2] + 0.001 * (x[0] + x[1]), 0.0).sum())


def split(setup, theta, phi):
    """Split angle (deg) between the rays oe and eo in air: the wave-vector chain alone."""
    _, n_out, _, (c1, c2) = setup

    def onward(q_lab, normal, n, A=None):
        """Wave vector (lab) beyond a face: the e-mode if A is given, else of index n."""
        R = face_frame(normal)
        qx, qy = R[:, 0] @ q_lab, R[:, 1] @ q_lab
        qn = np.hypot(qx, qy)
        qz, prop = root((n - qn) * (n + qn), 1.0) if A is None else e_root(R.T @ A @ R, qx, qy, 1.0)
        return apply(R, np.array([qx, qy, qz.real])), prop

    A1, A2 = e_surface(c1["no"], c1["ne"], c1["c"]), e_surface(c2["no"], c2["ne"], c2["c"])
    q0 = n_out * unit(theta, phi)
    q_o, p_o = onward(q0, c1["front"][0], c1["no"])
    q_e, p_e = onward(q0, c1["front"][0], None, A1)
    q_oe, p_oe = onward(q_o, c2["front"][0], None, A2)
    q_eo, p_eo = onward(q_e, c2["front"][0], c2["no"])
    u, pu = onward(q_oe, c2["back"][0], n_out)
    v, pv = onward(q_eo, c2["back"][0], n_out)
    angle = np.degrees(np.arctan2(np.sqrt(dot(*[cross(u, v)] * 2)), dot(u, v)))
    return np.where(p_o & p_e & p_oe & p_eo & pu & pv, angle, 0.0)


def check(setup):
    """Compares 20 samples with `doublespar trace`, ray by ray; returns the largest difference."""
    doc = setup[0]
    binary = os.environ.get("DOUBLESPAR_BIN", "./target/release/doublespar")
    theta, phi = samples(N)
    picks = np.linspace(0, N - 1, 20).astype(int)  # i = 0 and N - 1 included
    d, x, p, ok = trace(setup, theta[picks], phi[picks])
    angles = split(setup, theta[picks], phi[picks])
    worst = 0.0
    for col, i in enumerate(picks):
        doc["beam"]["incidence"] = {"polar_deg": float(theta[i]), "azimuth_deg": float(phi[i])}
        run = subprocess.run([binary, "trace", "-"], input=json.dumps(doc), capture_output=True, text=True, check=True)
        rays = {r["label"]: r for r in json.loads(run.stdout)["rays"]}
        mine = {lab: ray for ray, lab in enumerate(("oo", "oe", "eo", "ee")) if ok[ray, col]}
        assert set(rays) == set(mine), f"sample {i}: rays {sorted(rays)} vs {sorted(mine)}"
        for lab, ray in mine.items():
            worst = max(worst, np.abs(np.array(rays[lab]["direction"]) - d[:, ray, col]).max(),
                        np.abs(np.array(rays[lab]["exit_point_mm"]) - x[:, ray, col]).max(),
                        abs(rays[lab]["power"] - p[ray, col]))
        if "oe" in rays and "eo" in rays:  # (the split workload has no positions, so no apertures)
            u, v = np.array(rays["oe"]["direction"]), np.array(rays["eo"]["direction"])
            worst = max(worst, abs(np.degrees(np.arctan2(np.linalg.norm(np.cross(u, v)), u @ v)) - angles[col]))
        assert worst <= TOL, f"sample {i} (polar {theta[i]} deg, azimuth {phi[i]} deg): difference {worst}"
    return len(picks), worst


def median_ms(fn):
    runs = []
    for _ in range(RUNS):
        t0 = time.perf_counter()
        value = fn()
        runs.append(time.perf_counter() - t0)
    return sorted(runs)[RUNS // 2] * 1e3, value


def main():
    setup = load(SCENARIO)
    np.seterr(all="ignore")  # evanescent and rejected rays are masked, never summed
    if "--check" in sys.argv[1:] or "--check-only" in sys.argv[1:]:
        count, worst = check(setup)
        print(f"check: {count} samples agree with doublespar trace, largest difference {worst:.1e}", file=sys.stderr)
        if "--check-only" in sys.argv[1:]:
            return 0
    block = int(sys.argv[sys.argv.index("--block") + 1]) if "--block" in sys.argv else BLOCK

    def run(checksum):
        theta, phi = samples(N)
        return sum(checksum(setup, theta[i:i + block], phi[i:i + block]) for i in range(0, N, block))

    trace_ms, trace_sum = median_ms(lambda: run(trace_checksum))
    split_ms, split_sum = median_ms(lambda: run(lambda *a: float(split(*a).sum())))
    print(json.dumps({"bench": "numpy-splitter", "numpy": np.__version__,
                      "splitter_trace_1e5_ms": trace_ms, "splitter_trace_checksum": trace_sum,
                      "splitter_split_1e5_ms": split_ms, "splitter_split_checksum": split_sum}))


if __name__ == "__main__":
    sys.exit(main())
