package bolt

import (
	"math"

	"gonum.org/v1/gonum/spatial/r3"

	"github.com/joinery-cae/joinery/geom"
)

// alignAxis returns the bolt's axis as built and the crossings on it:
// the line along the direction of f (listed, or the element normal)
// fitted through the centres of the meshed holes among xs, and every
// sheet's crossing moved onto it, so that all centres lie on one
// straight shank.
//
// A bolt passes through its holes, so the holes, not the listed point,
// tell where its axis lies across; its direction stays the one given
// (the head and nut seat square to it). The fitted line is the least
// squares one of that direction: through the mean of the holes' centres
// across the axis (one hole: through its centre). A holed sheet's
// centre is where the line meets the hole's plane; a sheet without a
// meshed hole is crossed again on the fitted line (the element the line
// passes through nearest the point), else, where the moved line leaves
// its elements, where it meets the plane tangent to the sheet at the
// old crossing. Without a meshed hole the line is f's, and xs is
// returned as it came.
//
// Along the axis nothing moves but by the sheets' tilt: the fitted line
// runs through f.P shifted square to the axis, so coordinates along it
// are those along f.
func alignAxis(m *geom.Mesh, f *frame, near []int32, xs []crossing, reach, l, cosTol float64) frame {
	var shift r3.Vec
	holes := 0
	for _, cr := range xs {
		if cr.loop == nil {
			continue
		}
		d := r3.Sub(cr.centre, f.P)
		shift = r3.Add(shift, r3.Sub(d, r3.Scale(r3.Dot(d, f.A), f.A)))
		holes++
	}
	if holes == 0 {
		return *f
	}
	shift = r3.Scale(1/float64(holes), shift)
	// The shift lies square to the axis by construction; rounding aside.
	shift = r3.Sub(shift, r3.Scale(r3.Dot(shift, f.A), f.A))
	g := *f
	g.P = r3.Add(f.P, shift)
	for i := range xs {
		cr := &xs[i]
		if cr.loop != nil {
			cr.t = meetPlane(&g, cr.centre, cr.normal, cr.t)
			cr.point = g.at(cr.t)
			continue
		}
		if r3.Norm2(shift) == 0 {
			continue
		}
		pi := cr.part
		again := crossings(m, &g, near, reach, l, cosTol, func(p int32) bool { return p == pi })
		if len(again) == 1 && again[0].loop == nil {
			*cr = again[0]
			continue
		}
		cr.t = meetPlane(&g, cr.point, cr.normal, cr.t)
		cr.point = g.at(cr.t)
	}
	return g
}

// meetPlane returns the coordinate along g at which its line meets the
// plane through q with normal n; t when the plane lies along the axis
// (never within the angle limit of a stack).
func meetPlane(g *frame, q, n r3.Vec, t float64) float64 {
	c := r3.Dot(n, g.A)
	if math.Abs(c) < 1e-9 {
		return t
	}
	return r3.Dot(r3.Sub(q, g.P), n) / c
}
