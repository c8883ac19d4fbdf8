package joints

import (
	"cmp"
	"fmt"
	"math"
	"slices"

	"gonum.org/v1/gonum/spatial/r3"

	"github.com/joinery-cae/joinery/geom"
)

// Sheet is one sheet of a joint's stack: a part and the closest point of
// its mesh to the joint.
type Sheet struct {
	Part      int64
	Proj      geom.Projection
	Thickness float64 // mm, of the host element
	// Position is the signed coordinate of the sheet's mid-surface along
	// the stack axis, measured from the joint point, mm. It differs from
	// the projection's when the part is meshed on an outer surface.
	Position float64
	// Lateral is the distance of the projection point from the stack
	// axis, mm.
	Lateral float64
	// EdgeDistance is the distance from the projection point to the
	// part's nearest free edge, mm; +Inf when none lies within the
	// search radius of the edge check.
	EdgeDistance float64
}

// Stack is the ordered set of sheets a joint joins.
type Stack struct {
	Axis   r3.Vec  // unit; sheets are ordered by Position along it
	Sheets []Sheet // ordered through the stack
}

// Thicknesses returns the sheet thicknesses in stack order.
func (s *Stack) Thicknesses() []float64 {
	ts := make([]float64, len(s.Sheets))
	for i, sh := range s.Sheets {
		ts[i] = sh.Thickness
	}
	return ts
}

// Parts returns the part ids in stack order.
func (s *Stack) Parts() []int64 {
	ps := make([]int64, len(s.Sheets))
	for i, sh := range s.Sheets {
		ps[i] = sh.Part
	}
	return ps
}

// candidates returns, for every part with an element within r of p, the
// closest projection of p onto that part (ties to the lower element
// index), ordered by distance, then part id. Elements are visited in
// order of their bounding-box distance, and an element whose box lies
// farther than its part's best projection so far is not projected: the
// box distance is a lower bound of the true one.
func candidates(x *geom.Index, p r3.Vec, r float64) []Sheet {
	m := x.Mesh()
	var buf [256]int32
	type near struct {
		e  int32
		d2 float64 // squared distance from p to the element's box
	}
	elems := x.ElemsNear(p, r, buf[:0])
	list := make([]near, len(elems))
	for i, e := range elems {
		list[i] = near{e, geom.BoxDist2(m.ElemBox(int(e)), p)}
	}
	slices.SortFunc(list, func(a, b near) int { return cmp.Or(cmp.Compare(a.d2, b.d2), cmp.Compare(a.e, b.e)) })
	var out []Sheet
	for _, c := range list {
		pi := m.ElemPart[c.e]
		k := slices.IndexFunc(out, func(s Sheet) bool { return m.ElemPart[s.Proj.Elem] == pi })
		if k >= 0 && c.d2 > out[k].Proj.Dist*out[k].Proj.Dist {
			continue
		}
		pr := m.Project(int(c.e), p)
		if !(pr.Dist <= r) {
			continue
		}
		switch {
		case k < 0:
			out = append(out, Sheet{Part: m.Parts[pi].ID, Proj: pr, Thickness: m.Thickness(pr.Elem), EdgeDistance: math.Inf(1)})
		case pr.Dist < out[k].Proj.Dist || pr.Dist == out[k].Proj.Dist && pr.Elem < out[k].Proj.Elem:
			out[k].Proj, out[k].Thickness = pr, m.Thickness(pr.Elem)
		}
	}
	slices.SortStableFunc(out, func(a, b Sheet) int {
		return cmp.Or(cmp.Compare(a.Proj.Dist, b.Proj.Dist), cmp.Compare(a.Part, b.Part))
	})
	return out
}

// place sets a sheet's Position and Lateral for a stack axis through p.
func place(m *geom.Mesh, s *Sheet, p, axis r3.Vec) {
	v := r3.Sub(s.Proj.Point, p)
	along := r3.Dot(v, axis)
	s.Lateral = r3.Norm(r3.Sub(v, r3.Scale(along, axis)))
	// Outer-surface meshes: move from the meshed surface to the
	// mid-surface along the element normal, expressed along the axis.
	off := m.Part(s.Proj.Elem).Surface.MidOffset(s.Thickness)
	s.Position = along + off*r3.Dot(s.Proj.Normal, axis)
}

// parallel reports whether unit vectors a and b are within tol radians of
// parallel or anti-parallel.
func parallel(a, b r3.Vec, cosTol float64) bool { return math.Abs(r3.Dot(a, b)) >= cosTol }

// autoStack picks the sheets of a joint among the candidates: the largest
// set whose normals are near-parallel to an axis taken from one of them
// and whose projections lie near that axis through p. Ties go to the
// axis of the closer candidate.
func autoStack(m *geom.Mesh, cands []Sheet, p r3.Vec, o *BuildOptions, diameter float64, rule NuggetRule) Stack {
	cosTol := math.Cos(o.AngleTolerance * math.Pi / 180)
	var best Stack
	for _, c := range cands {
		axis := c.Proj.Normal
		if r3.Norm2(axis) == 0 {
			continue
		}
		d := diameter
		if d <= 0 {
			d = rule.Diameter(c.Thickness)
		}
		latTol := o.LateralFactor * d / 2
		var st Stack
		st.Axis = axis
		for _, s := range cands {
			if !parallel(s.Proj.Normal, axis, cosTol) {
				continue
			}
			place(m, &s, p, axis)
			if s.Lateral <= latTol {
				st.Sheets = append(st.Sheets, s)
			}
		}
		if len(st.Sheets) > len(best.Sheets) {
			best = st
		}
	}
	orderStack(&best)
	return best
}

// listedStack builds the stack from the parts a joint lists. Listed parts
// with no candidate are returned as missing.
func listedStack(m *geom.Mesh, cands []Sheet, p r3.Vec, listed []int64) (Stack, []int64) {
	var st Stack
	var missing []int64
	for _, id := range listed {
		i := slices.IndexFunc(cands, func(s Sheet) bool { return s.Part == id })
		if i < 0 {
			missing = append(missing, id)
			continue
		}
		st.Sheets = append(st.Sheets, cands[i])
	}
	// The axis is the normal of the closest listed sheet.
	closest := -1
	for i, s := range st.Sheets {
		if r3.Norm2(s.Proj.Normal) > 0 && (closest < 0 || s.Proj.Dist < st.Sheets[closest].Proj.Dist ||
			s.Proj.Dist == st.Sheets[closest].Proj.Dist && s.Part < st.Sheets[closest].Part) {
			closest = i
		}
	}
	if closest >= 0 {
		st.Axis = st.Sheets[closest].Proj.Normal
		for i := range st.Sheets {
			place(m, &st.Sheets[i], p, st.Axis)
		}
	}
	orderStack(&st)
	return st, missing
}

// splitStack keeps, of an automatically found stack, the sheets in
// contact around the weld: where the gap between two consecutive
// mid-surfaces exceeds contact by more than the average of their
// thicknesses, the stack is split, and the group holding the weld point
// (or, failing that, the group nearest to it) is kept when it has two
// sheets or more. The sheets left out are returned. When no such group
// exists the stack is kept whole, so its gaps are reported.
func splitStack(st *Stack) (kept Stack, dropped []Sheet) {
	var groups [][]Sheet
	start := 0
	for i := 0; i+1 < len(st.Sheets); i++ {
		a, b := st.Sheets[i], st.Sheets[i+1]
		contact := (a.Thickness + b.Thickness) / 2
		if b.Position-a.Position-contact > contact {
			groups = append(groups, st.Sheets[start:i+1])
			start = i + 1
		}
	}
	groups = append(groups, st.Sheets[start:])
	if len(groups) == 1 {
		return *st, nil
	}
	best, bestDist := -1, math.Inf(1)
	for g, grp := range groups {
		lo := grp[0].Position - grp[0].Thickness/2
		hi := grp[len(grp)-1].Position + grp[len(grp)-1].Thickness/2
		d := math.Max(0, math.Max(lo, -hi)) // distance of the weld point (0) from the group
		if d < bestDist {
			best, bestDist = g, d
		}
	}
	if len(groups[best]) < 2 {
		return *st, nil
	}
	kept = Stack{Axis: st.Axis, Sheets: slices.Clone(groups[best])}
	for g, grp := range groups {
		if g != best {
			dropped = append(dropped, grp...)
		}
	}
	return kept, dropped
}

// orderStack sorts sheets along the axis (ties by part id).
func orderStack(st *Stack) {
	slices.SortStableFunc(st.Sheets, func(a, b Sheet) int {
		return cmp.Or(cmp.Compare(a.Position, b.Position), cmp.Compare(a.Part, b.Part))
	})
}

// checkGaps compares each consecutive gap between mid-surfaces with the
// contact gap (t1+t2)/2 and returns the findings.
func checkGaps(st *Stack, o *BuildOptions, j *Joint) []Finding {
	var out []Finding
	for i := 0; i+1 < len(st.Sheets); i++ {
		a, b := st.Sheets[i], st.Sheets[i+1]
		gap := b.Position - a.Position
		want := (a.Thickness + b.Thickness) / 2
		tol := o.gapTolerance(a.Thickness, b.Thickness)
		dev := gap - want
		switch {
		case dev > tol:
			out = append(out, jointFinding(j, Warning, CodeGapOpen, []int64{a.Part, b.Part},
				fmt.Sprintf("parts %d and %d do not touch: mid-surfaces %s mm apart, contact at %s mm (tolerance %s mm); the weld would bridge %s mm of air",
					a.Part, b.Part, mm(gap), mm(want), mm(tol), mm(dev))))
		case dev < -tol:
			out = append(out, jointFinding(j, Warning, CodeGapClosed, []int64{a.Part, b.Part},
				fmt.Sprintf("parts %d and %d overlap: mid-surfaces %s mm apart, contact at %s mm (tolerance %s mm); the sheets penetrate by %s mm",
					a.Part, b.Part, mm(gap), mm(want), mm(tol), mm(-dev))))
		}
	}
	return out
}

func jointFinding(j *Joint, sev Severity, code string, parts []int64, msg string) Finding {
	return Finding{Severity: sev, Code: code, Joint: j.ID, Parts: parts, Message: msg, Point: j.Point, HasPoint: true}
}

// mm formats a length for messages: three decimals, no trailing zeros.
func mm(v float64) string {
	s := fmt.Sprintf("%.3f", v)
	for len(s) > 1 && s[len(s)-1] == '0' {
		s = s[:len(s)-1]
	}
	if s[len(s)-1] == '.' {
		s = s[:len(s)-1]
	}
	if s == "-0" {
		s = "0"
	}
	return s
}
