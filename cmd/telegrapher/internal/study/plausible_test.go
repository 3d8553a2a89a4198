package study

import (
	"errors"
	"fmt"
	"os"
	"strings"
	"testing"
)

// TestFasterThanLight: per-length constants whose wave velocity 1/sqrt(LC) exceeds
// the speed of light are refused, naming the key most likely wrong with the velocity
// in the message (issue 15, item 3). A unit slip is the usual cause: a uF/km value in
// the nF/km key, an H/km value in the mH/km key.
func TestFasterThanLight(t *testing.T) {
	t.Parallel()
	sections := func(third string) string {
		return "frequency_hz = 50\nvoltage_kv = 400\n" +
			"[[line.sections]]\nlength_km = 10\nr_ohm_per_km = 0.03\nl_mh_per_km = 0.95\nc_nf_per_km = 12\n" +
			"[[line.sections]]\nname = \"cable\"\nlength_km = 5\nr_ohm_per_km = 0.02\nl_mh_per_km = 0.4\nc_nf_per_km = 210\n" +
			"[[line.sections]]\nlength_km = 10\nr_ohm_per_km = 0.03\n" + third
	}
	for _, c := range []struct {
		name, src, key, speed string // speed: the velocity as the message writes it, in c
	}{
		// 1/sqrt(0.95e-6 H/m · 0.0089e-12 F/m) = 1.0875e10 m/s = 36.28 c (hand calculation)
		{"uF in the nF key", replace("c_nf_per_km", "c_nf_per_km = 0.0089"), "line.c_nf_per_km", "36.28 c"},
		// 1/sqrt(0.95e-9 · 12e-12) = 9.366e9 m/s = 31.24 c
		{"H in the mH key", replace("l_mh_per_km", "l_mh_per_km = 0.00095"), "line.l_mh_per_km", "31.24 c"},
		// 0.95 mH/km with 8.9 nF/km: 1/sqrt(8.455e-18) = 3.439e8 m/s = 1.147 c
		{"just faster", replace("c_nf_per_km", "c_nf_per_km = 8.9"), "line.c_nf_per_km", "1.147 c"},
		// b = ωC: 3.77 uS/km at 50 Hz is 12 nF/km; 0.00377 is 0.012 nF/km: 31.24 c
		{"susceptance form", replace("c_nf_per_km", "b_us_per_km = 0.00377"), "line.b_us_per_km", "31.24 c"},
		// x = ωL: 0.000298 ohm/km at 50 Hz is 0.0009486 mH/km: 1/sqrt(9.486e-10 · 12e-12) = 31.26 c
		{"reactance form", replace("l_mh_per_km", "x_ohm_per_km = 0.000298"), "line.x_ohm_per_km", "31.26 c"},
		{"third section", sections("l_mh_per_km = 0.95\nc_nf_per_km = 0.012\n"), "line.sections[2].c_nf_per_km", "31.24 c"},
		// zero sequence: 3 mH/km with 0.0075 nF/km: 1/sqrt(2.25e-20) = 6.667e9 m/s = 22.24 c
		{"zero sequence", base + "r0_ohm_per_km = 0.25\nl0_mh_per_km = 3\nc0_nf_per_km = 0.0075\n", "line.c0_nf_per_km", "22.24 c"},
	} {
		t.Run(c.name, func(t *testing.T) {
			t.Parallel()
			_, err := Parse("s.toml", []byte(c.src))
			var e *Error
			if !errors.As(err, &e) {
				t.Fatalf("accepted (or not a *study.Error): %v", err)
			}
			if e.Key != c.key || !strings.Contains(e.Msg, "faster than light") || !strings.Contains(e.Msg, c.speed) || len(e.Others) != 0 {
				t.Errorf("got %v; want one problem at %s, faster than light at %s", err, c.key, c.speed)
			}
		})
	}
}

// TestPlausibilityWarnings: values far from what overhead lines and cables have are
// warned about (Study.Warnings, each naming the key), values within the usual ranges
// are not (issue 15, item 3; the ranges are common practice, see plausible.go).
func TestPlausibilityWarnings(t *testing.T) {
	t.Parallel()
	sec := func(name, lc string) string {
		return "frequency_hz = 50\nvoltage_kv = 400\n[[line.sections]]\nname = " + fmt.Sprintf("%q", name) + "\nlength_km = 10\nr_ohm_per_km = 0.02\n" + lc
	}
	for _, c := range []struct {
		name, src string
		key       string // "" for no warning
	}{
		// 0.95 mH/km, 12 nF/km: 0.989 c, 281 ohm (hand calculation)
		{"overhead line", base, ""},
		// 0.42 mH/km, 220 nF/km: 0.347 c, 43.7 ohm; a cable, by its name and by its velocity
		{"cable by name", sec("Wend cable", "l_mh_per_km = 0.42\nc_nf_per_km = 220\n"), ""},
		{"cable by velocity", sec("crossing", "l_mh_per_km = 0.42\nc_nf_per_km = 220\n"), ""},
		// 0.95 mH/km, 40 nF/km: 0.541 c, 154 ohm: neither
		{"neither", replace("c_nf_per_km", "c_nf_per_km = 40"), "line.c_nf_per_km"},
		// 9.5 mH/km, 1.2 nF/km: 0.988 c but 2814 ohm, an overhead velocity with an
		// impedance no line has; C is further from an overhead line's (3-20 nF/km)
		{"overhead velocity, huge Zc", strings.Replace(replace("l_mh_per_km", "l_mh_per_km = 9.5"), "c_nf_per_km = 12.0", "c_nf_per_km = 1.2", 1), "line.c_nf_per_km"},
		// named a cable but with overhead constants
		{"named cable, overhead values", sec("river cable", "l_mh_per_km = 0.95\nc_nf_per_km = 12\n"), "line.sections[0].c_nf_per_km"},
		// named overhead with cable constants
		{"named overhead, cable values", sec("overhead A", "l_mh_per_km = 0.42\nc_nf_per_km = 220\n"), "line.sections[0].c_nf_per_km"},
		// zero sequence of an overhead line: 3 mH/km, 7.5 nF/km: 0.667 c, 632 ohm: usual
		{"overhead zero sequence", base + "r0_ohm_per_km = 0.25\nl0_mh_per_km = 3\nc0_nf_per_km = 7.5\n", ""},
		// 3 mH/km, 75 nF/km (ten times): 0.211 c, 200 ohm: far from usual
		{"zero sequence ten times C", base + "r0_ohm_per_km = 0.25\nl0_mh_per_km = 3\nc0_nf_per_km = 75\n", "line.c0_nf_per_km"},
		// the x/b forms are named as given
		{"x and b named", replace("c_nf_per_km", "b_us_per_km = 12.566"), "line.b_us_per_km"},
	} {
		t.Run(c.name, func(t *testing.T) {
			t.Parallel()
			st, err := Parse("s.toml", []byte(c.src))
			if err != nil {
				t.Fatal(err)
			}
			switch {
			case c.key == "" && len(st.Warnings) != 0:
				t.Errorf("warnings %q, want none", st.Warnings)
			case c.key != "" && (len(st.Warnings) != 1 || !strings.HasPrefix(st.Warnings[0], c.key+": ") || !strings.Contains(st.Warnings[0], "common practice")):
				t.Errorf("warnings %q, want one naming %s", st.Warnings, c.key)
			}
		})
	}
}

// TestGeometryNeverRefused: a tower geometry's derived constants are checked at
// frequency_hz too, but a real tower is never refused nor warned about, at any system
// frequency the loader accepts.
func TestGeometryNeverRefused(t *testing.T) {
	t.Parallel()
	data, err := os.ReadFile("../../../../testdata/geometry_tower_400kv.toml")
	if err != nil {
		t.Fatal(err)
	}
	for _, f := range []string{"1", "16.7", "50", "60", "400", "1000", "10000"} {
		src := strings.Replace(string(data), "frequency_hz = 50", "frequency_hz = "+f, 1)
		if src == string(data) && f != "50" {
			t.Fatal("the tower study has no frequency_hz = 50 line to replace")
		}
		st, err := Parse("tower.toml", []byte(src))
		if err != nil {
			t.Errorf("%s Hz: %v", f, err)
			continue
		}
		if len(st.Warnings) != 0 {
			t.Errorf("%s Hz: warnings %q", f, st.Warnings)
		}
	}
}
