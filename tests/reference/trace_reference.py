#!/usr/bin/env python3
"""Independent numerical reference for the `doublespar trace` command line.

Generates a deterministic set of scenarios (seeded numpy RNG), runs the command line on each and
recomputes, by a different method, what it reports:

* n_o, n_e from the catalogue's dispersion formulas (forms and coefficients as documented in
  src/optics/material/uniaxial.rs, the one shared input);
* the modes of each crystal from the general 4x4 first-order (Berreman) form of Maxwell's
  equations, d/dz (Ex, Ey, Hx, Hy) = i k0 Delta (Ex, Ey, Hx, Hy), solved with numpy.linalg.eig,
  not from the uniaxial closed forms; o and e are told apart by E being perpendicular to the
  optic axis (o); forward modes are those whose Poynting vector (or decay) points into +z;
* ray directions from Re(E x H*), walk-off, indices, separations, retardances, exit positions;
* face couplings from a 4x4 linear system for the tangential fields (numpy.linalg.solve), their
  unitary polar factor for ideal faces (numpy SVD), per-path 2x2 Jones matrices, and output
  Stokes vectors through the coherency matrix M C M^H.

Plus three textbook hand cases (Born & Wolf; Yariv & Yeh) checked against closed forms.

Usage: trace_reference.py [--bin PATH] [--count N] [--seed S] [--verbose]
Exit status 0 when every scenario agrees, 1 otherwise. The last line is "N passed, M failed".
"""

import argparse
import json
import math
import os
import subprocess
import sys
import time

import numpy as np

# ---------------------------------------------------------------------------------------------
# Tolerances (see README.md)
# ---------------------------------------------------------------------------------------------
REL = 1e-9  # relative tolerance of every compared quantity
FLOOR = 1e-12  # absolute floor for quantities that are ~0 (powers, positions, vector components)
FLOOR_DEG = 1e-9  # absolute floor for walk-off angles, degrees
FLOOR_RAD = 1e-9  # absolute floor for retardances and phases, radians
EPS = 2.220446049250313e-16  # double-precision unit roundoff (x2)

# Project conventions that decide a *choice* rather than physics (from the crate's documentation):
# the degenerate-direction rule (q x c shorter than this times |q|: D_o along q x x or q x y,
# whichever is longer; DEVELOPERS.md / src/optics/modes.rs header and src/precision.rs).
DEGENERATE_DIRECTION = 1e-12
# Spots (CONVENTIONS.md version 2, "spots"; DEVELOPERS.md, "Spots"): each ray is a Gaussian beam
# of the scenario's diameter D = 2w (w the 1/e² intensity radius). Two parallel beams whose centres
# lie d apart overlap with amplitude γ = exp(−d²/(2w²)) (the overlap integral of two equal
# Gaussian modes; its square is Joyce & DeLoach's coupling, Appl. Opt. 23, 4187 (1984), from
# memory). Rays link when γ ≥ e⁻², i.e. d ≤ D; a spot is a connected group of linked rays, and its
# coherency matrix is Σ_ij γ_ij M_i C_in M_jᴴ. Written here from that statement alone, pair by pair.
SPOT_LINK_DIAMETERS = 1.0

# ---------------------------------------------------------------------------------------------
# Catalogue: dispersion forms and coefficients as documented in src/optics/material/uniaxial.rs.
#   ("sellmeier", a, [(b, c), ...]):  n^2 = a + sum b l^2 / (l^2 - c),  l in micrometres
#   ("pole", a, b, c, d):             n^2 = a + b / (l^2 - c) - d l^2
# ---------------------------------------------------------------------------------------------
MATERIALS = {
    "calcite": ((204.0, 2172.0),
                ("sellmeier", 1.73358749, [(0.96464345, 1.94325203e-2), (1.82831454, 120.0)]),
                ("sellmeier", 1.35859695, [(0.82427830, 1.06689543e-2), (0.14429128, 120.0)])),
    "quartz": ((198.0, 2053.1),
               ("sellmeier", 1.28604141, [(1.07044083, 1.00585997e-2), (1.10202242, 100.0)]),
               ("sellmeier", 1.28851804, [(1.09509924, 1.02101864e-2), (1.15662475, 100.0)])),
    "yvo4": ((480.0, 1340.0),
             ("pole", 3.778790, 0.070479, 0.045731, 0.009701),
             ("pole", 4.607200, 0.108087, 0.052495, 0.014305)),
    "alpha-bbo": ((190.0, 3500.0),
                  ("pole", 2.7471, 0.01878, 0.01822, 0.01354),
                  ("pole", 2.37153, 0.01224, 0.01667, 0.01516)),
    "sapphire": ((200.0, 5000.0),
                 ("sellmeier", 1.0, [(1.4313493, 0.0726631 ** 2), (0.65054713, 0.1193242 ** 2),
                                     (5.3414021, 18.028251 ** 2)]),
                 ("sellmeier", 1.0, [(1.5039759, 0.0740288 ** 2), (0.55069141, 0.1216529 ** 2),
                                     (6.5927379, 20.072248 ** 2)])),
    "mgf2": ((200.0, 7000.0),
             ("sellmeier", 1.0, [(0.48755108, 0.04338408 ** 2), (0.39875031, 0.09461442 ** 2),
                                 (2.3120353, 23.793604 ** 2)]),
             ("sellmeier", 1.0, [(0.41344023, 0.03684262 ** 2), (0.50497499, 0.09076162 ** 2),
                                 (2.4904862, 23.771995 ** 2)])),
    "linbo3": ((400.0, 5000.0),
               ("sellmeier", 1.0, [(2.6734, 0.01764), (1.2290, 0.05914), (12.614, 474.60)]),
               ("sellmeier", 1.0, [(2.9804, 0.02047), (0.5981, 0.0666), (8.9543, 416.08)])),
    "rutile": ((430.0, 1530.0),
               ("pole", 5.913, 0.2441, 0.0803, 0.0),
               ("pole", 7.197, 0.3322, 0.0843, 0.0)),
}


def dispersion_index(formula, um):
    """n at vacuum wavelength `um` micrometres from one documented formula (textbook form)."""
    l2 = um * um
    if formula[0] == "sellmeier":
        _, a, terms = formula
        n2 = a + sum(b * l2 / (l2 - c) for b, c in terms)
    else:
        _, a, b, c, d = formula
        n2 = a + b / (l2 - c) - d * l2
    return math.sqrt(n2)


def material_indices(key, nm):
    _, fo, fe = MATERIALS[key]
    return dispersion_index(fo, nm * 1e-3), dispersion_index(fe, nm * 1e-3)


# ---------------------------------------------------------------------------------------------
# Small vector helpers
# ---------------------------------------------------------------------------------------------
def unit_axis(tilt_deg, az_deg):
    t, a = math.radians(tilt_deg), math.radians(az_deg)
    return np.array([math.sin(t) * math.cos(a), math.sin(t) * math.sin(a), math.cos(t)])


def incidence_direction(polar_deg, az_deg):
    p, a = math.radians(polar_deg), math.radians(az_deg)
    return np.array([math.sin(p) * math.cos(a), math.sin(p) * math.sin(a), math.cos(p)])


def angle_between(a, b):
    """Angle between two real vectors, accurate near 0 and pi (atan2 of |a x b| and a.b)."""
    return math.atan2(np.linalg.norm(np.cross(a, b)), float(np.dot(a, b)))


def permittivity(no, ne, c):
    return no * no * np.eye(3) + (ne * ne - no * no) * np.outer(c, c)


# ---------------------------------------------------------------------------------------------
# The 4x4 system.  With q = k/k0 and H~ = Z0 H, Maxwell's curl equations for a plane wave
# exp(i k0 (q.r) - i w t) read  q x E = H~  and  q x H~ = -eps E.  Their z-components give
#   H~z = qx Ey - qy Ex,      Ez = -(qx H~y - qy H~x + eps_zx Ex + eps_zy Ey) / eps_zz,
# and their x, y components, solved for qz times the tangential fields psi = (Ex, Ey, H~x, H~y):
#   qz Ex  = H~y + qx Ez          qz Ey  = qy Ez - H~x
#   qz H~x = qx H~z - (eps E)_y   qz H~y = qy H~z + (eps E)_x
# i.e. qz psi = Delta psi, Delta built below column by column.
# ---------------------------------------------------------------------------------------------
def longitudinal(psi, qx, qy, eps):
    ex, ey, hx, hy = psi
    ez = -(qx * hy - qy * hx + eps[2, 0] * ex + eps[2, 1] * ey) / eps[2, 2]
    hz = qx * ey - qy * ex
    return ez, hz


def berreman(qx, qy, eps):
    delta = np.zeros((4, 4))
    for j in range(4):
        psi = np.zeros(4)
        psi[j] = 1.0
        ex, ey, hx, hy = psi
        ez, hz = longitudinal(psi, qx, qy, eps)
        de = eps @ np.array([ex, ey, ez])
        delta[:, j] = [hy + qx * ez, qy * ez - hx, qx * hz - de[1], qy * hz + de[0]]
    return delta


def fields(psi, qx, qy, eps):
    ez, hz = longitudinal(psi, qx, qy, eps)
    e = np.array([psi[0], psi[1], ez], dtype=complex)
    h = np.array([psi[2], psi[3], hz], dtype=complex)
    return e, h


def poynting(e, h):
    return np.real(np.cross(e, np.conj(h)))


def det_and_slope(qx, qy, qz, eps):
    """det M(qz) and d det/d qz, M = q q^T - (q.q) I + eps (wave equation q x (q x E) + eps E = 0).
    The derivative by Jacobi's formula with the adjugate from cofactors (no inverse)."""
    q = np.array([qx, qy, qz], dtype=complex)
    m = np.outer(q, q) - (q @ q) * np.eye(3) + eps
    dm = -2.0 * qz * np.eye(3, dtype=complex)
    dm[2, :] += q
    dm[:, 2] += q
    cof = np.array([np.cross(m[1], m[2]), np.cross(m[2], m[0]), np.cross(m[0], m[1])])
    det = m[0] @ cof[0]
    return det, np.trace(cof.T @ dm)


class Mode:
    """One plane-wave mode at the stack's tangential wave vector."""

    def __init__(self, kind, qz, psi, e, h, propagating):
        self.kind, self.qz, self.psi, self.e, self.h = kind, qz, psi, e, h
        self.propagating = propagating

    def q(self, qx, qy):
        return np.array([qx, qy, self.qz.real])

    def ray(self):
        s = poynting(self.e, self.h)
        return s / np.linalg.norm(s)


class ReferenceError(Exception):
    pass


def normalize_mode(kind, qz, psi, qx, qy, eps, propagating, e=None, h=None):
    """A Mode scaled to unit |S_z| (propagating) or unit |E| (evanescent). E and H default to
    those reconstructed from psi by the elimination of Ez, H~z."""
    if e is None:
        e, h = fields(psi, qx, qy, eps)
    if propagating:
        scale = 1.0 / math.sqrt(abs(poynting(e, h)[2]))
    else:
        scale = 1.0 / np.linalg.norm(e)
    e, h = e * scale, h * scale
    return Mode(kind, qz, np.array([e[0], e[1], h[0], h[1]]), e, h, propagating)


def wave_matrix(qx, qy, qz, eps):
    """M(qz) = q q^T - (q.q) I + eps: the wave equation q x (q x E) + eps E = M E = 0."""
    q = np.array([qx, qy, qz], dtype=complex)
    return np.outer(q, q) - (q @ q) * np.eye(3) + eps


def null_vector_fields(qx, qy, qz, eps):
    """E as the null vector of M(qz) (last right singular vector; accurate for a simple root once
    qz is polished), and H~ = q x E."""
    _, _, vh = np.linalg.svd(wave_matrix(qx, qy, qz, eps))
    e = vh[-1].conj()
    return e, np.cross(np.array([qx, qy, qz], dtype=complex), e)


def rayleigh_qz(e, qx, qy, qz, eps):
    """Polishes qz for a known field E by Newton on phi(qz) = E^T M(qz) E = 0 (M symmetric, so phi
    is stationary in E at the true field: an error in E enters only to second order)."""
    for _ in range(3):
        phi = e @ wave_matrix(qx, qy, qz, eps) @ e
        dm = -2.0 * qz * np.eye(3, dtype=complex)
        q = np.array([qx, qy, qz], dtype=complex)
        dm[2, :] += q
        dm[:, 2] += q
        slope = e @ dm @ e
        if slope == 0:
            break
        qz = qz - phi / slope
    return qz


def crystal_modes(no, ne, c, qx, qy):
    """(forward [o, e], backward [o, e]) modes of a uniaxial crystal from the 4x4 eigenproblem."""
    eps = permittivity(no, ne, c)
    delta = berreman(qx, qy, eps)
    lam, vec = np.linalg.eig(delta)
    lam = lam.astype(complex)
    vec = vec.astype(complex)
    scale = max(1.0, float(np.max(np.abs(lam))))
    fwd, back = [], []
    for k in range(4):
        prop = abs(lam[k].imag) <= 1e-10 * scale
        if prop:
            e, h = fields(vec[:, k], qx, qy, eps)
            forward = poynting(e, h)[2] > 0.0
            lam_k = complex(lam[k].real, 0.0)
        else:
            forward = lam[k].imag > 0.0  # decays toward +z
            lam_k = lam[k]
        (fwd if forward else back).append((lam_k, vec[:, k], prop))
    if len(fwd) != 2 or len(back) != 2:
        raise ReferenceError(f"could not split the modes into 2 forward + 2 backward: {lam}")
    return (split_pair(fwd, qx, qy, eps, c, delta), split_pair(back, qx, qy, eps, c, delta))


def polish(qz, qx, qy, eps, gap):
    """A few guarded Newton steps on det M(qz) = 0, for a simple root."""
    f, _ = det_and_slope(qx, qy, qz, eps)
    for _ in range(3):
        if f == 0:
            break
        f0, d = det_and_slope(qx, qy, qz, eps)
        if d == 0:
            break
        step = f0 / d
        if abs(step) > 1e-3 * gap:
            break
        cand = qz - step
        fc, _ = det_and_slope(qx, qy, cand, eps)
        if abs(fc) > abs(f0):
            break
        qz, f = cand, fc
    return qz


def split_pair(pair, qx, qy, eps, c, delta):
    """Tells o from e within a pair of modes travelling the same way; returns [o, e] Modes."""
    (l1, v1, p1), (l2, v2, p2) = pair
    size = max(abs(l1), abs(l2), 1e-300)
    gap = abs(l1 - l2)
    if gap > 1e-4 * size:
        # Well separated: the eigenvectors are accurate; o is the one with E perpendicular to c.
        scores = []
        for v in (v1, v2):
            e, _ = fields(v, qx, qy, eps)
            scores.append(abs(np.dot(c, e)) / np.linalg.norm(e))
        io = int(np.argmin(scores))
        if scores[io] > 1e-8 or scores[1 - io] < 1e-8:
            raise ReferenceError(f"no mode with E perpendicular to the axis: scores {scores}")
        out = []
        for kind, (lam, v, p) in zip("oe", [pair[io], pair[1 - io]]):
            qz = polish(lam, qx, qy, eps, gap)
            if p:
                qz = complex(qz.real, 0.0)
            # Refine the field as the null vector of the wave equation at the polished qz,
            # keeping the eigenvector's phase (the sign conventions cancel anyway).
            e, h = null_vector_fields(qx, qy, qz, eps)
            e0, _ = fields(v, qx, qy, eps)
            ph = np.vdot(e, e0)
            if abs(ph) < 0.5 * np.linalg.norm(e) * np.linalg.norm(e0):
                raise ReferenceError("null vector of M(qz) disagrees with the eigenvector")
            ph /= abs(ph)
            out.append(normalize_mode(kind, qz, v, qx, qy, eps, p, e * ph, h * ph))
        return out
    # (Nearly) degenerate pair: the eigenvectors from eig are an ill-determined basis of the
    # pair's invariant subspace (error ~ eps/gap), but the subspace itself is accurate. Inside it,
    # o is the combination with E.c = 0, and e the one with D in the plane of q_e and c, i.e.
    # D_e.(q_e x c) = 0 (true of uniaxial e-modes: D_e is along (q x c) x q). When q x c is
    # shorter than 1e-12 |q| the pair is exactly degenerate and the project's documented choice is
    # used instead: D_o along d = q x x or q x y (the longer), D_e along d x q.
    # qz_o is the Rayleigh quotient of v_o (exact for an exact eigenvector), qz_e = trace - qz_o.
    def axis_choice(qz):
        q = np.array([qx, qy, qz], dtype=complex)
        qc = np.cross(q, c)
        if np.linalg.norm(qc) > DEGENERATE_DIRECTION * np.linalg.norm(q):
            return qc, False
        dx, dy = np.cross(q, [1.0, 0.0, 0.0]), np.cross(q, [0.0, 1.0, 0.0])
        return (dx if np.linalg.norm(dx) >= np.linalg.norm(dy) else dy), True

    def combine(fn):
        v = fn(v2) * v1 - fn(v1) * v2
        return v / np.linalg.norm(v)

    def dfield(v):
        e, _ = fields(v, qx, qy, eps)
        return eps @ e

    if p1 != p2:
        raise ReferenceError("a (nearly) degenerate pair of one propagating and one evanescent mode")
    trace_pair = l1 + l2
    d, fallback = axis_choice(0.5 * trace_pair)
    if fallback:
        w = np.cross(np.array([qx, qy, 0.5 * trace_pair], dtype=complex), d)
        vo = combine(lambda v: np.dot(w, dfield(v)))  # D_o along d
    else:
        vo = combine(lambda v: np.dot(c, fields(v, qx, qy, eps)[0]))  # E_o . c = 0
    qz_o = np.vdot(vo, delta @ vo) / np.vdot(vo, vo)
    qz_e = trace_pair - qz_o
    d, fallback = axis_choice(qz_e)
    # D_e perpendicular to d (d = q_e x c, or the fallback d); D_e . q_e = 0 holds for every mode.
    ve = combine(lambda v: np.dot(d, dfield(v)))
    out = []
    for kind, v, qz, p in (("o", vo, qz_o, p1), ("e", ve, qz_e, p2)):
        e, _ = fields(v, qx, qy, eps)
        qz = rayleigh_qz(e, qx, qy, complex(qz), eps)
        if p:
            qz = complex(qz.real, 0.0)
        out.append(normalize_mode(kind, complex(qz), v, qx, qy, eps, p))
    return out


def outside_modes(n, u, forward):
    """Isotropic outside medium: E along e1, e2 (DEVELOPERS.md), mirrored in the face for
    backward waves; normalized to unit |S_z|."""
    w = 1.0 + u[2]
    e1 = np.array([1.0 - u[0] ** 2 / w, -u[0] * u[1] / w, -u[0]])
    e2 = np.array([-u[0] * u[1] / w, 1.0 - u[1] ** 2 / w, -u[1]])
    q = n * u
    if not forward:
        e1, e2, q = e1 * [1, 1, -1], e2 * [1, 1, -1], q * [1, 1, -1]
    modes = []
    for kind, e in (("1", e1), ("2", e2)):
        e = e.astype(complex)
        h = np.cross(q, e)
        sz = poynting(e, h)[2]
        s = 1.0 / math.sqrt(abs(sz))
        e, h = e * s, h * s
        modes.append(Mode(kind, complex(q[2]), np.array([e[0], e[1], h[0], h[1]]), e, h, True))
    return modes, (e1, e2)


def face_transmission(incident, reflected, transmitted):
    """T[i, j]: amplitude of transmitted mode i for unit incident mode j, from continuity of
    (Ex, Ey, H~x, H~y): F_inc + sum r F_refl = sum t F_trans."""
    a = np.column_stack([transmitted[0].psi, transmitted[1].psi, -reflected[0].psi, -reflected[1].psi])
    b = np.column_stack([incident[0].psi, incident[1].psi])
    x = np.linalg.solve(a, b)
    return x[:2, :]


def lossless_part(t, rank_one):
    if rank_one:
        n = np.linalg.norm(t)
        return t / n if n > 0 else t * 0
    w, _, vh = np.linalg.svd(t)
    return w @ vh


def rot(a):
    c, s = math.cos(a), math.sin(a)
    return np.array([[c, -s], [s, c]], dtype=complex)


def retarder(gamma, theta):
    return rot(theta) @ np.diag([1.0, np.exp(1j * gamma)]) @ rot(-theta)


def polarizer(theta):
    return rot(theta) @ np.diag([1.0, 0.0]).astype(complex) @ rot(-theta)


def input_stokes(pol):
    """Normalized input Stokes vector (S0 = 1) from the contract's polarization, using
    S1 = |E1|^2 - |E2|^2, S2 = 2 Re E1 E2*, S3 = 2 Im E1 E2* (CONVENTIONS.md)."""
    kind = pol["kind"]
    if kind == "linear":
        p = math.radians(pol.get("azimuth_deg", 0.0))
        return np.array([1.0, math.cos(2 * p), math.sin(2 * p), 0.0])
    if kind == "circular":
        return np.array([1.0, 0.0, 0.0, 1.0 if pol["handedness"] == "right" else -1.0])
    if kind == "elliptical":
        p, x = math.radians(pol.get("azimuth_deg", 0.0)), math.radians(pol["ellipticity_deg"])
        return np.array([1.0, math.cos(2 * x) * math.cos(2 * p), math.cos(2 * x) * math.sin(2 * p),
                         math.sin(2 * x)])
    if kind == "jones":
        (a, b), (c, d) = pol["jones"]
        e1, e2 = complex(a, b), complex(c, d)
        s0 = abs(e1) ** 2 + abs(e2) ** 2
        x = e1 * e2.conjugate()
        return np.array([1.0, (abs(e1) ** 2 - abs(e2) ** 2) / s0, 2 * x.real / s0, 2 * x.imag / s0])
    if kind == "stokes":
        s = np.array(pol["stokes"], dtype=float)
        return s / s[0]
    if kind == "unpolarized":
        return np.array([1.0, 0.0, 0.0, 0.0])
    raise ValueError(kind)


def coherency(s):
    return 0.5 * np.array([[s[0] + s[1], s[2] + 1j * s[3]], [s[2] - 1j * s[3], s[0] - s[1]]])


def stokes_of(c):
    return np.array([(c[0, 0] + c[1, 1]).real, (c[0, 0] - c[1, 1]).real, 2 * c[0, 1].real, 2 * c[0, 1].imag])


# ---------------------------------------------------------------------------------------------
# The reference trace
# ---------------------------------------------------------------------------------------------
def shift_noise(length, t):
    """Rounding noise of a lateral shift L S_t/S_z whose direction has t = |S_t|/S_z: 8 ulp of the
    shift itself, and the same amplified by t^2 toward grazing, where a rounding of q_t changes
    q_z (hence S_t/S_z) by a factor t^2 more."""
    return 8 * EPS * length * (t + t ** 3)


def reference_trace(sc):
    nm = sc.get("wavelength_nm", 632.8)
    k0 = 2 * math.pi / (nm * 1e-6)  # rad/mm
    n_out = sc.get("outside_index", 1.0)
    ideal = sc.get("interface_losses", "ideal") == "ideal"
    beam = sc.get("beam", {})
    inc = beam.get("incidence", {})
    u = incidence_direction(inc.get("polar_deg", 0.0), inc.get("azimuth_deg", 0.0))
    qx, qy = n_out * u[0], n_out * u[1]
    qz_out = n_out * u[2]
    out_f, _ = outside_modes(n_out, u, True)
    out_b, _ = outside_modes(n_out, u, False)
    s_in = input_stokes(beam.get("polarization", {"kind": "linear", "azimuth_deg": 45.0}))
    c_in = coherency(s_in)

    def power(m):
        return float(np.real(np.trace(m @ c_in @ m.conj().T)))

    # A path: (label, Jones matrix, lateral position, phase, rounding noise of the position).
    paths = [("", np.eye(2, dtype=complex), np.zeros(2), 0.0, 0.0)]
    elements = []
    t_out_dir = math.hypot(u[0], u[1]) / u[2]
    for el in sc["elements"]:
        g = el.get("gap_mm", 0.0)
        if g > 0:
            f = np.exp(1j * k0 * qz_out * g)
            gap_noise = shift_noise(g, t_out_dir)
            paths = [(lab, m * f, pos + g * u[:2] / u[2], ph + k0 * qz_out * g, nz + gap_noise)
                     for lab, m, pos, ph, nz in paths]
        p_in = sum(power(p[1]) for p in paths)
        kind = el["kind"]
        if kind == "crystal":
            if "material" in el:
                no, ne = material_indices(el["material"], nm)
            else:
                no, ne = el["no"], el["ne"]
            ax = el["axis"]
            c = unit_axis(ax["tilt_deg"], ax.get("azimuth_deg", 0.0))
            fwd, back = crystal_modes(no, ne, c, qx, qy)
            t_in = face_transmission(out_f, out_b, fwd)
            t_out = face_transmission(fwd, back, out_f)
            evan = [not m.propagating for m in fwd]
            for i, ev in enumerate(evan):
                if ev:
                    t_in[i, :] = 0
                    t_out[:, i] = 0
            if ideal:
                t_in, t_out = lossless_part(t_in, any(evan)), lossless_part(t_out, any(evan))
            ell = el["thickness_mm"]
            shifts, noises, rep = [], [], {"no": no, "ne": ne, "modes": []}
            for mode in fwd:
                info = {"propagating": mode.propagating, "qz": mode.qz.real, "decay": abs(mode.qz.imag)}
                if mode.propagating:
                    q = mode.q(qx, qy)
                    s = mode.ray()
                    noise = shift_noise(ell, math.hypot(s[0], s[1]) / s[2])
                    info.update(index=float(np.linalg.norm(q)), walkoff_deg=math.degrees(angle_between(q, s)),
                                ray=s, shift=ell * s[:2] / s[2], shift_noise=noise)
                    shifts.append(ell * s[:2] / s[2])
                    noises.append(noise)
                else:
                    shifts.append(None)
                    noises.append(None)
                rep["modes"].append(info)
            nxt = []
            for lab, m, pos, ph, nz in paths:
                for i, mode in enumerate(fwd):
                    if not mode.propagating:
                        continue
                    phi = k0 * mode.qz.real * ell
                    step = np.outer(t_out[:, i], t_in[i, :]) * np.exp(1j * phi)
                    nxt.append((lab + mode.kind, step @ m, pos + shifts[i], ph + phi, nz + noises[i]))
            paths = nxt
            p_out = sum(power(p[1]) for p in paths)
            if all(m.propagating for m in fwd):
                sv = shifts[1] - shifts[0]
                rep["separation_noise"] = noises[0] + noises[1]
                rep["separation_vector"] = sv
                rep["separation"] = float(np.hypot(sv[0], sv[1]))
                rep["retardance"] = k0 * (fwd[1].qz.real - fwd[0].qz.real) * ell
                # What double precision can say about it: 4 ulp on each k0 q_z L, where q_z carries
                # the rounding of q_t amplified by dq_z/dq_t = -S_t/S_z (large toward grazing).
                qt = math.hypot(qx, qy)
                rep["retardance_noise"] = 4 * EPS * k0 * ell * sum(
                    abs(m.qz) + qt * math.hypot(m.ray()[0], m.ray()[1]) / m.ray()[2] for m in fwd)
            rep["reflected"] = max(p_in - p_out, 0.0)
            rep["power_in"] = p_in
            elements.append(rep)
        else:
            if kind == "retarder":
                jm = retarder(2 * math.pi * el["retardance_waves"], math.radians(el.get("fast_axis_deg", 0.0)))
            elif kind == "polarizer":
                jm = polarizer(math.radians(el.get("transmission_axis_deg", 0.0)))
            elif kind == "rotator":
                jm = rot(math.radians(el["angle_deg"]))
            else:
                raise ValueError(kind)
            paths = [(lab, jm @ m, pos, ph, nz) for lab, m, pos, ph, nz in paths]
            elements.append({"kind": kind, "power_in": p_in})
    rays = {}
    for lab, m, pos, ph, nz in paths:
        st = stokes_of(m @ c_in @ m.conj().T)
        rays[lab] = {"power": st[0], "stokes": st, "pos": pos, "phase": ph, "pos_noise": nz}
    # Spots: connected groups of rays at most one diameter apart; fields summed with the overlap.
    diameter = beam.get("diameter_mm", 1.0)
    w = diameter / 2.0
    link = SPOT_LINK_DIAMETERS * diameter
    n = len(paths)
    parent = list(range(n))

    def find(i):
        while parent[i] != i:
            parent[i] = parent[parent[i]]
            i = parent[i]
        return i

    ambiguous = False
    for i in range(n):
        for j in range(i + 1, n):
            d = np.linalg.norm(paths[i][2] - paths[j][2])
            if abs(d - link) < 1e-6 * link:  # a pair on the threshold: grouping not decidable
                ambiguous = True
            if d <= link:
                parent[find(i)] = find(j)
    groups = {}
    for i in range(n):
        groups.setdefault(find(i), []).append(i)
    spots = []
    for grp in sorted(groups.values()):
        c = np.zeros((2, 2), dtype=complex)
        for i in grp:
            for j in grp:
                d = np.linalg.norm(paths[i][2] - paths[j][2])
                gamma = math.exp(-d * d / (2 * w * w))
                c += gamma * (paths[i][1] @ c_in @ paths[j][1].conj().T)
        st = stokes_of(c)
        # Overlap figure: exp(−(2σ)²/w²), σ² the power-weighted spread of the ray points about
        # their power-weighted centre (two equal beams d apart: exp(−d²/w²)).
        pw = np.array([max(rays[paths[i][0]]["power"], 0.0) for i in grp])
        wts = pw / pw.sum() if pw.sum() > 0 else np.full(len(grp), 1.0 / len(grp))
        pts = np.array([paths[i][2][:2] for i in grp])
        centre = wts @ pts
        var = float(wts @ np.sum((pts - centre) ** 2, axis=1))
        phase_scale = max(abs(paths[i][3]) for i in grp)
        spots.append({"rays": [paths[i][0] for i in grp], "power": st[0], "stokes": st,
                      "overlap": math.exp(-4 * var / (w * w)), "phase_scale": phase_scale})
    return {"u": u, "rays": rays, "elements": elements, "spots": None if ambiguous else spots}


# ---------------------------------------------------------------------------------------------
# Comparison
# ---------------------------------------------------------------------------------------------
class Comparator:
    """Keeps, per quantity, the worst relative disagreement among values of magnitude at least
    1e-6 (where a relative measure means something), the worst absolute disagreement among smaller
    values, and the worst ratio of disagreement to tolerance (with where it occurred)."""

    def __init__(self):
        self.worst = {}
        self.where = ""

    def record(self, what, ref, got, tol, scale=0.0):
        mag = max(abs(ref), abs(got), scale)
        diff = abs(ref - got)
        w = self.worst.setdefault(what, [0.0, 0.0, 0.0, ""])
        if mag >= 1e-6:
            w[0] = max(w[0], diff / mag)
        else:
            w[1] = max(w[1], diff)
        if diff / tol > w[2]:
            w[2], w[3] = diff / tol, self.where


def check(ref, got, sc, comp, label):
    """Compares one scenario; returns a list of (field, reference, crate) mismatches."""
    bad = []
    comp.where = label

    def num(field, what, r, g, rel=REL, floor=FLOOR, scale=0.0):
        if g is None or r is None:
            if (g is None) != (r is None):
                bad.append((field, r, g))
            return
        if not (isinstance(g, (int, float)) and math.isfinite(g)):
            bad.append((field, r, g))
            return
        tol = max(rel * max(abs(r), abs(g), scale), floor)
        comp.record(what, r, g, tol, scale)
        if abs(r - g) > tol:
            bad.append((field, r, g))

    def vec(field, what, r, g, rel=REL, floor=FLOOR):
        if g is None or len(g) != len(r):
            bad.append((field, list(map(float, r)), g))
            return
        scale = float(np.linalg.norm(r))
        for i in range(len(r)):
            num(f"{field}[{i}]", what, float(r[i]), g[i], rel, floor, scale)

    if "error" in got:
        return [("error", None, got["error"])]
    vec("input.direction", "direction", ref["u"], got["input"]["direction"])
    if len(got["elements"]) != len(sc["elements"]):
        bad.append(("elements (count)", len(sc["elements"]), len(got["elements"])))
    for i, (el, rep) in enumerate(zip(sc["elements"], got["elements"])):
        if el["kind"] != "crystal":
            continue
        r = ref["elements"][i]
        p = f"elements[{i}]"
        num(f"{p}.no", "no", r["no"], rep["no"])
        num(f"{p}.ne", "ne", r["ne"], rep["ne"])
        for k, mname in enumerate("oe"):
            rm, gm = r["modes"][k], rep[mname]
            status = "propagating" if rm["propagating"] else "evanescent"
            if gm["status"] != status:
                bad.append((f"{p}.{mname}.status", status, gm["status"]))
                continue
            num(f"{p}.{mname}.qz", "qz", rm["qz"], gm["qz"])
            if rm["propagating"]:
                num(f"{p}.{mname}.index", "index", rm["index"], gm["index"])
                num(f"{p}.{mname}.walkoff_deg", "walkoff_deg", rm["walkoff_deg"], gm["walkoff_deg"],
                    floor=FLOOR_DEG)
                vec(f"{p}.{mname}.ray_direction", "ray_direction", rm["ray"], gm["ray_direction"])
                vec(f"{p}.{mname}.lateral_shift_mm", "lateral_shift_mm", rm["shift"], gm["lateral_shift_mm"],
                    floor=max(FLOOR, rm["shift_noise"]))
            else:
                num(f"{p}.{mname}.decay", "decay", rm["decay"], gm["decay"])
        if "separation" in r:
            sep_floor = max(FLOOR, r["separation_noise"])
            num(f"{p}.separation_mm", "separation_mm", r["separation"], rep["separation_mm"], floor=sep_floor)
            vec(f"{p}.separation_vector_mm", "separation_vector_mm", r["separation_vector"],
                rep["separation_vector_mm"], floor=sep_floor)
            num(f"{p}.retardance_rad", "retardance_rad", r["retardance"], rep["retardance_rad"],
                floor=max(FLOOR_RAD, r["retardance_noise"]))
        else:
            for f in ("separation_mm", "retardance_rad"):
                if rep.get(f) is not None:
                    bad.append((f"{p}.{f}", None, rep[f]))
        num(f"{p}.power_in", "power_in", r["power_in"], rep["power_in"])
        num(f"{p}.reflected_power", "reflected_power", r["reflected"], rep["reflected_power"],
            floor=max(FLOOR, REL * r["power_in"]))
    got_rays = {ray["label"]: ray for ray in got["rays"]}
    if sorted(got_rays) != sorted(ref["rays"]):
        bad.append(("rays[].label", sorted(ref["rays"]), sorted(got_rays)))
    for lab, rr in ref["rays"].items():
        g = got_rays.get(lab)
        if g is None:
            continue
        q = f"rays[{lab}]"
        num(f"{q}.power", "power", rr["power"], g["power"])
        vec(f"{q}.exit_position_mm", "exit_position_mm", rr["pos"], g["exit_position_mm"],
            floor=max(FLOOR, rr["pos_noise"]))
        for k in range(4):
            num(f"{q}.stokes[{k}]", "stokes", rr["stokes"][k], g["stokes"][k], scale=rr["power"])
        num(f"{q}.phase_rad", "phase_rad", rr["phase"], g["phase_rad"], floor=FLOOR_RAD)
        vec(f"{q}.direction", "direction", ref["u"], g["direction"])
    if ref["spots"] is not None:
        gs = {tuple(sorted(s["rays"])): s for s in got["spots"]}
        rs = {tuple(sorted(s["rays"])): s for s in ref["spots"]}
        if sorted(gs) != sorted(rs):
            bad.append(("spots[].rays", sorted(rs), sorted(gs)))
        else:
            for key, s in rs.items():
                # The coherent sum depends on path phases of up to ~1e7 rad, known to a few units
                # of 1e-16 relative: allow for that absolute phase uncertainty.
                ftol = max(FLOOR, 8 * EPS * s["phase_scale"])
                num(f"spots[{'+'.join(key)}].power", "spot power", s["power"], gs[key]["power"], floor=ftol)
                for k in range(4):
                    num(f"spots[{'+'.join(key)}].stokes[{k}]", "spot stokes", s["stokes"][k],
                        gs[key]["stokes"][k], scale=s["power"], floor=ftol)
                num(f"spots[{'+'.join(key)}].overlap", "spot overlap", s["overlap"], gs[key]["overlap"])
    return bad


# ---------------------------------------------------------------------------------------------
# Scenario generation (deterministic)
# ---------------------------------------------------------------------------------------------
KEYS = list(MATERIALS)


def gen_polarization(rng):
    k = rng.integers(7)
    if k == 0:
        return {"kind": "linear", "azimuth_deg": float(rng.uniform(-180, 180))}
    if k == 1:
        return {"kind": "linear", "azimuth_deg": float(rng.choice([0.0, 45.0, 90.0, -45.0]))}
    if k == 2:
        return {"kind": "elliptical", "azimuth_deg": float(rng.uniform(-90, 90)),
                "ellipticity_deg": float(rng.uniform(-45, 45))}
    if k == 3:
        return {"kind": "circular", "handedness": "right" if rng.random() < 0.5 else "left"}
    if k == 4:
        return {"kind": "unpolarized"}
    if k == 5:
        v = rng.normal(size=3)
        v *= rng.uniform(0, 1) / np.linalg.norm(v)
        s0 = rng.uniform(0.5, 3.0)
        return {"kind": "stokes", "stokes": [s0] + [float(x * s0) for x in v]}
    return {"kind": "jones", "jones": [[float(rng.normal()), float(rng.normal())], [float(rng.normal()), float(rng.normal())]]}


def gen_axis(rng):
    if rng.random() < 0.35:
        tilt = float(rng.choice([0.0, 90.0, 180.0, 1e-6, 180.0 - 1e-6, 45.0]))
    else:
        tilt = float(rng.uniform(0, 180))
    return {"tilt_deg": tilt, "azimuth_deg": float(rng.uniform(-360, 360))}


def gen_ideal_element(rng):
    k = rng.integers(3)
    if k == 0:
        el = {"kind": "retarder", "retardance_waves": float(rng.uniform(-2, 2)), "fast_axis_deg": float(rng.uniform(-180, 180))}
    elif k == 1:
        el = {"kind": "polarizer", "transmission_axis_deg": float(rng.uniform(-180, 180))}
    else:
        el = {"kind": "rotator", "angle_deg": float(rng.uniform(-400, 400))}
    if rng.random() < 0.3:
        el["gap_mm"] = float(rng.uniform(0, 5))
    return el


def gen_scenario(rng):
    # One scenario in eight is steered toward total internal reflection: a dense outside medium,
    # steep incidence and low-index crystals (MgF2 or custom), so that evanescent modes occur.
    tir = rng.random() < 0.125
    ncr = int(rng.integers(1, 4))
    mats = []
    for _ in range(ncr):
        if tir:
            mats.append(None if rng.random() < 0.6 else "mgf2")
        else:
            mats.append(None if rng.random() < 0.18 else KEYS[rng.integers(len(KEYS))])
    lo, hi = 190.0, 7000.0
    for m in mats:
        if m is not None:
            a, b = MATERIALS[m][0]
            lo, hi = max(lo, a), min(hi, b)
    if lo >= hi:
        return None
    nm = float(math.exp(rng.uniform(math.log(lo), math.log(hi))))
    elements = []
    for i, m in enumerate(mats):
        if i > 0 and rng.random() < 0.4:
            for _ in range(int(rng.integers(1, 3))):
                elements.append(gen_ideal_element(rng))
        el = {"kind": "crystal"}
        if m is None:
            top = 1.5 if tir else 2.8
            no = float(rng.uniform(1.3, top))
            ne = no if rng.random() < 0.1 else float(rng.uniform(1.3, top))
            el.update(no=no, ne=ne)
        else:
            el["material"] = m
        el["thickness_mm"] = float(math.exp(rng.uniform(math.log(0.05), math.log(30.0))))
        el["axis"] = gen_axis(rng)
        if rng.random() < 0.6:
            el["gap_mm"] = float(rng.uniform(0, 20))
        elements.append(el)
    if rng.random() < 0.15:
        elements.append(gen_ideal_element(rng))
    if tir:
        polar = float(rng.uniform(55, 75))
    elif rng.random() < 0.25:
        polar = 0.0
    else:
        polar = float(rng.uniform(0, 75)) * (-1 if rng.random() < 0.15 else 1)
    sc = {
        "version": 1,
        "wavelength_nm": nm,
        "outside_index": float(rng.uniform(1.42, 1.5)) if tir else
        (1.0 if rng.random() < 0.7 else float(rng.uniform(1.33, 1.5))),
        "interface_losses": "ideal" if rng.random() < 0.5 else "uncoated",
        "beam": {"diameter_mm": 1.0,
                 "incidence": {"polar_deg": polar, "azimuth_deg": float(rng.uniform(-360, 360))},
                 "polarization": gen_polarization(rng)},
        "elements": elements,
    }
    return sc


def well_posed(sc):
    """Rejects scenarios within a hair of a critical angle (where propagating vs evanescent is a
    rounding question for both programs)."""
    try:
        nm = sc["wavelength_nm"]
        n_out = sc["outside_index"]
        inc = sc["beam"]["incidence"]
        u = incidence_direction(inc["polar_deg"], inc["azimuth_deg"])
        for el in sc["elements"]:
            if el["kind"] != "crystal":
                continue
            no, ne = material_indices(el["material"], nm) if "material" in el else (el["no"], el["ne"])
            c = unit_axis(el["axis"]["tilt_deg"], el["axis"]["azimuth_deg"])
            fwd, _ = crystal_modes(no, ne, c, n_out * u[0], n_out * u[1])
            for m in fwd:
                if m.propagating and m.ray()[2] < 1e-3:
                    return False
                if not m.propagating and abs(m.qz.imag) < 1e-3:
                    return False
        return True
    except ReferenceError:
        return False


FIXED_SCENARIOS = [
    # Displacer, half-wave plate (fast axis 22.5 deg), displacer turned by 180 deg: at normal
    # incidence the "oo" and "ee" rays meet again and add coherently; at 3 deg they part.
    {"version": 1, "wavelength_nm": 632.8, "interface_losses": interface, "outside_index": 1.0,
     "beam": {"incidence": {"polar_deg": polar, "azimuth_deg": 30.0},
              "polarization": {"kind": "linear", "azimuth_deg": 20.0}},
     "elements": [
         {"kind": "crystal", "material": "calcite", "thickness_mm": 10.0, "axis": {"tilt_deg": 45.0, "azimuth_deg": 0.0}},
         {"kind": "retarder", "retardance_waves": 0.5, "fast_axis_deg": 22.5, "gap_mm": 1.0},
         {"kind": "crystal", "material": "calcite", "thickness_mm": 10.0, "axis": {"tilt_deg": 45.0, "azimuth_deg": 180.0},
          "gap_mm": 1.0}]}
    for polar in (0.0, 3.0) for interface in ("ideal", "uncoated")
]


def generate(count, seed):
    """The fixed scenarios, then `count` random ones."""
    rng = np.random.default_rng(seed)
    out = list(FIXED_SCENARIOS)
    count += len(out)
    while len(out) < count:
        sc = gen_scenario(rng)
        if sc is not None and well_posed(sc):
            out.append(sc)
    return out


# ---------------------------------------------------------------------------------------------
# Hand cases: closed forms from the textbooks
# ---------------------------------------------------------------------------------------------
def hand_cases():
    """(name, scenario, function(reference result, crate result) -> list of (what, closed form,
    reference, crate))."""
    cases = []

    # 1. Calcite, optic axis 45 deg from the plate normal, normal incidence, 632.8 nm. The e-wave
    #    normal is along z, at theta = 45 deg to the axis: its index from
    #    1/n(theta)^2 = cos^2/n_o^2 + sin^2/n_e^2 and its walk-off from
    #    tan rho = (n_o^2 - n_e^2) sin theta cos theta / (n_e^2 cos^2 theta + n_o^2 sin^2 theta)
    #    (M. Born and E. Wolf, Principles of Optics, 7th ed., section 15.3; A. Yariv and P. Yeh,
    #    Optical Waves in Crystals, Wiley 1984, section 4.3). Separation L tan rho.
    sc1 = {"version": 1, "wavelength_nm": 632.8, "beam": {"polarization": {"kind": "linear", "azimuth_deg": 30}},
           "elements": [{"kind": "crystal", "material": "calcite", "thickness_mm": 10.0,
                         "axis": {"tilt_deg": 45.0, "azimuth_deg": 0.0}}]}

    def f1(ref, got):
        no, ne = material_indices("calcite", 632.8)
        th = math.radians(45.0)
        n_th = 1.0 / math.sqrt(math.cos(th) ** 2 / no ** 2 + math.sin(th) ** 2 / ne ** 2)
        rho = math.atan((no ** 2 - ne ** 2) * math.sin(th) * math.cos(th) /
                        (ne ** 2 * math.cos(th) ** 2 + no ** 2 * math.sin(th) ** 2))
        gr, rr = got["elements"][0], ref["elements"][0]
        return [("e index n(45 deg)", n_th, rr["modes"][1]["index"], gr["e"]["index"]),
                ("e walk-off rho, deg", math.degrees(rho), rr["modes"][1]["walkoff_deg"], gr["e"]["walkoff_deg"]),
                ("separation L tan rho, mm", 10.0 * math.tan(rho), rr["separation"], gr["separation_mm"])]
    cases.append(("calcite 45-degree cut, normal incidence", sc1, f1))

    # 2. a-cut plate (optic axis along x), incidence in the x-z plane at 40 deg from air, custom
    #    n_o = 1.6, n_e = 1.5. With s = sin(40 deg): q_z,o = sqrt(n_o^2 - s^2) and, from
    #    q_x^2/n_o^2 + q_z^2/n_e^2 = 1, q_z,e = (n_e/n_o) sqrt(n_o^2 - s^2) (Yariv and Yeh,
    #    Optical Waves in Crystals, ch. 4, index ellipsoid / normal surface; Born and Wolf 15.3).
    #    Retardance k0 L (q_z,e - q_z,o).
    sc2 = {"version": 1, "wavelength_nm": 800.0, "interface_losses": "uncoated",
           "beam": {"incidence": {"polar_deg": 40.0, "azimuth_deg": 0.0}, "polarization": {"kind": "unpolarized"}},
           "elements": [{"kind": "crystal", "no": 1.6, "ne": 1.5, "thickness_mm": 2.0,
                         "axis": {"tilt_deg": 90.0, "azimuth_deg": 0.0}}]}

    def f2(ref, got):
        no, ne, s = 1.6, 1.5, math.sin(math.radians(40.0))
        qo = math.sqrt(no ** 2 - s ** 2)
        qe = ne / no * qo
        k0 = 2 * math.pi / 800e-6
        gr, rr = got["elements"][0], ref["elements"][0]
        return [("q_z,o", qo, rr["modes"][0]["qz"], gr["o"]["qz"]),
                ("q_z,e = (n_e/n_o) sqrt(n_o^2 - s^2)", qe, rr["modes"][1]["qz"], gr["e"]["qz"]),
                ("retardance k0 L (q_z,e - q_z,o)", k0 * 2.0 * (qe - qo), rr["retardance"], gr["retardance_rad"])]
    cases.append(("a-cut plate, incidence in the x-z plane", sc2, f2))

    # 3. Uncoated quartz plate, optic axis in the face along x (tilt 90), normal incidence from
    #    air, unpolarized light. Each face transmits 4n/(1+n)^2 of the power of a mode of index n
    #    (Born and Wolf, section 1.5.3, Fresnel formulae at normal incidence), so the o-ray
    #    carries (1/2)(4 n_o/(1+n_o)^2)^2 and the e-ray (1/2)(4 n_e/(1+n_e)^2)^2.
    sc3 = {"version": 1, "wavelength_nm": 589.3, "interface_losses": "uncoated",
           "beam": {"polarization": {"kind": "unpolarized"}},
           "elements": [{"kind": "crystal", "material": "quartz", "thickness_mm": 1.0,
                         "axis": {"tilt_deg": 90.0, "azimuth_deg": 0.0}}]}

    def f3(ref, got):
        no, ne = material_indices("quartz", 589.3)
        to, te = 4 * no / (1 + no) ** 2, 4 * ne / (1 + ne) ** 2
        gp = {r["label"]: r["power"] for r in got["rays"]}
        return [("o-ray power (1/2) T_o^2", 0.5 * to * to, ref["rays"]["o"]["power"], gp.get("o")),
                ("e-ray power (1/2) T_e^2", 0.5 * te * te, ref["rays"]["e"]["power"], gp.get("e"))]
    cases.append(("uncoated quartz, normal-incidence Fresnel", sc3, f3))
    return cases


# ---------------------------------------------------------------------------------------------
# Main
# ---------------------------------------------------------------------------------------------
def plain(v):
    """numpy scalars and arrays as plain Python values, for printing."""
    if isinstance(v, np.ndarray):
        return v.tolist()
    if isinstance(v, np.generic):
        return v.item()
    return v


def run_cli(binary, sc):
    p = subprocess.run([binary, "trace", "-"], input=json.dumps(sc), capture_output=True, text=True)
    try:
        return json.loads(p.stdout)
    except json.JSONDecodeError:
        return {"error": {"field": "", "message": f"exit {p.returncode}: {p.stdout[:300]} {p.stderr[:300]}"}}


def main():
    here = os.path.dirname(os.path.abspath(__file__))
    ap = argparse.ArgumentParser()
    ap.add_argument("--bin", default=os.path.join(here, "..", "..", "target", "release", "doublespar"))
    ap.add_argument("--count", type=int, default=400)
    ap.add_argument("--seed", type=int, default=20240611)
    ap.add_argument("--verbose", action="store_true")
    args = ap.parse_args()
    t0 = time.time()
    comp = Comparator()
    passed = failed = 0

    def report_failure(name, sc, bad):
        print(f"FAIL {name}")
        print("  scenario: " + json.dumps(sc))
        for field, r, g in bad:
            print(f"  {field}: reference {plain(r)!r}, crate {plain(g)!r}")

    # Hand cases: the reference against the closed form (tight), the crate against it (REL).
    for name, sc, fn in hand_cases():
        got = run_cli(args.bin, sc)
        ref = reference_trace(sc)
        bad = [] if "error" not in got else [("error", None, got["error"])]
        if not bad:
            for what, closed, r, g in fn(ref, got):
                if g is None or abs(r - closed) > 1e-12 * max(abs(closed), 1e-3):
                    bad.append((f"closed form {what} ({closed!r}) vs reference", closed, r))
                if g is None or abs(g - closed) > REL * max(abs(closed), 1e-3):
                    bad.append((f"closed form {what} ({closed!r}) vs crate", closed, g))
            bad += check(ref, got, sc, comp, name)
        if bad:
            failed += 1
            report_failure(f"hand case: {name}", sc, bad)
        else:
            passed += 1
            if args.verbose:
                print(f"ok   hand case: {name}")

    scenarios = generate(args.count, args.seed)
    for i, sc in enumerate(scenarios):
        try:
            ref = reference_trace(sc)
        except ReferenceError as e:
            failed += 1
            report_failure(f"scenario {i} (reference could not be computed: {e})", sc, [])
            continue
        got = run_cli(args.bin, sc)
        bad = check(ref, got, sc, comp, f"scenario {i}")
        if bad:
            failed += 1
            report_failure(f"scenario {i}", sc, bad)
        else:
            passed += 1
    dt = time.time() - t0
    print("worst disagreement per quantity: relative (values >= 1e-6), absolute (values < 1e-6),")
    print("and the largest disagreement/tolerance ratio with its scenario:")
    for what in sorted(comp.worst):
        rel, ab, ratio, where = comp.worst[what]
        print(f"  {what:22s} rel {rel:.1e}  abs(small) {ab:.1e}  err/tol {ratio:.2f} ({where})")
    print(f"runtime {dt:.1f} s")
    print(f"{passed} passed, {failed} failed")
    return 0 if failed == 0 else 1


if __name__ == "__main__":
    sys.exit(main())
