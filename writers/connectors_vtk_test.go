package writers

import (
	"bytes"
	"math"
	"strconv"
	"strings"
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
	if sk := m.Sources[0].Skipped; sk[3] != 2 || sk[1] != 1 {
		t.Fatalf("skipped %v", sk)
	}
	var again bytes.Buffer
	if err := WriteConnectorsVTK(&again, doc); err != nil || !bytes.Equal(again.Bytes(), buf.Bytes()) {
		t.Fatal("output differs between two writes")
	}
}

// The title line holds the run id and stays within the 256 characters
// of a legacy VTK header line, newline included (VTK file-format
// documentation, Kitware), also for a long version string.
func TestConnectorsVTKTitleLength(t *testing.T) {
	const id = "0123456789abcdef0123456789abcdef"
	for _, gen := range []string{"joinery dev", "joinery v1.12.3-rc.1+20250101.abcdef0123-dirty", "joinery " + string(bytes.Repeat([]byte("x"), 300))} {
		title := ConnectorsVTKTitle(gen, id)
		if len(title) > 255 || bytes.ContainsAny([]byte(title), "\n\r") {
			t.Errorf("title of %d characters for generator of %d", len(title), len(gen))
		}
		if len(gen) < 100 && document.FindRunID([]byte(title)) != id {
			t.Errorf("run id not found in %q", title)
		}
	}
}

// TestConnectorsVTKGapOffset: gap_offset is the gap square to the sheets
// less contact, as gap-open and gap-closed judge it: square_gap where
// the document has it (sheets at 40 degrees to the axis, in contact:
// 2.25 / cos 40 deg along the axis, 2.25 square to them, plane
// geometry; offset 0), mid_gap for a file written before square_gap
// (1.25 against contact 1.1: 0.15).
func TestConnectorsVTKGapOffset(t *testing.T) {
	square := 2.25
	doc := &document.ConnectorsDoc{Generator: "test", Connectors: []document.ConnectorDoc{
		{State: "built", Sheets: make([]document.SheetDoc, 3), Links: []document.LinkDoc{
			{Start: document.Vec{0, 0, 0}, End: document.Vec{0, 0, 1}, MidGap: 2.25 / math.Cos(40*math.Pi/180), SquareGap: &square, ContactGap: 2.25},
			{Start: document.Vec{0, 0, 1}, End: document.Vec{0, 0, 2.25}, MidGap: 1.25, ContactGap: 1.1},
		}},
	}}
	var buf bytes.Buffer
	if err := WriteConnectorsVTK(&buf, doc); err != nil {
		t.Fatal(err)
	}
	_, after, ok := strings.Cut(buf.String(), "SCALARS gap_offset double 1\nLOOKUP_TABLE default\n")
	if !ok {
		t.Fatalf("no gap_offset:\n%s", buf.String())
	}
	f := strings.Fields(after)
	if len(f) < 2 {
		t.Fatalf("gap_offset %q", after)
	}
	for i, want := range []float64{0, 1.25 - 1.1} {
		got, err := strconv.ParseFloat(f[i], 64)
		if err != nil || math.Abs(got-want) > 1e-12 {
			t.Errorf("link %d gap_offset %s, want %g", i, f[i], want)
		}
	}
}
