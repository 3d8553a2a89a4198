package analysis

import (
	"errors"
	"fmt"
	"math"
	"math/cmplx"
	"sort"
	"strings"

	"github.com/mjibson/go-dsp/fft"
	"github.com/mjibson/go-dsp/window"

	"github.com/telegrapher/telegrapher/cmd/telegrapher/internal/study"
	"github.com/telegrapher/telegrapher/freqscan"
	"github.com/telegrapher/telegrapher/waves"
)

// MethodError says that an energisation method cannot treat the study (the lattice
// diagram with an inductive source, for example): an input error on energise.method.
type MethodError struct {
	File    string
	Method  string // "lattice", "bergeron" or "laplace"
	Problem string // what the method cannot treat
}

func (e *MethodError) Error() string {
	return fmt.Sprintf("%s: energise.method: %s cannot treat this study: %s", e.File, e.Method, e.Problem)
}

// Energisation returns the study's [energise] settings for package waves, and how
// the duration was chosen ("given", or the default's reason, see energiseDuration).
func Energisation(st *study.Study) (waves.Energisation, string) {
	e := waves.Energisation{
		Excitation: waves.Step,
		Omega:      2 * math.Pi * st.Frequency,
		CloseDeg:   st.Energise.CloseDeg,
		TrappedPU:  st.Energise.TrappedPU,
		Duration:   st.Energise.Duration,
		TimeStep:   st.Energise.TimeStep,
	}
	if st.Energise.Waveform == "sine" {
		e.Excitation = waves.Sine
	}
	how := "given"
	if !st.Energise.DurationGiven {
		e.Duration, how = energiseDuration(st, e.Excitation)
	}
	return e, how
}

// Bounds of the default energisation duration.
const (
	// defaultDurationMin: the former fixed default, 20 ms (one cycle at 50 Hz).
	defaultDurationMin = 20e-3
	// defaultRoundTrips: travelling waves get at least five round trips (10 τ)
	// (common practice, no source: the switching surge has its crest within the
	// first few round trips).
	defaultRoundTrips = 5
	// defaultDecayTimes: a natural oscillation is followed for three of its time
	// constants Q/(π f), until it has decayed to e^-3 = 5 % of its amplitude: a
	// later alignment with the power-frequency crest can then add at most 5 % of it.
	defaultDecayTimes = 3
	// defaultDurationCycles caps the default at ten cycles of the system frequency.
	defaultDurationCycles = 10
	// defaultBeatHarmonic: a natural oscillation above this multiple of the system
	// frequency has a crest within π·f0/f1 of every EMF crest, which loses at most
	// 1 − cos(π/20) = 1.2 % of the EMF against perfect alignment; the first crests,
	// before it decays, are then the highest and its beat is not followed.
	defaultBeatHarmonic = 20
)

// energiseDuration chooses the duration of a run whose study gives no duration_ms:
// the longest of 20 ms, five round trips of the line (10 τ), two periods of the
// network's lowest natural oscillation (the first resonance f1 of |Vr/E| with the
// far end open, from a frequency scan: the source inductance against the line
// capacitance and shunts) and, for a sine EMF with f1 below the 20th harmonic, the
// time that oscillation takes to decay to 5 % (3·Q/(π·f1), Q from the resonance's
// -3 dB band), but no longer than one beat period 1/|f1 − n·f0| with the nearest
// harmonic n·f0 (after it the two crests align again as before); at most ten cycles
// of the system frequency. The text says which bound decided.
func energiseDuration(st *study.Study, exc waves.Excitation) (float64, string) {
	f0 := st.Frequency
	tau := TravelTime(st)
	d, why := defaultDurationMin, "at least 20 ms"
	if t := 2 * defaultRoundTrips * tau; t > d {
		d, why = t, fmt.Sprintf("%d round trips of the line, 10 x %.4g ms", defaultRoundTrips, tau*1e3)
	}
	f1, q := lowestResonance(st, tau)
	if f1 > 0 {
		if t := 2 / f1; t > d {
			d, why = t, fmt.Sprintf("two periods of the lowest natural frequency %.4g Hz", f1)
		}
		if exc == waves.Sine && f1 < defaultBeatHarmonic*f0 {
			decay := math.Inf(1)
			if q > 0 {
				decay = defaultDecayTimes * q / (math.Pi * f1)
			}
			n := math.Max(1, math.Round(f1/f0))
			beat := math.Inf(1)
			if f1 != n*f0 {
				beat = 1 / math.Abs(f1-n*f0)
			}
			t, w := decay, fmt.Sprintf("the %.4g Hz natural oscillation (Q %.3g) decayed to 5 %%, 3Q/(π f)", f1, q)
			if q == 0 {
				w = fmt.Sprintf("the %.4g Hz natural oscillation, undamped", f1)
			}
			if beat < decay {
				t, w = beat, fmt.Sprintf("one beat period of the %.4g Hz natural oscillation with the %g Hz harmonic", f1, n*f0)
			}
			if t > d {
				d, why = t, w
			}
		}
	}
	if top := math.Max(defaultDurationCycles/f0, defaultDurationMin); d > top {
		d, why = top, fmt.Sprintf("%s, capped at %d cycles", why, defaultDurationCycles)
	}
	// A given time step bounds the samples.
	if dt := st.Energise.TimeStep; dt > 0 && d/dt > waves.MaxSamples {
		d, why = dt*waves.MaxSamples, fmt.Sprintf("%s, capped at %d samples of the given time step", why, waves.MaxSamples)
	}
	return d, "default: " + why
}

// lowestResonance returns the lowest resonance of |Vr/E| of the energised network
// (far end open) and its Q (0 when unbounded or its band is not defined), on a grid
// of 4000 points from 1 Hz to the larger of 2 kHz and the line's half-wave
// frequency 1/(2τ); 0, 0 when there is none.
func lowestResonance(st *study.Study, tau float64) (f, q float64) {
	for _, p := range energisedPeaks(st, math.Max(2e3, 1/(2*tau)), 4000) {
		if f == 0 || p.F < f {
			f, q = p.F, p.Q
			if p.Unbounded || math.IsInf(p.Q, 0) || math.IsNaN(p.Q) {
				q = 0
			}
		}
	}
	return f, q
}

// LineIsLossy reports whether any section has series resistance or shunt conductance
// at the system frequency.
func LineIsLossy(st *study.Study) bool {
	for _, l := range st.Network.Line {
		z, y := l.At(complex(0, 2*math.Pi*st.Frequency))
		if real(z) > 0 || real(y) > 0 {
			return true
		}
	}
	return false
}

func TravelTime(st *study.Study) float64 {
	var t float64
	for _, l := range st.Network.Line {
		t += l.TravelTime(2 * math.Pi * st.Frequency)
	}
	return t
}

// EnergiseWaveform computes the energisation waveform e of st by method ("lattice",
// "bergeron" or "laplace") and returns it with the lattice diagram (lattice only) and
// the method's limits in words. A method that cannot treat the study is a
// *MethodError; a setting the method refuses is an *InputError naming its
// [energise] key (settingKeys).
func EnergiseWaveform(st *study.Study, method string, e waves.Energisation) (*waves.Waveform, *waves.LatticeDiagram, string, error) {
	net := st.Network.Energising()
	lossy := LineIsLossy(st)
	var (
		w      *waves.Waveform
		d      *waves.LatticeDiagram
		err    error
		limits string
	)
	switch method {
	case "lattice":
		opt := waves.LatticeOptions{}
		limits = "lattice diagram: resistive source, no shunts; exact for a lossless line"
		if lossy {
			opt.AttenuationHz = 1 / (4 * TravelTime(st))
			limits = fmt.Sprintf("lattice diagram: resistive source, no shunts; losses as a distortionless attenuation at the quarter-wave frequency %.4g Hz", opt.AttenuationHz)
		}
		w, d, err = waves.Lattice(net, e, opt)
	case "bergeron":
		w, err = waves.Bergeron(net, e, waves.BergeronOptions{LumpedResistance: lossy})
		limits = "Bergeron: lossless line pieces with constants at the system frequency (no frequency dependence), resistance lumped at ends and middle; trapezoidal lumped elements"
		if len(st.Network.Line) > 1 {
			limits = "Bergeron: lossless line pieces (each section its own surge impedance and travel time, split at mid-line) with constants at the system frequency (no frequency dependence), resistance lumped at the ends of each piece; trapezoidal lumped elements"
		}
	case "laplace":
		w, err = waves.Laplace(net, e, waves.LaplaceOptions{})
		limits = fmt.Sprintf("numerical Laplace transform: linear network, every element at its frequency-dependent value; the window smooths wavefronts over about two time steps and overshoots a jump by at most %.2g %% of it", waves.LaplaceFrontOvershoot*100)
	default:
		return nil, nil, "", inputf(st.File, "energise.method", "must be lattice, bergeron or laplace, got %q", method)
	}
	switch {
	case errors.Is(err, waves.ErrMethod):
		return nil, nil, "", &MethodError{File: st.File, Method: method, Problem: strings.TrimPrefix(err.Error(), waves.ErrMethod.Error()+": ")}
	case err != nil:
		return nil, nil, "", settingInput(st.File, CmdEnergise, err, waves.ErrSettings)
	}
	return w, d, limits, nil
}

// EnergiseResult is the energisation of the open-ended line by one method.
type EnergiseResult struct {
	Method      string             // "lattice", "bergeron" or "laplace"
	Settings    waves.Energisation // as run (duration chosen when not given)
	DurationHow string             // "given", or "default: " and the bound that decided
	Wave        *waves.Waveform    // pu of the peak phase-to-earth EMF
	Diagram     *waves.LatticeDiagram
	Limits      string  // the method's limits in words
	TravelTime  float64 // s, of the whole line at the system frequency
	// Resonances are the gain peaks of |Vr/E| of the energised network (far end
	// open) up to the lesser of 10 kHz and the transient's Nyquist frequency.
	Resonances []freqscan.Peak
	Spectrum   Spectrum // of the receiving-end transient
}

// Spectrum holds the dominant frequencies of a transient.
type Spectrum struct {
	Resolution float64 // Hz, 1 / duration
	Window     string
	Dominant   []Dominant // by frequency
}

// Dominant is one dominant frequency of a transient.
type Dominant struct {
	F           float64 // Hz
	Relative    float64 // amplitude relative to the largest spectral peak
	NearestScan float64 // Hz, the nearest of the scan's resonances (0: none)
}

// Energise computes the energisation of st by method ("" = the study's [energise]
// method, default laplace): the waveforms, their peaks' inputs, the resonances of
// the energised network and the transient's dominant frequencies.
func Energise(st *study.Study, method string) (*EnergiseResult, error) {
	if method == "" {
		method = st.Energise.Method
	}
	if method == "" {
		method = "laplace"
	}
	e, how := Energisation(st)
	w, d, limits, err := EnergiseWaveform(st, method, e)
	if err != nil {
		return nil, err
	}
	r := &EnergiseResult{Method: method, Settings: e, DurationHow: how, Wave: w, Diagram: d, Limits: limits, TravelTime: TravelTime(st)}
	r.Resonances = scanResonances(st, w.Step)
	r.Spectrum = transientSpectrum(w.Receiving, w.Step, r.Resonances)
	return r, nil
}

// scanResonances returns the resonance peaks of |Vr/E| of the energised network on a
// grid from 1 Hz to the lesser of 10 kHz and the transient's Nyquist frequency, by the
// scan's own peak finder (freqscan.Peaks).
func scanResonances(st *study.Study, dt float64) []freqscan.Peak {
	return energisedPeaks(st, math.Min(10e3, 0.5/dt), 6000)
}

// energisedPeaks returns the resonance peaks of |Vr/E| of the energised network (far
// end open) on n frequencies evenly spaced from 1 Hz to top.
func energisedPeaks(st *study.Study, top float64, n int) []freqscan.Peak {
	net := st.Network.Energising()
	freqs := make([]float64, n)
	for i := range freqs {
		freqs[i] = 1 + (top-1)*float64(i)/float64(n-1)
	}
	return freqscan.Peaks(net, freqscan.Scan(nil, net, freqs))
}

// transientSpectrum finds the dominant frequencies of the transient v (step dt): the
// deviation from its mean, Hann-windowed (go-dsp window.Hann), zero-padded to eight
// times its length and transformed (go-dsp fft.FFTReal); the local maxima of the
// magnitude above 10 % of the largest (above 2/duration), refined by a parabola through three bins,
// the four largest by frequency, each with the nearest of the resonances res.
func transientSpectrum(v []float64, dt float64, res []freqscan.Peak) Spectrum {
	sp := Spectrum{Window: "Hann (go-dsp), zero-padded x8"}
	n := len(v)
	if n < 8 {
		return sp
	}
	duration := float64(n-1) * dt
	sp.Resolution = 1 / duration
	// Long waveforms: decimate to at most 65,536 samples (the spectrum of interest
	// lies far below the Nyquist frequency of the decimated record).
	step := 1
	for n/step > 65536 {
		step *= 2
	}
	m := n / step
	x := make([]float64, m)
	var mean float64
	for i := range x {
		x[i] = v[i*step]
		mean += x[i]
	}
	mean /= float64(m)
	for i := range x {
		x[i] -= mean
	}
	window.Apply(x, window.Hann)
	size := 1
	for size < 8*m {
		size *= 2
	}
	padded := make([]float64, size)
	copy(padded, x)
	spec := fft.FFTReal(padded)
	mag := make([]float64, size/2)
	for i := range mag {
		mag[i] = cmplx.Abs(spec[i])
	}
	df := 1 / (float64(size) * dt * float64(step))
	// Below two resolutions (2/duration) a component is not told from the mean and
	// the window: those are left out.
	lowest := max(int(math.Ceil(2*sp.Resolution/df)), 1)
	type cand struct{ f, a float64 }
	var cs []cand
	var top float64
	for i := lowest; i < len(mag)-1; i++ {
		if mag[i] > mag[i-1] && mag[i] >= mag[i+1] {
			a, b, c := mag[i-1], mag[i], mag[i+1]
			off := 0.0
			if den := a - 2*b + c; den != 0 {
				off = 0.5 * (a - c) / den
			}
			cs = append(cs, cand{(float64(i) + off) * df, b})
			top = math.Max(top, b)
		}
	}
	if top == 0 {
		return sp
	}
	kept := cs[:0]
	for _, c := range cs {
		if c.a >= 0.1*top {
			kept = append(kept, cand{c.f, c.a / top})
		}
	}
	cs = kept
	sort.Slice(cs, func(i, j int) bool { return cs[i].a > cs[j].a })
	if len(cs) > 4 {
		cs = cs[:4]
	}
	sort.Slice(cs, func(i, j int) bool { return cs[i].f < cs[j].f })
	for _, c := range cs {
		d := Dominant{F: c.f, Relative: c.a}
		best := math.Inf(1)
		for _, r := range res {
			if dd := math.Abs(r.F - c.f); dd < best {
				best, d.NearestScan = dd, r.F
			}
		}
		sp.Dominant = append(sp.Dominant, d)
	}
	return sp
}

// Comparison is the energisation by every method the study allows on one time step.
type Comparison struct {
	Methods []string // in the order lattice, bergeron, laplace
	Skipped []string // "method: why" for the methods that cannot treat the study
	Step    float64  // s, Bergeron's (or the study's time_step_us)
	Traces  map[string][]float64
	Peaks   map[string]float64 // signed receiving-end peaks, pu
	Pairs   []Pair
	MaxDiff float64 // pu, the largest of the pairs'
	// FrequencyDependent is set when the line's constants vary with frequency
	// (LineFrequencyDependent), a cause of the differences.
	FrequencyDependent bool
}

// Pair is the difference of the receiving-end voltages of two methods: the largest
// and rms over the run, the largest near the wavefront arrivals, the rms away from
// them (over the run and its first and second half). Voltages in pu, times in s.
type Pair struct {
	A, B                               string
	MaxDiff, T, RMSDiff                float64
	FrontWindow                        float64 // ± this about each arrival counts as near a wavefront
	FrontMaxDiff, AwayMaxDiff, AwayT   float64
	AwayRMS, AwayRMSEarly, AwayRMSLate float64
	AtWavefronts                       bool // the difference concentrates at the wavefronts
}

// CompareEnergise runs every method the study allows on the Bergeron time step (or
// the study's time_step_us) and measures the receiving-end differences.
func CompareEnergise(st *study.Study) (*Comparison, error) {
	e, _ := Energisation(st)
	cmp := &Comparison{Peaks: map[string]float64{}, Traces: map[string][]float64{}}
	ber, _, _, err := EnergiseWaveform(st, "bergeron", e)
	if err != nil {
		return nil, err
	}
	e.TimeStep = ber.Step
	cmp.Step = ber.Step
	for _, m := range []string{"lattice", "bergeron", "laplace"} {
		w := ber
		if m != "bergeron" {
			var err error
			w, _, _, err = EnergiseWaveform(st, m, e)
			var me *MethodError
			if errors.As(err, &me) {
				cmp.Skipped = append(cmp.Skipped, m+": "+err.Error())
				continue
			}
			if err != nil {
				return nil, err
			}
		}
		cmp.Methods = append(cmp.Methods, m)
		cmp.Traces[m] = w.Receiving
		cmp.Peaks[m], _ = waves.Peak(w.Receiving)
	}
	tau := TravelTime(st)
	cmp.FrequencyDependent = LineFrequencyDependent(st)
	for i, a := range cmp.Methods {
		for _, b := range cmp.Methods[i+1:] {
			p := comparePair(a, b, cmp.Traces[a], cmp.Traces[b], ber.Step, tau)
			cmp.Pairs = append(cmp.Pairs, p)
			cmp.MaxDiff = math.Max(cmp.MaxDiff, p.MaxDiff)
		}
	}
	return cmp, nil
}

// AwayFromFrontsPU: an rms difference away from the wavefronts below this is
// agreement to screening precision (common practice, no source: 0.01 pu is below
// the precision a switching overvoltage is read to).
const AwayFromFrontsPU = 0.01

// comparePair measures the difference of two receiving-end waveforms (step dt):
// near the arrivals of the wavefront at the open end, the odd multiples of the
// travel time tau (within ±max(10·dt, tau/20), where the methods shape the front
// their own way), and away from them.
func comparePair(a, b string, va, vb []float64, dt, tau float64) Pair {
	p := Pair{A: a, B: b}
	m := min(len(va), len(vb))
	w := math.Max(10*dt, tau/20)
	p.FrontWindow = w
	var sum, away, early, late float64
	var nAway, nEarly, nLate int
	for k := range m {
		t := float64(k) * dt
		d := math.Abs(va[k] - vb[k])
		sum += d * d
		if d > p.MaxDiff {
			p.MaxDiff, p.T = d, t
		}
		// nearest odd multiple of tau
		j := 2*math.Floor(t/(2*tau)) + 1
		if math.Abs(t-j*tau) < w || math.Abs(t-(j-2)*tau) < w || math.Abs(t-(j+2)*tau) < w {
			p.FrontMaxDiff = math.Max(p.FrontMaxDiff, d)
			continue
		}
		away += d * d
		nAway++
		if d > p.AwayMaxDiff {
			p.AwayMaxDiff, p.AwayT = d, t
		}
		if k < m/2 {
			early += d * d
			nEarly++
		} else {
			late += d * d
			nLate++
		}
	}
	rms := func(s float64, n int) float64 {
		if n == 0 {
			return 0
		}
		return math.Sqrt(s / float64(n))
	}
	p.RMSDiff = rms(sum, m)
	p.AwayRMS, p.AwayRMSEarly, p.AwayRMSLate = rms(away, nAway), rms(early, nEarly), rms(late, nLate)
	p.AtWavefronts = p.AwayRMS < AwayFromFrontsPU
	return p
}

// LineFrequencyDependent reports whether any section's series resistance or
// inductance at ten times the system frequency differs from its value at the system
// frequency by more than 1 % (a line from geometry: skin effect and earth return).
func LineFrequencyDependent(st *study.Study) bool {
	w := 2 * math.Pi * st.Frequency
	for _, l := range st.Network.Line {
		z1, _ := l.At(complex(0, w))
		z10, _ := l.At(complex(0, 10*w))
		r1, r10 := real(z1), real(z10)
		l1, l10 := imag(z1)/w, imag(z10)/(10*w)
		if math.Abs(r10-r1) > 0.01*math.Abs(r1) || math.Abs(l10-l1) > 0.01*math.Abs(l1) {
			return true
		}
	}
	return false
}
