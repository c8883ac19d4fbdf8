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
