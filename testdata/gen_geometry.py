#!/usr/bin/python3
"""Reference tables for propagation/earth_test.go and geometry_test.go.

Run with Debian's python3 (python3-numpy 1.24, python3-scipy 1.10.1):
    /usr/bin/python3 testdata/gen_geometry.py
It writes
  testdata/geometry_carson_scipy.txt: Carson's earth-return integral by scipy.integrate.quad;
  testdata/geometry_numpy.json: positive- and zero-sequence r, l, c of a few tower
      constructions at 50 Hz and 1 kHz, by an independent numpy implementation of the
      same formulas as propagation.Geometry (Schelkunoff internal impedance with
      scipy.special, complex-depth earth return, potential coefficients with images,
      bundle equivalent radius, mean height with sag, Kron reduction of the earth wires,
      averaging for transposition, symmetrical components).
"""
import json
import math
import os

import numpy as np
import scipy
from scipy import integrate, special

HERE = os.path.dirname(os.path.abspath(__file__))
MU0 = 4e-7 * math.pi
C0 = 299792458.0
EPS0 = 1 / (MU0 * C0 * C0)


def carson_integral(f, rho, hsum, x):
    """Carson (1926): dZ = (j w mu0 / pi) int_0^inf exp(-hsum l) cos(x l) / (l + sqrt(l^2 + j w mu0 / rho)) dl."""
    w = 2 * math.pi * f
    k2 = 1j * w * MU0 / rho
    g = lambda l: np.exp(-hsum * l) * np.cos(x * l) / (l + np.sqrt(l * l + k2))
    # The integrand changes on two scales, |k| = sqrt(w mu0 / rho) and 1/hsum: split there.
    k = math.sqrt(w * MU0 / rho)
    cuts = sorted({0.0, k / 10, k, 10 * k, 100 * k, 1 / hsum, 10 / hsum})
    re = im = 0.0
    for lo, hi in zip(cuts, cuts[1:] + [np.inf]):
        re += integrate.quad(lambda l: g(l).real, lo, hi, limit=1000, epsabs=0, epsrel=1e-12)[0]
        im += integrate.quad(lambda l: g(l).imag, lo, hi, limit=1000, epsabs=0, epsrel=1e-12)[0]
    return 1j * w * MU0 / math.pi * (re + 1j * im)


def carson_table():
    rows = []
    for rho in [10.0, 100.0, 1000.0, 10000.0]:
        for hsum, x in [(40.0, 0.0), (60.0, 0.0), (40.0, 10.0), (45.0, 12.0), (100.0, 0.0)]:
            for f in np.logspace(0, 6, 25):
                z = carson_integral(f, rho, hsum, x)
                rows.append("%.17e %.17e %.17e %.17e %.17e %.17e" % (f, rho, hsum, x, z.real, z.imag))
    with open(os.path.join(HERE, "geometry_carson_scipy.txt"), "w") as out:
        out.write("# Carson's earth-return correction integral (Carson 1926, displacement currents neglected)\n")
        out.write("# by scipy.integrate.quad %s (Debian python3-scipy), written by testdata/gen_geometry.py.\n" % scipy.__version__)
        out.write("# columns: f_hz rho_ohm_m hsum_m x_m re(dZ) im(dZ)   (dZ in ohm/m)\n")
        out.write("\n".join(rows) + "\n")


def internal_impedance(s, a, b, rho):
    """Schelkunoff (1934), in scipy's iv/kv (|x| < 600 in these constructions)."""
    m = np.sqrt(s * MU0 / rho)
    x = m * a
    k = rho * m / (2 * math.pi * a)
    if b == 0:
        return k * special.iv(0, x) / special.iv(1, x)
    y = m * b
    num = special.iv(0, x) * special.kv(1, y) + special.kv(0, x) * special.iv(1, y)
    den = special.iv(1, x) * special.kv(1, y) - special.iv(1, y) * special.kv(1, x)
    return k * num / den


def wire_props(w):
    a = w["outer_mm"] / 2000
    b = w["core_mm"] / 2000
    rho = w["dc_ohm_per_km"] / 1000 * math.pi * (a * a - b * b)
    n = w.get("bundle", 1)
    if n > 1:
        A = w["spacing_mm"] / 1000 / (2 * math.sin(math.pi / n))
        req = (n * a * A ** (n - 1)) ** (1 / n)
    else:
        req = a
    h = w["height_m"] - 2 * w.get("sag_m", 0) / 3
    return a, b, rho, n, req, h


def sequence(con, f):
    wires = con["phases"] + con["earth_wires"]
    props = [wire_props(w) for w in wires]
    N = len(wires)
    s = 2j * math.pi * f
    p = np.sqrt(con["rho"] / (s * MU0))
    Z = np.zeros((N, N), complex)
    P = np.zeros((N, N))
    for i in range(N):
        ai, bi, rhoi, ni, ri, hi = props[i]
        xi = wires[i]["x_m"]
        for j in range(N):
            aj, bj, rhoj, nj, rj, hj = props[j]
            xj = wires[j]["x_m"]
            if i == j:
                Z[i, i] = internal_impedance(s, ai, bi, rhoi) / ni + s * MU0 / (2 * math.pi) * np.log(2 * (hi + p) / ri)
                P[i, i] = np.log(2 * hi / ri) / (2 * math.pi * EPS0)
            else:
                d = math.hypot(xi - xj, hi - hj)
                Dc = np.sqrt((hi + hj + 2 * p) ** 2 + (xi - xj) ** 2)
                Di = math.hypot(xi - xj, hi + hj)
                Z[i, j] = s * MU0 / (2 * math.pi) * np.log(Dc / d)
                P[i, j] = np.log(Di / d) / (2 * math.pi * EPS0)
    # Kron reduction of the earth wires (block form).
    Zr = Z[:3, :3] - Z[:3, 3:] @ np.linalg.solve(Z[3:, 3:], Z[3:, :3]) if N > 3 else Z
    Pr = P[:3, :3] - P[:3, 3:] @ np.linalg.solve(P[3:, 3:], P[3:, :3]) if N > 3 else P
    if con["transposed"]:
        def avg(M):
            d = np.trace(M) / 3
            o = (M.sum() - np.trace(M)) / 6
            return np.full((3, 3), o, dtype=M.dtype) + np.eye(3) * (d - o)
        Zr, Pr = avg(Zr), avg(Pr)
    C = np.linalg.inv(Pr)
    a = np.exp(2j * math.pi / 3)
    A = np.array([[1, 1, 1], [1, a * a, a], [1, a, a * a]])
    Ai = np.linalg.inv(A)
    Zs = Ai @ Zr @ A
    Cs = Ai @ C @ A
    w = 2 * math.pi * f
    out = {"f_hz": f}
    for name, k in (("1", 1), ("0", 0)):
        z = Zs[k, k]
        c = Cs[k, k].real
        out["r%s_ohm_per_km" % name] = z.real * 1e3
        out["l%s_mh_per_km" % name] = z.imag / w * 1e6
        out["c%s_nf_per_km" % name] = c * 1e12
    return out


def wire(x, h, outer, core, rdc, sag=0.0, bundle=1, spacing=0.0):
    return {"x_m": x, "height_m": h, "sag_m": sag, "outer_mm": outer, "core_mm": core,
            "dc_ohm_per_km": rdc, "bundle": bundle, "spacing_mm": spacing}


CONSTRUCTIONS = [
    {"name": "400 kV horizontal, twin bundle, two earth wires, transposed", "rho": 100.0, "transposed": True,
     "phases": [wire(-12, 27, 31.8, 9.0, 0.058, sag=12, bundle=2, spacing=400),
                wire(0, 27, 31.8, 9.0, 0.058, sag=12, bundle=2, spacing=400),
                wire(12, 27, 31.8, 9.0, 0.058, sag=12, bundle=2, spacing=400)],
     "earth_wires": [wire(-7, 36, 14.0, 0.0, 0.35, sag=9), wire(7, 36, 14.0, 0.0, 0.35, sag=9)]},
    {"name": "220 kV delta, single conductor, no earth wire, untransposed", "rho": 1000.0, "transposed": False,
     "phases": [wire(-5, 18, 28.0, 7.0, 0.07, sag=8), wire(5, 18, 28.0, 7.0, 0.07, sag=8), wire(0, 25, 28.0, 7.0, 0.07, sag=8)],
     "earth_wires": []},
    {"name": "quad bundle, one earth wire, wet earth, transposed", "rho": 10.0, "transposed": True,
     "phases": [wire(-14, 30, 30.0, 0.0, 0.05, sag=15, bundle=4, spacing=450),
                wire(0, 30, 30.0, 0.0, 0.05, sag=15, bundle=4, spacing=450),
                wire(14, 30, 30.0, 0.0, 0.05, sag=15, bundle=4, spacing=450)],
     "earth_wires": [wire(0, 40, 12.0, 0.0, 0.5, sag=10)]},
    {"name": "vertical, triple bundle, two different earth wires, rocky earth, untransposed", "rho": 10000.0, "transposed": False,
     "phases": [wire(6, 20, 25.0, 8.0, 0.09, sag=5, bundle=3, spacing=350),
                wire(6, 28, 25.0, 8.0, 0.09, sag=5, bundle=3, spacing=350),
                wire(6, 36, 25.0, 8.0, 0.09, sag=5, bundle=3, spacing=350)],
     "earth_wires": [wire(0, 44, 16.0, 0.0, 0.25, sag=4), wire(-3, 30, 11.0, 4.0, 0.6, sag=4)]},
]


def geometry_table():
    out = {"source": "numpy %s / scipy %s (Debian), testdata/gen_geometry.py" % (np.__version__, scipy.__version__),
           "units": "r ohm/km, l mH/km, c nF/km", "constructions": []}
    for con in CONSTRUCTIONS:
        c = dict(con)
        c["results"] = [sequence(con, f) for f in (50.0, 1000.0)]
        out["constructions"].append(c)
    with open(os.path.join(HERE, "geometry_numpy.json"), "w") as f:
        json.dump(out, f, indent=1)
        f.write("\n")


if __name__ == "__main__":
    carson_table()
    geometry_table()
