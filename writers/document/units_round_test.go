package document

import (
	"testing"

	"github.com/joinery-cae/joinery/joints"
)

// A length given in inches or metres, scaled to mm as the inputs are
// (joints.Unit.MM: 1 in = 25.4 mm exactly, by definition of the inch),
// comes back into its unit as it was given, not with a binary
// remainder (27.94 / 25.4 is 1.1000000000000001 in float64).
func TestLengthInRoundTrip(t *testing.T) {
	for _, c := range []struct {
		unit joints.Unit
		v    float64
	}{
		{joints.Inch, 1.1}, {joints.Inch, 0.0472441}, {joints.Inch, 3.3}, {joints.Inch, -12.7},
		{joints.Metre, 0.0012}, {joints.Metre, 1.1}, {joints.Metre, 0.3},
	} {
		mm := c.unit.MM()
		if got := lengthIn(c.v*mm, mm); got != c.v {
			t.Errorf("%g %s -> %g mm -> %v, want %v", c.v, c.unit, c.v*mm, got, c.v)
		}
	}
}
