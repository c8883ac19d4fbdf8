package geom

import (
	"math"
	"testing"
)

func TestFreeEdgeLoops(t *testing.T) {
	cases := []struct {
		name    string
		m       *Mesh
		free    int
		lengths []float64 // loop lengths, outline first
	}{
		// A 2x2 grid of 1 mm quads: 8 boundary edges, one loop of perimeter 8.
		{"plate", quadGrid(2, 2, 1, nil), 8, []float64{8}},
		// A 3x3 grid with the centre element removed: outline 12, hole 4.
		{"plate with hole", quadGrid(3, 3, 1, func(i, j int) bool { return i == 1 && j == 1 }), 16, []float64{12, 4}},
	}
	for _, c := range cases {
		adj := NodeElements(c.m)
		edges := FreeEdges(c.m, adj)
		if len(edges) != c.free {
			t.Errorf("%s: %d free edges, want %d", c.name, len(edges), c.free)
		}
		loops := FreeEdgeLoops(c.m, edges)
		if len(loops) != len(c.lengths) {
			t.Fatalf("%s: %d loops, want %d", c.name, len(loops), len(c.lengths))
		}
		for i, lp := range loops {
			if !lp.Closed {
				t.Errorf("%s: loop %d open", c.name, i)
			}
			if lp.Outline != (i == 0) {
				// Loops come in edge order; the outline's first edge comes first here.
				t.Errorf("%s: loop %d outline=%v", c.name, i, lp.Outline)
			}
			if math.Abs(lp.Length-c.lengths[i]) > 1e-12 || len(lp.Nodes) != int(c.lengths[i]) {
				t.Errorf("%s: loop %d length %g with %d nodes, want %g", c.name, i, lp.Length, len(lp.Nodes), c.lengths[i])
			}
		}
	}
}

func TestEdgeNeighbors(t *testing.T) {
	m := quadGrid(2, 1, 1, nil)
	adj := NodeElements(m)
	// Element 0's edge 1 (nodes 1 -> 4) is shared with element 1.
	if got := EdgeNeighbors(m, adj, 0, 1, nil); len(got) != 1 || got[0] != 1 {
		t.Fatalf("neighbours %v", got)
	}
	if got := EdgeNeighbors(m, adj, 0, 0, nil); len(got) != 0 {
		t.Fatalf("boundary edge neighbours %v", got)
	}
}

func TestIDIndexLayouts(t *testing.T) {
	cases := []struct {
		name string
		ids  []int64
		dup  bool
	}{
		{"contiguous", []int64{5, 6, 7, 8}, false},
		{"table", []int64{9, 3, 4, 10, 1}, false},
		{"sparse", []int64{5_000_001, 12, 3_000_000_000, 7}, false},
		{"sparse increasing", []int64{7, 12, 5_000_001, 3_000_000_000}, false},
		{"sparse increasing duplicate", []int64{7, 12, 12, 3_000_000_000}, true},
		{"table duplicate", []int64{3, 4, 3}, true},
		{"sparse duplicate", []int64{1, 9_000_000, 9_000_000}, true},
	}
	for _, c := range cases {
		x, d, ok := NewIDIndex(c.ids)
		if ok == c.dup {
			t.Errorf("%s: ok=%v", c.name, ok)
			continue
		}
		if c.dup {
			if c.ids[d.First] != d.ID || c.ids[d.Second] != d.ID || d.First == d.Second {
				t.Errorf("%s: bad duplicate report %+v", c.name, d)
			}
			continue
		}
		for i, id := range c.ids {
			if got, ok := x.Lookup(id); !ok || int(got) != i {
				t.Errorf("%s: Lookup(%d) = %d,%v want %d", c.name, id, got, ok, i)
			}
		}
		for _, absent := range []int64{0, -1, 2, 11, 4_000_000_000} {
			if _, ok := x.Lookup(absent); ok && !contains(c.ids, absent) {
				t.Errorf("%s: found absent id %d", c.name, absent)
			}
		}
	}
}

func contains(ids []int64, id int64) bool {
	for _, v := range ids {
		if v == id {
			return true
		}
	}
	return false
}

func TestSeparatePiecesAreOutlines(t *testing.T) {
	// Two 1x1 pieces of one part with a gap between them: two outlines.
	m := quadGrid(3, 1, 1, func(i, j int) bool { return i == 1 })
	loops := FreeEdgeLoops(m, FreeEdges(m, NodeElements(m)))
	if len(loops) != 2 || !loops[0].Outline || !loops[1].Outline {
		t.Fatalf("loops %+v", loops)
	}
}
