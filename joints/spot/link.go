package spot

import (
	"fmt"

	"gonum.org/v1/gonum/spatial/r3"

	"github.com/joinery-cae/joinery/geom"
	"github.com/joinery-cae/joinery/joints"
)

// link joins the ends on consecutive sheets of a stack in the form
// o.Links asks for, each link with its length, direction, contact gap
// and mid-surface gap; dofs are the connector's degrees of freedom. The
// offset form also returns its offset-mismatch findings.
func link(m *geom.Mesh, j *joints.Joint, st *joints.Stack, ends []joints.End, dofs joints.DOFs, o *joints.BuildOptions) ([]joints.Link, []joints.Finding) {
	if o.Links == joints.OffsetLinks {
		return offsetLinks(m, j, st, ends, dofs)
	}
	return gapLinks(st, ends, dofs), nil
}

// gapLinks joins the ends on consecutive sheets directly, across the gap.
func gapLinks(st *joints.Stack, ends []joints.End, dofs joints.DOFs) []joints.Link {
	var links []joints.Link
	for i := 0; i+1 < len(ends); i++ {
		a, b := ends[i].Point, ends[i+1].Point
		l, dir := joints.LinkSpan(a, b)
		s, t := st.Sheets[i], st.Sheets[i+1]
		gap, square := st.Gaps(i, i+1)
		links = append(links, joints.Link{Kind: joints.GapLink, From: i, To: i + 1, Start: a, End: b, Length: l, Direction: dir,
			Contact: (s.Thickness + t.Thickness) / 2, MidGap: gap, SquareGap: square,
			StartAt: joints.SheetEnd(i), EndAt: joints.SheetEnd(i + 1), DOFs: dofs})
	}
	return links
}

// offsetLinks bridges each pair of consecutive sheets i, i+1 with three
// links, in this order: the offset link of sheet i from its end along its
// normal to its faying face toward sheet i+1, the offset link of sheet
// i+1 to its faying face toward sheet i, and the zero-length faying joint
// between the two faying points. A middle sheet thus has two offset
// links, one to each face. Each offset follows the sheet's normal at its
// attachment point (joints.NewOffsetLink), so on curved or tilted sheets
// the two faying points may lie apart across the stack axis: beyond
// joints.OffsetMismatchFactor times the thinner sheet, offset-mismatch
// is reported. Along the axis they lie apart by the gap's deviation from
// contact, which gap-open and gap-closed judge square to the sheets
// (joints.SquareGap).
func offsetLinks(m *geom.Mesh, j *joints.Joint, st *joints.Stack, ends []joints.End, dofs joints.DOFs) ([]joints.Link, []joints.Finding) {
	var (
		links []joints.Link
		fs    []joints.Finding
	)
	for i := 0; i+1 < len(ends); i++ {
		a, b := &st.Sheets[i], &st.Sheets[i+1]
		contact := (a.Thickness + b.Thickness) / 2
		gap, square := st.Gaps(i, i+1)
		// Sheet i's faying face looks up the axis, sheet i+1's down it.
		la := joints.NewOffsetLink(ends[i].Point, a.Proj.Normal, a.Thickness, m.Part(a.Proj.Elem).Surface,
			joints.FayingSide(a.Proj.Normal, st.Axis))
		lb := joints.NewOffsetLink(ends[i+1].Point, b.Proj.Normal, b.Thickness, m.Part(b.Proj.Elem).Surface,
			joints.FayingSide(b.Proj.Normal, r3.Scale(-1, st.Axis)))
		la.From, la.To, la.StartAt, la.EndAt = i, i+1, joints.SheetEnd(i), joints.LinkNode(len(links))
		lb.From, lb.To, lb.StartAt, lb.EndAt = i+1, i, joints.SheetEnd(i+1), joints.LinkNode(len(links)+1)
		la.Contact, la.MidGap, la.SquareGap = contact, gap, square
		lb.Contact, lb.MidGap, lb.SquareGap = contact, gap, square
		d := r3.Sub(lb.End, la.End)
		l, dir := joints.LinkSpan(la.End, lb.End)
		fj := joints.Link{Kind: joints.FayingJoint, From: i, To: i + 1, Start: la.End, End: lb.End, Length: l, Direction: dir,
			Contact: contact, MidGap: gap, SquareGap: square, StartAt: joints.LinkNode(len(links)), EndAt: joints.LinkNode(len(links) + 1),
			DOFs: dofs, Mismatch: joints.Across(d, st.Axis)}
		links = append(links, la, lb, fj)
		if tol := joints.OffsetMismatchFactor * min(a.Thickness, b.Thickness); fj.Mismatch > tol {
			fs = append(fs, j.Finding(joints.Warning, joints.CodeOffsetMismatch, []int64{a.Part, b.Part},
				fmt.Sprintf("faying points of parts %d and %d lie %s mm apart across the stack (limit %s mm = %g x the thinner sheet): the sheets' normals at the weld differ, so the faying joint couples points apart",
					a.Part, b.Part, joints.MM(fj.Mismatch), joints.MM(tol), joints.OffsetMismatchFactor)))
		}
	}
	return links, fs
}
