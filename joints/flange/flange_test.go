package flange

import (
	"math"
	"testing"

	"gonum.org/v1/gonum/spatial/r3"

	"github.com/joinery-cae/joinery/geom"
	"github.com/joinery-cae/joinery/joints"
)

// one returns the only flange of set, failing the test otherwise.
func one(t *testing.T, set *Set) *joints.Flange {
	t.Helper()
	if len(set.Flanges) != 1 {
		t.Fatalf("%d flanges, want 1", len(set.Flanges))
	}
	return &set.Flanges[0]
}

func near(a, b, tol float64) bool { return math.Abs(a-b) <= tol }

// A 20 mm wide strip lying on a wider plate, both meshed with the same
// 5 mm grid: every node of the strip faces a node of the plate. Sheets
// in contact meshed on their mid-surfaces lie (t1+t2)/2 apart (shell
// mid-surface geometry, common practice), so every separation is the
// contact gap computed by hand.
func TestFacingPairsCongruent(t *testing.T) {
	for _, tc := range []struct {
		name       string
		t1, t2, z2 float64
		surface    geom.Surface
		contact    float64
	}{
		{"1+1 mm, mid-surfaces", 1, 1, 1, geom.SurfaceMid, 1},               // (1+1)/2
		{"0.8+1.5 mm, mid-surfaces", 0.8, 1.5, 1.15, geom.SurfaceMid, 1.15}, // (0.8+1.5)/2
		// The strip meshed on its bottom surface, which touches the
		// plate's top at 0.8/2 = 0.4: its mid-surface is 0.75 higher,
		// 1.15 above the plate's.
		{"0.8+1.5 mm, strip meshed on its bottom", 0.8, 1.5, 0.4, geom.SurfaceBottom, 1.15},
	} {
		t.Run(tc.name, func(t *testing.T) {
			strip := plate(2, tc.t2, 0, 10, tc.z2, 20, 4, 5)
			strip.Surface = tc.surface
			m := mesh(plate(1, tc.t1, 0, 0, 0, 20, 10, 5), strip)
			f := one(t, findAll(t, m, joints.FlangeOptions{}))
			// 21 x 5 nodes of the strip; all face the plate.
			if len(f.Facing) != 105 || f.Nodes != 105 || f.Match != joints.Congruent {
				t.Fatalf("%d facing pairs, %d nodes in contact, %v; want 105, 105, congruent", len(f.Facing), f.Nodes, f.Match)
			}
			seen := map[int32]bool{}
			for _, fp := range f.Facing {
				a, b := m.Coords[fp.A], m.Coords[fp.B]
				if m.ElemPart[0] != fp.PartA || a.X != b.X || a.Y != b.Y || seen[fp.A] || seen[fp.B] {
					t.Fatalf("pair %+v: %v and %v do not face each other, or a node is paired twice", fp, a, b)
				}
				seen[fp.A], seen[fp.B] = true, true
				if !near(fp.Separation, tc.contact, 1e-12) || !near(fp.Contact, tc.contact, 1e-12) || fp.Lateral > 1e-12 {
					t.Fatalf("pair %+v: separation %g, contact %g, lateral %g; want %g, %g, 0", fp, fp.Separation, fp.Contact, fp.Lateral, tc.contact, tc.contact)
				}
				if !near(fp.Tolerance, joints.DefaultFacingFactor*5, 1e-12) { // the local element size is 5 mm
					t.Fatalf("tolerance %g", fp.Tolerance)
				}
			}
			// The overlap is the strip: 100 x 20 mm.
			if !near(f.Area, 2000, 1e-6) || !near(f.Length, 100, 0.05) || !near(f.Width.Mean, 20, 0.02) || f.Closed {
				t.Errorf("area %g, length %g, width %+v, closed %v; want 2000, 100, 20, open", f.Area, f.Length, f.Width, f.Closed)
			}
		})
	}
}

// Meshes that do not match node for node: a grid shifted by half an
// element, and triangles of another size. The overlap is still found,
// by projection.
func TestFacingPairsNonCongruent(t *testing.T) {
	shifted := plate(2, 1, 2.5, 12.5, 1, 19, 3, 5) // x 2.5..97.5, y 12.5..27.5
	tri := plate(2, 1, 1.3, 10.7, 1, 23, 5, 4.1)   // x 1.3..95.6, y 10.7..31.2
	tri.Tri = true
	aligned := plate(2, 1, 0, 10, 1, 20, 4, 5)
	aligned.Tri = true
	for _, tc := range []struct {
		name          string
		strip         sheet
		match         joints.Match
		facing        int
		area, length  float64
		width, centre float64
	}{
		// Every node lies 2.5 mm (half an element) from the plate's
		// nodes in x and y: none faces one. The overlap is the strip,
		// 95 x 15 mm (hand calculation), traced on the plate, whose
		// elements the strip's corners fall inside: each corner is put
		// back (it was cut diagonally, half a 2.5 mm square short).
		{"shifted grid", shifted, joints.Projected, 0, 95 * 15, 95, 15, 20},
		{"triangles against quads", tri, joints.Projected, -1, 94.3 * 20.5, 94.3, 20.5, 20.95},
		// Triangles on the quads' grid keep the nodes: they all face.
		{"triangles on the same grid", aligned, joints.Congruent, 105, 2000, 100, 20, 20},
	} {
		t.Run(tc.name, func(t *testing.T) {
			m := mesh(plate(1, 1, 0, 0, 0, 20, 10, 5), tc.strip)
			f := one(t, findAll(t, m, joints.FlangeOptions{}))
			if f.Match != tc.match || tc.facing >= 0 && len(f.Facing) != tc.facing {
				t.Errorf("%v with %d facing pairs, want %v with %d", f.Match, len(f.Facing), tc.match, tc.facing)
			}
			if !near(f.Area, tc.area, 1e-5*tc.area) || !near(f.Length, tc.length, 0.05) || !near(f.Width.Mean, tc.width, 0.05) {
				t.Errorf("area %g, length %g, width %+v; want %g, %g, %g", f.Area, f.Length, f.Width, tc.area, tc.length, tc.width)
			}
			for _, p := range f.Centreline {
				if !near(p.Y, tc.centre, 0.3) || !near(p.Z, 0.5, 1e-9) {
					t.Fatalf("centreline point %v off the middle y = %g of the faying surface z = 0.5", p, tc.centre)
				}
			}
		})
	}
}

// annulus is a flat ring of radii r0..r1 round the z axis, nr elements
// across and na round.
func annulus(part int64, t, z, r0, r1 float64, nr, na int) sheet {
	return sheet{Part: part, T: t, NU: na, NV: nr, Wrap: true, At: func(i, j int) r3.Vec {
		a := 2 * math.Pi * float64(i) / float64(na)
		r := r0 + (r1-r0)*float64(j)/float64(nr)
		return r3.Vec{X: r * math.Cos(a), Y: r * math.Sin(a), Z: z}
	}}
}

// A ring flange round a pipe pass-through: a flat ring of radii 30 to
// 45 mm on a wider one, both meshed with 72 elements round. The
// centreline is the circle of radius 37.5, 2 pi 37.5 = 235.62 mm long
// (closed form); it is a polygon of about 30 sides, 0.2 per cent short
// (n sin(pi/n) / pi), so the length is held to 0.5 per cent.
func TestRingFlange(t *testing.T) {
	m := mesh(annulus(1, 1, 0, 20, 60, 16, 72), annulus(2, 1, 1, 30, 45, 6, 72))
	f := one(t, findAll(t, m, joints.FlangeOptions{}))
	if !f.Closed {
		t.Fatalf("ring flange not closed")
	}
	want := 2 * math.Pi * 37.5
	if !near(f.Length, want, 0.005*want) {
		t.Errorf("centreline length %g, want %g", f.Length, want)
	}
	for _, p := range f.Centreline {
		if r := math.Hypot(p.X, p.Y); !near(r, 37.5, 0.2) {
			t.Fatalf("centreline point %v at radius %g, want 37.5", p, r)
		}
	}
	// Area pi (45^2 - 30^2) of the circle, less the polygon's shortfall.
	if area := math.Pi * (45*45 - 30*30); !near(f.Area, area, 0.002*area) || !near(f.Width.Mean, 15, 0.1) {
		t.Errorf("area %g, width %+v; want %g, 15", f.Area, f.Width, area)
	}
	if len(f.Facing) != 72*7 || f.Match != joints.Congruent {
		t.Errorf("%d facing pairs (%v), want %d", len(f.Facing), f.Match, 72*7)
	}
}

// cylinder is a strip of a cylinder of radius r round the z axis, from 0
// to 120 degrees, 20 mm high, nu elements round and 8 up.
func cylinder(part int64, r float64, nu int) sheet {
	return sheet{Part: part, T: 1, NU: nu, NV: 8, At: func(i, j int) r3.Vec {
		a := 2 * math.Pi / 3 * float64(i) / float64(nu)
		return r3.Vec{X: r * math.Cos(a), Y: r * math.Sin(a), Z: 2.5 * float64(j)}
	}}
}

// A flange bent round an arc (as round a wheel arch): two cylindrical
// strips of radii 100 and 101 mm over 120 degrees. The centreline runs
// on the faying surface at radius 100.5 mm, mid-height, and is as long
// as the arc, 100.5 x 2 pi / 3 = 210.49 mm (closed form), not the chord
// (174.07 mm).
func TestCurvedFlange(t *testing.T) {
	for _, nu := range []int{60, 47} { // congruent, then not
		m := mesh(cylinder(1, 100, 60), cylinder(2, 101, nu))
		f := one(t, findAll(t, m, joints.FlangeOptions{}))
		want := 100.5 * 2 * math.Pi / 3
		if !near(f.Length, want, 0.003*want) {
			t.Errorf("nu %d: centreline length %g, want %g (the arc)", nu, f.Length, want)
		}
		for _, p := range f.Centreline {
			if r := math.Hypot(p.X, p.Y); !near(r, 100.5, 0.5) || !near(p.Z, 10, 0.05) {
				t.Fatalf("nu %d: centreline point %v at radius %g, height %g; want 100.5, 10", nu, p, r, p.Z)
			}
		}
		if wantMatch := map[int]joints.Match{60: joints.Congruent, 47: joints.Projected}[nu]; f.Match != wantMatch || f.Closed {
			t.Errorf("nu %d: %v, closed %v", nu, f.Match, f.Closed)
		}
	}
}

// Sheets farther apart than contact allows, or at an angle, have no
// flange; two overlaps of one pair are two flanges, numbered along.
func TestFlangeSelection(t *testing.T) {
	far := mesh(plate(1, 1, 0, 0, 0, 20, 10, 5), plate(2, 1, 0, 10, 1.3, 20, 4, 5)) // 0.3 mm off contact, allowance 0.25
	if n := len(findAll(t, far, joints.FlangeOptions{}).Flanges); n != 0 {
		t.Errorf("gap 0.3 mm beyond contact: %d flanges", n)
	}
	wall := sheet{Part: 2, T: 1, NU: 20, NV: 4, At: func(i, j int) r3.Vec { return r3.Vec{X: 5 * float64(i), Y: 20, Z: 1 + 5*float64(j)} }}
	if n := len(findAll(t, mesh(plate(1, 1, 0, 0, 0, 20, 10, 5), wall), joints.FlangeOptions{}).Flanges); n != 0 {
		t.Errorf("a wall standing on the plate: %d flanges", n)
	}
	two := plate(2, 1, 0, 10, 1, 20, 4, 5)
	two.Skip = func(i, j int) bool { return i >= 9 && i < 11 }
	set := findAll(t, mesh(plate(1, 1, 0, 0, 0, 20, 10, 5), two), joints.FlangeOptions{})
	if len(set.Flanges) != 2 || set.Flanges[0].ID != "1-2-1" || set.Flanges[1].ID != "1-2-2" ||
		set.Flanges[0].Centreline[0].X > set.Flanges[1].Centreline[0].X {
		t.Fatalf("two overlaps: %d flanges", len(set.Flanges))
	}
	for _, f := range set.Flanges {
		if !near(f.Length, 45, 0.05) {
			t.Errorf("%s: length %g, want 45", f.ID, f.Length)
		}
	}
}
