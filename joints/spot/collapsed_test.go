package spot

import (
	"math"
	"slices"
	"testing"

	"gonum.org/v1/gonum/spatial/r3"

	"github.com/joinery-cae/joinery/joints"
)

// TestCollapsedQuads checks that a triangle written as a quad repeating
// a corner (common practice where a format or a mesher has quads only)
// is built on as the triangle it is: not a degenerate host, its
// repeated node tied once, and its zero-length edge no free edge. The
// same sheets meshed with true triangles give the same connector. The
// weld at (22, 21) lies in the triangle (20,20) (25,20) (25,25) of the
// 5 mm mesh, whose barycentric weights there are 0.6, 0.2 and 0.2 (hand
// calculation: (22,21) = (20,20) + 0.2 (5,0) + 0.2 (5,5)); it lies 20 mm
// from the plates' free edges, beyond the 10 mm the edge check looks.
func TestCollapsedQuads(t *testing.T) {
	at := r3.Vec{X: 22, Y: 21, Z: 0.5}
	build := func(collapsed bool) joints.Connector {
		m := plates(plate{Part: 1, T: 1, NX: 9, NY: 9, H: 5, Tri: true, Collapsed: collapsed},
			plate{Part: 2, T: 1, Z: 1, NX: 9, NY: 9, H: 5, Tri: true, Collapsed: collapsed})
		return buildOne1(t, m, joints.Joint{ID: "W", Point: at}, joints.BuildOptions{})
	}
	tri, quad := build(false), build(true)
	for name, c := range map[string]joints.Connector{"triangles": tri, "collapsed quads": quad} {
		if c.Status != joints.Built || len(c.Findings) != 0 {
			t.Fatalf("%s: %s, findings %v; want built without findings", name, c.Status, c.Findings)
		}
		for i, e := range c.Ends {
			if len(e.Nodes) != 3 {
				t.Fatalf("%s: sheet %d ties nodes %v, want the triangle's 3", name, i, e.Nodes)
			}
			w := slices.Clone(e.Weights)
			slices.Sort(w)
			if want := []float64{0.2, 0.2, 0.6}; !slices.EqualFunc(w, want, func(a, b float64) bool { return math.Abs(a-b) < 1e-12 }) {
				t.Errorf("%s: sheet %d weights %v, want %v (barycentric)", name, i, e.Weights, want)
			}
			if s := c.Stack.Sheets[i]; !math.IsInf(s.EdgeDistance, 1) {
				t.Errorf("%s: sheet %d edge distance %g, want none within reach", name, i, s.EdgeDistance)
			}
		}
	}
	for i := range tri.Ends {
		if !slices.Equal(tri.Ends[i].Nodes, quad.Ends[i].Nodes) || r3.Norm(r3.Sub(tri.Ends[i].Point, quad.Ends[i].Point)) > 1e-12 {
			t.Errorf("sheet %d: collapsed quads tie %v at %v, triangles %v at %v", i, quad.Ends[i].Nodes, quad.Ends[i].Point, tri.Ends[i].Nodes, tri.Ends[i].Point)
		}
	}
}

// TestCollapsedEdgeNotFree checks that the repeated corner of a
// collapsed quad near a weld on a sound element is no free edge. The
// square (20..25, 20..25) of a 5 mm quad mesh is written as two
// collapsed quads, a b c c and a c d d, whose repeated corners c and d
// no other element repeats; a weld at (17, 24) on the quad beside it
// lies 3.16 mm from d (hand calculation), closer than the 5 mm edge
// limit of 1 mm sheets (one nugget diameter, 5 sqrt(1), common
// practice), and 15 mm from the plates' free edges: no edge-close.
func TestCollapsedEdgeNotFree(t *testing.T) {
	m := plates(plate{Part: 1, T: 1, NX: 9, NY: 9, H: 5}, plate{Part: 2, T: 1, Z: 1, NX: 9, NY: 9, H: 5})
	k := 4*9 + 4 // element of the square (20..25, 20..25) of part 1
	ns := m.Conn[m.ElemStart[k]:m.ElemStart[k+1]]
	a, c, d := ns[0], ns[2], ns[3]
	ns[3] = c
	m.Conn = append(m.Conn, a, c, d, d)
	m.ElemStart = append(m.ElemStart, int32(len(m.Conn)))
	m.ElemIDs = append(m.ElemIDs, 190000)
	m.ElemPart = append(m.ElemPart, 0)
	if err := m.Index(); err != nil {
		t.Fatal(err)
	}
	c0 := buildOne1(t, m, joints.Joint{ID: "W", Point: r3.Vec{X: 17, Y: 24, Z: 0.5}}, joints.BuildOptions{})
	if c0.Status != joints.Built || len(c0.Findings) != 0 {
		t.Fatalf("%s, findings %v; want built without findings", c0.Status, c0.Findings)
	}
	// On the collapsed quads themselves, the triangle a c d holds
	// (21, 24): barycentric weights 0.2 (a), 0.2 (c), 0.6 (d).
	c1 := buildOne1(t, m, joints.Joint{ID: "W", Point: r3.Vec{X: 21, Y: 24, Z: 0.5}}, joints.BuildOptions{})
	if c1.Status != joints.Built || len(c1.Findings) != 0 {
		t.Fatalf("on the collapsed quad: %s, findings %v; want built without findings", c1.Status, c1.Findings)
	}
	e := c1.Ends[0]
	want := map[int32]float64{a: 0.2, c: 0.2, d: 0.6}
	if len(e.Nodes) != 3 {
		t.Fatalf("on the collapsed quad: ties %v, want a, c, d", e.Nodes)
	}
	for i, n := range e.Nodes {
		if math.Abs(e.Weights[i]-want[n]) > 1e-12 {
			t.Errorf("on the collapsed quad: node %d weight %g, want %g", m.NodeIDs[n], e.Weights[i], want[n])
		}
	}
}
