package joints

import (
	"fmt"
	"math"
	"slices"

	"github.com/joinery-cae/joinery/geom"
)

// Plausible ranges of the values a job gives, in millimetres and degrees.
// A value outside them cannot be right for a sheet-metal joint; left
// through, it would pass every check and come out as a number hundreds
// of digits long, or as outputs of hundreds of megabytes (a nugget of a
// metre tied a patch end to every node of a panel). Mesh thicknesses and
// coordinates are bounded by the readers (geom.MaxThickness,
// geom.MaxCoordinate).
const (
	// MaxNugget, mm: spot-weld nuggets are 3 to 10 mm across (5√t gives
	// 3.9 mm for 0.6 mm sheets and 8.7 mm for 3 mm ones) and the largest
	// resistance welds of heavy sections under 20 mm (common practice);
	// a nugget of 50 mm is no spot weld.
	MaxNugget = 50.0
	// MaxBoltSize bounds a bolt's diameter, washer and hole, mm: bolts
	// through sheet metal are M5 to M20 (common practice), and the
	// largest washer of ISO 7089, for M64, is 115 mm across (from memory).
	MaxBoltSize = 200.0
	// MaxReach, mm: a weld joins sheets within a few thicknesses of its
	// point (the default reach is 4.5 times the thickest sheet); a reach
	// of a metre takes in whole assemblies around every weld (our
	// choice).
	MaxReach = 1000.0
	// MaxGapAllowance, mm: an allowance above the thickest possible sheet
	// (geom.MaxThickness) accepts any gap (our choice).
	MaxGapAllowance = geom.MaxThickness
	// MaxAngleLimit, degrees: normals are compared as axes, so no angle
	// between them exceeds 90 degrees.
	MaxAngleLimit = 90.0
	// MaxFactor bounds the lateral, edge and node factors, which are
	// multiples of a nugget radius or diameter (our choice: ten nuggets
	// is no longer about the weld).
	MaxFactor = 10.0
	// MaxPatchNodes caps the nodes a patch end ties (Patch attachment):
	// a 10 mm nugget on a 1 mm mesh, finer than crash models of sheet
	// metal use (common practice: 2 to 10 mm elements), covers about 80
	// nodes; more add nothing to how the load spreads and grow the
	// outputs (our choice). When more nodes lie within the nugget, the
	// end ties the nearest ones and a patch-capped finding says so.
	MaxPatchNodes = 100
	// MinPitch, mm, is the smallest weld pitch flanges places welds at:
	// the smallest fused zone of the spacing table (spacingTable: 2.9 mm
	// for 0.25 mm sheets), so that closer welds overlap on any sheet. A
	// finer pitch places nothing better (the welds are spaced wider to
	// keep apart, pitch-too-fine) and costs time growing with the square
	// of the stations per flange: 0.001 mm ran for hours on the
	// example's nine flanges.
	MinPitch = 2.9
)

// minPitchWant says what a pitch below MinPitch should be.
func minPitchWant() string {
	return fmt.Sprintf("want a length in mm of at least %g, the smallest nugget of the spacing table (closer welds overlap), or table", MinPitch)
}

// Plausible ranges of a sheet-metal model in millimetres, for the
// units-suspect warning: a model whose thicknesses and element sizes both
// fall outside them was probably drawn in another unit.
const (
	// SheetThicknessMin and SheetThicknessMax, mm: sheet-metal parts are
	// 0.3 to 6 mm thick (common practice).
	SheetThicknessMin = 0.3
	SheetThicknessMax = 6.0
	// ElementSizeMin and ElementSizeMax, mm: shell elements of car bodies
	// and similar assemblies are typically 2 to 20 mm across (common
	// practice). A model in metres read as mm has thicknesses like 0.001
	// and elements like 0.005; one in inches has thicknesses of 0.03 to
	// 0.1 and elements of 0.1 to 0.8.
	ElementSizeMin = 2.0
	ElementSizeMax = 20.0
)

// CheckJoints holds the lengths of every joint to the plausible ranges:
// its point (geom.MaxCoordinate), a spot weld's nugget (MaxNugget) and a
// bolt's diameter, washer and hole (MaxBoltSize). The joints' lengths are
// in a unit of scale mm (0 means 1). It returns an input error at the
// joint's line for the first joint out of range.
func CheckJoints(js []Joint, scale float64) error {
	if scale <= 0 {
		scale = 1
	}
	unit := func(v float64) string {
		switch scale {
		case 1:
			return MM(v) + " mm"
		case Metre.MM():
			return fmt.Sprintf("%g m (%s mm)", v, MM(v*scale))
		case Inch.MM():
			return fmt.Sprintf("%g in (%s mm)", v, MM(v*scale))
		}
		return fmt.Sprintf("%g (%s mm)", v, MM(v*scale))
	}
	for i := range js {
		j := &js[i]
		if err := geom.CheckCoordinates(j.Point.X, j.Point.Y, j.Point.Z, scale); err != nil {
			return geom.LineError(j.File, j.Line, "joint %q: %v", j.ID, err)
		}
		if j.Kind == Spot {
			if j.Diameter*scale > MaxNugget {
				return geom.LineError(j.File, j.Line, "spot weld %q: nugget diameter %s is more than %s mm, larger than any spot weld", j.ID, unit(j.Diameter), MM(MaxNugget))
			}
			continue
		}
		for _, v := range []struct {
			what string
			v    float64
		}{{"diameter", j.Diameter}, {"washer", j.Washer}, {"hole", j.Hole}} {
			if v.v*scale > MaxBoltSize {
				return geom.LineError(j.File, j.Line, "bolt %q: %s %s is more than %s mm, larger than any bolt through sheet metal", j.ID, v.what, unit(v.v), MM(MaxBoltSize))
			}
		}
	}
	return nil
}

// UnitsSuspect returns a units-suspect warning when the model's
// thicknesses and element sizes, in mm, both lie outside the ranges of
// sheet metal (SheetThicknessMin..Max, ElementSizeMin..Max) on the same
// side: the medians of a sample of elements are compared, so a few odd
// parts do not trigger it. It returns false when the model looks like
// sheet metal in mm, or has no elements.
func UnitsSuspect(m *geom.Mesh, unit Unit) (Finding, bool) {
	n := m.NumElems()
	if n == 0 {
		return Finding{}, false
	}
	// A deterministic sample of at most 10,000 elements, spread over
	// the whole mesh.
	step := max(1, n/10000)
	var ts, hs []float64
	for e := 0; e < n; e += step {
		if t := m.Thickness(e); t > 0 {
			ts = append(ts, t)
		}
		if a := m.Area(e); a > 0 {
			hs = append(hs, math.Sqrt(a))
		}
	}
	if len(hs) == 0 {
		return Finding{}, false
	}
	h := median(hs)
	side := func(v, lo, hi float64) int {
		switch {
		case v < lo:
			return -1
		case v > hi:
			return 1
		}
		return 0
	}
	hs0 := side(h, ElementSizeMin, ElementSizeMax)
	if hs0 == 0 {
		return Finding{}, false
	}
	what := fmt.Sprintf("elements about %s mm across", MM(h))
	if len(ts) > 0 {
		t := median(ts)
		if side(t, SheetThicknessMin, SheetThicknessMax) != hs0 {
			return Finding{}, false
		}
		what = fmt.Sprintf("sheets %s mm thick and %s", MM(t), what)
	}
	msg := fmt.Sprintf("the model reads as %s (typical sheet metal: %s to %s mm thick, elements %s to %s mm): are its units %s? Give the unit with units: in the job file or --units (mm, m or in)",
		what, MM(SheetThicknessMin), MM(SheetThicknessMax), MM(ElementSizeMin), MM(ElementSizeMax), unit)
	return Finding{Severity: Warning, Code: CodeUnitsSuspect, Message: msg}, true
}

// median returns the median of v, reordering it.
func median(v []float64) float64 {
	slices.Sort(v)
	k := len(v) / 2
	if len(v)%2 == 1 {
		return v[k]
	}
	return (v[k-1] + v[k]) / 2
}
