package analysis

import (
	"context"
	"math"
	"math/cmplx"

	"github.com/telegrapher/telegrapher/cmd/telegrapher/internal/study"
	"github.com/telegrapher/telegrapher/freqscan"
	"github.com/telegrapher/telegrapher/waves"
)

// OpenEndRiseScreenPU is the no-load receiving-end voltage (over the sending end)
// above which a line is flagged: 5 % is the usual allowance for the open-end rise of
// an uncompensated line (common practice, no source).
const OpenEndRiseScreenPU = 1.05

// EnergisePeakScreenPU is the screening level of the open-end energisation peak:
// about 2 pu is the usual ceiling aimed at for EHV line energisation (common
// practice, no source).
const EnergisePeakScreenPU = 2.0

// LineScreening is the screening of one line of an inventory.
type LineScreening struct {
	SIL         float64 // W, the mean of the sections' surge-impedance loadings
	OpenEndRise float64 // |Vr/Vs| with the line-connected reactors, at the system frequency
	// First is the lowest gain peak that magnifies (gain > 1), when HasFirst.
	First    freqscan.Peak
	HasFirst bool
	// Worst is the watched harmonic with the largest band gain, when HasWorst.
	Worst     freqscan.HarmonicRow
	HasWorst  bool
	Screening freqscan.Screening // every harmonic, and the gain limit
	// EnergisePeak is the signed receiving-end energisation peak (pu) at EnergiseT
	// (s), by the study's method; FrontOvershoot the method's accuracy at wavefronts.
	EnergisePeak, EnergiseT, FrontOvershoot float64
	// EnergiseOver is set when the peak less FrontOvershoot exceeds
	// EnergisePeakScreenPU.
	EnergiseOver bool
	// Severity is the largest ratio of a figure to its screening level (open-end
	// rise, energisation peak less FrontOvershoot, watched band gains to the gain
	// limit): above 1 a line is flagged; lines are ranked by it.
	Severity float64
}

// ScreenLine screens a line: its SIL, open-end rise, the harmonic scan (Scan) and
// energisation (Energise) of its study, and its severity.
func ScreenLine(ctx context.Context, st *study.Study) (*LineScreening, error) {
	r := &LineScreening{}
	w := 2 * math.Pi * st.Frequency
	for _, l := range st.Line {
		r.SIL += l.SIL(st.Voltage, w) / float64(len(st.Line))
	}
	// Open-end rise with the line-connected reactors in place (they are switched with
	// the line): Vr/Vs = 1/(A + B·Yr).
	s := complex(0, w)
	_, _, yr, _ := st.Network.Energising().Admittances(s)
	r.OpenEndRise = cmplx.Abs(st.Line.Exact(s).VoltageRatio(yr))

	sc, err := Scan(ctx, st)
	if err != nil {
		return nil, err
	}
	r.Screening = sc.Screen
	r.First, r.HasFirst = freqscan.FirstResonance(sc.Positive.Peaks)
	for _, h := range sc.Screen.Rows {
		if h.Watched && (!r.HasWorst || h.BandGain > r.Worst.BandGain) {
			r.Worst, r.HasWorst = h, true
		}
	}
	en, err := Energise(st, "")
	if err != nil {
		return nil, err
	}
	var k int
	r.EnergisePeak, k = waves.Peak(en.Wave.Receiving)
	r.EnergiseT, r.FrontOvershoot = en.Wave.Time(k), en.Wave.Overshoot
	r.EnergiseOver = math.Abs(r.EnergisePeak)-r.FrontOvershoot > EnergisePeakScreenPU

	ratio := func(v, limit float64) float64 {
		if math.IsInf(v, 1) {
			return math.MaxFloat64
		}
		return v / limit
	}
	r.Severity = math.Max(ratio(r.OpenEndRise, OpenEndRiseScreenPU), ratio(math.Abs(r.EnergisePeak)-r.FrontOvershoot, EnergisePeakScreenPU))
	for _, h := range sc.Screen.Rows {
		if h.Watched && sc.Screen.GainLimit > 0 {
			r.Severity = math.Max(r.Severity, ratio(h.BandGain, sc.Screen.GainLimit))
		}
	}
	return r, nil
}
