package analysis

import (
	"math"
	"math/cmplx"
	"strings"

	"github.com/telegrapher/telegrapher/cmd/telegrapher/internal/study"
	"github.com/telegrapher/telegrapher/freqscan"
	"github.com/telegrapher/telegrapher/propagation"
)

// LoadingResult is the loading study of a line with both ends held at 1 pu, its
// open end and its loadability, in SI units.
type LoadingResult struct {
	SIL         float64 // W, surge-impedance loading at voltage_kv
	PMax        float64 // W, the largest power the line delivers with both ends at 1 pu
	DeltaAtPMax float64 // rad, the angle at PMax
	// ShuntsSend and ShuntsRecv are the reactive powers (var) the study's shunts at
	// each end absorb at 1 pu.
	ShuntsSend, ShuntsRecv float64
	Points                 []propagation.LoadingPoint // from 0 to min(2 SIL, PMax)
	Profiles               []LoadingProfile           // the voltage along the line at a few loadings

	OpenBare    propagation.OpenEndResult // the line alone, far end open
	OpenWith    propagation.OpenEndResult // with the line-connected shunts
	RiseFromEMF float64                   // |Vr/E| with the source and sending shunts
	Target      float64                   // pu, the open-end target of the reactor
	Reactor     float64                   // var, receiving reactor for Target on the bare line
	ReactorAdd  float64                   // var, beyond the study's receiving line-connected shunts

	Limits      propagation.LoadabilityLimits // the limits the loadability uses
	Loadability propagation.LoadabilityPoint  // of this line
	Curve       []propagation.LoadabilityPoint
}

// LoadingProfile is the voltage along the line at one loading.
type LoadingProfile struct {
	P float64   // W delivered
	X []float64 // m from the sending end
	V []float64 // pu of voltage_kv
}

// loadingErr names the study key (or flag) an error of the loading library is about.
func loadingErr(file, key string, err error) error {
	return &InputError{File: file, Key: key, Msg: strings.TrimPrefix(err.Error(), "propagation: ")}
}

// Loading computes the loading study of st: both ends at 1 pu from 0 to min(2 SIL,
// p_max), the open end with the receiving reactor for targetPU (> 0), and the
// loadability (Dunlop, Gutman & Marchenko). Errors are *InputErrors.
func Loading(st *study.Study, targetPU float64) (*LoadingResult, error) {
	r := &LoadingResult{Target: targetPU}
	if len(st.Line) == 0 {
		return nil, inputf(st.File, "line", "no line sections")
	}
	omega := 2 * math.Pi * st.Frequency
	v := st.Voltage
	s := complex(0, omega)
	sil := propagation.SurgeImpedanceLoading(st.Line, v, omega)
	if !(sil > 0) {
		return nil, inputf(st.File, "line", "the surge-impedance loading needs inductance and capacitance > 0")
	}
	pmax, dmax, err := propagation.MaxTransfer(st.Line, omega, v)
	if err != nil {
		return nil, loadingErr(st.File, "line", err)
	}
	r.SIL, r.PMax, r.DeltaAtPMax = sil, pmax, dmax

	// Reactive power absorbed by the study's shunts at each end at 1 pu.
	var ySendLine, yRecvLine complex128
	for _, sh := range st.Network.Shunts {
		y := sh.Admittance(s)
		q := -v * v * imag(y)
		if sh.End == freqscan.Sending {
			r.ShuntsSend += q
			if sh.OnLine {
				ySendLine += y
			}
		} else {
			r.ShuntsRecv += q
			if sh.OnLine {
				yRecvLine += y
			}
		}
	}
	if r.Points, err = propagation.BothEndsHeld(st.Line, omega, v, propagation.LoadingPowers(sil, pmax)); err != nil {
		return nil, loadingErr(st.File, "line", err)
	}

	// Profiles at a few loadings.
	end := math.Min(2*sil, pmax)
	var prof []float64
	for _, k := range []float64{0, 0.5, 1, 1.5, 2} {
		if k*sil <= end*(1+1e-12) {
			prof = append(prof, math.Min(k*sil, end))
		}
	}
	if end < 2*sil && end > prof[len(prof)-1]*(1+1e-6) {
		prof = append(prof, end)
	}
	ppts, err := propagation.BothEndsHeld(st.Line, omega, v, prof)
	if err != nil {
		return nil, loadingErr(st.File, "line", err)
	}
	const nx = 201
	xs := make([]float64, nx)
	for i := range xs {
		xs[i] = st.Line.Length() * float64(i) / (nx - 1)
	}
	var buf []complex128
	for _, pt := range ppts {
		buf = propagation.VoltageAlong(buf, st.Line, omega, pt.Vr, pt.Ir, xs)
		lp := LoadingProfile{P: pt.P, X: append([]float64(nil), xs...), V: make([]float64, nx)}
		for i := range xs {
			lp.V[i] = cmplx.Abs(buf[i]) / v
		}
		r.Profiles = append(r.Profiles, lp)
	}

	// Open receiving end.
	if r.OpenBare, err = propagation.OpenEnd(st.Line, omega, v, 0, 0); err != nil {
		return nil, loadingErr(st.File, "line", err)
	}
	if r.OpenWith, err = propagation.OpenEnd(st.Line, omega, v, ySendLine, yRecvLine); err != nil {
		return nil, loadingErr(st.File, "shunt", err)
	}
	r.RiseFromEMF = cmplx.Abs(st.Network.Energising().At(s).VrE)
	if r.Reactor, err = propagation.ReactorForRise(st.Line, omega, v, 0, targetPU); err != nil {
		return nil, loadingErr(st.File, "--target-pu", err)
	}
	if r.ReactorAdd, err = propagation.ReactorForRise(st.Line, omega, v, yRecvLine, targetPU); err != nil {
		return nil, loadingErr(st.File, "--target-pu", err)
	}

	// Loadability.
	lim := propagation.DefaultLoadabilityLimits(v)
	if !st.Source.Ideal {
		lim.Zs = complex(st.Source.R, omega*st.Source.L)
	}
	if sc := st.Receiving.ShortCircuitVA; sc > 0 {
		lim.Zr = propagation.TerminalImpedance(v, sc, st.Receiving.XOverR)
	}
	if a := st.Loading.ThermalRating; a > 0 {
		lim.Thermal = math.Sqrt(3) * v * a
	}
	r.Limits = lim
	if r.Loadability, err = propagation.Loadability(st.Line, omega, v, lim); err != nil {
		return nil, loadingErr(st.File, "line", err)
	}
	maxLen := math.Max(800e3, 1.25*st.Line.Length())
	const nl = 80
	lengths := make([]float64, nl)
	for i := range lengths {
		lengths[i] = maxLen * float64(i+1) / nl
	}
	if r.Curve, err = propagation.LoadabilityCurve(st.Line, omega, v, lim, lengths); err != nil {
		return nil, loadingErr(st.File, "line", err)
	}
	return r, nil
}

// OpenEndRise returns the no-load rise |Vr/Vs| at the system frequency with the
// line-connected shunts in place, as Loading's OpenWith (the remedy search's measure).
func OpenEndRise(st *study.Study) (float64, error) {
	s := complex(0, 2*math.Pi*st.Frequency)
	var ys, yr complex128
	for _, sh := range st.Network.Shunts {
		if !sh.OnLine {
			continue
		}
		if sh.End == freqscan.Sending {
			ys += sh.Admittance(s)
		} else {
			yr += sh.Admittance(s)
		}
	}
	r, err := propagation.OpenEnd(st.Line, 2*math.Pi*st.Frequency, st.Voltage, ys, yr)
	if err != nil {
		return 0, loadingErr(st.File, "line", err)
	}
	return r.Rise, nil
}
