package spot

import (
	"gonum.org/v1/gonum/spatial/r3"

	"github.com/joinery-cae/joinery/joints"
)

// link joins the ends on consecutive sheets of a stack, each link with
// its length, direction, contact gap and mid-surface gap.
func link(st *joints.Stack, ends []joints.End) []joints.Link {
	var links []joints.Link
	for i := 0; i+1 < len(ends); i++ {
		a, b := ends[i].Point, ends[i+1].Point
		d := r3.Sub(b, a)
		l := r3.Norm(d)
		dir := r3.Vec{}
		if l > 0 {
			dir = r3.Scale(1/l, d)
		}
		s, t := st.Sheets[i], st.Sheets[i+1]
		links = append(links, joints.Link{From: i, To: i + 1, Start: a, End: b, Length: l, Direction: dir,
			Contact: (s.Thickness + t.Thickness) / 2, MidGap: t.Position - s.Position})
	}
	return links
}
