package freqscan

import (
	"math"
	"sort"
)

// Harmonic screening defaults.
const (
	DefaultGainLimit = 2.0  // largest acceptable gain near a watched harmonic; common practice, no source
	DefaultWatchBand = 0.10 // ±10 % of a watched harmonic's frequency
)

// DefaultWatch returns the default watch list: the odd harmonics 3 to 25.
func DefaultWatch() []int {
	var w []int
	for h := 3; h <= 25; h += 2 {
		w = append(w, h)
	}
	return w
}

// PlanningLevelPct returns the indicative planning level of harmonic voltage for HV-EHV
// networks, in percent of the fundamental, for the harmonic order h >= 2 (0 above 50).
//
//	odd, not multiple of 3:  5: 2   7: 2   11: 1.5   13: 1.5   17..49: 1.2·17/h
//	odd multiple of 3:       3: 2   9: 1   15: 0.3   21: 0.2   >21: 0.2
//	even:                    2: 1.4 4: 0.8  6: 0.4   8..50: 0.19·10/h + 0.16
//
// These are indicative values for coordinating emission limits; a network operator
// sets its own planning levels.
//
// References:
//   - IEC TR 61000-3-6:2008, Assessment of emission limits for the connection of
//     distorting installations to MV, HV and EHV power systems, table 2 (HV-EHV
//     column); from memory.
func PlanningLevelPct(h int) float64 {
	switch {
	case h < 2 || h > 50:
		return 0
	case h%2 == 0:
		switch h {
		case 2:
			return 1.4
		case 4:
			return 0.8
		case 6:
			return 0.4
		}
		return 0.19*10/float64(h) + 0.16
	case h%3 == 0:
		switch h {
		case 3:
			return 2
		case 9:
			return 1
		case 15:
			return 0.3
		}
		return 0.2
	}
	switch h {
	case 5, 7:
		return 2
	case 11, 13:
		return 1.5
	}
	return 1.2 * 17 / float64(h)
}

// ScreenSettings are the inputs of Screen besides the scans.
type ScreenSettings struct {
	Fundamental   float64         // system frequency, Hz, > 0
	FMax          float64         // top of the band, Hz: harmonics up to FMax are screened
	Watch         []int           // watched harmonic orders; nil = DefaultWatch
	GainLimit     float64         // 0 = DefaultGainLimit
	WatchBand     float64         // fraction; 0 = DefaultWatchBand
	BackgroundPct map[int]float64 // background harmonic voltage at the sending bus, % of fundamental
	PlanningPct   map[int]float64 // planning levels, %; absent orders take PlanningLevelPct
}

// Sequence names the network a harmonic was screened on.
type Sequence string

// The sequences of a screened harmonic.
const (
	Positive     Sequence = "positive"
	Zero         Sequence = "zero"
	PositiveOnly Sequence = "positive-sequence only" // a triplen screened without zero-sequence data
)

// HarmonicRow is the screening of one integer harmonic order.
type HarmonicRow struct {
	Order    int
	F        float64  // Hz
	Sequence Sequence // the network the row was screened on
	Gain     float64  // |Vr/E| at exactly Order × Fundamental; +Inf at a pole of a lossless network
	Watched  bool
	// For watched orders: the largest gain of the continuous response within
	// ±WatchBand of F, band edges included (see bandMax), and whether it exceeds
	// GainLimit.
	BandGain   float64
	OverLimit  bool
	NearPeaks  []Peak  // resonance peaks within the band
	PlanPct    float64 // planning level, % (0 = none for this order)
	Background float64 // background at the sending bus, %; valid when HasBackground
	// HasBackground: the study gives a background level for this order. Then Amplified
	// = Background × Gain is the receiving-end level and Exceeds compares it with
	// PlanPct. Without one, AllowedBackground = PlanPct / Gain is the largest
	// background that keeps the receiving end within the planning level.
	HasBackground     bool
	Amplified         float64
	Exceeds           bool
	AllowedBackground float64
}

// Screening is the harmonic screening of a network.
type Screening struct {
	Rows      []HarmonicRow
	GainLimit float64
	WatchBand float64
	Watch     []int
	Flags     []HarmonicRow // the watched rows over the gain limit and the rows over their planning level
}

// Triplen reports whether harmonic order h is a multiple of 3: zero sequence in a
// balanced three-phase system.
func Triplen(h int) bool { return h%3 == 0 }

// WithDefaults returns s with the settings it leaves at zero set to the defaults
// Screen uses: GainLimit DefaultGainLimit, WatchBand DefaultWatchBand, Watch
// DefaultWatch.
func (s ScreenSettings) WithDefaults() ScreenSettings {
	if s.GainLimit == 0 {
		s.GainLimit = DefaultGainLimit
	}
	if s.WatchBand == 0 {
		s.WatchBand = DefaultWatchBand
	}
	if s.Watch == nil {
		s.Watch = DefaultWatch()
	}
	return s
}

// Screen screens every integer harmonic from 1 (the fundamental) to
// FMax/Fundamental, each at exactly its frequency (not interpolated). Orders that are
// multiples of 3 are zero sequence in a balanced system and are screened on zero (with
// its scan zeroPts and peaks zeroPeaks) when zero is not nil; otherwise on the
// positive-sequence network, marked PositiveOnly. The background harmonic voltage is
// taken as the harmonic EMF behind the source impedance (the sending-bus voltage
// before the line is connected), so the receiving-end level is background × gain.
//
// References:
//   - IEC TR 61000-3-6:2008 (planning levels), see PlanningLevelPct.
func Screen(pos Network, posPts []Point, posPeaks []Peak, zero *Network, zeroPts []Point, zeroPeaks []Peak, set ScreenSettings) Screening {
	if !(set.Fundamental > 0) {
		panic("freqscan: Screen needs Fundamental > 0")
	}
	set = set.WithDefaults()
	sc := Screening{GainLimit: set.GainLimit, WatchBand: set.WatchBand, Watch: set.Watch}
	watched := map[int]bool{}
	for _, h := range sc.Watch {
		watched[h] = true
	}
	top := int(math.Floor(set.FMax/set.Fundamental + 1e-9))
	for h := 1; h <= top; h++ {
		f := float64(h) * set.Fundamental
		net, pts, peaks, seq := pos, posPts, posPeaks, Positive
		if Triplen(h) {
			if zero != nil {
				net, pts, peaks, seq = *zero, zeroPts, zeroPeaks, Zero
			} else {
				seq = PositiveOnly
			}
		}
		row := HarmonicRow{Order: h, F: f, Sequence: seq, Watched: watched[h]}
		kn := newKernel(net)
		row.Gain = kn.point(f).Gain
		if net.Lossless(f) && row.Gain > unboundedGain {
			row.Gain = math.Inf(1)
		}
		if row.Watched {
			lo, hi := f*(1-sc.WatchBand), f*(1+sc.WatchBand)
			row.BandGain = math.Max(row.Gain, bandMax(&kn, pts, lo, hi))
			for _, p := range peaks {
				if p.F >= lo && p.F <= hi {
					row.NearPeaks = append(row.NearPeaks, p)
					row.BandGain = math.Max(row.BandGain, p.Gain)
				}
			}
			if net.Lossless(f) && row.BandGain > unboundedGain {
				row.BandGain = math.Inf(1)
			}
			row.OverLimit = row.BandGain > sc.GainLimit
		}
		row.PlanPct = PlanningLevelPct(h)
		if v, ok := set.PlanningPct[h]; ok {
			row.PlanPct = v
		}
		if v, ok := set.BackgroundPct[h]; ok {
			row.HasBackground, row.Background = true, v
			row.Amplified = v * row.Gain
			if v == 0 {
				row.Amplified = 0
			}
			row.Exceeds = row.PlanPct > 0 && row.Amplified > row.PlanPct
		} else if row.PlanPct > 0 && row.Gain > 0 {
			row.AllowedBackground = row.PlanPct / row.Gain
		}
		sc.Rows = append(sc.Rows, row)
		if row.OverLimit || row.Exceeds {
			sc.Flags = append(sc.Flags, row)
		}
	}
	sort.Ints(sc.Watch)
	return sc
}

// bandSamples is the number of intervals of the band's own evenly spaced samples,
// taken besides the scan's grid points inside the band: ±10 % of f in 256 steps is
// f/1280 apart, so a resonance as sharp as Q ≈ 1000 (half-power width f/1000) still
// raises a sample above its neighbours whatever the scan grid.
const bandSamples = 256

// bandMax returns the largest gain of the network k over [lo, hi] (Hz): the gain at
// both edges, at the scan points pts inside the band, and at bandSamples + 1 evenly
// spaced samples of the band; every local maximum of these samples (the edges
// included) is refined by golden section between its neighbours, so the result is
// the maximum of the continuous response, not of a grid.
func bandMax(k *kernel, pts []Point, lo, hi float64) float64 {
	type sample struct{ f, g float64 }
	s := make([]sample, 0, bandSamples+1+len(pts))
	step := (hi - lo) / bandSamples
	for i := 0; i <= bandSamples; i++ {
		f := lo + float64(i)*step
		if i == bandSamples {
			f = hi
		}
		s = append(s, sample{f, k.point(f).Gain})
	}
	for _, p := range pts {
		if p.F > lo && p.F < hi {
			s = append(s, sample{p.F, p.Gain})
		}
	}
	sort.Slice(s, func(a, b int) bool { return s[a].f < s[b].f })
	gain := func(f float64) float64 { return k.point(f).Gain }
	best := 0.0
	for i, x := range s {
		if math.IsInf(x.g, 1) {
			return x.g
		}
		if (i > 0 && s[i-1].g > x.g) || (i+1 < len(s) && s[i+1].g > x.g) {
			continue
		}
		a, b := s[max(i-1, 0)].f, s[min(i+1, len(s)-1)].f
		g := x.g
		if b > a {
			_, g = refine(gain, a, b, x.f, x.g, true)
		}
		best = math.Max(best, g)
	}
	return best
}
