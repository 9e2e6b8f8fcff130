#!/usr/bin/python3
"""Reference values for tests/test_inductance.cpp and tests/test_forces.cpp, computed
independently of the C++ code with mpmath at 40 significant digits.

  M  Maxwell's mutual inductance of coaxial circular filaments of radii a, b a distance d apart:
       M = mu0 sqrt(a b) [(2/k - k) K(k) - (2/k) E(k)],  k^2 = 4ab / ((a+b)^2 + d^2)
     (J. C. Maxwell, Treatise on Electricity and Magnetism, vol. 2, art. 701), written here in
     the textbook form with mpmath's ellipk/ellipe (parameter m = k^2), not the Landen form the
     C++ code uses.
  F  the axial force on loop b (at +d) from loop a, per ampere squared, F = dM/dd, by mpmath's
     numerical differentiation of the formula above (independent of any closed form for F).
  KN Nagaoka's coefficient of a current sheet of radius a, length l (H. Nagaoka, J. Coll. Sci.
     Tokyo 27, 1909), from its elliptic-integral form, and by direct numerical integration of
     the mutual inductance of the sheet with itself as a check.

Run:  /usr/bin/python3 tests/reference/mutual_reference.py   (writes the CSVs next to it)
"""
import csv
import os

from mpmath import mp, mpf, ellipk, ellipe, sqrt, pi, diff, quad

mp.dps = 40
MU0 = mpf("1.25663706212e-6")  # CODATA 2018, as include/coilwright/constants.hpp

def maxwell(a, b, d):
    a, b, d = mpf(a), mpf(b), mpf(d)
    m = 4 * a * b / ((a + b) ** 2 + d ** 2)
    k = sqrt(m)
    return MU0 * sqrt(a * b) * ((2 / k - k) * ellipk(m) - (2 / k) * ellipe(m))

def force(a, b, d):
    return diff(lambda x: maxwell(a, b, x), mpf(d))

def nagaoka(diameter_over_length):
    # current sheet radius a, length l; k^2 = 4a^2/(4a^2 + l^2)
    a = mpf(diameter_over_length) / 2
    l = mpf(1)
    m = 4 * a ** 2 / (4 * a ** 2 + l ** 2)
    k, kp = sqrt(m), sqrt(1 - m)
    K, E = ellipk(m), ellipe(m)
    return 4 / (3 * pi * kp) * ((kp ** 2 / k ** 2) * (K - E) + E - k)

def nagaoka_by_quadrature(diameter_over_length):
    # L of a sheet with n turns per metre: n^2 * integral over both lengths of M(a, a, z1 - z2);
    # K_N = L / (mu0 pi a^2 n^2 l).  Integrate the |z1-z2| = u form: int_0^l 2 (l - u) M(u) du.
    a = mpf(diameter_over_length) / 2
    l = mpf(1)
    # M(a, a, u) has an integrable log singularity at u = 0; tanh-sinh never samples the end
    # point itself; below 1e-15 m (k^2 = 1 to 40 digits below 1e-20 m) the integrand is taken as 0, which
    # drops less than 1e-12 of the integral.
    f = lambda u: 2 * (l - u) * maxwell(a, a, u) if u > mpf(10) ** -15 else mpf(0)
    L = quad(f, [0, min(a, l) / 100, min(a, l), l])
    return L / (MU0 * pi * a ** 2 * l)

here = os.path.dirname(os.path.abspath(__file__))
cases = [  # a [m], b [m], d [m]
    (0.1, 0.1, 0.05), (0.1, 0.1, 0.1), (0.1, 0.2, 0.0), (0.1, 0.2, 0.3),
    (0.05, 0.3, 0.02), (0.1, 0.1, 1e-3), (0.1, 0.1, 2.0), (0.01, 0.5, 5.0),
    (0.25, 0.2, 0.125), (1.0, 1.0, 1e-4),
]
with open(os.path.join(here, "mutual_reference.csv"), "w", newline="") as f:
    w = csv.writer(f)
    w.writerow(["a_m", "b_m", "d_m", "M_H", "Fz_N_per_A2"])
    for a, b, d in cases:
        w.writerow([repr(a), repr(b), repr(d), mp.nstr(maxwell(a, b, d), 20), mp.nstr(force(a, b, d), 20)])

with open(os.path.join(here, "nagaoka_reference.csv"), "w", newline="") as f:
    w = csv.writer(f)
    w.writerow(["diameter_over_length", "nagaoka", "nagaoka_by_quadrature"])
    for r in ["0.1", "0.5", "1", "2", "5", "10"]:
        w.writerow([r, mp.nstr(nagaoka(r), 20), mp.nstr(nagaoka_by_quadrature(r), 20)])
