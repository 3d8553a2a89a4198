package propagation

import (
	"sync"
	"testing"
)

// countingConstants counts its evaluations.
type countingConstants struct {
	mu sync.Mutex
	n  int
}

func (c *countingConstants) At(s complex128) (z, y complex128) {
	c.mu.Lock()
	c.n++
	c.mu.Unlock()
	return complex(0.03e-3, 0) + s*1e-6, s * 12e-12
}

// A Memo gives exactly the values of what it wraps, computing each frequency once,
// also from several goroutines; RLGC is not wrapped.
func TestMemo(t *testing.T) {
	t.Parallel()
	c := &countingConstants{}
	m := Memo(c)
	var wg sync.WaitGroup
	for g := 0; g < 4; g++ {
		wg.Add(1)
		go func() {
			defer wg.Done()
			for i := 0; i < 100; i++ {
				s := complex(0, float64(i))
				z, y := m.At(s)
				wz, wy := c.At(s)
				if z != wz || y != wy {
					t.Errorf("At(%v) = %v, %v, want %v, %v", s, z, y, wz, wy)
				}
			}
		}()
	}
	wg.Wait()
	// 400 direct calls by the test itself, and at most 100 + a few racing first
	// evaluations through the memo (a frequency two goroutines miss at once).
	if through := c.n - 400; through < 100 || through > 400 {
		t.Errorf("%d evaluations through the memo for 100 frequencies", through)
	}
	before := c.n
	for i := 0; i < 100; i++ {
		m.At(complex(0, float64(i)))
	}
	if c.n != before {
		t.Errorf("remembered frequencies evaluated again: %d calls", c.n-before)
	}
	if _, ok := Memo(RLGC{R: 1, L: 1, C: 1}).(RLGC); !ok {
		t.Error("RLGC wrapped")
	}
	if Memo(m) != m {
		t.Error("a Memo wrapped again")
	}
}
