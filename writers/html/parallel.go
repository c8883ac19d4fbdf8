package html

import (
	"runtime"
	"slices"
	"sync"
	"sync/atomic"
)

// parallel calls fn(i) for every i in [0, n) from up to GOMAXPROCS
// goroutines and returns when all are done. fn must write only what
// belongs to i, so that the result does not depend on the schedule.
func parallel(n int, fn func(i int)) {
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

// writeAll writes n parts concurrently, each into its own writer, and
// appends them to w in order.
func writeAll(w *Writer, n int, part func(w *Writer, i int)) {
	ws := make([]Writer, n)
	parallel(n, func(i int) { part(&ws[i], i) })
	size := len(w.b)
	for i := range ws {
		size += len(ws[i].b)
	}
	w.b = slices.Grow(w.b, size-len(w.b))
	for i := range ws {
		w.b = append(w.b, ws[i].b...)
	}
}
