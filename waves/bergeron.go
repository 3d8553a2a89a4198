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
	// Line pieces: the cascade split at mid-line.
	type piece struct{ z, tau, r float64 }
	var pieces []piece
	half := n.Line.Length() / 2
	pos := 0.0
	midPiece := -1         // index of the first piece after mid-line
	var junctionNode []int // the node of each junction of sections
	for i, l := range n.Line {
		zc, v := l.Lossless(e.Omega)
		if !(zc > 0) || !(v > 0) || !(l.Length > 0) {
			return nil, fmt.Errorf("waves: bergeron: section %d needs length, inductance and capacitance > 0", i+1)
		}
		zr, _ := l.At(complex(0, e.Omega))
		rPerM := real(zr)
		add := func(length float64) {
			pieces = append(pieces, piece{zc, length / v, rPerM * length})
		}
		end := pos + l.Length
		if midPiece < 0 && end >= half*(1-1e-12) {
			first := half - pos
			if first > l.Length*1e-9 {
				add(first)
			}
			midPiece = len(pieces)
			if rest := end - half; rest > l.Length*1e-9 {
				add(rest)
			}
		} else {
			add(l.Length)
		}
		pos = end
		if i+1 < len(n.Line) {
			junctionNode = append(junctionNode, len(pieces))
		}
	}
	tauMin := math.Inf(1)
	for _, p := range pieces {
		tauMin = math.Min(tauMin, p.tau)
	}
	dt := e.TimeStep
	if dt == 0 {
		dt = defaultStep(2*tauMin, e.Duration) // a fiftieth of the shortest piece
	}
	if dt > tauMin {
		return nil, settingErr("TimeStep", ErrSettings, "bergeron: time step %.4g µs exceeds the shortest travel time %.4g µs", dt*1e6, tauMin*1e6)
	}
	exact := true
	worstFrac := 0.0 // the largest fraction of a step interpolated in a history
	for _, p := range pieces {
		k := p.tau / dt
		f := k - math.Floor(k)
		if math.Abs(k-math.Round(k)) > 1e-6 {
			exact = false
			worstFrac = math.Max(worstFrac, math.Min(f, 1-f))
		}
	}

	// Nodes: junction j (0 = sending, len(pieces) = receiving) and, with lumped
	// resistance, the two line-side nodes of each piece.
	nj := len(pieces) + 1
	nodeA := make([]int, len(pieces))
	nodeB := make([]int, len(pieces))
	nn := nj
	for k := range pieces {
		if opt.LumpedResistance && pieces[k].r > 0 {
			nodeA[k], nodeB[k] = nn, nn+1
			nn += 2
		} else {
			nodeA[k], nodeB[k] = k, k+1
		}
	}
	send, recv, mid := 0, nj-1, midPiece
	G := make([][]float64, nn)
	for i := range G {
		G[i] = make([]float64, nn)
	}
	stamp := func(a, b int, g float64) {
		G[a][a] += g
		if b >= 0 {
			G[b][b] += g
			G[a][b] -= g
			G[b][a] -= g
		}
	}
	for k, p := range pieces {
		stamp(nodeA[k], -1, 1/p.z)
		stamp(nodeB[k], -1, 1/p.z)
		if nodeA[k] != k { // r/2 between each junction and the piece's end
			stamp(k, nodeA[k], 2/p.r)
			stamp(k+1, nodeB[k], 2/p.r)
		}
	}

	// Companion branches.
	v0 := e.TrappedPU
	var branches []*branch
	ideal := n.Source.Ideal()
	var src *branch
	if !ideal {
		src = newBranch(n.Source.R, n.Source.L, 0, dt)
		G[send][send] += src.g
	}
	for _, sh := range n.Shunts {
		if sh.End == freqscan.Receiving && !sh.OnLine {
			continue
		}
		node := send
		if sh.End == freqscan.Receiving {
			node = recv
		}
		b := newBranch(sh.R, sh.L, sh.C, dt)
		b.node, b.onLine = node, sh.OnLine
		branches = append(branches, b)
		G[node][node] += b.g
	}
	// The state at t = 0+ (step 0). Before closing the source side is in its steady
	// state (sine) or at rest (step): the bus voltage, the source current and the
	// bus shunts' currents and capacitor voltages follow from phasors.
	phi := e.CloseDeg * math.Pi / 180
	emf := func(t float64) float64 {
		if e.Excitation == Sine {
			return math.Sin(e.Omega*t + phi)
		}
		return 1
	}
	vbus0, isrc0 := 0.0, 0.0 // bus voltage and source current just before closing
	s := complex(0, e.Omega)
	var ybus complex128
	for _, b := range branches {
		if b.node == send && !b.onLine {
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
	z1 := pieces[0].z // the first piece seen from the sending node at 0+
	if nodeA[0] != 0 {
		z1 += pieces[0].r / 2
	}
	// Branch states just before closing: inductor currents and capacitor voltages,
	// which stay continuous through the closing.
	for _, b := range branches {
		switch {
		case b.node == send && !b.onLine:
			if e.Excitation == Sine {
				b.iPrev = inst(vbus * b.admittance(s))
				if b.cap > 0 && b.l <= 0 {
					b.vc = vbus0 - b.r*b.iPrev // capacitor voltage = v − R·i
				}
			}
		case b.onLine: // no current at closing, capacitors at the trapped voltage
			b.iPrev = 0
			if b.cap > 0 && b.l <= 0 {
				b.vc = v0
			}
		}
	}
	// The sending node at 0+ is a resistive network: the EMF behind a resistive
	// source (or held by an ideal one), the line at V0 behind Z1, capacitors at their
	// voltage behind their resistance, inductors as their continuous currents. A
	// capacitor without resistance holds the node (capacitance-weighted when several).
	isCap := func(b *branch) bool { return b.cap > 0 && b.l <= 0 }
	var vs0, gSum, iSum, stiffC, stiffQ float64
	gSum, iSum = 1/z1, v0/z1
	if src != nil {
		if n.Source.L > 0 {
			iSum += isrc0
		} else {
			gSum += 1 / n.Source.R
			iSum += emf(0) / n.Source.R
		}
	}
	for _, b := range branches {
		if b.node != send {
			continue
		}
		switch {
		case isCap(b) && b.r == 0:
			stiffC += b.cap
			stiffQ += b.cap * b.vc
		case isCap(b):
			gSum += 1 / b.r
			iSum += b.vc / b.r
		default:
			iSum -= b.iPrev
		}
	}
	switch {
	case ideal:
		vs0 = emf(0)
	case stiffC > 0:
		vs0 = stiffQ / stiffC
	default:
		vs0 = iSum / gSum
	}
	if src != nil {
		src.vPrev, src.iPrev = emf(0)-vs0, isrc0
		if n.Source.L == 0 {
			src.iPrev = (emf(0) - vs0) / n.Source.R
		}
	}
	// Branch voltages at 0+, resistive capacitor currents, and what the rest of the
	// node leaves the capacitors without resistance (shared by capacitance).
	i0 := (vs0 - v0) / z1 // the first surge into the line
	residual := -i0
	if src != nil {
		residual += src.iPrev
	}
	for _, b := range branches {
		b.vPrev = v0
		if b.node == send {
			b.vPrev = vs0
		}
		if isCap(b) && b.r > 0 {
			b.iPrev = (b.vPrev - b.vc) / b.r
		}
		if b.node == send && !(isCap(b) && b.r == 0) {
			residual -= b.iPrev
		}
	}
	for _, b := range branches {
		if b.node == send && isCap(b) && b.r == 0 {
			b.iPrev = residual * b.cap / stiffC
		}
	}
	var colSend []float64 // the sending node's column, moved to the right-hand side for an ideal source
	if ideal {
		colSend = make([]float64, nn)
		for i := range G {
			colSend[i], G[i][send] = G[i][send], 0
			G[send][i] = 0
		}
		G[send][send], colSend[send] = 1, 0
	}
	lu, err := factor(G)
	if err != nil {
		return nil, fmt.Errorf("waves: bergeron: %v", err)
	}
	// Histories of the line pieces: v and i (into the piece) at each end, one ring per end.
	steps := samples(e.Duration, dt)
	maxLag := 0
	for _, p := range pieces {
		maxLag = max(maxLag, int(math.Ceil(p.tau/dt))+2)
	}
	ringLen := maxLag + 1
	type hist struct{ v, i []float64 }
	newHist := func() hist { return hist{make([]float64, ringLen), make([]float64, ringLen)} }
	ha := make([]hist, len(pieces))
	hb := make([]hist, len(pieces))
	for k := range pieces {
		ha[k], hb[k] = newHist(), newHist()
	}
	wf := &Waveform{Method: "bergeron", Step: dt, Sending: make([]float64, steps), Receiving: make([]float64, steps), Middle: make([]float64, steps)}
	rhs := make([]float64, nn)
	v := make([]float64, nn)
	// The rings hold step m at m % ringLen; steps before 0 are the initial state.
	interp := func(h []float64, nstep int, lag float64, init float64) float64 {
		l0 := int(math.Floor(lag + 1e-9))
		f := lag - float64(l0)
		if f < 1e-9 {
			f = 0
		}
		val := func(m int) float64 {
			if m < 0 {
				return init
			}
			return h[m%ringLen]
		}
		a := val(nstep - l0)
		if f == 0 {
			return a
		}
		return a*(1-f) + val(nstep-l0-1)*f
	}
	ihA := make([]float64, len(pieces))
	ihB := make([]float64, len(pieces))
	names, xs := junctionNames(n)
	for i, name := range names {
		j := JunctionWave{Name: name, X: xs[i], V: make([]float64, steps)}
		j.V[0] = v0
		wf.Junctions = append(wf.Junctions, j)
	}
	wf.Sending[0], wf.Receiving[0], wf.Middle[0] = vs0, v0, v0
	for k := range pieces { // the line at rest at the trapped voltage at t = 0+ ...
		ha[k].v[0], hb[k].v[0] = v0, v0
	}
	// ... but for the surge the closing launches into the first piece.
	ha[0].v[0], ha[0].i[0] = v0+i0*pieces[0].z, i0
	for nstep := 1; nstep < steps; nstep++ {
		t := float64(nstep) * dt
		for i := range rhs {
			rhs[i] = 0
		}
		for k, p := range pieces {
			lag := p.tau / dt
			ihA[k] = -interp(hb[k].v, nstep, lag, v0)/p.z - interp(hb[k].i, nstep, lag, 0)
			ihB[k] = -interp(ha[k].v, nstep, lag, v0)/p.z - interp(ha[k].i, nstep, lag, 0)
			rhs[nodeA[k]] -= ihA[k]
			rhs[nodeB[k]] -= ihB[k]
		}
		et := emf(t)
		if src != nil {
			src.history()
			rhs[send] += src.g*et + src.h
		}
		for _, b := range branches {
			b.history()
			rhs[b.node] -= b.h
		}
		if ideal { // sending node held at the EMF
			for i := range rhs {
				rhs[i] -= colSend[i] * et
			}
			rhs[send] = et
		}
		lu.solve(rhs, v)
		for k, p := range pieces {
			ia := v[nodeA[k]]/p.z + ihA[k]
			ib := v[nodeB[k]]/p.z + ihB[k]
			slot := nstep % ringLen
			ha[k].v[slot], ha[k].i[slot] = v[nodeA[k]], ia
			hb[k].v[slot], hb[k].i[slot] = v[nodeB[k]], ib
		}
		if src != nil {
			src.update(et - v[send])
		}
		for _, b := range branches {
			b.update(v[b.node])
		}
		wf.Sending[nstep] = v[send]
		wf.Receiving[nstep] = v[recv]
		wf.Middle[nstep] = v[mid]
		for i, node := range junctionNode {
			wf.Junctions[i].V[nstep] = v[node]
		}
	}
	note := fmt.Sprintf("Bergeron, lossless line pieces (half-line travel time %.4g µs), trapezoidal lumped elements, time step %.4g µs", pieces[0].tau*1e6, dt*1e6)
	if len(n.Line) > 1 {
		note = fmt.Sprintf("Bergeron, %d lossless line pieces (%d sections, each its own surge impedance and travel time; shortest piece %.4g µs), trapezoidal lumped elements, time step %.4g µs", len(pieces), len(n.Line), tauMin*1e6, dt*1e6)
	}
	if exact {
		note += " (travel times are whole multiples of the step: no interpolation)"
	} else {
		note += fmt.Sprintf(" (histories interpolated linearly, up to %.2f of a step: each wavefront is smoothed over one step, %.4g µs, at each transit; the timing of every front is exact)", worstFrac, dt*1e6)
	}
	wf.Notes = append(wf.Notes, note)
	if opt.LumpedResistance && len(n.Line) > 1 {
		wf.Notes = append(wf.Notes, "line resistance lumped half at each end of each line piece (frequency-independent, at the system frequency)")
	} else if opt.LumpedResistance {
		wf.Notes = append(wf.Notes, "line resistance lumped R/4, R/2, R/4 at ends and middle (frequency-independent, at the system frequency)")
	} else {
		wf.Notes = append(wf.Notes, "line resistance neglected (lossless line)")
	}
	wf.Notes = append(wf.Notes, "trapezoidal rule: error O(Δt²) for smooth parts; may ring at a current discontinuity in an inductor")
	if !finite(wf.Sending, wf.Receiving, wf.Middle) || !junctionsFinite(wf.Junctions) {
		return nil, fmt.Errorf("waves: bergeron: non-finite result (time step too coarse for the network?)")
	}
	return wf, nil
}

// branch is a trapezoidal companion model of a series R-L or R-C branch (or a
// resistor): i = g·v + h, with h from the previous step.
type branch struct {
	r, l, cap, dt float64
	g, h          float64
	node          int
	onLine        bool
	vPrev, iPrev  float64 // branch voltage and current at the previous step
	vc            float64 // capacitor voltage at the previous step (R-C)
}

func newBranch(r, l, c, dt float64) *branch {
	b := &branch{r: r, l: l, cap: c, dt: dt}
	switch {
	case l > 0:
		b.g = 1 / (r + 2*l/dt)
	case c > 0:
		b.g = 1 / (r + dt/(2*c))
	default:
		b.g = 1 / r
	}
	return b
}

// admittance returns the branch admittance at s (S).
func (b *branch) admittance(s complex128) complex128 {
	switch {
	case b.l > 0:
		return 1 / (complex(b.r, 0) + s*complex(b.l, 0))
	case b.cap > 0:
		sc := s * complex(b.cap, 0)
		return sc / (1 + sc*complex(b.r, 0))
	}
	return complex(1/b.r, 0)
}

// history sets h for the coming step from the previous one:
//
//	R-L:  h = g·(v' + (2L/Δt − R)·i')
//	R-C:  h = −g·(vC' + Δt/(2C)·i')
func (b *branch) history() {
	switch {
	case b.l > 0:
		b.h = b.g * (b.vPrev + (2*b.l/b.dt-b.r)*b.iPrev)
	case b.cap > 0:
		b.h = -b.g * (b.vc + b.dt/(2*b.cap)*b.iPrev)
	default:
		b.h = 0
	}
}

// update records the step's branch voltage v and the resulting current.
func (b *branch) update(v float64) {
	i := b.g*v + b.h
	if b.l <= 0 && b.cap > 0 {
		b.vc += b.dt / (2 * b.cap) * (i + b.iPrev)
	}
	b.vPrev, b.iPrev = v, i
}

// denseLU is an LU factorisation with partial pivoting of a small dense matrix.
type denseLU struct {
	a   [][]float64
	piv []int
	tmp []float64
}

func factor(m [][]float64) (*denseLU, error) {
	n := len(m)
	a := make([][]float64, n)
	for i := range m {
		a[i] = append([]float64(nil), m[i]...)
	}
	piv := make([]int, n)
	for i := range piv {
		piv[i] = i
	}
	for k := 0; k < n; k++ {
		p := k
		for i := k + 1; i < n; i++ {
			if math.Abs(a[i][k]) > math.Abs(a[p][k]) {
				p = i
			}
		}
		if a[p][k] == 0 || math.IsNaN(a[p][k]) {
			return nil, fmt.Errorf("singular nodal matrix")
		}
		a[k], a[p] = a[p], a[k]
		piv[k], piv[p] = piv[p], piv[k]
		for i := k + 1; i < n; i++ {
			f := a[i][k] / a[k][k]
			a[i][k] = f
			for j := k + 1; j < n; j++ {
				a[i][j] -= f * a[k][j]
			}
		}
	}
	return &denseLU{a: a, piv: piv, tmp: make([]float64, n)}, nil
}

// solve solves A x = b into x.
func (lu *denseLU) solve(b, x []float64) {
	n := len(b)
	y := lu.tmp
	for i := 0; i < n; i++ {
		s := b[lu.piv[i]]
		for j := 0; j < i; j++ {
			s -= lu.a[i][j] * y[j]
		}
		y[i] = s
	}
	for i := n - 1; i >= 0; i-- {
		s := y[i]
		for j := i + 1; j < n; j++ {
			s -= lu.a[i][j] * x[j]
		}
		x[i] = s / lu.a[i][i]
	}
}
