package bolt

import (
	"cmp"
	"context"
	"fmt"
	"math"
	"runtime"
	"slices"
	"strconv"
	"strings"
	"sync"
	"sync/atomic"

	"gonum.org/v1/gonum/spatial/r3"

	"github.com/joinery-cae/joinery/geom"
	"github.com/joinery-cae/joinery/joints"
)

// searchFactor times the washer diameter is the distance from the axis
// within which a bolt looks at a sheet's elements and free edges, mm:
// the washer's radius twice over (our choice: a hole the washer does
// not cover is still found and reported, washer-hole).
const searchFactor = 1.0

// IndexFor builds the spatial index a build of the bolts among js with
// options o needs: the elements within reach of some bolt, where the
// reach covers every query a bolt makes (the reach along the axis, the
// search radius across it). Nil when js holds no bolt.
func IndexFor(m *geom.Mesh, js []joints.Joint, o joints.BuildOptions) *geom.Index {
	pts, margin := Near(m, js, o)
	if len(pts) == 0 {
		return nil
	}
	return geom.NewIndexNear(m, pts, margin, false)
}

// Near returns what IndexFor indexes around: the points of the bolts
// among js and the margin round them, mm (0 without bolts), so that a
// caller building one index for several jobs covers this one's queries.
func Near(m *geom.Mesh, js []joints.Joint, o joints.BuildOptions) ([]r3.Vec, float64) {
	o = o.Defaults(joints.MaxThickness(m))
	var pts []r3.Vec
	wmax := 0.0
	for _, j := range js {
		if j.Kind == joints.Bolt {
			pts = append(pts, j.Point)
			wmax = math.Max(wmax, j.Washer)
		}
	}
	if len(pts) == 0 {
		return nil, 0
	}
	// 1% slack against rounding at the margin. The edge check looks a
	// washer's diameter round each centre, which lies within the reach
	// along the axis and, moved onto the axis through the holes, within
	// the washer's diameter across it: within hypot(reach, washer) of
	// the point, so the elements it needs lie within that plus the
	// washer's diameter (triangle inequality).
	return pts, 1.01 * (math.Hypot(o.Reach, searchFactor*wmax) + wmax)
}

// Build makes the connectors of the bolts among js (other kinds are left
// out) with options o, defaults resolved against the mesh of x (an index
// that covers the bolts: IndexFor, or a full one). Bolts are built in
// parallel, each from its own joint alone, so the result is the same
// whatever GOMAXPROCS; the connectors come in the order of js, and
// joints.NewResult sorts them and hands out ids.
func Build(ctx context.Context, x *geom.Index, js []joints.Joint, o joints.BuildOptions, prog geom.Progress) ([]joints.Connector, error) {
	if err := o.Validate(); err != nil {
		return nil, fmt.Errorf("bolt: %w", err)
	}
	var bolts []*joints.Joint
	for i := range js {
		if js[i].Kind == joints.Bolt {
			bolts = append(bolts, &js[i])
		}
	}
	if len(bolts) == 0 {
		return nil, nil
	}
	o = o.Defaults(joints.MaxThickness(x.Mesh()))
	if prog == nil {
		prog = geom.NoProgress{}
	}
	prog.Start("building bolts", int64(len(bolts)))
	defer prog.Done()
	out := make([]joints.Connector, len(bolts))
	var next atomic.Int64
	var wg sync.WaitGroup
	for range min(runtime.GOMAXPROCS(0), max(1, len(bolts)/16)) {
		wg.Go(func() {
			for {
				i := int(next.Add(1) - 1)
				if i >= len(bolts) || ctx.Err() != nil {
					return
				}
				out[i] = buildOne(x, bolts[i], &o)
			}
		})
	}
	wg.Wait()
	prog.Add(int64(len(bolts)))
	if err := ctx.Err(); err != nil {
		return nil, fmt.Errorf("bolt: build interrupted: %w", err)
	}
	return out, nil
}

// buildOne makes the connector of one bolt: the axis, the sheets it
// crosses, the checks, a centre and ring per sheet, the shank and the
// support.
func buildOne(x *geom.Index, j *joints.Joint, o *joints.BuildOptions) joints.Connector {
	m := x.Mesh()
	c := joints.Connector{Joint: *j, DOFs: o.BoltDOFsOrDefault(), Diameter: j.Diameter, DiameterSource: "list"}
	c.Bolt = &joints.BoltData{Coupling: o.BoltCoupling, Shank: o.Shank, Ring: o.BoltRing, Support: -1}
	if o.Shank == joints.BeamShank {
		c.Bolt.ShankModulus, c.Bolt.ShankPoisson = o.ShankModulusOrDefault(), joints.DefaultShankPoisson
	}
	listed := map[int32]bool{}
	for _, id := range j.Parts {
		if pi, ok := m.PartIndex(id); ok {
			listed[pi] = true
		}
	}
	keep := func(pi int32) bool { return len(j.Parts) == 0 || listed[pi] }
	l := searchFactor * j.Washer
	radius := math.Hypot(o.Reach, l)
	axis, from, ok := boltAxis(x, j, radius, keep)
	if !ok {
		which := "of any part"
		if len(j.Parts) > 0 {
			ids := make([]string, len(j.Parts))
			for i, id := range j.Parts {
				ids[i] = strconv.FormatInt(id, 10)
			}
			which = "of the listed parts (" + strings.Join(ids, ", ") + ")"
		}
		c.Findings = append(c.Findings, j.Finding(joints.Error, joints.CodeNoSheet, j.Parts,
			fmt.Sprintf("no element %s with a normal (a sheet, or the edge of a hole) lies within %s mm of the bolt's point (the reach, %s mm, along the axis and the washer's diameter, %s mm, across it), so none gives the bolt's axis: give the axis (nx, ny, nz), or a point nearer the sheets",
				which, joints.MM(radius), joints.MM(o.Reach), joints.MM(l))))
		c.Status = joints.NotBuilt
		return c
	}
	f := newFrame(j.Point, axis)
	var nbuf [512]int32
	near := x.ElemsNear(j.Point, radius, nbuf[:0])
	cosTol := math.Cos(o.AngleLimit * math.Pi / 180)
	xs := crossings(m, &f, near, o.Reach, l, cosTol, keep)
	g := alignAxis(m, &f, near, xs, o.Reach, l, cosTol)
	c.Stack.Axis = axis
	for _, cr := range xs {
		s := joints.Sheet{Part: m.Parts[cr.part].ID, Thickness: m.Thickness(cr.elem), EdgeDistance: math.Inf(1)}
		s.Proj = geom.Projection{Elem: cr.elem, Point: cr.point, Dist: math.Abs(cr.t), Normal: cr.normal}
		if cr.loop != nil {
			// A meshed hole: its centre, and how far it lies off the
			// axis through the holes.
			s.Proj.Point, s.Lateral = cr.centre, g.lateral(cr.centre)
		}
		// The mid-surface lies off along the normal from the meshed
		// surface: the axis meets it off / (n . a) along the axis from
		// where it meets the meshed one (|n . a| >= cosTol, as the
		// crossing's normal lies within the angle limit of the axis).
		s.Position = cr.t + m.Parts[cr.part].Surface.MidOffset(s.Thickness)/r3.Dot(cr.normal, axis)
		c.Stack.Sheets = append(c.Stack.Sheets, s)
	}
	order := make([]int, len(xs))
	for i := range order {
		order[i] = i
	}
	slices.SortStableFunc(order, func(a, b int) int {
		sa, sb := c.Stack.Sheets[a], c.Stack.Sheets[b]
		return cmp.Or(cmp.Compare(sa.Position, sb.Position), cmp.Compare(sa.Part, sb.Part))
	})
	sheets := make([]joints.Sheet, len(order))
	sorted := make([]crossing, len(order))
	for k, i := range order {
		sheets[k], sorted[k] = c.Stack.Sheets[i], xs[i]
	}
	c.Stack.Sheets, xs = sheets, sorted
	c.Findings = append(c.Findings, checkSheets(j, &c.Stack, o)...)
	if joints.HasError(c.Findings) {
		c.Status = joints.NotBuilt
		return c
	}
	for i := range xs {
		ring, weights, kind := ringOf(m, near, &xs[i], j.Washer, o.BoltRing)
		c.Ends = append(c.Ends, joints.End{Point: xs[i].point, NodeIndex: -1, Nodes: ring, Weights: weights})
		c.Bolt.Holes = append(c.Bolt.Holes, joints.BoltHole{Diameter: xs[i].hole, Narrowest: xs[i].narrow, Ring: kind})
		part := c.Stack.Sheets[i].Part
		if xs[i].loop == nil {
			// The axis meets the sheet's material: a meshed hole beside
			// it, under the washer, is the hole the bolt was meant for.
			var own []int32
			for _, e := range near {
				if m.ElemPart[e] == xs[i].part {
					own = append(own, e)
				}
			}
			if off, d, ok := holeBeside(m, &g, own, o.Reach, l, j.Washer/2); ok {
				c.Findings = append(c.Findings, j.Finding(joints.Warning, joints.CodeHoleOffCentre, []int64{part},
					fmt.Sprintf("the bolt's axis passes through part %d %s mm from the centre of a hole meshed there (%s mm across), outside the hole: the bolt is built through the sheet at the listed point, not through the hole; correct the point or the axis", part, joints.MM(off), joints.MM(d))))
			}
			continue
		}
		clear := (xs[i].hole - j.Diameter) / 2
		switch off := f.lateral(xs[i].centre); {
		case off > clear+joints.LengthRoundoff && off > offCentreTolerance:
			c.Findings = append(c.Findings, j.Finding(joints.Warning, joints.CodeHoleOffCentre, []int64{part},
				fmt.Sprintf("the bolt's point lies %s mm off the centre of the hole in part %d, more than the %s mm between shank and hole: the listed point or axis is off the hole; the centres are put on the axis through the holes", joints.MM(off), part, joints.MM(max(clear, 0)))))
		case off > offCentreTolerance:
			c.Findings = append(c.Findings, j.Finding(joints.Info, joints.CodeHoleOffCentre, []int64{part},
				fmt.Sprintf("the bolt's point lies %s mm off the centre of the hole in part %d (tolerance %s mm); the centres are put on the axis through the holes", joints.MM(off), part, joints.MM(offCentreTolerance))))
		}
		if mis := c.Stack.Sheets[i].Lateral; mis > clear+joints.LengthRoundoff && mis > offCentreTolerance {
			c.Findings = append(c.Findings, j.Finding(joints.Warning, joints.CodeHolesMisaligned, []int64{part},
				fmt.Sprintf("the centre of the hole in part %d lies %s mm off the axis through the stack's holes, more than the %s mm between shank and hole: a straight shank does not pass through the holes as meshed", part, joints.MM(mis), joints.MM(max(clear, 0)))))
		}
	}
	c.Findings = append(c.Findings, checkSizes(j, &c.Stack, c.Bolt.Holes, o)...)
	c.Findings = append(c.Findings, checkEdges(x, j, &c.Stack, c.Ends, xs)...)
	if joints.HasError(c.Findings) {
		c.Status = joints.NotBuilt
		return c
	}
	var lfs []joints.Finding
	c.Links, lfs = shank(m, j, &c.Stack, c.Ends, o)
	c.Findings = append(c.Findings, lfs...)
	if joints.HasError(lfs) {
		// A shank Joinery will not write (shank-short): no links at all.
		c.Links = nil
		c.Status = joints.NotBuilt
		return c
	}
	if j.Ground {
		c.Bolt.Support, c.Bolt.SupportDOFs = len(c.Ends)-1, c.DOFs
		if from >= 0 {
			p := c.Stack.Sheets[len(c.Stack.Sheets)-1].Part
			c.Findings = append(c.Findings, j.Finding(joints.Info, joints.CodeFixtureSide, []int64{p},
				fmt.Sprintf("the bolt is supported at its centre on part %d, the last along the axis, which is the element normal of part %d at the bolt (%s, %s, %s): the normals' direction chose the fixture's side; give nx,ny,nz pointing toward the fixture to fix it",
					p, m.Parts[from].ID, joints.MM(axis.X), joints.MM(axis.Y), joints.MM(axis.Z))))
		}
	}
	c.SetStatus()
	return c
}

// boltAxis returns the bolt's axis: the one listed, else the normal of
// the nearest sound element of a part keep accepts within radius of
// the point. The radius is the bolt's search radius, the reach along
// the axis and the washer's diameter across it, not the reach alone: in
// a meshed hole the nearest element lies at least the hole's radius
// away, more than the reach of a stack of thin sheets (0.8 and 1 mm
// sheets: 4.5 mm, against 5.5 mm for an M10's 11 mm hole).
// The part index is that of the element, -1 for a listed axis.
func boltAxis(x *geom.Index, j *joints.Joint, radius float64, keep func(pi int32) bool) (r3.Vec, int32, bool) {
	if r3.Norm2(j.Axis) > 0 {
		return r3.Unit(j.Axis), -1, true
	}
	m := x.Mesh()
	for _, pr := range x.ClosestPerPart(j.Point, radius) {
		if pi := m.ElemPart[pr.Elem]; keep(pi) && r3.Norm2(pr.Normal) > 0 && !m.ElemQuality(pr.Elem).Degenerate {
			return pr.Normal, pi, true
		}
	}
	return r3.Vec{}, -1, false
}

// offCentreTolerance, mm: a hole's centre (the circle fitted to its
// corner nodes) farther than this from the bolt's listed axis is reported,
// hole-off-centre (our choice: above points rounded to 0.01 mm, far
// below the half millimetre between an M10's shank and its ISO 273
// fine hole).
const offCentreTolerance = 0.01

// ringSlack, mm, widens the washer's radius when ring nodes are chosen,
// so that nodes meshed exactly on it count whatever the rounding of
// their coordinates (a node at 10 mm may lie at 10.000000000000002):
// symmetric rings stay symmetric (our choice: far above the rounding of
// coordinates in double precision, far below any element).
const ringSlack = 1e-4

// ringOf returns the nodes a sheet's centre couples, their weights and
// the kind of ring: with a hole, its edge nodes weighted by the arc
// length each stands for (half of each edge beside it), or, with
// WasherRing, those and every node of the part within the washer's
// radius of the centre; without a hole, the nodes of the part within
// the washer's radius and the host element's nodes. The weights sum to
// 1 and their weighted mean of the nodes is the centre in the sheet's
// plane: the arc-length weights corrected as little as that takes, the
// others the most uniform such weights (joints.EvenWeights); where the
// nodes do not span the plane, the arc-length or equal weights.
// Nodes of the part count when within the washer's radius of the
// centre in the sheet's plane and off that plane by at most the radius,
// ringSlack included (inFootprint). Nodes come in increasing index
// order.
func ringOf(m *geom.Mesh, near []int32, cr *crossing, washer float64, ring joints.BoltRing) ([]int32, []float64, string) {
	if cr.loop != nil && ring == joints.HoleRing {
		n := len(cr.loop)
		lens := make([]float64, n)
		total := 0.0
		for i := range n {
			lens[i] = r3.Norm(r3.Sub(m.Coords[cr.loop[(i+1)%n]], m.Coords[cr.loop[i]]))
			total += lens[i]
		}
		idx := make([]int, n)
		for i := range idx {
			idx[i] = i
		}
		slices.SortFunc(idx, func(a, b int) int { return cmp.Compare(cr.loop[a], cr.loop[b]) })
		nodes := make([]int32, n)
		ws := make([]float64, n)
		for k, i := range idx {
			nodes[k] = cr.loop[i]
			ws[k] = (lens[i] + lens[(i+n-1)%n]) / (2 * total)
		}
		if w, ok := joints.EvenWeights(m, nodes, cr.point, cr.normal, ws); ok {
			ws = w
		}
		return nodes, ws, "hole"
	}
	set := map[int32]bool{}
	for _, n := range cr.loop {
		set[n] = true
	}
	if cr.loop == nil {
		for _, n := range m.ElemNodes(cr.elem) {
			set[n] = true
		}
	}
	r := washer/2 + ringSlack
	// The washer seats on the sheet: its footprint is the disc of its
	// radius in the sheet's plane about the centre (the plane tangent to
	// the sheet at the host element, normal nu), whatever the axis's
	// tilt to it; measured square to the axis, the disc would be an
	// ellipse on a tilted sheet, 1 / cos of the tilt longer one way.
	nu := r3.Unit(cr.normal)
	for _, e := range near {
		if m.ElemPart[e] != cr.part {
			continue
		}
		for _, n := range m.ElemNodes(int(e)) {
			if inFootprint(m.Coords[n], cr.point, nu, r) {
				set[n] = true
			}
		}
	}
	nodes := make([]int32, 0, len(set))
	for n := range set {
		nodes = append(nodes, n)
	}
	slices.Sort(nodes)
	ws, ok := joints.EvenWeights(m, nodes, cr.point, cr.normal, nil)
	if !ok {
		ws = make([]float64, len(nodes))
		for i := range ws {
			ws[i] = 1 / float64(len(nodes))
		}
	}
	kind := "patch"
	if cr.loop != nil {
		kind = "washer"
	}
	return nodes, ws, kind
}

// inFootprint reports whether q lies within radius r of centre in the
// plane square to the unit normal n (the sheet's plane) and off that
// plane by at most r (a curved or folded sheet's nodes far from the
// washer's seat stay out).
func inFootprint(q, centre, n r3.Vec, r float64) bool {
	d := r3.Sub(q, centre)
	h := r3.Dot(d, n)
	return math.Abs(h) <= r && r3.Norm(r3.Sub(d, r3.Scale(h, n))) <= r
}
