package vtk_test

import (
	"bytes"
	"errors"
	"math"
	"math/rand/v2"
	"reflect"
	"slices"
	"strings"
	"testing"

	"gonum.org/v1/gonum/spatial/r3"

	"github.com/joinery-cae/joinery/geom"
	"github.com/joinery-cae/joinery/geom/vtk"
)

// tinyMesh is a quad and a triangle of two parts; the triangle has its
// own thickness, the quad takes its part's.
func tinyMesh(t *testing.T) *geom.Mesh {
	m := &geom.Mesh{
		Parts:         []geom.Part{{ID: 5, Thickness: 1.2}, {ID: 6, Thickness: 2}},
		NodeIDs:       []int64{1, 2, 3, 4, 5},
		Coords:        []r3.Vec{{X: 0, Y: 0, Z: 0}, {X: 1, Y: 0, Z: 0}, {X: 1, Y: 1, Z: 0}, {X: 0, Y: 1, Z: 0}, {X: 0.1, Y: 1e-7, Z: -3}},
		ElemIDs:       []int64{10, 11},
		ElemPart:      []int32{0, 1},
		ElemStart:     []int32{0, 4, 7},
		Conn:          []int32{0, 1, 2, 3, 1, 4, 2},
		ElemThickness: []float64{math.NaN(), 0.75},
	}
	if err := m.Index(); err != nil {
		t.Fatal(err)
	}
	return m
}

// TestWriteASCII checks the exact ASCII output for a tiny mesh; the
// layout is the legacy format as published in "VTK File Formats"
// (Kitware, VTK User's Guide ch. 19).
func TestWriteASCII(t *testing.T) {
	var b bytes.Buffer
	if err := vtk.Write(&b, tinyMesh(t), false); err != nil {
		t.Fatal(err)
	}
	want := `# vtk DataFile Version 3.0
Joinery mesh
ASCII
DATASET UNSTRUCTURED_GRID
POINTS 5 double
0 0 0
1 0 0
1 1 0
0 1 0
0.1 1e-07 -3
CELLS 2 9
4 0 1 2 3
3 1 4 2
CELL_TYPES 2
9
5
CELL_DATA 2
SCALARS part int 1
LOOKUP_TABLE default
5
6
SCALARS thickness double 1
LOOKUP_TABLE default
1.2
0.75
SCALARS element_id int 1
LOOKUP_TABLE default
10
11
POINT_DATA 5
SCALARS node_id int 1
LOOKUP_TABLE default
1
2
3
4
5
`
	if got := b.String(); got != want {
		t.Errorf("Write ASCII:\n%s\nwant:\n%s", got, want)
	}
}

// sparseMesh is a random mesh of quads and triangles with sparse node and
// element ids in the millions, part ids beyond 32 bits and coordinates
// with all 17 significant digits.
func sparseMesh(t *testing.T, n int) *geom.Mesh {
	rng := rand.New(rand.NewPCG(7, 11))
	m := &geom.Mesh{Parts: []geom.Part{{ID: 3_000_000_001}, {ID: 42}, {ID: 7}}, ElemStart: []int32{0}}
	id := int64(2_000_000)
	for range n {
		id += 1 + rng.Int64N(1000)
		m.NodeIDs = append(m.NodeIDs, id)
		m.Coords = append(m.Coords, r3.Vec{X: rng.NormFloat64() * 1e3, Y: rng.Float64(), Z: -rng.ExpFloat64() * 1e-5})
	}
	eid := int64(5_000_000)
	for e := range 2 * n {
		eid += 1 + rng.Int64N(50)
		m.ElemIDs = append(m.ElemIDs, eid)
		m.ElemPart = append(m.ElemPart, int32(e%3))
		k := 3 + rng.IntN(2)
		start := len(m.Conn)
		for len(m.Conn) < start+k {
			p := int32(rng.IntN(n))
			if !slices.Contains(m.Conn[start:], p) {
				m.Conn = append(m.Conn, p)
			}
		}
		m.ElemStart = append(m.ElemStart, int32(len(m.Conn)))
		m.ElemThickness = append(m.ElemThickness, 0.5+rng.Float64())
	}
	if err := m.Index(); err != nil {
		t.Fatal(err)
	}
	return m
}

// TestWriteRoundTrip writes meshes in ASCII and binary and reads them
// back with the VTK reader.
func TestWriteRoundTrip(t *testing.T) {
	for _, tc := range []struct {
		name string
		m    *geom.Mesh
	}{
		{"tiny", tinyMesh(t)},
		{"sparse ids", sparseMesh(t, 300)},
	} {
		for _, binary := range []bool{false, true} {
			var b bytes.Buffer
			if err := vtk.Write(&b, tc.m, binary); err != nil {
				t.Fatal(err)
			}
			got, err := vtk.Read(bytes.NewReader(b.Bytes()), "rt.vtk", geom.ReadOptions{})
			if err != nil {
				t.Fatalf("%s binary=%v: %v", tc.name, binary, err)
			}
			if d := sameMesh(got, tc.m); d != "" {
				t.Errorf("%s binary=%v: round trip differs: %s", tc.name, binary, d)
			}
			var again bytes.Buffer
			if err := vtk.Write(&again, got, binary); err != nil {
				t.Fatal(err)
			}
			if !bytes.Equal(again.Bytes(), b.Bytes()) {
				t.Errorf("%s binary=%v: writing the mesh read back gives other bytes", tc.name, binary)
			}
		}
	}
}

// TestWriteLookupTable checks that every SCALARS line is followed by
// "LOOKUP_TABLE default": the format documentation makes the line part of
// SCALARS (VTK file-format documentation, Kitware) and VTK 9's own legacy
// reader rejects a file without it ("Lookup table must be specified with
// scalar").
func TestWriteLookupTable(t *testing.T) {
	for _, m := range []*geom.Mesh{tinyMesh(t), sparseMesh(t, 300)} {
		for _, binary := range []bool{false, true} {
			var b bytes.Buffer
			if err := vtk.Write(&b, m, binary); err != nil {
				t.Fatal(err)
			}
			data := b.Bytes()
			n := 0
			for i := bytes.Index(data, []byte("\nSCALARS ")); i >= 0; {
				rest := data[i+1:]
				end := bytes.IndexByte(rest, '\n')
				if end < 0 || !bytes.HasPrefix(rest[end+1:], []byte("LOOKUP_TABLE default\n")) {
					t.Errorf("binary=%v: %q is not followed by LOOKUP_TABLE default", binary, rest[:max(end, 0)])
				}
				n++
				j := bytes.Index(rest, []byte("\nSCALARS "))
				if j < 0 {
					break
				}
				i += 1 + j
			}
			if n < 3 {
				t.Errorf("binary=%v: %d SCALARS arrays, want at least 3 (part, element_id, node_id)", binary, n)
			}
		}
	}
}

// sameMesh compares what a VTK file carries: nodes, elements, part ids
// per element and thickness per element.
func sameMesh(got, want *geom.Mesh) string {
	var d []string
	eq := func(name string, a, b any) {
		if !reflect.DeepEqual(a, b) {
			d = append(d, name)
		}
	}
	eq("NodeIDs", got.NodeIDs, want.NodeIDs)
	eq("Coords", got.Coords, want.Coords)
	eq("ElemIDs", got.ElemIDs, want.ElemIDs)
	eq("ElemStart", got.ElemStart, want.ElemStart)
	eq("Conn", got.Conn, want.Conn)
	if got.NumElems() == want.NumElems() {
		for e := range got.NumElems() {
			if got.Part(e).ID != want.Part(e).ID {
				d = append(d, "part ids")
				break
			}
			if got.Thickness(e) != want.Thickness(e) {
				d = append(d, "thickness")
				break
			}
		}
	}
	return strings.Join(d, ", ")
}

// TestWriteNoThickness checks that the thickness array is left out
// when an element has no known thickness, and that the file reads back.
func TestWriteNoThickness(t *testing.T) {
	m := tinyMesh(t)
	m.Parts[0].Thickness = 0
	for _, binary := range []bool{false, true} {
		var b bytes.Buffer
		if err := vtk.Write(&b, m, binary); err != nil {
			t.Fatal(err)
		}
		if bytes.Contains(b.Bytes(), []byte("thickness")) {
			t.Error("thickness array written for a mesh with an unknown thickness")
		}
		got, err := vtk.Read(&b, "nothick.vtk", geom.ReadOptions{})
		if err != nil {
			t.Fatal(err)
		}
		if got.ElemThickness != nil {
			t.Errorf("thickness read back: %v", got.ElemThickness)
		}
	}
}

// TestWriteEmpty writes a mesh without nodes or elements.
func TestWriteEmpty(t *testing.T) {
	m := &geom.Mesh{ElemStart: []int32{0}}
	for _, binary := range []bool{false, true} {
		var b bytes.Buffer
		if err := vtk.Write(&b, m, binary); err != nil {
			t.Fatal(err)
		}
		got, err := vtk.Read(&b, "empty.vtk", geom.ReadOptions{})
		if err != nil {
			t.Fatal(err)
		}
		if got.NumNodes() != 0 || got.NumElems() != 0 {
			t.Errorf("empty mesh read back with %d nodes, %d elements", got.NumNodes(), got.NumElems())
		}
	}
}

type failWriter struct{ n int }

func (f *failWriter) Write(p []byte) (int, error) {
	if f.n -= len(p); f.n < 0 {
		return 0, errors.New("disk full")
	}
	return len(p), nil
}

// TestWriteError checks that a failing writer's error comes back.
func TestWriteError(t *testing.T) {
	err := vtk.Write(&failWriter{n: 100_000}, sparseMesh(t, 3000), false)
	if err == nil || !strings.Contains(err.Error(), "disk full") {
		t.Errorf("err = %v, want disk full", err)
	}
}
