package freqscan

import (
	"math"
	"testing"
)

// fifthHarmonicNetwork resonates at the 5th harmonic of 50 Hz: with a lossless line the
// source inductance that puts the resonance at f solves tan(βl)·ωLs/Zc = 1 (see
// TestSourceInductanceResonance), so Ls = Zc/(ω tan βl) at ω = 2π·250; light line
// losses keep the peak finite.
func fifthHarmonicNetwork() Network {
	const (
		length = 200e3
		L, C   = 0.93e-6, 12.4e-12
	)
	w := 2 * math.Pi * 250
	ls := math.Sqrt(L/C) / (w * math.Tan(w*length*math.Sqrt(L*C)))
	return Network{Source: Source{R: 0.5, L: ls}, Line: line(length, 0.028e-3, L, 0, C)}
}

// TestScreeningFifth: the case built to resonate at the 5th harmonic is flagged there
// and not at the 3rd, 9th or 11th, where its gain stays below the limit (the 7th band,
// 315-385 Hz, reaches up the flank of the 250 Hz peak).
func TestScreeningFifth(t *testing.T) {
	t.Parallel()
	n := fifthHarmonicNetwork()
	pts := Scan(nil, n, LinearGrid(nil, 1, 2500, 5000))
	peaks := Peaks(n, pts)
	if len(peaks) == 0 || math.Abs(peaks[0].F-250)/250 > peakFreqTol {
		t.Fatalf("first peak %+v, want at 250 Hz", peaks)
	}
	sc := Screen(n, pts, peaks, nil, nil, nil, ScreenSettings{Fundamental: 50, FMax: 2500,
		BackgroundPct: map[int]float64{5: 1.0, 7: 0.5}})
	rows := map[int]HarmonicRow{}
	for _, r := range sc.Rows {
		rows[r.Order] = r
	}
	if len(sc.Rows) != 50 { // orders 1..50
		t.Errorf("%d rows, want 50", len(sc.Rows))
	}
	r5 := rows[5]
	if !r5.Watched || !r5.OverLimit || len(r5.NearPeaks) != 1 || r5.BandGain < r5.Gain {
		t.Errorf("5th: %+v, want watched, over the limit, one peak near", r5)
	}
	for _, h := range []int{3, 9, 11} {
		if r := rows[h]; r.OverLimit || r.BandGain > DefaultGainLimit {
			t.Errorf("%dth: band gain %g flagged %v, want below the limit", h, r.BandGain, r.OverLimit)
		}
	}
	// IEC TR 61000-3-6 planning level of the 5th (HV-EHV): 2 %; from memory.
	if r5.PlanPct != 2 || !r5.HasBackground || r5.Amplified != 1.0*r5.Gain || !r5.Exceeds {
		t.Errorf("5th: plan %g, amplified %g, exceeds %v", r5.PlanPct, r5.Amplified, r5.Exceeds)
	}
	if r := rows[11]; r.HasBackground || math.Abs(r.AllowedBackground*r.Gain-1.5) > 1e-12 {
		t.Errorf("11th: allowed background %g × gain %g, want the planning level 1.5", r.AllowedBackground, r.Gain)
	}
	if rows[3].Sequence != PositiveOnly || rows[5].Sequence != Positive {
		t.Errorf("sequences: 3rd %q, 5th %q", rows[3].Sequence, rows[5].Sequence)
	}
	var flagged []int
	for _, r := range sc.Flags {
		flagged = append(flagged, r.Order)
	}
	if len(flagged) == 0 || flagged[0] != 5 {
		t.Errorf("flags %v, want the 5th first", flagged)
	}
}

// TestScreeningZeroSequence: with a zero-sequence network, triplen orders are screened
// on it (their gain is that network's gain) and the others on the positive sequence.
func TestScreeningZeroSequence(t *testing.T) {
	t.Parallel()
	pos := fifthHarmonicNetwork()
	zero := pos
	zero.Line = line(200e3, 0.25e-3, 3e-6, 0, 7.5e-12)
	zero.Source.L *= 1.5
	freqs := LinearGrid(nil, 1, 2500, 5000)
	pp, zp := Scan(nil, pos, freqs), Scan(nil, zero, freqs)
	sc := Screen(pos, pp, Peaks(pos, pp), &zero, zp, Peaks(zero, zp), ScreenSettings{Fundamental: 50, FMax: 1000})
	for _, r := range sc.Rows {
		net, seq := pos, Positive
		if r.Order%3 == 0 {
			net, seq = zero, Zero
		}
		if r.Sequence != seq {
			t.Errorf("order %d: sequence %q, want %q", r.Order, r.Sequence, seq)
		}
		if want := Scan(nil, net, []float64{r.F})[0].Gain; r.Gain != want {
			t.Errorf("order %d: gain %g, want %g", r.Order, r.Gain, want)
		}
	}
}

// TestPlanningLevels: spot values of IEC TR 61000-3-6:2008 table 2, HV-EHV; from memory.
func TestPlanningLevels(t *testing.T) {
	t.Parallel()
	for _, tc := range []struct {
		h    int
		want float64
	}{{2, 1.4}, {3, 2}, {4, 0.8}, {5, 2}, {7, 2}, {9, 1}, {11, 1.5}, {13, 1.5}, {15, 0.3}, {17, 1.2}, {21, 0.2}, {25, 1.2 * 17 / 25.0}, {10, 0.35}, {51, 0}} {
		if got := PlanningLevelPct(tc.h); math.Abs(got-tc.want) > 1e-12 {
			t.Errorf("h = %d: %g %%, want %g %%", tc.h, got, tc.want)
		}
	}
}

// TestSourceStrength: SourceAt keeps |Z| = V²/S and X/R; with a purely inductive source
// the first resonance at each level solves tan(βl)·ωLs/Zc = 1 (see
// TestSourceInductanceResonance) and falls as the source weakens.
func TestSourceStrength(t *testing.T) {
	t.Parallel()
	src := SourceAt(10e9, 400e3, 12, 50)
	x := 2 * math.Pi * 50 * src.L
	if math.Abs(math.Hypot(src.R, x)-400e3*400e3/10e9) > 1e-9 || math.Abs(x/src.R-12) > 1e-12 {
		t.Errorf("SourceAt: R %g X %g", src.R, x)
	}
	const (
		length = 420e3
		L, C   = 0.93e-6, 12.4e-12
	)
	n := Network{Line: line(length, 0, L, 0, C)}
	m := SourceStrength(n, 400e3, math.Inf(1), 50, 2e9, 40e9, 6, LinearGrid(nil, 1, 1000, 2000))
	if len(m.Gain) != 6 || len(m.Gain[0]) != 2000 || len(m.First) != 6 {
		t.Fatalf("map %d x %d", len(m.Gain), len(m.Gain[0]))
	}
	zc, tau := math.Sqrt(L/C), length*math.Sqrt(L*C)
	prev := 0.0
	for i, pk := range m.First {
		ls := m.Source[i].L
		h := func(f float64) float64 { w := 2 * math.Pi * f; return math.Tan(w*tau)*w*ls/zc - 1 }
		lo, hi := 1e-3, 1/(4*tau)*(1-1e-12)
		for k := 0; k < 200; k++ {
			if mid := (lo + hi) / 2; h(mid) < 0 {
				lo = mid
			} else {
				hi = mid
			}
		}
		if want := (lo + hi) / 2; math.Abs(pk.F-want) > peakFreqTol*want {
			t.Errorf("level %g VA: first resonance %g Hz, want %g", m.ShortCircuitVA[i], pk.F, want)
		}
		if pk.F <= prev {
			t.Errorf("first resonance %g Hz not above %g Hz at a stronger source", pk.F, prev)
		}
		prev = pk.F
	}
}

// narrowNetworks are the positive- and zero-sequence networks of
// testdata/scan_narrow.toml: 275 kV, 180 km, a 6 GVA X/R 10 source and a 120 Mvar
// receiving-bus capacitor, with a Q 150 resonance near 716 Hz, just above the h13 band.
func narrowNetworks() (pos, zero Network) {
	const v, f0 = 275e3, 50.0
	w := 2 * math.Pi * f0
	src := SourceAt(6000e6, v, 10, f0)
	bank := Shunt{End: Receiving, C: 120e6 / (v * v * w)}
	pos = Network{Source: src, Line: line(180e3, 0.03e-3, 1.02e-6, 0, 11.3e-12), Shunts: []Shunt{bank}}
	zero = pos
	zero.Line = line(180e3, 0.20e-3, 3.0e-6, 0, 7.0e-12)
	return pos, zero
}

// bandDenseTol bounds how far the band gain may lie above the maximum over 200,001
// evenly spaced points of the band: the dense grid's step (≤ 1.4e-3 Hz here) against
// the narrowest half-power width (4.8 Hz) leaves the gain within (step/width)² ≈ 1e-7.
const bandDenseTol = 1e-6

// TestBandGainWhateverGrid: the band gain of every watched harmonic, both sequences,
// is the maximum of the continuous response over the band, edges included, on coarse,
// odd-sized and logarithmic scan grids alike: it matches the library's own dense
// evaluation of the band (200,001 points) from above within bandDenseTol.
func TestBandGainWhateverGrid(t *testing.T) {
	t.Parallel()
	pos, zero := narrowNetworks()
	dense := map[[2]int]float64{} // (order, zero?) -> dense maximum
	for _, h := range DefaultWatch() {
		net, z := pos, 0
		if Triplen(h) {
			net, z = zero, 1
		}
		f := 50 * float64(h)
		best := 0.0
		for _, p := range Scan(nil, net, LinearGrid(nil, f*(1-DefaultWatchBand), f*(1+DefaultWatchBand), 200001)) {
			best = math.Max(best, p.Gain)
		}
		dense[[2]int{h, z}] = best
	}
	grids := []struct {
		name  string
		freqs []float64
	}{
		{"linear 30", LinearGrid(nil, 1, 2500, 30)},
		{"linear 300", LinearGrid(nil, 1, 2500, 300)},
		{"linear 301", LinearGrid(nil, 1, 2500, 301)},
		{"linear 5000", LinearGrid(nil, 1, 2500, 5000)},
		{"log 120", LogGrid(nil, 1, 2500, 120)},
	}
	for _, g := range grids {
		t.Run(g.name, func(t *testing.T) {
			t.Parallel()
			pp, zp := Scan(nil, pos, g.freqs), Scan(nil, zero, g.freqs)
			sc := Screen(pos, pp, Peaks(pos, pp), &zero, zp, Peaks(zero, zp),
				ScreenSettings{Fundamental: 50, FMax: 2500, GainLimit: 7})
			for _, r := range sc.Rows {
				if !r.Watched {
					continue
				}
				z := 0
				if r.Sequence == Zero {
					z = 1
				}
				want := dense[[2]int{r.Order, z}]
				if r.BandGain < want*(1-1e-12) || r.BandGain > want*(1+bandDenseTol) {
					t.Errorf("h%d (%s): band gain %.10g, dense maximum %.10g", r.Order, r.Sequence, r.BandGain, want)
				}
				if r.OverLimit != (want > 7) {
					t.Errorf("h%d: over limit %v, dense maximum %.4g against 7", r.Order, r.OverLimit, want)
				}
			}
		})
	}
}
