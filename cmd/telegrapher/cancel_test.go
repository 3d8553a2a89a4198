package main

import (
	"bytes"
	"context"
	"errors"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"github.com/telegrapher/telegrapher/cmd/telegrapher/internal/study"
)

// A cancelled context (Ctrl-C, SIGTERM in main) makes every long command stop: run
// returns 130, says so on stderr, writes nothing to stdout and leaves no folder.
func TestRunCancelled(t *testing.T) {
	t.Parallel()
	td := filepath.Join("..", "..", "testdata")
	ctx, cancel := context.WithCancel(context.Background())
	cancel()
	for _, tc := range []struct {
		name   string
		args   func(out string) []string
		folder bool // the command writes a folder: out must not exist afterwards
	}{
		{"switching", func(string) []string {
			return []string{"switching", filepath.Join(td, "switching_study.toml"), "--json"}
		}, false},
		{"scan", func(string) []string { return []string{"scan", filepath.Join(td, "scan_study.toml"), "--json"} }, false},
		{"remedy", func(string) []string { return []string{"remedy", filepath.Join(td, "remedy_switching.toml"), "--json"} }, false},
		{"report", func(out string) []string {
			return []string{"report", filepath.Join(td, "switching_study.toml"), "--out", out}
		}, true},
		{"demo", func(out string) []string { return []string{"demo", "--out", out} }, true},
		{"batch", func(out string) []string {
			return []string{"batch", filepath.Join(td, "batch_example.csv"), "--out", out}
		}, true},
	} {
		t.Run(tc.name, func(t *testing.T) {
			t.Parallel()
			out := filepath.Join(t.TempDir(), "out")
			var stdout, stderr bytes.Buffer
			code := runContext(ctx, tc.args(out), &stdout, &stderr)
			if code != statusInterrupted {
				t.Fatalf("exit %d, want %d; stderr: %s", code, statusInterrupted, stderr.String())
			}
			if !strings.Contains(stderr.String(), "interrupted") {
				t.Errorf("stderr %q does not say the run was interrupted", stderr.String())
			}
			if stdout.Len() != 0 {
				t.Errorf("stdout has %d bytes, want none", stdout.Len())
			}
			if tc.folder {
				if !strings.Contains(stderr.String(), "nothing written to "+out) {
					t.Errorf("stderr %q does not say nothing was written to %s", stderr.String(), out)
				}
				if _, err := os.Stat(out); !os.IsNotExist(err) {
					t.Errorf("%s exists after the interrupted run (%v)", out, err)
				}
				if left, _ := filepath.Glob(filepath.Join(filepath.Dir(out), ".out.tmp-*")); len(left) > 0 {
					t.Errorf("temporary folders left: %v", left)
				}
			}
		})
	}
}

// The computations behind the commands return context.Canceled promptly on a
// cancelled context: the remedy search, the inventory screening and the report.
func TestComputationsCancelled(t *testing.T) {
	t.Parallel()
	td := filepath.Join("..", "..", "testdata")
	ctx, cancel := context.WithCancel(context.Background())
	cancel()
	rem := loadStudy(t, filepath.Join(td, "remedy_switching.toml"))
	if _, err := computeRemedyProgress(ctx, rem, nil); !isCanceled(err) {
		t.Errorf("remedy: error %v, want context.Canceled", err)
	}
	f, err := os.Open(filepath.Join(td, "batch_example.csv"))
	if err != nil {
		t.Fatal(err)
	}
	lines, err := parseBatch("batch_example.csv", f)
	f.Close()
	if err != nil {
		t.Fatal(err)
	}
	if _, err := screenInventory(ctx, "batch_example.csv", lines, 0, nil); !isCanceled(err) {
		t.Errorf("batch: error %v, want context.Canceled", err)
	}
	out := filepath.Join(t.TempDir(), "r")
	if _, err := writeReportStatus(ctx, rem, out, false, nil); !isCanceled(err) {
		t.Errorf("report: error %v, want context.Canceled", err)
	}
	if _, err := os.Stat(out); !os.IsNotExist(err) {
		t.Errorf("report: %s exists after the cancelled run", out)
	}
}

func loadStudy(t *testing.T, path string) *study.Study {
	t.Helper()
	st, err := study.Load(path)
	if err != nil {
		t.Fatal(err)
	}
	return st
}

func isCanceled(err error) bool { return errors.Is(err, context.Canceled) }
