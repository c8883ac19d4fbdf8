package geom

import (
	"cmp"
	"math"
	"slices"
	"sync"

	"gonum.org/v1/gonum/spatial/r3"
)

// Index is a spatial index over the elements and nodes of a Mesh. It
// answers "which elements lie within distance r of a point" (distance to
// the element surface), "which element is nearest" and "which nodes are
// nearest", each in O(log n) for a query with a bounded answer.
//
// It is a pair of static bounding-box trees packed along a Z-order curve
// (one over element boxes, one over nodes), built in linear time with a
// radix sort and stored in single precision rounded outwards, so that the
// exact double-precision tests made on the candidates never miss an
// answer.
//
// An Index is read-only after NewIndex returns: queries may run from
// several goroutines at once. The mesh must not change while the index is
// in use. Coordinates that are not finite make their elements and nodes
// unreachable but never cause a panic.
type Index struct {
	m     *Mesh
	elems packedTree
	nodes packedTree
}

// elemItems presents the elements of a mesh to the tree builder.
type elemItems struct{ m *Mesh }

func (it elemItems) Len() int { return it.m.NumElems() }

func (it elemItems) Box(e int) (lo, hi r3.Vec) { return elemBox(it.m, e) }

// nodeItems presents the nodes of a mesh to the tree builder.
type nodeItems struct{ c []r3.Vec }

func (it nodeItems) Len() int { return len(it.c) }

func (it nodeItems) Box(i int) (lo, hi r3.Vec) { return it.c[i], it.c[i] }

// elemBox returns the bounding box of the corner nodes of element e, or
// of the control points of a second-order element's curved surface (see
// controlBox), so that the box holds the whole surface; an element
// without nodes has an empty box (lo > hi). NaN coordinates are ignored.
func elemBox(m *Mesh, e int) (lo, hi r3.Vec) {
	if m.Type(e).Quadratic() {
		return quadraticBox(m, e)
	}
	lo = r3.Vec{X: math.Inf(1), Y: math.Inf(1), Z: math.Inf(1)}
	hi = r3.Vec{X: math.Inf(-1), Y: math.Inf(-1), Z: math.Inf(-1)}
	nodes := m.ElemNodes(e)
	if c := m.Type(e).Corners(); len(nodes) > c {
		nodes = nodes[:c]
	}
	for _, n := range nodes {
		v := m.Coords[n]
		lo.X, hi.X = minIgnoreNaN(lo.X, v.X), maxIgnoreNaN(hi.X, v.X)
		lo.Y, hi.Y = minIgnoreNaN(lo.Y, v.Y), maxIgnoreNaN(hi.Y, v.Y)
		lo.Z, hi.Z = minIgnoreNaN(lo.Z, v.Z), maxIgnoreNaN(hi.Z, v.Z)
	}
	return lo, hi
}

// BoxDist2 returns the squared distance from p to box b (0 inside, +Inf
// for an empty box): a lower bound of p's distance to anything in b.
func BoxDist2(b r3.Box, p r3.Vec) float64 { return boxDist2(b.Min, b.Max, p) }

// boxDist2 returns the squared distance from p to the box [lo, hi], +Inf
// for an empty box.
func boxDist2(lo, hi, p r3.Vec) float64 {
	axis := func(v, lo, hi float64) float64 {
		switch {
		case v < lo:
			return (lo - v) * (lo - v)
		case v > hi:
			return (v - hi) * (v - hi)
		}
		return 0
	}
	if !(lo.X <= hi.X && lo.Y <= hi.Y && lo.Z <= hi.Z) {
		return math.Inf(1)
	}
	return axis(p.X, lo.X, hi.X) + axis(p.Y, lo.Y, hi.Y) + axis(p.Z, lo.Z, hi.Z)
}

// NewIndex builds the index of m's elements and nodes, in time linear in
// their number (the two trees are built concurrently). m must be a valid
// mesh (every connectivity entry a node index) and must not change while
// the index is used.
func NewIndex(m *Mesh) *Index {
	x := &Index{m: m}
	var wg sync.WaitGroup
	wg.Go(func() { x.nodes = newPackedTree(nodeItems{m.Coords}) })
	x.elems = newPackedTree(elemItems{m})
	wg.Wait()
	return x
}

// Mesh returns the indexed mesh.
func (x *Index) Mesh() *Mesh { return x.m }

// Bytes returns the memory held by the index, in bytes.
func (x *Index) Bytes() int { return x.elems.Bytes() + x.nodes.Bytes() }

// query checks a query point and radius and returns the point as an array
// and the squared radius; ok is false when no answer is possible (a
// point that is not finite, a negative or NaN radius).
func query(p r3.Vec, r float64) (q [3]float64, r2 float64, ok bool) {
	if !finite(p.X) || !finite(p.Y) || !finite(p.Z) || !(r >= 0) {
		return q, 0, false
	}
	return [3]float64{p.X, p.Y, p.Z}, r * r, true
}

// ElemsNear appends to dst the elements whose bounding box (ElemBox)
// lies within distance r of p, in increasing index order,
// and returns the extended slice. These are the candidates for a
// projection: an element whose surface is within r of p is among them.
func (x *Index) ElemsNear(p r3.Vec, r float64, dst []int32) []int32 {
	q, r2, ok := query(p, r)
	if !ok {
		return dst
	}
	start := len(dst)
	dst = x.elems.appendWithin(dst, &q, r2)
	keep := dst[:start]
	for _, e := range dst[start:] {
		if lo, hi := elemBox(x.m, int(e)); boxDist2(lo, hi, p) <= r2 {
			keep = append(keep, e)
		}
	}
	slices.Sort(keep[start:])
	return keep
}

// CandidatesNear appends to dst the elements whose box in the index
// (ElemBox in single precision, rounded outwards) lies within distance r
// of p, in no particular order, and returns the extended slice: every
// element ElemsNear finds and possibly a few more, without its exact
// test and sort, for a caller whose own test makes the order and the
// few extra elements irrelevant (FreeEdgeDistance).
func (x *Index) CandidatesNear(p r3.Vec, r float64, dst []int32) []int32 {
	q, r2, ok := query(p, r)
	if !ok {
		return dst
	}
	return x.elems.appendWithin(dst, &q, r2*pruneSlack)
}

// ProjectNear projects p onto every element accepted by filter (nil
// accepts all) whose surface lies within distance r of p, and returns the
// projections sorted by distance, then element index.
func (x *Index) ProjectNear(p r3.Vec, r float64, filter func(e int) bool) []Projection {
	q, r2, ok := query(p, r)
	if !ok {
		return nil
	}
	var buf [256]int32
	cand := x.elems.appendWithin(buf[:0], &q, r2*pruneSlack)
	if len(cand) == 0 {
		return nil
	}
	out := make([]Projection, 0, len(cand))
	for _, e := range cand {
		if filter != nil && !filter(int(e)) {
			continue
		}
		if pr := x.m.Project(int(e), p); pr.Dist <= r {
			out = append(out, pr)
		}
	}
	slices.SortFunc(out, func(a, b Projection) int {
		if c := cmp.Compare(a.Dist, b.Dist); c != 0 {
			return c
		}
		return cmp.Compare(a.Elem, b.Elem)
	})
	return out
}

// pruneSlack widens the box tests made before exact distances by a
// relative 1e-9, so that rounding in the box distances cannot drop an
// element at the query radius or tied with the best one.
const pruneSlack = 1 + 1e-9

// ProjectNearest returns the projection of p onto the nearest element
// accepted by filter (nil accepts all) within distance r of p (r may be
// +Inf), and false when there is none. Ties go to the lower element
// id, so that the answer does not depend on the order of the elements.
func (x *Index) ProjectNearest(p r3.Vec, r float64, filter func(e int) bool) (Projection, bool) {
	q, r2, ok := query(p, r)
	if !ok {
		return Projection{}, false
	}
	best := Projection{Elem: -1, Dist: math.Inf(1)}
	bound := func() float64 {
		if best.Elem < 0 {
			return r2 * pruneSlack
		}
		return best.Dist * best.Dist * pruneSlack
	}
	x.elems.nearestSearch(&q, bound, func(lo, hi int) {
		b := bound()
		for i := lo; i < hi; i++ {
			if x.elems.boxes[i].dist2(&q) > b {
				continue
			}
			e := int(x.elems.ids[i])
			if filter != nil && !filter(e) {
				continue
			}
			pr := x.m.Project(e, p)
			if !(pr.Dist <= r) {
				continue
			}
			if best.Elem < 0 || pr.Dist < best.Dist || pr.Dist == best.Dist && x.m.ElemIDs[e] < x.m.ElemIDs[best.Elem] {
				best = pr
				b = bound()
			}
		}
	})
	return best, best.Elem >= 0
}

// nodeDist is a node with its squared distance to a query point.
type nodeDist struct {
	d2 float64
	n  int32
}

func compareNodeDist(a, b nodeDist) int {
	if c := cmp.Compare(a.d2, b.d2); c != 0 {
		return c
	}
	return cmp.Compare(a.n, b.n)
}

// NearestNodes returns the k nodes accepted by filter (nil accepts all)
// nearest to p, sorted by distance, then index; fewer when the mesh has
// fewer such nodes. Every node of the mesh is indexed, including nodes no
// element uses.
func (x *Index) NearestNodes(p r3.Vec, k int, filter func(n int) bool) []int32 {
	q, _, ok := query(p, 0)
	if !ok || k <= 0 {
		return nil
	}
	// heap is a max-heap of the k best so far, by (d2, n).
	heap := make([]nodeDist, 0, min(k, len(x.m.Coords)))
	bound := func() float64 {
		if len(heap) < k {
			return math.Inf(1)
		}
		return heap[0].d2 * pruneSlack
	}
	x.nodes.nearestSearch(&q, bound, func(lo, hi int) {
		for i := lo; i < hi; i++ {
			n := x.nodes.ids[i]
			if filter != nil && !filter(int(n)) {
				continue
			}
			c := nodeDist{r3.Norm2(r3.Sub(x.m.Coords[n], p)), n}
			if !(c.d2 <= math.MaxFloat64) {
				continue // not finite
			}
			switch {
			case len(heap) < k:
				heap = append(heap, c)
				siftUp(heap, len(heap)-1)
			case compareNodeDist(c, heap[0]) < 0:
				heap[0] = c
				siftDown(heap, 0)
			}
		}
	})
	slices.SortFunc(heap, compareNodeDist)
	out := make([]int32, len(heap))
	for i, c := range heap {
		out[i] = c.n
	}
	return out
}

// siftUp and siftDown maintain a max-heap of nodeDist.
func siftUp(h []nodeDist, i int) {
	for i > 0 {
		parent := (i - 1) / 2
		if compareNodeDist(h[parent], h[i]) >= 0 {
			return
		}
		h[parent], h[i] = h[i], h[parent]
		i = parent
	}
}

func siftDown(h []nodeDist, i int) {
	for {
		l := 2*i + 1
		if l >= len(h) {
			return
		}
		if r := l + 1; r < len(h) && compareNodeDist(h[r], h[l]) > 0 {
			l = r
		}
		if compareNodeDist(h[i], h[l]) >= 0 {
			return
		}
		h[i], h[l] = h[l], h[i]
		i = l
	}
}

// NodesWithin returns the nodes accepted by filter (nil accepts all)
// within distance r of p, sorted by distance, then index.
func (x *Index) NodesWithin(p r3.Vec, r float64, filter func(n int) bool) []int32 {
	q, r2, ok := query(p, r)
	if !ok {
		return nil
	}
	var buf [256]int32
	cand := x.nodes.appendWithin(buf[:0], &q, r2)
	found := make([]nodeDist, 0, len(cand))
	for _, n := range cand {
		if filter != nil && !filter(int(n)) {
			continue
		}
		if d2 := r3.Norm2(r3.Sub(x.m.Coords[n], p)); d2 <= r2 {
			found = append(found, nodeDist{d2, n})
		}
	}
	slices.SortFunc(found, compareNodeDist)
	out := make([]int32, len(found))
	for i, c := range found {
		out[i] = c.n
	}
	return out
}
