package propagation

import (
	"fmt"
	"math"
	"math/cmplx"
)

// Mu0 is the magnetic constant μ0 in H/m (the pre-2019 exact value 4π·1e-7, within
// 1e-9 of CODATA 2018).
const Mu0 = 4e-7 * math.Pi

// Conductor is a round overhead conductor, solid or tubular, of non-magnetic material
// (μr = 1). A steel-cored stranded conductor is approximated as a tube: the steel core
// carries little current and is left out, and the aluminium strands become a uniform
// tube with the resistivity that reproduces the conductor's d.c. resistance.
type Conductor struct {
	OuterRadius float64 // m, > 0
	InnerRadius float64 // m, 0 for a solid conductor, < OuterRadius
	Resistivity float64 // ohm·m, > 0 (effective, from the d.c. resistance)
}

// NewConductor returns the conductor of outer diameter outerD and non-conducting core
// diameter coreD (m; 0 for a solid conductor) whose d.c. resistance is rdc (ohm/m). The
// resistivity is rdc times the conducting area π(outerD² - coreD²)/4.
func NewConductor(outerD, coreD, rdc float64) (Conductor, error) {
	switch {
	case !(outerD > 0) || math.IsInf(outerD, 0):
		return Conductor{}, fmt.Errorf("outer diameter must be > 0, got %g m", outerD)
	case !(coreD >= 0) || coreD >= outerD:
		return Conductor{}, fmt.Errorf("core diameter must be >= 0 and less than the outer diameter %g m, got %g m", outerD, coreD)
	case !(rdc > 0) || math.IsInf(rdc, 0):
		return Conductor{}, fmt.Errorf("d.c. resistance must be > 0, got %g ohm/m", rdc)
	}
	a, b := outerD/2, coreD/2
	return Conductor{OuterRadius: a, InnerRadius: b, Resistivity: rdc * math.Pi * (a*a - b*b)}, nil
}

// DCResistance returns the d.c. resistance in ohm/m: ρ / (π(a² - b²)).
func (c Conductor) DCResistance() float64 {
	a, b := c.OuterRadius, c.InnerRadius
	return c.Resistivity / (math.Pi * (a*a - b*b))
}

// InternalImpedance returns the internal impedance per metre (ohm/m) of the conductor
// at the complex frequency s (rad/s), for Re s >= 0: the resistance and the internal
// inductance with skin effect, the current returning outside the conductor. With
// m = sqrt(s·μ0/ρ), outer radius a and inner radius b (a tube),
//
//	solid:  Z = (ρm / 2πa) · I0(ma) / I1(ma)
//	tube:   Z = (ρm / 2πa) · [I0(ma)K1(mb) + K0(ma)I1(mb)] / [I1(ma)K1(mb) - I1(mb)K1(ma)]
//
// evaluated with exponentially scaled Bessel functions so that it stays finite at any
// frequency. Z(0) is the d.c. resistance; as |s| grows, Z approaches the surface
// impedance ρm/(2πa).
//
// References:
//   - S. A. Schelkunoff, "The electromagnetic theory of coaxial transmission lines and
//     cylindrical shields", Bell System Technical Journal 13 (1934) 532-579.
func (c Conductor) InternalImpedance(s complex128) complex128 {
	if s == 0 || cmplx.Abs(s) < 1e-100 {
		return complex(c.DCResistance(), 0)
	}
	a, b, rho := c.OuterRadius, c.InnerRadius, c.Resistivity
	m := cmplx.Sqrt(s * complex(Mu0/rho, 0))
	x := m * complex(a, 0)
	k := complex(rho/(2*math.Pi*a), 0) * m
	if b == 0 {
		i0, i1, _, _ := besselIK(x)
		return k * i0 / i1
	}
	y := m * complex(b, 0)
	i0x, i1x, k0x, k1x := besselIK(x)
	_, i1y, _, k1y := besselIK(y)
	// The true products carry exp(±(x - y)); divide through by exp(x - y).
	e := cmplx.Exp(-2 * (x - y))
	num := i0x*k1y + k0x*i1y*e
	den := i1x*k1y - i1y*k1x*e
	return k * num / den
}

// BundleRadius returns the equivalent radius (m) of a bundle of n subconductors of
// radius r (m) spaced evenly on a circle with neighbour spacing d (m): the geometric
// mean distance of the bundle to itself,
//
//	r_eq = (n · r · A^{n-1})^{1/n},   A = d / (2 sin(π/n))
//
// and r for n = 1. Used with the physical radius for both the potential coefficients
// and the external inductance (the internal impedance is computed separately).
//
// References:
//   - J. D. Glover, M. S. Sarma, T. J. Overbye, Power System Analysis and Design, 5th ed.
//     (2012), ch. 4 (bundled conductors).
func BundleRadius(r float64, n int, d float64) float64 {
	if n <= 1 {
		return r
	}
	A := d / (2 * math.Sin(math.Pi/float64(n)))
	return math.Pow(float64(n)*r*math.Pow(A, float64(n-1)), 1/float64(n))
}

// MeanHeight returns the mean height (m) over a span of a conductor strung at height h
// (m) at the towers with mid-span sag (m): h - 2/3·sag, the mean of a parabolic sag
// curve.
func MeanHeight(h, sag float64) float64 { return h - 2*sag/3 }
