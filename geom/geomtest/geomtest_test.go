package geomtest

import (
	"errors"
	"math"
	"strings"
	"testing"

	"gonum.org/v1/gonum/spatial/r3"

	"github.com/joinery-cae/joinery/geom"
)

func TestDiff(t *testing.T) {
	tests := []struct {
		name string
		edit func(m *geom.Mesh)
		want string // "" for equal meshes
	}{
		{"equal", func(*geom.Mesh) {}, ""},
		{"no parts", func(m *geom.Mesh) { m.Parts = m.Parts[:0] }, "len(Parts) = 0, want 2"},
		{"part", func(m *geom.Mesh) { m.Parts[1].Material = "x" }, "Parts[1] = "},
		{"part thickness", func(m *geom.Mesh) { m.Parts[0].Thickness = math.Copysign(0, -1) }, "Parts[0] = "},
		{"coordinate", func(m *geom.Mesh) { m.Coords[4].Z = 0 }, "Coords[4] = {X:10.5 Y:10.5 Z:0}, want {X:10.5 Y:10.5 Z:0.125}"},
		{"negative zero", func(m *geom.Mesh) { m.Coords[0].X = math.Copysign(0, -1) }, "Coords[0] = {X:-0 "},
		{"short", func(m *geom.Mesh) { m.Conn = m.Conn[:18] }, "len(Conn) = 18, want 19"},
		{"element part", func(m *geom.Mesh) { m.ElemPart[4] = 0 }, "ElemPart[4] = 0, want 1"},
		{"thickness nil", func(m *geom.Mesh) { m.ElemThickness = nil }, "ElemThickness = [], want [1 1 1 1 1.5] (one of them nil)"},
		{"thickness", func(m *geom.Mesh) { m.ElemThickness[2] = math.NaN() }, "ElemThickness[2] = NaN, want 1"},
		{"file", func(m *geom.Mesh) { m.Sources[0].File = "b" }, "Sources[0] = {File:b "},
		{"skipped", func(m *geom.Mesh) { m.Sources[0].Skipped[3] = 1 }, "Sources[0] = "},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			got := Small("a")
			tt.edit(got)
			d := Diff(got, Small("a"))
			if (tt.want == "") != (d == "") || !strings.HasPrefix(d, tt.want) {
				t.Errorf("Diff = %q, want %q", d, tt.want)
			}
		})
	}
	empty := &geom.Mesh{Parts: []geom.Part{}, Conn: []int32{}, Sources: []geom.Source{{Skipped: geom.SkippedCells{}}}}
	if d := Diff(empty, &geom.Mesh{Sources: []geom.Source{{}}}); d != "" {
		t.Errorf("empty against nil: %s", d)
	}
	nan := Small("a")
	nan.ElemThickness[0] = math.NaN()
	other := Small("a")
	other.ElemThickness[0] = math.Float64frombits(math.Float64bits(math.NaN()) | 1)
	if d := Diff(nan, other); d != "" {
		t.Errorf("NaN against NaN: %s", d)
	}
}

func TestGrid(t *testing.T) {
	m := Grid(GridSpec{NX: 2, NY: 1})
	want := &geom.Mesh{
		// Counted by hand: points row by row, quads counterclockwise seen from +z.
		Parts:     []geom.Part{{ID: 1}},
		NodeIDs:   []int64{1, 2, 3, 4, 5, 6},
		Coords:    []r3.Vec{{X: 0}, {X: 1}, {X: 2}, {Y: 1}, {X: 1, Y: 1}, {X: 2, Y: 1}},
		ElemIDs:   []int64{1, 2},
		ElemPart:  []int32{0, 0},
		ElemStart: []int32{0, 4, 8},
		Conn:      []int32{0, 1, 4, 3, 1, 2, 5, 4},
	}
	if d := Diff(m, want); d != "" {
		t.Error(d)
	}
	m = Grid(GridSpec{
		NX: 3, NY: 2,
		Node:        func(i, j int) r3.Vec { return r3.Vec{X: 2 * float64(i), Y: 3 * float64(j), Z: 1} },
		Parts:       []geom.Part{{ID: 7}, {ID: 8}},
		Part:        func(_, j int) int32 { return int32(j) },
		FirstNodeID: 100,
		FirstElemID: 50,
	})
	if err := CheckMesh(m); err != nil {
		t.Fatal(err)
	}
	if m.NodeIDs[0] != 100 || m.ElemIDs[5] != 55 || m.Coords[11] != (r3.Vec{X: 6, Y: 6, Z: 1}) || m.Part(4).ID != 8 {
		t.Errorf("grid: node id %d, element id %d, last point %v, part of element 4 %d",
			m.NodeIDs[0], m.ElemIDs[5], m.Coords[11], m.Part(4).ID)
	}
}

func TestCheckMesh(t *testing.T) {
	tests := []struct {
		name string
		edit func(m *geom.Mesh)
		want string // "" for a consistent mesh
	}{
		{"consistent", func(*geom.Mesh) {}, ""},
		{"node ids", func(m *geom.Mesh) { m.NodeIDs = m.NodeIDs[:11] }, "11 node ids for 12 nodes"},
		{"starts", func(m *geom.Mesh) { m.ElemStart = m.ElemStart[:5] }, "5 elements, 5 part indices, 5 starts (want 6)"},
		{"conn", func(m *geom.Mesh) { m.Conn = append(m.Conn, 0) }, "starts run from 0 to 19, want 0 to 20 (len(Conn))"},
		{"thickness", func(m *geom.Mesh) { m.ElemThickness = m.ElemThickness[:4] }, "4 thicknesses for 5 elements"},
		{"five nodes", func(m *geom.Mesh) { m.ElemStart[4] = 17 }, "element 3 (id 1004) has 5 nodes, want 3, 4, 6, 8 or 9"},
		{"node index", func(m *geom.Mesh) { m.Conn[18] = 12 }, "element 4 (id 2001): node index 12 out of range (12 nodes)"},
		{"part index", func(m *geom.Mesh) { m.ElemPart[1] = -1 }, "element 1 (id 1002): part index -1 out of range (2 parts)"},
		{"element id", func(m *geom.Mesh) { m.ElemIDs[0] = 9 }, "ElemIndex(9) = -1, false; want 0"},
		{"node id", func(m *geom.Mesh) { m.NodeIDs[2] = 104 }, "NodeIndex(104) = 3, true; want 2"},
		{"part id", func(m *geom.Mesh) { m.Parts[1].ID = 30 }, "PartIndex(30) = 0, false; want 1"},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			m := Small("a")
			if err := m.Index(); err != nil {
				t.Fatal(err)
			}
			tt.edit(m)
			got := ""
			if err := CheckMesh(m); err != nil {
				got = err.Error()
			}
			if got != tt.want {
				t.Errorf("CheckMesh = %q, want %q", got, tt.want)
			}
		})
	}
}

func TestCheckRead(t *testing.T) {
	good := Small("a")
	if err := good.Index(); err != nil {
		t.Fatal(err)
	}
	bad := Small("a")
	bad.Conn[0] = 99
	tests := []struct {
		name string
		m    *geom.Mesh
		err  error
		ok   bool
	}{
		{"mesh", good, nil, true},
		{"input error", nil, geom.FileError("f", "bad"), true},
		{"other error", nil, errors.New("disk on fire"), false},
		{"inconsistent mesh", bad, nil, false},
	}
	for _, tt := range tests {
		if err := CheckRead(tt.m, tt.err); (err == nil) != tt.ok {
			t.Errorf("%s: CheckRead = %v, want ok %v", tt.name, err, tt.ok)
		}
	}
}
