package geomtest

import (
	"gonum.org/v1/gonum/spatial/r3"

	"github.com/joinery-cae/joinery/geom"
)

// Small returns the mesh that every VTK and VTK XML variant of the shared
// "small" fixture reads to, as testdata/formats/README.md specifies it:
// 12 nodes with ids 101 to 112, four
// quads of part 10 and a triangle of part 20 (ids 1001 to 1004 and 2001),
// parts in first-seen order without a part thickness, thickness 1, 1, 1,
// 1, 1.5 per element, and one source, named file, that skipped one vertex
// cell (a vertex, VTK type 1). Each call returns a new mesh, not indexed.
func Small(file string) *geom.Mesh {
	return &geom.Mesh{
		Parts:   []geom.Part{{ID: 10}, {ID: 20}},
		NodeIDs: []int64{101, 102, 103, 104, 105, 106, 107, 108, 109, 110, 111, 112},
		Coords: []r3.Vec{
			{X: 0, Y: 0, Z: 0}, {X: 10.5, Y: 0, Z: 0}, {X: 21.25, Y: 0, Z: 0},
			{X: 0, Y: 10.5, Z: 0}, {X: 10.5, Y: 10.5, Z: 0.125}, {X: 21.25, Y: 10.5, Z: 0},
			{X: 0, Y: 21.25, Z: 0}, {X: 10.5, Y: 21.25, Z: 0}, {X: 21.25, Y: 21.25, Z: 0},
			{X: 0, Y: 0, Z: 2.5}, {X: 10.5, Y: 0, Z: 2.5}, {X: 0, Y: 10.5, Z: 2.5},
		},
		ElemIDs:       []int64{1001, 1002, 1003, 1004, 2001},
		ElemPart:      []int32{0, 0, 0, 0, 1},
		ElemStart:     []int32{0, 4, 8, 12, 16, 19},
		Conn:          []int32{0, 1, 4, 3, 1, 2, 5, 4, 3, 4, 7, 6, 4, 5, 8, 7, 9, 10, 11},
		ElemThickness: []float64{1, 1, 1, 1, 1.5},
		Sources:       []geom.Source{{File: file, Skipped: geom.SkippedCells{1: 1}}},
	}
}

// SmallPoly returns the mesh the polydata variant of the "small" fixture
// reads to (testdata/polydata/vtk9_write.py, written by VTK's own
// writers): Small's mesh, with the vertex, the poly-vertex, the line, the
// poly-line, the triangle strip and the pentagon of its other cells
// skipped, each counted under the type VTK gives it (1, 2, 3, 4, 6 and 7).
func SmallPoly(file string) *geom.Mesh {
	m := Small(file)
	m.Sources[0].Skipped = geom.SkippedCells{1: 1, 2: 1, 3: 1, 4: 1, 6: 1, 7: 1}
	return m
}
