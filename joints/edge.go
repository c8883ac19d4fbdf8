package joints

import (
	"math"
	"slices"

	"gonum.org/v1/gonum/spatial/r3"

	"github.com/joinery-cae/joinery/geom"
)

// edgeDistance returns the distance from q to the nearest free edge of
// part pi (an element edge no other element of the part shares) within
// radius r, or +Inf when there is none. It looks only at elements near q,
// through the index, so it needs no global edge table.
func edgeDistance(x *geom.Index, q r3.Vec, pi int32, r float64) float64 {
	m := x.Mesh()
	best := math.Inf(1)
	var buf, nbuf [64]int32
	for _, e := range x.ElemsNear(q, r, buf[:0]) {
		if m.ElemPart[e] != pi {
			continue
		}
		nc := m.Type(int(e)).Corners()
		for k := 0; k < nc; k++ {
			ed := m.ElemEdge(int(e), k)
			d := segmentDistance(q, m.Coords[ed.A], m.Coords[ed.B])
			if d > r || d >= best {
				continue
			}
			if isFreeEdge(x, ed, nbuf[:0]) {
				best = d
			}
		}
	}
	return best
}

// isFreeEdge reports whether no element of the edge's part other than its
// own uses both its nodes.
func isFreeEdge(x *geom.Index, ed geom.Edge, buf []int32) bool {
	m := x.Mesh()
	a, b := m.Coords[ed.A], m.Coords[ed.B]
	mid := r3.Scale(0.5, r3.Add(a, b))
	part := m.ElemPart[ed.Elem]
	for _, f := range x.ElemsNear(mid, 1e-9*(1+r3.Norm(mid)), buf) {
		if f == ed.Elem || m.ElemPart[f] != part {
			continue
		}
		nodes := m.ElemNodes(int(f))
		if slices.Contains(nodes, ed.A) && slices.Contains(nodes, ed.B) {
			return false
		}
	}
	return true
}

// segmentDistance returns the distance from p to the segment ab.
func segmentDistance(p, a, b r3.Vec) float64 {
	ab := r3.Sub(b, a)
	l2 := r3.Norm2(ab)
	t := 0.0
	if l2 > 0 {
		t = math.Max(0, math.Min(1, r3.Dot(r3.Sub(p, a), ab)/l2))
	}
	return r3.Norm(r3.Sub(p, r3.Add(a, r3.Scale(t, ab))))
}
