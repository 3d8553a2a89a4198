package main

// Numerical extremes across commands: electrically very long lines at high frequency,
// a lossless line evaluated exactly at its quarter-wave resonance, a zero source
// impedance, very strong and very weak sources, tiny and huge reactors. Every command
// must succeed (or refuse with exit status 2 and a message naming the key, never fail
// with 1 or panic), and no output, text or JSON, may hold NaN or Inf. JSON values
// beyond a float64 follow the contract's overflow rule: null, and the key path listed
// in the top-level "overflow" array.

import (
	"bytes"
	"encoding/json"
	"fmt"
	"math"
	"os"
	"path/filepath"
	"regexp"
	"strconv"
	"strings"
	"testing"
)

// extremeStudy builds a study from a line, a source, shunts and a receiving end.
func extremeStudy(title, system, line, source, shunts, extra string) string {
	return fmt.Sprintf(`title = %q
%s

[line]
%s
%s
%s
[scan]
f_min_hz = 1
f_max_hz = 2500
points = 600
%s
[energise]
duration_ms = 10

[switching]
shots = 8
duration_ms = 10

[targets]
max_open_end_pu = 1.1

[levers]
reactor_mvar_receiving = [0, 300]
`, title, system, line, source, shunts, extra)
}

const (
	extremeSystem400 = "frequency_hz = 50\nvoltage_kv = 400\nus_kv = 420"
	extremeLine320   = `length_km = 320
r_ohm_per_km = 0.025
l_mh_per_km = 0.95
c_nf_per_km = 12.0
r0_ohm_per_km = 0.25
l0_mh_per_km = 3.0
c0_nf_per_km = 7.5`
	extremeSource = "[source]\nshort_circuit_mva = 15000\nx_over_r = 12\n"
	// A lossless line with L C = 1.6e-11 s^2/km^2: 250,000 km/s, Zc = 400 ohm, so
	// 1250 km is a quarter wavelength at 50 Hz (the open-end resonance of an ideal
	// source), in exact decimal numbers.
	extremeLineResonant = `length_km = 1250
r_ohm_per_km = 0
l_mh_per_km = 1.6
c_nf_per_km = 10
r0_ohm_per_km = 0
l0_mh_per_km = 3.2
c0_nf_per_km = 5`
)

var extremeStudies = []struct {
	name, src string
	hz        []string // --at-hz values for constants
}{
	{"long-3000km", extremeStudy("Extreme: invented 3000 km 765 kV line", "frequency_hz = 50\nvoltage_kv = 765\nus_kv = 800",
		`length_km = 3000
r_ohm_per_km = 0.012
l_mh_per_km = 0.87
c_nf_per_km = 13.3
r0_ohm_per_km = 0.2
l0_mh_per_km = 2.8
c0_nf_per_km = 8.5`, "[source]\nshort_circuit_mva = 30000\nx_over_r = 15\n", "",
		""), []string{"50000", "1e6"}},
	{"long-3000km-scan-100khz", strings.Replace(extremeStudy("Extreme: invented 3000 km line scanned to 100 kHz", extremeSystem400,
		strings.Replace(extremeLine320, "length_km = 320", "length_km = 3000", 1), extremeSource, "", ""),
		"f_max_hz = 2500\npoints = 600", "f_max_hz = 100000\npoints = 4000", 1), []string{"100000"}},
	{"lossless-at-resonance", extremeStudy("Extreme: lossless quarter-wave line, ideal source", extremeSystem400,
		extremeLineResonant, "", "", ""), []string{"50", "150", "100"}},
	{"lossless-at-resonance-grid", strings.Replace(extremeStudy("Extreme: lossless quarter-wave line, grid on the resonances", extremeSystem400,
		extremeLineResonant, "", "", ""), "f_min_hz = 1\nf_max_hz = 2500\npoints = 600", "f_min_hz = 50\nf_max_hz = 2450\npoints = 25", 1), []string{"250"}},
	{"zero-source-impedance", extremeStudy("Extreme: zero source impedance", extremeSystem400, extremeLine320,
		"[source]\nr_ohm = 0\nl_mh = 0\n", "", ""), []string{"1e6"}},
	{"strong-source-1e6mva", extremeStudy("Extreme: 1e6 MVA source", extremeSystem400, extremeLine320,
		"[source]\nshort_circuit_mva = 1e6\nx_over_r = 20\n", "", ""), nil},
	{"weak-source-10mva", extremeStudy("Extreme: 10 MVA source", extremeSystem400, extremeLine320,
		"[source]\nshort_circuit_mva = 10\nx_over_r = 5\n", "", ""), nil},
	{"tiny-reactors", extremeStudy("Extreme: 0.001 Mvar reactors", extremeSystem400, extremeLine320, extremeSource,
		"[[shunt]]\nat = \"receiving\"\nconnection = \"line\"\nmvar = 0.001\n\n[[shunt]]\nat = \"sending\"\nconnection = \"bus\"\nmvar = 0.001\nq_factor = 300\n", ""), nil},
	{"huge-reactors", extremeStudy("Extreme: 1e5 Mvar reactors", extremeSystem400, extremeLine320, extremeSource,
		"[[shunt]]\nat = \"receiving\"\nconnection = \"line\"\nmvar = 1e5\n\n[[shunt]]\nat = \"sending\"\nconnection = \"line\"\nmvar = 1e5\nq_factor = 300\n", ""), nil},
	// Beyond float64: 1600 Np of attenuation, so cosh(gamma l) is about e^1600; the
	// exact ABCD must come out null and listed in overflow (TestExtremesOverflowRule).
	{"overflow-3000km-lossy", extremeStudy("Extreme: 3000 km line with 1600 Np of attenuation", extremeSystem400,
		"length_km = 3000\nr_ohm_per_km = 300\nl_mh_per_km = 0.95\nc_nf_per_km = 12\ng_us_per_km = 100", extremeSource, "", ""), []string{"1e6"}},
	// An energisation shorter than one time step: one sample (t = 0) only.
	{"energise-shorter-than-a-step", strings.Replace(extremeStudy("Extreme: 1 us energisation", extremeSystem400, extremeLine320, extremeSource, "", ""),
		"[energise]\nduration_ms = 10", "[energise]\nduration_ms = 0.001", 1), nil},
	{"huge-capacitor-weak-source", extremeStudy("Extreme: 1e5 Mvar capacitor behind a 10 MVA source", extremeSystem400, extremeLine320,
		"[source]\nshort_circuit_mva = 10\nx_over_r = 5\n",
		"[[shunt]]\nat = \"receiving\"\nconnection = \"bus\"\nmvar = -1e5\n", "[receiving]\nload_mw = 0\nload_mvar = 0\n"), nil},
}

// extremeNonFinite matches the ways Go and JSON spell a non-finite number.
var extremeNonFinite = regexp.MustCompile(`(?i)\bnan\b|[+-]?\binf(inity)?\b|\+Inf|-Inf`)

func TestExtremesEveryCommandFinite(t *testing.T) {
	t.Parallel()
	for _, st := range extremeStudies {
		t.Run(st.name, func(t *testing.T) {
			t.Parallel()
			dir := t.TempDir()
			path := filepath.Join(dir, st.name+".toml")
			if err := os.WriteFile(path, []byte(st.src), 0o644); err != nil {
				t.Fatal(err)
			}
			invs := [][]string{
				{"check", path},
				{"constants", path}, {"constants", "--json", path},
				{"constants", "--sweep", path, "--plot", filepath.Join(dir, "sweep.svg")},
				{"scan", path, "--csv", filepath.Join(dir, "scan.csv"), "--plot", filepath.Join(dir, "scan.svg")}, {"scan", "--json", path},
				{"energise", path, "--csv", filepath.Join(dir, "energise.csv"), "--plot", filepath.Join(dir, "energise.svg")}, {"energise", "--json", path},
				{"energise", "--compare", path}, {"energise", "--json", "--method", "bergeron", path},
				{"energise", "--json", "--method", "lattice", path},
				{"switching", path}, {"switching", "--json", path},
				{"loading", path}, {"loading", "--json", path},
				{"remedy", path}, {"remedy", "--json", path},
				{"report", path, "--out", filepath.Join(dir, "report")},
			}
			for _, hz := range st.hz {
				invs = append(invs, []string{"constants", path, "--at-hz", hz}, []string{"constants", "--json", "--at-hz", hz, path})
			}
			for _, args := range invs {
				var stdout, stderr bytes.Buffer
				status := run(args, &stdout, &stderr)
				switch status {
				case 0:
				case 2:
					// A refusal must name the key that cannot be treated.
					if !regexp.MustCompile(`: [a-z_]+(\.[a-z_]+)*(\[\d+\])?(\.[a-z_]+)*: `).MatchString(stderr.String()) {
						t.Errorf("%v: exit 2 without a key path: %s", args[:len(args)-1], stderr.String())
					}
					t.Logf("%v refused: %s", args[:len(args)-1], strings.TrimSpace(stderr.String()))
					continue
				default:
					t.Errorf("%v: exit status %d: %s", args, status, stderr.String())
					continue
				}
				if m := extremeNonFinite.FindString(stdout.String()); m != "" {
					t.Errorf("%v: standard output holds %q:\n%s", args, m, extremeContext(stdout.String(), m))
				}
				if m := extremeNonFinite.FindString(stderr.String()); m != "" {
					t.Errorf("%v: standard error holds %q: %s", args, m, stderr.String())
				}
				if extremeHas(args, "--json") {
					extremeCheckJSON(t, args, stdout.Bytes())
				}
			}
			extremeCheckFiles(t, dir)
		})
	}
}

// extremeHas reports whether args holds flag.
func extremeHas(args []string, flag string) bool {
	for _, a := range args {
		if a == flag {
			return true
		}
	}
	return false
}

// extremeContext returns the line of s that holds m.
func extremeContext(s, m string) string {
	for _, l := range strings.Split(s, "\n") {
		if strings.Contains(l, m) {
			return l
		}
	}
	return ""
}

// extremeCheckJSON parses one JSON document and checks the overflow rule: every null
// number is listed in "overflow", and every listed path is null.
func extremeCheckJSON(t *testing.T, args []string, doc []byte) {
	t.Helper()
	dec := json.NewDecoder(bytes.NewReader(doc))
	dec.UseNumber()
	var v map[string]any
	if err := dec.Decode(&v); err != nil {
		t.Errorf("%v: not one JSON document: %v", args, err)
		return
	}
	if dec.More() {
		t.Errorf("%v: more than one JSON document", args)
	}
	listed := map[string]bool{}
	if o, ok := v["overflow"]; ok {
		arr, ok := o.([]any)
		if !ok {
			t.Errorf("%v: overflow is not an array: %v", args, o)
		}
		for _, p := range arr {
			if s, ok := p.(string); ok {
				listed[s] = true
			}
		}
	}
	nulls := map[string]bool{}
	var walk func(path string, x any)
	walk = func(path string, x any) {
		switch x := x.(type) {
		case nil:
			nulls[path] = true
		case json.Number:
			f, err := strconv.ParseFloat(string(x), 64)
			if err != nil || math.IsNaN(f) || math.IsInf(f, 0) {
				t.Errorf("%v: %s = %s is not a finite float64", args, path, x)
			}
		case map[string]any:
			for k, e := range x {
				p := k
				if path != "" {
					p = path + "." + k
				}
				walk(p, e)
			}
		case []any:
			for i, e := range x {
				walk(fmt.Sprintf("%s[%d]", path, i), e)
			}
		}
	}
	walk("", v)
	for p := range nulls {
		if !listed[p] {
			t.Errorf("%v: %s is null but not listed in overflow", args, p)
		}
	}
	for p := range listed {
		if !nulls[p] {
			t.Errorf("%v: overflow lists %s, which is not null", args, p)
		}
	}
}

// extremeCheckFiles greps every text file written (CSV, SVG, HTML, Markdown, COMTRADE)
// for non-finite numbers.
func extremeCheckFiles(t *testing.T, dir string) {
	t.Helper()
	_ = filepath.WalkDir(dir, func(p string, d os.DirEntry, err error) error {
		if err != nil || d.IsDir() || strings.HasSuffix(p, ".toml") || strings.HasSuffix(p, ".png") {
			return err
		}
		data, err := os.ReadFile(p)
		if err != nil {
			t.Error(err)
			return nil
		}
		if m := extremeNonFinite.FindString(string(data)); m != "" {
			t.Errorf("%s holds %q: %s", p, m, extremeContext(string(data), m))
		}
		return nil
	})
}

// extremeHugeNumber matches a number printed with a magnitude of 1e12 or more.
var extremeHugeNumber = regexp.MustCompile(`[0-9.]+e\+(1[2-9]|[2-9][0-9]|[1-9][0-9]{2})\b|\b[0-9]{13,}(\.[0-9]*)?\b`)

// extremeUnboundedLimit: on the lossless quarter-wave line with an ideal source the
// open-end voltage, the gain at the resonance and the relative error of a lumped model
// against an exact A = cos(pi/2) = 0 are unbounded in theory; in float64 they come out
// near 1/eps = 4.5e15 (cos(pi/2) rounds to 6e-17 rather than 0). Any printed value of
// 1e12 or more is that rounding echo and must be written as unbounded.
const extremeUnboundedLimit = 1e12

// TestExtremesUnboundedSaysSo runs the text form of every command on the lossless
// line evaluated exactly at its quarter-wave resonance: where a quantity is unbounded
// in theory the text must say so (contract: no NaN or Inf; unbounded values said in
// words), not print the rounding echo of 1/cos(pi/2).
func TestExtremesUnboundedSaysSo(t *testing.T) {
	t.Parallel()
	dir := t.TempDir()
	path := filepath.Join(dir, "resonant.toml")
	src := extremeStudy("Extreme: lossless quarter-wave line, ideal source", extremeSystem400, extremeLineResonant, "", "", "")
	if err := os.WriteFile(path, []byte(src), 0o644); err != nil {
		t.Fatal(err)
	}
	for _, cmd := range []string{"constants", "scan", "energise", "loading", "switching", "remedy"} {
		t.Run(cmd, func(t *testing.T) {
			t.Parallel()
			var stdout, stderr bytes.Buffer
			if status := run([]string{cmd, path}, &stdout, &stderr); status != 0 {
				t.Fatalf("exit status %d: %s", status, stderr.String())
			}
			for _, l := range strings.Split(stdout.String(), "\n") {
				for _, m := range extremeHugeNumber.FindAllString(l, -1) {
					if v, err := strconv.ParseFloat(m, 64); err == nil && math.Abs(v) >= extremeUnboundedLimit {
						t.Errorf("prints %s where the value is unbounded in theory (say so): %q", m, strings.TrimSpace(l))
					}
				}
			}
		})
	}
}

// TestExtremesOverflowRule: the exact two-port of a line with 1600 Np of attenuation
// (|cosh(gamma l)| ~ e^1600, beyond a float64) is written as null with its key paths
// listed in "overflow" (contract, JSON output), while the ratios stay finite.
func TestExtremesOverflowRule(t *testing.T) {
	t.Parallel()
	var src string
	for _, st := range extremeStudies {
		if st.name == "overflow-3000km-lossy" {
			src = st.src
		}
	}
	path := filepath.Join(t.TempDir(), "overflow.toml")
	if err := os.WriteFile(path, []byte(src), 0o644); err != nil {
		t.Fatal(err)
	}
	args := []string{"constants", "--json", "--at-hz", "1e6", path}
	var stdout, stderr bytes.Buffer
	if status := run(args, &stdout, &stderr); status != 0 {
		t.Fatalf("exit status %d: %s", status, stderr.String())
	}
	extremeCheckJSON(t, args, stdout.Bytes())
	var doc struct {
		Overflow []string                   `json:"overflow"`
		Rise     *float64                   `json:"no_load_rise_pu"`
		Zc       *struct{ Re, Im *float64 } `json:"zc_ohm"`
	}
	if err := json.Unmarshal(stdout.Bytes(), &doc); err != nil {
		t.Fatal(err)
	}
	want := map[string]bool{}
	for _, e := range []string{"a", "b", "c", "d"} {
		for _, part := range []string{"re", "im"} {
			want["abcd.exact."+e+"."+part] = true
		}
	}
	for _, p := range doc.Overflow {
		delete(want, p)
	}
	if len(want) != 0 {
		t.Errorf("overflow %v lacks %v", doc.Overflow, want)
	}
	if doc.Rise == nil || doc.Zc == nil || doc.Zc.Re == nil || doc.Zc.Im == nil {
		t.Errorf("ratios must stay finite: no_load_rise_pu %v, zc_ohm %+v", doc.Rise, doc.Zc)
	}
}

// extremeJSON runs a command with --json on the named extreme study and decodes it.
func extremeJSON(t *testing.T, name, cmd string, v any) {
	t.Helper()
	var src string
	for _, st := range extremeStudies {
		if st.name == name {
			src = st.src
		}
	}
	if src == "" {
		t.Fatalf("no extreme study %q", name)
	}
	path := filepath.Join(t.TempDir(), name+".toml")
	if err := os.WriteFile(path, []byte(src), 0o644); err != nil {
		t.Fatal(err)
	}
	var stdout, stderr bytes.Buffer
	if status := run([]string{cmd, "--json", path}, &stdout, &stderr); status != 0 {
		t.Fatalf("%s %s: exit status %d: %s", cmd, name, status, stderr.String())
	}
	if err := json.Unmarshal(stdout.Bytes(), v); err != nil {
		t.Fatal(err)
	}
}

type extremeOpenEnd struct {
	OpenEnd struct {
		Rise          float64 `json:"rise_pu"`
		RiseWithShunt float64 `json:"rise_with_shunts_pu"`
		RiseFromEMF   float64 `json:"rise_from_emf_pu"`
	} `json:"open_end"`
}

// TestExtremesLimits checks that the extremes also give the right answer in the limit
// they approach (circuit theory on the open-ended line, no published source needed):
// a zero source impedance makes |Vr/E| = |Vr/Vs|; a 0.001 Mvar reactor barely moves the
// open-end rise; a 1e5 Mvar reactor (1.6 ohm at 400 kV) nearly shorts the open end;
// a 1e6 MVA source is nearly ideal; a 10 MVA source (16 kohm) behind the line's
// capacitive input leaves only a small fraction of the EMF.
func TestExtremesLimits(t *testing.T) {
	t.Parallel()
	const (
		// zeroSourceTol: with Zsrc = 0, Vs = E and both gains are the same ratio up to
		// the roundings of two formulas.
		zeroSourceTol = 1e-12
		// tinyReactorTol: 0.001 Mvar against about 200 Mvar of line charging moves
		// the rise by about 0.001/200 = 5e-6 relative (times the rise); 2e-5 bounds it.
		tinyReactorTol = 2e-5
		// hugeReactorMax: a 1.6 ohm reactor at the open end of a 320 km line with
		// |B| = Zc sin(beta l) ~ 94 ohm gives |Vr/Vs| ~ 1.6/94 = 0.017; below 0.05.
		hugeReactorMax = 0.05
		// strongSourceTol: 1e6 MVA is 0.16 ohm at 400 kV against a line input
		// impedance of several hundred ohms: |Vr/E| within 0.1 % of |Vr/Vs|.
		strongSourceTol = 1e-3
		// weakSourceMax: 16 kohm of source reactance in series with a line input of
		// about -j900 ohm leaves |Vs/E| ~ 900/15100 = 0.06 of the EMF; below 0.1.
		weakSourceMax = 0.1
	)
	t.Run("zero source", func(t *testing.T) {
		t.Parallel()
		var sc struct {
			Points []struct {
				F        float64 `json:"f_hz"`
				Gain     float64 `json:"gain"`
				GainLine float64 `json:"gain_line"`
			} `json:"points"`
		}
		extremeJSON(t, "zero-source-impedance", "scan", &sc)
		if len(sc.Points) == 0 {
			t.Fatal("no points")
		}
		for _, p := range sc.Points {
			if math.Abs(p.Gain-p.GainLine) > zeroSourceTol*p.GainLine {
				t.Fatalf("%g Hz: gain %.15g, gain_line %.15g", p.F, p.Gain, p.GainLine)
			}
		}
	})
	t.Run("tiny reactor", func(t *testing.T) {
		t.Parallel()
		var o extremeOpenEnd
		extremeJSON(t, "tiny-reactors", "loading", &o)
		if d := o.OpenEnd.Rise - o.OpenEnd.RiseWithShunt; !(d > 0 && d < tinyReactorTol*o.OpenEnd.Rise) {
			t.Errorf("rise %.9f, with the 0.001 Mvar reactor %.9f: want slightly lower", o.OpenEnd.Rise, o.OpenEnd.RiseWithShunt)
		}
	})
	t.Run("huge reactor", func(t *testing.T) {
		t.Parallel()
		var o extremeOpenEnd
		extremeJSON(t, "huge-reactors", "loading", &o)
		if !(o.OpenEnd.RiseWithShunt > 0 && o.OpenEnd.RiseWithShunt < hugeReactorMax) {
			t.Errorf("open-end voltage with 1e5 Mvar at the end %.6g pu, want below %g", o.OpenEnd.RiseWithShunt, hugeReactorMax)
		}
	})
	t.Run("strong source", func(t *testing.T) {
		t.Parallel()
		var o extremeOpenEnd
		extremeJSON(t, "strong-source-1e6mva", "loading", &o)
		if d := math.Abs(o.OpenEnd.RiseFromEMF - o.OpenEnd.RiseWithShunt); !(d < strongSourceTol*o.OpenEnd.RiseWithShunt) {
			t.Errorf("|Vr/E| %.6f, |Vr/Vs| %.6f: want within %g", o.OpenEnd.RiseFromEMF, o.OpenEnd.RiseWithShunt, strongSourceTol)
		}
	})
	t.Run("weak source", func(t *testing.T) {
		t.Parallel()
		var o extremeOpenEnd
		extremeJSON(t, "weak-source-10mva", "loading", &o)
		if !(o.OpenEnd.RiseFromEMF > 0 && o.OpenEnd.RiseFromEMF < weakSourceMax*o.OpenEnd.Rise) {
			t.Errorf("|Vr/E| %.6f with a 10 MVA source, |Vr/Vs| %.6f: want below %g of it", o.OpenEnd.RiseFromEMF, o.OpenEnd.Rise, weakSourceMax)
		}
	})
}

// boundsBase is the hostile battery's valid base study made light (fewer points,
// shots and milliseconds), so that every command can run on it once per bound.
func boundsBase(t *testing.T) string {
	t.Helper()
	src := hostileBase(t)
	for _, r := range [][2]string{
		{"points = 500", "points = 200"}, {"shots = 20", "shots = 4"},
		{"[energise]\nwaveform = \"step\"\nduration_ms = 10", "[energise]\nwaveform = \"step\"\nduration_ms = 5"},
		{"pole_sigma_ms = 1.0\nduration_ms = 10", "pole_sigma_ms = 1.0\nduration_ms = 5"},
	} {
		if !strings.Contains(src, r[0]) {
			t.Fatalf("base study lacks %q", r[0])
		}
		src = strings.Replace(src, r[0], r[1], 1)
	}
	return src
}

// boundsBaseSource is the base's [source] table.
const boundsBaseSource = "[source]\nshort_circuit_mva = 15000\nx_over_r = 12\nx0_over_x1 = 1.2\n"

// boundsGeometry replaces the base's per-length constants by a tower geometry with
// an earth wire (invented, in the usual proportions of a 400 kV tower).
const boundsGeometry = `[conductors.main]
outer_diameter_mm = 31.8
core_diameter_mm = 10.6
dc_ohm_per_km = 0.0585

[conductors.earth]
outer_diameter_mm = 16
dc_ohm_per_km = 0.3

[line]
length_km = 320

[line.geometry]
earth_resistivity_ohm_m = 100
transposed = true
phases = [
  { x_m = -11, height_m = 27, sag_m = 12, conductor = "main", bundle = 2, bundle_spacing_mm = 450 },
  { x_m = 0, height_m = 27, sag_m = 12, conductor = "main", bundle = 2, bundle_spacing_mm = 450 },
  { x_m = 11, height_m = 27, sag_m = 12, conductor = "main", bundle = 2, bundle_spacing_mm = 450 },
]
earth_wires = [{ x_m = 0, height_m = 36, sag_m = 9, conductor = "earth" }]
`

// boundsSetKey sets key = val in table of src (table "" is the top level), adding the
// key or the table when absent.
func boundsSetKey(src, table, key, val string) string {
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
		at = 1 // after the title
	}
	lines = append(lines[:at], append([]string{key + " = " + val}, lines[at:]...)...)
	return strings.Join(lines, "\n")
}

// boundsCase is one key of the study file with its documented lower and upper bound
// (README, "The study file"; the values as the user writes them; "" skips one).
// prep turns the base into a study where the key applies; heavyHi marks upper bounds
// that only check and constants run at (a million scan points, ten seconds of
// transient, a scan to 10 MHz: their cost, not their numerics, is what the bound is
// about).
type boundsCase struct {
	table, key string
	lo, hi     string
	prep       func(string) string
	heavyHi    bool
}

func boundsWithGeometry(src string) string {
	i, j := strings.Index(src, "[line]"), strings.Index(src, "[source]")
	return src[:i] + boundsGeometry + "\n" + src[j:]
}

func boundsWith(table, key, val string) func(string) string {
	return func(s string) string { return boundsSetKey(s, table, key, val) }
}

func boundsChain(fs ...func(string) string) func(string) string {
	return func(s string) string {
		for _, f := range fs {
			s = f(s)
		}
		return s
	}
}

var boundsCases = []boundsCase{
	{"", "frequency_hz", "1", "10000", nil, false},
	{"", "voltage_kv", "1", "2000", boundsChain(boundsWith("", "us_kv", "2000")), false},
	{"", "us_kv", "400", "2000", nil, false},
	// A 10 m line runs at its travel time, 0.017 µs, and rings out within
	// microseconds: half a millisecond of energisation and switching, the poles
	// closing together (a spread of ±3 ms of closing instants would only add steps).
	{"line", "length_km", "0.01", "10000", boundsChain(boundsWith("switching", "pole_sigma_ms", "0"),
		boundsWith("switching", "duration_ms", "0.5"), boundsWith("energise", "duration_ms", "0.5")), false},
	{"line", "r_ohm_per_km", "0.000001", "1000", nil, false},
	{"line", "l_mh_per_km", "0.0001", "100", nil, false},
	{"line", "x_ohm_per_km", "0.000031415926535897936", "31.41592653589793", func(s string) string {
		return strings.Replace(s, "l_mh_per_km = 0.95\n", "", 1)
	}, false},
	{"line", "c_nf_per_km", "0.001", "10000", nil, false},
	{"line", "b_us_per_km", "0.0003141592653589793", "3141.592653589793", func(s string) string {
		return strings.Replace(s, "c_nf_per_km = 12.0\n", "", 1)
	}, false},
	{"line", "g_us_per_km", "0.000001", "10000", nil, false},
	{"line", "r0_ohm_per_km", "0.000001", "1000", nil, false},
	{"line", "l0_mh_per_km", "0.0001", "100", nil, false},
	{"line", "c0_nf_per_km", "0.001", "10000", nil, false},
	{"line", "g0_us_per_km", "0.000001", "10000", nil, false},
	{"source", "short_circuit_mva", "1", "10000000", nil, false},
	{"source", "x_over_r", "0.1", "10000", nil, false},
	{"source", "x0_over_x1", "0.01", "100", nil, false},
	{"source", "r_ohm", "0.000001", "1000000", func(s string) string {
		return strings.Replace(s, "short_circuit_mva = 15000\nx_over_r = 12\n", "r_ohm = 0.9\nl_mh = 34\n", 1)
	}, false},
	{"source", "l_mh", "0.000001", "1000000", func(s string) string {
		return strings.Replace(s, "short_circuit_mva = 15000\nx_over_r = 12\n", "r_ohm = 0.9\nl_mh = 34\n", 1)
	}, false},
	{"source", "x_ohm", "0.00000031415926535897936", "314159.2653589793", func(s string) string {
		return strings.Replace(s, "short_circuit_mva = 15000\nx_over_r = 12\n", "r_ohm = 0.9\nx_ohm = 10.7\n", 1)
	}, false},
	{"shunt", "mvar", "0.001", "100000", nil, false},
	{"shunt", "mvar", "-100000", "-0.001", nil, false},
	{"shunt", "q_factor", "1", "100000", nil, false},
	{"receiving", "load_mw", "0.001", "10000000", nil, false},
	{"receiving", "load_mvar", "0.001", "10000000", nil, false},
	{"receiving", "load_mvar", "-10000000", "-0.001", nil, false},
	{"receiving", "short_circuit_mva", "1", "10000000", boundsWith("receiving", "x_over_r", "10"), false},
	{"receiving", "x_over_r", "0.1", "10000", boundsWith("receiving", "short_circuit_mva", "8000"), false},
	{"scan", "f_min_hz", "0.001", "2499", nil, false},
	{"scan", "f_max_hz", "1.001", "10000000", nil, true},
	{"scan", "points", "2", "1000000", nil, true},
	{"scan", "watch_harmonics", "[1]", "[1000]", nil, false},
	{"scan", "gain_limit", "0.001", "1000000", nil, false},
	{"scan", "watch_band_pct", "0.1", "49", nil, false},
	{"scan", "background_pct", "{ 5 = 0 }", "{ 5 = 100 }", nil, false},
	{"scan", "planning_pct", "{ 5 = 0 }", "{ 5 = 100 }", nil, false},
	{"scan", "short_circuit_mva_range", "[1, 2]", "[9999999, 10000000]", nil, false},
	{"scan", "steps", "2", "200", boundsWith("scan", "short_circuit_mva_range", "[3000, 48000]"), false},
	{"energise", "close_deg", "-360", "360", boundsWith("energise", "waveform", `"sine"`), false},
	{"energise", "trapped_pu", "-2", "2", nil, false},
	{"energise", "duration_ms", "0.001", "10000", nil, true},
	{"energise", "time_step_us", "0.001", "", boundsWith("energise", "duration_ms", "0.05"), false},
	{"energise", "time_step_us", "", "5000", boundsWith("energise", "duration_ms", "5"), false},
	{"switching", "shots", "1", "100000", nil, true},
	{"switching", "close_deg", "-360", "360", nil, false},
	{"switching", "pole_sigma_ms", "0", "20", nil, false},
	{"switching", "trapped_pu", "[-10, -10, -10]", "[10, 10, 10]", nil, false},
	{"switching", "preinsertion_ohm", "1", "100000", nil, false},
	{"switching", "preinsertion_ms", "0.01", "100", boundsWith("switching", "preinsertion_ohm", "400"), false},
	{"switching", "siwl_kv", "1", "10000", nil, false},
	{"switching", "ks", "1", "2", nil, false},
	{"switching", "kcd", "1", "2", nil, false},
	{"switching", "duration_ms", "0.01", "10000", nil, true},
	{"switching", "time_step_us", "0.001", "", boundsChain(boundsWith("switching", "duration_ms", "0.05"), boundsWith("switching", "pole_sigma_ms", "0")), false},
	{"switching", "time_step_us", "", "10000", boundsWith("switching", "duration_ms", "10"), false},
	{"switching", "neutral_reactor_sending_ohm", "1", "1000000", nil, false},
	{"switching", "neutral_reactor_receiving_ohm", "1", "1000000", nil, false},
	{"switching", "dead_time_ms", "0.01", "10000", boundsWith("switching", "trapped_pu", "[-1, 1, -1]"), true},
	{"switching", "controlled_sigma_ms", "0", "20", boundsWith("switching", "controlled_closing", "true"), false},
	{"switching.arrester", "rated_kv", "1", "2000", func(s string) string {
		return s + "\n[[switching.arrester]]\nat = \"receiving\"\nrated_kv = 336\n"
	}, false},
	{"switching.arrester", "vi_ka_kv", "[[0.000001, 1], [0.000002, 2]]", "[[999, 9999], [1000, 10000]]", func(s string) string {
		return s + "\n[[switching.arrester]]\nat = \"receiving\"\nvi_ka_kv = [[0.001, 475], [1, 540]]\n"
	}, false},
	{"targets", "max_open_end_pu", "0.5", "10", nil, false},
	{"targets", "max_gain_watched", "0.1", "10000", nil, false},
	{"targets", "max_u2_pu", "1", "10", nil, false},
	{"targets", "min_margin_pct", "-100", "1000", boundsWith("switching", "siwl_kv", "1050"), false},
	{"levers", "reactor_mvar_sending", "[0, 0.001]", "[100000, 100000]", nil, false},
	{"levers", "reactor_mvar_receiving", "[0.001, 0.001]", "[0, 100000]", nil, false},
	{"levers", "preinsertion_ohm", "[0, 1]", "[100000, 100000]", nil, false},
	{"levers", "controlled_sigma_ms", "0", "20", boundsWith("levers", "controlled_closing", "true"), false},
	{"levers", "arresters_kv", "[1]", "[2000]", nil, false},
	{"loading", "thermal_rating_a", "1", "1000000", nil, false},
	{"conductors.main", "outer_diameter_mm", "1", "200", boundsChain(boundsWithGeometry, boundsWith("conductors.main", "core_diameter_mm", "0")), false},
	{"conductors.main", "core_diameter_mm", "0", "28.62", boundsWithGeometry, false},
	{"conductors.main", "dc_ohm_per_km", "0.001", "100", boundsWithGeometry, false},
	{"line.geometry", "earth_resistivity_ohm_m", "0.1", "1000000", boundsWithGeometry, false},
}

// boundsCommands runs every command on a study: constants, scan, energise by each
// method, loading, switching, and remedy (the base has targets).
var boundsCommands = [][]string{
	{"constants", "--json"}, {"scan", "--json"}, {"energise", "--json", "--method", "lattice"},
	{"energise", "--json", "--method", "bergeron"}, {"energise", "--json", "--method", "laplace"},
	{"loading", "--json"}, {"switching", "--json"}, {"remedy", "--json"},
}

// boundsCommandsFor returns the commands that read the keys of table: the system,
// line, source, shunt and receiving keys reach every command; the others only the
// commands whose part of the study they set (remedy reads the scan grid and the
// switching settings for its candidates).
func boundsCommandsFor(table string) [][]string {
	only := func(names ...string) [][]string {
		var out [][]string
		for _, c := range boundsCommands {
			for _, n := range names {
				if c[0] == n {
					out = append(out, c)
				}
			}
		}
		return out
	}
	switch table {
	case "scan":
		return only("scan", "remedy")
	case "energise":
		return only("energise")
	case "switching", "switching.arrester":
		return only("switching", "remedy")
	case "targets", "levers":
		return only("remedy")
	case "loading":
		return only("loading")
	}
	return boundsCommands
}

// TestExtremesEveryKeyAtItsBounds: every numeric key of the study file at its lower
// and at its upper bound, alone, loads (or is refused with exit 2 naming a key, when
// the bound meets another rule such as the speed of light) and every command then
// succeeds or refuses with exit 2 naming a key, never exit 1, with no NaN or Inf in
// its JSON (issue 15, item 17). Each key runs through the commands that read it
// (boundsCommandsFor). Just beyond each bound the key is refused with exit 2 naming it.
func TestExtremesEveryKeyAtItsBounds(t *testing.T) {
	t.Parallel()
	base := boundsBase(t)
	for _, c := range boundsCases {
		for i, val := range []string{c.lo, c.hi} {
			if val == "" {
				continue
			}
			name := fmt.Sprintf("%s.%s=%s", c.table, c.key, val)
			t.Run(name, func(t *testing.T) {
				t.Parallel()
				src := base
				if c.prep != nil {
					src = c.prep(src)
				}
				src = boundsSetKey(src, c.table, c.key, val)
				dir := t.TempDir()
				path := filepath.Join(dir, "bound.toml")
				if err := os.WriteFile(path, []byte(src), 0o644); err != nil {
					t.Fatal(err)
				}
				cmds := boundsCommandsFor(c.table)
				if c.heavyHi && i == 1 {
					cmds = [][]string{{"check"}, {"constants", "--json"}}
				}
				// The lattice diagram needs a resistive source and no line-connected
				// shunt: it runs on the same study with the base's source left out (an
				// ideal source) and its reactor on the bus (not in the energisation).
				latticeSrc := strings.Replace(strings.Replace(src, boundsBaseSource, "", 1), `connection = "line"`, `connection = "bus"`, 1)
				ideal := filepath.Join(dir, "bound-ideal.toml")
				if err := os.WriteFile(ideal, []byte(latticeSrc), 0o644); err != nil {
					t.Fatal(err)
				}
				for _, cmd := range cmds {
					args := append(append([]string{}, cmd...), path)
					if extremeHas(cmd, "lattice") {
						args[len(args)-1] = ideal
					}
					var stdout, stderr bytes.Buffer
					status := run(args, &stdout, &stderr)
					switch status {
					case 0:
						if extremeHas(args, "--json") {
							extremeCheckJSON(t, args, stdout.Bytes())
						}
					case 2:
						if !regexp.MustCompile(`: [a-z_0-9]+(\.[a-z_0-9]+)*(\[\d+\])?(\.[a-z_]+)*: `).MatchString(stderr.String()) {
							t.Errorf("%v: exit 2 without a key path: %s", cmd, stderr.String())
						}
						// A bound is inside the key's range: the key itself may not be refused
						// there (another rule, such as the speed of light, may refuse it).
						if strings.Contains(stderr.String(), c.key+": must") {
							t.Errorf("%v: the bound %s itself is refused: %s", cmd, val, stderr.String())
						}
						t.Logf("%v refused: %s", cmd, strings.TrimSpace(stderr.String()))
					default:
						t.Errorf("%v: exit status %d: %s", cmd, status, stderr.String())
					}
				}
			})
		}
	}
}
