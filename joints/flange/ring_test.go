package flange

import (
	"math"
	"testing"

	"github.com/joinery-cae/joinery/joints"
)

// frame is a square plate of n by n quads of size h from (x0, x0) at
// height z, with the quads from hole0 to hole1 (exclusive) in both
// directions left out: a frame round a square opening.
func frame(part int64, t, x0, z float64, n, hole0, hole1 int, h float64) sheet {
	s := plate(part, t, x0, x0, z, n, n, h)
	s.Skip = func(i, j int) bool { return i >= hole0 && i < hole1 && j >= hole0 && j < hole1 }
	return s
}

// squareRing is a square ring flange: the overlap runs from lo to lo+a+2w
// in x and y round an opening from lo+w to lo+w+a.
type squareRing struct {
	name    string
	m       func() []sheet
	lo      float64
	a, w, h float64 // opening, width, host element size
	tol     float64 // on the length
	off     float64 // of the centreline's points from the square
}

// Square ring flanges, as round a window opening. The centreline of a
// strip of constant width is its mid-line, so round a square opening of
// side a a ring of width w has the square of side a+w as its centreline,
// 4(a+w) long (closed form). Congruent frames hold the overlap's corners
// as nodes: the length is held to 0.02 h and the points to 0.005 h (the
// simplification tolerance of the centreline is 0.02 h). Where the host
// mesh does not hold the overlap's edges and corners, the traced outline
// cuts each corner inside a host element (the centreline puts the
// corner back where the outline runs straight up to it) and, on
// triangles, dents the outline by up to about 0.1 h near the other
// sheet's inner corners: the length is held to 0.5 h, the points to
// 0.2 h.
func squareRings() []squareRing {
	// A host grid of 2.7 mm from -4.3 mm, its own opening (17.3 to
	// 44.3 mm) inside the other sheet's (15 to 45): the overlap is the
	// other sheet's frame, its edges cut through the host's elements.
	shifted := func(tri bool) func() []sheet {
		return func() []sheet {
			s := plate(2, 1, -4.3, -4.3, 1, 27, 27, 2.7)
			s.Skip = func(i, j int) bool { return i >= 8 && i < 18 && j >= 8 && j < 18 }
			s.Tri = tri
			return []sheet{frame(1, 1, 0, 0, 12, 3, 9, 5), s}
		}
	}
	return []squareRing{
		// The reviewer's model: a 20 mm opening, 10 mm wide, 120 mm round.
		{"congruent, 10 mm wide", func() []sheet { return []sheet{frame(1, 1, 0, 0, 8, 2, 6, 5), frame(2, 1, 0, 1, 8, 2, 6, 5)} }, 0, 20, 10, 5, 0.02 * 5, 0.005 * 5},
		{"congruent, 15 mm wide", func() []sheet { return []sheet{frame(1, 1, 0, 0, 12, 3, 9, 5), frame(2, 1, 0, 1, 12, 3, 9, 5)} }, 0, 30, 15, 5, 0.02 * 5, 0.005 * 5},
		{"congruent, 2.5 mm elements", func() []sheet {
			return []sheet{frame(1, 1, 0, 0, 16, 4, 12, 2.5), frame(2, 1, 0, 1, 16, 4, 12, 2.5)}
		}, 0, 20, 10, 2.5, 0.02 * 2.5, 0.005 * 2.5},
		{"projected, quads", shifted(false), 0, 30, 15, 2.7, 0.5 * 2.7, 0.2 * 2.7},
		{"projected, triangles", shifted(true), 0, 30, 15, 2.7, 0.5 * 2.7, 0.2 * 2.7},
	}
}

// squareDist returns how far p lies off the square of side a+w centred
// on the ring, and its least distance to the ring's edges.
func (r squareRing) squareDist(x, y float64) (off, edge float64) {
	c := r.lo + r.a/2 + r.w
	dx, dy := math.Abs(x-c), math.Abs(y-c)
	off = math.Abs(math.Max(dx, dy) - (r.a+r.w)/2)
	outer := r.a/2 + r.w - math.Max(dx, dy)
	inner := math.Hypot(math.Max(dx-r.a/2, 0), math.Max(dy-r.a/2, 0))
	return off, math.Min(outer, inner)
}

func TestSquareRingFlange(t *testing.T) {
	for _, r := range squareRings() {
		t.Run(r.name, func(t *testing.T) {
			f := one(t, findAll(t, mesh(r.m()...), joints.FlangeOptions{}))
			want := 4 * (r.a + r.w)
			if !f.Closed || !near(f.Length, want, r.tol) {
				t.Errorf("closed %v, centreline length %g; want closed, %g within %g", f.Closed, f.Length, want, r.tol)
			}
			for _, p := range f.Centreline {
				if off, _ := r.squareDist(p.X, p.Y); off > r.off {
					t.Errorf("centreline point %v %g off the square of side %g", p, off, r.a+r.w)
				}
			}
			// The area is w (a+w) 4, so the mean width is w.
			if !near(f.Width.Mean, r.w, r.w*r.tol/want+0.01) {
				t.Errorf("width %+v, want mean %g", f.Width, r.w)
			}
		})
	}
}

// Welds on a square ring 15 mm wide lie on its mid-line, 7.5 mm from
// both edges and more at the corners, at least the edge rule's one
// nugget diameter (5 sqrt(t) = 5 mm for 1 mm sheets, common practice):
// no flange-narrow finding, equal spacing all round. On the 10 mm ring
// the mid-line lies exactly one nugget diameter from both edges.
func TestPlaceOnSquareRing(t *testing.T) {
	for _, r := range squareRings() {
		t.Run(r.name, func(t *testing.T) {
			set, fs := place(t, mesh(r.m()...), joints.FlangeOptions{Pitch: joints.Pitch{MM: 30}}, joints.BuildOptions{})
			f := one(t, set)
			if n := codeCount(fs, joints.CodeFlangeNarrow); r.w >= 15 && n != 0 {
				t.Errorf("flange-narrow on a %g mm ring: %v", r.w, fs)
			}
			if len(f.Welds) < 3 {
				t.Fatalf("%d welds", len(f.Welds))
			}
			for i, w := range f.Welds {
				off, edge := r.squareDist(w.Joint.Point.X, w.Joint.Point.Y)
				if off > r.off || edge < math.Min(5, r.w/2-r.off)-1e-6 {
					t.Errorf("weld %s at %v: %g off the mid-line, %g from the edges", w.Joint.ID, w.Joint.Point, off, edge)
				}
				if i > 0 && !near(w.S-f.Welds[i-1].S, f.Pitch, 1e-9) {
					t.Errorf("spacing %g, pitch %g", w.S-f.Welds[i-1].S, f.Pitch)
				}
			}
		})
	}
}

// The annulus r1 = 30 to r2 = 45 mm (a ring flange round a pipe
// pass-through) has the circle of radius (r1+r2)/2 as its centreline,
// pi (r1+r2) = 235.62 mm long (closed form). The overlap's outline is a
// polygon of n sides (the sheets' 72 or 50 elements round), and the
// mid-line between two such polygons is the one of radius (r1+r2)/2,
// n sin(pi/n) / pi of the circle's length (0.03 % short for 72 sides,
// 0.07 % for 50): the length is held to 0.05 % of that on congruent
// meshes and 0.1 % where the 50-gon's edges cut the host's elements.
func TestAnnulusLength(t *testing.T) {
	for _, tc := range []struct {
		na, sides int
		tol       float64
		match     joints.Match
	}{{72, 72, 0.0005, joints.Congruent}, {50, 50, 0.001, joints.Projected}} {
		m := mesh(annulus(1, 1, 0, 20, 60, 16, 72), annulus(2, 1, 1, 30, 45, 6, tc.na))
		f := one(t, findAll(t, m, joints.FlangeOptions{}))
		n := float64(tc.sides)
		want := math.Pi * (30 + 45) * n * math.Sin(math.Pi/n) / math.Pi
		if !f.Closed || f.Match != tc.match || !near(f.Length, want, tc.tol*want) {
			t.Errorf("%d round: closed %v, %v, length %g; want closed, %v, %g (%g of pi (r1+r2))",
				tc.na, f.Closed, f.Match, f.Length, tc.match, want, want/(math.Pi*75))
		}
		for _, p := range f.Centreline {
			if r := math.Hypot(p.X, p.Y); !near(r, 37.5, 0.1) {
				t.Errorf("%d round: centreline point %v at radius %g, want 37.5", tc.na, p, r)
			}
		}
	}
}
