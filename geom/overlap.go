package geom

import (
	"math"
	"runtime"
	"slices"
	"sync"
	"sync/atomic"

	"gonum.org/v1/gonum/spatial/r3"
)

// Facing is an element and the element of another group across from it.
type Facing struct {
	Elem, Other int32
	// Dist is the signed distance from Elem's centroid, along Elem's
	// normal (by its node order), to the plane of Other, mm.
	Dist float64
}

// facingSteps bounds the elements one walk visits.
const facingSteps = 32

// FacingElements finds where the elements of different groups (group[e]
// for element e, e.g. Mesh.ElemPart) lie across from each other: for
// every element e with a normal and every other group that has an
// element within r of it (bounding boxes), the element f of that group
// whose plane the line through e's centroid along e's normal meets
// within r of the centroid, at a point inside f's polygon, provided the
// two normals lie within cosTol of parallel, either way (|n_e·n_f| >=
// cosTol). Quads are taken as their mean plane through their centroid.
//
// f is found by walking over the group's surface: from the element of
// the group found for e's predecessor in the index's order when it lies
// near e, else from a candidate parallel to e whose reach holds the
// meeting point, step by step across the edge beyond which the point
// lies, until it lies inside; a free edge of the group on the way, or a
// turn of its surface away from parallel, means the line passes beside
// it.
// Where the group's surface passes e twice (a fold) the first crossing
// reached is given. The candidates come from a dual-tree walk of the
// element index stopped at its leaves, so the work is linear in the
// number of elements that lie near another group, not quadratic. adj
// must be m's node-to-element adjacency. The answer is in an order that
// depends only on the index; it does not depend on GOMAXPROCS.
//
// With upward set, the answer is the half a caller that looks at each
// pair of groups from its lower group needs: for an element, the groups
// above its own, and the groups below it only when one above faces it
// (to tell whether they lie in between). Facings of an element come
// together, in the order of its groups' first appearance near it.
func (x *Index) FacingElements(adj Adjacency, group []int32, r, cosTol float64, upward bool) []Facing {
	t := &x.elems
	if len(t.ids) < 2 || !(r >= 0) {
		return nil
	}
	pairs := newNearJoin(x, r, group).leafPairs()
	nl := t.count(1)
	start := make([]int32, nl+1)
	for _, p := range pairs {
		start[p[0]+1]++
		if p[1] != p[0] {
			start[p[1]+1]++
		}
	}
	for i := 1; i <= nl; i++ {
		start[i] += start[i-1]
	}
	partner := make([]int32, start[nl])
	fill := make([]int32, nl)
	for _, p := range pairs {
		partner[start[p[0]]+fill[p[0]]] = p[1]
		fill[p[0]]++
		if p[1] != p[0] {
			partner[start[p[1]]+fill[p[1]]] = p[0]
			fill[p[1]]++
		}
	}
	w := &facingWalk{m: x.m, adj: adj, group: group, r: r, cosTol: cosTol, upward: upward, geo: make([]elemGeo, x.m.NumElems())}
	// Geometry and clusters of the elements of the leaves that have
	// partners (only they are ever looked at).
	w.summarize(t, start)
	out := make([][]Facing, nl)
	var next atomic.Int64
	var wg sync.WaitGroup
	const chunk = 64
	for range min(runtime.GOMAXPROCS(0), (nl+chunk-1)/chunk) {
		wg.Go(func() {
			var sc leafScratch
			for {
				lo := int(next.Add(chunk) - chunk)
				if lo >= nl {
					return
				}
				for l := lo; l < min(lo+chunk, nl); l++ {
					if start[l] < start[l+1] {
						// Found in the worker's buffer, kept in a slice of
						// their size.
						sc.found = w.leaf(t, int32(l), partner[start[l]:start[l+1]], &sc, sc.found[:0])
						out[l] = slices.Clone(sc.found)
					}
				}
			}
		})
	}
	wg.Wait()
	return slices.Concat(out...)
}

// facingWalk holds what the walks of FacingElements share.
type facingWalk struct {
	upward bool
	m      *Mesh
	adj    Adjacency
	group  []int32
	r      float64
	cosTol float64
	// geo holds every element's unit normal, centroid and radius in
	// single precision, for the quick tests (parallel or not, clusters,
	// near or not); the walks use exact values.
	geo []elemGeo
	// clusters[b] holds the clusters of the leaves of block b (leaves
	// b*parallelBlock to (b+1)*parallelBlock-1) in leaf order, and
	// clEnd[l] where leaf l's end in its block's (see leafClusters).
	clusters [][]cluster
	clEnd    []int32
}

// leafClusters returns the clusters that sum up the elements of leaf l.
func (w *facingWalk) leafClusters(l int32) []cluster {
	lo := int32(0)
	if l%parallelBlock != 0 {
		lo = w.clEnd[l-1]
	}
	return w.clusters[l/parallelBlock][lo:w.clEnd[l]]
}

// elemGeo is an element's unit normal, centroid and the radius about
// the centroid that holds its corners (rounded up), in single precision.
type elemGeo struct {
	n, c [3]float32
	rad  float32
}

func vec32(v *[3]float32) r3.Vec { return r3.Vec{X: float64(v[0]), Y: float64(v[1]), Z: float64(v[2])} }

func (w *facingWalk) normal32(e int32) r3.Vec { return vec32(&w.geo[e].n) }

// reachable reports whether element f may hold the point where the line
// through e's centroid c along its normal meets f's plane within r: the
// point lies within r of c and within f's radius of f's centroid (with
// slack for single precision).
func (w *facingWalk) reachable(c r3.Vec, f int32) bool {
	g := &w.geo[f]
	d := r3.Sub(vec32(&g.c), c)
	lim := (w.r + float64(g.rad)) * (1 + 1e-5)
	return r3.Dot(d, d) <= lim*lim
}

// cluster sums up the elements of one group in one leaf whose normals
// lie within clusterCos of the first of them (its representative): the
// box of their centroids and their largest radius.
type cluster struct {
	g      int32
	n      r3.Vec
	lo, hi r3.Vec
	rad    float64
}

// clusterCos is the cosine of 5°: elements within it of a cluster's
// representative join the cluster.
var clusterCos = math.Cos(5 * math.Pi / 180)

// admits reports whether a member of c may be parallel to unit normal n
// (within repCos of the representative) and hold the line through c0
// along n within r: c0 within r plus the largest member radius of the
// members' centroids.
func (c *cluster) admits(c0, n r3.Vec, repCos, r float64) bool {
	if math.Abs(r3.Dot(c.n, n)) < repCos {
		return false
	}
	lim := (r + c.rad) * (1 + 1e-5)
	return BoxDist2(r3.Box{Min: c.lo, Max: c.hi}, c0) <= lim*lim
}

// summarize fills the geometry (geo) of the items of every leaf that has
// partners and the leaf's clusters (leafClusters), in the order of the
// leaf's items, in one pass over each leaf. Each block of leaves
// keeps its clusters in one slice (fresh memory is dear: no slice per
// leaf, no copy of them all into one).
func (w *facingWalk) summarize(t *packedTree, start []int32) {
	nl := t.count(1)
	w.clEnd = make([]int32, nl)
	w.clusters = make([][]cluster, (nl+parallelBlock-1)/parallelBlock)
	parallelBlocks(nl, func(from, to int) {
		// About 1.8 clusters per leaf on a car body: room for two.
		cs := make([]cluster, 0, 2*(to-from))
		var xs [4]r3.Vec
		for l := from; l < to; l++ {
			if start[l] < start[l+1] {
				w.leafGeo(t, l, &xs)
				cs = w.leafSummary(t, l, cs)
			}
			w.clEnd[l] = int32(len(cs))
		}
		w.clusters[from/parallelBlock] = cs
	})
}

// leafGeo fills the geometry of the items of leaf l (geo).
func (w *facingWalk) leafGeo(t *packedTree, l int, xs *[4]r3.Vec) {
	lo, hi := t.children(1, l)
	for _, e := range t.ids[lo:hi] {
		nc, n, c := corners(w.m, int(e), xs)
		rad := 0.0
		for k := range nc {
			rad = math.Max(rad, r3.Norm2(r3.Sub(xs[k], c)))
		}
		w.geo[e] = elemGeo{n: [3]float32{float32(n.X), float32(n.Y), float32(n.Z)},
			c: [3]float32{float32(c.X), float32(c.Y), float32(c.Z)}, rad: up32(math.Sqrt(rad))}
	}
}

// leafSummary appends the clusters of leaf l to cs.
func (w *facingWalk) leafSummary(t *packedTree, l int, cs []cluster) []cluster {
	first := len(cs)
	lo, hi := t.children(1, l)
	for _, e := range t.ids[lo:hi] {
		n := w.normal32(e)
		if r3.Dot(n, n) == 0 {
			continue
		}
		c, rad := vec32(&w.geo[e].c), float64(w.geo[e].rad)
		// (Loops over pointers here and below: the clusters are large to
		// copy, and these loops run millions of times.)
		k := -1
		for i := first; i < len(cs); i++ {
			if cs[i].g == w.group[e] && math.Abs(r3.Dot(cs[i].n, n)) >= clusterCos {
				k = i - first
				break
			}
		}
		if k < 0 {
			cs = append(cs, cluster{g: w.group[e], n: n, lo: c, hi: c, rad: rad})
			continue
		}
		cl := &cs[first+k]
		cl.lo = r3.Vec{X: math.Min(cl.lo.X, c.X), Y: math.Min(cl.lo.Y, c.Y), Z: math.Min(cl.lo.Z, c.Z)}
		cl.hi = r3.Vec{X: math.Max(cl.hi.X, c.X), Y: math.Max(cl.hi.Y, c.Y), Z: math.Max(cl.hi.Z, c.Z)}
		cl.rad = math.Max(cl.rad, rad)
	}
	return cs
}

// groupRun is one group near a leaf: its clusters in the partner
// leaves, merged by normal (merged clusters whose representatives lie
// within clusterCos of each other; members thus lie within twice that
// angle of the merged representative), each with the partner leaves it
// came from, and the element last found.
type groupRun struct {
	g    int32
	cls  []mergedCluster
	warm int32
}

// admits reports whether one of the merged clusters of rn admits the line
// through c0 along n (cluster.admits).
func (rn *groupRun) admits(c0, n r3.Vec, repCos, r float64) bool {
	for i := range rn.cls {
		if rn.cls[i].admits(c0, n, repCos, r) {
			return true
		}
	}
	return false
}

type mergedCluster struct {
	cluster
	parts []leafCluster // the clusters merged, with their leaves
}

type leafCluster struct {
	leaf int32
	c    *cluster
}

// leafScratch is a worker's reusable memory.
type leafScratch struct {
	runs  []groupRun
	found []Facing
}

// leaf appends the facing elements of the items of leaf l, among the
// elements of its partner leaves, in the order of its items.
func (w *facingWalk) leaf(t *packedTree, l int32, partners []int32, sc *leafScratch, dst []Facing) []Facing {
	ilo, ihi := t.children(1, int(l))
	items := t.ids[ilo:ihi]
	// The group of the leaf when it has only one: no item needs it.
	only := w.group[items[0]]
	for _, e := range items[1:] {
		if w.group[e] != only {
			only = -1
			break
		}
	}
	runs := sc.runs[:0]
	for _, p := range partners {
		pcs := w.leafClusters(p)
		for k := range pcs {
			c := &pcs[k]
			if c.g == only {
				continue
			}
			i := -1
			for r := range runs {
				if runs[r].g == c.g {
					i = r
					break
				}
			}
			if i < 0 {
				if len(runs) < cap(runs) {
					runs = runs[:len(runs)+1]
					old := runs[len(runs)-1].cls
					for k := range old {
						old[k].parts = old[k].parts[:0]
					}
					runs[len(runs)-1] = groupRun{g: c.g, cls: old[:0], warm: -1}
				} else {
					runs = append(runs, groupRun{g: c.g, warm: -1})
				}
				i = len(runs) - 1
			}
			rn := &runs[i]
			k := -1
			for i := range rn.cls {
				if math.Abs(r3.Dot(rn.cls[i].n, c.n)) >= clusterCos {
					k = i
					break
				}
			}
			if k < 0 {
				if len(rn.cls) < cap(rn.cls) {
					rn.cls = rn.cls[:len(rn.cls)+1]
					mc := &rn.cls[len(rn.cls)-1]
					mc.cluster, mc.parts = *c, append(mc.parts[:0], leafCluster{p, c})
				} else {
					rn.cls = append(rn.cls, mergedCluster{cluster: *c, parts: []leafCluster{{p, c}}})
				}
				continue
			}
			mc := &rn.cls[k]
			mc.lo = r3.Vec{X: math.Min(mc.lo.X, c.lo.X), Y: math.Min(mc.lo.Y, c.lo.Y), Z: math.Min(mc.lo.Z, c.lo.Z)}
			mc.hi = r3.Vec{X: math.Max(mc.hi.X, c.hi.X), Y: math.Max(mc.hi.Y, c.hi.Y), Z: math.Max(mc.hi.Z, c.hi.Z)}
			mc.rad = math.Max(mc.rad, c.rad)
			mc.parts = append(mc.parts, leafCluster{p, c})
		}
	}
	sc.runs = runs
	// An element parallel to a member of a merged cluster lies within
	// the angle limit plus 10° of its representative (and a little more
	// for the single-precision normals).
	repCos := math.Cos(math.Acos(min(1, w.cosTol)) + 10.01*math.Pi/180)
	m := w.m
	var xs [4]r3.Vec
	for _, e := range items {
		// Most items face no other group: the single-precision geometry
		// tells them apart without reading their corners again.
		if !w.mayFace(runs, e, repCos) {
			continue
		}
		_, ne, ce := corners(m, int(e), &xs)
		if r3.Dot(ne, ne) == 0 {
			continue
		}
		// With upward, groups above e's first; those below only when one
		// above faces e.
		found := false
		for pass := range 2 {
			if w.upward && pass == 1 && !found {
				break
			}
			for i := range runs {
				rn := &runs[i]
				if w.upward && (pass == 0) != (rn.g > w.group[e]) || !w.upward && pass == 1 {
					continue
				}
				if rn.g == w.group[e] || !rn.admits(ce, ne, repCos, w.r) {
					continue // no element of the group is parallel to e and near enough
				}
				// From the element found for the item before, when it lies
				// near, else from the first element of the group that may
				// hold the point; where that walk ends is the answer.
				f, d, res := int32(-1), 0.0, walkLost
				warmNear := rn.warm >= 0 && w.close(ce, e, rn.warm)
				if warmNear {
					f, d, res = w.walk(ce, ne, rn.warm, rn.g)
				}
				if !warmNear || res == walkLost {
					if near := w.nearest(t, ce, ne, rn, repCos); near >= 0 {
						f, d, res = w.walk(ce, ne, near, rn.g)
					}
				}
				switch res {
				case walkFound:
					rn.warm = f
					found = found || pass == 0
					dst = append(dst, Facing{Elem: e, Other: f, Dist: d})
				case walkOff, walkFar:
					rn.warm = f // the last element before the edge: near the next item
				}
			}
		}
	}
	return dst
}

// mayFace reports whether some group of runs other than e's may have a
// merged cluster that admits e (cluster.admits with e's exact centroid and
// normal, as the walks use them), judged from e's single-precision
// centroid and normal (geo), which are the exact ones rounded to nearest:
// each within a relative 2^-24 per component, so within 1e-6 of the
// exact normal and 1e-6 times the coordinates' size of the exact
// centroid, by which the test is widened. False means no group admits e.
func (w *facingWalk) mayFace(runs []groupRun, e int32, repCos float64) bool {
	g := &w.geo[e]
	n, c := vec32(&g.n), vec32(&g.c)
	if r3.Dot(n, n) == 0 {
		return false // the exact normal is zero too: a unit normal rounds to no zero vector
	}
	size := math.Max(math.Abs(c.X), math.Max(math.Abs(c.Y), math.Abs(c.Z)))
	if math.IsInf(size, 0) || math.IsNaN(size) {
		return true // out of single precision's range: ask the exact test
	}
	for i := range runs {
		rn := &runs[i]
		if rn.g == w.group[e] {
			continue
		}
		for k := range rn.cls {
			if rn.cls[k].mayAdmit(c, n, size, repCos, w.r) {
				return true
			}
		}
	}
	return false
}

// mayAdmit is admits widened for a centroid c0 and a unit normal n rounded
// to single precision, the centroid's largest coordinate being size in
// magnitude: true whenever admits is for the exact ones.
func (c *cluster) mayAdmit(c0, n r3.Vec, size, repCos, r float64) bool {
	const slack = 1e-6
	if math.Abs(r3.Dot(c.n, n)) < repCos-slack {
		return false
	}
	lim := (r+c.rad)*(1+1e-5) + slack*(1+size)
	return BoxDist2(r3.Box{Min: c.lo, Max: c.hi}, c0) <= lim*lim
}

// nearest returns the first element of the group of rn, in the partner
// leaves whose clusters admit the line through ce along ne, that is
// parallel to it within cosTol and may hold it within r (reachable), or
// -1: a start from which a walk reaches the point over the stretch of
// surface that faces e.
func (w *facingWalk) nearest(t *packedTree, ce, ne r3.Vec, rn *groupRun, repCos float64) int32 {
	slack := 1 - 1e-6 // single-precision normals
	leafCos := math.Cos(math.Acos(min(1, w.cosTol)) + 5.01*math.Pi/180)
	for i := range rn.cls {
		mc := &rn.cls[i]
		if !mc.admits(ce, ne, repCos, w.r) {
			continue
		}
		prev := int32(-1)
		for _, lc := range mc.parts {
			// A leaf's own clusters admit with the tighter angle.
			if lc.leaf == prev || !lc.c.admits(ce, ne, leafCos, w.r) {
				continue
			}
			prev = lc.leaf
			lo, hi := t.children(1, int(lc.leaf))
			for _, f := range t.ids[lo:hi] {
				if w.group[f] == rn.g && math.Abs(r3.Dot(ne, w.normal32(f))) >= w.cosTol*slack && w.reachable(ce, f) {
					return f
				}
			}
		}
	}
	return -1
}

// corners reads the corners of element e into x and returns their
// number, the unit normal (as Mesh.Normal gives it, with a plain square
// root; zero for a degenerate element) and the centroid.
func corners(m *Mesh, e int, x *[4]r3.Vec) (int, r3.Vec, r3.Vec) {
	nodes := m.ElemNodes(e)
	nc := 4
	if t := len(nodes); t == 3 || t == 6 {
		nc = 3
	}
	var c r3.Vec
	for k := range nc {
		x[k] = m.Coords[nodes[k]]
		c = r3.Add(c, x[k])
	}
	c = r3.Scale(1/float64(nc), c)
	var v r3.Vec
	if nc == 3 {
		v = r3.Cross(r3.Sub(x[1], x[0]), r3.Sub(x[2], x[0]))
	} else {
		v = r3.Cross(r3.Sub(x[2], x[0]), r3.Sub(x[3], x[1]))
	}
	l := math.Sqrt(r3.Dot(v, v))
	if !(l > 0) || math.IsInf(l, 0) {
		return nc, r3.Vec{}, c
	}
	return nc, r3.Scale(1/l, v), c
}

// close reports whether element f lies near enough to element e (with
// centroid c) for a walk from f to stay on the stretch of surface that
// faces e: within r plus twice both their radii.
func (w *facingWalk) close(c r3.Vec, e, f int32) bool {
	d := r3.Sub(vec32(&w.geo[f].c), c)
	lim := w.r + 2*float64(w.geo[e].rad+w.geo[f].rad)
	return r3.Dot(d, d) <= lim*lim
}

// walkEnd says how a walk ended.
type walkEnd int8

const (
	walkFound walkEnd = iota // the point lies inside the element returned
	// walkOff: a free edge of the group, or a turn of its surface away
	// from parallel, lies just before the point (within the size of the
	// element left from): the line passes beside the group.
	walkOff
	// walkFar: the same, but with the point farther beyond: the walk
	// may have started on another stretch of the surface.
	walkFar
	walkLost // the start was not parallel or too far, or too many steps: start elsewhere
)

// walk steps over the elements of group g from f toward the point where
// the line through c along unit n meets the group's surface. It returns
// the element it ended on (the last parallel one).
func (w *facingWalk) walk(c, n r3.Vec, f, g int32) (int32, float64, walkEnd) {
	m := w.m
	prev := int32(-1)
	beyond, size := 0.0, 0.0 // how far the point lay beyond the edge crossed last, and the element's size
	off := func(f int32) (int32, float64, walkEnd) {
		if beyond > size {
			return f, 0, walkFar
		}
		return f, 0, walkOff
	}
	var x [4]r3.Vec
	for step := range facingSteps {
		nc, nf, cf := corners(m, int(f), &x)
		cos := r3.Dot(n, nf)
		if math.Abs(cos) < w.cosTol || r3.Dot(nf, nf) == 0 {
			if step > 0 {
				return off(prev)
			}
			return f, 0, walkLost
		}
		s := r3.Dot(r3.Sub(cf, c), nf) / cos
		if math.Abs(s) > w.r {
			return f, 0, walkLost
		}
		p := r3.Add(c, r3.Scale(s, n))
		// The edge the point lies farthest beyond, if any.
		worst, wd := -1, 0.0
		size = 0.0
		for k := range nc {
			a, b := x[k], x[(k+1)%nc]
			edge := r3.Sub(b, a)
			l := math.Sqrt(r3.Dot(edge, edge))
			if l == 0 {
				continue
			}
			size = math.Max(size, l)
			if d := r3.Dot(r3.Sub(p, a), r3.Cross(nf, edge)) / l; d < wd {
				worst, wd = k, d
			}
		}
		if worst < 0 || -wd <= 1e-6*size {
			return f, s, walkFound
		}
		beyond = -wd
		next := w.mate(f, worst, g)
		if next < 0 {
			return off(f)
		}
		if next == prev {
			return f, 0, walkLost
		}
		prev, f = f, next
	}
	return f, 0, walkLost
}

// mate returns the element of group g other than f that shares edge k of
// f (the lowest index when several do), or -1.
func (w *facingWalk) mate(f int32, k int, g int32) int32 {
	m := w.m
	nodes := m.ElemNodes(int(f))
	nc := m.Type(int(f)).Corners()
	a, b := nodes[k], nodes[(k+1)%nc]
	best := int32(-1)
	for _, o := range w.adj.Of(a) {
		if o != f && w.group[o] == g && (best < 0 || o < best) && usesNode(m, int(o), b) {
			best = o
		}
	}
	return best
}
