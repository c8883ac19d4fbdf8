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

// FacingElements finds where the elements of different groups (group[e]
// for element e, e.g. Mesh.ElemPart) lie across from each other: for
// every element e with a normal and every other group that has an
// element within r of it (bounding boxes), the element f of that group
// whose plane the line through e's centroid along e's normal meets
// within r of the centroid, at a point inside f's polygon, provided the
// two normals lie within cosTol of parallel, either way (|n_e·n_f| >=
// cosTol). Quads are taken as their mean plane through their centroid.
//
// Of the elements of a group that meet e's line so, f is the one met
// nearest e's centroid (smallest |Dist|); of those met equally near, the
// one of lowest element id (Mesh.ElemIDs). Every element of the group in
// the leaves of the element index near e's is tested directly, so the
// answer depends neither on the order of the elements in the file nor
// on the shape of the index. The candidates come from a dual-tree walk
// of the element index stopped at its leaves, so the work is linear in
// the number of elements that lie near another group, not quadratic.
// The facings of an element come together, by the other's group; the
// elements come in the index's order. The answer does not depend on
// GOMAXPROCS.
//
// With upward set, the answer is the half a caller that looks at each
// pair of groups from its lower group needs: for an element, the groups
// above its own, and the groups below it only when one above faces it
// (to tell whether they lie in between).
func (x *Index) FacingElements(group []int32, r, cosTol float64, upward bool) []Facing {
	return x.FacingElementsOrdered(group, nil, r, cosTol, upward)
}

// FacingElementsOrdered is FacingElements with the groups taken in the
// order order gives them (group g's place is order[g]) where FacingElements
// takes them by value: which groups lie above an element's with upward,
// and the order of an element's facings. A nil order is FacingElements'.
func (x *Index) FacingElementsOrdered(group, order []int32, r, cosTol float64, upward bool) []Facing {
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
	w := &facingSearch{m: x.m, group: group, order: order, r: r, cosTol: cosTol, upward: upward, geo: make([]elemGeo, x.m.NumElems())}
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

// facingSearch holds what the leaves of FacingElements share.
type facingSearch struct {
	upward bool
	m      *Mesh
	group  []int32
	order  []int32 // each group's place; nil: its value
	r      float64
	cosTol float64
	// geo holds every element's unit normal, centroid and radius in
	// single precision, for the quick tests (parallel or not, clusters,
	// near or not); the final tests use exact values.
	geo []elemGeo
	// clusters[b] holds the clusters of the leaves of block b (leaves
	// b*parallelBlock to (b+1)*parallelBlock-1) in leaf order, and
	// clEnd[l] where leaf l's end in its block's (see leafClusters).
	clusters [][]cluster
	clEnd    []int32
}

// above reports whether group g comes after group h (order).
func (w *facingSearch) above(g, h int32) bool {
	if w.order != nil {
		return w.order[g] > w.order[h]
	}
	return g > h
}

// leafClusters returns the clusters that sum up the elements of leaf l.
func (w *facingSearch) leafClusters(l int32) []cluster {
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

func (w *facingSearch) normal32(e int32) r3.Vec { return vec32(&w.geo[e].n) }

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
func (w *facingSearch) summarize(t *packedTree, start []int32) {
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
func (w *facingSearch) leafGeo(t *packedTree, l int, xs *[4]r3.Vec) {
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
func (w *facingSearch) leafSummary(t *packedTree, l int, cs []cluster) []cluster {
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
// came from.
type groupRun struct {
	g   int32
	cls []mergedCluster
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
	runs   []groupRun
	found  []Facing
	leaves []int32 // the leaves one search has looked at
}

// leaf appends the facing elements of the items of leaf l, among the
// elements of its partner leaves, in the order of its items.
func (w *facingSearch) leaf(t *packedTree, l int32, partners []int32, sc *leafScratch, dst []Facing) []Facing {
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
					runs[len(runs)-1] = groupRun{g: c.g, cls: old[:0]}
				} else {
					runs = append(runs, groupRun{g: c.g})
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
		first := len(dst)
		found := false
		for pass := range 2 {
			if w.upward && pass == 1 && !found {
				break
			}
			for i := range runs {
				rn := &runs[i]
				if w.upward && (pass == 0) != w.above(rn.g, w.group[e]) || !w.upward && pass == 1 {
					continue
				}
				if rn.g == w.group[e] || !rn.admits(ce, ne, repCos, w.r) {
					continue // no element of the group is parallel to e and near enough
				}
				if f, d := w.facing(t, ce, ne, rn, repCos, sc); f >= 0 {
					found = found || pass == 0
					dst = append(dst, Facing{Elem: e, Other: f, Dist: d})
				}
			}
		}
		// e's facings by the other's group (there are few).
		for i := first + 1; i < len(dst); i++ {
			for k := i; k > first && w.above(w.group[dst[k-1].Other], w.group[dst[k].Other]); k-- {
				dst[k], dst[k-1] = dst[k-1], dst[k]
			}
		}
	}
	return dst
}

// mayFace reports whether some group of runs other than e's may have a
// merged cluster that admits e (cluster.admits with e's exact centroid and
// normal, as the search uses them), judged from e's single-precision
// centroid and normal (geo), which are the exact ones rounded to nearest:
// each within a relative 2^-24 per component, so within 1e-6 of the
// exact normal and 1e-6 times the coordinates' size of the exact
// centroid, by which the test is widened. False means no group admits e.
func (w *facingSearch) mayFace(runs []groupRun, e int32, repCos float64) bool {
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

// facing returns the element of the group of rn that faces the line
// through ce along unit ne (meets, for an element e with centroid ce
// and normal ne), and the signed distance along ne to its plane, or -1:
// of the elements of the group in the partner leaves whose clusters
// admit the line, those parallel to it within cosTol whose plane it
// meets within r at a point inside them (meets); of those the one met
// nearest ce, ties to the lowest element id. The single-precision
// geometry passes over the elements that cannot hold the point.
func (w *facingSearch) facing(t *packedTree, ce, ne r3.Vec, rn *groupRun, repCos float64, sc *leafScratch) (int32, float64) {
	slack := 1 - 1e-6 // single-precision normals
	leafCos := math.Cos(math.Acos(min(1, w.cosTol)) + 5.01*math.Pi/180)
	// The centroids of the group's elements are rounded to single
	// precision: each within 2^-24 of its size per component, well
	// within lat of the exact one.
	size := math.Max(math.Abs(ce.X), math.Max(math.Abs(ce.Y), math.Abs(ce.Z)))
	lat := 1e-6 * (1 + size + w.r)
	best, bd := int32(-1), 0.0
	var xs [4]r3.Vec
	leaves := sc.leaves[:0]
	for i := range rn.cls {
		mc := &rn.cls[i]
		if !mc.admits(ce, ne, repCos, w.r) {
			continue
		}
		for _, lc := range mc.parts {
			// A leaf's own clusters admit with the tighter angle; a leaf
			// is looked at once, whichever of its clusters admits.
			if slices.Contains(leaves, lc.leaf) || !lc.c.admits(ce, ne, leafCos, w.r) {
				continue
			}
			leaves = append(leaves, lc.leaf)
			lo, hi := t.children(1, int(lc.leaf))
			for _, f := range t.ids[lo:hi] {
				if w.group[f] != rn.g {
					continue
				}
				// The point lies within r of ce and inside f, so within f's
				// radius of its centroid, which thus lies within r plus
				// that radius of ce and within the radius of the line
				// (with slack for single precision).
				g := &w.geo[f]
				d := r3.Sub(vec32(&g.c), ce)
				dd, a, rad := r3.Dot(d, d), r3.Dot(d, ne), float64(g.rad)
				if lim := (w.r + rad) * (1 + 1e-5); dd > lim*lim {
					continue
				}
				if lim := rad*(1+1e-5) + lat; dd-a*a > lim*lim || math.Abs(r3.Dot(ne, vec32(&g.n))) < w.cosTol*slack {
					continue
				}
				s, ok := w.meets(ce, ne, f, &xs)
				if !ok || best >= 0 && !closer(s, f, bd, best, w.m.ElemIDs) {
					continue
				}
				best, bd = f, s
			}
		}
	}
	sc.leaves = leaves
	return best, bd
}

// closer reports whether element f, met at s, comes before element g,
// met at t: nearer, or as near and of lower id (then index).
func closer(s float64, f int32, t float64, g int32, ids []int64) bool {
	if as, at := math.Abs(s), math.Abs(t); as != at {
		return as < at
	}
	if ids[f] != ids[g] {
		return ids[f] < ids[g]
	}
	return f < g
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

// meets reports whether the line through c along unit n meets the plane
// of element f (parallel to n within cosTol) within r of c, at a point
// inside f (beyond none of its edges by more than a millionth of its
// longest), and gives the signed distance along n.
func (w *facingSearch) meets(c, n r3.Vec, f int32, x *[4]r3.Vec) (float64, bool) {
	nc, nf, cf := corners(w.m, int(f), x)
	cos := r3.Dot(n, nf)
	if math.Abs(cos) < w.cosTol || r3.Dot(nf, nf) == 0 {
		return 0, false
	}
	s := r3.Dot(r3.Sub(cf, c), nf) / cos
	if math.Abs(s) > w.r {
		return 0, false
	}
	p := r3.Add(c, r3.Scale(s, n))
	worst, size := 0.0, 0.0 // how far the point lies beyond an edge, at most; the longest edge
	for k := range nc {
		a, b := x[k], x[(k+1)%nc]
		edge := r3.Sub(b, a)
		l := math.Sqrt(r3.Dot(edge, edge))
		if l == 0 {
			continue
		}
		size = math.Max(size, l)
		if d := r3.Dot(r3.Sub(p, a), r3.Cross(nf, edge)) / l; d < worst {
			worst = d
		}
	}
	return s, -worst <= 1e-6*size
}
