package vtu

import (
	"errors"
	"strings"
	"testing"

	"gonum.org/v1/gonum/spatial/r3"

	"github.com/joinery-cae/joinery/geom"
)

// quadraticVTU is a file as meshers write one: a quadratic quad, a
// biquadratic quad and a quadratic triangle, the part ids in
// CellEntityIds, and a line cell.
const quadraticVTU = `<?xml version="1.0"?>
<VTKFile type="UnstructuredGrid" version="1.0" byte_order="LittleEndian" header_type="UInt64">
<UnstructuredGrid>
<Piece NumberOfPoints="9" NumberOfCells="4">
<Points>
<DataArray type="Float64" NumberOfComponents="3" format="ascii">
0 0 0  2 0 0  2 2 0  0 2 0  1 0 0.1  2 1 0  1 2 0  0 1 0  1 1 0.25
</DataArray>
</Points>
<Cells>
<DataArray type="Int64" Name="connectivity" format="ascii">0 1 2 3 4 5 6 7  0 1 2 3 4 5 6 7 8  0 1 3 4 8 7  0 1</DataArray>
<DataArray type="Int64" Name="offsets" format="ascii">8 17 23 25</DataArray>
<DataArray type="UInt8" Name="types" format="ascii">23 28 22 3</DataArray>
</Cells>
<CellData>
<DataArray type="Int32" Name="CellEntityIds" format="ascii">4 4 5 9</DataArray>
</CellData>
</Piece>
</UnstructuredGrid>
</VTKFile>
`

func TestReadSecondOrder(t *testing.T) {
	m, err := Read(strings.NewReader(quadraticVTU), "q.vtu", geom.ReadOptions{PartArray: "CellEntityIds"})
	if err != nil {
		t.Fatal(err)
	}
	if m.NumElems() != 3 || m.Type(0) != geom.Quad8 || m.Type(1) != geom.Quad9 || m.Type(2) != geom.Tri6 {
		t.Fatalf("%d elements", m.NumElems())
	}
	if len(m.Parts) != 2 || m.Part(2).ID != 5 || m.Sources[0].Skipped.String() != "line (VTK type 3): 1" {
		t.Errorf("parts %+v, skipped %v", m.Parts, m.Sources[0].Skipped)
	}
	// The Quad8's bottom edge bows up to z = 0.1 at its middle node.
	if pr := m.Project(0, r3.Vec{X: 1, Y: -1, Z: 0.1}); pr.Point != (r3.Vec{X: 1, Y: 0, Z: 0.1}) {
		t.Errorf("projection %v, want the midside node", pr.Point)
	}
	_, err = Read(strings.NewReader(quadraticVTU), "q.vtu", geom.ReadOptions{})
	if !errors.Is(err, geom.ErrInput) || !strings.Contains(err.Error(), `no cell array "part"; the file's cell arrays are "CellEntityIds"`) {
		t.Errorf("err = %v", err)
	}
	polys := strings.Replace(quadraticVTU, ">23 28 22 3<", ">7 7 22 3<", 1)
	_, err = Read(strings.NewReader(polys), "q.vtu", geom.ReadOptions{PartArray: "CellEntityIds"})
	if !errors.Is(err, geom.ErrInput) || !strings.Contains(err.Error(), "part 4 has no cell Joinery reads: its 2 surface cell(s) are of kinds it does not read (polygon (VTK type 7): 2)") {
		t.Errorf("err = %v", err)
	}
}
