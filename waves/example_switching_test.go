package waves_test

import (
	"fmt"
	"math"

	"github.com/telegrapher/telegrapher/propagation"
	"github.com/telegrapher/telegrapher/waves"
)

// A statistical energisation of a 320 km, 400 kV line from a 15 GVA source: 100 shots,
// random closing over a cycle with 1 ms pole scatter; the 2 % value by the phase-peak
// method in the IEC 60071-1 base of Us = 420 kV.
func ExampleSwitching() {
	const omega = 2 * math.Pi * 50
	km := 320e3
	pos := propagation.Cascade{{Length: km, Constants: propagation.RLGC{R: 0.025e-3, L: 0.95e-6, C: 12e-12}}}
	zero := propagation.Cascade{{Length: km, Constants: propagation.RLGC{R: 0.25e-3, L: 3.0e-6, C: 7.5e-12}}}
	line, err := waves.NewModalLine(pos, zero, omega)
	if err != nil {
		fmt.Println(err)
		return
	}
	net := waves.ThreePhase{
		Omega: omega, EMFPeak: 400e3 * math.Sqrt2 / math.Sqrt(3), Line: line,
		SourceR: 0.88, SourceL: 0.0338, X0OverX1: 1,
	}
	set := waves.SwitchingSettings{Shots: 100, Seed: 1, PoleSigma: 1e-3, Duration: 0.02}
	res, err := waves.Switching(net, set, nil)
	if err != nil {
		fmt.Println(err)
		return
	}
	peaks := make([][3]float64, len(res.Shots))
	for i, s := range res.Shots {
		peaks[i] = s.Peak
	}
	st, _ := waves.Statistics(peaks, 400.0/420.0)
	fmt.Printf("u2 = %.2f pu, ut = %.2f pu (IEC base, %d shots)\n", st.U2, st.Ut, st.Shots)
	// Output:
	// u2 = 2.65 pu, ut = 3.06 pu (IEC base, 100 shots)
}
