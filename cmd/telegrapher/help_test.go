package main

import (
	"strings"
	"testing"
)

// help answers for every name the command list shows, help and version included.
func TestHelpEveryListedName(t *testing.T) {
	t.Parallel()
	names := []string{"help", "version"}
	for n := range commands {
		names = append(names, n)
	}
	for _, n := range names {
		code, out, errOut := fndRun("help", n)
		if code != 0 || !strings.HasPrefix(out, "usage: telegrapher "+n) {
			t.Errorf("help %s: exit %d, stdout %q, stderr %q", n, code, clip(out, 60), errOut)
		}
	}
}

// `help loading` says what the loadability does with the thermal limit, as the command does.
func TestHelpLoadingThermal(t *testing.T) {
	t.Parallel()
	_, out, _ := fndRun("help", "loading")
	if strings.Contains(out, "No thermal limit is applied.") || !strings.Contains(out, "thermal_rating_a") {
		t.Errorf("help loading does not state the optional thermal limit:\n%s", out)
	}
}

// --at-hz given as 0 is refused like any other value out of range, not ignored.
func TestConstantsAtHzZeroRefused(t *testing.T) {
	t.Parallel()
	p := fndWrite(t, "s.toml", fndStudy)
	for _, v := range []string{"0", "-0", "-50"} {
		code, out, errOut := fndRun("constants", p, "--at-hz", v)
		if code != 2 || out != "" || !strings.Contains(errOut, "--at-hz must be > 0") {
			t.Errorf("--at-hz %s: exit %d, stdout %q, stderr %q", v, code, clip(out, 60), errOut)
		}
	}
}

// check lists harmonic tables by order in words, not in Go's map syntax.
func TestCheckHarmonicTables(t *testing.T) {
	t.Parallel()
	p := fndWrite(t, "s.toml", fndStudy+"[scan]\nbackground_pct = { 7 = 1.0, 5 = 1.5 }\n")
	code, out, errOut := fndRun("check", p)
	if code != 0 {
		t.Fatalf("exit %d: %s", code, errOut)
	}
	if strings.Contains(out, "map[") || !strings.Contains(out, "h5 1.5 %, h7 1 %") {
		t.Errorf("check output:\n%s", out)
	}
}

// The command list names each command once, in the alphabetical order `help` prints,
// and every command is reachable by its name.
func TestCommandListOrder(t *testing.T) {
	t.Parallel()
	for i, c := range commandList {
		if i > 0 && !(commandList[i-1].name < c.name) {
			t.Errorf("commandList: %q after %q: want distinct names in alphabetical order", c.name, commandList[i-1].name)
		}
		if commands[c.name] != c {
			t.Errorf("commands[%q] is not the list's entry", c.name)
		}
	}
	if len(commands) != len(commandList) {
		t.Errorf("commands has %d entries, commandList %d", len(commands), len(commandList))
	}
}

// A flagged gain reads above its limit, with as many figures as that takes.
func TestFmtAbove(t *testing.T) {
	t.Parallel()
	for _, tc := range []struct {
		g, limit float64
		want     string
	}{
		{15.84, 2, "15.8"}, {2.0004, 2, "2.0004"}, {2.0449, 2, "2.04"}, {7.0000001, 7, "7.0000001"},
	} {
		if got := fmtAbove(tc.g, tc.limit); got != tc.want {
			t.Errorf("fmtAbove(%g, %g) = %q, want %q", tc.g, tc.limit, got, tc.want)
		}
	}
}
