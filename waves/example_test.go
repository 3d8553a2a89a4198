package waves_test

import (
	"fmt"
	"math"

	"github.com/telegrapher/telegrapher/freqscan"
	"github.com/telegrapher/telegrapher/propagation"
	"github.com/telegrapher/telegrapher/waves"
)

// A 300 km lossless line energised by a 1 pu step through 100 ohm: the open end
// reaches 2·Zc/(Rs+Zc) at one travel time.
func ExampleLattice() {
	n := freqscan.Network{
		Source: freqscan.Source{R: 100},
		Line:   propagation.Cascade{{Length: 300e3, Constants: propagation.RLGC{L: 0.95e-6, C: 12e-12}}},
	}.Energising()
	e := waves.Energisation{Excitation: waves.Step, Omega: 2 * math.Pi * 50, Duration: 10e-3}
	w, d, err := waves.Lattice(n, e, waves.LatticeOptions{})
	if err != nil {
		fmt.Println(err)
		return
	}
	peak, k := waves.Peak(w.Receiving)
	fmt.Printf("Zc = %.1f ohm, travel time %.3f ms\n", d.Surge[0], d.Travel[0]*1e3)
	fmt.Printf("first wave %.4f pu, peak %.4f pu at %.2f ms\n", d.Wavefronts[0].Amplitude, peak, w.Time(k)*1e3)
	// Output:
	// Zc = 281.4 ohm, travel time 1.013 ms
	// first wave 0.7378 pu, peak 1.4756 pu at 1.01 ms
}

// The same line with its resistance and an inductive source, by the numerical
// Laplace transform of the frequency-domain network.
func ExampleLaplace() {
	n := freqscan.Network{
		Source: freqscan.Source{R: 0.9, L: 34e-3},
		Line:   propagation.Cascade{{Length: 300e3, Constants: propagation.RLGC{R: 0.1e-3, L: 0.95e-6, C: 12e-12}}},
	}.Energising()
	e := waves.Energisation{Excitation: waves.Step, Omega: 2 * math.Pi * 50, Duration: 20e-3, TimeStep: 10e-6}
	w, err := waves.Laplace(n, e, waves.LaplaceOptions{})
	if err != nil {
		fmt.Println(err)
		return
	}
	peak, k := waves.Peak(w.Receiving)
	fmt.Printf("peak %.3f pu at %.2f ms\n", peak, w.Time(k)*1e3)
	// Output:
	// peak 2.268 pu at 3.10 ms
}

// A 150 Mvar line-connected reactor at the open end of the same line, closed on a
// step through an R-L source with −0.8 pu trapped charge, by Bergeron's method.
func ExampleBergeron() {
	x := 400e3 * 400e3 / 150e6 // reactor reactance at 50 Hz, ohm
	n := freqscan.Network{
		Source: freqscan.Source{R: 0.9, L: 34e-3},
		Line:   propagation.Cascade{{Length: 300e3, Constants: propagation.RLGC{L: 0.95e-6, C: 12e-12}}},
		Shunts: []freqscan.Shunt{{End: freqscan.Receiving, OnLine: true, L: x / (2 * math.Pi * 50), R: x / 300}},
	}.Energising()
	e := waves.Energisation{Excitation: waves.Step, Omega: 2 * math.Pi * 50, TrappedPU: -0.8, Duration: 20e-3}
	w, err := waves.Bergeron(n, e, waves.BergeronOptions{})
	if err != nil {
		fmt.Println(err)
		return
	}
	peak, k := waves.Peak(w.Receiving)
	fmt.Printf("step %.2f µs, peak %.3f pu at %.2f ms\n", w.Step*1e6, peak, w.Time(k)*1e3)
	// Output:
	// step 10.13 µs, peak 3.572 pu at 19.37 ms
}
