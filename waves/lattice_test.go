package waves

import (
	"errors"
	"math"
	"testing"

	"github.com/telegrapher/telegrapher/freqscan"
	"github.com/telegrapher/telegrapher/propagation"
)

// latticeTol: the lattice is a closed-form sum; only round-off separates it from the
// series written out by hand.
const latticeTol = 1e-9

// Step through Rs: the launched wave is Zc/(Rs+Zc), doubled at the open end, so the
// open end reaches 2Zc/(Rs+Zc) at one travel time; 2 pu for an ideal source.
// Greenwood, Electrical Transients in Power Systems (1991), §9 (open-ended line); from memory.
func TestLatticeOpenEndFirstWave(t *testing.T) {
	t.Parallel()
	for _, rs := range []float64{0, 50, testZc, 1000} {
		w, _, err := Lattice(testNetwork(0, rs, 0), stepSettings(3*testTau, testTau/100), LatticeOptions{})
		if err != nil {
			t.Fatal(err)
		}
		want := 2 * testZc / (rs + testZc)
		if rs == 0 && want != 2 {
			t.Fatalf("ideal source: want 2 pu")
		}
		for _, tt := range []float64{1.05 * testTau, 1.5 * testTau, 2.5 * testTau} {
			if got := at(w.Receiving, w.Step, tt); math.Abs(got-want) > latticeTol {
				t.Errorf("Rs = %g ohm, t = %.3g ms: open end %.9f pu, want 2Zc/(Rs+Zc) = %.9f", rs, tt*1e3, got, want)
			}
		}
		if got := at(w.Receiving, w.Step, 0.95*testTau); got != 0 {
			t.Errorf("Rs = %g: open end before the first arrival = %g, want 0", rs, got)
		}
	}
}

// With −1 pu trapped and an ideal 1 pu step, the open end reaches 1 + 2·(1 − (−1)) = 3 pu.
// Common practice (the classical 3 pu of high-speed reclosing on trapped charge), no source.
func TestTrappedChargeThreePU(t *testing.T) {
	t.Parallel()
	e := stepSettings(4*testTau, testTau/100)
	e.TrappedPU = -1
	n := testNetwork(0, 0, 0)
	lat, ber, lap, _ := threeMethods(t, n, e)
	for _, c := range []struct {
		w   *Waveform
		tol float64
	}{{lat, latticeTol}, {ber, bergeronTol}, {lap, laplaceTol}} {
		if got := at(c.w.Receiving, c.w.Step, 2*testTau); math.Abs(got-3) > c.tol {
			t.Errorf("%s: open end at 2τ = %.6f pu, want 3", c.w.Method, got)
		}
		if got := at(c.w.Receiving, c.w.Step, 0.5*testTau); math.Abs(got+1) > c.tol {
			t.Errorf("%s: open end before the wave = %.6f pu, want the trapped −1", c.w.Method, got)
		}
	}
}

// A line charged to +1 pu closed onto a 1 pu step sees no transient at all (identity).
func TestTrappedEqualToEMFNoTransient(t *testing.T) {
	t.Parallel()
	e := stepSettings(10*testTau, testTau/50)
	e.TrappedPU = 1
	n := testNetwork(0, 100, 0)
	lat, _, err := Lattice(n, e, LatticeOptions{})
	if err != nil {
		t.Fatal(err)
	}
	ber, err := Bergeron(n, e, BergeronOptions{})
	if err != nil {
		t.Fatal(err)
	}
	for _, w := range []*Waveform{lat, ber} {
		for k, v := range w.Receiving {
			if math.Abs(v-1) > 1e-12 || math.Abs(w.Sending[k]-1) > 1e-12 {
				t.Fatalf("%s: sample %d: %g, %g, want 1 pu throughout", w.Method, k, w.Sending[k], v)
			}
		}
	}
}

// Lossless line, resistive source, step: between the arrivals (2k+1)τ and (2k+3)τ the
// open end is the partial geometric sum
//
//	v = 2a·(1 − Γ^{k+1})/(1 − Γ),  a = Zc/(Rs+Zc),  Γ = (Rs−Zc)/(Rs+Zc)
//
// Bewley, Traveling Waves on Transmission Systems (1951), ch. 3; from memory.
func TestLatticeClosedForm(t *testing.T) {
	t.Parallel()
	for _, rs := range []float64{0, 30, 500} {
		w, d, err := Lattice(testNetwork(0, rs, 0), stepSettings(20*testTau, testTau/20), LatticeOptions{})
		if err != nil {
			t.Fatal(err)
		}
		a := testZc / (rs + testZc)
		g := (rs - testZc) / (rs + testZc)
		for k := 0; k < 9; k++ {
			want := 2 * a * (1 - math.Pow(g, float64(k+1))) / (1 - g)
			tt := float64(2*k+2) * testTau
			if got := at(w.Receiving, w.Step, tt); math.Abs(got-want) > latticeTol {
				t.Errorf("Rs = %g, k = %d: %.9f, want %.9f", rs, k, got, want)
			}
		}
		// The diagram: one wavefront per transit, amplitude a·Γ^⌊j/2⌋.
		for j, f := range d.Wavefronts[:10] {
			want := a * math.Pow(g, float64(j/2))
			if math.Abs(f.Amplitude-want) > latticeTol || math.Abs(f.T0-float64(j)*testTau) > 1e-12 {
				t.Errorf("Rs = %g, wavefront %d: amplitude %.6f at %.6g s, want %.6f at %.6g s", rs, j, f.Amplitude, f.T0, want, float64(j)*testTau)
			}
		}
	}
}

// The lattice refuses what it cannot treat, naming the reason.
func TestLatticeRefuses(t *testing.T) {
	t.Parallel()
	reactor := freqscan.Shunt{Name: "R1", End: freqscan.Receiving, OnLine: true, L: 3}
	for _, n := range []freqscan.Network{testNetwork(0, 1, 0.03), testNetwork(0, 0, 0, reactor)} {
		if _, _, err := Lattice(n, stepSettings(1e-3, 0), LatticeOptions{}); !errors.Is(err, ErrMethod) {
			t.Errorf("want ErrMethod, got %v", err)
		}
	}
	// A receiving bus-connected shunt is disconnected with the far end open: accepted.
	bus := freqscan.Shunt{End: freqscan.Receiving, L: 3}
	if _, _, err := Lattice(testNetwork(0, 0, 0, bus), stepSettings(1e-3, 0), LatticeOptions{}); err != nil {
		t.Errorf("receiving bus shunt: %v", err)
	}
}

// Attenuation: each transit scales a wavefront by exp(−αl), α = Re γ at the stated
// frequency: the first open-end wave of an ideal step is 2·exp(−αl).
// Identity with propagation.Line.Gamma.
func TestLatticeAttenuation(t *testing.T) {
	t.Parallel()
	n := testNetwork(0.1, 0, 0)
	w, _, err := Lattice(n, stepSettings(2*testTau, testTau/100), LatticeOptions{AttenuationHz: 1000})
	if err != nil {
		t.Fatal(err)
	}
	alpha := real(n.Line[0].Gamma(complex(0, 2*math.Pi*1000)))
	want := 2 * math.Exp(-alpha*testLength)
	// The velocity is taken at 1 kHz too; sample clear of the front.
	if got := at(w.Receiving, w.Step, 1.5*testTau); math.Abs(got-want) > latticeTol {
		t.Errorf("open end %.9f, want %.9f", got, want)
	}
	if mid := at(w.Middle, w.Step, 0.75*testTau); math.Abs(mid-math.Exp(-alpha*testLength/2)) > latticeTol {
		t.Errorf("mid-line %.9f, want exp(−αl/2) = %.9f", mid, math.Exp(-alpha*testLength/2))
	}
}

// Two sections (an overhead line and a cable of the same travel time ratio): the
// first wave at the junction is transmitted with 2Z2/(Z1+Z2).
// Bewley (1951), ch. 3, junction coefficients; from memory.
func TestLatticeJunction(t *testing.T) {
	t.Parallel()
	cable := propagation.RLGC{L: 0.4e-6, C: 210e-12}
	n := freqscan.Network{Line: propagation.Cascade{
		{Length: 150e3, Constants: propagation.RLGC{L: testL, C: testC}},
		{Length: 30e3, Constants: cable},
	}}.Energising()
	w, d, err := Lattice(n, stepSettings(5e-3, 1e-6), LatticeOptions{})
	if err != nil {
		t.Fatal(err)
	}
	z1, z2 := d.Surge[0], d.Surge[1]
	tr := 2 * z2 / (z1 + z2)
	if got := at(w.Middle, w.Step, d.Travel[0]*0.99); got != 1 {
		t.Errorf("mid-line (in the overhead section) before the junction echo: %g, want 1", got)
	}
	// The first wave reaches the open end at τ1 + τ2 with amplitude tr, doubled.
	if got := at(w.Receiving, w.Step, d.Travel[0]+d.Travel[1]*1.01); math.Abs(got-2*tr) > latticeTol {
		t.Errorf("open end after the first arrival: %.9f, want 2·2Z2/(Z1+Z2) = %.9f", got, 2*tr)
	}
	if len(d.Junctions) != 3 || d.Junctions[1] != 150e3 {
		t.Errorf("junctions %v", d.Junctions)
	}
}
