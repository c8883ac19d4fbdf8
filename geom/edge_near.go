package geom

import (
	"cmp"
	"math"
	"slices"

	"gonum.org/v1/gonum/spatial/r3"
)

// FreeEdgeDistance returns the distance from q to the nearest free edge
// of part pi (an element edge that no other element of the part shares)
// within radius r, or +Inf when there is none. The edges of second-order
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
			uses = append(uses, edgeUse{edgeKey(m.ElemEdge(int(e), k)), e, int32(k)})
		}
	}
	slices.SortFunc(uses, func(a, b edgeUse) int { return cmp.Compare(a.key, b.key) })
	best := math.Inf(1)
	for i := 0; i < len(uses); {
		j := i + 1
		for j < len(uses) && uses[j].key == uses[i].key {
			j++
		}
		if j == i+1 { // used by one element of the part only: free
			if d := m.EdgeDistance(m.ElemEdge(int(uses[i].e), int(uses[i].k)), q); d <= r && d < best {
				best = d
			}
		}
		i = j
	}
	return best
}

// edgeKey identifies an edge by its two nodes, in either direction.
func edgeKey(ed Edge) uint64 {
	a, b := uint32(ed.A), uint32(ed.B)
	if a > b {
		a, b = b, a
	}
	return uint64(a)<<32 | uint64(b)
}
