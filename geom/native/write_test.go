package native

import (
	"bytes"
	"errors"
	"io"
	"math"
	"math/rand/v2"
	"path/filepath"
	"runtime"
	"strings"
	"testing"

	"github.com/joinery-cae/joinery/geom"
	"github.com/joinery-cae/joinery/geom/geomtest"
	"gonum.org/v1/gonum/spatial/r3"
)

// nativeSmall is the shared "small" fixture as a mesh: 12 nodes, four
// quads of part 10 (1 mm) and a triangle of part 20 (1.5 mm).
func nativeSmall(t testing.TB) *geom.Mesh {
	t.Helper()
	m, err := ReadFile(filepath.Join("..", "..", "testdata", "native", "small.jmesh"), geom.ReadOptions{})
	if err != nil {
		t.Fatal(err)
	}
	return m
}

func TestWriteSmall(t *testing.T) {
	const want = `joinery-mesh 1
part 10 thickness=1
part 20 thickness=1.5

node 101 0 0 0
node 102 10.5 0 0
node 103 21.25 0 0
node 104 0 10.5 0
node 105 10.5 10.5 0.125
node 106 21.25 10.5 0
node 107 0 21.25 0
node 108 10.5 21.25 0
node 109 21.25 21.25 0
node 110 0 0 2.5
node 111 10.5 0 2.5
node 112 0 10.5 2.5

shell 1001 10 101 102 105 104
shell 1002 10 102 103 106 105
shell 1003 10 104 105 108 107
shell 1004 10 105 106 109 108
shell 2001 20 110 111 112
`
	var buf bytes.Buffer
	if err := Write(&buf, nativeSmall(t)); err != nil {
		t.Fatal(err)
	}
	if got := buf.String(); got != want {
		t.Errorf("Write:\n%s\nwant:\n%s", got, want)
	}
}

// randomMesh returns a mesh of n nodes and about n elements, triangles and
// quads, with sparse ids up to the int64 limit, full-precision coordinates
// of every magnitude, parts with every attribute, and element thicknesses
// on some elements.
func randomMesh(rng *rand.Rand, n int) *geom.Mesh {
	m := &geom.Mesh{
		Parts: []geom.Part{
			{ID: 7, Thickness: 0.75, Surface: geom.SurfaceTop, Material: "DC04", Name: "floor panel # front"},
			{ID: math.MaxInt64},
			{ID: 3, Thickness: 1.0 / 3, Surface: geom.SurfaceBottom},
			{ID: 1, Name: "Ünïcode näme"},
		},
		ElemStart:     []int32{0},
		ElemThickness: []float64{},
	}
	used := map[int64]bool{}
	sparse := func() int64 {
		for {
			id := rng.Int64N(math.MaxInt64) + 1
			if rng.IntN(3) == 0 {
				id = rng.Int64N(10*int64(n)) + 1
			}
			if !used[id] {
				used[id] = true
				return id
			}
		}
	}
	coord := func() float64 {
		switch rng.IntN(4) {
		case 0:
			return (rng.Float64() - 0.5) * 4000
		case 1:
			return rng.NormFloat64() * math.Pow(10, float64(rng.IntN(600)-300))
		case 2:
			return math.Round(rng.Float64()*1e6) / 1e3
		}
		return math.Copysign(0, float64(rng.IntN(2))-0.5)
	}
	for range n {
		m.NodeIDs = append(m.NodeIDs, sparse())
		m.Coords = append(m.Coords, r3.Vec{X: coord(), Y: coord(), Z: coord()})
	}
	clear(used)
	for range n {
		m.ElemIDs = append(m.ElemIDs, sparse())
		m.ElemPart = append(m.ElemPart, int32(rng.IntN(len(m.Parts))))
		k := 3 + rng.IntN(2)
		for range k {
			m.Conn = append(m.Conn, int32(rng.IntN(n)))
		}
		m.ElemStart = append(m.ElemStart, int32(len(m.Conn)))
		th := math.NaN()
		if rng.IntN(3) == 0 {
			th = rng.Float64()*3 + 0.01
		}
		m.ElemThickness = append(m.ElemThickness, th)
	}
	return m
}

// diffMesh returns the first difference between two meshes, comparing
// floats by their bits (NaN equal to NaN), or "".
func diffMesh(got, want *geom.Mesh) string {
	eqF := func(a, b float64) bool {
		return math.Float64bits(a) == math.Float64bits(b) || (math.IsNaN(a) && math.IsNaN(b))
	}
	switch {
	case len(got.Parts) != len(want.Parts):
		return "part count"
	case len(got.NodeIDs) != len(want.NodeIDs) || len(got.ElemIDs) != len(want.ElemIDs) || len(got.Conn) != len(want.Conn):
		return "sizes"
	}
	// A nil ElemThickness and one of NaNs mean the same.
	elemT := func(m *geom.Mesh, e int) float64 {
		if m.ElemThickness == nil {
			return math.NaN()
		}
		return m.ElemThickness[e]
	}
	for i := range want.Parts {
		g, w := got.Parts[i], want.Parts[i]
		if g.ID != w.ID || !eqF(g.Thickness, w.Thickness) || g.Surface != w.Surface || g.Material != w.Material || g.Name != w.Name {
			return "part " + w.Name
		}
	}
	for i := range want.NodeIDs {
		g, w := got.Coords[i], want.Coords[i]
		if got.NodeIDs[i] != want.NodeIDs[i] || !eqF(g.X, w.X) || !eqF(g.Y, w.Y) || !eqF(g.Z, w.Z) {
			return "node"
		}
	}
	for e := range want.ElemIDs {
		if got.ElemIDs[e] != want.ElemIDs[e] || got.ElemPart[e] != want.ElemPart[e] || got.ElemStart[e+1] != want.ElemStart[e+1] {
			return "element"
		}
		if !eqF(elemT(got, e), elemT(want, e)) {
			return "element thickness"
		}
	}
	for k := range want.Conn {
		if got.Conn[k] != want.Conn[k] {
			return "connectivity"
		}
	}
	return ""
}

func TestWriteRoundTrip(t *testing.T) {
	rng := rand.New(rand.NewPCG(1, 2))
	for _, n := range []int{1, 10, 1000, nativeBlock + 17} {
		want := randomMesh(rng, n)
		var first bytes.Buffer
		if err := Write(&first, want); err != nil {
			t.Fatal(err)
		}
		// The random values span every float64 magnitude, to test the
		// writer's number forms; a tiny Scale keeps them inside the
		// reader's plausible ranges (geom.MaxCoordinate).
		got, err := Read(bytes.NewReader(first.Bytes()), "rt.jmesh", geom.ReadOptions{Scale: 1e-300})
		if err != nil {
			t.Fatalf("n=%d: %v", n, err)
		}
		if d := diffMesh(got, want); d != "" {
			t.Fatalf("n=%d: read back differs in %s", n, d)
		}
		var second bytes.Buffer
		if err := Write(&second, got); err != nil {
			t.Fatal(err)
		}
		if !bytes.Equal(first.Bytes(), second.Bytes()) {
			t.Fatalf("n=%d: second write differs from the first", n)
		}
	}
}

// TestWriteProcs checks that the output does not depend on the
// number of goroutines formatting it.
func TestWriteProcs(t *testing.T) {
	m := randomMesh(rand.New(rand.NewPCG(3, 4)), 2*nativeBlock+3)
	var outs [][]byte
	for _, p := range []int{1, 2, 5} {
		old := runtime.GOMAXPROCS(p)
		var buf bytes.Buffer
		err := Write(&buf, m)
		runtime.GOMAXPROCS(old)
		if err != nil {
			t.Fatal(err)
		}
		outs = append(outs, buf.Bytes())
	}
	for i := 1; i < len(outs); i++ {
		if !bytes.Equal(outs[0], outs[i]) {
			t.Fatalf("output %d differs from output 0", i)
		}
	}
}

func TestWriteNameTrimmed(t *testing.T) {
	m := nativeSmall(t)
	m.Parts[0].Name = "  roof  "
	var buf bytes.Buffer
	if err := Write(&buf, m); err != nil {
		t.Fatal(err)
	}
	if !strings.Contains(buf.String(), "part 10 thickness=1 name=roof\n") {
		t.Errorf("name not trimmed:\n%s", buf.String())
	}
}

func TestWriteErrors(t *testing.T) {
	tests := []struct {
		name string
		edit func(m *geom.Mesh)
		want string
	}{
		{"coords", func(m *geom.Mesh) { m.Coords = m.Coords[1:] }, "11 coordinates for 12 node ids"},
		{"parts", func(m *geom.Mesh) { m.ElemPart = m.ElemPart[1:] }, "4 element parts for 5 element ids"},
		{"thickness length", func(m *geom.Mesh) { m.ElemThickness = []float64{1} }, "1 element thicknesses for 5 element ids"},
		{"starts", func(m *geom.Mesh) { m.ElemStart = m.ElemStart[1:] }, "5 element starts for 5 element ids"},
		{"part id", func(m *geom.Mesh) { m.Parts[1].ID = 0 }, "part 1: id 0 is not positive"},
		{"part thickness", func(m *geom.Mesh) { m.Parts[0].Thickness = -1 }, "part 10: thickness -1 is neither positive nor unset (0)"},
		{"part thickness NaN", func(m *geom.Mesh) { m.Parts[0].Thickness = math.NaN() }, "part 10: thickness NaN is neither positive nor unset (0)"},
		{"name", func(m *geom.Mesh) { m.Parts[0].Name = "a\nb" }, `part 10: name "a\nb" has a control character`},
		{"material", func(m *geom.Mesh) { m.Parts[0].Material = "DC 04" }, `part 10: material "DC 04" has a blank or a control character`},
		{"node id", func(m *geom.Mesh) { m.NodeIDs[3] = -1 }, "node 3: id -1 is not positive"},
		{"coordinate", func(m *geom.Mesh) { m.Coords[0].Y = math.Inf(1) }, "node 101: coordinate (0, +Inf, 0) is not finite"},
		{"conn length", func(m *geom.Mesh) { m.Conn = m.Conn[:18] }, "element starts run from 0 to 19 over 18 connectivity entries"},
		{"element id", func(m *geom.Mesh) { m.ElemIDs[2] = 0 }, "element 2: id 0 is not positive"},
		{"element size", func(m *geom.Mesh) { m.ElemStart[1] = 2 }, "element 1001: 2 nodes (want 3, 4, 6, 8 or 9)"},
		{"node index", func(m *geom.Mesh) { m.Conn[5] = 12 }, "element 1002: node index 12 outside 0..11"},
		{"part index", func(m *geom.Mesh) { m.ElemPart[4] = 2 }, "element 2001: part index 2 outside 0..1"},
		{"element thickness", func(m *geom.Mesh) { m.ElemThickness = []float64{math.NaN(), 0, 1, 1, 1} }, "element 1002: thickness 0 is neither positive nor unset (NaN)"},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			m := nativeSmall(t)
			tt.edit(m)
			var buf bytes.Buffer
			err := Write(&buf, m)
			if err == nil || err.Error() != "native: writing: "+tt.want {
				t.Fatalf("err = %v, want %q", err, tt.want)
			}
			if buf.Len() != 0 {
				t.Errorf("wrote %d bytes before failing", buf.Len())
			}
		})
	}
}

// failWriter fails every write.
type failWriter struct{}

var errFail = errors.New("disk full")

func (failWriter) Write([]byte) (int, error) { return 0, errFail }

func TestWriteWriteError(t *testing.T) {
	if err := Write(failWriter{}, nativeSmall(t)); !errors.Is(err, errFail) {
		t.Fatalf("err = %v, want %v", err, errFail)
	}
}

// gridMesh returns an nx by ny grid of quads with coordinates of up to
// three decimals, ids from 1000001 (nodes) and 5000001 (elements).
func gridMesh(nx, ny int) *geom.Mesh {
	return geomtest.Grid(geomtest.GridSpec{
		NX: nx, NY: ny,
		Node: func(i, j int) r3.Vec {
			x, y := float64(i)*4.75, float64(j)*5.125
			return r3.Vec{X: x, Y: y, Z: math.Round(1000*10*math.Sin(x/300)*math.Cos(y/200)) / 1000}
		},
		Parts:       []geom.Part{{ID: 1, Thickness: 0.8, Material: "DC04", Name: "grid"}},
		FirstNodeID: 1000001,
		FirstElemID: 5000001,
	})
}

func benchmarkWrite(b *testing.B, nx, ny int) {
	m := gridMesh(nx, ny)
	var size int64
	for b.Loop() {
		cw := &countWriter{}
		if err := Write(cw, m); err != nil {
			b.Fatal(err)
		}
		size = cw.n
	}
	b.SetBytes(size)
	b.ReportMetric(float64(m.NumElems())/(b.Elapsed().Seconds()/float64(b.N)), "elems/s")
}

// countWriter counts the bytes written to it.
type countWriter struct{ n int64 }

func (w *countWriter) Write(p []byte) (int, error) {
	w.n += int64(len(p))
	return len(p), nil
}

var _ io.Writer = (*countWriter)(nil)

// BenchmarkWrite200k writes a 200,000-quad grid.
func BenchmarkWrite200k(b *testing.B) { benchmarkWrite(b, 500, 400) }

// BenchmarkWrite2M writes a 2,000,000-quad grid.
func BenchmarkWrite2M(b *testing.B) {
	if testing.Short() {
		b.Skip("2M-element benchmark skipped in -short mode")
	}
	benchmarkWrite(b, 2000, 1000)
}
