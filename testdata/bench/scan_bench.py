#!/usr/bin/python3
"""The computation of freqscan's BenchmarkScan100k, vectorised with numpy, for comparison.

Run: /usr/bin/python3 testdata/bench/scan_bench.py   (Debian python3-numpy)
Prints milliseconds per op. One op: gain |Vr/E|, gain_line |Vr/Vs|, |Vs/E|, z_in and the
sending and receiving driving-point impedances at 100,000 frequencies from 1 Hz to
2.5 kHz, for the network of freqscan/bench_test.go: a 420 km line (r 0.028 ohm/km,
l 0.93 mH/km, c 12.4 nF/km), an R-L source of 12 GVA at X/R 12 on 400 kV 50 Hz, and a
150 Mvar line-connected receiving-end reactor with X/R 300. The same formulas as the
Go code (exponential form of the exact two-port).
"""
import time
import numpy as np

V, F0 = 400e3, 50.0
ZS = V * V / 12e9
RS = ZS / np.sqrt(1 + 12.0 ** 2)
LS = RS * 12 / (2 * np.pi * F0)
XR = V * V / 150e6
RR, LR = XR / 300, XR / (2 * np.pi * F0)
R, L, G, C, LENGTH = 0.028e-3, 0.93e-6, 0.0, 12.4e-12, 420e3


def scan(f):
    s = 2j * np.pi * f
    z = R + s * L
    y = G + s * C
    gam = np.sqrt(z * y)
    zc = z / gam
    x = np.exp(-gam * LENGTH)
    w = x * x
    a = 1 + w
    b = zc * (1 - w)
    c = (1 - w) / zc
    yr = 1 / (RR + s * LR)
    zsrc = RS + s * LS
    num = a + b * yr
    den = c + a * yr
    tot = num + zsrc * den
    vre = 2 * x / tot
    vrvs = 2 * x / num
    vse = num / tot
    zin = num / den
    zsend = zsrc * num / tot
    zs = zsrc
    nout = a * zs + b
    zrecv = nout / ((c * zs + a) + yr * nout)
    return np.abs(vre), np.abs(vrvs), np.abs(vse), zin, zsend, zrecv


def main():
    f = np.linspace(1.0, 2500.0, 100000)
    scan(f)
    best = float("inf")
    for _ in range(7):
        t0 = time.perf_counter()
        reps = 10
        for _ in range(reps):
            scan(f)
        best = min(best, (time.perf_counter() - t0) / reps)
    print("scan_bench (numpy %s): %.3f ms/op (best of 7 runs of 10)" % (np.__version__, best * 1e3))


if __name__ == "__main__":
    main()
