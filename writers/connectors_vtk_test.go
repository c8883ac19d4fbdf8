package writers

import (
	"bytes"
	"testing"

	"github.com/joinery-cae/joinery/geom"
	"github.com/joinery-cae/joinery/geom/vtk"
	"github.com/joinery-cae/joinery/writers/document"
)

// TestConnectorsVTKReadsBack writes two connectors (one built with two
// links, one failed) and reads the file with Joinery's VTK legacy reader,
// which must accept it and skip its line (VTK type 3) and vertex (type 1)
// cells by type, as the VTK file-format documentation numbers them.
func TestConnectorsVTKReadsBack(t *testing.T) {
	doc := &document.ConnectorsDoc{Generator: "test", Connectors: []document.ConnectorDoc{
		{State: "built", Sheets: make([]document.SheetDoc, 3), Links: []document.LinkDoc{
			{Start: document.Vec{0, 0, 0}, End: document.Vec{0, 0, 1}, MidGap: 1, ContactGap: 1},
			{Start: document.Vec{0, 0, 1}, End: document.Vec{0, 0, 2.25}, MidGap: 1.25, ContactGap: 1.1},
		}},
		{State: "not-built", Point: document.Vec{5, 5, 5}},
	}}
	var buf bytes.Buffer
	if err := WriteConnectorsVTK(&buf, doc); err != nil {
		t.Fatal(err)
	}
	m, err := vtk.Read(bytes.NewReader(buf.Bytes()), "connectors.vtk", geom.ReadOptions{HasDefaultPart: true, DefaultPart: 1})
	if err != nil {
		t.Fatalf("%v\n%s", err, buf.String())
	}
	if m.NumNodes() != 5 || m.NumElems() != 0 {
		t.Fatalf("%d nodes %d elements", m.NumNodes(), m.NumElems())
	}
	if sk := m.Sources[0].Skipped; sk["vtk-cell-3"] != 2 || sk["vtk-cell-1"] != 1 {
		t.Fatalf("skipped %v", sk)
	}
	var again bytes.Buffer
	if err := WriteConnectorsVTK(&again, doc); err != nil || !bytes.Equal(again.Bytes(), buf.Bytes()) {
		t.Fatal("output differs between two writes")
	}
}
