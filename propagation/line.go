package propagation

import (
	"math"
	"math/cmplx"
)

// SpeedOfLight is the speed of light in vacuum, in m/s (CODATA, exact by definition).
const SpeedOfLight = 299792458.0

// Constants gives the per-length series impedance z (ohm/m) and shunt admittance y
// (S/m) of a line at the complex frequency s (rad/s). Directly given constants and
// geometry-derived ones both satisfy it.
type Constants interface {
	At(s complex128) (z, y complex128)
}

// RLGC holds per-length constants that do not vary with frequency: series resistance R
// (ohm/m), series inductance L (H/m), shunt conductance G (S/m) and shunt capacitance C
// (F/m).
//
//	z(s) = R + sL,   y(s) = G + sC
type RLGC struct{ R, L, G, C float64 }

// At returns z = R + sL and y = G + sC.
func (p RLGC) At(s complex128) (z, y complex128) {
	return complex(p.R, 0) + s*complex(p.L, 0), complex(p.G, 0) + s*complex(p.C, 0)
}

// Line is a uniform line section: a length in metres and its per-length constants.
type Line struct {
	Name   string  // optional label of a section
	Length float64 // m, > 0
	Constants
}

// Gamma returns the propagation constant γ = sqrt(z·y) of the line at the complex
// frequency s, in 1/m, with Re γ >= 0.
func (l Line) Gamma(s complex128) complex128 {
	z, y := l.At(s)
	return gammaOf(z, y)
}

// SurgeImpedance returns the surge (characteristic) impedance Zc = sqrt(z/y) at the
// complex frequency s, in ohm, computed as z/γ (one square root). Where γ = 0 (s = 0
// with no conductance and no resistance) it falls back to sqrt(z/y).
func (l Line) SurgeImpedance(s complex128) complex128 {
	z, y := l.At(s)
	_, zc := gammaZc(z, y)
	return zc
}

// GammaZc returns γ (1/m) and Zc (ohm) together at s, with one complex square root.
func (l Line) GammaZc(s complex128) (gamma, zc complex128) {
	z, y := l.At(s)
	return gammaZc(z, y)
}

func gammaOf(z, y complex128) complex128 { return PrincipalSqrt(z * y) }

func gammaZc(z, y complex128) (gamma, zc complex128) {
	gamma = gammaOf(z, y)
	if gamma != 0 {
		return gamma, z / gamma
	}
	if y != 0 {
		return 0, PrincipalSqrt(z / y)
	}
	return 0, 0
}

// PrincipalSqrt returns the principal square root of w, the one with Re >= 0 (the
// branch of cmplx.Sqrt): the branch of γ = sqrt(zy) whose waves decay in the direction
// they travel, and of a passive line's Zc = sqrt(z/y). By the half-angle formulas
//
//	r = |w|,  Re w >= 0:  t = sqrt((r + Re w)/2),  sqrt w = t + j·Im w/(2t)
//	          Re w < 0:   t = sqrt((r − Re w)/2),  sqrt w = |Im w|/(2t) ± j·t (the sign of Im w,
//	                      −0 counting as negative, as in cmplx.Sqrt)
//
// which avoid cmplx.Sqrt's rescaling and hypot (the kernels of freqscan and waves call
// it at every frequency); where a part of w is beyond 1e150 in magnitude or both parts
// below 1e-150 (r² could overflow or lose digits) it is cmplx.Sqrt. The two agree to a
// few ulps.
//
// References:
//
//   - W. H. Press et al., Numerical Recipes, 3rd ed., Cambridge (2007), §5.5 (complex
//     square root by the half-angle formulas); from memory.
func PrincipalSqrt(w complex128) complex128 {
	x, y := real(w), imag(w)
	ax, ay := math.Abs(x), math.Abs(y)
	if !(ax < 1e150 && ay < 1e150) || (ax < 1e-150 && ay < 1e-150) {
		return cmplx.Sqrt(w)
	}
	r := math.Sqrt(x*x + y*y)
	if x >= 0 {
		t := math.Sqrt((r + x) / 2)
		return complex(t, y/(2*t))
	}
	t := math.Sqrt((r - x) / 2)
	if math.Signbit(y) {
		t = -t
	}
	return complex(y/(2*t), t)
}

// Lossless returns the lossless surge impedance sqrt(L/C) (ohm) and propagation
// velocity 1/sqrt(LC) (m/s) from the inductance and capacitance per metre at the
// angular frequency omega (rad/s > 0): L = Im z(jω)/ω, C = Im y(jω)/ω.
func (l Line) Lossless(omega float64) (zc, velocity float64) {
	z, y := l.At(complex(0, omega))
	L, C := imag(z)/omega, imag(y)/omega
	if L <= 0 || C <= 0 {
		return 0, 0
	}
	return math.Sqrt(L / C), 1 / math.Sqrt(L*C)
}

// TravelTime returns the lossless travel time l·sqrt(LC) in seconds at the angular
// frequency omega (rad/s > 0).
func (l Line) TravelTime(omega float64) float64 {
	_, v := l.Lossless(omega)
	if v == 0 {
		return 0
	}
	return l.Length / v
}

// SIL returns the surge-impedance loading V²/sqrt(L/C) in W for a line-to-line rms
// voltage v (V), with the lossless surge impedance at omega (rad/s).
func (l Line) SIL(v, omega float64) float64 {
	zc, _ := l.Lossless(omega)
	if zc == 0 {
		return 0
	}
	return v * v / zc
}

// Exact returns the exact hyperbolic two-port of the line at s:
//
//	A = D = cosh(γl),  B = Zc sinh(γl),  C = sinh(γl)/Zc
//
// For Re(γl) > 300 the elements are returned scaled by exp(-Re γl) (see TwoPort).
func (l Line) Exact(s complex128) TwoPort {
	z, y := l.At(s)
	gamma, zc := gammaZc(z, y)
	gl := gamma * complex(l.Length, 0)
	if gl == 0 {
		return TwoPort{A: 1, B: z * complex(l.Length, 0), C: y * complex(l.Length, 0), D: 1}
	}
	var ch, sh complex128
	var logScale float64
	if real(gl) <= 300 {
		ch, sh = cmplx.Cosh(gl), cmplx.Sinh(gl)
	} else {
		// cosh(γl) = e^{γl}·even/2 with even = 1 + e^{-2γl} (ExpForm); factor out
		// e^{Re γl}, leaving e^{j Im γl}·even/2.
		logScale = real(gl)
		even, odd, _, _ := ExpForm(gl)
		rot := cmplx.Exp(complex(0, imag(gl)))
		ch = rot * even / 2
		sh = rot * odd / 2
	}
	return TwoPort{A: ch, B: zc * sh, C: sh / zc, D: ch, LogScale: logScale}
}

// NominalPi returns the nominal pi model at s: the whole series impedance Z = zl in the
// middle and half the shunt admittance Y = yl at each end.
//
//	A = D = 1 + ZY/2,  B = Z,  C = Y(1 + ZY/4)
func (l Line) NominalPi(s complex128) TwoPort {
	Z, Y := l.totals(s)
	a := 1 + Z*Y/2
	return TwoPort{A: a, B: Z, C: Y * (1 + Z*Y/4), D: a}
}

// NominalT returns the nominal T model at s: half the series impedance each side of the
// whole shunt admittance.
//
//	A = D = 1 + ZY/2,  B = Z(1 + ZY/4),  C = Y
func (l Line) NominalT(s complex128) TwoPort {
	Z, Y := l.totals(s)
	a := 1 + Z*Y/2
	return TwoPort{A: a, B: Z * (1 + Z*Y/4), C: Y, D: a}
}

// Short returns the short-line model at s: the series impedance alone, no shunt.
func (l Line) Short(s complex128) TwoPort {
	Z, _ := l.totals(s)
	return TwoPort{A: 1, B: Z, C: 0, D: 1}
}

func (l Line) totals(s complex128) (Z, Y complex128) {
	z, y := l.At(s)
	n := complex(l.Length, 0)
	return z * n, y * n
}

// Cascade is a line made of sections in cascade from the sending end. A single-section
// line is a Cascade of length one.
type Cascade []Line

// Length returns the total length in metres.
func (c Cascade) Length() float64 {
	var t float64
	for _, l := range c {
		t += l.Length
	}
	return t
}

// Exact returns the product of the sections' exact two-ports at s.
func (c Cascade) Exact(s complex128) TwoPort {
	p := Identity()
	for _, l := range c {
		p = p.Then(l.Exact(s))
	}
	return p
}
