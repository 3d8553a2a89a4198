package main

import (
	"bytes"
	"encoding/json"
	"math"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"github.com/telegrapher/telegrapher/cmd/telegrapher/internal/report"
	"github.com/telegrapher/telegrapher/cmd/telegrapher/internal/study"
	"github.com/telegrapher/telegrapher/freqscan"
	"github.com/telegrapher/telegrapher/propagation"
	"gonum.org/v1/plot/vg"
)

// loadingTestStudy is an invented 400 kV, 50 Hz, 320 km line with a 150 Mvar
// line-connected reactor at the receiving end and a 15 GVA source.
func loadingTestStudy() *study.Study {
	const v, f = 400e3, 50.0
	w := 2 * math.Pi * f
	line := propagation.Cascade{{Length: 320e3, Constants: propagation.RLGC{R: 0.025e-3, L: 0.95e-6, C: 12e-12}}}
	react := freqscan.Shunt{End: freqscan.Receiving, OnLine: true, L: v * v / (150e6 * w)}
	zs := v * v / 15e9
	src := freqscan.Source{R: zs / math.Hypot(1, 12), L: zs * 12 / math.Hypot(1, 12) / w}
	return &study.Study{
		File: "test.toml", Title: "test line", Frequency: f, Voltage: v, Us: v,
		Line:    line,
		Network: freqscan.Network{Source: src, Line: line, Shunts: []freqscan.Shunt{react}},
		Source:  study.SourceSpec{ShortCircuitVA: 15e9, XOverR: 12, R: src.R, L: src.L},
	}
}

func TestComputeLoadingContract(t *testing.T) {
	t.Parallel()
	st := loadingTestStudy()
	r, err := computeLoading(st, 1.0)
	if err != nil {
		t.Fatal(err)
	}
	// contract: points from 0 to min(2 SIL, p_max), at least 21, SIL among them
	n := len(r.Points)
	if n < 21 || r.Points[0].PMW != 0 {
		t.Fatalf("%d points, first %g MW", n, r.Points[0].PMW)
	}
	if want := math.Min(2*r.SILMW, r.PMaxMW); math.Abs(r.Points[n-1].PMW-want) > 1e-9*want {
		t.Errorf("last point %g MW, want %g", r.Points[n-1].PMW, want)
	}
	hasSIL := false
	for _, p := range r.Points {
		hasSIL = hasSIL || math.Abs(p.PSIL-1) < 1e-12
		// identity: the net figures differ by the shunts' 150 Mvar at the receiving end
		if math.Abs(p.QrMvar-p.QrNetMvar-150) > 1e-6 || math.Abs(p.QsNetMvar-p.QsMvar) > 1e-9 {
			t.Errorf("net reactive power: qr %g net %g, qs %g net %g", p.QrMvar, p.QrNetMvar, p.QsMvar, p.QsNetMvar)
		}
	}
	if !hasSIL {
		t.Error("no point at 1 SIL")
	}
	// identity: the added reactor brings the open end to the target
	omega := 2 * math.Pi * st.Frequency
	y := complex(0, -(150+r.OpenEnd.ReactorAddedMvar)*1e6/(st.Voltage*st.Voltage))
	oe, err := propagation.OpenEnd(st.Line, omega, st.Voltage, 0, y)
	if err != nil {
		t.Fatal(err)
	}
	if r.OpenEnd.RiseWithShuntsPU > 1 && math.Abs(oe.Rise-1) > 1e-9 {
		t.Errorf("with the added %g Mvar the rise is %g", r.OpenEnd.ReactorAddedMvar, oe.Rise)
	}
	if !(r.OpenEnd.RiseWithShuntsPU < r.OpenEnd.RisePU) {
		t.Errorf("a reactor must lower the rise: %g vs %g", r.OpenEnd.RiseWithShuntsPU, r.OpenEnd.RisePU)
	}
	var buf bytes.Buffer
	if err := writeJSON(&buf, r); err != nil {
		t.Fatal(err)
	}
	var doc map[string]any
	if err := json.Unmarshal(buf.Bytes(), &doc); err != nil {
		t.Fatal(err)
	}
	for _, k := range []string{"sil_mw", "p_max_mw", "points"} {
		if _, ok := doc[k]; !ok {
			t.Errorf("JSON lacks %q", k)
		}
	}
	if _, ok := doc["overflow"]; ok {
		t.Errorf("unexpected overflow: %v", doc["overflow"])
	}
	pt := doc["points"].([]any)[0].(map[string]any)
	for _, k := range []string{"p_mw", "p_sil", "delta_deg", "qs_mvar", "qr_mvar", "v_mid_pu", "v_max_pu", "v_min_pu", "x_v_max_km"} {
		if _, ok := pt[k].(float64); !ok {
			t.Errorf("points[0].%s missing or not a number", k)
		}
	}
}

func TestLoadingFigureRenders(t *testing.T) {
	t.Parallel()
	r, err := computeLoading(loadingTestStudy(), 1.0)
	if err != nil {
		t.Fatal(err)
	}
	dir := t.TempDir()
	for _, format := range []string{"png", "svg"} {
		b, err := report.RenderStacked(loadingPlots(r), 8*vg.Inch, 4*vg.Inch, format)
		if err != nil {
			t.Fatal(err)
		}
		if len(b) < 1000 {
			t.Errorf("%s figure only %d bytes", format, len(b))
		}
		if err := report.WriteFileAtomic(filepath.Join(dir, "loading."+format), b); err != nil {
			t.Fatal(err)
		}
	}
}

func TestLoadingCommand(t *testing.T) {
	t.Parallel()
	dir := t.TempDir()
	png := filepath.Join(dir, "loading.png")
	for _, tc := range []struct {
		name string
		args []string
		code int
	}{
		{"json", []string{"loading", "../../testdata/loading_study.toml", "--json"}, 0},
		{"flags first", []string{"loading", "--target-pu", "1.02", "--plot", png, "../../testdata/loading_study.toml"}, 0},
		{"table", []string{"loading", "../../testdata/loading_study.toml"}, 0},
		{"bad target", []string{"loading", "../../testdata/loading_study.toml", "--target-pu", "-1"}, 2},
		{"bad plot name", []string{"loading", "../../testdata/loading_study.toml", "--plot", filepath.Join(dir, "x.jpg")}, 2},
		{"no study", []string{"loading"}, 2},
		{"missing file", []string{"loading", filepath.Join(dir, "absent.toml")}, 2},
	} {
		var out, errb bytes.Buffer
		if code := run(tc.args, &out, &errb); code != tc.code {
			t.Errorf("%s: exit %d, want %d; stderr %s", tc.name, code, tc.code, errb.String())
			continue
		}
		if tc.name == "json" {
			var doc map[string]any
			if err := json.Unmarshal(out.Bytes(), &doc); err != nil {
				t.Errorf("json: %v", err)
			} else if len(doc["points"].([]any)) < 21 {
				t.Errorf("json: %d points", len(doc["points"].([]any)))
			}
		}
		if tc.code == 2 && errb.Len() == 0 {
			t.Errorf("%s: no message on stderr", tc.name)
		}
	}
	if fi, err := os.Stat(png); err != nil || fi.Size() < 1000 {
		t.Errorf("plot not written: %v", err)
	}
}

// [loading] thermal_rating_a gives the thermal limit sqrt(3)·V·I (the conductor
// rating as power at unity power factor, common practice, no source) and is
// validated like every key.
func TestLoadingThermalRating(t *testing.T) {
	t.Parallel()
	base, err := os.ReadFile(filepath.Join("..", "..", "testdata", "loading_study.toml"))
	if err != nil {
		t.Fatal(err)
	}
	dir := t.TempDir()
	write := func(name, extra string) string {
		p := filepath.Join(dir, name)
		if err := os.WriteFile(p, append(append([]byte{}, base...), extra...), 0o644); err != nil {
			t.Fatal(err)
		}
		return p
	}
	good := write("rated.toml", "\n[loading]\nthermal_rating_a = 800\n")
	var stdout, stderr bytes.Buffer
	if code := run([]string{"loading", good, "--json"}, &stdout, &stderr); code != 0 {
		t.Fatalf("exit %d: %s", code, stderr.String())
	}
	var doc struct {
		SILMW       float64 `json:"sil_mw"`
		VoltageKV   float64 `json:"voltage_kv"`
		Loadability struct {
			ThermalSIL float64 `json:"thermal_limit_sil"`
			SIL        float64 `json:"loadability_sil"`
			Curve      []struct {
				ThermalSIL     float64 `json:"thermal_sil"`
				LoadabilitySIL float64 `json:"loadability_sil"`
			} `json:"curve"`
		} `json:"loadability"`
	}
	if err := json.Unmarshal(stdout.Bytes(), &doc); err != nil {
		t.Fatal(err)
	}
	want := math.Sqrt(3) * doc.VoltageKV * 800 / 1e3 / doc.SILMW // MW over MW
	if math.Abs(doc.Loadability.ThermalSIL-want) > 1e-9*want {
		t.Errorf("thermal limit %.6g SIL, want sqrt(3)·V·I/SIL = %.6g", doc.Loadability.ThermalSIL, want)
	}
	for _, c := range doc.Loadability.Curve {
		if c.LoadabilitySIL > c.ThermalSIL*(1+1e-12) {
			t.Errorf("loadability %.4g SIL above the thermal limit %.4g", c.LoadabilitySIL, c.ThermalSIL)
		}
	}
	for _, tc := range []struct{ extra, want string }{
		{"\n[loading]\nthermal_rating_a = -5\n", "loading.thermal_rating_a: must be > 0"},
		{"\n[loading]\nthermal_rating = 800\n", `loading.thermal_rating: unknown key (did you mean "thermal_rating_a"?)`},
	} {
		p := write("bad.toml", tc.extra)
		stdout.Reset()
		stderr.Reset()
		if code := run([]string{"loading", p}, &stdout, &stderr); code != 2 || !strings.Contains(stderr.String(), tc.want) || stdout.Len() != 0 {
			t.Errorf("%q: exit %d, stderr %q, want exit 2 with %q", tc.extra, code, stderr.String(), tc.want)
		}
	}
}
