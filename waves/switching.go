package waves

import (
	"context"
	"errors"
	"fmt"
	"math"
	"math/cmplx"
	"math/rand/v2"
	"runtime"
	"sync"
	"sync/atomic"

	"github.com/telegrapher/telegrapher/freqscan"
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
			z := r.NormFloat64()
			for math.Abs(z) > 3 {
				z = r.NormFloat64()
			}
			out[k].Offset[p] = z * s.PoleSigma
		}
	}
	return out
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

// swBranch is a scalar lumped branch between node a and node b (-1 = earth) in its
// trapezoidal companion form: i = g·v + hist.
type swBranch struct {
	a, b    int
	r, l, c float64
	g       float64
	k       float64 // RL: 2L/dt − R; RC: dt/(2C)
	hist    float64
	i, v    float64 // current (a→b) and voltage (a−b) of the last step
	vc      float64 // RC: capacitor voltage
}

func newSwBranch(a, b int, r, l, c, dt float64) swBranch {
	br := swBranch{a: a, b: b, r: r, l: l, c: c}
	if l > 0 {
		br.g = 1 / (r + 2*l/dt)
		br.k = 2*l/dt - r
	} else if c > 0 {
		br.k = dt / (2 * c)
		br.g = 1 / (r + br.k)
	} else {
		br.g = 1 / r
	}
	return br
}

func (br *swBranch) history() {
	switch {
	case br.l > 0:
		br.hist = br.g * (br.v + br.k*br.i)
	case br.c > 0:
		br.hist = -br.g * (br.vc + br.k*br.i)
	default:
		br.hist = 0
	}
}

func (br *swBranch) update(v float64) {
	i := br.g*v + br.hist
	if br.c > 0 {
		br.vc += br.k * (i + br.i)
	}
	br.v, br.i = v, i
}

// topology is the factorised nodal system for one combination of pole states.
type topology struct {
	nu    int       // unknowns
	inv   []float64 // nu×nu inverse of G_UU, row-major
	guk   []float64 // nu×3 coupling to the known EMF-fed bus nodes (ideal source)
	nodeU []int     // full node → unknown index, -1 known
	nodeK []int     // full node → known EMF index (0..2), -1 unknown
	// arresters: unknown indices, their curves, Zth and the inverse's columns
	arrU   []int
	arrC   [][]*arresterCurve
	arrZth []float64 // len(arrU)² row-major
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
	endNode  [][3]int // junction j phase k
	neutral  [2]int   // node of the star point at each end, -1 none
	branches []swBranch
	srcG     [3]float64 // modal source companion conductance (0 for ideal)
	srcK     [3]float64 // modal 2L/dt − R
	srcZ     [3]complex128
	ideal    bool
	topo     [27]*topology
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
		sim.branches = append(sim.branches, newSwBranch(sim.neutral[e], -1, 0, net.NeutralL[e], 0, dt))
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
			sim.branches = append(sim.branches, newSwBranch(nodes[k], to[k], sh.R, sh.L, sh.C, dt))
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
			sim.srcG[m] = 1 / (r + 2*l/dt)
			sim.srcK[m] = 2*l/dt - r
		}
	}
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
		sim.ring = newRingDown(sim, minT, maxT)
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

// baseMatrix returns the full nodal conductance matrix without the breaker.
func (sim *SwitchingSimulator) baseMatrix() [][]float64 {
	n := sim.nNodes
	g := make([][]float64, n)
	for i := range g {
		g[i] = make([]float64, n)
	}
	stamp3 := func(nodes [3]int, m [3][3]float64) {
		for a := 0; a < 3; a++ {
			for b := 0; b < 3; b++ {
				g[nodes[a]][nodes[b]] += m[a][b]
			}
		}
	}
	if !sim.ideal {
		stamp3(sim.busNode, balancedMatrix(sim.srcG[0], sim.srcG[1]))
	}
	for j, sec := range sim.net.Line.Sections {
		y := balancedMatrix(1/(sec.Zc[0]+sec.R[0]/4), 1/(sec.Zc[1]+sec.R[1]/4))
		gl := balancedMatrix(sec.G[0]/2, sec.G[1]/2)
		for _, nodes := range [][3]int{sim.endNode[j], sim.endNode[j+1]} {
			stamp3(nodes, y)
			stamp3(nodes, gl)
		}
	}
	for _, br := range sim.branches {
		g[br.a][br.a] += br.g
		if br.b >= 0 {
			g[br.b][br.b] += br.g
			g[br.a][br.b] -= br.g
			g[br.b][br.a] -= br.g
		}
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

func (sim *SwitchingSimulator) factorise(base [][]float64, code int) (*topology, error) {
	n := sim.nNodes
	ps := poleStates(code)
	g := make([][]float64, n)
	for i := range g {
		g[i] = append([]float64(nil), base[i]...)
	}
	cls := make([]int, n)
	for i := range cls {
		cls[i] = i
	}
	for k := 0; k < 3; k++ {
		b, l := sim.busNode[k], sim.endNode[0][k]
		switch ps[k] {
		case poleResistor:
			if sim.set.Preinsertion == 0 {
				return nil, nil // never used without a resistor
			}
			y := 1 / sim.set.Preinsertion
			g[b][b] += y
			g[l][l] += y
			g[b][l] -= y
			g[l][b] -= y
		case poleClosed:
			cls[l] = b
		}
	}
	t := &topology{nodeU: make([]int, n), nodeK: make([]int, n)}
	ux := make([]int, n)
	for i := range ux {
		ux[i] = -1
	}
	for i := 0; i < n; i++ {
		t.nodeK[i] = -1
		c := cls[i]
		if sim.ideal && c < 3 {
			t.nodeK[i] = c
			t.nodeU[i] = -1
			continue
		}
		if ux[c] < 0 {
			ux[c] = t.nu
			t.nu++
		}
		t.nodeU[i] = ux[c]
	}
	nu := t.nu
	guu := make([][]float64, nu)
	for i := range guu {
		guu[i] = make([]float64, nu)
	}
	t.guk = make([]float64, nu*3)
	for a := 0; a < n; a++ {
		ua := t.nodeU[a]
		if ua < 0 {
			continue
		}
		for b := 0; b < n; b++ {
			if g[a][b] == 0 {
				continue
			}
			if ub := t.nodeU[b]; ub >= 0 {
				guu[ua][ub] += g[a][b]
			} else {
				t.guk[ua*3+t.nodeK[b]] += g[a][b]
			}
		}
	}
	inv, err := invertDense(guu)
	if err != nil {
		return nil, fmt.Errorf("%w: the nodal matrix is singular for pole states %v (a floating part of the circuit)", ErrSwitching, ps)
	}
	t.inv = inv
	// Arresters on unknown nodes.
	idx := map[int]int{}
	nj := len(sim.endNode)
	for ai, a := range sim.net.Arresters {
		j := 0
		if a.At == 1 {
			j = nj - 1
		}
		for k := 0; k < 3; k++ {
			u := t.nodeU[sim.endNode[j][k]]
			if u < 0 {
				continue // held by the ideal source
			}
			p, ok := idx[u]
			if !ok {
				p = len(t.arrU)
				idx[u] = p
				t.arrU = append(t.arrU, u)
				t.arrC = append(t.arrC, nil)
			}
			t.arrC[p] = append(t.arrC[p], sim.curves[ai])
		}
	}
	na := len(t.arrU)
	t.arrZth = make([]float64, na*na)
	for p, u := range t.arrU {
		for q, w := range t.arrU {
			t.arrZth[p*na+q] = inv[u*nu+w]
		}
	}
	return t, nil
}

// invertDense returns the inverse of the square matrix a (row-major result) by
// Gauss-Jordan elimination with partial pivoting.
func invertDense(a [][]float64) ([]float64, error) {
	n := len(a)
	m := make([][]float64, n)
	for i := range m {
		m[i] = make([]float64, 2*n)
		copy(m[i], a[i])
		m[i][n+i] = 1
	}
	var scale float64
	for i := range a {
		for _, x := range a[i] {
			scale = math.Max(scale, math.Abs(x))
		}
	}
	for c := 0; c < n; c++ {
		p := c
		for r := c + 1; r < n; r++ {
			if math.Abs(m[r][c]) > math.Abs(m[p][c]) {
				p = r
			}
		}
		if !(math.Abs(m[p][c]) > 1e-13*scale) {
			return nil, errors.New("singular")
		}
		m[c], m[p] = m[p], m[c]
		d := 1 / m[c][c]
		for j := range m[c] {
			m[c][j] *= d
		}
		for r := 0; r < n; r++ {
			if r == c || m[r][c] == 0 {
				continue
			}
			f := m[r][c]
			for j := range m[r] {
				m[r][j] -= f * m[c][j]
			}
		}
	}
	out := make([]float64, n*n)
	for i := 0; i < n; i++ {
		copy(out[i*n:], m[i][n:])
	}
	return out, nil
}

// shotState is the mutable state of one shot (or of the de-energised line during the
// dead time).
type shotState struct {
	lines    []*modalBergeron
	branches []swBranch
	srcU     [3]float64 // modal source branch voltage (EMF − bus)
	srcI     [3]float64 // modal source current into the bus
	j        []float64  // injections, full nodes
	rhs, vu  []float64
	v        []float64       // node voltages
	hist     [][2][3]float64 // line history currents of the current step
}

// clone returns a deep copy of st.
func (st *shotState) clone() *shotState {
	c := &shotState{srcU: st.srcU, srcI: st.srcI}
	c.lines = make([]*modalBergeron, len(st.lines))
	for i, ln := range st.lines {
		c.lines[i] = ln.clone()
	}
	c.branches = append([]swBranch(nil), st.branches...)
	c.j = make([]float64, len(st.j))
	c.v = append([]float64(nil), st.v...)
	c.hist = make([][2][3]float64, 0, len(st.lines))
	return c
}

// openingState returns the state at the line's opening: the line charged to the
// trapped voltages (V, phase to earth) with zero current in the line and in every
// line-side shunt, the source side at rest.
func (sim *SwitchingSimulator) openingState(trapped [3]float64) *shotState {
	st := &shotState{}
	for _, sec := range sim.net.Line.Sections {
		st.lines = append(st.lines, newModalBergeron(sec, sim.dt, trapped))
	}
	st.branches = append([]swBranch(nil), sim.branches...)
	n := sim.nNodes
	st.j = make([]float64, n)
	st.v = make([]float64, n)
	st.hist = make([][2][3]float64, 0, len(st.lines))
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
	st.srcU, st.srcI = toModal(srcUp), toModal(srcIp)
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

// advance takes st one time step on with the topology tp and the phase EMFs ek (V).
func (sim *SwitchingSimulator) advance(st *shotState, tp *topology, ek [3]float64) {
	n := sim.nNodes
	for i := range st.j {
		st.j[i] = 0
	}
	if !sim.ideal {
		var hm [3]float64
		em := toModal(ek)
		for m := 0; m < 3; m++ {
			// i = G·u + G·(u_prev + K·i_prev), u = e − v_bus
			hm[m] = sim.srcG[m]*em[m] + sim.srcG[m]*(st.srcU[m]+sim.srcK[m]*st.srcI[m])
		}
		hp := toPhase(hm)
		for k := 0; k < 3; k++ {
			st.j[sim.busNode[k]] += hp[k]
		}
	}
	for bi := range st.branches {
		br := &st.branches[bi]
		br.history()
		st.j[br.a] -= br.hist
		if br.b >= 0 {
			st.j[br.b] += br.hist
		}
	}
	st.hist = st.hist[:0]
	for li, ln := range st.lines {
		hs, hr := ln.history()
		st.hist = append(st.hist, [2][3]float64{hs, hr})
		ps, pr := toPhase(hs), toPhase(hr)
		for k := 0; k < 3; k++ {
			st.j[sim.endNode[li][k]] -= ps[k]
			st.j[sim.endNode[li+1][k]] -= pr[k]
		}
	}
	// Solve.
	nu := tp.nu
	if cap(st.rhs) < nu {
		st.rhs = make([]float64, nu)
		st.vu = make([]float64, nu)
	}
	rhs, vu := st.rhs[:nu], st.vu[:nu]
	for i := range rhs {
		rhs[i] = 0
	}
	for a := 0; a < n; a++ {
		if u := tp.nodeU[a]; u >= 0 {
			rhs[u] += st.j[a]
		}
	}
	if sim.ideal {
		for u := 0; u < nu; u++ {
			rhs[u] -= tp.guk[u*3]*ek[0] + tp.guk[u*3+1]*ek[1] + tp.guk[u*3+2]*ek[2]
		}
	}
	for r := 0; r < nu; r++ {
		row := tp.inv[r*nu : (r+1)*nu]
		var s float64
		for c, x := range row {
			s += x * rhs[c]
		}
		vu[r] = s
	}
	if len(tp.arrU) > 0 {
		sim.arresters(tp, st, vu)
	}
	for a := 0; a < n; a++ {
		if u := tp.nodeU[a]; u >= 0 {
			st.v[a] = vu[u]
		} else {
			st.v[a] = ek[tp.nodeK[a]]
		}
	}
	// Update states.
	if !sim.ideal {
		var up [3]float64
		for k := 0; k < 3; k++ {
			up[k] = ek[k] - st.v[sim.busNode[k]]
		}
		um := toModal(up)
		for m := 0; m < 3; m++ {
			st.srcI[m] = sim.srcG[m]*um[m] + sim.srcG[m]*(st.srcU[m]+sim.srcK[m]*st.srcI[m])
		}
		st.srcU = um
	}
	for bi := range st.branches {
		br := &st.branches[bi]
		v := st.v[br.a]
		if br.b >= 0 {
			v -= st.v[br.b]
		}
		br.update(v)
	}
	for li, ln := range st.lines {
		var vs, vr [3]float64
		for k := 0; k < 3; k++ {
			vs[k] = st.v[sim.endNode[li][k]]
			vr[k] = st.v[sim.endNode[li+1][k]]
		}
		vsm, vrm := toModal(vs), toModal(vr)
		var is, ir [3]float64
		for m := 0; m < 3; m++ {
			is[m] = vsm[m]/ln.z[m] + st.hist[li][0][m]
			ir[m] = vrm[m]/ln.z[m] + st.hist[li][1][m]
		}
		ln.store(vsm, vrm, is, ir)
	}
}

// Shot simulates one shot. With record it also returns the waveforms.
func (sim *SwitchingSimulator) Shot(spec ShotSpec, record bool) (Shot, *ThreePhaseWave) {
	net, dt, set := sim.net, sim.dt, sim.set
	w := net.Omega
	th := spec.CloseDeg * math.Pi / 180
	first := math.Min(spec.Offset[0], math.Min(spec.Offset[1], spec.Offset[2]))
	t0 := first
	var nIns int
	if set.Preinsertion > 0 {
		nIns = int(math.Round(set.InsertTime / dt))
		nIns = max(nIns, 1)
	}
	var nClose [3]int
	for k := 0; k < 3; k++ {
		nClose[k] = int(math.Round((spec.Offset[k] - t0) / dt))
	}
	lastContact := float64(max(nClose[0], nClose[1], nClose[2])+nIns) * dt
	nSteps := int(math.Round((lastContact+set.Duration)/dt)) + 1
	emf := func(t float64, k int) float64 {
		return math.Sin(w*t + th - float64(k)*2*math.Pi/3)
	}
	base := net.EMFPeak

	// Initial state at t0 − dt: the line side at the trapped voltages with zero
	// current, or as the dead time left it; the source side in its sinusoidal steady
	// state with the breaker open.
	var st *shotState
	if sim.ring != nil {
		st = sim.ring.stateAt(sim, sim.ring.stepAt(t0-dt, dt))
	} else {
		st = sim.openingState(sim.trappedV())
	}
	sim.initSource(st, th, t0-dt)

	var shot Shot
	shot.ShotSpec = spec
	var wave *ThreePhaseWave
	if record {
		wave = &ThreePhaseWave{Step: dt, Start: t0, LastContact: t0 + lastContact}
		for k := 0; k < 3; k++ {
			wave.Sending[k] = make([]float64, nSteps)
			wave.Receiving[k] = make([]float64, nSteps)
			wave.EMF[k] = make([]float64, nSteps)
		}
	}
	nj := len(sim.endNode)
	recv := sim.endNode[nj-1]
	send := sim.endNode[0]
	var ek [3]float64
	for step := 0; step < nSteps; step++ {
		t := t0 + float64(step)*dt
		code := 0
		mul := 1
		for k := 0; k < 3; k++ {
			s := poleOpen
			if step >= nClose[k] {
				s = poleClosed
				if nIns > 0 && step < nClose[k]+nIns {
					s = poleResistor
				}
			}
			code += s * mul
			mul *= 3
		}
		for k := 0; k < 3; k++ {
			ek[k] = emf(t, k) * base
		}
		sim.advance(st, sim.topo[code], ek)
		for k := 0; k < 3; k++ {
			vr := st.v[recv[k]] / base
			if step == 0 || math.Abs(vr) > math.Abs(shot.Peak[k]) {
				shot.Peak[k] = vr
				shot.PeakTime[k] = t
			}
			if record {
				wave.Receiving[k][step] = vr
				wave.Sending[k][step] = st.v[send[k]] / base
				wave.EMF[k][step] = ek[k] / base
			}
		}
	}
	return shot, wave
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

// arresters corrects the linear solution vu for the arrester currents by the
// compensation method: with v_lin the node voltages without arrester current and Zth
// the Thevenin impedance matrix at the arrester nodes,
//
//	v = v_lin − Zth·i(v)
//
// solved by Newton's method with step halving, then vu −= inv·i over all nodes.
func (sim *SwitchingSimulator) arresters(tp *topology, st *shotState, vu []float64) {
	na := len(tp.arrU)
	nu := tp.nu
	vlin := make([]float64, na)
	v := make([]float64, na)
	cur := make([]float64, na)
	di := make([]float64, na)
	g := make([]float64, na)
	jac := make([][]float64, na)
	for p := range jac {
		jac[p] = make([]float64, na+1)
	}
	for p, u := range tp.arrU {
		vlin[p] = vu[u]
		v[p] = vu[u]
	}
	eval := func(v []float64) float64 {
		var norm float64
		for p := range v {
			var s, d float64
			for _, c := range tp.arrC[p] {
				i, dd := c.current(v[p])
				s += i
				d += dd
			}
			cur[p], di[p] = s, d
		}
		for p := range v {
			s := v[p] - vlin[p]
			for q := range v {
				s += tp.arrZth[p*na+q] * cur[q]
			}
			g[p] = s
			norm = math.Max(norm, math.Abs(s))
		}
		return norm
	}
	tol := 1e-9 * sim.net.EMFPeak
	norm := eval(v)
	trial := make([]float64, na)
	for it := 0; it < 60 && norm > tol; it++ {
		for p := 0; p < na; p++ {
			for q := 0; q < na; q++ {
				jac[p][q] = tp.arrZth[p*na+q] * di[q]
			}
			jac[p][p] += 1
			jac[p][na] = -g[p]
		}
		dx := solveSmall(jac)
		step := 1.0
		for tries := 0; tries < 30; tries++ {
			for p := range v {
				trial[p] = v[p] + step*dx[p]
			}
			if nn := eval(trial); nn < norm || tries == 29 {
				norm = nn
				copy(v, trial)
				break
			}
			step /= 2
		}
	}
	eval(v)
	for r := 0; r < nu; r++ {
		var s float64
		for p, u := range tp.arrU {
			s += tp.inv[r*nu+u] * cur[p]
		}
		vu[r] -= s
	}
}

// solveSmall solves the augmented system a (n rows of n+1) by Gaussian elimination
// with partial pivoting; a is overwritten.
func solveSmall(a [][]float64) []float64 {
	n := len(a)
	for c := 0; c < n; c++ {
		p := c
		for r := c + 1; r < n; r++ {
			if math.Abs(a[r][c]) > math.Abs(a[p][c]) {
				p = r
			}
		}
		a[c], a[p] = a[p], a[c]
		for r := c + 1; r < n; r++ {
			f := a[r][c] / a[c][c]
			for j := c; j <= n; j++ {
				a[r][j] -= f * a[c][j]
			}
		}
	}
	x := make([]float64, n)
	for r := n - 1; r >= 0; r-- {
		s := a[r][n]
		for j := r + 1; j < n; j++ {
			s -= a[r][j] * x[j]
		}
		x[r] = s / a[r][r]
	}
	return x
}

// Run simulates every shot, spread over workers goroutines (0 = GOMAXPROCS). Each
// shot depends only on its ShotSpec, so the results are the same whatever the number
// of workers. progress, if not nil, is called (from any goroutine, possibly
// concurrently) with the number of shots done so far.
func (sim *SwitchingSimulator) Run(specs []ShotSpec, workers int, progress func(done int)) []Shot {
	out, _ := sim.RunContext(context.Background(), specs, workers, progress)
	return out
}

// RunContext is Run that stops between shots when ctx is done: it then returns the
// context's error, and the shots are incomplete.
func (sim *SwitchingSimulator) RunContext(ctx context.Context, specs []ShotSpec, workers int, progress func(done int)) ([]Shot, error) {
	if workers <= 0 {
		workers = runtime.GOMAXPROCS(0)
	}
	workers = min(workers, len(specs))
	out := make([]Shot, len(specs))
	var next, done atomic.Int64
	var wg sync.WaitGroup
	for w := 0; w < workers; w++ {
		wg.Add(1)
		go func() {
			defer wg.Done()
			for {
				k := int(next.Add(1) - 1)
				if k >= len(specs) || ctx.Err() != nil {
					return
				}
				out[k], _ = sim.Shot(specs[k], false)
				d := done.Add(1)
				if progress != nil {
					progress(int(d))
				}
			}
		}()
	}
	wg.Wait()
	if err := ctx.Err(); err != nil {
		return nil, err
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
