#!/usr/bin/python3
"""Reference table of modified Bessel functions of complex argument and of the internal
impedance of round conductors, for propagation/bessel_test.go and skin_test.go.

Run with Debian's python3 (python3-scipy 1.10.1, python3-numpy 1.24):
    /usr/bin/python3 testdata/gen_bessel.py
It writes testdata/bessel_scipy.txt and testdata/bessel_skin_scipy.txt.
"""
import math
import os

import numpy as np
import scipy
from scipy import special

HERE = os.path.dirname(os.path.abspath(__file__))
MU0 = 4e-7 * math.pi


def fmt(x):
    return "%.17e" % x if np.isfinite(x) else "nan"


def bessel_table():
    radii = list(np.logspace(-3, 4, 43)) + [0.5, 1.0, 1.99, 2.01, 5.0, 10.0, 17.0,
                                             24.9, 25.1, 40.0, 100.0, 700.0, 2500.0]
    angles = [0.0, math.pi / 8, math.pi / 4, -math.pi / 4, 3 * math.pi / 8]
    rows = []
    for th in angles:
        for r in radii:
            z = r * complex(math.cos(th), math.sin(th))
            vals = [special.ive(0, z), special.ive(1, z), special.kve(0, z), special.kve(1, z),
                    special.iv(0, z), special.iv(1, z), special.kv(0, z), special.kv(1, z)]
            cols = [fmt(z.real), fmt(z.imag)]
            for v in vals:
                v = complex(v)
                if not (np.isfinite(v.real) and np.isfinite(v.imag)):
                    cols += ["nan", "nan"]
                else:
                    cols += [fmt(v.real), fmt(v.imag)]
            rows.append(" ".join(cols))
    path = os.path.join(HERE, "bessel_scipy.txt")
    with open(path, "w") as f:
        f.write("# Modified Bessel functions of complex argument z from scipy.special %s\n" % scipy.__version__)
        f.write("# (Debian python3-scipy), written by testdata/gen_bessel.py.\n")
        f.write("# columns: re(z) im(z), then re im of ive0 ive1 kve0 kve1 iv0 iv1 kv0 kv1\n")
        f.write("# (ive = iv*exp(-|re z|), kve = kv*exp(z)); nan where scipy overflows.\n")
        f.write("\n".join(rows) + "\n")


def internal_impedance(s, a, b, rho):
    """Schelkunoff (1934) internal impedance per metre of a tube (outer a, inner b; b = 0 solid)."""
    m = np.sqrt(s * MU0 / rho)
    x = m * a
    k = rho * m / (2 * math.pi * a)
    if abs(x) < 600:
        # Directly in iv and kv, no scaling needed.
        if b == 0:
            return k * special.iv(0, x) / special.iv(1, x)
        y = m * b
        num = special.iv(0, x) * special.kv(1, y) + special.kv(0, x) * special.iv(1, y)
        den = special.iv(1, x) * special.kv(1, y) - special.iv(1, y) * special.kv(1, x)
        return k * num / den
    # Large |x|: exponentially scaled forms. scipy's ive scales by exp(-|Re x|); turn
    # it into I*exp(-x) with the phase factor exp(-j Im x).
    ie = lambda n, z: special.ive(n, z) * np.exp(-1j * z.imag)
    if b == 0:
        return k * ie(0, x) / ie(1, x)
    y = m * b
    e = np.exp(-2 * (x - y))
    num = ie(0, x) * special.kve(1, y) + special.kve(0, x) * ie(1, y) * e
    den = ie(1, x) * special.kve(1, y) - ie(1, y) * special.kve(1, x) * e
    return k * num / den


def skin_table():
    # (outer diameter mm, core diameter mm, d.c. ohm/km)
    conductors = [(30.0, 0.0, 0.05), (31.8, 9.0, 0.0580), (10.0, 0.0, 0.30), (20.0, 16.0, 0.10)]
    freqs = np.logspace(-2, 7, 28)
    dampings = [0.0, 50.0, 2000.0]  # Re s, 1/s (numerical Laplace transform abscissae)
    rows = []
    for D, Dc, rdc in conductors:
        a, b = D / 2000, Dc / 2000
        rho = rdc / 1000 * math.pi * (a * a - b * b)
        for c in dampings:
            for f in freqs:
                s = complex(c, 2 * math.pi * f)
                zi = complex(internal_impedance(s, a, b, rho))
                rows.append(" ".join(fmt(v) for v in [D, Dc, rdc, s.real, s.imag, zi.real, zi.imag]))
    path = os.path.join(HERE, "bessel_skin_scipy.txt")
    with open(path, "w") as f:
        f.write("# Internal impedance of round conductors (Schelkunoff 1934) from scipy.special %s ive/kve\n" % scipy.__version__)
        f.write("# (Debian python3-scipy), written by testdata/gen_bessel.py. mu_r = 1, resistivity from d.c.\n")
        f.write("# columns: outer_mm core_mm dc_ohm_per_km re(s) im(s) re(z) im(z)  (s in 1/s, z in ohm/m)\n")
        f.write("\n".join(rows) + "\n")


if __name__ == "__main__":
    bessel_table()
    skin_table()
