package main

// statusLine: the one progress line of a command that can take over a second, drawn on
// standard error only when it is a terminal (never into a file or a pipe, never on
// standard output).

import (
	"fmt"
	"io"
	"strings"
	"sync"
	"time"
)

// statusLine draws "stage [####......] done/total unit" in place with a carriage
// return, at most every statusEvery and always at the end of a count. A nil
// *statusLine draws nothing, so callers need not check.
type statusLine struct {
	w     io.Writer
	mu    sync.Mutex
	stage string
	last  time.Time
	shown bool
}

// statusEvery is the least time between two redraws of a count.
const statusEvery = 100 * time.Millisecond

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
	s.stage = name
	s.draw(name + " ...")
}

// Count draws the stage's progress: done of total units.
func (s *statusLine) Count(done, total int, unit string) {
	if s == nil {
		return
	}
	s.mu.Lock()
	defer s.mu.Unlock()
	if done < total && time.Since(s.last) < statusEvery {
		return
	}
	s.last = time.Now()
	const width = 30
	n := min(done*width/max(total, 1), width)
	s.draw(fmt.Sprintf("%s [%s%s] %d/%d %s", s.stage, strings.Repeat("#", n), strings.Repeat(".", width-n), done, total, unit))
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
	if s.shown {
		fmt.Fprint(s.w, "\r\033[K")
		s.shown = false
	}
}

func (s *statusLine) draw(text string) {
	fmt.Fprintf(s.w, "\r\033[K%s", text)
	s.shown = true
}
