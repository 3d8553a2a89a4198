package waves

import (
	"errors"
	"fmt"
	"math"
	"sort"
)

// VIPoint is one point of a surge arrester's V-I characteristic: the current (A, > 0)
// and the peak voltage across the arrester at that current (V, > 0).
type VIPoint struct {
	Current float64 // A
	Voltage float64 // V
}

// typicalMO is a typical metal-oxide arrester characteristic in per unit of the
// rated voltage's peak (√2·Ur): current in A, voltage in pu. The shape follows
// published 30/60 µs switching and 8/20 µs lightning residual voltages of station-class
// arresters (switching residual about 2.1·Ur at 1 kA, lightning residual about 2.5·Ur at
// 10 kA, both peak kV over rms kV); typical manufacturers' data, from memory.
var typicalMO = []VIPoint{
	{1e-3, 1.00},
	{1e-1, 1.07},
	{1, 1.13},
	{10, 1.20},
	{100, 1.30},
	{500, 1.42},
	{1000, 1.49},
	{2000, 1.56},
	{10000, 1.76},
	{20000, 1.90},
}

// TypicalArrester returns the typical metal-oxide characteristic scaled to the rated
// voltage ur (rms, V, > 0): voltage = pu·√2·ur.
func TypicalArrester(ur float64) []VIPoint {
	out := make([]VIPoint, len(typicalMO))
	for k, p := range typicalMO {
		out[k] = VIPoint{p.Current, p.Voltage * math.Sqrt2 * ur}
	}
	return out
}

// Arrester is a phase-to-earth surge arrester on each phase at one line end (on the
// line side of the breaker at the sending end).
type Arrester struct {
	Name string
	At   int       // 0 sending (line side), 1 receiving
	VI   []VIPoint // at least two points, current and voltage strictly increasing
}

// arresterCurve is the V-I characteristic, interpolated linearly in log I against
// log V (a power law i = I_k·(v/V_k)^α_k on each segment, extended beyond both ends
// with the end segments' exponents), odd in v.
type arresterCurve struct {
	logV, logI, alpha []float64
}

func newArresterCurve(vi []VIPoint) (*arresterCurve, error) {
	if len(vi) < 2 {
		return nil, fmt.Errorf("arrester V-I table needs at least 2 points, got %d", len(vi))
	}
	pts := append([]VIPoint(nil), vi...)
	sort.Slice(pts, func(a, b int) bool { return pts[a].Current < pts[b].Current })
	c := &arresterCurve{}
	for k, p := range pts {
		if !(p.Current > 0) || !(p.Voltage > 0) || math.IsInf(p.Current, 0) || math.IsInf(p.Voltage, 0) {
			return nil, fmt.Errorf("arrester V-I point %d: current and voltage must be > 0 and finite, got %g A, %g V", k+1, p.Current, p.Voltage)
		}
		if k > 0 && !(p.Voltage > pts[k-1].Voltage && p.Current > pts[k-1].Current) {
			return nil, fmt.Errorf("arrester V-I point %d: voltage and current must both increase (%g V at %g A after %g V at %g A)", k+1, p.Voltage, p.Current, pts[k-1].Voltage, pts[k-1].Current)
		}
		c.logV = append(c.logV, math.Log(p.Voltage))
		c.logI = append(c.logI, math.Log(p.Current))
	}
	for k := 0; k+1 < len(pts); k++ {
		c.alpha = append(c.alpha, (c.logI[k+1]-c.logI[k])/(c.logV[k+1]-c.logV[k]))
	}
	return c, nil
}

// current returns the arrester current (A) and its derivative di/dv (S) at the
// voltage v (V).
func (c *arresterCurve) current(v float64) (i, di float64) {
	a := math.Abs(v)
	if a == 0 {
		return 0, 0
	}
	lv := math.Log(a)
	k := sort.SearchFloat64s(c.logV, lv) - 1
	k = min(max(k, 0), len(c.alpha)-1)
	li := c.logI[k] + c.alpha[k]*(lv-c.logV[k])
	li = math.Min(li, 700) // keeps exp finite far beyond any physical current
	i = math.Exp(li)
	di = c.alpha[k] * i / a
	if v < 0 {
		i = -i
	}
	return i, di
}

// voltageAt returns the voltage (V) at which the arrester conducts the current i (A > 0).
func (c *arresterCurve) voltageAt(i float64) float64 {
	li := math.Log(i)
	k := sort.SearchFloat64s(c.logI, li) - 1
	k = min(max(k, 0), len(c.alpha)-1)
	return math.Exp(c.logV[k] + (li-c.logI[k])/c.alpha[k])
}

// ErrNoConvergence is wrapped by the error of a step whose arrester currents Newton's
// method did not find within maxNewton iterations (the switching shot's error names
// the shot and the time).
var ErrNoConvergence = errors.New("arrester currents did not converge")

// maxNewton is the iteration cap of the arresters' Newton iterations; each iteration
// halves its step up to newtonHalvings times while the residual does not fall.
const (
	maxNewton      = 60
	newtonHalvings = 30
)

// arresterSet is the arresters of one topology: the unknown nodes they sit on, the
// curves at each (several arresters on one node conduct in parallel), and the nodal
// system's inverse for the compensation. Shared read-only by the shots.
type arresterSet struct {
	nodes  []int              // unknown indices
	curves [][]*arresterCurve // per node
	zth    []float64          // Thevenin impedance matrix at the nodes, len(nodes)² row-major
	inv    []float64          // the topology's nu×nu inverse
	nu     int
	tol    float64 // V: the residual that counts as converged
}

// setZth takes the Thevenin impedance matrix from the inverse's rows and columns at
// the arrester nodes.
func (a *arresterSet) setZth() {
	na := len(a.nodes)
	a.zth = make([]float64, na*na)
	for p, u := range a.nodes {
		for q, w := range a.nodes {
			a.zth[p*na+q] = a.inv[u*a.nu+w]
		}
	}
}

// correct corrects the linear solution vu (the unknowns' voltages) for the arrester
// currents by the compensation method: with v_lin the node voltages without arrester
// current and Zth the Thevenin impedance matrix at the arrester nodes,
//
//	v = v_lin − Zth·i(v)
//
// solved by Newton's method with step halving, then vu −= inv·i over all nodes. When
// the residual is not within tol after maxNewton iterations the correction is still
// made and the error wraps ErrNoConvergence.
func (a *arresterSet) correct(vu []float64) error {
	na := len(a.nodes)
	vlin := make([]float64, na)
	v := make([]float64, na)
	cur := make([]float64, na)
	di := make([]float64, na)
	g := make([]float64, na)
	jac := make([][]float64, na)
	for p := range jac {
		jac[p] = make([]float64, na+1)
	}
	for p, u := range a.nodes {
		vlin[p] = vu[u]
		v[p] = vu[u]
	}
	eval := func(v []float64) float64 {
		var norm float64
		for p := range v {
			var s, d float64
			for _, c := range a.curves[p] {
				i, dd := c.current(v[p])
				s += i
				d += dd
			}
			cur[p], di[p] = s, d
		}
		for p := range v {
			s := v[p] - vlin[p]
			for q := range v {
				s += a.zth[p*na+q] * cur[q]
			}
			g[p] = s
			norm = math.Max(norm, math.Abs(s))
		}
		return norm
	}
	norm := eval(v)
	trial := make([]float64, na)
	for it := 0; it < maxNewton && norm > a.tol; it++ {
		for p := 0; p < na; p++ {
			for q := 0; q < na; q++ {
				jac[p][q] = a.zth[p*na+q] * di[q]
			}
			jac[p][p] += 1
			jac[p][na] = -g[p]
		}
		dx := solveSmall(jac)
		step := 1.0
		for tries := 0; tries < newtonHalvings; tries++ {
			for p := range v {
				trial[p] = v[p] + step*dx[p]
			}
			if nn := eval(trial); nn < norm || tries == newtonHalvings-1 {
				norm = nn
				copy(v, trial)
				break
			}
			step /= 2
		}
	}
	var err error
	if !(norm <= a.tol) {
		err = fmt.Errorf("%w: residual %.3g V after %d Newton iterations", ErrNoConvergence, norm, maxNewton)
	}
	eval(v)
	nu := a.nu
	for r := 0; r < nu; r++ {
		var s float64
		for p, u := range a.nodes {
			s += a.inv[r*nu+u] * cur[p]
		}
		vu[r] -= s
	}
	return err
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
