package geom

import (
	"math"
	"slices"
	"testing"

	"gonum.org/v1/gonum/spatial/r3"
)

// fuzzMesh decodes a small mesh and a query from bytes: a node count,
// three signed bytes per node (coordinate/4; 127 is NaN, -128 is +Inf),
// then elements as a kind byte (even: triangle, odd: quad) and node
// bytes taken modulo the node count, after a query point (three bytes)
// and radius (one byte) at the front.
func fuzzMesh(data []byte) (m *Mesh, p r3.Vec, r float64, ok bool) {
	if len(data) < 5 {
		return nil, p, 0, false
	}
	coord := func(b byte) float64 {
		switch int8(b) {
		case 127:
			return math.NaN()
		case -128:
			return math.Inf(1)
		}
		return float64(int8(b)) / 4
	}
	p = v3(float64(int8(data[0]))/4, float64(int8(data[1]))/4, float64(int8(data[2]))/4)
	r = float64(data[3]) / 8
	nn := int(data[4]%32) + 1
	data = data[5:]
	if len(data) < 3*nn {
		return nil, p, 0, false
	}
	m = &Mesh{Parts: []Part{{ID: 1}}, ElemStart: []int32{0}}
	for i := range nn {
		m.Coords = append(m.Coords, v3(coord(data[3*i]), coord(data[3*i+1]), coord(data[3*i+2])))
		m.NodeIDs = append(m.NodeIDs, int64(i+1))
	}
	data = data[3*nn:]
	for len(data) > 0 {
		k := 3 + int(data[0]%2)
		if len(data) < 1+k {
			break
		}
		for _, b := range data[1 : 1+k] {
			m.Conn = append(m.Conn, int32(int(b)%nn))
		}
		m.ElemStart = append(m.ElemStart, int32(len(m.Conn)))
		m.ElemIDs = append(m.ElemIDs, int64(len(m.ElemIDs)+1))
		m.ElemPart = append(m.ElemPart, 0)
		data = data[1+k:]
	}
	return m, p, r, true
}

func FuzzIndex(f *testing.F) {
	f.Add([]byte{0, 0, 4, 16, 4, 0, 0, 0, 8, 0, 0, 8, 8, 0, 0, 8, 0, 1, 0, 1, 2, 3, 0, 0, 2, 3})
	f.Add([]byte{4, 4, 4, 40, 3, 0, 0, 0, 0, 0, 0, 0, 0, 0, 0, 0, 1, 2})
	f.Add([]byte{1, 2, 3, 10, 5, 127, 0, 0, 0, 128, 0, 5, 5, 5, 9, 9, 9, 1, 1, 1, 1, 0, 1, 2, 3, 4, 0, 2, 3, 4})
	f.Fuzz(func(t *testing.T, data []byte) {
		m, p, r, ok := fuzzMesh(data)
		if !ok {
			return
		}
		x := NewIndex(m)
		if got, want := x.ElemsNear(p, r, nil), bruteElemsNear(m, p, r); !slices.Equal(got, want) {
			t.Fatalf("ElemsNear = %v, brute force %v", got, want)
		}
		if got, want := x.ProjectNear(p, r, nil), bruteProjectNear(m, p, r, nil); !slices.EqualFunc(got, want, sameProjection) {
			t.Fatalf("ProjectNear = %v, brute force %v", got, want)
		}
		all := bruteProjectNear(m, p, math.Inf(1), nil)
		best, ok := x.ProjectNearest(p, math.Inf(1), nil)
		if ok != (len(all) > 0) || ok && !sameProjection(best, all[0]) {
			t.Fatalf("ProjectNearest = %+v %v, brute force %v", best, ok, all)
		}
		nodes := bruteNodes(m, p, nil)
		var finite []nodeDist
		for _, c := range nodes {
			if c.d2 <= math.MaxFloat64 {
				finite = append(finite, c)
			}
		}
		if got, want := x.NearestNodes(p, 3, nil), nodeIDs(finite[:min(3, len(finite))]); !slices.Equal(got, want) {
			t.Fatalf("NearestNodes = %v, brute force %v", got, want)
		}
	})
}

// sameProjection compares projections, NaN fields included.
func sameProjection(a, b Projection) bool {
	eq := func(u, v float64) bool { return u == v || math.IsNaN(u) && math.IsNaN(v) }
	if a.Elem != b.Elem || !eq(a.Dist, b.Dist) || !eq(a.Xi, b.Xi) || !eq(a.Eta, b.Eta) {
		return false
	}
	for i := range a.Weights {
		if !eq(a.Weights[i], b.Weights[i]) {
			return false
		}
	}
	return true
}
