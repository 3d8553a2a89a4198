package waves_test

// Method agreement over random valid lossless lines (seeded PCG): on a lossless line
// with a resistive source, the lattice diagram is exact, Bergeron's method is exact
// when the time step divides the half-line travel time, and the numerical Laplace
// transform is accurate away from wavefronts. The three must agree (design rule:
// lattice = Bergeron = Laplace), through the public waves API only.

import (
	"math"
	"math/rand/v2"
	"testing"

	"github.com/telegrapher/telegrapher/freqscan"
	"github.com/telegrapher/telegrapher/propagation"
	"github.com/telegrapher/telegrapher/waves"
)

const (
	// agreeDraws is the number of random lines.
	agreeDraws = 40
	// agreeBergeronTol: Bergeron with a step dividing the half-line travel time and
	// a resistive source solves the same difference equation the lattice diagram
	// sums, so only float64 roundings over a few thousand steps separate them
	// (observed below 2e-14 pu).
	agreeBergeronTol = 1e-11
	// agreeLaplaceTol: the windowed numerical Laplace transform is accurate to about
	// 1e-4..1e-3 relative away from wavefronts (Moreno & Ramirez 2008, IEEE Trans.
	// Power Delivery 23(4), review of the method; Hanning-type windows); the
	// voltages reach about 2 pu, so 1e-3 pu (observed below 1e-4 pu here).
	agreeLaplaceTol = 1e-3
	// agreeFrontSteps: samples this close (in time steps) to a wavefront arriving
	// at the observed end are not compared; the Laplace window spreads a jump over
	// a few steps.
	agreeFrontSteps = 8
	// agreeStepsPerHalf is the number of time steps in a half-line travel time.
	agreeStepsPerHalf = 25
)

func TestPropertyMethodsAgreeRandomLossless(t *testing.T) {
	t.Parallel()
	r := rand.New(rand.NewPCG(8, 300))
	type draw struct {
		line propagation.Line
		rs   float64
		e    waves.Energisation
	}
	omega := 2 * math.Pi * 50
	var draws []draw
	for range agreeDraws {
		l := 0.6e-6 + r.Float64()*1.4e-6 // 0.6-2 mH/km
		c := 7e-12 + r.Float64()*9e-12   // 7-16 nF/km
		length := (20 + r.Float64()*780) * 1e3
		line := propagation.Line{Length: length, Constants: propagation.RLGC{L: l, C: c}}
		tau := length * math.Sqrt(l*c)
		zc := math.Sqrt(l / c)
		rs := zc * math.Exp((r.Float64()*2-1)*math.Log(20)) // Zc/20 .. 20 Zc
		if r.IntN(5) == 0 {
			rs = 0
		}
		e := waves.Energisation{Omega: omega, Duration: 12 * tau, TimeStep: tau / 2 / agreeStepsPerHalf}
		switch r.IntN(3) {
		case 0:
			e.Excitation = waves.Step
		case 1:
			e.Excitation = waves.Step
			e.TrappedPU = r.Float64()*2 - 1
		default:
			e.Excitation = waves.Sine
			e.CloseDeg = r.Float64() * 360
			e.Duration = math.Max(e.Duration, 20e-3)
		}
		draws = append(draws, draw{line, rs, e})
	}
	for i, d := range draws {
		t.Run("", func(t *testing.T) {
			t.Parallel()
			n := freqscan.Network{Source: freqscan.Source{R: d.rs}, Line: propagation.Cascade{d.line}}.Energising()
			lat, _, err := waves.Lattice(n, d.e, waves.LatticeOptions{})
			if err != nil {
				t.Fatal(err)
			}
			ber, err := waves.Bergeron(n, d.e, waves.BergeronOptions{})
			if err != nil {
				t.Fatal(err)
			}
			lap, err := waves.Laplace(n, d.e, waves.LaplaceOptions{})
			if err != nil {
				t.Fatal(err)
			}
			if len(lat.Receiving) != len(ber.Receiving) || len(lat.Receiving) != len(lap.Receiving) {
				t.Fatalf("draw %d: lengths lattice %d, bergeron %d, laplace %d", i, len(lat.Receiving), len(ber.Receiving), len(lap.Receiving))
			}
			tau := d.line.TravelTime(d.e.Omega)
			dt := d.e.TimeStep
			gap := agreeFrontSteps * dt
			compared, worstB, worstL := 0, 0.0, 0.0
			for k := range lat.Receiving {
				tt := float64(k) * dt
				// Fronts reach the receiving end at odd multiples of tau, the
				// sending end at even ones.
				nearR := nearOdd(tt, tau, gap)
				nearS := nearEven(tt, tau, gap)
				for _, c := range []struct {
					name     string
					near     bool
					a, b, lp float64
				}{
					{"receiving", nearR, lat.Receiving[k], ber.Receiving[k], lap.Receiving[k]},
					{"sending", nearS, lat.Sending[k], ber.Sending[k], lap.Sending[k]},
				} {
					if c.near {
						continue
					}
					compared++
					worstB = math.Max(worstB, math.Abs(c.a-c.b))
					worstL = math.Max(worstL, math.Abs(c.a-c.lp))
					if math.Abs(c.a-c.b) > agreeBergeronTol {
						t.Fatalf("draw %d (%+v, Rs %.4g, %+v): %s at %.4g ms: lattice %.9f, bergeron %.9f", i, d.line, d.rs, d.e, c.name, tt*1e3, c.a, c.b)
					}
					if math.Abs(c.a-c.lp) > agreeLaplaceTol {
						t.Fatalf("draw %d (%+v, Rs %.4g, %+v): %s at %.4g ms: lattice %.6f, laplace %.6f", i, d.line, d.rs, d.e, c.name, tt*1e3, c.a, c.lp)
					}
				}
			}
			t.Logf("draw %d: Rs/Zc %.3g, %v, %d samples: worst lattice-bergeron %.3g pu, lattice-laplace %.3g pu", i, d.rs/math.Sqrt(d.line.Constants.(propagation.RLGC).L/d.line.Constants.(propagation.RLGC).C), d.e.Excitation, len(lat.Receiving), worstB, worstL)
			if compared < len(lat.Receiving) {
				t.Fatalf("draw %d: only %d samples compared", i, compared)
			}
			for _, v := range [][]float64{lat.Receiving, ber.Receiving, lap.Receiving, lat.Sending, ber.Sending, lap.Sending} {
				for _, x := range v {
					if math.IsNaN(x) || math.IsInf(x, 0) {
						t.Fatalf("draw %d: non-finite sample", i)
					}
				}
			}
		})
	}
}

// nearOdd reports whether t is within w of an odd multiple of tau.
func nearOdd(t, tau, w float64) bool {
	k := math.Round((t/tau - 1) / 2)
	return math.Abs(t-(2*k+1)*tau) < w
}

// nearEven reports whether t is within w of an even multiple of tau (t = 0 included).
func nearEven(t, tau, w float64) bool {
	k := math.Round(t / tau / 2)
	return math.Abs(t-2*k*tau) < w
}
