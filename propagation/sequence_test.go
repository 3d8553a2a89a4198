package propagation

import (
	"math"
	"math/cmplx"
	"testing"
)

// seqTol is the tolerance of the transformations' identities: sums of a few O(1)
// products, each rounded to 1.1e-16, with √3, √2, √6 and a = e^{j2π/3} themselves
// rounded.
const seqTol = 1e-14

// The Clarke Q is orthonormal (Q·Qᵀ = I), ClarkeToPhase inverts ClarkeToModal both
// ways, and v·i is the same in both frames (power invariance). Identities.
func TestClarkeInverse(t *testing.T) {
	t.Parallel()
	q := ClarkeMatrix()
	for i := 0; i < 3; i++ {
		for j := 0; j < 3; j++ {
			s := q[i][0]*q[j][0] + q[i][1]*q[j][1] + q[i][2]*q[j][2]
			want := 0.0
			if i == j {
				want = 1
			}
			if math.Abs(s-want) > seqTol {
				t.Errorf("(Q·Qᵀ)[%d][%d] = %.17g, want %g", i, j, s, want)
			}
		}
	}
	for _, tc := range []struct {
		name string
		v, i [3]float64
	}{
		{"unit a", [3]float64{1, 0, 0}, [3]float64{0.3, -2, 5}},
		{"unbalanced", [3]float64{1.7, -0.4, 2.9}, [3]float64{-3, 1e-3, 7.5}},
		{"large", [3]float64{3.3e5, -1.2e5, -2.1e5}, [3]float64{800, -410, -390}},
	} {
		scale := math.Max(math.Max(math.Abs(tc.v[0]), math.Abs(tc.v[1])), math.Abs(tc.v[2]))
		back := ClarkeToPhase(ClarkeToModal(tc.v))
		there := ClarkeToModal(ClarkeToPhase(tc.v))
		for k := 0; k < 3; k++ {
			if math.Abs(back[k]-tc.v[k]) > seqTol*scale || math.Abs(there[k]-tc.v[k]) > seqTol*scale {
				t.Errorf("%s: round trips %v and %v of %v", tc.name, back, there, tc.v)
			}
		}
		mv, mi := ClarkeToModal(tc.v), ClarkeToModal(tc.i)
		pPhase := tc.v[0]*tc.i[0] + tc.v[1]*tc.i[1] + tc.v[2]*tc.i[2]
		pModal := mv[0]*mi[0] + mv[1]*mi[1] + mv[2]*mi[2]
		if math.Abs(pPhase-pModal) > seqTol*(math.Abs(pPhase)+scale*800) {
			t.Errorf("%s: power %g in phases, %g in modes", tc.name, pPhase, pModal)
		}
	}
}

// Textbook values of the power-invariant Clarke components (E. Clarke 1943, from memory;
// the power-invariant form is √(3/2) times her amplitude-invariant α, β and √3 times
// her 0): a zero-sequence set (1, 1, 1) is ground mode √3 alone; (1, −½, −½) is α
// alone, √(3/2); (0, 1, −1) is β alone, √2; and a balanced matrix (self 7, mutual 2
// less, i.e. zero 7 and positive 2 in sequence values) becomes diag(7, 2, 2).
func TestClarkeTextbookValues(t *testing.T) {
	t.Parallel()
	for _, tc := range []struct {
		v    [3]float64
		mode int
		want float64
	}{
		{[3]float64{1, 1, 1}, ClarkeGround, math.Sqrt(3)},
		{[3]float64{1, -0.5, -0.5}, ClarkeAlpha, math.Sqrt(1.5)},
		{[3]float64{0, 1, -1}, ClarkeBeta, math.Sqrt(2)},
	} {
		m := ClarkeToModal(tc.v)
		for k := 0; k < 3; k++ {
			want := 0.0
			if k == tc.mode {
				want = tc.want
			}
			if math.Abs(m[k]-want) > seqTol {
				t.Errorf("ClarkeToModal(%v)[%d] = %.17g, want %.17g", tc.v, k, m[k], want)
			}
		}
	}
	z0, z1 := complex(7, 3), complex(2, 0.5)
	m := ClarkeModalMatrix(BalancedMatrix(z0, z1))
	want := [3]complex128{ClarkeGround: z0, ClarkeAlpha: z1, ClarkeBeta: z1}
	for i := 0; i < 3; i++ {
		for j := 0; j < 3; j++ {
			w := complex128(0)
			if i == j {
				w = want[i]
			}
			if cmplx.Abs(m[i][j]-w) > seqTol*10 {
				t.Errorf("Q·M·Qᵀ[%d][%d] = %v, want %v", i, j, m[i][j], w)
			}
		}
	}
}

// Symmetrical components of balanced sets (Fortescue 1918): a positive-sequence set
// (V, a²V, aV) is positive sequence alone, a negative one (V, aV, a²V) negative alone,
// (V, V, V) zero alone; a current in phase a alone, as in a single line-to-earth fault,
// splits into I0 = I1 = I2 = Ia/3 (J. J. Grainger and W. D. Stevenson, Power System
// Analysis, McGraw-Hill (1994), ch. 12; from memory). SequencePhasors inverts
// SequenceComponents.
func TestSequenceOfBalancedSets(t *testing.T) {
	t.Parallel()
	a := cmplx.Rect(1, 2*math.Pi/3)
	v := cmplx.Rect(230e3, 0.3)
	for _, tc := range []struct {
		name string
		abc  [3]complex128
		want [3]complex128 // 0, 1, 2
	}{
		{"positive", [3]complex128{v, a * a * v, a * v}, [3]complex128{0, v, 0}},
		{"negative", [3]complex128{v, a * v, a * a * v}, [3]complex128{0, 0, v}},
		{"zero", [3]complex128{v, v, v}, [3]complex128{v, 0, 0}},
		{"phase a alone", [3]complex128{v, 0, 0}, [3]complex128{v / 3, v / 3, v / 3}},
	} {
		got := SequenceComponents(tc.abc)
		back := SequencePhasors(got)
		for k := 0; k < 3; k++ {
			if cmplx.Abs(got[k]-tc.want[k]) > seqTol*cmplx.Abs(v) {
				t.Errorf("%s: sequence %d = %v, want %v", tc.name, k, got[k], tc.want[k])
			}
			if cmplx.Abs(back[k]-tc.abc[k]) > seqTol*cmplx.Abs(v) {
				t.Errorf("%s: phase %d back = %v, want %v", tc.name, k, back[k], tc.abc[k])
			}
		}
	}
}

// A balanced phase matrix has the diagonal sequence matrix diag(z0, z1, z1), and
// SequenceOfBalanced recovers (z0, z1) from it; for an unbalanced symmetric matrix the
// sequence and Clarke forms are similar to it, so the trace is kept and the zero-
// sequence (ground-mode) diagonal element is the same in both (both take the row
// (1, 1, 1)/√3 direction). Identities.
func TestSequenceMatrix(t *testing.T) {
	t.Parallel()
	z0, z1 := complex(0.25e-3, 3.1e-3), complex(0.03e-3, 0.30e-3) // ohm/m, a 50 Hz line's order
	s := SequenceMatrix(BalancedMatrix(z0, z1))
	want := [3]complex128{z0, z1, z1}
	for i := 0; i < 3; i++ {
		for j := 0; j < 3; j++ {
			w := complex128(0)
			if i == j {
				w = want[i]
			}
			if cmplx.Abs(s[i][j]-w) > seqTol*cmplx.Abs(z0) {
				t.Errorf("A⁻¹·M·A[%d][%d] = %v, want %v", i, j, s[i][j], w)
			}
		}
	}
	g0, g1 := SequenceOfBalanced(BalancedMatrix(z0, z1))
	if cmplx.Abs(g0-z0) > seqTol*cmplx.Abs(z0) || cmplx.Abs(g1-z1) > seqTol*cmplx.Abs(z0) {
		t.Errorf("SequenceOfBalanced = %v, %v; want %v, %v", g0, g1, z0, z1)
	}
	u := [3][3]complex128{
		{complex(5, 40), complex(1, 12), complex(0.8, 9)},
		{complex(1, 12), complex(5.2, 41), complex(1.1, 12.5)},
		{complex(0.8, 9), complex(1.1, 12.5), complex(4.9, 39)},
	}
	sq, cl := SequenceMatrix(u), ClarkeModalMatrix(u)
	tr := u[0][0] + u[1][1] + u[2][2]
	for name, m := range map[string][3][3]complex128{"sequence": sq, "clarke": cl} {
		if d := m[0][0] + m[1][1] + m[2][2] - tr; cmplx.Abs(d) > seqTol*cmplx.Abs(tr) {
			t.Errorf("%s: trace changed by %v", name, d)
		}
	}
	if cmplx.Abs(sq[0][0]-cl[ClarkeGround][ClarkeGround]) > seqTol*cmplx.Abs(tr) {
		t.Errorf("zero sequence %v, ground mode %v", sq[0][0], cl[ClarkeGround][ClarkeGround])
	}
	if g0, _ := SequenceOfBalanced(u); cmplx.Abs(g0-sq[0][0]) > seqTol*cmplx.Abs(tr) {
		t.Errorf("SequenceOfBalanced zero %v, A⁻¹·M·A %v", g0, sq[0][0])
	}
	if _, g1 := SequenceOfBalanced(u); cmplx.Abs(g1-sq[1][1]) > seqTol*cmplx.Abs(tr) {
		t.Errorf("SequenceOfBalanced positive %v, A⁻¹·M·A %v", g1, sq[1][1])
	}
}
