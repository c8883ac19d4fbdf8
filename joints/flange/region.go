package flange

import (
	"math"
	"slices"

	"gonum.org/v1/gonum/spatial/r3"

	"github.com/joinery-cae/joinery/geom"
)

// pairWork holds the contact of one pair of parts, traced on the host's
// mesh.
type pairWork struct {
	c           *geom.Contacts
	m           *geom.Mesh
	host, other int32               // part indices
	recs        []*geom.NodeContact // the host's nodes in contact, by node
	elems       []int32             // region elements: host elements paired with other that use a node in contact
	cross       map[vkey]r3.Vec     // crossing points of the overlap's edge on element edges
	bisect      int                 // bisection steps for crossings
	facing      []geom.FacingPair   // the pair's facing node pairs
	outlines    []*outline          // aligned with the flanges returned
	// recOf[n] is 1 + the index in recs of node n's record, 0 for a node
	// not in contact: a worker's table over all nodes, filled for the
	// pair at hand and cleared after it (clearRecs).
	recOf []int32
	probe geom.ProbeScratch
}

// indexRecs fills recOf (of the mesh's node count, all zero) for the
// pair's records.
func (w *pairWork) indexRecs(recOf []int32) {
	w.recOf = recOf
	for i, r := range w.recs {
		recOf[r.Node] = int32(i + 1)
	}
}

// clearRecs sets recOf back to zero, for the worker's next pair.
func (w *pairWork) clearRecs() {
	for _, r := range w.recs {
		w.recOf[r.Node] = 0
	}
}

// vkey names a vertex of the overlap's outline: a node (b = -1) or the
// crossing point on the element edge between nodes a < b.
type vkey struct{ a, b int32 }

// rec returns the host's record of node n, nil when n is not in contact.
func (w *pairWork) rec(n int32) *geom.NodeContact {
	if i := w.recOf[n]; i > 0 {
		return w.recs[i-1]
	}
	return nil
}

// isRegion reports whether element e is a region element.
func (w *pairWork) isRegion(e int32) bool {
	_, ok := slices.BinarySearch(w.elems, e)
	return ok
}

// collectElems fills w.elems.
func (w *pairWork) collectElems() {
	var es []int32
	for _, r := range w.recs {
		for _, e := range w.c.NodeElems(r.Node) {
			if w.m.ElemPart[e] == w.host && len(w.c.PartnersIn(e, w.other)) > 0 {
				es = append(es, e)
			}
		}
	}
	slices.Sort(es)
	w.elems = slices.Compact(es)
}

// components splits the region elements into connected overlaps:
// elements that share a node in contact belong together. Components come
// in order of their smallest element.
func (w *pairWork) components() [][]int32 {
	parent := make([]int32, len(w.elems))
	for i := range parent {
		parent[i] = int32(i)
	}
	find := func(i int32) int32 {
		for parent[i] != i {
			parent[i] = parent[parent[i]]
			i = parent[i]
		}
		return i
	}
	for _, r := range w.recs {
		first := int32(-1)
		for _, e := range w.c.NodeElems(r.Node) {
			i, ok := slices.BinarySearch(w.elems, e)
			if !ok {
				continue
			}
			if first < 0 {
				first = int32(i)
				continue
			}
			a, b := find(first), find(int32(i))
			if a != b {
				parent[max(a, b)] = min(a, b)
			}
		}
	}
	groups := map[int32][]int32{}
	var roots []int32
	for i := range w.elems {
		r := find(int32(i))
		if _, ok := groups[r]; !ok {
			roots = append(roots, r)
		}
		groups[r] = append(groups[r], w.elems[i])
	}
	slices.Sort(roots)
	out := make([][]int32, len(roots))
	for k, r := range roots {
		out[k] = groups[r]
	}
	return out
}

// crossing returns the point on element edge u-w (u in contact, w not)
// where the overlap ends, found by bisection with the contact test on
// element e; points are cached per edge, so neighbouring elements share
// them.
func (w *pairWork) crossing(e, u, v int32) r3.Vec {
	key := vkey{min(u, v), max(u, v)}
	if p, ok := w.cross[key]; ok {
		return p
	}
	p := w.boundary(e, w.m.Coords[u], w.m.Coords[v], w.bisect, crossingTol)
	w.cross[key] = p
	return p
}

// boundary returns the last point in contact on the segment from a (in
// contact, on element e) to b (out of it), where the overlap ends, found
// in at most steps probes to a bracket of tol, mm.
func (w *pairWork) boundary(e int32, a, b r3.Vec, steps int, tol float64) r3.Vec {
	at := func(t float64) r3.Vec { return r3.Add(a, r3.Scale(t, r3.Sub(b, a))) }
	l := r3.Norm(r3.Sub(b, a))
	// The contact margin (not above 0 in contact) grows about linearly
	// on the far side of the edge of the contact: the distance beside a
	// straight free edge, or the gap's growing deviation from contact.
	// So secant steps from the far end find the edge in two or three
	// probes; bisection takes over when they do not close in (the margin
	// jumps where the normals stop being near-parallel). u is in
	// contact: its margin is taken as 0.
	// Without the probe just beyond a prediction that landed in contact,
	// the bracket would shrink from inside by the clamp's 1/64 a step,
	// and the edge be found up to a few tenths of a mm short.
	lo, hi := 0.0, 1.0
	rh, _ := w.c.ProbeWith(&w.probe, b, e, w.other)
	fh := rh.Margin
	t0, f0 := -1.0, 0.0 // a second point beyond the edge, for the secant
	const (
		predict  = iota // a secant or linear step from beyond the edge
		overstep        // just beyond a predicted step that landed in contact
		halve           // bisection
	)
	mode := predict
	// Predictions aim a quarter of the bracket inside the edge, and the
	// probe after one half of it further: both land well clear of the
	// edge itself, where rounding would decide in or out (and the result
	// would differ between units or with the model's position).
	aim := tol / 4
	for range steps {
		if (hi-lo)*l < tol {
			break
		}
		var t float64
		switch {
		case mode == overstep:
			t = min(lo+tol/(2*l), (lo+hi)/2)
		case mode == halve || fh >= 1:
			t = (lo + hi) / 2
		case t0 > hi && f0 > fh:
			t = hi - (fh+aim)*(t0-hi)/(f0-fh) // secant through two points beyond
		default:
			t = hi - (fh+aim)/l // as if the margin grew one for one
		}
		if mode == predict {
			t = min(max(t, lo+(hi-lo)/64), hi-(hi-lo)/64)
		}
		r, in := w.c.ProbeWith(&w.probe, at(t), e, w.other)
		if in {
			lo = t
			// A prediction that landed in contact found the edge to its
			// own accuracy: the next probe goes just beyond, which
			// closes the bracket when it was good. When that one lands in
			// contact too, the prediction fell short: bisect.
			switch mode {
			case predict:
				mode = overstep
			case overstep:
				mode = halve
			}
			continue
		}
		t0, f0 = hi, fh
		hi, fh = t, r.Margin
		mode = predict
	}
	return at(lo) // the last point found in contact
}

// sample is a piece of the overlap: the covered part of one host
// element.
type sample struct {
	elem int32
	pos  r3.Vec // centroid, moved to the faying surface
	// shift is how far the faying surface lies from the host element
	// along its normal (see faying in drape.go).
	shift  float64
	area   float64
	normal r3.Vec // the host element's normal
	// up is normal turned to one side of the sheet over the whole
	// overlap (orient).
	up    r3.Vec
	nodes []int32
}

// segment is a piece of the overlap's outline.
type segment struct {
	a, b   vkey
	pa, pb r3.Vec
	elem   int32 // the host element it bounds
}

// trace clips the elements of one component to the overlap and returns
// the pieces and the outline segments.
func (w *pairWork) trace(comp []int32) ([]sample, []segment) {
	m := w.m
	var (
		samples []sample
		segs    []segment
	)
	type vert struct {
		key  vkey
		p    r3.Vec
		edge int // the element edge the vertex lies on (crossings), or -1 for corners
		k    int // corner index for corners
		// corner: a vertex put back into a cut (edge cornerVertex) that
		// stands in the outline.
		corner bool
	}
	var verts, lineBuf []vert
	// How many elements of the component use each element edge: an edge
	// used once bounds the overlap (an edge with a node in contact is
	// shared only with elements of the same component).
	edges := make([]uint64, 0, 4*len(comp))
	// Every element of comp gives at most one sample, with its nodes in
	// contact (at most 4) in one shared array.
	samples = make([]sample, 0, len(comp))
	inBuf := make([]int32, 0, 4*len(comp))
	for _, e := range comp {
		nodes := m.ElemNodes(int(e))
		nc := m.Type(int(e)).Corners()
		for k := range nc {
			u, v := nodes[k], nodes[(k+1)%nc]
			edges = append(edges, edgeKey(u, v))
		}
	}
	slices.Sort(edges)
	for _, e := range comp {
		nodes := m.ElemNodes(int(e))
		nc := m.Type(int(e)).Corners()
		var cov [4]bool
		for k := range nc {
			cov[k] = w.rec(nodes[k]) != nil
		}
		verts = verts[:0]
		for k := range nc {
			u, v := nodes[k], nodes[(k+1)%nc]
			if cov[k] {
				verts = append(verts, vert{key: vkey{u, -1}, p: m.Coords[u], edge: -1, k: k})
			}
			if cov[k] != cov[(k+1)%nc] {
				in, out := u, v
				if !cov[k] {
					in, out = v, u
				}
				verts = append(verts, vert{key: vkey{min(u, v), max(u, v)}, p: w.crossing(e, in, out), edge: k, k: -1})
			}
		}
		if len(verts) < 3 {
			continue
		}
		// The polygon's normal, from the corners and crossings (it keeps
		// its direction as corners are put back below).
		var nrm r3.Vec
		for i := 1; i+1 < len(verts); i++ {
			nrm = r3.Add(nrm, r3.Cross(r3.Sub(verts[i].p, verts[0].p), r3.Sub(verts[i+1].p, verts[0].p)))
		}
		// A cut between two crossings is straight; where the overlap's
		// edge turns inside the element (the other sheet's corner, or
		// the inner corner of an L-shaped overlap) the corner is put
		// back between them. A polygon without area (an element that
		// touches the overlap along an edge) is left as it is.
		flat := r3.Norm2(nrm) == 0
		if !flat {
			nrm = r3.Unit(nrm)
		}
		for i := 0; i < len(verts) && !flat; i++ {
			a, b := verts[i], verts[(i+1)%len(verts)]
			if a.edge < 0 || b.edge < 0 {
				continue
			}
			pts := w.refineCut(e, nodes[:nc], cov[:nc], nrm, a.p, b.p, cutDepth, nil)
			if len(pts) == 0 {
				continue
			}
			// A corner stands in the outline when it lies well off the
			// cut; points a little off it (where a crossing, located to
			// a bracket, lies a little inside the edge) only mend the
			// area.
			off, left := 0.0, r3.Unit(r3.Cross(nrm, r3.Sub(b.p, a.p)))
			for _, q := range pts {
				off = math.Max(off, math.Abs(r3.Dot(r3.Sub(q, a.p), left)))
			}
			corner := off > cornerOff*m.ElemSize(int(e))
			ins := make([]vert, len(pts))
			for k, q := range pts {
				ins[k] = vert{key: vkey{-3 - e, int32(i*cutPoints + k)}, p: q, edge: cornerVertex, k: -1, corner: corner}
			}
			verts = slices.Insert(verts, i+1, ins...)
			i += len(ins)
		}
		// Outline: cuts through the element, and the element's edges
		// that no other region element shares.
		line := lineBuf[:0]
		for _, v := range verts {
			if v.edge != cornerVertex || v.corner {
				line = append(line, v)
			}
		}
		lineBuf = line
		for i := range line {
			a, b := line[i], line[(i+1)%len(line)]
			onEdge := -1
			switch {
			case a.edge >= 0 && b.edge >= 0, a.edge == cornerVertex || b.edge == cornerVertex:
				segs = append(segs, segment{a.key, b.key, a.p, b.p, e}) // a cut
				continue
			case a.edge < 0 && b.edge < 0:
				onEdge = a.k // corner k to corner k+1
			case a.edge < 0:
				onEdge = a.k // corner k to the crossing on edge k
			default:
				onEdge = a.edge // crossing on edge k to corner k+1
			}
			if u, v := nodes[onEdge], nodes[(onEdge+1)%nc]; edgeUses(edges, edgeKey(u, v)) == 1 {
				segs = append(segs, segment{a.key, b.key, a.p, b.p, e})
			}
		}
		// Area and centroid by a fan from the first vertex, signed
		// along the polygon's normal: a corner put back may make the
		// polygon concave.
		var (
			area float64
			cen  r3.Vec
		)
		for i := 1; i+1 < len(verts); i++ {
			t := r3.Cross(r3.Sub(verts[i].p, verts[0].p), r3.Sub(verts[i+1].p, verts[0].p))
			ta := r3.Dot(t, nrm) / 2
			area += ta
			cen = r3.Add(cen, r3.Scale(ta/3, r3.Add(verts[0].p, r3.Add(verts[i].p, verts[i+1].p))))
		}
		if !(area > 1e-9*m.Area(int(e))) {
			continue
		}
		cen = r3.Scale(1/area, cen)
		// Move to the faying surface by the mean offset of the element's
		// nodes in contact.
		var off r3.Vec
		cnt := 0
		in := inBuf[len(inBuf):len(inBuf)]
		for k := range nc {
			if r := w.rec(nodes[k]); r != nil {
				off = r3.Add(off, r3.Sub(r.Faying, m.Coords[nodes[k]]))
				cnt++
				in = append(in, nodes[k])
			}
		}
		inBuf = inBuf[:len(inBuf)+len(in)]
		in = in[:len(in):len(in)]
		shift := w.shift(e, cen, in)
		cen = r3.Add(cen, r3.Scale(1/float64(cnt), off))
		samples = append(samples, sample{elem: e, pos: cen, shift: shift, area: area, normal: w.c.Normal(e), nodes: in})
	}
	return samples, segs
}

// Corners put back into cuts (refineCut): a vertex so put back has edge
// cornerVertex; a cut is split at most cutDepth times over, so that it
// gains at most cutPoints vertices.
const (
	cornerVertex = -2
	cutDepth     = 4
	cutPoints    = 1<<cutDepth - 1
	// cornerSteps bounds the probes that find a corner put back: the
	// contact margin does not grow linearly round a corner, so the
	// secant steps of boundary do not close in as on a straight edge.
	cornerSteps = 40
	// cornerOff, times the element size, is how far off its cut a
	// corner put back must lie to stand in the outline.
	cornerOff = 0.1
)

// refineCut returns the points to put between crossings a and b of
// element e (its corner nodes and whether each is in contact, the
// polygon's normal nrm; the overlap lies to the left of a->b) where the
// overlap's edge does not run straight from a to b: when the mid-point of
// the cut is out of contact the edge turns into the overlap (its corner
// lies between the mid-point and a node in contact), when a point just
// beyond it is in contact the edge bulges out (towards a node out of
// contact). The corner found is put in, and each half refined again, at
// most depth times; on a straight edge it takes two probes.
func (w *pairWork) refineCut(e int32, nodes []int32, cov []bool, nrm, a, b r3.Vec, depth int, out []r3.Vec) []r3.Vec {
	if depth == 0 {
		return out
	}
	d := r3.Sub(b, a)
	l := math.Sqrt(r3.Norm2(d))
	if l < 4*crossingTol {
		return out
	}
	left := r3.Unit(r3.Cross(nrm, d))
	mid := r3.Add(a, r3.Scale(0.5, d))
	probe := func(q r3.Vec) bool {
		_, in := w.c.ProbeWith(&w.probe, q, e, w.other)
		return in
	}
	// The node, in contact (toward the overlap) or not, seen from mid
	// most nearly along dir.
	towards := func(dir r3.Vec, in bool) (r3.Vec, bool) {
		best, bc := r3.Vec{}, 0.0
		for k, n := range nodes {
			if cov[k] != in {
				continue
			}
			v := r3.Sub(w.m.Coords[n], mid)
			if nv := math.Sqrt(r3.Norm2(v)); nv > 0 {
				if c := r3.Dot(v, dir) / nv; c > bc {
					best, bc = w.m.Coords[n], c
				}
			}
		}
		return best, bc > 0
	}
	step := 2 * crossingTol
	var inside, outside r3.Vec
	if probe(mid) {
		if !probe(r3.Sub(mid, r3.Scale(step, left))) {
			return out // the edge runs along the cut
		}
		u, ok := towards(r3.Scale(-1, left), false)
		if !ok {
			return out
		}
		inside, outside = mid, u
	} else {
		if probe(r3.Add(mid, r3.Scale(step, left))) {
			return out
		}
		v, ok := towards(left, true)
		if !ok {
			return out
		}
		inside, outside = v, mid
	}
	c := w.boundary(e, inside, outside, cornerSteps, crossingTol/100)
	// Off the cut by less than the crossings' own bracket: nothing to
	// put back.
	if off := math.Abs(r3.Dot(r3.Sub(c, a), left)); off < step {
		return out
	}
	out = w.refineCut(e, nodes, cov, nrm, a, c, depth-1, out)
	out = append(out, c)
	return w.refineCut(e, nodes, cov, nrm, c, b, depth-1, out)
}

// edgeKey identifies the edge between nodes u and v, in either
// direction.
func edgeKey(u, v int32) uint64 { return uint64(uint32(min(u, v)))<<32 | uint64(uint32(max(u, v))) }

// edgeUses counts key in the sorted keys.
func edgeUses(keys []uint64, key uint64) int {
	i, _ := slices.BinarySearch(keys, key)
	n := 0
	for ; i < len(keys) && keys[i] == key; i++ {
		n++
	}
	return n
}

// loop is a chain of outline segments.
type loop struct {
	pts    []r3.Vec
	closed bool
	length float64
	diag   float64 // bounding-box diagonal
}

// loops chains outline segments into loops. Where more than two segments
// meet at a vertex, the unused one of lowest index is taken. Loops come
// in order of their first segment; the first one returned is the
// outline (largest bounding box), the others bound holes.
func loops(segs []segment) []loop {
	at := map[vkey][]int32{}
	for i, s := range segs {
		at[s.a] = append(at[s.a], int32(i))
		at[s.b] = append(at[s.b], int32(i))
	}
	used := make([]bool, len(segs))
	next := func(v vkey) int32 {
		for _, i := range at[v] {
			if !used[i] {
				return i
			}
		}
		return -1
	}
	var out []loop
	for first := range segs {
		if used[first] {
			continue
		}
		used[first] = true
		start := segs[first].a
		keys := []vkey{start, segs[first].b}
		pts := []r3.Vec{segs[first].pa, segs[first].pb}
		walk := func(v vkey, stop vkey) ([]vkey, []r3.Vec) {
			var ks []vkey
			var ps []r3.Vec
			for v != stop {
				i := next(v)
				if i < 0 {
					break
				}
				used[i] = true
				s := segs[i]
				nv, np := s.b, s.pb
				if s.b == v {
					nv, np = s.a, s.pa
				}
				ks = append(ks, nv)
				ps = append(ps, np)
				v = nv
			}
			return ks, ps
		}
		fk, fp := walk(segs[first].b, start)
		keys = append(keys, fk...)
		pts = append(pts, fp...)
		lp := loop{}
		if len(keys) > 2 && keys[len(keys)-1] == start {
			lp.closed = true
			pts = pts[:len(pts)-1]
		} else {
			bk, bp := walk(start, vkey{-2, -2})
			_ = bk
			slices.Reverse(bp)
			pts = append(bp, pts...)
		}
		lp.pts = pts
		lo, hi := pts[0], pts[0]
		for i, p := range pts {
			lo = r3.Vec{X: math.Min(lo.X, p.X), Y: math.Min(lo.Y, p.Y), Z: math.Min(lo.Z, p.Z)}
			hi = r3.Vec{X: math.Max(hi.X, p.X), Y: math.Max(hi.Y, p.Y), Z: math.Max(hi.Z, p.Z)}
			if i > 0 {
				lp.length += r3.Norm(r3.Sub(p, pts[i-1]))
			}
		}
		if lp.closed {
			lp.length += r3.Norm(r3.Sub(pts[0], pts[len(pts)-1]))
		}
		lp.diag = r3.Norm(r3.Sub(hi, lo))
		out = append(out, lp)
	}
	// The outline first.
	best := 0
	for i := range out {
		if out[i].diag > out[best].diag {
			best = i
		}
	}
	if best > 0 {
		out[0], out[best] = out[best], out[0]
	}
	return out
}

// shift returns how far the faying surface lies from host element e
// along its normal: at the piece's centroid cen, probed against the
// other sheet (the nodes' faying points do not do: a node on a crease
// finds its faying point on either side of it), else the mean over the
// element's nodes in contact in.
func (w *pairWork) shift(e int32, cen r3.Vec, in []int32) float64 {
	n := w.c.Normal(e)
	if r, ok := w.c.ProbeWith(&w.probe, cen, e, w.other); ok {
		return r3.Dot(r3.Sub(r.Faying, cen), n)
	}
	all := 0.0
	for _, u := range in {
		all += r3.Dot(r3.Sub(w.rec(u).Faying, w.m.Coords[u]), n)
	}
	return all / float64(len(in))
}
