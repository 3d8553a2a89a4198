package main

import (
	"os"
	"strings"
	"testing"
)

// The README's printed examples are what the commands print today: each block after
// "prints, among others" (and the demo's energise and remedy blocks) is checked line by
// line against the command's output (a "..." line stands for lines left out).
func TestREADMEExamples(t *testing.T) {
	t.Parallel()
	b, err := os.ReadFile("../../README.md")
	if err != nil {
		t.Fatal(err)
	}
	readme := string(b)
	for _, tc := range []struct {
		lead string   // text just before the block in README.md
		args []string // the command, paths from the repository root
	}{
		{"`telegrapher scan testdata/scan_study.toml`", []string{"scan", "testdata/scan_study.toml"}},
		{"`telegrapher energise` on the demo", []string{"energise", "cmd/telegrapher/demo.toml", "--compare"}},
		{"`telegrapher loading testdata/loading_study.toml`", []string{"loading", "testdata/loading_study.toml"}},
		{"`telegrapher constants testdata/geometry_tower_400kv.toml --sweep`", []string{"constants", "testdata/geometry_tower_400kv.toml", "--sweep"}},
		{"`telegrapher switching testdata/switching_study.toml`", []string{"switching", "testdata/switching_study.toml"}},
		{"`telegrapher remedy cmd/telegrapher/demo.toml`", []string{"remedy", "cmd/telegrapher/demo.toml"}},
	} {
		t.Run(tc.args[0], func(t *testing.T) {
			t.Parallel()
			i := strings.Index(readme, tc.lead)
			if i < 0 {
				t.Fatalf("README.md has no %s", tc.lead)
			}
			rest := readme[i:]
			j := strings.Index(rest, "\n```\n")
			if j < 0 {
				t.Fatalf("no block after %s", tc.lead)
			}
			block := rest[j+5:]
			block = block[:strings.Index(block, "\n```")]
			args := append([]string(nil), tc.args...)
			for k, a := range args {
				if strings.HasSuffix(a, ".toml") {
					args[k] = "../../" + a
				}
			}
			code, out, errOut := fndRun(args...)
			if code != 0 {
				t.Fatalf("%v: exit %d: %s", tc.args, code, errOut)
			}
			out = strings.ReplaceAll(out, "../../", "")
			for _, line := range strings.Split(block, "\n") {
				if strings.TrimSpace(line) == "..." || strings.TrimSpace(line) == "" {
					continue
				}
				if !strings.Contains(out, line) {
					t.Errorf("README line not in the output of %v:\n  %s", tc.args, line)
				}
			}
		})
	}
}
