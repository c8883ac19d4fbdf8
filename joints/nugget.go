package joints

import (
	"fmt"
	"math"
	"slices"

	"github.com/joinery-cae/joinery/geom"
)

// NuggetRule gives a default nugget diameter from the governing sheet
// thickness, d = K*sqrt(t) with d and t in mm.
//
// The rule d = 4*sqrt(t) is the conventional minimum and d = 5*sqrt(t) the
// larger value used for important welds. Both are common practice in
// resistance-welding literature, where the constant varies between 4 and
// 5; we know of no single source that fixes it. Joinery's default is
// 5*sqrt(t), which also lies close to the electrode-tip diameters of
// ISO 14373 (secondary copy of its table) at the top of each thickness
// band.
type NuggetRule float64

// The two rules in use.
const (
	Rule4Sqrt NuggetRule = 4
	Rule5Sqrt NuggetRule = 5
)

// ParseNuggetRule reads "4sqrt" or "5sqrt".
func ParseNuggetRule(s string) (NuggetRule, error) {
	switch s {
	case "4sqrt":
		return Rule4Sqrt, nil
	case "5sqrt", "":
		return Rule5Sqrt, nil
	}
	return 0, fmt.Errorf("unknown nugget rule %q (want 4sqrt or 5sqrt)", geom.Excerpt(s))
}

// String returns "4sqrt" or "5sqrt".
func (r NuggetRule) String() string { return fmt.Sprintf("%gsqrt", float64(r)) }

// Diameter returns K*sqrt(t), mm, for a governing thickness t in mm.
func (r NuggetRule) Diameter(t float64) float64 { return float64(r) * math.Sqrt(t) }

// GoverningThickness returns the thickness that sets the nugget size of a
// stack, following the governing-metal-thickness definition of AWS D8.1M:
// for two sheets the thinner one, for three the second thickest; for
// four or more, which the definition does not cover, the second thickest
// too (our extension).
// It returns 0 for fewer than two sheets.
func GoverningThickness(ts []float64) float64 {
	switch {
	case len(ts) < 2:
		return 0
	case len(ts) == 2:
		return math.Min(ts[0], ts[1])
	}
	s := slices.Clone(ts)
	slices.Sort(s)
	return s[len(s)-2]
}

// ISO 14373 scope for resistance spot welding of low-carbon steels: two or
// three sheets, each 0.4 to 3.0 mm thick, thickness ratio up to 3:1.
const (
	ISOMinThickness = 0.4
	ISOMaxThickness = 3.0
	ISOMaxRatio     = 3.0
	ISOMaxSheets    = 3
)

// ratioRoundoff is the relative rounding allowed when a thickness ratio
// is compared with ISOMaxRatio (our choice: far above float64 rounding,
// far below any thickness step a sheet gauge has).
const ratioRoundoff = 1e-9

// OutsideISO14373 says why a stack lies outside the scope of ISO 14373,
// or returns "" when it lies inside.
func OutsideISO14373(ts []float64) string {
	if len(ts) < 2 {
		return ""
	}
	if len(ts) > ISOMaxSheets {
		return fmt.Sprintf("%d sheets (the standard covers 2 or 3)", len(ts))
	}
	lo, hi := slices.Min(ts), slices.Max(ts)
	if lo < ISOMinThickness || hi > ISOMaxThickness {
		return fmt.Sprintf("sheet thickness %g..%g mm outside 0.4..3.0 mm", lo, hi)
	}
	// A ratio of exactly 3:1 is inside the scope: 2.1/0.7 is
	// 3.0000000000000004 in float64, so the ratio is compared with a
	// relative rounding allowance (ratioRoundoff).
	if hi > ISOMaxRatio*lo*(1+ratioRoundoff) {
		return fmt.Sprintf("thickness ratio %.2f:1 above 3:1", hi/lo)
	}
	return ""
}
