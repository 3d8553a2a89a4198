package waves

import (
	"math"
	"testing"

	"github.com/telegrapher/telegrapher/propagation"
)

// The Clarke transformation is orthonormal (Tᵀ·T = I) and diagonalises a balanced
// matrix into (Zs + 2Zm, Zs − Zm, Zs − Zm). E. Clarke (1943); identity.
func TestClarkeIdentities(t *testing.T) {
	t.Parallel()
	clarke := propagation.ClarkeMatrix()
	const tol = 1e-14 // a few ulps of O(1) sums
	for i := 0; i < 3; i++ {
		for j := 0; j < 3; j++ {
			var s float64
			for k := 0; k < 3; k++ {
				s += clarke[k][i] * clarke[k][j]
			}
			want := 0.0
			if i == j {
				want = 1
			}
			if math.Abs(s-want) > tol {
				t.Errorf("(TᵀT)[%d][%d] = %g", i, j, s)
			}
		}
	}
	m := balancedMatrix(7, 2)
	for _, tc := range []struct {
		v    [3]float64
		mode int
		z    float64
	}{
		{[3]float64{1, 1, 1}, ModeGround, 7},
		{[3]float64{1, -0.5, -0.5}, ModeAlpha, 2},
		{[3]float64{0, 1, -1}, ModeBeta, 2},
	} {
		var mv [3]float64
		for i := 0; i < 3; i++ {
			for j := 0; j < 3; j++ {
				mv[i] += m[i][j] * tc.v[j]
			}
		}
		for i := range mv {
			if math.Abs(mv[i]-tc.z*tc.v[i]) > tol*10 {
				t.Errorf("mode %d: M·v = %v, want %g·v", tc.mode, mv, tc.z)
			}
		}
		md := toModal(tc.v)
		for k := range md {
			if k != tc.mode && math.Abs(md[k]) > tol*10 {
				t.Errorf("pattern %v leaks into mode %d: %g", tc.v, k, md[k])
			}
		}
		back := toPhase(md)
		for k := range back {
			if math.Abs(back[k]-tc.v[k]) > tol*10 {
				t.Errorf("round trip %v -> %v", tc.v, back)
			}
		}
	}
}

// Modal parameters of directly given constants: Zc = sqrt(L/C), τ = l·sqrt(LC),
// R = r·l per mode; the aerial modes carry the positive sequence.
func TestNewModalLine(t *testing.T) {
	t.Parallel()
	const tol = 1e-12
	pos, zero := swLines(320, 0.025, 0.25)
	ml, err := NewModalLine(pos, zero, swOmega)
	if err != nil {
		t.Fatal(err)
	}
	sec := ml.Sections[0]
	for _, tc := range []struct {
		mode         int
		l, c, r      float64
		name         string
		zcLo, zcHi   float64
		velLo, velHi float64
	}{
		// common practice, no source: EHV aerial-mode surge impedance 250-350 ohm at
		// 0.95-0.99 c; ground mode 500-700 ohm, markedly slower.
		{ModeGround, 3.0e-6, 7.5e-12, 0.25e-3, "ground", 500, 700, 1.9e8, 2.6e8},
		{ModeAlpha, 0.95e-6, 12e-12, 0.025e-3, "alpha", 250, 350, 2.8e8, 2.98e8},
		{ModeBeta, 0.95e-6, 12e-12, 0.025e-3, "beta", 250, 350, 2.8e8, 2.98e8},
	} {
		zc := math.Sqrt(tc.l / tc.c)
		tau := 320e3 * math.Sqrt(tc.l*tc.c)
		if math.Abs(sec.Zc[tc.mode]-zc) > tol*zc || math.Abs(sec.Tau[tc.mode]-tau) > tol*tau || math.Abs(sec.R[tc.mode]-tc.r*320e3) > tol*tc.r*320e3 {
			t.Errorf("%s: Zc %g τ %g R %g", tc.name, sec.Zc[tc.mode], sec.Tau[tc.mode], sec.R[tc.mode])
		}
		if v := 320e3 / sec.Tau[tc.mode]; zc < tc.zcLo || zc > tc.zcHi || v < tc.velLo || v > tc.velHi {
			t.Errorf("%s: Zc %.1f ohm, velocity %.3g m/s outside the typical range", tc.name, zc, v)
		}
	}
	if want := 1 / (4 * sec.Tau[ModeAlpha]); math.Abs(ml.EvalHz-want) > tol*want {
		t.Errorf("evaluation frequency %g Hz, want %g", ml.EvalHz, want)
	}
	if _, err := NewModalLine(pos, nil, swOmega); err == nil {
		t.Error("missing zero sequence accepted")
	}
}
