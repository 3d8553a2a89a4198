#!/usr/bin/env bash
# Regenerates the ring-down of de-energised three-phase lines with line-connected
# reactors during a reclosing dead time, for waves/deadtime_test.go, with ngspice-39
# (Debian package ngspice 39) and Debian's python3-numpy (netlist, resampling).
# Run from this folder: ./gen_deadtime.sh
#
# Each line is a chain of 40 pi sections of a transposed line in the phase domain: each
# phase a series R1, L1 per section (positive sequence), a common earth-return
# conductor carrying the sum of the phase currents with (R0 - R1)/3, (L0 - L1)/3 per
# section (so self - mutual = Z1 and mutual = (Z0 - Z1)/3, the sequence impedances),
# and at every node C0 from each phase to the local earth and (C1 - C0)/3 between
# phases (so the capacitance matrix has the sequence capacitances C1, C0). Reactors are
# R + L per phase from the line end to their star point, the star point to the local
# earth directly or through a neutral reactor. Units: 1 V = 1 pu.
# At t = 0 (the opening) every phase is charged to its trapped voltage, every
# inductor current is zero (uic).
#   deadtime_345kv.csv: 345 kV, 60 Hz, 250 km (r 0.03, l 1.0 mH, c 11.5 nF per km;
#     r0 0.3, l0 3.2 mH, c0 7.5 nF per km), receiving-end reactor 75 Mvar at 345 kV,
#     q 300 (R 5.29 ohm + L 4.2105 H), solidly earthed; trapped -1, +1, -1 pu.
#   deadtime_400kv.csv: 400 kV, 50 Hz, 320 km (r 0.025, l 0.95 mH, c 12 nF per km;
#     r0 0.25, l0 3.0 mH, c0 7.5 nF per km), sending-end reactor 100 Mvar q 300
#     (R 5.3333 ohm + L 5.0930 H) solidly earthed, receiving-end reactor 150 Mvar
#     q 300 (R 3.5556 ohm + L 3.3953 H) with a 300 ohm neutral reactor (0.95493 H);
#     trapped +1, -0.4, +0.7 pu.
# Output columns: t_s, then the line voltage of phases a, b, c at the sending end and
# at the receiving end (each to the local earth), every 0.1 ms from 0 to 350 ms.
set -euo pipefail
cd "$(dirname "$0")"
(ngspice --version || true) | grep -m1 ngspice- > ngspice_version.txt
tmp=$(mktemp -d)
trap 'rm -rf "$tmp"' EXIT
/usr/bin/python3 - "$tmp" <<'PY'
import sys, subprocess, numpy as np
tmp = sys.argv[1]
N = 40
def netlist(name, km, r1, l1, c1, r0, l0, c0, reactors, trapped):
    dx = km / N
    out = ["* de-energised line with reactors, ring-down: " + name]
    rn, ln = (r0 - r1) / 3 * dx, (l0 - l1) / 3 * dx
    cpp = (c1 - c0) / 3
    ph = "abc"
    def e(j): return "0" if j == 0 else f"e{j}"
    for j in range(N):
        for k in range(3):
            out.append(f"R{ph[k]}{j} p{ph[k]}{j} m{ph[k]}{j} {r1*dx:.9g}")
            out.append(f"L{ph[k]}{j} m{ph[k]}{j} p{ph[k]}{j+1} {l1*dx:.9g} IC=0")
        out.append(f"Rn{j} {e(j)} mn{j} {rn:.9g}")
        out.append(f"Ln{j} mn{j} {e(j+1)} {ln:.9g} IC=0")
    for j in range(N + 1):
        w = 0.5 if j in (0, N) else 1.0
        for k in range(3):
            out.append(f"Cg{ph[k]}{j} p{ph[k]}{j} {e(j)} {c0*dx*w:.9g} IC={trapped[k]:.9g}")
            l = (k + 1) % 3
            out.append(f"Cm{ph[k]}{ph[l]}{j} p{ph[k]}{j} p{ph[l]}{j} {cpp*dx*w:.9g} IC={trapped[k]-trapped[l]:.9g}")
    for at, r, l, lnr in reactors:
        j = 0 if at == "sending" else N
        star = e(j) if lnr == 0 else f"s{j}"
        for k in range(3):
            out.append(f"Rx{ph[k]}{j} p{ph[k]}{j} x{ph[k]}{j} {r:.9g}")
            out.append(f"Lx{ph[k]}{j} x{ph[k]}{j} {star} {l:.9g} IC=0")
        if lnr:
            out.append(f"Lnr{j} {star} {e(j)} {lnr:.9g} IC=0")
    ic = " ".join(f"v(p{ph[k]}{j})={trapped[k]:.9g}" for j in range(N + 1) for k in range(3))
    out.append(".ic " + ic)
    out.append(".tran 10u 350m 0 10u uic")
    probes = " ".join([f"v(p{c}0)" for c in ph] + [f"v(p{c}{N},e{N})" for c in ph])
    out += [".control", "run", f"wrdata {tmp}/{name}.dat {probes}", ".endc", ".end"]
    return "\n".join(out) + "\n"

cases = {
    "deadtime_345kv": (250, 0.03, 1.0e-3, 11.5e-9, 0.3, 3.2e-3, 7.5e-9,
                       [("receiving", 345e3**2/75e6/300, 345e3**2/75e6/(2*np.pi*60), 0)], [-1, 1, -1]),
    "deadtime_400kv": (320, 0.025, 0.95e-3, 12e-9, 0.25, 3.0e-3, 7.5e-9,
                       [("sending", 400e3**2/100e6/300, 400e3**2/100e6/(2*np.pi*50), 0),
                        ("receiving", 400e3**2/150e6/300, 400e3**2/150e6/(2*np.pi*50), 300/(2*np.pi*50))],
                       [1, -0.4, 0.7]),
}
for name, c in cases.items():
    cir = f"{tmp}/{name}.cir"
    open(cir, "w").write(netlist(name, *c))
    log = subprocess.run(["ngspice", "-b", cir], capture_output=True, text=True)
    try:
        d = np.loadtxt(f"{tmp}/{name}.dat")
    except OSError:
        sys.exit(log.stdout + log.stderr)
    t = d[:, 0]
    cols = [d[:, 2*i+1] for i in range(6)]
    g = np.arange(0, 350e-3 + 1e-12, 0.1e-3)
    with open(name + ".csv", "w") as f:
        f.write("t_s,va_sending,vb_sending,vc_sending,va_receiving,vb_receiving,vc_receiving\n")
        for i, a in enumerate(g):
            f.write(",".join(f"{x:.9g}" for x in [a] + [np.interp(a, t, col) for col in cols]) + "\n")
PY
