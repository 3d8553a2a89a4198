package main

// The hostile battery across commands: every study file in testdata/hostile is broken
// in one way (wrong types, NaN and Inf literals, out-of-range values, alternatives both
// given, required keys missing, unknown keys, TOML syntax errors, empty files, caps
// exceeded). Every command that takes a STUDY must refuse each of them the same way:
// exit status 2, one message on standard error naming the file and the key path (or
// the line of a syntax error), nothing on standard output and no file written.
//
// Each file says what its message must contain in a trailing comment line
//
//	# want: line.length_km: must be > 0, got -3
//
// (the empty files, which cannot carry a comment, are listed in hostileEmptyWant).
// The expectations come from the interface contract (its "Exit status" and "Study
// file" sections), not from the loader's code.

import (
	"bytes"
	"os"
	"path/filepath"
	"sort"
	"strings"
	"testing"
)

// hostileDir holds the hostile study files.
const hostileDir = "testdata/hostile"

// hostileBaseFile is a valid study with every table the commands read (switching
// needs the zero sequence, remedy needs targets and levers); gen_hostile.py breaks it
// one way per file. The control test runs every command on it, so the battery cannot
// pass only because a command refuses everything.
const hostileBaseFile = "testdata/hostile/base-valid.txt"

// hostileBase returns the valid base study.
func hostileBase(t *testing.T) string {
	t.Helper()
	b, err := os.ReadFile(hostileBaseFile)
	if err != nil {
		t.Fatal(err)
	}
	return string(b)
}

// hostileEmptyWant gives the expected message of the files that cannot carry a
// "# want:" comment, by file name after the number ("NN-empty.toml").
var hostileEmptyWant = map[string]string{
	"empty.toml":           "the study file is empty",
	"whitespace-only.toml": "the study file is empty",
}

// hostileInvocation is one way of running a command on a study; outputs go into dir.
type hostileInvocation struct {
	name string
	args func(study, dir string) []string
}

// hostileInvocations runs every command that takes a STUDY, with each of its file
// outputs requested, in text and in JSON, flags before and after the study.
var hostileInvocations = []hostileInvocation{
	{"check", func(s, d string) []string { return []string{"check", s} }},
	{"constants", func(s, d string) []string { return []string{"constants", s} }},
	{"constants-json-at-hz", func(s, d string) []string { return []string{"constants", "--json", "--at-hz", "1000", s} }},
	{"constants-sweep", func(s, d string) []string {
		return []string{"constants", s, "--sweep", "--plot", filepath.Join(d, "sweep.png")}
	}},
	{"scan", func(s, d string) []string {
		return []string{"scan", s, "--csv", filepath.Join(d, "scan.csv"), "--plot", filepath.Join(d, "scan.svg"), "--map", filepath.Join(d, "map.png")}
	}},
	{"scan-json", func(s, d string) []string { return []string{"scan", "--json", s} }},
	{"energise", func(s, d string) []string {
		return []string{"energise", s, "--csv", filepath.Join(d, "e.csv"), "--plot", filepath.Join(d, "e.png")}
	}},
	{"energise-json-compare", func(s, d string) []string { return []string{"energise", "--json", "--compare", s} }},
	{"energize-bergeron", func(s, d string) []string { return []string{"energize", "--method", "bergeron", s} }},
	{"switching", func(s, d string) []string { return []string{"switching", s, "--plot", filepath.Join(d, "sw.svg")} }},
	{"switching-json", func(s, d string) []string { return []string{"switching", "--json", s} }},
	{"loading", func(s, d string) []string { return []string{"loading", s, "--plot", filepath.Join(d, "l.png")} }},
	{"loading-json", func(s, d string) []string { return []string{"loading", "--json", s} }},
	{"remedy", func(s, d string) []string { return []string{"remedy", s, "--plot", filepath.Join(d, "r.svg")} }},
	{"remedy-json", func(s, d string) []string { return []string{"remedy", "--json", s} }},
	{"report", func(s, d string) []string { return []string{"report", s, "--out", filepath.Join(d, "out")} }},
}

// hostileCase is one broken study and what its message must contain.
type hostileCase struct {
	name, path, want string
}

func hostileCases(t *testing.T) []hostileCase {
	t.Helper()
	entries, err := os.ReadDir(hostileDir)
	if err != nil {
		t.Fatal(err)
	}
	var cases []hostileCase
	for _, e := range entries {
		if e.IsDir() || !strings.HasSuffix(e.Name(), ".toml") {
			continue
		}
		p := filepath.Join(hostileDir, e.Name())
		data, err := os.ReadFile(p)
		if err != nil {
			t.Fatal(err)
		}
		_, bare, _ := strings.Cut(e.Name(), "-")
		want, ok := hostileEmptyWant[bare]
		if !ok {
			for _, l := range strings.Split(string(data), "\n") {
				if w, found := strings.CutPrefix(l, "# want: "); found {
					want = w
				}
			}
		}
		if want == "" {
			t.Fatalf("%s: no \"# want:\" line and not in hostileEmptyWant", p)
		}
		cases = append(cases, hostileCase{e.Name(), p, want})
	}
	return cases
}

// hostileMinFiles is the least number of hostile files the battery must hold (issue 8).
const hostileMinFiles = 30

func TestHostileBatteryEveryCommand(t *testing.T) {
	t.Parallel()
	cases := hostileCases(t)
	if len(cases) < hostileMinFiles {
		t.Fatalf("%d hostile files in %s, want at least %d", len(cases), hostileDir, hostileMinFiles)
	}
	// Whole-file problems that cannot be committed as files: the size cap, a missing
	// path, a directory, a dangling symbolic link. (The tests may run as root, so a
	// file without read permission would still be readable; the directory and the
	// dangling link take its place.)
	gen := t.TempDir()
	big := filepath.Join(gen, "too-large.toml")
	pad := strings.Repeat("# padding to exceed the size cap of a study file\n", (1<<20)/48+10)
	if err := os.WriteFile(big, []byte(hostileBase(t)+pad), 0o644); err != nil {
		t.Fatal(err)
	}
	dirStudy := filepath.Join(gen, "a-directory.toml")
	if err := os.Mkdir(dirStudy, 0o755); err != nil {
		t.Fatal(err)
	}
	dangling := filepath.Join(gen, "dangling.toml")
	if err := os.Symlink(filepath.Join(gen, "nowhere.toml"), dangling); err != nil {
		t.Fatal(err)
	}
	cases = append(cases,
		hostileCase{"too-large", big, "larger than"},
		hostileCase{"missing-file", filepath.Join(gen, "no-such-study.toml"), "cannot read the study file"},
		hostileCase{"directory", dirStudy, "cannot read the study file"},
		hostileCase{"dangling-link", dangling, "cannot read the study file"},
	)
	for _, c := range cases {
		for _, inv := range hostileInvocations {
			t.Run(c.name+"/"+inv.name, func(t *testing.T) {
				t.Parallel()
				dir := t.TempDir()
				args := inv.args(c.path, dir)
				var stdout, stderr bytes.Buffer
				status := run(args, &stdout, &stderr)
				msg := stderr.String()
				if status != 2 {
					t.Errorf("%v: exit status %d, want 2; stderr: %s", args, status, msg)
				}
				if stdout.Len() != 0 {
					t.Errorf("%v: standard output not empty: %.200q", args, stdout.String())
				}
				if !strings.Contains(msg, c.path) {
					t.Errorf("%v: message does not name the file %s: %q", args, c.path, msg)
				}
				if !strings.Contains(msg, c.want) {
					t.Errorf("%v: message %q does not contain %q", args, msg, c.want)
				}
				if n := strings.Count(strings.TrimRight(msg, "\n"), "\n"); n != 0 {
					t.Errorf("%v: want one message line on standard error, got %d: %q", args, n+1, msg)
				}
				if strings.Contains(msg, "internal error") {
					t.Errorf("%v: panic: %s", args, msg)
				}
				if left := hostileFilesUnder(t, dir); len(left) != 0 {
					t.Errorf("%v: files left in the output folder: %v", args, left)
				}
			})
		}
	}
}

// TestHostileBatteryControl runs every invocation of the battery on the valid base
// study: each must succeed and write what it was asked to, so the battery's refusals
// come from the broken keys and not from the invocation.
func TestHostileBatteryControl(t *testing.T) {
	t.Parallel()
	study := filepath.Join(t.TempDir(), "base.toml")
	if err := os.WriteFile(study, []byte(hostileBase(t)), 0o644); err != nil {
		t.Fatal(err)
	}
	for _, inv := range hostileInvocations {
		t.Run(inv.name, func(t *testing.T) {
			t.Parallel()
			dir := t.TempDir()
			args := inv.args(study, dir)
			var stdout, stderr bytes.Buffer
			if status := run(args, &stdout, &stderr); status != 0 {
				t.Fatalf("%v: exit status %d, want 0; stderr: %s", args, status, stderr.String())
			}
			if stdout.Len() == 0 && len(hostileFilesUnder(t, dir)) == 0 {
				t.Errorf("%v: no output at all", args)
			}
			for i, a := range args {
				if i > 0 && strings.HasPrefix(a, dir) {
					if _, err := os.Stat(a); err != nil {
						t.Errorf("%v: requested output %s not written: %v", args, a, err)
					}
				}
			}
		})
	}
}

// hostileFilesUnder lists every file and folder below dir.
func hostileFilesUnder(t *testing.T, dir string) []string {
	t.Helper()
	var found []string
	err := filepath.WalkDir(dir, func(p string, d os.DirEntry, err error) error {
		if err != nil {
			return err
		}
		if p != dir {
			rel, _ := filepath.Rel(dir, p)
			found = append(found, rel)
		}
		return nil
	})
	if err != nil {
		t.Fatal(err)
	}
	sort.Strings(found)
	return found
}

// TestHostileMethodRefusal: a method that cannot treat the study (the lattice diagram
// with an inductive source) is bad input naming energise.method (contract, "Exit
// status"), from the file and from the flag, with nothing on stdout and no file.
// (--diagram alone is not refused: it draws the line alone, see
// TestEnergiseDiagramInductiveSource.)
func TestHostileMethodRefusal(t *testing.T) {
	t.Parallel()
	dir := t.TempDir()
	study := filepath.Join(dir, "inductive.toml")
	src := strings.Replace(hostileBase(t), `method = "laplace"`, `method = "lattice"`, 1)
	if err := os.WriteFile(study, []byte(src), 0o644); err != nil {
		t.Fatal(err)
	}
	out := filepath.Join(dir, "out")
	if err := os.Mkdir(out, 0o755); err != nil {
		t.Fatal(err)
	}
	for _, args := range [][]string{
		{"energise", study, "--plot", filepath.Join(out, "e.svg"), "--csv", filepath.Join(out, "e.csv")},
		{"energise", "--json", study},
		{"energise", "--method", "lattice", "--json", study},
	} {
		var stdout, stderr bytes.Buffer
		status := run(args, &stdout, &stderr)
		if status != 2 || stdout.Len() != 0 || !strings.Contains(stderr.String(), "energise.method") || !strings.Contains(stderr.String(), study) {
			t.Errorf("%v: status %d, stdout %d bytes, stderr %q; want 2, nothing, a message naming %s and energise.method", args, status, stdout.Len(), stderr.String(), study)
		}
		if left := hostileFilesUnder(t, out); len(left) != 0 {
			t.Errorf("%v: files written: %v", args, left)
		}
	}
}

// TestHostileEveryProblemAtOnce: a study with several independent mistakes is refused
// by every command with exit status 2 and one message block on standard error, one
// line FILE: key.path: problem per mistake (issue 15, item 11), nothing on stdout.
func TestHostileEveryProblemAtOnce(t *testing.T) {
	t.Parallel()
	dir := t.TempDir()
	study := filepath.Join(dir, "three-mistakes.toml")
	src := strings.Replace(hostileBase(t), `method = "laplace"`, `method = "bergron"`, 1)
	src = strings.Replace(src, "f_min_hz = 1\n", "f_min_hz = -1\n", 1)
	src = strings.Replace(src, "[line]\n", "[line]\nlenght = 3\n", 1)
	if err := os.WriteFile(study, []byte(src), 0o644); err != nil {
		t.Fatal(err)
	}
	want := []string{study + ": line.lenght: ", study + ": scan.f_min_hz: ", study + ": energise.method: "}
	for _, inv := range hostileInvocations {
		t.Run(inv.name, func(t *testing.T) {
			t.Parallel()
			out := t.TempDir()
			args := inv.args(study, out)
			var stdout, stderr bytes.Buffer
			status := run(args, &stdout, &stderr)
			lines := strings.Split(strings.TrimRight(stderr.String(), "\n"), "\n")
			if status != 2 || stdout.Len() != 0 || len(lines) != len(want) {
				t.Fatalf("%v: status %d, stdout %d bytes, stderr:\n%s\nwant 2, nothing, %d lines", args, status, stdout.Len(), stderr.String(), len(want))
			}
			for i, w := range want {
				if !strings.HasPrefix(lines[i], w) {
					t.Errorf("line %d %q, want it to start with %q", i, lines[i], w)
				}
			}
			if left := hostileFilesUnder(t, out); len(left) != 0 {
				t.Errorf("%v: files written: %v", args, left)
			}
		})
	}
}
