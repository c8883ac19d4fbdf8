package geom

import (
	"cmp"
	"runtime"
	"slices"
	"sync"
	"sync/atomic"
)

// This file holds the one self-join of the element tree: every question
// of the form "which elements of other groups (parts) lie within r of
// each element" is answered by it, at once for the whole mesh. It runs
// in two stages that callers may take separately:
//
//   - leafPairs walks the tree against itself from the root and returns
//     the pairs of leaves that may hold such a pair of elements
//     (FacingElements works on these leaf pairs);
//   - elemPairs compares the items of those leaf pairs, grouped by part
//     within each leaf, and returns the element pairs a caller's test
//     keeps (ElemPairsNear, and FindContacts through contactPairs).
//
// A pair of tree nodes is skipped when their boxes lie farther apart
// than r, or when both hold elements of one and the same group only, so
// the work follows the places where groups come near each other, not the
// size of the mesh; no group is ever compared with every other. Both
// stages run on up to GOMAXPROCS goroutines and give their answers in an
// order that depends only on the index.

// NewElemIndex builds an index over the elements of m only, as NewIndex
// does but without the node tree: node queries (NearestNodes,
// NodesWithin) find nothing. It serves searches that need element
// queries alone, such as FindContacts, at about half the cost.
func NewElemIndex(m *Mesh) *Index {
	return &Index{m: m, elems: newPackedTree(elemItems{m}), nodes: packedTree{level: []int{0, 0}}}
}

// nearJoin is the state of one self-join of the element tree.
type nearJoin struct {
	t     *packedTree
	group []int32 // per element
	r2    float64 // squared reach, with slack
	r32   float32 // reach, with slack, rounded up: a quick per-axis test
	// label holds, per tree node (indexed like boxes), the one group all
	// its elements belong to, or -1 when they belong to several.
	label []int32
}

// newNearJoin prepares the join of the element tree of x for pairs of
// elements of different groups (group[e] for element e) whose boxes lie
// within r of each other. The boxes tested are the index's single
// precision ones, rounded outwards, and r2 carries pruneSlack: no pair
// within r is missed, and a pair farther than r by a few units in the
// seventh digit of the coordinates may come too.
func newNearJoin(x *Index, r float64, group []int32) *nearJoin {
	t := &x.elems
	j := &nearJoin{t: t, group: group, r2: r * r * pruneSlack, r32: up32(r * pruneSlack * (1 + 1e-6)), label: make([]int32, len(t.boxes))}
	for i, id := range t.ids {
		j.label[i] = group[id]
	}
	for l := 1; l < t.levels(); l++ {
		base := t.level[l-1]
		for i := range t.count(l) {
			lo, hi := t.children(l, i)
			g := j.label[base+lo]
			for c := lo + 1; c < hi && g >= 0; c++ {
				if j.label[base+c] != g {
					g = -1
				}
			}
			j.label[t.level[l]+i] = g
		}
	}
	return j
}

// joinTask is a pair of tree nodes to walk; a == b walks a node against
// itself.
type joinTask struct{ a, b treeRef }

func (j *nearJoin) node(n treeRef) int { return j.t.level[n.l] + int(n.i) }

// nearAt reports whether the nodes at ia and ib (indices into boxes) may
// hold a pair: their boxes within reach, and not both of one group.
func (j *nearJoin) nearAt(ia, ib int) bool {
	if la := j.label[ia]; la >= 0 && la == j.label[ib] {
		return false
	}
	a, b := &j.t.boxes[ia], &j.t.boxes[ib]
	return !apart32(a, b, j.r32) && boxesWithin(a, b, j.r2)
}

// leafPairs returns the pairs of leaves (level-1 nodes, by index) a <= b
// that may hold a pair of elements of different groups within reach: a
// leaf is paired with itself when it holds several groups. The order
// depends only on the index.
func (j *nearJoin) leafPairs() [][2]int32 {
	t := j.t
	if len(t.ids) < 2 {
		return nil
	}
	// Split the walk into tasks at the top of the tree, run them
	// concurrently and join their answers in task order.
	tasks := j.tasks(4 * treeFan * runtime.GOMAXPROCS(0))
	out := make([][][2]int32, len(tasks))
	var next atomic.Int64
	var wg sync.WaitGroup
	for range min(runtime.GOMAXPROCS(0), len(tasks)) {
		wg.Go(func() {
			var buf [][2]int32 // the worker's, kept per task in a slice of its size
			for {
				i := int(next.Add(1) - 1)
				if i >= len(tasks) {
					return
				}
				buf = j.walk(tasks[i].a, tasks[i].b, buf[:0])
				out[i] = slices.Clone(buf)
			}
		})
	}
	wg.Wait()
	return slices.Concat(out...)
}

// tasks splits the walk of the root against itself into at least want
// independent node pairs (fewer for a small tree), in a fixed order.
func (j *nearJoin) tasks(want int) []joinTask {
	top := treeRef{int32(j.t.levels() - 1), 0}
	tasks := []joinTask{{top, top}}
	for len(tasks) < want {
		var split []joinTask
		grew := false
		for _, tk := range tasks {
			if tk.a != tk.b || tk.a.l <= 1 {
				split = append(split, tk)
				continue
			}
			grew = true
			lo, hi := j.t.children(int(tk.a.l), int(tk.a.i))
			base := j.t.level[tk.a.l-1]
			for c := lo; c < hi; c++ {
				for d := c; d < hi; d++ {
					if c == d || j.nearAt(base+c, base+d) {
						split = append(split, joinTask{treeRef{tk.a.l - 1, int32(c)}, treeRef{tk.a.l - 1, int32(d)}})
					}
				}
			}
		}
		tasks = split
		if !grew {
			break
		}
	}
	return tasks
}

// walk appends the leaf pairs under nodes a and b of level >= 1 (a == b:
// under a alone).
func (j *nearJoin) walk(a, b treeRef, dst [][2]int32) [][2]int32 {
	t := j.t
	if a == b {
		if a.l == 1 {
			if j.label[j.node(a)] < 0 {
				dst = append(dst, [2]int32{a.i, a.i})
			}
			return dst
		}
		lo, hi := t.children(int(a.l), int(a.i))
		base := t.level[a.l-1]
		for c := lo; c < hi; c++ {
			ca := treeRef{a.l - 1, int32(c)}
			dst = j.walk(ca, ca, dst)
			for d := c + 1; d < hi; d++ {
				if j.nearAt(base+c, base+d) {
					dst = j.walk(ca, treeRef{a.l - 1, int32(d)}, dst)
				}
			}
		}
		return dst
	}
	if a.l == 1 && b.l == 1 {
		return append(dst, [2]int32{min(a.i, b.i), max(a.i, b.i)})
	}
	// Descend the higher node (a on a tie).
	if b.l > a.l {
		a, b = b, a
	}
	lo, hi := t.children(int(a.l), int(a.i))
	base, ib := t.level[a.l-1], j.node(b)
	for c := lo; c < hi; c++ {
		if j.nearAt(base+c, ib) {
			dst = j.walk(treeRef{a.l - 1, int32(c)}, b, dst)
		}
	}
	return dst
}

// partGroup is the run of one group's items in a leaf of the element
// tree (positions perm[lo:hi]) with their bounding box.
type partGroup struct {
	part   int32
	lo, hi int32
	box    box32
}

// leafGroups holds the items of every leaf grouped by group.
type leafGroups struct {
	gstart []int32 // groups of leaf i: groups[gstart[i]:gstart[i+1]]
	groups []partGroup
	perm   []int32 // item positions, grouped by group within each leaf
}

// leafRange returns the item positions of leaf i.
func (j *nearJoin) leafRange(i int) (int, int) {
	if j.t.levels() == 1 {
		return 0, len(j.t.ids)
	}
	return j.t.children(1, i)
}

// groupLeaves groups the items of every leaf by group, in the order of
// their groups, then positions.
func (j *nearJoin) groupLeaves() *leafGroups {
	t := j.t
	n := len(t.ids)
	nleaves := 1
	if t.levels() > 1 {
		nleaves = t.count(1)
	}
	lg := &leafGroups{perm: make([]int32, n), gstart: make([]int32, nleaves+1)}
	for i := range lg.perm {
		lg.perm[i] = int32(i)
	}
	g := func(pos int32) int32 { return j.group[t.ids[pos]] }
	parallelBlocks(nleaves, func(from, to int) {
		for i := from; i < to; i++ {
			lo, hi := j.leafRange(i)
			ps := lg.perm[lo:hi]
			slices.SortFunc(ps, func(a, b int32) int { return cmp.Or(cmp.Compare(g(a), g(b)), cmp.Compare(a, b)) })
			c := int32(1)
			for k := 1; k < len(ps); k++ {
				if g(ps[k]) != g(ps[k-1]) {
					c++
				}
			}
			lg.gstart[i+1] = c
		}
	})
	for i := 1; i <= nleaves; i++ {
		lg.gstart[i] += lg.gstart[i-1]
	}
	lg.groups = make([]partGroup, lg.gstart[nleaves])
	parallelBlocks(nleaves, func(from, to int) {
		for i := from; i < to; i++ {
			lo, hi := j.leafRange(i)
			k := lg.gstart[i]
			for s := lo; s < hi; {
				p := g(lg.perm[s])
				e := s
				b := emptyBox32()
				for e < hi && g(lg.perm[e]) == p {
					b.union(&t.boxes[lg.perm[e]])
					e++
				}
				lg.groups[k] = partGroup{part: p, lo: int32(s), hi: int32(e), box: b}
				k++
				s = e
			}
		}
	})
	return lg
}

// pairTest decides on a pair of elements e < f of different groups whose
// boxes lie within reach: it gets the elements, their positions in the
// tree and the squared distance of their boxes. It is called from
// several goroutines at once.
type pairTest func(e, f, pe, pf int32, d2 float64) bool

// elemPairs returns the pairs of elements of different groups under the
// leaf pairs (from leafPairs) whose boxes lie within reach and that keep
// accepts (every one when keep is nil), each pair once with the smaller
// element index first, in an order that depends only on the index: the
// pairs of the chunks in turn (concat joins them). onLeaf, when not nil,
// is called once for each leaf before keep sees any of its items (to
// prepare what keep reads about them).
func (j *nearJoin) elemPairs(pairs [][2]int32, onLeaf func(leaf int), keep pairTest) [][][2]int32 {
	if len(pairs) == 0 {
		return nil
	}
	lg := j.groupLeaves()
	var ready []sync.Once
	if onLeaf != nil {
		ready = make([]sync.Once, len(lg.gstart)-1)
	}
	const chunk = 256
	nchunks := (len(pairs) + chunk - 1) / chunk
	outs := make([][][2]int32, nchunks)
	var next atomic.Int64
	var wg sync.WaitGroup
	for range min(runtime.GOMAXPROCS(0), nchunks) {
		wg.Go(func() {
			// Each chunk's pairs are gathered in the worker's buffer, used
			// again from chunk to chunk, and kept in a slice of their
			// size: growing a slice per chunk would leave twice as much
			// fresh memory behind.
			var buf [][2]int32
			for {
				c := int(next.Add(1) - 1)
				if c >= nchunks {
					return
				}
				buf = buf[:0]
				for _, p := range pairs[c*chunk : min((c+1)*chunk, len(pairs))] {
					a, b := int(p[0]), int(p[1])
					if ready != nil {
						ready[a].Do(func() { onLeaf(a) })
						ready[b].Do(func() { onLeaf(b) })
					}
					buf = j.leafItems(lg, a, b, keep, buf)
				}
				outs[c] = slices.Clone(buf)
			}
		})
	}
	wg.Wait()
	return outs
}

// leafItems appends the pairs between the items of leaves a <= b (or
// within leaf a when a == b) to out: only groups of different parts
// whose boxes lie within reach are compared, and of those only the items
// near the other group's box.
func (j *nearJoin) leafItems(lg *leafGroups, a, b int, keep pairTest, out [][2]int32) [][2]int32 {
	t := j.t
	ga := lg.groups[lg.gstart[a]:lg.gstart[a+1]]
	gb := lg.groups[lg.gstart[b]:lg.gstart[b+1]]
	var abuf, bbuf [treeFan]int32
	as, bs := abuf[:0], bbuf[:0]
	for x := range ga {
		start := 0
		if a == b {
			start = x + 1
		}
		for y := start; y < len(gb); y++ {
			g, h := &ga[x], &gb[y]
			if g.part == h.part || !boxesWithin(&g.box, &h.box, j.r2) {
				continue
			}
			as = as[:0]
			for _, pa := range lg.perm[g.lo:g.hi] {
				if !apart32(&t.boxes[pa], &h.box, j.r32) && boxesWithin(&t.boxes[pa], &h.box, j.r2) {
					as = append(as, pa)
				}
			}
			if len(as) == 0 {
				continue
			}
			bs = bs[:0]
			for _, pb := range lg.perm[h.lo:h.hi] {
				if !apart32(&t.boxes[pb], &g.box, j.r32) && boxesWithin(&t.boxes[pb], &g.box, j.r2) {
					bs = append(bs, pb)
				}
			}
			for _, pa := range as {
				ba := &t.boxes[pa]
				for _, pb := range bs {
					bb := &t.boxes[pb]
					if apart32(ba, bb, j.r32) {
						continue
					}
					d2 := ba.dist2Box(bb)
					if !(d2 <= j.r2) {
						continue
					}
					e, f, pe, pf := t.ids[pa], t.ids[pb], pa, pb
					if e > f {
						e, f, pe, pf = f, e, pf, pe
					}
					if keep == nil || keep(e, f, pe, pf, d2) {
						out = append(out, [2]int32{e, f})
					}
				}
			}
		}
	}
	return out
}

// ElemPairsNear returns every pair of indexed elements of different
// groups (group[a] != group[b], group indexed by element, e.g.
// Mesh.ElemPart) whose bounding boxes (of their corner nodes) lie within
// distance r of each other, as (a, b) with a < b, in an order that
// depends only on the index. The boxes tested are the index's single
// precision ones, rounded outwards: no pair within r is missed, and a
// pair farther than r by a few units in the seventh digit of the
// coordinates may come too. Elements whose box is within r of an
// element's surface are among the answers, so these are the candidates
// for every "which other part lies within r" question at once.
func (x *Index) ElemPairsNear(r float64, group []int32) [][2]int32 {
	if len(x.elems.ids) < 2 || !(r >= 0) {
		return nil
	}
	j := newNearJoin(x, r, group)
	return slices.Concat(j.elemPairs(j.leafPairs(), nil, nil)...)
}

// contactPairs returns the pairs of elements of different parts whose
// bounding boxes lie within r of each other and that keep accepts (see
// ElemPairsNear), each pair once with the smaller element index first,
// in chunks (as elemPairs gives them). keep gets the two elements, their unit normals (single precision,
// computed only for the leaves near another part) and the squared
// distance of their boxes; it is called from several goroutines at once.
func (x *Index) contactPairs(r float64, keep func(a, b int32, na, nb *[3]float32, d2 float64) bool) [][][2]int32 {
	if len(x.elems.ids) < 2 || !(r >= 0) {
		return nil
	}
	j := newNearJoin(x, r, x.m.ElemPart)
	normal := make([][3]float32, len(x.elems.ids)) // by tree position
	onLeaf := func(i int) {
		lo, hi := j.leafRange(i)
		for k := lo; k < hi; k++ {
			v := x.m.Normal(int(x.elems.ids[k]))
			normal[k] = [3]float32{float32(v.X), float32(v.Y), float32(v.Z)}
		}
	}
	return j.elemPairs(j.leafPairs(), onLeaf, func(e, f, pe, pf int32, d2 float64) bool {
		return keep(e, f, &normal[pe], &normal[pf], d2)
	})
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

// boxesWithin reports whether two float32 boxes lie within squared
// distance r2 of each other. Differences are taken in double precision,
// where they are exact enough that no pair within reach is lost (r2
// carries pruneSlack); an empty box (lo = +Inf, hi = -Inf) is infinitely
// far from everything.
func boxesWithin(a, b *box32, r2 float64) bool {
	d := 0.0
	for k := range 3 {
		if g := float64(b.lo[k]) - float64(a.hi[k]); g > 0 {
			d += g * g
		} else if g := float64(a.lo[k]) - float64(b.hi[k]); g > 0 {
			d += g * g
		} else {
			continue
		}
		if !(d <= r2) {
			return false
		}
	}
	return true
}

// apart32 reports whether boxes a and b lie farther than r apart along
// one axis: a quick test in single precision before the exact one. The
// differences it takes are exact where they are near r (Sterbenz), so it
// never rejects boxes within r.
func apart32(a, b *box32, r float32) bool {
	return b.lo[0]-a.hi[0] > r || a.lo[0]-b.hi[0] > r || b.lo[1]-a.hi[1] > r || a.lo[1]-b.hi[1] > r ||
		b.lo[2]-a.hi[2] > r || a.lo[2]-b.hi[2] > r
}

// dot32 returns the dot product of two float32 vectors in float64.
func dot32(a, b *[3]float32) float64 {
	return float64(a[0])*float64(b[0]) + float64(a[1])*float64(b[1]) + float64(a[2])*float64(b[2])
}
