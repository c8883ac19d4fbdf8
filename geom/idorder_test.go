package geom

import (
	"math"
	"math/rand/v2"
	"slices"
	"testing"

	"gonum.org/v1/gonum/spatial/r3"
)

// TestSortByID: nodes and elements come out in id order within each
// source file's range, every element keeping its nodes (by id), part and
// thickness; a mesh already in order is left as it is.
func TestSortByID(t *testing.T) {
	nan := math.NaN()
	m := &Mesh{
		Parts:   []Part{{ID: 1, Thickness: 1}, {ID: 2, Thickness: 2}},
		NodeIDs: []int64{30, 10, 20, 40, 5, 7},
		Coords:  []r3.Vec{{X: 3}, {X: 1}, {X: 2}, {X: 4}, {X: 0.5}, {X: 0.7}},
		// file a: nodes 0-3, elements 0-1; file b: nodes 4-5, element 2
		ElemIDs:       []int64{200, 100, 50},
		ElemPart:      []int32{0, 1, 1},
		ElemStart:     []int32{0, 3, 6, 9},
		Conn:          []int32{0, 1, 2, 1, 2, 3, 4, 5, 3},
		ElemThickness: []float64{nan, 2.5, nan},
		Sources:       []Source{{File: "a", NodeStart: 0, ElemStart: 0}, {File: "b", NodeStart: 4, ElemStart: 2}},
	}
	if err := m.Index(); err != nil {
		t.Fatal(err)
	}
	type elem struct {
		id    int64
		part  int32
		t     float64
		nodes []int64
	}
	elems := func() map[int64]elem {
		out := map[int64]elem{}
		for e := range m.NumElems() {
			var ns []int64
			for _, n := range m.ElemNodes(e) {
				ns = append(ns, m.NodeIDs[n])
			}
			out[m.ElemIDs[e]] = elem{m.ElemIDs[e], m.ElemPart[e], m.Thickness(e), ns}
		}
		return out
	}
	before := elems()
	moved, err := m.SortByID()
	if err != nil || !moved {
		t.Fatalf("SortByID = %v, %v; want true, nil", moved, err)
	}
	if want := []int64{10, 20, 30, 40, 5, 7}; !slices.Equal(m.NodeIDs, want) {
		t.Errorf("node ids %v, want %v (each file's range sorted on its own)", m.NodeIDs, want)
	}
	for i, id := range m.NodeIDs {
		want := map[int64]float64{10: 1, 20: 2, 30: 3, 40: 4, 5: 0.5, 7: 0.7}[id]
		if m.Coords[i].X != want {
			t.Errorf("node %d at x %g, want %g", id, m.Coords[i].X, want)
		}
	}
	if want := []int64{100, 200, 50}; !slices.Equal(m.ElemIDs, want) {
		t.Errorf("element ids %v, want %v", m.ElemIDs, want)
	}
	after := elems()
	for id, b := range before {
		a := after[id]
		if a.part != b.part || a.t != b.t || !slices.Equal(a.nodes, b.nodes) {
			t.Errorf("element %d: %+v after, %+v before", id, a, b)
		}
	}
	if e, ok := m.ElemIndex(100); !ok || e != 0 {
		t.Errorf("ElemIndex(100) = %d, %v; want 0, true (lookups rebuilt)", e, ok)
	}
	if moved, err := m.SortByID(); moved || err != nil {
		t.Errorf("second SortByID = %v, %v; want false, nil", moved, err)
	}
}

// TestIDOrder: the permutation sorts ids of any sign and size, keeps
// equal ids in their order (stable) and leaves sorted ids alone.
func TestIDOrder(t *testing.T) {
	whole := func(n int) func(fn func(from, to int)) {
		return func(fn func(from, to int)) { fn(0, n) }
	}
	for _, c := range []struct {
		name string
		ids  []int64
		want []int32 // nil: already in order
	}{
		{"sorted", []int64{-3, 0, 7}, nil},
		{"extremes", []int64{math.MaxInt64, math.MinInt64, 0, -5}, []int32{1, 3, 2, 0}},
		{"stable", []int64{9, 4, 9, 4}, []int32{1, 3, 0, 2}},
		{"reversed", []int64{5, 4, 3, 2, 1}, []int32{4, 3, 2, 1, 0}},
	} {
		got := idOrder(c.ids, whole(len(c.ids)))
		if !slices.Equal(got, c.want) {
			t.Errorf("%s: order %v, want %v", c.name, got, c.want)
		}
	}
}

// BenchmarkSortByID measures putting a 2,000,000-quad mesh whose node
// and element lines were shuffled back in id order, beside the pass
// that finds a mesh already in order (the usual case). Skipped with
// -short.
func BenchmarkSortByID(b *testing.B) {
	if testing.Short() {
		b.Skip("2,000,000 elements")
	}
	sorted := gridMesh(2000, 1000, 1, 0)
	b.Run("in-order", func(b *testing.B) {
		for b.Loop() {
			if moved, err := sorted.SortByID(); moved || err != nil {
				b.Fatal(moved, err)
			}
		}
	})
	b.Run("shuffled", func(b *testing.B) {
		rng := rand.New(rand.NewPCG(1, 2))
		for b.Loop() {
			b.StopTimer()
			m := *sorted
			m.NodeIDs, m.ElemIDs = slices.Clone(sorted.NodeIDs), slices.Clone(sorted.ElemIDs)
			rng.Shuffle(len(m.NodeIDs), func(i, j int) { m.NodeIDs[i], m.NodeIDs[j] = m.NodeIDs[j], m.NodeIDs[i] })
			rng.Shuffle(len(m.ElemIDs), func(i, j int) { m.ElemIDs[i], m.ElemIDs[j] = m.ElemIDs[j], m.ElemIDs[i] })
			m.Conn = slices.Clone(sorted.Conn)
			b.StartTimer()
			if moved, err := m.SortByID(); !moved || err != nil {
				b.Fatal(moved, err)
			}
		}
	})
}

// TestSortByIDParts: parts listed out of id order (as a file's records
// gave them) come out in id order, every element keeping its part.
func TestSortByIDParts(t *testing.T) {
	m := &Mesh{
		Parts:     []Part{{ID: 30, Thickness: 3}, {ID: 10, Thickness: 1}, {ID: 20, Thickness: 2}},
		NodeIDs:   []int64{1, 2, 3},
		Coords:    []r3.Vec{{}, {X: 1}, {Y: 1}},
		ElemIDs:   []int64{1, 2, 3},
		ElemPart:  []int32{0, 1, 2},
		ElemStart: []int32{0, 3, 6, 9},
		Conn:      []int32{0, 1, 2, 0, 1, 2, 0, 1, 2},
	}
	if err := m.Index(); err != nil {
		t.Fatal(err)
	}
	moved, err := m.SortByID()
	if err != nil || !moved {
		t.Fatalf("SortByID = %v, %v; want true, nil", moved, err)
	}
	var ids []int64
	for _, p := range m.Parts {
		ids = append(ids, p.ID)
	}
	if want := []int64{10, 20, 30}; !slices.Equal(ids, want) {
		t.Errorf("parts %v, want %v", ids, want)
	}
	for e, want := range map[int]int64{0: 30, 1: 10, 2: 20} {
		if got := m.Part(e).ID; got != want || m.Thickness(e) != float64(want/10) {
			t.Errorf("element %d on part %d (t %g), want %d", m.ElemIDs[e], got, m.Thickness(e), want)
		}
		if pi, _ := m.PartIndex(m.Part(e).ID); int(pi) != int(m.ElemPart[e]) {
			t.Errorf("PartIndex(%d) = %d, element says %d", m.Part(e).ID, pi, m.ElemPart[e])
		}
	}
	if moved, _ := m.SortByID(); moved {
		t.Error("a mesh in order moved again")
	}
}
