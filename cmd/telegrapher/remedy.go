package main

// The remedy command: the cheapest change of the study's levers that meets every
// target (contract: "Remedies"; the search and the cost weights are at the top of
// internal/analysis/remedy_search.go).
//
//	computeRemedyProgress(ctx, st, status)    analysis.Remedy shaped for display:
//	                                          feasible, changes, before and after,
//	                                          binding target, cost, margins left;
//	                                          remedyResult is also the --json document
//	remedyPlots(r) ([]*plot.Plot, error)      the trade-off plots (report.RemedyResonancePlot:
//	                                          first resonance against added reactor with the
//	                                          watched harmonics marked; report.RemedyGainPlot:
//	                                          watched gain against added reactor, with a gain
//	                                          target; report.RemedyResistorPlot: u2 against
//	                                          the pre-insertion resistor)
//	printRemedy(w, r)                         the text summary
//	remedyReportPart(ctx, st, status)         the report's "remedies" section (with the
//	                                          plots for the report to write), ok false
//	                                          when the study has no [targets]
//
// computeRemedy returns an input error (exit 2) when the study has no [targets].

import (
	"context"
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
)

var remedyCommand = func() *command {
	return &command{
		name:  "remedy",
		args:  "STUDY [--json] [--plot F]",
		short: "cheapest change of the levers that meets the study's targets",
		long: `
Searches the levers of [levers] for the cheapest change that meets every target of
[targets]:

  [targets]  max_open_end_pu   no-load |Vr/Vs| at frequency_hz (with line-connected shunts)
             max_gain_watched  largest gain |Vr/E| within the watch band of a watched harmonic
             max_u2_pu         statistical switching u2 (IEC 60071-1 base)
             min_margin_pct    least margin to switching.siwl_kv
  [levers]   reactor_mvar_sending, reactor_mvar_receiving = [min, max]  line-connected
             reactors added (none, or a rating within the range); preinsertion_ohm =
             [min, max]; controlled_closing = true (each pole closes where the voltage
             across its contacts is zero, scattered by controlled_sigma_ms, default 1);
             arresters_kv = [ratings]  arresters at both line ends

Every candidate is evaluated by the computations of the ordinary commands on a modified
copy of the study (open end as 'loading', screening as 'scan', statistical switching as
'switching', with the study's seed). Cost units: reactor 30 per end plus 1 per Mvar,
pre-insertion resistor 60, controlled closing 40, arresters 15; added reactors have
X/R = 300.

Reports the cheapest change with the figures before and after and the margin left to
each target; where nothing meets the targets, the closest case and the target that
binds. --json writes feasible, changes, before, after, binding, cost, margins_left;
--plot writes the trade-offs (first resonance against reactor rating with the watched
harmonics marked; u2 against the pre-insertion resistor).`,
		flags: func(fs *flag.FlagSet, stdout, stderr io.Writer) func(context.Context, []string) error {
			asJSON := fs.Bool("json", false, "write the results as one JSON document")
			plotPath := fs.String("plot", "", "write the trade-off plots to `F` (.png or .svg)")
			return func(ctx context.Context, args []string) error {
				st, err := studyArg("remedy", args, stderr, [2]string{"plot", *plotPath})
				if err != nil {
					return err
				}
				res, err := computeRemedyProgress(ctx, st, newStatusLine(stderr))
				if err != nil {
					return err
				}
				if *plotPath != "" {
					plots, err := remedyPlots(&res)
					if err != nil {
						return usagef("--plot %s: %v", *plotPath, err)
					}
					if err := report.SaveStacked(plots, 20*vg.Centimeter, 11*vg.Centimeter, *plotPath); err != nil {
						return fmt.Errorf("--plot %s: %v", *plotPath, err)
					}
				}
				if *asJSON {
					return writeJSON(stdout, &res)
				}
				printRemedy(stdout, &res)
				return nil
			}
		},
	}
}()

// remedyFigures are the figures of the study before or after the change (the keys
// that apply: the switching ones only with a switching target).
type remedyFigures struct {
	OpenEndPU        *float64 `json:"open_end_pu,omitempty"`
	GainWatched      *float64 `json:"gain_watched,omitempty"`
	U2PU             *float64 `json:"u2_pu,omitempty"`
	MarginPct        *float64 `json:"margin_pct,omitempty"`
	FirstResonanceHz *float64 `json:"first_resonance_hz,omitempty"`
}

// remedyChanges are the levers that change, keyed as [levers].
type remedyChanges struct {
	ReactorMvarSending   *float64 `json:"reactor_mvar_sending,omitempty"`
	ReactorMvarReceiving *float64 `json:"reactor_mvar_receiving,omitempty"`
	PreinsertionOhm      *float64 `json:"preinsertion_ohm,omitempty"`
	ControlledClosing    *bool    `json:"controlled_closing,omitempty"`
	ControlledSigmaMs    *float64 `json:"controlled_sigma_ms,omitempty"`
	ArrestersKV          *float64 `json:"arresters_kv,omitempty"`
}

// remedyTargetsJSON are the targets as given.
type remedyTargetsJSON struct {
	MaxOpenEndPU   *float64 `json:"max_open_end_pu,omitempty"`
	MaxGainWatched *float64 `json:"max_gain_watched,omitempty"`
	MaxU2PU        *float64 `json:"max_u2_pu,omitempty"`
	MinMarginPct   *float64 `json:"min_margin_pct,omitempty"`
}

// remedyCostWeights states the cost model.
type remedyCostWeights struct {
	ReactorPerMvar float64 `json:"reactor_per_mvar"`
	ReactorPerEnd  float64 `json:"reactor_per_end"`
	Preinsertion   float64 `json:"preinsertion"`
	Controlled     float64 `json:"controlled_closing"`
	Arresters      float64 `json:"arresters"`
}

// remedyResult is the whole remedy search; it is also the --json document.
type remedyResult struct {
	Title    string        `json:"title,omitempty"`
	Feasible bool          `json:"feasible"`
	Changes  remedyChanges `json:"changes"`
	Before   remedyFigures `json:"before"`
	After    remedyFigures `json:"after"`
	Binding  string        `json:"binding,omitempty"`
	// Infeasible lists, when no change meets every target, the targets that cannot be
	// met; Changes is then the cheapest change meeting all the others.
	Infeasible []remedyInfeasible `json:"infeasible,omitempty"`
	// MarginsLeft is, per target, how far the result is inside it, in the target's
	// unit (limit - value for a maximum, value - limit for a minimum; < 0 = missed).
	MarginsLeft     map[string]float64 `json:"margins_left"`
	Cost            float64            `json:"cost"`
	CostWeights     remedyCostWeights  `json:"cost_weights"`
	Targets         remedyTargetsJSON  `json:"targets"`
	CandidatesTried int                `json:"candidates_tried"`
	// CandidatesByStage splits CandidatesTried by the stage of the search that
	// evaluated them (the stages the status line shows), in order of first use.
	CandidatesByStage []remedyStageCount `json:"candidates_by_stage"`
	SwitchingRuns     int                `json:"switching_runs"`
	Notes             []string           `json:"notes"`
	Caution           string             `json:"caution"`

	// For the plots.
	frequencyHz float64
	watch       []int
	watchBand   float64
	sweepEnd    string    // "receiving" or "sending": the end the resonance sweep varies
	sweepMvar   []float64 // added rating at that end
	sweepFirst  []float64 // first resonance, harmonic order (0 = none in the scan)
	sweepGain   []float64 // largest watched-harmonic gain
	targetGain  float64
	chosenMvar  float64 // the proposed rating at that end
	pir         []analysis.PIRSample
	chosenOhm   float64
	targetU2    float64
}

// computeRemedy searches st's levers for the cheapest change meeting its targets.
func computeRemedy(st *study.Study) (remedyResult, error) {
	return computeRemedyProgress(context.Background(), st, nil)
}

func computeRemedyProgress(ctx context.Context, st *study.Study, status *statusLine) (remedyResult, error) {
	var res remedyResult
	a, err := analysis.Remedy(ctx, st, status)
	status.Clear()
	if err != nil {
		return res, err
	}
	spec := st.Remedy()
	tg, lv := spec.Targets, spec.Levers
	res.Title, res.Caution = st.Title, Caution
	res.CostWeights = remedyCostWeights{analysis.RemedyCostPerMvar, analysis.RemedyCostReactorBay, analysis.RemedyCostPreinsertion, analysis.RemedyCostControlled, analysis.RemedyCostArresters}
	res.Targets = remedyTargetsJSON{MaxOpenEndPU: optF(tg.HasOpenEnd, tg.OpenEndPU), MaxGainWatched: optF(tg.HasGainWatched, tg.GainWatched),
		MaxU2PU: optF(tg.HasU2, tg.U2PU), MinMarginPct: optF(tg.HasMargin, tg.MarginPct)}
	res.Before, res.After = figuresJSON(a.Before.Figs, st.Frequency), figuresJSON(a.After.Figs, st.Frequency)
	if a.Before.Violation == 0 {
		res.Notes = append(res.Notes, "the study as given meets every target: no change is needed")
	}
	for _, x := range a.Infeasible {
		res.Infeasible = append(res.Infeasible, remedyInfeasible{Target: x.Target, Limit: x.Limit, Reachable: x.Reachable,
			With: changesJSON(x.With, lv), ConflictsWith: x.ConflictsWith, Capped: x.Capped})
	}
	c := a.Proposal
	res.Feasible, res.Binding = a.Feasible, a.Binding
	res.Cost = c.Cost()
	res.Changes = changesJSON(c, lv)
	res.MarginsLeft = marginsLeft(tg, a.After.Figs)
	res.CandidatesTried, res.SwitchingRuns = a.Evals, a.Runs
	for _, b := range a.ByStage {
		res.CandidatesByStage = append(res.CandidatesByStage, remedyStageCount{Stage: b.Stage, Candidates: b.Candidates})
	}
	if a.Capped {
		res.Notes = append(res.Notes, fmt.Sprintf("the search stopped after %d statistical switching runs: the closest case found is shown", analysis.RemedyMaxSwitching))
	}
	if !tg.Switching() && (lv.Preinsertion != nil || lv.Controlled || len(lv.ArrestersV) > 0) {
		res.Notes = append(res.Notes, "levers preinsertion_ohm, controlled_closing and arresters_kv act on switching overvoltages only; with no switching target they are not used")
	}
	if tg.Switching() {
		res.Notes = append(res.Notes, fmt.Sprintf("switching figures: %d seeded shots (switching.seed %d) per candidate, the study's [switching] settings", st.Switching.Shots, st.Switching.Seed))
	}
	if c.Controlled {
		res.Notes = append(res.Notes, "controlled closing: apply it as [switching] controlled_closing = true with controlled_sigma_ms; each pole aims where the voltage across its contacts is zero")
	}
	if c.ReactorSending > 0 || c.ReactorReceiving > 0 {
		res.Notes = append(res.Notes, fmt.Sprintf("to apply: add a [[shunt]] with connection = \"line\", the rating as mvar and q_factor = %d at each end that changes", analysis.RemedyReactorQ))
	}

	// Plot data: the first resonance against the reactor at one end (the other end as
	// proposed), and u2 against the resistor.
	set := freqscan.ScreenSettings{Watch: st.Scan.WatchHarmonics, WatchBand: st.Scan.WatchBand}.WithDefaults()
	res.frequencyHz, res.watch, res.watchBand = st.Frequency, set.Watch, set.WatchBand
	if sw := a.Sweep; sw != nil {
		res.sweepEnd = sw.End
		for k, q := range sw.Q {
			res.sweepMvar = append(res.sweepMvar, q/1e6)
			res.sweepFirst = append(res.sweepFirst, sw.First[k]/st.Frequency)
			res.sweepGain = append(res.sweepGain, sw.Gain[k])
		}
		res.chosenMvar = c.ReactorReceiving / 1e6
		if sw.End == "sending" {
			res.chosenMvar = c.ReactorSending / 1e6
		}
	}
	res.pir = a.PIR
	res.chosenOhm, res.targetU2, res.targetGain = c.Preinsertion, tg.U2PU, tg.GainWatched
	return res, nil
}

// remedyStageCount is how many candidates one stage of the search evaluated.
type remedyStageCount struct {
	Stage      string `json:"stage"`
	Candidates int    `json:"candidates"`
}

// remedyInfeasible is a target no change within the levers meets: alone (Reachable
// is then the best value of its measure the search found, With the change giving
// it), or together with the others (ConflictsWith lists them).
type remedyInfeasible struct {
	Target        string        `json:"target"`
	Limit         float64       `json:"limit"`
	Reachable     *float64      `json:"reachable,omitempty"`
	With          remedyChanges `json:"with"`
	ConflictsWith []string      `json:"conflicts_with,omitempty"`
	Capped        bool          `json:"search_capped,omitempty"`
}

func optF(ok bool, v float64) *float64 {
	if !ok {
		return nil
	}
	return &v
}

func figuresJSON(f analysis.RemedyFigures, f0 float64) remedyFigures {
	out := remedyFigures{OpenEndPU: optF(true, f.OpenEnd), GainWatched: optF(true, f.Gain)}
	if f.FirstResonanceHz > 0 {
		out.FirstResonanceHz = optF(true, f.FirstResonanceHz)
	}
	if f.HasSw {
		out.U2PU = optF(true, f.U2)
	}
	if f.HasMargin {
		out.MarginPct = optF(true, f.Margin)
	}
	return out
}

func changesJSON(c analysis.RemedyCandidate, lv study.Levers) remedyChanges {
	var ch remedyChanges
	if c.ReactorSending > 0 {
		ch.ReactorMvarSending = optF(true, c.ReactorSending/1e6)
	}
	if c.ReactorReceiving > 0 {
		ch.ReactorMvarReceiving = optF(true, c.ReactorReceiving/1e6)
	}
	if c.Preinsertion > 0 {
		ch.PreinsertionOhm = optF(true, c.Preinsertion)
	}
	if c.Controlled {
		t := true
		ch.ControlledClosing = &t
		ch.ControlledSigmaMs = optF(true, lv.ControlledSigma*1e3)
	}
	if c.ArresterV > 0 {
		ch.ArrestersKV = optF(true, c.ArresterV/1e3)
	}
	return ch
}

func marginsLeft(tg study.Targets, f analysis.RemedyFigures) map[string]float64 {
	m := map[string]float64{}
	if tg.HasOpenEnd {
		m["max_open_end_pu"] = tg.OpenEndPU - f.OpenEnd
	}
	if tg.HasGainWatched {
		m["max_gain_watched"] = tg.GainWatched - f.Gain
	}
	if tg.HasU2 && f.HasSw {
		m["max_u2_pu"] = tg.U2PU - f.U2
	}
	if tg.HasMargin && f.HasMargin {
		m["min_margin_pct"] = f.Margin - tg.MarginPct
	}
	return m
}

// remedyPlots returns the trade-off plots the study's levers allow.
func remedyPlots(r *remedyResult) ([]*plot.Plot, error) {
	var plots []*plot.Plot
	if len(r.sweepMvar) > 0 {
		var w []float64
		for _, h := range r.watch {
			w = append(w, float64(h))
		}
		d := report.RemedyResonanceData{
			Mvar: r.sweepMvar, FirstHarmonic: r.sweepFirst, Watched: w, Band: r.watchBand,
			ChosenMvar: r.chosenMvar, End: r.sweepEnd, Gain: r.sweepGain, TargetGain: r.targetGain,
		}
		plots = append(plots, report.RemedyResonancePlot(d))
		if r.targetGain > 0 {
			plots = append(plots, report.RemedyGainPlot(d))
		}
	}
	if len(r.pir) > 1 {
		d := report.RemedyResistorData{ChosenOhm: r.chosenOhm, TargetU2: r.targetU2}
		for _, s := range r.pir {
			d.Ohm = append(d.Ohm, s.Ohm)
			d.U2 = append(d.U2, s.U2)
		}
		plots = append(plots, report.RemedyResistorPlot(d))
	}
	if len(plots) == 0 {
		return nil, fmt.Errorf("nothing to plot: the trade-off plots need a reactor lever, or a preinsertion_ohm lever searched for a switching target")
	}
	return plots, nil
}

func printRemedy(w io.Writer, r *remedyResult) {
	if r.Title != "" {
		fmt.Fprintln(w, r.Title)
	}
	if r.Feasible {
		fmt.Fprintf(w, "Remedy: every target met, cost %.1f units\n", r.Cost)
	} else {
		fmt.Fprintf(w, "Remedy: no change within the levers meets every target; binding target: %s\n", r.Binding)
		for _, x := range r.Infeasible {
			fmt.Fprintln(w, "  "+infeasibleWords(x))
		}
	}
	ch := remedyChangeWords(r.Changes)
	if len(ch) == 0 {
		ch = []string{"none"}
	}
	switch {
	case r.Feasible:
		fmt.Fprintln(w, "\nChanges:")
	case len(r.Infeasible) > 0:
		fmt.Fprintf(w, "\nChanges, the cheapest meeting every other target (cost %.1f units):\n", r.Cost)
	default:
		fmt.Fprintf(w, "\nChanges, the closest case found (cost %.1f units):\n", r.Cost)
	}
	for _, s := range ch {
		fmt.Fprintln(w, "  "+s)
	}
	fmt.Fprintf(w, "\n%-34s %12s %12s %12s %12s\n", "", "before", "after", "target", "margin left")
	row := func(name, key string, b, a, t *float64, unit string) {
		if b == nil && a == nil {
			return
		}
		cell := func(p *float64) string {
			if p == nil {
				return "-"
			}
			return bounded(*p, "%.4g", atResonance)
		}
		left := "-"
		if m, ok := r.MarginsLeft[key]; ok {
			left = bounded(m, "%+.3g", atResonance)
		}
		fmt.Fprintf(w, "%-34s %12s %12s %12s %12s\n", name+" ("+unit+")", cell(b), cell(a), cell(t), left)
	}
	row("open-end voltage", "max_open_end_pu", r.Before.OpenEndPU, r.After.OpenEndPU, r.Targets.MaxOpenEndPU, "pu")
	row("gain near watched harmonics", "max_gain_watched", r.Before.GainWatched, r.After.GainWatched, r.Targets.MaxGainWatched, "-")
	row("switching u2", "max_u2_pu", r.Before.U2PU, r.After.U2PU, r.Targets.MaxU2PU, "pu")
	row("margin to SIWL", "min_margin_pct", r.Before.MarginPct, r.After.MarginPct, r.Targets.MinMarginPct, "%")
	fr := func(p *float64) *float64 {
		if p == nil {
			return nil
		}
		h := *p / r.frequencyHz
		return &h
	}
	row("first resonance", "", fr(r.Before.FirstResonanceHz), fr(r.After.FirstResonanceHz), nil, "harmonic")
	fmt.Fprintf(w, "\nCost units: reactor %g per end + %g per Mvar, pre-insertion resistor %g, controlled closing %g, arresters %g\n",
		r.CostWeights.ReactorPerEnd, r.CostWeights.ReactorPerMvar, r.CostWeights.Preinsertion, r.CostWeights.Controlled, r.CostWeights.Arresters)
	var parts []string
	for _, b := range r.CandidatesByStage {
		parts = append(parts, fmt.Sprintf("%d %s", b.Candidates, b.Stage))
	}
	fmt.Fprintf(w, "Candidates evaluated: %d (%s); statistical switching runs: %d\n\n", r.CandidatesTried, strings.Join(parts, ", "), r.SwitchingRuns)
	for _, n := range r.Notes {
		fmt.Fprintln(w, "Note: "+strings.TrimSpace(n))
	}
	fmt.Fprintln(w, "\n"+Caution)
}

// remedyFigure is a plot of the remedies section, for the report to write and inline.
type remedyFigure struct {
	Name, Title, Alt string // file name (.svg), title, text description
	Plot             *plot.Plot
}

// remedyReportPart returns the report's "remedies" section of st and its plots; ok is
// false when st has no [targets] (the report then has no such section).
func remedyReportPart(ctx context.Context, st *study.Study, status *statusLine) (sec report.Section, figs []remedyFigure, ok bool, err error) {
	if !st.Remedy().Present {
		return sec, nil, false, nil
	}
	r, err := computeRemedyProgress(ctx, st, status)
	if err != nil {
		return sec, nil, true, err
	}
	sec = report.Section{ID: "remedies", Title: "Remedies", Verdict: report.Pass, Notes: r.Notes}
	changes := remedyChangeWords(r.Changes)
	switch {
	case r.Feasible && len(changes) == 0:
		sec.Reading = "the study as given meets every target"
	case r.Feasible:
		// The study as given misses a target: the section needs attention even
		// though a change within the levers meets them all.
		sec.Verdict = report.Flagged
		sec.Reading = fmt.Sprintf("the study as given misses a target; cheapest change meeting every target (cost %.1f units): %s", r.Cost, strings.Join(changes, "; "))
	default:
		sec.Verdict = report.Flagged
		if len(changes) == 0 {
			changes = []string{"none"}
		}
		var why []string
		for _, x := range r.Infeasible {
			why = append(why, infeasibleWords(x))
		}
		if len(why) > 0 {
			sec.Reading = fmt.Sprintf("no change within the levers meets every target: %s; cheapest change meeting every other target (cost %.1f units): %s",
				strings.Join(why, "; "), r.Cost, strings.Join(changes, "; "))
		} else {
			sec.Reading = fmt.Sprintf("no change within the levers meets every target; binding: %s; closest case: %s", r.Binding, strings.Join(changes, "; "))
		}
	}
	fig := func(name string, b, a *float64, unit string, key string) {
		if b == nil || a == nil {
			return
		}
		v := func(x float64) string {
			if math.IsInf(x, 0) {
				return "unbounded"
			}
			return fmt.Sprintf("%.4g", x)
		}
		f := report.Fact{Name: name, Value: fmt.Sprintf("%s → %s %s", v(*b), v(*a), unit)}
		if m, has := r.MarginsLeft[key]; has {
			f.Value += fmt.Sprintf(" (margin left %s)", v(m))
			f.Flag = m < 0
		}
		sec.Facts = append(sec.Facts, f)
	}
	fig("open-end voltage, before → after", r.Before.OpenEndPU, r.After.OpenEndPU, "pu", "max_open_end_pu")
	fig("largest gain near a watched harmonic", r.Before.GainWatched, r.After.GainWatched, "", "max_gain_watched")
	fig("switching u2", r.Before.U2PU, r.After.U2PU, "pu", "max_u2_pu")
	fig("margin to SIWL", r.Before.MarginPct, r.After.MarginPct, "%", "min_margin_pct")
	sec.Facts = append(sec.Facts, report.Fact{Name: "cost units", Value: fmt.Sprintf("reactor %g per end + %g per Mvar, pre-insertion resistor %g, controlled closing %g, arresters %g",
		r.CostWeights.ReactorPerEnd, r.CostWeights.ReactorPerMvar, r.CostWeights.Preinsertion, r.CostWeights.Controlled, r.CostWeights.Arresters)})
	plots, perr := remedyPlots(&r)
	if perr == nil {
		for _, p := range plots {
			switch {
			case strings.HasPrefix(p.Title.Text, "First resonance"):
				figs = append(figs, remedyFigure{Name: "remedy_resonance.svg", Title: "First resonance against the added reactor", Plot: p,
					Alt: "first resonance (harmonic order) against the added line-connected reactor rating, watched harmonics and their bands marked, proposed rating marked"})
			case strings.HasPrefix(p.Title.Text, "Largest gain"):
				figs = append(figs, remedyFigure{Name: "remedy_gain.svg", Title: "Watched-harmonic gain against the added reactor", Plot: p,
					Alt: "largest gain within the watched harmonic bands against the added reactor rating, target and proposed rating marked"})
			default:
				figs = append(figs, remedyFigure{Name: "remedy_resistor.svg", Title: "u2 against the pre-insertion resistor", Plot: p,
					Alt: "statistical switching u2 against the pre-insertion resistor value, target and proposed value marked"})
			}
		}
	}
	return sec, figs, true, nil
}

// remedyChangeWords describes the changes in words.
func remedyChangeWords(c remedyChanges) []string {
	var ch []string
	if c.ReactorMvarSending != nil {
		ch = append(ch, fmt.Sprintf("add a %.1f Mvar line-connected reactor at the sending end", *c.ReactorMvarSending))
	}
	if c.ReactorMvarReceiving != nil {
		ch = append(ch, fmt.Sprintf("add a %.1f Mvar line-connected reactor at the receiving end", *c.ReactorMvarReceiving))
	}
	if c.PreinsertionOhm != nil {
		ch = append(ch, fmt.Sprintf("pre-insertion resistor %.0f ohm", *c.PreinsertionOhm))
	}
	if c.ControlledClosing != nil {
		ch = append(ch, fmt.Sprintf("controlled closing (scatter %.2g ms)", *c.ControlledSigmaMs))
	}
	if c.ArrestersKV != nil {
		ch = append(ch, fmt.Sprintf("surge arresters rated %.0f kV at both line ends", *c.ArrestersKV))
	}
	return ch
}

// infeasibleWords says why a target cannot be met: "max_u2_pu = 1.05 cannot be met
// within the levers (the best reached is 1.32, by: pre-insertion resistor 412 ohm)".
func infeasibleWords(x remedyInfeasible) string {
	if len(x.ConflictsWith) > 0 {
		return fmt.Sprintf("%s = %.4g cannot be met together with %s", x.Target, x.Limit, strings.Join(x.ConflictsWith, ", "))
	}
	s := fmt.Sprintf("%s = %.4g cannot be met within the levers", x.Target, x.Limit)
	if x.Reachable != nil {
		with := remedyChangeWords(x.With)
		if len(with) == 0 {
			with = []string{"no change"}
		}
		v := fmt.Sprintf("%.4g", *x.Reachable)
		if math.IsInf(*x.Reachable, 0) {
			v = "unbounded"
		}
		s += fmt.Sprintf(" (the best reached is %s, by: %s)", v, strings.Join(with, "; "))
	}
	if x.Capped {
		s += fmt.Sprintf("; the search stopped at its cap of %d statistical switching runs", analysis.RemedyMaxSwitching)
	}
	return s
}
