package geom

import (
	"cmp"
	"math/bits"
	"slices"

	"gonum.org/v1/gonum/spatial/r3"
)

// SortByID puts the nodes and the elements of each source file of m in
// increasing id order, and its parts too, in place, and reports whether
// anything moved.
// The loader (meshio.Load) calls it on each file read, so that no
// result depends on the order of the lines or cells in a file: sums over
// elements, ties between equally near elements and traced outlines all
// follow ids. Files whose ids already increase (the usual case) cost one
// pass over the ids. Nodes and elements stay inside their own file's
// range (Source), so a mesh merged from several files keeps them in
// file order. The parts, which a reader lists in the order of their
// records or of their first element in the file, are put in id order as
// well: which of two parts is taken first then follows their ids, not
// the lines (joints/offset takes the side a contact is sampled from by
// geometry, so neither ids nor lines move its answer).
// The id lookups are rebuilt when anything moved.
func (m *Mesh) SortByID() (bool, error) {
	nodesMoved := m.sortNodesByID()
	elemsMoved := m.sortElemsByID()
	partsMoved := m.sortPartsByID()
	if !nodesMoved && !elemsMoved && !partsMoved {
		return false, nil
	}
	return true, m.Index()
}

// sourceRanges calls fn with the index range [from, to) of each source
// file's nodes (elems false) or elements (elems true).
func (m *Mesh) sourceRanges(elems bool, fn func(from, to int)) {
	n := m.NumNodes()
	if elems {
		n = m.NumElems()
	}
	if len(m.Sources) == 0 {
		fn(0, n)
		return
	}
	for i, s := range m.Sources {
		from, to := s.NodeStart, n
		if elems {
			from = s.ElemStart
		}
		if i+1 < len(m.Sources) {
			to = m.Sources[i+1].NodeStart
			if elems {
				to = m.Sources[i+1].ElemStart
			}
		}
		fn(from, to)
	}
}

// idOrder returns the permutation that sorts ids within each range given
// by ranges (order[new] = old), or nil when they already increase.
func idOrder(ids []int64, ranges func(fn func(from, to int))) []int32 {
	sorted := true
	ranges(func(from, to int) { sorted = sorted && increasing(ids[from:to]) })
	if sorted {
		return nil
	}
	order := MakeLarge[int32](len(ids))
	keys := MakeLarge[uint64](len(ids))
	for i := range order {
		order[i] = int32(i)
	}
	ranges(func(from, to int) {
		if from >= to {
			return
		}
		lo, hi := slices.Min(ids[from:to]), slices.Max(ids[from:to])
		for i := from; i < to; i++ {
			keys[i] = uint64(ids[i]) - uint64(lo) // below 2^64 whatever the ids' signs
		}
		radixSort(keys[from:to], order[from:to], bits.Len64(uint64(hi)-uint64(lo)))
	})
	return order
}

func (m *Mesh) sortNodesByID() bool {
	order := idOrder(m.NodeIDs, func(fn func(from, to int)) { m.sourceRanges(false, fn) })
	if order == nil {
		return false
	}
	ids := MakeLarge[int64](len(order))
	coords := MakeLarge[r3.Vec](len(order))
	newIndex := MakeLarge[int32](len(order))
	for k, old := range order {
		ids[k], coords[k] = m.NodeIDs[old], m.Coords[old]
		newIndex[old] = int32(k)
	}
	for i, n := range m.Conn {
		m.Conn[i] = newIndex[n]
	}
	m.NodeIDs, m.Coords = ids, coords
	return true
}

func (m *Mesh) sortElemsByID() bool {
	order := idOrder(m.ElemIDs, func(fn func(from, to int)) { m.sourceRanges(true, fn) })
	if order == nil {
		return false
	}
	ne := len(order)
	ids := MakeLarge[int64](ne)
	parts := MakeLarge[int32](ne)
	start := MakeLarge[int32](ne + 1)
	conn := MakeLarge[int32](len(m.Conn))
	var thick []float64
	if m.ElemThickness != nil {
		thick = MakeLarge[float64](ne)
	}
	for k, old := range order {
		ids[k], parts[k] = m.ElemIDs[old], m.ElemPart[old]
		if thick != nil {
			thick[k] = m.ElemThickness[old]
		}
		nodes := m.ElemNodes(int(old))
		start[k+1] = start[k] + int32(len(nodes))
		copy(conn[start[k]:], nodes)
	}
	m.ElemIDs, m.ElemPart, m.ElemStart, m.Conn = ids, parts, start, conn
	if thick != nil {
		m.ElemThickness = thick
	}
	return true
}

// sortPartsByID puts Parts in increasing id order, renumbering ElemPart,
// and reports whether any part moved.
func (m *Mesh) sortPartsByID() bool {
	byID := func(a, b Part) int { return cmp.Compare(a.ID, b.ID) }
	if slices.IsSortedFunc(m.Parts, byID) {
		return false
	}
	order := make([]int32, len(m.Parts))
	for i := range order {
		order[i] = int32(i)
	}
	slices.SortStableFunc(order, func(a, b int32) int { return byID(m.Parts[a], m.Parts[b]) })
	parts := make([]Part, len(m.Parts))
	newIndex := make([]int32, len(m.Parts))
	for k, old := range order {
		parts[k] = m.Parts[old]
		newIndex[old] = int32(k)
	}
	for e, pi := range m.ElemPart {
		m.ElemPart[e] = newIndex[pi]
	}
	m.Parts = parts
	return true
}
