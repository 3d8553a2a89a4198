package main

import (
	"bufio"
	"encoding/json"
	"fmt"
	"math"
	"math/cmplx"
	"os"
	"path/filepath"
	"strconv"
	"strings"
	"testing"

	"github.com/telegrapher/telegrapher/cmd/telegrapher/internal/study"
	"github.com/telegrapher/telegrapher/propagation"
)

const sectionsCable = "../../testdata/sections_cable.toml"

// writeStudy writes body into a temporary study file.
func writeSectionsStudy(t *testing.T, body string) string {
	t.Helper()
	path := filepath.Join(t.TempDir(), "study.toml")
	if err := os.WriteFile(path, []byte(body), 0o644); err != nil {
		t.Fatal(err)
	}
	return path
}

// The loader reads [[line.sections]] in order, each section with its own constants
// converted to SI; a single-section [line] and a one-entry [[line.sections]] give
// the same line; a misplaced or missing key is an input error naming its key path.
func TestSectionsLoader(t *testing.T) {
	t.Parallel()
	st, err := study.Load(sectionsCable)
	if err != nil {
		t.Fatal(err)
	}
	want := []struct {
		name   string
		length float64
		p      propagation.RLGC
	}{
		{"overhead Harrowmere", 172e3, propagation.RLGC{R: 0.028e-3, L: 0.93e-6, G: 0.01e-9, C: 12.4e-12}},
		{"Wend cable", 8e3, propagation.RLGC{R: 0.012e-3, L: 0.42e-6, G: 0.05e-9, C: 220e-12}},
		{"overhead Ostrey", 14e3, propagation.RLGC{R: 0.028e-3, L: 0.93e-6, G: 0.01e-9, C: 12.4e-12}},
	}
	if len(st.Line) != len(want) || len(st.Network.Line) != len(want) || len(st.Zero) != len(want) {
		t.Fatalf("%d sections (network %d, zero %d), want %d", len(st.Line), len(st.Network.Line), len(st.Zero), len(want))
	}
	const rel = 1e-12 // unit conversions only
	close := func(a, b float64) bool { return math.Abs(a-b) <= rel*math.Abs(b) }
	for i, w := range want {
		l := st.Network.Line[i]
		p, ok := l.Constants.(propagation.RLGC)
		if !ok || l.Name != w.name || !close(l.Length, w.length) ||
			!close(p.R, w.p.R) || !close(p.L, w.p.L) || !close(p.G, w.p.G) || !close(p.C, w.p.C) {
			t.Errorf("section %d: %q %g m %+v, want %q %g m %+v", i, l.Name, l.Length, l.Constants, w.name, w.length, w.p)
		}
	}
	if !close(st.Line.Length(), 194e3) {
		t.Errorf("total length %g m, want 194 km", st.Line.Length())
	}

	head := "frequency_hz = 50\nvoltage_kv = 400\n"
	single, err := study.Parse("single.toml", []byte(head+"[line]\nlength_km = 120\nr_ohm_per_km = 0.03\nl_mh_per_km = 0.95\nc_nf_per_km = 12\n"))
	if err != nil {
		t.Fatal(err)
	}
	one, err := study.Parse("one.toml", []byte(head+"[[line.sections]]\nlength_km = 120\nr_ohm_per_km = 0.03\nl_mh_per_km = 0.95\nc_nf_per_km = 12\n"))
	if err != nil {
		t.Fatal(err)
	}
	if len(single.Line) != 1 || len(one.Line) != 1 || single.Line[0].Constants != one.Line[0].Constants || single.Line[0].Length != one.Line[0].Length {
		t.Errorf("single [line] %+v, one section %+v", single.Line, one.Line)
	}

	bad := []struct{ name, body, key string }{
		{"line key beside sections", "[line]\nlength_km = 5\n[[line.sections]]\nlength_km = 5\nr_ohm_per_km = 0.03\nl_mh_per_km = 0.95\nc_nf_per_km = 12\n", "line.length_km"},
		{"section without length", "[[line.sections]]\nr_ohm_per_km = 0.03\nl_mh_per_km = 0.95\nc_nf_per_km = 12\n", "length_km"},
		{"negative section length", "[[line.sections]]\nlength_km = 5\nr_ohm_per_km = 0.03\nl_mh_per_km = 0.95\nc_nf_per_km = 12\n[[line.sections]]\nlength_km = -3\nr_ohm_per_km = 0.03\nl_mh_per_km = 0.95\nc_nf_per_km = 12\n", "length_km"},
		{"unknown key in a section", "[[line.sections]]\nlength_km = 5\nr_ohm_per_km = 0.03\nl_mh_per_km = 0.95\nc_nf_per_km = 12\nlenght_km = 4\n", "lenght_km"},
	}
	for _, b := range bad {
		path := writeSectionsStudy(t, head+b.body)
		code, _, stderr := runCLI("check", path)
		if code != 2 || !strings.Contains(stderr, b.key) || !strings.Contains(stderr, "sections") && b.key != "line.length_km" {
			t.Errorf("%s: exit %d, stderr %q (want 2 naming %s)", b.name, code, stderr, b.key)
		}
	}
}

// jsonOf runs the CLI with --json and decodes the document.
func jsonOf(t *testing.T, args ...string) map[string]any {
	t.Helper()
	code, out, stderr := runCLI(append(args, "--json")...)
	if code != 0 {
		t.Fatalf("%v: exit %d: %s", args, code, stderr)
	}
	var doc map[string]any
	if err := json.Unmarshal([]byte(out), &doc); err != nil {
		t.Fatalf("%v: %v", args, err)
	}
	return doc
}

// lookup returns the value at a dotted key path of doc (nil when absent).
func lookup(doc map[string]any, path string) any {
	var v any = doc
	for _, k := range strings.Split(path, ".") {
		m, ok := v.(map[string]any)
		if !ok {
			return nil
		}
		v = m[k]
	}
	return v
}

// skipped are keys sameJSON leaves out: the positions of flat extrema of the loading
// profile, compared to positionTolKm instead.
var skipped = map[string]bool{"x_v_max_km": true, "x_v_min_km": true}

// positionTolKm: the loading profile's extremum is located by a search along the
// line; where the profile is flat (at its maximum) a position within 10 m is the
// same answer (common practice, no source).
const positionTolKm = 0.01

// sameJSON compares the decoded values a and b, numbers within tol relative (with an
// absolute floor of tol·floor), and returns the first difference.
func sameJSON(a, b any, path string, tol, floor float64) error {
	switch x := a.(type) {
	case map[string]any:
		y, ok := b.(map[string]any)
		if !ok {
			return fmt.Errorf("%s: object against %T", path, b)
		}
		for k, v := range x {
			if skipped[k] {
				continue
			}
			if err := sameJSON(v, y[k], path+"."+k, tol, floor); err != nil {
				return err
			}
		}
	case []any:
		y, ok := b.([]any)
		if !ok || len(x) != len(y) {
			return fmt.Errorf("%s: %d elements against %v", path, len(x), b)
		}
		for i := range x {
			if err := sameJSON(x[i], y[i], fmt.Sprintf("%s[%d]", path, i), tol, floor); err != nil {
				return err
			}
		}
	case float64:
		y, ok := b.(float64)
		if !ok || math.Abs(x-y) > tol*math.Max(math.Max(math.Abs(x), math.Abs(y)), floor) {
			return fmt.Errorf("%s: %v against %v", path, x, b)
		}
	default:
		if a != b {
			return fmt.Errorf("%s: %v against %v", path, a, b)
		}
	}
	return nil
}

// A section split into two identical halves gives the same results as the unsplit
// line in every command (an identity of the cascade: the product of the halves'
// exact two-ports is the whole line's), to rounding.
func TestSplitSectionSameEveryCommand(t *testing.T) {
	t.Parallel()
	// rounding of cosh/sinh products, relative; waveforms are of order 1 pu, and
	// the Laplace inversion amplifies rounding by up to N (the damping)
	const tol, waveTol = 1e-9, 1e-8
	consts := "r_ohm_per_km = 0.03\nl_mh_per_km = 0.95\nc_nf_per_km = 12\ng_us_per_km = 0.02\n"
	head := "title = \"split\"\nfrequency_hz = 50\nvoltage_kv = 400\n"
	tail := "[source]\nr_ohm = 15\nl_mh = 0\n[scan]\nf_max_hz = 2500\npoints = 800\n[energise]\nduration_ms = 8\n"
	whole := writeSectionsStudy(t, head+"[line]\nlength_km = 240\n"+consts+tail)
	split := writeSectionsStudy(t, head+"[[line.sections]]\nname = \"west\"\nlength_km = 120\n"+consts+"[[line.sections]]\nname = \"east\"\nlength_km = 120\n"+consts+tail)
	cases := []struct {
		args []string
		keys []string
		tol  float64
	}{
		{[]string{"constants"}, []string{"length_km", "gamma_per_km", "zc_ohm", "zc_lossless_ohm", "velocity_km_per_s", "electrical_length_deg", "sil_mw", "no_load_rise_pu", "abcd.exact"}, tol},
		{[]string{"constants", "--at-hz", "1234"}, []string{"gamma_per_km", "zc_ohm", "abcd.exact"}, tol},
		{[]string{"scan"}, []string{"points", "peaks"}, tol},
		{[]string{"energise", "--method", "lattice"}, []string{"peak_pu", "t_peak_ms", "peak_sending_pu", "t_ms", "v_receiving_pu", "v_sending_pu"}, waveTol},
		{[]string{"energise", "--method", "bergeron"}, []string{"peak_pu", "t_peak_ms", "peak_sending_pu", "t_ms", "v_receiving_pu", "v_sending_pu"}, waveTol},
		{[]string{"energise", "--method", "laplace"}, []string{"peak_pu", "t_peak_ms", "peak_sending_pu", "t_ms", "v_receiving_pu", "v_sending_pu"}, waveTol},
		{[]string{"loading"}, []string{"sil_mw", "p_max_mw", "points"}, tol},
	}
	for _, c := range cases {
		t.Run(strings.Join(c.args, "_"), func(t *testing.T) {
			t.Parallel()
			a := jsonOf(t, append(append([]string{}, c.args...), whole)...)
			b := jsonOf(t, append(append([]string{}, c.args...), split)...)
			for _, k := range c.keys {
				va, vb := lookup(a, k), lookup(b, k)
				if va == nil {
					t.Fatalf("key %q missing", k)
				}
				if err := sameJSON(va, vb, k, c.tol, 1e-6); err != nil {
					t.Errorf("whole against split: %v", err)
				}
			}
			if c.args[0] == "loading" { // where the profile peaks: a flat extremum
				pa, pb := a["points"].([]any), b["points"].([]any)
				for i := range pa {
					for _, k := range []string{"x_v_max_km", "x_v_min_km"} {
						xa, xb := pa[i].(map[string]any)[k].(float64), pb[i].(map[string]any)[k].(float64)
						if math.Abs(xa-xb) > positionTolKm {
							t.Errorf("points[%d].%s: whole %.6g km, split %.6g km", i, k, xa, xb)
						}
					}
				}
			}
			if c.args[0] == "constants" {
				secs, _ := b["sections"].([]any)
				if len(secs) != 2 || secs[0].(map[string]any)["name"] != "west" {
					t.Errorf("split: sections %v", b["sections"])
				}
			}
			// the junction of the halves is the mid-line of the whole line
			if c.args[0] == "energise" {
				js, _ := b["junctions"].([]any)
				if len(js) != 1 {
					t.Fatalf("split: junctions %v", b["junctions"])
				}
				j := js[0].(map[string]any)
				if j["name"] != "west / east" || j["x_km"] != 120.0 {
					t.Errorf("junction %v at %v", j["name"], j["x_km"])
				}
				if mid, ok := a["v_middle_pu"]; ok {
					if err := sameJSON(mid, j["v_pu"], "v_middle_pu", waveTol, 1e-6); err != nil {
						t.Errorf("mid-line of the whole against the junction: %v", err)
					}
				}
			}
		})
	}
}

// constants on the overhead-cable line: each section's Zc = sqrt(z/y) and
// γ = sqrt(z·y) from its own constants at 50 Hz (telegrapher's equations, evaluated
// here with math/cmplx), the total length, and the cascade's ABCD reciprocal
// (AD − BC = 1) and equal to the product of the sections' hyperbolic two-ports.
func TestConstantsSections(t *testing.T) {
	t.Parallel()
	const tol = 1e-10 // complex arithmetic rounding
	doc := jsonOf(t, "constants", sectionsCable)
	st, err := study.Load(sectionsCable)
	if err != nil {
		t.Fatal(err)
	}
	cx := func(v any) complex128 {
		m := v.(map[string]any)
		return complex(m["re"].(float64), m["im"].(float64))
	}
	if doc["length_km"].(float64) != 194 {
		t.Errorf("length_km %v, want the total 194", doc["length_km"])
	}
	secs := doc["sections"].([]any)
	if len(secs) != 3 {
		t.Fatalf("sections %v", secs)
	}
	s := complex(0, 2*math.Pi*50)
	prod := [4]complex128{1, 0, 0, 1}
	for i, sv := range secs {
		sec := sv.(map[string]any)
		p := st.Line[i].Constants.(propagation.RLGC)
		z, y := complex(p.R, 0)+s*complex(p.L, 0), complex(p.G, 0)+s*complex(p.C, 0)
		zc, g := cmplx.Sqrt(z/y), cmplx.Sqrt(z*y)
		if sec["name"] != st.Line[i].Name || sec["length_km"].(float64) != st.Line[i].Length/1e3 {
			t.Errorf("section %d: %v %v", i, sec["name"], sec["length_km"])
		}
		if d := cmplx.Abs(cx(sec["zc_ohm"]) - zc); d > tol*cmplx.Abs(zc) {
			t.Errorf("section %d: zc %v, want %v", i, cx(sec["zc_ohm"]), zc)
		}
		if d := cmplx.Abs(cx(sec["gamma_per_km"]) - g*1e3); d > tol*cmplx.Abs(g*1e3) {
			t.Errorf("section %d: gamma %v, want %v", i, cx(sec["gamma_per_km"]), g*1e3)
		}
		gl := g * complex(st.Line[i].Length, 0)
		a, b, c := cmplx.Cosh(gl), zc*cmplx.Sinh(gl), cmplx.Sinh(gl)/zc
		prod = [4]complex128{prod[0]*a + prod[1]*c, prod[0]*b + prod[1]*a, prod[2]*a + prod[3]*c, prod[2]*b + prod[3]*a}
	}
	ex := doc["abcd"].(map[string]any)["exact"].(map[string]any)
	A, B, C, D := cx(ex["a"]), cx(ex["b"]), cx(ex["c"]), cx(ex["d"])
	if d := cmplx.Abs(A*D - B*C - 1); d > tol {
		t.Errorf("AD − BC − 1 = %g", d)
	}
	for i, got := range []complex128{A, B, C, D} {
		if d := cmplx.Abs(got - prod[i]); d > tol*cmplx.Abs(prod[i]) {
			t.Errorf("abcd element %d: %v, want the product %v", i, got, prod[i])
		}
	}
}

// The scan of the overhead-cable line against full nodal analysis with numpy.
// numpy 1.24.2 (Debian python3-numpy), regenerated by testdata/gen_sections.py into
// testdata/sections_reference.csv.
func TestScanSectionsReference(t *testing.T) {
	t.Parallel()
	const tol = 1e-6 // relative; both in float64, different formulations
	doc := jsonOf(t, "scan", sectionsCable)
	byF := map[string]map[string]any{}
	for _, pv := range doc["points"].([]any) {
		p := pv.(map[string]any)
		byF[strconv.FormatFloat(p["f_hz"].(float64), 'f', 6, 64)] = p
	}
	f, err := os.Open("../../testdata/sections_reference.csv")
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	sc := bufio.NewScanner(f)
	rows := 0
	for sc.Scan() {
		line := sc.Text()
		if strings.HasPrefix(line, "#") || strings.HasPrefix(line, "f_hz") {
			continue
		}
		var v [5]float64
		for i, s := range strings.Split(line, ",") {
			if v[i], err = strconv.ParseFloat(s, 64); err != nil {
				t.Fatal(err)
			}
		}
		p, ok := byF[strconv.FormatFloat(v[0], 'f', 6, 64)]
		if !ok {
			t.Fatalf("no scan point at %g Hz", v[0])
		}
		z := p["z_in_ohm"].(map[string]any)
		zin, want := complex(z["re"].(float64), z["im"].(float64)), complex(v[3], v[4])
		if g := p["gain"].(float64); math.Abs(g-v[1]) > tol*v[1] {
			t.Errorf("%g Hz: gain %.10g, numpy %.10g", v[0], g, v[1])
		}
		if g := p["gain_line"].(float64); math.Abs(g-v[2]) > tol*v[2] {
			t.Errorf("%g Hz: gain_line %.10g, numpy %.10g", v[0], g, v[2])
		}
		if cmplx.Abs(zin-want) > tol*cmplx.Abs(want) {
			t.Errorf("%g Hz: z_in %v, numpy %v", v[0], zin, want)
		}
		rows++
	}
	if rows < 100 {
		t.Fatalf("only %d reference rows", rows)
	}
}

// energise on the overhead-cable line gives every junction in JSON (name, x_km,
// peak_pu = the signed extreme of v_pu), in the CSV (one column each) and in the text.
func TestEnergiseJunctionOutputs(t *testing.T) {
	t.Parallel()
	for _, m := range []string{"bergeron", "laplace"} {
		doc := jsonOf(t, "energise", sectionsCable, "--method", m)
		js, _ := doc["junctions"].([]any)
		if len(js) != 2 {
			t.Fatalf("%s: junctions %v", m, doc["junctions"])
		}
		for i, want := range []struct {
			name string
			x    float64
		}{{"overhead Harrowmere / Wend cable", 172}, {"Wend cable / overhead Ostrey", 180}} {
			j := js[i].(map[string]any)
			if j["name"] != want.name || j["x_km"] != want.x {
				t.Errorf("%s: junction %d %v at %v km", m, i, j["name"], j["x_km"])
			}
			var pk float64
			for _, v := range j["v_pu"].([]any) {
				if math.Abs(v.(float64)) > math.Abs(pk) {
					pk = v.(float64)
				}
			}
			if pk != j["peak_pu"].(float64) || len(j["v_pu"].([]any)) != len(doc["t_ms"].([]any)) {
				t.Errorf("%s: junction %d peak %v, largest sample %v", m, i, j["peak_pu"], pk)
			}
		}
	}
	csv := filepath.Join(t.TempDir(), "e.csv")
	code, out, stderr := runCLI("energise", sectionsCable, "--method", "bergeron", "--csv", csv)
	if code != 0 {
		t.Fatalf("exit %d: %s", code, stderr)
	}
	b, err := os.ReadFile(csv)
	if err != nil {
		t.Fatal(err)
	}
	if !strings.HasPrefix(string(b), "t_ms,v_sending_pu,v_receiving_pu,v_middle_pu,v_junction1_pu,v_junction2_pu\n") {
		t.Errorf("CSV header %q", strings.SplitN(string(b), "\n", 2)[0])
	}
	if !strings.Contains(out, "peaks at the junctions of sections") || !strings.Contains(out, "Wend cable / overhead Ostrey") {
		t.Errorf("text output lacks the junctions:\n%s", out)
	}
}

// The built-in sectioned study parses and is the copy kept for the tests.
func TestDemoCableStudy(t *testing.T) {
	t.Parallel()
	st, err := demoCableStudy()
	if err != nil {
		t.Fatal(err)
	}
	b, err := os.ReadFile(sectionsCable)
	if err != nil {
		t.Fatal(err)
	}
	if string(b) != string(demoCableTOML) || len(st.Line) != 3 {
		t.Errorf("testdata/sections_cable.toml differs from demo_cable.toml, or %d sections", len(st.Line))
	}
}
