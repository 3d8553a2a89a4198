package main

import (
	"bytes"
	"context"
	"encoding/json"
	"fmt"
	"math"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"github.com/telegrapher/telegrapher/cmd/telegrapher/internal/study"
	"github.com/telegrapher/telegrapher/freqscan"
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

// bandRefTol is the agreement with the numpy band maxima: both sides refine the
// maximum to ~1e-9 in frequency, where the gain is flat to second order; 1e-7 leaves
// room for the different formulas (nodal against chain) near a sharp peak.
const bandRefTol = 1e-7

// bandReference reads testdata/scan_bands_reference.csv: case -> order -> band gain.
func bandReference(t *testing.T) map[string]map[int]float64 {
	t.Helper()
	b, err := os.ReadFile("../../testdata/scan_bands_reference.csv")
	if err != nil {
		t.Fatal(err)
	}
	out := map[string]map[int]float64{}
	for _, ln := range strings.Split(string(b), "\n") {
		if ln == "" || strings.HasPrefix(ln, "#") || strings.HasPrefix(ln, "case,") {
			continue
		}
		var name string
		var h int
		var lo, hi, g, f float64
		fields := strings.Split(ln, ",")
		if len(fields) != 7 {
			t.Fatalf("bad reference line %q", ln)
		}
		name = fields[0]
		if _, err := fmt.Sscan(fields[1], &h); err != nil {
			t.Fatal(err)
		}
		for i, p := range []*float64{&lo, &hi, &g, &f} {
			if _, err := fmt.Sscan(fields[3+i], p); err != nil {
				t.Fatal(err)
			}
		}
		if out[name] == nil {
			out[name] = map[int]float64{}
		}
		out[name][h] = g
	}
	return out
}

// TestScanBandGainCoarseGrid: on a 300-point grid (8.4 Hz apart) the band gain of every
// watched harmonic is the maximum of the continuous response over the band, edges
// included, as a dense numpy evaluation finds it; h13, whose band ends 0.8 Hz below a
// Q 150 resonance, reaches 10.65 and is flagged against gain_limit = 7.
func TestScanBandGainCoarseGrid(t *testing.T) {
	t.Parallel()
	ref := bandReference(t)["narrow"] // numpy nodal analysis, testdata/gen_scan_bands.py
	st, err := study.Load("../../testdata/scan_narrow.toml")
	if err != nil {
		t.Fatal(err)
	}
	res, err := computeScan(context.Background(), st)
	if err != nil {
		t.Fatal(err)
	}
	seen := 0
	for _, h := range res.Harmonics {
		want, ok := ref[h.Order]
		if !h.Watched || !ok {
			continue
		}
		seen++
		if math.Abs(h.BandGain-want) > bandRefTol*want {
			t.Errorf("h%d (%s): band gain %.10g, numpy %.10g", h.Order, h.Sequence, h.BandGain, want)
		}
		if h.OverLimit != (want > 7) {
			t.Errorf("h%d: over limit %v with band gain %.4g against 7", h.Order, h.OverLimit, want)
		}
	}
	if seen != len(ref) {
		t.Errorf("%d watched harmonics compared, the table has %d", seen, len(ref))
	}
	if len(res.Flags) == 0 || !strings.HasPrefix(res.Flags[0], "h13:") {
		t.Errorf("flags %q, want h13 flagged", res.Flags)
	}
}

// phaseDomainTol is the agreement with the three-phase phase-domain model: its matrix
// square root and hyperbolic functions (scipy.linalg) carry ~1e-12 relative error, the
// 1e12 S earthing of a solid star point 1e-12 more; 1e-8 is far below any modelling
// difference that matters (omitting the far system changes the gain by a factor ~3).
const phaseDomainTol = 1e-8

// TestScanFarSystemAndNeutralReactor: the scan's positive- and zero-sequence gains of
// testdata/scan_far.toml, with the receiving-end system in and left out (scan.far_system
// = false), match a three-phase nodal model in the phase domain that builds the far
// system, the reactor banks with their star points and the neutral reactor as they are
// (testdata/gen_scan_far.py); the output lists what is in and what is left out.
func TestScanFarSystemAndNeutralReactor(t *testing.T) {
	t.Parallel()
	const file = "../../testdata/scan_far.toml"
	text, err := os.ReadFile(file)
	if err != nil {
		t.Fatal(err)
	}
	// three-phase nodal model, numpy/scipy.linalg: testdata/gen_scan_far.py
	b, err := os.ReadFile("../../testdata/scan_far_reference.csv")
	if err != nil {
		t.Fatal(err)
	}
	var ref [][5]float64
	for _, ln := range strings.Split(string(b), "\n") {
		if ln == "" || ln[0] == '#' || strings.HasPrefix(ln, "f_hz") {
			continue
		}
		var r [5]float64
		for i, f := range strings.Split(ln, ",") {
			if _, err := fmt.Sscan(f, &r[i]); err != nil {
				t.Fatal(err)
			}
		}
		ref = append(ref, r)
	}
	freqs := make([]float64, len(ref))
	for i, r := range ref {
		freqs[i] = r[0]
	}
	for _, c := range []struct {
		name            string
		extra           string
		colPos, colZero int
		in, out         string // an element that must be listed in service, and left out
	}{
		{"far system in", "", 1, 2, "receiving-end system", ""},
		{"far system left out", "\n[scan]\nfar_system = false\n", 3, 4, "", "receiving-end system"},
	} {
		t.Run(c.name, func(t *testing.T) {
			t.Parallel()
			st, err := study.Parse(file, append(append([]byte(nil), text...), c.extra...))
			if err != nil {
				t.Fatal(err)
			}
			if st.ZeroNetwork == nil {
				t.Fatal("no zero-sequence network")
			}
			pos, zero := freqscan.Scan(nil, st.Network, freqs), freqscan.Scan(nil, *st.ZeroNetwork, freqs)
			for i, r := range ref {
				if math.Abs(pos[i].Gain-r[c.colPos]) > phaseDomainTol*r[c.colPos] {
					t.Errorf("%.6g Hz: positive-sequence gain %.12g, phase domain %.12g", r[0], pos[i].Gain, r[c.colPos])
				}
				if math.Abs(zero[i].Gain-r[c.colZero]) > phaseDomainTol*r[c.colZero] {
					t.Errorf("%.6g Hz: zero-sequence gain %.12g, phase domain %.12g", r[0], zero[i].Gain, r[c.colZero])
				}
			}
			res, err := computeScan(context.Background(), st)
			if err != nil {
				t.Fatal(err)
			}
			has := func(list []string, what string) bool {
				for _, e := range list {
					if strings.Contains(e, what) {
						return true
					}
				}
				return false
			}
			if c.in != "" && (!has(res.Elements, c.in) || !has(res.ZeroSequence.Elements, c.in)) {
				t.Errorf("%q not listed in service: %q, zero %q", c.in, res.Elements, res.ZeroSequence.Elements)
			}
			if c.out != "" && (has(res.Elements, c.out) || !has(res.LeftOut, c.out)) {
				t.Errorf("%q not listed as left out: in %q, left out %q", c.out, res.Elements, res.LeftOut)
			}
			if !has(res.ZeroSequence.Elements, "neutral reactor (3 Xn = 1800 ohm)") {
				t.Errorf("zero-sequence elements %q lack the 600 ohm neutral reactor", res.ZeroSequence.Elements)
			}
			if has(res.Elements, "neutral reactor") {
				t.Errorf("positive-sequence elements %q list the neutral reactor", res.Elements)
			}
		})
	}
}
