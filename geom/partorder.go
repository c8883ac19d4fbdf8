package geom

import (
	"cmp"
	"math"
	"slices"
)

// orderGrain, mm (mm² for areas), is the grain below which PartOrder
// and the choice of a contact's host count two lengths or areas as
// equal: far below any size that tells two meshes apart, and far above
// the rounding of a model read in another unit and scaled to mm (a few
// units in the sixteenth digit), so that the same model in mm, m or in
// orders its parts alike.
const orderGrain = 1e-6

// grain returns v in units of orderGrain, rounded.
func grain(v float64) float64 { return math.Round(v / orderGrain) }

// PartOrder returns every part index's place (0, 1, ...) in an order of
// the parts by their geometry, for the jobs that measure a pair of parts
// from one of its sides and must not let the parts' ids or the order of
// their records choose it (joints/offset samples a contact from the
// part that comes first; FindContacts takes it as a pair's host where
// the meshes are alike there):
//
//  1. the finer mesh first (the smaller mean element area): an overlap
//     measured on it is resolved the better (the area found from a mesh
//     of spacing h is off by up to about h times the overlap's
//     perimeter /2);
//  2. the smaller area;
//  3. the lower corner of the part's box, x, y, z; then its upper corner;
//  4. the thinner;
//  5. the lower id, only between parts that agree in all of these
//     (meshes that coincide, which give alike answers from either side).
//
// Lengths and areas are compared at a grain of 1e-6 mm, so a model read
// in m or in and scaled to mm orders its parts as the same model in mm.
// Parts without elements come last. The sums go over fixed blocks of
// elements merged in block order: the order does not depend on
// GOMAXPROCS.
func (m *Mesh) PartOrder() []int32 {
	const block = 1 << 16
	ne := m.NumElems()
	type sums struct {
		n    []int32
		area []float64
	}
	blocks := make([]sums, (ne+block-1)/block)
	ParallelEach(len(blocks), func(k int) {
		b := sums{n: make([]int32, len(m.Parts)), area: make([]float64, len(m.Parts))}
		for e := k * block; e < min((k+1)*block, ne); e++ {
			p := m.ElemPart[e]
			b.n[p]++
			b.area[p] += m.Area(e)
		}
		blocks[k] = b
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
			if n[a] == 0 {
				return 1
			}
			return -1
		}
		if n[a] == 0 {
			return 0
		}
		return cmp.Or(cmp.Compare(grain(area[a]/float64(n[a])), grain(area[b]/float64(n[b]))), cmp.Compare(grain(area[a]), grain(area[b])))
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
			return cmp.Or(cmp.Compare(grain(sa.Box.Min.X), grain(sb.Box.Min.X)), cmp.Compare(grain(sa.Box.Min.Y), grain(sb.Box.Min.Y)),
				cmp.Compare(grain(sa.Box.Min.Z), grain(sb.Box.Min.Z)), cmp.Compare(grain(sa.Box.Max.X), grain(sb.Box.Max.X)),
				cmp.Compare(grain(sa.Box.Max.Y), grain(sb.Box.Max.Y)), cmp.Compare(grain(sa.Box.Max.Z), grain(sb.Box.Max.Z)),
				cmp.Compare(grain(sa.ThicknessMin), grain(sb.ThicknessMin)), cmp.Compare(grain(sa.ThicknessMax), grain(sb.ThicknessMax)),
				cmp.Compare(m.Parts[a].ID, m.Parts[b].ID))
		})
	}
	rank := make([]int32, len(m.Parts))
	for r, p := range idx {
		rank[p] = int32(r)
	}
	return rank
}
