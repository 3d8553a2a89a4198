package propagation

import (
	"errors"
	"fmt"
	"math"
	"math/cmplx"
)

// LoadabilityLimits are the criteria and terminal systems of the loadability
// analysis. The zero value is not usable; start from DefaultLoadabilityLimits.
type LoadabilityLimits struct {
	// VoltageDrop is the largest allowed drop from the sending to the receiving end,
	// as a fraction: 0.05 means Vr >= 0.95·Vs.
	VoltageDrop float64
	// StabilityMargin is the steady-state stability margin, (Pmax - P)/Pmax, as a
	// fraction: 0.30 corresponds to an angle of about 44° across the whole system.
	StabilityMargin float64
	// Zs and Zr are the Thevenin impedances (ohm, at the system frequency) of the
	// sending- and receiving-end systems, without the line.
	Zs, Zr complex128
	// Thermal is the thermal limit (W): the line's current rating at its nominal
	// voltage, sqrt(3)·V·I, taken as active power at unity power factor; 0 = none.
	Thermal float64
}

// TerminalImpedance returns the Thevenin impedance (ohm) of a system with the
// three-phase short-circuit level sc (VA) at the line-to-line rms voltage v (V), with
// the ratio xOverR (0 or +Inf: purely reactive):
//
//	|Z| = v²/sc,  Z = |Z|·(1 + j·X/R)/sqrt(1 + (X/R)²)
func TerminalImpedance(v, sc, xOverR float64) complex128 {
	if !(v > 0) || !(sc > 0) {
		panic("propagation: TerminalImpedance needs v > 0 and sc > 0")
	}
	zm := v * v / sc
	if xOverR <= 0 || math.IsInf(xOverR, 1) {
		return complex(0, zm)
	}
	r := zm / math.Hypot(1, xOverR)
	return complex(r, r*xOverR)
}

// DefaultTerminalCurrent is the three-phase short-circuit current (A) of the terminal
// systems assumed by Dunlop, Gutman and Marchenko (1979) when none is given: 50 kA.
const DefaultTerminalCurrent = 50e3

// DefaultLoadabilityLimits returns the criteria of Dunlop, Gutman and Marchenko
// (1979) at the line-to-line rms voltage v (V): a 5 % voltage drop, a 30 % stability
// margin, and purely reactive 50 kA terminal systems at both ends.
func DefaultLoadabilityLimits(v float64) LoadabilityLimits {
	z := TerminalImpedance(v, math.Sqrt(3)*v*DefaultTerminalCurrent, 0)
	return LoadabilityLimits{VoltageDrop: 0.05, StabilityMargin: 0.30, Zs: z, Zr: z}
}

// LoadabilityPoint is the loadability of a line of one length.
type LoadabilityPoint struct {
	Length      float64 // m
	SIL         float64 // W
	VoltageDrop float64 // power (W) at which the receiving end falls to (1 - drop)·Vs at unity power factor
	Stability   float64 // power (W) at which the stability margin falls to the limit
	Thermal     float64 // thermal limit (W) from LoadabilityLimits.Thermal; 0 = none
	Loadability float64 // the smallest of the limits, W
	LineAngle   float64 // angle across the line at the stability limit, rad
	SystemAngle float64 // angle between the terminal EMFs at the stability limit, rad
	Governs     string  // "voltage drop", "stability" or "thermal"
}

// Loadability returns the loadability of the cascade c at the line-to-line rms
// voltage v (V) and angular frequency omega (rad/s) under the limits lim, by the
// analytical method of Dunlop, Gutman and Marchenko (1979), which reproduces the
// empirical curve of St. Clair (1953). The system is
//
//	Es --Zs-- Vs ==== line ==== Vr --Zr-- Er
//
// with the exact two-port of the line (losses included). Two limits are computed,
// and a third when lim.Thermal is set (the conductor rating, independent of length,
// which governs short lines in the paper); the smallest is the loadability:
//
//   - voltage drop: Vs = v, the line delivering active power only (unity power
//     factor, no reactive support at the receiving end), and |Vr| = (1 - drop)·v.
//     With Ir = P/|Vr| this is |A·Vr + B·P/Vr| = v, a quadratic in P.
//   - stability: the line ends held at Vs = v and |Vr| = (1 - drop)·v (the voltage
//     drop at its limit, the terminal systems supplying the reactive power), the
//     EMFs Es = Vs + Zs·Is and Er = Vr - Zr·Ir, and the power raised until
//     (Pmax - P)/Pmax equals the margin, Pmax being the largest power the whole
//     system Series(Zs)·line·Series(Zr) can pass with |Es| and |Er| fixed (see
//     MaxTransfer). For a lossless system a 30 % margin is an angle of
//     asin(0.7) = 44.4° between Es and Er, of which the line takes 35° to 44°.
//
// Assumptions as stated by the paper: 5 % voltage drop, 30 % margin, 50 kA terminal
// systems (DefaultLoadabilityLimits); here the terminal systems and the line's own
// losses may differ from the paper's.
//
// References:
//   - R. D. Dunlop, R. Gutman, P. P. Marchenko, "Analytical development of
//     loadability characteristics for EHV and UHV transmission lines", IEEE Trans.
//     Power Apparatus and Systems, PAS-98(2), 606-617 (1979).
//   - H. P. St. Clair, "Practical concepts in capability and performance of
//     transmission lines", AIEE Trans. 72, part III, 1152-1157 (1953).
//   - P. Kundur, Power System Stability and Control, McGraw-Hill (1994), §6.1.12.
func Loadability(c Cascade, omega, v float64, lim LoadabilityLimits) (LoadabilityPoint, error) {
	if !(v > 0) {
		return LoadabilityPoint{}, fmt.Errorf("propagation: voltage must be > 0, got %g", v)
	}
	if !(lim.VoltageDrop > 0 && lim.VoltageDrop < 1) {
		return LoadabilityPoint{}, fmt.Errorf("propagation: voltage drop limit must be in (0, 1), got %g", lim.VoltageDrop)
	}
	if !(lim.StabilityMargin > 0 && lim.StabilityMargin < 1) {
		return LoadabilityPoint{}, fmt.Errorf("propagation: stability margin must be in (0, 1), got %g", lim.StabilityMargin)
	}
	a, b, cc, d, err := lineElements(c, omega)
	if err != nil {
		return LoadabilityPoint{}, err
	}
	pt := LoadabilityPoint{Length: c.Length(), SIL: SurgeImpedanceLoading(c, v, omega)}
	vrm := (1 - lim.VoltageDrop) * v

	// Voltage drop: |B|²/Vr²·P² + 2·Re(A·conj B)·P + |A|²·Vr² - v² = 0.
	qa := real(b*cmplx.Conj(b)) / (vrm * vrm)
	qb := 2 * real(a*cmplx.Conj(b))
	qc := real(a*cmplx.Conj(a))*vrm*vrm - v*v
	disc := qb*qb - 4*qa*qc
	if disc >= 0 {
		pt.VoltageDrop = (-qb + math.Sqrt(disc)) / (2 * qa)
	}
	if !(pt.VoltageDrop > 0) {
		pt.VoltageDrop = 0
	}

	// Stability: whole-system two-port.
	sys := Series(lim.Zs).Then(TwoPort{A: a, B: b, C: cc, D: d}).Then(Series(lim.Zr))
	at, bt, _, _, ok := sys.Elements()
	if !ok {
		return LoadabilityPoint{}, errors.New("propagation: the system two-port is not finite")
	}
	state := func(delta float64) (p, margin, sysAngle float64) {
		vs := cmplx.Rect(v, delta)
		vr := complex(vrm, 0)
		ir := (vs - a*vr) / b
		is := cc*vr + d*ir
		es := vs + lim.Zs*is
		er := vr - lim.Zr*ir
		p = real(vr * cmplx.Conj(ir))
		// Power into the receiving system at Er, and its largest value with |Es|, |Er| fixed.
		per := real(er * cmplx.Conj(ir))
		bt2, at2 := cmplx.Phase(bt), cmplx.Phase(at)
		pmax := cmplx.Abs(es)*cmplx.Abs(er)/cmplx.Abs(bt) - cmplx.Abs(at)*cmplx.Abs(er)*cmplx.Abs(er)*math.Cos(bt2-at2)/cmplx.Abs(bt)
		if !(pmax > 0) {
			return p, 0, cmplx.Phase(es / er)
		}
		return p, 1 - per/pmax, cmplx.Phase(es / er)
	}
	// Scan the line angle up from 0 (where P <= 0 and the margin is >= 1) to the
	// first crossing of the margin limit, then bisect.
	_, lineMax := maxTransfer(a, b, v)
	hi := math.Min(lineMax, math.Pi)
	const steps = 720
	lo, found := 0.0, false
	for i := 1; i <= steps; i++ {
		x := hi * float64(i) / steps
		if _, m, _ := state(x); m <= lim.StabilityMargin {
			hi, found = x, true
			break
		}
		lo = x
	}
	if found {
		for i := 0; i < 100 && hi-lo > 1e-13; i++ {
			mid := (lo + hi) / 2
			if _, m, _ := state(mid); m <= lim.StabilityMargin {
				hi = mid
			} else {
				lo = mid
			}
		}
	}
	// Without a crossing the line's own limit at these terminal voltages governs.
	p, _, sa := state(hi)
	pt.Stability, pt.LineAngle, pt.SystemAngle = math.Max(p, 0), hi, sa

	pt.Loadability, pt.Governs = pt.VoltageDrop, "voltage drop"
	if pt.Stability < pt.VoltageDrop {
		pt.Loadability, pt.Governs = pt.Stability, "stability"
	}
	if lim.Thermal > 0 {
		pt.Thermal = lim.Thermal
		if lim.Thermal < pt.Loadability {
			pt.Loadability, pt.Governs = lim.Thermal, "thermal"
		}
	}
	return pt, nil
}

// Scaled returns the cascade with every section's length multiplied by k (> 0),
// keeping the sections' proportions and constants: a line of the same make and a
// different length.
func (c Cascade) Scaled(k float64) Cascade {
	if !(k > 0) {
		panic("propagation: Scaled needs k > 0")
	}
	out := make(Cascade, len(c))
	for i, l := range c {
		l.Length *= k
		out[i] = l
	}
	return out
}

// LoadabilityCurve returns the loadability (see Loadability) of lines of the same
// make as c (its sections scaled in proportion) at each total length of lengths (m,
// > 0).
func LoadabilityCurve(c Cascade, omega, v float64, lim LoadabilityLimits, lengths []float64) ([]LoadabilityPoint, error) {
	total := c.Length()
	if !(total > 0) {
		return nil, errors.New("propagation: the line has no length")
	}
	out := make([]LoadabilityPoint, len(lengths))
	for i, l := range lengths {
		if !(l > 0) {
			return nil, fmt.Errorf("propagation: length must be > 0, got %g", l)
		}
		pt, err := Loadability(c.Scaled(l/total), omega, v, lim)
		if err != nil {
			return nil, err
		}
		out[i] = pt
	}
	return out, nil
}
