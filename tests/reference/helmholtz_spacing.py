#!/usr/bin/env python3
"""Second-order on-axis error of a Helmholtz pair whose spacing is off (reference for test_tolerance.cpp).

Two coaxial circular loops of radius R at z = +-d/2, equal currents. On the axis (Biot-Savart)
    B(z) ∝ f((z - d/2)/R) + f((z + d/2)/R),   f(u) = (1 + u^2)^(-3/2),
and the expansion B(z)/B(0) = 1 + c2 z^2 + c4 z^4 + ... is the zonal-harmonic series of
M. W. Garrett, J. Appl. Phys. 22, 1091 (1951). Differentiating twice at z = 0 gives, with u = d/2R,
    c2 = (3 / (2 R^2)) (4 u^2 - 1) / (1 + u^2)^2,
which vanishes at d = R (Helmholtz) and, for d = R + delta, is to first order
    c2 = (48/25) delta / R^3.
Off the axis the n = 2 zonal harmonic is B_z ∝ z^2 - rho^2/2, B_rho ∝ -z rho, so over a sphere of
radius a the largest |B - B(0)| / B(0) from this term is |c2| a^2 (at the poles).
This script checks the closed form against mpmath's numerical derivatives (50 digits) and writes
the coefficients used by the test. Run: python3 tests/reference/helmholtz_spacing.py
"""
import mpmath as mp

mp.mp.dps = 50


def c2_numeric(R, d):
    f = lambda z: (1 + ((z - d / 2) / R) ** 2) ** mp.mpf(-1.5) + (1 + ((z + d / 2) / R) ** 2) ** mp.mpf(-1.5)
    return mp.diff(f, 0, 2) / (2 * f(0))


def c4_numeric(R, d):
    f = lambda z: (1 + ((z - d / 2) / R) ** 2) ** mp.mpf(-1.5) + (1 + ((z + d / 2) / R) ** 2) ** mp.mpf(-1.5)
    return mp.diff(f, 0, 4) / (24 * f(0))


def c2_closed(R, d):
    u = d / (2 * R)
    return mp.mpf(3) / (2 * R**2) * (4 * u**2 - 1) / (1 + u**2) ** 2


R = mp.mpf(1)
lines = ["# Helmholtz pair, loops of radius R = 1 at +-d/2: c2 (per R^2) and c4 (per R^4); 20 digits (mpmath, 50-digit work)"]
for eps in ["-0.02", "-0.01", "-0.005", "0", "0.005", "0.01", "0.02"]:
    d = R * (1 + mp.mpf(eps))
    a, b = c2_numeric(R, d), c2_closed(R, d)
    assert abs(a - b) < mp.mpf("1e-30"), (eps, a, b)
    lines.append(f"eps = {eps:>6}  c2 = {mp.nstr(b, 20):>26}  c4 = {mp.nstr(c4_numeric(R, d), 20):>26}")
slope = mp.diff(lambda e: c2_closed(R, R * (1 + e)), 0)
assert abs(slope - mp.mpf(48) / 25) < mp.mpf("1e-30")
lines.append(f"d c2 / d eps at eps = 0: {mp.nstr(slope, 20)} (= 48/25)")
open(__file__.replace(".py", ".txt"), "w").write("\n".join(lines) + "\n")
print("\n".join(lines))
