#!/usr/bin/python3
"""Baseline: the field of a circular filament loop with numpy and scipy.special.ellipk/ellipe
(the textbook K, E form), on the same points as bench/bench_kernels.cpp. Prints ns per point."""
import sys
import time

import numpy as np
from scipy.special import ellipe, ellipk

MU0 = 1.25663706212e-6  # CODATA 2018
N = 1 << 16
A = 1.0


def points():
    i = np.arange(N, dtype=np.float64)
    u = np.fmod(0.1234 + i * 0.6180339887498949, 1.0)
    v = np.fmod(0.3456 + i * 0.7548776662466927, 1.0)
    return 2.0 * A * u, A * (2.0 * v - 1.0)


def loop_field(a, rho, z):
    """B_rho, B_z [T/A]: textbook complete elliptic integral form (e.g. Jackson, Classical
    Electrodynamics, 3rd ed., sec. 5.5; Smythe, Static and Dynamic Electricity)."""
    D = (a + rho) ** 2 + z ** 2
    d = (a - rho) ** 2 + z ** 2
    m = 4.0 * a * rho / D
    K = ellipk(m)
    E = ellipe(m)
    c = MU0 / (2.0 * np.pi * np.sqrt(D))
    bz = c * (K + (a * a - rho * rho - z * z) / d * E)
    with np.errstate(divide="ignore", invalid="ignore"):
        br = c * z / rho * (-K + (a * a + rho * rho + z * z) / d * E)
    return br, bz


def main():
    reps = int(sys.argv[1]) if len(sys.argv) > 1 else 30
    rho, z = points()
    best = 1e300
    for _ in range(reps):
        t0 = time.perf_counter()
        loop_field(A, rho, z)
        best = min(best, time.perf_counter() - t0)
    print(f"numpy_loop_ns {best / N * 1e9:.3f}")


if __name__ == "__main__":
    main()
