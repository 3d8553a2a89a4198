package propagation_test

// Properties over random valid lines (seeded PCG, so every run draws the same lines):
// reciprocity AD - BC = 1 of the exact two-port and of cascades, symmetry A = D of a
// uniform line and of a mirror-symmetric cascade, reversal of a cascade swapping A and
// D, and passivity Re z_in >= 0 for passive terminations. These are identities of the
// telegrapher's equations (any textbook on transmission lines, e.g. the reciprocity
// and symmetry of the ABCD matrix of a uniform line); the tests hold the
// implementation to them for overhead lines and cables, short and electrically very
// long, on the j*omega axis and on the damped contour s = c + j*omega of the numerical
// Laplace transform.

import (
	"math"
	"math/cmplx"
	"math/rand/v2"
	"testing"

	"github.com/telegrapher/telegrapher/propagation"
)

const (
	// propertyDraws is the number of random lines per property.
	propertyDraws = 4000
	// detRelTol bounds |AD - BC - 1| relative to |AD| + |BC|: the determinant is a
	// difference of two products each carrying a few roundings of cosh, sinh and the
	// products (a few float64 epsilons each, 2.2e-16); 1e-13 leaves a factor ~50 for
	// the roundings inside cmplx.Cosh and cmplx.Sinh and for cascades of up to a few
	// sections. Where |AD| is large the identity is lost to cancellation whatever
	// the formula, so the bound grows with it.
	detRelTol = 1e-13
	// symRelTol bounds |A - D| of a mirror-symmetric cascade and |A(l1,l2) - D(l2,l1)|
	// relative to the magnitudes of the products summed in the cascade (same
	// reasoning as detRelTol).
	symRelTol = 1e-13
	// passiveTol bounds how negative Re Yin may be, relative to |Yin| plus the
	// cancellation scale of the formula: a lossless line with a reactive termination
	// has Re Yin = 0 exactly and only roundings may make it negative.
	passiveTol = 1e-12
)

// randomLine draws a valid line: an overhead line (L 0.6-2 mH/km, C 7-16 nF/km) or a
// cable (L 0.2-0.6 mH/km, C 100-400 nF/km), R 0-0.3 ohm/km (a third lossless), G 0 or up
// to 0.1 uS/km, length 0.1 km to 3000 km log-uniform.
func randomLine(r *rand.Rand) propagation.Line {
	logU := func(lo, hi float64) float64 { return lo * math.Exp(r.Float64()*math.Log(hi/lo)) }
	var p propagation.RLGC
	if r.IntN(4) == 0 {
		p.L = logU(0.2, 0.6) * 1e-6
		p.C = logU(100, 400) * 1e-12
	} else {
		p.L = logU(0.6, 2) * 1e-6
		p.C = logU(7, 16) * 1e-12
	}
	if r.IntN(3) != 0 {
		p.R = r.Float64() * 0.3e-3
	}
	if r.IntN(2) == 0 {
		p.G = r.Float64() * 0.1e-9
	}
	return propagation.Line{Length: logU(0.1, 3000) * 1e3, Constants: p}
}

// randomS draws a complex frequency: j*omega from 0.1 Hz to 1 MHz log-uniform, and half
// the time with a damping c up to 5/(1 ms) as on the numerical Laplace contour.
func randomS(r *rand.Rand) complex128 {
	f := 0.1 * math.Exp(r.Float64()*math.Log(1e7))
	s := complex(0, 2*math.Pi*f)
	if r.IntN(2) == 0 {
		s += complex(r.Float64()*5e3, 0)
	}
	return s
}

// trueElements returns the unscaled elements, or ok = false beyond a float64.
func trueElements(p propagation.TwoPort) (a, b, c, d complex128, ok bool) {
	return p.Elements()
}

func TestPropertyReciprocity(t *testing.T) {
	t.Parallel()
	cases := []struct {
		name     string
		sections int
	}{{"single", 1}, {"two", 2}, {"five", 5}}
	for i, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			t.Parallel()
			r := rand.New(rand.NewPCG(8, uint64(i)))
			checked, worst := 0, 0.0
			for range propertyDraws {
				cas := make(propagation.Cascade, c.sections)
				for k := range cas {
					cas[k] = randomLine(r)
				}
				s := randomS(r)
				p := cas.Exact(s)
				a, b, cc, d, ok := trueElements(p)
				if !ok {
					continue // beyond a float64: the determinant is not representable either
				}
				scale := cmplx.Abs(a*d) + cmplx.Abs(b*cc)
				if scale > 1e12 {
					continue // the identity is lost to cancellation in any float64 formula
				}
				checked++
				e := cmplx.Abs(p.Determinant() - 1)
				worst = math.Max(worst, e/math.Max(1, scale))
				if !(e <= detRelTol*math.Max(1, scale)) {
					t.Fatalf("AD-BC = %v (off by %.3g, scale %.3g) for %+v at s = %v", p.Determinant(), e, scale, cas, s)
				}
			}
			t.Logf("%d draws checked, worst |AD-BC-1| / scale = %.3g (tolerance %.3g)", checked, worst, detRelTol)
			if checked < propertyDraws/4 {
				t.Fatalf("only %d of %d draws checked", checked, propertyDraws)
			}
		})
	}
}

func TestPropertySymmetry(t *testing.T) {
	t.Parallel()
	r := rand.New(rand.NewPCG(8, 100))
	for range propertyDraws {
		l1, l2 := randomLine(r), randomLine(r)
		s := randomS(r)
		// A uniform line is symmetric: A = D exactly (one cosh serves both).
		if p := l1.Exact(s); p.A != p.D {
			t.Fatalf("uniform line: A = %v, D = %v", p.A, p.D)
		}
		// A mirror-symmetric cascade l1, l2, l1 has A = D.
		sym := propagation.Cascade{l1, l2, l1}.Exact(s)
		a, _, _, d, ok := trueElements(sym)
		if ok {
			scale := symScale(l1, l2, s)
			if scale < 1e12 && !(cmplx.Abs(a-d) <= symRelTol*math.Max(1, scale)) {
				t.Fatalf("symmetric cascade: A = %v, D = %v (scale %.3g)", a, d, scale)
			}
		}
		// Reversing a cascade swaps A and D (and keeps B and C).
		fwd := propagation.Cascade{l1, l2}.Exact(s)
		rev := propagation.Cascade{l2, l1}.Exact(s)
		fa, fb, fc, fd, ok1 := trueElements(fwd)
		ra, rb, rc, rd, ok2 := trueElements(rev)
		if !ok1 || !ok2 {
			continue
		}
		scale := symScale(l1, l2, s)
		if scale > 1e12 {
			continue
		}
		tol := symRelTol * math.Max(1, scale)
		if cmplx.Abs(fa-rd) > tol || cmplx.Abs(fd-ra) > tol {
			t.Fatalf("reversal: A %v D %v, reversed A %v D %v (tol %.3g)", fa, fd, ra, rd, tol)
		}
		zTol := tol * math.Max(cmplx.Abs(fb), 1)
		yTol := tol * math.Max(cmplx.Abs(fc), 1e-12)
		if cmplx.Abs(fb-rb) > zTol || cmplx.Abs(fc-rc) > yTol {
			t.Fatalf("reversal: B %v C %v, reversed B %v C %v", fb, fc, rb, rc)
		}
	}
}

// symScale is the size of the products a two-section cascade sums (|cosh| and
// |sinh| of each section), the scale of its rounding errors.
func symScale(l1, l2 propagation.Line, s complex128) float64 {
	m := func(l propagation.Line) float64 {
		gl := l.Gamma(s) * complex(l.Length, 0)
		return math.Max(cmplx.Abs(cmplx.Cosh(gl)), cmplx.Abs(cmplx.Sinh(gl)))
	}
	a, b := m(l1), m(l2)
	return a * b * a
}

// randomPassive draws a passive receiving-end admittance (S) at s = j*omega: open,
// short-ish, resistive, R-L, R||C, or a lossless reactor or capacitor.
func randomPassive(r *rand.Rand, s complex128) complex128 {
	R := 10 * math.Exp(r.Float64()*math.Log(1e4)) // 10 ohm to 100 kohm
	L := 1e-3 * math.Exp(r.Float64()*math.Log(1e4))
	C := 1e-9 * math.Exp(r.Float64()*math.Log(1e4))
	switch r.IntN(6) {
	case 0:
		return 0
	case 1:
		return complex(1/R, 0)
	case 2:
		return 1 / (complex(R, 0) + s*complex(L, 0))
	case 3:
		return complex(1/R, 0) + s*complex(C, 0)
	case 4:
		return 1 / (s * complex(L, 0))
	default:
		return s * complex(C, 0)
	}
}

func TestPropertyPassivity(t *testing.T) {
	t.Parallel()
	r := rand.New(rand.NewPCG(8, 200))
	for range propertyDraws {
		cas := propagation.Cascade{randomLine(r)}
		if r.IntN(2) == 0 {
			cas = append(cas, randomLine(r))
		}
		f := 0.1 * math.Exp(r.Float64()*math.Log(1e7))
		s := complex(0, 2*math.Pi*f)
		yr := randomPassive(r, s)
		p := cas.Exact(s)
		yin := p.InputAdmittance(yr)
		if cmplx.IsNaN(yin) || cmplx.IsInf(yin) {
			// An exact pole of a lossless network is allowed only as a pole, never NaN.
			if cmplx.IsNaN(yin) {
				t.Fatalf("Yin = NaN for %+v, yr = %v at %g Hz", cas, yr, f)
			}
			continue
		}
		// z_in = 1/Yin has the sign of Re Yin; the rounding scale is that of the
		// numerator and denominator products.
		scale := (cmplx.Abs(p.C) + cmplx.Abs(p.D*yr)) / cmplx.Abs(p.A+p.B*yr)
		if re := real(yin); re < -passiveTol*math.Max(cmplx.Abs(yin), scale) {
			t.Fatalf("Re Yin = %.3g < 0 (|Yin| %.3g) for %+v, yr = %v at %g Hz", re, cmplx.Abs(yin), cas, yr, f)
		}
	}
}
