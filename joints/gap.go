package joints

import (
	"math"

	"gonum.org/v1/gonum/spatial/r3"
)

// SquareGap returns the gap between the mid-surfaces of two consecutive
// sheets a and b of a stack measured square to the sheets, the figure
// their contact gap, (ta+tb)/2, is measured in. along is the distance
// along the unit stack axis between the points where the axis meets
// their mid-surfaces (b's minus a's), ta and tb their thicknesses, na
// and nb their normals there (either sense).
//
// A plane d from a point lies d/c from it along a line whose direction
// makes cos c with the plane's normal (hand calculation). So the axis
// meets a's faying face ta/(2 ca) past a's mid-surface and b's
// tb/(2 cb) before b's (ca, cb: |cos| of each normal to the axis), and
// the air between the faces along the axis is along minus the two. From
// the point midway between the faces' crossings the faces lie
// (air/2) ca and (air/2) cb away square to each; the gap is contact plus
// their sum, contact + air (ca+cb)/2:
//   - parallel sheets (ca = cb = c): along times c, their separation,
//     exactly (along is d/c), whatever the axis's tilt;
//   - sheets whose faying faces touch on the axis: contact exactly;
//   - sheets at an angle theta to each other: the opening of the wedge
//     of their faces at that midway point, the sum of its distances
//     square to the two faces; with the axis square to one face, a line
//     s from the faces' meeting line, s tan(theta) (1 + cos(theta))/2
//     (plane geometry: the faces lie s tan(theta) apart along the axis).
//
// A zero normal gives along unchanged.
func SquareGap(along, ta, tb float64, na, nb, axis r3.Vec) float64 {
	ca, cb := cosToAxis(na, axis), cosToAxis(nb, axis)
	if ca == 0 || cb == 0 {
		return along
	}
	if ca == cb { // parallel: along c, with no rounding of the detour
		return along * ca
	}
	air := along - ta/(2*ca) - tb/(2*cb)
	return (ta+tb)/2 + air*(ca+cb)/2
}

// cosToAxis returns |cos| of the angle between n and the unit axis, 0
// for a zero n.
func cosToAxis(n, axis r3.Vec) float64 {
	l := r3.Norm(n)
	if l == 0 {
		return 0
	}
	return math.Abs(r3.Dot(n, axis)) / l
}

// AxisCrossing returns the coordinate along the unit axis, from a point
// q, at which the axis through q meets the plane through q + v moved off
// by off along its unit normal n: the mid-surface of a sheet whose meshed
// surface passes through q + v (off its MidOffset), where SquareGap takes
// the sheets' positions. On a sheet tilted to the axis this does not
// depend on where along the axis q lies. A normal square to the axis
// (never within a stack's angle limit) falls back to the distance along
// the axis.
func AxisCrossing(v, n, axis r3.Vec, off float64) float64 {
	c := r3.Dot(n, axis)
	if math.Abs(c) < 1e-6 {
		return r3.Dot(v, axis) + off*c
	}
	return (r3.Dot(v, n) + off) / c
}
