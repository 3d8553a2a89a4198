package report

import (
	"bytes"
	"math"
	"testing"

	"gonum.org/v1/plot/vg"
)

// The builders render in both formats, with their limits marked; a normal sample plots
// as a straight line on the probit scale (identity of the plotting scale).
func TestSwitchingPlotsRender(t *testing.T) {
	t.Parallel()
	var peaks []float64
	for k := 0; k < 300; k++ {
		// deterministic pseudo-normal sample from a quantile grid
		z := math.Sqrt2 * math.Erfinv(2*(float64(k)+0.5)/300-1)
		peaks = append(peaks, 2+0.2*z)
	}
	s := SwitchingSample{Label: "test", Peaks: peaks, U2: 2.41, Ut: 2.76, Mean: 2, Sigma: 0.2}
	dist := SwitchingDistributionPlot([]SwitchingSample{s}, "")
	tm := make([]float64, 500)
	var ph [3][]float64
	for i := range tm {
		tm[i] = float64(i) * 0.04
		for k := 0; k < 3; k++ {
			ph[k] = append(ph[k], 2*math.Sin(2*math.Pi*50*tm[i]/1e3-float64(k)*2*math.Pi/3))
		}
	}
	wave := SwitchingWaveformPlot(tm, ph, [3]float64{0, 1, 2}, 2, "")
	for _, format := range []string{"png", "svg"} {
		b, err := RenderStacked(nil, 10*vg.Centimeter, 8*vg.Centimeter, format)
		if err == nil || b != nil {
			t.Errorf("%s: empty figure rendered", format)
		}
		b, err = RenderPlot(dist, 16*vg.Centimeter, 10*vg.Centimeter, format)
		if err != nil || len(b) < 1000 {
			t.Errorf("%s distribution: %v (%d bytes)", format, err, len(b))
		}
		b, err = RenderPlot(wave, 16*vg.Centimeter, 10*vg.Centimeter, format)
		if err != nil || len(b) < 1000 {
			t.Errorf("%s waveforms: %v (%d bytes)", format, err, len(b))
		}
		if format == "svg" && !bytes.Contains(b, []byte("phase a")) {
			t.Error("waveform legend lacks phase a")
		}
	}
	if dist.Y.Min > -2.5 || dist.Y.Max < 2.054 {
		t.Errorf("probability axis %g..%g does not show the 2 %% level", dist.Y.Min, dist.Y.Max)
	}
}
