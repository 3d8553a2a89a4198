package study

import (
	"github.com/telegrapher/telegrapher/freqscan"
	"github.com/telegrapher/telegrapher/propagation"
)

// Study is a validated study in SI units (V, Hz, ohm, H, F, S, m, s, W, var, VA).
type Study struct {
	File  string // the path as given, for messages
	Title string

	Frequency float64 // system frequency, Hz
	Voltage   float64 // nominal line-to-line rms voltage, V
	Us        float64 // highest voltage for equipment (IEC 60071-1), V; = Voltage when absent

	Line propagation.Cascade // positive sequence, from the sending end
	Zero propagation.Cascade // zero sequence; nil without zero-sequence data

	Network     freqscan.Network  // positive sequence, every element in service (far system too, unless scan.far_system = false)
	ZeroNetwork *freqscan.Network // zero sequence; nil without zero-sequence data

	Source    SourceSpec
	Receiving ReceivingSpec
	Scan      ScanSettings
	Energise  EnergiseSettings
	Switching SwitchingSettings
	Loading   LoadingSettings

	// Understood lists what the loader read, in file order, for `check`.
	Understood []Entry
	// Warnings are values far from what such lines have, each "key.path: problem":
	// the study runs, and the CLI prints them on standard error, in `check` and in
	// the report's inputs.
	Warnings []string

	switchingOpts SwitchingOptions // [switching] keys beyond the contract's
	remedy        RemedySpec       // [targets] and [levers]
}

// SourceSpec is the sending-end source as given.
type SourceSpec struct {
	Ideal          bool    // no [source] table: zero impedance
	ShortCircuitVA float64 // three-phase short-circuit level, VA; 0 when given as R and L
	XOverR         float64 // X/R at Frequency; 0 when given as R and L
	R, L           float64 // ohm, H (derived when given as short-circuit level)
	X0OverX1       float64 // zero- over positive-sequence source impedance; default 1
	HasX0OverX1    bool
}

// ReceivingSpec is the receiving-end system as given.
type ReceivingSpec struct {
	LoadW, LoadVar float64 // constant-impedance load at Voltage (three-phase W and var)
	ShortCircuitVA float64 // receiving-end system short-circuit level, VA; 0 = not given
	XOverR         float64 // its X/R; 0 = not given
	X0OverX1       float64 // its zero- over positive-sequence impedance; default 1
}

// ScanSettings is [scan] in SI units.
type ScanSettings struct {
	FMin, FMax float64 // Hz
	Points     int
	Log        bool // logarithmic grid (grid = "log"); default linear

	WatchHarmonics []int           // default odd 3..25
	GainLimit      float64         // default 2.0
	WatchBand      float64         // fraction, default 0.10 (+-10 %)
	BackgroundPct  map[int]float64 // background harmonic voltage at the sending bus, % of fundamental
	PlanningPct    map[int]float64 // planning levels, %; default IEC TR 61000-3-6 HV-EHV indicative

	ShortCircuitRange [2]float64 // VA; zero = no source-strength map
	ShortCircuitSteps int

	// FarSystem: the receiving-end system ([receiving] short_circuit_mva) is in the
	// scanned networks (default true); false leaves it out (Network.Far cleared).
	FarSystem bool
}

// EnergiseSettings is [energise] in SI units.
type EnergiseSettings struct {
	Waveform  string  // "step" or "sine"
	CloseDeg  float64 // EMF phase angle at t = 0 (sine)
	TrappedPU float64 // line voltage at closing, pu
	Duration  float64 // s; without duration_ms 20 ms, extended by the energise command (see DurationGiven)
	TimeStep  float64 // s; 0 = chosen by the method
	Method    string  // "lattice", "bergeron" or "laplace"

	// DurationGiven: duration_ms was given; otherwise the command chooses the
	// duration from the network (at least Duration).
	DurationGiven bool
}

// SwitchingSettings is [switching] in SI units.
type SwitchingSettings struct {
	Shots        int
	Seed         int64
	HasCloseDeg  bool
	CloseDeg     float64
	PoleSigma    float64    // s
	TrappedPU    [3]float64 // phases a, b, c
	Preinsertion float64    // ohm; 0 = none
	InsertTime   float64    // s
	SIWL         float64    // peak V; 0 = none
	Ks, Kcd      float64
	Duration     float64 // s
	TimeStep     float64 // s; 0 = chosen by the method
}

// Entry is one understood setting, for `check`.
type Entry struct {
	Key   string // key path, e.g. "line.l_mh_per_km"
	Value string // as understood, with unit
	How   string // "given", "default", or how it was derived
}
