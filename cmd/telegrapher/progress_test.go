package main

import (
	"bytes"
	"context"
	"fmt"
	"path/filepath"
	"strings"
	"testing"
)

// The report draws a status line for each of its parts (a report of an ordinary study
// takes seconds, and showed nothing), with the switching shots counted to their number.
func TestReportStatusLine(t *testing.T) {
	t.Parallel()
	text := strings.Replace(remedyReadFile(t, "remedy_switching.toml"), "shots = 100", "shots = 30", 1)
	st := remedyParse(t, "s.toml", text)
	var buf bytes.Buffer
	if _, err := writeReportStatus(context.Background(), st, filepath.Join(t.TempDir(), "r"), false, &statusLine{w: &buf}); err != nil {
		t.Fatal(err)
	}
	got := buf.String()
	for i, part := range []string{"line constants", "harmonic scan", "energisation", "loading", "statistical switching", "remedies"} {
		if !strings.Contains(got, fmt.Sprintf("report %d/6: %s", i+1, part)) {
			t.Errorf("status line never shows %q:\n%q", part, got)
		}
	}
	if !strings.Contains(got, "statistical switching, shots 100%") || !strings.Contains(got, "(30/30)") {
		t.Errorf("switching shots not counted to 30/30:\n%q", got)
	}
	// Cleared at the end: the last drawing is blanks between carriage returns.
	if i := strings.LastIndex(strings.TrimSuffix(got, "\r"), "\r"); i < 0 || strings.TrimSpace(got[i:]) != "" {
		t.Errorf("status line not cleared at the end: %q", got[max(0, len(got)-60):])
	}
}

// A nil status line draws nothing and does not fail.
func TestStatusLineNil(t *testing.T) {
	t.Parallel()
	var s *statusLine
	s.Stage("x")
	s.Count(1, 2, "y")
	s.Clear()
	if s.Shots() != nil {
		t.Error("a nil status line gives a counter")
	}
	if newStatusLine(&bytes.Buffer{}) != nil {
		t.Error("a status line on a buffer (not a terminal)")
	}
}
