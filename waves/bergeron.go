package waves

import (
	"fmt"
	"math"
	"math/cmplx"

	"github.com/telegrapher/telegrapher/freqscan"
)

// BergeronOptions tunes Bergeron.
type BergeronOptions struct {
	// LumpedResistance, when true, lumps each line piece's series resistance at its
	// ends: for a single section R/4 at each end and R/2 in the middle (the line is
	// always modelled as two halves so the mid-line voltage is a node).
	LumpedResistance bool
}

// Bergeron computes the energisation of the open-ended line by Bergeron's method of
// characteristics. Each line piece is lossless with surge impedance Z = sqrt(L/C) and
// travel time τ at e.Omega; at its ends
//
//	i_a(t) = v_a(t)/Z + I_a(t),  I_a(t) = −v_b(t−τ)/Z − i_b(t−τ)
//
// The lumped elements (the source's R and L, the sending-bus shunts, the
// line-connected shunts at both ends, with their resistances) are companion models of
// the trapezoidal rule; the nodal equations are factored once and solved every step.
// The line is split at mid-line; with LumpedResistance each piece carries half its
// resistance at each end. The time step is the shortest half-line travel time divided
// by an integer (no interpolation) when every piece allows it, otherwise the histories
// are interpolated linearly, which smooths a wavefront over about one step at each
// transit (the note states the step and the largest interpolated fraction). A
// sectioned line is a chain of pieces, each section with its own surge impedance and
// travel time; each junction of sections is a node, whose voltage is kept in
// Waveform.Junctions.
//
// Initial state: the line at the trapped voltage with no current, line-connected
// reactors with no current (the crest of the ring-down), line-connected capacitors at
// the trapped voltage; for a sine EMF the source and the sending-bus shunts in their
// steady state with the breaker open, for a step at rest.
//
// References:
//
//   - L. Bergeron, Du coup de bélier en hydraulique au coup de foudre en électricité,
//     Dunod (1950).
//   - H. W. Dommel, "Digital computer solution of electromagnetic transients in
//     single- and multiphase networks", IEEE Trans. PAS-88 (1969) 388-399.
func Bergeron(n freqscan.Network, e Energisation, opt BergeronOptions) (*Waveform, error) {
	if err := e.check(); err != nil {
		return nil, err
	}
	if len(n.Line) == 0 {
		return nil, fmt.Errorf("waves: bergeron: the line has no sections")
	}
	if n.Source.R < 0 || n.Source.L < 0 {
		return nil, fmt.Errorf("waves: bergeron: source R and L must be >= 0")
	}
	cut, err := cutPieces(n, e.Omega)
	if err != nil {
		return nil, err
	}
	st, err := chooseStep(cut.pieces, e)
	if err != nil {
		return nil, err
	}
	bn, err := newBergeronNet(n, e, opt, cut, st.dt)
	if err != nil {
		return nil, err
	}
	wf := bn.run(n, e, st.dt)
	wf.Notes = bergeronNotes(n, opt, cut.pieces, st)
	if !finite(wf.Sending, wf.Receiving, wf.Middle) || !junctionsFinite(wf.Junctions) {
		return nil, fmt.Errorf("waves: bergeron: non-finite result (time step too coarse for the network?)")
	}
	return wf, nil
}

// piece is one lossless line piece: surge impedance (ohm), travel time (s) and
// series resistance (ohm) at the system frequency.
type piece struct{ z, tau, r float64 }

// pieceCut is the line cut into pieces at mid-line and at every junction of sections.
type pieceCut struct {
	pieces   []piece
	mid      int   // index of the first piece after mid-line (its sending junction is mid-line)
	junction []int // the junction index of each junction of sections
}

// cutPieces splits the cascade at mid-line, so the mid-line voltage is a node.
func cutPieces(n freqscan.Network, omega float64) (pieceCut, error) {
	var c pieceCut
	half := n.Line.Length() / 2
	pos := 0.0
	c.mid = -1
	for i, l := range n.Line {
		zc, v := l.Lossless(omega)
		if !(zc > 0) || !(v > 0) || !(l.Length > 0) {
			return c, fmt.Errorf("waves: bergeron: section %d needs length, inductance and capacitance > 0", i+1)
		}
		zr, _ := l.At(complex(0, omega))
		rPerM := real(zr)
		add := func(length float64) {
			c.pieces = append(c.pieces, piece{zc, length / v, rPerM * length})
		}
		end := pos + l.Length
		if c.mid < 0 && end >= half*(1-1e-12) {
			first := half - pos
			if first > l.Length*1e-9 {
				add(first)
			}
			c.mid = len(c.pieces)
			if rest := end - half; rest > l.Length*1e-9 {
				add(rest)
			}
		} else {
			add(l.Length)
		}
		pos = end
		if i+1 < len(n.Line) {
			c.junction = append(c.junction, len(c.pieces))
		}
	}
	return c, nil
}

// stepChoice is the time step and whether the histories need interpolation.
type stepChoice struct {
	dt, tauMin float64
	exact      bool    // every travel time a whole number of steps
	worstFrac  float64 // the largest fraction of a step interpolated in a history
}

// chooseStep returns e.TimeStep, or a fiftieth of the shortest piece's round trip (at
// most that piece's travel time, within MaxSamples over the run).
func chooseStep(pieces []piece, e Energisation) (stepChoice, error) {
	c := stepChoice{tauMin: math.Inf(1), exact: true}
	for _, p := range pieces {
		c.tauMin = math.Min(c.tauMin, p.tau)
	}
	c.dt = e.TimeStep
	if c.dt == 0 {
		c.dt = defaultStep(2*c.tauMin, e.Duration) // a fiftieth of the shortest piece
		// The sample cap of defaultStep may not stretch the step past the shortest
		// travel time (a short line over a long run): hold it there, within MaxSamples.
		if c.dt > c.tauMin {
			c.dt = c.tauMin
			if n := e.Duration / c.dt; n > MaxSamples {
				return c, settingErr("Duration", ErrSettings, "bergeron: a run of %.4g ms needs %.3g samples at the longest step the method allows (the shortest line piece's travel time, %.4g µs), more than %d: shorten duration_ms, or use the laplace method",
					e.Duration*1e3, n, c.tauMin*1e6, MaxSamples)
			}
		}
	}
	if c.dt > c.tauMin {
		return c, settingErr("TimeStep", ErrSettings, "bergeron: time step %.4g µs exceeds the shortest travel time %.4g µs", c.dt*1e6, c.tauMin*1e6)
	}
	for _, p := range pieces {
		k := p.tau / c.dt
		f := k - math.Floor(k)
		if math.Abs(k-math.Round(k)) > 1e-6 {
			c.exact = false
			c.worstFrac = math.Max(c.worstFrac, math.Min(f, 1-f))
		}
	}
	return c, nil
}

// bergeronNet is the single-phase network of Bergeron on the nodal engine: the
// junctions 0 (sending) to len(pieces) (receiving) and, with lumped resistance, the
// two line-side nodes of each piece; the line pieces, the source behind its R-L (none
// for an ideal source: the sending node is held at the EMF) and the shunts.
type bergeronNet struct {
	cut             pieceCut
	lines           []*linePiece
	src             *emfBranch // nil: ideal source
	shunts          []*companion
	onLine          []bool // per shunt: line-connected
	send, recv, mid int
	*nodal
	tp *topology
}

// newBergeronNet builds the nodes and elements, stamps and factorises the network
// and sets the state at t = 0+.
func newBergeronNet(n freqscan.Network, e Energisation, opt BergeronOptions, cut pieceCut, dt float64) (*bergeronNet, error) {
	pieces := cut.pieces
	nj := len(pieces) + 1
	bn := &bergeronNet{cut: cut, send: 0, recv: nj - 1, mid: cut.mid}
	nn := nj
	ring := 0
	for _, p := range pieces {
		ring = max(ring, int(math.Ceil(p.tau/dt))+2)
	}
	ring++
	var elems []element
	for k, p := range pieces {
		lp := &linePiece{piece: p, ja: k, jb: k + 1, a: k, b: k + 1, lag: p.tau / dt, v0: e.TrappedPU}
		if opt.LumpedResistance && p.r > 0 {
			lp.a, lp.b = nn, nn+1
			nn += 2
		}
		lp.hist(ring)
		bn.lines = append(bn.lines, lp)
		elems = append(elems, lp)
	}
	if !n.Source.Ideal() {
		bn.src = &emfBranch{companion: newCompanion(bn.send, -1, n.Source.R, n.Source.L, 0, dt)}
		elems = append(elems, bn.src)
	}
	for _, sh := range n.Shunts {
		if sh.End == freqscan.Receiving && !sh.OnLine {
			continue
		}
		node := bn.send
		if sh.End == freqscan.Receiving {
			node = bn.recv
		}
		b := newCompanion(node, -1, sh.R, sh.L, sh.C, dt)
		bn.shunts = append(bn.shunts, &b)
		bn.onLine = append(bn.onLine, sh.OnLine)
		elems = append(elems, &b)
	}
	g := newMatrix(nn)
	for _, el := range elems {
		el.stamp(g)
	}
	join, known := make([]int, nn), make([]int, nn)
	for i := range join {
		join[i], known[i] = i, -1
	}
	if bn.src == nil {
		known[bn.send] = 0 // held at the EMF
	}
	tp, err := newTopology(g, join, known, luFactorise)
	if err != nil {
		return nil, fmt.Errorf("waves: bergeron: %v", err)
	}
	bn.tp = tp
	bn.nodal = newNodal(nn, elems)
	bn.initialise(n, e)
	return bn, nil
}

// initialise sets the state at t = 0+ (step 0). Before closing the source side is in
// its steady state (sine) or at rest (step): the bus voltage, the source current and
// the bus shunts' currents and capacitor voltages follow from phasors. The line is at
// rest at the trapped voltage but for the surge the closing launches into the first
// piece.
func (bn *bergeronNet) initialise(n freqscan.Network, e Energisation) {
	v0 := e.TrappedPU
	phi := e.CloseDeg * math.Pi / 180
	emf0 := e.emf(0)
	vbus0, isrc0 := 0.0, 0.0 // bus voltage and source current just before closing
	s := complex(0, e.Omega)
	var ybus complex128
	for bi, b := range bn.shunts {
		if b.a == bn.send && !bn.onLine[bi] {
			ybus += b.admittance(s)
		}
	}
	vbus := 1 / (1 + n.Source.Impedance(s)*ybus) // bus voltage phasor per unit EMF phasor
	inst := func(ph complex128) float64 {        // value at t = 0 of Im(ph·e^{j(ωt+φ)})
		return imag(ph * cmplx.Exp(complex(0, phi)))
	}
	if e.Excitation == Sine {
		vbus0, isrc0 = inst(vbus), inst(vbus*ybus)
	}
	first := bn.lines[0]
	z1 := first.z // the first piece seen from the sending node at 0+
	if first.a != first.ja {
		z1 += first.r / 2
	}
	// Branch states just before closing: inductor currents and capacitor voltages,
	// which stay continuous through the closing.
	for bi, b := range bn.shunts {
		switch {
		case b.a == bn.send && !bn.onLine[bi]:
			if e.Excitation == Sine {
				b.i = inst(vbus * b.admittance(s))
				if b.isRC() {
					b.vc = vbus0 - b.r*b.i // capacitor voltage = v − R·i
				}
			}
		case bn.onLine[bi]: // no current at closing, capacitors at the trapped voltage
			b.i = 0
			if b.isRC() {
				b.vc = v0
			}
		}
	}
	vs0, stiffC := bn.sendingAt0(n, v0, z1, emf0, isrc0)
	if bn.src != nil {
		bn.src.v, bn.src.i = emf0-vs0, isrc0
		if n.Source.L == 0 {
			bn.src.i = (emf0 - vs0) / n.Source.R
		}
	}
	// Branch voltages at 0+, resistive capacitor currents, and what the rest of the
	// node leaves the capacitors without resistance (shared by capacitance).
	i0 := (vs0 - v0) / z1 // the first surge into the line
	residual := -i0
	if bn.src != nil {
		residual += bn.src.i
	}
	for _, b := range bn.shunts {
		b.v = v0
		if b.a == bn.send {
			b.v = vs0
		}
		if b.isRC() && b.r > 0 {
			b.i = (b.v - b.vc) / b.r
		}
		if b.a == bn.send && !(b.isRC() && b.r == 0) {
			residual -= b.i
		}
	}
	for _, b := range bn.shunts {
		if b.a == bn.send && b.isRC() && b.r == 0 {
			b.i = residual * b.c / stiffC
		}
	}
	for _, lp := range bn.lines { // the line at rest at the trapped voltage at t = 0+ ...
		lp.va[0], lp.vb[0] = v0, v0
	}
	// ... but for the surge the closing launches into the first piece.
	first.va[0], first.ia[0] = v0+i0*first.z, i0
	bn.v[bn.send], bn.v[bn.recv], bn.v[bn.mid] = vs0, v0, v0
}

// sendingAt0 returns the sending node's voltage at 0+ and the capacitance of the
// capacitors without resistance there. The node is then a resistive network: the
// EMF behind a resistive source (or held by an ideal one), the line at V0 behind Z1,
// capacitors at their voltage behind their resistance, inductors as their continuous
// currents. A capacitor without resistance holds the node (capacitance-weighted when
// several).
func (bn *bergeronNet) sendingAt0(n freqscan.Network, v0, z1, emf0, isrc0 float64) (vs0, stiffC float64) {
	var gSum, iSum, stiffQ float64
	gSum, iSum = 1/z1, v0/z1
	if bn.src != nil {
		if n.Source.L > 0 {
			iSum += isrc0
		} else {
			gSum += 1 / n.Source.R
			iSum += emf0 / n.Source.R
		}
	}
	for _, b := range bn.shunts {
		if b.a != bn.send {
			continue
		}
		switch {
		case b.isRC() && b.r == 0:
			stiffC += b.c
			stiffQ += b.c * b.vc
		case b.isRC():
			gSum += 1 / b.r
			iSum += b.vc / b.r
		default:
			iSum -= b.i
		}
	}
	switch {
	case bn.src == nil:
		vs0 = emf0
	case stiffC > 0:
		vs0 = stiffQ / stiffC
	default:
		vs0 = iSum / gSum
	}
	return vs0, stiffC
}

// run steps the network from t = 0+ to the end of e.Duration: inject, solve, update.
func (bn *bergeronNet) run(n freqscan.Network, e Energisation, dt float64) *Waveform {
	steps := samples(e.Duration, dt)
	v0 := e.TrappedPU
	wf := &Waveform{Method: "bergeron", Step: dt, Sending: make([]float64, steps), Receiving: make([]float64, steps), Middle: make([]float64, steps)}
	names, xs := junctionNames(n)
	for i, name := range names {
		j := JunctionWave{Name: name, X: xs[i], V: make([]float64, steps)}
		j.V[0] = v0
		wf.Junctions = append(wf.Junctions, j)
	}
	wf.Sending[0], wf.Receiving[0], wf.Middle[0] = bn.v[bn.send], v0, v0
	for nstep := 1; nstep < steps; nstep++ {
		d := drive{e.emf(float64(nstep) * dt)}
		bn.inject(d)
		_ = bn.solve(bn.tp, d, nil) // linear: cannot fail
		bn.update(d)
		wf.Sending[nstep] = bn.v[bn.send]
		wf.Receiving[nstep] = bn.v[bn.recv]
		wf.Middle[nstep] = bn.v[bn.mid]
		for i, node := range bn.cut.junction {
			wf.Junctions[i].V[nstep] = bn.v[node]
		}
	}
	return wf
}

// bergeronNotes describes the model of a Bergeron waveform.
func bergeronNotes(n freqscan.Network, opt BergeronOptions, pieces []piece, st stepChoice) []string {
	dt := st.dt
	note := fmt.Sprintf("Bergeron, lossless line pieces (half-line travel time %.4g µs), trapezoidal lumped elements, time step %.4g µs", pieces[0].tau*1e6, dt*1e6)
	if len(n.Line) > 1 {
		note = fmt.Sprintf("Bergeron, %d lossless line pieces (%d sections, each its own surge impedance and travel time; shortest piece %.4g µs), trapezoidal lumped elements, time step %.4g µs", len(pieces), len(n.Line), st.tauMin*1e6, dt*1e6)
	}
	if st.exact {
		note += " (travel times are whole multiples of the step: no interpolation)"
	} else {
		note += fmt.Sprintf(" (histories interpolated linearly, up to %.2f of a step: each wavefront is smoothed over one step, %.4g µs, at each transit; the timing of every front is exact)", st.worstFrac, dt*1e6)
	}
	notes := []string{note}
	switch {
	case opt.LumpedResistance && len(n.Line) > 1:
		notes = append(notes, "line resistance lumped half at each end of each line piece (frequency-independent, at the system frequency)")
	case opt.LumpedResistance:
		notes = append(notes, "line resistance lumped R/4, R/2, R/4 at ends and middle (frequency-independent, at the system frequency)")
	default:
		notes = append(notes, "line resistance neglected (lossless line)")
	}
	return append(notes, "trapezoidal rule: error O(Δt²) for smooth parts; may ring at a current discontinuity in an inductor")
}

// emfBranch is a companion branch from an EMF (drive element 0) to node a (b < 0):
// i = g·(e − v_a) + h into the node.
type emfBranch struct{ companion }

func (s *emfBranch) inject(j []float64, e drive) {
	s.history()
	j[s.a] += s.g*e[0] + s.h
}

func (s *emfBranch) update(v []float64, e drive) { s.step(e[0] - v[s.a]) }

// linePiece is a lossless Bergeron line piece between the line-side nodes a and b
// (current into the piece at each end),
//
//	i_a(t) = v_a(t)/Z + I_a(t),  I_a(t) = −v_b(t−τ)/Z − i_b(t−τ)
//
// with the delayed values interpolated linearly between steps (steps before 0 are at
// v0 with no current). With lumped resistance a and b are nodes of their own, joined
// to the junctions ja and jb through R/2 each.
type linePiece struct {
	piece
	ja, jb, a, b   int
	lag            float64 // τ/Δt
	l0             int     // whole steps of the lag
	f              float64 // the fraction of a step interpolated, 0 when within 1e-9 of whole
	v0             float64
	va, ia, vb, ib []float64 // rings: step m at m % len
	n              int       // the step being computed
	ihA, ihB       float64   // history currents of step n
}

// hist makes the piece's history rings of length ring, step 0 to come.
func (p *linePiece) hist(ring int) {
	p.va, p.ia = make([]float64, ring), make([]float64, ring)
	p.vb, p.ib = make([]float64, ring), make([]float64, ring)
	p.n = 1
	p.l0 = int(math.Floor(p.lag + 1e-9))
	p.f = p.lag - float64(p.l0)
	if p.f < 1e-9 {
		p.f = 0
	}
}

func (p *linePiece) stamp(g [][]float64) {
	stampConductance(g, p.a, -1, 1/p.z)
	stampConductance(g, p.b, -1, 1/p.z)
	if p.a != p.ja { // r/2 between each junction and the piece's end
		stampConductance(g, p.ja, p.a, 2/p.r)
		stampConductance(g, p.jb, p.b, 2/p.r)
	}
}

// delayed returns the ring h at step n − lag, linearly interpolated, init before step 0.
func (p *linePiece) delayed(h []float64, init float64) float64 {
	a := init
	if m := p.n - p.l0; m >= 0 {
		a = h[m%len(h)]
	}
	if p.f == 0 {
		return a
	}
	b := init
	if m := p.n - p.l0 - 1; m >= 0 {
		b = h[m%len(h)]
	}
	return a*(1-p.f) + b*p.f
}

func (p *linePiece) inject(j []float64, _ drive) {
	p.ihA = -p.delayed(p.vb, p.v0)/p.z - p.delayed(p.ib, 0)
	p.ihB = -p.delayed(p.va, p.v0)/p.z - p.delayed(p.ia, 0)
	j[p.a] -= p.ihA
	j[p.b] -= p.ihB
}

func (p *linePiece) update(v []float64, _ drive) {
	slot := p.n % len(p.va)
	p.va[slot], p.ia[slot] = v[p.a], v[p.a]/p.z+p.ihA
	p.vb[slot], p.ib[slot] = v[p.b], v[p.b]/p.z+p.ihB
	p.n++
}
