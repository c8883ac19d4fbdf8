package geom

import (
	"math"
	"slices"

	"gonum.org/v1/gonum/spatial/r3"
)

// FreeEdgeDistance returns the distance from q to the nearest free edge
// of part pi (an element edge that no other element of the part shares)
// within radius r, or +Inf when there is none. The edges of second-order
// elements are the curves through their midside nodes (Mesh.EdgeDistance). near must hold every
// element within r of q (it may hold more), for example the answer of
// Index.ElemsNear(q, r).
//
// It needs no global edge table: an edge within r of q has every element
// that uses it within r too (their bounding boxes hold the edge), so the
// near elements suffice, and counting edge uses among them tells which
// edges are free.
func FreeEdgeDistance(m *Mesh, near []int32, q r3.Vec, pi int32, r float64) float64 {
	var lbuf [128]int32
	var kbuf [512]uint64
	local := lbuf[:0]
	keys := kbuf[:0]
	for _, e := range near {
		if m.ElemPart[e] != pi {
			continue
		}
		local = append(local, e)
		for k := range m.Type(int(e)).Corners() {
			keys = append(keys, edgeKey(m.ElemEdge(int(e), k)))
		}
	}
	slices.Sort(keys)
	best := math.Inf(1)
	for _, e := range local {
		for k := range m.Type(int(e)).Corners() {
			ed := m.ElemEdge(int(e), k)
			key := edgeKey(ed)
			i, _ := slices.BinarySearch(keys, key)
			if i+1 < len(keys) && keys[i+1] == key {
				continue // shared by another element of the part
			}
			if d := m.EdgeDistance(ed, q); d <= r && d < best {
				best = d
			}
		}
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
