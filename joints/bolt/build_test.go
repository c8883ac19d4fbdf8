package bolt

import (
	"fmt"
	"math"
	"slices"
	"testing"

	"gonum.org/v1/gonum/spatial/r3"

	"github.com/joinery-cae/joinery/geom"
	"github.com/joinery-cae/joinery/joints"
)

// TestHoleRing builds a bolt through two sheets with meshed circular
// holes, straight and with the whole model turned so that the axis is
// oblique: the ring on each sheet is exactly the hole's edge nodes, the
// measured diameter the generated one, the centres lie on the axis at
// the mid-surfaces, and only translations are coupled by default.
func TestHoleRing(t *testing.T) {
	for _, c := range []struct {
		name  string
		rot   rotation
		given bool // the list gives the axis
	}{
		{"straight", rotation{}, false},
		{"oblique", rotation{u: r3.Unit(r3.Vec{X: 1, Y: 2, Z: 0.5}), a: 0.7}, false},
		{"oblique-listed-axis", rotation{u: r3.Unit(r3.Vec{X: -1, Y: 0.3, Z: 2}), a: 1.1}, true},
	} {
		t.Run(c.name, func(t *testing.T) {
			m := mesh(t, c.rot, holed(11)...)
			j := m10("B1", c.rot.apply(r3.Vec{Z: 1.125}))
			axis := c.rot.apply(r3.Vec{Z: 1})
			if c.given {
				j.Axis = axis
			}
			cs := build(t, m, joints.BuildOptions{}, j)
			if len(cs) != 1 {
				t.Fatalf("%d connectors", len(cs))
			}
			b := cs[0]
			if b.Status != joints.Built || len(b.Findings) > 0 {
				t.Fatalf("state %s, findings %v", b.Status, codes(b.Findings))
			}
			if b.DOFs != joints.Translations {
				t.Errorf("dofs %s, want tx,ty,tz", b.DOFs)
			}
			if got := b.Stack.Parts(); !slices.Equal(got, []int64{1, 2}) && !slices.Equal(got, []int64{2, 1}) {
				t.Fatalf("sheets %v", got)
			}
			for i, s := range b.Stack.Sheets {
				pi, _ := m.PartIndex(s.Part)
				z := []float64{0, 2.25}[pi]
				// The hole's edge: the first ring of the annulus, 24 nodes.
				var want []int32
				for k := range 24 {
					n, _ := m.NodeIndex(s.Part*10000 + int64(k) + 1)
					want = append(want, n)
				}
				if !slices.Equal(b.Ends[i].Nodes, want) {
					t.Errorf("part %d: ring %v, want the hole's edge nodes %v", s.Part, b.Ends[i].Nodes, want)
				}
				// A regular 24-gon: equal arc lengths, weights 1/24.
				for _, w := range b.Ends[i].Weights {
					if !near(w, 1.0/24, 1e-12) {
						t.Errorf("part %d: weight %g, want 1/24", s.Part, w)
					}
				}
				if h := b.Bolt.Holes[i]; !near(h.Diameter, 11, 1e-9) || h.Ring != "hole" {
					t.Errorf("part %d: hole %g (%s), want 11 (hole)", s.Part, h.Diameter, h.Ring)
				}
				if p := c.rot.apply(r3.Vec{Z: z}); r3.Norm(r3.Sub(b.Ends[i].Point, p)) > 1e-9 {
					t.Errorf("part %d: centre %v, want %v", s.Part, b.Ends[i].Point, p)
				}
			}
			if len(b.Links) != 1 || b.Links[0].Kind != joints.ShankLink || !near(b.Links[0].Length, 2.25, 1e-9) || b.Links[0].DOFs != joints.AllDOFs {
				t.Errorf("links %+v, want one shank of 2.25 mm on all six", b.Links)
			}
			if d := math.Abs(r3.Dot(b.Stack.Axis, axis)); !near(d, 1, 1e-12) {
				t.Errorf("axis %v, want +-%v", b.Stack.Axis, axis)
			}
		})
	}
}

// TestNoHole: a coarse model without holes; the ring is the nodes within
// the washer's radius, at least the host element's.
func TestNoHole(t *testing.T) {
	plates := func(h float64, n int) []sheet {
		return []sheet{
			{Part: 1, T: 1.5, Z: 0, X0: -float64(n) * h / 2, H: h, N: n},
			{Part: 2, T: 3, Z: 2.25, X0: -float64(n) * h / 2, H: h, N: n},
		}
	}
	for _, c := range []struct {
		name string
		h    float64
		n    int
		p    r3.Vec
		want int // ring nodes per sheet
	}{
		// 10 mm quads, bolt at an element centre: the host's 4 corners lie
		// 7.07 mm away, the next nodes 15.8 mm: 4 within the 10 mm radius.
		{"element-centre", 10, 8, r3.Vec{X: 5, Y: 5, Z: 1.125}, 4},
		// At a node: it, its four neighbours 10 mm away (on the circle,
		// counted), and the host element's far corner: 6.
		{"node", 10, 8, r3.Vec{Z: 1.125}, 6},
		// 30 mm quads: no node within 10 mm; the host element's 4.
		{"coarse", 30, 4, r3.Vec{X: 15, Y: 15, Z: 1.125}, 4},
		// 2 mm quads, at a node: the nodes of a 10 mm disc on a 2 mm grid,
		// (x, y) = 2 (i, j) with i^2 + j^2 <= 25: 81 (Gauss circle
		// problem, N(5) = 81).
		{"fine", 2, 20, r3.Vec{Z: 1.125}, 81},
	} {
		t.Run(c.name, func(t *testing.T) {
			m := mesh(t, rotation{}, plates(c.h, c.n)...)
			cs := build(t, m, joints.BuildOptions{}, m10("B1", c.p))
			b := cs[0]
			if b.Status != joints.Built {
				t.Fatalf("state %s, findings %v", b.Status, codes(b.Findings))
			}
			for i := range b.Ends {
				if len(b.Ends[i].Nodes) != c.want || b.Bolt.Holes[i].Ring != "patch" || b.Bolt.Holes[i].Diameter != 0 {
					t.Errorf("sheet %d: %d ring nodes (%s, hole %g), want %d (patch, none)", i, len(b.Ends[i].Nodes), b.Bolt.Holes[i].Ring, b.Bolt.Holes[i].Diameter, c.want)
				}
				host := m.ElemNodes(b.Stack.Sheets[i].Proj.Elem)
				for _, n := range host {
					if !slices.Contains(b.Ends[i].Nodes, n) {
						t.Errorf("sheet %d: host node %d not in the ring", i, m.NodeIDs[n])
					}
				}
			}
		})
	}
}

// TestWasherRing: --bolt-ring washer widens a holed sheet's ring to the
// nodes within the washer's radius: the hole's edge (r = 5.5) and the
// annulus rings out to 10 mm. Rings of 40 mm outer radius in 6 steps lie
// at 5.5 + 5.75 k mm: k = 0 only (11.25 > 10), so the ring is the edge;
// with 12 steps, at 5.5 + 2.875 k: k = 0 and 1 (8.375), 48 nodes.
func TestWasherRing(t *testing.T) {
	ss := holed(11)
	for i := range ss {
		ss[i].Rings = 12
	}
	m := mesh(t, rotation{}, ss...)
	cs := build(t, m, joints.BuildOptions{BoltRing: joints.WasherRing}, m10("B1", r3.Vec{Z: 1.125}))
	for i, e := range cs[0].Ends {
		if len(e.Nodes) != 48 || cs[0].Bolt.Holes[i].Ring != "washer" {
			t.Errorf("sheet %d: %d nodes (%s), want 48 (washer)", i, len(e.Nodes), cs[0].Bolt.Holes[i].Ring)
		}
	}
}

// TestWasherRingEdge: nodes exactly at the washer's radius belong to the
// ring whatever the rounding of their coordinates: four rings of 16
// nodes at 5.5, 7, 8.5 and 10 mm with a 20 mm washer give all 64 nodes
// (4 x 16, counted), straight and with the model turned.
func TestWasherRingEdge(t *testing.T) {
	for _, rot := range []rotation{{}, {u: r3.Unit(r3.Vec{X: 1, Y: 2, Z: 0.5}), a: 0.7}, {u: r3.Unit(r3.Vec{X: -1, Y: 0.3, Z: 2}), a: 1.1}} {
		ss := holed(11)
		for i := range ss {
			ss[i].Outer, ss[i].Rings, ss[i].Seg = 10, 3, 16
		}
		m := mesh(t, rot, ss...)
		j := m10("B1", rot.apply(r3.Vec{Z: 1.125}))
		j.Axis = rot.apply(r3.Vec{Z: 1})
		cs := build(t, m, joints.BuildOptions{BoltRing: joints.WasherRing}, j)
		for i, e := range cs[0].Ends {
			if len(e.Nodes) != 64 {
				t.Errorf("rotation %v: sheet %d: %d nodes, want 64", rot, i, len(e.Nodes))
			}
		}
	}
}

// TestRingCentre: a ring's weights sum to 1 and their weighted mean of
// the ring's nodes is the centre (to 1e-9 mm), and a meshed hole's
// centre is the centre of its edge's circle (the Kasa fit is exact for
// nodes on a circle): a point 0.3 mm off the hole's centre (reported,
// hole-off-centre, info: within the 0.5 mm between an M10's shank and
// an 11 mm hole), an unevenly spaced hole (nodes on the circle at
// a + 0.3 sin a), the same with a washer ring, and a sheet without a
// hole with the point off its nodes.
func TestRingCentre(t *testing.T) {
	grid := []sheet{
		{Part: 1, T: 1.5, Z: 0, X0: -20, H: 2.5, N: 16},
		{Part: 2, T: 3, Z: 2.25, X0: -20, H: 2.5, N: 16},
	}
	warped := holed(11)
	for i := range warped {
		warped[i].Warp = 0.3
	}
	for _, c := range []struct {
		name   string
		ss     []sheet
		p      r3.Vec
		ring   joints.BoltRing
		centre r3.Vec // of sheet 1; sheet 2's lies 2.25 mm above
		off    bool   // hole-off-centre expected
	}{
		{"off-centre", holed(11), r3.Vec{X: 0.3, Y: -0.1, Z: 1.125}, joints.HoleRing, r3.Vec{}, true},
		{"uneven", warped, r3.Vec{Z: 1.125}, joints.HoleRing, r3.Vec{}, false},
		{"uneven-washer", warped, r3.Vec{Z: 1.125}, joints.WasherRing, r3.Vec{}, false},
		{"no-hole", grid, r3.Vec{X: 0.7, Y: 0.3, Z: 1.125}, joints.HoleRing, r3.Vec{X: 0.7, Y: 0.3}, false},
	} {
		t.Run(c.name, func(t *testing.T) {
			m := mesh(t, rotation{}, c.ss...)
			j := m10("B1", c.p)
			j.Axis = r3.Vec{Z: 1}
			b := build(t, m, joints.BuildOptions{BoltRing: c.ring, BoltCoupling: joints.AveragingCoupling}, j)[0]
			if b.Status == joints.NotBuilt || len(b.Ends) != 2 {
				t.Fatalf("state %s, findings %v", b.Status, codes(b.Findings))
			}
			if got := slices.Contains(codes(b.Findings), joints.CodeHoleOffCentre); got != c.off {
				t.Errorf("findings %v, hole-off-centre wanted %v", codes(b.Findings), c.off)
			}
			for i, e := range b.Ends {
				want := r3.Add(c.centre, r3.Vec{Z: 2.25 * float64(i)})
				if r3.Norm(r3.Sub(e.Point, want)) > 1e-9 {
					t.Errorf("sheet %d: centre %v, want %v", i, e.Point, want)
				}
				var sum float64
				var mean r3.Vec
				for k, n := range e.Nodes {
					sum += e.Weights[k]
					mean = r3.Add(mean, r3.Scale(e.Weights[k], m.Coords[n]))
				}
				if !near(sum, 1, 1e-12) || r3.Norm(r3.Sub(mean, e.Point)) > 1e-9 {
					t.Errorf("sheet %d: weights sum to %g, mean %v, want 1 and the centre %v", i, sum, mean, e.Point)
				}
				if h := b.Bolt.Holes[i].Diameter; c.ss[0].Hole > 0 && !near(h, 11, 1e-9) {
					t.Errorf("sheet %d: hole %g, want 11", i, h)
				}
			}
		})
	}
}

// TestReferenceSurfaces: centres lie where the axis meets each sheet's
// meshed surface; positions along the axis are the mid-surfaces' (sheet
// 1 from z = -0.75 to 0.75, sheet 2 from 0.75 to 3.75), whichever
// surface was meshed.
func TestReferenceSurfaces(t *testing.T) {
	for _, c := range []struct {
		name     string
		s1, s2   geom.Surface
		z1, z2   float64 // meshed surfaces
		wantEnds [2]float64
	}{
		{"mid", geom.SurfaceMid, geom.SurfaceMid, 0, 2.25, [2]float64{0, 2.25}},
		{"top", geom.SurfaceTop, geom.SurfaceTop, 0.75, 3.75, [2]float64{0.75, 3.75}},
		{"bottom", geom.SurfaceBottom, geom.SurfaceBottom, -0.75, 0.75, [2]float64{-0.75, 0.75}},
	} {
		t.Run(c.name, func(t *testing.T) {
			ss := holed(11)
			ss[0].Surface, ss[0].Z = c.s1, c.z1
			ss[1].Surface, ss[1].Z = c.s2, c.z2
			m := mesh(t, rotation{}, ss...)
			cs := build(t, m, joints.BuildOptions{}, joints.Joint{ID: "B1", Kind: joints.Bolt, Point: r3.Vec{Z: 0.75},
				Diameter: 10, Washer: 20, Hole: 11, Axis: r3.Vec{Z: 1}})
			b := cs[0]
			if b.Status != joints.Built {
				t.Fatalf("state %s, findings %v", b.Status, codes(b.Findings))
			}
			for i, want := range c.wantEnds {
				if !near(b.Ends[i].Point.Z, want, 1e-9) {
					t.Errorf("sheet %d: centre at z = %g, want %g", i, b.Ends[i].Point.Z, want)
				}
			}
			// Mid-surfaces at 0 and 2.25, from the point at 0.75.
			if p := b.Stack.Sheets; !near(p[0].Position, -0.75, 1e-9) || !near(p[1].Position, 1.5, 1e-9) {
				t.Errorf("positions %g, %g, want -0.75, 1.5", p[0].Position, p[1].Position)
			}
		})
	}
}

// TestTiltedAxisPositions: a bolt whose listed axis is tilted to two
// parallel sheets, one meshed on its mid-surface, one on its bottom
// face. The position of a sheet is where the axis meets its
// mid-surface: the plane a distance off from the meshed surface along
// the normal n meets the axis, direction a, a distance off / (n . a)
// along it from where the axis meets the meshed surface (hand
// calculation: a line through two parallel planes d apart runs
// d / cos(theta) between them).
func TestTiltedAxisPositions(t *testing.T) {
	for _, c := range []struct {
		name   string
		tilt   float64 // degrees between the axis and the sheets' normal
		s2     geom.Surface
		z2     float64 // sheet 2's meshed surface; its mid-surface is at 2.25
		wantP1 float64 // sheet 1's position: its mid-surface at z = 0, from the point at z = 0.75
		wantP2 float64
	}{
		// Hand calculation: mid-surfaces at z = 0 and 2.25, the point at
		// z = 0.75: positions -0.75 / cos and 1.5 / cos.
		{"bottom-15deg", 15, geom.SurfaceBottom, 0.75, -0.75 / math.Cos(15*math.Pi/180), 1.5 / math.Cos(15*math.Pi/180)},
		{"top-15deg", 15, geom.SurfaceTop, 3.75, -0.75 / math.Cos(15*math.Pi/180), 1.5 / math.Cos(15*math.Pi/180)},
		{"bottom-19deg", 19, geom.SurfaceBottom, 0.75, -0.75 / math.Cos(19*math.Pi/180), 1.5 / math.Cos(19*math.Pi/180)},
		{"mid-15deg", 15, geom.SurfaceMid, 2.25, -0.75 / math.Cos(15*math.Pi/180), 1.5 / math.Cos(15*math.Pi/180)},
	} {
		t.Run(c.name, func(t *testing.T) {
			m := mesh(t, rotation{},
				sheet{Part: 1, T: 1.5, Z: 0, X0: -40, H: 10, N: 8},
				sheet{Part: 2, T: 3, Z: c.z2, Surface: c.s2, X0: -40, H: 10, N: 8})
			a := c.tilt * math.Pi / 180
			cs := build(t, m, joints.BuildOptions{}, joints.Joint{ID: "B1", Kind: joints.Bolt, Point: r3.Vec{X: 1, Y: 2, Z: 0.75},
				Diameter: 10, Washer: 20, Hole: 11, Axis: r3.Vec{X: math.Sin(a), Z: math.Cos(a)}})
			b := cs[0]
			if b.Status != joints.Built {
				t.Fatalf("state %s, findings %v", b.Status, codes(b.Findings))
			}
			if p := b.Stack.Sheets; !near(p[0].Position, c.wantP1, 1e-9) || !near(p[1].Position, c.wantP2, 1e-9) {
				t.Errorf("positions %.9g, %.9g, want %.9g, %.9g", p[0].Position, p[1].Position, c.wantP1, c.wantP2)
			}
			if l := b.Links[0]; !near(l.MidGap, c.wantP2-c.wantP1, 1e-9) {
				t.Errorf("mid gap %.9g, want %.9g", l.MidGap, c.wantP2-c.wantP1)
			}
		})
	}
}

// TestQuadraticHoleRing: a hole meshed with 8-node quads has on its edge
// the corners and, between each two, an edge's midside node; the ring
// is all of them, in order round the hole, weighted by arc length. On a
// regular 12-gon of corners with midside nodes on the same circle the
// loop is a regular 24-gon: weights 1/24 each, the fitted circle the
// hole's (hand calculation).
func TestQuadraticHoleRing(t *testing.T) {
	for _, c := range []struct {
		name string
		ring joints.BoltRing
		want int // ring nodes per sheet
	}{
		// The hole's edge: 12 corners and 12 midside nodes.
		{"hole", joints.HoleRing, 24},
		// Within the washer's radius, 10 mm, on an annulus from 5.5 to
		// 14.5 mm in 2 rings: the corners and midsides of the hole's edge
		// (24), the radial midsides at 7.75 mm (12) and the next ring's
		// corners and midsides at 10 mm, on the washer's circle (24): 60.
		{"washer", joints.WasherRing, 60},
	} {
		t.Run(c.name, func(t *testing.T) {
			ss := []sheet{
				{Part: 1, T: 1.5, Z: 0, Hole: 11, Outer: 14.5, Seg: 12, Rings: 2, Quadratic: true},
				{Part: 2, T: 3, Z: 2.25, Hole: 11, Outer: 14.5, Seg: 12, Rings: 2, Quadratic: true},
			}
			m := mesh(t, rotation{}, ss...)
			cs := build(t, m, joints.BuildOptions{BoltRing: c.ring}, m10("B1", r3.Vec{Z: 1.125}))
			b := cs[0]
			if b.Status != joints.Built {
				t.Fatalf("state %s, findings %v", b.Status, codes(b.Findings))
			}
			for i, s := range b.Stack.Sheets {
				if len(b.Ends[i].Nodes) != c.want {
					t.Errorf("part %d: %d ring nodes, want %d", s.Part, len(b.Ends[i].Nodes), c.want)
				}
				if h := b.Bolt.Holes[i]; !near(h.Diameter, 11, 1e-9) {
					t.Errorf("part %d: hole %g, want 11", s.Part, h.Diameter)
				}
				sum := 0.0
				var mean r3.Vec
				for k, n := range b.Ends[i].Nodes {
					w := b.Ends[i].Weights[k]
					sum += w
					mean = r3.Add(mean, r3.Scale(w, m.Coords[n]))
					if c.ring == joints.HoleRing && !near(w, 1.0/24, 1e-12) {
						t.Errorf("part %d: node %d weight %g, want 1/24", s.Part, m.NodeIDs[n], w)
					}
				}
				if !near(sum, 1, 1e-12) || r3.Norm(r3.Sub(mean, b.Ends[i].Point)) > 1e-9 {
					t.Errorf("part %d: weights sum to %g with mean %v, want 1 and the centre %v", s.Part, sum, mean, b.Ends[i].Point)
				}
			}
		})
	}
}

// TestSecondOrderHoles: holes meshed with 8- and 9-node quads and
// 6-node triangles, their midside nodes on the hole's circle or on the
// chords between its corners (straight-sided elements), the corners
// evenly or unevenly spaced round it. Closed form: the hole's edge
// nodes are its Seg corners and Seg midside nodes, nothing else (no
// Quad9 centre, no Tri6 diagonal, no midside between rings); its
// circle, fitted to its corners, all on the 11 mm circle, is that
// circle exactly, centre and diameter, whatever the element order and
// wherever the midside nodes lie, as for first-order elements with the
// same corners; the weights sum to 1 and their weighted mean of the
// nodes is the centre; evenly spaced on the circle, each is 1/(2 Seg).
func TestSecondOrderHoles(t *testing.T) {
	const seg, rings = 8, 2
	for _, elem := range []geom.ElemType{geom.Quad8, geom.Quad9, geom.Tri6} {
		for _, straight := range []bool{false, true} {
			for _, warp := range []float64{0, 0.3} {
				name := fmt.Sprintf("%s/straight=%v/warp=%g", elem, straight, warp)
				t.Run(name, func(t *testing.T) {
					// An M10 in an ISO 273 fine hole, 10.5 mm (REFERENCES.md),
					// ISO 7089 washer 20 mm.
					ss := []sheet{
						{Part: 1, T: 1.5, Z: 0, Hole: 10.5, Outer: 14, Seg: seg, Rings: rings, Quadratic: true, Elem: elem, Straight: straight, Warp: warp},
						{Part: 2, T: 3, Z: 2.25, Hole: 10.5, Outer: 14, Seg: seg, Rings: rings, Quadratic: true, Elem: elem, Straight: straight, Warp: warp},
					}
					m := mesh(t, rotation{}, ss...)
					j := joints.Joint{ID: "B1", Kind: joints.Bolt, Point: r3.Vec{Z: 1.125}, Diameter: 10, Washer: 20, Hole: 10.5}
					b := build(t, m, joints.BuildOptions{}, j)[0]
					if b.Status != joints.Built || len(b.Findings) > 0 {
						t.Fatalf("state %s, findings %v", b.Status, b.Findings)
					}
					for i, s := range b.Stack.Sheets {
						var want []int32
						for k := range seg {
							n, _ := m.NodeIndex(s.Part*10000 + int64(k) + 1) // corners of the hole's edge
							want = append(want, n)
						}
						for k := range seg {
							n, _ := m.NodeIndex(s.Part*10000 + int64((rings+1)*seg+k) + 1) // their midsides
							want = append(want, n)
						}
						if !slices.Equal(b.Ends[i].Nodes, want) {
							t.Errorf("part %d: ring %v, want %v", s.Part, b.Ends[i].Nodes, want)
						}
						z := []float64{0, 2.25}[i]
						if r3.Norm(r3.Sub(b.Ends[i].Point, r3.Vec{Z: z})) > 1e-9 {
							t.Errorf("part %d: centre %v, want (0, 0, %g)", s.Part, b.Ends[i].Point, z)
						}
						if h := b.Bolt.Holes[i]; !near(h.Diameter, 10.5, 1e-9) || !near(h.Narrowest, 10.5, 1e-9) {
							t.Errorf("part %d: hole %g, narrowest %g; want 10.5 and 10.5", s.Part, h.Diameter, h.Narrowest)
						}
						sum := 0.0
						var mean r3.Vec
						for k, n := range b.Ends[i].Nodes {
							w := b.Ends[i].Weights[k]
							sum += w
							mean = r3.Add(mean, r3.Scale(w, m.Coords[n]))
							if warp == 0 && !straight && !near(w, 1.0/(2*seg), 1e-12) {
								t.Errorf("part %d: weight %g, want 1/%d", s.Part, w, 2*seg)
							}
						}
						if !near(sum, 1, 1e-12) || r3.Norm(r3.Sub(mean, b.Ends[i].Point)) > 1e-9 {
							t.Errorf("part %d: weights sum to %g, mean %v; want 1 and %v", s.Part, sum, mean, b.Ends[i].Point)
						}
					}
				})
			}
		}
	}
}

// TestFewNodeHoles: a hexagonal and an octagonal hole, their corners on
// the 11 mm circle (an M10's ISO 273 medium hole, REFERENCES.md). The
// fitted circle passes through the corners (Kasa's fit is exact for
// points on a circle), so the hole measures 11 mm, the circumscribed
// circle, not the inscribed one, 11 cos(180°/n) (9.526 mm for the
// hexagon, 10.163 mm for the octagon); its least width through the
// centre as its corners tell is 11 too; the ring's weights are 1/n,
// and the bolt is built without findings.
func TestFewNodeHoles(t *testing.T) {
	for _, n := range []int{6, 8} {
		t.Run(fmt.Sprintf("%d-gon", n), func(t *testing.T) {
			ss := holed(11)
			for i := range ss {
				ss[i].Seg = n
			}
			// Turned about the axis, so that no corner lies on a
			// coordinate axis.
			m := mesh(t, rotation{u: r3.Vec{Z: 1}, a: 0.3}, ss...)
			b := build(t, m, joints.BuildOptions{}, m10("B1", r3.Vec{Z: 1.125}))[0]
			if b.Status != joints.Built || len(b.Findings) > 0 {
				t.Fatalf("state %s, findings %v", b.Status, b.Findings)
			}
			for i := range b.Stack.Sheets {
				if h := b.Bolt.Holes[i]; !near(h.Diameter, 11, 1e-9) || !near(h.Narrowest, 11, 1e-9) {
					t.Errorf("sheet %d: hole %.12g, narrowest %.12g; want 11 (circumscribed; inscribed %.4g)", i, h.Diameter, h.Narrowest, 11*math.Cos(math.Pi/float64(n)))
				}
				if len(b.Ends[i].Nodes) != n {
					t.Errorf("sheet %d: %d ring nodes, want %d", i, len(b.Ends[i].Nodes), n)
				}
				for _, w := range b.Ends[i].Weights {
					if !near(w, 1/float64(n), 1e-12) {
						t.Errorf("sheet %d: weight %g, want 1/%d", i, w, n)
					}
				}
				if z := []float64{0, 2.25}[i]; r3.Norm(r3.Sub(b.Ends[i].Point, r3.Vec{Z: z})) > 1e-9 {
					t.Errorf("sheet %d: centre %v, want (0, 0, %g)", i, b.Ends[i].Point, z)
				}
			}
		})
	}
}

// TestThreeSheetsGrounded: an M10 through three holed sheets in contact,
// 1, 1.5 and 2 mm thick, mid-surfaces at z = 0, 1.25 and 3 (contact
// (t1+t2)/2: 1.25 and 1.75), grounded. Closed form: three centres on the
// axis at the mid-surfaces, two shanks of 1.25 and 1.75 mm on all six
// degrees of freedom, the support at the last centre along the listed
// axis (z = 3 along +z, z = 0 along -z), holding the rings' degrees of
// freedom: translations by default, all six when asked.
func TestThreeSheetsGrounded(t *testing.T) {
	ss := []sheet{
		{Part: 1, T: 1, Z: 0, Hole: 11, Outer: 40, Seg: 24, Rings: 6},
		{Part: 2, T: 1.5, Z: 1.25, Hole: 11, Outer: 40, Seg: 24, Rings: 6},
		{Part: 3, T: 2, Z: 3, Hole: 11, Outer: 40, Seg: 24, Rings: 6},
	}
	m := mesh(t, rotation{}, ss...)
	for _, c := range []struct {
		name    string
		axis    r3.Vec
		dofs    joints.DOFs
		support int64 // part of the supported centre
	}{
		{"toward +z", r3.Vec{Z: 1}, 0, 3},
		{"toward -z", r3.Vec{Z: -1}, 0, 1},
		{"rotations asked", r3.Vec{Z: 2}, joints.AllDOFs, 3},
	} {
		t.Run(c.name, func(t *testing.T) {
			j := m10("B1", r3.Vec{X: 0.004, Z: 1.5}) // within 0.01 mm of the centres: no finding
			j.Axis, j.Ground = c.axis, true
			b := build(t, m, joints.BuildOptions{BoltDOFs: c.dofs}, j)[0]
			if b.Status != joints.Built || len(b.Findings) > 0 {
				t.Fatalf("state %s, findings %v", b.Status, b.Findings)
			}
			want := c.dofs
			if want == 0 {
				want = joints.Translations
			}
			if b.DOFs != want || b.Bolt.SupportDOFs != want || b.Bolt.Support != 2 || b.Stack.Sheets[2].Part != c.support {
				t.Errorf("dofs %s, support at sheet %d (part %d) holding %s; want %s at the last sheet, part %d", b.DOFs, b.Bolt.Support, b.Stack.Sheets[b.Bolt.Support].Part, b.Bolt.SupportDOFs, want, c.support)
			}
			if len(b.Links) != 2 {
				t.Fatalf("%d links, want 2", len(b.Links))
			}
			lengths := []float64{1.25, 1.75} // in stack order along the axis
			if c.axis.Z < 0 {
				lengths = []float64{1.75, 1.25}
			}
			for k, l := range b.Links {
				if l.Kind != joints.ShankLink || l.DOFs != joints.AllDOFs || !near(l.Length, lengths[k], 1e-9) || !near(l.SquareGap, l.Contact, 1e-9) {
					t.Errorf("link %d: %s %s length %g gap %g contact %g; want a shank on all six, %g long, at contact", k, l.Kind, l.DOFs, l.Length, l.SquareGap, l.Contact, lengths[k])
				}
			}
			for i, s := range b.Stack.Sheets {
				pi, _ := m.PartIndex(s.Part)
				if p := (r3.Vec{Z: ss[pi].Z}); r3.Norm(r3.Sub(b.Ends[i].Point, p)) > 1e-9 {
					t.Errorf("part %d: centre %v, want %v", s.Part, b.Ends[i].Point, p)
				}
			}
		})
	}
}
