package geom

import (
	"math"
	"math/rand/v2"
	"testing"

	"gonum.org/v1/gonum/spatial/r3"
)

// freeEdgeDistanceAll is the reference for FreeEdgeDistance: every
// element of the part in near counts the uses of its edges, whatever its
// distance to q.
func freeEdgeDistanceAll(m *Mesh, near []int32, q r3.Vec, pi int32, r float64) float64 {
	uses := map[uint64]int{}
	for _, e := range near {
		if m.ElemPart[e] == pi {
			for k := range m.Type(int(e)).Corners() {
				if ed := m.ElemEdge(int(e), k); ed.A != ed.B { // collapsed edges bound nothing
					uses[edgeKey(ed)]++
				}
			}
		}
	}
	best := math.Inf(1)
	for _, e := range near {
		if m.ElemPart[e] != pi {
			continue
		}
		for k := range m.Type(int(e)).Corners() {
			ed := m.ElemEdge(int(e), k)
			if ed.A != ed.B && uses[edgeKey(ed)] == 1 {
				if d := m.EdgeDistance(ed, q); d <= r && d < best {
					best = d
				}
			}
		}
	}
	return best
}

// FreeEdgeDistance looks only at the elements within r of q: the answer
// must be the one counting every near element's edges, on a grid of four
// parts (their shared rows are free edges of both), on unconnected
// elements of uneven size (every edge free, some collapsed) and with
// radii from below an element to several; with the near elements of
// ElemsNear and with the rough candidates of CandidatesNear.
func TestFreeEdgeDistanceMatchesAllElements(t *testing.T) {
	rng := rand.New(rand.NewPCG(7, 8))
	for _, tc := range []struct {
		name string
		m    *Mesh
	}{
		{"grid of four parts", gridMesh(40, 40, 2.5, 1.5)},
		{"unconnected elements", soupMesh(rng, 2000)},
	} {
		x := NewIndex(tc.m)
		found := 0
		for range 500 {
			q := tc.m.Coords[rng.IntN(len(tc.m.Coords))]
			q = r3.Add(q, r3.Vec{X: 3 * rng.NormFloat64(), Y: 3 * rng.NormFloat64(), Z: rng.NormFloat64()})
			r := 0.5 + 20*rng.Float64()
			near := x.ElemsNear(q, r+5*rng.Float64(), nil)
			for pi := range int32(len(tc.m.Parts)) {
				want := freeEdgeDistanceAll(tc.m, near, q, pi, r)
				got := FreeEdgeDistance(tc.m, near, q, pi, r)
				rough := FreeEdgeDistance(tc.m, x.CandidatesNear(q, r, nil), q, pi, r)
				for _, g := range []float64{got, rough} {
					if g != want && !(math.IsInf(g, 1) && math.IsInf(want, 1)) {
						t.Fatalf("%s: q %v, r %g, part %d: %g (ElemsNear), %g (CandidatesNear), want %g", tc.name, q, r, pi, got, rough, want)
					}
				}
				if !math.IsInf(got, 1) {
					found++
				}
			}
		}
		if found == 0 {
			t.Errorf("%s: no free edge found within reach: the test tests nothing", tc.name)
		}
	}
}

// BenchmarkFreeEdgeDistance measures the edge check of a spot weld: the
// nearest free edge of a part within 12 mm of a point on a grid of
// 2.5 mm elements of four parts, from the elements ElemsNear finds.
func BenchmarkFreeEdgeDistance(b *testing.B) {
	m := gridMesh(200, 200, 2.5, 1.5)
	x := NewIndex(m)
	rng := rand.New(rand.NewPCG(1, 2))
	type query struct {
		q    r3.Vec
		near []int32
		pi   int32
	}
	qs := make([]query, 256)
	for i := range qs {
		q := m.Coords[rng.IntN(len(m.Coords))]
		near := x.ElemsNear(q, 12, nil)
		qs[i] = query{q, near, m.ElemPart[near[0]]}
	}
	i := 0
	defer cpuMetric(b)()
	for b.Loop() {
		q := &qs[i%len(qs)]
		FreeEdgeDistance(m, q.near, q.q, q.pi, 12)
		i++
	}
}
