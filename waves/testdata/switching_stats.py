#!/usr/bin/python3
"""Reference statistics for waves.Statistics (phase-peak and case-peak methods).

Generates switching_stats.json: signed phase peaks of invented shots and the figures
numpy computes for them. Run with Debian's interpreter (it has numpy):
    /usr/bin/python3 waves/testdata/switching_stats.py > waves/testdata/switching_stats.json
"""
import json
import numpy as np

rng = np.random.default_rng(20261202)
cases = []
for n, to_iec in ((1, 1.0), (7, 400 / 420), (50, 1.0), (333, 500 / 525)):
    mag = rng.normal(2.1, 0.3, size=(n, 3))
    sign = rng.choice([-1.0, 1.0], size=(n, 3))
    peaks = mag * sign
    a = np.abs(peaks) * to_iec
    ph = a.ravel()
    cs = a.max(axis=1)
    sig = float(np.std(ph, ddof=1)) if ph.size > 1 else 0.0
    csig = float(np.std(cs, ddof=1)) if cs.size > 1 else 0.0
    u2 = float(np.percentile(ph, 98, method="linear"))
    cu2 = float(np.percentile(cs, 98, method="linear"))
    cases.append({
        "to_iec": to_iec,
        "peaks": peaks.tolist(),
        "u2": u2,
        "ut": 1.25 * u2 - 0.25,
        "mean": float(np.mean(ph)),
        "sigma": sig,
        "u2_fit": float(np.mean(ph)) + 2.054 * sig,
        "max": float(ph.max()),
        "case_u2": cu2,
        "case_mean": float(np.mean(cs)),
        "case_sigma": csig,
    })
print(json.dumps({"generator": "numpy %s (Debian python3-numpy), switching_stats.py" % np.__version__, "cases": cases}, indent=1))
