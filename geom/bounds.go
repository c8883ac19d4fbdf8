package geom

import (
	"fmt"
	"math"
)

// Plausible ranges of the lengths Joinery reads, in millimetres. A value
// outside them cannot be right for a sheet-metal assembly in any unit,
// so the readers refuse it at its line: it would otherwise pass every
// check and come out as a number hundreds of digits long. Readers compare
// value*ReadOptions.Scale with them, so they hold whatever the unit of
// the file.
const (
	// MaxThickness bounds sheet thicknesses, mm: sheet metal is 0.3 to
	// 6 mm thick, and the heaviest plates of rail-car and truck frames
	// are a few tens of millimetres (common practice); a shell element
	// of 100 mm or more is no sheet.
	MaxThickness = 100.0
	// MaxCoordinate bounds the magnitude of coordinates, mm: 10 km. The
	// largest assemblies Joinery is for (rail cars, bus bodies) are tens
	// of metres long, and models are placed near their own origin
	// (common practice); a coordinate of 10 km is no vehicle, and beyond
	// it float64 coordinates lose the resolution of micrometres that
	// projection needs.
	MaxCoordinate = 1e7
)

// scale returns the millimetres per unit of the file's lengths.
func (o ReadOptions) scale() float64 {
	if o.Scale > 0 {
		return o.Scale
	}
	return 1
}

// CheckThickness checks that a thickness t, in a unit of scale mm, is a
// positive finite number of at most MaxThickness mm. scale 0 means 1.
func CheckThickness(t, scale float64) error {
	if scale <= 0 {
		scale = 1
	}
	switch {
	case !(t > 0) || math.IsInf(t, 0):
		return fmt.Errorf("thickness %g is not a positive number", t)
	case t*scale > MaxThickness:
		return fmt.Errorf("thickness %s is more than %g mm, thicker than any sheet", InMM(t, scale), float64(MaxThickness))
	}
	return nil
}

// CoordinateLimit returns MaxCoordinate in a unit of scale mm (0 means
// 1): readers compare the magnitude of every coordinate with it, a test
// that also fails for NaN, and call CheckCoordinates for the message.
func CoordinateLimit(scale float64) float64 {
	if scale <= 0 {
		scale = 1
	}
	return MaxCoordinate / scale
}

// InRange reports whether every coordinate of a point has a magnitude of
// at most lim (CoordinateLimit); false for NaN and infinities.
func InRange(x, y, z, lim float64) bool {
	return math.Abs(x) <= lim && math.Abs(y) <= lim && math.Abs(z) <= lim
}

// CheckCoordinates checks that a point, in a unit of scale mm, has finite
// coordinates of magnitude at most MaxCoordinate mm. scale 0 means 1.
func CheckCoordinates(x, y, z, scale float64) error {
	if scale <= 0 {
		scale = 1
	}
	for _, v := range [3]float64{x, y, z} {
		switch {
		case math.IsNaN(v) || math.IsInf(v, 0):
			return fmt.Errorf("non-finite coordinate (%g, %g, %g)", x, y, z)
		case math.Abs(v)*scale > MaxCoordinate:
			return fmt.Errorf("coordinate %s lies more than %g km from the origin (%g, %g, %g): no vehicle is that large", InMM(v, scale), float64(MaxCoordinate/1e6), x, y, z)
		}
	}
	return nil
}

// InMM formats a value in a unit of scale mm for messages: "120 mm",
// "0.2 m (200 mm)", "5 in (127 mm)".
func InMM(v, scale float64) string {
	switch scale {
	case 1:
		return fmt.Sprintf("%g mm", v)
	case 1000:
		return fmt.Sprintf("%g m (%g mm)", v, v*scale)
	case 25.4:
		return fmt.Sprintf("%g in (%g mm)", v, v*scale)
	}
	return fmt.Sprintf("%g (%g mm)", v, v*scale)
}
