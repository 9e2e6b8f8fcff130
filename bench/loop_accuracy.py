#!/usr/bin/python3
"""40-digit values of a 1 A circular loop (a = 1 m) at 2400 points: a uniform random
spread in the meridian half-plane, near the axis (rho down to 1e-12 a), near the wire (1e-6 a to
0.1 a) and far away (3 a to 1000 a). Textbook K/E form evaluated with mpmath at 40 digits (its
cancellations cost nothing at that precision); on the axis the closed form. Columns: rho z
B_rho/rho B_z. Used by bench/loop_accuracy.sh."""
import random
import sys

import mpmath as mp

mp.mp.dps = 40
random.seed(3)
pts = []
for i in range(1500):
    pts.append((random.uniform(0, 2), random.uniform(-1, 1)))
for i in range(300):
    pts.append((10**random.uniform(-12, -1), random.uniform(-2, 2)))      # near axis
for i in range(300):
    r = 10**random.uniform(-6, -1); t = random.uniform(0, 6.283185307179586)
    pts.append((1 + r*float(mp.cos(t)), r*float(mp.sin(t))))               # near wire
for i in range(300):
    r = 10**random.uniform(0.5, 3); t = random.uniform(0, 3.14159)
    pts.append((abs(r*float(mp.sin(t))), r*float(mp.cos(t))))               # far
mu0 = mp.mpf('1.25663706212e-6')
with open(sys.argv[1] if len(sys.argv) > 1 else "loop_accuracy_ref.txt", "w") as f:
    for rho, z in pts:
        a = mp.mpf(1); R = mp.mpf(rho); Z = mp.mpf(z)
        D = (a+R)**2 + Z**2; d = (a-R)**2 + Z**2; m = 4*a*R/D
        K = mp.ellipk(m); E = mp.ellipe(m)
        c = mu0/(2*mp.pi*mp.sqrt(D))
        bz = c*(K + (a*a - R*R - Z*Z)/d*E)
        if R == 0:
            brr = 0.75*mu0*a*a*Z/(a*a+Z*Z)**mp.mpf(2.5)
        else:
            brr = c*Z/R*(-K + (a*a+R*R+Z*Z)/d*E)/R
        f.write(f"{rho!r} {z!r} {mp.nstr(brr, 25)} {mp.nstr(bz, 25)}\n")
