package main

import (
	"fmt"
	"math"
)

// unboundedFrom is the magnitude from which a printed figure is the float64 echo of a
// quantity unbounded in theory: a lossless line (with its shunts) at an exact
// resonance gives 1/cos(pi/2), about 1.6e16 in float64, where the true value is
// infinite. No real line comes near: a lossy 400 kV line gives rises below 10 pu and
// relative model errors below 100 %.
const unboundedFrom = 1e12

// Reasons given with an unbounded figure.
const (
	atResonance = "a resonance of the lossless line"
	exactIsZero = "the exact element is zero"
)

// bounded formats v with format (number and unit), or says "unbounded (why)" when v
// is infinite or beyond unboundedFrom.
func bounded(v float64, format, why string) string {
	if math.IsInf(v, 0) || math.Abs(v) >= unboundedFrom {
		return "unbounded (" + why + ")"
	}
	return fmt.Sprintf(format, v)
}
