package joints

import "math"

// SpacingRow is one row of a minimum-spacing table for spot welds.
type SpacingRow struct {
	Thickness float64 // sheet thickness, mm
	Nugget    float64 // fused-zone diameter, mm
	Spacing   float64 // minimum weld spacing (centre to centre), mm
	Overlap   float64 // minimum flange overlap, mm
}

// spacingTable returns the resistance welding manufacturers' optimum
// spot-welding schedule for low-carbon steel (SAE 1010), inch table
// converted to mm (secondary copy, as reproduced in Joinery's reference
// notes): sheet thickness, fused-zone diameter, minimum weld spacing,
// minimum flange overlap.
func spacingTable() []SpacingRow {
	return []SpacingRow{
		{0.25, 2.9, 6.3, 9.5},
		{0.53, 3.5, 9.5, 11.1},
		{0.79, 4.1, 12.7, 11.1},
		{1.02, 4.6, 19.0, 12.7},
		{1.27, 5.3, 22.2, 14.3},
		{1.57, 5.9, 25.4, 15.9},
		{1.98, 6.8, 28.6, 17.5},
		{2.39, 7.7, 31.8, 19.0},
		{2.77, 8.6, 33.3, 20.6},
		{3.17, 9.5, 38.1, 22.2},
	}
}

// ThreeSheetSpacingFactor is the allowance the same tables note for
// three-sheet stacks: 30 per cent more spacing (secondary copy).
const ThreeSheetSpacingFactor = 1.3

// LengthRoundoff is how far, mm, a length computed from coordinates may
// pass a limit and still meet it: the rounding of float64 arithmetic on
// body coordinates (about 1e-12 mm at 5 m from the origin) lies far
// below it, and no length a plan gives or a test can measure comes near
// it (our choice). Without it, welds placed at exactly the minimum
// spacing (20.024 mm for 1.1 mm sheets) come out 20.023999999999994 mm
// apart and are reported too close, and a gap at exactly the allowance
// off contact is reported open while its mirror case is not. It applies
// to the spacing of welds, the gaps between sheets, and a meshed bolt
// hole's fitted diameter and centre (a hole meshed at the shank's
// diameter, or at the declared hole's tolerance, or a point off the
// centre by exactly the clearance).
const LengthRoundoff = 1e-6

// MinSpacing returns the minimum centre-to-centre spacing of spot welds,
// mm, for governing thickness t (mm) and a stack of the given number of
// sheets, from the resistance welding manufacturers' table (see
// spacingTable), interpolated linearly between its rows and held at the
// end rows outside 0.25 to 3.17 mm; three sheets or more add 30 per cent.
func MinSpacing(t float64, sheets int) float64 {
	s := interpolate(t, func(r SpacingRow) float64 { return r.Spacing })
	if sheets >= 3 {
		s *= ThreeSheetSpacingFactor
	}
	return s
}

// MinOverlap returns the minimum flange overlap, mm, for governing
// thickness t (mm), from the same table, interpolated linearly and held
// at its end rows.
func MinOverlap(t float64) float64 {
	return interpolate(t, func(r SpacingRow) float64 { return r.Overlap })
}

// interpolate reads column col of the spacing table at thickness t.
func interpolate(t float64, col func(SpacingRow) float64) float64 {
	rows := spacingTable()
	if math.IsNaN(t) || t <= rows[0].Thickness {
		return col(rows[0])
	}
	for i := 1; i < len(rows); i++ {
		if t <= rows[i].Thickness {
			a, b := rows[i-1], rows[i]
			f := (t - a.Thickness) / (b.Thickness - a.Thickness)
			return col(a) + f*(col(b)-col(a))
		}
	}
	return col(rows[len(rows)-1])
}
