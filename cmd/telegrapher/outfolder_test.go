package main

import (
	"bytes"
	"errors"
	"os"
	"os/exec"
	"path/filepath"
	"strings"
	"testing"
	"time"
)

// Tiny studies for the folder tests: a 20 km line, a coarse scan, a short lattice run
// and four switching shots, so a whole report takes a few tens of milliseconds. Only
// the folder handling is checked here; the numbers are the other tests' business.
const (
	tinyStudy = `title = "tiny"
frequency_hz = 50
voltage_kv = 132
[line]
length_km = 20
r_ohm_per_km = 0.1
l_mh_per_km = 1.2
c_nf_per_km = 9.5
[scan]
points = 200
f_max_hz = 1000
[energise]
method = "lattice"
duration_ms = 2
`
	// tinySwitchingStudy adds zero-sequence data, so the report also writes the
	// switching files (switching.csv, .cfg, .dat, two plots).
	tinySwitchingStudy = tinyStudy + `[switching]
shots = 4
seed = 1
duration_ms = 2
`
	tinyInventory = "name,voltage_kv,frequency_hz,length_km,r_ohm_per_km,l_mh_per_km,c_nf_per_km\nA,132,50,20,0.1,1.2,9.5\n"
)

// tinyFiles writes the tiny studies and inventory into dir and returns their paths.
func tinyFiles(t *testing.T, dir string) (plain, switching, inventory string) {
	t.Helper()
	plain, switching, inventory = filepath.Join(dir, "tiny.toml"), filepath.Join(dir, "tiny_sw.toml"), filepath.Join(dir, "lines.csv")
	zero := strings.Replace(tinySwitchingStudy, "c_nf_per_km = 9.5\n", "c_nf_per_km = 9.5\nr0_ohm_per_km = 0.3\nl0_mh_per_km = 3.5\nc0_nf_per_km = 6\n", 1)
	for p, data := range map[string]string{plain: tinyStudy, switching: zero, inventory: tinyInventory} {
		if err := os.WriteFile(p, []byte(data), 0o644); err != nil {
			t.Fatal(err)
		}
	}
	return plain, switching, inventory
}

// snapshot is every file under dir (relative path -> content); folders end in "/".
func snapshot(t *testing.T, dir string) map[string]string {
	t.Helper()
	files := map[string]string{}
	err := filepath.WalkDir(dir, func(p string, d os.DirEntry, err error) error {
		if err != nil {
			return err
		}
		rel, _ := filepath.Rel(dir, p)
		if d.IsDir() {
			files[rel+"/"] = ""
			return nil
		}
		b, err := os.ReadFile(p)
		files[rel] = string(b)
		return err
	})
	if err != nil {
		t.Fatal(err)
	}
	return files
}

// sameSnapshot reports the first difference between two snapshots, or "".
func sameSnapshot(before, after map[string]string) string {
	for k, v := range before {
		if w, ok := after[k]; !ok {
			return k + " is gone"
		} else if w != v {
			return k + " changed"
		}
	}
	for k := range after {
		if _, ok := before[k]; !ok {
			return k + " appeared"
		}
	}
	return ""
}

// runOK runs the CLI and fails the test unless it exits 0.
func runOK(t *testing.T, args ...string) {
	t.Helper()
	var stdout, stderr bytes.Buffer
	if code := run(args, &stdout, &stderr); code != 0 {
		t.Fatalf("%v: exit %d: %s", args, code, stderr.String())
	}
}

// TestReportKeepsUserFiles: a report into an earlier report folder replaces the files
// the earlier run wrote (and removes those the new run does not write) but leaves the
// files and folders the user added there.
func TestReportKeepsUserFiles(t *testing.T) {
	t.Parallel()
	dir := t.TempDir()
	plain, switching, _ := tinyFiles(t, dir)
	out := filepath.Join(dir, "rep")
	runOK(t, "report", switching, "--out", out)
	if _, err := os.Stat(filepath.Join(out, "switching.csv")); err != nil {
		t.Fatalf("the first report wrote no switching.csv: %v", err)
	}
	user := map[string]string{"my_notes.txt": "site visit 3 May", "sub/plan.txt": "reactor options", "sub/deeper/x.csv": "1,2\n"}
	for name, data := range user {
		p := filepath.Join(out, filepath.FromSlash(name))
		if err := os.MkdirAll(filepath.Dir(p), 0o755); err != nil {
			t.Fatal(err)
		}
		if err := os.WriteFile(p, []byte(data), 0o644); err != nil {
			t.Fatal(err)
		}
	}
	// The second study has no zero-sequence data: no switching files this time.
	runOK(t, "report", plain, "--out", out)
	for name, data := range user {
		b, err := os.ReadFile(filepath.Join(out, filepath.FromSlash(name)))
		if err != nil || string(b) != data {
			t.Errorf("the user's %s was lost or changed (err %v)", name, err)
		}
	}
	for _, gone := range []string{"switching.csv", "switching.cfg", "switching.dat", "switching.svg", "switching_worst.svg"} {
		if _, err := os.Stat(filepath.Join(out, gone)); err == nil {
			t.Errorf("%s of the earlier report is still there", gone)
		}
	}
	page, err := os.ReadFile(filepath.Join(out, "report.html"))
	if err != nil || !bytes.Contains(page, []byte("Not run for this study")) {
		t.Errorf("report.html is not the second report (err %v)", err)
	}
	// Nothing is left beside the folder.
	for _, n := range listDir(t, dir) {
		if n != "rep" && n != "tiny.toml" && n != "tiny_sw.toml" && n != "lines.csv" {
			t.Errorf("left beside the folder: %s", n)
		}
	}
}

// TestOutputKindsApart: a batch screening is never written into a report folder nor a
// report into a batch folder, even with --force (exit 2, saying why); the folder is
// left as it was.
func TestOutputKindsApart(t *testing.T) {
	t.Parallel()
	dir := t.TempDir()
	plain, _, inventory := tinyFiles(t, dir)
	reportDir, batchDir := filepath.Join(dir, "rep"), filepath.Join(dir, "screen")
	runOK(t, "report", plain, "--out", reportDir)
	runOK(t, "batch", inventory, "--out", batchDir)
	tests := []struct {
		name string
		args []string
		want string // in the message
	}{
		{"batch into a report", []string{"batch", inventory, "--out", reportDir}, "holds a report"},
		{"batch into a report, forced", []string{"batch", inventory, "--out", reportDir, "--force"}, "holds a report"},
		{"report into a batch folder", []string{"report", plain, "--out", batchDir}, "holds a batch screening"},
		{"report into a batch folder, forced", []string{"report", plain, "--out", batchDir, "--force"}, "holds a batch screening"},
		{"demo into a batch folder, forced", []string{"demo", "--out", batchDir, "--force"}, "holds a batch screening"},
	}
	for _, tc := range tests {
		target := tc.args[len(tc.args)-1]
		if target == "--force" {
			target = tc.args[len(tc.args)-2]
		}
		before := snapshot(t, target)
		var stdout, stderr bytes.Buffer
		if code := run(tc.args, &stdout, &stderr); code != 2 {
			t.Errorf("%s: exit %d, want 2: %s", tc.name, code, stderr.String())
		}
		if !strings.Contains(stderr.String(), tc.want) {
			t.Errorf("%s: message %q lacks %q", tc.name, stderr.String(), tc.want)
		}
		if d := sameSnapshot(before, snapshot(t, target)); d != "" {
			t.Errorf("%s: the folder changed: %s", tc.name, d)
		}
	}
	for _, n := range listDir(t, dir) {
		if strings.Contains(n, ".tmp-") {
			t.Errorf("left behind: %s", n)
		}
	}
}

// TestOutRegularFileRefused: a file (or a link to one) given as --out is refused by
// report, demo and batch, with or without --force, and stays as it was.
func TestOutRegularFileRefused(t *testing.T) {
	t.Parallel()
	dir := t.TempDir()
	plain, _, inventory := tinyFiles(t, dir)
	link := filepath.Join(dir, "link.toml")
	if err := os.Symlink(plain, link); err != nil {
		t.Fatal(err)
	}
	before := snapshot(t, dir)
	for _, args := range [][]string{
		{"report", plain, "--out", plain, "--force"},
		{"report", plain, "--out", plain},
		{"report", plain, "--out", link, "--force"},
		{"demo", "--out", plain, "--force"},
		{"batch", inventory, "--out", inventory, "--force"},
	} {
		var stdout, stderr bytes.Buffer
		if code := run(args, &stdout, &stderr); code != 2 {
			t.Errorf("%v: exit %d, want 2: %s", args, code, stderr.String())
		}
		if !strings.Contains(stderr.String(), "is a file, not a folder") {
			t.Errorf("%v: message %q does not say why", args, stderr.String())
		}
		if d := sameSnapshot(before, snapshot(t, dir)); d != "" {
			t.Fatalf("%v: %s", args, d)
		}
	}
	if fi, err := os.Lstat(link); err != nil || fi.Mode()&os.ModeSymlink == 0 {
		t.Errorf("the link was replaced (err %v)", err)
	}
}

// TestLeftoversCleaned: the temporary folders a killed run left beside its target are
// removed by the next run into the same parent; a folder a live run holds, a fresh
// one, another target's and a name not of telegrapher's pattern stay.
func TestLeftoversCleaned(t *testing.T) {
	t.Parallel()
	dir := t.TempDir()
	plain, _, _ := tinyFiles(t, dir)
	old := time.Now().Add(-2 * time.Hour)
	mk := func(name string, stale bool) string {
		p := filepath.Join(dir, name)
		if err := os.MkdirAll(filepath.Join(p, "inner"), 0o755); err != nil {
			t.Fatal(err)
		}
		if err := os.WriteFile(filepath.Join(p, "inner", "scan.csv"), []byte("x"), 0o644); err != nil {
			t.Fatal(err)
		}
		if stale {
			for _, q := range []string{filepath.Join(p, "inner"), p} {
				if err := os.Chtimes(q, old, old); err != nil {
					t.Fatal(err)
				}
			}
		}
		return p
	}
	killed := mk(".rep.tmp-1234567", true)
	killedOld := mk(".rep.tmp-7654321.old", true)
	fresh := mk(".rep.tmp-2222222", false)
	live := mk(".rep.tmp-3333333", true)
	other := mk(".notes.tmp-4444444", true)
	users := mk(".rep.tmp-mine", true)
	unlock, err := lockDir(live)
	if err != nil {
		t.Skipf("folder locks not available here: %v", err)
	}
	defer unlock()
	runOK(t, "report", plain, "--out", filepath.Join(dir, "rep"))
	for _, p := range []string{killed, killedOld} {
		if _, err := os.Stat(p); err == nil {
			t.Errorf("leftover %s not removed", filepath.Base(p))
		}
	}
	for _, p := range []string{fresh, live, other, users} {
		if _, err := os.Stat(filepath.Join(p, "inner", "scan.csv")); err != nil {
			t.Errorf("%s was removed: %v", filepath.Base(p), err)
		}
	}
}

// TestTempNameNotInErrors: a failed write names the file the user gave, never the
// temporary file it is written through.
func TestTempNameNotInErrors(t *testing.T) {
	t.Parallel()
	dir := t.TempDir()
	plain, _, _ := tinyFiles(t, dir)
	target := filepath.Join(dir, "missing", "gain.csv")
	var stdout, stderr bytes.Buffer
	if code := run([]string{"scan", plain, "--csv", target}, &stdout, &stderr); code == 0 {
		t.Fatal("writing into a missing folder succeeded")
	}
	msg := stderr.String()
	if strings.Contains(msg, ".tmp-") || strings.Count(msg, target) == 0 {
		t.Errorf("message %q names a temporary file, or not %s", msg, target)
	}
}

// markerFile writes a marker of kind listing files into dir ("" kind: an earlier
// version's marker, which lists nothing).
func markerFile(t *testing.T, dir string, kind folderKind, files ...string) {
	t.Helper()
	text := "written by telegrapher dev; a later run may replace this folder\n"
	if kind != "" {
		text = markerHeader + "\nkind = " + string(kind) + "\nversion = test\n# a comment\n"
		for _, f := range files {
			text += "file = " + f + "\n"
		}
	}
	if err := os.WriteFile(filepath.Join(dir, reportMarker), []byte(text), 0o644); err != nil {
		t.Fatal(err)
	}
}

// TestOutputFolder: each rule of outfolder.go on a run writing a.txt, through
// newOutputFolder, write and commit (or discard, for a failed run).
func TestOutputFolder(t *testing.T) {
	t.Parallel()
	file := func(t *testing.T, p, data string) {
		if err := os.MkdirAll(filepath.Dir(p), 0o755); err != nil {
			t.Fatal(err)
		}
		if err := os.WriteFile(p, []byte(data), 0o644); err != nil {
			t.Fatal(err)
		}
	}
	none := func(*testing.T, string) {}
	empty := func(t *testing.T, d string) {
		if err := os.MkdirAll(d, 0o755); err != nil {
			t.Fatal(err)
		}
	}
	foreign := func(t *testing.T, d string) { file(t, filepath.Join(d, "thesis.tex"), "precious") }
	// previous: an earlier report wrote a.txt and old.txt; the user added thesis.tex
	// and a sub-folder.
	previous := func(t *testing.T, d string) {
		foreign(t, d)
		file(t, filepath.Join(d, "a.txt"), "old a")
		file(t, filepath.Join(d, "old.txt"), "old")
		file(t, filepath.Join(d, "sub", "notes.txt"), "mine")
		markerFile(t, d, kindReport, "a.txt", "old.txt")
	}
	legacy := func(t *testing.T, d string) {
		foreign(t, d)
		file(t, filepath.Join(d, "report.html"), "old page")
		markerFile(t, d, "")
	}
	legacyBatch := func(t *testing.T, d string) {
		file(t, filepath.Join(d, "batch.csv"), "old table")
		markerFile(t, d, "")
	}
	batchFolder := func(t *testing.T, d string) {
		file(t, filepath.Join(d, "batch.csv"), "old table")
		markerFile(t, d, kindBatch, "batch.csv")
	}
	// clash: the earlier run did not write a.txt; the user did.
	clash := func(t *testing.T, d string) {
		file(t, filepath.Join(d, "a.txt"), "the user's a")
		markerFile(t, d, kindReport, "old.txt")
	}
	folderClash := func(t *testing.T, d string) {
		file(t, filepath.Join(d, "a.txt", "inside"), "mine")
		markerFile(t, d, kindReport)
	}
	plainFile := func(t *testing.T, d string) { file(t, d, "precious") }
	badMarker := func(t *testing.T, d string) {
		empty(t, d)
		if err := os.WriteFile(filepath.Join(d, reportMarker), []byte(markerHeader+"\nkind = report\nfile = ../escape\n"), 0o644); err != nil {
			t.Fatal(err)
		}
	}

	const (
		ok     = ""
		atOpen = "open"   // refused by newOutputFolder
		atEnd  = "commit" // refused by commit, after the run
	)
	tests := []struct {
		name    string
		setup   func(*testing.T, string)
		force   bool
		fail    bool   // the run fails after writing a.txt
		refused string // ok, atOpen or atEnd
		want    map[string]string
	}{
		{"new folder", none, false, false, ok, map[string]string{"a.txt": "new"}},
		{"empty folder", empty, false, false, ok, map[string]string{"a.txt": "new"}},
		{"foreign folder refused", foreign, false, false, atOpen, nil},
		{"foreign folder forced: files added, nothing removed", foreign, true, false, ok,
			map[string]string{"a.txt": "new", "thesis.tex": "precious"}},
		{"previous report: its files replaced, the user's kept", previous, false, false, ok,
			map[string]string{"a.txt": "new", "thesis.tex": "precious", "sub/notes.txt": "mine"}},
		{"earlier version's marker: nothing removed", legacy, false, false, ok,
			map[string]string{"a.txt": "new", "thesis.tex": "precious", "report.html": "old page"}},
		{"earlier version's batch folder refused", legacyBatch, true, false, atOpen, nil},
		{"batch folder refused, even forced", batchFolder, true, false, atOpen, nil},
		{"user's file of a new name refused", clash, false, false, atEnd, nil},
		{"user's file of a new name forced", clash, true, false, ok, map[string]string{"a.txt": "new"}},
		{"user's folder of a new name refused, even forced", folderClash, true, false, atEnd, nil},
		{"plain file refused, even forced", plainFile, true, false, atOpen, nil},
		{"marker naming a file outside refused", badMarker, false, false, atOpen, nil},
		{"failed run, new folder", none, false, true, ok, nil},
		{"failed run, new parents", none, false, true, ok, nil},
		{"failed run keeps the previous report", previous, false, true, ok, nil},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			t.Parallel()
			parent := t.TempDir()
			target := filepath.Join(parent, "out")
			if strings.Contains(tc.name, "new parents") {
				target = filepath.Join(parent, "out", "a", "b")
			}
			tc.setup(t, target)
			before := snapshot(t, parent)
			o, err := newOutputFolder(target, kindReport, tc.force)
			if tc.refused == atOpen {
				if err == nil {
					t.Fatal("not refused")
				}
				if _, isUsage := err.(*usageError); !isUsage {
					t.Errorf("refusal %T (%v) is not an input error", err, err)
				}
			} else {
				if err != nil {
					t.Fatal(err)
				}
				if err := o.write("a.txt", []byte("new")); err != nil {
					t.Fatal(err)
				}
				if tc.fail {
					o.discard()
				} else {
					err := o.commit()
					switch {
					case tc.refused == atEnd && err == nil:
						t.Fatal("not refused")
					case tc.refused == atEnd:
						if _, isUsage := err.(*usageError); !isUsage {
							t.Errorf("refusal %T (%v) is not an input error", err, err)
						}
					case err != nil:
						t.Fatal(err)
					}
				}
			}
			after := snapshot(t, parent)
			if tc.want == nil { // refused or failed: nothing changed, nothing left
				if d := sameSnapshot(before, after); d != "" {
					t.Errorf("changed: %s", d)
				}
				return
			}
			// Only the target is in the parent: no temporary or old folders.
			for _, n := range listDir(t, parent) {
				if n != "out" {
					t.Errorf("left behind: %s", n)
				}
			}
			got := snapshot(t, target)
			kind, listed, legacy, err := readMarker([]byte(got[reportMarker]))
			if err != nil || legacy || kind != kindReport || len(listed) != 1 || !listed["a.txt"] {
				t.Errorf("marker %q: kind %q, files %v, legacy %v, err %v", got[reportMarker], kind, listed, legacy, err)
			}
			delete(got, reportMarker)
			for k := range got {
				if strings.HasSuffix(k, "/") {
					delete(got, k)
				}
			}
			if d := sameSnapshot(tc.want, got); d != "" {
				t.Errorf("target: %s (holds %v)", d, got)
			}
		})
	}
}

// TestOutputFolderCommitFailure: a move failing midway through commit puts the
// earlier files back, leaves nothing beside the target, and the error names the
// user's folder, not a temporary one.
func TestOutputFolderCommitFailure(t *testing.T) {
	t.Parallel()
	for _, failAt := range []int{1, 2, 3, 4, 5} {
		parent := t.TempDir()
		target := filepath.Join(parent, "out")
		if err := os.MkdirAll(filepath.Join(target, "sub"), 0o755); err != nil {
			t.Fatal(err)
		}
		for name, data := range map[string]string{"a.txt": "old a", "old.txt": "old", "mine.txt": "mine"} {
			if err := os.WriteFile(filepath.Join(target, name), []byte(data), 0o644); err != nil {
				t.Fatal(err)
			}
		}
		markerFile(t, target, kindReport, "a.txt", "old.txt")
		before := snapshot(t, parent)
		o, err := newOutputFolder(target, kindReport, false)
		if err != nil {
			t.Fatal(err)
		}
		calls := 0
		o.rename = func(from, to string) error {
			if calls++; calls == failAt {
				return &os.LinkError{Op: "rename", Old: from, New: to, Err: os.ErrPermission}
			}
			return os.Rename(from, to)
		}
		for _, n := range []string{"a.txt", "b.txt"} {
			if err := o.write(n, []byte("new")); err != nil {
				t.Fatal(err)
			}
		}
		err = o.commit()
		if err == nil {
			t.Fatalf("move %d failing: commit succeeded", failAt)
		}
		if strings.Contains(err.Error(), ".tmp-") || !strings.Contains(err.Error(), target) {
			t.Errorf("move %d failing: %q names a temporary folder, or not %s", failAt, err, target)
		}
		if d := sameSnapshot(before, snapshot(t, parent)); d != "" {
			t.Errorf("move %d failing: %s", failAt, d)
		}
	}
}

// TestInterruptHelper is the child process of TestInterruptLeavesNothing: it runs the
// command line in TELEGRAPHER_TEST_ARGS (tab separated).
func TestInterruptHelper(t *testing.T) {
	args := os.Getenv("TELEGRAPHER_TEST_ARGS")
	if args == "" {
		t.Skip("only run as the child of TestInterruptLeavesNothing")
	}
	os.Exit(runSignals(strings.Split(args, "\t"), os.Stdout, os.Stderr))
}

// TestInterruptLeavesNothing: Ctrl-C during a report removes the folder under
// construction, exits 130 and leaves an earlier report (and the user's file in it)
// as it was.
func TestInterruptLeavesNothing(t *testing.T) {
	t.Parallel()
	if testing.Short() {
		t.Skip("writes the demo report in a child process")
	}
	parent := t.TempDir()
	out := filepath.Join(parent, "rep")
	plain, _, _ := tinyFiles(t, t.TempDir())
	runOK(t, "report", plain, "--out", out)
	if err := os.WriteFile(filepath.Join(out, "my_notes.txt"), []byte("mine"), 0o644); err != nil {
		t.Fatal(err)
	}
	before := snapshot(t, parent)
	cmd := exec.Command(os.Args[0], "-test.run=^TestInterruptHelper$")
	cmd.Env = append(os.Environ(), "TELEGRAPHER_TEST_ARGS="+strings.Join([]string{"demo", "--out", out}, "\t"))
	var stderr bytes.Buffer
	cmd.Stderr = &stderr
	if err := cmd.Start(); err != nil {
		t.Fatal(err)
	}
	// Interrupt once the demo has written files into its temporary folder.
	deadline := time.Now().Add(time.Minute)
	for started := false; !started; time.Sleep(20 * time.Millisecond) {
		if time.Now().After(deadline) {
			cmd.Process.Kill()
			t.Fatal("the demo made no temporary folder within a minute")
		}
		for _, n := range listDir(t, parent) {
			if strings.HasPrefix(n, ".rep.tmp-") {
				if !leftoverName(n, "rep") {
					t.Errorf("the temporary folder %s is not of the pattern cleanLeftovers removes", n)
				}
				if files, _ := os.ReadDir(filepath.Join(parent, n)); len(files) > 0 {
					started = true
				}
			}
		}
	}
	if err := cmd.Process.Signal(os.Interrupt); err != nil {
		t.Fatal(err)
	}
	err := cmd.Wait()
	var ee *exec.ExitError
	if !errors.As(err, &ee) || ee.ExitCode() != 130 {
		t.Fatalf("exit %v, want 130; stderr: %s", err, stderr.String())
	}
	if !strings.Contains(stderr.String(), "interrupted; nothing written to "+out) {
		t.Errorf("stderr %q does not say nothing was written", stderr.String())
	}
	if d := sameSnapshot(before, snapshot(t, parent)); d != "" {
		t.Errorf("after the interrupt: %s", d)
	}
}
