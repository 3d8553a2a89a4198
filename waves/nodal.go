package waves

import (
	"errors"
	"math"
)

// The nodal time-step engine shared by Bergeron and the three-phase switching
// simulator: the trapezoidal rule turns every element into a conductance in parallel
// with a current source that depends on the past only, so each time step is one
// linear solve
//
//	G·v(t) = j(t)
//
// with G constant between switchings. Every element stamps its conductances into G
// once (stamp), adds its history current sources to j before the solve (inject) and
// records the solution after it (update). A topology is G for one state of the
// switches, reduced to the unknown node voltages (nodes joined by a closed switch are
// one unknown, nodes held by an ideal source are known) and factorised once; the
// simulators keep one per switch state and share them read-only.
//
// Each network keeps the factorisation it had before the engine was shared, so its
// results stay the same to the bit: Bergeron an LU decomposition with partial
// pivoting (forward and back substitution each step), the switching simulator the
// explicit inverse (Gauss-Jordan with partial pivoting) applied as a dense
// matrix-vector product, whose columns its arresters' compensation needs anyway.
// Both are hand-written rather than gonum's mat.LU or mat.Cholesky: at these sizes
// (a few to a few tens of unknowns) a gonum triangular solve takes 2.5 to 8 times as
// long as the product (1.2 µs against 0.14 µs at 8 unknowns, 10 µs against 4 µs at
// 32), the call overhead and copies dominating.
//
// References:
//
//   - H. W. Dommel, "Digital computer solution of electromagnetic transients in
//     single- and multiphase networks", IEEE Trans. PAS-88 (1969) 388-399.

// drive holds the source EMFs of a step: the three phases (V) of the switching
// simulator, or in element 0 the single-phase EMF (pu) of Bergeron.
type drive = [3]float64

// element is one part of a nodal network.
type element interface {
	// stamp adds the element's conductances to the full nodal matrix g.
	stamp(g [][]float64)
	// inject works out the element's history for the coming step and adds its
	// current sources (into the nodes) to j.
	inject(j []float64, e drive)
	// update records the step's node voltages v.
	update(v []float64, e drive)
}

// stampConductance adds the conductance y between nodes a and b (b < 0: earth) to g.
func stampConductance(g [][]float64, a, b int, y float64) {
	g[a][a] += y
	if b >= 0 {
		g[b][b] += y
		g[a][b] -= y
		g[b][a] -= y
	}
}

// newMatrix returns an n×n zero matrix.
func newMatrix(n int) [][]float64 {
	g := make([][]float64, n)
	for i := range g {
		g[i] = make([]float64, n)
	}
	return g
}

// companion is the trapezoidal companion model of a series R-L branch, a series R-C
// branch or a resistor between node a and node b (b < 0: earth): i = g·v + h, with h
// from the previous step,
//
//	R-L:  g = 1/(R + 2L/Δt),   h = g·(v' + (2L/Δt − R)·i')
//	R-C:  g = 1/(R + Δt/(2C)), h = −g·(vC' + Δt/(2C)·i'),  vC = vC' + Δt/(2C)·(i + i')
//	R:    g = 1/R,             h = 0
//
// (primes: the previous step; v = v_a − v_b, i from a to b). A branch with L > 0 is
// an R-L branch whatever its C.
type companion struct {
	a, b    int
	r, l, c float64
	g       float64
	k       float64 // R-L: 2L/Δt − R; R-C: Δt/(2C)
	h       float64
	v, i    float64 // branch voltage and current of the last step
	vc      float64 // R-C: capacitor voltage of the last step
}

func newCompanion(a, b int, r, l, c, dt float64) companion {
	br := companion{a: a, b: b, r: r, l: l, c: c}
	switch {
	case l > 0:
		br.g = 1 / (r + 2*l/dt)
		br.k = 2*l/dt - r
	case c > 0:
		br.k = dt / (2 * c)
		br.g = 1 / (r + br.k)
	default:
		br.g = 1 / r
	}
	return br
}

// isRC reports whether the branch holds a capacitor (and no inductor).
func (br *companion) isRC() bool { return br.l <= 0 && br.c > 0 }

// admittance returns the branch admittance at s (S).
func (br *companion) admittance(s complex128) complex128 {
	switch {
	case br.l > 0:
		return 1 / (complex(br.r, 0) + s*complex(br.l, 0))
	case br.c > 0:
		sc := s * complex(br.c, 0)
		return sc / (1 + sc*complex(br.r, 0))
	}
	return complex(1/br.r, 0)
}

// history sets h for the coming step.
func (br *companion) history() {
	switch {
	case br.l > 0:
		br.h = br.g * (br.v + br.k*br.i)
	case br.c > 0:
		br.h = -br.g * (br.vc + br.k*br.i)
	default:
		br.h = 0
	}
}

// step records the step's branch voltage v and the resulting current.
func (br *companion) step(v float64) {
	i := br.g*v + br.h
	if br.isRC() {
		br.vc += br.k * (i + br.i)
	}
	br.v, br.i = v, i
}

func (br *companion) stamp(g [][]float64) { stampConductance(g, br.a, br.b, br.g) }

func (br *companion) inject(j []float64, _ drive) {
	br.history()
	j[br.a] -= br.h
	if br.b >= 0 {
		j[br.b] += br.h
	}
}

func (br *companion) update(v []float64, _ drive) {
	u := v[br.a]
	if br.b >= 0 {
		u -= v[br.b]
	}
	br.step(u)
}

// topology is the nodal system for one state of the switches, reduced and
// factorised: each full node is an unknown (nodeU, several nodes may share one) or is
// held at a known source voltage (nodeK: the index into the drive).
type topology struct {
	nu    int       // unknowns
	guk   []float64 // nu×3 coupling of the unknowns to the known voltages
	nodeU []int     // full node → unknown index, -1 known
	nodeK []int     // full node → known voltage index (0..2), -1 unknown
	f     factorisation
	// plain: every node its own unknown, in order, none known (rhs = j, v = vu)
	plain bool
}

// errSingular is returned by newTopology for a singular reduced nodal matrix.
var errSingular = errors.New("singular nodal matrix")

// newTopology reduces the full nodal matrix g: node a is joined to node join[a]
// (join[a] == a: on its own; join[a] < a) and held at the drive's voltage known[a]
// (-1: unknown). It factorises the unknowns' matrix with factorise.
func newTopology(g [][]float64, join, known []int, factorise func([][]float64) (factorisation, error)) (*topology, error) {
	n := len(g)
	t := &topology{nodeU: make([]int, n), nodeK: make([]int, n)}
	ux := make([]int, n)
	for i := range ux {
		ux[i] = -1
	}
	for i := 0; i < n; i++ {
		t.nodeK[i] = -1
		c := join[i]
		if k := known[c]; k >= 0 {
			t.nodeK[i] = k
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
	guu := newMatrix(nu)
	t.guk = make([]float64, nu*3)
	held := false
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
				held = true
			}
		}
	}
	if !held {
		t.guk = nil
	}
	t.plain = nu == n
	for i, u := range t.nodeU {
		t.plain = t.plain && u == i
	}
	f, err := factorise(guu)
	if err != nil {
		return nil, err
	}
	t.f = f
	return t, nil
}

// factorisation solves the reduced nodal equations G_UU·x = b of a topology.
type factorisation interface {
	solve(b, x []float64)
}

// inverse is the explicit inverse of G_UU (row-major), applied as a product.
type inverse struct {
	n int
	a []float64
}

// invertWith returns a factorise function for newTopology that inverts G_UU, with a
// pivot not above minPivot·max|G_UU| singular.
func invertWith(minPivot float64) func([][]float64) (factorisation, error) {
	return func(g [][]float64) (factorisation, error) {
		a, err := invertDense(g, minPivot)
		if err != nil {
			return nil, err
		}
		return &inverse{n: len(g), a: a}, nil
	}
}

func (m *inverse) solve(b, x []float64) {
	n := m.n
	for r := 0; r < n; r++ {
		row := m.a[r*n : (r+1)*n]
		var s float64
		for c, y := range row {
			s += y * b[c]
		}
		x[r] = s
	}
}

// luFactorise is the factorise function for newTopology by LU decomposition.
func luFactorise(g [][]float64) (factorisation, error) { return factor(g) }

// invertDense returns the inverse of the square matrix a (row-major result) by
// Gauss-Jordan elimination with partial pivoting; a pivot not above
// minPivot·max|a| (or NaN) is singular.
func invertDense(a [][]float64, minPivot float64) ([]float64, error) {
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
		if !(math.Abs(m[p][c]) > minPivot*scale) {
			return nil, errSingular
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

// nodal is the changing part of a network in time: its elements and the work
// vectors of a step. One step is inject, solve (with the topology of the step), then
// update.
type nodal struct {
	elems   []element
	j       []float64 // injections into the full nodes
	v       []float64 // full node voltages of the last step
	rhs, vu []float64 // the unknowns' right-hand side and voltages
}

func newNodal(nodes int, elems []element) *nodal {
	return &nodal{elems: elems, j: make([]float64, nodes), v: make([]float64, nodes)}
}

// inject gathers every element's current sources for the coming step.
func (s *nodal) inject(e drive) {
	for i := range s.j {
		s.j[i] = 0
	}
	for _, el := range s.elems {
		el.inject(s.j, e)
	}
}

// solve solves the step with the topology tp: the unknowns' voltages from the
// injections and the known voltages e, corrected by correct if not nil (a
// compensation for nonlinear elements, which may fail), then every node's voltage.
func (s *nodal) solve(tp *topology, e drive, correct func(vu []float64) error) error {
	if tp.plain {
		tp.f.solve(s.j, s.v)
		if correct != nil {
			return correct(s.v)
		}
		return nil
	}
	nu := tp.nu
	if cap(s.rhs) < nu {
		s.rhs = make([]float64, nu)
		s.vu = make([]float64, nu)
	}
	rhs, vu := s.rhs[:nu], s.vu[:nu]
	for i := range rhs {
		rhs[i] = 0
	}
	for a, x := range s.j {
		if u := tp.nodeU[a]; u >= 0 {
			rhs[u] += x
		}
	}
	if len(tp.guk) > 0 {
		for u := 0; u < nu; u++ {
			rhs[u] -= tp.guk[u*3]*e[0] + tp.guk[u*3+1]*e[1] + tp.guk[u*3+2]*e[2]
		}
	}
	tp.f.solve(rhs, vu)
	var err error
	if correct != nil {
		err = correct(vu)
	}
	for a := range s.v {
		if u := tp.nodeU[a]; u >= 0 {
			s.v[a] = vu[u]
		} else {
			s.v[a] = e[tp.nodeK[a]]
		}
	}
	return err
}

// update lets every element record the step's solution.
func (s *nodal) update(e drive) {
	for _, el := range s.elems {
		el.update(s.v, e)
	}
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
			return nil, errSingular
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
