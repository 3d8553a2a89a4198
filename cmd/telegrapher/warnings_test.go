package main

// Warnings of the study loader (values far from what overhead lines and cables have,
// issue 15 item 3) reach the user: on standard error for every command, in `check`'s
// listing and in the report's inputs section, never in --json standard output.

import (
	"bytes"
	"encoding/json"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"github.com/telegrapher/telegrapher/cmd/telegrapher/internal/study"
)

// warnStudy has 0.95 mH/km with 40 nF/km: 0.541 c, 154 ohm, neither an overhead line
// nor a cable (hand calculation; ranges common practice, see study/plausible.go).
const warnStudy = `frequency_hz = 50
voltage_kv = 400
[line]
length_km = 100
r_ohm_per_km = 0.03
l_mh_per_km = 0.95
c_nf_per_km = 40
`

func TestStudyWarningsShown(t *testing.T) {
	t.Parallel()
	dir := t.TempDir()
	path := filepath.Join(dir, "warn.toml")
	if err := os.WriteFile(path, []byte(warnStudy), 0o644); err != nil {
		t.Fatal(err)
	}
	want := path + ": warning: line.c_nf_per_km: velocity 0.541 c"
	for _, args := range [][]string{
		{"check", path}, {"constants", path}, {"constants", "--json", path}, {"scan", "--json", path},
		{"energise", "--json", path}, {"loading", "--json", path},
		{"report", path, "--out", filepath.Join(dir, "out")},
	} {
		var stdout, stderr bytes.Buffer
		if status := run(args, &stdout, &stderr); status != 0 {
			t.Fatalf("%v: exit %d: %s", args, status, stderr.String())
		}
		if !strings.HasPrefix(stderr.String(), want) || strings.Count(stderr.String(), "warning:") != 1 {
			t.Errorf("%v: stderr %q, want one warning starting %q", args, stderr.String(), want)
		}
		if args[1] == "--json" {
			var v map[string]any
			if err := json.Unmarshal(stdout.Bytes(), &v); err != nil || strings.Contains(stdout.String(), "warning") {
				t.Errorf("%v: stdout is not one clean JSON document (%v)", args, err)
			}
		}
		if args[0] == "check" && !strings.Contains(stdout.String(), "warnings") || args[0] == "check" && !strings.Contains(stdout.String(), "line.c_nf_per_km: velocity 0.541 c") {
			t.Errorf("check does not list the warning:\n%s", stdout.String())
		}
	}
	html, err := os.ReadFile(filepath.Join(dir, "out", "report.html"))
	if err != nil {
		t.Fatal(err)
	}
	if !strings.Contains(string(html), "Warning: line.c_nf_per_km: velocity 0.541 c") {
		t.Error("report.html does not show the warning in its inputs")
	}
}

// TestStudyWarningsNoneOnDemo: the built-in studies are real lines; they warn of
// nothing.
func TestStudyWarningsNoneOnDemo(t *testing.T) {
	t.Parallel()
	for _, load := range []func() (*study.Study, error){demoStudy, demoCableStudy} {
		st, err := load()
		if err != nil {
			t.Fatal(err)
		}
		if len(st.Warnings) != 0 {
			t.Errorf("%s: warnings %q", st.File, st.Warnings)
		}
	}
}
