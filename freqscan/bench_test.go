package freqscan

import (
	"math"
	"testing"
)

// benchNetwork is the network of BenchmarkScan100k and testdata/bench/scan_bench.py
// (keep the two in step): a 420 km line, an R-L source of 12 GVA at X/R = 12 on 400 kV
// 50 Hz, and a 150 Mvar receiving-end reactor (line-connected, Q = 300).
func benchNetwork() Network {
	const v, f0 = 400e3, 50.0
	src := SourceAt(12e9, v, 12, f0)
	x := v * v / 150e6
	return Network{
		Source: src,
		Line:   line(420e3, 0.028e-3, 0.93e-6, 0, 12.4e-12),
		Shunts: []Shunt{{End: Receiving, OnLine: true, R: x / 300, L: x / (2 * math.Pi * f0)}},
	}
}

// BenchmarkScan100k: one op is the scan of the benchmark network at 100,000
// frequencies from 1 Hz to 2.5 kHz (every Point field: gain, gain_line, |Vs/E|, z_in
// and the two driving-point impedances).
func BenchmarkScan100k(b *testing.B) {
	n := benchNetwork()
	freqs := LinearGrid(nil, 1, 2500, 100000)
	dst := make([]Point, len(freqs))
	b.ResetTimer()
	for b.Loop() {
		dst = Scan(dst, n, freqs)
	}
}
