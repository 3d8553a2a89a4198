package waves

import (
	"math"

	"github.com/telegrapher/telegrapher/freqscan"
	"github.com/telegrapher/telegrapher/propagation"
)

// Test circuit: a 400 kV, 50 Hz, 320 km line of our own invented scenario with typical
// EHV constants (common practice, no source: quad-bundle 400 kV lines have about
// 0.95 mH/km and 12 nF/km positive sequence, 3 mH/km and 7.5 nF/km zero sequence).
const (
	swOmega   = 2 * math.Pi * 50
	swVoltage = 400e3
)

var swEMF = swVoltage * math.Sqrt2 / math.Sqrt(3)

func swLines(km float64, r, r0 float64) (pos, zero propagation.Cascade) {
	pos = propagation.Cascade{{Length: km * 1e3, Constants: propagation.RLGC{R: r / 1e3, L: 0.95e-6, C: 12e-12}}}
	zero = propagation.Cascade{{Length: km * 1e3, Constants: propagation.RLGC{R: r0 / 1e3, L: 3.0e-6, C: 7.5e-12}}}
	return pos, zero
}

// swSource is a 15 GVA, X/R = 12 source at 400 kV: |Z| = V²/S.
func swSource() (r, l float64) {
	z := swVoltage * swVoltage / 15e9
	x := z * 12 / math.Sqrt(145)
	return x / 12, x / swOmega
}

func swThreePhase(km float64, r, r0 float64, srcR, srcL float64) (ThreePhase, freqscan.Network) {
	pos, zero := swLines(km, r, r0)
	ml, err := NewModalLine(pos, zero, swOmega)
	if err != nil {
		panic(err)
	}
	tp := ThreePhase{Omega: swOmega, EMFPeak: swEMF, Line: ml, SourceR: srcR, SourceL: srcL, X0OverX1: 1}
	net := freqscan.Network{Source: freqscan.Source{R: srcR, L: srcL}, Line: pos, FarEndOpen: true}
	return tp, net
}
