package vtk

import (
	"errors"
	"fmt"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"github.com/joinery-cae/joinery/geom"
	"github.com/joinery-cae/joinery/geom/geomtest"
)

// polydata holds the polydata fixture written by VTK 9.1's own writers
// (testdata/polydata/vtk9_write.py, which lists its cells).
const polydata = "../../testdata/polydata"

// TestPolyDataFiles reads the polydata files VTK wrote, in the 5.1 and
// the classic 4.2 layouts, ASCII and binary: each gives the fixture's
// model (geomtest.SmallPoly: the types VTK gives the cells are those of
// vtkPolyData::GetCellType, and VTK's own reader agrees, geom/meshio's
// TestAgainstVTKLibrary).
func TestPolyDataFiles(t *testing.T) {
	files, _ := filepath.Glob(filepath.Join(polydata, "*.vtk"))
	if len(files) != 4 {
		t.Fatalf("%d polydata files, want 4", len(files))
	}
	for _, f := range files {
		t.Run(filepath.Base(f), func(t *testing.T) {
			m, err := ReadFile(f, geom.ReadOptions{})
			if err != nil {
				t.Fatal(err)
			}
			if d := geomtest.Diff(m, geomtest.SmallPoly(f)); d != "" {
				t.Error(d)
			}
		})
	}
}

// polySections splits the classic ASCII fixture into its header (up to
// the cell sections), its four sections by keyword, and the rest (the
// cell and point data).
func polySections(t *testing.T) (head string, secs map[string]string, tail string) {
	t.Helper()
	b, err := os.ReadFile(filepath.Join(polydata, "vtk9_42_ascii.vtk"))
	if err != nil {
		t.Fatal(err)
	}
	parts := strings.Split(string(b), "\n\n")
	if len(parts) != 6 {
		t.Fatalf("fixture has %d blank-line blocks, want 6", len(parts))
	}
	secs = map[string]string{}
	for _, p := range parts[1:5] {
		secs[strings.Fields(p)[0]] = p
	}
	return parts[0], secs, parts[5]
}

// TestPolyDataSectionOrder writes the sections in other orders, and
// leaves some out: the cells are numbered in VTK's order whatever the
// order in the file, so the cell data still matches them.
func TestPolyDataSectionOrder(t *testing.T) {
	head, secs, tail := polySections(t)
	for _, order := range [][]string{
		{"TRIANGLE_STRIPS", "POLYGONS", "LINES", "VERTICES"},
		{"POLYGONS", "VERTICES", "TRIANGLE_STRIPS", "LINES"},
	} {
		var b strings.Builder
		b.WriteString(head)
		for _, k := range order {
			b.WriteString("\n\n" + secs[k])
		}
		b.WriteString("\n\n" + tail)
		m, err := Parse([]byte(b.String()), "order.vtk", geom.ReadOptions{})
		if err != nil {
			t.Fatalf("%v: %v", order, err)
		}
		if d := geomtest.Diff(m, geomtest.SmallPoly("order.vtk")); d != "" {
			t.Errorf("%v: %s", order, d)
		}
	}
	// Polygons alone, with their six cells' data: the same five shells.
	cellData := "CELL_DATA 6\nFIELD FieldData 3\npart 1 6 int\n10 10 10 10 20 20\nthickness 1 6 double\n1 1 1 1 1.5 1.5\nelement_id 1 6 int\n1001 1002 1003 1004 2001 2002\n"
	pointData := tail[strings.Index(tail, "POINT_DATA"):]
	m, err := Parse([]byte(head+"\n\n"+secs["POLYGONS"]+"\n\n"+cellData+pointData), "polys.vtk", geom.ReadOptions{})
	if err != nil {
		t.Fatal(err)
	}
	want := geomtest.Small("polys.vtk")
	want.Sources[0].Skipped = geom.SkippedCells{7: 1}
	if d := geomtest.Diff(m, want); d != "" {
		t.Errorf("polygons only: %s", d)
	}
}

// TestPolyDataErrors checks that a bad polydata file is an input error
// naming the file, the line and the section.
func TestPolyDataErrors(t *testing.T) {
	b, err := os.ReadFile(filepath.Join(polydata, "vtk9_42_ascii.vtk"))
	if err != nil {
		t.Fatal(err)
	}
	good := string(b)
	repl := func(old, new string) string {
		if !strings.Contains(good, old) {
			t.Fatalf("fixture lacks %q", old)
		}
		return strings.Replace(good, old, new, 1)
	}
	head, secs, tail := polySections(t)
	// The fixture's lines (vtk9_42_ascii.vtk): 4 DATASET, 5 to 9 POINTS,
	// 11 VERTICES, 15 LINES, 19 POLYGONS (its cells on lines 20 to 25),
	// 27 TRIANGLE_STRIPS (its cell on 28), 30 CELL_DATA.
	for _, c := range []struct{ name, in, want string }{
		{"bad point", repl("3 9 10 11 \n5", "3 9 10 12 \n5"), "bad.vtk:24: POLYGONS: cell 4 references point 12; the file has 12 points"},
		{"size too big", repl("POLYGONS 6 30", "POLYGONS 6 31"), "bad.vtk:25: POLYGONS: the cells hold 30 values, the size says 31"},
		{"size below count", repl("POLYGONS 6 30", "POLYGONS 6 5"), "bad.vtk:19: POLYGONS: size 5 is smaller than the cell count 6"},
		{"count word", repl("4 0 1 4 3", "four 0 1 4 3"), "bad.vtk:20: POLYGONS: value 1 of 30: \"four\" is not a valid number here"},
		{"second section", head + "\n\n" + secs["POLYGONS"] + "\n\n" + secs["POLYGONS"] + "\n\n" + tail, "bad.vtk:19: a second POLYGONS section"},
		{"section after cell data", head + "\n\n" + secs["VERTICES"] + "\n\n" + secs["LINES"] + "\n\n" + secs["POLYGONS"] + "\n\nCELL_DATA 10\n" + secs["TRIANGLE_STRIPS"] + "\n",
			"bad.vtk:28: TRIANGLE_STRIPS after CELL_DATA: the cell data must follow every cell section"},
		{"cell data count", repl("CELL_DATA 11", "CELL_DATA 10"), "bad.vtk:30: CELL_DATA: 10 values for 11 cells"},
		{"cells in polydata", repl("VERTICES 2 5", "CELLS 2 5"), "bad.vtk:11: CELLS in a POLYDATA file: its cells come in VERTICES, LINES, POLYGONS and TRIANGLE_STRIPS"},
		{"polygons in a grid", repl("DATASET POLYDATA", "DATASET UNSTRUCTURED_GRID"), "bad.vtk:11: VERTICES in an UNSTRUCTURED_GRID file: its cells come in CELLS and CELL_TYPES"},
		// The strip alone in part 30: a sheet of cells Joinery does not
		// read is refused, at the strip's line.
		{"part of strips only", repl("10 10 20 20 10 10 10 10 20 \n20 10", "10 10 20 20 10 10 10 10 20 \n20 30"), "bad.vtk:28: part 30"},
	} {
		t.Run(c.name, func(t *testing.T) {
			_, err := Parse([]byte(c.in), "bad.vtk", geom.ReadOptions{})
			if err == nil {
				t.Fatalf("no error; want %q", c.want)
			}
			if !strings.Contains(err.Error(), c.want) {
				t.Errorf("error\n  %v\nwant it to contain\n  %s", err, c.want)
			}
			if !errors.Is(err, geom.ErrInput) {
				t.Errorf("not an input error: %v", err)
			}
		})
	}
}

// TestPolyDataBinaryErrors checks that errors in a binary polydata file
// give the byte offset of the bad value.
func TestPolyDataBinaryErrors(t *testing.T) {
	b, err := os.ReadFile(filepath.Join(polydata, "vtk9_42_binary.vtk"))
	if err != nil {
		t.Fatal(err)
	}
	at := strings.Index(string(b), "POLYGONS 6 30\n") + len("POLYGONS 6 30\n")
	// Cell 4 of the polygons is the triangle: its count at value 20 of
	// the section, its last point at value 23.
	bad := append([]byte(nil), b...)
	bad[at+4*23+3] = 12
	_, err = Parse(bad, "bad.vtk", geom.ReadOptions{})
	want := fmt.Sprintf("bad.vtk: byte %d: POLYGONS: cell 4 references point 12; the file has 12 points", at+4*23)
	if err == nil || !strings.Contains(err.Error(), want) {
		t.Errorf("error %v, want %q", err, want)
	}
}
