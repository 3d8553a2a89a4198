package main

import (
	"bytes"
	"encoding/json"
	"math"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"github.com/telegrapher/telegrapher/cmd/telegrapher/internal/analysis"
)

// fndStudy is a valid single-section study used by the foundation CLI tests.
const fndStudy = `title = "test line"
frequency_hz = 50
voltage_kv = 400
[line]
length_km = 320
r_ohm_per_km = 0.028
l_mh_per_km = 0.93
c_nf_per_km = 12.4
`

// fndWrite writes a study file into a fresh folder and returns its path.
func fndWrite(t *testing.T, name, src string) string {
	t.Helper()
	p := filepath.Join(t.TempDir(), name)
	if err := os.WriteFile(p, []byte(src), 0o644); err != nil {
		t.Fatal(err)
	}
	return p
}

// fndRun runs the CLI in-process.
func fndRun(args ...string) (code int, stdout, stderr string) {
	var o, e bytes.Buffer
	code = run(args, &o, &e)
	return code, o.String(), e.String()
}

// tolJSON: values through JSON round trip exactly; formulas in float64.
const tolJSON = 1e-12

func TestConstantsJSONContract(t *testing.T) {
	t.Parallel()
	p := fndWrite(t, "line.toml", fndStudy)
	code, out, errOut := fndRun("constants", "--json", p)
	if code != 0 || errOut != "" {
		t.Fatalf("exit %d, stderr %q", code, errOut)
	}
	var doc map[string]any
	if err := json.Unmarshal([]byte(out), &doc); err != nil {
		t.Fatal(err)
	}
	for _, k := range []string{"frequency_hz", "length_km", "gamma_per_km", "alpha_np_per_km", "beta_rad_per_km", "zc_ohm",
		"zc_lossless_ohm", "velocity_km_per_s", "wavelength_km", "electrical_length_deg", "sil_mw", "no_load_rise_pu", "abcd"} {
		if _, ok := doc[k]; !ok {
			t.Errorf("missing %q", k)
		}
	}
	abcd := doc["abcd"].(map[string]any)
	for _, m := range []string{"exact", "nominal_pi", "nominal_t", "short"} {
		e, ok := abcd[m].(map[string]any)
		if !ok {
			t.Fatalf("abcd.%s missing", m)
		}
		for _, k := range []string{"a", "b", "c", "d"} {
			if _, ok := e[k].(map[string]any)["re"]; !ok {
				t.Errorf("abcd.%s.%s is not complex", m, k)
			}
		}
	}
	// SIL = V²/sqrt(L/C) and no-load rise = 1/|cosh γl| (design.md formulas).
	zl := math.Sqrt(0.93e-6 / 12.4e-12)
	if got, want := doc["zc_lossless_ohm"].(float64), zl; math.Abs(got-want) > tolJSON*want {
		t.Errorf("zc_lossless_ohm = %g, want %g", got, want)
	}
	if got, want := doc["sil_mw"].(float64), 400.0*400/zl; math.Abs(got-want) > tolJSON*want {
		t.Errorf("sil_mw = %g, want %g", got, want)
	}
	ex := abcd["exact"].(map[string]any)["a"].(map[string]any)
	if got, want := doc["no_load_rise_pu"].(float64), 1/math.Hypot(ex["re"].(float64), ex["im"].(float64)); math.Abs(got-want) > 1e-12 {
		t.Errorf("no_load_rise_pu = %g, want 1/|A| = %g", got, want)
	}
	if doc["class_by_length"] != "long" {
		t.Errorf("class_by_length = %v", doc["class_by_length"])
	}
	if _, ok := doc["overflow"]; ok {
		t.Errorf("unexpected overflow: %v", doc["overflow"])
	}
}

func TestConstantsAtHzAndText(t *testing.T) {
	t.Parallel()
	p := fndWrite(t, "line.toml", fndStudy)
	code, out, _ := fndRun("constants", p, "--at-hz", "250", "--json")
	if code != 0 {
		t.Fatalf("exit %d", code)
	}
	var a, b map[string]any
	json.Unmarshal([]byte(out), &a)
	_, out50, _ := fndRun("constants", "--json", p)
	json.Unmarshal([]byte(out50), &b)
	if a["frequency_hz"].(float64) != 250 || a["sil_mw"] != b["sil_mw"] || a["no_load_rise_pu"] != b["no_load_rise_pu"] {
		t.Errorf("--at-hz: f %v, SIL %v vs %v, rise %v vs %v", a["frequency_hz"], a["sil_mw"], b["sil_mw"], a["no_load_rise_pu"], b["no_load_rise_pu"])
	}
	// Electrical length scales with frequency for constant L, C (5x at 250 Hz), less
	// the loss term β ≈ ω sqrt(LC)(1 + R²/(8ω²L²)), 0.1 % at 50 Hz for this line.
	if r := a["electrical_length_deg"].(float64) / b["electrical_length_deg"].(float64); math.Abs(r-5) > 2e-3*5 || r > 5 {
		t.Errorf("electrical length ratio %g, want about 5", r)
	}
	code, text, _ := fndRun("constants", p)
	for _, want := range []string{"Np/km", "dB/100 km", "deg/km", "SIL", "no-load rise", "nominal pi", "nominal T", "short", "error against exact", "by length", "by electrical length", "section(s) in cascade"} {
		if !strings.Contains(text, want) {
			t.Errorf("text lacks %q", want)
		}
	}
	if code != 0 {
		t.Errorf("exit %d", code)
	}
}

func TestConstantsSectionsAndOverflow(t *testing.T) {
	t.Parallel()
	sec := `frequency_hz = 50
voltage_kv = 400
[[line.sections]]
name = "overhead A"
length_km = 120
r_ohm_per_km = 0.03
l_mh_per_km = 0.95
c_nf_per_km = 12.0
[[line.sections]]
name = "cable"
length_km = 8
r_ohm_per_km = 0.02
l_mh_per_km = 0.4
c_nf_per_km = 210
`
	code, out, errOut := fndRun("constants", "--json", fndWrite(t, "sec.toml", sec))
	if code != 0 {
		t.Fatalf("exit %d: %s", code, errOut)
	}
	var doc map[string]any
	json.Unmarshal([]byte(out), &doc)
	secs, ok := doc["sections"].([]any)
	if !ok || len(secs) != 2 || doc["length_km"].(float64) != 128 {
		t.Fatalf("sections %v, length %v", doc["sections"], doc["length_km"])
	}
	if secs[1].(map[string]any)["name"] != "cable" {
		t.Errorf("section names: %v", secs)
	}
	// A synthetic very lossy 3000 km line at 1 MHz: the true ABCD exceeds a float64,
	// so its elements are null and listed in "overflow"; ratios stay finite.
	lossy := strings.Replace(strings.Replace(fndStudy, "length_km = 320", "length_km = 3000", 1), "c_nf_per_km = 12.4", "c_nf_per_km = 12.4\ng_us_per_km = 2000", 1)
	code, out, errOut = fndRun("constants", "--json", "--at-hz", "1e6", fndWrite(t, "lossy.toml", lossy))
	if code != 0 {
		t.Fatalf("exit %d: %s", code, errOut)
	}
	doc = nil
	json.Unmarshal([]byte(out), &doc)
	ov, _ := doc["overflow"].([]any)
	found := false
	for _, k := range ov {
		found = found || k == "abcd.exact.a.re"
	}
	if !found {
		t.Errorf("overflow = %v, want abcd.exact.a.re listed", ov)
	}
	if doc["no_load_rise_pu"] == nil || doc["zc_ohm"] == nil {
		t.Errorf("finite results went missing")
	}
}

func TestConstantsUsage(t *testing.T) {
	t.Parallel()
	p := fndWrite(t, "line.toml", fndStudy)
	for _, args := range [][]string{
		{"constants"},
		{"constants", p, p},
		{"constants", p, "--at-hz", "-5"},
		{"constants", p, "--at-hz", "x"},
		{"constants", p, "--plot", "a.png"},
		{"check"},
		{"demo", p},
	} {
		code, out, errOut := fndRun(args...)
		if code != 2 || out != "" || errOut == "" {
			t.Errorf("%v: exit %d, stdout %q, stderr %q", args, code, out, errOut)
		}
	}
}

func TestCheckPrintsUnderstood(t *testing.T) {
	t.Parallel()
	src := fndStudy + "[source]\nshort_circuit_mva = 15000\nx_over_r = 12\n"
	code, out, errOut := fndRun("check", fndWrite(t, "c.toml", src))
	if code != 0 || errOut != "" {
		t.Fatalf("exit %d: %s", code, errOut)
	}
	for _, want := range []string{"valid study", "line.length_km", "320 km", "[given]", "us_kv", "default: voltage_kv", "source.r_ohm", "from |Z| = V^2/S", "scan.f_max_hz", "2500 Hz", "energise.method", "laplace"} {
		if !strings.Contains(out, want) {
			t.Errorf("check output lacks %q", want)
		}
	}
}

func TestDemoPrints(t *testing.T) {
	t.Parallel()
	st, err := demoStudy()
	if err != nil {
		t.Fatal(err)
	}
	if st.Zero == nil || len(st.Network.Shunts) != 1 || !st.Network.Shunts[0].OnLine || st.Source.ShortCircuitVA != 15e9 || st.Source.XOverR != 12 {
		t.Errorf("demo study is not the documented scenario: %+v", st)
	}
	res, err := computeConstants(st, 0)
	if err != nil {
		t.Fatal(err)
	}
	// Trade facts for a 400 kV line (common practice, no source): SIL 500-700 MW,
	// no-load rise of a 320 km line a few per cent.
	if res.SILMW < 500 || res.SILMW > 700 || res.NoLoadRisePU < 1.03 || res.NoLoadRisePU > 1.1 {
		t.Errorf("demo SIL %g MW, rise %g", res.SILMW, res.NoLoadRisePU)
	}
}

// The nominal-pi count is the fewest sections within 1 %: n passes, n-1 does not.
// Cross-check: the error of n sections falls as 1/n² (identity of the lumped model).
func TestPiSectionsCount(t *testing.T) {
	t.Parallel()
	st, err := demoStudy()
	if err != nil {
		t.Fatal(err)
	}
	for _, f := range []float64{50, 250, 1000} {
		res, err := computeConstants(st, f)
		if err != nil {
			t.Fatal(err)
		}
		n := res.PiSectionsFor1Pct
		s := complex(0, 2*math.Pi*f)
		exact := st.Line.Exact(s)
		errN := func(k int) float64 {
			pi, _, _ := analysis.Lumped(st.Line, s, k)
			return analysis.ModelErrorOf(pi, exact).Max
		}
		if n < 1 || errN(n) >= 1 || (n > 1 && errN(n-1) < 1) {
			t.Errorf("%g Hz: n = %d, error(n) = %g %%, error(n-1) = %g %%", f, n, errN(n), errN(max(n-1, 1)))
		}
		if r := errN(40) / errN(80); math.Abs(r-4) > 0.05 {
			t.Errorf("%g Hz: error(40)/error(80) = %g, want about 4", f, r)
		}
	}
}
