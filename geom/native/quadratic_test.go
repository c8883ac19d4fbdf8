package native

import (
	"bytes"
	"math"
	"strings"
	"testing"

	"gonum.org/v1/gonum/spatial/r3"

	"github.com/joinery-cae/joinery/geom"
	"github.com/joinery-cae/joinery/geom/geomtest"
)

// TestSecondOrderRoundTrip writes 6-, 8- and 9-node shells, with and
// without their own thickness, and reads them back unchanged, in one
// piece and in several (the reader's pieces grow their connectivity for
// shells of more than four nodes).
func TestSecondOrderRoundTrip(t *testing.T) {
	var meshes []*geom.Mesh
	for k, typ := range []geom.ElemType{geom.Quad9, geom.Tri6, geom.Quad4, geom.Quad8} {
		var m *geom.Mesh
		if typ == geom.Quad4 {
			m = geomtest.Grid(geomtest.GridSpec{NX: 30, NY: 30, FirstNodeID: 50001, FirstElemID: 50001, Parts: []geom.Part{{ID: 3}}})
		} else {
			m = geomtest.SecondOrder(geomtest.SecondOrderSpec{
				Type: typ, NX: 40, NY: 30, H: 4, X0: float64(200 * k), Part: int64(k + 1),
				FirstNodeID: int64(10000*k + 1), FirstElemID: int64(10000*k + 1),
				Surface: func(x, y float64) r3.Vec { return r3.Vec{X: x, Y: y, Z: math.Sin(x/30) * y / 7} },
			})
		}
		meshes = append(meshes, m)
	}
	want, _, err := geom.Merge(meshes, false)
	if err != nil {
		t.Fatal(err)
	}
	want.ElemThickness = make([]float64, want.NumElems())
	for e := range want.ElemThickness {
		want.ElemThickness[e] = math.NaN()
		if e%7 == 0 {
			want.ElemThickness[e] = 0.5 + float64(e%5)/10
		}
	}
	want.Sources = nil
	var b bytes.Buffer
	if err := Write(&b, want); err != nil {
		t.Fatal(err)
	}
	if !strings.HasPrefix(b.String(), Header+"\n") {
		t.Errorf("header %q", b.String()[:20])
	}
	for _, pieces := range []int{1, 3, 8} {
		got, err := parseSplit(b.Bytes(), "q.jmesh", pieces)
		if err != nil {
			t.Fatalf("%d pieces: %v", pieces, err)
		}
		if d := diffMesh(got, want); d != "" {
			t.Fatalf("%d pieces: read back differs in %s", pieces, d)
		}
	}
}

func TestSecondOrderShellRecord(t *testing.T) {
	const file = Header + `
node 1 0 0 0
node 2 2 0 0
node 3 2 2 0
node 4 0 2 0
node 5 1 0 0
node 6 2 1 0
node 7 1 2 0
node 8 0 1 0
node 9 1 1 0.5
shell 10 1 1 2 3 4 5 6 7 8 9
shell 11 1 1 2 3 4 5 6 7 8 t=1.5
shell 12 1 1 2 4 5 9 8
`
	m, err := Read(strings.NewReader(file), "q.jmesh", geom.ReadOptions{})
	if err != nil {
		t.Fatal(err)
	}
	if m.Type(0) != geom.Quad9 || m.Type(1) != geom.Quad8 || m.Type(2) != geom.Tri6 || m.Thickness(1) != 1.5 {
		t.Fatalf("types %v %v %v, thickness %g", m.Type(0), m.Type(1), m.Type(2), m.Thickness(1))
	}
}
