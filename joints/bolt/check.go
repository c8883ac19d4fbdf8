package bolt

import (
	"fmt"
	"math"
	"slices"

	"gonum.org/v1/gonum/spatial/r3"

	"github.com/joinery-cae/joinery/geom"
	"github.com/joinery-cae/joinery/joints"
)

// checkSheets returns the findings about the sheets a bolt found: listed
// parts not crossed (part-not-found), no sheet (no-sheet), one sheet on
// a bolt not grounded (single-sheet), a sheet without thickness, and the
// gaps between consecutive sheets against contact (gap-open,
// gap-closed), as for spot welds.
func checkSheets(j *joints.Joint, st *joints.Stack, o *joints.BuildOptions) []joints.Finding {
	var fs []joints.Finding
	for _, id := range j.Parts {
		if !slices.ContainsFunc(st.Sheets, func(s joints.Sheet) bool { return s.Part == id }) {
			fs = append(fs, j.Finding(joints.Error, joints.CodePartNotFound, []int64{id},
				fmt.Sprintf("listed part %d is not crossed by the bolt's axis within %s mm (no element on the axis, no hole round it)", id, joints.MM(o.Reach))))
		}
	}
	switch n := len(st.Sheets); {
	case n == 0 && len(fs) == 0:
		fs = append(fs, j.Finding(joints.Error, joints.CodeNoSheet, nil,
			fmt.Sprintf("the bolt's axis crosses no sheet within %s mm of the point along it (no element on it, no closed hole edge round it within %s mm of it)", joints.MM(o.Reach), joints.MM(searchFactor*j.Washer))))
	case n == 1 && !j.Ground && len(fs) == 0:
		fs = append(fs, j.Finding(joints.Error, joints.CodeSingleSheet, st.Parts(),
			fmt.Sprintf("the bolt's axis crosses only part %d within %s mm: nothing to fasten it to (a bolt to a fixture outside the model says ground yes)", st.Sheets[0].Part, joints.MM(o.Reach))))
	}
	for _, s := range st.Sheets {
		if !(s.Thickness > 0) {
			fs = append(fs, j.Finding(joints.Error, joints.CodeNoThickness, []int64{s.Part},
				fmt.Sprintf("part %d has no thickness: give it one in the parts table", s.Part)))
		}
	}
	for i := 0; i+1 < len(st.Sheets); i++ {
		a, b := st.Sheets[i], st.Sheets[i+1]
		along := b.Position - a.Position
		gap := joints.SquareGap(along, a.Thickness, b.Thickness, a.Proj.Normal, b.Proj.Normal, st.Axis)
		want := (a.Thickness + b.Thickness) / 2
		tol := o.GapAllowanceFor(a.Thickness, b.Thickness)
		lim := tol + joints.LengthRoundoff
		apart := joints.MM(gap) + " mm apart"
		if joints.MM(along) != joints.MM(gap) {
			apart += " square to the sheets (" + joints.MM(along) + " mm along the bolt's tilted axis)"
		}
		switch dev := gap - want; {
		case dev > lim:
			fs = append(fs, j.Finding(joints.Warning, joints.CodeGapOpen, []int64{a.Part, b.Part},
				fmt.Sprintf("parts %d and %d do not touch at the bolt: mid-surfaces %s, contact at %s mm (allowance %s mm); the shank bridges %s mm of air",
					a.Part, b.Part, apart, joints.MM(want), joints.MM(tol), joints.MM(dev))))
		case dev < -lim:
			fs = append(fs, j.Finding(joints.Warning, joints.CodeGapClosed, []int64{a.Part, b.Part},
				fmt.Sprintf("parts %d and %d overlap at the bolt: mid-surfaces %s, contact at %s mm (allowance %s mm); the sheets penetrate by %s mm",
					a.Part, b.Part, apart, joints.MM(want), joints.MM(tol), joints.MM(-dev))))
		}
	}
	return fs
}

// checkSizes checks a bolt's sizes against the published tables and its
// holes as meshed: a declared hole larger than ISO 273's coarse series
// for the size (hole-class) and a washer smaller than ISO 7089's
// (washer-small) are warnings; per sheet with a hole in the mesh, a
// measured diameter off the declared one by more than the tolerance is a
// warning (hole-size), an error when the shank does not pass through it
// (the fitted diameter, or the hole's width where it is narrowest, as
// on an oval hole, less than the bolt's),
// and a washer that does not cover it is an error (washer-hole).
func checkSizes(j *joints.Joint, st *joints.Stack, holes []joints.BoltHole, o *joints.BuildOptions) []joints.Finding {
	var fs []joints.Finding
	if b, ok := joints.MetricBoltFor(j.Diameter); ok {
		// SizeRoundoff absorbs the rounding of sizes given in other
		// units (20 mm written 0.7874 in is 19.99996 mm).
		if j.Hole > b.Coarse+joints.SizeRoundoff {
			fs = append(fs, j.Finding(joints.Warning, joints.CodeHoleClass, st.Parts(),
				fmt.Sprintf("hole %s mm is larger than the coarse clearance hole for M%g, %s mm (ISO 273): the washer may not bear", joints.MM(j.Hole), b.Nominal, joints.MM(b.Coarse))))
		}
		if j.Washer < b.WasherOuter-joints.SizeRoundoff {
			fs = append(fs, j.Finding(joints.Warning, joints.CodeWasherSmall, st.Parts(),
				fmt.Sprintf("washer %s mm is smaller than the plain washer for M%g, %s mm (ISO 7089)", joints.MM(j.Washer), b.Nominal, joints.MM(b.WasherOuter))))
		}
	}
	tol := o.HoleToleranceOrDefault()
	for i, h := range holes {
		if h.Diameter == 0 {
			continue
		}
		part := st.Sheets[i].Part
		switch d := h.Diameter; {
		case d < j.Diameter-joints.LengthRoundoff:
			fs = append(fs, j.Finding(joints.Error, joints.CodeHoleSize, []int64{part},
				fmt.Sprintf("the hole in part %d measures %s mm, less than the bolt's %s mm: the shank does not pass", part, joints.MM(d), joints.MM(j.Diameter))))
		case h.Narrowest > 0 && h.Narrowest < j.Diameter-joints.LengthRoundoff:
			fs = append(fs, j.Finding(joints.Error, joints.CodeHoleSize, []int64{part},
				fmt.Sprintf("the hole in part %d measures %s mm (the circle fitted to its edge) but only %s mm across where it is narrowest, less than the bolt's %s mm: the shank does not pass", part, joints.MM(d), joints.MM(h.Narrowest), joints.MM(j.Diameter))))
		case d > j.Hole+tol+joints.LengthRoundoff || d < j.Hole-tol-joints.LengthRoundoff:
			fs = append(fs, j.Finding(joints.Warning, joints.CodeHoleSize, []int64{part},
				fmt.Sprintf("the hole in part %d measures %s mm, the list declares %s mm (tolerance %s mm)", part, joints.MM(d), joints.MM(j.Hole), joints.MM(tol))))
		}
		if h.Diameter >= j.Washer {
			fs = append(fs, j.Finding(joints.Error, joints.CodeWasherHole, []int64{part},
				fmt.Sprintf("the washer (%s mm) does not cover the hole in part %d, which measures %s mm", joints.MM(j.Washer), part, joints.MM(h.Diameter))))
		}
	}
	return fs
}

// checkEdges sets each sheet's EdgeDistance, the distance from its
// centre to the part's nearest free edge other than its hole's (within
// the washer's diameter; +Inf beyond), and reports a washer whose
// footprint, the disc of its radius about the centre, runs past such an
// edge (edge-close, a warning): the washer overhangs the sheet and
// bears on less than its ring (closed form: a disc of radius r about a
// point d from a straight edge crosses it when d < r). x must hold every
// element within the washer's diameter of each centre (Near's margin).
func checkEdges(x *geom.Index, j *joints.Joint, st *joints.Stack, ends []joints.End, xs []crossing) []joints.Finding {
	m := x.Mesh()
	var fs []joints.Finding
	var nbuf [256]int32
	for i := range st.Sheets {
		s := &st.Sheets[i]
		near := x.ElemsNear(ends[i].Point, j.Washer, nbuf[:0])
		s.EdgeDistance = freeEdgeBeyondHole(m, near, ends[i].Point, xs[i].part, xs[i].loop, j.Washer)
		if r := j.Washer / 2; s.EdgeDistance < r-joints.LengthRoundoff {
			fs = append(fs, j.Finding(joints.Warning, joints.CodeEdgeClose, []int64{s.Part},
				fmt.Sprintf("the bolt's centre on part %d lies %s mm from a free edge of the part, less than the washer's radius, %s mm: the washer overhangs the sheet's edge", s.Part, joints.MM(s.EdgeDistance), joints.MM(r))))
		}
	}
	return fs
}

// freeEdgeBeyondHole returns the distance from q to the nearest free
// edge of part pi within r, leaving out the edges of the hole loop (both
// ends on it), +Inf when there is none. near holds every element within
// r of q: an edge within r has every element using it within r too.
func freeEdgeBeyondHole(m *geom.Mesh, near []int32, q r3.Vec, pi int32, loop []int32, r float64) float64 {
	onHole := map[int32]bool{}
	for _, n := range loop {
		onHole[n] = true
	}
	type use struct {
		e int32
		k int
	}
	var uses []use
	count := map[[2]int32]int{}
	for _, e := range near {
		if m.ElemPart[e] != pi {
			continue
		}
		for k := range m.Type(int(e)).Corners() {
			ed := m.ElemEdge(int(e), k)
			count[[2]int32{min(ed.A, ed.B), max(ed.A, ed.B)}]++
			uses = append(uses, use{e, k})
		}
	}
	best := math.Inf(1)
	for _, u := range uses {
		ed := m.ElemEdge(int(u.e), u.k)
		if count[[2]int32{min(ed.A, ed.B), max(ed.A, ed.B)}] != 1 || onHole[ed.A] && onHole[ed.B] {
			continue
		}
		if d := m.EdgeDistance(ed, q); d <= r && d < best {
			best = d
		}
	}
	return best
}
