package freqscan

import (
	"math"
	"math/cmplx"
	"testing"
)

// FuzzScan: for any valid network (lengths, constants and elements in their valid
// ranges) the scan returns exactly the requested number of points, every value finite,
// and the peaks lie inside the band, at most one per two grid points, finite unless
// flagged unbounded. Values outside the valid ranges are skipped, as the study loader
// refuses them.
func FuzzScan(f *testing.F) {
	f.Add(420.0, 0.028, 0.93, 12.4, 0.0, 1.2, 45.0, 150.0, 0.0, 0.0, 2500.0, uint16(500))
	f.Add(1.0, 0.0, 0.5, 200.0, 0.0, 0.0, 0.0, 0.0, -40.0, 900.0, 5000.0, uint16(2))
	f.Add(5000.0, 0.5, 3.0, 7.5, 1.0, 10.0, 300.0, 1e-3, -1e4, 1.0, 1e5, uint16(3000))
	f.Fuzz(func(t *testing.T, lengthKm, rOhmKm, lMhKm, cNfKm, gUsKm, srcR, srcLmH, reactorMvar, capMvar, loadR, fMax float64, points uint16) {
		ok := func(x, lo, hi float64) bool { return x >= lo && x <= hi }
		if !ok(lengthKm, 1e-3, 2e4) || !ok(rOhmKm, 0, 100) || !ok(lMhKm, 1e-3, 100) || !ok(cNfKm, 1e-3, 1e4) ||
			!ok(gUsKm, 0, 100) || !ok(srcR, 0, 1e5) || !ok(srcLmH, 0, 1e5) || !ok(reactorMvar, 0, 1e5) ||
			!ok(capMvar, -1e5, 0) || !ok(loadR, 0, 1e7) || !ok(fMax, 2, 1e6) || points < 2 || points > 5000 {
			t.Skip()
		}
		const v, f0 = 400e3, 50.0
		n := Network{
			Source: Source{R: srcR, L: srcLmH * 1e-3},
			Line:   line(lengthKm*1e3, rOhmKm*1e-3, lMhKm*1e-6, gUsKm*1e-9, cNfKm*1e-12),
			Load:   Load{R: loadR},
		}
		if reactorMvar > 1e-9 {
			n.Shunts = append(n.Shunts, Shunt{End: Receiving, OnLine: true, L: v * v / (reactorMvar * 1e6) / (2 * math.Pi * f0)})
		}
		if capMvar < -1e-9 {
			n.Shunts = append(n.Shunts, Shunt{End: Sending, C: -capMvar * 1e6 / (v * v) / (2 * math.Pi * f0)})
		}
		freqs := LinearGrid(nil, 1, fMax, int(points))
		pts := Scan(nil, n, freqs)
		if len(pts) != int(points) {
			t.Fatalf("%d points, want %d", len(pts), points)
		}
		finite := func(x float64) bool { return !math.IsNaN(x) && !math.IsInf(x, 0) }
		for _, p := range pts {
			if !finite(p.Gain) || !finite(p.GainLine) || !finite(p.GainSending) {
				t.Fatalf("f = %g: non-finite gain %+v", p.F, p)
			}
			for _, z := range []complex128{p.ZIn, p.ZSending, p.ZReceiving} {
				if cmplx.IsNaN(z) || cmplx.IsInf(z) {
					t.Fatalf("f = %g: non-finite impedance %+v", p.F, p)
				}
			}
		}
		peaks := Peaks(n, pts)
		if len(peaks) > len(pts)/2 {
			t.Fatalf("%d peaks from %d points", len(peaks), len(pts))
		}
		for _, p := range peaks {
			if p.F < freqs[0] || p.F > freqs[len(freqs)-1] || math.IsNaN(p.Gain) || (!p.Unbounded && !finite(p.Gain)) ||
				!finite(p.Q) || !finite(p.Bandwidth) {
				t.Fatalf("bad peak %+v", p)
			}
		}
		for _, r := range ImpedanceResonances(n, pts) {
			if math.IsNaN(r.Ohm) || (!r.Unbounded && !finite(r.Ohm)) {
				t.Fatalf("bad impedance resonance %+v", r)
			}
		}
	})
}
