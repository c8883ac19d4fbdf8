package spot

import (
	"cmp"
	"fmt"
	"math"
	"slices"

	"gonum.org/v1/gonum/spatial/r3"

	"github.com/joinery-cae/joinery/geom"
	"github.com/joinery-cae/joinery/joints"
)

// chooseStack finds the sheets weld j joins: the parts it lists, or the
// stack found around its point, with the findings of that choice.
func chooseStack(x *geom.Index, j *joints.Joint, o *joints.BuildOptions) (joints.Stack, []joints.Finding) {
	m := x.Mesh()
	cands := candidates(x, j.Point, o.Reach)
	var (
		st joints.Stack
		fs []joints.Finding
	)
	if len(j.Parts) > 0 {
		var missing []int64
		st, missing = listedStack(m, cands, j.Point, j.Parts)
		for _, id := range missing {
			fs = append(fs, j.Finding(joints.Error, joints.CodePartNotFound, []int64{id},
				fmt.Sprintf("listed part %d has no element within %s mm of the weld", id, joints.MM(o.Reach))))
		}
	} else {
		st = autoStack(m, cands, j.Point, o, j.Diameter, o.Rule)
		var dropped []joints.Sheet
		st, dropped = splitStack(&st)
		for _, s := range dropped {
			fs = append(fs, j.Finding(joints.Info, joints.CodeSheetApart, []int64{s.Part},
				fmt.Sprintf("part %d lies parallel %s mm from the weld, apart from the sheets in contact: not joined", s.Part, joints.MM(math.Abs(s.Position)))))
		}
	}
	switch n := len(st.Sheets); {
	case n == 0 && len(fs) == 0:
		fs = append(fs, j.Finding(joints.Error, joints.CodeNoSheet, nil,
			fmt.Sprintf("no sheet within %s mm of the weld", joints.MM(o.Reach))))
	case n == 1 && len(j.Parts) == 0:
		fs = append(fs, j.Finding(joints.Error, joints.CodeSingleSheet, st.Parts(),
			fmt.Sprintf("only part %d lies under the weld within %s mm: nothing to join", st.Sheets[0].Part, joints.MM(o.Reach))))
	case n == 1 && len(fs) == 0:
		fs = append(fs, j.Finding(joints.Error, joints.CodeSingleSheet, st.Parts(),
			"fewer than two listed parts found: nothing to join"))
	case n > 4:
		fs = append(fs, j.Finding(joints.Warning, joints.CodeStackSize, st.Parts(),
			fmt.Sprintf("%d sheets in one stack; spot-welded stacks have 2 to 4", n)))
	}
	return st, fs
}

// candidates returns, for every part with an element within r of p, the
// closest projection of p onto that part (ties to the lower element
// index), ordered by distance, then part id. Elements are visited in
// order of their bounding-box distance, and an element whose box lies
// farther than its part's best projection so far is not projected: the
// box distance is a lower bound of the true one.
func candidates(x *geom.Index, p r3.Vec, r float64) []joints.Sheet {
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
	var out []joints.Sheet
	for _, c := range list {
		pi := m.ElemPart[c.e]
		k := slices.IndexFunc(out, func(s joints.Sheet) bool { return m.ElemPart[s.Proj.Elem] == pi })
		if k >= 0 && c.d2 > out[k].Proj.Dist*out[k].Proj.Dist {
			continue
		}
		pr := m.Project(int(c.e), p)
		if !(pr.Dist <= r) {
			continue
		}
		switch {
		case k < 0:
			out = append(out, joints.Sheet{Part: m.Parts[pi].ID, Proj: pr, Thickness: m.Thickness(pr.Elem), EdgeDistance: math.Inf(1)})
		case pr.Dist < out[k].Proj.Dist || pr.Dist == out[k].Proj.Dist && pr.Elem < out[k].Proj.Elem:
			out[k].Proj, out[k].Thickness = pr, m.Thickness(pr.Elem)
		}
	}
	slices.SortStableFunc(out, func(a, b joints.Sheet) int {
		return cmp.Or(cmp.Compare(a.Proj.Dist, b.Proj.Dist), cmp.Compare(a.Part, b.Part))
	})
	return out
}

// place sets a sheet's Position and Lateral for a stack axis through p.
func place(m *geom.Mesh, s *joints.Sheet, p, axis r3.Vec) {
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
func autoStack(m *geom.Mesh, cands []joints.Sheet, p r3.Vec, o *joints.BuildOptions, diameter float64, rule joints.NuggetRule) joints.Stack {
	cosTol := math.Cos(o.AngleLimit * math.Pi / 180)
	var best joints.Stack
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
		var st joints.Stack
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
func listedStack(m *geom.Mesh, cands []joints.Sheet, p r3.Vec, listed []int64) (joints.Stack, []int64) {
	var st joints.Stack
	var missing []int64
	for _, id := range listed {
		i := slices.IndexFunc(cands, func(s joints.Sheet) bool { return s.Part == id })
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
func splitStack(st *joints.Stack) (kept joints.Stack, dropped []joints.Sheet) {
	var groups [][]joints.Sheet
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
	kept = joints.Stack{Axis: st.Axis, Sheets: slices.Clone(groups[best])}
	for g, grp := range groups {
		if g != best {
			dropped = append(dropped, grp...)
		}
	}
	return kept, dropped
}

// orderStack sorts sheets along the axis (ties by part id).
func orderStack(st *joints.Stack) {
	slices.SortStableFunc(st.Sheets, func(a, b joints.Sheet) int {
		return cmp.Or(cmp.Compare(a.Position, b.Position), cmp.Compare(a.Part, b.Part))
	})
}
