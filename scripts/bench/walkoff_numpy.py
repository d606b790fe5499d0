"""The numpy baseline of the benchmark: the 10^6-point closed-form walk-off sweep, vectorized.

This is what a designer would otherwise write: the walk-off of the e-ray against the cut tilt,
tan rho = (no^2 - ne^2) sin(t) cos(t) / (ne^2 cos^2 t + no^2 sin^2 t) (Born & Wolf, Principles of
Optics, section 15.3), evaluated on a numpy array of tilts. Prints the median time of repeated
runs and a checksum, as JSON, for scripts/bench.sh to compare with the native core.
"""
import json
import sys
import time

import numpy as np

NO, NE, N = 1.6556901060179166, 1.484909030214121, 1_000_000


def sweep(n):
    t = np.linspace(0.0, np.pi / 2, n)
    s, c = np.sin(t), np.cos(t)
    return np.arctan2((NO * NO - NE * NE) * s * c, NE * NE * c * c + NO * NO * s * s)


def main():
    runs = []
    for _ in range(9):
        t0 = time.perf_counter()
        rho = sweep(N)
        total = float(rho.sum())
        runs.append(time.perf_counter() - t0)
    runs.sort()
    print(json.dumps({"bench": "numpy-baseline", "numpy": np.__version__, "walkoff_sweep_1e6_ms": runs[len(runs) // 2] * 1e3, "walkoff_sweep_checksum": total}))


if __name__ == "__main__":
    sys.exit(main())
