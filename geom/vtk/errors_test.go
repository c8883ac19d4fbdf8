package vtk

import (
	"bytes"
	"encoding/binary"
	"errors"
	"fmt"
	"math"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"github.com/joinery-cae/joinery/geom"
)

// TestErrorsASCII checks that bad ASCII files give input errors that name
// the file and the line.
func TestErrorsASCII(t *testing.T) {
	small := readFixture(t, "small_ascii.vtk")
	small51 := readFixture(t, "small_51_ascii.vtk")
	repl := func(src, old, new string) string {
		if !strings.Contains(src, old) {
			t.Fatalf("fixture lacks %q", old)
		}
		return strings.Replace(src, old, new, 1)
	}
	cut := func(src, at string) string {
		i := strings.Index(src, at)
		if i < 0 {
			t.Fatalf("fixture lacks %q", at)
		}
		return src[:i]
	}
	tests := []struct {
		name, in, want string
	}{
		{"empty", "", "bad.vtk:1: not a VTK legacy file"},
		{"bad magic", repl(small, "DataFile Version", "DataFile Versio"), "bad.vtk:1: not a VTK legacy file"},
		{"version 6", repl(small, "Version 3.0", "Version 6.0"), "bad.vtk:1: unsupported file version"},
		{"version 1", repl(small, "Version 3.0", "Version 1.0"), "bad.vtk:1: unsupported file version"},
		{"version 5.2", repl(small, "Version 3.0", "Version 5.2"), "bad.vtk:1: unsupported file version"},
		{"version text", repl(small, "Version 3.0", "Version three"), "bad.vtk:1: unsupported file version"},
		{"no title", "# vtk DataFile Version 3.0\n", "bad.vtk:2: file ends after the first line"},
		{"no format", "# vtk DataFile Version 3.0\ntitle\n", "bad.vtk:3: file ends after the title"},
		{"bad format", repl(small, "\nASCII\n", "\nTEXT\n"), "bad.vtk:3: want ASCII or BINARY"},
		{"no dataset", cut(small, "DATASET"), "bad.vtk:4: file ends before the DATASET line"},
		{"not dataset", repl(small, "DATASET UNSTRUCTURED_GRID", "POINTS 3 float"), "bad.vtk:4: want a DATASET line"},
		{"polydata with CELLS", repl(small, "UNSTRUCTURED_GRID", "POLYDATA"), "bad.vtk:18: CELLS in a POLYDATA file: its cells come in VERTICES, LINES, POLYGONS and TRIANGLE_STRIPS"},
		{"structured points", repl(small, "UNSTRUCTURED_GRID", "STRUCTURED_POINTS"), "bad.vtk:4: unsupported dataset type \"structured_points\" (want UNSTRUCTURED_GRID or POLYDATA)"},
		{"negative count", repl(small, "POINTS 12", "POINTS -1"), "bad.vtk:5: POINTS: point count \"-1\" is not a count"},
		{"count not a number", repl(small, "POINTS 12", "POINTS twelve"), "bad.vtk:5: POINTS: point count"},
		{"missing type", repl(small, "POINTS 12 double", "POINTS 12"), "bad.vtk:5: POINTS: missing data type"},
		{"bad type", repl(small, "POINTS 12 double", "POINTS 12 quux"), "bad.vtk:5: POINTS: unsupported data type \"quux\""},
		{"lying count", repl(small, "POINTS 12", "POINTS 2000000000"), "bad.vtk:5: POINTS: 6000000000 values announced"},
		{"truncated points", cut(small, "21.25 21.25 0"), "bad.vtk:14: POINTS: file ends after 24 of 36 values"},
		{"truncated at end", cut(small, "102 103"), "bad.vtk:43: array node_id: 12 values announced, but only 4 bytes left"},
		{"non-numeric coordinate", repl(small, "10.5 0 0", "10.5 x 0"), "bad.vtk:7: POINTS: value 5 of 36: \"x\" is not a valid number"},
		{"nan coordinate", repl(small, "21.25 0 0", "21.25 nan 0"), "bad.vtk:8: POINTS: point 2 has a non-finite coordinate NaN"},
		{"inf coordinate", repl(small, "0 0 2.5", "0 0 1e999"), "bad.vtk:15: POINTS: point 9 has a non-finite coordinate +Inf"},
		// 1e39 is beyond the largest float32, about 3.4e38 (IEEE 754).
		{"float coordinate range", repl(repl(small, "POINTS 12 double", "POINTS 12 float"), "0 0 2.5", "0 0 1e39"), "bad.vtk:15: POINTS: point 9 has a coordinate 1e+39 beyond the range of type float"},
		{"too few points", repl(small, "POINTS 12", "POINTS 11"), "bad.vtk:17: unknown keyword \"0\""},
		{"missing point", repl(small, "3 9 10 11", "3 9 10 12"), "bad.vtk:23: CELLS: cell 4 references point 12; the file has 12 points"},
		{"negative point", repl(small, "3 9 10 11", "3 9 -1 11"), "bad.vtk:23: CELLS: cell 4 references point -1"},
		{"cells size too big", repl(small, "CELLS 6 26", "CELLS 6 27"), "bad.vtk:24: CELLS: the cells hold 26 values, the size says 27"},
		{"cells size too small", repl(small, "CELLS 6 26", "CELLS 6 25"), "bad.vtk:24: CELLS: cell 5 has 1 points, more than the size 25 leaves"},
		{"cells size below count", repl(small, "CELLS 6 26", "CELLS 6 5"), "bad.vtk:18: CELLS: size 5 is smaller than the cell count 6"},
		{"cell count word", repl(small, "4 1 2 5 4", "four 1 2 5 4"), "bad.vtk:20: CELLS: value 6 of 26: \"four\""},
		{"cell types count", repl(small, "CELL_TYPES 6", "CELL_TYPES 5"), "bad.vtk:25: CELL_TYPES: 5 cells, but 6 before"},
		{"cell type range", repl(small, "9\n5\n1\n", "9\n500\n1\n"), "bad.vtk:30: CELL_TYPES: cell 4 has type 500"},
		{"no cell types", cut(small, "CELL_TYPES"), "bad.vtk:25: CELLS without CELL_TYPES"},
		{"cell data count", repl(small, "CELL_DATA 6", "CELL_DATA 5"), "bad.vtk:32: CELL_DATA: 5 values for 6 cells"},
		{"point data count", repl(small, "POINT_DATA 12", "POINT_DATA 13"), "bad.vtk:42: POINT_DATA: 13 values for 12 points"},
		{"fractional part", repl(small, "10 10 10 10 20 20", "10 10 10.5 10 20 20"), "bad.vtk:35: array part: value 3 of 6: \"10.5\""},
		{"fractional part as float", repl(repl(small, "SCALARS part int", "SCALARS part double"), "10 10 10 10 20 20", "10 10 10.5 10 20 20"), "bad.vtk:35: array part: value 3 of 6: \"10.5\""},
		{"id out of range", repl(small, "1001 1002", "1001 99999999999999999999"), "bad.vtk:41: array element_id: value 2 of 6"},
		{"vector part", repl(small, "SCALARS part int 1", "SCALARS part int 3"), "bad.vtk:33: array part has 3 components, want 1"},
		{"second part", repl(small, "SCALARS element_id", "SCALARS part"), "bad.vtk:39: a second array part"},
		{"unknown keyword", repl(small, "CELL_DATA 6", "CELL_STUFF 6"), "bad.vtk:32: unknown keyword \"CELL_STUFF\""},
		{"scalars too early", repl(small, "CELL_DATA 6\n", ""), "bad.vtk:32: SCALARS before POINT_DATA or CELL_DATA"},
		{"zero thickness", repl(small, "1 1 1 1 1.5 1.5", "1 1 0 1 1.5 1.5"), "bad.vtk:38: cell 2: thickness 0 is not a positive number"},
		{"duplicate node id", repl(small, "101 102 103", "101 101 103"), "bad.vtk:45: node id 101 appears twice (points 0 and 1; first at line 45)"},
		{"offsets not rising", repl(small51, "0 4 8 12", "0 4 3 12"), "bad.vtk:20: OFFSETS: offset 2 is 3; offsets must rise from 0 to 20"},
		{"offsets last", repl(small51, "16 19 20", "16 19 19"), "bad.vtk:20: OFFSETS: the last offset is 19, the connectivity size 20"},
		{"no connectivity", repl(small51, "CONNECTIVITY vtktypeint64", "CONNECTIONS vtktypeint64"), "bad.vtk:21: want connectivity, found \"CONNECTIONS\""},
		{"connectivity point", repl(small51, "9 10 11 0", "9 10 11 99"), "bad.vtk:23: CONNECTIVITY: entry 19 references point 99"},
		{"field array line", repl(readFixture(t, "small_field.vtk"), "part 1 6 double", "part 1 6"), "bad.vtk:38: FIELD: want an array line"},
		{"field tuples", repl(readFixture(t, "small_field.vtk"), "part 1 6 double", "part 1 5 double"), "bad.vtk:38: array part has 5 values for 6 items"},
		{"field skipped array short", repl(readFixture(t, "small_field.vtk"), "strain 3 6 double", "strain 3 7 double"), "bad.vtk:30: array \"strain\": value 19 of 21: \"METADATA\""},
		{"string array", repl(readFixture(t, "small_field.vtk"), "TIME 1 1 double", "TIME 1 1 string"), "bad.vtk:6: FIELD array TIME: unsupported data type \"string\""},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			checkErr(t, []byte(tc.in), tc.want)
		})
	}
}

// TestErrorsASCIIValues checks that values found wrong after parsing
// (by geom.MeshFromCells) are reported at the line where they are written.
func TestErrorsASCIIValues(t *testing.T) {
	small := readFixture(t, "small_ascii.vtk")
	small51 := readFixture(t, "small_51_ascii.vtk")
	repl := func(src string, oldNew ...string) string {
		for i := 0; i < len(oldNew); i += 2 {
			if !strings.Contains(src, oldNew[i]) {
				t.Fatalf("fixture lacks %q", oldNew[i])
			}
			src = strings.Replace(src, oldNew[i], oldNew[i+1], 1)
		}
		return src
	}
	// cellsFirst moves the POINTS section after the cells, so that
	// connectivity is checked only once the mesh is built.
	lines := strings.SplitAfter(small, "\n")
	cellsFirst := strings.Join(lines[:4], "") + strings.Join(lines[17:31], "") + strings.Join(lines[4:17], "") + strings.Join(lines[31:], "")
	// A minimal quad, as in the review that asked for these lines.
	head := "# vtk DataFile Version 3.0\nt\nASCII\nDATASET UNSTRUCTURED_GRID\n" +
		"POINTS 4 float\n0 0 0\n1 0 0\n1 1 0\n0 1 0\nCELLS 1 5\n4 0 1 2 3\nCELL_TYPES 1\n9\nCELL_DATA 1\n"
	tests := []struct {
		name, in, want string
	}{
		{"quad thickness", head + "SCALARS part int 1\n1\nSCALARS thickness float 1\n-0.5\n", "bad.vtk:18: cell 0: thickness -0.5 is not a positive number"},
		{"quad part", head + "SCALARS part int 1\n-3\n", "bad.vtk:16: cell 0: part id -3 is not positive"},
		{"quad dup node_id", head + "SCALARS part int 1\n1\nPOINT_DATA 4\nSCALARS node_id int 1\n7\n8\n9\n7\n", "bad.vtk:22: node id 7 appears twice (points 0 and 3; first at line 19)"},
		{"part not positive", repl(small, "10 10 10 10 20 20", "10 10 10 10 -3 20"), "bad.vtk:35: cell 4: part id -3 is not positive"},
		{"nan thickness", repl(small, "1 1 1 1 1.5 1.5", "1 1 1\n1\nnan 1.5"), "bad.vtk:40: cell 4: thickness NaN is not a positive number"},
		{"negative thickness", repl(small, "1 1 1 1 1.5 1.5", "1 1 1\n1 -1.5 1.5"), "bad.vtk:39: cell 4: thickness -1.5 is not a positive number"},
		{"element id zero", repl(small, "1001 1002", "1001 0"), "bad.vtk:41: cell 1: element id 0 is not positive"},
		{"node id negative", repl(small, "105 106 107 108", "105 106\n107 -108"), "bad.vtk:46: point 7: node id -108 is not positive"},
		{"missing point, cells first", repl(cellsFirst, "3 9 10 11", "3 9 10 12"), "bad.vtk:10: cell 4 references point 12; the file has 12 points"},
		{"duplicate node id, two lines", repl(small, "106 107", "106\n107", "111 112", "111 104"), "bad.vtk:46: node id 104 appears twice (points 3 and 11; first at line 45)"},
		{"duplicate element id", repl(small, "1003 1004 2001", "1003\n1004 1002"), "bad.vtk:42: element id 1002 appears twice (cells 1 and 4; first at line 41)"},
		// Cell 0 is a polygon, skipped, so elements and cells differ by one.
		{"duplicate element id after skipped cell", repl(small, "CELL_TYPES 6\n9\n", "CELL_TYPES 6\n7\n", "2001", "1003"), "bad.vtk:41: element id 1003 appears twice (cells 2 and 4; first at line 41)"},
		{"type needs points", repl(small, "9\n9\n9\n9\n5", "9\n5\n9\n9\n5"), "bad.vtk:27: cell 1: type 5 (triangle) needs 3 points, has 4"},
		{"5.1 type needs points", repl(small51, "9\n9\n9\n9\n5", "9\n9\n5\n9\n5"), "bad.vtk:27: cell 2: type 5 (triangle) needs 3 points, has 4"},
		{"5.1 thickness", repl(small51, "1 1 1 1 1.5 1.5", "1 1 1 1\n0 1.5"), "bad.vtk:39: cell 4: thickness 0 is not a positive number"},
		{"5.1 duplicate node id", repl(small51, "110 111 112", "110\n111 110"), "bad.vtk:46: node id 110 appears twice (points 9 and 11; first at line 45)"},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			checkErr(t, []byte(tc.in), tc.want)
		})
	}
}

// TestLocate checks the line parser.locate gives for the values of each
// array, in both CELLS layouts.
func TestLocate(t *testing.T) {
	for _, tc := range []struct {
		file  string
		a     geom.CellArray
		index int
		line  int
	}{
		{"small_ascii.vtk", geom.ArrayPoints, 0, 6},
		{"small_ascii.vtk", geom.ArrayPoints, 11, 17},
		{"small_ascii.vtk", geom.ArrayConn, 0, 19},
		{"small_ascii.vtk", geom.ArrayConn, 3, 19},
		{"small_ascii.vtk", geom.ArrayConn, 4, 20},
		{"small_ascii.vtk", geom.ArrayConn, 18, 23},
		{"small_ascii.vtk", geom.ArrayConn, 19, 24},
		{"small_ascii.vtk", geom.ArrayOffsets, 0, 19},
		{"small_ascii.vtk", geom.ArrayOffsets, 5, 24},
		{"small_ascii.vtk", geom.ArrayTypes, 5, 31},
		{"small_ascii.vtk", geom.ArrayPart, 5, 35},
		{"small_ascii.vtk", geom.ArrayThickness, 0, 38},
		{"small_ascii.vtk", geom.ArrayElemIDs, 0, 41},
		{"small_ascii.vtk", geom.ArrayNodeIDs, 11, 45},
		{"small_51_ascii.vtk", geom.ArrayOffsets, 0, 20},
		{"small_51_ascii.vtk", geom.ArrayOffsets, 5, 20},
		{"small_51_ascii.vtk", geom.ArrayConn, 9, 22},
		{"small_51_ascii.vtk", geom.ArrayConn, 10, 23},
		{"small_51_ascii.vtk", geom.ArrayTypes, 0, 25},
		{"small_51_ascii.vtk", geom.ArrayElemIDs, 5, 41},
	} {
		p := parser{name: tc.file, data: []byte(readFixture(t, tc.file)), npoints: -1, ncells: -1}
		if err := p.parse(); err != nil {
			t.Fatal(err)
		}
		if line, off := p.locate(tc.a, tc.index); line != tc.line || off != -1 {
			t.Errorf("%s: array %d value %d: line %d, offset %d; want line %d", tc.file, tc.a, tc.index, line, off, tc.line)
		}
	}
}

// TestErrorsBinary checks that bad BINARY files give input errors that
// name the file and the byte offset.
func TestErrorsBinary(t *testing.T) {
	good := smallBinary()
	at := func(marker string) int {
		i := bytes.Index(good, []byte(marker))
		if i < 0 {
			t.Fatalf("fixture lacks %q", marker)
		}
		return i
	}
	after := func(marker string) int { return at(marker) + len(marker) } // data start after "KEYWORD ...\n"
	edit := func(f func(b []byte) []byte) []byte { return f(bytes.Clone(good)) }
	replace := func(old, new string) []byte {
		return bytes.Replace(bytes.Clone(good), []byte(old), []byte(new), 1)
	}
	pts := after("POINTS 12 float\n")
	cells := after("CELLS 6 26\n")
	types := after("CELL_TYPES 6\n")
	thick := after("SCALARS thickness float 1\nLOOKUP_TABLE default\n")
	elem := after("SCALARS element_id int 1\nLOOKUP_TABLE default\n")
	tests := []struct {
		name string
		in   []byte
		want string
	}{
		{"truncated points", good[:pts+20], fmt.Sprintf("bad.vtk: byte %d: POINTS: 36 values of type float need 144 bytes, only 20 left", at("POINTS"))},
		{"truncated cells", good[:cells+8], fmt.Sprintf("bad.vtk: byte %d: CELLS: 26 values of type int need 104 bytes, only 8 left", at("CELLS"))},
		{"inf coordinate", edit(func(b []byte) []byte {
			binary.BigEndian.PutUint32(b[pts+4*12+4:], math.Float32bits(float32(math.Inf(1))))
			return b
		}), fmt.Sprintf("bad.vtk: byte %d: POINTS: point 4 has a non-finite coordinate", pts+4*12)},
		{"nan coordinate", edit(func(b []byte) []byte {
			binary.BigEndian.PutUint32(b[pts+11*12+8:], math.Float32bits(float32(math.NaN())))
			return b
		}), fmt.Sprintf("bad.vtk: byte %d: POINTS: point 11 has a non-finite coordinate", pts+11*12)},
		{"cell count", edit(func(b []byte) []byte {
			binary.BigEndian.PutUint32(b[cells:], 40)
			return b
		}), fmt.Sprintf("bad.vtk: byte %d: CELLS: cell 0 has 40 points", cells)},
		{"missing point", edit(func(b []byte) []byte {
			binary.BigEndian.PutUint32(b[cells+4*22:], 12)
			return b
		}), fmt.Sprintf("bad.vtk: byte %d: CELLS: cell 4 references point 12", cells+4*22)},
		{"cells size", replace("CELLS 6 26", "CELLS 6 25"), fmt.Sprintf("bad.vtk: byte %d: CELLS: cell 5 has 1 points, more than the size 25 leaves", cells+4*24)},
		{"cell type", edit(func(b []byte) []byte {
			binary.BigEndian.PutUint32(b[types+8:], 1000)
			return b
		}), fmt.Sprintf("bad.vtk: byte %d: CELL_TYPES: cell 2 has type 1000", types+8)},
		{"point count one short", replace("POINTS 12 float", "POINTS 11 float"), fmt.Sprintf("bad.vtk: byte %d: unknown keyword", pts+11*12)},
		{"cell types count", replace("CELL_TYPES 6", "CELL_TYPES 7"), fmt.Sprintf("bad.vtk: byte %d: CELL_TYPES: 7 cells, but 6 before", at("CELL_TYPES"))},
		{"node id array short", good[:len(good)-10], fmt.Sprintf("bad.vtk: byte %d: array node_id: 12 values of type int need 48 bytes, only 39 left", at("SCALARS node_id"))},
		{"bad keyword", replace("CELL_DATA 6", "CELL_DATUM 6"), fmt.Sprintf("bad.vtk: byte %d: unknown keyword \"CELL_DATUM\"", at("CELL_DATA"))},
		{"zero thickness", edit(func(b []byte) []byte {
			binary.BigEndian.PutUint32(b[thick+4*3:], 0)
			return b
		}), fmt.Sprintf("bad.vtk: byte %d: cell 3: thickness 0 is not a positive number", thick+4*3)},
		{"duplicate element id", edit(func(b []byte) []byte {
			binary.BigEndian.PutUint32(b[elem+4*3:], 1001)
			return b
		}), fmt.Sprintf("bad.vtk: byte %d: element id 1001 appears twice (cells 0 and 3; first at byte %d)", elem+4*3, elem)},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			checkErr(t, tc.in, tc.want)
		})
	}
}

// TestErrorsBinaryArrays checks binary integer arrays holding values
// that are not integers in range.
func TestErrorsBinaryArrays(t *testing.T) {
	base := func(partType string, part func(e *enc)) []byte {
		var e enc
		e.line("# vtk DataFile Version 3.0")
		e.line("t")
		e.line("BINARY")
		e.line("DATASET UNSTRUCTURED_GRID")
		e.line("POINTS 3 double")
		e.f64(0, 0, 0, 1, 0, 0, 0, 1, 0)
		e.line("")
		e.line("CELLS 1 4")
		e.i32(3, 0, 1, 2)
		e.line("")
		e.line("CELL_TYPES 1")
		e.i32(5)
		e.line("")
		e.line("CELL_DATA 1")
		e.line("SCALARS part " + partType)
		e.line("LOOKUP_TABLE default")
		part(&e)
		e.line("")
		return e.b
	}
	good := base("double", func(e *enc) { e.f64(4) })
	if m, err := Parse(good, "ok.vtk", geom.ReadOptions{}); err != nil || m.Parts[0].ID != 4 {
		t.Fatalf("part 4.0 stored as double: err %v", err)
	}
	for _, tc := range []struct {
		name string
		in   []byte
	}{
		{"fraction", base("double", func(e *enc) { e.f64(4.5) })},
		{"nan", base("float", func(e *enc) { e.f32(math.NaN()) })},
		{"huge", base("double", func(e *enc) { e.f64(1e300) })},
		{"uint64", base("vtktypeuint64", func(e *enc) { e.i64(-1) })},
	} {
		t.Run(tc.name, func(t *testing.T) {
			off := bytes.LastIndex(tc.in, []byte("default\n")) + len("default\n")
			checkErr(t, tc.in, fmt.Sprintf("bad.vtk: byte %d: array part: value 1 is not an integer in range", off))
		})
	}
}

func readFixture(t *testing.T, name string) string {
	t.Helper()
	data, err := os.ReadFile(filepath.Join(formats, name))
	if err != nil {
		t.Fatal(err)
	}
	return string(data)
}

func checkErr(t *testing.T, in []byte, want string) {
	t.Helper()
	_, err := Parse(in, "bad.vtk", geom.ReadOptions{})
	if err == nil {
		t.Fatalf("no error; want %q", want)
	}
	if !errors.Is(err, geom.ErrInput) {
		t.Errorf("error %q is not an input error", err)
	}
	if !strings.Contains(err.Error(), want) {
		t.Errorf("error\n  %s\nwant it to contain\n  %s", err, want)
	}
}
