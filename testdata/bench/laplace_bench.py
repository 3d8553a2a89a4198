#!/usr/bin/python3
"""The numpy twin of waves.BenchmarkLaplace64k (run with Debian's /usr/bin/python3 and
python3-numpy): the open-end energisation of a lossy 300 km line (r = 0.1 ohm/km,
l = 0.95 mH/km, c = 12 nF/km) from a 1 pu step behind 0.9 ohm + 34 mH, by the numerical
Laplace transform on 65,536 frequency samples, vectorised. Prints ms/op and the peak.
"""
import time
import numpy as np

N = 65536
DURATION = 20e-3
R, L, C, LENGTH = 0.1e-3, 0.95e-6, 12e-12, 300e3
RS, LS = 0.9, 34e-3


def energise():
    dt = 2 * DURATION / N
    T = N * dt
    c = np.log(float(N) * N) / T
    k = np.arange(N)
    s = c + 1j * k * (2 * np.pi / T)
    z, y = R + s * L, s * C
    g = np.sqrt(z * y)
    g = np.where(g.real < 0, -g, g)
    zc = z / g
    x = np.exp(-g * LENGTH)
    x2 = x * x
    d = (1 - x2) * zc
    y11 = (1 + x2) / d
    y12 = -2 * x / d
    ysrc = 1 / (RS + s * LS)
    emf = 1 / s
    js = ysrc * emf
    a = y11 + ysrc
    det = a * y11 - y12 * y12
    vs = js * y11 / det
    vr = -y12 * js / det
    w = 0.5 * (1 + np.cos(np.pi * k / (N - 1)))
    w[0] *= 0.5
    t = np.arange(N // 2) * dt
    scale = 2 / T * np.exp(c * t)
    out_s = scale * (np.fft.ifft(vs * w)[: N // 2].real * N)
    out_r = scale * (np.fft.ifft(vr * w)[: N // 2].real * N)
    return out_s, out_r


energise()
best = float("inf")
for _ in range(7):
    reps = 10
    t0 = time.perf_counter()
    for _ in range(reps):
        vs, vr = energise()
    best = min(best, (time.perf_counter() - t0) / reps)
ms = best * 1e3
i = np.argmax(np.abs(vr))
print(f"numpy {np.__version__}: {ms:.2f} ms/op (best of 7 runs of 10), peak {vr[i]:.4f} pu at {i * 2 * DURATION / N * 1e3:.3f} ms")
