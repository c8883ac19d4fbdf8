package geom

import (
	"runtime"
	"sync"
	"sync/atomic"
)

// ParallelEach calls fn(i) for every i in [0, n) on up to GOMAXPROCS
// goroutines, handing out one i at a time (for items of uneven cost),
// and returns when all are done. fn must write only what belongs to i,
// so that the result does not depend on the schedule. It is exported for
// the packages that render what geom computes (writers/html), so that
// the project keeps one such loop.
func ParallelEach(n int, fn func(i int)) {
	workers := min(runtime.GOMAXPROCS(0), n)
	if workers <= 1 {
		for i := range n {
			fn(i)
		}
		return
	}
	var next atomic.Int64
	var wg sync.WaitGroup
	for range workers {
		wg.Go(func() {
			for {
				i := int(next.Add(1) - 1)
				if i >= n {
					return
				}
				fn(i)
			}
		})
	}
	wg.Wait()
}
