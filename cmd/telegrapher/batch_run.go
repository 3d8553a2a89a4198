package main

import (
	"runtime"
	"sync/atomic"

	"golang.org/x/sync/errgroup"
)

// parallelEach calls work(i) for i in [0, n) on up to workers goroutines (0 = one per
// core). It calls progress(done) after each item, from any goroutine (the status line
// throttles its drawing), and progress(n) last; progress may be nil.
func parallelEach(n, workers int, progress func(done int), work func(i int)) {
	if workers <= 0 {
		workers = runtime.GOMAXPROCS(0)
	}
	var done atomic.Int64
	var g errgroup.Group
	g.SetLimit(max(workers, 1))
	for i := range n {
		g.Go(func() error {
			work(i)
			if d := done.Add(1); progress != nil {
				progress(int(d))
			}
			return nil
		})
	}
	_ = g.Wait() // work returns nothing to report
	if progress != nil {
		progress(n)
	}
}
