package main

// statusLine: the one progress line of a command that can take over a second, drawn on
// standard error only when it is a terminal (never into a file or a pipe, never on
// standard output), by github.com/schollz/progressbar.

import (
	"io"
	"os"
	"sync"
	"time"

	"github.com/schollz/progressbar/v3"
)

// statusLine draws the stage under way ("report 2/6: harmonic scan") as a spinner, and
// a count within it ("remedy: reactor pairs  46% |█████     | (6/13)") as a bar,
// redrawn in place at most every statusEvery and always at the end of a count. A nil
// *statusLine draws nothing, so callers need not check.
type statusLine struct {
	w     io.Writer
	mu    sync.Mutex
	stage string
	bar   *progressbar.ProgressBar
	total int    // the count the bar is drawn for; 0 for the stage's spinner
	unit  string // what it counts
}

// statusEvery is the least time between two redraws.
const statusEvery = 100 * time.Millisecond

// statusWidth is the width of the bar in characters.
const statusWidth = 30

// newStatusLine returns a status line on stderr when it is a terminal, else nil.
func newStatusLine(stderr io.Writer) *statusLine {
	if !isTerminal(stderr) {
		return nil
	}
	return &statusLine{w: stderr}
}

// Stage starts a new stage of the work and draws its name at once.
func (s *statusLine) Stage(name string) {
	if s == nil {
		return
	}
	s.mu.Lock()
	defer s.mu.Unlock()
	s.clear()
	s.stage, s.total, s.unit = name, 0, ""
	// Drawn once (no spinner goroutine redrawing it after the stage has moved on).
	s.bar = progressbar.NewOptions(-1, progressbar.OptionSetWriter(s.w), progressbar.OptionSetDescription(name),
		progressbar.OptionThrottle(statusEvery), progressbar.OptionSetRenderBlankState(true),
		progressbar.OptionSetSpinnerChangeInterval(0))
}

// Count draws the stage's progress: done of total, counting unit ("shots"; "" when the
// stage's name says what is counted).
func (s *statusLine) Count(done, total int, unit string) {
	if s == nil {
		return
	}
	s.mu.Lock()
	defer s.mu.Unlock()
	if s.bar == nil || s.total != total || s.unit != unit {
		s.clear()
		s.total, s.unit = total, unit
		desc := s.stage
		switch {
		case desc == "":
			desc = unit
		case unit != "":
			desc += ", " + unit
		}
		s.bar = progressbar.NewOptions(max(total, 1), progressbar.OptionSetWriter(s.w),
			progressbar.OptionSetDescription(desc), progressbar.OptionShowCount(),
			progressbar.OptionSetWidth(statusWidth), progressbar.OptionThrottle(statusEvery))
	}
	_ = s.bar.Set(min(done, max(total, 1))) // into a terminal: nothing to report
}

// Shots returns the switching simulator's progress callback: done of total shots,
// with the pass ("with arresters") when the shots run twice (nil when s is nil).
func (s *statusLine) Shots() func(done, total int, pass string) {
	if s == nil {
		return nil
	}
	return func(done, total int, pass string) {
		unit := "shots"
		if pass != "" {
			unit += " (" + pass + ")"
		}
		s.Count(done, total, unit)
	}
}

// Clear removes the line, leaving the cursor at the start of an empty line.
func (s *statusLine) Clear() {
	if s == nil {
		return
	}
	s.mu.Lock()
	defer s.mu.Unlock()
	s.clear()
}

func (s *statusLine) clear() {
	if s.bar != nil {
		_ = s.bar.Clear()
		s.bar = nil
	}
}

// isTerminal reports whether w is a terminal (a character device), where a progress
// bar belongs; not a file or a pipe.
func isTerminal(w io.Writer) bool {
	f, ok := w.(*os.File)
	if !ok {
		return false
	}
	info, err := f.Stat()
	return err == nil && info.Mode()&os.ModeCharDevice != 0
}
