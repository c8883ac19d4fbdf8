package geom

import (
	"math"

	"gonum.org/v1/gonum/spatial/r3"
)

// FreeEdgeDistance returns the distance from q to the nearest free edge
// of part pi (an element edge that no other element of the part shares;
// collapsed edges, whose two ends are one node, are left out, as
// FreeEdges leaves them) within radius r, or +Inf when there is none. The edges of second-order
// elements are the curves through their midside nodes (Mesh.EdgeDistance). near must hold every
// element within r of q (it may hold more, in any order), for example the
// answer of Index.ElemsNear(q, r) or Index.CandidatesNear(q, r).
//
// It needs no global edge table: an edge within r of q has every element
// that uses it within r too (their bounding boxes hold the edge), so the
// elements of near whose box lies within r of q suffice, and counting
// edge uses among them tells which edges are free.
func FreeEdgeDistance(m *Mesh, near []int32, q r3.Vec, pi int32, r float64) float64 {
	type edgeUse struct {
		key uint64
		e   int32
		k   int32
	}
	var ubuf [256]edgeUse
	uses := ubuf[:0]
	r2 := r * r * pruneSlack
	for _, e := range near {
		if m.ElemPart[e] != pi {
			continue
		}
		if lo, hi := elemBox(m, int(e)); !(boxDist2(lo, hi, q) <= r2) {
			continue
		}
		for k := range m.Type(int(e)).Corners() {
			if ed := m.ElemEdge(int(e), k); ed.A != ed.B { // a collapsed edge bounds nothing (FreeEdges)
				uses = append(uses, edgeUse{edgeKey(ed), e, int32(k)})
			}
		}
	}
	// Count the uses of each edge in an open-addressing table of at
	// least twice as many slots as uses (key 0 marks an empty slot: a
	// stored key is its own +1, and keys of node pairs below 2^32 each
	// never reach the top value).
	size := 16
	for size < 2*len(uses) {
		size *= 2
	}
	var tbuf [512]edgeCount
	var table []edgeCount
	if size <= len(tbuf) {
		table = tbuf[:size]
	} else {
		table = make([]edgeCount, size)
	}
	mask := uint64(size - 1)
	slot := func(key uint64) *edgeCount {
		stored := key + 1
		for h := (key * 0x9E3779B97F4A7C15) >> 32 & mask; ; h = (h + 1) & mask {
			if c := &table[h]; c.key == stored || c.key == 0 {
				c.key = stored
				return c
			}
		}
	}
	for _, u := range uses {
		slot(u.key).n++
	}
	// The nearest free edge: the minimum does not depend on the order
	// the edges are met in.
	best := math.Inf(1)
	for _, u := range uses {
		if slot(u.key).n != 1 { // used by one element of the part only: free
			continue
		}
		if d := m.EdgeDistance(m.ElemEdge(int(u.e), int(u.k)), q); d <= r && d < best {
			best = d
		}
	}
	return best
}

// edgeCount is a slot of FreeEdgeDistance's table: an edge key plus one
// (0 for an empty slot) and its number of uses.
type edgeCount struct {
	key uint64
	n   int32
}

// edgeKey identifies an edge by its two nodes, in either direction.
func edgeKey(ed Edge) uint64 {
	a, b := uint32(ed.A), uint32(ed.B)
	if a > b {
		a, b = b, a
	}
	return uint64(a)<<32 | uint64(b)
}
