package waves

import (
	"errors"
	"math"
	"strings"
	"testing"
)

// The interpolated characteristic passes through its table points, is odd, strictly
// increasing, and voltageAt inverts it.
func TestArresterCurve(t *testing.T) {
	t.Parallel()
	const tol = 1e-12 // exp/log round trips
	vi := TypicalArrester(336e3)
	c, err := newArresterCurve(vi)
	if err != nil {
		t.Fatal(err)
	}
	for _, p := range vi {
		i, _ := c.current(p.Voltage)
		if math.Abs(i-p.Current) > tol*p.Current*100 {
			t.Errorf("i(%g V) = %g A, table %g A", p.Voltage, i, p.Current)
		}
		if v := c.voltageAt(p.Current); math.Abs(v-p.Voltage) > tol*p.Voltage*100 {
			t.Errorf("v(%g A) = %g V, table %g V", p.Current, v, p.Voltage)
		}
		in, _ := c.current(-p.Voltage)
		if in != -i {
			t.Errorf("not odd at %g V", p.Voltage)
		}
	}
	prev := 0.0
	for v := 100e3; v < 1.2e6; v += 5e3 {
		i, di := c.current(v)
		if !(i > prev) || !(di > 0) {
			t.Fatalf("not increasing at %g V", v)
		}
		// derivative against a central difference, 1e-4 relative (second-order error
		// within a segment)
		h := v * 1e-7
		ip, _ := c.current(v + h)
		im, _ := c.current(v - h)
		if fd := (ip - im) / (2 * h); math.Abs(fd-di) > 1e-4*di && !nearKnot(c, v, h) {
			t.Fatalf("di/dv %g, finite difference %g at %g V", di, fd, v)
		}
		prev = i
	}
	// Typical 336 kV station-class arrester: switching residual about 700-760 kV at
	// 1 kA, lightning residual about 800-880 kV at 10 kA (manufacturers' data; from memory).
	if v := c.voltageAt(1000); v < 690e3 || v > 760e3 {
		t.Errorf("1 kA residual %.0f kV", v/1e3)
	}
	if v := c.voltageAt(10000); v < 800e3 || v > 880e3 {
		t.Errorf("10 kA residual %.0f kV", v/1e3)
	}
	for _, bad := range [][]VIPoint{{{1, 1}}, {{1, 2}, {2, 1}}, {{0, 1}, {1, 2}}} {
		if _, err := newArresterCurve(bad); err == nil {
			t.Errorf("bad table %v accepted", bad)
		}
	}
}

func nearKnot(c *arresterCurve, v, h float64) bool {
	for _, lv := range c.logV {
		if math.Abs(math.Exp(lv)-v) <= 2*h {
			return true
		}
	}
	return false
}

// Newton's method on the arrester equation v = v_lin − Zth·i(v) moves ln v by about
// 1/α per iteration on the steep side of a power law i ∝ v^α, so a near-ideal clamp
// (α in the thousands) driven well above its knee cannot converge within the
// iteration cap: the step must fail with ErrNoConvergence instead of keeping a
// voltage whose residual is far from zero. A typical metal-oxide curve (α ≤ 40 or
// so) converges on the same circuit.
func TestArresterNoConvergenceIsAnError(t *testing.T) {
	t.Parallel()
	// A clamp at 0.6 pu of the EMF crest: 1 A at 0.6 pu, 2 A at 0.6 pu + 0.03 %,
	// α = ln 2 / ln 1.0003 ≈ 2300; closing at the crest drives the far end well
	// above the knee in the first steps.
	steep := []VIPoint{{1, 0.6 * swEMF}, {2, 0.6 * swEMF * 1.0003}}
	cases := []struct {
		name    string
		vi      []VIPoint
		failing bool
	}{
		{"typical metal-oxide converges", TypicalArrester(336e3), false},
		{"near-ideal clamp does not converge", steep, true},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			t.Parallel()
			r, l := swSource()
			tp, _ := swThreePhase(320, 0.025, 0.25, r, l)
			tp.Arresters = []Arrester{{Name: "receiving", At: 1, VI: c.vi}}
			s := SwitchingSettings{Shots: 3, Seed: 1, HasCloseDeg: true, CloseDeg: 90, Duration: 0.005}
			res, err := Switching(tp, s, nil)
			if !c.failing {
				if err != nil {
					t.Fatal(err)
				}
				if len(res.Shots) != 3 {
					t.Fatalf("%d shots, want 3", len(res.Shots))
				}
				return
			}
			if !errors.Is(err, ErrNoConvergence) {
				t.Fatalf("error %v, want one wrapping ErrNoConvergence", err)
			}
			t.Log(err)
			for _, want := range []string{"shot 1", "at t = ", "ms"} {
				if !strings.Contains(err.Error(), want) {
					t.Errorf("error %q does not name %q", err, want)
				}
			}
			sim, err := NewSwitchingSimulator(tp, s)
			if err != nil {
				t.Fatal(err)
			}
			if _, _, err := sim.Shot(ShotSpec{CloseDeg: 90}, true); !errors.Is(err, ErrNoConvergence) {
				t.Errorf("Shot: error %v, want one wrapping ErrNoConvergence", err)
			}
		})
	}
}
