package bolt

import (
	"cmp"
	"math"
	"slices"

	"gonum.org/v1/gonum/mat"
	"gonum.org/v1/gonum/spatial/r3"

	"github.com/joinery-cae/joinery/geom"
	"github.com/joinery-cae/joinery/joints"
)

// frame is a bolt's axis: the line through P along the unit vector A,
// with U and V square to A and to each other.
type frame struct {
	P, A, U, V r3.Vec
}

func newFrame(p, a r3.Vec) frame {
	// Any vector not parallel to a gives u; the axis least aligned with a
	// keeps it well conditioned.
	ref := r3.Vec{X: 1}
	if math.Abs(a.X) > 0.6 {
		ref = r3.Vec{Y: 1}
	}
	u := r3.Unit(r3.Cross(a, ref))
	return frame{P: p, A: a, U: u, V: r3.Cross(a, u)}
}

// along returns q's coordinate along the axis from P, mm.
func (f *frame) along(q r3.Vec) float64 { return r3.Dot(r3.Sub(q, f.P), f.A) }

// lateral returns q's distance from the axis, mm.
func (f *frame) lateral(q r3.Vec) float64 { return joints.Across(r3.Sub(q, f.P), f.A) }

// plane returns q's coordinates in the plane square to the axis.
func (f *frame) plane(q r3.Vec) (float64, float64) {
	d := r3.Sub(q, f.P)
	return r3.Dot(d, f.U), r3.Dot(d, f.V)
}

// at returns the point of the axis at coordinate t.
func (f *frame) at(t float64) r3.Vec { return r3.Add(f.P, r3.Scale(t, f.A)) }

// crossesBox reports whether the axis, within reach of P, passes
// through box b grown by boxSlack and boxGrowth of its size (the slab
// test): only then can it cross the element the box holds.
func (f *frame) crossesBox(b r3.Box, reach float64) bool {
	lo, hi := -reach, reach
	p := [3]float64{f.P.X, f.P.Y, f.P.Z}
	a := [3]float64{f.A.X, f.A.Y, f.A.Z}
	d := r3.Sub(b.Max, b.Min)
	g := boxSlack + boxGrowth*max(d.X, d.Y, d.Z)
	bl := [3]float64{b.Min.X - g, b.Min.Y - g, b.Min.Z - g}
	bh := [3]float64{b.Max.X + g, b.Max.Y + g, b.Max.Z + g}
	for i := range 3 {
		if a[i] == 0 {
			if p[i] < bl[i] || p[i] > bh[i] {
				return false
			}
			continue
		}
		t0, t1 := (bl[i]-p[i])/a[i], (bh[i]-p[i])/a[i]
		if t0 > t1 {
			t0, t1 = t1, t0
		}
		lo, hi = max(lo, t0), min(hi, t1)
		if lo > hi {
			return false
		}
	}
	return true
}

// boxSlack, mm, grows element boxes for the slab test: far above the
// hit tolerance, so that no crossing within it is missed (our choice).
const boxSlack = 1e-3

// boxGrowth of an element box's largest side grows it further for the
// slab test: a second-order element's curved surface may bulge a little
// outside the box of its nodes (our choice: a tenth of the element, far
// more than any usable element bulges).
const boxGrowth = 0.1

// crossing is where the axis meets one part.
type crossing struct {
	part  int32 // part index
	elem  int   // host element
	t     float64
	point r3.Vec // on the meshed surface (in a hole, its plane), on the axis
	// centre is a meshed hole's centre, the circle fitted to its corner
	// nodes (second-order edges' midside nodes left out): on the axis as
	// the list gives it, off the axis fitted through the holes by the
	// holes' misalignment (alignAxis).
	centre r3.Vec
	// normal is the host element's normal at the point.
	normal r3.Vec
	// loop holds the hole's edge nodes in order round it (second-order
	// edges' midside nodes between their corners); nil when the
	// axis meets an element (no hole meshed there).
	loop []int32
	hole float64 // measured hole diameter (the fitted circle's), mm; 0 without a hole
	// narrow is the hole's least width through its centre as meshed:
	// twice the least distance of its corner nodes from the centre in
	// the sheet's plane, mm; 0 without a hole.
	narrow float64
}

// hitTolerance, mm, is how close the projection of an axis point onto
// an element must come for the axis to count as crossing it (our
// choice: far below any element, far above the rounding of the Newton
// steps below).
const hitTolerance = 1e-6

// hitElement returns where the axis crosses element e, if it does
// within reach: Newton steps along the axis on the element's tangent
// plane, then the projection must land on the axis.
func hitElement(m *geom.Mesh, f *frame, e int, reach float64) (geom.Projection, float64, bool) {
	n := m.Normal(e)
	dn := r3.Dot(f.A, n)
	if r3.Norm2(n) == 0 || math.Abs(dn) < 1e-9 {
		return geom.Projection{}, 0, false
	}
	c0 := m.Coords[m.ElemNodes(e)[0]]
	t := r3.Dot(r3.Sub(c0, f.P), n) / dn
	var pr geom.Projection
	for range 4 {
		q := f.at(t)
		pr = m.Project(e, q)
		d := r3.Dot(f.A, pr.Normal)
		if math.Abs(d) < 1e-9 {
			return pr, 0, false
		}
		off := pr.Offset(q)
		if math.Abs(off) < hitTolerance/10 {
			break
		}
		t -= off / d
	}
	if math.Abs(t) > reach {
		return pr, 0, false
	}
	q := f.at(t)
	pr = m.Project(e, q)
	if pr.Dist > hitTolerance*math.Max(1, math.Abs(t)) {
		return pr, 0, false
	}
	return pr, t, true
}

// crossings returns, per part with elements in near (indices of the
// elements within the search radius of the bolt point), where the axis
// meets it: the element it crosses nearest the bolt point, else the
// hole whose free-edge loop encloses the axis, nearest the bolt point.
// Only elements whose normals lie within cosTol of the axis count, and
// only parts keep(part index) accepts. Free edges count only with both
// nodes within radius l of the axis and reach of the point along it: as
// their elements lie within the search radius then, the near elements
// tell which edges are free. Parts come in the order of their ids.
func crossings(m *geom.Mesh, f *frame, near []int32, reach, l, cosTol float64, keep func(pi int32) bool) []crossing {
	byPart := map[int32][]int32{}
	for _, e := range near {
		pi := m.ElemPart[e]
		if keep(pi) {
			byPart[pi] = append(byPart[pi], e)
		}
	}
	parts := make([]int32, 0, len(byPart))
	for pi := range byPart {
		parts = append(parts, pi)
	}
	slices.SortFunc(parts, func(a, b int32) int { return cmp.Compare(m.Parts[a].ID, m.Parts[b].ID) })
	var out []crossing
	for _, pi := range parts {
		elems := byPart[pi]
		best, found := crossing{}, false
		for _, e := range elems {
			if !f.crossesBox(m.ElemBox(int(e)), reach) {
				continue
			}
			n := m.Normal(int(e))
			if math.Abs(r3.Dot(n, f.A)) < cosTol {
				continue
			}
			pr, t, ok := hitElement(m, f, int(e), reach)
			if !ok {
				continue
			}
			if !found || math.Abs(t) < math.Abs(best.t) || math.Abs(t) == math.Abs(best.t) && m.ElemIDs[e] < m.ElemIDs[best.elem] {
				best, found = crossing{part: pi, elem: int(e), t: t, point: f.at(t), normal: pr.Normal}, true
			}
		}
		if !found {
			best, found = holeCrossing(m, f, pi, elems, reach, l, cosTol)
		}
		if found {
			out = append(out, best)
		}
	}
	return out
}

// edgeLoop is a closed loop of free edges of one part.
type edgeLoop struct {
	// nodes are the loop's nodes in order round it, a second-order
	// edge's midside node between its corners; corners leaves the
	// midside nodes out.
	nodes, corners []int32
	host           int32 // the loop's element of lowest id
}

// freeLoops returns the closed free-edge loops among the elements elems
// of one part whose edges have both ends within l of the axis and reach
// of the point along it, in the order of their edges' lowest nodes.
func freeLoops(m *geom.Mesh, f *frame, elems []int32, reach, l float64) []edgeLoop {
	type edge struct {
		a, b int32
		mid  int32 // the midside node of a second-order element's edge, -1 without
		elem int32
	}
	uses := map[[2]int32]int{}
	var all []edge
	for _, e := range elems {
		for k := range m.Type(int(e)).Corners() {
			ed := m.ElemEdge(int(e), k)
			key := [2]int32{min(ed.A, ed.B), max(ed.A, ed.B)}
			uses[key]++
			all = append(all, edge{ed.A, ed.B, ed.Mid, e})
		}
	}
	inside := func(n int32) bool {
		q := m.Coords[n]
		return f.lateral(q) <= l && math.Abs(f.along(q)) <= reach
	}
	var free []edge
	for _, ed := range all {
		if uses[[2]int32{min(ed.a, ed.b), max(ed.a, ed.b)}] == 1 && inside(ed.a) && inside(ed.b) {
			free = append(free, ed)
		}
	}
	if len(free) < 3 {
		return nil
	}
	slices.SortFunc(free, func(x, y edge) int { return cmp.Or(cmp.Compare(x.a, y.a), cmp.Compare(x.b, y.b)) })
	at := map[int32][]int{} // node -> free edges using it
	for i, ed := range free {
		at[ed.a] = append(at[ed.a], i)
		at[ed.b] = append(at[ed.b], i)
	}
	used := make([]bool, len(free))
	var out []edgeLoop
	for s := range free {
		if used[s] {
			continue
		}
		// Walk from edge s; a node with other than two free edges ends
		// the walk without a loop. The midside node of a second-order
		// edge joins the loop between the edge's corners: it lies on
		// the hole's edge as they do.
		loop, corners := []int32{free[s].a}, []int32{free[s].a}
		if free[s].mid >= 0 {
			loop = append(loop, free[s].mid)
		}
		hosts := []int32{free[s].elem}
		used[s] = true
		cur, node, closed := s, free[s].b, false
		for {
			if node == loop[0] {
				closed = true
				break
			}
			es := at[node]
			if len(es) != 2 {
				break
			}
			next := es[0]
			if next == cur {
				next = es[1]
			}
			if used[next] {
				break
			}
			used[next] = true
			loop, corners = append(loop, node), append(corners, node)
			if free[next].mid >= 0 {
				loop = append(loop, free[next].mid)
			}
			hosts = append(hosts, free[next].elem)
			cur = next
			if free[next].a == node {
				node = free[next].b
			} else {
				node = free[next].a
			}
		}
		if !closed || len(loop) < 3 {
			continue
		}
		host := slices.MinFunc(hosts, func(a, b int32) int { return cmp.Compare(m.ElemIDs[a], m.ElemIDs[b]) })
		out = append(out, edgeLoop{nodes: loop, corners: corners, host: host})
	}
	return out
}

// holeCircle returns the circle of a hole's loop in the plane square to
// normal n: centre and radius fitted to its corners.
//
// The hole is measured on its corners, the nodes a first- and a
// second-order mesh of it share: a midside node lies on the hole's edge
// only where the mesher curved the element's edge, and on the chord
// where it did not (straight-sided elements), which would read a hole
// of the same corners smaller and off centre. Fewer than three corners:
// every edge node. Edge nodes on a line: the mean distance from the
// axis of f, where it crosses their mean plane. It also returns the
// nodes the circle was fitted to.
func holeCircle(m *geom.Mesh, f *frame, lp *edgeLoop, n r3.Vec) (r3.Vec, float64, []int32) {
	fit := lp.corners
	if len(fit) < 3 {
		fit = lp.nodes
	}
	centre, r, ok := fitCircle(m, fit, n)
	if !ok {
		var t float64
		for _, nd := range fit {
			t += f.along(m.Coords[nd])
			r += f.lateral(m.Coords[nd])
		}
		t /= float64(len(fit))
		r /= float64(len(fit))
		centre = f.at(t)
	}
	return centre, r, fit
}

// holeCrossing finds the hole of part pi round the axis among its
// elements elems: the closed free-edge loop, within l of the axis and
// reach along it, that winds round the axis, nearest the bolt point
// along it; of two such loops in one sheet (a small part whose outer
// edge also lies within l), the inner one.
func holeCrossing(m *geom.Mesh, f *frame, pi int32, elems []int32, reach, l, cosTol float64) (crossing, bool) {
	best, found := crossing{}, false
	for _, lp := range freeLoops(m, f, elems, reach, l) {
		if !winds(m, f, lp.nodes) {
			continue
		}
		host, loop := lp.host, lp.nodes
		n := m.Normal(int(host))
		if math.Abs(r3.Dot(n, f.A)) < cosTol {
			continue
		}
		centre, r, fit := holeCircle(m, f, &lp, n)
		t := f.along(centre)
		c := crossing{part: pi, elem: int(host), t: t, point: centre, centre: centre, normal: n, loop: loop, hole: 2 * r, narrow: narrowest(m, fit, centre, n)}
		// Of two loops in one sheet (within its thickness along the
		// axis), the inner is the hole, the outer the sheet's edge; of
		// loops apart along the axis, the one nearer the bolt point.
		switch {
		case !found:
			best, found = c, true
		case math.Abs(t-best.t) <= m.Thickness(int(host)):
			if c.hole < best.hole {
				best = c
			}
		case math.Abs(t) < math.Abs(best.t):
			best = c
		}
	}
	return best, found
}

// holeBeside returns the meshed hole of part pi, among its elements
// elems, that lies beside the axis instead of round it: of the closed
// free-edge loops within l of the axis and reach along it that do not
// wind round it, the one whose centre lies nearest the axis, if within
// r of it (the washer's radius: the washer would seat over it). It
// returns the centre's distance from the axis and the hole's diameter.
func holeBeside(m *geom.Mesh, f *frame, elems []int32, reach, l, r float64) (float64, float64, bool) {
	best, dia, found := 0.0, 0.0, false
	for _, lp := range freeLoops(m, f, elems, reach, l) {
		if winds(m, f, lp.nodes) {
			continue
		}
		n := m.Normal(int(lp.host))
		if r3.Norm2(n) == 0 {
			continue
		}
		centre, rad, _ := holeCircle(m, f, &lp, n)
		if d := f.lateral(centre); d <= r+joints.LengthRoundoff && (!found || d < best) {
			best, dia, found = d, 2*rad, true
		}
	}
	return best, dia, found
}

// narrowest returns twice the least distance of the nodes of loop (a
// hole's corner nodes) from centre in the plane square to normal, mm:
// the width of the hole through its centre where it is narrowest, as
// far as its corners tell (they lie on the hole's edge; the chords
// between them cut inside it, by an amount that depends on the mesh,
// not on the hole). On a circle it is the diameter; on an oval its
// lesser axis, where corners lie at its ends.
func narrowest(m *geom.Mesh, loop []int32, centre, normal r3.Vec) float64 {
	n := r3.Unit(normal)
	least := math.Inf(1)
	for _, nd := range loop {
		d := r3.Sub(m.Coords[nd], centre)
		least = math.Min(least, r3.Norm(r3.Sub(d, r3.Scale(r3.Dot(d, n), n))))
	}
	return 2 * least
}

// winds reports whether a closed loop of nodes winds round the axis:
// the sum of the angles it turns through seen along the axis is a whole
// turn or more.
func winds(m *geom.Mesh, f *frame, loop []int32) bool {
	sum := 0.0
	x0, y0 := f.plane(m.Coords[loop[len(loop)-1]])
	for _, n := range loop {
		x1, y1 := f.plane(m.Coords[n])
		sum += math.Atan2(x0*y1-y0*x1, x0*x1+y0*y1)
		x0, y0 = x1, y1
	}
	return math.Abs(sum) > math.Pi
}

// fitCircle returns the circle that fits a hole's nodes (its corners) best in
// the plane through their mean square to normal: the algebraic least
// squares fit x^2 + y^2 + D x + E y + F = 0 (I. Kasa, A circle fitting
// procedure and its error analysis, IEEE Trans. Instrum. Meas. 25,
// 1976), exact for nodes on a circle, centre (-D/2, -E/2), radius
// sqrt(D^2/4 + E^2/4 - F). False when the nodes do not span the plane.
func fitCircle(m *geom.Mesh, loop []int32, normal r3.Vec) (r3.Vec, float64, bool) {
	if len(loop) < 3 || r3.Norm2(normal) == 0 {
		return r3.Vec{}, 0, false
	}
	var mean r3.Vec
	for _, n := range loop {
		mean = r3.Add(mean, m.Coords[n])
	}
	mean = r3.Scale(1/float64(len(loop)), mean)
	pl := newFrame(mean, r3.Unit(normal))
	a := mat.NewDense(len(loop), 3, nil)
	b := mat.NewVecDense(len(loop), nil)
	for i, n := range loop {
		x, y := pl.plane(m.Coords[n])
		a.Set(i, 0, x)
		a.Set(i, 1, y)
		a.Set(i, 2, 1)
		b.SetVec(i, -(x*x + y*y))
	}
	var qr mat.QR
	qr.Factorize(a)
	if c := qr.Cond(); math.IsInf(c, 1) || c > 1e12 {
		return r3.Vec{}, 0, false
	}
	var s mat.VecDense
	if err := qr.SolveVecTo(&s, false, b); err != nil {
		return r3.Vec{}, 0, false
	}
	d, e, f := s.AtVec(0), s.AtVec(1), s.AtVec(2)
	r2 := (d*d+e*e)/4 - f
	if !(r2 > 0) {
		return r3.Vec{}, 0, false
	}
	centre := r3.Add(mean, r3.Add(r3.Scale(-d/2, pl.U), r3.Scale(-e/2, pl.V)))
	return centre, math.Sqrt(r2), true
}
