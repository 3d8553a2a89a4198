package main

import (
	"bytes"
	"encoding/json"
	"math"
	"os"
	"path/filepath"
	"strings"
	"testing"
)

// scanStudy is a 420 km 400 kV line from a 12 GVA source with a receiving-end reactor
// and zero-sequence constants: its first resonance falls near the 3rd harmonic.
const scanStudy = `
title = "scan test line"
frequency_hz = 50
voltage_kv = 400

[line]
length_km = 420
r_ohm_per_km = 0.028
l_mh_per_km = 0.93
c_nf_per_km = 12.4
r0_ohm_per_km = 0.25
l0_mh_per_km = 3.0
c0_nf_per_km = 7.5

[source]
short_circuit_mva = 12000
x_over_r = 12

[[shunt]]
at = "receiving"
connection = "line"
mvar = 150
q_factor = 300

[scan]
short_circuit_mva_range = [3000, 48000]
steps = 6
background_pct = { 5 = 1.0, 3 = 1.5 }
`

// losslessStudy is an ideal source feeding a lossless open line: its resonances are
// poles, which the CLI must report as unbounded (JSON null + overflow).
const losslessStudy = `
frequency_hz = 50
voltage_kv = 400
[line]
length_km = 300
r_ohm_per_km = 0
l_mh_per_km = 1.0
c_nf_per_km = 12.0
`

func writeStudy(t *testing.T, text string) string {
	t.Helper()
	p := filepath.Join(t.TempDir(), "study.toml")
	if err := os.WriteFile(p, []byte(text), 0o644); err != nil {
		t.Fatal(err)
	}
	return p
}

func TestScanJSON(t *testing.T) {
	t.Parallel()
	path := writeStudy(t, scanStudy)
	var out, errb bytes.Buffer
	if code := run([]string{"scan", "--json", path}, &out, &errb); code != 0 {
		t.Fatalf("exit %d: %s", code, errb.String())
	}
	var doc struct {
		Points []struct {
			FHz      float64                  `json:"f_hz"`
			Harmonic float64                  `json:"harmonic"`
			Gain     float64                  `json:"gain"`
			GainLine float64                  `json:"gain_line"`
			ZIn      struct{ Re, Im float64 } `json:"z_in_ohm"`
		} `json:"points"`
		Peaks []struct {
			FHz      float64  `json:"f_hz"`
			Harmonic float64  `json:"harmonic"`
			Gain     *float64 `json:"gain"`
		} `json:"peaks"`
		ZeroSequence *struct {
			Points []json.RawMessage `json:"points"`
			Peaks  []json.RawMessage `json:"peaks"`
		} `json:"zero_sequence"`
		Harmonics []struct {
			Order      int      `json:"order"`
			Sequence   string   `json:"sequence"`
			Gain       float64  `json:"gain"`
			Background *float64 `json:"background_pct"`
			Receiving  *float64 `json:"receiving_pct"`
		} `json:"harmonics"`
		Flags          []string        `json:"flags"`
		SourceStrength json.RawMessage `json:"source_strength"`
		Overflow       []string        `json:"overflow"`
	}
	if err := json.Unmarshal(out.Bytes(), &doc); err != nil {
		t.Fatalf("not JSON: %v", err)
	}
	// Contract defaults: 5000 points from 1 Hz to 50 x frequency_hz.
	if len(doc.Points) != 5000 || doc.Points[0].FHz != 1 || doc.Points[4999].FHz != 2500 {
		t.Fatalf("%d points, %v .. %v", len(doc.Points), doc.Points[0].FHz, doc.Points[len(doc.Points)-1].FHz)
	}
	for _, p := range doc.Points {
		if math.Abs(p.Harmonic-p.FHz/50) > 1e-12 || !(p.Gain > 0) || !(p.GainLine > 0) || p.ZIn.Re < 0 {
			t.Fatalf("bad point %+v", p)
		}
	}
	if len(doc.Peaks) == 0 || doc.Peaks[0].Gain == nil || doc.Peaks[0].Harmonic < 2.5 || doc.Peaks[0].Harmonic > 3.5 {
		t.Fatalf("first peak %+v, want a finite peak near the 3rd harmonic", doc.Peaks)
	}
	if doc.ZeroSequence == nil || len(doc.ZeroSequence.Points) != 5000 || len(doc.ZeroSequence.Peaks) == 0 {
		t.Fatal("zero_sequence missing or empty")
	}
	for _, h := range doc.Harmonics {
		if want := map[bool]string{true: "zero", false: "positive"}[h.Order%3 == 0]; h.Sequence != want {
			t.Errorf("h%d sequence %q, want %q", h.Order, h.Sequence, want)
		}
		// The receiving-end level is background x gain where a background is given.
		if bg, ok := map[int]float64{3: 1.5, 5: 1.0}[h.Order]; ok != (h.Background != nil) ||
			(ok && (*h.Background != bg || math.Abs(*h.Receiving-bg*h.Gain) > 1e-12*bg*h.Gain)) {
			t.Errorf("h%d: background %v receiving %v gain %g", h.Order, h.Background, h.Receiving, h.Gain)
		}
	}
	if len(doc.Flags) == 0 || !strings.HasPrefix(doc.Flags[0], "h3") {
		t.Errorf("flags %q, want the 3rd harmonic flagged first", doc.Flags)
	}
	if len(doc.SourceStrength) == 0 || len(doc.Overflow) != 0 {
		t.Errorf("source_strength %d bytes, overflow %v", len(doc.SourceStrength), doc.Overflow)
	}
}

func TestScanLosslessUnbounded(t *testing.T) {
	t.Parallel()
	path := writeStudy(t, losslessStudy)
	var out, errb bytes.Buffer
	if code := run([]string{"scan", path, "--json"}, &out, &errb); code != 0 {
		t.Fatalf("exit %d: %s", code, errb.String())
	}
	var doc struct {
		Peaks []struct {
			FHz       float64  `json:"f_hz"`
			Gain      *float64 `json:"gain"`
			Unbounded bool     `json:"unbounded"`
		} `json:"peaks"`
		Overflow []string `json:"overflow"`
	}
	if err := json.Unmarshal(out.Bytes(), &doc); err != nil {
		t.Fatal(err)
	}
	// Quarter wave of a lossless line: f = 1/(4 l sqrt(LC)); telegrapher's equations.
	fq := 1 / (4 * 300e3 * math.Sqrt(1e-6*12e-12))
	if len(doc.Peaks) == 0 || math.Abs(doc.Peaks[0].FHz-fq) > 0.002*fq || doc.Peaks[0].Gain != nil || !doc.Peaks[0].Unbounded {
		t.Fatalf("peaks %+v, want an unbounded first peak at %g Hz", doc.Peaks, fq)
	}
	if len(doc.Overflow) == 0 || doc.Overflow[0] != "peaks[0].gain" {
		t.Errorf("overflow %v, want peaks[0].gain listed", doc.Overflow)
	}
	out.Reset()
	if code := run([]string{"scan", path}, &out, &errb); code != 0 {
		t.Fatalf("exit %d: %s", code, errb.String())
	}
	if !strings.Contains(out.String(), "unbounded") || strings.Contains(out.String(), "Inf") || strings.Contains(out.String(), "NaN") {
		t.Errorf("summary does not say unbounded (or shows Inf/NaN):\n%s", out.String())
	}
}

func TestScanFiles(t *testing.T) {
	t.Parallel()
	path := writeStudy(t, scanStudy)
	dir := t.TempDir()
	csvPath, plotPath, mapPath := filepath.Join(dir, "scan.csv"), filepath.Join(dir, "scan.png"), filepath.Join(dir, "map.svg")
	var out, errb bytes.Buffer
	if code := run([]string{"scan", path, "--csv", csvPath, "--plot", plotPath, "--map", mapPath}, &out, &errb); code != 0 {
		t.Fatalf("exit %d: %s", code, errb.String())
	}
	b, err := os.ReadFile(csvPath)
	if err != nil {
		t.Fatal(err)
	}
	lines := strings.Split(strings.TrimSpace(string(b)), "\n")
	if len(lines) != 5001 || !strings.HasPrefix(lines[0], "f_hz,harmonic,gain,gain_line,gain_sending,z_in_re_ohm") || !strings.Contains(lines[0], "gain_zero") {
		t.Errorf("csv: %d lines, header %q", len(lines), lines[0])
	}
	for _, p := range []string{plotPath, mapPath} {
		if st, err := os.Stat(p); err != nil || st.Size() < 1000 {
			t.Errorf("%s: %v", p, err)
		}
	}
	for _, want := range []string{"Model:", "Resonance peaks", "Harmonic screening", "Flags:", "First resonance against source", "Caution"} {
		if !strings.Contains(out.String(), want) {
			t.Errorf("summary lacks %q", want)
		}
	}
}

func TestScanUsageErrors(t *testing.T) {
	t.Parallel()
	path := writeStudy(t, scanStudy)
	for _, tc := range []struct {
		name string
		args []string
		want string
	}{
		{"plot extension", []string{"scan", path, "--plot", "x.pdf"}, "--plot"},
		{"map extension", []string{"scan", path, "--map", "x.jpg"}, "--map"},
		{"no study", []string{"scan"}, "expected one study file"},
		{"map without source", []string{"scan", writeStudy(t, losslessStudy), "--map", filepath.Join(t.TempDir(), "m.png")}, "scan.short_circuit_mva_range"},
	} {
		t.Run(tc.name, func(t *testing.T) {
			t.Parallel()
			var out, errb bytes.Buffer
			if code := run(tc.args, &out, &errb); code != 2 || !strings.Contains(errb.String(), tc.want) {
				t.Errorf("exit %d, stderr %q; want 2 naming %q", code, errb.String(), tc.want)
			}
		})
	}
}
