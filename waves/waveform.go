package waves

import (
	"errors"
	"fmt"
	"math"

	"github.com/telegrapher/telegrapher/freqscan"
)

// Excitation names the source EMF applied at the closing instant t = 0.
type Excitation int

const (
	// Step is a 1 pu EMF step at t = 0 (the source at rest before).
	Step Excitation = iota
	// Sine is e(t) = sin(ωt + CloseDeg), the source in its steady state before
	// closing.
	Sine
)

func (e Excitation) String() string {
	if e == Sine {
		return "sine"
	}
	return "step"
}

// MaxSamples is the largest number of time steps a transient may take
// (duration / time step).
const MaxSamples = 10_000_000

// Energisation describes the closing of the breaker at the sending end onto the
// open-ended line.
type Energisation struct {
	Excitation Excitation
	Omega      float64 // system angular frequency, rad/s (> 0; used by Sine and for line constants)
	CloseDeg   float64 // Sine: EMF phase angle at t = 0, degrees
	TrappedPU  float64 // line voltage at closing, pu (with line-connected reactors: at zero reactor current)
	Duration   float64 // s, > 0
	TimeStep   float64 // s; 0 = chosen by the method
}

// emf returns the source EMF at t >= 0 in pu.
func (e Energisation) emf(t float64) float64 {
	if e.Excitation == Sine {
		return math.Sin(e.Omega*t + e.CloseDeg*math.Pi/180)
	}
	return 1
}

// ErrSettings is wrapped by every error about the energisation settings, so a caller
// can tell them from errors about the network.
var ErrSettings = errors.New("energisation settings")

// ErrMethod is wrapped by every error that says a method cannot treat the network
// (for example the lattice diagram with an inductive source).
var ErrMethod = errors.New("method cannot treat this network")

// SettingError is an error about one setting of a simulation that the user's data can
// cause, in the style of os.PathError: Setting names the field of the settings
// (Energisation or SwitchingSettings, e.g. "TimeStep"), or of the circuit, that the
// problem concerns, and Err is the problem (it wraps ErrSettings or ErrSwitching).
// Callers read it with errors.As to name the input the setting came from.
type SettingError struct {
	Setting string
	Err     error
}

func (e *SettingError) Error() string { return e.Err.Error() }
func (e *SettingError) Unwrap() error { return e.Err }

// settingErr returns a *SettingError about setting wrapping sentinel.
func settingErr(setting string, sentinel error, format string, a ...any) error {
	return &SettingError{Setting: setting, Err: fmt.Errorf("%w: %s", sentinel, fmt.Sprintf(format, a...))}
}

func (e Energisation) check() error {
	switch {
	case !(e.Duration > 0) || math.IsInf(e.Duration, 0):
		return settingErr("Duration", ErrSettings, "duration must be > 0 and finite, got %g s", e.Duration)
	case !(e.Omega > 0) || math.IsInf(e.Omega, 0):
		return settingErr("Omega", ErrSettings, "angular frequency must be > 0, got %g rad/s", e.Omega)
	case e.TimeStep < 0 || math.IsNaN(e.TimeStep) || math.IsInf(e.TimeStep, 0):
		return settingErr("TimeStep", ErrSettings, "time step must be >= 0, got %g s", e.TimeStep)
	case math.IsNaN(e.TrappedPU) || math.IsInf(e.TrappedPU, 0) || math.Abs(e.TrappedPU) > 10:
		return settingErr("TrappedPU", ErrSettings, "trapped charge must be within ±10 pu, got %g", e.TrappedPU)
	case math.IsNaN(e.CloseDeg) || math.IsInf(e.CloseDeg, 0):
		return settingErr("CloseDeg", ErrSettings, "closing angle must be finite, got %g", e.CloseDeg)
	case e.Excitation != Step && e.Excitation != Sine:
		return settingErr("Excitation", ErrSettings, "unknown excitation %d", int(e.Excitation))
	}
	if e.TimeStep > e.Duration {
		return settingErr("TimeStep", ErrSettings, "time step %g s is longer than the duration %g s (a waveform needs two samples at least)", e.TimeStep, e.Duration)
	}
	if e.TimeStep > 0 && e.Duration/e.TimeStep > MaxSamples {
		return settingErr("TimeStep", ErrSettings, "duration / time step = %.4g exceeds %d samples", e.Duration/e.TimeStep, MaxSamples)
	}
	return nil
}

// samples returns the number of samples (including t = 0) for a step dt.
func samples(duration, dt float64) int {
	return int(math.Floor(duration/dt+1e-9)) + 1
}

// Waveform is a transient sampled evenly from t = 0 with step Step (s). Voltages are
// in pu of the peak phase-to-earth EMF. Middle is the voltage at mid-line (nil where
// the method does not give it).
type Waveform struct {
	Method    string
	Step      float64   // s
	Sending   []float64 // sending-end (line side of the breaker) voltage, pu
	Receiving []float64 // open receiving-end voltage, pu
	Middle    []float64 // mid-line voltage, pu; may be nil
	// Junctions holds the voltage at each junction of sections of a sectioned line,
	// from the sending end (len(line) − 1 of them); nil for a single section.
	Junctions []JunctionWave
	// Overshoot bounds, in pu, how far the method's smoothing of wavefronts may carry
	// a peak beyond the exact waveform of its model (the numerical Laplace window);
	// 0 where the method adds none. A verdict against a limit allows for it.
	Overshoot float64
	// Notes states the method's assumptions and its error estimate, for the reader.
	Notes []string
}

// JunctionWave is the voltage at the junction of two sections in cascade.
type JunctionWave struct {
	Name string    // "A / B" from the names of the sections on either side (or their numbers)
	X    float64   // m from the sending end
	V    []float64 // pu, sampled like the waveform's ends
}

// junctionNames returns the label and position (m) of each junction of the line.
func junctionNames(n freqscan.Network) (names []string, xs []float64) {
	label := func(i int) string {
		if n.Line[i].Name != "" {
			return n.Line[i].Name
		}
		return fmt.Sprintf("section %d", i+1)
	}
	x := 0.0
	for i := 0; i+1 < len(n.Line); i++ {
		x += n.Line[i].Length
		names = append(names, label(i)+" / "+label(i+1))
		xs = append(xs, x)
	}
	return names, xs
}

// junctionsFinite reports whether every junction sample is finite.
func junctionsFinite(js []JunctionWave) bool {
	for _, j := range js {
		if !finite(j.V) {
			return false
		}
	}
	return true
}

// Time returns the time of sample k in seconds.
func (w *Waveform) Time(k int) float64 { return float64(k) * w.Step }

// Peak returns the signed value of largest magnitude of v and its sample index
// (0, -1 for an empty slice).
func Peak(v []float64) (value float64, index int) {
	index = -1
	for k, x := range v {
		if index < 0 || math.Abs(x) > math.Abs(value) {
			value, index = x, k
		}
	}
	return value, index
}

// finite reports whether every sample is finite.
func finite(vs ...[]float64) bool {
	for _, v := range vs {
		for _, x := range v {
			if math.IsNaN(x) || math.IsInf(x, 0) {
				return false
			}
		}
	}
	return true
}
