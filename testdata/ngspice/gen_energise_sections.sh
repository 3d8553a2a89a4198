#!/usr/bin/env bash
# Regenerates the reference waveforms of a line in sections (overhead, cable, overhead)
# for waves/sections_test.go with ngspice-39 (Debian package ngspice 39, its LTRA lossy
# line) and Debian's python3-numpy (resampling onto an even 10 µs grid).
# Run from this folder: ./gen_energise_sections.sh
# The circuit: a 1 V (= 1 pu) step EMF (1 µs rise) behind R-L 0.8858 ohm + 33.84 mH,
# 172 km overhead (R 0.028 ohm/km, L 0.93 mH/km, C 12.4 nF/km), 8 km cable
# (R 0.012 ohm/km, L 0.42 mH/km, C 220 nF/km), 14 km overhead as the first; at the open
# end a line-connected reactor 3.8095 ohm + 4.2441 H (120 Mvar at 400 kV, 50 Hz,
# q = 350) and a 1e12 ohm leak. Everything at rest at t = 0 (uic).
# Output: energise_sections.csv with t_s, v_sending, v_junction1, v_junction2, v_receiving.
set -euo pipefail
cd "$(dirname "$0")"
(ngspice --version || true) | grep -m1 ngspice- > ngspice_version.txt
tmp=$(mktemp -d)
trap 'rm -rf "$tmp"' EXIT
cat > "$tmp/sections.cir" <<CIR
* overhead line with a cable crossing, R-L source, receiving line reactor, step
V1 e 0 PWL(0 0 1u 1)
R1 e m 0.8858
L1 m s 33.84m
O1 s 0 j1 0 ohl
O2 j1 0 j2 0 cab
O3 j2 0 r 0 ohs
Rx r x 3.8095
Lx x 0 4.2441
Rr r 0 1e12
.model ohl LTRA R=0.028 L=0.93e-3 G=0 C=12.4e-9 LEN=172
.model cab LTRA R=0.012 L=0.42e-3 G=0 C=220e-9 LEN=8
.model ohs LTRA R=0.028 L=0.93e-3 G=0 C=12.4e-9 LEN=14
.tran 0.5u 20m 0 0.5u uic
.control
run
wrdata $tmp/sections.dat v(s) v(j1) v(j2) v(r)
.endc
.end
CIR
ngspice -b "$tmp/sections.cir" > "$tmp/sections.log" 2>&1 || true
[ -s "$tmp/sections.dat" ] || { cat "$tmp/sections.log"; exit 1; }
/usr/bin/python3 - "$tmp/sections.dat" energise_sections.csv <<'PY'
import sys, numpy as np
d = np.loadtxt(sys.argv[1])
t = d[:, 0]
cols = [d[:, 1], d[:, 3], d[:, 5], d[:, 7]]
g = np.arange(0, 20e-3 + 1e-12, 10e-6)
with open(sys.argv[2], "w") as f:
    f.write("t_s,v_sending,v_junction1,v_junction2,v_receiving\n")
    for i, a in enumerate(g):
        f.write(",".join(f"{x:.9g}" for x in [a] + [np.interp(a, t, c) for c in cols]) + "\n")
PY
