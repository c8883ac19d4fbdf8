package spot

import (
	"cmp"
	"math/rand/v2"
	"slices"
	"testing"

	"gonum.org/v1/gonum/spatial/r3"

	"github.com/joinery-cae/joinery/geom"
	"github.com/joinery-cae/joinery/joints"
)

// TestCandidatesMatchExhaustive checks the pruned per-part search against
// projecting onto every element within reach (the index's ProjectNear,
// itself checked against brute force in package geom): same parts, same
// host elements, same distances.
func TestCandidatesMatchExhaustive(t *testing.T) {
	m := plates(
		plate{Part: 1, T: 1, NX: 12, NY: 12, H: 5},
		plate{Part: 2, T: 1.2, Z: 1.1, X0: 1.3, Y0: -0.7, NX: 15, NY: 15, H: 4.1, Tri: true},
		plate{Part: 3, T: 0.8, Z: 2.2, X0: -2, NX: 9, NY: 9, H: 7},
	)
	x := geom.NewIndex(m)
	rng := rand.New(rand.NewPCG(5, 6))
	for q := 0; q < 3000; q++ {
		p := r3.Vec{X: rng.Float64()*70 - 5, Y: rng.Float64()*70 - 5, Z: rng.Float64()*6 - 2}
		r := rng.Float64() * 5
		got := candidates(x, p, r)
		var want []joints.Sheet
		seen := map[int32]bool{}
		for _, pr := range x.ProjectNear(p, r, nil) {
			if pi := m.ElemPart[pr.Elem]; !seen[pi] {
				seen[pi] = true
				want = append(want, joints.Sheet{Part: m.Parts[pi].ID, Proj: pr})
			}
		}
		slices.SortStableFunc(want, func(a, b joints.Sheet) int {
			return cmp.Or(cmp.Compare(a.Proj.Dist, b.Proj.Dist), cmp.Compare(a.Part, b.Part))
		})
		if len(got) != len(want) {
			t.Fatalf("query %d: %d sheets, want %d", q, len(got), len(want))
		}
		for i := range got {
			if got[i].Part != want[i].Part || got[i].Proj.Elem != want[i].Proj.Elem || got[i].Proj.Dist != want[i].Proj.Dist {
				t.Fatalf("query %d sheet %d: part %d elem %d dist %g, want part %d elem %d dist %g", q, i,
					got[i].Part, got[i].Proj.Elem, got[i].Proj.Dist, want[i].Part, want[i].Proj.Elem, want[i].Proj.Dist)
			}
		}
	}
}
