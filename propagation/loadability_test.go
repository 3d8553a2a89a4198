package propagation

import (
	"math"
	"testing"
)

// A 345 kV, 60 Hz line of the kind the published curve was drawn for: Zc = 300 ohm,
// propagation at 2.98e5 km/s, lossless (the paper neglects losses), 50 kA terminals.
func paperLine() (Cascade, float64, float64) {
	const zc, vel = 300.0, 2.98e8
	return Cascade{{Length: 1e3, Constants: RLGC{L: zc / vel, C: 1 / (zc * vel)}}}, 2 * math.Pi * 60, 345e3
}

func TestLoadabilityPublishedCurve(t *testing.T) {
	t.Parallel()
	// Reading a published curve off memory, and the paper's terminal systems and line
	// data only approximately known: agreement within 10 % is what can be asked.
	const curveTol = 0.10
	line, omega, v := paperLine()
	lim := DefaultLoadabilityLimits(v)
	for _, tc := range []struct {
		km      float64
		sil     float64
		which   string // "combined", "stability"
		comment string
	}{
		// St. Clair (1953) / Dunlop, Gutman, Marchenko (1979), loadability curve; from memory.
		{80, 3.0, "combined", "about 3 SIL at 80 km (50 mi), voltage drop governs"},
		{600, 1.0, "combined", "about 1 SIL at 600 km, stability governs"},
		// Dunlop et al. (1979): beyond about 300 km the 30 % stability margin governs,
		// at about 1.6-1.7 SIL near 300 km; from memory.
		{300, 1.65, "stability", "stability limit near 300 km"},
	} {
		pts, err := LoadabilityCurve(line, omega, v, lim, []float64{tc.km * 1e3})
		if err != nil {
			t.Fatal(err)
		}
		pt := pts[0]
		got := pt.Loadability / pt.SIL
		if tc.which == "stability" {
			got = pt.Stability / pt.SIL
		}
		if math.Abs(got-tc.sil) > curveTol*tc.sil {
			t.Errorf("%g km (%s): %s %.3f SIL, published about %.2f", tc.km, tc.comment, tc.which, got, tc.sil)
		}
	}
}

func TestLoadabilityIdentities(t *testing.T) {
	t.Parallel()
	line, omega, v := paperLine()
	lim := DefaultLoadabilityLimits(v)
	lengths := []float64{50e3, 100e3, 200e3, 400e3, 800e3, 1000e3}
	pts, err := LoadabilityCurve(line, omega, v, lim, lengths)
	if err != nil {
		t.Fatal(err)
	}
	for i, pt := range pts {
		// Lossless system: a 30 % margin is sin θ = 0.7 across the whole system.
		if want := math.Asin(0.7); math.Abs(pt.SystemAngle-want) > 1e-6 {
			t.Errorf("%g km: system angle %g°, want %g°", pt.Length/1e3, pt.SystemAngle*180/math.Pi, want*180/math.Pi)
		}
		// The paper: the line itself takes 35° to 44° of it.
		if deg := pt.LineAngle * 180 / math.Pi; deg < 30 || deg > 44.5 {
			t.Errorf("%g km: line angle %g°", pt.Length/1e3, deg)
		}
		// Unity power factor at 0.95 pu, lossless: P = Vr·sqrt(V² - cos²βl·Vr²)/(Zc sin βl).
		bl := omega * math.Sqrt(line[0].Constants.(RLGC).L*line[0].Constants.(RLGC).C) * pt.Length
		vr := 0.95 * v
		want := vr * math.Sqrt(v*v-math.Pow(math.Cos(bl)*vr, 2)) / (300 * math.Sin(bl))
		if math.Abs(pt.VoltageDrop-want) > 1e-9*pt.SIL {
			t.Errorf("%g km: voltage-drop limit %g, closed form %g", pt.Length/1e3, pt.VoltageDrop, want)
		}
		if i > 0 && !(pt.Loadability < pts[i-1].Loadability) {
			t.Errorf("loadability does not fall with length at %g km", pt.Length/1e3)
		}
	}
	// Stronger terminal systems can only raise the stability limit.
	strong := lim
	strong.Zs, strong.Zr = lim.Zs/4, lim.Zr/4
	for _, l := range lengths {
		a, _ := LoadabilityCurve(line, omega, v, lim, []float64{l})
		b, _ := LoadabilityCurve(line, omega, v, strong, []float64{l})
		if !(b[0].Stability > a[0].Stability) {
			t.Errorf("%g km: stronger terminals give %g <= %g", l/1e3, b[0].Stability, a[0].Stability)
		}
	}
}

// A conductor rating caps the loadability of short lines and leaves long ones to the
// other limits: the thermal limit does not depend on length (Dunlop, Gutman and
// Marchenko 1979: thermal governs below about 80 km; Kundur 1994, §6.1.12).
func TestLoadabilityThermalLimit(t *testing.T) {
	t.Parallel()
	line, omega, v := paperLine()
	lim := DefaultLoadabilityLimits(v)
	sil := SurgeImpedanceLoading(line, v, omega)
	lim.Thermal = 2 * sil // a rating of 2 SIL
	pts, err := LoadabilityCurve(line, omega, v, lim, []float64{40e3, 80e3, 600e3})
	if err != nil {
		t.Fatal(err)
	}
	short, mid, long := pts[0], pts[1], pts[2]
	if short.Governs != "thermal" || short.Loadability != lim.Thermal || short.Thermal != lim.Thermal {
		t.Errorf("40 km: %s governs at %.3f SIL, want the thermal limit at 2 SIL", short.Governs, short.Loadability/short.SIL)
	}
	if mid.Governs != "thermal" || mid.Loadability != lim.Thermal {
		t.Errorf("80 km (about 3 SIL without a rating): %s governs at %.3f SIL, want thermal at 2", mid.Governs, mid.Loadability/mid.SIL)
	}
	if long.Governs == "thermal" || long.Loadability != math.Min(long.VoltageDrop, long.Stability) {
		t.Errorf("600 km: %s governs at %.3f SIL, want the smaller of voltage drop and stability", long.Governs, long.Loadability/long.SIL)
	}
}
