package waves

import (
	"math"
	"testing"

	"github.com/telegrapher/telegrapher/freqscan"
	"github.com/telegrapher/telegrapher/propagation"
)

// clampFuzz maps any float (NaN and ±Inf included) into [lo, hi].
func clampFuzz(x, lo, hi float64) float64 {
	switch {
	case math.IsNaN(x):
		return lo
	case x < lo:
		return lo
	case x > hi:
		return hi
	}
	return x
}

// FuzzLaplace: on any valid network of bounded size (line 1-1000 km, constants in
// the overhead-line-to-cable range, any R-L source, an optional line-connected
// reactor, trapped charge, step or sine) the numerical Laplace transform returns
// finite waveforms of the requested length, bounded by the physics: a passive
// network driven by a 1 pu EMF with |V0| <= 2 cannot exceed 1 + 2·(1 + |V0|)
// times the largest lossless magnification, held here at a generous 50 pu.
// Seed corpus: testdata/fuzz/FuzzLaplace.
func FuzzLaplace(f *testing.F) {
	f.Add(320.0, 0.025, 0.95, 12.0, 0.9, 34.0, 0.0, 0.0, 20.0, false, 90.0)
	f.Fuzz(func(t *testing.T, km, r, lmh, cnf, rs, lsmh, reactorH, trapped, durMs float64, sine bool, deg float64) {
		km = clampFuzz(km, 1, 1000)
		line := propagation.RLGC{
			R: clampFuzz(r, 0, 1) / 1e3,
			L: clampFuzz(lmh, 0.2, 3) / 1e6,
			C: clampFuzz(cnf, 1, 300) / 1e12,
		}
		n := freqscan.Network{
			Source: freqscan.Source{R: clampFuzz(rs, 0, 1000), L: clampFuzz(lsmh, 0, 1000) / 1e3},
			Line:   propagation.Cascade{{Length: km * 1e3, Constants: line}},
		}
		if h := clampFuzz(reactorH, 0, 50); h > 0.5 {
			n.Shunts = []freqscan.Shunt{{End: freqscan.Receiving, OnLine: true, L: h, R: 1}}
		}
		tau := n.Line[0].TravelTime(testOmega)
		e := Energisation{Omega: testOmega, TrappedPU: clampFuzz(trapped, -2, 2), CloseDeg: clampFuzz(deg, -360, 360)}
		if sine {
			e.Excitation = Sine
		}
		// bounded size: at most 40 travel times, at most 4096 output samples, and a
		// step no longer than the run (a longer one is refused: Energisation.check)
		e.Duration = math.Min(clampFuzz(durMs, 0.01, 20)/1e3, 40*tau)
		e.TimeStep = math.Min(math.Max(tau/100, e.Duration/4096), e.Duration)
		w, err := Laplace(n.Energising(), e, LaplaceOptions{})
		if err != nil {
			t.Fatalf("valid network refused: %v", err)
		}
		if want := samples(e.Duration, e.TimeStep); len(w.Receiving) != want || len(w.Sending) != want {
			t.Fatalf("%d samples, want %d", len(w.Receiving), want)
		}
		for k := range w.Receiving {
			if math.IsNaN(w.Receiving[k]) || math.IsInf(w.Receiving[k], 0) || math.Abs(w.Receiving[k]) > 50 || math.Abs(w.Sending[k]) > 50 {
				t.Fatalf("sample %d: %g, %g", k, w.Sending[k], w.Receiving[k])
			}
		}
	})
}
