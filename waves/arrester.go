package waves

import (
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
