package analysis

import (
	"context"
	"math"

	"github.com/telegrapher/telegrapher/cmd/telegrapher/internal/study"
)

// RemedyResult is the remedy search of a study: the cheapest change within its
// [levers] meeting every [targets] (remedy_search.go), with the study as given and
// the proposal evaluated in full.
type RemedyResult struct {
	Before   RemedyEval      // the study as given
	After    RemedyEval      // the proposal
	Proposal RemedyCandidate // the change proposed, rounded as a study file gives it when that still meets the targets
	Chosen   RemedyCandidate // the change the search found, before rounding
	Feasible bool
	Capped   bool // the search stopped at RemedyMaxSwitching switching runs
	// Infeasible lists the targets no change within the levers meets (alone, or
	// together with the others); Binding is the target that cannot be met.
	Infeasible []Infeasible
	Binding    string
	Evals      int          // candidates evaluated
	Runs       int          // statistical switching runs made
	ByStage    []StageCount // candidates per stage, each stage once
	// Sweep is the first resonance and the watched gain against the reactor at one
	// end (the other end as proposed); nil without a reactor lever.
	Sweep *ReactorSweep
	// PIR is u2 against the pre-insertion resistor for the chosen reactor pair.
	PIR []PIRSample
}

// ReactorSweep is the harmonic measures of the proposal with the reactor at End
// ("sending" or "receiving") swept over its lever.
type ReactorSweep struct {
	End   string
	Q     []float64 // var added
	First []float64 // Hz, the lowest gain peak above 1.05 f0 that magnifies; 0 = none
	Gain  []float64 // the largest watched band gain
}

// Remedy runs the remedy search of st (which must have [targets]): the study as
// given, the search when it misses a target, the targets that cannot be met, the
// proposal rounded to a study file's precision and evaluated in full, and the sweep of
// a reactor lever for the plot. It stops at the next candidate when ctx ends.
func Remedy(ctx context.Context, st *study.Study, progress RemedyProgress) (*RemedyResult, error) {
	spec := st.Remedy()
	if !spec.Present {
		return nil, inputf(st.File, "targets", "the study has no [targets]; give e.g. [targets] max_open_end_pu = 1.05 and [levers] reactor_mvar_receiving = [0, 300]")
	}
	st = memoLines(st)
	rs, err := NewRemedySearch(ctx, st, progress)
	if err != nil {
		return nil, err
	}
	lv := spec.Levers
	full := func(c RemedyCandidate) (RemedyEval, error) {
		rs.setStage("full evaluations (the study as given, the proposal)")
		e, err := rs.evalAll(c)
		if err != nil {
			return e, err
		}
		g, first, err := WatchedGain(ctx, RemedyStudy(st, c), rs.freqs)
		if err != nil {
			return e, err
		}
		e.Figs.Gain, e.Figs.FirstResonanceHz = g, first
		return rs.judge(c, e.Figs), nil
	}
	res := &RemedyResult{}
	if res.Before, err = full(RemedyCandidate{}); err != nil {
		return nil, err
	}
	var chosen RemedyEval
	feasible, capped := false, false
	if res.Before.Violation == 0 {
		chosen, feasible = res.Before, true
	} else {
		if chosen, feasible, capped, err = rs.search(); err != nil {
			return nil, err
		}
		if !feasible && !capped {
			// Which targets no change within the levers can meet, and the cheapest
			// change that meets all the others.
			var alt RemedyEval
			var others bool
			if res.Infeasible, alt, others, err = rs.separate(); err != nil {
				return nil, err
			}
			if others {
				chosen = alt
			}
		}
	}
	// Round the proposal to what a study file would say (0.1 Mvar, 1 ohm) when it
	// still meets the targets, and evaluate it in full.
	c := chosen.Cand
	if c != (RemedyCandidate{}) {
		r := c
		up := func(q float64, rg *study.Range) float64 {
			if q == 0 || rg == nil {
				return q
			}
			return math.Min(math.Ceil(q/1e5)*1e5, rg.Max)
		}
		r.ReactorSending = up(r.ReactorSending, lv.ReactorSending)
		r.ReactorReceiving = up(r.ReactorReceiving, lv.ReactorReceiving)
		if rg := lv.Preinsertion; rg != nil && r.Preinsertion > 0 {
			r.Preinsertion = math.Max(rg.Min, math.Min(rg.Max, math.Round(r.Preinsertion)))
		}
		if !feasible {
			c = r
		} else if e, err := full(r); err == nil && e.Violation == 0 {
			c = r
		} else if err := ctx.Err(); err != nil {
			return nil, err
		}
	}
	if res.After, err = full(c); err != nil {
		return nil, err
	}
	if feasible && res.After.Violation > 0 {
		feasible = false
	}
	res.Feasible, res.Capped, res.Proposal, res.Chosen = feasible, capped, c, chosen.Cand
	if !feasible {
		res.Binding = res.After.Binding
		if len(res.Infeasible) > 0 {
			res.Binding = res.Infeasible[0].Target
		}
		if res.Binding == "" {
			res.Binding = res.Before.Binding
		}
	}
	res.Evals, res.Runs, res.ByStage = rs.evals, rs.runs, rs.merged()

	if r := lv.ReactorReceiving; r != nil || lv.ReactorSending != nil {
		end := "receiving"
		if r == nil {
			r, end = lv.ReactorSending, "sending"
		}
		sw := &ReactorSweep{End: end}
		const n = 41
		for i := 0; i < n; i++ {
			q := r.Max * float64(i) / (n - 1)
			sc := c
			if end == "receiving" {
				sc.ReactorReceiving = q
			} else {
				sc.ReactorSending = q
			}
			g, first, err := WatchedGain(ctx, RemedyStudy(st, sc), rs.freqs)
			if err != nil {
				return nil, err
			}
			sw.Q, sw.First, sw.Gain = append(sw.Q, q), append(sw.First, first), append(sw.Gain, g)
		}
		res.Sweep = sw
	}
	res.PIR = rs.pirSamples[[2]float64{chosen.Cand.ReactorSending, chosen.Cand.ReactorReceiving}]
	return res, nil
}
