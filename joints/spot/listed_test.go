package spot

import (
	"slices"
	"strings"
	"testing"

	"gonum.org/v1/gonum/spatial/r3"

	"github.com/joinery-cae/joinery/joints"
)

// TestListedPartsSkipASheet checks a weld whose list leaves out a sheet
// it goes through: three 1 mm sheets in contact at z = 0, 1 and 2, the
// weld listing parts 1 and 3. Their mid-surfaces lie 2 mm apart, 1 mm off
// contact (hand calculation): gap-open, whose message names part 2 as
// lying between them rather than calling the gap air. A list of one
// part says it lists one part alone.
func TestListedPartsSkipASheet(t *testing.T) {
	m := plates(plate{Part: 1, T: 1, NX: 10, NY: 10, H: 5}, plate{Part: 2, T: 1, Z: 1, NX: 10, NY: 10, H: 5},
		plate{Part: 3, T: 1, Z: 2, NX: 10, NY: 10, H: 5})
	at := r3.Vec{X: 25, Y: 25, Z: 1}
	c := buildOne1(t, m, joints.Joint{ID: "L", Point: at, Parts: []int64{1, 3}}, joints.BuildOptions{})
	if got := c.Stack.Parts(); !slices.Equal(got, []int64{1, 3}) || !slices.Equal(codes(c), []string{joints.CodeGapOpen}) {
		t.Fatalf("stack %v findings %v, want parts 1 and 3 with gap-open", got, c.Findings)
	}
	if msg := c.Findings[0].Message; !strings.Contains(msg, "mid-surfaces 2 mm apart") || !strings.Contains(msg, "between them under the weld lies part 2, which the joint does not list") {
		t.Errorf("gap-open message %q does not name part 2 between the listed sheets", msg)
	}
	// Part 2 beside the axis, beyond the listed stack's lateral limit
	// (1.25 mm for a 5 mm nugget): not under the weld, not named.
	beside := plates(plate{Part: 1, T: 1, NX: 10, NY: 10, H: 5}, plate{Part: 2, T: 1, Z: 1, X0: 26.5, NX: 4, NY: 10, H: 5},
		plate{Part: 3, T: 1, Z: 2, NX: 10, NY: 10, H: 5})
	c = buildOne1(t, beside, joints.Joint{ID: "L", Point: at, Parts: []int64{1, 3}}, joints.BuildOptions{})
	if got := messages(c, joints.CodeGapOpen); len(got) != 1 || strings.Contains(got[0], "part 2") {
		t.Errorf("part 2 1.5 mm beside the weld: gap-open %q, want it without part 2", got)
	}
	c = buildOne1(t, m, joints.Joint{ID: "L", Point: at, Parts: []int64{2}}, joints.BuildOptions{})
	if got := messages(c, joints.CodeSingleSheet); len(got) != 1 || !strings.Contains(got[0], "lists part 2 alone") {
		t.Errorf("one listed part: single-sheet %q, want it to say the joint lists part 2 alone", got)
	}
}

// TestListedSheetTilted checks that a listed sheet whose normal lies
// beyond the 20 degree angle limit of the weld axis is joined as listed
// and reported (sheet-tilted), while one within it is not: sheet 2
// crosses the weld axis at z = 1, its normal at 10 to 80 degrees to
// sheet 1's; the weld at z = 0.1 lies closer to sheet 1 (0.1 mm) than
// to sheet 2 (0.9 cos(theta) mm, 0.156 mm at 80 degrees), so sheet 1's
// normal is the axis and sheet 2 the one reported.
func TestListedSheetTilted(t *testing.T) {
	for _, c := range []struct {
		deg    float64
		tilted bool
	}{{10, false}, {19.9, false}, {25, true}, {80, true}} {
		m := tilted(plates(plate{Part: 1, T: 1, NX: 10, NY: 10, H: 5}, plate{Part: 2, T: 1, Z: 1, Y0: -25, NX: 10, NY: 20, H: 5}), 1, c.deg, 25, 1)
		con := buildOne1(t, m, joints.Joint{ID: "T", Point: r3.Vec{X: 25, Y: 25, Z: 0.1}, Parts: []int64{1, 2}}, joints.BuildOptions{})
		got := messages(con, joints.CodeSheetTilted)
		if con.Status == joints.NotBuilt || len(got) != map[bool]int{false: 0, true: 1}[c.tilted] {
			t.Errorf("%g degrees: %s, findings %v; want built, sheet-tilted %v", c.deg, con.Status, con.Findings, c.tilted)
			continue
		}
		if c.tilted && !strings.Contains(got[0], "listed part 2 lies with its normal "+joints.MM(c.deg)+" degrees off the weld axis") {
			t.Errorf("%g degrees: %q", c.deg, got[0])
		}
	}
}
