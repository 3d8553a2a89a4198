package freqscan

import (
	"math"

	"github.com/telegrapher/telegrapher/propagation"
)

// Source is the network behind the sending bus: an EMF behind a series resistance R
// (ohm, constant with frequency) and inductance L (H). R = L = 0 is an ideal source.
type Source struct {
	R, L float64
}

// Impedance returns R + sL in ohm.
func (src Source) Impedance(s complex128) complex128 {
	return complex(src.R, 0) + s*complex(src.L, 0)
}

// Ideal reports whether the source has no impedance.
func (src Source) Ideal() bool { return src.R == 0 && src.L == 0 }

// End names a line end.
type End int

// The two ends of the line.
const (
	Sending End = iota
	Receiving
)

func (e End) String() string {
	if e == Sending {
		return "sending"
	}
	return "receiving"
}

// Shunt is a shunt element at a line end: a reactor (L > 0) or a capacitor (C > 0),
// with an optional resistance R in series (ohm, constant). Line-connected shunts are
// switched with the line; bus-connected ones stay with the bus.
type Shunt struct {
	Name    string
	End     End
	OnLine  bool    // true: line-connected; false: bus-connected
	R, L, C float64 // ohm, H, F; exactly one of L and C is > 0
}

// Impedance returns the shunt's impedance R + sL or R + 1/(sC) in ohm.
func (sh Shunt) Impedance(s complex128) complex128 {
	if sh.L > 0 {
		return complex(sh.R, 0) + s*complex(sh.L, 0)
	}
	return complex(sh.R, 0) + 1/(s*complex(sh.C, 0))
}

// Admittance returns 1/Impedance in siemens.
func (sh Shunt) Admittance(s complex128) complex128 {
	if sh.L > 0 {
		return 1 / (complex(sh.R, 0) + s*complex(sh.L, 0))
	}
	// sC / (1 + sRC) avoids 1/(sC) at small s.
	sc := s * complex(sh.C, 0)
	return sc / (1 + sc*complex(sh.R, 0))
}

// Load is a constant-impedance load at the receiving bus: a resistance R in parallel
// with an inductance L or a capacitance C. A zero field is an absent branch; the zero
// Load is no load.
type Load struct {
	R, L, C float64 // ohm, H, F
}

// Admittance returns the load admittance in siemens.
func (ld Load) Admittance(s complex128) complex128 {
	var y complex128
	if ld.R > 0 {
		y += complex(1/ld.R, 0)
	}
	if ld.L > 0 {
		y += 1 / (s * complex(ld.L, 0))
	}
	if ld.C > 0 {
		y += s * complex(ld.C, 0)
	}
	return y
}

// Network is the circuit around the line, for one sequence. With FarEndOpen the
// receiving bus-connected shunts, the load and the far system are disconnected (the
// line energised from the sending end, far end open); line-connected shunts stay.
type Network struct {
	Source Source
	Line   propagation.Cascade
	Shunts []Shunt
	Load   Load
	// Far is the system beyond the receiving bus, as the harmonic transfer from the
	// source sees it: its EMF shorted, a passive R + sL from the receiving bus to
	// earth. The zero value is no far system.
	Far Source
	// ReactorNeutral is the inductance (H) between earth and the star point of the
	// line-connected reactors of each end (indexed by End), as this sequence sees it:
	// 3·Ln for a neutral reactor Ln in the zero sequence, 0 in the positive sequence
	// (and for a solidly earthed star). It is in series with the parallel combination
	// of that end's line-connected reactors, which share the star point; it does
	// nothing at an end without one.
	ReactorNeutral [2]float64
	FarEndOpen     bool
}

// Energising returns a copy of n with the far end open, as for energisation.
func (n Network) Energising() Network {
	n.FarEndOpen = true
	return n
}

// Response is the network's response at one complex frequency. Voltage ratios are
// complex; impedances in ohm.
type Response struct {
	VrE        complex128 // Vr/E: receiving-end voltage over source EMF
	VrVs       complex128 // Vr/Vs: receiving over sending-end voltage
	VsE        complex128 // Vs/E
	ZIn        complex128 // into the line from the sending bus, with line-connected shunts and termination
	ZSending   complex128 // driving-point impedance at the sending bus, whole network in place
	ZReceiving complex128 // driving-point impedance at the receiving bus, whole network in place
}

// Admittances returns the total shunt admittance (S) at each end at s, split into
// line-connected and bus-connected, with the load and the far system included in the
// receiving bus part unless the far end is open (then the receiving bus part is zero).
// The line-connected reactors of an end with a ReactorNeutral are combined in
// parallel and put in series with s·ReactorNeutral:
//
//	Y = Yreactors / (1 + s·Ln·Yreactors)
func (n Network) Admittances(s complex128) (sendLine, sendBus, recvLine, recvBus complex128) {
	var reactors [2]complex128
	for _, sh := range n.Shunts {
		y := sh.Admittance(s)
		switch {
		case sh.OnLine && sh.L > 0 && n.ReactorNeutral[sh.End] > 0:
			reactors[sh.End] += y
		case sh.End == Sending && sh.OnLine:
			sendLine += y
		case sh.End == Sending:
			sendBus += y
		case sh.OnLine:
			recvLine += y
		case !n.FarEndOpen:
			recvBus += y
		}
	}
	sendLine += withNeutral(reactors[Sending], s*complex(n.ReactorNeutral[Sending], 0))
	recvLine += withNeutral(reactors[Receiving], s*complex(n.ReactorNeutral[Receiving], 0))
	if !n.FarEndOpen {
		recvBus += n.Load.Admittance(s)
		if !n.Far.Ideal() {
			recvBus += 1 / n.Far.Impedance(s)
		}
	}
	return
}

// withNeutral is the admittance y of a reactor bank with the impedance zn in series
// with its star point: y/(1 + zn·y).
func withNeutral(y, zn complex128) complex128 {
	if y == 0 {
		return 0
	}
	return y / (1 + zn*y)
}

// At evaluates the network at the complex frequency s (rad/s), s != 0.
//
// With the line's exact two-port (A, B, C, D), the receiving-end termination
// admittance Yr and the sending line-connected shunts Ysl:
//
//	N = A + B·Yr,  M = (C + D·Yr) + Ysl·N
//	Vr/Vs = 1/N,  Zin = N/M,  Vs/E = N / (N + Zsrc·(M + Ysb·N))
//
// which stays finite for an ideal source and for a lossless line at resonance except
// where the true value is unbounded. The driving-point impedance at the receiving
// bus uses the line's output admittance with the sending side terminated.
func (n Network) At(s complex128) Response {
	p := n.Line.Exact(s)
	return n.respond(s, p)
}

func (n Network) respond(s complex128, p propagation.TwoPort) Response {
	k := 1.0
	if p.LogScale != 0 {
		k = math.Exp(-p.LogScale)
	}
	return n.respondScaled(s, p.A, p.B, p.C, p.D, k)
}

// respondScaled forms the response from the line's ABCD elements scaled by 1/k (the true
// elements are a/k, b/k, ...; k > 0 may underflow to 0 on an electrically long lossy
// line, where Vr/Vs and Vr/E are then 0). Every ratio is formed so that a zero
// denominator gives an infinite value, never NaN; Vr/E is formed directly rather than
// as (Vs/E)(Vr/Vs), which keeps it finite at a sending-bus series resonance with an
// ideal source.
func (n Network) respondScaled(s, a, b, c, d complex128, k float64) Response {
	ysl, ysb, yrl, yrb := n.Admittances(s)
	yr := yrl + yrb
	zsrc := n.Source.Impedance(s)
	num := a + b*yr
	den := (c + d*yr) + ysl*num
	all := num + zsrc*(den+ysb*num)
	kc := complex(k, 0)
	var r Response
	r.VrVs = ratio(kc, num)
	r.VsE = ratio(num, all)
	r.VrE = ratio(kc, all)
	r.ZIn = ratio(num, den)
	r.ZSending = ratio(zsrc*num, all)
	// Sending side seen from the line: source in parallel with all sending shunts.
	zs := ratio(zsrc, 1+zsrc*(ysl+ysb))
	nOut := d*zs + b
	r.ZReceiving = ratio(nOut, (c*zs+a)+yr*nOut)
	return r
}

// ratio returns x/y, with a zero y giving +Inf (an unbounded value: a resonance of a
// lossless network hit exactly) and 0/0 giving 0 rather than NaN.
func ratio(x, y complex128) complex128 {
	if y == 0 {
		if x == 0 {
			return 0
		}
		return complex(math.Inf(1), 0)
	}
	return x / y
}

// Lossless reports whether the network has no loss at the frequency f (Hz): no source
// resistance, no shunt or load resistance, and no per-length resistance or conductance
// in any line section at s = j2πf. A lossless network's resonances are unbounded.
func (n Network) Lossless(f float64) bool {
	if n.Source.R != 0 {
		return false
	}
	for _, sh := range n.Shunts {
		if sh.R != 0 && (sh.OnLine || sh.End == Sending || !n.FarEndOpen) {
			return false
		}
	}
	if !n.FarEndOpen && (n.Load.R > 0 || n.Far.R != 0) {
		return false
	}
	s := complex(0, 2*math.Pi*f)
	for _, l := range n.Line {
		z, y := l.At(s)
		if real(z) != 0 || real(y) != 0 {
			return false
		}
	}
	return true
}
