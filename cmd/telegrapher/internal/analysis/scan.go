package analysis

import (
	"context"
	"math"
	"math/cmplx"
	"sort"

	"github.com/telegrapher/telegrapher/cmd/telegrapher/internal/study"
	"github.com/telegrapher/telegrapher/freqscan"
)

// ScanResult is the harmonic scan of a study: the responses of its positive-sequence
// network (and zero-sequence one when the study has zero-sequence data) over the
// study's frequency grid, their resonances and the harmonic screening.
type ScanResult struct {
	Log   bool      // the grid is logarithmic (else linear)
	Freqs []float64 // the grid, Hz
	// Positive is the study's network, Zero its zero-sequence one (nil without
	// zero-sequence data).
	Positive Sequence
	Zero     *Sequence
	Screen   freqscan.Screening
	// Strength is the source-strength map when the study sets
	// scan.short_circuit_mva_range (or when asked for: SourceStrength).
	Strength *StrengthMap
}

// Sequence is the scan of one sequence network.
type Sequence struct {
	Network freqscan.Network
	Points  []freqscan.Point
	Peaks   []freqscan.Peak
	ZRes    []freqscan.ZResonance
}

// StrengthMap is the gain over frequency and source short-circuit level.
type StrengthMap struct {
	XOverR float64 // the sources' X/R (+Inf for a purely inductive one)
	Freqs  []float64
	// Map holds the levels (VA), the sources, the gains on Freqs and, in First, the
	// first resonance of each level on the study's full grid (a zero Peak: none
	// within the band; Found tells them apart).
	Map   freqscan.StrengthMap
	Found []bool
}

// MapColumns is the number of frequencies of the source-strength map.
const MapColumns = 500

// grid returns the study's scan grid and whether it is logarithmic.
func grid(st *study.Study, n int) []float64 {
	sc := st.Scan
	if sc.Log {
		return freqscan.LogGrid(nil, sc.FMin, sc.FMax, n)
	}
	return freqscan.LinearGrid(nil, sc.FMin, sc.FMax, n)
}

// checkGrid refuses a scan grid that cannot be scanned.
func checkGrid(st *study.Study) error {
	sc := st.Scan
	if !(sc.FMin > 0 && sc.FMax > sc.FMin) || sc.Points < 2 {
		return inputf(st.File, "scan", "the grid needs 0 < f_min_hz < f_max_hz and points >= 2, got %g, %g, %d", sc.FMin, sc.FMax, sc.Points)
	}
	return nil
}

// sequence scans network n on freqs and finds its peaks and, with zres, its
// driving-point resonances.
func sequence(ctx context.Context, n freqscan.Network, freqs []float64, zres bool) (Sequence, error) {
	pts, err := freqscan.ScanContext(ctx, nil, n, freqs)
	if err != nil {
		return Sequence{}, err
	}
	sq := Sequence{Network: n, Points: pts, Peaks: freqscan.Peaks(n, pts)}
	if zres {
		sq.ZRes = freqscan.ImpedanceResonances(n, pts)
	}
	return sq, nil
}

// Scan scans the study's positive-sequence network (and the zero-sequence one when
// the study has it) over the grid of [scan], finds the resonances, screens the
// harmonics and, when the study sets scan.short_circuit_mva_range, computes the
// source-strength map. A grid of many points stops between chunks when ctx ends.
func Scan(ctx context.Context, st *study.Study) (*ScanResult, error) {
	if err := checkGrid(st); err != nil {
		return nil, err
	}
	res, err := screen(ctx, st, grid(st, st.Scan.Points), true)
	if err != nil {
		return nil, err
	}
	if st.Scan.ShortCircuitRange[1] > 0 {
		if res.Strength, err = SourceStrength(ctx, st); err != nil {
			return nil, err
		}
	}
	return res, nil
}

// screen scans both sequence networks on freqs and screens the harmonics: the part
// of Scan the remedy search repeats for every candidate (WatchedGain), without the
// driving-point resonances unless zres.
func screen(ctx context.Context, st *study.Study, freqs []float64, zres bool) (*ScanResult, error) {
	res := &ScanResult{Log: st.Scan.Log, Freqs: freqs}
	var err error
	if res.Positive, err = sequence(ctx, st.Network, freqs, zres); err != nil {
		return nil, err
	}
	var zeroPts []freqscan.Point
	var zeroPeaks []freqscan.Peak
	if st.ZeroNetwork != nil {
		z, err := sequence(ctx, *st.ZeroNetwork, freqs, zres)
		if err != nil {
			return nil, err
		}
		res.Zero, zeroPts, zeroPeaks = &z, z.Points, z.Peaks
	}
	res.Screen = freqscan.Screen(st.Network, res.Positive.Points, res.Positive.Peaks, st.ZeroNetwork, zeroPts, zeroPeaks, screenSettings(st))
	return res, nil
}

// ScanGrid returns the frequencies (Hz) of the study's scan grid, or an *InputError
// when [scan] gives none.
func ScanGrid(st *study.Study) ([]float64, error) {
	if err := checkGrid(st); err != nil {
		return nil, err
	}
	return grid(st, st.Scan.Points), nil
}

// WatchedGain returns the largest gain within the watch band of a watched harmonic
// (screened as Scan screens them, triplens on the zero sequence where it exists) and
// the lowest positive-sequence gain peak above 1.05 times the fundamental that
// magnifies (Hz; 0 when none), on the grid freqs (ScanGrid): the remedy search's
// harmonic measures.
func WatchedGain(ctx context.Context, st *study.Study, freqs []float64) (gain, first float64, err error) {
	// The screening's band gains need only the peaks inside the watched bands, and the
	// first resonance the peaks up to the first that magnifies: the remedy search,
	// which calls this for every candidate, refines no other peak. A peak's frequency
	// and gain depend only on its grid neighbours, so these are the peaks Scan finds.
	set := screenSettings(st)
	pos, err := freqscan.ScanContext(ctx, nil, st.Network, freqs)
	if err != nil {
		return 0, 0, err
	}
	var zero *freqscan.Network
	var zeroPts []freqscan.Point
	var zeroPeaks []freqscan.Peak
	if st.ZeroNetwork != nil {
		zero = st.ZeroNetwork
		if zeroPts, err = freqscan.ScanContext(ctx, nil, *zero, freqs); err != nil {
			return 0, 0, err
		}
		zeroPeaks = bandPeaks(*zero, zeroPts, set)
	}
	scr := freqscan.Screen(st.Network, pos, bandPeaks(st.Network, pos, set), zero, zeroPts, zeroPeaks, set)
	for _, r := range scr.Rows {
		if r.Watched {
			gain = math.Max(gain, r.BandGain)
		}
	}
	return gain, firstAbove(st.Network, pos, 1.05*st.Frequency), nil
}

// bandPeaks returns the peaks of pts (as freqscan.Peaks finds them) whose frequency
// lies within the band of a watched harmonic, refining only the grid points in or
// next to a band: two points beyond each band edge, since a grid maximum just outside
// may refine to a frequency inside.
func bandPeaks(n freqscan.Network, pts []freqscan.Point, set freqscan.ScreenSettings) []freqscan.Peak {
	set = set.WithDefaults()
	band := set.WatchBand
	var out []freqscan.Peak
	for _, h := range set.Watch {
		lo, hi := float64(h)*set.Fundamental*(1-band), float64(h)*set.Fundamental*(1+band)
		i := sort.Search(len(pts), func(i int) bool { return pts[i].F >= lo })
		j := sort.Search(len(pts), func(j int) bool { return pts[j].F > hi })
		i, j = max(i-2, 0), min(j+2, len(pts))
		if j-i < 3 {
			continue
		}
		for _, p := range freqscan.Peaks(n, pts[i:j]) {
			if p.F >= lo && p.F <= hi {
				out = append(out, p)
			}
		}
	}
	return out
}

// firstAbove returns the frequency (Hz) of the lowest gain peak of pts above fLow that
// magnifies (gain > 1 or unbounded), 0 when none: the peaks of freqscan.Peaks, refined
// on growing leading parts of the scan until one is found (a peak's frequency and gain
// depend only on its grid neighbours, so they are those of the whole scan).
func firstAbove(n freqscan.Network, pts []freqscan.Point, fLow float64) float64 {
	for k := min(len(pts), 64); ; k = min(2*k, len(pts)) {
		// The last point of a leading part cannot be a peak of it: only the peaks
		// before it are final.
		for _, p := range freqscan.Peaks(n, pts[:k]) {
			if p.F > fLow && p.Magnifies() && (k == len(pts) || p.F < pts[k-2].F) {
				return p.F
			}
		}
		if k == len(pts) {
			return 0
		}
	}
}

// screenSettings are the harmonic screening settings of [scan].
func screenSettings(st *study.Study) freqscan.ScreenSettings {
	sc := st.Scan
	return freqscan.ScreenSettings{
		Fundamental: st.Frequency, FMax: sc.FMax, Watch: sc.WatchHarmonics, GainLimit: sc.GainLimit,
		WatchBand: sc.WatchBand, BackgroundPct: sc.BackgroundPct, PlanningPct: sc.PlanningPct,
	}
}

// SourceStrength computes the source-strength map over scan.short_circuit_mva_range
// or, without it, over 0.25 to 4 times the study's short-circuit level, X/R kept.
func SourceStrength(ctx context.Context, st *study.Study) (*StrengthMap, error) {
	f0, v := st.Frequency, st.Voltage
	lo, hi := st.Scan.ShortCircuitRange[0], st.Scan.ShortCircuitRange[1]
	steps := st.Scan.ShortCircuitSteps
	if hi == 0 {
		sc := st.Source.ShortCircuitVA
		if sc == 0 && !st.Network.Source.Ideal() {
			z := cmplx.Abs(st.Network.Source.Impedance(complex(0, 2*math.Pi*f0)))
			sc = v * v / z
		}
		if sc == 0 {
			return nil, inputf(st.File, "scan.short_circuit_mva_range", "--map needs a range, or a [source] to span; the study has an ideal source")
		}
		lo, hi = sc/4, sc*4
	}
	if steps < 2 {
		steps = 25
	}
	if !(lo > 0 && hi > lo) {
		return nil, inputf(st.File, "scan.short_circuit_mva_range", "needs 0 < min < max, got [%g, %g]", lo/1e6, hi/1e6)
	}
	xr := st.Source.XOverR
	if xr == 0 {
		src := st.Network.Source
		switch {
		case src.R > 0:
			xr = 2 * math.Pi * f0 * src.L / src.R
		default:
			xr = math.Inf(1) // ideal or purely inductive source: keep it inductive
		}
	}
	if !(xr > 0) {
		return nil, inputf(st.File, "source", "the source-strength map needs an inductive source (X/R > 0)")
	}
	freqs := grid(st, min(MapColumns, st.Scan.Points))
	// The first resonance needs the full grid's resolution: scan each level on the
	// study grid for the peak, then the coarse grid for the map.
	m := freqscan.SourceStrength(st.Network, v, xr, f0, lo, hi, steps, freqs)
	out := &StrengthMap{XOverR: xr, Freqs: freqs, Found: make([]bool, len(m.ShortCircuitVA))}
	full := grid(st, st.Scan.Points)
	var pts []freqscan.Point
	for i := range m.ShortCircuitVA {
		nn := st.Network
		nn.Source = m.Source[i]
		var err error
		if pts, err = freqscan.ScanContext(ctx, pts, nn, full); err != nil {
			return nil, err
		}
		if pk, ok := freqscan.FirstResonance(freqscan.Peaks(nn, pts)); ok {
			m.First[i], out.Found[i] = pk, true
		} else {
			m.First[i] = freqscan.Peak{}
		}
	}
	out.Map = m
	return out, nil
}
