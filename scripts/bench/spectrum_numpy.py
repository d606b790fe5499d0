"""The numpy baseline of the spectrum benchmark: a 2 000-point spectrum of a five-stage filter.

Workload. The filter of scripts/bench/five-stage-filter.json: five a-cut quartz plates of 1, 2,
4, 8 and 16 mm, optic axis in the faces at 45 deg, each behind an ideal polarizer at 0 deg, a last
polarizer at 0 deg; light linear at 0 deg at normal incidence; 2 000 vacuum wavelengths evenly
spaced from 550 to 650 nm, both ends included. Checksum = the sum of the transmissions.

Physics, as the core does it for this set-up (normal incidence, ideal faces, optic axis in the
faces): each plate is a linear retarder of retardance 2 pi (n_e - n_o) L / lambda with its slow
axis (quartz is positive) along the optic axis; its Jones matrix in the x, y basis is
R(45) diag(1, exp(i Gamma)) R(-45) up to a common phase; a polarizer at 0 deg is diag(1, 0). The
field after the stack is the product applied to (1, 0) and the transmission its squared norm.
The o and e rays of each plate leave at the same point in the same direction (no walk-off), so
the core's spots add them as fields: the same sum as the Jones product.
n_o, n_e: G. Ghosh, Opt. Commun. 163, 95 (1999), the core's quartz formula (n^2 = A + B l^2 /
(l^2 - C) + D l^2 / (l^2 - E), l in um), written out here.

Vectorized over the wavelengths: every plate's Jones matrices for all 2 000 wavelengths are one
(2000, 2, 2) complex array and the stack is six batched matrix products.
Prints one JSON line: spectrum_2000_ms (best of 21 runs), spectrum_checksum.
"""

import json
import time

import numpy as np

QUARTZ_O = (1.28604141, 1.07044083, 1.00585997e-2, 1.10202242, 100.0)
QUARTZ_E = (1.28851804, 1.09509924, 1.02101864e-2, 1.15662475, 100.0)
THICKNESS_MM = [1.0, 2.0, 4.0, 8.0, 16.0]


def index(c, um):
    a, b, c1, d, e = c
    l2 = um * um
    return np.sqrt(a + b * l2 / (l2 - c1) + d * l2 / (l2 - e))


def spectrum(nm):
    um = nm * 1e-3
    dn = index(QUARTZ_E, um) - index(QUARTZ_O, um)
    polarizer = np.array([[1.0, 0.0], [0.0, 0.0]], dtype=complex)
    field = np.zeros((nm.size, 2), dtype=complex)
    field[:, 0] = 1.0
    for mm in THICKNESS_MM:
        gamma = 2.0 * np.pi * dn * mm * 1e6 / nm
        e = np.exp(1j * gamma)
        # R(45) diag(1, e) R(-45) = 0.5 [[1 + e, 1 - e], [1 - e, 1 + e]] up to sign convention.
        plate = np.empty((nm.size, 2, 2), dtype=complex)
        plate[:, 0, 0] = 0.5 * (1.0 + e)
        plate[:, 1, 1] = 0.5 * (1.0 + e)
        plate[:, 0, 1] = 0.5 * (1.0 - e)
        plate[:, 1, 0] = 0.5 * (1.0 - e)
        field = field @ polarizer.T
        field = np.einsum("nij,nj->ni", plate, field)
    field = field @ polarizer.T
    return np.sum(np.abs(field) ** 2, axis=1)


def main():
    nm = np.linspace(550.0, 650.0, 2000)
    best = float("inf")
    t = None
    for _ in range(21):
        start = time.perf_counter()
        t = spectrum(nm)
        best = min(best, time.perf_counter() - start)
    print(json.dumps({"bench": "numpy-spectrum", "spectrum_2000_ms": best * 1e3, "spectrum_checksum": float(np.sum(t))}))


if __name__ == "__main__":
    main()
