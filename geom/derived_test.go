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
