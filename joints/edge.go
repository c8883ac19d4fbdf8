package joints

import (
	"math"

	"gonum.org/v1/gonum/spatial/r3"

	"github.com/joinery-cae/joinery/geom"
)

// edgeDistance returns the distance from q to the nearest free edge of
// part pi (an element edge no other element of the part shares) within
// radius r, or +Inf when there is none.
//
// It needs no global edge table: an edge within r of q has every element
// that uses it within r too (their bounding boxes hold the edge), so one
// query gives the elements, and counting edge uses among them tells which
// edges are free.
func edgeDistance(x *geom.Index, q r3.Vec, pi int32, r float64) float64 {
	m := x.Mesh()
	var buf [128]int32
	type key struct{ a, b int32 }
	uses := map[key]int{}
	near := x.ElemsNear(q, r, buf[:0])
	local := near[:0]
	for _, e := range near {
		if m.ElemPart[e] != pi {
			continue
		}
		local = append(local, e)
		nc := m.Type(int(e)).Corners()
		for k := 0; k < nc; k++ {
			ed := m.ElemEdge(int(e), k)
			uses[key{min(ed.A, ed.B), max(ed.A, ed.B)}]++
		}
	}
	best := math.Inf(1)
	for _, e := range local {
		nc := m.Type(int(e)).Corners()
		for k := 0; k < nc; k++ {
			ed := m.ElemEdge(int(e), k)
			if uses[key{min(ed.A, ed.B), max(ed.A, ed.B)}] != 1 {
				continue
			}
			if d := segmentDistance(q, m.Coords[ed.A], m.Coords[ed.B]); d <= r && d < best {
				best = d
			}
		}
	}
	return best
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
