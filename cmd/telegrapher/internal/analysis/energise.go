package analysis

import (
	"errors"
	"fmt"
	"math"
	"strings"

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
	net := st.Network.Energising()
	top := math.Max(2e3, 1/(2*tau))
	const n = 4000
	freqs := make([]float64, n)
	for i := range freqs {
		freqs[i] = 1 + (top-1)*float64(i)/(n-1)
	}
	pts := freqscan.Scan(nil, net, freqs)
	for _, p := range freqscan.Peaks(net, pts) {
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
