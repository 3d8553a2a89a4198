package freqscan_test

import (
	"fmt"

	"github.com/telegrapher/telegrapher/freqscan"
	"github.com/telegrapher/telegrapher/propagation"
)

// A 420 km line fed from a 12 GVA source at X/R 12, 400 kV 50 Hz, open at the far end:
// its first resonance falls near the 3rd harmonic (a triplen, screened here on the
// positive sequence for want of zero-sequence data).
func ExampleScan() {
	n := freqscan.Network{
		Source: freqscan.SourceAt(12e9, 400e3, 12, 50),
		Line: propagation.Cascade{{Length: 420e3,
			Constants: propagation.RLGC{R: 0.028e-3, L: 0.93e-6, C: 12.4e-12}}},
	}
	pts := freqscan.Scan(nil, n, freqscan.LinearGrid(nil, 1, 2500, 5000))
	for _, p := range freqscan.Peaks(n, pts)[:2] {
		fmt.Printf("%.1f Hz (harmonic %.2f): gain %.1f, Q %.0f\n", p.F, p.F/50, p.Gain, p.Q)
	}
	// Output:
	// 158.3 Hz (harmonic 3.17): gain 42.7, Q 34
	// 477.4 Hz (harmonic 9.55): gain 39.6, Q 102
}

// Screening the harmonics of the same network against the default watch list, gain
// limit and IEC TR 61000-3-6 planning levels.
func ExampleScreen() {
	n := freqscan.Network{
		Source: freqscan.SourceAt(12e9, 400e3, 12, 50),
		Line: propagation.Cascade{{Length: 420e3,
			Constants: propagation.RLGC{R: 0.028e-3, L: 0.93e-6, C: 12.4e-12}}},
	}
	pts := freqscan.Scan(nil, n, freqscan.LinearGrid(nil, 1, 2500, 5000))
	sc := freqscan.Screen(n, pts, freqscan.Peaks(n, pts), nil, nil, nil,
		freqscan.ScreenSettings{Fundamental: 50, FMax: 2500})
	for _, r := range sc.Flags[:3] {
		fmt.Printf("h%d (%s): largest gain within ±10 %% = %.1f\n", r.Order, r.Sequence, r.BandGain)
	}
	// Output:
	// h3 (positive-sequence only): largest gain within ±10 % = 42.7
	// h9 (positive-sequence only): largest gain within ±10 % = 39.6
	// h11 (positive): largest gain within ±10 % = 5.2
}
