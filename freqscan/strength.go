package freqscan

import "math"

// StrengthMap is the response of a network over a range of source short-circuit levels
// at a fixed X/R: the first resonance at each level and the gain over frequency.
type StrengthMap struct {
	ShortCircuitVA []float64   // the levels, VA, geometric from the minimum to the maximum
	Freqs          []float64   // Hz, the map's frequency grid
	Gain           [][]float64 // Gain[i][j]: |Vr/E| at ShortCircuitVA[i], Freqs[j]
	First          []Peak      // the lowest-frequency resonance peak at each level; zero Peak (F = 0) when none
	Source         []Source    // the source at each level
}

// SourceAt returns the source of three-phase short-circuit level sc (VA) at the
// line-to-line voltage v (V) and X/R ratio xr at the system frequency f0 (Hz):
//
//	|Z| = v²/sc,  R = |Z|/sqrt(1 + (X/R)²),  L = R·(X/R)/(2π f0)
//
// xr = +Inf gives a purely inductive source. No voltage factor is applied.
//
// References:
//   - IEC 60909-0:2016, network feeder impedance (without the voltage factor c); from
//     memory.
func SourceAt(sc, v, xr, f0 float64) Source {
	z := v * v / sc
	if math.IsInf(xr, 1) {
		return Source{L: z / (2 * math.Pi * f0)}
	}
	r := z / math.Sqrt(1+xr*xr)
	return Source{R: r, L: r * xr / (2 * math.Pi * f0)}
}

// SourceStrength replaces n's source by SourceAt(level, v, xr, f0) for steps levels
// (>= 2) spaced geometrically from scMin to scMax (VA, 0 < scMin < scMax) and scans
// each over freqs (Hz, increasing). The levels are independent; the work is spread
// over the cores by Scan.
func SourceStrength(n Network, v, xr, f0, scMin, scMax float64, steps int, freqs []float64) StrengthMap {
	if !(scMin > 0 && scMax > scMin) || steps < 2 || !(v > 0) || !(f0 > 0) || !(xr > 0) {
		panic("freqscan: SourceStrength needs 0 < scMin < scMax, steps >= 2, v, f0, xr > 0")
	}
	m := StrengthMap{Freqs: freqs}
	m.ShortCircuitVA = LogGrid(nil, scMin, scMax, steps)
	var pts []Point
	for _, sc := range m.ShortCircuitVA {
		nn := n
		nn.Source = SourceAt(sc, v, xr, f0)
		pts = Scan(pts, nn, freqs)
		row := make([]float64, len(pts))
		for j, p := range pts {
			row[j] = p.Gain
		}
		first, _ := FirstResonance(Peaks(nn, pts))
		m.Gain = append(m.Gain, row)
		m.First = append(m.First, first)
		m.Source = append(m.Source, nn.Source)
	}
	return m
}
