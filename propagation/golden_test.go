package propagation

import (
	"math"
	"testing"
)

// GoldenMax finds the maximum of unimodal functions to the bracket width asked for,
// and narrows the bracket by the golden ratio each step (Kiefer 1953: after n steps the
// bracket is (0.618...)^n of the first one; from memory).
func TestGoldenMax(t *testing.T) {
	t.Parallel()
	for _, tc := range []struct {
		name string
		f    func(float64) float64
		a, b float64
		want float64
	}{
		{"parabola", func(x float64) float64 { return -(x - 0.3) * (x - 0.3) }, -1, 2, 0.3},
		{"kink", func(x float64) float64 { return -math.Abs(x - 0.2) }, -1, 0.5, 0.2},
		{"resonance", func(f float64) float64 { return 1 / math.Hypot(1-f*f, 0.01*f) }, 0.5, 1.5, math.Sqrt(1 - 0.01*0.01/2)},
		{"edge maximum", func(x float64) float64 { return x }, 0, 1, 1},
	} {
		const tol = 1e-10
		x, fx := GoldenMax(tc.f, tc.a, tc.b, func(a, b float64) bool { return b-a <= tol }, 200)
		if math.Abs(x-tc.want) > 2*tol || fx != tc.f(x) {
			t.Errorf("%s: x = %.12g (f %.12g), want %.12g", tc.name, x, fx, tc.want)
		}
	}
	// The bracket after n steps is invPhi^n of the first (counting the calls of stop).
	steps := 0
	GoldenMax(math.Sin, 0, math.Pi, func(a, b float64) bool {
		want := math.Pi * math.Pow(0.6180339887498949, float64(steps))
		if math.Abs((b-a)-want) > 1e-12 {
			t.Errorf("step %d: bracket %g, want %g", steps, b-a, want)
		}
		steps++
		return false
	}, 20)
	if steps != 20 {
		t.Errorf("%d steps, want maxIter = 20", steps)
	}
}
