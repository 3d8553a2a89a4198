package analysis

import (
	"context"
	"fmt"
	"math"

	"github.com/telegrapher/telegrapher/cmd/telegrapher/internal/study"
	"github.com/telegrapher/telegrapher/waves"
)

// SwitchingFigures are the statistics of one set of shots.
type SwitchingFigures struct {
	Stats       waves.SwitchingStats // pu of the IEC 60071-1 base Us·√2/√3
	PhasePeaks  [][3]float64         // each shot's signed phase peaks, pu of the EMF base
	Margin      *float64             // % to switching.siwl_kv with the study's kcd; nil without siwl
	Unprotected bool                 // no surge arresters
	ToIEC       float64              // EMF base to IEC base: voltage / Us
}

// ArresterLevel is the switching protective level of one arrester set.
type ArresterLevel struct {
	Spec    study.ArresterSpec
	Ups     float64 // V peak, residual voltage at the coordination current
	Current float64 // A, the switching coordination current
}

// SwitchingResult is the statistical switching study of a study.
type SwitchingResult struct {
	Shots int
	// Figures are those of the study as given (with its arresters, if any); Bare
	// those of the same shots without arresters (Figures itself when it has none).
	Figures *SwitchingFigures
	Bare    *SwitchingFigures
	// WithArresters is set when the study has arresters (Figures != Bare).
	WithArresters bool

	Net      waves.ThreePhase        // the circuit, with its arresters
	Settings waves.SwitchingSettings // the simulation settings
	BaseIEC  float64                 // V, Us·√2/√3
	BaseEMF  float64                 // V, the EMF peak voltage·√2/√3
	Step     float64                 // s, the simulation time step
	EvalHz   float64                 // Hz, where the modal line's constants are taken

	Arresters      []ArresterLevel
	KcdFigure      float64  // IEC 60071-2 Fig. 6 reading for Ups/u2 (with arresters)
	MarginArrester *float64 // % with arresters, kcd from the figure (with siwl)

	Worst     int // index of the worst shot (largest absolute phase peak)
	WorstShot waves.Shot
	WorstWave *waves.ThreePhaseWave // its waveforms, pu of BaseEMF

	RingDown               *waves.RingDown // the dead time's ring-down; nil without one
	RingGround, RingAerial float64         // Hz, lumped ring-down estimates (0: no reactors)

	Notes []string // how the figures were obtained
}

// SwitchingProgress is told the shots done of total in a pass ("without arresters",
// "with arresters", or "" when the study has no arresters); it may be called
// concurrently.
type SwitchingProgress func(done, total int, pass string)

// SwitchingApplicable returns nil when the study can run the switching study, or an
// *InputError saying why not.
func SwitchingApplicable(st *study.Study) error {
	if len(st.Zero) == 0 {
		return inputf(st.File, "line", "switching needs zero-sequence data: give line.r0_ohm_per_km, l0_mh_per_km (or x0_ohm_per_km) and c0_nf_per_km (or b0_us_per_km), or [line.geometry]")
	}
	return nil
}

// ModalLine returns the modal line of the study's three-phase line at the system
// frequency (an *InputError when its data cannot make one).
func ModalLine(st *study.Study) (waves.ModalLine, error) {
	ml, err := waves.NewModalLine(st.Line, st.Zero, 2*math.Pi*st.Frequency)
	if err != nil {
		return ml, inputf(st.File, "line", "%v", err)
	}
	return ml, nil
}

// SwitchingSetup builds the three-phase circuit (without its arresters, returned
// apart) and the simulation settings of st on the modal line ml, as every switching
// computation uses them.
func SwitchingSetup(st *study.Study, ml waves.ModalLine) (waves.ThreePhase, waves.SwitchingSettings, []waves.Arrester) {
	set := st.Switching
	opt := st.SwitchingOptions()
	x0 := st.Source.X0OverX1
	if x0 == 0 {
		x0 = 1
	}
	omega := 2 * math.Pi * st.Frequency
	net := waves.ThreePhase{
		Omega: omega, EMFPeak: st.Voltage * math.Sqrt2 / math.Sqrt(3), Line: ml,
		SourceR: st.Network.Source.R, SourceL: st.Network.Source.L, X0OverX1: x0,
		Shunts: st.Network.Shunts, NeutralL: opt.NeutralReactorL,
	}
	ws := waves.SwitchingSettings{
		Shots: set.Shots, Seed: uint64(set.Seed), HasCloseDeg: set.HasCloseDeg, CloseDeg: set.CloseDeg,
		PoleSigma: set.PoleSigma, TrappedPU: set.TrappedPU, Preinsertion: set.Preinsertion,
		InsertTime: set.InsertTime, Duration: set.Duration, TimeStep: set.TimeStep,
		Controlled: opt.Controlled, ControlledSigma: opt.ControlledSigma, DeadTime: opt.DeadTime,
	}
	if ws.Preinsertion == 0 {
		ws.InsertTime = 0
	}
	var arr []waves.Arrester
	for _, a := range opt.Arresters {
		at := 1
		if a.At == "sending" {
			at = 0
		}
		arr = append(arr, waves.Arrester{Name: a.Name, At: at, VI: a.VI})
	}
	return net, ws, arr
}

// simulate builds the simulator of net once and runs its shots; a problem with the
// settings or circuit is an *InputError naming the study key (settingKeys).
func simulate(ctx context.Context, st *study.Study, net waves.ThreePhase, ws waves.SwitchingSettings, progress func(int)) (*waves.SwitchingSimulator, *waves.SwitchingResult, error) {
	sim, err := waves.NewSwitchingSimulator(net, ws)
	if err != nil {
		return nil, nil, noConvergence(st.File, settingInput(st.File, CmdSwitching, err, waves.ErrSwitching))
	}
	r, err := sim.Simulate(ctx, progress)
	if err != nil {
		return nil, nil, noConvergence(st.File, err)
	}
	return sim, r, nil
}

// figures computes the statistics of shots.
func figures(st *study.Study, shots []waves.Shot, unprotected bool) (*SwitchingFigures, error) {
	peaks := make([][3]float64, len(shots))
	for i, s := range shots {
		peaks[i] = s.Peak
	}
	toIEC := st.Voltage / st.Us
	stats, err := waves.Statistics(peaks, toIEC)
	if err != nil {
		return nil, err
	}
	f := &SwitchingFigures{Stats: stats, PhasePeaks: peaks, Unprotected: unprotected, ToIEC: toIEC}
	if set := st.Switching; set.SIWL > 0 {
		baseIEC := st.Us * math.Sqrt2 / math.Sqrt(3)
		m := waves.MarginPct(set.SIWL, set.Ks, set.Kcd, stats.U2*baseIEC)
		f.Margin = &m
	}
	return f, nil
}

// SwitchingFiguresOf runs the statistical switching study of st on the modal line ml
// with the study's arresters (as Switching does for its figures, without the worst
// shot's waveforms) and returns its statistics; the remedy search calls it on each
// modified study. With controlled set, the poles close under controlled closing with
// scatter sigma (s) instead of the study's setting.
func SwitchingFiguresOf(ctx context.Context, st *study.Study, ml waves.ModalLine, controlled bool, sigma float64) (*SwitchingFigures, error) {
	net, ws, arr := SwitchingSetup(st, ml)
	net.Arresters = arr
	if controlled {
		ws.Controlled, ws.ControlledSigma = true, sigma
	}
	_, r, err := simulate(ctx, st, net, ws, nil)
	if err != nil {
		return nil, err
	}
	return figures(st, r.Shots, len(arr) == 0)
}

// Switching runs the statistical switching study of st: every shot without arresters
// and, when the study has arresters, the same shots with them; the statistics (IEC
// 60071-2 phase-peak and case-peak methods), the arresters' protective levels, the
// worst shot's waveforms and the dead time's ring-down. progress (may be nil) counts
// the shots of each pass. It stops between shots when ctx ends.
func Switching(ctx context.Context, st *study.Study, progress SwitchingProgress) (*SwitchingResult, error) {
	if err := SwitchingApplicable(st); err != nil {
		return nil, err
	}
	set := st.Switching
	opt := st.SwitchingOptions()
	if set.SIWL > 0 && st.Us <= 245e3 {
		return nil, inputf(st.File, "switching.siwl_kv", "switching impulse withstand levels belong to range II (us_kv > 245); this study has us_kv = %g", st.Us/1e3)
	}
	ml, err := ModalLine(st)
	if err != nil {
		return nil, err
	}
	net, ws, arr := SwitchingSetup(st, ml)
	// Progress counts shots, once per pass (the simulator counts each run from 0): the
	// shots run a second time with the arresters when the study has them.
	pass := ""
	if len(arr) > 0 {
		pass = "without arresters"
	}
	var prog func(int)
	if progress != nil {
		prog = func(done int) { progress(done, set.Shots, pass) }
	}
	res := &SwitchingResult{Shots: set.Shots, Settings: ws, EvalHz: ml.EvalHz,
		BaseIEC: st.Us * math.Sqrt2 / math.Sqrt(3), BaseEMF: net.EMFPeak}
	sim, r, err := simulate(ctx, st, net, ws, prog)
	if err != nil {
		return nil, err
	}
	if res.Bare, err = figures(st, r.Shots, true); err != nil {
		return nil, err
	}
	res.Figures = res.Bare
	if len(arr) > 0 {
		net.Arresters = arr
		pass = "with arresters"
		if sim, r, err = simulate(ctx, st, net, ws, prog); err != nil {
			return nil, err
		}
		if res.Figures, err = figures(st, r.Shots, false); err != nil {
			return nil, err
		}
		res.WithArresters = true
	}
	res.Net, res.Step = net, r.Step
	res.Notes = append(res.Notes, r.Notes...)
	res.Notes = append(res.Notes,
		fmt.Sprintf("statistics: IEC 60071-2 phase-peak method (u2 = 98th percentile of the %d absolute phase peaks, linear interpolation; ut = 1.25 u2 - 0.25) and case-peak method (ut = 1.13 u2 - 0.13), per unit of Us*sqrt(2)/sqrt(3) = %.1f kV", 3*set.Shots, res.BaseIEC/1e3),
		"pole closing instants are rounded to the time step; duration counted from the last pole's last contact (resistor bypass included)")
	if ws.Controlled {
		aim := "where the voltage across its contacts is zero"
		if ws.DeadTime > 0 && ws.TrappedPU != [3]float64{} {
			aim = "at the least voltage across its contacts (EMF minus the ringing line-side voltage the dead time leaves) within two cycles of the command, over its scatter"
		}
		res.Notes = append(res.Notes, fmt.Sprintf("controlled closing: each pole aims %s, scattered by %g ms (normal, truncated at 3 sigma), instead of random closing", aim, ws.ControlledSigma*1e3))
	}
	// Switching coordination current: 2 kA above 362 kV, 1 kA below (IEC 60099-5, from memory).
	ka := 1.0
	if st.Us > 362e3 {
		ka = 2.0
	}
	for _, a := range opt.Arresters {
		ups, err := waves.SwitchingProtectiveLevel(a.VI, ka*1e3)
		if err != nil {
			return nil, inputf(st.File, "switching.arrester", "%v", err)
		}
		res.Arresters = append(res.Arresters, ArresterLevel{Spec: a, Ups: ups, Current: ka * 1e3})
	}
	if len(res.Arresters) > 0 {
		u2kv := res.Bare.Stats.U2 * res.BaseIEC / 1e3
		ups := math.Inf(1)
		for _, a := range res.Arresters {
			ups = math.Min(ups, a.Ups/1e3)
		}
		res.KcdFigure = waves.KcdPhasePeak(ups / u2kv)
		if set.SIWL > 0 {
			m := waves.MarginPct(set.SIWL, set.Ks, res.KcdFigure, ups*1e3)
			res.MarginArrester = &m
		}
		res.Notes = append(res.Notes, fmt.Sprintf("with arresters: Ups = %.0f kV at %.0f kA; IEC 60071-2 Fig. 6 (phase-peak, approximate reading) gives kcd = %.3f for Ups/u2 = %.2f (the margin uses kcd = %.3f as given)", ups, ka, res.KcdFigure, ups/u2kv, set.Kcd))
	}
	// Worst shot: the largest case peak of the study as given, simulated again with its
	// waveforms recorded.
	worst, wv := 0, -1.0
	for i, sh := range r.Shots {
		for k := 0; k < 3; k++ {
			if a := math.Abs(sh.Peak[k]); a > wv {
				worst, wv = i, a
			}
		}
	}
	res.Worst = worst
	if res.WorstShot, res.WorstWave, err = sim.Shot(r.Shots[worst].ShotSpec, true); err != nil {
		return nil, noConvergence(st.File, err)
	}
	res.RingGround, res.RingAerial = net.RingEstimate()
	if rd := sim.RingDown(); rd != nil {
		res.RingDown = rd
		res.Notes = append(res.Notes, fmt.Sprintf("dead time %g ms: the de-energised line is simulated from the opening (line at trapped_pu, zero current in the line and its reactors) by the same model and step as the shots; every shot starts from that ring-down state", ws.DeadTime*1e3))
	}
	return res, nil
}
