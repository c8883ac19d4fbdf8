package spot

import (
	"fmt"
	"math"
	"strings"

	"gonum.org/v1/gonum/spatial/r3"

	"github.com/joinery-cae/joinery/geom"
	"github.com/joinery-cae/joinery/joints"
)

// checkSheets returns the errors that stop a weld from being built on
// its stack: a sheet without thickness, a host element without area, a
// listed sheet that does not lie under the weld.
func checkSheets(m *geom.Mesh, j *joints.Joint, st *joints.Stack, diameter float64, o *joints.BuildOptions) []joints.Finding {
	var fs []joints.Finding
	for _, s := range st.Sheets {
		if !(s.Thickness > 0) {
			fs = append(fs, j.Finding(joints.Error, joints.CodeNoThickness, []int64{s.Part},
				fmt.Sprintf("part %d has no thickness: give it one in the parts table", s.Part)))
		}
	}
	for _, s := range st.Sheets {
		switch {
		case degenerateHost(m, &s):
			fs = append(fs, j.Finding(joints.Error, joints.CodeDegenerate, []int64{s.Part}, degenerateMessage(m, &s)))
		case len(j.Parts) > 0 && offAxis(s.Lateral, o.LateralFactor*diameter/2):
			// Automatic stacks only hold sheets near the axis; listed ones
			// are held to the same limit here: the weld must lie over them.
			fs = append(fs, j.Finding(joints.Error, joints.CodeOffSheet, []int64{s.Part},
				fmt.Sprintf("listed part %d does not lie under the weld: its nearest point is %s mm off the weld axis (limit %s mm)",
					s.Part, joints.MM(s.Lateral), joints.MM(o.LateralFactor*diameter/2))))
		}
	}
	return fs
}

// checkStack returns the warnings about a stack that can be built: its
// thicknesses outside ISO 14373, gaps off contact, the weld too near a
// sheet's free edge. It sets each sheet's EdgeDistance. unlisted are
// the sheets of parts a joint listing its parts leaves out
// (chooseStack).
func checkStack(x *geom.Index, j *joints.Joint, st *joints.Stack, diameter float64, o *joints.BuildOptions, unlisted []joints.Sheet) []joints.Finding {
	var fs []joints.Finding
	if why := joints.OutsideISO14373(st.Thicknesses()); why != "" {
		fs = append(fs, j.Finding(joints.Warning, joints.CodeThicknessRange, st.Parts(),
			"stack outside the scope of ISO 14373: "+why))
	}
	if len(j.Parts) > 0 {
		fs = append(fs, checkTilt(x.Mesh(), j, st, o)...)
	}
	fs = append(fs, checkGaps(x.Mesh(), st, o, j, unlisted, o.LateralFactor*diameter/2)...)
	return append(fs, checkEdges(x, j, st, diameter, o)...)
}

// checkTilt returns a sheet-tilted warning for every sheet of a stack
// of listed parts whose normal lies beyond the angle limit of the stack
// axis (the normal of the closest listed sheet): the limit an automatic
// stack holds its sheets to, here not a reason to leave a listed part
// out, but a sign that the sheets cross rather than lie on each other
// at the weld.
func checkTilt(m *geom.Mesh, j *joints.Joint, st *joints.Stack, o *joints.BuildOptions) []joints.Finding {
	var fs []joints.Finding
	for _, s := range st.Sheets {
		angle := axisAngle(s.Proj.Normal, st.Axis)
		if !(angle > o.AngleLimit) {
			continue
		}
		msg := fmt.Sprintf("listed part %d lies with its normal %s degrees off the weld axis (limit %s degrees): the sheets cross rather than lie on each other at the weld",
			s.Part, joints.MM(angle), joints.MM(o.AngleLimit))
		if q := m.ElemQuality(s.Proj.Elem); q.Warp > o.AngleLimit {
			msg += fmt.Sprintf("; its element there (id %d) is warped by %s degrees", m.ElemIDs[s.Proj.Elem], joints.MM(q.Warp))
		}
		fs = append(fs, j.Finding(joints.Warning, joints.CodeSheetTilted, []int64{s.Part}, msg))
	}
	return fs
}

// checkGaps compares each consecutive gap between mid-surfaces, square
// to the sheets (joints.SquareGap), with the contact gap and reports
// those off by more than the allowance. A gap that a reversed normal on
// one sheet of an outer-surface mesh would bring to contact names that
// sheet's host element (flippedHint). A gap that holds sheets of parts
// the joint does not list, under the weld within limit mm of the axis,
// names them: the list then leaves out a sheet the weld goes through.
func checkGaps(m *geom.Mesh, st *joints.Stack, o *joints.BuildOptions, j *joints.Joint, unlisted []joints.Sheet, limit float64) []joints.Finding {
	var out []joints.Finding
	for i := 0; i+1 < len(st.Sheets); i++ {
		a, b := st.Sheets[i], st.Sheets[i+1]
		if f, ok := GapFinding(j, st.Axis, a, b, o); ok {
			if between := unlistedBetween(unlisted, a, b, limit); len(between) > 0 {
				f.Message += fmt.Sprintf("; that is no air: between them under the weld lies %s, which the joint does not list, so the weld goes through a sheet it does not join", partList(between))
			} else {
				f.Message += flippedHint(m, st.Axis, a, b, o)
			}
			out = append(out, f)
		}
	}
	return out
}

// flippedHint returns a clause for a gap finding between consecutive
// sheets a and b when the sheet of a part meshed on an outer surface
// (top or bottom) would be at contact, within the allowance, had its
// host element's normal pointed the other way: the mid-surface was then
// placed on the wrong side of the meshed surface, which reads as a gap
// off by the sheet's thickness. It returns "" otherwise.
func flippedHint(m *geom.Mesh, axis r3.Vec, a, b joints.Sheet, o *joints.BuildOptions) string {
	want := (a.Thickness + b.Thickness) / 2
	tol := o.GapAllowanceFor(a.Thickness, b.Thickness)
	for k, s := range []joints.Sheet{a, b} {
		p := m.Part(s.Proj.Elem)
		off := p.Surface.MidOffset(s.Thickness)
		if off == 0 {
			continue
		}
		// Reversing the normal moves the mid-surface to the other side of
		// the meshed surface.
		shift := joints.AxisCrossing(r3.Vec{}, s.Proj.Normal, axis, -off) - joints.AxisCrossing(r3.Vec{}, s.Proj.Normal, axis, off)
		pa, pb := a.Position, b.Position
		if k == 0 {
			pa += shift
		} else {
			pb += shift
		}
		gap := joints.SquareGap(math.Abs(pb-pa), a.Thickness, b.Thickness, a.Proj.Normal, b.Proj.Normal, axis)
		if math.Abs(gap-want) <= tol+joints.LengthRoundoff {
			return fmt.Sprintf("; part %d is meshed on its %s face, and the sheets would touch if the normal of its element %d under the weld pointed the other way: check its normals (inspect --deep reports normals-flipped; joinery offsets infers each part's surface)",
				s.Part, p.Surface, m.ElemIDs[s.Proj.Elem])
		}
	}
	return ""
}

// GapFinding compares the gap between the mid-surfaces of consecutive
// sheets a and b of a stack with unit axis axis, square to the sheets
// (joints.SquareGap of b.Position - a.Position, their distance along the
// axis), with contact, (t1+t2)/2, and returns a gap-open or gap-closed
// warning when it is off by more than the allowance.
func GapFinding(j *joints.Joint, axis r3.Vec, a, b joints.Sheet, o *joints.BuildOptions) (joints.Finding, bool) {
	along := b.Position - a.Position
	gap := joints.SquareGap(along, a.Thickness, b.Thickness, a.Proj.Normal, b.Proj.Normal, axis)
	want := (a.Thickness + b.Thickness) / 2
	tol := o.GapAllowanceFor(a.Thickness, b.Thickness)
	dev := gap - want
	lim := tol + joints.LengthRoundoff
	apart := joints.MM(gap) + " mm apart"
	if joints.MM(along) != joints.MM(gap) {
		apart += " square to the sheets (" + joints.MM(along) + " mm along the weld axis)"
	}
	switch {
	case dev > lim:
		return j.Finding(joints.Warning, joints.CodeGapOpen, []int64{a.Part, b.Part},
			fmt.Sprintf("parts %d and %d do not touch: mid-surfaces %s, contact at %s mm (allowance %s mm); the weld would bridge %s mm of air",
				a.Part, b.Part, apart, joints.MM(want), joints.MM(tol), joints.MM(dev))), true
	case dev < -lim:
		return j.Finding(joints.Warning, joints.CodeGapClosed, []int64{a.Part, b.Part},
			fmt.Sprintf("parts %d and %d overlap: mid-surfaces %s, contact at %s mm (allowance %s mm); the sheets penetrate by %s mm",
				a.Part, b.Part, apart, joints.MM(want), joints.MM(tol), joints.MM(-dev))), true
	}
	return joints.Finding{}, false
}

// EdgeFindings sets the edge distance of every sheet of connector c, a
// spot weld read from elsewhere (a node-pair list, a connectors.json),
// from the mesh of x and returns the edge-close warnings build would
// give it: a weld centre closer than o.EdgeFactor nugget diameters to
// a sheet's free edge, or beyond it. x must index the elements within
// EdgeReach(c, o) of the weld point.
func EdgeFindings(x *geom.Index, c *joints.Connector, o *joints.BuildOptions) []joints.Finding {
	return checkEdges(x, &c.Joint, &c.Stack, c.Diameter, o)
}

// EdgeReach returns how far from connector c's weld point EdgeFindings
// looks for elements, mm.
func EdgeReach(c *joints.Connector, o *joints.BuildOptions) float64 {
	reach := 0.0
	for _, s := range c.Stack.Sheets {
		reach = math.Max(reach, s.Proj.Dist)
	}
	return reach + 2*o.EdgeFactor*c.Diameter
}

// checkEdges sets each sheet's distance to its part's nearest free edge
// and reports welds closer than the edge limit (EdgeFactor nugget
// diameters). One element query around the weld serves every sheet: it
// reaches twice the edge limit around each projection point.
func checkEdges(x *geom.Index, j *joints.Joint, st *joints.Stack, diameter float64, o *joints.BuildOptions) []joints.Finding {
	m := x.Mesh()
	edgeLimit := o.EdgeFactor * diameter
	reach := 0.0
	for _, s := range st.Sheets {
		reach = math.Max(reach, s.Proj.Dist)
	}
	var nbuf [256]int32
	// FreeEdgeDistance makes its own test of every candidate: the rough
	// candidates serve it as well as ElemsNear's, for less.
	near := x.CandidatesNear(j.Point, reach+2*edgeLimit, nbuf[:0])
	var fs []joints.Finding
	for i := range st.Sheets {
		s := &st.Sheets[i]
		s.EdgeDistance = geom.FreeEdgeDistance(m, near, s.Proj.Point, m.ElemPart[s.Proj.Elem], 2*edgeLimit)
		// A weld exactly at the edge limit meets it (joints.LengthRoundoff:
		// the distance is computed from coordinates).
		if s.EdgeDistance < edgeLimit-joints.LengthRoundoff {
			msg := fmt.Sprintf("weld centre %s mm from a free edge of part %d (minimum %s mm = %g nugget diameter(s))",
				joints.MM(s.EdgeDistance), s.Part, joints.MM(edgeLimit), o.EdgeFactor)
			if off := offSheet(s, j.Point); off > 0 {
				msg = fmt.Sprintf("weld centre off part %d: %s mm beyond its free edge (it should lie at least %s mm = %g nugget diameter(s) inside it)",
					s.Part, joints.MM(off), joints.MM(edgeLimit), o.EdgeFactor)
			}
			fs = append(fs, j.Finding(joints.Warning, joints.CodeEdgeClose, []int64{s.Part}, msg))
		}
	}
	return fs
}

// offSheet returns how far, in the plane of its host element, the weld
// centre p lies beyond the free edge of sheet s: the weld's nearest
// point on the sheet lies on a free edge and p is not over it. It
// returns 0 when p lies over the sheet (its nearest point is the foot
// of the normal through p) or less than half a micrometre off, below
// what a message shows.
func offSheet(s *joints.Sheet, p r3.Vec) float64 {
	if s.EdgeDistance > 1e-6 {
		return 0
	}
	v := r3.Sub(p, s.Proj.Point)
	n := s.Proj.Normal
	d := r3.Norm(r3.Sub(v, r3.Scale(r3.Dot(v, n), n)))
	if d < 5e-4 {
		return 0
	}
	return d
}

// partList names parts for a message: "part 3", "parts 3 and 4",
// "parts 3, 4 and 5".
func partList(ps []int64) string {
	if len(ps) == 1 {
		return fmt.Sprintf("part %d", ps[0])
	}
	var b strings.Builder
	b.WriteString("parts ")
	for i, p := range ps {
		switch {
		case i == len(ps)-1:
			b.WriteString(" and ")
		case i > 0:
			b.WriteString(", ")
		}
		fmt.Fprintf(&b, "%d", p)
	}
	return b.String()
}
