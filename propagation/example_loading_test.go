package propagation_test

import (
	"fmt"
	"math"

	"github.com/telegrapher/telegrapher/propagation"
)

// A 320 km, 400 kV line at 50 Hz with both ends held at 1 pu, delivering its
// surge-impedance loading. Lossless, the angle would equal the electrical length
// (19.4°) with no reactive power at either end; the line's resistance shifts both.
func ExampleBothEndsHeld() {
	line := propagation.Cascade{{Length: 320e3, Constants: propagation.RLGC{R: 0.025e-3, L: 0.95e-6, C: 12e-12}}}
	omega := 2 * math.Pi * 50
	sil := propagation.SurgeImpedanceLoading(line, 400e3, omega)
	pts, err := propagation.BothEndsHeld(line, omega, 400e3, []float64{0, sil})
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Printf("SIL %.1f MW\n", sil/1e6)
	for _, p := range pts {
		fmt.Printf("P %.1f MW: delta %.2f deg, Qs %.1f Mvar, Qr %.1f Mvar, mid-line %.4f pu\n",
			p.P/1e6, p.Delta*180/math.Pi, p.Qs/1e6, p.Qr/1e6, p.VMid)
	}
	// Output:
	// SIL 568.7 MW
	// P 0.0 MW: delta 0.00 deg, Qs -97.5 Mvar, Qr 97.4 Mvar, mid-line 1.0146 pu
	// P 568.7 MW: delta 19.89 deg, Qs -43.7 Mvar, Qr -51.1 Mvar, mid-line 0.9993 pu
}

// The no-load rise of the same line and the receiving-end reactor that holds its
// open end at 1 pu.
func ExampleReactorForRise() {
	line := propagation.Cascade{{Length: 320e3, Constants: propagation.RLGC{R: 0.025e-3, L: 0.95e-6, C: 12e-12}}}
	omega := 2 * math.Pi * 50
	open, _ := propagation.OpenEnd(line, omega, 400e3, 0, 0)
	q, _ := propagation.ReactorForRise(line, omega, 400e3, 0, 1.0)
	fmt.Printf("rise %.4f pu, charging %.1f Mvar, reactor for 1 pu %.1f Mvar\n", open.Rise, open.Charging/1e6, q/1e6)
	// Output:
	// rise 1.0605 pu, charging 200.8 Mvar, reactor for 1 pu 97.4 Mvar
}

// The loadability of lines of this make at a few lengths, with the paper's
// assumptions (5 % drop, 30 % margin, 50 kA terminals).
func ExampleLoadabilityCurve() {
	line := propagation.Cascade{{Length: 1e3, Constants: propagation.RLGC{R: 0.025e-3, L: 0.95e-6, C: 12e-12}}}
	omega := 2 * math.Pi * 50
	lim := propagation.DefaultLoadabilityLimits(400e3)
	pts, _ := propagation.LoadabilityCurve(line, omega, 400e3, lim, []float64{100e3, 300e3, 600e3})
	for _, p := range pts {
		fmt.Printf("%.0f km: %.2f SIL (%s)\n", p.Length/1e3, p.Loadability/p.SIL, p.Governs)
	}
	// Output:
	// 100 km: 2.31 SIL (voltage drop)
	// 300 km: 1.09 SIL (voltage drop)
	// 600 km: 0.92 SIL (voltage drop)
}
