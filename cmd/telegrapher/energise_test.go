package main

import (
	"bytes"
	"encoding/json"
	"fmt"
	"math"
	"os"
	"path/filepath"
	"strings"
	"testing"
)

// energiseStudy writes a study of a 300 km line (0.95 mH/km, 12 nF/km: Zc = 281.37
// ohm) with the given [source] and [energise] bodies and extra tables.
func energiseStudy(t *testing.T, r, source, energise, extra string) string {
	t.Helper()
	body := `title = "energise test line"
frequency_hz = 50
voltage_kv = 400
[line]
length_km = 300
r_ohm_per_km = ` + r + `
l_mh_per_km = 0.95
c_nf_per_km = 12
` + source + "\n[energise]\n" + energise + "\n" + extra
	path := filepath.Join(t.TempDir(), "study.toml")
	if err := os.WriteFile(path, []byte(body), 0o644); err != nil {
		t.Fatal(err)
	}
	return path
}

func runCLI(args ...string) (int, string, string) {
	var out, errb bytes.Buffer
	code := run(args, &out, &errb)
	return code, out.String(), errb.String()
}

// The contract's JSON keys, and the physics: an ideal step into the open-ended
// lossless line doubles at the open end (2 pu, common practice, no source), by every
// method; a step through Rs gives 2·Zc/(Rs+Zc) (Greenwood 1991, §9; from memory).
func TestEnergiseJSON(t *testing.T) {
	t.Parallel()
	// the window smooths a jump over about 2Δt and overshoots it by under 0.02 %
	// (waves.LaplaceFrontOvershoot), the peak sample may sit on the smoothed front;
	// Bergeron and the lattice are exact on the lossless line
	const tol = 0.012
	zc := math.Sqrt(0.95e-3 / 12e-9)
	cases := []struct {
		method, source string
		want           float64
	}{
		{"lattice", "", 2},
		{"bergeron", "", 2},
		{"laplace", "", 2},
		{"lattice", "[source]\nr_ohm = 100\nl_mh = 0", 2 * zc / (100 + zc)},
		{"laplace", "[source]\nr_ohm = 100\nl_mh = 0", 2 * zc / (100 + zc)},
	}
	for _, c := range cases {
		path := energiseStudy(t, "0", c.source, "duration_ms = 5", "")
		code, out, stderr := runCLI("energise", path, "--json", "--method", c.method)
		if code != 0 {
			t.Fatalf("%s: exit %d: %s", c.method, code, stderr)
		}
		var doc map[string]any
		if err := json.Unmarshal([]byte(out), &doc); err != nil {
			t.Fatalf("%s: %v\n%s", c.method, err, out)
		}
		for _, k := range []string{"method", "peak_pu", "t_peak_ms", "peak_sending_pu", "t_ms", "v_receiving_pu", "v_sending_pu"} {
			if _, ok := doc[k]; !ok {
				t.Errorf("%s: key %q missing", c.method, k)
			}
		}
		if doc["method"] != c.method {
			t.Errorf("method %v, want %s", doc["method"], c.method)
		}
		// The first open-end plateau (between τ and 3τ).
		ts, vr := doc["t_ms"].([]any), doc["v_receiving_pu"].([]any)
		var got float64
		for i, tv := range ts {
			if tv.(float64) >= 2.0 {
				got = vr[i].(float64)
				break
			}
		}
		if math.Abs(got-c.want) > tol {
			t.Errorf("%s %q: open end at 2 ms = %.4f pu, want %.4f", c.method, c.source, got, c.want)
		}
		if len(ts) != len(vr) || len(ts) < 100 {
			t.Errorf("%s: %d times, %d samples", c.method, len(ts), len(vr))
		}
	}
}

// A method that cannot treat the study exits 2 naming energise.method.
func TestEnergiseMethodRefused(t *testing.T) {
	t.Parallel()
	inductive := energiseStudy(t, "0", "[source]\nr_ohm = 1\nl_mh = 30", `method = "lattice"`, "")
	reactor := energiseStudy(t, "0", "", "duration_ms = 5", "[[shunt]]\nat = \"receiving\"\nconnection = \"line\"\nmvar = 100\n")
	for _, c := range []struct {
		path string
		args []string
	}{
		{inductive, nil},
		{reactor, []string{"--method", "lattice"}},
	} {
		code, out, stderr := runCLI(append([]string{"energise", c.path}, c.args...)...)
		if code != 2 || !strings.HasPrefix(stderr, c.path+": energise.method:") || out != "" {
			t.Errorf("exit %d, stderr %q, stdout %q; want 2 and a message starting %q", code, stderr, out, c.path+": energise.method:")
		}
	}
	if code, _, stderr := runCLI("energise", inductive, "--method", "sideways"); code != 2 || !strings.Contains(stderr, "--method") {
		t.Errorf("unknown method: exit %d, %q", code, stderr)
	}
}

// --compare, --csv, --plot and --diagram, with flags before the study too; the
// methods agree on the lossless line with a resistive source.
func TestEnergiseFilesAndCompare(t *testing.T) {
	t.Parallel()
	path := energiseStudy(t, "0", "[source]\nr_ohm = 100\nl_mh = 0", "duration_ms = 8", "")
	dir := t.TempDir()
	csv, png, svg := filepath.Join(dir, "e.csv"), filepath.Join(dir, "e.png"), filepath.Join(dir, "d.svg")
	code, out, stderr := runCLI("energise", "--compare", "--csv", csv, path, "--plot", png, "--diagram", svg)
	if code != 0 {
		t.Fatalf("exit %d: %s", code, stderr)
	}
	for _, want := range []string{"peak at the receiving (open) end", "largest difference of all", "lattice", "bergeron", "laplace", "resonances"} {
		if !strings.Contains(out, want) {
			t.Errorf("summary lacks %q:\n%s", want, out)
		}
	}
	for _, f := range []string{csv, png, svg} {
		if fi, err := os.Stat(f); err != nil || fi.Size() < 200 {
			t.Errorf("%s: %v", f, err)
		}
	}
	b, _ := os.ReadFile(csv)
	if !strings.HasPrefix(string(b), "t_ms,v_sending_pu,v_receiving_pu") {
		t.Errorf("csv header: %q", strings.SplitN(string(b), "\n", 2)[0])
	}
	// The comparison in JSON: the lossless line's methods differ only at wavefronts,
	// where one sample may hold the jump (up to the 1.47 pu jump itself).
	code, out, stderr = runCLI("energise", path, "--compare", "--json")
	if code != 0 {
		t.Fatalf("exit %d: %s", code, stderr)
	}
	var doc struct {
		Compare struct {
			Methods []string           `json:"methods"`
			Peaks   map[string]float64 `json:"peak_pu"`
		} `json:"compare"`
	}
	if err := json.Unmarshal([]byte(out), &doc); err != nil {
		t.Fatal(err)
	}
	if len(doc.Compare.Methods) != 3 {
		t.Fatalf("methods compared: %v", doc.Compare.Methods)
	}
	// peaks agree within the window's smoothing of a jump (its overshoot is under 0.02 %)
	const peakTol = 0.015
	for m, p := range doc.Compare.Peaks {
		if math.Abs(p-doc.Compare.Peaks["lattice"]) > peakTol*math.Abs(p) {
			t.Errorf("%s peak %.4f, lattice %.4f", m, p, doc.Compare.Peaks["lattice"])
		}
	}
	if code, _, stderr := runCLI("energise", path, "--plot", filepath.Join(dir, "x.jpg")); code != 2 || !strings.Contains(stderr, "--plot") {
		t.Errorf("bad plot extension: exit %d, %q", code, stderr)
	}
}

// The same physics seen twice: the dominant frequency of the transient (spectrum of
// the waveform) is the first resonance of the scan of the same network, and for an
// ideal source on a lossless line the quarter-wave frequency 1/(4τ) (common practice,
// no source). peak_pu keeps its sign: closing a sine at 270° drives the line negative.
func TestEnergiseSpectrumAndSign(t *testing.T) {
	t.Parallel()
	// 8x zero padding and a parabola through three bins locate a spectral peak of a
	// 20 ms record to within a few tenths of a per cent of the true frequency.
	const fTol = 0.01
	tau := 300 * math.Sqrt(0.95e-3*12e-9)
	path := energiseStudy(t, "0", "", "duration_ms = 20\nmethod = \"bergeron\"", "")
	code, out, stderr := runCLI("energise", path, "--json")
	if code != 0 {
		t.Fatalf("exit %d: %s", code, stderr)
	}
	var doc struct {
		Spectrum struct {
			Dominant []struct {
				FHz  float64 `json:"f_hz"`
				Scan float64 `json:"nearest_scan_resonance_hz"`
			} `json:"dominant"`
		} `json:"spectrum"`
		Resonances []struct {
			FHz float64 `json:"f_hz"`
		} `json:"scan_resonances"`
	}
	if err := json.Unmarshal([]byte(out), &doc); err != nil {
		t.Fatal(err)
	}
	if len(doc.Spectrum.Dominant) == 0 || len(doc.Resonances) == 0 {
		t.Fatalf("no dominant frequency or resonance: %s", out[:min(len(out), 400)])
	}
	f1, r1, want := doc.Spectrum.Dominant[0].FHz, doc.Resonances[0].FHz, 1/(4*tau)
	if math.Abs(f1-want) > fTol*want || math.Abs(r1-want) > 1e-3*want {
		t.Errorf("dominant %.2f Hz, first scan resonance %.2f Hz, want 1/(4τ) = %.2f Hz", f1, r1, want)
	}
	sine := energiseStudy(t, "0", "[source]\nr_ohm = 50\nl_mh = 0", "waveform = \"sine\"\nclose_deg = 270\nduration_ms = 10", "")
	code, out, stderr = runCLI("energise", sine, "--json")
	if code != 0 {
		t.Fatalf("exit %d: %s", code, stderr)
	}
	var s struct {
		Peak float64 `json:"peak_pu"`
	}
	if err := json.Unmarshal([]byte(out), &s); err != nil {
		t.Fatal(err)
	}
	if !(s.Peak < -1) {
		t.Errorf("peak_pu %.4f: closing at 270° should peak below −1 pu", s.Peak)
	}
}

// --diagram on a study the lattice method cannot treat (an inductive source and a
// line-connected reactor) draws the line alone from an ideal source, as the report
// does, and says so; it never advises another method where a diagram was asked for.
func TestEnergiseDiagramInductiveSource(t *testing.T) {
	t.Parallel()
	path := writeStudy(t, `
frequency_hz = 50
voltage_kv = 400
[line]
length_km = 300
r_ohm_per_km = 0.03
l_mh_per_km = 0.95
c_nf_per_km = 12
[source]
short_circuit_mva = 10000
x_over_r = 12
[[shunt]]
at = "receiving"
connection = "line"
mvar = 100
`)
	for _, json := range []bool{false, true} {
		svg := filepath.Join(t.TempDir(), "lattice.svg")
		args := []string{"energise", path, "--diagram", svg}
		if json {
			args = append(args, "--json")
		}
		code, out, errs := runCLI(args...)
		if code != 0 {
			t.Fatalf("%v: exit %d: %s", args, code, errs)
		}
		if b, err := os.ReadFile(svg); err != nil || !bytes.Contains(b, []byte("line alone")) {
			t.Errorf("%v: no diagram of the line alone written (%v)", args, err)
		}
		if !strings.Contains(out, "the lattice diagram shows the line alone, energised from an ideal source") {
			t.Errorf("%v: output does not say the diagram is of the line alone:\n%s", args, out)
		}
		if strings.Contains(out+errs, "use bergeron or laplace") {
			t.Errorf("%v: advises another method for a diagram:\n%s%s", args, out, errs)
		}
	}
}

// --compare explains a difference by its cause. On a line from geometry (constants
// varying with frequency) Bergeron, at constants of the system frequency, and the
// frequency-dependent Laplace transform differ away from the wavefronts too: the
// output must say so and name frequency-dependent damping, not blame the wavefronts.
// On a lossless line of constant parameters the methods are exact alike (identity:
// lattice = Bergeron = Laplace) and differ only at the wavefronts.
func TestEnergiseCompareCause(t *testing.T) {
	t.Parallel()
	lossless := writeStudy(t, `
frequency_hz = 50
voltage_kv = 400
[line]
length_km = 100
r_ohm_per_km = 0
l_mh_per_km = 0.95
c_nf_per_km = 12
[source]
r_ohm = 50
l_mh = 0
`)
	for _, c := range []struct {
		name, path   string
		atWavefronts bool
		says         string
	}{
		{"geometry", filepath.Join("..", "..", "testdata", "geometry_tower_400kv.toml"), false, "vary with frequency"},
		{"lossless", lossless, true, "concentrates at the wavefronts"},
	} {
		t.Run(c.name, func(t *testing.T) {
			t.Parallel()
			code, out, errs := runCLI("energise", c.path, "--compare")
			if code != 0 {
				t.Fatalf("exit %d: %s", code, errs)
			}
			if !strings.Contains(out, c.says) {
				t.Errorf("comparison does not say %q:\n%s", c.says, out)
			}
			if !c.atWavefronts && strings.Contains(out, "concentrate") {
				t.Errorf("blames the wavefronts for a frequency-dependent difference:\n%s", out)
			}
			code, js, errs := runCLI("energise", c.path, "--compare", "--json")
			if code != 0 {
				t.Fatalf("exit %d: %s", code, errs)
			}
			var doc struct {
				Compare struct {
					Pairs []energisePair `json:"pairs"`
				} `json:"compare"`
			}
			if err := json.Unmarshal([]byte(js), &doc); err != nil {
				t.Fatal(err)
			}
			if len(doc.Compare.Pairs) == 0 {
				t.Fatal("no pairs compared")
			}
			for _, p := range doc.Compare.Pairs {
				if p.AtWavefronts != c.atWavefronts {
					t.Errorf("%s vs %s: at_wavefronts %v, want %v (away rms %.3g pu, near fronts largest %.3g pu)", p.A, p.B, p.AtWavefronts, c.atWavefronts, p.AwayRMSDiffPU, p.FrontMaxDiffPU)
				}
			}
		})
	}
}

// sine500kV: 400 km 500 kV 60 Hz line with 150 Mvar line-connected reactors at both
// ends behind a 15 GVA source, closed at the EMF crest. Its lowest natural frequency
// (about 169 Hz) beats with the 3rd harmonic (180 Hz): the crests of the natural and
// the power-frequency oscillation align again some 30 ms after closing, and the
// open-end peak there (about 2.19 pu) is higher than any within 20 ms (about 2.09).
const sine500kV = `
frequency_hz = 60
voltage_kv = 500
[line]
length_km = 400
r_ohm_per_km = 0.02
l_mh_per_km = 0.87
c_nf_per_km = 13.3
[source]
short_circuit_mva = 15000
x_over_r = 15
[[shunt]]
at = "sending"
connection = "line"
mvar = 150
q_factor = 300
[[shunt]]
at = "receiving"
connection = "line"
mvar = 150
q_factor = 300
[energise]
waveform = "sine"
close_deg = 90
`

// Without duration_ms the run covers the network's slowest oscillation that matters:
// its peak is the peak of a long run (100 ms, identity: the longer run contains the
// default one's), and the output says the duration and why.
func TestEnergiseDefaultDurationCatchesLaterPeak(t *testing.T) {
	t.Parallel()
	// peakTol: two runs of different length have different Laplace windows and
	// damping; they agree to the transform's accuracy away from fronts (waves tests,
	// 2e-3 pu), doubled for the different sampling of the crest.
	const peakTol = 4e-3
	type doc struct {
		PeakPU      float64 `json:"peak_pu"`
		TPeakMs     float64 `json:"t_peak_ms"`
		DurationMs  float64 `json:"duration_ms"`
		DurationHow string  `json:"duration_how"`
	}
	get := func(text string) doc {
		code, out, errs := runCLI("energise", writeStudy(t, text), "--json")
		if code != 0 {
			t.Fatalf("exit %d: %s", code, errs)
		}
		var d doc
		if err := json.Unmarshal([]byte(out), &d); err != nil {
			t.Fatal(err)
		}
		return d
	}
	def := get(sine500kV)
	long := get(sine500kV + "duration_ms = 100\n")
	if long.TPeakMs <= 20 {
		t.Fatalf("the case lost its point: the 100 ms run peaks at %.2f ms", long.TPeakMs)
	}
	if math.Abs(def.PeakPU-long.PeakPU) > peakTol {
		t.Errorf("default duration %.4g ms (%s): peak %.4f pu at %.2f ms, the 100 ms run %.4f pu at %.2f ms",
			def.DurationMs, def.DurationHow, def.PeakPU, def.TPeakMs, long.PeakPU, long.TPeakMs)
	}
	if !strings.HasPrefix(def.DurationHow, "default: ") || long.DurationHow != "given" {
		t.Errorf("duration_how %q (default) and %q (given)", def.DurationHow, long.DurationHow)
	}
	code, out, _ := runCLI("energise", writeStudy(t, sine500kV))
	if code != 0 || !strings.Contains(out, fmt.Sprintf("duration %.4g ms (default: ", def.DurationMs)) {
		t.Errorf("the text output does not say the default duration:\n%s", out)
	}
}
