package native

import (
	"errors"
	"fmt"
	"math"
	"path/filepath"
	"slices"
	"strings"
	"testing"

	"gonum.org/v1/gonum/spatial/r3"

	"github.com/joinery-cae/joinery/geom"
	"github.com/joinery-cae/joinery/geom/geomtest"
)

// smallMesh is the shared "small" fixture (testdata/formats/README.md) as testdata/native/small.jmesh at path holds it: without
// its vertex cell, so nothing skipped, and with the thickness per part
// (10: 1, 20: 1.5) instead of per element.
func smallMesh(path string) *geom.Mesh {
	m := geomtest.Small(path)
	m.Parts[0].Thickness, m.Parts[1].Thickness = 1, 1.5
	m.ElemThickness = nil
	m.Sources[0].Skipped = nil
	return m
}

func TestReadSmall(t *testing.T) {
	path := filepath.Join("..", "..", "testdata", "native", "small.jmesh")
	m, err := ReadFile(path, geom.ReadOptions{})
	if err != nil {
		t.Fatal(err)
	}
	if d := geomtest.Diff(m, smallMesh(path)); d != "" {
		t.Fatal(d)
	}
	if len(m.Sources) != 1 || m.Sources[0].File != path || m.Sources[0].Skipped != nil {
		t.Errorf("Sources = %+v", m.Sources)
	}
	for id, want := range map[int64]int32{101: 0, 105: 4, 112: 11} {
		if got, ok := m.NodeIndex(id); !ok || got != want {
			t.Errorf("NodeIndex(%d) = %d, %v; want %d", id, got, ok, want)
		}
	}
	if got, ok := m.ElemIndex(2001); !ok || got != 4 {
		t.Errorf("ElemIndex(2001) = %d, %v", got, ok)
	}
	if th := m.Thickness(4); th != 1.5 {
		t.Errorf("Thickness(2001) = %g, want 1.5", th)
	}
}

// TestReadLayout reads files that use the freedoms of the format: records
// in any order, comments, blank lines, tabs, CRLF line ends, a missing
// final newline, part attributes and per-element thickness.
func TestReadLayout(t *testing.T) {
	tests := []struct {
		name  string
		input string
		want  func(m *geom.Mesh)
	}{
		{
			name: "shells before nodes, parts last",
			input: "# leading comment\n\njoinery-mesh 1 # version\n" +
				"shell 7 3 30 10 20 t=0.75\n" +
				"shell 5 4 10 20 40 30\n" +
				"\tnode 10 0 0 0\n  node 20 1 0 0 # second\nnode 30 1 1 0\nnode 40 0 1 0\n" +
				"part 4 thickness=2 surface=top material=HX340 name= inner  roof  # not a comment\n" +
				"part 3",
			want: func(m *geom.Mesh) {
				m.Parts = []geom.Part{
					{ID: 4, Thickness: 2, Surface: geom.SurfaceTop, Material: "HX340", Name: "inner  roof  # not a comment"},
					{ID: 3},
				}
				m.NodeIDs = []int64{10, 20, 30, 40}
				m.Coords = []r3.Vec{{}, {X: 1}, {X: 1, Y: 1}, {Y: 1}}
				m.ElemIDs = []int64{7, 5}
				m.ElemPart = []int32{1, 0}
				m.ElemStart = []int32{0, 3, 7}
				m.Conn = []int32{2, 0, 1, 0, 1, 3, 2}
				m.ElemThickness = []float64{0.75, math.NaN()}
			},
		},
		{
			name:  "CRLF and undeclared parts in order of use",
			input: "joinery-mesh 1\r\nnode 1 1e3 -2.5E-1 +3.\r\nnode 2 .5 0 -0\r\nnode 3 0 0 0\r\nshell 9 20 1 2 3\r\nshell 8 10 3 2 1\r\nshell 7 20 1 3 2\r\n",
			want: func(m *geom.Mesh) {
				m.Parts = []geom.Part{{ID: 20}, {ID: 10}}
				m.NodeIDs = []int64{1, 2, 3}
				m.Coords = []r3.Vec{{X: 1000, Y: -0.25, Z: 3}, {X: 0.5, Z: math.Copysign(0, -1)}, {}}
				m.ElemIDs = []int64{9, 8, 7}
				m.ElemPart = []int32{0, 1, 0}
				m.ElemStart = []int32{0, 3, 6, 9}
				m.Conn = []int32{0, 1, 2, 2, 1, 0, 0, 2, 1}
			},
		},
		{
			name:  "sparse huge ids",
			input: "joinery-mesh 1\nnode 9223372036854775807 1 2 3\nnode 1 0 0 0\nnode 500000000000 4 5 6\nshell 9000000000000000000 123456789012 1 500000000000 9223372036854775807\n",
			want: func(m *geom.Mesh) {
				m.Parts = []geom.Part{{ID: 123456789012}}
				m.NodeIDs = []int64{math.MaxInt64, 1, 500000000000}
				m.Coords = []r3.Vec{{X: 1, Y: 2, Z: 3}, {}, {X: 4, Y: 5, Z: 6}}
				m.ElemIDs = []int64{9000000000000000000}
				m.ElemPart = []int32{0}
				m.ElemStart = []int32{0, 3}
				m.Conn = []int32{1, 2, 0}
			},
		},
		{
			name:  "header only",
			input: "joinery-mesh 1",
			want:  func(m *geom.Mesh) { m.ElemStart = []int32{0} },
		},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			want := &geom.Mesh{Sources: []geom.Source{{File: "t.jmesh"}}}
			tt.want(want)
			for n := 1; n <= 5; n++ {
				m, err := parseSplit([]byte(tt.input), "t.jmesh", n)
				if err != nil {
					t.Fatalf("%d pieces: %v", n, err)
				}
				if d := geomtest.Diff(m, want); d != "" {
					t.Fatalf("%d pieces: %s", n, d)
				}
			}
		})
	}
}

func TestReadErrors(t *testing.T) {
	const h = "joinery-mesh 1\n"
	nodes := "node 1 0 0 0\nnode 2 1 0 0\nnode 3 1 1 0\n"
	tests := []struct {
		name  string
		input string
		want  string // full message after "t.jmesh"
	}{
		{"empty", "", `t.jmesh: no records: a mesh file starts with the line "joinery-mesh 1"`},
		{"comments only", "# x\n\n", `t.jmesh: no records: a mesh file starts with the line "joinery-mesh 1"`},
		{"no header", "node 1 0 0 0\n", `t.jmesh:1: not a Joinery mesh: the first record must be "joinery-mesh 1"`},
		{"header without version", "# c\njoinery-mesh\n", `t.jmesh:2: header has no format version (want "joinery-mesh 1")`},
		{"future version", "joinery-mesh 2\n", `t.jmesh:1: format version "2" is not supported (this reader reads version 1)`},
		{"header extra", "joinery-mesh 1 x\n", `t.jmesh:1: header has extra fields (want "joinery-mesh 1")`},
		{"header twice", h + nodes + h, `t.jmesh:5: the header "joinery-mesh 1" may only be the first record`},
		{"unknown record", h + "nodes 1 0 0 0\n", `t.jmesh:2: unknown record "nodes" (want part, node or shell)`},
		{"node few fields", h + "node 1 0 0\n", `t.jmesh:2: node record needs an id and 3 coordinates, has 3 fields`},
		{"node many fields", h + "node 1 0 0 0 0\n", `t.jmesh:2: node record needs an id and 3 coordinates, has 5 fields`},
		{"node id text", h + "node a 0 0 0\n", `t.jmesh:2: node id "a" is not an integer`},
		{"node id overflow", h + "node 9223372036854775808 0 0 0\n", `t.jmesh:2: node id "9223372036854775808" is not an integer`},
		{"node id zero", h + "node 0 0 0 0\n", `t.jmesh:2: node id 0 is not positive`},
		{"node id negative", h + "node -4 0 0 0\n", `t.jmesh:2: node id -4 is not positive`},
		{"coordinate text", h + "node 1 0 1,5 0\n", `t.jmesh:2: node 1: y coordinate "1,5" is not a finite decimal number`},
		{"coordinate NaN", h + "node 1 0 0 NaN\n", `t.jmesh:2: node 1: z coordinate "NaN" is not a finite decimal number`},
		{"coordinate Inf", h + "node 1 inf 0 0\n", `t.jmesh:2: node 1: x coordinate "inf" is not a finite decimal number`},
		{"coordinate overflow", h + "node 1 1e309 0 0\n", `t.jmesh:2: node 1: x coordinate "1e309" is not a finite decimal number`},
		{"coordinate hex", h + "node 1 0x1p3 0 0\n", `t.jmesh:2: node 1: x coordinate "0x1p3" is not a finite decimal number`},
		{"duplicate node", h + nodes + "# c\nnode 2 5 5 5\n", `t.jmesh:6: node 2 already defined on line 3`},
		{"shell empty", h + "shell\n", `t.jmesh:2: shell record needs an element id, a part id and 3, 4, 6, 8 or 9 node ids`},
		{"shell id text", h + "shell x 1 1 2 3\n", `t.jmesh:2: shell id "x" is not an integer`},
		{"shell id zero", h + "shell 0 1 1 2 3\n", `t.jmesh:2: shell id 0 is not positive`},
		{"shell no part", h + "shell 5\n", `t.jmesh:2: shell 5: no part id`},
		{"shell part text", h + "shell 5 p 1 2 3\n", `t.jmesh:2: shell 5: part id "p" is not an integer`},
		{"shell part zero", h + "shell 5 0 1 2 3\n", `t.jmesh:2: shell 5: part id 0 is not positive`},
		{"shell two nodes", h + nodes + "shell 5 1 1 2\n", `t.jmesh:5: shell 5: needs 3, 4, 6, 8 or 9 node ids, has 2`},
		{"shell five nodes", h + nodes + "shell 5 1 1 2 3 1 2\n", `t.jmesh:5: shell 5: needs 3, 4, 6, 8 or 9 node ids, has 5`},
		{"shell ten nodes", h + nodes + "shell 5 1 1 2 3 1 2 3 1 2 3 1\n", `t.jmesh:5: shell 5: needs 3, 4, 6, 8 or 9 node ids, has 10`},
		{"shell node text", h + "shell 5 1 1 2 x\n", `t.jmesh:2: shell 5: node id "x" is not an integer`},
		{"shell node negative", h + "shell 5 1 1 2 -3\n", `t.jmesh:2: shell 5: node id -3 is not positive`},
		{"shell missing node", h + nodes + "shell 5 1 1 2 3\nshell 6 1 1 2 4\n", `t.jmesh:6: shell 6: node 4 is not defined in the file`},
		{"shell thickness zero", h + nodes + "shell 5 1 1 2 3 t=0\n", `t.jmesh:5: shell 5: thickness "0" is not a positive finite number`},
		{"shell thickness negative", h + nodes + "shell 5 1 1 2 3 t=-1\n", `t.jmesh:5: shell 5: thickness "-1" is not a positive finite number`},
		{"shell thickness text", h + nodes + "shell 5 1 1 2 3 t=x\n", `t.jmesh:5: shell 5: thickness "x" is not a positive finite number`},
		{"shell thickness not last", h + nodes + "shell 5 1 1 2 t=1 3\n", `t.jmesh:5: shell 5: 1 fields after the thickness, which must come last`},
		{"duplicate shell", h + nodes + "shell 5 1 1 2 3\nshell 6 1 1 2 3\nshell 5 1 3 2 1\n", `t.jmesh:7: shell 5 already defined on line 5`},
		{"part no id", h + "part\n", `t.jmesh:2: part record needs a part id`},
		{"part id text", h + "part x\n", `t.jmesh:2: part id "x" is not an integer`},
		{"part id negative", h + "part -1\n", `t.jmesh:2: part id -1 is not positive`},
		{"part field", h + "part 1 thick\n", `t.jmesh:2: part 1: field "thick" is not key=value`},
		{"part key", h + "part 1 colour=red\n", `t.jmesh:2: part 1: unknown key "colour" (want thickness, surface, material or name)`},
		{"part key twice", h + "part 1 material=a material=b\n", `t.jmesh:2: part 1: material given twice`},
		{"part empty value", h + "part 1 material=\n", `t.jmesh:2: part 1: material has no value`},
		{"part empty name", h + "part 1 name=  \n", `t.jmesh:2: part 1: name has no value`},
		{"part thickness", h + "part 1 thickness=-2\n", `t.jmesh:2: part 1: thickness "-2" is not a positive finite number`},
		{"part surface", h + "part 1 surface=side\n", `t.jmesh:2: part 1: unknown reference surface "side" (want mid, top or bottom)`},
		{"duplicate part", h + "part 1\npart 2\npart 1 thickness=1\n", `t.jmesh:4: part 1 already defined on line 2`},
		{"truncated last line", h + "node 1 0 0", `t.jmesh:2: node record needs an id and 3 coordinates, has 3 fields (the last line has no newline: is the file truncated?)`},
		{"truncated number", h + "node 1 0 0 1e", `t.jmesh:2: node 1: z coordinate "1e" is not a finite decimal number (the last line has no newline: is the file truncated?)`},
		// Errors found once every record is read get the hint too.
		{"truncated node id", h + "node 1 0 0 0\nnode 2 1 0 0\nnode 3 1 1 0\nshell 1 5 1 2 9", `t.jmesh:5: shell 1: node 9 is not defined in the file (the last line has no newline: is the file truncated?)`},
		{"duplicate on a truncated line", h + "node 1 0 0 0\nnode 2 1 0 0\nnode 3 1 1 0\nshell 1 5 1 2 3\nshell 1 5 1 3 2", `t.jmesh:6: shell 1 already defined on line 5 (the last line has no newline: is the file truncated?)`},
		{"duplicate part, truncated", h + "part 1\npart 1", `t.jmesh:3: part 1 already defined on line 2 (the last line has no newline: is the file truncated?)`},
		{"undefined node, not last", h + "node 1 0 0 0\nnode 2 1 0 0\nshell 1 5 1 2 9\nnode 3 1 1 0", `t.jmesh:4: shell 1: node 9 is not defined in the file`},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			for n := 1; n <= 4; n++ {
				_, err := parseSplit([]byte(tt.input), "t.jmesh", n)
				if err == nil {
					t.Fatalf("%d pieces: no error, want %s", n, tt.want)
				}
				if err.Error() != tt.want {
					t.Fatalf("%d pieces:\n got %s\nwant %s", n, err, tt.want)
				}
				if !errors.Is(err, geom.ErrInput) {
					t.Errorf("%v does not match geom.ErrInput", err)
				}
			}
		})
	}
}

// TestReadSplit checks that a file reads the same in any number of pieces,
// on a grid large enough for every piece to hold records of each kind.
func TestReadSplit(t *testing.T) {
	data := gridFile(30, 20, true)
	want, err := parseSplit(data, "grid", 1)
	if err != nil {
		t.Fatal(err)
	}
	if want.NumElems() <= 30*20 || want.NumNodes() != 31*21 || want.ElemThickness == nil {
		t.Fatalf("grid has %d elements, %d nodes", want.NumElems(), want.NumNodes())
	}
	for n := 2; n <= 9; n++ {
		m, err := parseSplit(data, "grid", n)
		if err != nil {
			t.Fatal(err)
		}
		if d := geomtest.Diff(m, want); d != "" {
			t.Fatalf("%d pieces: %s", n, d)
		}
	}
	// The same records in layouts that the fast paths leave to the
	// general code must read the same.
	variants := map[string]string{
		"tabs":     strings.ReplaceAll(string(data), " ", "\t"),
		"blanks":   strings.ReplaceAll(string(data), " ", "  \r "),
		"comments": strings.ReplaceAll(string(data), "\n", " # c\n"),
		"crlf":     strings.ReplaceAll(string(data), "\n", "\r\n"),
		"indent":   strings.ReplaceAll(string(data), "\n", "\n "),
	}
	for name, v := range variants {
		// name= takes the rest of its line, blanks and comment included.
		for _, edited := range []string{"grid band # c", "grid\tband", "grid  \r band"} {
			v = strings.ReplaceAll(v, edited, "grid band")
		}
		m, err := parseSplit([]byte(v), "grid", 3)
		if err != nil {
			t.Fatalf("%s: %v", name, err)
		}
		if d := geomtest.Diff(m, want); d != "" {
			t.Fatalf("%s: %s", name, d)
		}
	}
}

// TestReadSplitErrors checks that errors deep in a file that is read in
// pieces are the first in file order and name the right line.
func TestReadSplitErrors(t *testing.T) {
	data := string(gridFile(30, 20, false))
	lines := strings.SplitAfter(data, "\n")
	edit := func(line int, text string) string {
		l := slices.Clone(lines)
		l[line-1] = text
		return strings.Join(l, "")
	}
	nodeLine := slices.IndexFunc(lines, func(s string) bool { return strings.HasPrefix(s, "node ") }) + 1
	shellLine := slices.IndexFunc(lines, func(s string) bool { return strings.HasPrefix(s, "shell ") }) + 1
	last := len(lines) - 1 // the final element is empty after the last newline
	tests := []struct {
		input string
		want  string
	}{
		{edit(last, "shell 1 1 1 2 x\n"), fmt.Sprintf(`grid:%d: shell 1: node id "x" is not an integer`, last)},
		{edit(last-100, "nod 1\n"), fmt.Sprintf(`grid:%d: unknown record "nod" (want part, node or shell)`, last-100)},
		{edit(last, fmt.Sprintf("node %d 0 0 0\n", 1000001+5)), fmt.Sprintf(`grid:%d: node 1000006 already defined on line %d`, last, nodeLine+5)},
		{edit(last, "shell 5000001 1 1000001 1000002 1000003\n"), fmt.Sprintf(`grid:%d: shell 5000001 already defined on line %d`, last, shellLine)},
		{edit(last-3, "shell 1 1 1000001 1000002 7\n"), fmt.Sprintf(`grid:%d: shell 1: node 7 is not defined in the file`, last-3)},
		{edit(last-3, "shell 1 1 1000001 1000002 7\n") + "shell 2 1 8 1000001 1000002\n", fmt.Sprintf(`grid:%d: shell 1: node 7 is not defined in the file`, last-3)},
	}
	for i, tt := range tests {
		for n := 1; n <= 4; n++ {
			_, err := parseSplit([]byte(tt.input), "grid", n)
			if err == nil || err.Error() != tt.want {
				t.Errorf("case %d, %d pieces:\n got %v\nwant %s", i, n, err, tt.want)
			}
		}
	}
}

func TestReadFileMissing(t *testing.T) {
	_, err := ReadFile(filepath.Join(t.TempDir(), "none.jmesh"), geom.ReadOptions{})
	if !errors.Is(err, geom.ErrInput) || !strings.HasPrefix(err.Error(), "native: ") {
		t.Fatalf("err = %v, want an input error from package native", err)
	}
}

func TestReadReader(t *testing.T) {
	m, err := Read(strings.NewReader("joinery-mesh 1\nnode 1 0 0 0\n"), "r", geom.ReadOptions{})
	if err != nil || m.NumNodes() != 1 {
		t.Fatalf("Read = %v, %v", m, err)
	}
}
