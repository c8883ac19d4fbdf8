package geom

import (
	"errors"
	"math"
	"strings"
	"testing"

	"gonum.org/v1/gonum/spatial/r3"
)

// TestMeshFromCellsErrors checks that value errors are placed with
// CellSet.Locate when it knows the place (a line, else a byte offset) and
// at the record otherwise.
func TestMeshFromCellsErrors(t *testing.T) {
	// lines places value i of array a at line 100*(a+1)+i.
	lines := func(a CellArray, i int) (int, int64) { return 100*(int(a)+1) + i, -1 }
	bytesAt := func(a CellArray, i int) (int, int64) { return 0, int64(1000*(int(a)+1) + 4*i) }
	unknown := func(CellArray, int) (int, int64) { return 0, -1 }
	// base is two triangles and a quad, after a skipped vertex cell.
	base := func() *CellSet {
		return &CellSet{
			File:      "m.vtk",
			Points:    []r3.Vec{{}, {X: 1}, {X: 1, Y: 1}, {Y: 1}, {X: 2}},
			Types:     []uint8{1, VTKTriangle, VTKTriangle, VTKQuad},
			Offsets:   []int64{0, 1, 4, 7, 11},
			Conn:      []int64{0, 0, 1, 2, 0, 2, 3, 1, 4, 2, 2},
			NodeIDs:   []int64{1, 2, 3, 4, 5},
			ElemIDs:   []int64{10, 11, 12, 13},
			Part:      []int64{1, 1, 1, 2},
			Thickness: []float64{1, 1, 1, 1},
		}
	}
	tests := []struct {
		name   string
		edit   func(cs *CellSet)
		locate func(CellArray, int) (int, int64)
		want   string
	}{
		{"part by line", func(cs *CellSet) { cs.Part[2] = 0 }, lines, "m.vtk:702: cell 2: part id 0 is not positive"},
		{"part by byte", func(cs *CellSet) { cs.Part[2] = 0 }, bytesAt, "m.vtk: byte 7008: cell 2: part id 0 is not positive"},
		{"part by record", func(cs *CellSet) { cs.Part[2] = 0 }, nil, "m.vtk: record 2: cell 2: part id 0 is not positive"},
		{"part, place unknown", func(cs *CellSet) { cs.Part[2] = 0 }, unknown, "m.vtk: record 2: cell 2: part id 0 is not positive"},
		{"thickness NaN", func(cs *CellSet) { cs.Thickness[3] = math.NaN() }, lines, "m.vtk:803: cell 3: thickness NaN is not a positive number"},
		{"thickness infinite", func(cs *CellSet) { cs.Thickness[1] = math.Inf(1) }, lines, "m.vtk:801: cell 1: thickness +Inf is not a positive number"},
		{"element id", func(cs *CellSet) { cs.ElemIDs[3] = -1 }, lines, "m.vtk:603: cell 3: element id -1 is not positive"},
		{"node id", func(cs *CellSet) { cs.NodeIDs[4] = 0 }, lines, "m.vtk:504: point 4: node id 0 is not positive"},
		{"coordinate", func(cs *CellSet) { cs.Points[3].Z = math.NaN() }, lines, "m.vtk:103: point 3 has a non-finite coordinate (0, 1, NaN)"},
		{"missing point", func(cs *CellSet) { cs.Conn[8] = 5 }, lines, "m.vtk:208: cell 3 references point 5; the file has 5 points"},
		{"missing point by record", func(cs *CellSet) { cs.Conn[8] = 5 }, nil, "m.vtk: record 3: cell 3 references point 5"},
		{"type size", func(cs *CellSet) { cs.Types[2] = VTKQuad }, lines, "m.vtk:402: cell 2: type 9 (quad) needs 4 points, has 3"},
		{"offsets", func(cs *CellSet) { cs.Offsets[4] = 12 }, lines, "m.vtk:303: cell 3: offsets 7..12 outside the 11 connectivity entries"},
		{"duplicate node id", func(cs *CellSet) { cs.NodeIDs[3] = 2 }, lines, "m.vtk:503: node id 2 appears twice (points 1 and 3; first at line 501)"},
		{"duplicate node id by byte", func(cs *CellSet) { cs.NodeIDs[3] = 2 }, bytesAt, "m.vtk: byte 5012: node id 2 appears twice (points 1 and 3; first at byte 5004)"},
		{"duplicate node id by record", func(cs *CellSet) { cs.NodeIDs[3] = 2 }, nil, "m.vtk: record 3: node id 2 appears twice (points 1 and 3)"},
		// Cell 0 is skipped: cells 1 and 3 are elements 0 and 2.
		{"duplicate element id", func(cs *CellSet) { cs.ElemIDs[3] = 11 }, lines, "m.vtk:603: element id 11 appears twice (cells 1 and 3; first at line 601)"},
		{"duplicate element id by record", func(cs *CellSet) { cs.ElemIDs[3] = 11 }, nil, "m.vtk: record 3: element id 11 appears twice (cells 1 and 3)"},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			cs := base()
			if _, err := MeshFromCells(cs, ReadOptions{}); err != nil {
				t.Fatalf("unedited set: %v", err)
			}
			tc.edit(cs)
			cs.Locate = tc.locate
			_, err := MeshFromCells(cs, ReadOptions{})
			if err == nil {
				t.Fatalf("no error; want %q", tc.want)
			}
			if !errors.Is(err, ErrInput) {
				t.Errorf("%v: not an input error", err)
			}
			if !strings.Contains(err.Error(), tc.want) {
				t.Errorf("error %q\n  does not contain %q", err, tc.want)
			}
		})
	}
}
