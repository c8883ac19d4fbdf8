package geom

import (
	"errors"
	"strings"
	"testing"

	"gonum.org/v1/gonum/spatial/r3"
)

// TestMergeImplicitIDs checks the message for ids that clash because
// the files number their nodes and elements themselves.
func TestMergeImplicitIDs(t *testing.T) {
	read := func(name string, ids bool) *Mesh {
		cs := &CellSet{File: name, Points: []r3.Vec{{}, {X: 1}, {Y: 1}}, Types: []uint8{VTKTriangle},
			Offsets: []int64{0, 3}, Conn: []int64{0, 1, 2}, Part: []int64{1}}
		if ids {
			cs.NodeIDs, cs.ElemIDs = []int64{1, 5, 6}, []int64{9}
		}
		m, err := MeshFromCells(cs, ReadOptions{})
		if err != nil {
			t.Fatal(err)
		}
		return m
	}
	for _, tc := range []struct {
		a, b bool
		want string
	}{
		{false, false, "node id 1 appears twice (floor.vtk and beam.vtk): neither file has a node_id array, so both number their nodes 1, 2, 3, ...; --renumber shifts the ids of the later file"},
		{true, false, "node id 1 appears twice (floor.vtk and beam.vtk): beam.vtk has no node_id array and numbers its nodes 1, 2, 3, ...; --renumber shifts the ids of the later file"},
		{true, true, "node id 1 appears twice (floor.vtk and beam.vtk)"},
	} {
		_, _, err := Merge([]*Mesh{read("floor.vtk", tc.a), read("beam.vtk", tc.b)}, false)
		if !errors.Is(err, ErrInput) || !strings.HasSuffix(err.Error(), tc.want) {
			t.Errorf("ids %v %v: err = %v\nwant suffix %s", tc.a, tc.b, err, tc.want)
		}
	}
	// Element ids: the nodes do not clash.
	a, b := read("floor.vtk", false), read("beam.vtk", false)
	for i := range b.NodeIDs {
		b.NodeIDs[i] += 100
	}
	if err := b.Index(); err != nil {
		t.Fatal(err)
	}
	_, _, err := Merge([]*Mesh{a, b}, false)
	if want := "element id 1 appears twice (floor.vtk and beam.vtk): neither file has an element_id array"; err == nil || !strings.Contains(err.Error(), want) {
		t.Errorf("err = %v", err)
	}
}
