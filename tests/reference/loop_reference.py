#!/usr/bin/python3
"""Reference field of a circular filament loop by direct numerical integration of the
Biot-Savart law at 30 significant digits (mpmath), independent of any elliptic-integral form.

Loop of radius a in the plane z = 0, 1 A right-handed about +z, point (rho, 0, z):
  B_rho = mu0 I a z / (4 pi) * int_0^{2 pi} cos(phi) / R^3 dphi
  B_z   = mu0 I a   / (4 pi) * int_0^{2 pi} (a - rho cos(phi)) / R^3 dphi
  R^2   = a^2 + rho^2 + z^2 - 2 a rho cos(phi)
The integrands are even in phi, so we integrate over [0, pi] and double; near the wire the
interval is split geometrically towards phi = 0 (the nearest point) so tanh-sinh quadrature
resolves the peak. mu0 = 1.25663706212e-6 N/A^2 (CODATA 2018).

Writes loop_reference.csv next to this script: a_m, rho_m, z_m, brho_T, bz_T, brho_over_rho_T_per_m.
Run: /usr/bin/python3 tests/reference/loop_reference.py
"""
import csv
import os

import mpmath as mp

mp.mp.dps = 30
MU0 = mp.mpf("1.25663706212e-6")


def loop_field(a, rho, z):
    a, rho, z = mp.mpf(a), mp.mpf(rho), mp.mpf(z)

    def r3(phi):
        r2 = a * a + rho * rho + z * z - 2 * a * rho * mp.cos(phi)
        return r2 * mp.sqrt(r2)

    dist = mp.sqrt((a - rho) ** 2 + z * z)
    breaks = [mp.mpf(0)]
    t = dist / a
    while t < 1:
        breaks.append(t)
        t *= 8
    breaks.append(mp.pi)
    ir = mp.quad(lambda p: mp.cos(p) / r3(p), breaks)
    iz = mp.quad(lambda p: (a - rho * mp.cos(p)) / r3(p), breaks)
    c = MU0 / (4 * mp.pi) * 2
    br = c * a * z * ir
    bz = c * a * iz
    # B_rho / rho from the same integral; on the axis its limit (3/4) mu0 a^2 z / (a^2+z^2)^(5/2).
    brr = br / rho if rho != 0 else mp.mpf(3) / 4 * MU0 * a * a * z / (a * a + z * z) ** mp.mpf(2.5)
    return br, bz, brr


def points():
    a = 1.0
    pts = []
    # On the axis, including the centre and far along it.
    for z in (0.0, 0.3, -0.7, 2.5, 100.0):
        pts.append((a, 0.0, z))
    # Near the axis.
    for rho in (1e-8, 1e-4, 1e-2):
        pts.append((a, rho, 0.4))
    # 1e-3 a and 1e-6 a from the wire, in several directions.
    for d in (1e-3, 1e-6):
        for ang in (0.0, 0.5, 1.3, 2.2, 3.14159):
            pts.append((a, a + d * mp.cos(ang), d * mp.sin(ang)))
    # 100 a away in several directions.
    for ang in (0.1, 0.8, 1.5):
        pts.append((a, 100.0 * mp.sin(ang), 100.0 * mp.cos(ang)))
    # Generic points inside and outside, a few with another radius.
    for rho, z in ((0.5, 0.5), (0.9, -0.2), (1.7, 0.3), (3.0, -2.0), (0.2, 0.05)):
        pts.append((a, rho, z))
    for rho, z in ((0.1, 0.02), (0.3, -0.4)):
        pts.append((0.25, rho, z))
    return [(float(p[0]), float(p[1]), float(p[2])) for p in pts]


def main():
    out = os.path.join(os.path.dirname(os.path.abspath(__file__)), "loop_reference.csv")
    with open(out, "w", newline="") as f:
        w = csv.writer(f)
        f.write("# Circular loop, 1 A, mpmath 30-digit Biot-Savart integration (loop_reference.py)\n")
        w.writerow(["a_m", "rho_m", "z_m", "brho_T", "bz_T", "brho_over_rho_T_per_m"])
        for a, rho, z in points():
            br, bz, brr = loop_field(a, rho, z)
            w.writerow([repr(a), repr(rho), repr(z), mp.nstr(br, 25), mp.nstr(bz, 25), mp.nstr(brr, 25)])


if __name__ == "__main__":
    main()
