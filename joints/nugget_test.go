package joints

import (
	"math"
	"testing"
)

func TestNuggetRules(t *testing.T) {
	// The rules' own numbers: d = 4*sqrt(t) and d = 5*sqrt(t) (common
	// practice in resistance-welding literature).
	cases := []struct {
		rule NuggetRule
		t, d float64
	}{
		{Rule4Sqrt, 1, 4}, {Rule4Sqrt, 0.81, 3.6}, {Rule4Sqrt, 2.25, 6},
		{Rule5Sqrt, 1, 5}, {Rule5Sqrt, 0.64, 4}, {Rule5Sqrt, 1.44, 6}, {Rule5Sqrt, 4, 10},
	}
	for _, c := range cases {
		if got := c.rule.Diameter(c.t); math.Abs(got-c.d) > 1e-12 {
			t.Errorf("%v t=%g: d=%g, want %g", c.rule, c.t, got, c.d)
		}
	}
}

func TestNuggetAgainstISO14373Tips(t *testing.T) {
	// ISO 14373 electrode tip diameter by sheet thickness, read from a
	// secondary copy of the table (shared/REFERENCES.md): 0.8 -> 4 mm,
	// 1.2 -> 5, 1.6 -> 6, 2.0 -> 7 mm at the top of each band. The 5*sqrt(t)
	// rule lies within 0.5 mm of each.
	for _, c := range []struct{ t, tip float64 }{{0.8, 4}, {1.2, 5}, {1.6, 6}, {2.0, 7}} {
		if got := Rule5Sqrt.Diameter(c.t); math.Abs(got-c.tip) > 0.5 {
			t.Errorf("t=%g: 5*sqrt(t) = %.3f, tip %g", c.t, got, c.tip)
		}
	}
}

func TestGoverningThickness(t *testing.T) {
	// AWS D8.1M definition: two sheets -> the thinner; three sheets -> the
	// second thickest.
	cases := []struct {
		ts   []float64
		want float64
	}{
		{nil, 0}, {[]float64{1.2}, 0},
		{[]float64{0.8, 1.5}, 0.8}, {[]float64{2, 0.7}, 0.7},
		{[]float64{0.8, 1.5, 1.2}, 1.2}, {[]float64{2, 2, 0.7}, 2}, {[]float64{0.7, 1, 2, 1.5}, 1.5},
	}
	for _, c := range cases {
		if got := GoverningThickness(c.ts); got != c.want {
			t.Errorf("%v: %g, want %g", c.ts, got, c.want)
		}
	}
}

func TestOutsideISO14373(t *testing.T) {
	// ISO 14373 scope: 2 or 3 sheets, 0.4 to 3.0 mm each, ratio up to 3:1.
	cases := []struct {
		ts      []float64
		outside bool
	}{
		{[]float64{0.8, 1.5}, false},
		{[]float64{0.4, 1.2}, false},  // ratio exactly 3
		{[]float64{0.4, 1.25}, true},  // ratio above 3
		{[]float64{0.3, 0.6}, true},   // too thin
		{[]float64{3.2, 2.0}, true},   // too thick
		{[]float64{1, 1, 1, 1}, true}, // four sheets
		{[]float64{0.8, 1.2, 1.5}, false},
		// Exactly 3:1 where the float64 quotient is not 3
		// (2.1/0.7 = 3.0000000000000004, 1.5/0.5 = 3): inside.
		{[]float64{0.7, 2.1}, false},
		{[]float64{0.5, 1.5}, false},
		{[]float64{1.0, 3.0}, false},
		{[]float64{0.7, 2.1001}, true},
		{[]float64{1.0, 3.01}, true}, // too thick
	}
	for _, c := range cases {
		if got := OutsideISO14373(c.ts) != ""; got != c.outside {
			t.Errorf("%v: outside=%v, want %v (%s)", c.ts, got, c.outside, OutsideISO14373(c.ts))
		}
	}
}
