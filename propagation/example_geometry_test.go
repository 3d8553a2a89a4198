package propagation_test

import (
	"fmt"
	"math"

	"github.com/telegrapher/telegrapher/propagation"
)

// A 400 kV single circuit: twin-bundle steel-cored conductors in a horizontal row,
// two earth wires, transposed, over 100 ohm·m earth; its sequence constants at 50 Hz.
func ExampleGeometry() {
	phase, _ := propagation.NewConductor(0.0318, 0.009, 0.058e-3) // m, m, ohm/m
	earth, _ := propagation.NewConductor(0.014, 0, 0.35e-3)
	var phases []propagation.Wire
	for _, x := range []float64{-12, 0, 12} {
		phases = append(phases, propagation.Wire{X: x, Height: 27, Sag: 12, Conductor: phase, Bundle: 2, Spacing: 0.4})
	}
	earthWires := []propagation.Wire{
		{X: -7, Height: 36, Sag: 9, Conductor: earth},
		{X: 7, Height: 36, Sag: 9, Conductor: earth},
	}
	g, err := propagation.NewGeometry(phases, earthWires, 100, true)
	if err != nil {
		fmt.Println(err)
		return
	}
	w := 2 * math.Pi * 50
	z1, y1, z0, y0 := g.Sequence(complex(0, w))
	fmt.Printf("positive: r %.4f ohm/km, l %.3f mH/km, c %.2f nF/km\n", real(z1)*1e3, imag(z1)/w*1e6, imag(y1)/w*1e12)
	fmt.Printf("zero:     r %.4f ohm/km, l %.3f mH/km, c %.2f nF/km\n", real(z0)*1e3, imag(z0)/w*1e6, imag(y0)/w*1e12)
	line := propagation.Line{Length: 200e3, Constants: g.Positive()}
	zc, v := line.Lossless(w)
	fmt.Printf("surge impedance %.0f ohm, velocity %.3f c\n", zc, v/propagation.SpeedOfLight)
	// Output:
	// positive: r 0.0302 ohm/km, l 1.067 mH/km, c 10.83 nF/km
	// zero:     r 0.1932 ohm/km, l 2.371 mH/km, c 7.56 nF/km
	// surge impedance 314 ohm, velocity 0.981 c
}

// The internal impedance of a steel-cored conductor taken as an aluminium tube, at
// 50 Hz and 10 kHz: the resistance rises and the internal inductance falls with the
// skin effect.
func ExampleConductor_InternalImpedance() {
	c, _ := propagation.NewConductor(0.0318, 0.009, 0.058e-3) // 31.8 mm, 9 mm core, 0.058 ohm/km
	for _, f := range []float64{50, 1e4} {
		w := 2 * math.Pi * f
		z := c.InternalImpedance(complex(0, w))
		fmt.Printf("%g Hz: R %.4f ohm/km, L_int %.4f mH/km\n", f, real(z)*1e3, imag(z)/w*1e6)
	}
	// Output:
	// 50 Hz: R 0.0589 ohm/km, L_int 0.0429 mH/km
	// 10000 Hz: R 0.4231 ohm/km, L_int 0.0065 mH/km
}
