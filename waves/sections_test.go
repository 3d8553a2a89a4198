package waves

import (
	"bufio"
	"fmt"
	"math"
	"os"
	"strconv"
	"strings"
	"testing"

	"github.com/telegrapher/telegrapher/freqscan"
	"github.com/telegrapher/telegrapher/propagation"
)

// Two sections whose travel times are whole microseconds: an overhead section of
// 3.4 µs/km (L = 1 mH/km, C = 11.56 nF/km, Zc = 294.1 ohm) and a cable of 10 µs/km
// (L = 0.4 mH/km, C = 250 nF/km, Zc = 40 ohm).
var (
	secOverhead = propagation.RLGC{L: 1e-6, C: 11.56e-12}
	secCable    = propagation.RLGC{L: 0.4e-6, C: 250e-12}
)

func twoSections(rs float64, first, second propagation.RLGC, l1, l2 float64) freqscan.Network {
	return freqscan.Network{Source: freqscan.Source{R: rs}, Line: propagation.Cascade{
		{Name: "first", Length: l1, Constants: first},
		{Name: "second", Length: l2, Constants: second},
	}}.Energising()
}

// Junction coefficients of the lattice diagram, in both directions (overhead into
// cable and cable into overhead): transmitted 2·Z2/(Z1+Z2), reflected
// (Z2−Z1)/(Z1+Z2) (Bewley, Traveling Waves on Transmission Systems, 1933, ch. 3;
// textbook), and the junction voltage of every method between the first arrival at
// the junction and its first echo equal to the launched wave times the transmission
// coefficient.
func TestJunctionCoefficients(t *testing.T) {
	t.Parallel()
	// lattice: closed-form sums (rounding only); Bergeron: travel times are whole
	// steps, exact on the lossless line; Laplace: the windowed transform's
	// accuracy away from wavefronts (see laplaceTol).
	const latTol, berTol = 1e-12, 1e-9
	cases := []struct {
		name          string
		first, second propagation.RLGC
		l1, l2        float64
	}{
		{"overhead_into_cable", secOverhead, secCable, 100e3, 10e3},
		{"cable_into_overhead", secCable, secOverhead, 10e3, 100e3},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			t.Parallel()
			rs := 30.0
			n := twoSections(rs, c.first, c.second, c.l1, c.l2)
			e := stepSettings(2e-3, 1e-6)
			lat, d, err := Lattice(n, e, LatticeOptions{})
			if err != nil {
				t.Fatal(err)
			}
			z1, z2 := math.Sqrt(c.first.L/c.first.C), math.Sqrt(c.second.L/c.second.C)
			tr, rf := 2*z2/(z1+z2), (z2-z1)/(z1+z2)
			if math.Abs(tr-(1+rf)) > 1e-15 {
				t.Fatalf("t = 1 + r violated: %g, %g", tr, rf)
			}
			var gotT, gotR float64
			for _, f := range d.Wavefronts {
				if f.T0 > 0 && f.T0 < d.Travel[0]*1.0001 {
					if f.Section == 1 {
						gotT = f.Coefficient
					} else {
						gotR = f.Coefficient
					}
				}
			}
			if math.Abs(gotT-tr) > latTol || math.Abs(gotR-rf) > latTol {
				t.Errorf("lattice coefficients t %.12f r %.12f, want %.12f %.12f", gotT, gotR, tr, rf)
			}
			ber, err := Bergeron(n, e, BergeronOptions{})
			if err != nil {
				t.Fatal(err)
			}
			lap, err := Laplace(n, e, LaplaceOptions{})
			if err != nil {
				t.Fatal(err)
			}
			want := z1 / (rs + z1) * tr
			// a moment inside the plateau: after τ1, before the echo from the far end
			// (τ1 + 2τ2) and before the source's echo (3τ1)
			tau1, tau2 := d.Travel[0], d.Travel[1]
			tm := tau1 + 0.5*math.Min(2*tau2, 2*tau1)
			for _, w := range []*Waveform{lat, ber, lap} {
				if len(w.Junctions) != 1 || w.Junctions[0].X != c.l1 || w.Junctions[0].Name != "first / second" {
					t.Fatalf("%s: junctions %+v", w.Method, w.Junctions)
				}
				tol := map[string]float64{"lattice": latTol, "bergeron": berTol, "laplace": laplaceTol}[w.Method]
				if got := at(w.Junctions[0].V, w.Step, tm); math.Abs(got-want) > tol {
					t.Errorf("%s: junction voltage %.9f at %.4g ms, want Z1/(Rs+Z1)·2Z2/(Z1+Z2) = %.9f", w.Method, got, tm*1e3, want)
				}
				if got := at(w.Junctions[0].V, w.Step, tau1*0.9); math.Abs(got) > tol {
					t.Errorf("%s: junction voltage %.9f before the first arrival", w.Method, got)
				}
			}
		})
	}
}

// The first arrival at the open end through one junction, in closed form: the wave
// Z1/(Rs+Z1) launched into the first section, transmitted by 2·Z2/(Z1+Z2) and doubled
// at the open end, arriving at τ1 + τ2 (Bewley 1933, ch. 3; textbook), by every
// method.
func TestFirstArrivalThroughJunction(t *testing.T) {
	t.Parallel()
	const latTol, berTol = 1e-12, 1e-9
	rs := 60.0
	n := twoSections(rs, secOverhead, secCable, 100e3, 10e3)
	e := stepSettings(1e-3, 1e-6)
	z1, z2 := math.Sqrt(secOverhead.L/secOverhead.C), math.Sqrt(secCable.L/secCable.C)
	tau1, tau2 := 100e3*math.Sqrt(secOverhead.L*secOverhead.C), 10e3*math.Sqrt(secCable.L*secCable.C)
	want := 2 * z1 / (rs + z1) * 2 * z2 / (z1 + z2)
	lat, ber, lap, _ := threeMethods(t, n, e)
	for _, w := range []*Waveform{lat, ber, lap} {
		tol := map[string]float64{"lattice": latTol, "bergeron": berTol, "laplace": laplaceTol}[w.Method]
		// before the arrival, and on the plateau up to the first cable echo (τ1 + 3τ2)
		if got := at(w.Receiving, w.Step, (tau1+tau2)*0.95); math.Abs(got) > tol {
			t.Errorf("%s: open end %.9f before the first arrival", w.Method, got)
		}
		if got := at(w.Receiving, w.Step, tau1+2*tau2); math.Abs(got-want) > tol {
			t.Errorf("%s: open end %.9f after the first arrival, want 2·Z1/(Rs+Z1)·2Z2/(Z1+Z2) = %.9f", w.Method, got, want)
		}
	}
}

// Lattice, Bergeron and Laplace agree on a lossless two-section line with a
// resistive source, at both ends and at the junction, away from wavefronts (design
// rule: lattice = Bergeron = Laplace where their assumptions overlap).
func TestMethodsAgreeTwoSections(t *testing.T) {
	t.Parallel()
	const berTol = 1e-9 // whole-step travel times: Bergeron exact on the lossless line
	n := twoSections(50, secOverhead, secCable, 100e3, 10e3)
	for _, e := range []Energisation{
		stepSettings(8e-3, 1e-6),
		{Excitation: Sine, Omega: testOmega, CloseDeg: 60, TrappedPU: -0.5, Duration: 8e-3, TimeStep: 1e-6},
	} {
		t.Run(e.Excitation.String(), func(t *testing.T) {
			t.Parallel()
			lat, ber, lap, d := threeMethods(t, n, e)
			// samples within a few steps of a front passing the compared point
			near := func(x float64) map[int]bool {
				m := map[int]bool{}
				for _, f := range d.Wavefronts {
					lo, hi := math.Min(f.X0, f.X1), math.Max(f.X0, f.X1)
					if x < lo-1 || x > hi+1 {
						continue
					}
					tt := f.T0 + math.Abs(x-f.X0)/(hi-lo)*(f.T1-f.T0)
					k := int(math.Round(tt / e.TimeStep))
					for j := k - 3*frontGapSteps; j <= k+3*frontGapSteps; j++ {
						m[j] = true
					}
				}
				return m
			}
			pts := []struct {
				name       string
				x          float64
				l, b, lapv []float64
			}{
				{"sending", 0, lat.Sending, ber.Sending, lap.Sending},
				{"receiving", d.Length, lat.Receiving, ber.Receiving, lap.Receiving},
				{"junction", d.Junctions[1], lat.Junctions[0].V, ber.Junctions[0].V, lap.Junctions[0].V},
			}
			for _, p := range pts {
				skip := near(p.x)
				compared := 0
				for k := range p.l {
					if math.Abs(p.b[k]-p.l[k]) > berTol && !skip[k] {
						t.Fatalf("%s t = %.4g ms: bergeron %.9f, lattice %.9f", p.name, float64(k)*e.TimeStep*1e3, p.b[k], p.l[k])
					}
					if skip[k] {
						continue
					}
					compared++
					if math.Abs(p.lapv[k]-p.l[k]) > laplaceTol {
						t.Fatalf("%s t = %.4g ms: laplace %.6f, lattice %.6f", p.name, float64(k)*e.TimeStep*1e3, p.lapv[k], p.l[k])
					}
				}
				if compared < len(p.l)/5 {
					t.Fatalf("%s: only %d of %d samples clear of wavefronts", p.name, compared, len(p.l))
				}
			}
		})
	}
}

// A section split into two identical halves gives the same waveforms as the unsplit
// line, by every method (to rounding: an identity of the cascade).
func TestSplitSectionSameWaveforms(t *testing.T) {
	t.Parallel()
	// lattice and Bergeron: the same arithmetic up to the order of sums; Laplace:
	// the cascade product against the single section's closed form, relative
	// rounding of 1e-12 on spectra of order 1, amplified by the damping e^{ct} <= N
	const tol = 1e-8
	line := propagation.RLGC{R: 0.03e-3, L: testL, C: testC}
	whole := freqscan.Network{Source: freqscan.Source{R: 40}, Line: propagation.Cascade{{Length: 240e3, Constants: line}}}.Energising()
	split := freqscan.Network{Source: freqscan.Source{R: 40}, Line: propagation.Cascade{{Length: 120e3, Constants: line}, {Length: 120e3, Constants: line}}}.Energising()
	e := stepSettings(6e-3, 0)
	for _, m := range []string{"lattice", "bergeron", "laplace"} {
		t.Run(m, func(t *testing.T) {
			t.Parallel()
			run := func(n freqscan.Network) *Waveform {
				var w *Waveform
				var err error
				switch m {
				case "lattice":
					w, _, err = Lattice(n, e, LatticeOptions{AttenuationHz: 300})
				case "bergeron":
					w, err = Bergeron(n, e, BergeronOptions{LumpedResistance: true})
				default:
					w, err = Laplace(n, e, LaplaceOptions{})
				}
				if err != nil {
					t.Fatal(err)
				}
				return w
			}
			a, b := run(whole), run(split)
			if len(a.Receiving) != len(b.Receiving) || len(b.Junctions) != 1 {
				t.Fatalf("lengths %d %d, junctions %d", len(a.Receiving), len(b.Receiving), len(b.Junctions))
			}
			for k := range a.Receiving {
				if d := math.Max(math.Abs(a.Receiving[k]-b.Receiving[k]), math.Abs(a.Sending[k]-b.Sending[k])); d > tol {
					t.Fatalf("t = %.4g ms: whole %.12f/%.12f, split %.12f/%.12f", a.Time(k)*1e3, a.Sending[k], a.Receiving[k], b.Sending[k], b.Receiving[k])
				}
			}
			if a.Middle != nil {
				for k := range a.Middle {
					if d := math.Abs(a.Middle[k] - b.Junctions[0].V[k]); d > tol {
						t.Fatalf("t = %.4g ms: mid-line %.12f, junction %.12f", a.Time(k)*1e3, a.Middle[k], b.Junctions[0].V[k])
					}
				}
			}
		})
	}
}

func ExampleLattice_junction() {
	// 100 km of overhead line (Zc 294 ohm) then 10 km of cable (Zc 40 ohm), closed
	// onto a 1 pu step through 30 ohm.
	n := freqscan.Network{Source: freqscan.Source{R: 30}, Line: propagation.Cascade{
		{Name: "overhead", Length: 100e3, Constants: propagation.RLGC{L: 1e-6, C: 11.56e-12}},
		{Name: "cable", Length: 10e3, Constants: propagation.RLGC{L: 0.4e-6, C: 250e-12}},
	}}.Energising()
	w, _, err := Lattice(n, Energisation{Excitation: Step, Omega: 2 * math.Pi * 50, Duration: 2e-3, TimeStep: 1e-6}, LatticeOptions{})
	if err != nil {
		fmt.Println(err)
		return
	}
	j := w.Junctions[0]
	pk, k := Peak(j.V)
	// 0.217 = Z1/(Rs+Z1)·2Z2/(Z1+Z2) = 0.9074·0.2394, the first transmitted wave
	fmt.Printf("junction %s at %.0f km: %.3f pu at 0.4 ms, peak %.3f pu at %.3f ms\n", j.Name, j.X/1e3, j.V[400], pk, w.Time(k)*1e3)
	// Output:
	// junction overhead / cable at 100 km: 0.217 pu at 0.4 ms, peak 1.846 pu at 1.740 ms
}

// An overhead line with a cable crossing (R-L source, line-connected receiving
// reactor) by the numerical Laplace transform and by Bergeron, at both ends and at
// both junctions, against ngspice-39 (Debian) with its LTRA lossy lines, waveforms
// regenerated by testdata/ngspice/gen_energise_sections.sh. Acceptance as for the
// single line (TestLaplaceAgainstNgspice), for both methods: peak within 1 %,
// waveform within 0.02 pu rms (Bergeron lumps the resistance at the pieces' ends,
// which the lines' R·l of at most 5 ohm against Zc of 44 to 274 ohm allows).
func TestSectionsAgainstNgspice(t *testing.T) {
	t.Parallel()
	ver, err := os.ReadFile("../testdata/ngspice/ngspice_version.txt")
	if err != nil || !strings.Contains(string(ver), "ngspice-39") {
		t.Fatalf("reference tables not made by ngspice-39: %q %v", ver, err)
	}
	f, err := os.Open("../testdata/ngspice/energise_sections.csv")
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	var ref [5][]float64 // t, sending, junction 1, junction 2, receiving
	sc := bufio.NewScanner(f)
	sc.Scan() // header
	for sc.Scan() {
		for i, s := range strings.Split(sc.Text(), ",") {
			v, err := strconv.ParseFloat(s, 64)
			if err != nil {
				t.Fatal(err)
			}
			ref[i] = append(ref[i], v)
		}
	}
	oh := propagation.RLGC{R: 0.028e-3, L: 0.93e-6, C: 12.4e-12}
	n := freqscan.Network{
		Source: freqscan.Source{R: 0.8858, L: 33.84e-3},
		Line: propagation.Cascade{
			{Name: "overhead", Length: 172e3, Constants: oh},
			{Name: "cable", Length: 8e3, Constants: propagation.RLGC{R: 0.012e-3, L: 0.42e-6, C: 220e-12}},
			{Name: "overhead", Length: 14e3, Constants: oh},
		},
		Shunts: []freqscan.Shunt{{End: freqscan.Receiving, OnLine: true, R: 3.8095, L: 4.2441}},
	}.Energising()
	e := stepSettings(20e-3, 10e-6)
	lap, err := Laplace(n, e, LaplaceOptions{})
	if err != nil {
		t.Fatal(err)
	}
	eb := e
	eb.TimeStep = 0.5e-6 // Bergeron on a fine step, compared every 10 µs
	ber, err := Bergeron(n, eb, BergeronOptions{LumpedResistance: true})
	if err != nil {
		t.Fatal(err)
	}
	for _, c := range []struct {
		w               *Waveform
		every           int
		rmsTol, peakTol float64
	}{{lap, 1, 0.02, 0.01}, {ber, 20, 0.02, 0.01}} {
		w := c.w
		if len(w.Junctions) != 2 {
			t.Fatalf("%s: %d junctions", w.Method, len(w.Junctions))
		}
		for i, got := range [][]float64{w.Sending, w.Junctions[0].V, w.Junctions[1].V, w.Receiving} {
			want := ref[i+1]
			var sum float64
			sub := make([]float64, len(want))
			for k := range want {
				sub[k] = got[k*c.every]
				d := sub[k] - want[k]
				sum += d * d
			}
			rms := math.Sqrt(sum / float64(len(want)))
			pg, _ := Peak(sub)
			pw, _ := Peak(want)
			t.Logf("%s, node %d: rms difference %.4g pu, peak %.5f, ngspice %.5f", w.Method, i, rms, pg, pw)
			if rms > c.rmsTol || math.Abs(pg-pw) > c.peakTol*math.Abs(pw) {
				t.Errorf("%s, node %d: rms difference %.4g pu (tol %g), peak %.5f against ngspice %.5f", w.Method, i, rms, c.rmsTol, pg, pw)
			}
		}
	}
}
