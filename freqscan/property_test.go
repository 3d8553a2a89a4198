package freqscan_test

// Properties over random valid networks (seeded PCG): passivity of every driving-point
// impedance (Re Z >= 0 for a network of passive elements), no NaN anywhere, and the
// agreement of the scan's exponential form with the network's hyperbolic two-port
// (two formulations of the same long-line equations). Then numerical extremes: an
// electrically very long line scanned to 100 kHz, and a lossless line evaluated
// exactly on its resonances.

import (
	"math"
	"math/cmplx"
	"math/rand/v2"
	"testing"

	"github.com/telegrapher/telegrapher/freqscan"
	"github.com/telegrapher/telegrapher/propagation"
)

const (
	// netDraws is the number of random networks.
	netDraws = 3000
	// zPassiveTol bounds how negative Re Z may be relative to |Z|: a lossless network
	// has Re Z = 0 exactly and only roundings (a few float64 epsilons per operation,
	// and the line's cosh/sinh cancellation on long lines) can make it negative.
	zPassiveTol = 1e-9
	// formTol bounds the relative difference of |Vr/E| between Scan (exponential
	// form) and Network.At (cosh/sinh): both are exact formulas rounded
	// differently; near a sharp resonance the gain is ill-conditioned (its
	// sensitivity grows with the gain), so the relative bound is scaled by the gain
	// (observed below 1e-12).
	formTol = 1e-10
)

// randomNetwork draws a network of passive elements: an R-L source (or ideal), one or
// two line sections (overhead), line- and bus-connected reactors and capacitors with
// and without resistance, a resistive-inductive or capacitive load.
func randomNetwork(r *rand.Rand) freqscan.Network {
	logU := func(lo, hi float64) float64 { return lo * math.Exp(r.Float64()*math.Log(hi/lo)) }
	line := func() propagation.Line {
		p := propagation.RLGC{L: logU(0.6, 2) * 1e-6, C: logU(7, 16) * 1e-12}
		if r.IntN(4) != 0 {
			p.R = r.Float64() * 0.1e-3
		}
		return propagation.Line{Length: logU(1, 1500) * 1e3, Constants: p}
	}
	n := freqscan.Network{Line: propagation.Cascade{line()}}
	if r.IntN(3) == 0 {
		n.Line = append(n.Line, line())
	}
	if r.IntN(5) != 0 {
		n.Source = freqscan.Source{R: logU(0.01, 50), L: logU(1e-3, 1)}
	}
	for range r.IntN(4) {
		sh := freqscan.Shunt{End: freqscan.End(r.IntN(2)), OnLine: r.IntN(2) == 0}
		if r.IntN(2) == 0 {
			sh.L = logU(0.1, 100)
		} else {
			sh.C = logU(1e-8, 1e-5)
		}
		if r.IntN(2) == 0 {
			sh.R = logU(0.1, 100)
		}
		n.Shunts = append(n.Shunts, sh)
	}
	switch r.IntN(3) {
	case 0:
	case 1:
		n.Load = freqscan.Load{R: logU(100, 1e4), L: logU(0.5, 50)}
	default:
		n.Load = freqscan.Load{R: logU(100, 1e4), C: logU(1e-8, 1e-6)}
	}
	if r.IntN(4) == 0 {
		n = n.Energising()
	}
	return n
}

func TestPropertyNetworkPassive(t *testing.T) {
	t.Parallel()
	r := rand.New(rand.NewPCG(8, 400))
	freqs := make([]float64, 1)
	var pts []freqscan.Point
	worst := 0.0
	for range netDraws {
		n := randomNetwork(r)
		f := 0.5 * math.Exp(r.Float64()*math.Log(2e5)) // 0.5 Hz .. 100 kHz
		freqs[0] = f
		pts = freqscan.Scan(pts, n, freqs)
		p := pts[0]
		resp := n.At(complex(0, 2*math.Pi*f))
		for _, z := range []struct {
			name string
			v    complex128
		}{{"scan z_in", p.ZIn}, {"scan z_sending", p.ZSending}, {"scan z_receiving", p.ZReceiving},
			{"At z_in", resp.ZIn}, {"At z_sending", resp.ZSending}, {"At z_receiving", resp.ZReceiving}} {
			if cmplx.IsNaN(z.v) {
				t.Fatalf("%s = NaN at %g Hz for %+v", z.name, f, n)
			}
			if cmplx.IsInf(z.v) {
				continue // an exact pole is allowed as +Inf
			}
			if re := real(z.v); re < -zPassiveTol*cmplx.Abs(z.v) {
				t.Fatalf("%s = %v has Re < 0 at %g Hz for %+v", z.name, z.v, f, n)
			}
		}
		for _, g := range []float64{p.Gain, p.GainLine, p.GainSending} {
			if math.IsNaN(g) || g < 0 {
				t.Fatalf("gain %g at %g Hz for %+v", g, f, n)
			}
		}
		if ga := cmplx.Abs(resp.VrE); !math.IsInf(ga, 0) && !math.IsInf(p.Gain, 0) && len(n.Line) == 1 {
			d := math.Abs(ga-p.Gain) / math.Max(ga, 1e-300)
			worst = math.Max(worst, d/math.Max(1, ga))
			if d > formTol*math.Max(1, ga) {
				t.Fatalf("|Vr/E|: scan %.12g, two-port %.12g at %g Hz for %+v", p.Gain, ga, f, n)
			}
		}
	}
	t.Logf("worst relative |Vr/E| difference per unit gain: %.3g (tolerance %.3g)", worst, formTol)
}

// TestExtremeLongLineScan scans an electrically very long line (3000 km, 100 kHz: about
// a million degrees) with a strong and a weak source: every value finite.
func TestExtremeLongLineScan(t *testing.T) {
	t.Parallel()
	line := propagation.Line{Length: 3000e3, Constants: propagation.RLGC{R: 0.012e-3, L: 0.87e-6, C: 13.3e-12}}
	freqs := freqscan.LinearGrid(nil, 1, 100e3, 20000)
	for _, src := range []freqscan.Source{{}, {R: 0.05, L: 0.016e-3}, {R: 3000, L: 50}} {
		n := freqscan.Network{Source: src, Line: propagation.Cascade{line},
			Shunts: []freqscan.Shunt{{End: freqscan.Receiving, OnLine: true, L: 1e-3 * 1e3}}}
		for _, sections := range []int{1, 3} {
			nn := n
			if sections == 3 {
				third := line
				third.Length /= 3
				nn.Line = propagation.Cascade{third, third, third}
			}
			pts := freqscan.Scan(nil, nn, freqs)
			for _, p := range pts {
				for _, v := range []float64{p.Gain, p.GainLine, p.GainSending, real(p.ZIn), imag(p.ZIn),
					real(p.ZSending), imag(p.ZSending), real(p.ZReceiving), imag(p.ZReceiving)} {
					if math.IsNaN(v) || math.IsInf(v, 0) {
						t.Fatalf("source %+v, %d sections: non-finite value at %g Hz: %+v", src, sections, p.F, p)
					}
				}
			}
			for _, pk := range freqscan.Peaks(nn, pts) {
				if math.IsNaN(pk.F) || math.IsNaN(pk.Gain) {
					t.Fatalf("NaN peak %+v", pk)
				}
			}
		}
	}
}

// TestExtremeLosslessAtResonance evaluates a lossless quarter-wave line (L = 1.6
// mH/km, C = 10 nF/km: 250,000 km/s; 1250 km is a quarter wavelength at 50 Hz) with an
// ideal source at its open-end resonances 50, 150, 250 Hz: the gain is unbounded in
// theory, and must come out as a very large number or +Inf, never NaN; away from the
// resonances it is 1/|cos(beta l)| (telegrapher's equations, lossless open line).
func TestExtremeLosslessAtResonance(t *testing.T) {
	t.Parallel()
	line := propagation.Line{Length: 1250e3, Constants: propagation.RLGC{L: 1.6e-6, C: 10e-12}}
	n := freqscan.Network{Line: propagation.Cascade{line}}.Energising()
	// Off the resonances, |Vr/E| = 1/|cos(2 pi f l / v)| with l/v = 5 ms.
	const offTol = 1e-12 // a few roundings of one exponential, relative
	freqs := []float64{50, 150, 250, 1050, 20, 75, 123.4}
	pts := freqscan.Scan(nil, n, freqs)
	for _, p := range pts {
		if math.IsNaN(p.Gain) || math.IsNaN(real(p.ZIn)) || math.IsNaN(imag(p.ZIn)) {
			t.Fatalf("NaN at %g Hz: %+v", p.F, p)
		}
		want := 1 / math.Abs(math.Cos(2*math.Pi*p.F*5e-3))
		if math.Mod(p.F, 100) == 50 {
			if !(p.Gain > 1e12) {
				t.Errorf("at the resonance %g Hz gain %g, want unbounded (> 1e12 or +Inf)", p.F, p.Gain)
			}
			continue
		}
		if math.Abs(p.Gain-want) > offTol*want {
			t.Errorf("%g Hz: gain %.15g, want %.15g", p.F, p.Gain, want)
		}
	}
	for _, pk := range freqscan.Peaks(n, freqscan.Scan(nil, n, freqscan.LinearGrid(nil, 1, 500, 500))) {
		if math.IsNaN(pk.Gain) || math.IsNaN(pk.F) {
			t.Fatalf("NaN peak %+v", pk)
		}
	}
}
