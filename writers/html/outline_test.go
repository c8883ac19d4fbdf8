package html

import (
	"cmp"
	"math"
	"math/rand/v2"
	"slices"
	"testing"

	"gonum.org/v1/gonum/spatial/r3"

	"github.com/joinery-cae/joinery/geom"
	"github.com/joinery-cae/joinery/geom/geomtest"
	"github.com/joinery-cae/joinery/joints/synth"
)

// edgeKey is a free edge as a set: part index and its two nodes, lower
// first.
type edgeKey struct{ part, a, b int32 }

// outlineMeshes are meshes to check the outline against geom.FreeEdges:
// the shared small fixture, two parts meeting along a row of shared nodes
// (free edges of both), a grid with a hole and a collapsed quad, three
// quads on one edge (a T-junction: not free), a fan of 40 triangles
// around one node (the sorted-bucket path), and a synthetic body.
func outlineMeshes(t *testing.T) map[string]*geom.Mesh {
	t.Helper()
	ms := map[string]*geom.Mesh{"small": geomtest.Small("small.vtk")}
	ms["two parts"] = geomtest.Grid(geomtest.GridSpec{NX: 6, NY: 4, Parts: []geom.Part{{ID: 1}, {ID: 2}},
		Part: func(i, j int) int32 { return int32(i / 3) }})
	holed := geomtest.Grid(geomtest.GridSpec{NX: 8, NY: 8})
	// Drop the quad at (4, 4) to make a hole, and collapse quad (1, 1).
	keep := &geom.Mesh{Parts: holed.Parts, NodeIDs: holed.NodeIDs, Coords: holed.Coords, ElemStart: []int32{0}}
	for e := range holed.ElemIDs {
		if e == 4*8+4 {
			continue
		}
		nodes := slices.Clone(holed.ElemNodes(e))
		if e == 1*8+1 {
			nodes[2] = nodes[1]
		}
		keep.ElemIDs = append(keep.ElemIDs, holed.ElemIDs[e])
		keep.ElemPart = append(keep.ElemPart, 0)
		keep.Conn = append(keep.Conn, nodes...)
		keep.ElemStart = append(keep.ElemStart, int32(len(keep.Conn)))
	}
	ms["hole and collapsed quad"] = keep
	ms["T-junction"] = &geom.Mesh{
		Parts:     []geom.Part{{ID: 1}},
		NodeIDs:   []int64{1, 2, 3, 4, 5, 6, 7, 8},
		Coords:    []r3.Vec{{}, {X: 1}, {X: 1, Y: 1}, {Y: 1}, {X: 1, Y: -1}, {Y: -1}, {X: 1, Z: 1}, {Z: 1}},
		ElemIDs:   []int64{1, 2, 3},
		ElemPart:  []int32{0, 0, 0},
		ElemStart: []int32{0, 4, 8, 12},
		Conn:      []int32{0, 1, 2, 3, 1, 0, 5, 4, 0, 1, 6, 7},
	}
	fan := &geom.Mesh{Parts: []geom.Part{{ID: 1}}, ElemStart: []int32{0}}
	const n = 40
	fan.NodeIDs = append(fan.NodeIDs, 1)
	fan.Coords = append(fan.Coords, r3.Vec{})
	for k := range n {
		a := 2 * math.Pi * float64(k) / n
		fan.NodeIDs = append(fan.NodeIDs, int64(k+2))
		fan.Coords = append(fan.Coords, r3.Vec{X: math.Cos(a), Y: math.Sin(a)})
		fan.ElemIDs = append(fan.ElemIDs, int64(k+1))
		fan.ElemPart = append(fan.ElemPart, 0)
		fan.Conn = append(fan.Conn, 0, int32(k+1), int32((k+1)%n+1))
		fan.ElemStart = append(fan.ElemStart, int32(len(fan.Conn)))
	}
	ms["fan"] = fan
	md, err := synth.Generate(synth.Config{Elements: 30_000, Welds: 40, Seed: 3})
	if err != nil {
		t.Fatal(err)
	}
	ms["synthetic"] = md.Mesh
	return ms
}

// TestOutlineMatchesFreeEdges checks the outline's free edges against
// geom.FreeEdges, the baseline built on a node-to-element table: the
// chains must hold every free edge exactly once and nothing else.
func TestOutlineMatchesFreeEdges(t *testing.T) {
	for name, m := range outlineMeshes(t) {
		t.Run(name, func(t *testing.T) {
			var want []edgeKey
			for _, e := range geom.FreeEdges(m, geom.NodeElements(m)) {
				want = append(want, edgeKey{m.ElemPart[e.Elem], min(e.A, e.B), max(e.A, e.B)})
			}
			var got []edgeKey
			for pi, chains := range partChains(m) {
				for _, c := range chains {
					for k := 0; k+1 < len(c); k++ {
						got = append(got, edgeKey{int32(pi), min(c[k], c[k+1]), max(c[k], c[k+1])})
					}
				}
			}
			order := func(x, y edgeKey) int {
				return cmp.Or(cmp.Compare(x.part, y.part), cmp.Compare(x.a, y.a), cmp.Compare(x.b, y.b))
			}
			slices.SortFunc(want, order)
			slices.SortFunc(got, order)
			if !slices.Equal(got, want) {
				t.Fatalf("%d chained edges, %d free edges\n got %v\nwant %v", len(got), len(want), head(got), head(want))
			}
			if len(want) == 0 {
				t.Fatal("no free edges: the case tests nothing")
			}
		})
	}
}

func head(s []edgeKey) []edgeKey { return s[:min(len(s), 12)] }

// TestOutlineChains checks the chains of simple shapes: a grid's border
// is one closed chain, a grid with a hole has two, parts and chains come
// in a fixed order.
func TestOutlineChains(t *testing.T) {
	g := geomtest.Grid(geomtest.GridSpec{NX: 3, NY: 2})
	o := NewOutline(g)
	if len(o.Parts) != 1 || len(o.Parts[0].Chains) != 1 {
		t.Fatalf("%d parts, chains %v", len(o.Parts), o.Parts)
	}
	c := o.Parts[0].Chains[0]
	// The border of a 3 by 2 grid simplifies to its four corners, closed.
	if len(c) != 5 || c[0] != c[len(c)-1] {
		t.Fatalf("chain %v, want the 4 corners and the first again", c)
	}
	corners := map[r3.Vec]bool{{}: true, {X: 3}: true, {X: 3, Y: 2}: true, {Y: 2}: true}
	for _, p := range c {
		if !corners[p] {
			t.Errorf("point %v is not a corner", p)
		}
	}
	ms := outlineMeshes(t)
	// The border, the hole, and the gap the collapsed quad leaves: it is
	// a triangle now, whose diagonal and the two edges it gave up bound
	// nothing else.
	if n := len(NewOutline(ms["hole and collapsed quad"]).Parts[0].Chains); n != 3 {
		t.Errorf("grid with a hole and a collapsed quad: %d chains, want 3", n)
	}
	a, b := NewOutline(ms["synthetic"]), NewOutline(ms["synthetic"])
	if !slices.EqualFunc(a.Parts, b.Parts, func(x, y PartOutline) bool {
		return x.ID == y.ID && slices.EqualFunc(x.Chains, y.Chains, func(p, q Chain) bool { return slices.Equal(p, q) })
	}) {
		t.Error("two outlines of one mesh differ")
	}
	if !slices.IsSortedFunc(a.Parts, func(x, y PartOutline) int { return cmp.Compare(x.ID, y.ID) }) {
		t.Error("parts not sorted by id")
	}
}

// TestOutlineFileOrder checks that the outline depends on the mesh's
// ids only: the same meshes with their elements, their nodes and their
// parts in other orders (every element keeping its id, part and nodes,
// a few seeds) give the same chains, point for point.
func TestOutlineFileOrder(t *testing.T) {
	for name, m := range outlineMeshes(t) {
		t.Run(name, func(t *testing.T) {
			want := NewOutline(m)
			for seed := range uint64(4) {
				rng := rand.New(rand.NewPCG(seed, 7))
				got := NewOutline(shuffleMesh(rng, m))
				if !slices.EqualFunc(got.Parts, want.Parts, func(x, y PartOutline) bool {
					return x.ID == y.ID && slices.EqualFunc(x.Chains, y.Chains, func(p, q Chain) bool { return slices.Equal(p, q) })
				}) {
					t.Fatalf("seed %d: the outline of the shuffled mesh differs", seed)
				}
			}
		})
	}
}

// shuffleMesh returns m with its elements, nodes and parts in random
// order; every element keeps its id, part, thickness and nodes (by id).
func shuffleMesh(rng *rand.Rand, m *geom.Mesh) *geom.Mesh {
	np, nn, ne := len(m.Parts), len(m.NodeIDs), len(m.ElemIDs)
	pp, nperm, eperm := rng.Perm(np), rng.Perm(nn), rng.Perm(ne)
	out := &geom.Mesh{Parts: make([]geom.Part, np), NodeIDs: make([]int64, nn), Coords: make([]r3.Vec, nn), ElemStart: []int32{0}}
	partAt, nodeAt := make([]int32, np), make([]int32, nn) // old index -> new
	for k, i := range pp {
		out.Parts[k], partAt[i] = m.Parts[i], int32(k)
	}
	for k, i := range nperm {
		out.NodeIDs[k], out.Coords[k], nodeAt[i] = m.NodeIDs[i], m.Coords[i], int32(k)
	}
	for _, e := range eperm {
		out.ElemIDs = append(out.ElemIDs, m.ElemIDs[e])
		out.ElemPart = append(out.ElemPart, partAt[m.ElemPart[e]])
		for _, n := range m.ElemNodes(e) {
			out.Conn = append(out.Conn, nodeAt[n])
		}
		out.ElemStart = append(out.ElemStart, int32(len(out.Conn)))
		if m.ElemThickness != nil {
			out.ElemThickness = append(out.ElemThickness, m.ElemThickness[e])
		}
	}
	return out
}

// TestSimplify3 checks the 3-D Douglas-Peucker simplification against
// its definition on random polylines (seeded): ends kept, points kept in
// order, every dropped point within the tolerance of the segment that
// replaces it; and a straight run collapses to its ends.
func TestSimplify3(t *testing.T) {
	rng := rand.New(rand.NewPCG(1, 2))
	for trial := range 200 {
		n := 2 + rng.IntN(60)
		c := make(Chain, n)
		p := r3.Vec{}
		for i := range c {
			p = r3.Add(p, r3.Vec{X: 1, Y: rng.NormFloat64() * 0.05, Z: rng.NormFloat64() * 0.05})
			c[i] = p
		}
		orig := slices.Clone(c)
		tol := 0.02 + rng.Float64()*0.1
		s := simplify3(c, tol)
		if s[0] != orig[0] || s[len(s)-1] != orig[n-1] {
			t.Fatalf("trial %d: ends not kept", trial)
		}
		// The kept points, by their index in the original.
		var kept []int
		for i, q := range orig {
			if len(kept) < len(s) && q == s[len(kept)] {
				kept = append(kept, i)
			}
		}
		if len(kept) != len(s) {
			t.Fatalf("trial %d: simplified points are not a subsequence of the original", trial)
		}
		for k := 0; k+1 < len(kept); k++ {
			for i := kept[k] + 1; i < kept[k+1]; i++ {
				if d := geom.SegmentDistance(orig[i], orig[kept[k]], orig[kept[k+1]]); d > tol {
					t.Fatalf("trial %d: point %d lies %g from its segment, tolerance %g", trial, i, d, tol)
				}
			}
		}
	}
	line := Chain{{}, {X: 1}, {X: 2}, {X: 3.5}, {X: 7}}
	if s := simplify3(line, 1e-9); len(s) != 2 {
		t.Errorf("straight line simplified to %v", s)
	}
}

// BenchmarkOutline measures NewOutline against the baseline it replaces
// for pictures, geom.FreeEdges and geom.FreeEdgeLoops with their
// node-to-element table, on the 2,000,000-element synthetic body.
func BenchmarkOutline(b *testing.B) {
	if testing.Short() {
		b.Skip("2,000,000 elements")
	}
	md, err := synth.Generate(synth.Config{Elements: 2_000_000, Welds: 6000, Seed: 1})
	if err != nil {
		b.Fatal(err)
	}
	b.Run("NewOutline", func(b *testing.B) {
		for b.Loop() {
			NewOutline(md.Mesh)
		}
	})
	b.Run("FreeEdgeLoops", func(b *testing.B) {
		for b.Loop() {
			geom.FreeEdgeLoops(md.Mesh, geom.FreeEdges(md.Mesh, geom.NodeElements(md.Mesh)))
		}
	})
}
