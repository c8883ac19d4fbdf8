package offset

import (
	"cmp"
	"slices"

	"github.com/joinery-cae/joinery/geom"
)

// sampleOrder returns every part index's place (0, 1, ...) in the order
// in which pairs of parts are measured: each pair is sampled from the
// elements of the part that comes first, along its normals, and its
// contacts are framed on that part. The order is geometric, so that
// neither the parts' ids nor the order of their records in a file
// changes the evidence (with the side taken from the part of lower index
// and the frame from the part of lower id, the bundled example gave 5
// contacts, 1 of them disagreeing, with its parts in one order and 6 and
// 2 with them reversed; TestInferIndependentOfIDsAndOrder):
//
//  1. the finer mesh first (the smaller mean element area): the overlap
//     is then sampled at the closer spacing, so its area and its
//     boundary are resolved the better (the area sampled from a mesh of
//     spacing h is off by up to about h times the overlap's perimeter
//     /2);
//  2. the smaller area;
//  3. the lower corner of the part's box, x, y, z; then its upper corner;
//  4. the thinner;
//  5. the lower id, only between parts that agree in all of these
//     (meshes that coincide, whose samples from either side are alike).
//
// Lengths and areas are compared at the grain of tie, so a model read in
// m or in and scaled to mm orders its parts as the same model in mm. Parts
// without elements come last.
func sampleOrder(m *geom.Mesh) []int32 {
	// Element counts and areas per part, summed over fixed blocks of
	// elements merged in block order (the result does not depend on
	// GOMAXPROCS).
	const block = 1 << 16
	ne := m.NumElems()
	type sums struct {
		n    []int32
		area []float64
	}
	blocks := make([]sums, (ne+block-1)/block)
	parallelRange(ne, block, func(lo, hi int) {
		b := sums{n: make([]int32, len(m.Parts)), area: make([]float64, len(m.Parts))}
		for e := lo; e < hi; e++ {
			p := m.ElemPart[e]
			b.n[p]++
			b.area[p] += m.Area(e)
		}
		blocks[lo/block] = b
	})
	n := make([]int, len(m.Parts))
	area := make([]float64, len(m.Parts))
	for _, b := range blocks {
		for p := range n {
			n[p] += int(b.n[p])
			area[p] += b.area[p]
		}
	}
	idx := make([]int32, len(m.Parts))
	for i := range idx {
		idx[i] = int32(i)
	}
	first := func(a, b int32) int {
		if (n[a] == 0) != (n[b] == 0) {
			return cmpBool(n[a] == 0, n[b] == 0)
		}
		if n[a] == 0 {
			return 0
		}
		return cmp.Or(cmp.Compare(tie(area[a]/float64(n[a])), tie(area[b]/float64(n[b]))), cmp.Compare(tie(area[a]), tie(area[b])))
	}
	slices.SortFunc(idx, func(a, b int32) int { return cmp.Or(first(a, b), cmp.Compare(m.Parts[a].ID, m.Parts[b].ID)) })
	// Boxes and thicknesses only where those keys tie (meshes of one
	// element size, as generated ones often are).
	tied := false
	for i := 1; i < len(idx); i++ {
		if n[idx[i]] > 0 && first(idx[i-1], idx[i]) == 0 {
			tied = true
			break
		}
	}
	if tied {
		st := m.PartStats()
		slices.SortFunc(idx, func(a, b int32) int {
			if c := first(a, b); c != 0 || n[a] == 0 {
				return cmp.Or(c, cmp.Compare(m.Parts[a].ID, m.Parts[b].ID))
			}
			sa, sb := &st[a], &st[b]
			return cmp.Or(cmp.Compare(tie(sa.Box.Min.X), tie(sb.Box.Min.X)), cmp.Compare(tie(sa.Box.Min.Y), tie(sb.Box.Min.Y)),
				cmp.Compare(tie(sa.Box.Min.Z), tie(sb.Box.Min.Z)), cmp.Compare(tie(sa.Box.Max.X), tie(sb.Box.Max.X)),
				cmp.Compare(tie(sa.Box.Max.Y), tie(sb.Box.Max.Y)), cmp.Compare(tie(sa.Box.Max.Z), tie(sb.Box.Max.Z)),
				cmp.Compare(tie(sa.ThicknessMin), tie(sb.ThicknessMin)), cmp.Compare(tie(sa.ThicknessMax), tie(sb.ThicknessMax)),
				cmp.Compare(m.Parts[a].ID, m.Parts[b].ID))
		})
	}
	rank := make([]int32, len(m.Parts))
	for r, p := range idx {
		rank[p] = int32(r)
	}
	return rank
}
