package freqscan

import (
	"context"
	"math"
	"math/cmplx"
	"runtime"

	"github.com/telegrapher/telegrapher/propagation"
	"golang.org/x/sync/errgroup"
)

// Point is the network's response at one frequency of a scan.
type Point struct {
	F           float64    // frequency, Hz
	Gain        float64    // |Vr/E|: receiving-end voltage over source EMF
	GainLine    float64    // |Vr/Vs|: receiving-end over sending-end voltage
	GainSending float64    // |Vs/E|
	ZIn         complex128 // ohm, into the line from the sending bus (line-connected shunts and termination)
	ZSending    complex128 // ohm, driving point at the sending bus, whole network in place
	ZReceiving  complex128 // ohm, driving point at the receiving bus, whole network in place
}

// parallelMin is the grid size from which Scan spreads the work over the cores.
const parallelMin = 4096

// Scan evaluates the network n at every frequency of freqs (Hz, > 0) on the jω axis
// and returns the points in dst (reused when it has the capacity). Large grids are
// split over GOMAXPROCS goroutines; each point depends only on its own frequency, so
// the result does not depend on the core count.
//
// Every value is finite except where a lossless network is evaluated exactly at a
// resonance (a zero denominator): that value is +Inf, never NaN.
//
// A single-section line is evaluated in the exponential form (one complex square root
// and one complex exponential per frequency):
//
//	x = exp(-γl),  A' = D' = 1 + x²,  B' = Zc(1 - x²),  C' = (1 - x²)/Zc
//
// which is the exact two-port scaled by 2 e^{-γl}; the ratios do not depend on the
// scale, and nothing overflows however long the line or high the frequency.
//
// References:
//   - Grainger, J. J. and Stevenson, W. D., Power System Analysis, McGraw-Hill, 1994,
//     ch. 6 (the long-line equations in ABCD form).
func Scan(dst []Point, n Network, freqs []float64) []Point {
	dst = grow(dst, len(freqs))
	workers := runtime.GOMAXPROCS(0)
	if len(freqs) < parallelMin || workers < 2 {
		scanRange(dst, n, freqs)
		return dst
	}
	chunk := (len(freqs) + workers - 1) / workers
	var g errgroup.Group
	for lo := 0; lo < len(freqs); lo += chunk {
		hi := min(lo+chunk, len(freqs))
		g.Go(func() error { scanRange(dst[lo:hi], n, freqs[lo:hi]); return nil })
	}
	_ = g.Wait() // scanRange returns nothing to report
	return dst
}

// ScanChunk is the number of frequencies ScanContext evaluates between two checks of
// its context.
const ScanChunk = 1 << 15

// ScanContext is Scan that checks ctx between chunks of ScanChunk frequencies, so a
// scan of many points stops promptly when ctx ends; it then returns ctx's error. The
// points are those of Scan.
func ScanContext(ctx context.Context, dst []Point, n Network, freqs []float64) ([]Point, error) {
	dst = grow(dst, len(freqs))
	for lo := 0; lo < len(freqs); lo += ScanChunk {
		if err := ctx.Err(); err != nil {
			return nil, err
		}
		hi := min(lo+ScanChunk, len(freqs))
		Scan(dst[lo:hi], n, freqs[lo:hi])
	}
	return dst, nil
}

func scanRange(dst []Point, n Network, freqs []float64) {
	k := newKernel(n)
	for i, f := range freqs {
		k.eval(&dst[i], f)
	}
}

// point evaluates the network at f Hz.
func (n Network) point(f float64) Point {
	if !(f > 0) {
		panic("freqscan: scan frequency must be > 0")
	}
	r := n.response(complex(0, 2*math.Pi*f))
	return Point{
		F:           f,
		Gain:        abs(r.VrE),
		GainLine:    abs(r.VrVs),
		GainSending: abs(r.VsE),
		ZIn:         r.ZIn,
		ZSending:    r.ZSending,
		ZReceiving:  r.ZReceiving,
	}
}

// smallGammaL is |γl| below which the exponential form loses digits in 1 - x² and the
// hyperbolic two-port is used instead.
const smallGammaL = 0.05

// response is At, with the exponential form for a single-section line.
func (n Network) response(s complex128) Response {
	if len(n.Line) != 1 {
		return n.At(s)
	}
	l := n.Line[0]
	z, y := l.At(s)
	gamma := propagation.PrincipalSqrt(z * y)
	if gamma == 0 {
		return n.At(s)
	}
	zc := z / gamma
	gl := gamma * complex(l.Length, 0)
	if math.Abs(real(gl))+math.Abs(imag(gl)) < smallGammaL {
		return n.At(s)
	}
	// The true elements are these over 2x = 2e^{-γl}; ratios need |2x| = 2 e^{-Re γl}
	// and its phase, carried in kx as a complex factor folded into the ratios below.
	a, b, c, x, _ := propagation.ExactExp(gl, zc, 1/zc)
	return n.respondExp(s, a, b, c, a, 2*x)
}

// respondExp is respondScaled with a complex scale factor kx (Vr/Vs = kx/(A' + B'Yr)).
func (n Network) respondExp(s, a, b, c, d, kx complex128) Response {
	r := n.respondScaled(s, a, b, c, d, 1)
	r.VrVs = mulInf(r.VrVs, kx)
	r.VrE = mulInf(r.VrE, kx)
	return r
}

// mulInf multiplies, keeping an infinite a infinite (instead of Inf·0 = NaN parts).
func mulInf(a, b complex128) complex128 {
	if cmplx.IsInf(a) {
		return complex(math.Inf(1), 0)
	}
	return a * b
}

// abs is |c|, +Inf for an infinite c.
func abs(c complex128) float64 {
	return cmplx.Abs(c)
}
