#!/usr/bin/env bash
# Regenerates the energisation reference waveforms of waves/laplace_test.go with
# ngspice-39 (Debian package ngspice 39) and Debian's python3-numpy (resampling onto an
# even 10 µs grid). Run from this folder: ./gen_energise.sh
# The circuits are the open-ended line energised from an EMF of 1 V (= 1 pu) through
# the source impedance; the far end carries only a 1e12 ohm leak to give the node a
# d.c. path. Output: energise_<case>.csv with t_s, v_sending, v_receiving.
set -euo pipefail
cd "$(dirname "$0")"
(ngspice --version || true) | grep -m1 ngspice- > ngspice_version.txt
tmp=$(mktemp -d)
trap 'rm -rf "$tmp"' EXIT

# Line of the tests: L = 0.95 mH/km, C = 12 nF/km, 300 km (Zc = 281.366 ohm, tau = 1.012917 ms).
run() { # name netlist
	printf '%s\n' "$2" > "$tmp/$1.cir"
	ngspice -b "$tmp/$1.cir" > "$tmp/$1.log" 2>&1 || true # batch mode exits 1 without .print lines
	[ -s "$tmp/$1.dat" ] || { cat "$tmp/$1.log"; exit 1; }
	/usr/bin/python3 - "$tmp/$1.dat" "energise_$1.csv" <<'PY'
import sys, numpy as np
d = np.loadtxt(sys.argv[1])
t, vs, vr = d[:, 0], d[:, 1], d[:, 3]
g = np.arange(0, 20e-3 + 1e-12, 10e-6)
with open(sys.argv[2], "w") as f:
    f.write("t_s,v_sending,v_receiving\n")
    for a, b, c in zip(g, np.interp(g, t, vs), np.interp(g, t, vr)):
        f.write(f"{a:.9g},{b:.9g},{c:.9g}\n")
PY
}

# 1. Lossless line (ngspice T element), 100 ohm resistive source, unit step (1 µs rise).
run lossless "* lossless line, resistive source
V1 e 0 PWL(0 0 1u 1)
R1 e s 100
T1 s 0 r 0 Z0=281.3657 TD=1.0129166m
Rr r 0 1e12
.tran 1u 20m 0 1u
.control
run
wrdata $tmp/lossless.dat v(s) v(r)
.endc
.end"

# 2. Lossy line (ngspice LTRA, R = 0.1 ohm/km), R-L source 0.9 ohm + 34 mH, unit step.
run lossy_step "* lossy line, R-L source, step
V1 e 0 PWL(0 0 1u 1)
R1 e m 0.9
L1 m s 34m
O1 s 0 r 0 lmod
Rr r 0 1e12
.model lmod LTRA R=0.1 L=0.95e-3 G=0 C=12e-9 LEN=300
.tran 1u 20m 0 1u
.control
run
wrdata $tmp/lossy_step.dat v(s) v(r)
.endc
.end"

# 3. The same lossy line and source, sine EMF sin(2*pi*50*t + 90 deg) from t = 0
#    (uic: everything at rest at t = 0, no d.c. operating point).
run lossy_sine "* lossy line, R-L source, sine closed at 90 degrees
V1 e 0 SIN(0 1 50 0 0 90)
R1 e m 0.9
L1 m s 34m
O1 s 0 r 0 lmod
Rr r 0 1e12
.model lmod LTRA R=0.1 L=0.95e-3 G=0 C=12e-9 LEN=300
.tran 1u 20m 0 1u uic
.control
run
wrdata $tmp/lossy_sine.dat v(s) v(r)
.endc
.end"
