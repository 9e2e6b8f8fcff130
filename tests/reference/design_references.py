#!/usr/bin/env python3
"""Reference values for the classical coil designs, at 30 digits with mpmath.

Run:  /usr/bin/python3 tests/reference/design_references.py > tests/reference/design_references.txt
The tests quote these values beside their checks.
"""
import mpmath as mp

mp.mp.dps = 30


def loop_axis(z, a=1):
    # On-axis field of a circular loop per mu0*I/2 (Biot–Savart; e.g. Jackson, Classical Electrodynamics, 3rd ed., 5.4).
    return a**2 / (a**2 + z**2) ** mp.mpf(1.5)


def square_axis(z, a=1):
    # On-axis field of a square loop of side a per mu0*I/(2*pi) (Biot–Savart over four straight sides).
    return a**2 / ((a**2 / 4 + z**2) * mp.sqrt(a**2 / 2 + z**2))


print("# Helmholtz pair (R = 1, separation 1): on-axis Taylor coefficients b_n / b_0")
c = mp.taylor(lambda z: loop_axis(z - 0.5) + loop_axis(z + 0.5), 0, 8)
for n in range(9):
    print(f"helmholtz_b{n} = {mp.nstr(c[n] / c[0], 20)}")

print("# Maxwell gradient pair: separation / R where the third-order term vanishes")
d = mp.findroot(lambda s: mp.diff(lambda z: loop_axis(z - s / 2) - loop_axis(z + s / 2), 0, 3), 1.7)
print(f"maxwell_gradient_separation = {mp.nstr(d, 20)}  # sqrt(3) = {mp.nstr(mp.sqrt(3), 20)}")

print("# Square pair (side a = 1): separation / a where the second-order term vanishes")
d = mp.findroot(lambda s: mp.diff(lambda z: square_axis(z - s / 2) + square_axis(z + s / 2), 0, 2), 0.54)
print(f"square_pair_separation = {mp.nstr(d, 20)}")

print("# Maxwell three-coil system: outer radius sqrt(4/7), at +-sqrt(3/7), ampere-turns 49/64 of the centre coil")
ro, zo, k = mp.sqrt(mp.mpf(4) / 7), mp.sqrt(mp.mpf(3) / 7), mp.mpf(49) / 64
c = mp.taylor(lambda z: loop_axis(z) + k * (loop_axis(z - zo, ro) + loop_axis(z + zo, ro)), 0, 8)
for n in range(9):
    print(f"maxwell3_b{n} = {mp.nstr(c[n] / c[0], 20)}")
