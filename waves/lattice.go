package waves

import (
	"container/heap"
	"fmt"
	"math"
	"sort"

	"github.com/telegrapher/telegrapher/freqscan"
)

// LatticeOptions tunes Lattice.
type LatticeOptions struct {
	// AttenuationHz, when > 0, attenuates each wavefront over each transit of a
	// section by exp(-α·length), with α = Re γ(j2πf) at this frequency (a
	// distortionless approximation of the losses); 0 = lossless.
	AttenuationHz float64
	// MaxWavefronts caps the number of wavefronts traced (default 200,000).
	MaxWavefronts int
}

// Wavefront is one travelling wave of a lattice diagram: it leaves position X0 (m
// from the sending end) at time T0 (s) and reaches X1 at T1, inside section Section.
// Coefficient is its amplitude relative to the wave launched at t = 0 (the products of
// the reflection and transmission coefficients and the attenuation met on its way);
// Amplitude is the voltage jump it carries for a step EMF, in pu (Coefficient ×
// Z1/(Rs+Z1) × (1 − trapped)); for a sine EMF the launched wave follows the EMF and
// Amplitude is Coefficient × Z1/(Rs+Z1).
type Wavefront struct {
	Section     int
	X0, X1      float64 // m
	T0, T1      float64 // s
	Coefficient float64
	Amplitude   float64 // pu
}

// LatticeDiagram is the distance-time data of a Bewley lattice diagram.
type LatticeDiagram struct {
	Length     float64     // m, whole line
	Junctions  []float64   // m, positions of the section boundaries, sending end first
	Surge      []float64   // ohm, lossless surge impedance of each section
	Travel     []float64   // s, travel time of each section
	Wavefronts []Wavefront // sorted by T0
	Duration   float64     // s
	// Dropped counts wavefronts below the amplitude floor (1e-9 of the launched wave)
	// that were not traced further.
	Dropped int
}

// latticeQuantum is the time resolution of the wavefront times, s: fronts closer
// than this are merged. Samples are microseconds apart, so this moves no sample.
const latticeQuantum = 1e-9

// frontKey identifies a wavefront by section, direction and start time in quanta.
type frontKey struct {
	sec, dir int
	t        int64
}

// frontHeap orders wavefronts by start time (then section, direction, for a
// deterministic order).
type frontHeap []frontKey

func (h frontHeap) Len() int { return len(h) }
func (h frontHeap) Less(i, j int) bool {
	if h[i].t != h[j].t {
		return h[i].t < h[j].t
	}
	if h[i].sec != h[j].sec {
		return h[i].sec < h[j].sec
	}
	return h[i].dir < h[j].dir
}
func (h frontHeap) Swap(i, j int) { h[i], h[j] = h[j], h[i] }
func (h *frontHeap) Push(x any)   { *h = append(*h, x.(frontKey)) }
func (h *frontHeap) Pop() any {
	old := *h
	x := old[len(old)-1]
	*h = old[:len(old)-1]
	return x
}

// latticeFloor is the relative amplitude below which a wavefront is not traced: it
// changes no sample by more than 1e-9 pu per wave.
const latticeFloor = 1e-9

// Lattice computes the energisation of the open-ended line by the Bewley lattice
// diagram: the source (an EMF behind a resistance Rs >= 0, no inductance) launches
// the wave Z1/(Rs+Z1)·(e(t) − V0) into the line at rest at the trapped voltage V0;
// every wavefront is reflected at the open end (coefficient +1), at the source
// ((Rs−Z1)/(Rs+Z1)) and at each junction of sections, where it is split into
//
//	reflected   (Z2 − Z1)/(Z1 + Z2)
//	transmitted 2·Z2/(Z1 + Z2)
//
// The voltage at a point is V0 plus the sum of the delayed launched waveform over all
// wavefronts that have reached it, each times its coefficient; for the lossless line
// this is exact (no time-step error: samples are taken of the closed-form sum). The
// voltage at a junction (in Waveform.Junctions) is the sum of the waves arriving at it
// and leaving it on the sending side, which equals the transmitted waves.
//
// It refuses (error wrapping ErrMethod) a source with inductance and any shunt at the
// sending bus or on the line: those are not resistive junctions. The surge impedance
// sqrt(L/C) and velocity 1/sqrt(LC) of each section are taken at the attenuation
// frequency, or at e.Omega when lossless.
//
// References:
//
//   - L. V. Bewley, Traveling Waves on Transmission Systems, 2nd ed., Wiley (1951), ch. 3.
//   - A. Greenwood, Electrical Transients in Power Systems, 2nd ed., Wiley (1991), ch. 9.
func Lattice(n freqscan.Network, e Energisation, opt LatticeOptions) (*Waveform, *LatticeDiagram, error) {
	if err := e.check(); err != nil {
		return nil, nil, err
	}
	if len(n.Line) == 0 {
		return nil, nil, fmt.Errorf("waves: lattice: the line has no sections")
	}
	if n.Source.L != 0 {
		return nil, nil, fmt.Errorf("%w: the lattice diagram needs a resistive source, the source has %.4g mH of inductance (use bergeron or laplace)", ErrMethod, n.Source.L*1e3)
	}
	if n.Source.R < 0 || math.IsNaN(n.Source.R) {
		return nil, nil, fmt.Errorf("waves: lattice: source resistance must be >= 0, got %g", n.Source.R)
	}
	for _, sh := range n.Shunts {
		if sh.End == freqscan.Receiving && !sh.OnLine {
			continue // disconnected with the far end open
		}
		return nil, nil, fmt.Errorf("%w: the lattice diagram cannot treat the %s shunt %q at the %s end (use bergeron or laplace)", ErrMethod, kindOf(sh), sh.Name, sh.End)
	}
	if opt.AttenuationHz < 0 || math.IsNaN(opt.AttenuationHz) || math.IsInf(opt.AttenuationHz, 0) {
		return nil, nil, fmt.Errorf("%w: attenuation frequency must be >= 0, got %g Hz", ErrSettings, opt.AttenuationHz)
	}
	maxW := opt.MaxWavefronts
	if maxW <= 0 {
		maxW = 200_000
	}
	omega := e.Omega
	if opt.AttenuationHz > 0 {
		omega = 2 * math.Pi * opt.AttenuationHz
	}
	ns := len(n.Line)
	d := &LatticeDiagram{Duration: e.Duration, Junctions: make([]float64, ns+1), Surge: make([]float64, ns), Travel: make([]float64, ns)}
	atten := make([]float64, ns)
	x := 0.0
	for i, l := range n.Line {
		zc, v := l.Lossless(omega)
		if !(zc > 0) || !(v > 0) || !(l.Length > 0) {
			return nil, nil, fmt.Errorf("waves: lattice: section %d needs length, inductance and capacitance > 0", i+1)
		}
		d.Surge[i], d.Travel[i] = zc, l.Length/v
		atten[i] = 1
		if opt.AttenuationHz > 0 {
			atten[i] = math.Exp(-real(l.Gamma(complex(0, omega))) * l.Length)
		}
		x += l.Length
		d.Junctions[i+1] = x
	}
	d.Length = x
	rs := n.Source.R
	launch := d.Surge[0] / (rs + d.Surge[0])
	gSource := (rs - d.Surge[0]) / (rs + d.Surge[0])

	// Trace the wavefronts in time order; dir +1 travels towards the receiving end.
	// Wavefronts entering the same section in the same direction within a
	// nanosecond of each other are merged (their coefficients added), which keeps the
	// count polynomial in time for any number of sections.
	type front struct{ t, coef float64 } // exact start time of the first merged, sum of coefficients
	pending := map[frontKey]front{{0, +1, 0}: {0, 1}}
	h := &frontHeap{{0, +1, 0}}
	push := func(sec, dir int, t, c float64) {
		k := frontKey{sec, dir, int64(math.Round(t / latticeQuantum))}
		f, ok := pending[k]
		if !ok {
			heap.Push(h, k)
			f.t = t
		}
		f.coef += c
		pending[k] = f
	}
	for h.Len() > 0 {
		k := heap.Pop(h).(frontKey)
		f := pending[k]
		delete(pending, k)
		t0, coef := f.t, f.coef
		if t0 >= e.Duration*(1+1e-12) {
			continue
		}
		if math.Abs(coef) < latticeFloor {
			d.Dropped++
			continue
		}
		if len(d.Wavefronts) >= maxW {
			return nil, nil, fmt.Errorf("%w: more than %d wavefronts within %.4g ms; shorten the duration or use bergeron or laplace", ErrMethod, maxW, e.Duration*1e3)
		}
		i := k.sec
		w := Wavefront{Section: i, T0: t0, T1: t0 + d.Travel[i], Coefficient: coef}
		if k.dir > 0 {
			w.X0, w.X1 = d.Junctions[i], d.Junctions[i+1]
		} else {
			w.X0, w.X1 = d.Junctions[i+1], d.Junctions[i]
		}
		d.Wavefronts = append(d.Wavefronts, w)
		c := coef * atten[i]
		switch {
		case k.dir > 0 && i == ns-1: // open end
			push(i, -1, w.T1, c)
		case k.dir > 0:
			z1, z2 := d.Surge[i], d.Surge[i+1]
			push(i, -1, w.T1, c*(z2-z1)/(z1+z2))
			push(i+1, +1, w.T1, c*2*z2/(z1+z2))
		case i == 0: // source
			if gSource != 0 {
				push(0, +1, w.T1, c*gSource)
			}
		default:
			z1, z2 := d.Surge[i], d.Surge[i-1]
			push(i, +1, w.T1, c*(z2-z1)/(z1+z2))
			push(i-1, -1, w.T1, c*2*z2/(z1+z2))
		}
	}
	sort.SliceStable(d.Wavefronts, func(a, b int) bool { return d.Wavefronts[a].T0 < d.Wavefronts[b].T0 })
	v0 := e.TrappedPU
	for k := range d.Wavefronts {
		a := d.Wavefronts[k].Coefficient * launch
		if e.Excitation == Step {
			a *= 1 - v0
		}
		d.Wavefronts[k].Amplitude = a
	}

	dt := e.TimeStep
	if dt == 0 {
		// as Laplace: a hundredth of the whole travel time, and at least 20 steps
		// over the shortest section
		var tau float64
		for _, t := range d.Travel {
			tau += t
		}
		dt = defaultStep(math.Min(tau, 5*minOf(d.Travel)), e.Duration)
	}
	wf := &Waveform{Method: "lattice", Step: dt}
	m := samples(e.Duration, dt)
	wf.Sending = latticeAt(d, atten, 0, e, launch, dt, m)
	wf.Receiving = latticeAt(d, atten, d.Length, e, launch, dt, m)
	wf.Middle = latticeAt(d, atten, d.Length/2, e, launch, dt, m)
	names, _ := junctionNames(n)
	for i, name := range names {
		x := d.Junctions[i+1]
		wf.Junctions = append(wf.Junctions, JunctionWave{Name: name, X: x, V: latticeAt(d, atten, x, e, launch, dt, m)})
	}
	if opt.AttenuationHz > 0 {
		wf.Notes = append(wf.Notes, fmt.Sprintf("lattice diagram with each transit attenuated by the line's alpha at %.4g Hz (distortionless approximation of the losses)", opt.AttenuationHz))
	} else {
		wf.Notes = append(wf.Notes, "lattice diagram of the lossless line: exact for a resistive source, no shunts")
	}
	wf.Notes = append(wf.Notes, fmt.Sprintf("%d wavefronts traced, %d below %.0e of the launched wave dropped", len(d.Wavefronts), d.Dropped, latticeFloor))
	if !finite(wf.Sending, wf.Receiving, wf.Middle) || !junctionsFinite(wf.Junctions) {
		return nil, nil, fmt.Errorf("waves: lattice: non-finite result")
	}
	return wf, d, nil
}

func kindOf(sh freqscan.Shunt) string {
	kind := "reactor"
	if sh.L <= 0 {
		kind = "capacitor"
	}
	if sh.OnLine {
		return "line-connected " + kind
	}
	return "bus-connected " + kind
}

func minOf(v []float64) float64 {
	m := math.Inf(1)
	for _, x := range v {
		m = math.Min(m, x)
	}
	return m
}

// defaultStep is the time step chosen when none is given: a hundredth of the
// shortest travel time, coarsened so a run has at most 200,000 steps, and refined so
// a run shorter than the travel time still has at least minDefaultSteps.
func defaultStep(tau, duration float64) float64 {
	dt := tau / 100
	if duration/dt > 200_000 {
		dt = duration / 200_000
	}
	return math.Min(dt, duration/minDefaultSteps)
}

// minDefaultSteps is the fewest steps a run gets from the chosen time step.
const minDefaultSteps = 100

// latticeAt sums the wavefronts passing the point at distance x (m) into m samples.
func latticeAt(d *LatticeDiagram, atten []float64, x float64, e Energisation, launch, dt float64, m int) []float64 {
	// The section holding x (the first one whose end reaches it).
	sec := len(d.Travel) - 1
	for i := range d.Travel {
		if x <= d.Junctions[i+1]*(1+1e-12) {
			sec = i
			break
		}
	}
	a, b := d.Junctions[sec], d.Junctions[sec+1]
	frac := 0.0
	if b > a {
		frac = math.Min(1, math.Max(0, (x-a)/(b-a)))
	}
	type arrival struct{ t, c float64 }
	var arr []arrival
	for _, w := range d.Wavefronts {
		if w.Section != sec {
			continue
		}
		p := frac // fraction of the section already travelled when passing x
		if w.X1 < w.X0 {
			p = 1 - frac
		}
		t := w.T0 + p*d.Travel[sec]
		if t > e.Duration*(1+1e-9) {
			continue
		}
		arr = append(arr, arrival{t, w.Coefficient * math.Pow(atten[sec], p)})
	}
	sort.Slice(arr, func(i, j int) bool { return arr[i].t < arr[j].t })
	v0 := e.TrappedPU
	out := make([]float64, m)
	// Σ c_k·f(t − t_k) with f(t) = launch·(e(t) − V0): for a sine
	// e(t − t_k) = sin(ωt+φ)cos(ωt_k) − cos(ωt+φ)sin(ωt_k), so running sums suffice.
	var sumC, sumCos, sumSin float64
	j := 0
	phi := e.CloseDeg * math.Pi / 180
	for k := range out {
		t := float64(k) * dt
		for j < len(arr) && arr[j].t <= t+1e-9*dt {
			sumC += arr[j].c
			if e.Excitation == Sine {
				sumCos += arr[j].c * math.Cos(e.Omega*arr[j].t)
				sumSin += arr[j].c * math.Sin(e.Omega*arr[j].t)
			}
			j++
		}
		var v float64
		if e.Excitation == Sine {
			wt := e.Omega*t + phi
			v = launch * (math.Sin(wt)*sumCos - math.Cos(wt)*sumSin - v0*sumC)
		} else {
			v = launch * (1 - v0) * sumC
		}
		out[k] = v0 + v
	}
	return out
}
