package geom

import (
	"errors"
	"strings"
	"testing"
)

func fileMesh(name string, nx int) *Mesh {
	m := quadGrid(nx, 1, 1, nil)
	m.Sources = []Source{{File: name}}
	return m
}

func TestMergeDuplicateNamesBothFiles(t *testing.T) {
	_, _, err := Merge([]*Mesh{fileMesh("floor.vtk", 2), fileMesh("beam.vtk", 2)}, false)
	if err == nil {
		t.Fatal("no error for duplicate ids")
	}
	if !errors.Is(err, ErrInput) || !strings.Contains(err.Error(), "floor.vtk") || !strings.Contains(err.Error(), "beam.vtk") {
		t.Fatalf("error %q should name both files and be an input error", err)
	}
}

func TestMergeRenumber(t *testing.T) {
	m, shifts, err := Merge([]*Mesh{fileMesh("a.vtk", 20), fileMesh("b.vtk", 2), fileMesh("c.vtk", 1)}, true)
	if err != nil {
		t.Fatal(err)
	}
	// a has nodes 1..42 and elements 1..20; b's ids overlap them, so b is
	// shifted by the round offsets 50 (nodes) and 20 (elements); c's ids
	// 1..4 overlap too, so c goes above the new maxima: 56 -> 60, 22 -> 30.
	want := []Renumbering{{"b.vtk", 50, 20}, {"c.vtk", 60, 30}}
	if len(shifts) != len(want) {
		t.Fatalf("shifts %+v", shifts)
	}
	for i := range want {
		if shifts[i] != want[i] {
			t.Errorf("shift %d = %+v, want %+v", i, shifts[i], want[i])
		}
	}
	if m.NumElems() != 23 || m.NumNodes() != 42+6+4 {
		t.Fatalf("merged %d elements %d nodes", m.NumElems(), m.NumNodes())
	}
	if _, ok := m.NodeIndex(51); !ok {
		t.Error("node 51 (b's node 1) missing")
	}
}

func TestRoundOffset(t *testing.T) {
	for _, c := range []struct{ hi, want int64 }{{1, 1}, {7, 7}, {10, 10}, {42, 50}, {999, 1000}, {48213, 50000}, {1_000_001, 2_000_000}} {
		if got := roundOffset(c.hi); got != c.want {
			t.Errorf("roundOffset(%d) = %d, want %d", c.hi, got, c.want)
		}
	}
}
