package flange

import (
	"math"
	"testing"

	"github.com/joinery-cae/joinery/joints"
	"gonum.org/v1/gonum/spatial/r3"
)

// bentStrip returns a sheet bent about the line x = 50 (y along it) by
// angle th, its mid-surface offset by off along its normal from the
// reference: a first leg z = off for x up to the crease, a second leg
// 50 mm long rising at th; 10 + 10 quads along, nv of 5 mm across. The
// crease of the offset sheet is where its two legs' planes meet,
// x = 50 - off tan(th/2).
func bentStrip(part int64, off, th float64, nv int) sheet {
	xc := 50 - off*math.Tan(th/2)
	return sheet{Part: part, T: 1, NU: 20, NV: nv, At: func(i, j int) r3.Vec {
		y := 5 * float64(j)
		if i <= 10 {
			return r3.Vec{X: xc * float64(i) / 10, Y: y, Z: off}
		}
		u := 5 * float64(i-10)
		return r3.Vec{X: 50 + u*math.Cos(th) - off*math.Sin(th), Y: y, Z: u*math.Sin(th) + off*math.Cos(th)}
	}}
}

// A flange that runs across a crease: a strip 20 mm wide bent by th
// about a line square to it, lapped by a wider sheet bent with it, their
// mid-surfaces 1 mm apart (t 1 and 1). The faying surface lies 0.5 mm
// from the strip's mid-surface, towards the other sheet; each of its
// legs is 50 - 0.5 s tan(th/2) long (s = 1 with the other sheet on the
// inside of the bend, -1 on the outside), so the centreline, which runs
// on it, is 100 - s tan(th/2) long (closed form).
// Before the centreline was laid on the sheets it ran from station to
// station, a bin (10 mm) apart, through the air inside the bend: 3.5 mm
// short over a right angle (95.47 mm for 99), 1.5 mm over 60 degrees.
func TestFlangeAcrossCrease(t *testing.T) {
	for _, tc := range []struct {
		deg, side float64
	}{
		{10, 1}, {30, 1}, {60, 1}, {90, 1}, {120, 1},
		{30, -1}, {90, -1}, {120, -1},
	} {
		th := tc.deg * math.Pi / 180
		m := mesh(bentStrip(1, 0, th, 4), bentStrip(2, tc.side, th, 8))
		f := one(t, findAll(t, m, joints.FlangeOptions{}))
		want := 100 - tc.side*math.Tan(th/2)
		// To 0.02 h (h = 5 mm, README), the ends' share of it too.
		if !near(f.Length, want, 0.1) {
			t.Errorf("bend %g deg, side %g: length %.6g, want %.6g (closed form)", tc.deg, tc.side, f.Length, want)
		}
		// Every centreline point on the faying surface, mid-width.
		xc := 50 - 0.5*tc.side*math.Tan(th/2)
		for _, p := range f.Centreline {
			d1 := math.Abs(p.Z - 0.5*tc.side)
			if p.X > xc+1e-6 {
				d1 = math.Inf(1)
			}
			d2 := math.Abs(-(p.X-xc)*math.Sin(th) + (p.Z-0.5*tc.side)*math.Cos(th))
			if d := math.Min(d1, d2); d > 0.1 || !near(p.Y, 10, 0.1) {
				t.Errorf("bend %g deg, side %g: centreline point %v is %.3g mm off the faying surface", tc.deg, tc.side, p, d)
			}
		}
	}
}

// The same flanges measured across: the strip is 20 mm wide everywhere,
// so every cross-section is 20 mm and the overlap's area on the faying
// surface, where the centreline is measured, is 20 (100 - s tan(th/2))
// mm² (closed form: each leg of the faying surface is a 20 mm wide
// rectangle 50 - 0.5 s tan(th/2) long), and the mean width, area over
// length, 20 mm. The host, the finer mesh, is the other sheet with it
// on the inside of the bend (its mid-surface 1 mm inside the strip's,
// its own area 20 (100 - 2 tan(th/2))), the strip with it on the
// outside (its own area 2000 mm²): before the area was measured on the
// faying surface the mean width was 19.80 mm over a right angle on
// either side, 19.65 mm over 120 degrees. And before the pieces'
// normals were given one orientation across the crease (their dot
// product is negative past a right angle) the chart's lateral sense
// flipped along the spine near a sharp bend, its cross-sections cut
// short there: the minimum width over 120 degrees was 16.08 mm (inside)
// and 15.08 mm (outside). Meshes whose second leg's elements run the
// other way round (normals the other way there) and triangles measure
// the same.
func TestFlangeAcrossCreaseWidth(t *testing.T) {
	for _, tc := range []struct {
		deg, side float64
		mixed     bool // the second legs' elements reversed
		tri       bool
	}{
		{10, 1, false, false}, {30, 1, false, false}, {60, 1, false, false}, {90, 1, false, false}, {120, 1, false, false},
		{10, -1, false, false}, {30, -1, false, false}, {60, -1, false, false}, {90, -1, false, false}, {120, -1, false, false},
		{90, 1, true, false}, {120, 1, true, false}, {120, -1, true, false},
		{90, 1, false, true}, {120, -1, false, true},
	} {
		th := tc.deg * math.Pi / 180
		strip, other := bentStrip(1, 0, th, 4), bentStrip(2, tc.side, th, 8)
		if tc.mixed {
			leg2 := func(i, _ int) bool { return i >= 10 }
			strip.FlipAt, other.FlipAt = leg2, leg2
		}
		strip.Tri, other.Tri = tc.tri, tc.tri
		f := one(t, findAll(t, mesh(strip, other), joints.FlangeOptions{}))
		l := 100 - tc.side*math.Tan(th/2)
		// Area to rounding: the overlap's edges are the strip's own; on
		// triangles the diagonals cross the strip's edge, each crossing
		// found to a bracket of crossingTol, so to crossingTol times
		// the length. Length to 0.02 h (README), and the widths with it.
		tol := 1e-6
		if tc.tri {
			tol = crossingTol * l
		}
		if !near(f.Area, 20*l, tol) || !near(f.Length, l, 0.1) ||
			!near(f.Width.Min, 20, 0.02) || !near(f.Width.Mean, 20, 0.02) || !near(f.Width.Max, 20, 0.02) {
			t.Errorf("bend %g deg, side %g, mixed %v, triangles %v: area %.6g, length %.6g, width %.6g / %.6g / %.6g; want %.6g, %.6g, 20 (closed form)",
				tc.deg, tc.side, tc.mixed, tc.tri, f.Area, f.Length, f.Width.Min, f.Width.Mean, f.Width.Max, 20*l, l)
		}
	}
}
