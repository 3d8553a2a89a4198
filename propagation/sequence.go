package propagation

import (
	"math"
	"math/cmplx"
)

// The three-phase transformations of the package, each written once: the Clarke
// (0, α, β) modal transformation of a transposed line and Fortescue's symmetrical
// components (0, 1, 2). Phases are in the order a, b, c.
//
// References:
//
//   - E. Clarke, Circuit Analysis of A-C Power Systems, vol. I, Wiley (1943): the
//     α, β, 0 components.
//   - C. L. Fortescue, "Method of symmetrical co-ordinates applied to the solution of
//     polyphase networks", AIEE Trans. 37 (1918) 1027-1140.

// Clarke mode numbers: the order of the modal quantities of ClarkeToModal. The ground
// mode travels on the zero-sequence constants of a transposed line, the two aerial modes
// on the positive-sequence ones.
const (
	ClarkeGround = 0
	ClarkeAlpha  = 1
	ClarkeBeta   = 2
)

// clarkeQ is the orthonormal (power-invariant) Clarke transformation, rows in the order
// ClarkeGround, ClarkeAlpha, ClarkeBeta: v_modal = clarkeQ · v_phase. Its inverse is its
// transpose.
var clarkeQ = [3][3]float64{
	{1 / math.Sqrt(3), 1 / math.Sqrt(3), 1 / math.Sqrt(3)},
	{math.Sqrt(2.0 / 3.0), -1 / math.Sqrt(6), -1 / math.Sqrt(6)},
	{0, 1 / math.Sqrt(2), -1 / math.Sqrt(2)},
}

// ClarkeMatrix returns the Clarke transformation Q of the package, the orthonormal
// (power-invariant) form with rows (0, α, β):
//
//	Q = [ 1/√3  1/√3  1/√3 ;  √(2/3)  −1/√6  −1/√6 ;  0  1/√2  −1/√2 ]
//
// v_modal = Q·v_phase and v_phase = Qᵀ·v_modal (Q⁻¹ = Qᵀ). Powers are the same in both
// frames (vᵀi is invariant). A balanced phase matrix (self Zs, mutual Zm) becomes
// diag(Zs + 2Zm, Zs − Zm, Zs − Zm).
func ClarkeMatrix() [3][3]float64 { return clarkeQ }

// ClarkeToModal returns Q·p: the modal (0, α, β) components of the phase quantities p
// (any unit; the result has the same unit).
func ClarkeToModal(p [3]float64) (m [3]float64) {
	for i := 0; i < 3; i++ {
		m[i] = clarkeQ[i][0]*p[0] + clarkeQ[i][1]*p[1] + clarkeQ[i][2]*p[2]
	}
	return m
}

// ClarkeToPhase returns Qᵀ·m: the phase quantities of the modal (0, α, β) components m;
// the inverse of ClarkeToModal.
func ClarkeToPhase(m [3]float64) (p [3]float64) {
	for i := 0; i < 3; i++ {
		p[i] = clarkeQ[0][i]*m[0] + clarkeQ[1][i]*m[1] + clarkeQ[2][i]*m[2]
	}
	return p
}

// ClarkeModalMatrix returns Q·M·Qᵀ, the modal (0, α, β) form of a phase matrix M (a
// series impedance in ohm/m or a shunt admittance in S/m, for example). For a
// transposed line it is diagonal: the zero- and positive-sequence values.
func ClarkeModalMatrix(m [3][3]complex128) [3][3]complex128 {
	var q, qt [3][3]complex128
	for i := 0; i < 3; i++ {
		for j := 0; j < 3; j++ {
			q[i][j] = complex(clarkeQ[i][j], 0)
			qt[j][i] = q[i][j]
		}
	}
	return mul3(mul3(q, m), qt)
}

// BalancedMatrix returns the phase matrix of a balanced (transposed) three-phase
// element from its zero- and positive-sequence values (any unit: ohm, S, ohm/m, ...):
//
//	self = (zero + 2·positive)/3,  mutual = (zero − positive)/3
//
// the inverse of SequenceOfBalanced; it equals Qᵀ·diag(zero, positive, positive)·Q for
// the Clarke Q and A·diag(zero, positive, positive)·A⁻¹ for symmetrical components.
func BalancedMatrix[T float64 | complex128](zero, positive T) [3][3]T {
	self := (zero + 2*positive) / 3
	mut := (zero - positive) / 3
	return [3][3]T{{self, mut, mut}, {mut, self, mut}, {mut, mut, self}}
}

// SequenceOfBalanced returns the zero- and positive-sequence values of a symmetric phase
// matrix m: the diagonal of A⁻¹·m·A (the negative sequence equals the positive one),
//
//	zero = (Σ m_ii + 2·Σ_{i<j} m_ij)/3,  positive = (Σ m_ii − Σ_{i<j} m_ij)/3
//
// with the off-diagonal sum taken as the mean of m_ij and m_ji. For a balanced m
// (BalancedMatrix) these are exact; for an unbalanced one they leave the coupling
// between sequences out (see SequenceMatrix).
func SequenceOfBalanced(m [3][3]complex128) (zero, positive complex128) {
	sd := m[0][0] + m[1][1] + m[2][2]
	so := (m[0][1] + m[1][0] + m[0][2] + m[2][0] + m[1][2] + m[2][1]) / 2
	return (sd + 2*so) / 3, (sd - so) / 3
}

// opA is Fortescue's operator a = exp(j·2π/3).
var opA = cmplx.Rect(1, 2*math.Pi/3)

// Symmetrical components: A = [1 1 1; 1 a² a; 1 a a²] takes the sequences (0, 1, 2)
// to the phases (a, b, c); seqInv = A⁻¹ = A*/3 the other way.
var (
	seqA   = [3][3]complex128{{1, 1, 1}, {1, opA * opA, opA}, {1, opA, opA * opA}}
	seqInv = [3][3]complex128{{1.0 / 3, 1.0 / 3, 1.0 / 3}, {1.0 / 3, opA / 3, opA * opA / 3}, {1.0 / 3, opA * opA / 3, opA / 3}}
)

// SequenceComponents returns the zero-, positive- and negative-sequence components
// (0, 1, 2) of the phasors (a, b, c): A⁻¹·v, so that a balanced positive-sequence set
// (V, a²V, aV) gives (0, V, 0).
func SequenceComponents(v [3]complex128) [3]complex128 { return mul3v(seqInv, v) }

// SequencePhasors returns the phasors (a, b, c) of the sequence components (0, 1, 2):
// A·s, the inverse of SequenceComponents.
func SequencePhasors(s [3]complex128) [3]complex128 { return mul3v(seqA, s) }

// SequenceMatrix returns A⁻¹·m·A, the sequence (0, 1, 2) form of a phase matrix m: a
// series impedance in ohm/m or a shunt admittance in S/m, for example. It is diagonal
// for a balanced m; its off-diagonal elements are the coupling between sequences of an
// untransposed line.
func SequenceMatrix(m [3][3]complex128) [3][3]complex128 { return mul3(mul3(seqInv, m), seqA) }

func mul3(a, b [3][3]complex128) [3][3]complex128 {
	var r [3][3]complex128
	for i := 0; i < 3; i++ {
		for j := 0; j < 3; j++ {
			r[i][j] = a[i][0]*b[0][j] + a[i][1]*b[1][j] + a[i][2]*b[2][j]
		}
	}
	return r
}

func mul3v(a [3][3]complex128, v [3]complex128) (r [3]complex128) {
	for i := 0; i < 3; i++ {
		r[i] = a[i][0]*v[0] + a[i][1]*v[1] + a[i][2]*v[2]
	}
	return r
}
