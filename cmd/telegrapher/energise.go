package main

// The energise command: the energisation transient of the open-ended line, all poles
// closed together (positive-sequence equivalent).
//
//	computeEnergise(st, method) (energiseResult, error)  analysis.Energise in display
//	                            units: the waveforms by one method
//	                            (lattice, bergeron or laplace; "" = the study's), the
//	                            peaks, the method's notes and limits, the dominant
//	                            frequencies of the transient beside the scan's
//	                            resonances of the same network, and the lattice
//	                            diagram when the method is lattice
//	compareEnergise(st)         analysis.CompareEnergise: every method the study
//	                            allows on one time step, and their largest differences,
//	                            with their causes in words
//	energiseTable(res)          the waveforms as a report.Table (CSV)
//	energisePlotData(res, ...)  the input of report.EnergisePlot; report.LatticePlot
//	                            draws res.diagram
//
// A method that cannot treat the study (the lattice diagram with an inductive source
// or a shunt) is an *analysis.MethodError naming energise.method (exit 2).

import (
	"context"
	"errors"
	"flag"
	"fmt"
	"io"
	"math"
	"strings"

	"gonum.org/v1/plot"
	"gonum.org/v1/plot/vg"

	"github.com/telegrapher/telegrapher/cmd/telegrapher/internal/analysis"
	"github.com/telegrapher/telegrapher/cmd/telegrapher/internal/report"
	"github.com/telegrapher/telegrapher/cmd/telegrapher/internal/study"
	"github.com/telegrapher/telegrapher/freqscan"
	"github.com/telegrapher/telegrapher/waves"
)

var energiseCommand = func() *command {
	return &command{
		name:  "energise",
		args:  "STUDY [--method lattice|bergeron|laplace] [--compare] [--json] [--csv F] [--plot F] [--diagram F]",
		short: "energisation transient of the open-ended line (lattice, Bergeron, numerical Laplace)",
		long: `Closes the breaker at the sending end onto the line with its far end open, all poles
together (positive-sequence equivalent): the receiving load and receiving bus-connected
shunts are off, line-connected reactors stay on. The EMF is a 1 pu step at t = 0 or
sin(wt + close_deg) ([energise] waveform), with the line at trapped_pu at closing.
Voltages are in pu of the peak phase-to-earth EMF, voltage_kv * sqrt(2) / sqrt(3).

Methods (--method over [energise] method, default laplace):
  lattice   Bewley lattice diagram: resistive source only, no shunts; lossless, or each
            transit attenuated by the line's alpha at the quarter-wave frequency
  bergeron  method of characteristics, lumped elements by the trapezoidal rule; line
            resistance lumped R/4, R/2, R/4 at ends and middle
  laplace   numerical Laplace transform of the whole frequency-domain network (exact
            line model, frequency-dependent constants included)

On a line in sections ([[line.sections]]) every method also gives the voltage at each
junction of sections (JSON "junctions", one CSV column per junction, a plot trace
each), where the peak may occur.

The summary gives the peak at each end and when, the method's limits, and the dominant
frequencies of the transient (Hann window and FFT of the receiving-end voltage) beside
the resonances of the same network found by a frequency scan. Results are unprotected
overvoltages (no surge arresters).`,
		flags: func(fs *flag.FlagSet, stdout, stderr io.Writer) func(context.Context, []string) error {
			method := fs.String("method", "", "lattice, bergeron or laplace (default: the study's [energise] method)")
			compare := fs.Bool("compare", false, "run every method the study allows and print the largest difference")
			asJSON := fs.Bool("json", false, "write the result as one JSON document")
			csvPath := fs.String("csv", "", "write the waveforms to this CSV file")
			plotPath := fs.String("plot", "", "write the waveforms plot (.png or .svg)")
			diagramPath := fs.String("diagram", "", "write the lattice diagram (.png or .svg)")
			return func(ctx context.Context, args []string) error {
				if *method != "" && !validMethod(*method) {
					return usagef("telegrapher energise: --method %s: must be lattice, bergeron or laplace", *method)
				}
				st, err := studyArg("energise", args, stderr, [2]string{"plot", *plotPath}, [2]string{"diagram", *diagramPath})
				if err != nil {
					return err
				}
				res, err := computeEnergise(st, *method)
				if err != nil {
					return err
				}
				var cmp *energiseComparison
				if *compare {
					if cmp, err = compareEnergise(st); err != nil {
						return err
					}
					res.Compare = cmp
				}
				if *diagramPath != "" {
					d, note, err := latticeDiagram(st, res)
					if err != nil {
						return err
					}
					if d == nil {
						return usagef("%s: --diagram %s: %s", st.File, *diagramPath, note)
					}
					title := "Lattice diagram: " + studyTitle(st)
					if note != "" {
						res.Notes = append(res.Notes, "--diagram: "+note)
						title = "Lattice diagram of the line alone (ideal source): " + studyTitle(st)
					}
					p, err := report.LatticePlot(report.LatticePlotData{
						Title:    title,
						Diagram:  d,
						Sections: sectionNames(st),
						Sine:     st.Energise.Waveform == "sine",
					})
					if err != nil {
						return err
					}
					if err := savePlotAs(p, 9*vg.Inch, 7*vg.Inch, *diagramPath, "diagram"); err != nil {
						return err
					}
				}
				if *plotPath != "" {
					p, err := report.EnergisePlot(energisePlotData(st, res))
					if err != nil {
						return err
					}
					if err := savePlotAs(p, 9*vg.Inch, 5.5*vg.Inch, *plotPath, "plot"); err != nil {
						return err
					}
				}
				if *csvPath != "" {
					tbl, err := energiseTable(res)
					if err != nil {
						return err
					}
					if err := report.WriteFileAtomic(*csvPath, tbl.CSV()); err != nil {
						return fmt.Errorf("--csv %s: %v", *csvPath, err)
					}
				}
				if *asJSON {
					return writeJSON(stdout, res)
				}
				printEnergise(stdout, st, res)
				return nil
			}
		},
	}
}()

// lineAloneNote says what a lattice diagram of the line alone shows.
const lineAloneNote = "the lattice method treats only a resistive source without shunts, so the lattice diagram shows the line alone, energised from an ideal source: its travel times and reflections, not the study's source and shunts"

// latticeDiagram returns the lattice diagram of the energisation: res's own when it
// was computed by the lattice method, else the study's by the lattice method, else,
// when the lattice method cannot treat the study's source or shunts, the line alone
// from an ideal source with a note saying so. When even the line alone cannot be
// drawn, d is nil and note says why, in terms of the diagram (no advice to use
// another method: a diagram was asked for).
func latticeDiagram(st *study.Study, res energiseResult) (d *waves.LatticeDiagram, note string, err error) {
	if res.diagram != nil {
		return res.diagram, "", nil
	}
	lat, err := computeEnergise(st, "lattice")
	if err == nil {
		return lat.diagram, "", nil
	}
	if !cannotRun(err) {
		return nil, "", err
	}
	alone := *st
	alone.Network.Source = freqscan.Source{}
	alone.Network.Shunts = nil
	lat, err = computeEnergise(&alone, "lattice")
	switch {
	case err == nil:
		return lat.diagram, lineAloneNote, nil
	case cannotRun(err):
		msg := err.Error()
		var me *analysis.MethodError
		if errors.As(err, &me) {
			msg = me.Problem
		}
		msg = strings.NewReplacer("; shorten the duration or use bergeron or laplace", "; shorten energise.duration_ms",
			" (use bergeron or laplace)", "").Replace(msg)
		return nil, "lattice diagram not drawn: " + msg, nil
	}
	return nil, "", err
}

func validMethod(m string) bool { return m == "lattice" || m == "bergeron" || m == "laplace" }

// savePlotAs renders p by the extension of path and writes it atomically, naming
// flagName in errors.
func savePlotAs(p *plot.Plot, w, h vg.Length, path, flagName string) error {
	format, err := report.PlotFormat(path, flagName)
	if err != nil {
		return usagef("%v", err)
	}
	b, err := report.RenderPlot(p, w, h, format)
	if err != nil {
		return err
	}
	if err := report.WriteFileAtomic(path, b); err != nil {
		return fmt.Errorf("--%s %s: %v", flagName, path, err)
	}
	return nil
}

// energiseResult is the energise command's result; the JSON keys follow the contract
// (method, peak_pu, t_peak_ms, peak_sending_pu, t_ms, v_receiving_pu, v_sending_pu),
// the rest are extras.
type energiseResult struct {
	Method         string  `json:"method"`
	PeakPU         float64 `json:"peak_pu"` // signed receiving-end extreme
	TPeakMs        float64 `json:"t_peak_ms"`
	PeakSendingPU  float64 `json:"peak_sending_pu"`
	TPeakSendingMs float64 `json:"t_peak_sending_ms"`
	PeakKV         float64 `json:"peak_kv"` // the receiving-end peak in kV (signed)
	BaseKV         float64 `json:"base_kv"` // 1 pu: peak phase-to-earth EMF, kV
	Waveform       string  `json:"waveform"`
	CloseDeg       float64 `json:"close_deg"`
	TrappedPU      float64 `json:"trapped_pu"`
	DurationMs     float64 `json:"duration_ms"`
	DurationHow    string  `json:"duration_how"` // "given", or "default: " and the bound that decided
	TimeStepUs     float64 `json:"time_step_us"`
	TravelTimeMs   float64 `json:"travel_time_ms"`
	Limits         string  `json:"limits"`
	// FrontOvershootPU bounds how far the method's smoothing of wavefronts may carry
	// a peak beyond the exact waveform (the Laplace window; 0 for the others).
	FrontOvershootPU float64  `json:"front_overshoot_pu"`
	Notes            []string `json:"notes"`

	Spectrum   energiseSpectrum    `json:"spectrum"`
	Resonances []energiseResonance `json:"scan_resonances"`
	Compare    *energiseComparison `json:"compare,omitempty"`

	TMs          []float64 `json:"t_ms"`
	VReceivingPU []float64 `json:"v_receiving_pu"`
	VSendingPU   []float64 `json:"v_sending_pu"`
	VMiddlePU    []float64 `json:"v_middle_pu,omitempty"`

	// A sectioned line: the voltage at each junction of sections, and the largest
	// voltage at any of the ends and junctions.
	Junctions    []energiseJunction `json:"junctions,omitempty"`
	PeakAnyPU    float64            `json:"peak_any_pu"`
	PeakAnyWhere string             `json:"peak_any_where"`
	PeakAnyXKm   float64            `json:"peak_any_x_km"`

	diagram *waves.LatticeDiagram
}

// energiseJunction is the energisation at one junction of sections.
type energiseJunction struct {
	Name    string    `json:"name"`
	XKm     float64   `json:"x_km"` // from the sending end
	PeakPU  float64   `json:"peak_pu"`
	TPeakMs float64   `json:"t_peak_ms"`
	VPU     []float64 `json:"v_pu"`
}

// energiseSpectrum is the spectrum of the receiving-end transient.
type energiseSpectrum struct {
	ResolutionHz float64             `json:"resolution_hz"` // 1 / duration
	Window       string              `json:"window"`
	Dominant     []energiseFrequency `json:"dominant"`
}

// energiseFrequency is one dominant frequency of the transient, with the nearest
// resonance of the scan.
type energiseFrequency struct {
	FHz         float64 `json:"f_hz"`
	Harmonic    float64 `json:"harmonic"`
	Relative    float64 `json:"relative_amplitude"` // to the largest spectral peak
	NearestScan float64 `json:"nearest_scan_resonance_hz,omitempty"`
}

// energiseResonance is a resonance peak of |Vr/E| of the energised network.
type energiseResonance struct {
	FHz       float64  `json:"f_hz"`
	Harmonic  float64  `json:"harmonic"`
	Gain      *float64 `json:"gain,omitempty"` // absent when unbounded (lossless pole)
	Unbounded bool     `json:"unbounded,omitempty"`
}

// energiseComparison is the result of --compare.
type energiseComparison struct {
	Methods    []string             `json:"methods"`
	Skipped    []string             `json:"skipped,omitempty"` // method: why
	TimeStepUs float64              `json:"time_step_us"`
	Pairs      []energisePair       `json:"pairs"`
	MaxDiffPU  float64              `json:"max_diff_pu"`
	Peaks      map[string]float64   `json:"peak_pu"`
	traces     map[string][]float64 // receiving-end waveforms by method
}

// energisePair is the difference of the receiving-end voltages of two methods: the
// largest and rms over the run, the largest near the wavefront arrivals, the rms
// away from them (over the run and its first and second half), and its cause.
type energisePair struct {
	A         string  `json:"a"`
	B         string  `json:"b"`
	MaxDiffPU float64 `json:"max_diff_pu"`
	TMs       float64 `json:"t_ms"`
	RMSDiffPU float64 `json:"rms_diff_pu"`

	FrontWindowMs  float64 `json:"front_window_ms"` // ± this about each arrival counts as near a wavefront
	FrontMaxDiffPU float64 `json:"front_max_diff_pu"`
	AwayMaxDiffPU  float64 `json:"away_max_diff_pu"`
	AwayTMs        float64 `json:"away_t_ms"`
	AwayRMSDiffPU  float64 `json:"away_rms_diff_pu"`
	AwayRMSEarlyPU float64 `json:"away_rms_first_half_pu"`
	AwayRMSLatePU  float64 `json:"away_rms_second_half_pu"`
	AtWavefronts   bool    `json:"at_wavefronts"` // the difference concentrates at the wavefronts
	Cause          string  `json:"cause"`
}

// computeEnergise computes the energisation by method ("" = the study's [energise]
// method, default laplace).
func computeEnergise(st *study.Study, method string) (energiseResult, error) {
	if method == "" {
		method = st.Energise.Method
	}
	if method == "" {
		method = "laplace"
	}
	a, err := analysis.Energise(st, method)
	if err != nil {
		return energiseResult{}, err
	}
	e, durationHow, w, d, limits := a.Settings, a.DurationHow, a.Wave, a.Diagram, a.Limits
	method = a.Method
	base := st.Voltage * math.Sqrt2 / math.Sqrt(3) / 1e3
	res := energiseResult{
		Method:           method,
		BaseKV:           base,
		Waveform:         e.Excitation.String(),
		CloseDeg:         e.CloseDeg,
		TrappedPU:        e.TrappedPU,
		DurationMs:       e.Duration * 1e3,
		DurationHow:      durationHow,
		TimeStepUs:       w.Step * 1e6,
		TravelTimeMs:     a.TravelTime * 1e3,
		Limits:           limits,
		FrontOvershootPU: w.Overshoot,
		Notes:            w.Notes,
		VReceivingPU:     w.Receiving,
		VSendingPU:       w.Sending,
		VMiddlePU:        w.Middle,
		diagram:          d,
	}
	if e.Excitation != waves.Sine {
		res.CloseDeg = 0
	}
	res.TMs = make([]float64, len(w.Receiving))
	for k := range res.TMs {
		res.TMs[k] = w.Time(k) * 1e3
	}
	pk, k := waves.Peak(w.Receiving)
	res.PeakPU, res.TPeakMs, res.PeakKV = pk, res.TMs[k], pk*base
	pk, k = waves.Peak(w.Sending)
	res.PeakSendingPU, res.TPeakSendingMs = pk, res.TMs[k]
	res.PeakAnyPU, res.PeakAnyWhere, res.PeakAnyXKm = res.PeakPU, "receiving end", st.Line.Length()/1e3
	if math.Abs(res.PeakSendingPU) > math.Abs(res.PeakAnyPU) {
		res.PeakAnyPU, res.PeakAnyWhere, res.PeakAnyXKm = res.PeakSendingPU, "sending end", 0
	}
	for _, j := range w.Junctions {
		pk, k := waves.Peak(j.V)
		res.Junctions = append(res.Junctions, energiseJunction{Name: j.Name, XKm: j.X / 1e3, PeakPU: pk, TPeakMs: res.TMs[k], VPU: j.V})
		if math.Abs(pk) > math.Abs(res.PeakAnyPU) {
			res.PeakAnyPU, res.PeakAnyWhere, res.PeakAnyXKm = pk, "junction "+j.Name, j.X/1e3
		}
	}
	for _, p := range a.Resonances {
		r := energiseResonance{FHz: p.F, Harmonic: p.F / st.Frequency, Unbounded: p.Unbounded}
		if !p.Unbounded && !math.IsInf(p.Gain, 0) && !math.IsNaN(p.Gain) {
			g := p.Gain
			r.Gain = &g
		} else {
			r.Unbounded = true
		}
		res.Resonances = append(res.Resonances, r)
	}
	res.Spectrum = energiseSpectrum{ResolutionHz: a.Spectrum.Resolution, Window: a.Spectrum.Window}
	for _, d := range a.Spectrum.Dominant {
		res.Spectrum.Dominant = append(res.Spectrum.Dominant, energiseFrequency{FHz: d.F, Harmonic: d.F / st.Frequency, Relative: d.Relative, NearestScan: d.NearestScan})
	}
	return res, nil
}

// compareEnergise runs every method the study allows on the Bergeron time step (or
// the study's time_step_us) and returns the largest receiving-end differences.
func compareEnergise(st *study.Study) (*energiseComparison, error) {
	a, err := analysis.CompareEnergise(st)
	if err != nil {
		return nil, err
	}
	cmp := &energiseComparison{Methods: a.Methods, Skipped: a.Skipped, TimeStepUs: a.Step * 1e6,
		Peaks: a.Peaks, traces: a.Traces, MaxDiffPU: a.MaxDiff}
	for _, q := range a.Pairs {
		p := energisePair{A: q.A, B: q.B, MaxDiffPU: q.MaxDiff, TMs: q.T * 1e3, RMSDiffPU: q.RMSDiff,
			FrontWindowMs: q.FrontWindow * 1e3, FrontMaxDiffPU: q.FrontMaxDiff, AwayMaxDiffPU: q.AwayMaxDiff,
			AwayTMs: q.AwayT * 1e3, AwayRMSDiffPU: q.AwayRMS, AwayRMSEarlyPU: q.AwayRMSEarly, AwayRMSLatePU: q.AwayRMSLate,
			AtWavefronts: q.AtWavefronts}
		p.Cause = pairCause(st, p, a.FrequencyDependent)
		cmp.Pairs = append(cmp.Pairs, p)
	}
	return cmp, nil
}

// pairCause explains the difference of two methods by its cause.
func pairCause(st *study.Study, p energisePair, freqDep bool) string {
	if p.AtWavefronts {
		return fmt.Sprintf("the difference concentrates at the wavefronts (largest %.3g pu within ±%.3g ms of the arrivals, rms %.2g pu away from them), where each method shapes the jump its own way", p.FrontMaxDiffPU, p.FrontWindowMs, p.AwayRMSDiffPU)
	}
	away := fmt.Sprintf("away from the wavefronts the difference is rms %.3g pu (%.3g in the first half of the run, %.3g in the second), largest %.3g pu at %.3f ms", p.AwayRMSDiffPU, p.AwayRMSEarlyPU, p.AwayRMSLatePU, p.AwayMaxDiffPU, p.AwayTMs)
	if freqDep && (p.A == "laplace" || p.B == "laplace") {
		other := p.A
		if other == "laplace" {
			other = p.B
		}
		return fmt.Sprintf("%s: the line's constants vary with frequency (skin effect, earth return) and the %s method holds them at %g Hz, while the Laplace transform damps and slows each frequency of the transient by the line's own resistance and inductance there; the higher frequencies are damped more, so the waveforms drift apart as the run goes on", away, other, st.Frequency)
	}
	if analysis.LineIsLossy(st) {
		losses := map[string]string{
			"lattice":  "lattice: a distortionless attenuation at one frequency",
			"bergeron": "Bergeron: the resistance lumped at the ends and middle",
			"laplace":  "Laplace: the resistance distributed along the line",
		}
		return fmt.Sprintf("%s: the methods treat the line's losses differently (%s; %s)", away, losses[p.A], losses[p.B])
	}
	return away + ": the methods treat the source and shunts differently (Bergeron: the trapezoidal rule on the time step; Laplace: exact in frequency)"
}

// energiseTable returns the waveforms as a table: t_ms, v_sending_pu, v_receiving_pu,
// v_middle_pu where the method gives it, and on a sectioned line one column per
// junction, v_junction1_pu, v_junction2_pu, ... from the sending end.
func energiseTable(res energiseResult) (*report.Table, error) {
	cols := []string{"t_ms", "v_sending_pu", "v_receiving_pu"}
	if res.VMiddlePU != nil {
		cols = append(cols, "v_middle_pu")
	}
	for i := range res.Junctions {
		cols = append(cols, fmt.Sprintf("v_junction%d_pu", i+1))
	}
	t := report.NewTable(cols...)
	for k, tm := range res.TMs {
		row := []any{tm, res.VSendingPU[k], res.VReceivingPU[k]}
		if res.VMiddlePU != nil {
			row = append(row, res.VMiddlePU[k])
		}
		for _, j := range res.Junctions {
			row = append(row, j.VPU[k])
		}
		if err := t.Add(row...); err != nil {
			return nil, err
		}
	}
	return t, nil
}

// energisePlotData builds the waveform plot's input: the receiving end bold, the
// sending end, the mid-line voltage dashed, and with a comparison each other method's
// receiving end.
func energisePlotData(st *study.Study, res energiseResult) report.EnergisePlotData {
	d := report.EnergisePlotData{
		Title:   fmt.Sprintf("Energisation, far end open: %s (%s)", studyTitle(st), res.Method),
		BaseKV:  res.BaseKV,
		PeakTMs: res.TPeakMs,
		PeakPU:  res.PeakPU,
	}
	d.Traces = append(d.Traces,
		report.EnergiseTrace{Name: "receiving end (open)", TMs: res.TMs, V: res.VReceivingPU, Bold: true},
		report.EnergiseTrace{Name: "sending end", TMs: res.TMs, V: res.VSendingPU})
	if res.VMiddlePU != nil {
		d.Traces = append(d.Traces, report.EnergiseTrace{Name: "mid-line", TMs: res.TMs, V: res.VMiddlePU, Dashed: true})
	}
	for _, j := range res.Junctions {
		d.Traces = append(d.Traces, report.EnergiseTrace{Name: fmt.Sprintf("junction %s (%.4g km)", j.Name, j.XKm), TMs: res.TMs, V: j.VPU})
	}
	if c := res.Compare; c != nil {
		for _, m := range c.Methods {
			if m == res.Method {
				continue
			}
			v := c.traces[m]
			t := make([]float64, len(v))
			for k := range t {
				t[k] = float64(k) * c.TimeStepUs / 1e3
			}
			d.Traces = append(d.Traces, report.EnergiseTrace{Name: "receiving end (" + m + ")", TMs: t, V: v, Dashed: true})
		}
	}
	return d
}

func studyTitle(st *study.Study) string {
	if st.Title != "" {
		return st.Title
	}
	return st.File
}

func sectionNames(st *study.Study) []string {
	names := make([]string, len(st.Network.Line))
	for i, l := range st.Network.Line {
		names[i] = l.Name
	}
	return names
}

func printEnergise(w io.Writer, st *study.Study, res energiseResult) {
	fmt.Fprintf(w, "energisation of the open-ended line: %s\n", studyTitle(st))
	exc := "1 pu step of EMF at t = 0"
	if res.Waveform == "sine" {
		exc = fmt.Sprintf("EMF sin(wt + %g deg)", res.CloseDeg)
	}
	fmt.Fprintf(w, "  %s, trapped charge %g pu, %.4g ms in steps of %.4g us; travel time %.5g ms\n", exc, res.TrappedPU, res.DurationMs, res.TimeStepUs, res.TravelTimeMs)
	if res.DurationHow != "given" {
		fmt.Fprintf(w, "  duration %.4g ms (%s)\n", res.DurationMs, res.DurationHow)
	}
	fmt.Fprintf(w, "  1 pu = %.4g kV (peak phase-to-earth EMF)\n\n", res.BaseKV)
	fmt.Fprintf(w, "method %s\n  limits: %s\n", res.Method, res.Limits)
	for _, n := range res.Notes {
		fmt.Fprintf(w, "  %s\n", n)
	}
	fmt.Fprintf(w, "\npeak at the receiving (open) end  %+.4f pu = %+.1f kV at %.3f ms\n", res.PeakPU, res.PeakKV, res.TPeakMs)
	fmt.Fprintf(w, "peak at the sending end           %+.4f pu = %+.1f kV at %.3f ms\n", res.PeakSendingPU, res.PeakSendingPU*res.BaseKV, res.TPeakSendingMs)
	if len(res.Junctions) > 0 {
		fmt.Fprintln(w, "peaks at the junctions of sections:")
		for _, j := range res.Junctions {
			fmt.Fprintf(w, "  %-30s at %8.3f km  %+.4f pu = %+.1f kV at %.3f ms\n", j.Name, j.XKm, j.PeakPU, j.PeakPU*res.BaseKV, j.TPeakMs)
		}
		fmt.Fprintf(w, "largest of ends and junctions     %+.4f pu at the %s (%.4g km)\n", res.PeakAnyPU, res.PeakAnyWhere, res.PeakAnyXKm)
	}
	fmt.Fprintf(w, "\ndominant frequencies of the receiving-end transient (%s, resolution %.3g Hz, above %.3g Hz):\n", res.Spectrum.Window, res.Spectrum.ResolutionHz, 2*res.Spectrum.ResolutionHz)
	if len(res.Spectrum.Dominant) == 0 {
		fmt.Fprintln(w, "  none found")
	}
	for _, d := range res.Spectrum.Dominant {
		near := ""
		if d.NearestScan > 0 {
			near = fmt.Sprintf("   nearest scan resonance %.1f Hz (h %.2f)", d.NearestScan, d.NearestScan/st.Frequency)
		}
		fmt.Fprintf(w, "  %8.1f Hz  h %6.2f  relative amplitude %.2f%s\n", d.FHz, d.Harmonic, d.Relative, near)
	}
	fmt.Fprintln(w, "resonances of |Vr/E| of the same network (frequency scan, far end open):")
	shown := 0
	for _, r := range res.Resonances {
		if shown == 6 {
			fmt.Fprintf(w, "  ... %d more\n", len(res.Resonances)-shown)
			break
		}
		g := "unbounded (lossless)"
		if r.Gain != nil {
			g = fmt.Sprintf("gain %.3g", *r.Gain)
		}
		fmt.Fprintf(w, "  %8.1f Hz  h %6.2f  %s\n", r.FHz, r.Harmonic, g)
		shown++
	}
	if shown == 0 {
		fmt.Fprintln(w, "  none in the scanned range")
	}
	if c := res.Compare; c != nil {
		fmt.Fprintf(w, "\ncomparison on one time step (%.4g us), receiving end:\n", c.TimeStepUs)
		for _, m := range c.Methods {
			fmt.Fprintf(w, "  %-9s peak %+.4f pu\n", m, c.Peaks[m])
		}
		for _, p := range c.Pairs {
			fmt.Fprintf(w, "  %s vs %s: largest difference %.4f pu at %.3f ms, rms %.4f pu\n    %s\n", p.A, p.B, p.MaxDiffPU, p.TMs, p.RMSDiffPU, p.Cause)
		}
		fmt.Fprintf(w, "  largest difference of all: %.4f pu\n", c.MaxDiffPU)
		for _, s := range c.Skipped {
			fmt.Fprintf(w, "  skipped %s\n", s)
		}
	}
	fmt.Fprintln(w, "\nUnprotected overvoltages (no surge arresters). "+Caution)
}
