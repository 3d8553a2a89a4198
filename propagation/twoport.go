package propagation

import (
	"math"
	"math/cmplx"
)

// TwoPort is a two-port in transmission (ABCD) form, relating the sending-end voltage
// and current to the receiving-end ones (current out of the receiving port):
//
//	Vs = A·Vr + B·Ir
//	Is = C·Vr + D·Ir
//
// B is in ohm and C in siemens. The true elements are exp(LogScale) times the stored
// ones; LogScale is zero except where an electrically long lossy line would overflow a
// float64. Ratios formed by the methods below do not depend on the scale.
type TwoPort struct {
	A, B, C, D complex128
	LogScale   float64
}

// Identity returns the two-port of a zero-length connection.
func Identity() TwoPort { return TwoPort{A: 1, D: 1} }

// Series returns the two-port of a series impedance z (ohm).
func Series(z complex128) TwoPort { return TwoPort{A: 1, B: z, D: 1} }

// Shunt returns the two-port of a shunt admittance y (S).
func Shunt(y complex128) TwoPort { return TwoPort{A: 1, C: y, D: 1} }

// Then returns the cascade of p followed by q (p at the sending end).
func (p TwoPort) Then(q TwoPort) TwoPort {
	r := TwoPort{
		A:        p.A*q.A + p.B*q.C,
		B:        p.A*q.B + p.B*q.D,
		C:        p.C*q.A + p.D*q.C,
		D:        p.C*q.B + p.D*q.D,
		LogScale: p.LogScale + q.LogScale,
	}
	return r.normalised()
}

// normalised moves the magnitude of the largest element into LogScale when it is far
// from one, so long cascades neither overflow nor underflow.
func (p TwoPort) normalised() TwoPort {
	m := math.Max(math.Max(cmplx.Abs(p.A), cmplx.Abs(p.B)), math.Max(cmplx.Abs(p.C), cmplx.Abs(p.D)))
	if m == 0 || (m < 1e100 && m > 1e-100) || math.IsInf(m, 0) || math.IsNaN(m) {
		return p
	}
	k := complex(1/m, 0)
	return TwoPort{A: p.A * k, B: p.B * k, C: p.C * k, D: p.D * k, LogScale: p.LogScale + math.Log(m)}
}

// Elements returns the true (unscaled) A, B, C, D. An element whose magnitude exceeds a
// float64 comes back infinite; ok reports whether all four are finite.
func (p TwoPort) Elements() (a, b, c, d complex128, ok bool) {
	if p.LogScale == 0 {
		return p.A, p.B, p.C, p.D, true
	}
	k := math.Exp(p.LogScale)
	f := func(x complex128) complex128 {
		if x == 0 {
			return 0
		}
		// Scale in the log domain so a finite true value is not lost to k = Inf.
		lm := math.Log(cmplx.Abs(x)) + p.LogScale
		if lm > math.Log(math.MaxFloat64) {
			return cmplx.Inf()
		}
		if !math.IsInf(k, 0) {
			return x * complex(k, 0)
		}
		return cmplx.Rect(math.Exp(lm), cmplx.Phase(x))
	}
	a, b, c, d = f(p.A), f(p.B), f(p.C), f(p.D)
	ok = !cmplx.IsInf(a) && !cmplx.IsInf(b) && !cmplx.IsInf(c) && !cmplx.IsInf(d)
	return a, b, c, d, ok
}

// Determinant returns AD - BC of the true elements, scaled back; 1 for a reciprocal
// two-port. For a scaled two-port it is computed as (A'D' - B'C')·exp(2·LogScale).
// The scaled difference cancels in rounding once LogScale exceeds about 18 (the two
// products agree to exp(-2·LogScale)), so for such two-ports the result says nothing
// about reciprocity; test AD - BC = 1 on unscaled two-ports.
func (p TwoPort) Determinant() complex128 {
	det := p.A*p.D - p.B*p.C
	if p.LogScale == 0 || det == 0 {
		return det
	}
	return cmplx.Rect(math.Exp(math.Log(cmplx.Abs(det))+2*p.LogScale), cmplx.Phase(det))
}

// VoltageRatio returns Vr/Vs with the receiving end loaded by the admittance yr (S;
// 0 = open):
//
//	Vr/Vs = 1 / (A + B·yr)
func (p TwoPort) VoltageRatio(yr complex128) complex128 {
	den := p.A + p.B*yr
	if p.LogScale == 0 {
		return 1 / den
	}
	return cmplx.Exp(complex(-p.LogScale, 0)) / den
}

// InputAdmittance returns the admittance (S) looking into the sending port with the
// receiving end loaded by the admittance yr (S; 0 = open):
//
//	Yin = (C + D·yr) / (A + B·yr)
func (p TwoPort) InputAdmittance(yr complex128) complex128 {
	return (p.C + p.D*yr) / (p.A + p.B*yr)
}

// OutputAdmittance returns the admittance (S) looking back into the receiving port
// with the sending port terminated by the impedance zs (ohm; 0 = short, as an ideal
// source):
//
//	Yout = (C·zs + A) / (D·zs + B)
func (p TwoPort) OutputAdmittance(zs complex128) complex128 {
	return (p.C*zs + p.A) / (p.D*zs + p.B)
}

// ExpForm returns the exponential form of the hyperbolic functions of a uniform line of
// electrical length gl = γ·l (dimensionless, Re gl >= 0 for a passive line), the form in
// which the exact two-port cannot overflow however long and lossy the line:
//
//	x = e^{−γl},  m = |x| = e^{−Re γl} <= 1,
//	even = 1 + x² = 2x·cosh γl,  odd = 1 − x² = 2x·sinh γl
//
// so that cosh γl = even/(2x) and sinh γl = odd/(2x); ExactExp builds the two-port from
// them. x and m underflow to 0 for Re γl > ~745, where even = odd = 1. For |γl| much
// below 1, odd loses digits to cancellation (relative error about 1e-16/|γl|): use
// cosh and sinh there (Line.Exact does).
//
// References:
//
//   - L. V. Bewley, Traveling Waves on Transmission Systems, 2nd ed., Wiley (1951):
//     the line's solution as forward and backward waves e^{∓γx}; from memory.
func ExpForm(gl complex128) (even, odd, x complex128, m float64) {
	sn, cs := math.Sincos(-imag(gl))
	m = math.Exp(-real(gl))
	x = complex(m*cs, m*sn)
	x2 := x * x
	return 1 + x2, 1 - x2, x, m
}

// ExactExp returns the exact two-port of a uniform line of electrical length gl = γ·l,
// surge impedance zc (ohm) and surge admittance yc = 1/zc (S, given so that a caller
// with γ and the per-length y can form it as y/γ without a division by zc), in the
// exponential form of ExpForm: the elements multiplied by 2x = 2·e^{−γl},
//
//	A' = D' = 1 + x²,  B' = Zc·(1 − x²),  C' = (1 − x²)·Yc
//
// The true elements are A = A'/(2x) and so on; ratios of elements need no scaling, a
// voltage ratio 1/(A + B·Yr) is 2x/(A' + B'·Yr). x and m = |x| are returned for that.
// It allocates nothing and costs one exponential and one sine-cosine pair.
func ExactExp(gl, zc, yc complex128) (a, b, c, x complex128, m float64) {
	even, odd, x, m := ExpForm(gl)
	return even, zc * odd, odd * yc, x, m
}
