package geom

import (
	"math/rand/v2"
	"slices"
	"testing"

	"gonum.org/v1/gonum/spatial/r3"
)

// TestIndexNearMatchesFullIndex: for queries whose ball lies within the
// margin of one of the points, the partial index must give exactly the
// full index's answers.
func TestIndexNearMatchesFullIndex(t *testing.T) {
	rng := rand.New(rand.NewPCG(3, 4))
	for _, m := range []*Mesh{gridMesh(120, 80, 2.5, 1.5), soupMesh(rng, 5000)} {
		full := NewIndex(m)
		used := make([]bool, m.NumNodes())
		for _, n := range m.Conn {
			used[n] = true
		}
		inElem := func(n int) bool { return used[n] } // the partial index holds no orphan node
		lo, hi := m.Coords[0], m.Coords[0]
		for _, c := range m.Coords {
			lo = r3.Vec{X: min(lo.X, c.X), Y: min(lo.Y, c.Y), Z: min(lo.Z, c.Z)}
			hi = r3.Vec{X: max(hi.X, c.X), Y: max(hi.Y, c.Y), Z: max(hi.Z, c.Z)}
		}
		randPt := func() r3.Vec {
			return r3.Vec{X: lo.X + rng.Float64()*(hi.X-lo.X), Y: lo.Y + rng.Float64()*(hi.Y-lo.Y), Z: lo.Z + rng.Float64()*(hi.Z-lo.Z)}
		}
		pts := make([]r3.Vec, 40)
		for i := range pts {
			pts[i] = randPt()
		}
		const margin = 12.0
		near := NewIndexNear(m, pts, margin, true)
		if near.elems.count(0) >= m.NumElems() {
			t.Errorf("partial index holds every element (%d)", m.NumElems())
		}
		for q := 0; q < 2000; q++ {
			p := pts[rng.IntN(len(pts))]
			r := rng.Float64() * margin
			dir := r3.Unit(r3.Vec{X: rng.NormFloat64(), Y: rng.NormFloat64(), Z: rng.NormFloat64()})
			c := r3.Add(p, r3.Scale(rng.Float64()*(margin-r), dir))
			a, b := full.ProjectNear(c, r, nil), near.ProjectNear(c, r, nil)
			if len(a) != len(b) {
				t.Fatalf("query %d: full %d projections, near %d", q, len(a), len(b))
			}
			for i := range a {
				if a[i].Elem != b[i].Elem || a[i].Dist != b[i].Dist {
					t.Fatalf("query %d: projection %d differs", q, i)
				}
			}
			if ea, eb := full.ElemsNear(c, r, nil), near.ElemsNear(c, r, nil); !slices.Equal(ea, eb) {
				t.Fatalf("query %d: ElemsNear differs: %v vs %v", q, ea, eb)
			}
			if na, nb := full.NodesWithin(c, r, inElem), near.NodesWithin(c, r, nil); !slices.Equal(na, nb) {
				t.Fatalf("query %d: NodesWithin differs", q)
			}
		}
	}
}

func TestIndexNearWithoutNodes(t *testing.T) {
	m := gridMesh(10, 10, 1, 0)
	x := NewIndexNear(m, []r3.Vec{{X: 5, Y: 5}}, 2, false)
	if got := x.NearestNodes(r3.Vec{X: 5, Y: 5}, 3, nil); len(got) != 0 {
		t.Fatalf("node query on an element-only index found %v", got)
	}
	if got := x.ElemsNear(r3.Vec{X: 5, Y: 5}, 0.5, nil); len(got) == 0 {
		t.Fatal("element query found nothing")
	}
}

// nearElements selects exactly the elements whose box comes within the
// margin of a point (brute force over every element and point is the
// reference), with their float32 boxes, whatever the margin: small
// against the elements, large, or so large that the grid coarsens; and
// the tree sortItems makes of them is the one newPackedTree builds over
// the selected elements (the same ids, boxes and unions).
func TestNearElementsExact(t *testing.T) {
	rng := rand.New(rand.NewPCG(5, 6))
	meshes := []*Mesh{gridMesh(60, 40, 2.5, 1.5), soupMesh(rng, 3000)}
	for mi, m := range meshes {
		for _, tc := range []struct {
			name    string
			npts    int
			margin  float64
			npts2   int     // a second set of points (NewIndexNearSets)
			margin2 float64 // with its own margin
		}{
			{"no margin", 30, 0, 0, 0},
			{"below the element size", 30, 0.7, 0, 0},
			{"a few elements", 20, 6, 0, 0},
			{"most of the model", 5, 40, 0, 0},
			{"one point", 1, 3, 0, 0},
			{"two sets, the second reaching farther", 20, 0.7, 3, 6},
			{"two sets, the second empty of reach", 20, 6, 5, 0},
		} {
			random := func(n int) []r3.Vec {
				pts := make([]r3.Vec, n)
				for i := range pts {
					c := m.Coords[rng.IntN(len(m.Coords))]
					pts[i] = r3.Add(c, r3.Vec{X: rng.NormFloat64(), Y: rng.NormFloat64(), Z: rng.NormFloat64()})
				}
				return pts
			}
			sets := []NearPoints{{random(tc.npts), tc.margin}}
			if tc.npts2 > 0 {
				sets = append(sets, NearPoints{random(tc.npts2), tc.margin2})
			}
			sel, tree := nearElements(m, sets...)
			var want []int32
			for e := range m.NumElems() {
				lo, hi := elemBox(m, e)
				if slices.ContainsFunc(sets, func(set NearPoints) bool {
					return slices.ContainsFunc(set.Pts, func(p r3.Vec) bool { return boxDist2(lo, hi, p) <= set.Margin*set.Margin })
				}) {
					want = append(want, int32(e))
				}
			}
			if !slices.Equal(sel, want) {
				t.Errorf("mesh %d, %s: %d elements selected, want %d", mi, tc.name, len(sel), len(want))
				continue
			}
			for i, e := range sel {
				if tree.boxes[i] != box32Of(elemBox(m, int(e))) {
					t.Fatalf("mesh %d, %s: box of element %d differs", mi, tc.name, e)
				}
			}
			tree.sortItems()
			tree.remap(sel)
			ref := newPackedTree(subsetItems{elemItems{m}, sel})
			ref.remap(sel)
			if !slices.Equal(tree.ids, ref.ids) || !slices.Equal(tree.boxes, ref.boxes) || !slices.Equal(tree.level, ref.level) {
				t.Errorf("mesh %d, %s: tree differs from newPackedTree's over the same elements", mi, tc.name)
			}
		}
	}
}

// CandidatesNear holds every element ElemsNear finds, each once.
func TestCandidatesNearHoldsElemsNear(t *testing.T) {
	rng := rand.New(rand.NewPCG(9, 10))
	for _, m := range []*Mesh{gridMesh(50, 30, 2.5, 1.5), soupMesh(rng, 3000)} {
		x := NewIndex(m)
		for range 300 {
			c := m.Coords[rng.IntN(len(m.Coords))]
			p := r3.Add(c, r3.Vec{X: rng.NormFloat64(), Y: rng.NormFloat64(), Z: rng.NormFloat64()})
			r := 10 * rng.Float64()
			cand := slices.Sorted(slices.Values(x.CandidatesNear(p, r, nil)))
			if len(slices.Compact(slices.Clone(cand))) != len(cand) {
				t.Fatalf("p %v, r %g: an element found twice", p, r)
			}
			for _, e := range x.ElemsNear(p, r, nil) {
				if _, ok := slices.BinarySearch(cand, e); !ok {
					t.Fatalf("p %v, r %g: element %d of ElemsNear not a candidate", p, r, e)
				}
			}
		}
	}
}

// BenchmarkPointGrid builds the grid of NewIndexNear for 6,000 points
// spread over 8 m x 6 m, margin 18 mm (the synthetic body's welds).
func BenchmarkPointGrid(b *testing.B) {
	rng := rand.New(rand.NewPCG(3, 4))
	pts := make([]r3.Vec, 6000)
	for i := range pts {
		pts[i] = r3.Vec{X: 8000 * rng.Float64(), Y: 6000 * rng.Float64(), Z: 100 * rng.Float64()}
	}
	defer cpuMetric(b)()
	for b.Loop() {
		newPointGrid(pts, 18)
	}
}
