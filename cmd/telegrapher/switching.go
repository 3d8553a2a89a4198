package main

// The switching command: three-phase statistical energisation and reclosing.
//
//	computeSwitching(st)           analysis.Switching shaped for display: every shot,
//	                               the statistics (IEC 60071-2 phase-peak and
//	                               case-peak, IEC 60071-1 base and kV), the margin to
//	                               switching.siwl_kv, with and without arresters when the
//	                               study has them, and the worst shot's three-phase
//	                               waveforms (switchingResult.Worst, for COMTRADE:
//	                               Sending/Receiving/EMF [3][]float64 in pu of
//	                               BaseEMFKV, sampled every Worst.Step s from the first
//	                               pole's contact; WorstShot says which shot it is)
//	switchingFigures               one column of figures (Figures: as studied; Bare:
//	                               without arresters)
//	switchingPlots(r)              the distribution plot and the worst shot's waveforms
//	                               (report.SwitchingDistributionPlot, SwitchingWaveformPlot)
//	printSwitching(w, r)           the text summary

import (
	"context"
	"flag"
	"fmt"
	"io"
	"math"

	"gonum.org/v1/plot"
	"gonum.org/v1/plot/vg"

	"github.com/telegrapher/telegrapher/cmd/telegrapher/internal/analysis"
	"github.com/telegrapher/telegrapher/cmd/telegrapher/internal/report"
	"github.com/telegrapher/telegrapher/cmd/telegrapher/internal/study"
	"github.com/telegrapher/telegrapher/waves"
)

var switchingCommand = func() *command {
	return &command{
		name:  "switching",
		args:  "STUDY [--json] [--plot F]",
		short: "three-phase statistical energisation and reclosing overvoltages",
		long: `
Closes a three-pole breaker on the open-ended three-phase line [switching] shots times,
with the mean closing instant uniformly random over one cycle (or fixed by close_deg)
and each pole scattered about it (pole_sigma_ms, normal truncated at 3 sigma), with
trapped charge (trapped_pu) and an optional pre-insertion resistor.

Reclosing: trapped_pu is each phase's line voltage at the opening, with zero current
in the line and its reactors. Through the dead time (dead_time_ms, default 300 ms,
from the opening to the mean closing instant; 0 = the charge held at the closing) the
de-energised line is simulated by the same model: with line-connected reactors its
charge rings at about 1/(2 pi sqrt(LC)) per mode and decays through their losses;
without, it stays as d.c. Every shot starts from that state; the output gives the
line voltages and reactor currents at the closing. With controlled_closing each pole
aims at the least voltage across its contacts (EMF minus the ringing line side)
within two cycles of the command. The line is
transposed, in modal form (ground mode on the zero-sequence constants, two aerial modes
on the positive-sequence ones); the source has positive- and zero-sequence R-L
impedance ([source] x0_over_x1). It needs zero-sequence data: [line] r0/l0/c0 or a
geometry.

The statistics follow IEC 60071-2 (phase-peak method: u2 exceeded by 2 % of the
absolute phase peaks, ut = 1.25 u2 - 0.25; case-peak figures too) in the IEC 60071-1
base us_kv*sqrt(2)/sqrt(3), and in kV. With switching.siwl_kv the margin
(siwl / (ks * kcd * u2_kv) - 1) * 100 is given. Without [[switching.arrester]] the
results are unprotected overvoltages; with them, both are shown side by side.

Own keys of [switching]: dead_time_ms, controlled_closing, controlled_sigma_ms,
neutral_reactor_sending_ohm, neutral_reactor_receiving_ohm
(neutral reactor of that end's line-connected reactors, reactance at frequency_hz), and
[[switching.arrester]] with at = "sending"|"receiving" and rated_kv (a typical
metal-oxide curve) or vi_ka_kv = [[kA, kV], ...].

--json writes shots, u2_pu, ut_pu, u2_kv, ut_kv, u2_fit_pu, case_u2_pu, case_ut_pu,
max_pu, mean_pu, sigma_pu, phase_peaks_pu (signed, EMF base) and margin_pct; --plot
writes the distribution on a normal-probability scale and the worst shot's waveforms.`,
		flags: func(fs *flag.FlagSet, stdout, stderr io.Writer) func(context.Context, []string) error {
			asJSON := fs.Bool("json", false, "write the results as one JSON document")
			plotPath := fs.String("plot", "", "write the distribution and the worst shot to `F` (.png or .svg)")
			return func(ctx context.Context, args []string) error {
				st, err := studyArg("switching", args, stderr, [2]string{"plot", *plotPath})
				if err != nil {
					return err
				}
				status := newStatusLine(stderr)
				status.Stage("switching")
				res, err := computeSwitchingProgress(ctx, st, status.Shots())
				status.Clear()
				if err != nil {
					return err
				}
				if *plotPath != "" {
					if err := report.SaveStacked(switchingPlots(&res), 20*vg.Centimeter, 12*vg.Centimeter, *plotPath); err != nil {
						return fmt.Errorf("--plot %s: %v", *plotPath, err)
					}
				}
				if *asJSON {
					return writeJSON(stdout, &res)
				}
				printSwitching(stdout, &res)
				return nil
			}
		},
	}
}()

// switchingFigures are the statistical figures of one set of shots.
type switchingFigures struct {
	U2PU         float64      `json:"u2_pu"`
	UtPU         float64      `json:"ut_pu"`
	U2KV         float64      `json:"u2_kv"`
	UtKV         float64      `json:"ut_kv"`
	U2FitPU      float64      `json:"u2_fit_pu"`
	CaseU2PU     float64      `json:"case_u2_pu"`
	CaseUtPU     float64      `json:"case_ut_pu"`
	MaxPU        float64      `json:"max_pu"`
	MeanPU       float64      `json:"mean_pu"`
	SigmaPU      float64      `json:"sigma_pu"`
	MarginPct    *float64     `json:"margin_pct,omitempty"`
	MaxKV        float64      `json:"max_kv"`
	CaseU2KV     float64      `json:"case_u2_kv"`
	Unprotected  bool         `json:"unprotected"` // no surge arresters
	PhasePeaksPU [][3]float64 `json:"phase_peaks_pu"`

	stats waves.SwitchingStats
	toIEC float64 // EMF base to IEC 60071-1 base
}

// switchingArrester describes one arrester set in the results.
type switchingArrester struct {
	Name    string  `json:"name"`
	At      string  `json:"at"`
	RatedKV float64 `json:"rated_kv,omitempty"`
	UpsKV   float64 `json:"ups_kv"` // residual voltage at the switching coordination current
	UpsKA   float64 `json:"ups_ka"`
}

// switchingWorst identifies the worst shot (largest case peak of the study as given).
type switchingWorst struct {
	Index       int        `json:"index"`
	CloseDeg    float64    `json:"close_deg"`
	PoleCloseMs [3]float64 `json:"pole_close_ms"` // first contact of each pole, from the mean instant
	PeakPU      [3]float64 `json:"peak_pu"`
}

// switchingReclosing is the trapped charge: at the opening, and as the dead time
// leaves it at the mean closing instant (pu of the EMF base).
type switchingReclosing struct {
	DeadTimeMs float64    `json:"dead_time_ms"`
	TrappedPU  [3]float64 `json:"trapped_pu"` // at the opening
	// At the mean closing instant: each phase's line voltage at the sending and
	// receiving end, the largest |sending-end voltage| over the last LargestMs of the
	// dead time, the line-connected reactor currents (A) at the sending and receiving
	// end. Absent without trapped charge or without a dead time.
	SendingPU   *[3]float64    `json:"line_sending_pu,omitempty"`
	ReceivingPU *[3]float64    `json:"line_receiving_pu,omitempty"`
	LargestPU   *[3]float64    `json:"largest_pu,omitempty"`
	LargestMs   float64        `json:"largest_over_ms,omitempty"`
	ReactorA    *[2][3]float64 `json:"reactor_current_a,omitempty"`
	// The lumped estimate 1/(2π√(LC)) of the ring-down frequency of the ground and
	// aerial modes; 0 without line-connected reactors (the charge stays as d.c.).
	RingGroundHz float64 `json:"ring_ground_hz"`
	RingAerialHz float64 `json:"ring_aerial_hz"`
}

// switchingResult is the whole switching study. The top-level figures are those of
// the study as given (with its arresters, if any); WithoutArresters repeats them for
// the same shots without arresters when the study has some.
type switchingResult struct {
	Shots int `json:"shots"`
	switchingFigures

	Title           string  `json:"title,omitempty"`
	Seed            int64   `json:"seed"`
	BaseIECKV       float64 `json:"base_iec_kv"` // us_kv·√2/√3
	BaseEMFKV       float64 `json:"base_emf_kv"` // voltage_kv·√2/√3
	UsKV            float64 `json:"us_kv"`
	SIWLKV          float64 `json:"siwl_kv,omitempty"`
	PreinsertionOhm float64 `json:"preinsertion_ohm"`
	PreinsertionMs  float64 `json:"preinsertion_ms,omitempty"`
	Ks              float64 `json:"ks"`
	Kcd             float64 `json:"kcd"`
	KcdFigure       float64 `json:"kcd_iec_figure,omitempty"` // IEC 60071-2 Fig. 6 reading for Ups/u2, with arresters
	// MarginArresterPct is the margin of the deterministic approach of IEC 60071-2 with
	// arresters, siwl / (ks·Kcd·Ups) − 1 (Kcd from the figure), beside the contract's.
	MarginArresterPct *float64            `json:"margin_arrester_pct,omitempty"`
	Arresters         []switchingArrester `json:"arresters,omitempty"`
	WithoutArresters  *switchingFigures   `json:"without_arresters,omitempty"`
	TimeStepUs        float64             `json:"time_step_us"`
	ModalEvalHz       float64             `json:"modal_constants_at_hz"`
	WorstShot         switchingWorst      `json:"worst_shot"`
	Reclosing         switchingReclosing  `json:"reclosing"`
	Notes             []string            `json:"notes"`
	Caution           string              `json:"caution"`

	// The embedded figures are the study as given; Bare the shots without arresters
	// (the same figures when the study has none).
	Bare  *switchingFigures     `json:"-"`
	Worst *waves.ThreePhaseWave `json:"-"` // the worst shot's waveforms, pu of BaseEMFKV
}

// computeSwitching runs the statistical switching study of st.
func computeSwitching(st *study.Study) (switchingResult, error) {
	return computeSwitchingProgress(context.Background(), st, nil)
}

// computeSwitchingProgress runs analysis.Switching and shapes its result for printing
// and JSON.
func computeSwitchingProgress(ctx context.Context, st *study.Study, progress analysis.SwitchingProgress) (switchingResult, error) {
	var res switchingResult
	a, err := analysis.Switching(ctx, st, progress)
	if err != nil {
		return res, err
	}
	set := st.Switching
	baseIEC := a.BaseIEC
	bare := switchingFiguresOf(a.Bare, baseIEC)
	f := bare
	if a.WithArresters {
		f = switchingFiguresOf(a.Figures, baseIEC)
		res.WithoutArresters = bare
	}
	res.switchingFigures, res.Bare = *f, bare
	res.Shots = a.Shots
	res.Title, res.Seed = st.Title, set.Seed
	res.BaseIECKV, res.BaseEMFKV, res.UsKV = baseIEC/1e3, a.BaseEMF/1e3, st.Us/1e3
	res.SIWLKV, res.Ks, res.Kcd = set.SIWL/1e3, set.Ks, set.Kcd
	res.PreinsertionOhm = set.Preinsertion
	if set.Preinsertion > 0 {
		res.PreinsertionMs = set.InsertTime * 1e3
	}
	res.TimeStepUs, res.ModalEvalHz = a.Step*1e6, a.EvalHz
	res.Notes = a.Notes
	for _, l := range a.Arresters {
		res.Arresters = append(res.Arresters, switchingArrester{Name: l.Spec.Name, At: l.Spec.At, RatedKV: l.Spec.RatedV / 1e3, UpsKV: l.Ups / 1e3, UpsKA: l.Current / 1e3})
	}
	res.KcdFigure, res.MarginArresterPct = a.KcdFigure, a.MarginArrester
	shot := a.WorstShot
	res.Worst = a.WorstWave
	res.WorstShot = switchingWorst{Index: a.Worst, CloseDeg: math.Mod(shot.CloseDeg, 360), PeakPU: shot.Peak}
	for k := 0; k < 3; k++ {
		res.WorstShot.PoleCloseMs[k] = shot.Offset[k] * 1e3
	}
	ws := a.Settings
	res.Reclosing = switchingReclosing{DeadTimeMs: ws.DeadTime * 1e3, TrappedPU: ws.TrappedPU}
	res.Reclosing.RingGroundHz, res.Reclosing.RingAerialHz = a.RingGround, a.RingAerial
	if rd := a.RingDown; rd != nil {
		rc := &res.Reclosing
		rc.SendingPU, rc.ReceivingPU, rc.LargestPU = &rd.Sending, &rd.Receiving, &rd.Largest
		rc.LargestMs, rc.ReactorA = rd.RingSpan*1e3, &rd.ReactorI
	}
	res.Caution = Caution
	return res, nil
}

// switchingFiguresOf shapes one set of statistics (pu of the IEC base baseIEC, V).
func switchingFiguresOf(a *analysis.SwitchingFigures, baseIEC float64) *switchingFigures {
	st := a.Stats
	kv := baseIEC / 1e3
	return &switchingFigures{
		U2PU: st.U2, UtPU: st.Ut, U2KV: st.U2 * kv, UtKV: st.Ut * kv, U2FitPU: st.U2Fit,
		CaseU2PU: st.CaseU2, CaseUtPU: st.CaseUt, MaxPU: st.Max, MeanPU: st.Mean, SigmaPU: st.Sigma,
		MaxKV: st.Max * kv, CaseU2KV: st.CaseU2 * kv, Unprotected: a.Unprotected,
		PhasePeaksPU: a.PhasePeaks, stats: st, toIEC: a.ToIEC, MarginPct: a.Margin,
	}
}

// switchingSample returns the distribution-plot sample of a set of figures.
func switchingSample(f *switchingFigures, label string) report.SwitchingSample {
	s := report.SwitchingSample{Label: label, U2: f.U2PU, Ut: f.UtPU, Mean: f.MeanPU, Sigma: f.SigmaPU}
	for _, p := range f.PhasePeaksPU {
		for _, v := range p {
			s.Peaks = append(s.Peaks, math.Abs(v)*f.toIEC)
		}
	}
	return s
}

// switchingPlots returns the distribution plot (with and without arresters when the
// study has them) and the worst shot's receiving-end waveforms.
func switchingPlots(r *switchingResult) []*plot.Plot {
	var samples []report.SwitchingSample
	if r.WithoutArresters != nil {
		samples = append(samples, switchingSample(r.WithoutArresters, "without arresters (unprotected)"))
		samples = append(samples, switchingSample(&r.switchingFigures, "with arresters"))
	} else {
		samples = append(samples, switchingSample(&r.switchingFigures, "phase peaks (unprotected)"))
	}
	title := fmt.Sprintf("Statistical switching, %d shots: absolute phase peaks at the open end", r.Shots)
	plots := []*plot.Plot{report.SwitchingDistributionPlot(samples, title)}
	if w := r.Worst; w != nil && len(w.Receiving[0]) > 0 {
		t := make([]float64, len(w.Receiving[0]))
		for i := range t {
			t[i] = float64(i) * w.Step * 1e3
		}
		var closeMs [3]float64
		for k := 0; k < 3; k++ {
			closeMs[k] = r.WorstShot.PoleCloseMs[k] - w.Start*1e3
		}
		last := -1.0 // no resistor: the last contact is the last pole's closing
		if r.PreinsertionOhm > 0 {
			last = (w.LastContact - w.Start) * 1e3
		}
		which := "unprotected"
		if r.WithoutArresters != nil {
			which = "with arresters"
		}
		wt := fmt.Sprintf("Worst shot (#%d, %s, close at %.0f°): receiving-end voltages", r.WorstShot.Index+1, which, r.WorstShot.CloseDeg)
		plots = append(plots, report.SwitchingWaveformPlot(t, w.Receiving, closeMs, last, wt))
	}
	return plots
}

func printSwitching(w io.Writer, r *switchingResult) {
	if r.Title != "" {
		fmt.Fprintln(w, r.Title)
	}
	fmt.Fprintf(w, "Statistical switching: %d shots, seed %d, time step %.3g µs\n", r.Shots, r.Seed, r.TimeStepUs)
	fmt.Fprintf(w, "Base: IEC 60071-1 Us*sqrt(2)/sqrt(3) = %.1f kV (EMF base %.1f kV)\n\n", r.BaseIECKV, r.BaseEMFKV)
	cols := []*switchingFigures{&r.switchingFigures}
	heads := []string{"unprotected"}
	if r.WithoutArresters != nil {
		cols = []*switchingFigures{r.WithoutArresters, &r.switchingFigures}
		heads = []string{"no arresters", "with arresters"}
	}
	fmt.Fprintf(w, "%-32s", "")
	for _, h := range heads {
		fmt.Fprintf(w, "%18s", h)
	}
	fmt.Fprintln(w)
	row := func(name string, pu func(*switchingFigures) float64, kv func(*switchingFigures) float64) {
		fmt.Fprintf(w, "%-32s", name)
		for _, c := range cols {
			if kv != nil {
				fmt.Fprintf(w, "%8.3f pu %4.0f kV", pu(c), kv(c))
			} else {
				fmt.Fprintf(w, "%15.3f pu", pu(c))
			}
		}
		fmt.Fprintln(w)
	}
	row("u2 (2 %, phase-peak)", func(f *switchingFigures) float64 { return f.U2PU }, func(f *switchingFigures) float64 { return f.U2KV })
	row("ut (truncation, phase-peak)", func(f *switchingFigures) float64 { return f.UtPU }, func(f *switchingFigures) float64 { return f.UtKV })
	row("u2 of a normal fit", func(f *switchingFigures) float64 { return f.U2FitPU }, nil)
	row("u2 (case-peak)", func(f *switchingFigures) float64 { return f.CaseU2PU }, func(f *switchingFigures) float64 { return f.CaseU2KV })
	row("ut (case-peak)", func(f *switchingFigures) float64 { return f.CaseUtPU }, nil)
	row("largest phase peak", func(f *switchingFigures) float64 { return f.MaxPU }, func(f *switchingFigures) float64 { return f.MaxKV })
	row("mean of phase peaks", func(f *switchingFigures) float64 { return f.MeanPU }, nil)
	row("sigma of phase peaks", func(f *switchingFigures) float64 { return f.SigmaPU }, nil)
	if r.SIWLKV > 0 {
		fmt.Fprintf(w, "%-32s", fmt.Sprintf("margin to SIWL %.0f kV", r.SIWLKV))
		for _, c := range cols {
			fmt.Fprintf(w, "%16.1f %%", *c.MarginPct)
		}
		fmt.Fprintf(w, "\n  (ks %.3g, kcd %.3g: margin = siwl / (ks*kcd*u2) - 1)\n", r.Ks, r.Kcd)
	}
	for _, a := range r.Arresters {
		fmt.Fprintf(w, "Arrester %q at the %s end: Ups %.0f kV at %.0f kA\n", a.Name, a.At, a.UpsKV, a.UpsKA)
	}
	if r.MarginArresterPct != nil {
		fmt.Fprintf(w, "IEC 60071-2 deterministic margin with arresters: siwl / (ks*Kcd*Ups) - 1 = %.1f %% (Kcd %.3f from Fig. 6, approximate)\n", *r.MarginArresterPct, r.KcdFigure)
	}
	printReclosing(w, &r.Reclosing)
	ws := r.WorstShot
	fmt.Fprintf(w, "\nWorst shot #%d: close at %.1f deg, poles at %+.2f, %+.2f, %+.2f ms; peaks %+.3f, %+.3f, %+.3f pu (EMF base)\n",
		ws.Index+1, ws.CloseDeg, ws.PoleCloseMs[0], ws.PoleCloseMs[1], ws.PoleCloseMs[2], ws.PeakPU[0], ws.PeakPU[1], ws.PeakPU[2])
	fmt.Fprintln(w)
	for _, n := range r.Notes {
		fmt.Fprintln(w, "Note: "+n)
	}
	fmt.Fprintln(w, "\n"+Caution)
}

// printReclosing writes the dead time and the trapped charge at the closing.
func printReclosing(w io.Writer, rc *switchingReclosing) {
	tr := rc.TrappedPU
	fmt.Fprintf(w, "\nDead time %g ms; trapped charge at the opening %+.3f, %+.3f, %+.3f pu\n", rc.DeadTimeMs, tr[0], tr[1], tr[2])
	switch {
	case tr == [3]float64{}:
		fmt.Fprintln(w, "  no trapped charge: the line is uncharged at the closing")
		return
	case rc.SendingPU == nil:
		fmt.Fprintln(w, "  no dead time: the line holds the trapped charge at the closing, with zero reactor current")
		return
	}
	v, vr, big := rc.SendingPU, rc.ReceivingPU, rc.LargestPU
	fmt.Fprintf(w, "  at the mean closing instant: line voltage %+.3f, %+.3f, %+.3f pu (sending end), %+.3f, %+.3f, %+.3f pu (receiving end)\n", v[0], v[1], v[2], vr[0], vr[1], vr[2])
	fmt.Fprintf(w, "  largest |line voltage| over the last %.0f ms of the dead time: %.3f, %.3f, %.3f pu\n", rc.LargestMs, big[0], big[1], big[2])
	if rc.RingAerialHz == 0 && rc.RingGroundHz == 0 {
		fmt.Fprintln(w, "  no line-connected reactors: the charge stays as d.c., leaking away through the line's conductance only")
		return
	}
	fmt.Fprintf(w, "  ringing through the line-connected reactors: lumped estimate 1/(2 pi sqrt(LC)) %.1f Hz aerial, %.1f Hz ground\n", rc.RingAerialHz, rc.RingGroundHz)
	for e, end := range []string{"sending", "receiving"} {
		if i := rc.ReactorA[e]; i != [3]float64{} {
			fmt.Fprintf(w, "  %s-end reactor currents at the mean closing instant: %+.1f, %+.1f, %+.1f A\n", end, i[0], i[1], i[2])
		}
	}
}
