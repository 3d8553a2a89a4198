package propagation

import "sync"

// Memo returns c with its values remembered per complex frequency, for a caller that
// evaluates the same line at the same frequencies many times over (the remedy search
// scans one line with many terminations, and a line from its geometry costs Bessel
// functions and an earth-return term at every frequency). Safe for concurrent use.
// RLGC is returned as it is: its At is cheaper than a look-up. At most memoMax
// frequencies are remembered; beyond, values are computed each time.
func Memo(c Constants) Constants {
	switch c.(type) {
	case RLGC, *memo:
		return c
	}
	return &memo{c: c, m: map[complex128][2]complex128{}}
}

// memoMax bounds what a Memo remembers (about 50 MB).
const memoMax = 1 << 20

type memo struct {
	c  Constants
	mu sync.RWMutex
	m  map[complex128][2]complex128
}

// At returns c.At(s), computed once per s.
func (m *memo) At(s complex128) (z, y complex128) {
	m.mu.RLock()
	v, ok := m.m[s]
	m.mu.RUnlock()
	if ok {
		return v[0], v[1]
	}
	z, y = m.c.At(s)
	m.mu.Lock()
	if len(m.m) < memoMax {
		m.m[s] = [2]complex128{z, y}
	}
	m.mu.Unlock()
	return z, y
}

// MemoCascade returns a copy of c whose sections' constants are Memo'd.
func MemoCascade(c Cascade) Cascade {
	if c == nil {
		return nil
	}
	out := make(Cascade, len(c))
	for i, l := range c {
		l.Constants = Memo(l.Constants)
		out[i] = l
	}
	return out
}
