package joints

import (
	"math"
	"testing"
)

// The minimum spacing and overlap follow the resistance welding
// manufacturers' optimum schedule for low-carbon steel (secondary copy of
// the table, inch values converted to mm), interpolated linearly.
func TestMinSpacingTable(t *testing.T) {
	for _, tc := range []struct {
		t       float64
		sheets  int
		spacing float64
		overlap float64
	}{
		{1.02, 2, 19.0, 12.7},                           // table row (secondary copy)
		{1.57, 2, 25.4, 15.9},                           // table row (secondary copy)
		{1.98, 2, 28.6, 17.5},                           // table row (secondary copy)
		{1.02, 3, 19.0 * 1.3, 12.7},                     // +30 % for three sheets (note with the table)
		{1.42, 2, (22.2 + 25.4) / 2, (14.3 + 15.9) / 2}, // half-way between the 1.27 and 1.57 mm rows
		{0.1, 2, 6.3, 9.5},                              // below the table: first row
		{5.0, 2, 38.1, 22.2},                            // above the table: last row
	} {
		if got := MinSpacing(tc.t, tc.sheets); math.Abs(got-tc.spacing) > 1e-9 {
			t.Errorf("MinSpacing(%g, %d) = %g, want %g", tc.t, tc.sheets, got, tc.spacing)
		}
		if got := MinOverlap(tc.t); math.Abs(got-tc.overlap) > 1e-9 {
			t.Errorf("MinOverlap(%g) = %g, want %g", tc.t, got, tc.overlap)
		}
	}
}
