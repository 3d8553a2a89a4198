package waves

import (
	"math"
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
