package flange

import (
	"fmt"
	"testing"

	"github.com/joinery-cae/joinery/joints"
)

// A 100 mm plate strip on a 5 mm grid under a wider sheet on a 2.7 mm
// grid shifted against it (non-matching meshes): the overlap is the
// rectangle x 0 to 100, y from the upper sheet's edge to the plate's
// edge at y 40 (hand calculation), every edge of it but one cutting
// through the host's elements. Where the overlap ends along an element
// edge is found to 0.01 mm (crossingTol) plus the contact test's slack:
// length, width and area are held to 0.02 mm, 0.02 mm and 0.02 mm per mm
// of outline, and the centreline to the strip's mid-line. The edge was
// found up to 0.164 mm short before a prediction that lands in contact
// was followed by a probe just beyond it.
func TestProjectedStripEdges(t *testing.T) {
	for _, y0 := range []float64{21.3, 20.15, 22.9} {
		t.Run(fmt.Sprintf("upper sheet from y %g", y0), func(t *testing.T) {
			lower := plate(1, 1, 0, 0, 0, 20, 8, 5)
			upper := plate(2, 1, -4.3, y0, 1, 40, 15, 2.7)
			f := one(t, findAll(t, mesh(lower, upper), joints.FlangeOptions{}))
			w := 40 - y0
			const tol = 0.02
			if f.Match != joints.Projected {
				t.Errorf("match %v, want projected", f.Match)
			}
			if !near(f.Length, 100, tol) {
				t.Errorf("length %.4f, want 100 within %g", f.Length, tol)
			}
			if !near(f.Width.Min, w, tol) || !near(f.Width.Max, w, tol) {
				t.Errorf("width %+v, want %g within %g", f.Width, w, tol)
			}
			if !near(f.Area, 100*w, tol*2*(100+w)) {
				t.Errorf("area %.3f, want %g within %g", f.Area, 100*w, tol*2*(100+w))
			}
			// Flat sheets in the plane z = const: the plan view looks
			// along +z.
			if !near(f.Normal.Z, 1, 1e-12) {
				t.Errorf("normal %v, want (0, 0, 1)", f.Normal)
			}
			for _, p := range f.Centreline {
				if !near(p.Y, (y0+40)/2, tol) {
					t.Errorf("centreline point %v off the mid-line y %g", p, (y0+40)/2)
				}
			}
		})
	}
}
