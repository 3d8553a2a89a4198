package waves

import (
	"testing"

	"github.com/telegrapher/telegrapher/freqscan"
)

// BenchmarkLaplace64k: one op is the open-end energisation waveform (sending and
// receiving ends) of a lossy 300 km line with an R-L source by the numerical Laplace
// transform on 65,536 frequency samples (20 ms kept of a 40 ms window). The same
// work vectorised in numpy: testdata/bench/laplace_bench.py.
func BenchmarkLaplace64k(b *testing.B) {
	const N = 65536
	n := testNetwork(0.1, 0.9, 34e-3)
	e := stepSettings(20e-3, 0)
	dt := 2 * e.Duration / N
	lt := NewLaplaceTransform(N)
	b.ReportAllocs()
	for b.Loop() {
		if _, _, err := lt.Energise(n, e, dt); err != nil {
			b.Fatal(err)
		}
	}
}

// BenchmarkBergeron: one op is 20 ms of the energisation of the 300 km test line with
// an R-L source, a sending-bus capacitor bank and a receiving line-connected reactor
// by Bergeron with lumped resistance at a 1 µs step (20,000 steps of the nodal engine).
func BenchmarkBergeron(b *testing.B) {
	n := testNetwork(0.03, 0.9, 34e-3,
		freqscan.Shunt{End: freqscan.Sending, C: 1e-6, R: 2},
		freqscan.Shunt{End: freqscan.Receiving, OnLine: true, L: 1.5, R: 3})
	e := stepSettings(20e-3, 1e-6)
	b.ReportAllocs()
	for b.Loop() {
		if _, err := Bergeron(n, e, BergeronOptions{LumpedResistance: true}); err != nil {
			b.Fatal(err)
		}
	}
}
