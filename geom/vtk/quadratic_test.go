package vtk_test

import (
	"bytes"
	"errors"
	"strings"
	"testing"

	"gonum.org/v1/gonum/spatial/r3"

	"github.com/joinery-cae/joinery/geom"
	"github.com/joinery-cae/joinery/geom/geomtest"
	"github.com/joinery-cae/joinery/geom/vtk"
)

// secondOrder is a mesh of Tri6, Quad8 and Quad9 elements of three parts
// on the paraboloid z = (x^2 + y^2)/100.
func secondOrder() *geom.Mesh {
	var meshes []*geom.Mesh
	for k, typ := range []geom.ElemType{geom.Tri6, geom.Quad8, geom.Quad9} {
		meshes = append(meshes, geomtest.SecondOrder(geomtest.SecondOrderSpec{
			Type: typ, NX: 3, NY: 2, H: 5, X0: float64(20 * k), Part: int64(k + 1),
			FirstNodeID: int64(1000*k + 1), FirstElemID: int64(1000*k + 1),
			Surface: func(x, y float64) r3.Vec { return r3.Vec{X: x, Y: y, Z: (x*x + y*y) / 100} },
		}))
	}
	m, _, err := geom.Merge(meshes, false)
	if err != nil {
		panic(err)
	}
	for i := range m.Parts {
		m.Parts[i].Thickness = 1 + float64(i)/4
	}
	return m
}

// TestWriteRoundTripSecondOrder writes second-order elements as VTK
// types 22, 23 and 28 and reads them back unchanged.
func TestWriteRoundTripSecondOrder(t *testing.T) {
	want := secondOrder()
	for _, binary := range []bool{false, true} {
		var b bytes.Buffer
		if err := vtk.Write(&b, want, binary); err != nil {
			t.Fatal(err)
		}
		got, err := vtk.Read(bytes.NewReader(b.Bytes()), "rt.vtk", geom.ReadOptions{})
		if err != nil {
			t.Fatalf("binary=%v: %v", binary, err)
		}
		if d := sameMesh(got, want); d != "" {
			t.Errorf("binary=%v: round trip differs: %s", binary, d)
		}
		for e := range got.NumElems() {
			if got.Type(e) != want.Type(e) {
				t.Fatalf("binary=%v: element %d is %v, want %v", binary, e, got.Type(e), want.Type(e))
			}
		}
		if !binary && !strings.Contains(b.String(), "\n22\n") || !strings.Contains(b.String(), "\n23\n") && !binary {
			t.Errorf("ASCII file lacks cell types 22 and 23")
		}
	}
}

// gmshLike is a legacy file as a mesher writes one: no node or element
// ids, the part ids in the cell array CellEntityIds, vertex and line
// cells beside the shells.
const gmshLike = `# vtk DataFile Version 2.0
written by a mesher
ASCII
DATASET UNSTRUCTURED_GRID
POINTS 9 double
0 0 0  2 0 0  2 2 0  0 2 0  1 0 0  2 1 0  1 2 0  0 1 0  1 1 0.25
CELLS 4 22
1 0
2 0 1
9 0 1 2 3 4 5 6 7 8
6 0 1 2 4 5 8
CELL_TYPES 4
1
3
28
22
CELL_DATA 4
SCALARS CellEntityIds int 1
LOOKUP_TABLE default
7
8
5
6
`

func TestReadSecondOrderCells(t *testing.T) {
	m, err := vtk.Parse([]byte(gmshLike), "g.vtk", geom.ReadOptions{PartArray: "CellEntityIds"})
	if err != nil {
		t.Fatal(err)
	}
	if m.NumElems() != 2 || m.Type(0) != geom.Quad9 || m.Type(1) != geom.Tri6 {
		t.Fatalf("%d elements, types %v %v; want a quad9 and a tri6", m.NumElems(), m.Type(0), m.Type(1))
	}
	if m.Part(0).ID != 5 || m.Part(1).ID != 6 {
		t.Errorf("parts %d %d, want 5 6", m.Part(0).ID, m.Part(1).ID)
	}
	if s := m.Sources[0]; s.Skipped.String() != "vertex (VTK type 1): 1, line (VTK type 3): 1" || !s.ImplicitNodeIDs || !s.ImplicitElemIDs {
		t.Errorf("source %+v", s)
	}
	// The curved centre: the quad9 bulges to z = 0.25 at its middle.
	if pr := m.Project(0, r3.Vec{X: 1, Y: 1, Z: 5}); pr.Point != (r3.Vec{X: 1, Y: 1, Z: 0.25}) {
		t.Errorf("projection %v, want the centre node", pr.Point)
	}
	// The default part array is missing: the error names the arrays the
	// file has.
	_, err = vtk.Parse([]byte(gmshLike), "g.vtk", geom.ReadOptions{})
	if !errors.Is(err, geom.ErrInput) || !strings.Contains(err.Error(), `no cell array "part"; the file's cell arrays are "CellEntityIds"`) {
		t.Errorf("err = %v", err)
	}
	_, err = vtk.Parse([]byte(gmshLike), "g.vtk", geom.ReadOptions{PartArray: "physical"})
	if err == nil || !strings.Contains(err.Error(), `no cell array "physical"`) {
		t.Errorf("err = %v", err)
	}
}

// TestReadDroppedShellsError checks that a part made of surface cells
// Joinery does not read is an error naming the file and the kinds, while
// skipped lines and vertices of their own part are only counted.
func TestReadDroppedShellsError(t *testing.T) {
	polys := strings.Replace(gmshLike, "CELL_TYPES 4\n1\n3\n28\n22", "CELL_TYPES 4\n1\n3\n28\n7", 1)
	_, err := vtk.Parse([]byte(polys), "g.vtk", geom.ReadOptions{PartArray: "CellEntityIds"})
	want := "g.vtk:16: part 6 has no cell Joinery reads: its 1 surface cell(s) are of kinds it does not read (polygon (VTK type 7): 1)"
	if !errors.Is(err, geom.ErrInput) || !strings.Contains(err.Error(), want) {
		t.Errorf("err = %v\nwant %s", err, want)
	}
}
