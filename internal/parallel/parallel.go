// Package parallel runs the iterations of a loop on several goroutines: the one worker pool
// the engine, the loader and the writer share.
package parallel

import (
	"runtime"
	"sync"
	"sync/atomic"
)

// For calls f(i) for every i in [0, n) on up to GOMAXPROCS goroutines (see [ForN]).
func For(n int, f func(i int)) { ForN(runtime.GOMAXPROCS(0), n, f) }

// ForN calls f(i) for every i in [0, n) on up to workers goroutines, each taking the next
// index when it finishes one (so long and short items even out), and returns when every
// call has returned. With one worker, or one item, it runs in the calling goroutine. Calls
// for different i may run at the same time: f must only write what belongs to its i.
func ForN(workers, n int, f func(i int)) {
	workers = min(workers, n)
	if workers <= 1 {
		for i := range n {
			f(i)
		}
		return
	}
	var next atomic.Int64
	var wg sync.WaitGroup
	for range workers {
		wg.Go(func() {
			for {
				i := int(next.Add(1)) - 1
				if i >= n {
					return
				}
				f(i)
			}
		})
	}
	wg.Wait()
}
