package vtu

import (
	"errors"
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

// TestPolyDataFiles reads the .vtp files VTK wrote (ascii, inline binary
// with zlib, appended raw, appended with LZMA): each gives the fixture's
// model (geomtest.SmallPoly; VTK's own reader agrees, geom/meshio's
// TestAgainstVTKLibrary). VTK writes the Strips before the Polys, so the
// cells are numbered in VTK's order, not the file's.
func TestPolyDataFiles(t *testing.T) {
	files, _ := filepath.Glob(filepath.Join(polydata, "*.vtp"))
	if len(files) != 4 {
		t.Fatalf("%d .vtp files, want 4", len(files))
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

// TestPolyDataErrors checks that a bad .vtp file is an input error naming
// the file, the line and the section.
func TestPolyDataErrors(t *testing.T) {
	b, err := os.ReadFile(filepath.Join(polydata, "vtk9_ascii.vtp"))
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
	polys := good[strings.Index(good, "      <Polys>"):strings.Index(good, "      </Polys>")]
	// Lines of vtk9_ascii.vtp: 4 Piece, 67 Polys, its connectivity values
	// on 69 to 72, its offsets on 75.
	for _, c := range []struct{ name, in, want string }{
		{"bad point", repl("11 0 1 2 5 4", "12 0 1 2 5 4"), "bad.vtp:72: Polys connectivity value 18 (cell 4) refers to point 12; the piece has 12 points"},
		{"offsets fall", repl("4 8 12 16 19 24", "4 8 12 10 19 24"), "bad.vtp:75: Polys offsets: cell 3 ends at 10, before its start 12"},
		{"offsets short", repl("4 8 12 16 19 24", "4 8 12 16 19"), `bad.vtp:74: array "offsets" has 5 values, want 6 (NumberOfPolys=6)`},
		{"no offsets", repl(polys[strings.Index(polys, `        <DataArray type="Int64" Name="offsets"`):], ""), `bad.vtp:4: Piece has 6 cells but no "offsets" array in Polys`},
		{"bad count", repl(`NumberOfPolys="6"`, `NumberOfPolys="six"`), `bad.vtp:4: Piece NumberOfPolys="six" is not a valid count`},
		// Without NumberOfPolys the piece has no polygons, and the cell
		// data is found too long.
		{"count left out", repl(` NumberOfPolys="6"`, ""), `bad.vtp:20: array "element_id" has 11 values, want 5 (5 cells in Verts, Lines, Polys and Strips)`},
		{"no points", repl(`NumberOfPoints="12"`, `NumberOfPointz="12"`), "bad.vtp:4: Piece needs NumberOfPoints"},
		{"second polys", repl("      </Polys>", "      </Polys>\n"+polys+"      </Polys>"), `second Polys array "connectivity" in one piece`},
		{"grid element", strings.ReplaceAll(good, "PolyData>", "UnstructuredGrid>"), "no PolyData element"},
	} {
		t.Run(c.name, func(t *testing.T) {
			_, err := Read(strings.NewReader(c.in), "bad.vtp", geom.ReadOptions{})
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

// TestPolyDataCellsIgnored checks that a Cells element in a PolyData piece
// is skipped, as VTK's reader skips it: the polydata sections alone make
// the cells.
func TestPolyDataCellsIgnored(t *testing.T) {
	b, err := os.ReadFile(filepath.Join(polydata, "vtk9_ascii.vtp"))
	if err != nil {
		t.Fatal(err)
	}
	in := strings.Replace(string(b), "      <Verts>", `      <Cells>
        <DataArray type="Int64" Name="connectivity" format="ascii">0 1 2</DataArray>
        <DataArray type="Int64" Name="offsets" format="ascii">3</DataArray>
        <DataArray type="UInt8" Name="types" format="ascii">5</DataArray>
      </Cells>
      <Verts>`, 1)
	m, err := Read(strings.NewReader(in), "cells.vtp", geom.ReadOptions{})
	if err != nil {
		t.Fatal(err)
	}
	if d := geomtest.Diff(m, geomtest.SmallPoly("cells.vtp")); d != "" {
		t.Error(d)
	}
}
