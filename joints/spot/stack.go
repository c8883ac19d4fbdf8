package spot

import (
	"cmp"
	"fmt"
	"math"
	"slices"
	"strings"

	"gonum.org/v1/gonum/spatial/r3"

	"github.com/joinery-cae/joinery/geom"
	"github.com/joinery-cae/joinery/joints"
)

// chooseStack finds the sheets weld j joins: the parts it lists, or the
// stack found around its point, with the findings of that choice. When
// the automatic choice leaves fewer than two sheets, the finding names
// the sheets within reach it rejected and why; a sheet under the weld
// whose host element is degenerate is an error of its own
// (degenerate-host). For a joint that lists its parts it also returns
// the sheets of the parts it does not list that lie parallel to the
// stack's axis (within the angle limit, on sound host elements), placed
// on that axis: the checks name those that lie between two listed
// sheets under the weld (unlistedBetween).
func chooseStack(x *geom.Index, j *joints.Joint, o *joints.BuildOptions) (joints.Stack, []joints.Finding, []joints.Sheet) {
	m := x.Mesh()
	cands := candidates(x, j.Point, o.Reach)
	var (
		st       joints.Stack
		fs       []joints.Finding
		rejs     []rejection
		unlisted []joints.Sheet
	)
	if len(j.Parts) > 0 {
		var missing []int64
		st, missing = listedStack(m, cands, j.Point, j.Parts)
		unlisted = parallelUnlisted(m, cands, &st, j, o)
		for _, id := range missing {
			fs = append(fs, j.Finding(joints.Error, joints.CodePartNotFound, []int64{id},
				fmt.Sprintf("listed part %d has no element within %s mm of the weld", id, joints.MM(o.Reach))))
		}
	} else {
		var (
			latTol  float64
			dropped []joints.Sheet
		)
		st, latTol = autoStack(m, cands, j.Point, o, j.Diameter)
		// The sheets kept in contact may have another governing
		// thickness than the whole stack: hold them to its nugget again,
		// and split again what that leaves (a middle sheet dropped opens
		// a gap), until neither changes the stack.
		for {
			n := len(st.Sheets)
			var apart []joints.Sheet
			st, apart = splitStack(&st)
			dropped = append(dropped, apart...)
			latTol = holdToNugget(&st, latTol, j.Diameter, o)
			if len(st.Sheets) == n || len(st.Sheets) < 2 {
				break
			}
		}
		if len(st.Sheets) == 0 {
			latTol = groupLimit(m, cands, j.Diameter, o)
		}
		// Sheets split off as apart are reported as such, not rejected.
		seen := joints.Stack{Axis: st.Axis, Sheets: append(slices.Clone(st.Sheets), dropped...)}
		rejs = rejected(m, cands, &seen, j.Point, latTol, o)
		for _, s := range dropped {
			fs = append(fs, j.Finding(joints.Info, joints.CodeSheetApart, []int64{s.Part},
				fmt.Sprintf("part %d lies parallel %s mm from the weld, apart from the sheets in contact: not joined", s.Part, joints.MM(math.Abs(s.Position)))))
		}
		for _, r := range rejs {
			if r.degenerate && r.underWeld {
				fs = append(fs, j.Finding(joints.Error, joints.CodeDegenerate, []int64{r.sheet.Part}, degenerateMessage(m, &r.sheet)))
			}
		}
	}
	switch n := len(st.Sheets); {
	case n == 0 && len(fs) == 0:
		msg := fmt.Sprintf("no sheet within %s mm of the weld", joints.MM(o.Reach))
		if len(rejs) > 0 {
			msg = fmt.Sprintf("no sheet lies under the weld within %s mm; within reach: %s", joints.MM(o.Reach), reasons(rejs))
		}
		fs = append(fs, j.Finding(joints.Error, joints.CodeNoSheet, rejectedParts(nil, rejs), msg))
	case n == 1 && len(j.Parts) == 0 && !joints.HasError(fs):
		msg := fmt.Sprintf("only part %d lies under the weld within %s mm: nothing to join", st.Sheets[0].Part, joints.MM(o.Reach))
		if len(rejs) > 0 {
			msg += "; also within reach: " + reasons(rejs)
		}
		fs = append(fs, j.Finding(joints.Error, joints.CodeSingleSheet, rejectedParts(st.Parts(), rejs), msg))
	case n == 1 && len(fs) == 0:
		msg := "fewer than two listed parts found: nothing to join"
		if len(j.Parts) == 1 {
			msg = fmt.Sprintf("the joint lists part %d alone: nothing to join (a spot weld joins two sheets or more)", j.Parts[0])
		}
		fs = append(fs, j.Finding(joints.Error, joints.CodeSingleSheet, st.Parts(), msg))
	case n > 4:
		fs = append(fs, j.Finding(joints.Warning, joints.CodeStackSize, st.Parts(),
			fmt.Sprintf("%d sheets in one stack; spot-welded stacks have 2 to 4", n)))
	}
	return st, fs, unlisted
}

// parallelUnlisted returns the candidates of parts joint j does not
// list whose normals lie within the angle limit of listed stack st's
// axis, on sound host elements, placed on that axis through the weld
// point.
func parallelUnlisted(m *geom.Mesh, cands []joints.Sheet, st *joints.Stack, j *joints.Joint, o *joints.BuildOptions) []joints.Sheet {
	if r3.Norm2(st.Axis) == 0 {
		return nil
	}
	var out []joints.Sheet
	for _, s := range cands {
		if slices.Contains(j.Parts, s.Part) || degenerateHost(m, &s) || axisAngle(s.Proj.Normal, st.Axis) > o.AngleLimit {
			continue
		}
		place(m, &s, j.Point, st.Axis)
		out = append(out, s)
	}
	return out
}

// unlistedBetween returns the parts of the sheets among unlisted that
// lie under the weld (within limit of the axis, mm) between consecutive
// sheets a and b of its stack, along the axis.
func unlistedBetween(unlisted []joints.Sheet, a, b joints.Sheet, limit float64) []int64 {
	var out []int64
	for _, s := range unlisted {
		if s.Position > a.Position && s.Position < b.Position && !offAxis(s.Lateral, limit) {
			out = append(out, s.Part)
		}
	}
	slices.Sort(out)
	return out
}

// candidates returns, for every part with an element within r of p, the
// closest projection of p onto that part (geom.Index.ClosestPerPart: ties
// to the lower element id), ordered by distance, then part id. A closest
// element that is degenerate gives way to a sound element of the part at
// the same distance, if there is one: a sliver along an edge must not
// hide the element beside it.
func candidates(x *geom.Index, p r3.Vec, r float64) []joints.Sheet {
	m := x.Mesh()
	prs := x.ClosestPerPart(p, r)
	out := make([]joints.Sheet, len(prs))
	moved := false
	for i, pr := range prs {
		if degenerateElem(m, pr.Elem) {
			pi := m.ElemPart[pr.Elem]
			sound := func(e int) bool { return m.ElemPart[e] == pi && !degenerateElem(m, e) }
			if alt := x.ProjectNear(p, pr.Dist+geom.TieDistance, sound); len(alt) > 0 {
				moved = true
				pr = alt[0]
				for _, a := range alt[1:] {
					if a.Dist <= alt[0].Dist+geom.TieDistance && m.ElemIDs[a.Elem] < m.ElemIDs[pr.Elem] {
						pr = a
					}
				}
			}
		}
		out[i] = joints.Sheet{Part: m.Part(pr.Elem).ID, Proj: pr, Thickness: m.Thickness(pr.Elem), EdgeDistance: math.Inf(1)}
	}
	if moved { // a distance may have changed within the tie distance
		slices.SortFunc(out, func(a, b joints.Sheet) int {
			return cmp.Or(cmp.Compare(a.Proj.Dist, b.Proj.Dist), cmp.Compare(a.Part, b.Part))
		})
	}
	return out
}

// degenerateElem reports whether element e has no usable normal: no
// area, or too little for its size (geom.Quality.Degenerate).
func degenerateElem(m *geom.Mesh, e int) bool {
	return r3.Norm2(m.Normal(e)) == 0 || m.ElemQuality(e).Degenerate
}

// degenerateHost reports whether a sheet's host element gives no normal
// to build on.
func degenerateHost(m *geom.Mesh, s *joints.Sheet) bool {
	return r3.Norm2(s.Proj.Normal) == 0 || degenerateElem(m, s.Proj.Elem)
}

// degenerateMessage is the message of a degenerate-host finding.
func degenerateMessage(m *geom.Mesh, s *joints.Sheet) string {
	return fmt.Sprintf("the element of part %d under the weld (id %d) is degenerate: too little area for a normal to build on", s.Part, m.ElemIDs[s.Proj.Elem])
}

// rejection is a sheet within reach that an automatic stack left out,
// and why.
type rejection struct {
	sheet      joints.Sheet
	why        string
	degenerate bool // its host element is degenerate
	underWeld  bool // degenerate, and its nearest point lies near the axis
}

// rejected returns the candidates that stack st (before it is split)
// does not hold, with the test each failed against st's axis through p:
// a degenerate host, a normal beyond the angle limit, a nearest point
// farther than latTol from the axis. With no stack, each sheet is held
// against its own normal (and latTol, the limit of the candidates as one
// stack: groupLimit).
func rejected(m *geom.Mesh, cands []joints.Sheet, st *joints.Stack, p r3.Vec, latTol float64, o *joints.BuildOptions) []rejection {
	var out []rejection
	for _, s := range cands {
		if slices.ContainsFunc(st.Sheets, func(t joints.Sheet) bool { return t.Part == s.Part }) {
			continue
		}
		axis, limit := st.Axis, latTol
		if len(st.Sheets) == 0 {
			axis = s.Proj.Normal
		}
		r := rejection{sheet: s}
		if degenerateHost(m, &s) {
			r.degenerate = true
			r.why = fmt.Sprintf("its element there (id %d) is degenerate: too little area for a normal", m.ElemIDs[s.Proj.Elem])
			r.underWeld = true
			if r3.Norm2(axis) > 0 {
				place(m, &s, p, axis)
				r.underWeld = !offAxis(s.Lateral, limit)
			}
			out = append(out, r)
			continue
		}
		if angle := axisAngle(s.Proj.Normal, axis); angle > o.AngleLimit {
			r.why = fmt.Sprintf("its normal %s degrees off the weld axis (limit %s degrees)", joints.MM(angle), joints.MM(o.AngleLimit))
			if q := m.ElemQuality(s.Proj.Elem); q.Warp > o.AngleLimit {
				r.why += fmt.Sprintf(" on an element warped by %s degrees (id %d)", joints.MM(q.Warp), m.ElemIDs[s.Proj.Elem])
			}
			out = append(out, r)
			continue
		}
		place(m, &s, p, axis)
		if offAxis(s.Lateral, limit) {
			r.why = fmt.Sprintf("%s mm off the weld axis (limit %s mm)", joints.MM(s.Lateral), joints.MM(limit))
			out = append(out, r)
		}
	}
	return out
}

// axisAngle returns the angle in degrees between unit normal n and the
// axis, taken either way round (0 to 90).
func axisAngle(n, axis r3.Vec) float64 {
	return math.Acos(min(1, math.Abs(r3.Dot(n, axis)))) * 180 / math.Pi
}

// reasons lists rejections for a message: "part 2, 1.5 mm off the weld
// axis (limit 1.25 mm); part 3, ...".
func reasons(rs []rejection) string {
	var b strings.Builder
	for i, r := range rs {
		if i > 0 {
			b.WriteString("; ")
		}
		fmt.Fprintf(&b, "part %d, %s", r.sheet.Part, r.why)
	}
	return b.String()
}

// rejectedParts appends the parts of rs to parts.
func rejectedParts(parts []int64, rs []rejection) []int64 {
	for _, r := range rs {
		parts = append(parts, r.sheet.Part)
	}
	return parts
}

// lateralLimit returns how far from the axis a sheet's nearest point may
// lie, mm: LateralFactor nugget radii, the nugget being the listed
// diameter or the rule's for thickness t.
func lateralLimit(diameter, t float64, o *joints.BuildOptions) float64 {
	if diameter <= 0 {
		diameter = o.Rule.Diameter(t)
	}
	return o.LateralFactor * diameter / 2
}

// offAxis reports whether a sheet whose nearest point lies lat mm from
// the weld axis lies beyond the lateral limit, mm. A sheet exactly at the
// limit meets it: lat is computed from coordinates, so it is compared
// with joints.LengthRoundoff allowed, and the same model in mm, m or
// inches (scaled to mm on reading) keeps or drops the same sheets.
func offAxis(lat, limit float64) bool { return lat > limit+joints.LengthRoundoff }

// stackLimit returns how far from the axis the nearest point of each
// sheet of a stack of two or more may lie, mm: LateralFactor radii of the
// stack's nugget, the listed diameter or the rule's for the stack's
// governing thickness (joints.GoverningThickness), as the nugget the weld
// is built with.
func stackLimit(ts []float64, diameter float64, o *joints.BuildOptions) float64 {
	if diameter <= 0 {
		diameter = o.Rule.Diameter(joints.GoverningThickness(ts))
	}
	return o.LateralFactor * diameter / 2
}

// holdToNugget drops from a stack of two or more sheets those farther
// from its axis than its own nugget allows (stackLimit), and again for
// the sheets left, whose governing thickness may be another, until every
// sheet kept lies within the limit of the stack it is in: the limit a
// stack of listed parts is held to (checkSheets). It returns that limit;
// for a stack it cut to fewer than two sheets, the limit of the last
// stack of two or more, which the sheets it dropped lie beyond; for a
// stack of fewer than two sheets to begin with, limit.
func holdToNugget(st *joints.Stack, limit, diameter float64, o *joints.BuildOptions) float64 {
	for len(st.Sheets) >= 2 {
		limit = stackLimit(st.Thicknesses(), diameter, o)
		kept := slices.DeleteFunc(slices.Clone(st.Sheets), func(s joints.Sheet) bool { return offAxis(s.Lateral, limit) })
		if len(kept) == len(st.Sheets) {
			break
		}
		st.Sheets = kept
	}
	return limit
}

// groupLimit returns the lateral limit the candidates of a weld with no
// stack are judged against: that of all sound ones as one stack, or of
// the one alone; with none sound, that of all of them (a degenerate host
// is still under the weld within it: degenerate-host).
func groupLimit(m *geom.Mesh, cands []joints.Sheet, diameter float64, o *joints.BuildOptions) float64 {
	var ts []float64
	for i := range cands {
		if !degenerateHost(m, &cands[i]) {
			ts = append(ts, cands[i].Thickness)
		}
	}
	if len(ts) == 0 {
		for i := range cands {
			ts = append(ts, cands[i].Thickness)
		}
	}
	if len(ts) == 1 {
		return lateralLimit(diameter, ts[0], o)
	}
	return stackLimit(ts, diameter, o)
}

// place sets a sheet's Position and Lateral for a stack axis through p.
// The position is where the axis meets the plane tangent to the sheet at
// its projection point (moved to the mid-surface for outer-surface
// meshes), so that on a sheet tilted to the axis the gap between two
// sheets does not depend on how high along the axis the weld point was
// given; on a sheet square to the axis it is the projection's distance
// along the axis.
func place(m *geom.Mesh, s *joints.Sheet, p, axis r3.Vec) {
	v := r3.Sub(s.Proj.Point, p)
	along := r3.Dot(v, axis)
	s.Lateral = r3.Norm(r3.Sub(v, r3.Scale(along, axis)))
	s.Position = joints.AxisCrossing(v, s.Proj.Normal, axis, m.Part(s.Proj.Elem).Surface.MidOffset(s.Thickness))
}

// parallel reports whether unit vectors a and b are within tol radians of
// parallel or anti-parallel.
func parallel(a, b r3.Vec, cosTol float64) bool { return math.Abs(r3.Dot(a, b)) >= cosTol }

// autoStack picks the sheets of a joint among the candidates: the largest
// set whose normals are near-parallel to an axis taken from one of them
// and whose projections lie near that axis through p. Ties go to the
// axis of the closer candidate. Sheets on degenerate host elements give
// no axis and join no stack. The sheets near an axis are first those
// within the limit of the axis sheet's own nugget, then those within the
// limit of the nugget of the stack they form (holdToNugget). It returns
// the stack and its lateral limit, mm.
func autoStack(m *geom.Mesh, cands []joints.Sheet, p r3.Vec, o *joints.BuildOptions, diameter float64) (joints.Stack, float64) {
	cosTol := math.Cos(o.AngleLimit * math.Pi / 180)
	var (
		best    joints.Stack
		bestTol float64
	)
	bad := make([]bool, len(cands))
	maxT := 0.0
	for i := range cands {
		bad[i] = degenerateHost(m, &cands[i])
		if !bad[i] {
			maxT = math.Max(maxT, cands[i].Thickness)
		}
	}
	for i, c := range cands {
		if bad[i] {
			continue
		}
		axis := c.Proj.Normal
		// First the limit no stack of these sheets can exceed (the nugget
		// of the thickest as governing thickness), then that of the stack
		// they form: holdToNugget only drops sheets, and a stack's
		// governing thickness never grows as sheets go, so every sheet
		// within the final limit is kept.
		latTol := lateralLimit(diameter, maxT, o)
		var st joints.Stack
		st.Axis = axis
		for k, s := range cands {
			if bad[k] || !parallel(s.Proj.Normal, axis, cosTol) {
				continue
			}
			place(m, &s, p, axis)
			if !offAxis(s.Lateral, latTol) {
				st.Sheets = append(st.Sheets, s)
			}
		}
		latTol = holdToNugget(&st, latTol, diameter, o)
		if len(st.Sheets) > len(best.Sheets) {
			best, bestTol = st, latTol
		}
	}
	orderStack(&best)
	return best, bestTol
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
		if !degenerateHost(m, &s) && (closest < 0 || s.Proj.Dist < st.Sheets[closest].Proj.Dist ||
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
// mid-surfaces, square to the sheets (joints.SquareGap), exceeds contact
// by more than the average of their thicknesses (a gap exactly at that
// limit meets it: it is computed from coordinates, so it is compared
// with joints.LengthRoundoff allowed, and the same sheets split alike
// whatever the height of the weld point), the stack is split, and the group holding the weld point
// (or, failing that, the group nearest to it) is kept when it has two
// sheets or more. The sheets left out are returned. When no such group
// exists the stack is kept whole, so its gaps are reported.
func splitStack(st *joints.Stack) (kept joints.Stack, dropped []joints.Sheet) {
	var groups [][]joints.Sheet
	start := 0
	for i := 0; i+1 < len(st.Sheets); i++ {
		a, b := st.Sheets[i], st.Sheets[i+1]
		contact := (a.Thickness + b.Thickness) / 2
		gap := joints.SquareGap(b.Position-a.Position, a.Thickness, b.Thickness, a.Proj.Normal, b.Proj.Normal, st.Axis)
		if gap-contact > contact+joints.LengthRoundoff {
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
