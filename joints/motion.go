package joints

import "gonum.org/v1/gonum/spatial/r3"

// Kinds of free motion (Motion.Kind), in plain words of our own.
const (
	// MotionRotation: a turn about a line (Point on it, Direction along
	// it), as of a strip held by one straight line of ball joints.
	MotionRotation = "rotation"
	// MotionTranslation: a slide along Direction (Count > 1: in a plane
	// or in space; Direction is then the first of them).
	MotionTranslation = "translation"
	// MotionScrew: a turn about a line with a slide along it, Pitch mm
	// per radian.
	MotionScrew = "screw"
	// MotionPivot: Count turns about one point (Point), as of a body held
	// at a single ball joint (Count 3); Direction is zero.
	MotionPivot = "pivot"
	// MotionSeveral: Count free motions that share no point or line;
	// Point and Direction describe the first of them.
	MotionSeveral = "several"
)

// Motion is a free motion found by the kinematic checks: how a body (a
// part, a group of parts held rigidly together, or a node a connector
// made) can move relative to what it is tied to without any connector
// resisting it, in the small-displacement sense.
type Motion struct {
	Kind string
	// Point is a point of the axis of a rotation or screw (the one nearest
	// the ties concerned) or the centre of a pivot, mm; zero with
	// HasPoint false for translations.
	Point    r3.Vec
	HasPoint bool
	// Direction is the unit axis of a rotation or screw, or the direction
	// of a translation, signed so that its largest component is positive;
	// zero for a pivot.
	Direction r3.Vec
	// Pitch is the slide along the axis per radian of turn of a screw, mm.
	Pitch float64
	// Count is the number of independent free motions described: 1 for a
	// single rotation, 3 for a pivot about a ball joint.
	Count int
}
