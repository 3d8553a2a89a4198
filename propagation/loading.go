package propagation

import (
	"errors"
	"fmt"
	"math"
	"math/cmplx"
)

// LosslessCascade returns the lossless surge impedance sqrt(L/C) (ohm) of a cascade at
// the angular frequency omega (rad/s > 0), with L and C the length-weighted totals of
// its sections (Σ L_k·l_k over Σ C_k·l_k). For a single section it equals
// Line.Lossless. It returns 0 when the cascade has no inductance or no capacitance.
func LosslessCascade(c Cascade, omega float64) float64 {
	var lt, ct float64
	for _, l := range c {
		z, y := l.At(complex(0, omega))
		lt += imag(z) / omega * l.Length
		ct += imag(y) / omega * l.Length
	}
	if lt <= 0 || ct <= 0 {
		return 0
	}
	return math.Sqrt(lt / ct)
}

// SurgeImpedanceLoading returns the surge-impedance loading V²/sqrt(L/C) in W of a
// cascade at the line-to-line rms voltage v (V) and angular frequency omega (rad/s),
// with sqrt(L/C) from LosslessCascade. It returns 0 for a cascade without L or C.
func SurgeImpedanceLoading(c Cascade, v, omega float64) float64 {
	zc := LosslessCascade(c, omega)
	if zc == 0 {
		return 0
	}
	return v * v / zc
}

// LoadingPoint is one steady-state operating point of a line with both ends held at
// the same voltage magnitude. Powers are three-phase (W, var), angles in radians,
// distances in metres from the sending end, voltages in per unit of the held voltage.
type LoadingPoint struct {
	P      float64 // active power delivered into the receiving bus, W
	Delta  float64 // angle of the sending-end voltage ahead of the receiving end, rad
	Qs     float64 // reactive power the sending bus delivers into the line, var
	Qr     float64 // reactive power the line delivers into the receiving bus, var
	Losses float64 // active power lost in the line, W (sending power minus P)
	VMid   float64 // voltage at mid-length, pu
	VMax   float64 // largest voltage along the line, pu
	XVMax  float64 // where it occurs, m
	VMin   float64 // smallest voltage along the line, pu
	XVMin  float64 // where it occurs, m
	// Vs, Vr, Is, Ir are the end phasors: voltages line-to-line (V), currents scaled
	// by sqrt(3) so that Vr·conj(Ir) is the three-phase complex power (W + j var).
	Vs, Vr, Is, Ir complex128
}

// MaxTransfer returns the largest active power (W) a line can deliver into the
// receiving bus with both ends held at the line-to-line rms voltage v (V), at the
// angular frequency omega (rad/s), and the angle (rad) at which it does so. With
// Vr = v, Vs = v·e^{jδ} and the line's two-port (A = |A|∠α, B = |B|∠β):
//
//	Pr(δ) = v²/|B| · (cos(β - δ) - |A|·cos(β - α)),   Pmax = Pr(β)
//
// On a lossless line this is v²/(Zc·sin βl) at δ = 90°. It returns an error when the
// two-port cannot be formed (an electrically enormous line) or the line can deliver
// no power at all.
//
// References:
//   - W. D. Stevenson, Elements of Power System Analysis, 4th ed., McGraw-Hill (1982),
//     ch. 5, power-circle diagram of the general two-port.
func MaxTransfer(c Cascade, omega, v float64) (pmax, delta float64, err error) {
	a, b, _, _, err := lineElements(c, omega)
	if err != nil {
		return 0, 0, err
	}
	pmax, delta = maxTransfer(a, b, v)
	if !(pmax > 0) {
		return 0, 0, errors.New("propagation: the line cannot deliver active power with both ends at the same voltage")
	}
	return pmax, delta, nil
}

func maxTransfer(a, b complex128, v float64) (pmax, delta float64) {
	beta, alpha := cmplx.Phase(b), cmplx.Phase(a)
	k := cmplx.Abs(a) * math.Cos(beta-alpha)
	return v * v / cmplx.Abs(b) * (1 - k), beta
}

func lineElements(c Cascade, omega float64) (a, b, cc, d complex128, err error) {
	if len(c) == 0 {
		panic("propagation: empty cascade")
	}
	if !(omega > 0) {
		panic("propagation: angular frequency must be > 0")
	}
	p := c.Exact(complex(0, omega))
	a, b, cc, d, ok := p.Elements()
	if !ok || b == 0 || cmplx.IsNaN(a) || cmplx.IsNaN(b) {
		return 0, 0, 0, 0, errors.New("propagation: the line's two-port at the system frequency is not finite")
	}
	return a, b, cc, d, nil
}

// BothEndsHeld returns the operating points of the line with both ends held at the
// line-to-line rms voltage v (V) at the angular frequency omega (rad/s), delivering
// each active power of powers (W, 0 <= P <= MaxTransfer) into the receiving bus.
// It uses the exact (lossy) long-line two-port of the whole cascade: with Vr = v,
// the stable solution of Pr(δ) = P (see MaxTransfer) is
//
//	δ = β - arccos(P·|B|/v² + |A|·cos(β - α))
//	Ir = (Vs - A·Vr)/B,  Is = C·Vr + D·Ir,  Ss = Vs·conj(Is),  Sr = Vr·conj(Ir)
//
// and the voltage profile follows from the telegrapher's equations section by
// section, walking back from the receiving end (see VoltageAlong). The maximum and
// minimum along the line are found on a grid and refined by golden-section search.
//
// On a lossless line it reduces to P = v²·sin δ/(Zc·sin βl) and
// Qr = v²·(cos δ - cos βl)/(Zc·sin βl); at P = SIL the profile is flat and Qs = Qr = 0.
//
// References:
//   - W. D. Stevenson, Elements of Power System Analysis, 4th ed., McGraw-Hill (1982),
//     ch. 5 (long-line equations, power flow through a line).
//   - P. Kundur, Power System Stability and Control, McGraw-Hill (1994), §6.1
//     (performance requirements of a line, both ends at fixed voltage).
func BothEndsHeld(c Cascade, omega, v float64, powers []float64) ([]LoadingPoint, error) {
	if !(v > 0) {
		return nil, fmt.Errorf("propagation: voltage must be > 0, got %g", v)
	}
	a, b, cc, d, err := lineElements(c, omega)
	if err != nil {
		return nil, err
	}
	pmax, _ := maxTransfer(a, b, v)
	prof := newProfiler(c, omega)
	beta, alpha := cmplx.Phase(b), cmplx.Phase(a)
	k := cmplx.Abs(a) * math.Cos(beta-alpha)
	out := make([]LoadingPoint, len(powers))
	for i, p := range powers {
		if !(p >= 0) || p > pmax*(1+1e-12) {
			return nil, fmt.Errorf("propagation: power %g W is outside 0 to the largest transferable %g W", p, pmax)
		}
		arg := math.Min(1, math.Max(-1, p*cmplx.Abs(b)/(v*v)+k))
		delta := beta - math.Acos(arg)
		vs := cmplx.Rect(v, delta)
		vr := complex(v, 0)
		ir := (vs - a*vr) / b
		is := cc*vr + d*ir
		ss, sr := vs*cmplx.Conj(is), vr*cmplx.Conj(ir)
		pt := LoadingPoint{
			P: p, Delta: wrapAngle(delta), // real(sr) equals p to rounding
			Qs: imag(ss), Qr: imag(sr), Losses: real(ss) - real(sr),
			Vs: vs, Vr: vr, Is: is, Ir: ir,
		}
		prof.set(vr, ir)
		pt.VMid = cmplx.Abs(prof.at(prof.length/2)) / v
		pt.XVMax, pt.VMax = prof.extreme(+1)
		pt.XVMin, pt.VMin = prof.extreme(-1)
		pt.VMax /= v
		pt.VMin /= v
		out[i] = pt
	}
	return out, nil
}

func wrapAngle(x float64) float64 {
	x = math.Mod(x+math.Pi, 2*math.Pi)
	if x < 0 {
		x += 2 * math.Pi
	}
	return x - math.Pi
}

// LoadingPowers returns the powers (W) at which to evaluate a line with both ends
// held: from 0 to min(2·sil, pmax) in steps of 0.05·sil, the end point included, and
// at least 21 of them (evenly spaced when the range is short); sil itself is among
// them whenever sil <= pmax. sil and pmax must be > 0.
func LoadingPowers(sil, pmax float64) []float64 {
	if !(sil > 0) || !(pmax > 0) {
		panic("propagation: LoadingPowers needs sil > 0 and pmax > 0")
	}
	end := math.Min(2*sil, pmax)
	step := 0.05 * sil
	var ps []float64
	for k := 0; float64(k)*step < end*(1-1e-9); k++ {
		ps = append(ps, float64(k)*step)
	}
	ps = append(ps, end)
	if len(ps) >= 21 {
		return ps
	}
	ps = ps[:0]
	for k := 0; k <= 20; k++ {
		ps = append(ps, end*float64(k)/20)
	}
	if sil < end {
		for i := range ps {
			if ps[i] > sil {
				ps = append(ps[:i], append([]float64{sil}, ps[i:]...)...)
				break
			}
		}
	}
	return ps
}

// VoltageAlong writes into dst the voltage phasors (same unit as vr) at the distances
// x (m from the sending end, 0..total length) along the cascade, given the
// receiving-end voltage vr and the current ir out of the receiving port, at the
// angular frequency omega (rad/s). Within a section, at distance d from its
// receiving end,
//
//	V(d) = cosh(γd)·V_k + Zc·sinh(γd)·I_k
//
// with V_k, I_k that section's receiving-end quantities. It returns dst, grown if
// needed.
func VoltageAlong(dst []complex128, c Cascade, omega float64, vr, ir complex128, x []float64) []complex128 {
	if cap(dst) < len(x) {
		dst = make([]complex128, len(x))
	}
	dst = dst[:len(x)]
	p := newProfiler(c, omega)
	p.set(vr, ir)
	for i, xi := range x {
		dst[i] = p.at(xi)
	}
	return dst
}

// profiler evaluates the voltage along a cascade for given receiving-end quantities.
type profiler struct {
	gamma, zc []complex128
	start     []float64 // position of each section's sending end, m
	lengths   []float64
	vk, ik    []complex128 // receiving-end quantities of each section
	length    float64
}

func newProfiler(c Cascade, omega float64) *profiler {
	n := len(c)
	p := &profiler{
		gamma: make([]complex128, n), zc: make([]complex128, n),
		start: make([]float64, n), lengths: make([]float64, n),
		vk: make([]complex128, n), ik: make([]complex128, n),
	}
	pos := 0.0
	for i, l := range c {
		p.gamma[i], p.zc[i] = l.GammaZc(complex(0, omega))
		p.start[i] = pos
		p.lengths[i] = l.Length
		pos += l.Length
	}
	p.length = pos
	return p
}

func (p *profiler) set(vr, ir complex128) {
	v, i := vr, ir
	for k := len(p.gamma) - 1; k >= 0; k-- {
		p.vk[k], p.ik[k] = v, i
		gl := p.gamma[k] * complex(p.lengths[k], 0)
		ch, sh := cmplx.Cosh(gl), cmplx.Sinh(gl)
		v, i = ch*p.vk[k]+p.zc[k]*sh*p.ik[k], sh/p.zc[k]*p.vk[k]+ch*p.ik[k]
	}
}

func (p *profiler) section(x float64) int {
	for k := len(p.start) - 1; k > 0; k-- {
		if x >= p.start[k] {
			return k
		}
	}
	return 0
}

func (p *profiler) at(x float64) complex128 {
	return p.atIn(p.section(x), x)
}

func (p *profiler) atIn(k int, x float64) complex128 {
	d := p.start[k] + p.lengths[k] - x
	gd := p.gamma[k] * complex(d, 0)
	if p.zc[k] == 0 {
		return p.vk[k]
	}
	return cmplx.Cosh(gd)*p.vk[k] + p.zc[k]*cmplx.Sinh(gd)*p.ik[k]
}

// extremeTie is the relative difference below which two voltages along the line count
// as equal when locating an extreme (rounding of the end voltages is ~1e-16).
const extremeTie = 1e-12

// extreme returns the position and magnitude of the largest (sign > 0) or smallest
// (sign < 0) voltage along the whole cascade.
func (p *profiler) extreme(sign float64) (x, vabs float64) {
	bestX, bestV := 0.0, math.Inf(-1)
	for k := range p.start {
		n := int(math.Min(400, math.Max(32, math.Ceil(p.lengths[k]/2e3))))
		f := func(x float64) float64 { return sign * cmplx.Abs(p.atIn(k, x)) }
		h := p.lengths[k] / float64(n)
		iBest, vB := 0, math.Inf(-1)
		for i := 0; i <= n; i++ {
			// Ties (both ends held at exactly the same voltage) go to the point
			// nearer the sending end, so the reported place does not flicker.
			if v := f(p.start[k] + float64(i)*h); i == 0 || v > vB+extremeTie*math.Abs(vB) {
				iBest, vB = i, v
			}
		}
		xB := p.start[k] + float64(iBest)*h
		if iBest > 0 && iBest < n {
			xB, vB = goldenMax(f, xB-h, xB+h)
		} else {
			// At a section end the extreme may lie just inside the section (a
			// junction of sections on a flat profile): search the end interval too.
			lo := math.Max(xB-h, p.start[k])
			x2, v2 := goldenMax(f, lo, lo+h)
			if v2 > vB+extremeTie*math.Abs(vB) {
				xB, vB = x2, v2
			}
		}
		if k == 0 || vB > bestV+extremeTie*math.Abs(bestV) {
			bestX, bestV = xB, vB
		}
	}
	return bestX, sign * bestV
}

// goldenMax maximises a unimodal f on [lo, hi] by GoldenMax, to 1e-9·(1 + |lo|) m.
func goldenMax(f func(float64) float64, lo, hi float64) (x, fx float64) {
	return GoldenMax(f, lo, hi, func(a, b float64) bool { return b-a <= 1e-9*(1+math.Abs(a)) }, 80)
}

// OpenEndResult is the line energised from the sending bus, held at voltage v, with
// the receiving end open.
type OpenEndResult struct {
	Rise     float64 // |Vr/Vs|, the no-load (Ferranti) rise
	Charging float64 // reactive power (var) the line with the given shunts delivers into the sending bus; > 0 when it generates
}

// OpenEnd returns the no-load rise and charging reactive power of the cascade at the
// angular frequency omega (rad/s), with the sending bus held at the line-to-line rms
// voltage v (V), the receiving end open apart from the admittance yRecv (S, e.g.
// line-connected reactors; 0 = nothing), and the admittance ySend (S) on the line at
// the sending end:
//
//	Vr/Vs = 1/(A + B·yRecv),  Yin = (C + D·yRecv)/(A + B·yRecv) + ySend,
//	charging = v²·Im(Yin)
//
// References:
//   - W. D. Stevenson, Elements of Power System Analysis, 4th ed., McGraw-Hill (1982),
//     ch. 5 (Ferranti effect, long-line equations).
func OpenEnd(c Cascade, omega, v float64, ySend, yRecv complex128) (OpenEndResult, error) {
	a, b, cc, d, err := lineElements(c, omega)
	if err != nil {
		return OpenEndResult{}, err
	}
	n := a + b*yRecv
	if n == 0 {
		return OpenEndResult{}, errors.New("propagation: the open-end voltage is unbounded (the line is at resonance)")
	}
	yin := (cc+d*yRecv)/n + ySend
	return OpenEndResult{Rise: 1 / cmplx.Abs(n), Charging: v * v * imag(yin)}, nil
}

// ReactorForRise returns the rating (var at the line-to-line rms voltage v, V, and
// angular frequency omega, rad/s) of a lossless shunt reactor at the open receiving
// end, in addition to the admittance yRecv (S) already there, that brings the
// open-end rise |Vr/Vs| to target (> 0). With a reactor of rating Q, admittance
// -jQ/v², the condition |A + B·yRecv - jB·Q/v²| = 1/target is a quadratic in Q; the
// smallest root >= 0 is returned, or 0 when the rise is already at or below target.
// It returns an error when no reactor reaches the target.
func ReactorForRise(c Cascade, omega, v float64, yRecv complex128, target float64) (float64, error) {
	if !(target > 0) {
		return 0, fmt.Errorf("propagation: target rise must be > 0, got %g", target)
	}
	a, b, _, _, err := lineElements(c, omega)
	if err != nil {
		return 0, err
	}
	n0 := a + b*yRecv
	if cmplx.Abs(n0) >= 1/target {
		return 0, nil
	}
	w := -complex(0, 1) * b / complex(v*v, 0)
	qa := real(w * cmplx.Conj(w))
	qb := 2 * real(n0*cmplx.Conj(w))
	qc := real(n0*cmplx.Conj(n0)) - 1/(target*target)
	disc := qb*qb - 4*qa*qc
	if disc < 0 || qa == 0 {
		return 0, fmt.Errorf("propagation: no receiving-end reactor brings the open-end rise to %g", target)
	}
	sq := math.Sqrt(disc)
	// qc < 0 here, so the roots have opposite signs: the positive one is wanted.
	r1, r2 := (-qb-sq)/(2*qa), (-qb+sq)/(2*qa)
	q := math.Max(r1, r2)
	if q < 0 {
		return 0, fmt.Errorf("propagation: no receiving-end reactor brings the open-end rise to %g", target)
	}
	return q, nil
}
