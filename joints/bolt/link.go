package bolt

import (
	"fmt"

	"gonum.org/v1/gonum/spatial/r3"

	"github.com/joinery-cae/joinery/geom"
	"github.com/joinery-cae/joinery/joints"
)

// shank joins the centres of consecutive sheets in the link form of o:
// with gap links one shank link between the centres; with offset links,
// as for spot welds, an offset link from each centre along its sheet's
// normal to its faying face and the shank between the two faying points
// (offset-mismatch reported alike). A beam shank always runs between
// the two centres, whatever the link form, so that it spans the grip
// (with offset links the faying points of sheets in contact coincide,
// and a beam between them would have no length); a beam shorter than
// joints.MinBeamShank is an error (shank-short). Shank links couple all six
// degrees of freedom whatever the bolt's ring DOFs.
func shank(m *geom.Mesh, j *joints.Joint, st *joints.Stack, ends []joints.End, o *joints.BuildOptions) ([]joints.Link, []joints.Finding) {
	var (
		links []joints.Link
		fs    []joints.Finding
	)
	for i := 0; i+1 < len(ends); i++ {
		a, b := &st.Sheets[i], &st.Sheets[i+1]
		contact := (a.Thickness + b.Thickness) / 2
		gap, square := st.Gaps(i, i+1)
		if o.Links != joints.OffsetLinks || o.Shank == joints.BeamShank {
			l := joints.Link{Kind: joints.ShankLink, From: i, To: i + 1, Contact: contact, MidGap: gap, SquareGap: square,
				StartAt: joints.SheetEnd(i), EndAt: joints.SheetEnd(i + 1), DOFs: joints.AllDOFs}
			setSpan(&l, ends[i].Point, ends[i+1].Point)
			links = append(links, l)
			if o.Shank == joints.BeamShank && l.Length < joints.MinBeamShank {
				fs = append(fs, j.Finding(joints.Error, joints.CodeShankShort, []int64{a.Part, b.Part},
					fmt.Sprintf("the beam shank between parts %d and %d would be %s mm long, less than the %s mm a beam needs: the two sheets' centres coincide (mid-surfaces %s mm apart, contact at %s mm); correct the gap in the mesh or use --shank rigid",
						a.Part, b.Part, joints.MM(l.Length), joints.MM(joints.MinBeamShank), joints.MM(gap), joints.MM(contact))))
			}
			continue
		}
		la := joints.NewOffsetLink(ends[i].Point, a.Proj.Normal, a.Thickness, m.Part(a.Proj.Elem).Surface,
			joints.FayingSide(a.Proj.Normal, st.Axis))
		lb := joints.NewOffsetLink(ends[i+1].Point, b.Proj.Normal, b.Thickness, m.Part(b.Proj.Elem).Surface,
			joints.FayingSide(b.Proj.Normal, r3.Scale(-1, st.Axis)))
		la.From, la.To, la.StartAt, la.EndAt = i, i+1, joints.SheetEnd(i), joints.LinkNode(len(links))
		lb.From, lb.To, lb.StartAt, lb.EndAt = i+1, i, joints.SheetEnd(i+1), joints.LinkNode(len(links)+1)
		la.Contact, la.MidGap, la.SquareGap = contact, gap, square
		lb.Contact, lb.MidGap, lb.SquareGap = contact, gap, square
		sh := joints.Link{Kind: joints.ShankLink, From: i, To: i + 1, Contact: contact, MidGap: gap, SquareGap: square,
			StartAt: joints.LinkNode(len(links)), EndAt: joints.LinkNode(len(links) + 1), DOFs: joints.AllDOFs}
		setSpan(&sh, la.End, lb.End)
		sh.Mismatch = joints.Across(r3.Sub(lb.End, la.End), st.Axis)
		links = append(links, la, lb, sh)
		if tol := joints.OffsetMismatchFactor * min(a.Thickness, b.Thickness); sh.Mismatch > tol {
			fs = append(fs, j.Finding(joints.Warning, joints.CodeOffsetMismatch, []int64{a.Part, b.Part},
				fmt.Sprintf("faying points of parts %d and %d lie %s mm apart across the bolt's axis (limit %s mm = %g x the thinner sheet): the sheets' normals at the bolt differ",
					a.Part, b.Part, joints.MM(sh.Mismatch), joints.MM(tol), joints.OffsetMismatchFactor)))
		}
	}
	return links, fs
}

// setSpan sets a link's ends, length and direction.
func setSpan(l *joints.Link, a, b r3.Vec) {
	l.Start, l.End = a, b
	l.Length, l.Direction = joints.LinkSpan(a, b)
}
