package joints

import (
	"math"
	"testing"

	"gonum.org/v1/gonum/spatial/r3"
)

// SquareGap against closed forms (plane geometry): a plane d away lies
// d / cos(theta) along a line at theta to its normal; two faces meeting
// at theta, a line square to one of them s from where they meet, lie
// s tan(theta) apart along it, and midway between them s tan(theta)/2
// and s tan(theta) cos(theta)/2 away square to each.
func TestSquareGap(t *testing.T) {
	deg := func(d float64) float64 { return d * math.Pi / 180 }
	unit := func(th float64) r3.Vec { s, c := math.Sincos(th); return r3.Vec{X: s, Z: c} }
	z := r3.Vec{Z: 1}
	const ta, tb = 1.0, 1.5 // contact 1.25
	c19, t19 := math.Cos(deg(19)), math.Tan(deg(19))
	for _, c := range []struct {
		name         string
		along        float64
		na, nb, axis r3.Vec
		want         float64
	}{
		{"square to parallel sheets", 2.25, z, z, z, 2.25},
		{"parallel sheets, axis at 40deg", 2.25 / math.Cos(deg(40)), z, z, unit(deg(40)), 2.25},
		{"parallel sheets at 19deg to the axis, normals opposed", 1.75 / c19, unit(deg(19)), r3.Scale(-1, unit(deg(19))), z, 1.75},
		{"faces touching on the axis, b at 19deg", ta/2 + tb/(2*c19), z, unit(deg(19)), z, 1.25},
		{"faces touching on the axis, a at 19deg", ta/(2*c19) + tb/2, unit(deg(19)), z, z, 1.25},
		{"wedge 19deg, 2 mm from where the faces meet", ta/2 + 2*t19 + tb/(2*c19), z, unit(deg(19)), z, 1.25 + 2*t19*(1+c19)/2},
		{"wedge 19deg, 2 mm on the closed side", ta/2 - 2*t19 + tb/(2*c19), z, unit(deg(19)), z, 1.25 - 2*t19*(1+c19)/2},
		{"zero normal: along as given", 1.7, r3.Vec{}, z, z, 1.7},
	} {
		if got := SquareGap(c.along, ta, tb, c.na, c.nb, c.axis); math.Abs(got-c.want) > 1e-12 {
			t.Errorf("%s: %.15g, want %.15g", c.name, got, c.want)
		}
	}
}

// AxisCrossing against plane geometry: a plane d from a point lies
// d / cos(theta) from it along a line at theta to its normal; moving the
// plane off along its normal by off moves the crossing by off / cos(theta).
func TestAxisCrossing(t *testing.T) {
	deg := func(d float64) float64 { return d * math.Pi / 180 }
	z := r3.Vec{Z: 1}
	s, c := math.Sincos(deg(19))
	n := r3.Vec{Y: -s, Z: c}
	for _, tc := range []struct {
		name string
		v, n r3.Vec
		off  float64
		want float64
	}{
		{"square plane 2 up", r3.Vec{X: 3, Z: 2}, z, 0, 2},
		{"square plane, moved off 0.5", r3.Vec{X: 3, Z: 2}, z, 0.5, 2.5},
		{"plane at 19deg, 2 mm away square to it", r3.Scale(2, n), n, 0, 2 / c},
		{"plane at 19deg through a point off the axis", r3.Add(r3.Scale(2, n), r3.Vec{X: 7, Y: 4 * c, Z: 4 * s}), n, 0, 2 / c},
		{"plane at 19deg, moved off 0.5", r3.Scale(2, n), n, 0.5, 2.5 / c},
		{"normal reversed", r3.Scale(2, n), r3.Scale(-1, n), -0.5, 2.5 / c},
	} {
		if got := AxisCrossing(tc.v, tc.n, z, tc.off); math.Abs(got-tc.want) > 1e-12 {
			t.Errorf("%s: %.15g, want %.15g", tc.name, got, tc.want)
		}
	}
}
