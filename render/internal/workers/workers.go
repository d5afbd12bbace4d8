// Package workers is the one worker pool of the renderer: it spreads
// independent, indexed jobs over all cores. Results never depend on
// scheduling as long as job i writes only its own slot.
package workers

import (
	"context"
	"runtime"
	"sync"
	"sync/atomic"
)

// Each runs job(i, s) for every i in [0, n) on min(GOMAXPROCS, n)
// goroutines, handing out indices in increasing order through an atomic
// counter. Each goroutine gets its own scratch value s from scratch (pass
// a function returning a zero struct when no scratch space is needed).
// Once ctx is cancelled no new index is handed out; Each returns when the
// running jobs finish, and the caller checks ctx.Err().
func Each[S any](ctx context.Context, n int, scratch func() S, job func(i int, s S)) {
	var next atomic.Int64
	var wg sync.WaitGroup
	for range min(runtime.GOMAXPROCS(0), n) {
		wg.Add(1)
		go func() {
			defer wg.Done()
			s := scratch()
			for {
				i := int(next.Add(1) - 1)
				if i >= n || ctx.Err() != nil {
					return
				}
				job(i, s)
			}
		}()
	}
	wg.Wait()
}

// Counter returns a function that jobs call when they finish: it counts
// them and passes the count to report, from one goroutine at a time, so
// that report (a progress bar) needs no locking. A nil report gives a
// function that does nothing.
func Counter(report func(done int)) func() {
	if report == nil {
		return func() {}
	}
	var mu sync.Mutex
	done := 0
	return func() {
		mu.Lock()
		done++
		report(done)
		mu.Unlock()
	}
}
