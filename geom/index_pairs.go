package geom

import (
	"runtime"
	"sync"
	"sync/atomic"
)

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
//
// It walks the element tree against itself (a dual-tree join): a pair of
// tree nodes is skipped when their boxes lie farther apart than r, or
// when both hold elements of one and the same group only, so the work
// follows the places where groups come near each other, not the size of
// the mesh. The walk runs on up to GOMAXPROCS goroutines; the result does
// not depend on their number.
func (x *Index) ElemPairsNear(r float64, group []int32) [][2]int32 {
	t := &x.elems
	if len(t.ids) < 2 || !(r >= 0) {
		return nil
	}
	j := &groupJoin{t: t, group: group, r2: r * r * pruneSlack, label: make([]int32, len(t.boxes))}
	return j.run()
}

// run labels the tree, walks it against itself and returns the pairs
// found, in task order.
func (j *groupJoin) run() [][2]int32 {
	j.labels()
	// Split the walk into tasks at the top of the tree, run them
	// concurrently and join their answers in task order.
	tasks := j.tasks(4 * treeFan * runtime.GOMAXPROCS(0))
	out := make([][][2]int32, len(tasks))
	var next atomic.Int64
	var wg sync.WaitGroup
	for range min(runtime.GOMAXPROCS(0), len(tasks)) {
		wg.Go(func() {
			for {
				i := int(next.Add(1) - 1)
				if i >= len(tasks) {
					return
				}
				out[i] = j.walk(tasks[i].a, tasks[i].b, nil)
			}
		})
	}
	wg.Wait()
	n := 0
	for _, o := range out {
		n += len(o)
	}
	pairs := make([][2]int32, 0, n)
	for _, o := range out {
		pairs = append(pairs, o...)
	}
	return pairs
}

// groupJoin is the state of one ElemPairsNear walk.
type groupJoin struct {
	t     *packedTree
	group []int32
	r2    float64
	// label holds, per tree node (indexed like boxes), the one group all
	// its elements belong to, or -1 when they belong to several.
	label []int32
	// leaves makes the walk stop at leaves: it returns pairs of leaf
	// indices (level-1 nodes) instead of elements, a leaf paired with
	// itself when it holds several groups.
	leaves bool
}

// groupTask is a pair of tree nodes to walk; a == b walks a node against
// itself.
type groupTask struct{ a, b treeRef }

// labels fills label bottom up.
func (j *groupJoin) labels() {
	t := j.t
	for i, id := range t.ids {
		j.label[i] = j.group[id]
	}
	for l := 1; l < t.levels(); l++ {
		for i := range t.count(l) {
			lo, hi := t.children(l, i)
			base := t.level[l-1]
			g := j.label[base+lo]
			for c := lo + 1; c < hi && g >= 0; c++ {
				if j.label[base+c] != g {
					g = -1
				}
			}
			j.label[t.level[l]+i] = g
		}
	}
}

func (j *groupJoin) node(n treeRef) int { return j.t.level[n.l] + int(n.i) }

// tasks splits the walk of the root against itself into at least want
// independent node pairs (fewer for a small tree), in a fixed order.
func (j *groupJoin) tasks(want int) []groupTask {
	top := treeRef{int32(j.t.levels() - 1), 0}
	tasks := []groupTask{{top, top}}
	for len(tasks) < want {
		var split []groupTask
		grew := false
		for _, tk := range tasks {
			if tk.a != tk.b || tk.a.l == 0 || j.leaves && tk.a.l == 1 {
				split = append(split, tk)
				continue
			}
			grew = true
			lo, hi := j.t.children(int(tk.a.l), int(tk.a.i))
			for c := lo; c < hi; c++ {
				for d := c; d < hi; d++ {
					a, b := treeRef{tk.a.l - 1, int32(c)}, treeRef{tk.a.l - 1, int32(d)}
					if a == b || j.near(a, b) {
						split = append(split, groupTask{a, b})
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

// near reports whether nodes a and b may hold a pair: their boxes within
// r, and not both of one group.
func (j *groupJoin) near(a, b treeRef) bool {
	return j.nearAt(j.node(a), j.node(b))
}

// nearAt is near for nodes given by their index in boxes.
func (j *groupJoin) nearAt(ia, ib int) bool {
	if la := j.label[ia]; la >= 0 && la == j.label[ib] {
		return false
	}
	return boxesWithin(&j.t.boxes[ia], &j.t.boxes[ib], j.r2)
}

// walk appends the pairs under nodes a and b (a == b: under a alone).
func (j *groupJoin) walk(a, b treeRef, dst [][2]int32) [][2]int32 {
	t := j.t
	if a == b {
		if a.l == 0 {
			return dst
		}
		if j.leaves && a.l == 1 {
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
	switch {
	case a.l == 1 && b.l == 1 && j.leaves:
		return append(dst, [2]int32{min(a.i, b.i), max(a.i, b.i)})
	case a.l == 1 && b.l == 1:
		return j.leafItems(int(a.i), int(b.i), dst)
	case a.l == 0 && b.l == 0:
		ea, eb := t.ids[a.i], t.ids[b.i]
		if j.group[ea] == j.group[eb] {
			return dst
		}
		return append(dst, [2]int32{min(ea, eb), max(ea, eb)})
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

// leafItems appends the pairs of items of two leaves (level-1 nodes a
// and b, a != b).
func (j *groupJoin) leafItems(a, b int, dst [][2]int32) [][2]int32 {
	t := j.t
	alo, ahi := t.children(1, a)
	blo, bhi := t.children(1, b)
	bbox := &t.boxes[t.level[1]+b]
	for ia := alo; ia < ahi; ia++ {
		ga, boxA := j.label[ia], &t.boxes[ia]
		if ga == j.label[t.level[1]+b] || !boxesWithin(boxA, bbox, j.r2) {
			continue
		}
		for ib := blo; ib < bhi; ib++ {
			if j.label[ib] == ga || !boxesWithin(boxA, &t.boxes[ib], j.r2) {
				continue
			}
			ea, eb := t.ids[ia], t.ids[ib]
			if ea > eb {
				ea, eb = eb, ea
			}
			dst = append(dst, [2]int32{ea, eb})
		}
	}
	return dst
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
