package waves

import (
	"fmt"
	"math"

	"github.com/telegrapher/telegrapher/propagation"
)

// Mode numbers of a transposed three-phase line in the Clarke (0, α, β) frame of
// propagation.ClarkeMatrix: the ground mode travels on the zero-sequence constants, the
// two aerial modes on the positive-sequence ones.
const (
	ModeGround = propagation.ClarkeGround
	ModeAlpha  = propagation.ClarkeAlpha
	ModeBeta   = propagation.ClarkeBeta
)

// toModal returns the modal components of the phase quantities p, by the orthonormal
// Clarke transformation of propagation (ClarkeToModal).
func toModal(p [3]float64) [3]float64 { return propagation.ClarkeToModal(p) }

// toPhase returns the phase quantities of the modal components m, the inverse of
// toModal (propagation.ClarkeToPhase).
func toPhase(m [3]float64) [3]float64 { return propagation.ClarkeToPhase(m) }

// balancedMatrix returns the phase-domain matrix Qᵀ·diag(zero, aerial, aerial)·Q of the
// Clarke Q: self (zero + 2·aerial)/3 and mutual (zero − aerial)/3
// (propagation.BalancedMatrix).
func balancedMatrix(zero, aerial float64) [3][3]float64 {
	return propagation.BalancedMatrix(zero, aerial)
}

// ModalSection is one line section of a transposed three-phase line in modal form:
// for each mode (ModeGround, ModeAlpha, ModeBeta) a constant-parameter line.
type ModalSection struct {
	Length float64    // m
	Zc     [3]float64 // lossless surge impedance sqrt(L'/C') per mode, ohm
	Tau    [3]float64 // travel time Length·sqrt(L'C') per mode, s
	R      [3]float64 // total series resistance R'·Length per mode, ohm (lumped R/4, R/2, R/4)
	G      [3]float64 // total shunt conductance G'·Length per mode, S (lumped G/2 at each end)
}

// ModalLine is a transposed three-phase line in modal form, section by section from the
// sending end, with its parameters taken at the frequency EvalHz.
type ModalLine struct {
	Sections []ModalSection
	EvalHz   float64 // frequency at which frequency-dependent constants were evaluated, Hz
}

// NewModalLine builds the modal form of a transposed line from its positive- and
// zero-sequence cascades (the same sections, the same lengths). The aerial modes take
// the positive-sequence constants, the ground mode the zero-sequence ones; the
// per-length R', L', C', G' of each are read at the frequency
//
//	f_eval = 1 / (4·τ₁)
//
// the quarter-wave (first open-end) frequency of the positive-sequence line with its
// travel time τ₁ at the system angular frequency omega: the dominant frequency of an
// open-end energisation transient. Constants given directly do not vary with frequency,
// so for them the choice does not matter.
//
// References:
//
//   - H. W. Dommel, "Digital computer solution of electromagnetic transients in
//     single- and multiphase networks", IEEE Trans. PAS-88 (1969) 388-399.
//   - A. Greenwood, Electrical Transients in Power Systems, 2nd ed., Wiley (1991),
//     ch. 9 (modal components of transposed lines).
func NewModalLine(positive, zero propagation.Cascade, omega float64) (ModalLine, error) {
	if len(positive) == 0 {
		return ModalLine{}, fmt.Errorf("waves: modal line: the line has no sections")
	}
	if len(zero) != len(positive) {
		return ModalLine{}, fmt.Errorf("waves: modal line: %d positive-sequence sections but %d zero-sequence ones", len(positive), len(zero))
	}
	if !(omega > 0) {
		return ModalLine{}, fmt.Errorf("waves: modal line: angular frequency must be > 0, got %g", omega)
	}
	var tau1 float64
	for i, l := range positive {
		t := l.TravelTime(omega)
		if !(t > 0) {
			return ModalLine{}, fmt.Errorf("waves: modal line: section %d needs inductance and capacitance > 0", i+1)
		}
		tau1 += t
	}
	fEval := 1 / (4 * tau1)
	w := 2 * math.Pi * fEval
	ml := ModalLine{EvalHz: fEval}
	for i := range positive {
		p, z := positive[i], zero[i]
		if math.Abs(p.Length-z.Length) > 1e-9*p.Length {
			return ModalLine{}, fmt.Errorf("waves: modal line: section %d is %g m in positive but %g m in zero sequence", i+1, p.Length, z.Length)
		}
		var sec ModalSection
		sec.Length = p.Length
		for m, c := range [3]propagation.Line{z, p, p} {
			zs, ys := c.At(complex(0, w))
			r, l, g, cap := real(zs), imag(zs)/w, real(ys), imag(ys)/w
			if !(l > 0) || !(cap > 0) || r < 0 || g < 0 || math.IsInf(r, 0) || math.IsInf(g, 0) {
				return ModalLine{}, fmt.Errorf("waves: modal line: section %d, mode %d: needs L, C > 0 and R, G >= 0 (got R %g ohm/m, L %g H/m, G %g S/m, C %g F/m)", i+1, m, r, l, g, cap)
			}
			sec.Zc[m] = math.Sqrt(l / cap)
			sec.Tau[m] = p.Length * math.Sqrt(l*cap)
			sec.R[m] = r * p.Length
			sec.G[m] = g * p.Length
		}
		ml.Sections = append(ml.Sections, sec)
	}
	return ml, nil
}

// minTau returns the shortest modal travel time of any section.
func (ml ModalLine) minTau() float64 {
	t := math.Inf(1)
	for _, s := range ml.Sections {
		for _, x := range s.Tau {
			t = math.Min(t, x)
		}
	}
	return t
}

// modalBergeron is the state of one section in the time domain: for each mode a
// Bergeron line of surge impedance Zc and travel time τ with its resistance lumped as
// R/4 at each end and R/2 in the middle (two lossless halves), which gives at end k
// (current into the line, m the other end)
//
//	i_k(t) = v_k(t)/Z + I_k(t)
//	I_k(t) = −(1+h)/2·[v_m(t−τ)/Z + h·i_m(t−τ)] − (1−h)/2·[v_k(t−τ)/Z + h·i_k(t−τ)]
//	Z = Zc + R/4,  h = (Zc − R/4)/(Zc + R/4)
//
// with the delayed values interpolated linearly between stored steps.
//
// References:
//
//   - H. W. Dommel, EMTP Theory Book, Bonneville Power Administration (1986), §4.2.2
//     (lumped-resistance approximation); from memory.
type modalBergeron struct {
	ends  [2][3]int  // nodes of phases a, b, c at the sending (0) and receiving (1) end
	gl    [3]float64 // shunt conductance G/2 per mode at each end, S
	z, h  [3]float64
	delay [3]int     // whole steps of τ
	frac  [3]float64 // fractional step of τ
	size  int        // ring length
	// ring buffers per mode: voltage and current at the sending (0) and receiving (1) end
	v, i [2][3][]float64
	pos  int // index of the slot for the current step
	// hs, hr are the modal history currents of the current step at each end.
	hs, hr [3]float64
}

// newModalBergeron returns the section between the nodes ends, at rest at the
// trapped phase voltages.
func newModalBergeron(sec ModalSection, dt float64, trapped [3]float64, ends [2][3]int) *modalBergeron {
	b := &modalBergeron{ends: ends}
	maxDelay := 0
	for m := 0; m < 3; m++ {
		b.gl[m] = sec.G[m] / 2
		q := sec.R[m] / 4
		b.z[m] = sec.Zc[m] + q
		b.h[m] = (sec.Zc[m] - q) / (sec.Zc[m] + q)
		steps := sec.Tau[m] / dt
		b.delay[m] = int(math.Floor(steps))
		b.frac[m] = steps - float64(b.delay[m])
		maxDelay = max(maxDelay, b.delay[m])
	}
	b.size = maxDelay + 2
	vm := toModal(trapped)
	for e := 0; e < 2; e++ {
		for m := 0; m < 3; m++ {
			b.v[e][m] = make([]float64, b.size)
			b.i[e][m] = make([]float64, b.size)
			for k := range b.v[e][m] {
				b.v[e][m][k] = vm[m]
			}
		}
	}
	return b
}

// delayed returns x(t − τ) for mode m from ring r, with the current step at b.pos not
// yet written.
func (b *modalBergeron) delayed(r []float64, m int) float64 {
	d := b.delay[m]
	i0 := (b.pos - d + b.size) % b.size // t − d·dt
	i1 := (b.pos - d - 1 + b.size) % b.size
	f := b.frac[m]
	return (1-f)*r[i0] + f*r[i1]
}

// history returns the history currents (modal) into each end for the current step.
// Needs delay >= 1 (τ >= dt), which the time-step choice guarantees.
func (b *modalBergeron) history() (hs, hr [3]float64) {
	for m := 0; m < 3; m++ {
		z, h := b.z[m], b.h[m]
		vs, is := b.delayed(b.v[0][m], m), b.delayed(b.i[0][m], m)
		vr, ir := b.delayed(b.v[1][m], m), b.delayed(b.i[1][m], m)
		a, c := (1+h)/2, (1-h)/2
		hs[m] = -a*(vr/z+h*ir) - c*(vs/z+h*is)
		hr[m] = -a*(vs/z+h*is) - c*(vr/z+h*ir)
	}
	return hs, hr
}

// store records the modal end voltages and currents of the current step and advances.
func (b *modalBergeron) store(vs, vr, is, ir [3]float64) {
	for m := 0; m < 3; m++ {
		b.v[0][m][b.pos], b.v[1][m][b.pos] = vs[m], vr[m]
		b.i[0][m][b.pos], b.i[1][m][b.pos] = is[m], ir[m]
	}
	b.pos = (b.pos + 1) % b.size
}

// clone returns a deep copy of b.
func (b *modalBergeron) clone() *modalBergeron {
	c := *b
	for e := 0; e < 2; e++ {
		for m := 0; m < 3; m++ {
			c.v[e][m] = append([]float64(nil), b.v[e][m]...)
			c.i[e][m] = append([]float64(nil), b.i[e][m]...)
		}
	}
	return &c
}

// stamp adds the section's conductances at both ends: 1/Z per mode and the lumped
// shunt conductance G/2 per mode.
func (b *modalBergeron) stamp(g [][]float64) {
	y := balancedMatrix(1/b.z[0], 1/b.z[1])
	gl := balancedMatrix(b.gl[0], b.gl[1])
	for _, nodes := range b.ends {
		for _, m := range [][3][3]float64{y, gl} {
			for r := 0; r < 3; r++ {
				for c := 0; c < 3; c++ {
					g[nodes[r]][nodes[c]] += m[r][c]
				}
			}
		}
	}
}

// inject adds the history currents of the coming step (into the line at each end)
// as sources drawing from the end nodes.
func (b *modalBergeron) inject(j []float64, _ drive) {
	b.hs, b.hr = b.history()
	ps, pr := toPhase(b.hs), toPhase(b.hr)
	for k := 0; k < 3; k++ {
		j[b.ends[0][k]] -= ps[k]
		j[b.ends[1][k]] -= pr[k]
	}
}

// update stores the step's modal end voltages and currents.
func (b *modalBergeron) update(v []float64, _ drive) {
	var vs, vr [3]float64
	for k := 0; k < 3; k++ {
		vs[k] = v[b.ends[0][k]]
		vr[k] = v[b.ends[1][k]]
	}
	vsm, vrm := toModal(vs), toModal(vr)
	var is, ir [3]float64
	for m := 0; m < 3; m++ {
		is[m] = vsm[m]/b.z[m] + b.hs[m]
		ir[m] = vrm[m]/b.z[m] + b.hr[m]
	}
	b.store(vsm, vrm, is, ir)
}
