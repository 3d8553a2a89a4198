package study

import (
	"errors"
	"os"
	"strings"
	"testing"
)

// fullBase is the CLI's hostile-battery base: a valid study with every table.
func fullBase(t *testing.T) string {
	t.Helper()
	b, err := os.ReadFile("../../testdata/hostile/base-valid.txt")
	if err != nil {
		t.Fatal(err)
	}
	return string(b)
}

// setKey sets key = val in table of src (table "" is the top level), adding the key
// or the table when absent.
func setKey(src, table, key, val string) string {
	lines := strings.Split(src, "\n")
	start, end := 0, len(lines)
	if table != "" {
		start = -1
		for i, l := range lines {
			if l == "["+table+"]" || l == "[["+table+"]]" {
				start = i + 1
				break
			}
		}
		if start < 0 {
			return src + "\n[" + table + "]\n" + key + " = " + val + "\n"
		}
	}
	for i := start; i < len(lines); i++ {
		if strings.HasPrefix(lines[i], "[") {
			end = i
			break
		}
	}
	for i := start; i < end; i++ {
		if strings.HasPrefix(lines[i], key+" = ") {
			lines[i] = key + " = " + val
			return strings.Join(lines, "\n")
		}
	}
	at := start
	if table == "" {
		at = 1
	}
	lines = append(lines[:at], append([]string{key + " = " + val}, lines[at:]...)...)
	return strings.Join(lines, "\n")
}

// geometryLine replaces the base's per-length constants by a tower (for the
// conductor and geometry keys).
func geometryLine(src string) string {
	i, j := strings.Index(src, "[line]"), strings.Index(src, "[source]")
	return src[:i] + `[conductors.main]
outer_diameter_mm = 31.8
core_diameter_mm = 10.6
dc_ohm_per_km = 0.0585

[line]
length_km = 320

[line.geometry]
earth_resistivity_ohm_m = 100
phases = [
  { x_m = -11, height_m = 27, sag_m = 12, conductor = "main" },
  { x_m = 0, height_m = 27, sag_m = 12, conductor = "main" },
  { x_m = 11, height_m = 27, sag_m = 12, conductor = "main" },
]

` + src[j:]
}

// TestBoundsRefused: just beyond each key's lower or upper bound (README, "The study
// file"), and at the subnormal 1e-320 that passed "> 0" before, the file is refused
// naming the key (issue 15, item 17); TestExtremesEveryKeyAtItsBounds in the CLI runs
// every command at the bounds themselves.
func TestBoundsRefused(t *testing.T) {
	t.Parallel()
	rlSource := func(s string) string {
		return strings.Replace(s, "short_circuit_mva = 15000\nx_over_r = 12\n", "r_ohm = 0.9\nl_mh = 34\n", 1)
	}
	xSource := func(s string) string {
		return strings.Replace(s, "short_circuit_mva = 15000\nx_over_r = 12\n", "r_ohm = 0.9\nx_ohm = 10.7\n", 1)
	}
	noL := func(s string) string { return strings.Replace(s, "l_mh_per_km = 0.95\n", "", 1) }
	noC := func(s string) string { return strings.Replace(s, "c_nf_per_km = 12.0\n", "", 1) }
	arrester := func(s string) string { return s + "\n[[switching.arrester]]\nat = \"receiving\"\nrated_kv = 336\n" }
	arresterVI := func(s string) string {
		return s + "\n[[switching.arrester]]\nat = \"receiving\"\nvi_ka_kv = [[0.001, 475], [1, 540]]\n"
	}
	for _, c := range []struct {
		table, key string
		prep       func(string) string
		values     []string
		path       string // the key path named; "" for table.key
	}{
		{"", "frequency_hz", nil, []string{"1e-320", "0.99", "10001"}, ""},
		{"", "voltage_kv", nil, []string{"1e-320", "0.99"}, ""},
		{"line", "length_km", nil, []string{"1e-320", "0.0099", "10001"}, ""},
		{"line", "r_ohm_per_km", nil, []string{"1e-320", "9e-7", "1001"}, ""},
		{"line", "l_mh_per_km", nil, []string{"1e-320", "9e-5", "101"}, ""},
		{"line", "x_ohm_per_km", noL, []string{"1e-320", "31.5"}, ""},
		{"line", "c_nf_per_km", nil, []string{"1e-320", "9e-4", "10001"}, ""},
		{"line", "b_us_per_km", noC, []string{"1e-320", "3142"}, ""},
		{"line", "g_us_per_km", nil, []string{"1e-320", "10001"}, ""},
		{"line", "r0_ohm_per_km", nil, []string{"1e-320", "1001"}, ""},
		{"line", "l0_mh_per_km", nil, []string{"1e-320", "101"}, ""},
		{"line", "c0_nf_per_km", nil, []string{"1e-320", "10001"}, ""},
		{"line", "g0_us_per_km", nil, []string{"1e-320"}, ""},
		{"source", "short_circuit_mva", nil, []string{"1e-320", "0.99", "1.1e7"}, ""},
		{"source", "x_over_r", nil, []string{"1e-320", "0.099", "10001"}, ""},
		{"source", "x0_over_x1", nil, []string{"1e-320", "0.0099", "101"}, ""},
		{"source", "r_ohm", rlSource, []string{"1e-320", "1.1e6"}, ""},
		{"source", "l_mh", rlSource, []string{"1e-320", "1.1e6"}, ""},
		{"source", "x_ohm", xSource, []string{"1e-320", "1e9"}, ""},
		{"shunt", "mvar", nil, []string{"1e-320", "-1e-320", "0.00099", "100001"}, "shunt[0].mvar"},
		{"shunt", "q_factor", nil, []string{"1e-320", "0.99", "100001"}, "shunt[0].q_factor"},
		{"receiving", "load_mw", nil, []string{"1e-320", "1.1e7"}, ""},
		{"receiving", "load_mvar", nil, []string{"1e-320", "-1e-320"}, ""},
		{"scan", "f_min_hz", nil, []string{"1e-320", "0.00099"}, ""},
		{"scan", "gain_limit", nil, []string{"1e-320", "1.1e6"}, ""},
		{"scan", "watch_band_pct", nil, []string{"1e-320", "0.09", "49.5"}, ""},
		{"scan", "short_circuit_mva_range", nil, []string{"[1e-320, 2]", "[0.5, 2]"}, ""},
		{"energise", "duration_ms", nil, []string{"1e-320", "0.00099"}, ""},
		{"energise", "time_step_us", nil, []string{"1e-320", "0.00099"}, ""},
		{"switching", "close_deg", nil, []string{"361", "1e300"}, ""},
		{"switching", "preinsertion_ohm", nil, []string{"1e-320", "0.99"}, ""},
		{"switching", "preinsertion_ms", nil, []string{"1e-320", "0.0099"}, ""},
		{"switching", "siwl_kv", nil, []string{"1e-320"}, ""},
		{"switching", "ks", nil, []string{"0.99", "2.01"}, ""},
		{"switching", "kcd", nil, []string{"1e-320", "0.99", "2.01"}, ""},
		{"switching", "duration_ms", nil, []string{"1e-320", "0.0099"}, ""},
		{"switching", "time_step_us", nil, []string{"1e-320", "0.00099"}, ""},
		{"switching", "neutral_reactor_sending_ohm", nil, []string{"1e-320", "0.99"}, ""},
		{"switching", "neutral_reactor_receiving_ohm", nil, []string{"1e-320"}, ""},
		{"switching", "dead_time_ms", nil, []string{"1e-320", "0.0099", "10001"}, ""},
		{"switching.arrester", "rated_kv", arrester, []string{"1e-320", "0.99"}, "switching.arrester[0].rated_kv"},
		{"switching.arrester", "vi_ka_kv", arresterVI, []string{"[[1e-320, 1], [1, 2]]", "[[0.001, 1e-320], [1, 1]]"}, "switching.arrester[0].vi_ka_kv[0]"},
		{"targets", "max_open_end_pu", nil, []string{"1e-320", "0.49", "11"}, ""},
		{"targets", "max_gain_watched", nil, []string{"1e-320", "0.09", "10001"}, ""},
		{"targets", "max_u2_pu", nil, []string{"1e-320", "0.99", "11"}, ""},
		{"levers", "reactor_mvar_receiving", nil, []string{"[0, 1e-320]", "[1e-320, 300]"}, ""},
		{"levers", "preinsertion_ohm", nil, []string{"[0, 1e-320]", "[0.5, 300]"}, ""},
		{"levers", "arresters_kv", nil, []string{"[1e-320]", "[0.99]"}, "levers.arresters_kv[0]"},
		{"loading", "thermal_rating_a", nil, []string{"1e-320", "0.99"}, ""},
		{"conductors.main", "outer_diameter_mm", geometryLine, []string{"1e-320", "0.99"}, ""},
		{"conductors.main", "core_diameter_mm", geometryLine, []string{"28.63"}, ""},
		{"conductors.main", "dc_ohm_per_km", geometryLine, []string{"1e-320", "0.00099"}, ""},
	} {
		for _, v := range c.values {
			t.Run(c.table+"."+c.key+"="+v, func(t *testing.T) {
				t.Parallel()
				src := fullBase(t)
				if c.prep != nil {
					src = c.prep(src)
				}
				src = setKey(src, c.table, c.key, v)
				if c.key == "outer_diameter_mm" {
					src = strings.Replace(src, "core_diameter_mm = 10.6", "core_diameter_mm = 0", 1)
				}
				want := c.path
				if want == "" {
					want = strings.TrimPrefix(c.table+"."+c.key, ".")
				}
				_, err := Parse("b.toml", []byte(src))
				var e *Error
				if !errors.As(err, &e) {
					t.Fatalf("accepted (or not a *study.Error): %v", err)
				}
				if !strings.HasPrefix(err.Error(), "b.toml: "+want+": ") {
					t.Errorf("got %v; want it to name %s", err, want)
				}
			})
		}
	}
	// A tower conductor too low to the ground.
	src := strings.Replace(geometryLine(fullBase(t)), "{ x_m = 0, height_m = 27, sag_m = 12,", "{ x_m = 0, height_m = 0.5, sag_m = 0,", 1)
	if _, err := Parse("b.toml", []byte(src)); err == nil || !strings.HasPrefix(err.Error(), "b.toml: line.geometry.phases[1].height_m: ") {
		t.Errorf("a 0.5 m high conductor: %v", err)
	}
}
