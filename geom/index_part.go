package geom

import (
	"cmp"
	"slices"

	"gonum.org/v1/gonum/spatial/r3"
)

// TieDistance, in model units (mm), is how close two elements' distances
// from a query point must be for ClosestPerPart to count them as tied:
// 1e-9 mm, far below any element size or the precision of coordinates in
// a mesh file, and far above the rounding of projections onto
// neighbouring elements at body coordinates (about 1e-12 mm at 5,000 mm;
// our choice).
const TieDistance = 1e-9

// ClosestPerPart returns, for every part with an element whose surface
// lies within distance r of p, the projection of p onto the part's
// closest element, sorted by distance, then part id; nil when there is
// none.
//
// Elements whose distances from p differ by TieDistance or less are tied,
// and ties go to the lower element id: a point on an edge or a node that
// several elements share takes the element with the lowest id among them,
// so the answer does not depend on the order of the elements in the mesh
// or its files.
//
// Elements are visited in order of their bounding-box distance from p
// (the index's box, rounded outwards), and an element whose box lies
// farther than its part's best projection so far (plus TieDistance) is
// not projected: the box distance is a lower bound of the distance to
// the element's surface. The choice is made once the best distances are
// final, so neither the order of the visits nor how tight the bounds are
// changes the answer. A query costs
// O(log n) plus the elements near p.
func (x *Index) ClosestPerPart(p r3.Vec, r float64) []Projection {
	q, r2, ok := query(p, r)
	if !ok {
		return nil
	}
	m := x.m
	type near struct {
		d2 float64 // squared distance from p to the element's box in the index
		e  int32
	}
	// The index's boxes (rounded outwards) give the lower bounds: no
	// need to make the elements' boxes again.
	var buf [256]near
	list := buf[:0]
	x.elems.within(&q, r2*pruneSlack, func(k int, d2 float64) { list = append(list, near{d2, x.elems.ids[k]}) })
	if len(list) == 0 {
		return nil
	}
	slices.SortFunc(list, func(a, b near) int {
		return cmp.Or(cmp.Compare(a.d2, b.d2), cmp.Compare(m.ElemIDs[a.e], m.ElemIDs[b.e]))
	})
	// Per part found: its index in m.Parts and its best distance so far.
	// kept holds every projection within TieDistance of its part's best
	// at the time it was made; the choice among them is made at the end,
	// once the best distances are final, so that it does not depend on
	// the order of the visits.
	var (
		parts []int32
		best  []float64
		kept  []Projection
	)
	for _, c := range list {
		pi := m.ElemPart[c.e]
		k := slices.Index(parts, pi)
		if k >= 0 {
			if b := best[k] + TieDistance; c.d2 > b*b*pruneSlack {
				continue
			}
		}
		pr := m.Project(int(c.e), p)
		if !(pr.Dist <= r) {
			continue
		}
		switch {
		case k < 0:
			parts = append(parts, pi)
			best = append(best, pr.Dist)
		case pr.Dist > best[k]+TieDistance:
			continue
		default:
			best[k] = min(best[k], pr.Dist)
		}
		kept = append(kept, pr)
	}
	out := make([]Projection, 0, len(parts))
	for k, pi := range parts {
		chosen := -1
		for i := range kept {
			pr := &kept[i]
			if m.ElemPart[pr.Elem] != pi || pr.Dist > best[k]+TieDistance {
				continue
			}
			if chosen < 0 || m.ElemIDs[pr.Elem] < m.ElemIDs[kept[chosen].Elem] {
				chosen = i
			}
		}
		out = append(out, kept[chosen])
	}
	slices.SortFunc(out, func(a, b Projection) int {
		return cmp.Or(cmp.Compare(a.Dist, b.Dist), cmp.Compare(m.Parts[m.ElemPart[a.Elem]].ID, m.Parts[m.ElemPart[b.Elem]].ID))
	})
	return out
}
