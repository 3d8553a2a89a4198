package waves

import (
	"fmt"
	"math"
	"math/cmplx"
	"runtime"

	"github.com/mjibson/go-dsp/window"
	"golang.org/x/sync/errgroup"
	"gonum.org/v1/gonum/dsp/fourier"

	"github.com/telegrapher/telegrapher/freqscan"
	"github.com/telegrapher/telegrapher/propagation"
)

// MaxLaplaceSamples caps the frequency samples of one numerical Laplace transform
// (2^21: about 130 MB of work buffers); a finer output step is interpolated.
const MaxLaplaceSamples = 1 << 21

// LaplaceOptions tunes Laplace.
type LaplaceOptions struct {
	// Samples is the number of frequency samples N (a power of two); 0 = chosen from
	// the duration and time step. The observation window is T = N·Δt >= 2·duration.
	Samples int
}

// LaplaceTransform holds the reusable set-up of a numerical Laplace inversion of N
// samples: the FFT plans (gonum dsp/fourier, real output), the window and the work
// buffers. It is not safe for concurrent use.
type LaplaceTransform struct {
	n      int
	plans  [2]*fourier.FFT
	window []float64
	spec   [2][]complex128 // sending and receiving spectra, N samples
	coeff  [2][]complex128 // their Hermitian folds, N/2+1 samples
	seq    [2][]float64
	out    []float64
}

// NewLaplaceTransform returns the set-up for n frequency samples (n >= 16, a power
// of two).
func NewLaplaceTransform(n int) *LaplaceTransform {
	if n < 16 || n&(n-1) != 0 {
		panic(fmt.Sprintf("waves: NewLaplaceTransform: n = %d is not a power of two >= 16", n))
	}
	// Half of a Blackman window of length 2n−1:
	// σ_k = 0.42 + 0.5·cos(πk/(n−1)) + 0.08·cos(2πk/(n−1)), k = 0..n−1.
	full := window.Blackman(2*n - 1)
	lt := &LaplaceTransform{n: n, window: append([]float64(nil), full[n-1:]...), out: make([]float64, n)}
	for i := range lt.plans {
		lt.plans[i] = fourier.NewFFT(n)
		lt.spec[i] = make([]complex128, n)
		lt.coeff[i] = make([]complex128, n/2+1)
		lt.seq[i] = make([]float64, n)
	}
	return lt
}

// Laplace computes the energisation of the open-ended line by the numerical Laplace
// transform of the whole frequency-domain network (frequency-dependent line, source,
// shunts), evaluated at s_k = c + jkΔω, k = 0..N−1, and inverted by a real-output FFT
// (gonum dsp/fourier, one reusable plan per end):
//
//	v(t_m) = (2/T)·e^{c·t_m}·Re Σ_k σ_k·w_k·V(s_k)·e^{j2πkm/N},  t_m = m·T/N
//
// with Δω = 2π/T, w_0 = 1/2 (w_k = 1 otherwise), the Blackman window
// σ_k = 0.42 + 0.5·cos(πk/(N−1)) + 0.08·cos(2πk/(N−1)) (the falling half of go-dsp's
// window.Blackman) against the Gibbs oscillations, and the damping c = ln(N²)/T, which keeps the aliasing from
// the periodic images below 1/N² of the response. The window overshoots a jump of
// the waveform by at most LaplaceFrontOvershoot of the jump, wherever the jump falls
// between samples (the Hann half-window, common in the literature, overshoots by
// 0.64 % one sample after a jump that falls on a sample, as every front does on the
// default step of a hundredth of the travel time); Waveform.Overshoot states the
// bound for the waveform. With an ideal source the sending end is the EMF itself,
// set exactly rather than inverted. The window
// T is at least twice the duration and only its first half is kept, so the damping
// amplifies round-off by no more than N.
//
// Trapped charge V0 on a line without shunt conductance is the uniform particular
// solution V0/s with no current; the rest is the network's response to the equivalent
// initial-condition sources: the source EMF less V0/s, and −Y·V0/s through each
// line-connected reactor (no current at closing). Line-connected capacitors hold V0.
// For a sine EMF the source side is in its steady state before closing: it acts on
// the line through its Norton equivalent with the open-circuit bus voltage. A
// sectioned line is the cascade of its sections' exact two-ports; the voltage at each
// junction comes from the partial cascades (see LaplaceTransform.Junctions).
//
// References:
//
//   - L. M. Wedepohl, "Power system transients: errors incurred in the numerical
//     inversion of the Laplace transform", Proc. 26th Midwest Symposium on Circuits
//     and Systems (1983) 174-178.
//   - P. Moreno, A. Ramirez, "Implementation of the numerical Laplace transform: a
//     review", IEEE Trans. Power Delivery 23(4) (2008) 2599-2609.
func Laplace(n freqscan.Network, e Energisation, opt LaplaceOptions) (*Waveform, error) {
	if err := e.check(); err != nil {
		return nil, err
	}
	if len(n.Line) == 0 {
		return nil, fmt.Errorf("waves: laplace: the line has no sections")
	}
	tau, tauMin := 0.0, math.Inf(1)
	for i, l := range n.Line {
		t := l.TravelTime(e.Omega)
		if !(t > 0) || !(l.Length > 0) {
			return nil, fmt.Errorf("waves: laplace: section %d needs length, inductance and capacitance > 0", i+1)
		}
		tau += t
		tauMin = math.Min(tauMin, t)
	}
	dt := e.TimeStep
	if dt == 0 {
		// a hundredth of the whole travel time, and at least 20 steps over the
		// shortest section (a short cable's own reflections)
		dt = defaultStep(math.Min(tau, 5*tauMin), e.Duration)
	}
	N := opt.Samples
	if N == 0 {
		N = 16
		for float64(N)*dt < 2*e.Duration && N < MaxLaplaceSamples {
			N *= 2
		}
	}
	if N < 16 || N&(N-1) != 0 || N > MaxLaplaceSamples {
		return nil, fmt.Errorf("%w: laplace: %d frequency samples: need a power of two from 16 to %d", ErrSettings, N, MaxLaplaceSamples)
	}
	inner := dt // the transform's own step
	if float64(N)*dt < 2*e.Duration {
		inner = 2 * e.Duration / float64(N)
	}
	lt := NewLaplaceTransform(N)
	vs, vr, err := lt.Energise(n, e, inner)
	if err != nil {
		return nil, err
	}
	m := samples(e.Duration, dt)
	wf := &Waveform{Method: "laplace", Step: dt, Sending: resample(vs, inner, dt, m), Receiving: resample(vr, inner, dt, m)}
	if len(n.Line) > 1 {
		vj, err := lt.Junctions(n, e, inner)
		if err != nil {
			return nil, err
		}
		names, xs := junctionNames(n)
		for i, v := range vj {
			wf.Junctions = append(wf.Junctions, JunctionWave{Name: names[i], X: xs[i], V: resample(v, inner, dt, m)})
		}
	}
	T := float64(N) * inner
	wf.Overshoot = LaplaceFrontOvershoot * swing(e.TrappedPU, wf.Sending, wf.Receiving)
	for _, j := range wf.Junctions {
		wf.Overshoot = math.Max(wf.Overshoot, LaplaceFrontOvershoot*swing(e.TrappedPU, j.V))
	}
	wf.Notes = append(wf.Notes, fmt.Sprintf("numerical Laplace transform: %d frequency samples up to %.4g kHz, window T = %.4g ms (first half kept), damping c = ln(N²)/T = %.4g 1/s, Blackman window; aliasing below 1/N² = %.1e",
		N, float64(N)/T/1e3, T*1e3, math.Log(float64(N)*float64(N))/T, 1/(float64(N)*float64(N))))
	if inner != dt {
		wf.Notes = append(wf.Notes, fmt.Sprintf("transform step %.4g µs, output interpolated linearly to %.4g µs", inner*1e6, dt*1e6))
	}
	wf.Notes = append(wf.Notes, fmt.Sprintf("the window smooths each wavefront over about 2Δt and overshoots it by at most %.2g %% of the jump: peaks are accurate to +%.2g pu at wavefronts", LaplaceFrontOvershoot*100, wf.Overshoot))
	return wf, nil
}

// LaplaceFrontOvershoot is the largest overshoot of the numerical Laplace transform's
// windowed inversion at a jump of the waveform, as a fraction of the jump: 1.8e-4
// for the Blackman half-window, measured over the position of the jump between two
// samples (TestLaplaceFrontOvershoot), rounded up.
const LaplaceFrontOvershoot = 2e-4

// swing returns the largest jump a waveform starting from v0 can make: the spread of
// its samples and v0.
func swing(v0 float64, vs ...[]float64) float64 {
	lo, hi := v0, v0
	for _, v := range vs {
		for _, x := range v {
			lo, hi = math.Min(lo, x), math.Max(hi, x)
		}
	}
	return hi - lo
}

// resample interpolates v (step from) linearly at m samples of step to.
func resample(v []float64, from, to float64, m int) []float64 {
	if from == to && len(v) >= m {
		return append([]float64(nil), v[:m]...)
	}
	out := make([]float64, m)
	for k := range out {
		x := float64(k) * to / from
		i := int(x)
		if i >= len(v)-1 {
			out[k] = v[len(v)-1]
			continue
		}
		f := x - float64(i)
		out[k] = v[i]*(1-f) + v[i+1]*f
	}
	return out
}

// Energise inverts the sending- and receiving-end voltages of the energisation (see
// Laplace) with time step dt (s): the window is T = N·dt, and the first N/2 samples
// (from t = 0) are returned, in pu. The returned slices are reused by the next call.
func (lt *LaplaceTransform) Energise(n freqscan.Network, e Energisation, dt float64) (vs, vr []float64, err error) {
	N := lt.n
	T := float64(N) * dt
	c := math.Log(float64(N)*float64(N)) / T
	dw := 2 * math.Pi / T
	net := n.Energising()
	ev := newEvaluator(net, e)
	// Fill the spectra, then transform, on up to two cores (the frequency samples
	// and the two ends are independent).
	workers := min(runtime.GOMAXPROCS(0), 2)
	if N < 4096 {
		workers = 1
	}
	parallel(workers, N, func(lo, hi int) {
		for k := lo; k < hi; k++ {
			a, b := ev.at(complex(c, float64(k)*dw))
			wk := complex(lt.window[k], 0)
			if k == 0 {
				wk *= 0.5
			}
			lt.spec[0][k], lt.spec[1][k] = wk*a, wk*b
		}
	})
	// Re Σ_k A_k·e^{j2πkm/N} = Σ_j B_j·e^{j2πjm/N} with the Hermitian
	// B_j = (A_j + conj(A_{N−j}))/2: a real-output inverse FFT of N/2+1 coefficients.
	half := N / 2
	parallel(workers, 2, func(lo, hi int) {
		for i := lo; i < hi; i++ {
			A, B := lt.spec[i], lt.coeff[i]
			B[0] = complex(real(A[0]), 0)
			for j := 1; j <= half; j++ {
				B[j] = (A[j] + cmplx.Conj(A[N-j])) * 0.5
			}
			B[half] = complex(real(B[half]), 0)
			lt.plans[i].Sequence(lt.seq[i], B)
		}
	})
	vsOut, vrOut := lt.out[:half], lt.out[half:]
	// The damping factor (2/T)·e^{c·t}, exact every 256 samples and by a running
	// product between (relative error below 1e-13).
	grow := math.Exp(c * dt)
	var g float64
	for m := 0; m < half; m++ {
		if m%256 == 0 {
			g = 2 / T * math.Exp(c*float64(m)*dt)
		} else {
			g *= grow
		}
		vsOut[m] = e.TrappedPU + g*lt.seq[0][m]
		vrOut[m] = e.TrappedPU + g*lt.seq[1][m]
	}
	if ev.ideal {
		// An ideal source holds the sending end at the EMF from the closing instant.
		for m := range vsOut {
			vsOut[m] = e.emf(float64(m) * dt)
		}
	}
	if !finite(vsOut, vrOut) {
		return nil, nil, fmt.Errorf("waves: laplace: non-finite result (network evaluation overflowed)")
	}
	return vsOut, vrOut, nil
}

// Junctions inverts the voltage at each junction of sections of the energisation (see
// Laplace) with time step dt (s), the first N/2 samples from t = 0, in pu, sending end
// first. At each s the junction voltage follows from the receiving end through the
// partial cascade of the sections beyond the junction,
//
//	V_j = A_j·V_r + B_j·I_r,   [A_j B_j; C_j D_j] = Π_{i >= j} ABCD_i(s)
//
// with I_r the current the line delivers into its line-connected receiving shunts
// (zero for the bare open end): both terms grow towards the sending end, so nothing
// cancels. The slices are freshly allocated.
func (lt *LaplaceTransform) Junctions(n freqscan.Network, e Energisation, dt float64) ([][]float64, error) {
	nj := len(n.Line) - 1
	if nj <= 0 {
		return nil, nil
	}
	N := lt.n
	T := float64(N) * dt
	c := math.Log(float64(N)*float64(N)) / T
	dw := 2 * math.Pi / T
	net := n.Energising()
	ev := newEvaluator(net, e)
	spec := make([][]complex128, nj)
	for j := range spec {
		spec[j] = make([]complex128, N)
	}
	workers := min(runtime.GOMAXPROCS(0), 2)
	if N < 4096 {
		workers = 1
	}
	parallel(workers, N, func(lo, hi int) {
		vj := make([]complex128, nj)
		for k := lo; k < hi; k++ {
			ev.junctions(complex(c, float64(k)*dw), vj)
			wk := complex(lt.window[k], 0)
			if k == 0 {
				wk *= 0.5
			}
			for j := range vj {
				spec[j][k] = wk * vj[j]
			}
		}
	})
	half := N / 2
	out := make([][]float64, nj)
	grow := math.Exp(c * dt)
	for j := range out {
		A, B := spec[j], lt.coeff[0]
		B[0] = complex(real(A[0]), 0)
		for i := 1; i <= half; i++ {
			B[i] = (A[i] + cmplx.Conj(A[N-i])) * 0.5
		}
		B[half] = complex(real(B[half]), 0)
		lt.plans[0].Sequence(lt.seq[0], B)
		v := make([]float64, half)
		var g float64
		for m := range v {
			if m%256 == 0 {
				g = 2 / T * math.Exp(c*float64(m)*dt)
			} else {
				g *= grow
			}
			v[m] = e.TrappedPU + g*lt.seq[0][m]
		}
		if !finite(v) {
			return nil, fmt.Errorf("waves: laplace: non-finite junction voltage (network evaluation overflowed)")
		}
		out[j] = v
	}
	return out, nil
}

// junctions sets dst[j] to the voltage (without V0/s) at junction j+1 of the sections
// at s.
func (ev *evaluator) junctions(s complex128, dst []complex128) {
	_, vr := ev.at(s)
	yr, jr := ev.receivingShunts(s)
	ir := yr*vr - jr // into the receiving line-connected shunts
	p := propagation.Identity()
	line := ev.net.Line
	for j := len(line) - 1; j >= 1; j-- {
		p = line[j].Exact(s).Then(p)
		v := p.A*vr + p.B*ir
		if p.LogScale != 0 {
			v *= complex(math.Exp(p.LogScale), 0)
		}
		dst[j-1] = v
	}
}

// receivingShunts returns the admittance of the line-connected receiving shunts at s
// and their equivalent initial-condition current (−Y·V0/s for reactors).
func (ev *evaluator) receivingShunts(s complex128) (yr, jr complex128) {
	vp := complex(ev.v0, 0) / s
	for _, sh := range ev.net.Shunts {
		if sh.End != freqscan.Receiving || !sh.OnLine {
			continue
		}
		y := sh.Admittance(s)
		yr += y
		if sh.L > 0 {
			jr -= y * vp
		}
	}
	return yr, jr
}

// parallel runs fn over [0, n) split into at most workers contiguous parts.
func parallel(workers, n int, fn func(lo, hi int)) {
	if workers <= 1 || n < 2 {
		fn(0, n)
		return
	}
	var g errgroup.Group
	chunk := (n + workers - 1) / workers
	for lo := 0; lo < n; lo += chunk {
		hi := min(n, lo+chunk)
		g.Go(func() error { fn(lo, hi); return nil })
	}
	_ = g.Wait() // fn returns nothing to report
}

// inv returns 1/z, by conj(z)/|z|² where that cannot overflow or underflow (three
// times cheaper than the general complex division), else by the division.
func inv(z complex128) complex128 {
	r, i := real(z), imag(z)
	d := r*r + i*i
	if d > 1e-290 && d < 1e290 {
		return complex(r/d, -i/d)
	}
	return 1 / z
}

// evaluator gives the Laplace-domain sending and receiving voltages (less the trapped
// V0/s) of the energisation at s.
type evaluator struct {
	net      freqscan.Network
	e        Energisation
	single   bool
	rlgc     propagation.RLGC
	length   float64
	ideal    bool
	v0       float64
	busRatio complex128 // steady-state bus voltage over EMF before closing (sine)
	psi      float64    // phase of the open-circuit bus voltage at t = 0, rad
}

func newEvaluator(net freqscan.Network, e Energisation) *evaluator {
	ev := &evaluator{net: net, e: e, ideal: net.Source.Ideal(), v0: e.TrappedPU, busRatio: 1}
	if len(net.Line) == 1 {
		if p, ok := net.Line[0].Constants.(propagation.RLGC); ok {
			ev.single, ev.rlgc, ev.length = true, p, net.Line[0].Length
		}
	}
	if e.Excitation == Sine {
		s := complex(0, e.Omega)
		_, ysb, _, _ := net.Admittances(s)
		ev.busRatio = 1 / (1 + net.Source.Impedance(s)*ysb)
	}
	ev.psi = e.CloseDeg*math.Pi/180 + cmplx.Phase(ev.busRatio)
	return ev
}

// lineY returns the nodal admittances of the line at s: Y11 (sending), Y22
// (receiving), Y12 (transfer), in S.
func (ev *evaluator) lineY(s complex128) (y11, y22, y12 complex128) {
	if ev.single {
		// Y11 = D/B = coth(γl)/Zc, Y12 = −1/B = −1/(Zc·sinh γl) of the exact two-port
		// in the exponential form of propagation.ExpForm (x = e^{−γl}, |x| < 1 for
		// Re s > 0, even = 1 + x², odd = 1 − x²), which cannot overflow: with 1/Zc = γ/z,
		//	Y11 = even·γ / (odd·z),  Y12 = −2x·γ / (odd·z)
		p := ev.rlgc
		z := complex(p.R+real(s)*p.L, imag(s)*p.L)
		y := complex(p.G+real(s)*p.C, imag(s)*p.C)
		g := propagation.PrincipalSqrt(z * y) // Re γ >= 0
		even, odd, x, _ := propagation.ExpForm(g * complex(ev.length, 0))
		q := g * inv(odd*z)
		y11 = even * q
		return y11, y11, -2 * x * q
	}
	p := ev.net.Line.Exact(s)
	y12 = -1 / p.B
	if p.LogScale != 0 {
		y12 *= complex(math.Exp(-p.LogScale), 0)
	}
	return p.D / p.B, p.A / p.B, y12
}

// at returns the sending and receiving voltages at s, without V0/s.
func (ev *evaluator) at(s complex128) (vs, vr complex128) {
	net := &ev.net
	y11, y22, y12 := ev.lineY(s)
	vp := complex(ev.v0, 0) / s // uniform trapped voltage
	// Shunt admittances at each end and the equivalent initial-condition currents of
	// the line-connected reactors (no current at closing): −Y·V0/s.
	var ysBus, ysLine, yr, js, jr complex128
	for _, sh := range net.Shunts {
		if sh.End == freqscan.Receiving && !sh.OnLine {
			continue
		}
		y := sh.Admittance(s)
		switch {
		case sh.End == freqscan.Sending && !sh.OnLine:
			ysBus += y
		case sh.End == freqscan.Sending:
			ysLine += y
			if sh.L > 0 {
				js -= y * vp
			}
		default:
			yr += y
			if sh.L > 0 {
				jr -= y * vp
			}
		}
	}
	// The source side: Norton current Y_th·V_oc(s), Y_th = 1/Zsrc + Ysb.
	var emf complex128
	if ev.e.Excitation == Sine {
		w := complex(ev.e.Omega, 0)
		mag := complex(cmplx.Abs(ev.busRatio), 0)
		emf = mag * (s*complex(math.Sin(ev.psi), 0) + w*complex(math.Cos(ev.psi), 0)) / (s*s + w*w)
	} else {
		emf = inv(s)
	}
	if ev.ideal {
		vs = emf - vp
		vr = (jr - y12*vs) / (y22 + yr)
		return vs, vr
	}
	ysrc := inv(net.Source.Impedance(s))
	yth := ysrc + ysBus
	var jsrc complex128
	if ev.e.Excitation == Sine {
		jsrc = yth * emf // the open-circuit bus voltage behind Y_th
	} else {
		jsrc = ysrc * emf // at rest before the step
	}
	js += jsrc - yth*vp
	a := y11 + yth + ysLine
	d := y22 + yr
	idet := inv(a*d - y12*y12)
	vs = (js*d - y12*jr) * idet
	vr = (a*jr - y12*js) * idet
	return vs, vr
}
