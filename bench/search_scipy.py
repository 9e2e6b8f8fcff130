#!/usr/bin/python3
"""Baseline for bench/bench_search.cpp: the three-coil worst-deviation search written directly
with numpy, scipy.special and scipy.optimize.

Problem (the same as bench_search.cpp builds from TOML): coaxial loops about z, R = 0.5 m,
10 turns each; a centre loop of radius R at z = 0 on one circuit, a pair of radius sqrt(4/7) R
at z = +-s/2 on a second circuit; s free in [0.2 R, 2 R]. Goal: B = (0, 0, 100 uT) on a sphere of
radius 0.3 R, sampled at N = 2000 points of a Fibonacci lattice (the formula of
coilwright's sampling.cpp). For each s the two currents are the least-squares fit (numpy lstsq)
of B to the goal over all points and components; the objective is max_i |B_i - B_goal| / |B_goal|.

Two searches, each timed (best of `reps` runs):
  multistart: Nelder-Mead from 4 starts, chosen as bench_search.cpp chooses them (the start, then
              3 seeded random points), xatol 1e-10 of the range, fatol 1e-16 -- the same kind of
              search as coilwright's (multi-start local, derivative-free);
  bounded:    minimize_scalar(method="bounded") over [0.2 R, 2 R], xatol 1e-10 of the range --
              the cheapest scipy route for one parameter (it assumes one minimum in the range).
Prints key value lines that bench/run_search.sh reads."""
import sys
import time

import numpy as np
from scipy.optimize import minimize, minimize_scalar
from scipy.special import ellipe, ellipk

MU0 = 1.25663706212e-6
R = 0.5
RO = np.sqrt(4.0 / 7.0) * R
TURNS = 10.0
LO, HI = 0.2 * R, 2.0 * R
START = 1.6 * np.sqrt(3.0 / 7.0) * R
B_GOAL = np.array([0.0, 0.0, 100e-6])
N = int(sys.argv[2]) if len(sys.argv) > 2 else 2000


def fibonacci_sphere(n, radius):
    i = np.arange(n, dtype=np.float64)
    z = 1.0 - (2.0 * i + 1.0) / n
    r = np.sqrt(np.maximum(0.0, 1.0 - z * z))
    phi = np.pi * (3.0 - np.sqrt(5.0)) * i
    return radius * r * np.cos(phi), radius * r * np.sin(phi), radius * z


X, Y, Z = fibonacci_sphere(N, 0.3 * R)
RHO = np.hypot(X, Y)


def loop_field(a, zc):
    """B_x, B_y, B_z [T/A] of a loop of radius a at height zc: textbook K, E form."""
    z = Z - zc
    D = (a + RHO) ** 2 + z ** 2
    d = (a - RHO) ** 2 + z ** 2
    m = 4.0 * a * RHO / D
    K = ellipk(m)
    E = ellipe(m)
    c = MU0 / (2.0 * np.pi * np.sqrt(D))
    bz = c * (K + (a * a - RHO * RHO - z * z) / d * E)
    brho = c * z / RHO * (-K + (a * a + RHO * RHO + z * z) / d * E)
    return brho * X / RHO, brho * Y / RHO, bz


CENTRE = np.concatenate(loop_field(R, 0.0)) * TURNS   # fixed geometry: computed once, as coilwright caches it
WANT = np.concatenate([np.full(N, B_GOAL[0]), np.full(N, B_GOAL[1]), np.full(N, B_GOAL[2])])
evaluations = 0


def objective(s):
    global evaluations
    evaluations += 1
    s = float(np.clip(s, LO, HI))
    upper = loop_field(RO, 0.5 * s)
    lower = loop_field(RO, -0.5 * s)
    outer = np.concatenate([u + l for u, l in zip(upper, lower)]) * TURNS
    A = np.column_stack([CENTRE, outer])
    current, *_ = np.linalg.lstsq(A, WANT, rcond=None)
    b = (A @ current).reshape(3, N)
    dev = np.sqrt(((b - B_GOAL[:, None]) ** 2).sum(axis=0))
    return dev.max() / np.linalg.norm(B_GOAL)


def starts(count, seed):
    # The config's start, then seeded random points in the range (like coilwright's start list).
    rng = np.random.default_rng(seed)
    return [START] + list(LO + (HI - LO) * rng.random(count - 1))


def multistart():
    best = (np.inf, None)
    for s0 in starts(4, 1):
        r = minimize(lambda v: objective(v[0]), [s0], method="Nelder-Mead",
                     options={"xatol": 1e-10 * (HI - LO), "fatol": 1e-16, "initial_simplex": [[s0], [min(HI, s0 + 0.05 * (HI - LO))]],
                              "maxfev": 2000})
        if r.fun < best[0]:
            best = (r.fun, float(np.clip(r.x[0], LO, HI)))
    return best


def bounded():
    r = minimize_scalar(objective, bounds=(LO, HI), method="bounded", options={"xatol": 1e-10 * (HI - LO)})
    return r.fun, float(r.x)


def timed(search, reps):
    global evaluations
    best_t = np.inf
    for _ in range(reps):
        evaluations = 0
        t0 = time.perf_counter()
        f, s = search()
        best_t = min(best_t, time.perf_counter() - t0)
    return best_t, f, s, evaluations


def main():
    reps = int(sys.argv[1]) if len(sys.argv) > 1 else 3
    for name, search in (("multistart", multistart), ("bounded", bounded)):
        t, f, s, n = timed(search, reps)
        print(f"scipy_{name}_seconds {t:.6f}")
        print(f"scipy_{name}_objective {f:.9e}")
        print(f"scipy_{name}_separation_m {s:.12f}")
        print(f"scipy_{name}_evaluations {n}")
    print(f"scipy_points {N}")


if __name__ == "__main__":
    main()
