package main

import (
	"bytes"
	"errors"
	"fmt"
	"html"
	"math"
	"os"
	"path/filepath"
	"regexp"
	"sort"
	"strconv"
	"strings"
	"sync"
	"sync/atomic"
	"testing"

	"github.com/telegrapher/telegrapher/cmd/telegrapher/internal/report"
)

// listDir returns the names in dir, sorted.
func listDir(t *testing.T, dir string) []string {
	t.Helper()
	entries, err := os.ReadDir(dir)
	if err != nil {
		t.Fatal(err)
	}
	var names []string
	for _, e := range entries {
		names = append(names, e.Name())
	}
	sort.Strings(names)
	return names
}

// demoMade records that demoReport ran, for TestMain's clean-up.
var demoMade atomic.Bool

// demoReport writes the demo report once per test binary and returns its folder.
var demoReport = sync.OnceValues(func() (string, error) {
	demoMade.Store(true)
	dir, err := os.MkdirTemp("", "telegrapher-demo-test-")
	if err != nil {
		return "", err
	}
	out := filepath.Join(dir, "demo")
	var stdout, stderr bytes.Buffer
	if code := run([]string{"demo", "--out", out}, &stdout, &stderr); code != 0 {
		return "", fmt.Errorf("demo: exit %d: %s", code, stderr.String())
	}
	if !strings.Contains(stdout.String(), filepath.Join(out, "report.html")) {
		return "", fmt.Errorf("demo does not say where to open the report:\n%s", stdout.String())
	}
	return out, nil
})

func demoFolder(t *testing.T) string {
	t.Helper()
	out, err := demoReport()
	if err != nil {
		t.Fatal(err)
	}
	return out
}

func TestMain(m *testing.M) {
	code := m.Run()
	if demoMade.Load() {
		if out, err := demoReport(); err == nil {
			os.RemoveAll(filepath.Dir(out))
		}
	}
	os.Exit(code)
}

// TestDemoReportFiles: the folder holds what the contract lists, each CSV has a
// header with units and only finite numbers, and the HTML has every section.
func TestDemoReportFiles(t *testing.T) {
	t.Parallel()
	out := demoFolder(t)
	want := []string{"report.html", "summary.md", "scan.csv", "energise.csv", "loading.csv", "switching.csv",
		"energise.cfg", "energise.dat", "switching.cfg", "switching.dat",
		"constants.svg", "scan.svg", "energise.svg", "energise_lattice.svg", "loading.svg", "switching.svg", reportMarker}
	for _, f := range want {
		if info, err := os.Stat(filepath.Join(out, f)); err != nil || info.Size() == 0 {
			t.Errorf("%s missing or empty", f)
		}
	}
	// Units in the column names: every column but counters ends in a unit or is a
	// dimensionless ratio the contract names.
	dimensionless := map[string]bool{"harmonic": true, "gain": true, "gain_line": true, "gain_sending": true,
		"gain_zero": true, "gain_line_zero": true, "shot": true}
	for _, f := range []string{"scan.csv", "energise.csv", "loading.csv", "switching.csv"} {
		idx, rows := readCSV(t, filepath.Join(out, f))
		if len(rows) == 0 {
			t.Errorf("%s has no rows", f)
		}
		for col := range idx {
			if !dimensionless[col] && !regexp.MustCompile(`_(hz|pu|ms|ohm|mw|mvar|deg|km|sil)$`).MatchString(col) {
				t.Errorf("%s: column %q has no unit in its name", f, col)
			}
		}
		for i, r := range rows {
			for j, c := range r {
				if l := strings.ToLower(c); strings.Contains(l, "nan") || strings.Contains(l, "inf") {
					t.Fatalf("%s row %d column %d: %q", f, i+2, j+1, c)
				}
			}
		}
	}
	page, err := os.ReadFile(filepath.Join(out, "report.html"))
	if err != nil {
		t.Fatal(err)
	}
	for _, id := range []string{"inputs", "constants", "scan", "energise", "loading", "switching", "caution"} {
		if !bytes.Contains(page, []byte(`id="`+id+`"`)) {
			t.Errorf("report.html lacks section %q", id)
		}
	}
	if !bytes.Contains(page, []byte(html.EscapeString(Caution))) {
		t.Error("report.html lacks the caution")
	}
	md, err := os.ReadFile(filepath.Join(out, "summary.md"))
	if err != nil {
		t.Fatal(err)
	}
	for _, w := range []string{"first resonance", "SIL", "u2", "open-end peak"} {
		if !bytes.Contains(md, []byte(w)) {
			t.Errorf("summary.md lacks %q", w)
		}
	}
}

// comtradeRecord reads an ASCII COMTRADE record (C37.111-2013 layout, checked in
// detail by the report package's tests) back into channels in engineering units.
func comtradeRecord(t *testing.T, cfgPath string) (names []string, step float64, values [][]float64, steps []float64) {
	t.Helper()
	cfg, err := os.ReadFile(cfgPath)
	if err != nil {
		t.Fatal(err)
	}
	lines := strings.Split(strings.TrimSuffix(string(cfg), "\r\n"), "\r\n")
	n, _ := strconv.Atoi(strings.Split(lines[1], ",")[0])
	var a, b []float64
	for i := 0; i < n; i++ {
		f := strings.Split(lines[2+i], ",")
		names = append(names, f[1])
		a = append(a, num(t, f[5]))
		b = append(b, num(t, f[6]))
	}
	rate := num(t, strings.Split(lines[2+n+2], ",")[0])
	dat, err := os.ReadFile(strings.TrimSuffix(cfgPath, ".cfg") + ".dat")
	if err != nil {
		t.Fatal(err)
	}
	values = make([][]float64, n)
	for _, l := range strings.Split(strings.TrimSuffix(string(dat), "\r\n"), "\r\n") {
		f := strings.Split(l, ",")
		for i := 0; i < n; i++ {
			values[i] = append(values[i], a[i]*num(t, f[2+i])+b[i])
		}
	}
	return names, 1 / rate, values, a
}

// TestDemoCOMTRADEMatchesCSV: the energisation record reconstructs the CSV's
// waveforms (pu times the base) within half a quantisation step, on the same time
// base; the worst switching shot's record holds three receiving-end phases whose
// extremes are the worst shot's phase peaks.
func TestDemoCOMTRADEMatchesCSV(t *testing.T) {
	t.Parallel()
	out := demoFolder(t)
	st, err := demoStudy()
	if err != nil {
		t.Fatal(err)
	}
	baseKV := st.Voltage * math.Sqrt2 / math.Sqrt(3) / 1e3
	names, step, vals, a := comtradeRecord(t, filepath.Join(out, "energise.cfg"))
	idx, rows := readCSV(t, filepath.Join(out, "energise.csv"))
	if len(vals[0]) != len(rows) {
		t.Fatalf("COMTRADE has %d samples, CSV %d", len(vals[0]), len(rows))
	}
	if names[0] != "V receiving" || names[1] != "V sending" {
		t.Fatalf("channels %q", names)
	}
	dt := num(t, rows[1][idx["t_ms"]]) / 1e3
	if math.Abs(step-dt) > 1e-9*dt {
		t.Errorf("sample interval %g s, CSV %g s", step, dt)
	}
	for k, r := range rows {
		for ch, col := range []string{"v_receiving_pu", "v_sending_pu"} {
			want := num(t, r[idx[col]]) * baseKV
			if d := math.Abs(vals[ch][k] - want); d > a[ch]/2*(1+1e-6) {
				t.Fatalf("sample %d %s: COMTRADE %g kV, CSV %g kV (step %g)", k+1, col, vals[ch][k], want, a[ch])
			}
		}
	}
	names, _, vals, a = comtradeRecord(t, filepath.Join(out, "switching.cfg"))
	if len(names) < 3 || !strings.HasPrefix(names[0], "V receiving a") || !strings.HasPrefix(names[2], "V receiving c") {
		t.Fatalf("switching channels %q", names)
	}
	_, srows := readCSV(t, filepath.Join(out, "switching.csv"))
	worst := 0.0
	for _, r := range srows {
		worst = math.Max(worst, num(t, r[4]))
	}
	got := 0.0
	for ch := 0; ch < 3; ch++ {
		for _, v := range vals[ch] {
			got = math.Max(got, math.Abs(v)/baseKV)
		}
	}
	// The record is the worst shot simulated again with its waveforms kept: its
	// largest phase voltage is the largest case peak of switching.csv.
	if math.Abs(got-worst) > a[0]/baseKV+1e-9 {
		t.Errorf("worst shot record peaks at %.6f pu, switching.csv's largest case peak is %.6f pu", got, worst)
	}
}

// TestReportWithoutZeroSequence: switching cannot run without zero-sequence data and
// the lattice method not with an inductive source; the sections say why and the rest
// of the report is written.
func TestReportWithoutZeroSequence(t *testing.T) {
	t.Parallel()
	dir := t.TempDir()
	path := filepath.Join(dir, "study.toml")
	data := "title = \"no zero sequence\"\nfrequency_hz = 50\nvoltage_kv = 220\n\n[line]\nlength_km = 150\nr_ohm_per_km = 0.05\nl_mh_per_km = 1.2\nc_nf_per_km = 9.5\n\n[source]\nshort_circuit_mva = 5000\nx_over_r = 10\n\n[energise]\nmethod = \"lattice\"\n"
	if err := os.WriteFile(path, []byte(data), 0o644); err != nil {
		t.Fatal(err)
	}
	out := filepath.Join(dir, "out")
	var stdout, stderr bytes.Buffer
	if code := run([]string{"report", path, "--out", out}, &stdout, &stderr); code != 0 {
		t.Fatalf("exit %d: %s", code, stderr.String())
	}
	page, err := os.ReadFile(filepath.Join(out, "report.html"))
	if err != nil {
		t.Fatal(err)
	}
	if !bytes.Contains(page, []byte("Not run for this study:</strong>")) || !bytes.Contains(page, []byte("zero-sequence")) {
		t.Error("the switching section does not say why it did not run")
	}
	// The lattice method cannot treat an inductive source: the energisation is shown
	// by the Laplace method, and the section says why.
	if !bytes.Contains(page, []byte("method could not run")) || !bytes.Contains(page, []byte("by the laplace method")) {
		t.Error("the energisation section does not say it fell back on the Laplace method")
	}
	if _, err := os.Stat(filepath.Join(out, "switching.csv")); err == nil {
		t.Error("switching.csv written without a switching study")
	}
	for _, f := range []string{"scan.csv", "energise.csv", "loading.csv", "energise.cfg"} {
		if _, err := os.Stat(filepath.Join(out, f)); err != nil {
			t.Errorf("%s missing", f)
		}
	}
}

// TestReportRefusesForeignFolder: an existing folder not written by telegrapher is
// left alone without --force (exit 2); with it the report is added and the user's
// file stays. The tiny study (outfolder_test.go): only the folder handling is checked.
func TestReportRefusesForeignFolder(t *testing.T) {
	t.Parallel()
	tiny, _, _ := tinyFiles(t, t.TempDir())
	out := filepath.Join(t.TempDir(), "notes")
	if err := os.MkdirAll(out, 0o755); err != nil {
		t.Fatal(err)
	}
	if err := os.WriteFile(filepath.Join(out, "notes.txt"), []byte("mine"), 0o644); err != nil {
		t.Fatal(err)
	}
	var stdout, stderr bytes.Buffer
	if code := run([]string{"report", tiny, "--out", out}, &stdout, &stderr); code != 2 {
		t.Fatalf("exit %d, want 2: %s", code, stderr.String())
	}
	if !strings.Contains(stderr.String(), "--force") {
		t.Errorf("message does not mention --force: %s", stderr.String())
	}
	if got := listDir(t, out); len(got) != 1 || got[0] != "notes.txt" {
		t.Errorf("folder changed: %v", got)
	}
	if code := run([]string{"report", tiny, "--out", out, "--force"}, &stdout, &stderr); code != 0 {
		t.Fatalf("--force: exit %d: %s", code, stderr.String())
	}
	if _, err := os.Stat(filepath.Join(out, "report.html")); err != nil {
		t.Error("--force did not write the report")
	}
	if b, err := os.ReadFile(filepath.Join(out, "notes.txt")); err != nil || string(b) != "mine" {
		t.Errorf("--force lost the user's notes.txt (err %v)", err)
	}
}

// TestReportFailureLeavesNothing: a part failing midway (after others wrote their
// files) leaves neither a partial folder nor temporary files, and an earlier report
// in place stays as it was (the tiny study: the folder handling is checked). Not
// parallel: it swaps a part of the report.
func TestReportFailureLeavesNothing(t *testing.T) {
	tiny, _, _ := tinyFiles(t, t.TempDir())
	saved := reportParts
	defer func() { reportParts = saved }()
	reportParts = append(append([]reportPart{}, saved[:2]...),
		reportPart{"failing part", func(*reportRun) (report.Section, error) { return report.Section{}, errors.New("deliberate failure") }})
	parent := t.TempDir()
	out := filepath.Join(parent, "rep")
	var stdout, stderr bytes.Buffer
	if code := run([]string{"report", tiny, "--out", out}, &stdout, &stderr); code != 1 {
		t.Fatalf("exit %d, want 1", code)
	}
	if got := listDir(t, parent); len(got) != 0 {
		t.Errorf("left behind: %v", got)
	}
	// An earlier report survives a failed run untouched.
	reportParts = saved
	if code := run([]string{"report", tiny, "--out", out}, &stdout, &stderr); code != 0 {
		t.Fatalf("exit %d: %s", code, stderr.String())
	}
	before, err := os.ReadFile(filepath.Join(out, "report.html"))
	if err != nil {
		t.Fatal(err)
	}
	reportParts = append(append([]reportPart{}, saved...),
		reportPart{"failing part", func(*reportRun) (report.Section, error) { return report.Section{}, errors.New("deliberate failure") }})
	if code := run([]string{"report", tiny, "--out", out}, &stdout, &stderr); code != 1 {
		t.Fatalf("exit %d, want 1", code)
	}
	after, err := os.ReadFile(filepath.Join(out, "report.html"))
	if err != nil || !bytes.Equal(before, after) {
		t.Errorf("the earlier report changed after a failed run (err %v)", err)
	}
	if got := listDir(t, parent); len(got) != 1 || got[0] != "rep" {
		t.Errorf("beside the report: %v", got)
	}
}

// BenchmarkDemoReport writes the whole demo report (goal: a few seconds, under 15 s on
// the shared 2-core machine).
func BenchmarkDemoReport(b *testing.B) {
	st, err := demoStudy()
	if err != nil {
		b.Fatal(err)
	}
	out := filepath.Join(b.TempDir(), "demo")
	for b.Loop() {
		if _, err := writeReport(st, out, false); err != nil {
			b.Fatal(err)
		}
	}
}

// A whole harmonic order reads as an English ordinal; a fractional one as "harmonic
// order 2.3" (no ordinal suffix fits a fraction: "the 2.3th" is not English).
func TestHarmonicAt(t *testing.T) {
	t.Parallel()
	for _, tc := range []struct {
		h    float64
		want string
	}{{1, "the 1st harmonic"}, {2, "the 2nd harmonic"}, {3, "the 3rd harmonic"}, {4, "the 4th harmonic"},
		{11, "the 11th harmonic"}, {12, "the 12th harmonic"}, {13, "the 13th harmonic"}, {21, "the 21st harmonic"},
		{112, "the 112th harmonic"}, {4.13, "harmonic order 4.1"}, {2.3, "harmonic order 2.3"}} {
		if got := harmonicAt(tc.h); got != tc.want {
			t.Errorf("harmonicAt(%g) = %q, want %q", tc.h, got, tc.want)
		}
	}
}

func TestDemoCable(t *testing.T) {
	t.Parallel()
	out := filepath.Join(t.TempDir(), "cable")
	var stdout, stderr bytes.Buffer
	if code := run([]string{"demo", "--cable", "--out", out}, &stdout, &stderr); code != 0 {
		t.Fatalf("exit %d: %s", code, stderr.String())
	}
	page, err := os.ReadFile(filepath.Join(out, "report.html"))
	if err != nil {
		t.Fatal(err)
	}
	if !bytes.Contains(page, []byte("Sections, from the sending end")) {
		t.Error("the cable demo's report has no table of sections")
	}
}

// A study with [targets] gets a remedies section with its trade-off plots; one without
// gets none.
func TestReportRemediesSection(t *testing.T) {
	t.Parallel()
	for _, tc := range []struct {
		study string
		want  bool
	}{
		{filepath.Join("..", "..", "testdata", "remedy_fifth.toml"), true},
		{filepath.Join("..", "..", "testdata", "scan_study.toml"), false},
	} {
		out := filepath.Join(t.TempDir(), "out")
		var stdout, stderr bytes.Buffer
		if code := run([]string{"report", tc.study, "--out", out}, &stdout, &stderr); code != 0 {
			t.Fatalf("%s: exit %d: %s", tc.study, code, stderr.String())
		}
		page, err := os.ReadFile(filepath.Join(out, "report.html"))
		if err != nil {
			t.Fatal(err)
		}
		has := bytes.Contains(page, []byte(`id="remedies"`))
		if has != tc.want {
			t.Errorf("%s: remedies section present = %v, want %v", tc.study, has, tc.want)
		}
		_, err = os.Stat(filepath.Join(out, "remedy_resonance.svg"))
		if (err == nil) != tc.want {
			t.Errorf("%s: remedy_resonance.svg present = %v, want %v", tc.study, err == nil, tc.want)
		}
	}
}
