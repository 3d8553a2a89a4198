package propagation

import (
	"math"
	"math/cmplx"
	"testing"
)

// sqrtTol: PrincipalSqrt and cmplx.Sqrt evaluate the same half-angle formulas with a
// different |w| (x² + y² against hypot) and rescaling; each rounds a few times.
const sqrtTol = 4e-16

// PrincipalSqrt is the principal branch (Re >= 0, the branch of C99 csqrt and of
// cmplx.Sqrt, including the sign of a zero imaginary part on the negative real axis:
// W. Kahan, "Branch cuts for complex elementary functions", in The State of the Art in
// Numerical Analysis, Oxford (1987); from memory), exact on textbook squares, and within
// a few ulps of cmplx.Sqrt elsewhere, the fallback ranges included.
func TestPrincipalSqrt(t *testing.T) {
	t.Parallel()
	exact := []struct{ w, want complex128 }{
		{complex(3, 4), complex(2, 1)}, // (2 + j)² = 3 + 4j
		{complex(-3, 4), complex(1, 2)},
		{complex(-3, -4), complex(1, -2)},
		{complex(3, -4), complex(2, -1)},
		{complex(-4, 0), complex(0, 2)},
		{complex(-4, math.Copysign(0, -1)), complex(0, -2)}, // below the cut
		{complex(9, 0), complex(3, 0)},
		{0, 0},
	}
	for _, tc := range exact {
		if got := PrincipalSqrt(tc.w); got != tc.want || math.Signbit(imag(got)) != math.Signbit(imag(tc.want)) {
			t.Errorf("PrincipalSqrt(%v) = %v, want %v", tc.w, got, tc.want)
		}
	}
	for _, w := range []complex128{
		complex(0, 1), complex(0, -1), complex(1e-3, 7), complex(-2.5e-13, 1.1e-12),
		complex(-1, 1e-20), complex(-1, -1e-20), complex(4.4e-7, -3.3e-3),
		complex(1e200, 1e200), complex(-1e160, 3), complex(1e-200, -1e-200), complex(3e-151, 2e-152),
	} {
		got, want := PrincipalSqrt(w), cmplx.Sqrt(w)
		if real(got) < 0 {
			t.Errorf("PrincipalSqrt(%v) = %v: negative real part", w, got)
		}
		if cmplx.Abs(got-want) > sqrtTol*cmplx.Abs(want) {
			t.Errorf("PrincipalSqrt(%v) = %v, cmplx.Sqrt %v", w, got, want)
		}
	}
}

// γ = sqrt(zy) of a passive line on the whole right half plane of s has Re γ >= 0 (waves
// decay the way they travel) and, on s = jω, Im γ > 0 (they travel forward); Zc = z/γ
// has Re Zc > 0 (a passive line). Telegrapher's equations; identities.
func TestGammaBranch(t *testing.T) {
	t.Parallel()
	l := Line{Length: 100e3, Constants: RLGC{R: 0.03e-3, L: 0.95e-6, G: 1e-11, C: 12e-12}}
	for _, s := range []complex128{
		complex(0, 2*math.Pi*50), complex(0, 2*math.Pi*1e6), complex(50, 2*math.Pi*3e3),
		complex(300, -2*math.Pi*3e3), complex(1e3, 0), complex(1e-3, 1e-3),
	} {
		g, zc := l.GammaZc(s)
		if real(g) < 0 || real(zc) <= 0 {
			t.Errorf("s = %v: γ = %v, Zc = %v: expected Re γ >= 0 and Re Zc > 0", s, g, zc)
		}
		if real(s) == 0 && imag(g) <= 0 {
			t.Errorf("s = %v: Im γ = %g, expected > 0", s, imag(g))
		}
		z, y := l.At(s)
		if !relClose(g*g, z*y, 1e-15) || !relClose(zc*zc, z/y, 1e-14) {
			t.Errorf("s = %v: γ² = %v against zy %v, Zc² = %v against z/y %v", s, g*g, z*y, zc*zc, z/y)
		}
	}
}

// expTol: the exponential form and cmplx.Cosh/Sinh round differently; 1 − x² loses
// digits as 1e-16/|γl|, here |γl| >= 0.05.
const expTol = 1e-13

// The exponential form is the exact two-port: A = even/(2x) = cosh γl, B = Zc·odd/(2x)
// = Zc sinh γl, C = odd/(2x·Zc) = sinh γl/Zc (the textbook hyperbolic forms), and the
// true elements of ExactExp have AD − BC = 1 (reciprocity), on electrical lengths
// where nothing is scaled away.
func TestExactExpIdentities(t *testing.T) {
	t.Parallel()
	zc := complex(280, -9.5)
	for _, gl := range []complex128{
		complex(0.004, 0.05), complex(0.02, 1.3), complex(0.3, 2.2), complex(1.5, -0.7), complex(4, 12),
	} {
		a, b, c, x, m := ExactExp(gl, zc, 1/zc)
		if math.Abs(m-cmplx.Abs(x)) > 3e-16*m { // |x| = m·|e^{-j Im γl}|, rounded
			t.Errorf("γl = %v: m = %g, |x| = %g", gl, m, cmplx.Abs(x))
		}
		if !relClose(x, cmplx.Exp(-gl), 1e-15) {
			t.Errorf("γl = %v: x = %v, want e^-γl = %v", gl, x, cmplx.Exp(-gl))
		}
		k := 1 / (2 * x)
		A, B, C := a*k, b*k, c*k
		if !relClose(A, cmplx.Cosh(gl), expTol) || !relClose(B, zc*cmplx.Sinh(gl), expTol) || !relClose(C, cmplx.Sinh(gl)/zc, expTol) {
			t.Errorf("γl = %v: A, B, C = %v %v %v, want cosh, Zc sinh, sinh/Zc = %v %v %v",
				gl, A, B, C, cmplx.Cosh(gl), zc*cmplx.Sinh(gl), cmplx.Sinh(gl)/zc)
		}
		if det := A*A - B*C; cmplx.Abs(det-1) > identityTol {
			t.Errorf("γl = %v: AD - BC = %v", gl, det)
		}
	}
}

// Electrically very long and lossy: x and m underflow to zero, the form stays finite
// (even = odd = 1: only the forward wave is left), and Line.Exact's scaled two-port
// (which takes its long-line branch from ExpForm) is matched: A/B = 1/Zc.
func TestExpFormUnderflow(t *testing.T) {
	t.Parallel()
	for _, gl := range []complex128{complex(400, 3e4), complex(800, 1e5), complex(1e6, -2)} {
		even, odd, x, m := ExpForm(gl)
		for _, v := range []complex128{even, odd, x} {
			if cmplx.IsNaN(v) || cmplx.IsInf(v) {
				t.Fatalf("γl = %v: non-finite %v %v %v", gl, even, odd, x)
			}
		}
		if even != 1 || odd != 1 || math.IsNaN(m) || m > math.Exp(-399) {
			t.Errorf("γl = %v: even %v, odd %v, m %g; want 1, 1 and m below e^-399", gl, even, odd, m)
		}
	}
	l := Line{Length: 3000e3, Constants: RLGC{R: 0.03e-3, L: 0.95e-6, G: 2e-6, C: 12e-12}}
	s := complex(0, 2*math.Pi*1e6)
	p := l.Exact(s)
	if p.LogScale <= 300 {
		t.Fatalf("LogScale %g: expected the long-line branch", p.LogScale)
	}
	if zc := l.SurgeImpedance(s); !relClose(p.A/p.B, 1/zc, 1e-15) || !relClose(p.C/p.D, 1/zc, 1e-15) {
		t.Errorf("A/B = %v, C/D = %v, want 1/Zc = %v", p.A/p.B, p.C/p.D, 1/zc)
	}
}
