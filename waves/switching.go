package waves

import (
	"context"
	"errors"
	"fmt"
	"math"
	"math/cmplx"
	"math/rand/v2"
	"runtime"
	"sync/atomic"

	"github.com/telegrapher/telegrapher/freqscan"
	"golang.org/x/sync/errgroup"
)

// MaxShots is the largest number of shots a statistical switching study may take.
const MaxShots = 100_000

// MaxDeadTime is the longest dead time of a reclosing (s).
const MaxDeadTime = 10.0

// ThreePhase is the three-phase circuit of a switching study: a balanced source EMF of
// peak EMFPeak behind its positive- and zero-sequence R-L impedance, the sending bus
// with its bus-connected shunts, the three-pole breaker, the transposed line in modal
// form with its line-connected shunts at both ends, the far end open.
type ThreePhase struct {
	Omega   float64 // system angular frequency, rad/s
	EMFPeak float64 // peak phase-to-earth source EMF, V (the per-unit base)
	Line    ModalLine

	// SourceR and SourceL are the positive-sequence source resistance (ohm) and
	// inductance (H); both 0 is an ideal source. The zero-sequence impedance is
	// X0OverX1 times the positive-sequence one (R and L both scaled, so X/R is kept).
	SourceR, SourceL float64
	X0OverX1         float64 // > 0

	// Shunts are per-phase elements, phase to earth (or to the bank's neutral). The
	// receiving bus-connected ones are not connected (far end open).
	Shunts []freqscan.Shunt
	// NeutralL is the inductance (H) of a neutral reactor between the star point of the
	// line-connected reactors at the sending (0) and receiving (1) end and earth;
	// 0 = star point solidly earthed.
	NeutralL [2]float64

	Arresters []Arrester // phase-to-earth surge arresters; none = unprotected
}

// SwitchingSettings are the settings of a statistical switching study, in SI units.
type SwitchingSettings struct {
	Shots       int     // 1..MaxShots
	Seed        uint64  // seed of the random closing instants
	HasCloseDeg bool    // true: phase a EMF angle at the mean closing instant is CloseDeg
	CloseDeg    float64 // degrees
	PoleSigma   float64 // s, standard deviation of each pole about the mean instant (truncated at 3σ)
	TrappedPU   [3]float64
	// Preinsertion is the pre-insertion resistor (ohm, 0 = none), in circuit for
	// InsertTime (s) after each pole's first contact, then bypassed.
	Preinsertion, InsertTime float64
	Duration                 float64 // s, from the last pole's last contact
	TimeStep                 float64 // s; 0 = chosen (min(20 µs, shortest modal travel time / 10))
	Workers                  int     // goroutines; 0 = GOMAXPROCS
	// Controlled is controlled (point-on-wave) closing: each pole aims at the instant
	// the voltage across its contacts is zero (ControlledShots), scattered normally by
	// ControlledSigma (s, truncated at 3σ), instead of random closing.
	Controlled      bool
	ControlledSigma float64
	// DeadTime is the dead time of a reclosing (s): from the line's opening, when it
	// is left at TrappedPU with zero current in the line and its shunts, to the mean
	// closing instant (deadtime.go). 0: the trapped voltages hold at the closing.
	DeadTime float64
}

// ShotSpec is one shot's random draw: the phase a EMF angle at the mean closing
// instant (degrees) and each pole's first-contact instant relative to the mean (s).
type ShotSpec struct {
	CloseDeg float64
	Offset   [3]float64
}

// Shot is the outcome of one shot: the signed extreme of each phase's receiving-end
// voltage (pu of EMFPeak) and when it occurred (s from the mean closing instant).
type Shot struct {
	ShotSpec
	Peak     [3]float64
	PeakTime [3]float64
}

// ThreePhaseWave is one shot's waveforms at both line ends, sampled every Step from
// Start (s, relative to the mean closing instant; Start is the first pole's contact).
// Voltages in pu of EMFPeak.
type ThreePhaseWave struct {
	Step        float64
	Start       float64
	LastContact float64 // s: the last pole's last contact (resistor bypass included)
	Sending     [3][]float64
	Receiving   [3][]float64
	EMF         [3][]float64
}

// SwitchingResult holds every shot of a study, in the order drawn.
type SwitchingResult struct {
	Shots []Shot
	Step  float64 // time step used, s
	Notes []string
}

// DrawShots draws every shot's random numbers up front from a PCG generator seeded
// with s.Seed, in shot order, so the shots do not depend on how they are later
// spread over cores: per shot the mean-instant angle (uniform over one cycle, unless
// HasCloseDeg) then the three pole offsets, each normal with PoleSigma truncated at
// ±3σ by rejection.
func DrawShots(s SwitchingSettings) []ShotSpec {
	r := rand.New(rand.NewPCG(s.Seed, 0x7e1e_9a4f_3c5d_2b61))
	out := make([]ShotSpec, s.Shots)
	for k := range out {
		if s.HasCloseDeg {
			out[k].CloseDeg = s.CloseDeg
		} else {
			out[k].CloseDeg = 360 * r.Float64()
		}
		for p := 0; p < 3; p++ {
			if s.PoleSigma == 0 {
				continue
			}
			out[k].Offset[p] = truncatedNormal(r) * s.PoleSigma
		}
	}
	return out
}

// truncatedNormal draws a standard normal number truncated at ±3 by rejection: the
// scatter of a pole's closing instant, in units of its standard deviation.
func truncatedNormal(r *rand.Rand) float64 {
	z := r.NormFloat64()
	for math.Abs(z) > 3 {
		z = r.NormFloat64()
	}
	return z
}

// ErrSwitching is wrapped by errors about the switching settings or circuit that the
// user's data can cause.
var ErrSwitching = errors.New("switching")

func (s SwitchingSettings) check() error {
	bad := func(setting, f string, a ...any) error {
		return settingErr(setting, ErrSwitching, f, a...)
	}
	fin := func(x float64) bool { return !math.IsNaN(x) && !math.IsInf(x, 0) }
	switch {
	case s.Shots < 1 || s.Shots > MaxShots:
		return bad("Shots", "shots must be 1..%d, got %d", MaxShots, s.Shots)
	case !fin(s.CloseDeg):
		return bad("CloseDeg", "closing angle must be finite")
	case !(s.PoleSigma >= 0) || !fin(s.PoleSigma) || s.PoleSigma > 0.02:
		return bad("PoleSigma", "pole scatter must be 0..20 ms, got %g s", s.PoleSigma)
	case !(s.Preinsertion >= 0) || !fin(s.Preinsertion):
		return bad("Preinsertion", "pre-insertion resistance must be >= 0, got %g ohm", s.Preinsertion)
	case s.Preinsertion > 0 && (!(s.InsertTime > 0) || !fin(s.InsertTime) || s.InsertTime > 0.1):
		return bad("InsertTime", "pre-insertion time must be > 0 and at most 100 ms, got %g s", s.InsertTime)
	case !(s.Duration > 0) || !fin(s.Duration):
		return bad("Duration", "duration must be > 0, got %g s", s.Duration)
	case !(s.TimeStep >= 0) || !fin(s.TimeStep):
		return bad("TimeStep", "time step must be >= 0, got %g s", s.TimeStep)
	case !(s.ControlledSigma >= 0) || !fin(s.ControlledSigma) || s.ControlledSigma > 0.02:
		return bad("ControlledSigma", "controlled-closing scatter must be 0..20 ms, got %g s", s.ControlledSigma)
	case !(s.DeadTime >= 0) || !fin(s.DeadTime) || s.DeadTime > MaxDeadTime:
		return bad("DeadTime", "dead time must be 0..%g s, got %g s", MaxDeadTime, s.DeadTime)
	}
	for k, v := range s.TrappedPU {
		if !fin(v) || math.Abs(v) > 10 {
			return bad("TrappedPU", "trapped charge of phase %c must be within ±10 pu, got %g", 'a'+k, v)
		}
	}
	return nil
}

// pole states
const (
	poleOpen = iota
	poleResistor
	poleClosed
)

// switchTopo is the factorised nodal system for one combination of pole states
// (nodal.go) with the arresters on its unknown nodes (nil: none).
type switchTopo struct {
	*topology
	arr *arresterSet
}

// modalSource is the source's coupled R-L impedance between the phase EMFs and the
// sending bus, as one companion branch per mode (ground mode scaled by x0/x1): v is
// the modal EMF minus the bus voltage, i the modal current into the bus.
type modalSource struct {
	bus  [3]int
	mode [3]companion
}

func (s *modalSource) stamp(g [][]float64) {
	m := balancedMatrix(s.mode[0].g, s.mode[1].g)
	for a := 0; a < 3; a++ {
		for b := 0; b < 3; b++ {
			g[s.bus[a]][s.bus[b]] += m[a][b]
		}
	}
}

// inject adds i = g·e + h per mode (the EMF behind the companion) to the bus nodes.
func (s *modalSource) inject(j []float64, ek drive) {
	var hm [3]float64
	em := toModal(ek)
	for m := 0; m < 3; m++ {
		s.mode[m].history()
		hm[m] = s.mode[m].g*em[m] + s.mode[m].h
	}
	hp := toPhase(hm)
	for k := 0; k < 3; k++ {
		j[s.bus[k]] += hp[k]
	}
}

func (s *modalSource) update(v []float64, ek drive) {
	var up [3]float64
	for k := 0; k < 3; k++ {
		up[k] = ek[k] - v[s.bus[k]]
	}
	um := toModal(up)
	for m := 0; m < 3; m++ {
		s.mode[m].step(um[m])
	}
}

// SwitchingSimulator is the set-up of a switching study for a fixed time step: the
// modal lines, the lumped elements and the nodal matrices factorised (inverted, the
// system is at most a few tens of nodes) for every combination of pole states, shared
// read-only by all shots.
type SwitchingSimulator struct {
	net      ThreePhase
	set      SwitchingSettings
	dt       float64
	nNodes   int
	busNode  [3]int
	endNode  [][3]int    // junction j phase k
	neutral  [2]int      // node of the star point at each end, -1 none
	branches []companion // lumped shunts and neutral reactors
	src      modalSource // the source's companions (unused for an ideal source)
	srcZ     [3]complex128
	ideal    bool
	topo     [27]*switchTopo
	curves   []*arresterCurve
	ring     *ringDown // the dead time's ring-down; nil without trapped charge or dead time
}

// NewSwitchingSimulator checks the circuit and settings and prepares the nodal
// simulation: nodal time-domain analysis with modal Bergeron lines and trapezoidal
// lumped elements at a fixed step, with the small nodal matrix re-factorised for
// each topology (pole open, through its pre-insertion resistor, or closed).
//
// References:
//
//   - H. W. Dommel, "Digital computer solution of electromagnetic transients in
//     single- and multiphase networks", IEEE Trans. PAS-88 (1969) 388-399.
//   - H. W. Dommel, "Nonlinear and time-varying elements in digital simulation of
//     electromagnetic transients", IEEE Trans. PAS-90 (1971) 2561-2567
//     (compensation method for the arresters).
func NewSwitchingSimulator(net ThreePhase, s SwitchingSettings) (*SwitchingSimulator, error) {
	if err := s.check(); err != nil {
		return nil, err
	}
	if !(net.Omega > 0) || !(net.EMFPeak > 0) {
		panic("waves: switching: Omega and EMFPeak must be > 0")
	}
	if len(net.Line.Sections) == 0 {
		return nil, fmt.Errorf("%w: the line has no sections", ErrSwitching)
	}
	if !(net.SourceR >= 0) || !(net.SourceL >= 0) || !(net.X0OverX1 > 0) {
		return nil, fmt.Errorf("%w: source R, L must be >= 0 and x0/x1 > 0 (got %g ohm, %g H, %g)", ErrSwitching, net.SourceR, net.SourceL, net.X0OverX1)
	}
	tmin := net.Line.minTau()
	dt := s.TimeStep
	if dt == 0 {
		dt = math.Min(20e-6, tmin/10)
	}
	if dt > tmin {
		return nil, settingErr("TimeStep", ErrSwitching, "time step %.4g µs exceeds the shortest modal travel time %.4g µs", dt*1e6, tmin*1e6)
	}
	span := 6*s.PoleSigma + s.InsertTime*b2f(s.Preinsertion > 0) + s.Duration
	if span/dt > MaxSamples {
		return nil, settingErr("TimeStep", ErrSwitching, "duration / time step = %.4g exceeds %d samples", span/dt, MaxSamples)
	}
	sim := &SwitchingSimulator{net: net, set: s, dt: dt}
	sim.ideal = net.SourceR == 0 && net.SourceL == 0
	n := 0
	for k := 0; k < 3; k++ {
		sim.busNode[k] = n
		n++
	}
	nj := len(net.Line.Sections) + 1
	sim.endNode = make([][3]int, nj)
	for j := 0; j < nj; j++ {
		for k := 0; k < 3; k++ {
			sim.endNode[j][k] = n
			n++
		}
	}
	sim.neutral = [2]int{-1, -1}
	for e := 0; e < 2; e++ {
		if net.NeutralL[e] < 0 || math.IsNaN(net.NeutralL[e]) || math.IsInf(net.NeutralL[e], 0) {
			return nil, settingErr("NeutralL", ErrSwitching, "neutral reactor inductance must be >= 0")
		}
		if net.NeutralL[e] == 0 {
			continue
		}
		has := false
		for _, sh := range net.Shunts {
			has = has || (sh.OnLine && sh.L > 0 && int(sh.End) == e)
		}
		if !has {
			return nil, settingErr([2]string{"NeutralL[0]", "NeutralL[1]"}[e], ErrSwitching, "a neutral reactor at the %s end needs a line-connected reactor there", freqscan.End(e))
		}
		sim.neutral[e] = n
		n++
		sim.branches = append(sim.branches, newCompanion(sim.neutral[e], -1, 0, net.NeutralL[e], 0, dt))
	}
	sim.nNodes = n
	for _, sh := range net.Shunts {
		if sh.R < 0 || sh.L < 0 || sh.C < 0 || (sh.L > 0) == (sh.C > 0) {
			return nil, fmt.Errorf("%w: shunt %q needs exactly one of L, C > 0 and R >= 0", ErrSwitching, sh.Name)
		}
		var nodes [3]int
		to := [3]int{-1, -1, -1}
		switch {
		case sh.End == freqscan.Sending && !sh.OnLine:
			nodes = sim.busNode
		case sh.End == freqscan.Sending:
			nodes = sim.endNode[0]
		case sh.OnLine:
			nodes = sim.endNode[nj-1]
		default:
			continue // receiving bus-connected: far end open
		}
		if sh.OnLine && sh.L > 0 && sim.neutral[sh.End] >= 0 {
			to = [3]int{sim.neutral[sh.End], sim.neutral[sh.End], sim.neutral[sh.End]}
		}
		for k := 0; k < 3; k++ {
			sim.branches = append(sim.branches, newCompanion(nodes[k], to[k], sh.R, sh.L, sh.C, dt))
		}
	}
	// Source: modal companion of the coupled R-L (ground mode scaled by x0/x1).
	for m := 0; m < 3; m++ {
		f := 1.0
		if m == ModeGround {
			f = net.X0OverX1
		}
		r, l := f*net.SourceR, f*net.SourceL
		sim.srcZ[m] = complex(r, net.Omega*l)
		if !sim.ideal {
			sim.src.mode[m] = newCompanion(-1, -1, r, l, 0, dt)
		}
	}
	sim.src.bus = sim.busNode
	for _, a := range net.Arresters {
		c, err := newArresterCurve(a.VI)
		if err != nil {
			return nil, settingErr("Arresters", ErrSwitching, "arrester %q: %v", a.Name, err)
		}
		sim.curves = append(sim.curves, c)
	}
	base := sim.baseMatrix()
	for code := 0; code < 27; code++ {
		t, err := sim.factorise(base, code)
		if err != nil {
			return nil, err
		}
		sim.topo[code] = t
	}
	if s.DeadTime > 0 && s.TrappedPU != [3]float64{} {
		// First contacts fall within [minT, maxT] of the mean closing instant.
		minT, maxT := -3*s.PoleSigma, 3*s.PoleSigma
		if s.Controlled {
			minT, maxT = -3*s.ControlledSigma, controlWindow(net.Omega)+3*s.ControlledSigma
		}
		if (s.DeadTime+maxT)/dt > MaxSamples {
			return nil, settingErr("TimeStep", ErrSwitching, "dead time / time step = %.4g exceeds %d samples", (s.DeadTime+maxT)/dt, MaxSamples)
		}
		rd, err := newRingDown(sim, minT, maxT)
		if err != nil {
			return nil, err
		}
		sim.ring = rd
	}
	return sim, nil
}

func b2f(b bool) float64 {
	if b {
		return 1
	}
	return 0
}

// Step returns the time step in seconds.
func (sim *SwitchingSimulator) Step() float64 { return sim.dt }

// baseMatrix returns the full nodal conductance matrix without the breaker, stamped
// in the order source, line sections, lumped branches.
func (sim *SwitchingSimulator) baseMatrix() [][]float64 {
	g := newMatrix(sim.nNodes)
	if !sim.ideal {
		sim.src.stamp(g)
	}
	st := sim.openingState([3]float64{})
	for _, ln := range st.lines {
		ln.stamp(g)
	}
	for bi := range sim.branches {
		sim.branches[bi].stamp(g)
	}
	return g
}

// poleStates decodes a topology code.
func poleStates(code int) (p [3]int) {
	for k := 0; k < 3; k++ {
		p[k] = code % 3
		code /= 3
	}
	return p
}

// factorise returns the nodal system for the pole states of code: each pole open,
// through its pre-insertion resistor (stamped between the bus and the line end) or
// closed (the line end joins the bus node); with an ideal source the bus nodes are
// held at the EMFs. nil for a resistor state without a resistor (never used).
func (sim *SwitchingSimulator) factorise(base [][]float64, code int) (*switchTopo, error) {
	n := sim.nNodes
	ps := poleStates(code)
	g := make([][]float64, n)
	for i := range g {
		g[i] = append([]float64(nil), base[i]...)
	}
	join := make([]int, n)
	known := make([]int, n)
	for i := range join {
		join[i], known[i] = i, -1
	}
	if sim.ideal {
		for k, b := range sim.busNode {
			known[b] = k
		}
	}
	for k := 0; k < 3; k++ {
		b, l := sim.busNode[k], sim.endNode[0][k]
		switch ps[k] {
		case poleResistor:
			if sim.set.Preinsertion == 0 {
				return nil, nil // never used without a resistor
			}
			stampConductance(g, b, l, 1/sim.set.Preinsertion)
		case poleClosed:
			join[l] = b
		}
	}
	tp, err := newTopology(g, join, known, invertWith(1e-13))
	if err != nil {
		return nil, fmt.Errorf("%w: the nodal matrix is singular for pole states %v (a floating part of the circuit)", ErrSwitching, ps)
	}
	t := &switchTopo{topology: tp}
	// Arresters on unknown nodes.
	arr := &arresterSet{inv: tp.f.(*inverse).a, nu: tp.nu, tol: 1e-9 * sim.net.EMFPeak}
	idx := map[int]int{}
	nj := len(sim.endNode)
	for ai, a := range sim.net.Arresters {
		j := 0
		if a.At == 1 {
			j = nj - 1
		}
		for k := 0; k < 3; k++ {
			u := tp.nodeU[sim.endNode[j][k]]
			if u < 0 {
				continue // held by the ideal source
			}
			p, ok := idx[u]
			if !ok {
				p = len(arr.nodes)
				idx[u] = p
				arr.nodes = append(arr.nodes, u)
				arr.curves = append(arr.curves, nil)
			}
			arr.curves[p] = append(arr.curves[p], sim.curves[ai])
		}
	}
	if len(arr.nodes) > 0 {
		arr.setZth()
		t.arr = arr
	}
	return t, nil
}

// shotState is the mutable state of one shot (or of the de-energised line during the
// dead time): the elements and the node voltages of the last step.
type shotState struct {
	*nodal
	src      modalSource
	branches []companion
	lines    []*modalBergeron
}

// wire builds st's nodal network from its parts, in the order of the injections:
// source, lumped branches, line sections.
func (st *shotState) wire(nodes int, ideal bool) {
	var elems []element
	if !ideal {
		elems = append(elems, &st.src)
	}
	for bi := range st.branches {
		elems = append(elems, &st.branches[bi])
	}
	for _, ln := range st.lines {
		elems = append(elems, ln)
	}
	st.nodal = newNodal(nodes, elems)
}

// clone returns a deep copy of st.
func (st *shotState) clone(ideal bool) *shotState {
	c := &shotState{src: st.src}
	c.lines = make([]*modalBergeron, len(st.lines))
	for i, ln := range st.lines {
		c.lines[i] = ln.clone()
	}
	c.branches = append([]companion(nil), st.branches...)
	c.wire(len(st.v), ideal)
	copy(c.v, st.v)
	return c
}

// openingState returns the state at the line's opening: the line charged to the
// trapped voltages (V, phase to earth) with zero current in the line and in every
// line-side shunt, the source side at rest.
func (sim *SwitchingSimulator) openingState(trapped [3]float64) *shotState {
	st := &shotState{src: sim.src}
	for j, sec := range sim.net.Line.Sections {
		st.lines = append(st.lines, newModalBergeron(sec, sim.dt, trapped, [2][3]int{sim.endNode[j], sim.endNode[j+1]}))
	}
	st.branches = append([]companion(nil), sim.branches...)
	n := sim.nNodes
	st.wire(n, sim.ideal)
	for a := 3; a < n; a++ {
		st.v[a] = sim.trappedAt(a, trapped)
	}
	for bi := range st.branches {
		br := &st.branches[bi]
		br.i, br.v, br.vc = 0, 0, 0
		if br.a < 3 {
			continue // bus side: set with the source
		}
		vb := 0.0
		if br.b >= 0 {
			vb = st.v[br.b]
		}
		br.v = st.v[br.a] - vb
		br.vc = br.v
	}
	return st
}

// initSource puts the source side of st (source branch, sending bus and its
// bus-connected shunts) in its sinusoidal steady state with the breaker open at the
// time tm1, for the phase a EMF angle th (rad) at time 0.
func (sim *SwitchingSimulator) initSource(st *shotState, th, tm1 float64) {
	net, w, base := sim.net, sim.net.Omega, sim.net.EMFPeak
	var ysb complex128
	for _, sh := range net.Shunts {
		if sh.End == freqscan.Sending && !sh.OnLine {
			ysb += sh.Admittance(complex(0, w))
		}
	}
	rot := cmplx.Exp(complex(0, w*tm1))
	var vbus [3]complex128
	var srcUp, srcIp [3]float64
	for k := 0; k < 3; k++ {
		e := cmplx.Exp(complex(0, th-float64(k)*2*math.Pi/3))
		vb := e / (1 + sim.srcZ[1]*ysb)
		vbus[k] = vb
		srcUp[k] = imag((e-vb)*rot) * base
		srcIp[k] = imag(vb*ysb*rot) * base
	}
	srcU, srcI := toModal(srcUp), toModal(srcIp)
	for m := 0; m < 3; m++ {
		st.src.mode[m].v, st.src.mode[m].i = srcU[m], srcI[m]
	}
	for bi := range st.branches {
		br := &st.branches[bi]
		if br.a >= 3 {
			continue
		}
		vb := vbus[br.a]
		sh := freqscan.Shunt{R: br.r, L: br.l, C: br.c}
		y := sh.Admittance(complex(0, w))
		br.v = imag(vb*rot) * base
		br.i = imag(vb*y*rot) * base
		if br.c > 0 {
			br.vc = imag(vb*y/complex(0, w*br.c)*rot) * base
		}
	}
	for k := 0; k < 3; k++ {
		st.v[sim.busNode[k]] = imag(vbus[k]*rot) * base
	}
}

// advance takes st one time step on with the topology tp and the phase EMFs ek (V):
// inject, solve (with the arresters' compensation), update. The step is taken
// whatever happens; the error wraps ErrNoConvergence when the arrester currents did
// not converge.
func (sim *SwitchingSimulator) advance(st *shotState, tp *switchTopo, ek [3]float64) error {
	st.inject(ek)
	var err error
	if tp.arr != nil {
		err = st.solve(tp.topology, ek, tp.arr.correct)
	} else {
		err = st.solve(tp.topology, ek, nil)
	}
	st.update(ek)
	return err
}

// shotPlan is the timing of one shot in steps: the first contact is step 0 (at
// Start, relative to the mean closing instant), pole k makes contact at close[k],
// the pre-insertion resistors stay in for ins steps.
type shotPlan struct {
	start       float64 // s, the first pole's contact
	close       [3]int
	ins         int
	lastContact float64 // s from start: the last pole's last contact
	steps       int
}

func (sim *SwitchingSimulator) plan(spec ShotSpec) shotPlan {
	dt, set := sim.dt, sim.set
	p := shotPlan{start: math.Min(spec.Offset[0], math.Min(spec.Offset[1], spec.Offset[2]))}
	if set.Preinsertion > 0 {
		p.ins = max(int(math.Round(set.InsertTime/dt)), 1)
	}
	for k := 0; k < 3; k++ {
		p.close[k] = int(math.Round((spec.Offset[k] - p.start) / dt))
	}
	p.lastContact = float64(max(p.close[0], p.close[1], p.close[2])+p.ins) * dt
	p.steps = int(math.Round((p.lastContact+set.Duration)/dt)) + 1
	return p
}

// code returns the topology code of the pole states at step.
func (p *shotPlan) code(step int) int {
	code, mul := 0, 1
	for k := 0; k < 3; k++ {
		s := poleOpen
		if step >= p.close[k] {
			s = poleClosed
			if p.ins > 0 && step < p.close[k]+p.ins {
				s = poleResistor
			}
		}
		code += s * mul
		mul *= 3
	}
	return code
}

// startState returns the state one step before the first contact: the line side at
// the trapped voltages with zero current, or as the dead time left it; the source
// side in its sinusoidal steady state with the breaker open.
func (sim *SwitchingSimulator) startState(spec ShotSpec, p shotPlan) (*shotState, error) {
	t := p.start - sim.dt
	var st *shotState
	if sim.ring != nil {
		var err error
		if st, err = sim.ring.stateAt(sim, sim.ring.stepAt(t, sim.dt)); err != nil {
			return nil, fmt.Errorf("during the dead time: %w", err)
		}
	} else {
		st = sim.openingState(sim.trappedV())
	}
	sim.initSource(st, spec.CloseDeg*math.Pi/180, t)
	return st, nil
}

// newWave returns the empty waveforms of a recorded shot.
func (sim *SwitchingSimulator) newWave(p shotPlan) *ThreePhaseWave {
	w := &ThreePhaseWave{Step: sim.dt, Start: p.start, LastContact: p.start + p.lastContact}
	for k := 0; k < 3; k++ {
		w.Sending[k] = make([]float64, p.steps)
		w.Receiving[k] = make([]float64, p.steps)
		w.EMF[k] = make([]float64, p.steps)
	}
	return w
}

// record keeps the step's receiving-end extremes in shot and, if wave is not nil,
// the step's end voltages and EMFs (pu).
func (sim *SwitchingSimulator) record(shot *Shot, wave *ThreePhaseWave, st *shotState, step int, t float64, ek [3]float64) {
	base := sim.net.EMFPeak
	recv := sim.endNode[len(sim.endNode)-1]
	send := sim.endNode[0]
	for k := 0; k < 3; k++ {
		vr := st.v[recv[k]] / base
		if step == 0 || math.Abs(vr) > math.Abs(shot.Peak[k]) {
			shot.Peak[k] = vr
			shot.PeakTime[k] = t
		}
		if wave != nil {
			wave.Receiving[k][step] = vr
			wave.Sending[k][step] = st.v[send[k]] / base
			wave.EMF[k][step] = ek[k] / base
		}
	}
}

// Shot simulates one shot. With record it also returns the waveforms. The error
// wraps ErrNoConvergence, with the time, when the arrester currents did not converge.
func (sim *SwitchingSimulator) Shot(spec ShotSpec, record bool) (Shot, *ThreePhaseWave, error) {
	w, base := sim.net.Omega, sim.net.EMFPeak
	th := spec.CloseDeg * math.Pi / 180
	p := sim.plan(spec)
	shot := Shot{ShotSpec: spec}
	st, err := sim.startState(spec, p)
	if err != nil {
		return shot, nil, err
	}
	var wave *ThreePhaseWave
	if record {
		wave = sim.newWave(p)
	}
	var ek [3]float64
	for step := 0; step < p.steps; step++ {
		t := p.start + float64(step)*sim.dt
		for k := 0; k < 3; k++ {
			ek[k] = math.Sin(w*t+th-float64(k)*2*math.Pi/3) * base
		}
		if err := sim.advance(st, sim.topo[p.code(step)], ek); err != nil {
			return shot, nil, fmt.Errorf("at t = %.6g ms: %w", t*1e3, err)
		}
		sim.record(&shot, wave, st, step, t, ek)
	}
	return shot, wave, nil
}

// trappedV returns the trapped voltages in V.
func (sim *SwitchingSimulator) trappedV() [3]float64 {
	b := sim.net.EMFPeak
	t := sim.set.TrappedPU
	return [3]float64{t[0] * b, t[1] * b, t[2] * b}
}

// trappedAt returns the initial voltage of a line-side node: the trapped voltage of
// its phase, or for a star point the voltage that keeps the reactor currents'
// derivatives balanced (Σ (v_k − v_n)/L_k = v_n/L_n).
func (sim *SwitchingSimulator) trappedAt(node int, trapped [3]float64) float64 {
	if node < 3 {
		return 0
	}
	for e := 0; e < 2; e++ {
		if node != sim.neutral[e] {
			continue
		}
		num, den := 0.0, 1/sim.net.NeutralL[e]
		for _, br := range sim.branches {
			if br.b == node && br.l > 0 {
				k := (br.a - 3) % 3
				num += trapped[k] / br.l
				den += 1 / br.l
			}
		}
		return num / den
	}
	return trapped[(node-3)%3]
}

// Run simulates every shot, spread over workers goroutines (0 = GOMAXPROCS). Each
// shot depends only on its ShotSpec, so the results are the same whatever the number
// of workers. progress, if not nil, is called (from any goroutine, possibly
// concurrently) with the number of shots done so far. A shot that fails (arrester
// currents that do not converge: ErrNoConvergence) stops the run; the error names
// the first failed shot in the order drawn among those simulated.
func (sim *SwitchingSimulator) Run(specs []ShotSpec, workers int, progress func(done int)) ([]Shot, error) {
	return sim.RunContext(context.Background(), specs, workers, progress)
}

// RunContext is Run that also stops between shots when ctx is done: it then returns
// the context's error, and no shots.
func (sim *SwitchingSimulator) RunContext(ctx context.Context, specs []ShotSpec, workers int, progress func(done int)) ([]Shot, error) {
	if workers <= 0 {
		workers = runtime.GOMAXPROCS(0)
	}
	out := make([]Shot, len(specs))
	errs := make([]error, len(specs))
	var done atomic.Int64
	var failed atomic.Bool
	var g errgroup.Group
	g.SetLimit(max(workers, 1))
	for k := range specs {
		if failed.Load() || ctx.Err() != nil {
			break
		}
		g.Go(func() error { // a shot once started runs to its end: the first failed one in order is reported
			if ctx.Err() != nil {
				return nil
			}
			if out[k], _, errs[k] = sim.Shot(specs[k], false); errs[k] != nil {
				failed.Store(true)
				return nil
			}
			if d := done.Add(1); progress != nil {
				progress(int(d))
			}
			return nil
		})
	}
	_ = g.Wait() // the shots' errors are in errs, reported in the order drawn
	if err := ctx.Err(); err != nil {
		return nil, err
	}
	for k, err := range errs {
		if err != nil {
			return nil, fmt.Errorf("waves: switching: shot %d (closing angle %.4g°): %w (check the arresters' V-I tables, or try a smaller time step)", k+1, specs[k].CloseDeg, err)
		}
	}
	return out, nil
}

// Switching runs a whole statistical switching study: draws the shots (DrawShots, or
// ControlledShots with s.Controlled),
// prepares the simulation (NewSwitchingSimulator) and runs them (Run). Results are
// unprotected overvoltages unless net has arresters.
func Switching(net ThreePhase, s SwitchingSettings, progress func(done int)) (*SwitchingResult, error) {
	sim, err := NewSwitchingSimulator(net, s)
	if err != nil {
		return nil, err
	}
	return sim.Simulate(context.Background(), progress)
}

// Simulate runs the statistical switching study of the prepared simulator: draws the
// shots (DrawShots, or ControlledShots with the settings' Controlled) and runs them
// (RunContext), so a caller that needs the simulator afterwards (the worst shot's
// waveforms, the ring-down) builds it once. It returns ctx's error when ctx ends
// before the last shot.
func (sim *SwitchingSimulator) Simulate(ctx context.Context, progress func(done int)) (*SwitchingResult, error) {
	s, net := sim.set, sim.net
	specs := DrawShots(s)
	if s.Controlled {
		specs = sim.ControlledShots()
	}
	shots, err := sim.RunContext(ctx, specs, s.Workers, progress)
	if err != nil {
		return nil, err
	}
	for _, sh := range shots {
		for k := 0; k < 3; k++ {
			if math.IsNaN(sh.Peak[k]) || math.IsInf(sh.Peak[k], 0) {
				return nil, fmt.Errorf("waves: switching: the simulation diverged (non-finite voltage); try a smaller time step")
			}
		}
	}
	res := &SwitchingResult{Shots: shots, Step: sim.dt}
	res.Notes = append(res.Notes,
		fmt.Sprintf("nodal time-domain simulation, fixed step %.3g µs, modal Bergeron lines (ground and two aerial modes, constants at %.4g Hz, resistance lumped R/4-R/2-R/4 per mode), trapezoidal lumped elements, nodal matrix re-factorised for each pole-state topology", sim.dt*1e6, net.Line.EvalHz))
	if len(net.Arresters) == 0 {
		res.Notes = append(res.Notes, "unprotected overvoltages: no surge arresters")
	}
	return res, nil
}
