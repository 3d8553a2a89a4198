package analysis

// The remedy search: the cheapest combination of levers ([levers]) that meets every
// target ([targets]), each candidate evaluated by the computations the ordinary
// commands use on a modified copy of the study.
//
// # Cost
//
// Costs are in plain cost units, a ranking device rather than a price list (common
// practice, no source; the weights are meant to order typical remedies the way
// planners usually do, cheapest first):
//
//	line-connected shunt reactor   RemedyCostReactorBay (30) per line end where one is
//	                               added + RemedyCostPerMvar (1) per Mvar
//	pre-insertion resistor         RemedyCostPreinsertion (60), whatever its value
//	controlled closing             RemedyCostControlled (40)
//	surge arresters at both ends   RemedyCostArresters (15), whatever the rating; among
//	                               ratings of equal cost the highest that meets the
//	                               targets is preferred (more temporary-overvoltage
//	                               capability, less energy)
//
// # Search
//
//  1. Reactors (continuous levers). Every reactor pair of a grid ("none" and
//     remedyGridSteps ratings across each [min, max]) is evaluated on the frequency
//     targets (open-end rise by propagation.OpenEnd as `loading` does; watched-harmonic
//     gain by freqscan.Scan, Peaks and Screen as `scan` does). From each grid pair that
//     meets them while its lower neighbours do not (the frontier: a pair above a
//     feasible one costs more), each added rating is lowered by bisection while the
//     targets stay met (the open-end rise falls monotonically as a reactor grows; near
//     a watched harmonic the bisection finds the edge of the feasible interval the grid
//     point lies in). The cheapest remedyKeepReactors pairs go on; without a frequency
//     target every grid pair goes on.
//  2. Switching levers (discrete ones by enumeration). For each retained reactor pair
//     and each combination of pre-insertion resistor (none / the value minimising u2),
//     controlled closing (off / on) and arrester rating (none / each rating), in
//     increasing order of cost, the statistical switching study is run (seeded, the
//     study's [switching] settings, waves.NewSwitchingSimulator, Run, Statistics,
//     MarginPct as `switching` does) until one meets every target. The resistor value
//     is found once per reactor pair by a grid of remedyPIRGrid values over its range
//     refined by golden-section search on u2.
//
// Where nothing meets the targets together, separate finds the targets no change
// within the levers meets even alone (each searched on its own, with the best value
// it reaches), and the search runs again for the cheapest change meeting all the
// others. Where every target can be met alone but not all together, the target
// whose removal gives the cheapest change meeting the rest is named.

import (
	"context"
	"math"
	"sort"

	"github.com/telegrapher/telegrapher/cmd/telegrapher/internal/study"
	"github.com/telegrapher/telegrapher/freqscan"
	"github.com/telegrapher/telegrapher/propagation"
	"github.com/telegrapher/telegrapher/waves"
)

// Cost weights (cost units; see the top of this file).
const (
	RemedyCostPerMvar      = 1.0
	RemedyCostReactorBay   = 30.0
	RemedyCostPreinsertion = 60.0
	RemedyCostControlled   = 40.0
	RemedyCostArresters    = 15.0
)

// Search settings.
const (
	remedyGridSteps    = 12   // reactor ratings per lever across [min, max]
	remedyBisections   = 12   // bisection steps lowering a reactor rating
	remedyKeepReactors = 3    // reactor pairs carried to the switching stage
	remedyPIRGrid      = 7    // resistor values of the first pass
	remedyGolden       = 8    // golden-section steps refining the resistor value
	RemedyMaxSwitching = 160  // cap on statistical switching runs per search
	RemedyReactorQ     = 300  // X/R of an added reactor (common practice for EHV shunt reactors, no source)
	remedyTol          = 1e-9 // relative slack on a target (rounding)
)

// RemedyCandidate is one setting of the levers; zero values are "no change".
type RemedyCandidate struct {
	ReactorSending   float64 // var added, line-connected at the sending end
	ReactorReceiving float64 // var added at the receiving end
	Preinsertion     float64 // ohm; 0 = the study's setting
	Controlled       bool
	ArresterV        float64 // rated voltage (rms V) of arresters added at both ends; 0 = none
}

// cost returns the candidate's cost in cost units.
func (c RemedyCandidate) Cost() float64 {
	var k float64
	for _, q := range []float64{c.ReactorSending, c.ReactorReceiving} {
		if q > 0 {
			k += RemedyCostReactorBay + RemedyCostPerMvar*q/1e6
		}
	}
	if c.Preinsertion > 0 {
		k += RemedyCostPreinsertion
	}
	if c.Controlled {
		k += RemedyCostControlled
	}
	if c.ArresterV > 0 {
		k += RemedyCostArresters
	}
	return k
}

// RemedyFigures are the figures of one candidate on the targets' measures.
type RemedyFigures struct {
	OpenEnd, Gain    float64 // open-end |Vr/Vs|; largest watched-harmonic band gain
	U2, Margin       float64 // u2 (pu, IEC 60071-1 base); margin to siwl (%)
	HasSw, HasMargin bool    // switching figures computed; margin computed
	FirstResonanceHz float64 // lowest positive-sequence gain peak above the fundamental with gain > 1; 0 = none
}

// RemedyEval is a candidate with its figures and how far it is from the targets.
type RemedyEval struct {
	Cand      RemedyCandidate
	Figs      RemedyFigures
	Violation float64 // largest relative violation over the targets; 0 when all are met
	Binding   string  // the target key violated most ("" when all are met)
}

// RemedySearch holds one search's state.
type RemedySearch struct {
	ctx      context.Context // cancelled: the search stops at the next candidate
	st       *study.Study
	spec     study.RemedySpec
	freqs    []float64
	omega    float64
	modal    waves.ModalLine
	hasModal bool
	runs     int            // statistical switching runs made
	runs0    int            // runs made before the search under way (the cap counts from here)
	evals    int            // candidates evaluated
	progress RemedyProgress // nil: none
	stage    string         // the stage under way, for byStage
	byStage  []StageCount

	pirSamples map[[2]float64][]PIRSample // u2 against resistor value, per reactor pair
}

// StageCount is how many candidates one stage of the search evaluated.
type StageCount struct {
	Stage      string
	Candidates int
}

// setStage names the stage under way (for the count by stage and the status line).
func (rs *RemedySearch) setStage(name string) {
	if rs.stage != name {
		rs.stage = name
		rs.progress.Stage("remedy: " + name)
	}
}

// PIRSample is one point of u2 against the pre-insertion resistor.
type PIRSample struct{ Ohm, U2 float64 }

// NewRemedySearch prepares a search of st; it stops at the next candidate once ctx
// ends, with ctx's error.
func NewRemedySearch(ctx context.Context, st *study.Study, progress RemedyProgress) (*RemedySearch, error) {
	if progress == nil {
		progress = noProgress{}
	}
	rs := &RemedySearch{ctx: ctx, st: st, spec: st.Remedy(), omega: 2 * math.Pi * st.Frequency, progress: progress,
		pirSamples: map[[2]float64][]PIRSample{}}
	var err error
	if rs.freqs, err = ScanGrid(st); err != nil {
		return nil, err
	}
	if rs.spec.Targets.Switching() {
		if err := SwitchingApplicable(st); err != nil {
			return nil, err
		}
		ml, err := ModalLine(st)
		if err != nil {
			return nil, err
		}
		rs.modal, rs.hasModal = ml, true
	}
	return rs, nil
}

// memoLines returns a copy of st whose line constants remember their values per
// frequency (propagation.Memo): every candidate of a search scans the same line at
// the same frequencies, and only the terminations change.
func memoLines(st *study.Study) *study.Study {
	cp := *st
	cp.Line, cp.Zero = propagation.MemoCascade(st.Line), propagation.MemoCascade(st.Zero)
	cp.Network.Line = propagation.MemoCascade(st.Network.Line)
	if st.ZeroNetwork != nil {
		zn := *st.ZeroNetwork
		zn.Line = propagation.MemoCascade(zn.Line)
		cp.ZeroNetwork = &zn
	}
	return &cp
}

// RemedyStudy returns a copy of st with the candidate's changes: added line-connected
// reactors in the positive- and zero-sequence networks (the loader gives the zero
// sequence the same shunts, solidly earthed or, for line-connected reactors, through
// the end's neutral reactor, which added reactors share as in switching; the far
// system stays as the study has it), the pre-insertion resistor, and
// arresters at both line ends. st itself is not changed.
func RemedyStudy(st *study.Study, c RemedyCandidate) *study.Study {
	cp := *st
	opt := st.SwitchingOptions()
	w, v := 2*math.Pi*st.Frequency, st.Voltage
	shunts := append([]freqscan.Shunt(nil), st.Network.Shunts...)
	for _, add := range []struct {
		q   float64
		end freqscan.End
	}{{c.ReactorSending, freqscan.Sending}, {c.ReactorReceiving, freqscan.Receiving}} {
		if add.q > 0 {
			x := v * v / add.q
			shunts = append(shunts, freqscan.Shunt{Name: "added reactor (remedy, " + add.end.String() + ")",
				End: add.end, OnLine: true, L: x / w, R: x / RemedyReactorQ})
		}
	}
	cp.Network.Shunts = shunts
	if st.ZeroNetwork != nil {
		zn := *st.ZeroNetwork
		zn.Shunts = append([]freqscan.Shunt(nil), zn.Shunts...)
		zn.Shunts = append(zn.Shunts, shunts[len(st.Network.Shunts):]...)
		cp.ZeroNetwork = &zn
	}
	if c.Preinsertion > 0 {
		cp.Switching.Preinsertion = c.Preinsertion
	}
	if c.ArresterV > 0 {
		opt.Arresters = append(append([]study.ArresterSpec(nil), opt.Arresters...),
			study.ArresterSpec{Name: "remedy arresters, sending end", At: "sending", RatedV: c.ArresterV, VI: waves.TypicalArrester(c.ArresterV), Typical: true},
			study.ArresterSpec{Name: "remedy arresters, receiving end", At: "receiving", RatedV: c.ArresterV, VI: waves.TypicalArrester(c.ArresterV), Typical: true})
	}
	cp.SetSwitchingOptions(opt)
	return &cp
}

// remedySwitching runs the statistical switching study of the modified study cst
// (SwitchingFiguresOf, as the switching command, with the study's seed and
// settings) and returns u2 (pu of
// Us·√2/√3) and the margin to siwl (%, when set). With controlled closing the shots
// follow waves.ControlledShots instead of random closing.
func (rs *RemedySearch) U2(cst *study.Study, controlled bool) (u2, margin float64, err error) {
	f, err := SwitchingFiguresOf(rs.ctx, cst, rs.modal, controlled, rs.spec.Levers.ControlledSigma)
	if err != nil {
		return 0, 0, err
	}
	rs.runs++
	if f.Margin != nil {
		margin = *f.Margin
	}
	return f.Stats.U2, margin, nil
}

// evalFreq evaluates a candidate on the frequency-domain measures.
func (rs *RemedySearch) evalFreq(c RemedyCandidate) (RemedyFigures, error) {
	var f RemedyFigures
	if err := rs.ctx.Err(); err != nil {
		return f, err // cancelled: no more candidates
	}
	cst := RemedyStudy(rs.st, c)
	var err error
	if f.OpenEnd, err = OpenEndRise(cst); err != nil {
		return f, err
	}
	if rs.spec.Targets.HasGainWatched {
		if f.Gain, f.FirstResonanceHz, err = WatchedGain(rs.ctx, cst, rs.freqs); err != nil {
			return f, err
		}
	}
	rs.evals++
	if n := len(rs.byStage); n == 0 || rs.byStage[n-1].Stage != rs.stage {
		rs.byStage = append(rs.byStage, StageCount{Stage: rs.stage})
	}
	rs.byStage[len(rs.byStage)-1].Candidates++
	return f, nil
}

// evalAll evaluates a candidate on every target's measure.
func (rs *RemedySearch) evalAll(c RemedyCandidate) (RemedyEval, error) {
	f, err := rs.evalFreq(c)
	if err != nil {
		return RemedyEval{}, err
	}
	if rs.spec.Targets.Switching() {
		f.U2, f.Margin, err = rs.U2(RemedyStudy(rs.st, c), c.Controlled)
		if err != nil {
			return RemedyEval{}, err
		}
		f.HasSw, f.HasMargin = true, rs.st.Switching.SIWL > 0
	}
	return rs.judge(c, f), nil
}

// judge sets how far the figures are from the targets: each target's relative
// violation (value/limit - 1 for the upper limits; (limit - margin)/100 for the
// margin), the largest of them, and the target it belongs to.
func (rs *RemedySearch) judge(c RemedyCandidate, f RemedyFigures) RemedyEval {
	e := RemedyEval{Cand: c, Figs: f}
	tg := rs.spec.Targets
	check := func(key string, x float64) {
		if math.IsInf(x, 1) {
			x = 1e12
		}
		if x > remedyTol && x > e.Violation {
			e.Violation, e.Binding = x, key
		}
	}
	if tg.HasOpenEnd {
		check("max_open_end_pu", f.OpenEnd/tg.OpenEndPU-1)
	}
	if tg.HasGainWatched {
		check("max_gain_watched", f.Gain/tg.GainWatched-1)
	}
	if tg.HasU2 && f.HasSw {
		check("max_u2_pu", f.U2/tg.U2PU-1)
	}
	if tg.HasMargin && f.HasMargin {
		check("min_margin_pct", (tg.MarginPct-f.Margin)/100)
	}
	return e
}

// reactorLevels returns "none" and the grid of ratings (var) of a reactor lever.
func reactorLevels(r *study.Range) []float64 {
	if r == nil {
		return []float64{0}
	}
	out := []float64{0}
	for i := 0; i <= remedyGridSteps; i++ {
		q := r.Min + (r.Max-r.Min)*float64(i)/remedyGridSteps
		if q > 0 && q > out[len(out)-1] {
			out = append(out, q)
		}
	}
	return out
}

// reactorStage returns the reactor pairs meeting the frequency targets, cheapest
// first (at most remedyKeepReactors), and the closest pair when none does.
func (rs *RemedySearch) reactorStage() (keep []RemedyEval, closest RemedyEval, err error) {
	lv := rs.spec.Levers
	ls, lr := reactorLevels(lv.ReactorSending), reactorLevels(lv.ReactorReceiving)
	total := len(ls) * len(lr)
	grid := make([][]RemedyEval, len(ls))
	closest.Violation = math.Inf(1)
	rs.setStage("reactor pairs")
	var feasible []RemedyEval
	for i, s := range ls {
		grid[i] = make([]RemedyEval, len(lr))
		for j, r := range lr {
			c := RemedyCandidate{ReactorSending: s, ReactorReceiving: r}
			f, err := rs.evalFreq(c)
			if err != nil {
				return nil, closest, err
			}
			e := rs.judge(c, f)
			grid[i][j] = e
			if e.Violation < closest.Violation || (e.Violation == closest.Violation && c.Cost() < closest.Cand.Cost()) {
				closest = e
			}
			rs.progress.Count(i*len(lr)+j+1, total, "")
		}
	}
	tg := rs.spec.Targets
	if !tg.HasOpenEnd && !tg.HasGainWatched {
		// No frequency target: every pair is a candidate for the switching stage.
		for i := range ls {
			feasible = append(feasible, grid[i]...)
		}
		sort.SliceStable(feasible, func(a, b int) bool { return feasible[a].Cand.Cost() < feasible[b].Cand.Cost() })
		return feasible, closest, nil
	}
	for i := range ls {
		for j := range lr {
			e := grid[i][j]
			// Only the grid's frontier: a pair whose lower neighbours fail the targets
			// (a pair above a feasible one costs more).
			if e.Violation > 0 || (i > 0 && grid[i-1][j].Violation == 0) || (j > 0 && grid[i][j-1].Violation == 0) {
				continue
			}
			// Lower each added rating while the targets stay met.
			if i > 0 {
				if e, err = rs.lower(e, lv.ReactorSending, ls[i-1], true); err != nil {
					return nil, closest, err
				}
			}
			if j > 0 {
				if e, err = rs.lower(e, lv.ReactorReceiving, lr[j-1], false); err != nil {
					return nil, closest, err
				}
			}
			feasible = append(feasible, e)
		}
	}
	sort.SliceStable(feasible, func(a, b int) bool { return feasible[a].Cand.Cost() < feasible[b].Cand.Cost() })
	for _, e := range feasible {
		dup := false
		for _, k := range keep {
			if math.Abs(k.Cand.ReactorSending-e.Cand.ReactorSending) < 1e3 && math.Abs(k.Cand.ReactorReceiving-e.Cand.ReactorReceiving) < 1e3 {
				dup = true
			}
		}
		if !dup {
			keep = append(keep, e)
		}
		if len(keep) == remedyKeepReactors {
			break
		}
	}
	return keep, closest, nil
}

// lower lowers the sending (or receiving) rating of the feasible e towards the grid
// level below, prev (0 = none), by bisection, keeping the frequency targets met.
func (rs *RemedySearch) lower(e RemedyEval, r *study.Range, prev float64, sending bool) (RemedyEval, error) {
	get := func(c RemedyCandidate) float64 {
		if sending {
			return c.ReactorSending
		}
		return c.ReactorReceiving
	}
	with := func(q float64) RemedyCandidate {
		c := e.Cand
		if sending {
			c.ReactorSending = q
		} else {
			c.ReactorReceiving = q
		}
		return c
	}
	try := func(q float64) (RemedyEval, bool, error) {
		c := with(q)
		f, err := rs.evalFreq(c)
		if err != nil {
			return RemedyEval{}, false, err
		}
		x := rs.judge(c, f)
		return x, x.Violation == 0, nil
	}
	rs.setStage("reactor ratings refined")
	lo, hi := prev, get(e.Cand)
	if prev == 0 {
		if r.Min > 0 {
			x, ok, err := try(r.Min)
			if err != nil {
				return e, err
			}
			if ok {
				return x, nil
			}
			lo = r.Min
		}
	}
	for k := 0; k < remedyBisections; k++ {
		mid := (lo + hi) / 2
		x, ok, err := try(mid)
		if err != nil {
			return e, err
		}
		if ok {
			hi, e = mid, x
		} else {
			lo = mid
		}
	}
	return e, nil
}

// remedyCombo is one setting of the switching levers.
type remedyCombo struct {
	pir        bool
	controlled bool
	arresterV  float64
}

// combos lists the settings of the switching levers the study allows.
func (rs *RemedySearch) combos() []remedyCombo {
	lv := rs.spec.Levers
	pirs := []bool{false}
	if lv.Preinsertion != nil {
		pirs = append(pirs, true)
	}
	ccs := []bool{false}
	if lv.Controlled {
		ccs = append(ccs, true)
	}
	arrs := []float64{0}
	for i := len(lv.ArrestersV) - 1; i >= 0; i-- { // highest rating first
		arrs = append(arrs, lv.ArrestersV[i])
	}
	var out []remedyCombo
	for _, p := range pirs {
		for _, c := range ccs {
			for _, a := range arrs {
				out = append(out, remedyCombo{pir: p, controlled: c, arresterV: a})
			}
		}
	}
	return out
}

// bestResistor returns the pre-insertion resistor (ohm) within the lever's range that
// minimises u2 for the reactor pair of base (random closing, no added arresters): a
// grid of remedyPIRGrid values, then golden-section search between the neighbours of
// the grid's best.
//
// References:
//   - Kiefer, J., Sequential minimax search for a maximum, Proc. AMS 4 (1953) 502-506.
func (rs *RemedySearch) bestResistor(base RemedyCandidate) (float64, error) {
	r := rs.spec.Levers.Preinsertion
	key := [2]float64{base.ReactorSending, base.ReactorReceiving}
	u2At := func(ohm float64) (float64, error) {
		c := base
		c.Preinsertion, c.Controlled, c.ArresterV = ohm, false, 0
		u2, _, err := rs.U2(RemedyStudy(rs.st, c), false)
		if err == nil {
			rs.pirSamples[key] = append(rs.pirSamples[key], PIRSample{Ohm: ohm, U2: u2})
		}
		return u2, err
	}
	lo := math.Max(r.Min, r.Max*1e-3)
	xs := make([]float64, remedyPIRGrid)
	ys := make([]float64, remedyPIRGrid)
	best := 0
	for i := range xs {
		xs[i] = lo + (r.Max-lo)*float64(i)/(remedyPIRGrid-1)
		u, err := u2At(xs[i])
		if err != nil {
			return 0, err
		}
		ys[i] = u
		if u < ys[best] {
			best = i
		}
	}
	// Golden section between the grid neighbours of the grid's best, keeping the best
	// value seen (u2 of a finite set of shots need not be exactly unimodal).
	a, b := xs[max(best-1, 0)], xs[min(best+1, remedyPIRGrid-1)]
	bx, by := xs[best], ys[best]
	var err error
	negU2 := func(ohm float64) float64 {
		if err != nil {
			return math.Inf(-1)
		}
		var u float64
		if u, err = u2At(ohm); err != nil {
			return math.Inf(-1)
		}
		if u < by {
			bx, by = ohm, u
		}
		return -u
	}
	propagation.GoldenMax(negU2, a, b, func(a, b float64) bool { return false }, remedyGolden)
	if err != nil {
		return 0, err
	}
	return bx, nil
}

// switchingStage combines the reactor pairs with the switching levers in increasing
// order of cost and returns the first candidate meeting every target, with ok false
// and the closest candidate evaluated when none does (or the run cap is reached).
func (rs *RemedySearch) switchingStage(reactors []RemedyEval) (best RemedyEval, ok bool, capped bool, err error) {
	type trial struct {
		r     RemedyEval
		combo remedyCombo
		cost  float64
	}
	var trials []trial
	for _, r := range reactors {
		for _, cb := range rs.combos() {
			c := r.Cand
			c.Controlled, c.ArresterV = cb.controlled, cb.arresterV
			if cb.pir {
				c.Preinsertion = 1 // placeholder for the cost; the value is found below
			}
			trials = append(trials, trial{r: r, combo: cb, cost: c.Cost()})
		}
	}
	sort.SliceStable(trials, func(a, b int) bool { return trials[a].cost < trials[b].cost })
	rs.setStage("switching combinations")
	resistor := map[[2]float64]float64{}
	best.Violation = math.Inf(1)
	for i, t := range trials {
		if rs.runs-rs.runs0 >= RemedyMaxSwitching {
			return best, false, true, nil
		}
		c := t.r.Cand
		c.Controlled, c.ArresterV = t.combo.controlled, t.combo.arresterV
		if t.combo.pir {
			key := [2]float64{c.ReactorSending, c.ReactorReceiving}
			ohm, done := resistor[key]
			if !done {
				if ohm, err = rs.bestResistor(c); err != nil {
					return best, false, false, err
				}
				resistor[key] = ohm
			}
			c.Preinsertion = ohm
		}
		e, err := rs.evalAll(c)
		if err != nil {
			return best, false, false, err
		}
		rs.progress.Count(i+1, len(trials), "")
		if e.Violation == 0 {
			return e, true, false, nil
		}
		if e.Violation < best.Violation {
			best = e
		}
	}
	return best, false, false, nil
}

// search runs the two stages for the targets in rs.spec and returns the cheapest
// candidate meeting them all (feasible), or the closest one found; capped reports
// that the cap on statistical switching runs ended the search.
func (rs *RemedySearch) search() (chosen RemedyEval, feasible, capped bool, err error) {
	rs.runs0 = rs.runs
	tg, lv := rs.spec.Targets, rs.spec.Levers
	keep, closest, err := rs.reactorStage()
	if err != nil {
		return chosen, false, false, err
	}
	switch {
	case len(keep) == 0:
		chosen = closest
		if tg.Switching() {
			// The closest reactors with the most protective switching levers.
			c := closest.Cand
			c.Controlled = lv.Controlled
			if len(lv.ArrestersV) > 0 {
				c.ArresterV = lv.ArrestersV[0]
			}
			if lv.Preinsertion != nil {
				if c.Preinsertion, err = rs.bestResistor(c); err != nil {
					return chosen, false, false, err
				}
			}
			chosen = RemedyEval{Cand: c}
		}
		return chosen, false, false, nil
	case !tg.Switching():
		return keep[0], true, false, nil
	default:
		return rs.switchingStage(keep)
	}
}

// Infeasible is a target no change within the levers meets: alone (Reachable
// is then the best value of its measure the search found, With the change giving
// it), or together with the others (ConflictsWith lists them).
type Infeasible struct {
	Target        string
	Limit         float64
	Reachable     *float64
	With          RemedyCandidate
	ConflictsWith []string
	Capped        bool // the search stopped at its cap of switching runs
}

// targetKeys lists the keys of the targets present in tg, in the [targets] order.
func targetKeys(tg study.Targets) []string {
	var k []string
	for _, t := range []struct {
		has bool
		key string
	}{{tg.HasOpenEnd, "max_open_end_pu"}, {tg.HasGainWatched, "max_gain_watched"}, {tg.HasU2, "max_u2_pu"}, {tg.HasMargin, "min_margin_pct"}} {
		if t.has {
			k = append(k, t.key)
		}
	}
	return k
}

// keepTargets returns tg with only the targets for which keep(key) is true.
func keepTargets(tg study.Targets, keep func(key string) bool) study.Targets {
	tg.HasOpenEnd = tg.HasOpenEnd && keep("max_open_end_pu")
	tg.HasGainWatched = tg.HasGainWatched && keep("max_gain_watched")
	tg.HasU2 = tg.HasU2 && keep("max_u2_pu")
	tg.HasMargin = tg.HasMargin && keep("min_margin_pct")
	return tg
}

// targetFigure returns a target's limit and the candidate's value of its measure.
func targetFigure(tg study.Targets, f RemedyFigures, key string) (limit, value float64) {
	switch key {
	case "max_open_end_pu":
		return tg.OpenEndPU, f.OpenEnd
	case "max_gain_watched":
		return tg.GainWatched, f.Gain
	case "max_u2_pu":
		return tg.U2PU, f.U2
	default:
		return tg.MarginPct, f.Margin
	}
}

// separate is called when no change meets every target together. It returns the
// targets no change within the levers meets even alone (each searched on its own) and
// the cheapest change meeting all the other targets (ok false when none does). When
// each target can be met alone, the one target whose removal gives the cheapest
// change meeting the rest is returned as conflicting with them.
func (rs *RemedySearch) separate() (out []Infeasible, alt RemedyEval, ok bool, err error) {
	all := rs.spec.Targets
	defer func() { rs.spec.Targets = all }()
	drop := map[string]bool{}
	for _, k := range targetKeys(all) {
		rs.spec.Targets = keepTargets(all, func(key string) bool { return key == k })
		e, met, capped, err := rs.search()
		if err != nil {
			return nil, alt, false, err
		}
		if met {
			continue
		}
		if e, err = rs.evalAll(e.Cand); err != nil {
			return nil, alt, false, err
		}
		limit, v := targetFigure(all, e.Figs, k)
		out = append(out, Infeasible{Target: k, Limit: limit, Reachable: &v,
			With: e.Cand, Capped: capped})
		drop[k] = true
	}
	if len(out) > 0 {
		rest := keepTargets(all, func(key string) bool { return !drop[key] })
		if !rest.Any() {
			return out, RemedyEval{}, true, nil // nothing else to meet: no change
		}
		rs.spec.Targets = rest
		e, met, _, err := rs.search()
		if err != nil || !met {
			return out, alt, false, err
		}
		return out, e, true, nil
	}
	// Every target can be met alone: drop the one whose removal costs least.
	best, bestKey := RemedyEval{}, ""
	for _, k := range targetKeys(all) {
		rs.spec.Targets = keepTargets(all, func(key string) bool { return key != k })
		e, met, _, err := rs.search()
		if err != nil {
			return nil, alt, false, err
		}
		if met && (bestKey == "" || e.Cand.Cost() < best.Cand.Cost()) {
			best, bestKey = e, k
		}
	}
	if bestKey == "" {
		return nil, alt, false, nil
	}
	limit, _ := targetFigure(all, best.Figs, bestKey)
	var with []string
	for _, k := range targetKeys(all) {
		if k != bestKey {
			with = append(with, k)
		}
	}
	return []Infeasible{{Target: bestKey, Limit: limit, With: best.Cand, ConflictsWith: with}}, best, true, nil
}

// merged returns the counts by stage with each stage once, in order of first use (a
// stage may run again, as in separate).
func (rs *RemedySearch) merged() []StageCount {
	var out []StageCount
	at := map[string]int{}
	for _, b := range rs.byStage {
		if i, ok := at[b.Stage]; ok {
			out[i].Candidates += b.Candidates
			continue
		}
		at[b.Stage] = len(out)
		out = append(out, b)
	}
	return out
}

// RemedyProgress is told the stage of the remedy search under way and its count of
// candidates; a terminal status line implements it.
type RemedyProgress interface {
	Stage(name string)
	Count(done, total int, what string)
}

type noProgress struct{}

func (noProgress) Stage(string)           {}
func (noProgress) Count(int, int, string) {}

// Freqs returns the frequencies (Hz) the search screens the harmonics on.
func (rs *RemedySearch) Freqs() []float64 { return rs.freqs }
