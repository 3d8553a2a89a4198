package main

// The report command: every study part in one folder.
//
//	writeReport(st, out, force)  -> the folder: report.html, summary.md, plots (SVG),
//	                                CSV tables, COMTRADE records; the demo command and
//	                                tests call it too
//	(*reportRun).build()         -> the report.Document: the inputs, then reportParts
//	                                in order, each writing its own files
//	outputFolder (outfolder.go)  -> the folder built beside the target and moved into
//	                                place when complete (batch uses it too)
//
// Each part calls the compute function and plot builders of its command (computeScan,
// computeEnergise, computeLoading, computeSwitchingProgress, report.*Plot: the analysis
// package's results shaped for display) so the report shows exactly what the commands
// show. A cancelled context stops the run after the part under way and discards the
// folder. A part that cannot run for the study (for example
// switching without zero-sequence data) becomes a section saying why; any other failure
// fails the whole run, and then nothing is left in place (see outputFolder).

import (
	"context"
	"errors"
	"flag"
	"fmt"
	"io"
	"math"
	"math/cmplx"
	"path/filepath"
	"strconv"
	"strings"
	"time"
	"unicode/utf8"

	"gonum.org/v1/plot"
	"gonum.org/v1/plot/vg"

	"github.com/telegrapher/telegrapher/cmd/telegrapher/internal/analysis"
	"github.com/telegrapher/telegrapher/cmd/telegrapher/internal/report"
	"github.com/telegrapher/telegrapher/cmd/telegrapher/internal/study"
)

// writePlot renders p as SVG at the given size into the folder and returns the SVG
// bytes for inlining in the HTML report.
func (o *outputFolder) writePlot(name string, p *plot.Plot, w, h vg.Length) ([]byte, error) {
	svg, err := report.RenderPlot(p, w, h, "svg")
	if err != nil {
		return nil, fmt.Errorf("drawing %s: %w", name, err)
	}
	return svg, o.write(name, svg)
}

// writeSVG writes an already rendered SVG figure into the folder and returns it.
func (o *outputFolder) writeSVG(name string, svg []byte) ([]byte, error) {
	return svg, o.write(name, svg)
}

// Report plot size: wide enough for a frequency axis to 50 harmonics, read on a
// screen or printed on A4.
const (
	reportPlotW = 7.5 * vg.Inch
	reportPlotH = 4 * vg.Inch
)

// reportRun is one report being built.
type reportRun struct {
	ctx    context.Context // cancelled: the run stops after the part under way
	st     *study.Study
	out    *outputFolder
	status *statusLine // progress on a terminal; nil draws nothing
}

// figure draws p into the folder as name (SVG) and returns it for the HTML.
func (rr *reportRun) figure(name, title, alt string, p *plot.Plot) (report.Figure, error) {
	svg, err := rr.out.writePlot(name, p, reportPlotW, reportPlotH)
	if err != nil {
		return report.Figure{}, err
	}
	return report.Figure{Title: title, File: name, SVG: svg, Alt: alt}, nil
}

// table writes t as the CSV file name.
func (rr *reportRun) table(name string, t *report.Table) error {
	return rr.out.write(name, t.CSV())
}

// cannotRun reports whether err says a part cannot run for this study (bad or missing
// input for that part), as opposed to a failure of the tool.
func cannotRun(err error) bool {
	var ue *usageError
	return errors.As(err, &ue) || isInputError(err)
}

// notRunSection is the section of a part that cannot run, saying why.
func notRunSection(id, title string, why error) report.Section {
	return report.Section{ID: id, Title: title, Verdict: report.NotRun, Reason: why.Error()}
}

// inputsSection lists what the loader understood, with units and where each value
// came from (given, default, derived).
func inputsSection(st *study.Study) report.Section {
	t := report.NewTable("setting", "value", "from")
	for _, e := range st.Understood {
		_ = t.Add(e.Key, e.Value, e.How)
	}
	sec := report.Section{
		ID: "inputs", Title: "Study inputs", Verdict: report.Info,
		Reading: fmt.Sprintf("%s: %.0f kV, %g Hz, %.1f km line", reportTitle(st), st.Voltage/1e3, st.Frequency, st.Line.Length()/1e3),
	}
	if len(t.Rows) > 0 {
		sec.Tables = []report.TableView{{Caption: "Settings as understood (SI conversions done once, at load)", Table: t}}
	}
	for _, w := range st.Warnings {
		sec.Notes = append(sec.Notes, "Warning: "+w)
	}
	return sec
}

// reportTitle is the study's title, or its file name without one.
func reportTitle(st *study.Study) string {
	if st.Title != "" {
		return st.Title
	}
	if st.File != "" {
		return filepath.Base(st.File)
	}
	return "study"
}

// sweepFigure draws the line constants against frequency (the constants --sweep plot)
// as constants.svg.
func (rr *reportRun) sweepFigure() (report.Figure, error) {
	res, err := computeSweep(rr.st, sweepFrequencies(sweepFMin, sweepFMax, sweepPlotPoints))
	if err != nil {
		return report.Figure{}, err
	}
	svg, err := report.RenderSweep(sweepPlotData(rr.st, res), "svg")
	if err != nil {
		return report.Figure{}, fmt.Errorf("drawing constants.svg: %w", err)
	}
	if _, err := rr.out.writeSVG("constants.svg", svg); err != nil {
		return report.Figure{}, err
	}
	return report.Figure{
		Title: "Per-length constants, attenuation, velocity and surge impedance against frequency",
		File:  "constants.svg", SVG: svg,
		Alt: "six panels: resistance, inductance, capacitance, attenuation, velocity and surge impedance magnitude per km against frequency from 1 Hz to 1 MHz",
	}, nil
}

// switchingSection is the three-phase statistical switching part: the distribution
// plot, the worst shot's waveforms (plot and COMTRADE), the shots in switching.csv.
func (rr *reportRun) switchingSection() (report.Section, error) {
	const id, title = "switching", "Statistical switching (three-phase)"
	if err := analysis.SwitchingApplicable(rr.st); err != nil {
		return notRunSection(id, title, err), nil
	}
	r, err := computeSwitchingProgress(rr.ctx, rr.st, rr.status.Shots())
	if err != nil {
		if cannotRun(err) {
			return notRunSection(id, title, err), nil
		}
		return report.Section{}, err
	}
	sec := report.Section{ID: id, Title: title, Verdict: report.Info, Notes: r.Notes}
	sec.Reading = fmt.Sprintf("u2 = %.2f pu (%.0f kV) by the phase-peak method over %d shots, largest phase peak %.2f pu",
		r.U2PU, r.U2KV, r.Shots, r.MaxPU)
	verdict, text, u2Over, marginShort := switchingVerdict(rr.st, &r)
	sec.Verdict, sec.Reading = verdict, sec.Reading+text
	if !r.Unprotected {
		sec.Reading += " (with arresters)"
	}
	sec.Facts = []report.Fact{
		{Name: "shots, seed", Value: fmt.Sprintf("%d, %d", r.Shots, r.Seed)},
		{Name: "per-unit base (IEC 60071-1)", Value: fmt.Sprintf("Us·√2/√3 = %.1f kV", r.BaseIECKV)},
		{Name: "u2, phase-peak (2 % value)", Value: fmt.Sprintf("%.3f pu, %.0f kV", r.U2PU, r.U2KV), Flag: u2Over},
		{Name: "ut, phase-peak (truncation)", Value: fmt.Sprintf("%.3f pu, %.0f kV", r.UtPU, r.UtKV)},
		{Name: "u2, case-peak", Value: fmt.Sprintf("%.3f pu, %.0f kV", r.CaseU2PU, r.CaseU2KV)},
		{Name: "u2 of a normal fit", Value: fmt.Sprintf("%.3f pu", r.U2FitPU)},
		{Name: "largest phase peak", Value: fmt.Sprintf("%.3f pu, %.0f kV", r.MaxPU, r.MaxKV)},
		{Name: "mean, sigma of phase peaks", Value: fmt.Sprintf("%.3f pu, %.3f pu", r.MeanPU, r.SigmaPU)},
	}
	if r.MarginPct != nil {
		sec.Facts = append(sec.Facts, report.Fact{Name: fmt.Sprintf("margin to SIWL %.0f kV (ks %.3g, kcd %.3g)", r.SIWLKV, r.Ks, r.Kcd),
			Value: fmt.Sprintf("%+.1f %%", *r.MarginPct), Flag: marginShort})
	}
	for _, a := range r.Arresters {
		name := "arrester at the " + a.At + " end"
		if a.Name != "" && !strings.Contains(a.Name, a.At) {
			name = fmt.Sprintf("arrester %s (%s end)", a.Name, a.At)
		}
		sec.Facts = append(sec.Facts, report.Fact{Name: name,
			Value: fmt.Sprintf("Ups %.0f kV at %.0f kA", a.UpsKV, a.UpsKA)})
	}
	ws := r.WorstShot
	sec.Facts = append(sec.Facts, report.Fact{Name: "worst shot",
		Value: fmt.Sprintf("#%d, closing at %.1f°, poles at %+.2f, %+.2f, %+.2f ms; peaks %+.3f, %+.3f, %+.3f pu (EMF base)",
			ws.Index+1, ws.CloseDeg, ws.PoleCloseMs[0], ws.PoleCloseMs[1], ws.PoleCloseMs[2], ws.PeakPU[0], ws.PeakPU[1], ws.PeakPU[2])})
	if rc := r.Reclosing; rc.SendingPU != nil {
		v, tr := rc.SendingPU, rc.TrappedPU
		sec.Facts = append(sec.Facts, report.Fact{Name: fmt.Sprintf("trapped charge at the closing, after the %g ms dead time", rc.DeadTimeMs),
			Value: fmt.Sprintf("%+.3f, %+.3f, %+.3f pu (%+.2f, %+.2f, %+.2f pu at the opening)", v[0], v[1], v[2], tr[0], tr[1], tr[2])})
	}

	plots := switchingPlots(&r)
	names := []string{"switching.svg", "switching_worst.svg"}
	alts := []string{"cumulative distribution of the absolute phase peaks at the open end, with the 2 % value marked",
		"the worst shot's receiving-end voltages of phases a, b and c against time, with the pole closing instants"}
	titles := []string{"Distribution of the phase peaks", "Worst shot: receiving-end phase voltages"}
	for i, p := range plots {
		if i >= len(names) {
			break
		}
		f, err := rr.figure(names[i], titles[i], alts[i], p)
		if err != nil {
			return report.Section{}, err
		}
		sec.Figures = append(sec.Figures, f)
	}

	t := report.NewTable("shot", "peak_a_pu", "peak_b_pu", "peak_c_pu", "case_peak_pu", "case_peak_iec_pu")
	toIEC := rr.st.Voltage / rr.st.Us
	for i, p := range r.PhasePeaksPU {
		c := math.Max(math.Abs(p[0]), math.Max(math.Abs(p[1]), math.Abs(p[2])))
		if err := t.Add(i+1, p[0], p[1], p[2], c, c*toIEC); err != nil {
			return report.Section{}, err
		}
	}
	if err := rr.table("switching.csv", t); err != nil {
		return report.Section{}, err
	}
	sec.Files = []string{"switching.csv"}
	if w := r.Worst; w != nil && len(w.Receiving[0]) > 0 {
		base := r.BaseEMFKV
		var chans []report.AnalogChannel
		for k, ph := range []string{"A", "B", "C"} {
			chans = append(chans, report.AnalogChannel{ID: "V receiving " + strings.ToLower(ph), Phase: ph, Circuit: "receiving end", Unit: "kV", Values: scaled(w.Receiving[k], base)})
		}
		for k, ph := range []string{"A", "B", "C"} {
			if len(w.Sending[k]) == len(w.Receiving[k]) {
				chans = append(chans, report.AnalogChannel{ID: "V sending " + strings.ToLower(ph), Phase: ph, Circuit: "sending end", Unit: "kV", Values: scaled(w.Sending[k], base)})
			}
		}
		if err := rr.comtrade("switching", w.Step, chans); err != nil {
			return report.Section{}, err
		}
		sec.Files = append(sec.Files, "switching.cfg", "switching.dat")
	}
	return sec, nil
}

// scaled returns v times k, in a new slice.
func scaled(v []float64, k float64) []float64 {
	out := make([]float64, len(v))
	for i, x := range v {
		out[i] = x * k
	}
	return out
}

// comtradeEpoch is the nominal time of the breaker closing in the COMTRADE records:
// the waveforms are computed, not recorded, so a fixed time keeps reports repeatable.
var comtradeEpoch = time.Date(2000, 1, 1, 0, 0, 0, 0, time.UTC)

// comtrade writes name.cfg and name.dat from evenly sampled channels (step in s).
func (rr *reportRun) comtrade(name string, step float64, chans []report.AnalogChannel) error {
	cfg, dat, err := report.COMTRADE(report.Record{
		Station: clip(strings.Map(noComma, reportTitle(rr.st)), 64), Device: "telegrapher " + name,
		LineFrequency: rr.st.Frequency, SampleRate: 1 / step,
		Start: comtradeEpoch, Trigger: comtradeEpoch, Channels: chans,
	})
	if err != nil {
		return fmt.Errorf("writing %s.cfg: %w", name, err)
	}
	if err := rr.out.write(name+".cfg", cfg); err != nil {
		return err
	}
	return rr.out.write(name+".dat", dat)
}

// noComma drops the characters a COMTRADE text field may not hold.
func noComma(r rune) rune {
	if r == ',' || r == '\r' || r == '\n' {
		return -1
	}
	return r
}

// clip shortens s to at most n bytes on a character boundary.
func clip(s string, n int) string {
	if len(s) <= n {
		return s
	}
	for n > 0 && !utf8.RuneStart(s[n]) {
		n--
	}
	return s[:n]
}

var reportCommand = func() *command {
	return &command{
		name:  "report",
		args:  "STUDY --out DIR [--force]",
		short: "everything into one folder: HTML report, plots, CSV, COMTRADE",
		long: `
Runs every part of the study and writes one folder:

  report.html     the report: inputs, constants, scan, energisation, loading and
                  switching, each with a one-line reading and its plots (self-contained:
                  opens from disk in any browser, nothing fetched from a network)
  summary.md      the key figures in Markdown
  *.svg           one plot per study part
  scan.csv, energise.csv, loading.csv, switching.csv
                  the results as tables (header row, units in the column names)
  energise.cfg/.dat, switching.cfg/.dat
                  the energisation waveforms and the worst switching shot in the ASCII
                  form of IEEE C37.111-2013 (COMTRADE)

A part the study cannot run (switching without zero-sequence data, for example) says
why in its section instead of failing the report.

The files are built beside DIR and moved in only when all are written, so a failed or
interrupted run changes nothing. telegrapher never deletes what it did not write:
  - an absent or empty DIR is made;
  - in a folder an earlier report wrote (its .telegrapher-report marker lists the
    files it wrote) the new files replace those listed; files and folders you added
    stay (one of yours with the name of a new file is refused unless --force);
  - any other existing DIR is refused unless --force, which adds the report's files
    to it, overwriting files of the same names and touching nothing else;
  - a file given as DIR, and a batch screening's folder, are refused even with --force.
Temporary folders .DIR.tmp-N a killed run left beside DIR are removed by the next run
into the same folder once no running telegrapher holds them (see the README).`,
		flags: func(fs *flag.FlagSet, stdout, stderr io.Writer) func(context.Context, []string) error {
			out := fs.String("out", "", "write the report into folder `DIR` (required)")
			force := fs.Bool("force", false, "write into DIR even if telegrapher did not make it (overwrites its own file names only)")
			return func(ctx context.Context, args []string) error {
				if *out == "" {
					return usagef("telegrapher report: --out DIR is required\nusage: telegrapher report STUDY --out DIR [--force]")
				}
				st, err := studyArg("report", args, stderr)
				if err != nil {
					return err
				}
				doc, err := writeReportStatus(ctx, st, *out, *force, newStatusLine(stderr))
				if err != nil {
					return err
				}
				printReportSummary(stdout, doc, *out)
				return nil
			}
		},
	}
}()

// writeReport runs every part of st and writes the report folder out (see the report
// command). Nothing is left behind on failure.
func writeReport(st *study.Study, out string, force bool) (*report.Document, error) {
	return writeReportStatus(context.Background(), st, out, force, nil)
}

// writeReportStatus is writeReport drawing each part's progress on status (nil: none).
// When ctx is cancelled, the run stops after the part under way, removes the folder
// under construction and returns an *interruptedError (wrapping ctx's error).
func writeReportStatus(ctx context.Context, st *study.Study, out string, force bool, status *statusLine) (*report.Document, error) {
	defer status.Clear()
	folder, err := newOutputFolder(out, kindReport, force)
	if err != nil {
		return nil, err
	}
	defer folder.discard() // nothing to do once committed
	rr := &reportRun{ctx: ctx, st: st, out: folder, status: status}
	doc, err := rr.build()
	if err != nil {
		return nil, folder.interrupted(ctx, err)
	}
	page, err := report.HTML(doc)
	if err != nil {
		return nil, err
	}
	if err := folder.write("report.html", page); err != nil {
		return nil, err
	}
	if err := folder.write("summary.md", report.Markdown(doc)); err != nil {
		return nil, err
	}
	if err := folder.commit(); err != nil {
		return nil, err
	}
	return doc, nil
}

// reportPart is one part of the report: its name for the status line and the
// function that builds its section.
type reportPart struct {
	name  string
	build func(*reportRun) (report.Section, error)
}

// reportParts are the report's parts after the inputs, in order.
var reportParts = []reportPart{
	{"line constants", (*reportRun).constantsSection},
	{"harmonic scan", (*reportRun).scanSection},
	{"energisation", (*reportRun).energiseSection},
	{"loading", (*reportRun).loadingSection},
	{"statistical switching", (*reportRun).switchingSection},
}

// remedySection is the remedies part, present only when the study has [targets].
func (rr *reportRun) remedySection() (report.Section, bool, error) {
	sec, figs, ok, err := remedyReportPart(rr.ctx, rr.st, rr.status)
	if !ok || err != nil {
		return sec, ok, err
	}
	for _, f := range figs {
		fg, err := rr.figure(f.Name, f.Title, f.Alt, f.Plot)
		if err != nil {
			return sec, true, err
		}
		sec.Figures = append(sec.Figures, fg)
	}
	return sec, true, nil
}

// build runs the parts in order and returns the document.
func (rr *reportRun) build() (*report.Document, error) {
	doc := &report.Document{
		Title:     "telegrapher report: " + reportTitle(rr.st),
		StudyFile: rr.st.File,
		Generator: "telegrapher " + version,
		Caution:   Caution,
	}
	doc.Sections = append(doc.Sections, inputsSection(rr.st))
	for i, part := range reportParts {
		rr.status.Stage(fmt.Sprintf("report %d/%d: %s", i+1, len(reportParts)+1, part.name))
		sec, err := part.build(rr)
		if err == nil {
			err = rr.ctx.Err() // a part may have turned the cancellation into "not run"
		}
		if err != nil {
			return nil, err
		}
		doc.Sections = append(doc.Sections, sec)
	}
	rr.status.Stage(fmt.Sprintf("report %d/%d: remedies", len(reportParts)+1, len(reportParts)+1))
	sec, ok, err := rr.remedySection()
	if err == nil {
		err = rr.ctx.Err()
	}
	if err != nil {
		return nil, err
	} else if ok {
		doc.Sections = append(doc.Sections, sec)
	}
	if where := report.NonFinite(doc); where != "" {
		return nil, fmt.Errorf("internal error: a value that is not finite reached the report (a bug, please report it): %s", where)
	}
	return doc, nil
}

// printReportSummary prints each section's verdict and reading, and where to open the
// report.
func printReportSummary(w io.Writer, doc *report.Document, out string) {
	fmt.Fprintln(w, doc.Title)
	for _, s := range doc.Sections {
		r := s.Reading
		if s.Verdict == report.NotRun {
			r = s.Reason
		}
		fmt.Fprintf(w, "  %-36s %-16s %s\n", s.Title, "["+s.Verdict.String()+"]", r)
	}
	abs, err := filepath.Abs(filepath.Join(out, "report.html"))
	if err != nil {
		abs = filepath.Join(out, "report.html")
	}
	fmt.Fprintf(w, "\nOpen %s in a browser (summary.md beside it has the key figures).\n\n%s\n", abs, Caution)
}

// constantsSection is the line constants part: surge impedance, propagation constant,
// SIL, no-load rise, the exact and lumped two-ports with the lumped models' errors,
// and the constants against frequency.
func (rr *reportRun) constantsSection() (report.Section, error) {
	const id, title = "constants", "Line constants and model errors"
	r, err := computeConstants(rr.st, 0)
	if err != nil {
		if cannotRun(err) {
			return notRunSection(id, title, err), nil
		}
		return report.Section{}, err
	}
	sec := report.Section{ID: id, Title: title, Verdict: report.Info}
	piErr := r.ModelErrorPct["nominal_pi"].Max
	sec.Reading = fmt.Sprintf("surge impedance %.1f Ω, velocity %.3f c, electrical length %.1f° at %g Hz (%s line); SIL %.0f MW; nominal pi off the exact two-port by %s",
		r.ZcAbsOhm, r.VelocityFractionOfC, r.ElectricalLengthDeg, r.FrequencyHz, r.ClassByElectrical, r.SILMW, pct(piErr))
	sec.Facts = []report.Fact{
		{Name: "propagation constant γ", Value: cfmt(r.GammaPerKm) + " per km"},
		{Name: "attenuation α", Value: fmt.Sprintf("%.4g Np/km (%.4g dB/100 km)", r.AlphaNpPerKm, r.AlphaDBPer100Km)},
		{Name: "phase constant β", Value: fmt.Sprintf("%.5g °/km", r.BetaDegPerKm)},
		{Name: "surge impedance Zc", Value: fmt.Sprintf("%.2f Ω at %.2f°; lossless sqrt(L/C) %.2f Ω", r.ZcAbsOhm, r.ZcAngleDeg, r.ZcLosslessOhm)},
		{Name: "velocity, wavelength", Value: fmt.Sprintf("%.0f km/s (%.3f c), %.0f km", r.VelocityKmPerS, r.VelocityFractionOfC, r.WavelengthKm)},
		{Name: "electrical length", Value: fmt.Sprintf("%.2f° (%s by length: %.0f km)", r.ElectricalLengthDeg, r.ClassByLength, r.LengthKm)},
		{Name: "SIL", Value: fmt.Sprintf("%.1f MW at %.0f kV", r.SILMW, rr.st.Voltage/1e3)},
		{Name: "no-load rise |Vr/Vs|", Value: fmt.Sprintf("%.4f pu (line alone, receiving end open)", r.NoLoadRisePU)},
	}
	if r.PiSectionsFor1Pct > 0 {
		sec.Facts = append(sec.Facts, report.Fact{Name: "nominal pi sections for 1 %", Value: fmt.Sprintf("%d in cascade keep every ABCD element within 1 %% of exact", r.PiSectionsFor1Pct)})
	}
	t := report.NewTable("model", "A", "B (Ω)", "C (S)", "D", "largest error against exact")
	for _, m := range []struct {
		key, name string
		p         abcdOut
	}{{"", "exact", r.ABCD.Exact}, {"nominal_pi", "nominal pi", r.ABCD.NominalPi}, {"nominal_t", "nominal T", r.ABCD.NominalT}, {"short", "short line", r.ABCD.Short}} {
		e := "-"
		if m.key != "" {
			e = pct(r.ModelErrorPct[m.key].Max)
		}
		_ = t.Add(m.name, cfmt(m.p.A), cfmt(m.p.B), cfmt(m.p.C), cfmt(m.p.D), e)
	}
	sec.Tables = append(sec.Tables, report.TableView{Caption: fmt.Sprintf("Two-port (ABCD) models at %g Hz", r.FrequencyHz), Table: t})
	if len(r.Sections) > 0 {
		st := report.NewTable("section", "length (km)", "|Zc| (Ω)", "α (Np/km)", "β (°/km)", "electrical length (°)")
		for i, s := range r.Sections {
			name := s.Name
			if name == "" {
				name = fmt.Sprintf("section %d", i+1)
			}
			_ = st.Add(name, fmt.Sprintf("%.4g", s.LengthKm), fmt.Sprintf("%.5g", cmplx.Abs(s.ZcOhm)), fmt.Sprintf("%.4g", s.AlphaNpPerKm),
				fmt.Sprintf("%.5g", s.BetaRadPerKm*180/math.Pi), fmt.Sprintf("%.4g", s.ElectricalLengthDeg))
		}
		sec.Tables = append(sec.Tables, report.TableView{Caption: "Sections, from the sending end", Table: st})
	}
	sec.Notes = []string{"The exact hyperbolic two-port is the model every part of this report uses; the nominal pi, nominal T and short-line models are shown only for their error against it."}
	f, err := rr.sweepFigure()
	if err != nil {
		return report.Section{}, err
	}
	sec.Figures = append(sec.Figures, f)
	return sec, nil
}

// energisePeakScreenPU is the open-end energisation peak above which the report flags
// the result (analysis.EnergisePeakScreenPU); a study with switching.siwl_kv gets the
// real margin in the switching section.
const energisePeakScreenPU = analysis.EnergisePeakScreenPU

// harmonicAt names a harmonic order as the report reads it: "the 5th harmonic" for a
// whole order, "harmonic order 4.4" otherwise (a fractional order is not an ordinal).
func harmonicAt(h float64) string {
	if h != math.Round(h) {
		return fmt.Sprintf("harmonic order %.1f", h)
	}
	n := int(h)
	suffix := "th"
	switch {
	case n%100 >= 11 && n%100 <= 13:
	case n%10 == 1:
		suffix = "st"
	case n%10 == 2:
		suffix = "nd"
	case n%10 == 3:
		suffix = "rd"
	}
	return fmt.Sprintf("the %d%s harmonic", n, suffix)
}

// scanSection is the harmonic scan part: the gain plot with its peaks, the watched
// harmonics, the flags, scan.csv and, when the study asks for it, the map.
func (rr *reportRun) scanSection() (report.Section, error) {
	const id, title = "scan", "Harmonic scan"
	res, err := computeScan(rr.ctx, rr.st)
	if err != nil {
		if cannotRun(err) {
			return notRunSection(id, title, err), nil
		}
		return report.Section{}, err
	}
	sec := report.Section{ID: id, Title: title, Verdict: report.Pass}
	if len(res.Flags) > 0 {
		sec.Verdict = report.Flagged
	}
	// The first resonance and the worst watched harmonic.
	first := res.firstResonance()
	var worst *scanHarmonic
	for i := range res.Harmonics {
		h := &res.Harmonics[i]
		if h.Watched && (worst == nil || h.BandGain > worst.BandGain) {
			worst = h
		}
	}
	switch {
	case first == nil:
		sec.Reading = fmt.Sprintf("no resonance magnifying the gain above 1 between %g and %g Hz", res.FMinHz, res.FMaxHz)
	case first.Unbounded:
		sec.Reading = fmt.Sprintf("first resonance at %s (%.4g Hz), unbounded gain (lossless network)", harmonicAt(first.Harmonic), first.FHz)
	default:
		sec.Reading = fmt.Sprintf("first resonance at %s (%.4g Hz), gain %.3g", harmonicAt(first.Harmonic), first.FHz, first.Gain)
		if first.Gain > res.GainLimit {
			sec.Reading += fmt.Sprintf(": above the limit of %g", res.GainLimit)
		} else {
			sec.Reading += fmt.Sprintf(": within the limit of %g", res.GainLimit)
		}
	}
	if worst != nil {
		verdict := "within"
		if worst.OverLimit {
			verdict = "over"
		}
		seq := ""
		if worst.Sequence == "zero" {
			seq = " (zero sequence)"
		}
		sec.Reading += fmt.Sprintf("; worst watched harmonic h%d%s, gain %s within ±%.0f %% (%s the limit)", worst.Order, seq, fmtGain(worst.BandGain), res.WatchBandPct, verdict)
		if over, given, text := scanTargetCheck(rr.st, worst.BandGain); given {
			sec.Reading += text
			if over {
				sec.Verdict = report.Flagged
			}
		}
	}
	if len(res.Flags) > 0 {
		sec.Reading += fmt.Sprintf("; %d flag(s)", len(res.Flags))
	}
	sec.Facts = append(sec.Facts,
		report.Fact{Name: "model", Value: res.Model},
		report.Fact{Name: "in service, positive sequence", Value: strings.Join(res.Elements, "; ")})
	if res.ZeroSequence != nil {
		sec.Facts = append(sec.Facts, report.Fact{Name: "in service, zero sequence", Value: strings.Join(res.ZeroSequence.Elements, "; ")})
	}
	for _, l := range res.LeftOut {
		sec.Facts = append(sec.Facts, report.Fact{Name: "left out", Value: l})
	}
	sec.Facts = append(sec.Facts,
		report.Fact{Name: "grid", Value: fmt.Sprintf("%d points, %s, %g to %g Hz", len(res.Points), res.Grid, res.FMinHz, res.FMaxHz)},
		report.Fact{Name: "gain limit, watch band", Value: fmt.Sprintf("%g, ±%.0f %%", res.GainLimit, res.WatchBandPct)},
		report.Fact{Name: "planning levels", Value: res.PlanningSource})
	for _, f := range res.Flags {
		sec.Facts = append(sec.Facts, report.Fact{Name: "flag", Value: f, Flag: true})
	}
	peaks := func(name string, s scanSequence) {
		t := report.NewTable("f (Hz)", "harmonic", "gain |Vr/E|", "Q", "-3 dB band (Hz)")
		for _, p := range s.Peaks {
			q, band := "-", "-"
			if p.Q > 0 {
				q, band = fmt.Sprintf("%.3g", p.Q), fmt.Sprintf("%.5g to %.5g", p.FLowHz, p.FHighHz)
			}
			g := fmtGain(p.Gain)
			if p.Unbounded {
				g = "unbounded"
			}
			_ = t.Add(fmt.Sprintf("%.5g", p.FHz), fmt.Sprintf("%.3f", p.Harmonic), g, q, band)
		}
		if len(t.Rows) > 0 {
			sec.Tables = append(sec.Tables, report.TableView{Caption: "Resonance peaks, " + name, Table: t})
		}
	}
	peaks("positive sequence", res.scanSequence)
	if res.ZeroSequence != nil {
		peaks("zero sequence", *res.ZeroSequence)
	}
	ht := report.NewTable("harmonic", "f (Hz)", "sequence", "gain", "largest gain in band", "planning level (%)", "background (%)", "receiving end (%)", "verdict")
	for _, h := range res.Harmonics {
		if !h.Watched && h.BackgroundPct == nil && !h.ExceedsPlanning {
			continue
		}
		band, bg, rv, verdict := "-", "-", "-", "ok"
		if h.Watched {
			band = fmtGain(h.BandGain)
		}
		if h.BackgroundPct != nil {
			bg, rv = fmt.Sprintf("%.3g", *h.BackgroundPct), fmt.Sprintf("%.3g", *h.ReceivingPct)
			if h.ExceedsPlanning {
				verdict = "exceeds planning level"
			}
		} else if h.AllowedBackgroundPct > 0 {
			verdict = fmt.Sprintf("ok if background <= %.3g %%", h.AllowedBackgroundPct)
		}
		if h.OverLimit {
			verdict = "gain over limit; " + verdict
		}
		_ = ht.Add(strconv.Itoa(h.Order), fmt.Sprintf("%.4g", h.FHz), h.Sequence, fmtGain(h.Gain), band,
			fmt.Sprintf("%.3g", h.PlanningPct), bg, rv, verdict)
	}
	if len(ht.Rows) > 0 {
		sec.Tables = append(sec.Tables, report.TableView{Caption: "Harmonic screening (watched harmonics and those with a background level)", Table: ht})
	}
	sec.Notes = []string{
		"Gain is |Vr/E|, the receiving-end voltage over the source EMF, with the elements listed above in service (a receiving-end system is passive: its EMF shorted); the background harmonic voltage at the sending bus is taken as the source EMF, so the receiving-end level is background × gain.",
		"Harmonics that are multiples of 3 are zero sequence in a balanced system: they are screened on the zero-sequence network where the study gives zero-sequence data, and marked positive-sequence only where it does not.",
	}
	p, err := report.ScanPlot(scanPlotData(rr.st, res))
	if err != nil {
		return report.Section{}, err
	}
	f, err := rr.figure("scan.svg", "Gain |Vr/E| against harmonic order, with the watched harmonics and the gain limit", "gain of the receiving-end voltage over the source EMF against harmonic order on a logarithmic gain axis, resonance peaks labelled", p)
	if err != nil {
		return report.Section{}, err
	}
	sec.Figures = append(sec.Figures, f)
	if res.SourceStrength != nil && res.strength != nil {
		mp, err := report.ScanMapPlot(scanMapData(rr.st, res))
		if err != nil {
			return report.Section{}, err
		}
		f, err := rr.figure("scan_map.svg", "Gain over frequency and source short-circuit level", "heat map of the gain against harmonic order and source short-circuit level, with the first resonance marked", mp)
		if err != nil {
			return report.Section{}, err
		}
		sec.Figures = append(sec.Figures, f)
	}
	t, err := scanTable(res)
	if err != nil {
		return report.Section{}, err
	}
	if err := rr.table("scan.csv", t); err != nil {
		return report.Section{}, err
	}
	sec.Files = []string{"scan.csv"}
	return sec, nil
}

// energiseSection is the energisation part: the waveforms by the study's method, the
// lattice diagram, energise.csv and the COMTRADE record.
func (rr *reportRun) energiseSection() (report.Section, error) {
	const id, title = "energise", "Energisation (far end open)"
	res, err := computeEnergise(rr.st, "")
	if err != nil {
		if !cannotRun(err) {
			return report.Section{}, err
		}
		// The study's method cannot treat it: fall back on the general method.
		why := err
		if res, err = computeEnergise(rr.st, "laplace"); err != nil {
			if cannotRun(err) {
				return notRunSection(id, title, err), nil
			}
			return report.Section{}, err
		}
		res.Notes = append([]string{fmt.Sprintf("the study's method could not run (%v); shown by the numerical Laplace transform instead", why)}, res.Notes...)
	}
	sec := report.Section{ID: id, Title: title, Verdict: report.Pass}
	sec.Reading = fmt.Sprintf("open-end peak %+.4g pu (%.0f kV) at %.3g ms by the %s method", res.PeakPU, math.Abs(res.PeakKV), res.TPeakMs, res.Method)
	peakOver, text := energiseOver(res, energiseLimit())
	if peakOver {
		sec.Verdict = report.Flagged
	}
	sec.Reading += ": " + text
	excitation := "1 pu step of EMF at t = 0"
	if res.Waveform == "sine" {
		excitation = fmt.Sprintf("sine EMF, closing at %.0f°", res.CloseDeg)
	}
	sec.Facts = []report.Fact{
		{Name: "method", Value: res.Method},
		{Name: "excitation", Value: excitation},
		{Name: "trapped charge", Value: fmt.Sprintf("%g pu", res.TrappedPU)},
		{Name: "per-unit base", Value: fmt.Sprintf("peak phase-to-earth EMF, %.1f kV", res.BaseKV)},
		{Name: "receiving-end peak", Value: fmt.Sprintf("%+.3f pu (%+.0f kV) at %.3f ms", res.PeakPU, res.PeakKV, res.TPeakMs), Flag: peakOver},
		{Name: "sending-end peak", Value: fmt.Sprintf("%+.3f pu at %.3f ms", res.PeakSendingPU, res.TPeakSendingMs)},
		{Name: "travel time", Value: fmt.Sprintf("%.4g ms", res.TravelTimeMs)},
		{Name: "duration, time step", Value: fmt.Sprintf("%.4g ms (%s), %.4g µs", res.DurationMs, res.DurationHow, res.TimeStepUs)},
	}
	var dom []string
	for i, d := range res.Spectrum.Dominant {
		if i == 4 {
			break
		}
		s := fmt.Sprintf("%.4g Hz (h %.2f)", d.FHz, d.Harmonic)
		if d.NearestScan > 0 {
			s += fmt.Sprintf(" near the scan resonance at %.4g Hz", d.NearestScan)
		}
		dom = append(dom, s)
	}
	if len(dom) > 0 {
		sec.Facts = append(sec.Facts, report.Fact{Name: "dominant frequencies of the transient", Value: strings.Join(dom, "; ")})
	}
	sec.Notes = append([]string{res.Limits}, res.Notes...)
	p, err := report.EnergisePlot(energisePlotData(rr.st, res))
	if err != nil {
		return report.Section{}, err
	}
	f, err := rr.figure("energise.svg", "Energisation waveforms: receiving (open) and sending end", "voltage in per unit against time in milliseconds at the open receiving end and at the sending end, the peak marked", p)
	if err != nil {
		return report.Section{}, err
	}
	sec.Figures = append(sec.Figures, f)
	if f, note, err := rr.latticeFigure(res); err != nil {
		return report.Section{}, err
	} else {
		if f != nil {
			sec.Figures = append(sec.Figures, *f)
		}
		if note != "" {
			sec.Notes = append(sec.Notes, note)
		}
	}
	t, err := energiseTable(res)
	if err != nil {
		return report.Section{}, err
	}
	if err := rr.table("energise.csv", t); err != nil {
		return report.Section{}, err
	}
	chans := []report.AnalogChannel{
		{ID: "V receiving", Phase: "A", Circuit: "receiving end", Unit: "kV", Values: scaled(res.VReceivingPU, res.BaseKV)},
		{ID: "V sending", Phase: "A", Circuit: "sending end", Unit: "kV", Values: scaled(res.VSendingPU, res.BaseKV)},
	}
	if len(res.VMiddlePU) == len(res.VReceivingPU) {
		chans = append(chans, report.AnalogChannel{ID: "V mid-line", Phase: "A", Circuit: "mid-line", Unit: "kV", Values: scaled(res.VMiddlePU, res.BaseKV)})
	}
	if err := rr.comtrade("energise", res.TimeStepUs*1e-6, chans); err != nil {
		return report.Section{}, err
	}
	sec.Files = []string{"energise.csv", "energise.cfg", "energise.dat"}
	return sec, nil
}

// latticeFigure draws the lattice diagram: of the study itself when the lattice method
// can treat it, otherwise of the line alone from an ideal source (travel times and
// reflections of the line, said so in the note).
func (rr *reportRun) latticeFigure(res energiseResult) (*report.Figure, string, error) {
	d, note, err := latticeDiagram(rr.st, res)
	if err != nil {
		return nil, "", err
	}
	if note != "" {
		note = strings.ToUpper(note[:1]) + note[1:] + "."
	}
	if d == nil {
		return nil, note, nil
	}
	p, err := report.LatticePlot(report.LatticePlotData{
		Title: "Lattice diagram: " + reportTitle(rr.st), Diagram: d, Sections: sectionNames(rr.st),
		Sine: rr.st.Energise.Waveform == "sine",
	})
	if err != nil {
		return nil, "", err
	}
	f, err := rr.figure("energise_lattice.svg", "Lattice diagram of the energisation", "Bewley lattice diagram: distance along the line across, time downwards, each wavefront labelled with its amplitude", p)
	if err != nil {
		return nil, "", err
	}
	return &f, note, nil
}

// loadingSection is the loading part: both ends held at 1 pu up to twice the SIL, the
// open end, the loadability; loading.svg (three panels) and loading.csv.
func (rr *reportRun) loadingSection() (report.Section, error) {
	const id, title = "loading", "Loading against SIL"
	r, err := computeLoading(rr.st, 1.0)
	if err != nil {
		// computeLoading's errors are problems with the study's data (FILE: key: problem).
		return notRunSection(id, title, err), nil
	}
	sec := report.Section{ID: id, Title: title, Verdict: report.Pass, Notes: r.Notes}
	o, la := r.OpenEnd, r.Loadability
	rise := o.RiseWithShuntsPU
	sec.Reading = fmt.Sprintf("SIL %.0f MW; open-end rise %.3f pu with the line-connected shunts (%.3f for the line alone); loadability %.2f SIL (%.0f MW), %s governs",
		r.SILMW, rise, o.RisePU, la.SIL, la.MW, la.Governs)
	lim := openEndLimit(rr.st)
	if rise > lim.Value {
		sec.Verdict = report.Flagged
		sec.Reading += "; the open-end rise is above the " + lim.From
	} else {
		sec.Reading += "; the open-end rise is within the " + lim.From
	}
	sec.Facts = []report.Fact{
		{Name: "SIL", Value: fmt.Sprintf("%.1f MW", r.SILMW)},
		{Name: "largest power, both ends at 1 pu", Value: fmt.Sprintf("%.1f MW (%.2f SIL) at %.1f°", r.PMaxMW, r.PMaxMW/r.SILMW, r.DeltaAtPMaxDeg)},
		{Name: "open-end rise, line alone", Value: fmt.Sprintf("%.4f pu, charging %.1f Mvar", o.RisePU, o.ChargingMvar)},
		{Name: "open-end rise, with line-connected shunts", Value: fmt.Sprintf("%.4f pu, charging %.1f Mvar", o.RiseWithShuntsPU, o.ChargingShuntsMvar), Flag: rise > lim.Value},
		{Name: "open end from the source EMF |Vr/E|", Value: fmt.Sprintf("%.4f pu", o.RiseFromEMFPU)},
		{Name: fmt.Sprintf("receiving-end reactor for %.3g pu", o.TargetPU), Value: fmt.Sprintf("%.1f Mvar on the bare line, %.1f Mvar beyond the study's shunts", o.ReactorMvar, o.ReactorAddedMvar)},
		{Name: "loadability", Value: fmt.Sprintf("%.2f SIL (%.0f MW): voltage drop %.2f SIL, stability %.2f SIL; %s governs", la.SIL, la.MW, la.VoltageDropSIL, la.StabilitySIL, la.Governs)},
		{Name: "loadability method", Value: la.Method},
	}
	for _, p := range r.Points {
		if math.Abs(p.PSIL-1) < 1e-9 {
			sec.Facts = append(sec.Facts, report.Fact{Name: "at SIL", Value: fmt.Sprintf("angle %.1f°, Qs %.1f Mvar, Qr %.1f Mvar, mid-line %.4f pu", p.DeltaDeg, p.QsMvar, p.QrMvar, p.VMidPU)})
		}
	}
	svg, err := report.RenderStacked(loadingPlots(r), reportPlotW, 3.6*vg.Inch, "svg")
	if err != nil {
		return report.Section{}, fmt.Errorf("drawing loading.svg: %w", err)
	}
	if _, err := rr.out.writeSVG("loading.svg", svg); err != nil {
		return report.Section{}, err
	}
	sec.Figures = []report.Figure{{Title: "Voltage profiles, reactive power against loading, and loadability against length", File: "loading.svg", SVG: svg,
		Alt: "three panels: voltage along the line for several loadings; reactive power at both ends against loading in multiples of SIL; loadability in multiples of SIL against line length with this line marked"}}
	t := report.NewTable("p_mw", "p_sil", "delta_deg", "qs_mvar", "qr_mvar", "losses_mw", "v_mid_pu", "v_max_pu", "x_v_max_km", "v_min_pu", "x_v_min_km", "qs_net_mvar", "qr_net_mvar")
	for _, p := range r.Points {
		if err := t.Add(p.PMW, p.PSIL, p.DeltaDeg, p.QsMvar, p.QrMvar, p.LossesMW, p.VMidPU, p.VMaxPU, p.XVMaxKm, p.VMinPU, p.XVMinKm, p.QsNetMvar, p.QrNetMvar); err != nil {
			return report.Section{}, err
		}
	}
	if err := rr.table("loading.csv", t); err != nil {
		return report.Section{}, err
	}
	sec.Files = []string{"loading.csv"}
	return sec, nil
}
