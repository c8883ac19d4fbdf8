package joints

import (
	"fmt"

	"github.com/joinery-cae/joinery/geom"
)

// Unit is the length unit of a job's inputs: meshes, parts-table
// thicknesses, joint points and diameters alike. Joinery works in
// millimetres: a pipeline scales the inputs to mm once they are read, so
// that rules, defaults and tolerances apply in mm, and writes its
// outputs back in the inputs' unit, so that they overlay the meshes.
type Unit int8

// The units a job may give.
const (
	Millimetre Unit = iota // the default
	Metre
	Inch
)

// ParseUnit reads "mm", "m" or "in"; "" is mm.
func ParseUnit(s string) (Unit, error) {
	switch s {
	case "", "mm":
		return Millimetre, nil
	case "m":
		return Metre, nil
	case "in":
		return Inch, nil
	}
	return Millimetre, fmt.Errorf("unknown unit %q (want mm, m or in)", geom.Excerpt(s))
}

// String returns "mm", "m" or "in".
func (u Unit) String() string {
	switch u {
	case Metre:
		return "m"
	case Inch:
		return "in"
	}
	return "mm"
}

// MM returns the millimetres in one unit: 1, 1000, or 25.4 for the inch
// (exactly, by the international yard and pound agreement of 1959).
func (u Unit) MM() float64 {
	switch u {
	case Metre:
		return 1000
	case Inch:
		return 25.4
	}
	return 1
}

// ScaleJoints multiplies the lengths of every joint by f: its point and
// its diameter, washer and hole.
func ScaleJoints(js []Joint, f float64) {
	if f == 1 {
		return
	}
	for i := range js {
		j := &js[i]
		j.Point.X *= f
		j.Point.Y *= f
		j.Point.Z *= f
		j.Diameter *= f
		j.Washer *= f
		j.Hole *= f
	}
}
