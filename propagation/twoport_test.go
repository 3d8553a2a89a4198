package propagation

import (
	"math"
	"math/cmplx"
	"testing"
)

// Series and shunt blocks: a series z then a shunt y is an L network with
// A = 1 + zy, B = z, C = y, D = 1 (circuit theory; identity).
func TestSeriesShuntBlocks(t *testing.T) {
	t.Parallel()
	z, y := complex(3, 40), complex(0, 2e-3)
	p := Series(z).Then(Shunt(y))
	want := TwoPort{A: 1 + z*y, B: z, C: y, D: 1}
	if p != want {
		t.Errorf("Series.Then(Shunt) = %+v, want %+v", p, want)
	}
	if d := p.Determinant(); cmplx.Abs(d-1) > 1e-15 {
		t.Errorf("AD-BC = %v", d)
	}
	if q := Identity().Then(p).Then(Identity()); q != p {
		t.Errorf("identity changed the two-port: %+v", q)
	}
}

// Cascading is associative.
func TestThenAssociative(t *testing.T) {
	t.Parallel()
	l := Line{Length: 150e3, Constants: RLGC{R: 0.03e-3, L: 0.95e-6, C: 12e-12}}
	s := complex(0, 2*math.Pi*50)
	a, b, c := Series(complex(1, 30)), l.Exact(s), Shunt(complex(0, -1e-3))
	x, y := a.Then(b).Then(c), a.Then(b.Then(c))
	for _, d := range []complex128{x.A - y.A, x.B - y.B, x.C - y.C, x.D - y.D} {
		if cmplx.Abs(d) > 1e-12 {
			t.Fatalf("(ab)c %+v != a(bc) %+v", x, y)
		}
	}
}

// A scaled two-port gives the same ratios as its unscaled form, and Elements
// restores the true values.
func TestLogScaleInvariance(t *testing.T) {
	t.Parallel()
	p := Line{Length: 300e3, Constants: RLGC{R: 0.03e-3, L: 0.95e-6, G: 1e-9, C: 12e-12}}.Exact(complex(0, 2*math.Pi*250))
	k := 1e120
	q := TwoPort{A: p.A / complex(k, 0), B: p.B / complex(k, 0), C: p.C / complex(k, 0), D: p.D / complex(k, 0), LogScale: math.Log(k)}
	const tol = 1e-12 // exp/log round trip
	if !relClose(q.VoltageRatio(0), p.VoltageRatio(0), tol) {
		t.Errorf("VoltageRatio %v, unscaled %v", q.VoltageRatio(0), p.VoltageRatio(0))
	}
	if !relClose(q.InputAdmittance(0.004), p.InputAdmittance(0.004), tol) {
		t.Errorf("InputAdmittance differs")
	}
	if !relClose(q.OutputAdmittance(12), p.OutputAdmittance(12), tol) {
		t.Errorf("OutputAdmittance differs")
	}
	a, b, c, d, ok := q.Elements()
	if !ok || !relClose(a, p.A, tol) || !relClose(b, p.B, tol) || !relClose(c, p.C, tol) || !relClose(d, p.D, tol) {
		t.Errorf("Elements = %v %v %v %v, want %+v", a, b, c, d, p)
	}
	if det := q.Determinant(); cmplx.Abs(det-1) > 1e-9 {
		t.Errorf("scaled AD-BC = %v", det)
	}
}

// A synthetic, very lossy long line (G = 2000 uS/km): its true elements exceed a float64, Elements
// says so, and the open-end voltage ratio underflows gracefully to a tiny finite value.
func TestOverflowReported(t *testing.T) {
	t.Parallel()
	l := Line{Length: 3000e3, Constants: RLGC{R: 0.03e-3, L: 0.95e-6, G: 2e-6, C: 12e-12}}
	p := l.Exact(complex(0, 2*math.Pi*1e6))
	if p.LogScale < 710 {
		t.Fatalf("LogScale %g: expected an overflowing line", p.LogScale)
	}
	if _, _, _, _, ok := p.Elements(); ok {
		t.Errorf("Elements reported finite for LogScale %g", p.LogScale)
	}
	vr := p.VoltageRatio(0)
	if cmplx.IsNaN(vr) || cmplx.IsInf(vr) || cmplx.Abs(vr) > 1e-300 {
		t.Errorf("VoltageRatio = %v", vr)
	}
	// Input admittance of an overflowing lossy line tends to 1/Zc (matched).
	zc := l.SurgeImpedance(complex(0, 2*math.Pi*1e6))
	if y := p.InputAdmittance(0); !relClose(y, 1/zc, 1e-12) {
		t.Errorf("Yin = %v, want 1/Zc = %v", y, 1/zc)
	}
}
