package geomtest

import (
	"fmt"
	"maps"
	"math"

	"gonum.org/v1/gonum/spatial/r3"

	"github.com/joinery-cae/joinery/geom"
)

// Diff describes the first difference between the exported fields of got
// and want, naming the field and index ("Coords[4] = {…}, want {…}" or
// "len(Conn) = 18, want 19"), or returns "" when they are equal.
//
// Fields are compared in declaration order, Sources included (file names,
// starts, offsets and skipped-cell counts). Floats are equal when they
// have the same bits or are both NaN, so -0 differs from 0. A nil slice or
// map equals an empty one, except that a nil ElemThickness (no
// per-element thickness) differs from a non-nil one. The id lookups built
// by Index are not compared.
func Diff(got, want *geom.Mesh) string {
	thickness := diffSlice("ElemThickness", got.ElemThickness, want.ElemThickness, sameFloat)
	if (got.ElemThickness == nil) != (want.ElemThickness == nil) {
		thickness = fmt.Sprintf("ElemThickness = %v, want %v (one of them nil)", got.ElemThickness, want.ElemThickness)
	}
	for _, d := range []string{
		diffSlice("Parts", got.Parts, want.Parts, samePart),
		diffSlice("NodeIDs", got.NodeIDs, want.NodeIDs, same),
		diffSlice("Coords", got.Coords, want.Coords, sameVec),
		diffSlice("ElemIDs", got.ElemIDs, want.ElemIDs, same),
		diffSlice("ElemPart", got.ElemPart, want.ElemPart, same),
		diffSlice("ElemStart", got.ElemStart, want.ElemStart, same),
		diffSlice("Conn", got.Conn, want.Conn, same),
		thickness,
		diffSlice("Sources", got.Sources, want.Sources, sameSource),
	} {
		if d != "" {
			return d
		}
	}
	return ""
}

// diffSlice reports the first index at which got and want differ, or
// their lengths when one is a prefix of the other.
func diffSlice[T any](name string, got, want []T, eq func(a, b T) bool) string {
	for i := range min(len(got), len(want)) {
		if !eq(got[i], want[i]) {
			return fmt.Sprintf("%s[%d] = %+v, want %+v", name, i, got[i], want[i])
		}
	}
	if len(got) != len(want) {
		return fmt.Sprintf("len(%s) = %d, want %d", name, len(got), len(want))
	}
	return ""
}

func same[T comparable](a, b T) bool { return a == b }

// sameFloat reports whether a and b have the same bits or are both NaN.
func sameFloat(a, b float64) bool {
	return math.Float64bits(a) == math.Float64bits(b) || (math.IsNaN(a) && math.IsNaN(b))
}

func sameVec(a, b r3.Vec) bool {
	return sameFloat(a.X, b.X) && sameFloat(a.Y, b.Y) && sameFloat(a.Z, b.Z)
}

func samePart(a, b geom.Part) bool {
	th := sameFloat(a.Thickness, b.Thickness)
	a.Thickness, b.Thickness = 0, 0
	return th && a == b
}

func sameSource(a, b geom.Source) bool {
	return a.File == b.File && a.NodeStart == b.NodeStart && a.ElemStart == b.ElemStart &&
		a.NodeOffset == b.NodeOffset && a.ElemOffset == b.ElemOffset && maps.Equal(a.Skipped, b.Skipped) &&
		a.ImplicitNodeIDs == b.ImplicitNodeIDs && a.ImplicitElemIDs == b.ImplicitElemIDs
}
