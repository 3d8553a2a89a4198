package waves

import (
	"fmt"
	"math"
	"sort"

	"gonum.org/v1/gonum/stat"
)

// Normal2Pct is the standard normal quantile exceeded with probability 2 %:
// Φ⁻¹(0.98) = 2.0537... (rounded to 2.054 as IEC 60071-2 and most texts write it).
const Normal2Pct = 2.054

// SwitchingStats are the statistical overvoltage figures of a set of shots, in per unit
// of the IEC 60071-1 base (peak phase-to-earth of the highest voltage for equipment,
// Us·√2/√3).
type SwitchingStats struct {
	Shots int
	// Phase-peak method (IEC 60071-2): every shot gives three values, the absolute
	// extreme of each phase.
	U2    float64 // empirical 2 % value: the 98th percentile, linear interpolation between order statistics
	Ut    float64 // truncation value 1.25·U2 − 0.25
	U2Fit float64 // 2 % value of a normal fit: Mean + 2.054·Sigma
	Max   float64 // largest absolute phase peak
	Mean  float64 // mean of the absolute phase peaks
	Sigma float64 // their sample standard deviation (n − 1)
	// Case-peak method: every shot gives one value, the largest of its three.
	CaseU2    float64
	CaseUt    float64 // 1.13·CaseU2 − 0.13
	CaseMean  float64
	CaseSigma float64
}

// Quantile returns the p-quantile (0 <= p <= 1) of the ascending sorted sample x by
// linear interpolation between order statistics:
//
//	h = (n − 1)·p,  Q = x[⌊h⌋] + (h − ⌊h⌋)·(x[⌊h⌋+1] − x[⌊h⌋])
//
// (Hyndman and Fan's definition 7, the default of numpy.percentile and R; gonum's
// stat.Quantile offers the empirical inverse and definition 4, not this one). It panics
// on an empty sample.
//
// References:
//
//   - R. J. Hyndman and Y. Fan, "Sample quantiles in statistical packages", The
//     American Statistician 50 (1996) 361-365.
func Quantile(x []float64, p float64) float64 {
	if len(x) == 0 {
		panic("waves: Quantile of an empty sample")
	}
	h := float64(len(x)-1) * p
	lo := int(math.Floor(h))
	if lo >= len(x)-1 {
		return x[len(x)-1]
	}
	lo = max(lo, 0)
	return x[lo] + (h-float64(lo))*(x[lo+1]-x[lo])
}

// TruncationPhasePeak returns the truncation value Ut = 1.25·U2 − 0.25 (pu) of the
// phase-peak method, from its 2 % value U2 (pu).
//
// References:
//
//   - IEC 60071-2:1996, §2.3.3.2 and Annex C (relation between Ue2 and Uet,
//     phase-peak method); from memory.
func TruncationPhasePeak(u2 float64) float64 { return 1.25*u2 - 0.25 }

// TruncationCasePeak returns the truncation value Ut = 1.13·U2 − 0.13 (pu) of the
// case-peak method.
//
// References:
//
//   - IEC 60071-2:1996, Annex C (case-peak method); from memory.
func TruncationCasePeak(u2 float64) float64 { return 1.13*u2 - 0.13 }

// Statistics returns the statistical figures of the shots' signed phase peaks (pu of
// the EMF base), converted to the IEC 60071-1 base by the factor toIEC
// (voltage / Us, <= 1 in practice).
//
// References:
//
//   - IEC 60071-2:1996, Insulation co-ordination - Part 2: Application guide, §2.3.3
//     and Annex C (phase-peak and case-peak methods, 2 % and truncation values).
//   - IEC 60071-1:2006, §3.26 (per-unit base Us·√2/√3).
func Statistics(peaks [][3]float64, toIEC float64) (SwitchingStats, error) {
	if len(peaks) == 0 {
		return SwitchingStats{}, fmt.Errorf("waves: statistics: no shots")
	}
	if !(toIEC > 0) || math.IsInf(toIEC, 0) {
		panic("waves: statistics: base factor must be > 0")
	}
	phase := make([]float64, 0, 3*len(peaks))
	cases := make([]float64, 0, len(peaks))
	for _, p := range peaks {
		c := 0.0
		for _, v := range p {
			a := math.Abs(v) * toIEC
			if math.IsNaN(a) || math.IsInf(a, 0) {
				return SwitchingStats{}, fmt.Errorf("waves: statistics: non-finite phase peak")
			}
			phase = append(phase, a)
			c = math.Max(c, a)
		}
		cases = append(cases, c)
	}
	sort.Float64s(phase)
	sort.Float64s(cases)
	var st SwitchingStats
	st.Shots = len(peaks)
	st.U2 = Quantile(phase, 0.98)
	st.Ut = TruncationPhasePeak(st.U2)
	st.Mean, st.Sigma = meanSigma(phase)
	st.U2Fit = st.Mean + Normal2Pct*st.Sigma
	st.Max = phase[len(phase)-1]
	st.CaseU2 = Quantile(cases, 0.98)
	st.CaseUt = TruncationCasePeak(st.CaseU2)
	st.CaseMean, st.CaseSigma = meanSigma(cases)
	return st, nil
}

// meanSigma returns the mean and the sample standard deviation (n − 1; 0 for n = 1),
// by gonum's stat.MeanStdDev.
func meanSigma(x []float64) (mean, sigma float64) {
	if len(x) < 2 {
		return stat.Mean(x, nil), 0
	}
	return stat.MeanStdDev(x, nil)
}

// MarginPct returns the margin of a switching impulse withstand level siwl (peak V)
// over the required withstand ks·kcd·u2 (u2 in peak V), in per cent:
//
//	margin = (siwl / (ks·kcd·u2) − 1)·100
//
// References:
//
//   - IEC 60071-2:1996, §3.3.2 (deterministic coordination factor Kcd), §4.3.4
//     (safety factor Ks: 1.15 internal, 1.05 external insulation).
func MarginPct(siwl, ks, kcd, u2 float64) float64 {
	return (siwl/(ks*kcd*u2) - 1) * 100
}

// KcdPhasePeak returns the deterministic coordination factor Kcd of IEC 60071-2 for
// the phase-peak method as a function of the ratio of the arresters' switching
// impulse protective level to the 2 % overvoltage, Ups/Ue2: 1.10 up to a ratio of
// 0.7, falling linearly to 1.00 at 1.2 and beyond. This is an approximate reading of
// the figure (straight-line fit), from memory: check it against the standard before
// relying on it.
//
// References:
//
//   - IEC 60071-2:1996, Figure 6 (evaluation of the deterministic coordination factor
//     Kcd), curve for the phase-peak method; from memory.
func KcdPhasePeak(upsOverU2 float64) float64 {
	switch {
	case upsOverU2 <= 0.7:
		return 1.10
	case upsOverU2 >= 1.2:
		return 1.00
	}
	return 1.10 - 0.10*(upsOverU2-0.7)/0.5
}

// SwitchingProtectiveLevel returns the arrester voltage (V) at the switching
// coordination current i (A), the switching impulse protective level Ups.
func SwitchingProtectiveLevel(vi []VIPoint, i float64) (float64, error) {
	c, err := newArresterCurve(vi)
	if err != nil {
		return 0, err
	}
	return c.voltageAt(i), nil
}
