package flange

import (
	"math"
	"testing"

	"gonum.org/v1/gonum/spatial/r3"
)

// TestSectionFinderReach: sectionFinder.middle finds every outline
// crossing within its reach, however far the crossing segment's middle
// lies from the point. A crossing within reach r along the section's
// lateral and off-plane directions lies within r sqrt(2) of the point,
// and the segment's middle within half the segment's length of the
// crossing (plane geometry), so that is what the grid's neighbourhood
// must cover. Here r = 10, the section's lateral direction at 45 degrees
// to the axes, one crossing 1 mm from the point on one side and 9 mm on
// the other on a segment 10 mm long that runs on 4.5 mm past it: the
// middle of the section is (9 - 1)/2 = 4 mm along lat (closed form).
// With cells of max(r, longest/2) = 10 mm the far segment's middle lay
// two cells off in x and the section was not found.
func TestSectionFinderReach(t *testing.T) {
	s := 1 / math.Sqrt2
	p := r3.Vec{X: 0.1, Y: 0.1}
	tan := r3.Vec{X: s, Y: -s}
	lat := r3.Vec{X: -s, Y: -s}
	far := r3.Add(p, r3.Scale(9, lat))
	near := r3.Sub(p, lat)
	lps := []loop{
		{pts: []r3.Vec{r3.Add(far, r3.Vec{X: 0.5}), r3.Add(far, r3.Vec{X: -9.5})}},
		{pts: []r3.Vec{r3.Add(near, r3.Vec{X: -0.5}), r3.Add(near, r3.Vec{X: 0.5})}},
	}
	f := newSectionFinder(lps, 10)
	off, ok := f.middle(p, tan, lat)
	if !ok || math.Abs(off-4) > 1e-9 {
		t.Fatalf("middle = %g, %v: want 4 (closed form), true", off, ok)
	}
}
