package flange

import (
	"math"
	"testing"

	"github.com/joinery-cae/joinery/joints"
)

// With the table's pitch, welds on a curved flange keep the table's
// minimum spacing in a straight line, as build and check measure it: on
// an arc of mid-radius R = 100 mm two stations p apart along the
// centreline are only 2R sin(p/2R) apart (closed form), so the placer
// widens the spacing just enough; on a ring of mid-radius 23.55 mm the
// table's 18.452 mm (two 1 mm sheets, resistance welding manufacturers'
// table as in REFERENCES.md) fits 8 stations along the centreline but
// their chords, 2r sin(pi/8) = 18.03 mm, fall short, so it takes 7.
// No pitch-short finding either way.
func TestTablePitchOnCurves(t *testing.T) {
	need := joints.MinSpacing(1, 2)
	for _, tc := range []struct {
		name string
		m    []sheet
	}{
		{"arc", []sheet{arcSector(1, 0, 70, 130, math.Pi/2, 12, 90), arcSector(2, 1, 90, 110, math.Pi/2, 4, 90)}},
		{"ring", []sheet{annulus(1, 1, 0, 10, 40, 12, 72), annulus(2, 1, 1, 18.55, 28.55, 4, 72)}},
	} {
		t.Run(tc.name, func(t *testing.T) {
			set, fs := place(t, mesh(tc.m...), joints.FlangeOptions{Pitch: joints.Pitch{Table: true}}, joints.BuildOptions{})
			f := one(t, set)
			for _, fd := range fs {
				if fd.Code == joints.CodePitchShort {
					t.Errorf("finding %s: %s", fd.Code, fd.Message)
				}
			}
			if len(f.Welds) < 3 {
				t.Fatalf("%d welds", len(f.Welds))
			}
			least, r := math.Inf(1), 0.0
			for i, w := range f.Welds {
				r += math.Hypot(w.Joint.Point.X, w.Joint.Point.Y) / float64(len(f.Welds))
				if i > 0 {
					least = math.Min(least, dist(w.Joint.Point, f.Welds[i-1].Joint.Point))
				}
			}
			if f.Closed {
				least = math.Min(least, dist(f.Welds[0].Joint.Point, f.Welds[len(f.Welds)-1].Joint.Point))
			}
			if least < need-joints.LengthRoundoff {
				t.Errorf("welds %.6g mm apart in a straight line, below the table's %.6g", least, need)
			}
			switch tc.name {
			case "arc":
				if least > need+0.01 {
					t.Errorf("welds %.6g mm apart, widened past the table's %.6g", least, need)
				}
			case "ring":
				n := len(f.Welds)
				if n != 7 || 2*r*math.Sin(math.Pi/float64(n+1)) >= need {
					t.Errorf("%d welds round a ring of radius %.4g: want the most whose chords meet %.6g (7)", n, r, need)
				}
			}
		})
	}
}
