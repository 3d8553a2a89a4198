package report

import (
	"fmt"
	"math"
	"strings"
	"testing"

	"gonum.org/v1/plot/vg"

	"github.com/telegrapher/telegrapher/freqscan"
	"github.com/telegrapher/telegrapher/propagation"
	"github.com/telegrapher/telegrapher/waves"
)

// energiseFixture: a 300 km line (Zc = 281.4 ohm) closed through 100 ohm onto a step,
// and a two-section line (overhead + cable), by the lattice diagram.
func energiseFixture(t *testing.T, sections bool) (*waves.Waveform, *waves.LatticeDiagram) {
	t.Helper()
	line := propagation.Cascade{{Length: 300e3, Constants: propagation.RLGC{L: 0.95e-6, C: 12e-12}}}
	if sections {
		line = propagation.Cascade{
			{Name: "overhead", Length: 120e3, Constants: propagation.RLGC{L: 0.95e-6, C: 12e-12}},
			{Name: "cable", Length: 20e3, Constants: propagation.RLGC{L: 0.4e-6, C: 210e-12}},
		}
	}
	n := freqscan.Network{Source: freqscan.Source{R: 100}, Line: line}.Energising()
	w, d, err := waves.Lattice(n, waves.Energisation{Omega: 2 * math.Pi * 50, Duration: 10e-3}, waves.LatticeOptions{})
	if err != nil {
		t.Fatal(err)
	}
	return w, d
}

// The plots render in both formats and carry their labels: the peak, the wavefront
// amplitudes (the first launched wave Zc/(Rs+Zc) = 0.738 pu), the ends.
func TestEnergisePlots(t *testing.T) {
	t.Parallel()
	w, d := energiseFixture(t, false)
	tms := make([]float64, len(w.Receiving))
	for k := range tms {
		tms[k] = w.Time(k) * 1e3
	}
	pk, k := waves.Peak(w.Receiving)
	p, err := EnergisePlot(EnergisePlotData{Title: "test", BaseKV: 326.6, PeakTMs: tms[k], PeakPU: pk,
		Traces: []EnergiseTrace{{Name: "receiving end", TMs: tms, V: w.Receiving, Bold: true}, {Name: "sending end", TMs: tms, V: w.Sending}}})
	if err != nil {
		t.Fatal(err)
	}
	svg, err := RenderPlot(p, 8*vg.Inch, 5*vg.Inch, "svg")
	if err != nil {
		t.Fatal(err)
	}
	if !strings.Contains(string(svg), "peak +1.476 pu") {
		t.Errorf("waveform plot lacks the peak label")
	}
	for _, sections := range []bool{false, true} {
		_, d2 := energiseFixture(t, sections)
		if !sections {
			d2 = d
		}
		lp, err := LatticePlot(LatticePlotData{Title: "lattice", Diagram: d2, Sections: []string{"overhead", "cable"}})
		if err != nil {
			t.Fatal(err)
		}
		for _, format := range []string{"svg", "png"} {
			b, err := RenderPlot(lp, 9*vg.Inch, 7*vg.Inch, format)
			if err != nil || len(b) < 1000 {
				t.Fatalf("%s: %v (%d bytes)", format, err, len(b))
			}
			if format == "svg" {
				for _, want := range []string{"open end", "source", "+0.738"} {
					if !sections && !strings.Contains(string(b), want) {
						t.Errorf("lattice plot lacks %q", want)
					}
				}
				// The junction's coefficients for a wave from the overhead side,
				// 2·Z2/(Z1+Z2) and (Z2−Z1)/(Z1+Z2) (Bewley 1933, ch. 3; textbook),
				// from the fixture's constants; the 20 km cable is widened.
				z1, z2 := math.Sqrt(0.95e-6/12e-12), math.Sqrt(0.4e-6/210e-12)
				coef := fmt.Sprintf("t %.3f  r %+.3f", 2*z2/(z1+z2), (z2-z1)/(z1+z2))
				for _, want := range []string{"junction 1, 120 km", coef, "not to scale"} {
					if sections && !strings.Contains(string(b), want) {
						t.Errorf("sectioned lattice plot lacks %q", want)
					}
				}
			}
		}
	}
	// Waveforms longer than the cap are reduced keeping their extremes.
	x := make([]float64, 100000)
	y := make([]float64, len(x))
	for i := range x {
		x[i], y[i] = float64(i), math.Sin(float64(i)/500)
	}
	y[77777] = 9
	pts := reduceMinMax(x, y, maxPlotPoints)
	var top float64
	for _, q := range pts {
		top = math.Max(top, q.Y)
	}
	if len(pts) > maxPlotPoints+2 || top != 9 {
		t.Errorf("reduced to %d points, max %g", len(pts), top)
	}
}
