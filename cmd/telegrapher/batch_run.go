package main

import (
	"io"
	"os"
	"runtime"
	"sync"
	"sync/atomic"
	"time"

	"golang.org/x/sync/errgroup"
)

// parallelEach calls work(i) for i in [0, n) on up to workers goroutines (0 = one per
// core). It calls progress(done) from one goroutine at most every tick and once at the
// end; progress may be nil.
func parallelEach(n, workers int, tick time.Duration, progress func(done int), work func(i int)) {
	if workers <= 0 {
		workers = runtime.GOMAXPROCS(0)
	}
	var done atomic.Int64
	stop := make(chan struct{})
	var pwg sync.WaitGroup
	if progress != nil {
		pwg.Add(1)
		go func() {
			defer pwg.Done()
			t := time.NewTicker(tick)
			defer t.Stop()
			for {
				select {
				case <-stop:
					return
				case <-t.C:
					progress(int(done.Load()))
				}
			}
		}()
	}
	var g errgroup.Group
	g.SetLimit(max(workers, 1))
	for i := range n {
		g.Go(func() error { work(i); done.Add(1); return nil })
	}
	_ = g.Wait() // work returns nothing to report
	close(stop)
	pwg.Wait()
	if progress != nil {
		progress(n)
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
