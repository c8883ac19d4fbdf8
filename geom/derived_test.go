package geom

import (
	"math"
	"testing"

	"gonum.org/v1/gonum/spatial/r3"
)

func singleElem(pts ...r3.Vec) *Mesh {
	m := &Mesh{Parts: []Part{{ID: 1, Thickness: 1}}, ElemStart: []int32{0, int32(len(pts))}, ElemIDs: []int64{1}, ElemPart: []int32{0}}
	for i, p := range pts {
		m.NodeIDs = append(m.NodeIDs, int64(i+1))
		m.Coords = append(m.Coords, p)
		m.Conn = append(m.Conn, int32(i))
	}
	if err := m.Index(); err != nil {
		panic(err)
	}
	return m
}

func TestAreaNormalCentroid(t *testing.T) {
	// Closed-form values: a 3-4-5 right triangle has area 3*4/2 = 6; a
	// 2x3 rectangle has area 6; both lie in z=0 with counter-clockwise
	// nodes, so the right-hand-rule normal is +z.
	cases := []struct {
		name     string
		pts      []r3.Vec
		area     float64
		normal   r3.Vec
		centroid r3.Vec
	}{
		{"triangle 3-4-5", []r3.Vec{{}, {X: 3}, {Y: 4}}, 6, r3.Vec{Z: 1}, r3.Vec{X: 1, Y: 4.0 / 3}},
		{"rectangle 2x3", []r3.Vec{{}, {X: 2}, {X: 2, Y: 3}, {Y: 3}}, 6, r3.Vec{Z: 1}, r3.Vec{X: 1, Y: 1.5}},
		{"rectangle clockwise", []r3.Vec{{}, {Y: 3}, {X: 2, Y: 3}, {X: 2}}, 6, r3.Vec{Z: -1}, r3.Vec{X: 1, Y: 1.5}},
	}
	for _, c := range cases {
		m := singleElem(c.pts...)
		if got := m.Area(0); math.Abs(got-c.area) > 1e-12 {
			t.Errorf("%s: area %g, want %g", c.name, got, c.area)
		}
		if got := m.Normal(0); r3.Norm(r3.Sub(got, c.normal)) > 1e-12 {
			t.Errorf("%s: normal %v, want %v", c.name, got, c.normal)
		}
		if got := m.Centroid(0); r3.Norm(r3.Sub(got, c.centroid)) > 1e-12 {
			t.Errorf("%s: centroid %v, want %v", c.name, got, c.centroid)
		}
	}
}

func TestWarp(t *testing.T) {
	// Unit square with corner 2 lifted by h. Closed form: splitting along
	// diagonal 0-2 the triangle normals are (0,-h,1) and (-h,0,1), so
	// cos = 1/(1+h²); along 1-3 they are (-h,-h,1) and (0,0,1), so
	// cos = 1/sqrt(1+2h²). Warp is the larger angle.
	for _, h := range []float64{0, 0.01, 0.1, 1} {
		m := singleElem(r3.Vec{}, r3.Vec{X: 1}, r3.Vec{X: 1, Y: 1, Z: h}, r3.Vec{Y: 1})
		want := math.Max(math.Acos(1/(1+h*h)), math.Acos(1/math.Sqrt(1+2*h*h))) * 180 / math.Pi
		q := m.ElemQuality(0)
		if math.Abs(q.Warp-want) > 1e-9 {
			t.Errorf("h=%g: warp %g°, want %g°", h, q.Warp, want)
		}
		if q.Degenerate {
			t.Errorf("h=%g: flagged degenerate", h)
		}
	}
}

func TestDegenerate(t *testing.T) {
	cases := []struct {
		name string
		pts  []r3.Vec
	}{
		{"collinear triangle", []r3.Vec{{}, {X: 1}, {X: 2}}},
		{"zero edge quad", []r3.Vec{{}, {X: 1}, {X: 1}, {Y: 1}}},
	}
	for _, c := range cases {
		if q := singleElem(c.pts...).ElemQuality(0); !q.Degenerate {
			t.Errorf("%s: not flagged degenerate: %+v", c.name, q)
		}
	}
}

func TestPartStats(t *testing.T) {
	m := quadGrid(4, 3, 2.5, nil)
	st := m.PartStats()
	if st[0].Elems != 12 || st[0].Quads != 12 || math.Abs(st[0].Area-12*2.5*2.5) > 1e-9 {
		t.Fatalf("stats %+v", st[0])
	}
	if st[0].Box.Max != (r3.Vec{X: 10, Y: 7.5}) || st[0].Box.Min != (r3.Vec{}) {
		t.Fatalf("box %+v", st[0].Box)
	}
}

// TestCollapsedQuad checks a triangle written as a quad repeating a
// corner (nodes a b c c, common practice where a format or a mesher
// has quads only): the 3-4-5 right triangle's area 6, normal +z and
// edges 3 and 5 (hand calculation), not degenerate, no warp, and its
// zero-length edge no free edge, either in FreeEdges or in
// FreeEdgeDistance (from its repeated corner the nearest free edge is
// the hypotenuse, 0 away, and from (1, 1) the legs and the hypotenuse, 1 away). A quad
// whose repeated nodes are opposite corners, or that repeats two
// corners, stays degenerate.
func TestCollapsedQuad(t *testing.T) {
	m := &Mesh{Parts: []Part{{ID: 1, Thickness: 1}}, ElemStart: []int32{0, 4}, ElemIDs: []int64{1}, ElemPart: []int32{0},
		NodeIDs: []int64{1, 2, 3}, Coords: []r3.Vec{{}, {X: 3}, {Y: 4}}, Conn: []int32{0, 1, 2, 2}}
	if err := m.Index(); err != nil {
		t.Fatal(err)
	}
	q := m.ElemQuality(0)
	if !q.Collapsed || q.Degenerate || q.Warp != 0 || q.MinEdge != 3 || q.MaxEdge != 5 {
		t.Errorf("quality %+v, want collapsed, not degenerate, no warp, edges 3 to 5", q)
	}
	if a, n := m.Area(0), m.Normal(0); math.Abs(a-6) > 1e-12 || r3.Norm(r3.Sub(n, r3.Vec{Z: 1})) > 1e-12 {
		t.Errorf("area %g normal %v, want 6 and +z", a, n)
	}
	if fe := FreeEdges(m, NodeElements(m)); len(fe) != 3 {
		t.Errorf("%d free edges %v, want the triangle's 3", len(fe), fe)
	}
	for _, c := range []struct{ q, want float64 }{{0, 0}, {1, 1}} {
		p := r3.Vec{X: c.q, Y: c.q}
		if c.q == 0 {
			p = r3.Vec{Y: 4}
		}
		if d := FreeEdgeDistance(m, []int32{0}, p, 0, 10); math.Abs(d-c.want) > 1e-12 {
			t.Errorf("free edge distance from %v: %g, want %g", p, d, c.want)
		}
	}
	for name, conn := range map[string][]int32{"opposite corners": {0, 1, 0, 2}, "two corners repeated": {0, 0, 1, 1}} {
		m.Conn = conn
		if q := m.ElemQuality(0); q.Collapsed || !q.Degenerate {
			t.Errorf("%s: quality %+v, want degenerate", name, q)
		}
	}
}
