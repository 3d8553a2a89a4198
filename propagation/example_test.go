package propagation_test

import (
	"fmt"
	"math"
	"math/cmplx"

	"github.com/telegrapher/telegrapher/propagation"
)

// The surge impedance, velocity and open-end (Ferranti) rise of a 400 kV line.
func ExampleLine_Exact() {
	l := propagation.Line{Length: 320e3, Constants: propagation.RLGC{R: 0.028e-3, L: 0.93e-6, C: 12.4e-12}}
	w := 2 * math.Pi * 50
	zc, v := l.Lossless(w)
	rise := cmplx.Abs(l.Exact(complex(0, w)).VoltageRatio(0))
	fmt.Printf("Zc = %.1f ohm, v = %.3f c, SIL = %.0f MW, open-end rise = %.4f pu\n",
		zc, v/propagation.SpeedOfLight, l.SIL(400e3, w)/1e6, rise)
	// Output:
	// Zc = 273.9 ohm, v = 0.982 c, SIL = 584 MW, open-end rise = 1.0612 pu
}

// A cascade: an overhead section followed by a cable section.
func ExampleCascade_Exact() {
	c := propagation.Cascade{
		{Name: "overhead", Length: 120e3, Constants: propagation.RLGC{R: 0.03e-3, L: 0.95e-6, C: 12e-12}},
		{Name: "cable", Length: 8e3, Constants: propagation.RLGC{R: 0.02e-3, L: 0.4e-6, C: 210e-12}},
	}
	p := c.Exact(complex(0, 2*math.Pi*50))
	fmt.Printf("%.0f km, AD-BC = %.6f\n", c.Length()/1e3, real(p.Determinant()))
	// Output:
	// 128 km, AD-BC = 1.000000
}
