package main

// The constants sweep (`constants --sweep [--plot F]`) and the sequence constants of a
// geometry-derived line (`constants --json` adds `sequence`), hooked into constants.go.
//
//   computeSweep(st, freqs) (sweepResult, error): r, l, c, g, α, velocity and |Zc| of
//     every section, positive and zero sequence (zero where the study has it), at each
//     frequency (default 1 Hz to 1 MHz, logarithmic).
//   printSweep(w, res): the table; sweepPlotData(st, res): the input of
//     report.SweepPlots / report.RenderSweep (three by two panels, log frequency).
//   lineSequence(l, zero, f) *sequenceOut: `sequence: {positive, zero}` for a line
//     section whose constants come from a tower geometry; nil otherwise.
//   runSweep(st, stdout, plotPath, asJSON) is the whole `--sweep` for constants.go.

import (
	"fmt"
	"io"
	"math"
	"math/cmplx"

	"github.com/telegrapher/telegrapher/cmd/telegrapher/internal/analysis"
	"github.com/telegrapher/telegrapher/cmd/telegrapher/internal/report"
	"github.com/telegrapher/telegrapher/cmd/telegrapher/internal/study"
	"github.com/telegrapher/telegrapher/propagation"
)

// Sweep defaults: 1 Hz to 1 MHz, five points per decade in the table and forty in the
// plot.
const (
	sweepFMin        = 1.0
	sweepFMax        = 1e6
	sweepTablePoints = 31
	sweepPlotPoints  = 241
)

// perKm is one sequence's constants at one frequency, per km.
type perKm struct {
	R        float64    `json:"r_ohm_per_km"`
	L        float64    `json:"l_mh_per_km"`
	C        float64    `json:"c_nf_per_km"`
	G        float64    `json:"g_us_per_km"`
	Zc       complex128 `json:"zc_ohm"`
	Gamma    complex128 `json:"gamma_per_km"`
	Alpha    float64    `json:"alpha_np_per_km"`
	Velocity float64    `json:"velocity_km_per_s"`
}

// sequenceOut is `sequence: {positive, zero}` of the constants JSON.
type sequenceOut struct {
	Positive perKm `json:"positive"`
	Zero     perKm `json:"zero"`
}

// constantsPerKm evaluates c at f (Hz) on the jω axis (analysis.ConstantsAt), per km.
func constantsPerKm(c propagation.Constants, f float64) perKm {
	return perKmOf(analysis.ConstantsAt(c, f))
}

// perKmOf converts per-metre constants to the display units.
func perKmOf(p analysis.PerLength) perKm {
	return perKm{
		R: p.R * 1e3, L: p.L * 1e6, C: p.C * 1e12, G: p.G * 1e9,
		Zc: p.Zc, Gamma: p.Gamma * 1e3, Alpha: real(p.Gamma) * 1e3, Velocity: p.Velocity / 1e3,
	}
}

// lineSequence returns the positive- and zero-sequence constants at f (Hz) of a line
// section given by a tower geometry, or nil when its constants are given directly.
func lineSequence(l propagation.Line, f float64) *sequenceOut {
	sc, ok := l.Constants.(propagation.SequenceConstants)
	if !ok || sc.Geometry == nil {
		return nil
	}
	g := sc.Geometry
	return &sequenceOut{Positive: constantsPerKm(g.Positive(), f), Zero: constantsPerKm(g.Zero(), f)}
}

// sweepSequence is one sequence over the sweep.
type sweepSequence struct {
	Name   string  `json:"name"`
	Points []perKm `json:"points"`
}

// sweepSection is one line section over the sweep.
type sweepSection struct {
	Name      string          `json:"name,omitempty"`
	Geometry  bool            `json:"from_geometry"`
	Sequences []sweepSequence `json:"sequences"`
}

// sweepResult is the whole sweep.
type sweepResult struct {
	FreqHz   []float64      `json:"f_hz"`
	Sections []sweepSection `json:"sections"`
}

// sweepFrequencies returns n frequencies from fmin to fmax (Hz), logarithmically spaced.
func sweepFrequencies(fmin, fmax float64, n int) []float64 {
	fs := make([]float64, n)
	for i := range fs {
		fs[i] = fmin * math.Pow(fmax/fmin, float64(i)/float64(n-1))
	}
	return fs
}

// computeSweep evaluates every section's positive- and (where given) zero-sequence
// constants at freqs (Hz).
func computeSweep(st *study.Study, freqs []float64) (sweepResult, error) {
	secs, err := analysis.Sweep(st, freqs)
	if err != nil {
		return sweepResult{}, err
	}
	res := sweepResult{FreqHz: freqs}
	for _, a := range secs {
		sec := sweepSection{Name: a.Name, Geometry: a.Geometry}
		for _, sq := range a.Sequences {
			out := sweepSequence{Name: sq.Name, Points: make([]perKm, len(sq.Points))}
			for k, p := range sq.Points {
				out.Points[k] = perKmOf(p)
			}
			sec.Sequences = append(sec.Sequences, out)
		}
		res.Sections = append(res.Sections, sec)
	}
	return res, nil
}

// printSweep writes the sweep as a table, one block per section and sequence.
func printSweep(w io.Writer, res sweepResult) {
	for _, sec := range res.Sections {
		for _, sq := range sec.Sequences {
			head := sq.Name + " sequence"
			if sec.Name != "" {
				head = sec.Name + ", " + head
			}
			if !sec.Geometry {
				head += " (constants given directly: r, l, c do not vary)"
			}
			fmt.Fprintf(w, "\n%s\n", head)
			fmt.Fprintf(w, "%12s %12s %10s %10s %12s %12s %10s\n", "f (Hz)", "r (ohm/km)", "l (mH/km)", "c (nF/km)", "α (Np/km)", "v (km/s)", "|Zc| (ohm)")
			for k, p := range sq.Points {
				fmt.Fprintf(w, "%12.4g %12.5g %10.5g %10.5g %12.4g %12.6g %10.4g\n",
					res.FreqHz[k], p.R, p.L, p.C, p.Alpha, p.Velocity, cmplx.Abs(p.Zc))
			}
		}
	}
}

// sweepPlotData turns the first section of a sweep into the plot input.
func sweepPlotData(st *study.Study, res sweepResult) report.SweepData {
	d := report.SweepData{FreqHz: res.FreqHz, SystemHz: st.Frequency}
	title := "Line constants against frequency"
	if st.Title != "" {
		title = st.Title + ": line constants against frequency"
	}
	if len(res.Sections) > 0 {
		sec := res.Sections[0]
		if sec.Name != "" && len(res.Sections) > 1 {
			title += " (section " + sec.Name + ")"
		}
		for _, sq := range sec.Sequences {
			s := report.SweepSequence{Name: sq.Name}
			for _, p := range sq.Points {
				s.ROhmPerKm = append(s.ROhmPerKm, p.R)
				s.LMHPerKm = append(s.LMHPerKm, p.L)
				s.CNFPerKm = append(s.CNFPerKm, p.C)
				s.AlphaNpPerKm = append(s.AlphaNpPerKm, p.Alpha)
				s.VelocityKmPerS = append(s.VelocityKmPerS, p.Velocity)
				s.ZcOhm = append(s.ZcOhm, cmplx.Abs(p.Zc))
			}
			d.Sequences = append(d.Sequences, s)
		}
	}
	d.Title = title
	return d
}

// runSweep is `constants --sweep`: with asJSON it returns the sweep for the JSON
// document (the caller writes it) and prints nothing; otherwise it prints the table.
// With a plot path it also writes the plot (PNG or SVG by extension).
func runSweep(st *study.Study, stdout io.Writer, plotPath string, asJSON bool) (*sweepResult, error) {
	res, err := computeSweep(st, sweepFrequencies(sweepFMin, sweepFMax, sweepTablePoints))
	if err != nil {
		return nil, err
	}
	if plotPath != "" {
		format, err := report.PlotFormat(plotPath, "plot")
		if err != nil {
			return nil, usagef("%v", err)
		}
		fine, err := computeSweep(st, sweepFrequencies(sweepFMin, sweepFMax, sweepPlotPoints))
		if err != nil {
			return nil, err
		}
		b, err := report.RenderSweep(sweepPlotData(st, fine), format)
		if err != nil {
			return nil, err
		}
		if err := report.WriteFileAtomic(plotPath, b); err != nil {
			return nil, err
		}
	}
	if !asJSON {
		printSweep(stdout, res)
	}
	return &res, nil
}
