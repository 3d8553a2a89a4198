package report

import (
	"bytes"
	"math"
	"testing"

	"gonum.org/v1/plot/vg"
)

// TestScanPlots renders both scan plots, with an unbounded peak and a gain that
// underflows to zero, in both formats.
func TestScanPlots(t *testing.T) {
	t.Parallel()
	var s ScanSeries
	for i := 0; i <= 200; i++ {
		h := 0.1 + float64(i)*0.25
		s.Harmonic = append(s.Harmonic, h)
		s.Gain = append(s.Gain, 1/math.Abs(math.Cos(h*math.Pi/7)))
	}
	s.Gain[10], s.Gain[11] = math.Inf(1), 0
	d := ScanPlotData{Title: "t", Series: []ScanSeries{s}, Watch: []int{3, 5, 7}, WatchBand: 0.1, GainLimit: 2,
		Peaks: []ScanPeak{{Harmonic: 3.5, Unbounded: true}, {Harmonic: 10.5, Gain: 40}}}
	p, err := ScanPlot(d)
	if err != nil {
		t.Fatal(err)
	}
	for _, f := range []string{"png", "svg"} {
		b, err := RenderPlot(p, 20*vg.Centimeter, 12*vg.Centimeter, f)
		if err != nil || len(b) < 1000 {
			t.Fatalf("%s: %v (%d bytes)", f, err, len(b))
		}
		if f == "svg" && !bytes.Contains(b, []byte("unbounded")) {
			t.Error("the unbounded peak is not labelled")
		}
	}
	m := ScanMapData{Title: "m", Harmonic: []float64{1, 2, 3}, ShortCircuit: []float64{1000, 10000},
		Gain: [][]float64{{1, 5, 50}, {0.5, 2, 3}}, FirstHarmonic: []float64{2, 2.5}, StudyMVA: 5000, Watch: []int{2}}
	mp, err := ScanMapPlot(m)
	if err != nil {
		t.Fatal(err)
	}
	if b, err := RenderPlot(mp, 20*vg.Centimeter, 12*vg.Centimeter, "png"); err != nil || len(b) < 1000 {
		t.Fatalf("map: %v", err)
	}
	if _, err := ScanPlot(ScanPlotData{}); err == nil {
		t.Error("empty scan plot: no error")
	}
	if _, err := ScanMapPlot(ScanMapData{}); err == nil {
		t.Error("empty map: no error")
	}
}

// TestGainBins: the map's colour classes cover every gain, in order.
func TestGainBins(t *testing.T) {
	t.Parallel()
	for _, tc := range []struct {
		g    float64
		want int
	}{{0, 0}, {0.99, 0}, {1, 1}, {1.99, 2}, {2, 3}, {7, 4}, {29, 5}, {1e9, 6}, {math.Inf(1), 6}} {
		if got := binOf(tc.g); got != tc.want {
			t.Errorf("binOf(%g) = %d, want %d", tc.g, got, tc.want)
		}
	}
}
