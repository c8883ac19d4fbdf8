package html

import (
	"slices"

	"github.com/joinery-cae/joinery/geom"
)

// writeAll writes n parts concurrently, each into its own writer, and
// appends them to w in order.
func writeAll(w *Writer, n int, part func(w *Writer, i int)) {
	ws := make([]Writer, n)
	geom.ParallelEach(n, func(i int) { part(&ws[i], i) })
	size := len(w.b)
	for i := range ws {
		size += len(ws[i].b)
	}
	w.b = slices.Grow(w.b, size-len(w.b))
	for i := range ws {
		w.b = append(w.b, ws[i].b...)
	}
}
