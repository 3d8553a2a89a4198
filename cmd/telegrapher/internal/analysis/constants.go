package analysis

import (
	"errors"
	"math"
	"math/cmplx"

	"github.com/telegrapher/telegrapher/cmd/telegrapher/internal/study"
	"github.com/telegrapher/telegrapher/propagation"
)

// MaxPiSections is the largest cascade of nominal-pi sections tried for the 1 % count.
const MaxPiSections = 1000

// piTarget is the relative error the nominal-pi cascade must stay under (1 %).
const piTarget = 0.01

// ModelError is the relative error of each element of a lumped model against the
// exact two-port, in percent, and the largest of them.
type ModelError struct{ A, B, C, D, Max float64 }

// SectionConstants are the constants of one section of the line at the evaluated
// frequency.
type SectionConstants struct {
	Line       propagation.Line
	Gamma      complex128 // 1/m
	Zc         complex128 // ohm
	ZcLossless float64    // ohm, sqrt(L/C) at the system frequency
	// Inductance and Capacitance are the section's totals (H, F) at the system
	// frequency.
	Inductance, Capacitance float64
}

// ConstantsResult are the line constants of a study at one frequency.
type ConstantsResult struct {
	Frequency float64 // Hz, where γ, Zc and the ABCD are evaluated
	Length    float64 // m
	Sections  []SectionConstants
	GammaL    complex128 // the total γl of the line
	Gamma     complex128 // 1/m, GammaL over the length
	Zc        complex128 // ohm: the section's, or sqrt(B/C) of the cascade
	// ZcLossless is sqrt(ΣLl/ΣCl) at the system frequency (ohm) and SIL the
	// surge-impedance loading voltage_kv²/ZcLossless (W); 0 without L or C.
	ZcLossless, SIL float64
	NoLoadRise      float64 // |Vr/Vs| of the line alone, far end open, at the system frequency
	// The exact two-port and the nominal pi, nominal T and short models of the line.
	Exact, Pi, Tee, Short propagation.TwoPort
	Errors                map[string]ModelError // "nominal_pi", "nominal_t", "short" against Exact
	PiSectionsFor1Pct     int                   // 0: more than MaxPiSections
}

// Constants evaluates the line of st at atHz (Hz; 0 = frequency_hz) on the jω axis. A
// sectioned line gives the cascade's ABCD; its γ is the length-weighted mean of the
// sections' (total γl over total length), its Zc = sqrt(B/C) of the cascade, its
// lossless Zc = sqrt(ΣLl/ΣCl).
func Constants(st *study.Study, atHz float64) (*ConstantsResult, error) {
	if len(st.Line) == 0 {
		return nil, errors.New("internal error: the study has no line")
	}
	f := st.Frequency
	if atHz > 0 {
		f = atHz
	}
	w, w0 := 2*math.Pi*f, 2*math.Pi*st.Frequency
	s, s0 := complex(0, w), complex(0, w0)
	r := &ConstantsResult{Frequency: f, Length: st.Line.Length()}
	var lTot, cTot float64
	for _, l := range st.Line {
		g, zc := l.GammaZc(s)
		z0, y0 := l.At(s0)
		zl, _ := l.Lossless(w0)
		sec := SectionConstants{Line: l, Gamma: g, Zc: zc, ZcLossless: zl,
			Inductance: imag(z0) / w0 * l.Length, Capacitance: imag(y0) / w0 * l.Length}
		r.GammaL += g * complex(l.Length, 0)
		lTot += sec.Inductance
		cTot += sec.Capacitance
		r.Sections = append(r.Sections, sec)
	}
	r.Gamma = r.GammaL / complex(r.Length, 0)
	if lTot > 0 && cTot > 0 {
		r.ZcLossless = math.Sqrt(lTot / cTot)
		r.SIL = st.Voltage * st.Voltage / r.ZcLossless
	}
	r.Exact = st.Line.Exact(s)
	if len(st.Line) == 1 {
		r.Zc = r.Sections[0].Zc
	} else {
		r.Zc = CascadeZc(r.Exact)
	}
	r.NoLoadRise = cmplx.Abs(st.Line.Exact(s0).VoltageRatio(0))
	r.Pi, r.Tee, r.Short = Lumped(st.Line, s, 1)
	r.Errors = map[string]ModelError{
		"nominal_pi": ModelErrorOf(r.Pi, r.Exact),
		"nominal_t":  ModelErrorOf(r.Tee, r.Exact),
		"short":      ModelErrorOf(r.Short, r.Exact),
	}
	r.PiSectionsFor1Pct = piSectionsNeeded(st.Line, s, r.Exact)
	return r, nil
}

// CascadeZc returns sqrt(B/C) of a two-port (the geometric mean of its image
// impedances), independent of the two-port's scale.
func CascadeZc(p propagation.TwoPort) complex128 {
	if p.C == 0 {
		return 0
	}
	return propagation.PrincipalSqrt(p.B / p.C)
}

// Lumped returns the nominal pi, nominal T and short models of the line cut into n
// pieces of equal length, each piece lumped from its own totals Z = Σ z·l and
// Y = Σ y·l over the sections it spans. With n = 1 they are the models of the whole
// line (total series impedance and total shunt admittance); the answer does not depend
// on how a uniform line is split into sections in the study file.
func Lumped(c propagation.Cascade, s complex128, n int) (pi, tee, short propagation.TwoPort) {
	pi, tee, short = propagation.Identity(), propagation.Identity(), propagation.Identity()
	total := c.Length()
	zs := make([]complex128, len(c))
	ys := make([]complex128, len(c))
	for i, l := range c {
		zs[i], ys[i] = l.At(s)
	}
	starts := make([]float64, len(c)+1) // starts[j] is where section j begins
	for j, l := range c {
		starts[j+1] = starts[j] + l.Length
	}
	first := 0 // the first section that ends after the current piece begins
	for k := 0; k < n; k++ {
		a, b := total*float64(k)/float64(n), total*float64(k+1)/float64(n)
		for first < len(c)-1 && starts[first+1] <= a {
			first++
		}
		var Z, Y complex128
		for j := first; j < len(c) && starts[j] < b; j++ {
			if w := math.Min(b, starts[j+1]) - math.Max(a, starts[j]); w > 0 {
				Z += zs[j] * complex(w, 0)
				Y += ys[j] * complex(w, 0)
			}
		}
		pi = pi.Then(lumpedPi(Z, Y))
		tee = tee.Then(lumpedT(Z, Y))
		short = short.Then(propagation.Series(Z))
	}
	return pi, tee, short
}

// lumpedPi is the nominal pi of the totals Z (ohm) and Y (S):
//
//	A = D = 1 + ZY/2,  B = Z,  C = Y(1 + ZY/4)
func lumpedPi(Z, Y complex128) propagation.TwoPort {
	a := 1 + Z*Y/2
	return propagation.TwoPort{A: a, B: Z, C: Y * (1 + Z*Y/4), D: a}
}

// lumpedT is the nominal T of the totals Z and Y:
//
//	A = D = 1 + ZY/2,  B = Z(1 + ZY/4),  C = Y
func lumpedT(Z, Y complex128) propagation.TwoPort {
	a := 1 + Z*Y/2
	return propagation.TwoPort{A: a, B: Z * (1 + Z*Y/4), C: Y, D: a}
}

// ModelErrorOf returns the relative error of each element of m against e in percent,
// comparing scaled elements (a model and the exact two-port of the same line may carry
// different scales).
func ModelErrorOf(m, e propagation.TwoPort) ModelError {
	k := math.Exp(m.LogScale - e.LogScale)
	rel := func(x, y complex128) float64 {
		if y == 0 {
			if x == 0 {
				return 0
			}
			return math.Inf(1)
		}
		v := cmplx.Abs(x*complex(k, 0)-y) / cmplx.Abs(y) * 100
		if math.IsNaN(v) {
			return math.Inf(1)
		}
		return v
	}
	me := ModelError{A: rel(m.A, e.A), B: rel(m.B, e.B), C: rel(m.C, e.C), D: rel(m.D, e.D)}
	me.Max = math.Max(math.Max(me.A, me.B), math.Max(me.C, me.D))
	return me
}

// piSectionsNeeded returns the fewest nominal-pi sections of equal length over the
// whole line whose cascade is within piTarget of the exact two-port in every element, or 0 when more
// than MaxPiSections are needed. The error falls about as 1/n², so it bisects.
func piSectionsNeeded(c propagation.Cascade, s complex128, exact propagation.TwoPort) int {
	ok := func(n int) bool {
		pi, _, _ := Lumped(c, s, n)
		return ModelErrorOf(pi, exact).Max < piTarget*100
	}
	if ok(1) {
		return 1
	}
	if !ok(MaxPiSections) {
		return 0
	}
	lo, hi := 1, MaxPiSections // ok(lo) false, ok(hi) true
	for hi-lo > 1 {
		mid := (lo + hi) / 2
		if ok(mid) {
			hi = mid
		} else {
			lo = mid
		}
	}
	return hi
}
