package freqscan

import (
	"math"
	"math/cmplx"
	"sort"

	"github.com/telegrapher/telegrapher/propagation"
)

// Peak is a resonance peak of the gain |Vr/E|: an interior local maximum of a scan,
// with its frequency refined on the continuous response.
type Peak struct {
	F         float64 // Hz, refined between the grid neighbours of the grid maximum
	Gain      float64 // |Vr/E| at F; +Inf when Unbounded
	Unbounded bool    // the network is lossless at F and the gain has a pole there
	FLow      float64 // Hz, lower half-power (-3 dB) frequency; 0 where not defined
	FHigh     float64 // Hz, upper half-power frequency; 0 where not defined
	Bandwidth float64 // FHigh - FLow, Hz; 0 where not defined
	Q         float64 // F / Bandwidth; 0 where not defined
}

// ZResonance is a resonance of a driving-point impedance: a parallel resonance is a
// local maximum of |Z|, a series resonance a local minimum.
type ZResonance struct {
	Bus       string  // "in" (into the line, as Point.ZIn), "sending" or "receiving"
	Parallel  bool    // true: |Z| maximum; false: |Z| minimum (series resonance)
	F         float64 // Hz, refined
	Ohm       float64 // |Z| at F, ohm; +Inf when Unbounded
	Unbounded bool    // parallel resonance of a network lossless at F: |Z| has a pole
}

// Thresholds telling a pole of a lossless network from a large finite value: the
// refinement below stops within a relative 1e-11 of the pole, where 1/|f - fp| makes
// the value exceed 1e9 times its scale; a finite peak of a lossless network that is
// not a pole stays far below 1e6 times the scale.
const (
	unboundedGain  = 1e6 // dimensionless gain
	unboundedZover = 1e6 // times the line's surge impedance magnitude
)

// refineTol is the relative frequency tolerance of the golden-section refinement.
const refineTol = 1e-11

// Peaks returns every interior local maximum of the gain of the scan pts (as returned
// by Scan for n, frequencies increasing), by frequency. Each peak's frequency is refined
// by golden-section search on the continuous |Vr/E(j2πf)| between the grid neighbours,
// and its half-power frequencies by bisection where the gain falls to 1/√2 of the peak
// on both sides before rising again within the scan.
//
// A peak of a network without any loss (Network.Lossless) is a pole of the gain: it is
// reported Unbounded with Gain = +Inf rather than a large number that depends only on
// rounding.
//
// References:
//   - Kiefer, J., Sequential minimax search for a maximum, Proc. AMS 4 (1953) 502-506
//     (golden-section search).
func Peaks(n Network, pts []Point) []Peak {
	vals := make([]float64, len(pts))
	for i, p := range pts {
		vals[i] = p.Gain
	}
	k := newKernel(n)
	gain := func(f float64) float64 { return k.point(f).Gain }
	var out []Peak
	for _, i := range extrema(vals, true) {
		f, g := refine(gain, pts[i-1].F, pts[i+1].F, pts[i].F, vals[i], true)
		pk := Peak{F: f, Gain: g}
		if n.Lossless(f) && g > unboundedGain {
			pk.Gain, pk.Unbounded = math.Inf(1), true
			out = append(out, pk)
			continue
		}
		lo, okLo := halfPower(gain, pts, vals, i, f, g, -1)
		hi, okHi := halfPower(gain, pts, vals, i, f, g, +1)
		if okLo && okHi && hi > lo {
			pk.FLow, pk.FHigh, pk.Bandwidth = lo, hi, hi-lo
			pk.Q = f / pk.Bandwidth
		}
		out = append(out, pk)
	}
	return out
}

// ImpedanceResonances returns the parallel (|Z| maximum) and series (|Z| minimum)
// resonances of the driving-point impedances of the scan pts: into the line, at the
// sending bus (omitted for an ideal source, whose bus impedance is zero) and at the
// receiving bus; by frequency, refined as in Peaks.
func ImpedanceResonances(n Network, pts []Point) []ZResonance {
	type bus struct {
		name string
		pt   func(Point) complex128
	}
	buses := []bus{
		{"in", func(p Point) complex128 { return p.ZIn }},
		{"sending", func(p Point) complex128 { return p.ZSending }},
		{"receiving", func(p Point) complex128 { return p.ZReceiving }},
	}
	k := newKernel(n)
	var out []ZResonance
	vals := make([]float64, len(pts))
	for _, b := range buses {
		if b.name == "sending" && n.Source.Ideal() {
			continue
		}
		for i, p := range pts {
			vals[i] = cmplx.Abs(b.pt(p))
		}
		fn := func(f float64) float64 { return cmplx.Abs(b.pt(k.point(f))) }
		for _, parallel := range []bool{true, false} {
			for _, i := range extrema(vals, parallel) {
				f, z := refine(fn, pts[i-1].F, pts[i+1].F, pts[i].F, vals[i], parallel)
				r := ZResonance{Bus: b.name, Parallel: parallel, F: f, Ohm: z}
				if parallel && n.Lossless(f) && z > unboundedZover*n.surgeScale(f) {
					r.Ohm, r.Unbounded = math.Inf(1), true
				}
				out = append(out, r)
			}
		}
	}
	sort.SliceStable(out, func(a, b int) bool { return out[a].F < out[b].F })
	return out
}

// surgeScale is |Zc| of the first line section at f, the impedance scale of the
// network (1 ohm for a line without one).
func (n Network) surgeScale(f float64) float64 {
	if len(n.Line) == 0 {
		return 1
	}
	z := cmplx.Abs(n.Line[0].SurgeImpedance(jw(f)))
	if z > 0 && !math.IsInf(z, 0) {
		return z
	}
	return 1
}

func jw(f float64) complex128 { return complex(0, 2*math.Pi*f) }

// extrema returns the indices of interior strict local maxima (max) or minima of v;
// a flat run counts once, at its first index, when both its neighbours lie on the
// same side.
func extrema(v []float64, max bool) []int {
	better := func(a, b float64) bool { // a strictly beyond b
		if max {
			return a > b
		}
		return a < b
	}
	var idx []int
	for i := 1; i+1 < len(v); i++ {
		if !better(v[i], v[i-1]) {
			continue
		}
		k := i
		for k+1 < len(v) && v[k+1] == v[i] {
			k++
		}
		if k+1 < len(v) && better(v[i], v[k+1]) {
			idx = append(idx, i)
		}
		i = k
	}
	return idx
}

// refine searches [a, b] for the maximum (or minimum) of fn by golden section,
// starting from the grid value (x0, f0), and returns the better of the search result
// and the grid point.
func refine(fn func(float64) float64, a, b, x0, f0 float64, max bool) (x, fx float64) {
	sign := 1.0
	if !max {
		sign = -1
	}
	g := func(x float64) float64 { return sign * fn(x) }
	x, gx := propagation.GoldenMax(g, a, b, func(a, b float64) bool { return b-a <= refineTol*math.Abs(a+b)/2 }, 200)
	if sign*f0 > gx {
		return x0, f0
	}
	return x, sign * gx
}

// halfPower walks the grid from the peak at index i (refined to (fp, gp)) in the
// direction dir (-1 down, +1 up in frequency) until the gain falls below gp/√2, then
// bisects for the crossing. It reports false when the gain rises again, or the scan
// ends, first.
func halfPower(fn func(float64) float64, pts []Point, vals []float64, i int, fp, gp float64, dir int) (float64, bool) {
	level := gp / math.Sqrt2
	j := i
	if (dir < 0 && pts[i].F >= fp) || (dir > 0 && pts[i].F <= fp) {
		j = i + dir
	}
	prevF, prevG := fp, gp
	for ; j >= 0 && j < len(pts); j += dir {
		g := vals[j]
		if g < level {
			lo, hi := pts[j].F, prevF // fn(lo) < level <= fn(hi)
			for it := 0; it < 100 && math.Abs(hi-lo) > refineTol*math.Abs(hi+lo)/2; it++ {
				mid := (lo + hi) / 2
				if fn(mid) < level {
					lo = mid
				} else {
					hi = mid
				}
			}
			return (lo + hi) / 2, true
		}
		if g > prevG {
			return 0, false
		}
		prevF, prevG = pts[j].F, g
	}
	return 0, false
}

// Magnifies reports whether the peak magnifies a harmonic voltage: Gain > 1, or
// Unbounded. A local maximum of the gain below 1, such as the shallow low-frequency
// bump of a line between a source and a far system, is a peak but not a resonance
// that magnifies (common practice, no source).
func (p Peak) Magnifies() bool { return p.Unbounded || p.Gain > 1 }

// FirstResonance returns the lowest-frequency peak of peaks (as Peaks returns them,
// by frequency) that magnifies (Peak.Magnifies); ok is false when none does.
func FirstResonance(peaks []Peak) (p Peak, ok bool) {
	for _, pk := range peaks {
		if pk.Magnifies() {
			return pk, true
		}
	}
	return Peak{}, false
}
