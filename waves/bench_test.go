package waves

import (
	"testing"
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
