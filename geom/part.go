package geom

import (
	"fmt"
	"math"
)

// Surface says which surface of a sheet its mesh was drawn on.
type Surface int8

const (
	// SurfaceMid is the mid-surface, the default for shell meshes.
	SurfaceMid Surface = iota
	// SurfaceTop is the outer surface on the side the element normals point to.
	SurfaceTop
	// SurfaceBottom is the outer surface on the side opposite the normals.
	SurfaceBottom
)

// String returns "mid", "top" or "bottom".
func (s Surface) String() string {
	switch s {
	case SurfaceTop:
		return "top"
	case SurfaceBottom:
		return "bottom"
	default:
		return "mid"
	}
}

// ParseSurface reads "mid", "top" or "bottom"; the empty string is "mid".
func ParseSurface(s string) (Surface, error) {
	switch s {
	case "", "mid":
		return SurfaceMid, nil
	case "top":
		return SurfaceTop, nil
	case "bottom":
		return SurfaceBottom, nil
	}
	return SurfaceMid, fmt.Errorf("unknown reference surface %q (want mid, top or bottom)", Excerpt(s))
}

// MidOffset returns the signed distance, along the element normal, from
// the meshed surface to the sheet's mid-surface for a sheet of thickness t:
// 0 for mid, -t/2 for top (the mid-surface lies below), +t/2 for bottom.
func (s Surface) MidOffset(t float64) float64 {
	switch s {
	case SurfaceTop:
		return -t / 2
	case SurfaceBottom:
		return t / 2
	}
	return 0
}

// Part is one sheet-metal part: a set of shell elements with a thickness.
type Part struct {
	ID        int64
	Name      string  // optional
	Thickness float64 // mm; 0 when unknown
	Material  string  // optional
	Surface   Surface
	// Mesh optionally names the mesh file (by base name) whose elements all
	// belong to this part, for files that carry no part array.
	Mesh string
}

// OffsetTolerance, mm, is how far an offset given in a parts table may
// differ from the one its surface implies: half a unit in the third
// decimal, the precision tables in millimetres are written to.
const OffsetTolerance = 0.0005

// SurfaceForOffset returns the surface whose MidOffset(t) is off, to
// within OffsetTolerance, and false when none is: Joinery places a sheet's
// mid-surface on its meshed surface or half its thickness to either side.
func SurfaceForOffset(off, t float64) (Surface, bool) {
	for _, s := range []Surface{SurfaceMid, SurfaceTop, SurfaceBottom} {
		if math.Abs(off-s.MidOffset(t)) <= OffsetTolerance {
			return s, true
		}
	}
	return SurfaceMid, false
}
