"""The numpy baseline of the liquid-crystal benchmark: a cell's retardance at 200 voltages.

Workload (benches/core.rs, `lc_curve`): a 5CB cell 5 um thick, untwisted, rubbed along x, pretilt
2 deg at both faces, 100 sublayers, at 633 nm; 200 RMS voltages evenly from 0 to 10 V, each
director solve starting from the one before. Checksum = the sum of the 200 retardances (waves).

Physics, the same computation as the core's (src/optics/lc/director.rs and curve.rs). The
director n = (cos t, 0, sin t) has the tilt t(z) from the faces; with no twist its azimuth stays
at the rubbing direction (every azimuth term of the energy vanishes), so the core's unknowns
reduce to the tilts. The Oseen-Frank energy per area with the field at constant voltage
(de Gennes & Prost, The Physics of Liquid Crystals, 3.1-3.2; Landau & Lifshitz, Electrodynamics
of Continuous Media, 10):

    G = sum_j A(t_j) (dt_j)^2 / (2h) - eps0 V^2 / (2 W),   W = sum_j h / eps_zz(t_j),
    A = K11 cos^2 t + K33 sin^2 t,   eps_zz = eps_perp + d_eps sin^2 t,

on 100 equal intervals (t_j the mean of the interval's two nodes, dt_j their difference), the two
face nodes held at the pretilt. It is minimized by Newton's method on the exact gradient and
Hessian (tridiagonal, plus the rank-one term -eps0 V^2/W^3 u u^T of the voltage constraint),
shifted by mu I until positive definite (Levenberg-Marquardt) with a backtracking line search on
G, the core's steps, thresholds and warm start (a bulge of 1e-6 rad over the previous profile).
Retardance: (1/lambda) sum_j (n_eff(t_j) - n_o) h with 1/n_eff^2 = sin^2 t/n_o^2 + cos^2 t/n_e^2.
5CB: indices from the Cauchy fits of J. Li and S.-T. Wu, J. Appl. Phys. 95, 896 (2004), elastic
and dielectric constants of M. J. Bradshaw et al., J. Physique 46, 1513 (1985), the numbers of
src/optics/lc/catalogue.rs written out here.

Vectorized: every sum, gradient and Hessian is one array expression over the 100 intervals and
the Newton step one dense solve; the voltages are taken one after the other, as the warm start
needs. Prints one JSON line: lc_curve_200_ms (median of 7 runs), lc_curve_checksum.
With --check: compares each of several voltages with `doublespar trace` of the same cell (its
cold solve) to 1e-7 waves, and exits 1 on a disagreement.
"""

import json
import subprocess
import sys
import time

import numpy as np

EPS0 = 8.8541878128  # pN/V^2
UM = 0.633
NE = 1.6795 + 0.0048 / UM**2 + 0.0027 / UM**4
NO = 1.5187 + 0.0016 / UM**2 + 0.0011 / UM**4
K11, K33 = 6.4, 10.0
EPS_PAR, EPS_PERP = 19.7, 6.7
THICKNESS_UM = 5.0
PRETILT = np.radians(2.0)
SUBLAYERS = 100
STEP_RAD = 1e-11  # precision::DIRECTOR_STEP_RAD
ITERATIONS = 200  # precision::DIRECTOR_ITERATIONS
BASIN_RAD = 1e-3
FLAT_VALLEY = 1e-13


def energy(theta, h, v2):
    t = 0.5 * (theta[1:] + theta[:-1])
    a = np.diff(theta)
    s2 = np.sin(t) ** 2
    aa = K11 + (K33 - K11) * s2
    w = np.sum(h / (EPS_PERP + (EPS_PAR - EPS_PERP) * s2))
    return np.sum(aa * a * a) * 0.5 / h - 0.5 * v2 / w


def local(theta, h, v2):
    """Energy, gradient, Hessian (dense, rank-one term included) over the interior nodes."""
    t = 0.5 * (theta[1:] + theta[:-1])
    a = np.diff(theta)
    s2t, c2t = np.sin(2 * t), np.cos(2 * t)
    aa = K11 + (K33 - K11) * 0.5 * (1 - c2t)
    aa1 = (K33 - K11) * s2t
    aa2 = 2 * (K33 - K11) * c2t
    de = EPS_PAR - EPS_PERP
    e = EPS_PERP + de * 0.5 * (1 - c2t)
    e1, e2 = de * s2t, 2 * de * c2t
    g0 = h / e
    g1 = -h * e1 / e**2
    g2 = h * (2 * e1 * e1 / e**3 - e2 / e**2)
    w = np.sum(g0)
    field = 0.5 * v2 / w**2
    en = np.sum(aa * a * a) * 0.5 / h - 0.5 * v2 / w
    gt = aa1 * a * a * 0.5 / h + field * g1
    ga = aa * a / h
    ett = aa2 * a * a * 0.5 / h + field * g2
    eta = aa1 * a / h
    eaa = aa / h
    # Interval j touches nodes j (weights 0.5, -1) and j + 1 (0.5, 1); keep the interior nodes.
    grad = (0.5 * gt[:-1] + ga[:-1]) + (0.5 * gt[1:] - ga[1:])
    diag = (0.25 * ett[:-1] + eta[:-1] + eaa[:-1]) + (0.25 * ett[1:] - eta[1:] + eaa[1:])
    off = (0.25 * ett - eaa)[1:-1]
    u = 0.5 * (g1[:-1] + g1[1:])
    hess = np.diag(diag) + np.diag(off, 1) + np.diag(off, -1) - (v2 / w**3) * np.outer(u, u)
    return en, grad, hess, np.max(np.abs(diag))


def newton_step(grad, hess, scale):
    mu = 0.0
    eye = np.eye(len(grad))
    for _ in range(80):
        try:
            np.linalg.cholesky(hess + mu * eye)
            return -np.linalg.solve(hess + mu * eye, grad), mu > 0.0
        except np.linalg.LinAlgError:
            mu = 1e-8 * max(scale, 1e-300) if mu == 0.0 else mu * 4.0
    return None, False


def solve(voltage, start):
    n = SUBLAYERS
    h = THICKNESS_UM / n
    v2 = EPS0 * voltage * voltage
    if start is None:
        theta = np.full(n + 1, PRETILT)  # the relaxed profile: the first voltage is 0 V
    else:
        theta = start + 1e-6 * np.sin(np.pi * np.arange(n + 1) / n)
    theta[0] = theta[n] = PRETILT
    for _ in range(ITERATIONS):
        en, grad, hess, scale = local(theta, h, v2)
        step, shifted = newton_step(grad, hess, scale)
        if step is None:
            break
        largest = np.max(np.abs(step))
        if not shifted and largest <= BASIN_RAD:
            theta[1:-1] += step
            if largest <= STEP_RAD:
                break
            continue
        slope = float(grad @ step)
        alpha, moved = 1.0, False
        for _ in range(40):
            trial = theta.copy()
            trial[1:-1] += alpha * step
            e = energy(trial, h, v2)
            if e <= en + 1e-4 * alpha * slope:
                theta = trial
                moved = not shifted or en - e > FLAT_VALLEY * (1.0 + abs(en))
                break
            alpha *= 0.5
        if not moved:
            break
    return theta


def retardance(theta):
    t = 0.5 * (theta[1:] + theta[:-1])
    n_eff = 1.0 / np.sqrt(np.sin(t) ** 2 / NO**2 + np.cos(t) ** 2 / NE**2)
    return float(np.sum(n_eff - NO) * (THICKNESS_UM / SUBLAYERS) / UM)


def curve(voltages):
    out, last = [], None
    for v in voltages:
        last = solve(v, last)
        out.append(retardance(last))
    return np.array(out)


def check(voltages, values):
    worst = 0.0
    for i in range(0, len(voltages), 19):
        doc = {"version": 2, "wavelength_nm": 633, "elements": [
            {"kind": "lc_cell", "thickness_um": THICKNESS_UM, "lc": "5cb", "twist_deg": 0, "pretilt_deg": 2,
             "voltage_v": float(voltages[i])}]}
        r = subprocess.run(["target/release/doublespar", "trace", "-"], input=json.dumps(doc),
                           capture_output=True, text=True, check=True)
        core = json.loads(r.stdout)["elements"][0]["retardance_waves"]
        worst = max(worst, abs(core - values[i]))
    print(f"largest difference from doublespar trace: {worst:.2e} waves (tolerance 1e-7)")
    return worst <= 1e-7


def main():
    voltages = np.linspace(0.0, 10.0, 200)
    times, values = [], None
    for _ in range(7):
        start = time.perf_counter()
        values = curve(voltages)
        times.append(time.perf_counter() - start)
    if "--check" in sys.argv[1:] and not check(voltages, values):
        sys.exit(1)
    print(json.dumps({"bench": "numpy-lc", "lc_curve_200_ms": float(np.median(times)) * 1e3,
                      "lc_curve_checksum": float(np.sum(values))}))


if __name__ == "__main__":
    main()
