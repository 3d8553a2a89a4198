package waves

import (
	"fmt"
	"math"
	"testing"

	"github.com/telegrapher/telegrapher/freqscan"
	"github.com/telegrapher/telegrapher/propagation"
)

const (
	// bergeronTol: with the time step dividing the half-line travel time, Bergeron
	// is exact for a lossless line and resistive terminations; the trapezoidal
	// rule's O(Δt²) error enters only through reactive elements.
	bergeronTol = 1e-9
	// laplaceTol: the windowed numerical Laplace transform has a relative accuracy
	// of about 1e-4 away from wavefronts (Moreno & Ramirez 2008 report 1e-4..1e-3
	// with the Hanning window); 2e-3 pu leaves room for the 1/N² aliasing.
	laplaceTol = 2e-3
	// frontGap: samples closer than this to a wavefront are not compared (the
	// window spreads a jump over a few steps; Bergeron interpolation over one).
	frontGapSteps = 6
)

// The three methods agree on a lossless line with a resistive source, away from
// wavefronts (design rule: lattice = Bergeron = Laplace), for a step and for sines
// closed at several angles, with and without trapped charge.
func TestMethodsAgreeLossless(t *testing.T) {
	t.Parallel()
	dt := testTau / 50 // divides the half-line travel time: Bergeron without interpolation
	cases := []struct {
		rs float64
		e  Energisation
	}{
		{100, stepSettings(20e-3, dt)},
		{0, stepSettings(20e-3, dt)},
		{100, Energisation{Excitation: Step, Omega: testOmega, TrappedPU: -0.7, Duration: 20e-3, TimeStep: dt}},
	}
	for _, deg := range []float64{0, 30, 90, 135, 270} {
		cases = append(cases, struct {
			rs float64
			e  Energisation
		}{50, Energisation{Excitation: Sine, Omega: testOmega, CloseDeg: deg, Duration: 20e-3, TimeStep: dt}})
	}
	for _, c := range cases {
		name := fmt.Sprintf("%s_%g_Rs%g_V0%g", c.e.Excitation, c.e.CloseDeg, c.rs, c.e.TrappedPU)
		t.Run(name, func(t *testing.T) {
			t.Parallel()
			n := testNetwork(0, c.rs, 0)
			lat, _, err := Lattice(n, c.e, LatticeOptions{})
			if err != nil {
				t.Fatal(err)
			}
			ber, err := Bergeron(n, c.e, BergeronOptions{})
			if err != nil {
				t.Fatal(err)
			}
			lap, err := Laplace(n, c.e, LaplaceOptions{})
			if err != nil {
				t.Fatal(err)
			}
			gap := frontGapSteps * dt
			for k := range lat.Receiving {
				tt := float64(k) * dt
				if nearFront(tt, testTau, gap) {
					continue
				}
				if d := math.Abs(ber.Receiving[k] - lat.Receiving[k]); d > bergeronTol {
					t.Fatalf("t = %.4g ms: bergeron %.9f, lattice %.9f", tt*1e3, ber.Receiving[k], lat.Receiving[k])
				}
				if d := math.Abs(ber.Sending[k] - lat.Sending[k]); d > bergeronTol {
					t.Fatalf("t = %.4g ms: bergeron sending %.9f, lattice %.9f", tt*1e3, ber.Sending[k], lat.Sending[k])
				}
				if !nearFront(tt, testTau/2, gap) {
					if d := math.Abs(ber.Middle[k] - lat.Middle[k]); d > bergeronTol {
						t.Fatalf("t = %.4g ms: bergeron mid-line %.9f, lattice %.9f", tt*1e3, ber.Middle[k], lat.Middle[k])
					}
				}
				if d := math.Abs(lap.Receiving[k] - lat.Receiving[k]); d > laplaceTol {
					t.Fatalf("t = %.4g ms: laplace %.6f, lattice %.6f", tt*1e3, lap.Receiving[k], lat.Receiving[k])
				}
				if d := math.Abs(lap.Sending[k] - lat.Sending[k]); d > laplaceTol {
					t.Fatalf("t = %.4g ms: laplace sending %.6f, lattice %.6f", tt*1e3, lap.Sending[k], lat.Sending[k])
				}
			}
		})
	}
}

// Lattice, Bergeron and Laplace on a line in two sections (overhead + cable):
// junction coefficients in the lattice against the cascaded two-port in Laplace.
func TestMethodsAgreeSections(t *testing.T) {
	t.Parallel()
	n := freqscan.Network{Source: freqscan.Source{R: 60}, Line: propagation.Cascade{
		{Length: 120e3, Constants: propagation.RLGC{L: testL, C: testC}},
		{Length: 20e3, Constants: propagation.RLGC{L: 0.4e-6, C: 210e-12}},
	}}.Energising()
	e := stepSettings(8e-3, 2e-6)
	lat, ber, lap, d := threeMethods(t, n, e)
	// Wavefronts arrive at every combination of section transits: compare the
	// plateaus only where no wavefront passed within the gap.
	fronts := map[int]bool{}
	for _, f := range d.Wavefronts {
		if f.X1 == d.Length || f.X0 == d.Length {
			k := int(math.Round(f.T1 / e.TimeStep))
			if f.X0 == d.Length {
				k = int(math.Round(f.T0 / e.TimeStep))
			}
			for j := k - 15; j <= k+15; j++ {
				fronts[j] = true
			}
		}
	}
	var compared int
	// The interpolated Bergeron histories (travel times not whole steps) smooth the
	// fronts; away from them its error is the interpolation's, O((Δt/τ)²).
	const berSectionsTol = 2e-3
	for k := range lat.Receiving {
		if fronts[k] {
			continue
		}
		compared++
		if dv := math.Abs(lap.Receiving[k] - lat.Receiving[k]); dv > laplaceTol {
			t.Fatalf("t = %.4g ms: laplace %.6f, lattice %.6f", float64(k)*e.TimeStep*1e3, lap.Receiving[k], lat.Receiving[k])
		}
		if dv := math.Abs(ber.Receiving[k] - lat.Receiving[k]); dv > berSectionsTol {
			t.Fatalf("t = %.4g ms: bergeron %.6f, lattice %.6f", float64(k)*e.TimeStep*1e3, ber.Receiving[k], lat.Receiving[k])
		}
	}
	if compared < len(lat.Receiving)/4 {
		t.Fatalf("only %d of %d samples clear of wavefronts", compared, len(lat.Receiving))
	}
}

// Bergeron and Laplace agree with an inductive source and line-connected reactors
// (trapezoidal lumped elements against the exact frequency-domain network), including
// trapped charge at the crest of the ring-down, and the lumped resistance against
// the distributed one.
func TestBergeronLaplaceInductive(t *testing.T) {
	t.Parallel()
	reactor := func(end freqscan.End) freqscan.Shunt { // 150 Mvar at 400 kV, q = 300
		x := 400e3 * 400e3 / 150e6
		return freqscan.Shunt{End: end, OnLine: true, L: x / testOmega, R: x / 300}
	}
	busCap := freqscan.Shunt{End: freqscan.Sending, C: 2e-6}
	cases := []struct {
		name    string
		n       freqscan.Network
		e       Energisation
		opt     BergeronOptions
		rmsTol  float64
		peakTol float64
	}{
		// Lossless line: Bergeron's only error is the trapezoidal one, O(Δt²): at
		// Δt = τ/200 against the source time constant L/R = 38 ms and the line's
		// 250 Hz oscillation, a few 1e-3 pu.
		{"lossless_RL", testNetwork(0, 0.9, 34e-3), stepSettings(20e-3, testTau/200), BergeronOptions{}, 2e-3, 2e-3},
		{"lossless_RL_reactors_trapped", testNetwork(0, 0.9, 34e-3, reactor(freqscan.Receiving), reactor(freqscan.Sending)),
			Energisation{Excitation: Sine, Omega: testOmega, CloseDeg: 60, TrappedPU: -0.8, Duration: 20e-3, TimeStep: testTau / 200}, BergeronOptions{}, 3e-3, 3e-3},
		// A wavefront meeting the bus capacitor is a current jump, which the
		// trapezoidal rule spreads over one step: an O(Δt) error, hence the finer step.
		{"lossless_RL_buscap_sine", testNetwork(0, 0.9, 34e-3, busCap),
			Energisation{Excitation: Sine, Omega: testOmega, CloseDeg: 90, Duration: 20e-3, TimeStep: testTau / 1000}, BergeronOptions{}, 3e-3, 3e-3},
		// Lossy line: lumped R/4, R/2, R/4 against the distributed resistance; an
		// approximation of the method, held to 0.05 pu rms (common practice, no source:
		// lumping is accepted where R·l is small against Zc, here 30 ohm against 281).
		{"lossy_RL_lumped", testNetwork(0.1, 0.9, 34e-3), stepSettings(20e-3, testTau/200), BergeronOptions{LumpedResistance: true}, 0.05, 0.05},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			t.Parallel()
			ber, err := Bergeron(c.n, c.e, c.opt)
			if err != nil {
				t.Fatal(err)
			}
			lap, err := Laplace(c.n, c.e, LaplaceOptions{})
			if err != nil {
				t.Fatal(err)
			}
			// rms over the samples clear of the open end's wavefronts (odd multiples
			// of τ), where the window and the trapezoidal rule both smooth the jump.
			var sum float64
			var m int
			for k := range ber.Receiving {
				if nearFront(float64(k)*ber.Step, testTau, frontGapSteps*ber.Step) {
					continue
				}
				d := ber.Receiving[k] - lap.Receiving[k]
				sum += d * d
				m++
			}
			rms := math.Sqrt(sum / float64(m))
			pb, _ := Peak(ber.Receiving)
			pl, _ := Peak(lap.Receiving)
			if rms > c.rmsTol || math.Abs(pb-pl) > c.peakTol*math.Abs(pl)+c.rmsTol {
				t.Errorf("bergeron vs laplace: rms %.4g pu (tol %g), peaks %.5f and %.5f", rms, c.rmsTol, pb, pl)
			}
		})
	}
}

// Energy: charging the lossless open line (capacitance C·l) from a 1 pu step through
// Rs, the source delivers the charge Q = C·l and the resistance dissipates half the
// energy it supplies, C·l/2, the other half being stored on the line (the classical
// result for charging any capacitance through a resistance; common practice, no
// source). Checked on the sending-end waveform of every method, i = (1 − v_s)/Rs.
func TestEnergyBalance(t *testing.T) {
	t.Parallel()
	// 40 travel times leave (|Γs|)^20 ≈ 4e-7 of the transient; the rectangle rule on
	// a step of τ/100 errs by one sample at each of the 20 jumps: a few 1e-3.
	const tol = 5e-3
	rs := 100.0
	n := testNetwork(0, rs, 0)
	e := stepSettings(40*testTau, testTau/100)
	lat, ber, lap, _ := threeMethods(t, n, e)
	cl := testC * testLength
	for _, w := range []*Waveform{lat, ber, lap} {
		// Rectangle rule; the first interval takes sample 1, since sample 0 sits on
		// the closing jump (the Laplace inversion gives the jump's midpoint there).
		var q, heat float64
		for k, v := range w.Sending {
			if k == 0 {
				v = w.Sending[1]
			}
			i := (1 - v) / rs
			q += i * w.Step
			heat += rs * i * i * w.Step
		}
		if math.Abs(q/cl-1) > tol || math.Abs(heat/(cl/2)-1) > tol {
			t.Errorf("%s: charge %.5g C (want C·l = %.5g), heat %.5g J (want C·l/2 = %.5g)", w.Method, q, cl, heat, cl/2)
		}
	}
}
