package geom

import (
	"cmp"
	"runtime"
	"slices"
	"sync"
	"sync/atomic"
)

// NewElemIndex builds an index over the elements of m only, as NewIndex
// does but without the node tree: node queries (NearestNodes,
// NodesWithin) find nothing. It serves searches that need element
// queries alone, such as FindContacts, at about half the cost.
func NewElemIndex(m *Mesh) *Index {
	return &Index{m: m, elems: newPackedTree(elemItems{m}), nodes: packedTree{level: []int{0, 0}}}
}

// dist2Box returns the squared distance between two boxes (0 when they
// overlap, +Inf when one is empty).
func (b *box32) dist2Box(c *box32) float64 {
	s := 0.0
	for k := range 3 {
		d := float64(c.lo[k]) - float64(b.hi[k])
		if e := float64(b.lo[k]) - float64(c.hi[k]); e > d {
			d = e
		}
		if d > 0 {
			s += d * d
		}
	}
	return s
}

// within reports whether boxes b and c may lie within distance r of each
// other (r2 = r*r, both with slack): a quick test that rejects on the
// first axis that separates them, then checks the distance.
func (b *box32) within(c *box32, r float32, r2 float64) bool {
	for k := range 3 {
		if c.lo[k]-b.hi[k] > r || b.lo[k]-c.hi[k] > r {
			return false
		}
	}
	return b.dist2Box(c) <= r2
}

// partGroup is the run of one part's items in a leaf of the element tree
// (positions perm[lo:hi]) with their bounding box.
type partGroup struct {
	part   int32
	lo, hi int32
	box    box32
}

// pairJoin holds what the self-join of the element tree needs.
type pairJoin struct {
	t      *packedTree
	m      *Mesh
	r2     float64 // squared reach, with slack
	r      float32 // reach, with slack, rounded up
	part   []int32 // per tree node: the part of all its elements, or -1
	gstart []int32 // groups of leaf i: groups[gstart[i]:gstart[i+1]]
	groups []partGroup
	perm   []int32      // item positions, grouped by part within each leaf
	normal [][3]float32 // per item position: the element normal, once ready[leaf] has run
	ready  []sync.Once  // per leaf
	// keep decides on a pair of elements of different parts whose boxes
	// (float32, rounded outwards) lie within the reach: it gets the
	// elements, their normals and the squared distance of their boxes.
	keep func(a, b int32, na, nb *[3]float32, d2 float64) bool
}

// contactPairs returns the pairs of elements of different parts whose
// bounding boxes lie within r of each other and that keep accepts, each
// pair once with the smaller element index first, in an order that is
// the same on every run whatever GOMAXPROCS.
//
// It is a self-join of the element tree: pairs of tree nodes are
// followed down from the root while their boxes lie within r; a pair of
// nodes that hold one and the same part only is dropped at once, and in
// the leaves the elements are grouped by part so that only groups of
// different parts within r are compared element by element. The cost is
// that of the near pairs of nodes and of the near element pairs of
// different parts, linear in the mesh of a shell model; no part is ever
// compared with every other. keep is called from several goroutines at
// once.
func (x *Index) contactPairs(r float64, keep func(a, b int32, na, nb *[3]float32, d2 float64) bool) [][2]int32 {
	t := &x.elems
	if len(t.ids) == 0 || !(r >= 0) {
		return nil
	}
	j := &pairJoin{t: t, m: x.m, r2: r * r * pruneSlack, r: up32(r * pruneSlack * (1 + 1e-6)), keep: keep}
	j.prepare()
	levels := t.levels()
	if levels == 1 {
		// A single leaf: the root's items are the leaf.
		return j.leafPair(0, 0, nil)
	}
	// Tasks: the node pairs at a level low enough to share the work out,
	// found by a sequential walk from the root, then joined concurrently
	// in chunks whose outputs are put together in task order.
	top := levels - 1
	taskLevel := 1
	for l := top; l >= 1; l-- {
		if t.count(l) >= 512 {
			taskLevel = l
			break
		}
	}
	type task struct{ i, j int32 }
	var tasks []task
	var walk func(l, a, b int)
	walk = func(l, a, b int) {
		if j.far(l, a, b) {
			return
		}
		if l == taskLevel {
			tasks = append(tasks, task{int32(a), int32(b)})
			return
		}
		lo1, hi1 := t.children(l, a)
		lo2, hi2 := t.children(l, b)
		for ci := lo1; ci < hi1; ci++ {
			start := lo2
			if a == b {
				start = ci
			}
			for cj := start; cj < hi2; cj++ {
				walk(l-1, ci, cj)
			}
		}
	}
	walk(top, 0, 0)
	const chunk = 256
	nchunks := (len(tasks) + chunk - 1) / chunk
	outs := make([][][2]int32, nchunks)
	var next atomic.Int64
	var wg sync.WaitGroup
	for range min(runtime.GOMAXPROCS(0), nchunks) {
		wg.Go(func() {
			for {
				c := int(next.Add(1) - 1)
				if c >= nchunks {
					return
				}
				var out [][2]int32
				for _, tk := range tasks[c*chunk : min((c+1)*chunk, len(tasks))] {
					out = j.visit(taskLevel, int(tk.i), int(tk.j), out)
				}
				outs[c] = out
			}
		})
	}
	wg.Wait()
	n := 0
	for _, o := range outs {
		n += len(o)
	}
	all := make([][2]int32, 0, n)
	for _, o := range outs {
		all = append(all, o...)
	}
	return all
}

// prepare labels the tree nodes with their part and groups the items of
// every leaf by part.
func (j *pairJoin) prepare() {
	t, m := j.t, j.m
	levels := t.levels()
	n := len(t.ids)
	nleaves := 1
	if levels > 1 {
		nleaves = t.count(1)
	}
	leaf := func(i int) (int, int) {
		if levels == 1 {
			return 0, n
		}
		return t.children(1, i)
	}
	j.perm = make([]int32, n)
	for i := range j.perm {
		j.perm[i] = int32(i)
	}
	counts := make([]int32, nleaves+1)
	parallelBlocks(nleaves, func(from, to int) {
		for i := from; i < to; i++ {
			lo, hi := leaf(i)
			ps := j.perm[lo:hi]
			slices.SortFunc(ps, func(a, b int32) int {
				return cmp.Or(cmp.Compare(m.ElemPart[t.ids[a]], m.ElemPart[t.ids[b]]), cmp.Compare(a, b))
			})
			g := int32(1)
			for k := 1; k < len(ps); k++ {
				if m.ElemPart[t.ids[ps[k]]] != m.ElemPart[t.ids[ps[k-1]]] {
					g++
				}
			}
			counts[i+1] = g
		}
	})
	j.gstart = counts
	for i := 1; i <= nleaves; i++ {
		j.gstart[i] += j.gstart[i-1]
	}
	j.groups = make([]partGroup, j.gstart[nleaves])
	j.normal = make([][3]float32, n)
	j.ready = make([]sync.Once, nleaves)
	parallelBlocks(nleaves, func(from, to int) {
		for i := from; i < to; i++ {
			lo, hi := leaf(i)
			g := j.gstart[i]
			for k := lo; k < hi; {
				p := m.ElemPart[t.ids[j.perm[k]]]
				e := k
				b := emptyBox32()
				for e < hi && m.ElemPart[t.ids[j.perm[e]]] == p {
					b.union(&t.boxes[j.perm[e]])
					e++
				}
				j.groups[g] = partGroup{part: p, lo: int32(k), hi: int32(e), box: b}
				g++
				k = e
			}
		}
	})
	// part[k] is the part of every element under tree node k, -1 for a
	// node holding several parts.
	j.part = make([]int32, len(t.boxes))
	for i := range n {
		j.part[i] = m.ElemPart[t.ids[i]]
	}
	for l := 1; l < levels; l++ {
		base := t.level[l-1]
		for i := range t.count(l) {
			lo, hi := t.children(l, i)
			p := j.part[base+lo]
			for k := lo + 1; k < hi && p >= 0; k++ {
				if j.part[base+k] != p {
					p = -1
				}
			}
			j.part[t.level[l]+i] = p
		}
	}
}

// normals computes, once, the normals of the elements of leaf i (only
// the leaves near another part need them).
func (j *pairJoin) normals(i int) {
	j.ready[i].Do(func() {
		lo, hi := i*treeFan, min((i+1)*treeFan, len(j.t.ids))
		for k := lo; k < hi; k++ {
			v := j.m.Normal(int(j.t.ids[k]))
			j.normal[k] = [3]float32{float32(v.X), float32(v.Y), float32(v.Z)}
		}
	})
}

// far reports whether nodes a and b of level l hold no pair to look at:
// one and the same part on both sides, or boxes too far apart.
func (j *pairJoin) far(l, a, b int) bool {
	t := j.t
	pa, pb := j.part[t.level[l]+a], j.part[t.level[l]+b]
	if pa >= 0 && pa == pb {
		return true
	}
	return a != b && !t.box(l, a).within(t.box(l, b), j.r, j.r2)
}

// visit appends the pairs under nodes a <= b of level l >= 1 to out.
func (j *pairJoin) visit(l, a, b int, out [][2]int32) [][2]int32 {
	if j.far(l, a, b) {
		return out
	}
	if l == 1 {
		return j.leafPair(a, b, out)
	}
	t := j.t
	lo1, hi1 := t.children(l, a)
	lo2, hi2 := t.children(l, b)
	// Only the children of each node near the other node's box can pair.
	var abuf, bbuf [treeFan]int32
	as, bs := abuf[:0], bbuf[:0]
	base := t.level[l-1]
	if a == b {
		for ci := lo1; ci < hi1; ci++ {
			as = append(as, int32(ci))
		}
		bs = as
	} else {
		ba, bb := t.box(l, a), t.box(l, b)
		for ci := lo1; ci < hi1; ci++ {
			if t.boxes[base+ci].within(bb, j.r, j.r2) {
				as = append(as, int32(ci))
			}
		}
		for cj := lo2; cj < hi2; cj++ {
			if t.boxes[base+cj].within(ba, j.r, j.r2) {
				bs = append(bs, int32(cj))
			}
		}
	}
	for x, ci := range as {
		start := 0
		if a == b {
			start = x
		}
		for _, cj := range bs[start:] {
			out = j.visit(l-1, int(ci), int(cj), out)
		}
	}
	return out
}

// leafPair appends the pairs between leaves a <= b (or within leaf a
// when a == b) to out.
func (j *pairJoin) leafPair(a, b int, out [][2]int32) [][2]int32 {
	t := j.t
	j.normals(a)
	if b != a {
		j.normals(b)
	}
	ga := j.groups[j.gstart[a]:j.gstart[a+1]]
	gb := j.groups[j.gstart[b]:j.gstart[b+1]]
	var abuf, bbuf [treeFan]int32
	as, bs := abuf[:0], bbuf[:0]
	for x := range ga {
		start := 0
		if a == b {
			start = x + 1
		}
		for y := start; y < len(gb); y++ {
			g, h := &ga[x], &gb[y]
			if g.part == h.part || !g.box.within(&h.box, j.r, j.r2) {
				continue
			}
			// Only the items of each group near the other group's box
			// can pair.
			as = as[:0]
			for _, pa := range j.perm[g.lo:g.hi] {
				if t.boxes[pa].within(&h.box, j.r, j.r2) {
					as = append(as, pa)
				}
			}
			if len(as) == 0 {
				continue
			}
			bs = bs[:0]
			for _, pb := range j.perm[h.lo:h.hi] {
				if t.boxes[pb].within(&g.box, j.r, j.r2) {
					bs = append(bs, pb)
				}
			}
			for _, pa := range as {
				for _, pb := range bs {
					if !t.boxes[pa].within(&t.boxes[pb], j.r, j.r2) {
						continue
					}
					d2 := t.boxes[pa].dist2Box(&t.boxes[pb])
					e, f := t.ids[pa], t.ids[pb]
					ne, nf := &j.normal[pa], &j.normal[pb]
					if e > f {
						e, f, ne, nf = f, e, nf, ne
					}
					if j.keep(e, f, ne, nf, d2) {
						out = append(out, [2]int32{e, f})
					}
				}
			}
		}
	}
	return out
}

// dot32 returns the dot product of two float32 vectors in float64.
func dot32(a, b *[3]float32) float64 {
	return float64(a[0])*float64(b[0]) + float64(a[1])*float64(b[1]) + float64(a[2])*float64(b[2])
}
