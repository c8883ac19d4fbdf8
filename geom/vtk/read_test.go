package vtk

import (
	"bytes"
	"encoding/binary"
	"errors"
	"flag"
	"math"
	"os"
	"path/filepath"
	"strconv"
	"strings"
	"testing"

	"gonum.org/v1/gonum/spatial/r3"

	"github.com/joinery-cae/joinery/geom"
	"github.com/joinery-cae/joinery/geom/geomtest"
)

var update = flag.Bool("update", false, "rewrite the generated binary fixtures in testdata/formats")

const formats = "../../testdata/formats"

// TestSmallFixtures reads every VTK variant of the shared small fixture
// and checks that each gives the mesh of the fixture specification.
func TestSmallFixtures(t *testing.T) {
	if *update {
		writeBinaryFixtures(t)
	}
	for _, name := range []string{"small_ascii.vtk", "small_binary.vtk", "small_51_ascii.vtk", "small_51_binary.vtk", "small_field.vtk"} {
		t.Run(name, func(t *testing.T) {
			path := filepath.Join(formats, name)
			m, err := ReadFile(path, geom.ReadOptions{})
			if err != nil {
				t.Fatal(err)
			}
			if d := geomtest.Diff(m, geomtest.Small(path)); d != "" {
				t.Errorf("%s differs from the fixture specification:\n%s", name, d)
			}
			if m.Sources[0].File != path {
				t.Errorf("source file %q, want %q", m.Sources[0].File, path)
			}
			f, err := os.Open(path)
			if err != nil {
				t.Fatal(err)
			}
			defer f.Close()
			m2, err := Read(f, name, geom.ReadOptions{})
			if err != nil {
				t.Fatal(err)
			}
			if len(m2.Sources) == 1 {
				m2.Sources[0].File = path // file names differ by design
			}
			if d := geomtest.Diff(m2, m); d != "" {
				t.Errorf("Read and ReadFile differ:\n%s", d)
			}
		})
	}
}

// TestHandwritten reads a file written by hand after the legacy format
// description in "VTK File Formats" (Kitware, The VTK User's Guide, 11th
// ed., ch. 19, and the online VTK file-format documentation): SCALARS
// with and without a component count, a named LOOKUP_TABLE with its own
// table, FIELD data, VECTORS, NORMALS and TEXTURE_COORDINATES, and cells
// of types quad (9), triangle (5), line (3) and vertex (1) from the
// cell-type figure of the same documentation.
func TestHandwritten(t *testing.T) {
	path := "../../testdata/vtk/handwritten_v3.vtk"
	m, err := ReadFile(path, geom.ReadOptions{})
	if err != nil {
		t.Fatal(err)
	}
	want := &geom.Mesh{
		// Values typed into handwritten_v3.vtk.
		Parts:   []geom.Part{{ID: 7}, {ID: 8}},
		NodeIDs: []int64{11, 12, 13, 21, 22, 23, 31, 41},
		Coords: []r3.Vec{
			{X: 0, Y: 0, Z: 0}, {X: 1, Y: 0, Z: 0}, {X: 2, Y: 0, Z: 0},
			{X: 0, Y: 1, Z: 0}, {X: 1, Y: 1, Z: 0}, {X: 2, Y: 1, Z: 0},
			{X: 1.5, Y: 2, Z: -0.25}, {X: 3, Y: 0.25, Z: 10},
		},
		ElemIDs:   []int64{501, 502, 601, 602},
		ElemPart:  []int32{0, 0, 1, 1},
		ElemStart: []int32{0, 4, 8, 11, 14},
		Conn:      []int32{0, 1, 4, 3, 1, 2, 5, 4, 3, 4, 6, 4, 5, 6},
		// thickness is declared float: VTK stores the values of a float
		// array as 32-bit floats (the declared type of the legacy format,
		// VTK file-format documentation, Kitware; VTK 9 reads
		// 0.800000011920929 here), and so does the reader, as the binary
		// twin of the file would hold them. 1.25 is exact either way.
		ElemThickness: []float64{float64(float32(0.8)), float64(float32(0.8)), 1.25, 1.25},
		Sources:       []geom.Source{{File: path, Skipped: geom.SkippedCells{3: 1, 1: 1}}},
	}
	if d := geomtest.Diff(m, want); d != "" {
		t.Errorf("handwritten_v3.vtk:\n%s", d)
	}
	for i, id := range want.NodeIDs {
		if got, ok := m.NodeIndex(id); !ok || int(got) != i {
			t.Errorf("NodeIndex(%d) = %d, %v; want %d", id, got, ok, i)
		}
	}
}

// TestScalarsWithoutLookupTable reads the 5.1 fixtures with the
// LOOKUP_TABLE line of a SCALARS array left out. The format documentation
// (VTK file-format documentation, Kitware) makes the line part of SCALARS
// and VTK's own reader rejects a file without it, but the reader accepts
// one, as some writers leave it out.
func TestScalarsWithoutLookupTable(t *testing.T) {
	for _, name := range []string{"small_51_ascii.vtk", "small_51_binary.vtk"} {
		path := filepath.Join(formats, name)
		data, err := os.ReadFile(path)
		if err != nil {
			t.Fatal(err)
		}
		const with = "SCALARS element_id vtktypeint64\nLOOKUP_TABLE default\n"
		if !bytes.Contains(data, []byte(with)) {
			t.Fatalf("%s lacks %q", name, with)
		}
		data = bytes.Replace(data, []byte(with), []byte("SCALARS element_id vtktypeint64\n"), 1)
		m, err := Parse(data, path, geom.ReadOptions{})
		if err != nil {
			t.Fatalf("%s without LOOKUP_TABLE: %v", name, err)
		}
		if d := geomtest.Diff(m, geomtest.Small(path)); d != "" {
			t.Errorf("%s without LOOKUP_TABLE differs from the fixture specification:\n%s", name, d)
		}
	}
}

// TestDefaultPart reads a file without a part array.
func TestDefaultPart(t *testing.T) {
	data, err := os.ReadFile(filepath.Join(formats, "small_ascii.vtk"))
	if err != nil {
		t.Fatal(err)
	}
	s := strings.Replace(string(data), "SCALARS part int 1\nLOOKUP_TABLE default\n10 10 10 10 20 20\n", "", 1)
	if _, err := Parse([]byte(s), "nopart.vtk", geom.ReadOptions{}); err == nil || !errors.Is(err, geom.ErrInput) {
		t.Errorf("no part array and no default part: err = %v, want an input error", err)
	}
	m, err := Parse([]byte(s), "nopart.vtk", geom.ReadOptions{DefaultPart: 3, HasDefaultPart: true})
	if err != nil {
		t.Fatal(err)
	}
	if len(m.Parts) != 1 || m.Parts[0].ID != 3 {
		t.Errorf("parts %v, want one part 3", m.Parts)
	}
}

// enc builds binary fixture files.
type enc struct{ b []byte }

func (e *enc) line(s string) { e.b = append(append(e.b, s...), '\n') }
func (e *enc) i32(vs ...int64) {
	for _, v := range vs {
		e.b = binary.BigEndian.AppendUint32(e.b, uint32(int32(v)))
	}
}
func (e *enc) i64(vs ...int64) {
	for _, v := range vs {
		e.b = binary.BigEndian.AppendUint64(e.b, uint64(v))
	}
}
func (e *enc) f32(vs ...float64) {
	for _, v := range vs {
		e.b = binary.BigEndian.AppendUint32(e.b, math.Float32bits(float32(v)))
	}
}
func (e *enc) f64(vs ...float64) {
	for _, v := range vs {
		e.b = binary.BigEndian.AppendUint64(e.b, math.Float64bits(v))
	}
}

// smallBinary returns small_binary.vtk: version 3.0, classic layout,
// float points, int ids, a VECTORS array to skip.
func smallBinary() []byte {
	w := geomtest.Small("")
	var e enc
	e.line("# vtk DataFile Version 3.0")
	e.line("Joinery shared small fixture, classic layout, BINARY")
	e.line("BINARY")
	e.line("DATASET UNSTRUCTURED_GRID")
	e.line("POINTS 12 float")
	for _, p := range w.Coords {
		e.f32(p.X, p.Y, p.Z)
	}
	e.line("")
	e.line("CELLS 6 26")
	e.i32(4, 0, 1, 4, 3, 4, 1, 2, 5, 4, 4, 3, 4, 7, 6, 4, 4, 5, 8, 7, 3, 9, 10, 11, 1, 0)
	e.line("")
	e.line("CELL_TYPES 6")
	e.i32(9, 9, 9, 9, 5, 1)
	e.line("")
	e.line("CELL_DATA 6")
	e.line("SCALARS part int 1")
	e.line("LOOKUP_TABLE default")
	e.i32(10, 10, 10, 10, 20, 20)
	e.line("")
	e.line("SCALARS thickness float 1")
	e.line("LOOKUP_TABLE default")
	e.f32(1, 1, 1, 1, 1.5, 1.5)
	e.line("")
	e.line("SCALARS element_id int 1")
	e.line("LOOKUP_TABLE default")
	e.i32(1001, 1002, 1003, 1004, 2001, 9001)
	e.line("")
	e.line("POINT_DATA 12")
	e.line("VECTORS velocity double")
	for i := range 12 {
		e.f64(float64(i), 10, math.NaN())
	}
	e.line("")
	e.line("SCALARS node_id int 1")
	e.line("LOOKUP_TABLE default")
	e.i32(w.NodeIDs...)
	e.line("")
	return e.b
}

// small51Binary returns small_51_binary.vtk: version 5.1, OFFSETS and
// CONNECTIVITY as vtktypeint64, double points, a METADATA block, FIELD
// arrays and a SCALARS array without a component count. Every SCALARS
// array has its LOOKUP_TABLE line, which VTK's own reader requires
// (VTK 9: "Lookup table must be specified with scalar"); the reader's
// leniency about a missing one is tested by TestScalarsWithoutLookupTable.
func small51Binary() []byte {
	w := geomtest.Small("")
	var e enc
	e.line("# vtk DataFile Version 5.1")
	e.line("Joinery shared small fixture, 5.1 layout, BINARY")
	e.line("BINARY")
	e.line("DATASET UNSTRUCTURED_GRID")
	e.line("POINTS 12 double")
	for _, p := range w.Coords {
		e.f64(p.X, p.Y, p.Z)
	}
	e.line("")
	e.line("METADATA")
	e.line("INFORMATION 0")
	e.line("")
	e.line("CELLS 7 20")
	e.line("OFFSETS vtktypeint64")
	e.i64(0, 4, 8, 12, 16, 19, 20)
	e.line("")
	e.line("CONNECTIVITY vtktypeint64")
	e.i64(0, 1, 4, 3, 1, 2, 5, 4, 3, 4, 7, 6, 4, 5, 8, 7, 9, 10, 11, 0)
	e.line("")
	e.line("CELL_TYPES 6")
	e.i32(9, 9, 9, 9, 5, 1)
	e.line("")
	e.line("CELL_DATA 6")
	e.line("FIELD FieldData 3")
	e.line("part 1 6 vtktypeint64")
	e.i64(10, 10, 10, 10, 20, 20)
	e.line("")
	e.line("flags 1 6 unsigned_char")
	e.b = append(e.b, 1, 2, 3, 4, 5, 6)
	e.line("")
	e.line("thickness 1 6 double")
	e.f64(1, 1, 1, 1, 1.5, 1.5)
	e.line("")
	e.line("SCALARS element_id vtktypeint64")
	e.line("LOOKUP_TABLE default")
	e.i64(1001, 1002, 1003, 1004, 2001, 9001)
	e.line("")
	e.line("POINT_DATA 12")
	e.line("SCALARS node_id vtktypeint64 1")
	e.line("LOOKUP_TABLE default")
	e.i64(w.NodeIDs...)
	e.line("")
	return e.b
}

// writeBinaryFixtures regenerates the binary fixtures (go test -update).
func writeBinaryFixtures(t *testing.T) {
	for name, data := range map[string][]byte{"small_binary.vtk": smallBinary(), "small_51_binary.vtk": small51Binary()} {
		if err := os.WriteFile(filepath.Join(formats, name), data, 0o644); err != nil {
			t.Fatal(err)
		}
	}
}

// TestBinaryFixturesCurrent checks that the committed binary fixtures are
// what the generators produce.
func TestBinaryFixturesCurrent(t *testing.T) {
	for name, data := range map[string][]byte{"small_binary.vtk": smallBinary(), "small_51_binary.vtk": small51Binary()} {
		got, err := os.ReadFile(filepath.Join(formats, name))
		if err != nil {
			t.Fatal(err)
		}
		if !bytes.Equal(got, data) {
			t.Errorf("%s is out of date; run go test -update", name)
		}
	}
}

// TestFloatASCIIMatchesBinary reads the same values declared float from
// an ASCII file and from its binary twin: VTK stores float values as
// 32-bit floats whatever the encoding (the declared type of the legacy
// format, VTK file-format documentation, Kitware), so both must give the
// same model, with 0.1 read as float32(0.1). Double values stay exact.
func TestFloatASCIIMatchesBinary(t *testing.T) {
	coords := []float64{0.1, 0, 0, 1.1, 0, 0, 1.1, 1.3, 0.7, 0, 1.3, 1e-40}
	thick := []float64{0.8, 2.2}
	for _, typ := range []string{"float", "double"} {
		var a, b enc
		for _, e := range []*enc{&a, &b} {
			e.line("# vtk DataFile Version 3.0")
			e.line("float twin")
		}
		a.line("ASCII")
		b.line("BINARY")
		for _, e := range []*enc{&a, &b} {
			e.line("DATASET UNSTRUCTURED_GRID")
			e.line("POINTS 4 " + typ)
		}
		put := func(vs []float64) {
			for _, v := range vs {
				a.line(strconv.FormatFloat(v, 'g', -1, 64))
			}
			if typ == "float" {
				b.f32(vs...)
			} else {
				b.f64(vs...)
			}
			b.line("")
		}
		put(coords)
		a.line("CELLS 2 9\n4 0 1 2 3\n3 0 1 2\nCELL_TYPES 2\n9 5")
		b.line("CELLS 2 9")
		b.i32(4, 0, 1, 2, 3, 3, 0, 1, 2)
		b.line("\nCELL_TYPES 2")
		b.i32(9, 5)
		b.line("")
		for _, e := range []*enc{&a, &b} {
			e.line("CELL_DATA 2")
			e.line("SCALARS part int 1")
			e.line("LOOKUP_TABLE default")
		}
		a.line("4 4")
		b.i32(4, 4)
		b.line("")
		for _, e := range []*enc{&a, &b} {
			e.line("SCALARS thickness " + typ + " 1")
			e.line("LOOKUP_TABLE default")
		}
		put(thick)
		ma, err := Parse(a.b, "twin.vtk", geom.ReadOptions{})
		if err != nil {
			t.Fatal(err)
		}
		mb, err := Parse(b.b, "twin.vtk", geom.ReadOptions{})
		if err != nil {
			t.Fatal(err)
		}
		if d := geomtest.Diff(ma, mb); d != "" {
			t.Errorf("%s: ASCII and binary differ:\n%s", typ, d)
		}
		round := func(v float64) float64 {
			if typ == "float" {
				return float64(float32(v))
			}
			return v
		}
		if got, want := ma.Coords[0].X, round(0.1); got != want {
			t.Errorf("%s: x of point 0 = %v, want %v", typ, got, want)
		}
		if got, want := ma.Thickness(0), round(0.8); got != want {
			t.Errorf("%s: thickness = %v, want %v", typ, got, want)
		}
	}
}
