package geom

import (
	"cmp"
	"math"
	"math/rand/v2"
	"slices"
	"testing"

	"gonum.org/v1/gonum/spatial/r3"
)

// bruteClosestPerPart projects p onto every element and keeps, per part,
// the lowest element id among those within TieDistance of the part's
// nearest.
func bruteClosestPerPart(m *Mesh, p r3.Vec, r float64) []Projection {
	all := map[int32][]Projection{}
	for e := range m.NumElems() {
		if pr := m.Project(e, p); pr.Dist <= r {
			all[m.ElemPart[e]] = append(all[m.ElemPart[e]], pr)
		}
	}
	var out []Projection
	for _, prs := range all {
		dmin := math.Inf(1)
		for _, pr := range prs {
			dmin = math.Min(dmin, pr.Dist)
		}
		var chosen *Projection
		for i, pr := range prs {
			if pr.Dist <= dmin+TieDistance && (chosen == nil || m.ElemIDs[pr.Elem] < m.ElemIDs[chosen.Elem]) {
				chosen = &prs[i]
			}
		}
		out = append(out, *chosen)
	}
	slices.SortFunc(out, func(a, b Projection) int {
		return cmp.Or(cmp.Compare(a.Dist, b.Dist), cmp.Compare(m.Parts[m.ElemPart[a.Elem]].ID, m.Parts[m.ElemPart[b.Elem]].ID))
	})
	return out
}

func TestIndexClosestPerPart(t *testing.T) {
	rng := rand.New(rand.NewPCG(11, 12))
	for _, tm := range testMeshes() {
		x := NewIndex(tm.m)
		for i := range numQueries() {
			p := queryPoint(rng, tm.m, tm.r)
			r := tm.r * rng.Float64()
			got := x.ClosestPerPart(p, r)
			want := bruteClosestPerPart(tm.m, p, r)
			if !slices.Equal(got, want) {
				t.Fatalf("%s query %d: ClosestPerPart(%v, %g) = %+v\nbrute force %+v", tm.name, i, p, r, got, want)
			}
		}
	}
}

// shuffled returns m with its elements in the order perm (new element i
// is old element perm[i]); nodes, ids and parts are kept.
func shuffled(m *Mesh, perm []int) *Mesh {
	s := &Mesh{Parts: m.Parts, NodeIDs: m.NodeIDs, Coords: m.Coords, ElemStart: []int32{0}}
	for _, e := range perm {
		s.Conn = append(s.Conn, m.ElemNodes(e)...)
		s.ElemStart = append(s.ElemStart, int32(len(s.Conn)))
		s.ElemIDs = append(s.ElemIDs, m.ElemIDs[e])
		s.ElemPart = append(s.ElemPart, m.ElemPart[e])
	}
	return s
}

func TestIndexClosestPerPartTies(t *testing.T) {
	// A flat 4 x 4 grid of unit quads, part 1 in the lower half, part 2
	// in the upper: points above a node or an edge that elements share
	// are at the same distance from each; the host is the lowest element
	// id, whatever the order of the elements.
	m := gridMesh(4, 4, 1, 0)
	for e := range m.ElemPart {
		m.ElemPart[e] = int32(m.Centroid(e).Y / 2)
	}
	m.Parts = m.Parts[:2]
	// Element ids in an order unrelated to the grid's: 1000 - 7e mod 16.
	for e := range m.ElemIDs {
		m.ElemIDs[e] = int64(1000 - (7*e)%16)
	}
	// lowest returns the lowest id among the elements of part pi that
	// touch the point (x, y).
	lowest := func(m *Mesh, pi int32, x, y float64) int64 {
		id := int64(math.MaxInt64)
		for e := range m.NumElems() {
			b := m.ElemBox(e)
			if m.ElemPart[e] == pi && b.Min.X <= x && x <= b.Max.X && b.Min.Y <= y && y <= b.Max.Y {
				id = min(id, m.ElemIDs[e])
			}
		}
		return id
	}
	rng := rand.New(rand.NewPCG(3, 3))
	points := []r3.Vec{v3(1, 1, 0.5), v3(2, 1, 0.5), v3(1.5, 1, 0.25), v3(3, 3, 0), v3(2, 2, 1), v3(1, 2.5, 0.5)}
	for trial := range 20 {
		perm := rng.Perm(m.NumElems())
		if trial == 0 {
			perm = perm[:0]
			for e := range m.NumElems() {
				perm = append(perm, e)
			}
		}
		s := shuffled(m, perm)
		x := NewIndex(s)
		for _, p := range points {
			got := x.ClosestPerPart(p, 2)
			if len(got) == 0 {
				t.Fatalf("%v: nothing found", p)
			}
			for _, pr := range got {
				pi := s.ElemPart[pr.Elem]
				if want := lowest(s, pi, p.X, p.Y); s.ElemIDs[pr.Elem] != want && math.Abs(pr.Dist-math.Abs(p.Z)) < 1e-12 {
					t.Errorf("trial %d, %v, part %d: host %d, want %d", trial, p, s.Parts[pi].ID, s.ElemIDs[pr.Elem], want)
				}
			}
		}
	}
}

func TestIndexClosestPerPartEdgeCases(t *testing.T) {
	m := gridMesh(3, 3, 1, 0)
	x := NewIndex(m)
	for _, tc := range []struct {
		p r3.Vec
		r float64
	}{
		{v3(1, 1, 0), -1}, {v3(1, 1, 0), math.NaN()}, {v3(math.NaN(), 1, 0), 1}, {v3(1, 1, 50), 10},
	} {
		if got := x.ClosestPerPart(tc.p, tc.r); got != nil {
			t.Errorf("ClosestPerPart(%v, %g) = %v, want nil", tc.p, tc.r, got)
		}
	}
	empty := NewIndex(&Mesh{ElemStart: []int32{0}})
	if got := empty.ClosestPerPart(v3(0, 0, 0), 1); got != nil {
		t.Errorf("empty mesh: %v", got)
	}
	// r = 0 finds the elements the point lies on.
	if got := x.ClosestPerPart(v3(0.5, 0.5, 0), 0); len(got) != 1 || got[0].Dist != 0 || got[0].Elem != 0 {
		t.Errorf("on the surface: %+v", got)
	}
}
