package study

import (
	"errors"
	"fmt"
	"math"
	"strings"
	"testing"
)

// base is a valid single-section study; cases append or replace lines.
const base = `frequency_hz = 50
voltage_kv = 400
[line]
length_km = 320
r_ohm_per_km = 0.025
l_mh_per_km = 0.95
c_nf_per_km = 12.0
`

// closeRel is the tolerance of unit conversions (a few float64 roundings).
const closeRel = 1e-12

func near(a, b float64) bool { return math.Abs(a-b) <= closeRel*math.Max(math.Abs(a), math.Abs(b)) }

func TestParseConversions(t *testing.T) {
	t.Parallel()
	src := base + `g_us_per_km = 0.02
r0_ohm_per_km = 0.25
x0_ohm_per_km = 0.9424777960769379
b0_us_per_km = 2.356194490192345
[source]
short_circuit_mva = 15000
x_over_r = 12
x0_over_x1 = 1.5
[[shunt]]
at = "receiving"
connection = "line"
mvar = 150
q_factor = 400
[[shunt]]
at = "sending"
connection = "bus"
mvar = -50
[receiving]
load_mw = 100
load_mvar = 20
[energise]
duration_ms = 30
time_step_us = 2
`
	st, err := Parse("s.toml", []byte(src))
	if err != nil {
		t.Fatal(err)
	}
	w := 2 * math.Pi * 50
	z, y := st.Line[0].Constants.At(complex(0, w))
	checks := []struct {
		name      string
		got, want float64
	}{
		{"length m", st.Line[0].Length, 320e3},
		{"R ohm/m", real(z), 0.025e-3},
		{"X ohm/m", imag(z), w * 0.95e-6},
		{"G S/m", real(y), 0.02e-9},
		{"B S/m", imag(y), w * 12e-12},
		// x0 = ω·3 mH/km and b0 = ω·7.5 nF/km at 50 Hz, so L0 = 3 mH/km, C0 = 7.5 nF/km.
		{"L0 H/m", lOf(st.Zero[0].Constants, w), 3e-6},
		{"V", st.Voltage, 400e3},
		{"Us default", st.Us, 400e3},
		// |Z| = V²/S = 400²/15000 = 10.667 ohm; R = |Z|/sqrt(145); L = 12 R/ω.
		{"source R", st.Network.Source.R, 400e3 * 400e3 / 15000e6 / math.Sqrt(145)},
		{"source L", st.Network.Source.L, 12 * 400e3 * 400e3 / 15000e6 / math.Sqrt(145) / w},
		{"zero source L", st.ZeroNetwork.Source.L, 1.5 * st.Network.Source.L},
		// X = V²/Q = 1066.67 ohm: L = X/ω, R = X/q.
		{"reactor L", st.Network.Shunts[0].L, 400e3 * 400e3 / 150e6 / w},
		{"reactor R", st.Network.Shunts[0].R, 400e3 * 400e3 / 150e6 / 400},
		// capacitor C = 1/(ωX), X = V²/50 Mvar.
		{"capacitor C", st.Network.Shunts[1].C, 1 / (w * 400e3 * 400e3 / 50e6)},
		{"load R", st.Network.Load.R, 400e3 * 400e3 / 100e6},
		{"load L", st.Network.Load.L, 400e3 * 400e3 / (20e6 * w)},
		{"duration s", st.Energise.Duration, 0.03},
		{"time step s", st.Energise.TimeStep, 2e-6},
		{"scan f_max default", st.Scan.FMax, 2500},
		{"scan points default", float64(st.Scan.Points), 5000},
		{"gain limit default", st.Scan.GainLimit, 2},
		{"watch band default", st.Scan.WatchBand, 0.1},
	}
	for _, c := range checks {
		if !near(c.got, c.want) {
			t.Errorf("%s = %g, want %g", c.name, c.got, c.want)
		}
	}
	if st.Network.Shunts[0].End.String() != "receiving" || !st.Network.Shunts[0].OnLine || st.Network.Shunts[1].OnLine {
		t.Errorf("shunt placement wrong: %+v", st.Network.Shunts)
	}
	if len(st.Scan.WatchHarmonics) != 12 || st.Scan.WatchHarmonics[0] != 3 || st.Scan.WatchHarmonics[11] != 25 {
		t.Errorf("watch harmonics %v", st.Scan.WatchHarmonics)
	}
	if st.Energise.Method != "laplace" || st.Energise.Waveform != "step" || st.Energise.CloseDeg != 90 {
		t.Errorf("energise defaults %+v", st.Energise)
	}
	if len(st.Understood) < 20 {
		t.Errorf("only %d understood entries", len(st.Understood))
	}
}

// lOf returns the inductance per metre of c at ω.
func lOf(c interface {
	At(complex128) (complex128, complex128)
}, w float64) float64 {
	z, _ := c.At(complex(0, w))
	return imag(z) / w
}

// replace returns base with the line starting with key replaced by repl ("" drops it).
func replace(key, repl string) string {
	var out []string
	for _, l := range strings.Split(base, "\n") {
		if strings.HasPrefix(l, key+" ") {
			if repl != "" {
				out = append(out, repl)
			}
			continue
		}
		out = append(out, l)
	}
	return strings.Join(out, "\n")
}

// ruleCases are files breaking one rule each: the key path the error must name and a
// part of its message. The CLI battery (cmd/telegrapher) runs them too.
var ruleCases = []struct {
	name, src, key, msg string
}{
	{"missing frequency", replace("frequency_hz", ""), "frequency_hz", "missing"},
	{"missing voltage", replace("voltage_kv", ""), "voltage_kv", "missing"},
	{"missing line", "frequency_hz = 50\nvoltage_kv = 400\n", "line", "missing"},
	{"missing length", replace("length_km", ""), "line.length_km", "missing"},
	{"missing r", replace("r_ohm_per_km", ""), "line.r_ohm_per_km", "missing"},
	{"missing l and x", replace("l_mh_per_km", ""), "line.l_mh_per_km", "missing"},
	{"missing c and b", replace("c_nf_per_km", ""), "line.c_nf_per_km", "missing"},
	{"negative length", replace("length_km", "length_km = -3"), "line.length_km", "must be > 0, got -3"},
	{"zero length", replace("length_km", "length_km = 0"), "line.length_km", "must be > 0"},
	{"huge length", replace("length_km", "length_km = 1e9"), "line.length_km", "at most"},
	{"negative r", replace("r_ohm_per_km", "r_ohm_per_km = -0.1"), "line.r_ohm_per_km", "must be >= 0"},
	{"zero frequency", replace("frequency_hz", "frequency_hz = 0"), "frequency_hz", "must be > 0"},
	{"negative voltage", replace("voltage_kv", "voltage_kv = -400"), "voltage_kv", "must be > 0"},
	{"us below voltage", base + "us_kv = 300\n", "line.us_kv", "unknown key"},
	{"us below voltage top", "us_kv = 300\n" + base, "us_kv", "must be >= voltage_kv"},
	{"negative g", base + "g_us_per_km = -1\n", "line.g_us_per_km", "must be >= 0"},
	{"nan", replace("r_ohm_per_km", "r_ohm_per_km = nan"), "line.r_ohm_per_km", "finite"},
	{"inf", replace("length_km", "length_km = inf"), "line.length_km", "finite"},
	{"minus inf", replace("frequency_hz", "frequency_hz = -inf"), "frequency_hz", "finite"},
	{"string for number", replace("length_km", `length_km = "320"`), "line.length_km", "must be a number"},
	{"bool for number", replace("voltage_kv", "voltage_kv = true"), "voltage_kv", "must be a number"},
	{"date for number", replace("frequency_hz", "frequency_hz = 1979-05-27"), "frequency_hz", "must be a number"},
	{"array for number", replace("l_mh_per_km", "l_mh_per_km = [1, 2]"), "line.l_mh_per_km", "must be a number"},
	{"line not a table", "frequency_hz = 50\nvoltage_kv = 400\nline = 3\n", "line", "must be a table"},
	{"both l and x", base + "x_ohm_per_km = 0.3\n", "line.x_ohm_per_km", "alternatives"},
	{"both c and b", base + "b_us_per_km = 3.7\n", "line.b_us_per_km", "alternatives"},
	{"both l0 and x0", base + "r0_ohm_per_km = 0.2\nl0_mh_per_km = 3\nx0_ohm_per_km = 0.9\nc0_nf_per_km = 7\n", "line.x0_ohm_per_km", "alternatives"},
	{"both c0 and b0", base + "r0_ohm_per_km = 0.2\nl0_mh_per_km = 3\nc0_nf_per_km = 7\nb0_us_per_km = 2\n", "line.b0_us_per_km", "alternatives"},
	{"zero sequence incomplete", base + "r0_ohm_per_km = 0.2\nl0_mh_per_km = 3\n", "line.c0_nf_per_km", "zero-sequence"},
	{"zero sequence no r0", base + "l0_mh_per_km = 3\nc0_nf_per_km = 7\n", "line.r0_ohm_per_km", "zero-sequence"},
	{"unknown key hint", replace("length_km", "lenght_km = 320"), "line.lenght_km", `did you mean "length_km"`},
	{"unknown top key", "frequncy_hz = 50\n" + base, "frequncy_hz", `did you mean "frequency_hz"`},
	{"unknown table", base + "[switchin]\nshots = 3\n", "switchin", "unknown key"},
	{"unregistered table", base + "[wishes]\nmax_u2_pu = 2\n", "wishes", "unknown key"},
	{"source both forms", base + "[source]\nshort_circuit_mva = 15000\nx_over_r = 12\nr_ohm = 1\nl_mh = 30\n", "source.r_ohm", "two ways"},
	{"source sc without xr", base + "[source]\nshort_circuit_mva = 15000\n", "source.x_over_r", "missing"},
	{"source xr zero", base + "[source]\nshort_circuit_mva = 15000\nx_over_r = 0\n", "source.x_over_r", "must be > 0"},
	{"source l and x", base + "[source]\nr_ohm = 1\nl_mh = 30\nx_ohm = 9\n", "source.x_ohm", "alternatives"},
	{"source r without l", base + "[source]\nr_ohm = 1\n", "source.l_mh", "missing"},
	{"source empty", base + "[source]\n", "source.short_circuit_mva", "missing"},
	{"source negative l", base + "[source]\nr_ohm = 1\nl_mh = -3\n", "source.l_mh", "must be >= 0"},
	{"x0_over_x1 zero", base + "[source]\nr_ohm = 1\nl_mh = 30\nx0_over_x1 = 0\n", "source.x0_over_x1", "must be > 0"},
	{"shunt bad at", base + "[[shunt]]\nat = \"middle\"\nconnection = \"line\"\nmvar = 100\n", "shunt[0].at", "must be"},
	{"shunt missing at", base + "[[shunt]]\nconnection = \"line\"\nmvar = 100\n", "shunt[0].at", "missing"},
	{"shunt bad connection", base + "[[shunt]]\nat = \"sending\"\nconnection = \"lin\"\nmvar = 100\n", "shunt[0].connection", `did you mean "line"`},
	{"shunt zero mvar", base + "[[shunt]]\nat = \"sending\"\nconnection = \"bus\"\nmvar = 0\n", "shunt[0].mvar", "must not be 0"},
	{"shunt q zero", base + "[[shunt]]\nat = \"sending\"\nconnection = \"bus\"\nmvar = 10\nq_factor = 0\n", "shunt[0].q_factor", "must be > 0"},
	{"shunt second bad", base + "[[shunt]]\nat = \"sending\"\nconnection = \"bus\"\nmvar = 10\n[[shunt]]\nat = \"receiving\"\nconnection = \"bus\"\nmvars = 10\n", "shunt[1].mvars", `did you mean "mvar"`},
	{"shunt not array", "shunt = 3\n" + base, "shunt", "array of tables"},
	{"load negative", base + "[receiving]\nload_mw = -5\n", "receiving.load_mw", "must be >= 0"},
	{"receiving sc alone", base + "[receiving]\nshort_circuit_mva = 8000\n", "receiving.x_over_r", "missing"},
	{"receiving x0 without system", base + "[receiving]\nload_mw = 10\nx0_over_x1 = 2\n", "receiving.x0_over_x1", "applies to the receiving-end system"},
	{"receiving x0 negative", base + "[receiving]\nshort_circuit_mva = 8000\nx_over_r = 10\nx0_over_x1 = -1\n", "receiving.x0_over_x1", "must be > 0"},
	{"far system not bool", base + "[scan]\nfar_system = 1\n", "scan.far_system", "must be true or false"},
	{"scan points too many", base + "[scan]\npoints = 2000000\n", "scan.points", "between"},
	{"scan points float", base + "[scan]\npoints = 10.5\n", "scan.points", "integer"},
	{"scan fmax below fmin", base + "[scan]\nf_min_hz = 100\nf_max_hz = 10\n", "scan.f_max_hz", "must be > f_min_hz"},
	{"scan fmin zero", base + "[scan]\nf_min_hz = 0\n", "scan.f_min_hz", "must be > 0"},
	{"scan grid", base + "[scan]\ngrid = \"logarithmic\"\n", "scan.grid", "must be"},
	{"scan gain limit", base + "[scan]\ngain_limit = 0\n", "scan.gain_limit", "must be > 0"},
	{"scan band", base + "[scan]\nwatch_band_pct = 50\n", "scan.watch_band_pct", "< 50"},
	{"scan harmonic zero", base + "[scan]\nwatch_harmonics = [3, 0]\n", "scan.watch_harmonics[1]", "between"},
	{"scan harmonic float", base + "[scan]\nwatch_harmonics = [3, 5.5]\n", "scan.watch_harmonics[1]", "integer"},
	{"scan background key", base + "[scan]\nbackground_pct = { fifth = 1.5 }\n", "scan.background_pct.fifth", "harmonic number"},
	{"scan background negative", base + "[scan]\nbackground_pct = { 5 = -1 }\n", "scan.background_pct.5", "between"},
	{"scan planning not table", base + "[scan]\nplanning_pct = 3\n", "scan.planning_pct", "must be a table"},
	{"scan sc range order", base + "[scan]\nshort_circuit_mva_range = [9000, 1000]\n", "scan.short_circuit_mva_range", "min < max"},
	{"scan sc range length", base + "[scan]\nshort_circuit_mva_range = [1000]\n", "scan.short_circuit_mva_range", "[min, max]"},
	{"scan steps", base + "[scan]\nsteps = 1\n", "scan.steps", "between"},
	{"energise method", base + "[energise]\nmethod = \"bergron\"\n", "energise.method", `did you mean "bergeron"`},
	{"energise waveform", base + "[energise]\nwaveform = 3\n", "energise.waveform", "must be a string"},
	{"energise duration", base + "[energise]\nduration_ms = 0\n", "energise.duration_ms", "must be > 0"},
	{"energise step negative", base + "[energise]\ntime_step_us = -1\n", "energise.time_step_us", "must be >= 0"},
	{"energise samples cap", base + "[energise]\nduration_ms = 10000\ntime_step_us = 0.0001\n", "energise.time_step_us", "samples"},
	{"energise trapped", base + "[energise]\ntrapped_pu = 5\n", "energise.trapped_pu", "between"},
	{"sections with line keys", "frequency_hz = 50\nvoltage_kv = 400\n[line]\nlength_km = 3\n[[line.sections]]\nlength_km = 3\nr_ohm_per_km = 0.1\nl_mh_per_km = 1\nc_nf_per_km = 12\n", "line.length_km", "sections"},
	{"section bad", "frequency_hz = 50\nvoltage_kv = 400\n[[line.sections]]\nlength_km = 3\nr_ohm_per_km = 0.1\nl_mh_per_km = 1\nc_nf_per_km = 12\n[[line.sections]]\nlength_km = -1\n", "line.sections[1].length_km", "must be > 0"},
	{"section zero partial", "frequency_hz = 50\nvoltage_kv = 400\n[[line.sections]]\nlength_km = 3\nr_ohm_per_km = 0.1\nl_mh_per_km = 1\nc_nf_per_km = 12\nr0_ohm_per_km = 0.3\nl0_mh_per_km = 3\nc0_nf_per_km = 6\n[[line.sections]]\nlength_km = 2\nr_ohm_per_km = 0.1\nl_mh_per_km = 1\nc_nf_per_km = 12\n", "line.sections[1].r0_ohm_per_km", "every section"},
	{"frequency cap", replace("frequency_hz", "frequency_hz = 1e6"), "frequency_hz", "at most"},
	{"voltage cap", replace("voltage_kv", "voltage_kv = 1e5"), "voltage_kv", "at most"},
	{"scan f_max cap", base + "[scan]\nf_max_hz = 1e9\n", "scan.f_max_hz", "at most"},
	{"scan not table", "scan = 5\n" + base, "scan", "must be a table"},
	{"energise close range", base + "[energise]\nwaveform = \"sine\"\nclose_deg = 400\n", "energise.close_deg", "between"},
	{"x negative", replace("l_mh_per_km", "x_ohm_per_km = -0.3"), "line.x_ohm_per_km", "must be > 0"},
	{"b zero", replace("c_nf_per_km", "b_us_per_km = 0"), "line.b_us_per_km", "must be > 0"},
	{"sections empty", "frequency_hz = 50\nvoltage_kv = 400\n[line]\nsections = []\n", "line.sections", "at least one"},
	{"title not string", "title = 3\n" + base, "title", "must be a string"},
}

func TestRules(t *testing.T) {
	t.Parallel()
	for _, c := range ruleCases {
		t.Run(c.name, func(t *testing.T) {
			t.Parallel()
			st, err := Parse("bad.toml", []byte(c.src))
			if err == nil {
				t.Fatalf("accepted: %+v", st)
			}
			var e *Error
			if !errors.As(err, &e) || !IsInputError(err) {
				t.Fatalf("error %T is not a *study.Error: %v", err, err)
			}
			if e.Key != c.key || !strings.Contains(e.Msg, c.msg) {
				t.Errorf("got key %q msg %q; want key %q with %q", e.Key, e.Msg, c.key, c.msg)
			}
			if !strings.HasPrefix(err.Error(), "bad.toml: "+c.key+": ") {
				t.Errorf("text %q does not start with FILE: key:", err.Error())
			}
		})
	}
}

func TestWholeFileErrors(t *testing.T) {
	t.Parallel()
	for _, c := range []struct {
		name string
		data []byte
		line int
		msg  string
	}{
		{"empty", nil, 0, "empty"},
		{"blank", []byte("  \n\n"), 0, "empty"},
		{"comments only", []byte("# nothing\n"), 0, "empty"},
		{"syntax", []byte("frequency_hz = 50\nvoltage_kv = = 400\n[line]\n"), 2, "syntax error"},
		{"duplicate key", []byte("frequency_hz = 50\nfrequency_hz = 60\n"), 2, "syntax error"},
		{"too large", []byte(base + "title = \"" + strings.Repeat("x", MaxFileBytes) + "\"\n"), 0, "larger than"},
	} {
		t.Run(c.name, func(t *testing.T) {
			t.Parallel()
			_, err := Parse("f.toml", c.data)
			var e *Error
			if !errors.As(err, &e) {
				t.Fatalf("error %v", err)
			}
			if e.Line != c.line || !strings.Contains(e.Msg, c.msg) || !strings.HasPrefix(e.Error(), "f.toml: ") {
				t.Errorf("got %q (line %d), want line %d with %q", e.Error(), e.Line, c.line, c.msg)
			}
		})
	}
	if _, err := Load("/nonexistent/study.toml"); err == nil || !IsInputError(err) || !strings.Contains(err.Error(), "/nonexistent/study.toml: cannot read") {
		t.Errorf("missing file: %v", err)
	}
	if _, err := Load(t.TempDir()); err == nil || !strings.Contains(err.Error(), "directory") {
		t.Errorf("directory: %v", err)
	}
}

func TestSectionsAndAlternatives(t *testing.T) {
	t.Parallel()
	src := `frequency_hz = 60
voltage_kv = 230
us_kv = 245
[[line.sections]]
name = "overhead A"
length_km = 120
r_ohm_per_km = 0.03
x_ohm_per_km = 0.377
b_us_per_km = 4.5
[[line.sections]]
name = "cable"
length_km = 8
r_ohm_per_km = 0.02
l_mh_per_km = 0.4
c_nf_per_km = 210
[source]
r_ohm = 0.5
x_ohm = 12
[scan]
grid = "log"
watch_harmonics = [5, 7]
background_pct = { 5 = 1.5, 7 = 1.0 }
short_circuit_mva_range = [1000, 20000]
steps = 10
`
	st, err := Parse("sec.toml", []byte(src))
	if err != nil {
		t.Fatal(err)
	}
	w := 2 * math.Pi * 60
	if len(st.Line) != 2 || st.Line[0].Name != "overhead A" || st.Line.Length() != 128e3 || st.Zero != nil || st.ZeroNetwork != nil {
		t.Fatalf("sections: %+v", st.Line)
	}
	z, y := st.Line[0].Constants.At(complex(0, w))
	if !near(imag(z)/w, 0.377e-3/w) || !near(imag(y), 4.5e-9) {
		t.Errorf("x/b conversion: z=%v y=%v", z, y)
	}
	if !near(st.Source.L, 12/w) || st.Source.R != 0.5 || st.Us != 245e3 {
		t.Errorf("source %+v", st.Source)
	}
	if !st.Scan.Log || st.Scan.BackgroundPct[5] != 1.5 || st.Scan.PlanningPct != nil || st.Scan.ShortCircuitRange != [2]float64{1e9, 2e10} || st.Scan.ShortCircuitSteps != 10 {
		t.Errorf("scan %+v", st.Scan)
	}
	if st.Scan.FMax != 3000 {
		t.Errorf("f_max default %g, want 50 x 60 Hz", st.Scan.FMax)
	}
}

// A resistive source (l_mh = 0) and a capacitive load.
func TestResistiveSourceCapacitiveLoad(t *testing.T) {
	t.Parallel()
	st, err := Parse("r.toml", []byte(base+"[source]\nr_ohm = 2\nl_mh = 0\n[receiving]\nload_mvar = -30\n"))
	if err != nil {
		t.Fatal(err)
	}
	w := 2 * math.Pi * 50
	if st.Source.L != 0 || st.Source.R != 2 || st.Source.Ideal {
		t.Errorf("source %+v", st.Source)
	}
	if want := 30e6 / (400e3 * 400e3 * w); !near(st.Network.Load.C, want) || st.Network.Load.R != 0 {
		t.Errorf("load %+v, want C %g", st.Network.Load, want)
	}
	st2, err := Parse("i.toml", []byte(base))
	if err != nil || !st2.Source.Ideal || st2.Network.Source.R != 0 || st2.Network.Source.L != 0 {
		t.Errorf("ideal source: %v %+v", err, st2)
	}
}

func TestDidYouMean(t *testing.T) {
	t.Parallel()
	for _, c := range []struct{ in, want string }{
		{"lenght_km", "length_km"},
		{"r_ohm_per_kn", "r_ohm_per_km"},
		{"frequency", "frequency_hz"},
		{"zzzz", ""},
	} {
		got := DidYouMean(c.in, append(append([]string{}, sectionKeys...), rootKeys...))
		if (c.want == "") != (got == "") || !strings.Contains(got, c.want) {
			t.Errorf("DidYouMean(%q) = %q, want %q", c.in, got, c.want)
		}
	}
	if d := levenshtein("kitten", "sitting"); d != 3 {
		t.Errorf("levenshtein = %d, want 3", d)
	}
}

// BenchmarkParseSections1000: validating a study of 1000 line sections with zero
// sequence (the section cap).
func BenchmarkParseSections1000(b *testing.B) {
	var sb strings.Builder
	sb.WriteString("frequency_hz = 50\nvoltage_kv = 400\n")
	for i := 0; i < MaxSections; i++ {
		sb.WriteString("[[line.sections]]\nlength_km = 3\nr_ohm_per_km = 0.1\nl_mh_per_km = 1\nc_nf_per_km = 12\nr0_ohm_per_km = 0.3\nl0_mh_per_km = 3\nc0_nf_per_km = 6\n")
	}
	data := []byte(sb.String())
	b.ResetTimer()
	for i := 0; i < b.N; i++ {
		if _, err := Parse("b.toml", data); err != nil {
			b.Fatal(err)
		}
	}
}

// TestEveryProblemAtOnce: a file with several independent mistakes gets all of them
// in one *Error, one line each, in file order of the stages; a mistake that makes
// later checks meaningless gives one message, not a cascade (issue 15, item 11).
func TestEveryProblemAtOnce(t *testing.T) {
	t.Parallel()
	manySections := "frequency_hz = 50\nvoltage_kv = 400\n"
	for range 30 {
		manySections += "[[line.sections]]\nlength_km = -1\nr_ohm_per_km = 0.1\nl_mh_per_km = 1\nc_nf_per_km = 12\n"
	}
	for _, c := range []struct {
		name, src string
		keys      []string // the key path of each problem, in order
		omitted   int
	}{
		{"independent tables", `frequency_hz = 50
voltage_kv = 400
[line]
length_km = 320
r_ohm_per_km = -0.025
l_mh_per_km = 0.95
[source]
short_circuit_mva = 15000
x_over_r = 0
[[shunt]]
at = "receiving"
connection = "line"
mvar = 0
[scan]
points = 1
[energise]
method = "bergron"
`, []string{"line.r_ohm_per_km", "line.c_nf_per_km", "source.x_over_r", "shunt[0].mvar", "scan.points", "energise.method"}, 0},
		{"frequency and voltage", "frequency_hz = -50\nvoltage_kv = 0\n[line]\nlength_km = -1\n", []string{"frequency_hz", "voltage_kv"}, 0},
		{"several unknown keys", replace("length_km", "lenght_km = 320\nr_ohm_per_kmm = 1") + "[scan]\npoint = 3\n",
			[]string{"line.lenght_km", "line.r_ohm_per_kmm", "scan.point"}, 0},
		{"a typo is not also a missing key", "frequncy_hz = 50\n" + replace("frequency_hz", ""), []string{"frequncy_hz"}, 0},
		// No cascades: a missing required key is not also out of range; a typo in
		// [source] is not also a missing source form; both l and x are one problem.
		{"missing not also out of range", replace("frequency_hz", ""), []string{"frequency_hz"}, 0},
		{"typo in source", base + "[source]\nshort_circuit_mv = 15000\nx_over_r = 12\n", []string{"source.short_circuit_mv"}, 0},
		{"both l and x once", base + "x_ohm_per_km = 0.3\n", []string{"line.x_ohm_per_km"}, 0},
		{"bad duration not also a bad step", base + "[energise]\nduration_ms = -1\ntime_step_us = 5\n", []string{"energise.duration_ms"}, 0},
		{"sections each", "frequency_hz = 50\nvoltage_kv = 400\n[[line.sections]]\nlength_km = -3\nr_ohm_per_km = 0.1\nl_mh_per_km = 1\nc_nf_per_km = 12\n[[line.sections]]\nlength_km = 3\nr_ohm_per_km = 0.1\nl_mh_per_km = 1\n",
			[]string{"line.sections[0].length_km", "line.sections[1].c_nf_per_km"}, 0},
		{"capped", manySections, nil, 30 - MaxErrors},
	} {
		t.Run(c.name, func(t *testing.T) {
			t.Parallel()
			_, err := Parse("bad.toml", []byte(c.src))
			var e *Error
			if !errors.As(err, &e) || !IsInputError(err) {
				t.Fatalf("error %T is not a *study.Error: %v", err, err)
			}
			lines := strings.Split(err.Error(), "\n")
			keys := c.keys
			if keys == nil {
				for i := range MaxErrors {
					keys = append(keys, fmt.Sprintf("line.sections[%d].length_km", i))
				}
			}
			var wantLines []string
			for _, k := range keys {
				wantLines = append(wantLines, "bad.toml: "+k+": ")
			}
			if c.omitted > 0 {
				wantLines = append(wantLines, fmt.Sprintf("bad.toml: and %d more problems", c.omitted))
			}
			if len(lines) != len(wantLines) {
				t.Fatalf("%d lines, want %d:\n%s", len(lines), len(wantLines), err)
			}
			for i, w := range wantLines {
				if !strings.HasPrefix(lines[i], w) {
					t.Errorf("line %d = %q, want it to start with %q", i, lines[i], w)
				}
			}
			if e.Key != keys[0] || len(e.Others) != len(keys)-1 || e.Omitted != c.omitted {
				t.Errorf("first key %q, %d others, %d omitted; want %q, %d, %d", e.Key, len(e.Others), e.Omitted, keys[0], len(keys)-1, c.omitted)
			}
		})
	}
}
