package geom

import (
	"math"
	mbits "math/bits"
	"runtime"
	"sync"
	"sync/atomic"

	"gonum.org/v1/gonum/spatial/r3"
)

// treeFan is the number of children of each node of a packedTree.
const treeFan = 16

// box32 is an axis-aligned box in single precision, rounded outwards so
// that it contains the double-precision box it was made from.
type box32 struct {
	lo, hi [3]float32
}

// emptyBox32 returns a box that contains nothing; union with it is the
// identity.
func emptyBox32() box32 {
	inf := float32(math.Inf(1))
	return box32{lo: [3]float32{inf, inf, inf}, hi: [3]float32{-inf, -inf, -inf}}
}

// down32 and up32 round x to a float32 not above (below) it. When the
// nearest float32 is on the wrong side, the next one is one step of its
// bits away (math.Nextafter32, inlined: it runs for every box of the
// index). The step is taken without a branch, which the processor could
// not predict (the nearest float32 lies on either side about as often):
// towards -Inf the bits go down for a positive float32 and up for a
// negative one (-0 included: its next is the smallest negative); +0,
// which only a positive x rounds to, never steps down. up32 mirrors it.
func down32(x float64) float32 {
	f := float32(x)
	b := math.Float32bits(f)
	var step uint32
	if float64(f) > x {
		step = 1
	}
	neg := b >> 31
	return math.Float32frombits(b + step*(2*neg-1)) // 2*neg-1 wraps to -1 for a positive f
}

func up32(x float64) float32 {
	f := float32(x)
	b := math.Float32bits(f)
	var step uint32
	if float64(f) < x {
		step = 1
	}
	neg := b >> 31
	return math.Float32frombits(b + step*(1-2*neg)) // 1-2*neg wraps to -1 for a negative f
}

// box32Of returns the float32 box around a double-precision box.
func box32Of(lo, hi r3.Vec) box32 {
	return box32{
		lo: [3]float32{down32(lo.X), down32(lo.Y), down32(lo.Z)},
		hi: [3]float32{up32(hi.X), up32(hi.Y), up32(hi.Z)},
	}
}

// union grows b to contain c. NaN bounds are ignored.
func (b *box32) union(c *box32) {
	for k := range 3 {
		if c.lo[k] < b.lo[k] {
			b.lo[k] = c.lo[k]
		}
		if c.hi[k] > b.hi[k] {
			b.hi[k] = c.hi[k]
		}
	}
}

// dist2 returns the squared distance from p to the box (0 inside). An
// empty box (lo = +Inf, hi = -Inf) is infinitely far from a finite p.
func (b *box32) dist2(p *[3]float64) float64 {
	return axisDist2(p[0], b.lo[0], b.hi[0]) + axisDist2(p[1], b.lo[1], b.hi[1]) + axisDist2(p[2], b.lo[2], b.hi[2])
}

func axisDist2(v float64, lo, hi float32) float64 {
	if d := float64(lo) - v; d > 0 {
		return d * d
	}
	if d := v - float64(hi); d > 0 {
		return d * d
	}
	return 0
}

// packedTree is a static bounding-box hierarchy over n items, packed in
// the manner of a packed R-tree: the items are sorted along a Morton
// (Z-order) curve of their box centres, consecutive runs of treeFan items
// form the leaves, runs of treeFan leaves the next level, and so on up to
// a single root. Level l occupies boxes[level[l]:level[l+1]]; the children
// of node i of level l are nodes i*treeFan .. i*treeFan+treeFan-1 of level
// l-1; level 0 holds the item boxes, ids[i] being the item of box i.
//
// A packedTree is read-only after construction and safe for concurrent
// queries.
type packedTree struct {
	ids   []int32
	boxes []box32
	level []int
}

// treeItems describes the items a packedTree is built over.
type treeItems interface {
	// Len returns the number of items.
	Len() int
	// Box returns the double-precision bounding box of item i.
	Box(i int) (lo, hi r3.Vec)
}

// parallelBlock is the block size of parallelBlocks: block b covers
// [b*parallelBlock, (b+1)*parallelBlock).
const parallelBlock = 1 << 15

// parallelBlocks calls fn on consecutive blocks of [0, n), from up to
// GOMAXPROCS goroutines, and returns when all are done.
func parallelBlocks(n int, fn func(from, to int)) {
	const block = parallelBlock
	nb := (n + block - 1) / block
	var next atomic.Int64
	var wg sync.WaitGroup
	for range min(runtime.GOMAXPROCS(0), nb) {
		wg.Go(func() {
			for {
				b := int(next.Add(1) - 1)
				if b >= nb {
					return
				}
				fn(b*block, min((b+1)*block, n))
			}
		})
	}
	wg.Wait()
}

// newPackedTree builds a packedTree over the items in O(n) time (one
// radix sort), holding 28 bytes per item and needing about 24 more while
// it builds; it computes each item's box twice.
func newPackedTree(items treeItems) packedTree {
	n := items.Len()
	if n == 0 {
		return packedTree{level: []int{0, 0}}
	}
	t := newLevels(n)
	// Item boxes in input order, computed straight into the tree's array
	// (they serve only for the codes), with the bounds of their centres.
	// Blocks of items run concurrently; each item's box depends on the
	// item alone and min/max merge in any order, so the result does not
	// depend on the number of goroutines.
	boxes := t.boxes[:n]
	var c centreBounds
	parallelBlocks(n, func(from, to int) {
		var b centreBounds
		b.reset()
		for i := from; i < to; i++ {
			lo, hi := items.Box(i)
			boxes[i] = box32Of(lo, hi)
			b.add(&boxes[i])
		}
		c.merge(&b)
	})
	t.ids = curveOrder(boxes, &c)

	// Level 0: the item boxes in curve order, made again from the items
	// in input order over the boxes in input order, which only served
	// for the codes, each written to its rank on the curve (reading the
	// items in curve order instead would chase one cache miss after
	// another through the mesh); then the unions.
	rank := MakeLarge[int32](n)
	for i, id := range t.ids {
		rank[id] = int32(i)
	}
	parallelBlocks(n, func(from, to int) {
		for i := from; i < to; i++ {
			boxes[rank[i]] = box32Of(items.Box(i))
		}
	})
	t.unions()
	return t
}

// sortItems finishes a tree made by newLevels whose item boxes have been
// filled in item order (boxes[i] is item i's): it puts them in curve
// order, as newPackedTree would order the same boxes, and makes the
// levels above. It holds a second array of boxes while it sorts (a
// gather by blocks runs on every core; the permutation in place did not).
func (t *packedTree) sortItems() {
	n := t.level[1]
	if n == 0 {
		return
	}
	boxes := t.boxes[:n]
	var c centreBounds
	parallelBlocks(n, func(from, to int) {
		var b centreBounds
		b.reset()
		for i := from; i < to; i++ {
			b.add(&boxes[i])
		}
		c.merge(&b)
	})
	t.ids = curveOrder(boxes, &c)
	// Level 0 in curve order: box k becomes the box of item ids[k],
	// gathered by blocks concurrently into a new array (the old one,
	// in item order, is garbage then).
	sorted := MakeLarge[box32](len(t.boxes))
	parallelBlocks(n, func(from, to int) {
		for k := from; k < to; k++ {
			sorted[k] = boxes[t.ids[k]]
		}
	})
	t.boxes = sorted
	t.unions()
}

// newLevels returns a tree over n > 0 items with its levels' sizes set
// and its boxes allocated.
func newLevels(n int) packedTree {
	t := packedTree{level: []int{0}}
	total := 0
	for c := n; ; c = (c + treeFan - 1) / treeFan {
		total += c
		t.level = append(t.level, total)
		if c == 1 {
			break
		}
	}
	t.boxes = MakeLarge[box32](total)
	return t
}

// centreBounds are the bounds of the centres of item boxes, merged from
// blocks of items under a lock.
type centreBounds struct {
	mu     sync.Mutex
	lo, hi [3]float64
	set    bool
}

func (c *centreBounds) reset() {
	c.lo = [3]float64{math.Inf(1), math.Inf(1), math.Inf(1)}
	c.hi = [3]float64{math.Inf(-1), math.Inf(-1), math.Inf(-1)}
	c.set = true
}

// add takes in the centre of box b (NaN bounds are ignored).
func (c *centreBounds) add(b *box32) {
	for k := range 3 {
		m := (float64(b.lo[k]) + float64(b.hi[k])) / 2
		c.lo[k], c.hi[k] = minIgnoreNaN(c.lo[k], m), maxIgnoreNaN(c.hi[k], m)
	}
}

// merge takes in the bounds of a block.
func (c *centreBounds) merge(b *centreBounds) {
	c.mu.Lock()
	defer c.mu.Unlock()
	if !c.set {
		c.reset()
	}
	for k := range 3 {
		c.lo[k], c.hi[k] = minIgnoreNaN(c.lo[k], b.lo[k]), maxIgnoreNaN(c.hi[k], b.hi[k])
	}
}

// curveOrder returns the items in the order of the Morton codes of their
// box centres (stable: ties keep the item order), c the centres' bounds.
func curveOrder(boxes []box32, c *centreBounds) []int32 {
	n := len(boxes)
	// One scale for all axes so that the curve's cells are cubes: a
	// scale per axis would stretch the cells of a flat model.
	// The resolution grows with n: a few cells per item along each axis.
	bits := min(mortonBits, max(6, (mbits.Len(uint(n))+2)/3+4))
	top := uint64(1)<<bits - 1
	var scale float64
	if d := max(c.hi[0]-c.lo[0], c.hi[1]-c.lo[1], c.hi[2]-c.lo[2]); d > 0 && !math.IsInf(d, 0) {
		scale = float64(top) / d
	}
	codes := MakeLarge[uint64](n)
	ids := MakeLarge[int32](n)
	parallelBlocks(n, func(from, to int) {
		for i := from; i < to; i++ {
			b := &boxes[i]
			var q [3]uint64
			for k := range 3 {
				q[k] = quantize((float64(b.lo[k])+float64(b.hi[k]))/2, c.lo[k], scale, top)
			}
			codes[i] = morton3(q[0], q[1], q[2])
			ids[i] = int32(i)
		}
	})
	radixSort(codes, ids, 3*bits)
	return ids
}

// unions fills the levels above 0 with the unions of their children.
func (t *packedTree) unions() {
	for l := 1; l+1 < len(t.level); l++ {
		child := t.boxes[t.level[l-1]:t.level[l]]
		for i := range t.level[l+1] - t.level[l] {
			b := emptyBox32()
			for j := i * treeFan; j < min(i*treeFan+treeFan, len(child)); j++ {
				b.union(&child[j])
			}
			t.boxes[t.level[l]+i] = b
		}
	}
}

// levels returns the number of levels; the root is node 0 of level
// levels()-1.
func (t *packedTree) levels() int { return len(t.level) - 1 }

// count returns the number of nodes of level l.
func (t *packedTree) count(l int) int { return t.level[l+1] - t.level[l] }

// box returns node i of level l.
func (t *packedTree) box(l, i int) *box32 { return &t.boxes[t.level[l]+i] }

// children returns the range of child indices of node i of level l >= 1.
func (t *packedTree) children(l, i int) (lo, hi int) {
	return i * treeFan, min(i*treeFan+treeFan, t.count(l-1))
}

// treeRef names node i of level l.
type treeRef struct {
	l, i int32
}

// appendWithin appends to dst the items whose float32 box lies within
// squared distance r2 of p, in tree order. The float32 boxes are rounded
// outwards, so callers apply their exact test to the result.
func (t *packedTree) appendWithin(dst []int32, p *[3]float64, r2 float64) []int32 {
	t.within(p, r2, func(k int, _ float64) { dst = append(dst, t.ids[k]) })
	return dst
}

// within calls fn, in tree order, for every item whose float32 box lies
// within squared distance r2 of p, with its index k in level 0 (the
// item is ids[k]) and the squared distance d2 from p to that box: a
// lower bound of the distance to the item itself.
func (t *packedTree) within(p *[3]float64, r2 float64, fn func(k int, d2 float64)) {
	if len(t.ids) == 0 {
		return
	}
	var buf [8 * treeFan]treeRef
	stack := buf[:0]
	top := t.levels() - 1
	if d2 := t.box(top, 0).dist2(p); d2 > r2 {
		return
	} else if top == 0 {
		fn(0, d2)
		return
	}
	stack = append(stack, treeRef{int32(top), 0})
	for len(stack) > 0 {
		n := stack[len(stack)-1]
		stack = stack[:len(stack)-1]
		lo, hi := t.children(int(n.l), int(n.i))
		if n.l == 1 {
			items := t.boxes[lo:hi] // level 0 starts at 0
			for j := range items {
				if d2 := items[j].dist2(p); d2 <= r2 {
					fn(lo+j, d2)
				}
			}
			continue
		}
		base := t.level[n.l-1]
		for j := lo; j < hi; j++ {
			if t.boxes[base+j].dist2(p) <= r2 {
				stack = append(stack, treeRef{n.l - 1, int32(j)})
			}
		}
	}
}

// queued is a tree node waiting in a best-first search, with the squared
// distance from the query point to its box.
type queued struct {
	d2 float64
	n  treeRef
}

// nodeQueue is a binary min-heap of queued nodes by d2.
type nodeQueue []queued

func (q *nodeQueue) push(x queued) {
	h := append(*q, x)
	i := len(h) - 1
	for i > 0 {
		parent := (i - 1) / 2
		if h[parent].d2 <= h[i].d2 {
			break
		}
		h[parent], h[i] = h[i], h[parent]
		i = parent
	}
	*q = h
}

func (q *nodeQueue) pop() queued {
	h := *q
	top := h[0]
	last := len(h) - 1
	h[0] = h[last]
	h = h[:last]
	i := 0
	for {
		l := 2*i + 1
		if l >= len(h) {
			break
		}
		if r := l + 1; r < len(h) && h[r].d2 < h[l].d2 {
			l = r
		}
		if h[i].d2 <= h[l].d2 {
			break
		}
		h[i], h[l] = h[l], h[i]
		i = l
	}
	*q = h
	return top
}

// nearestSearch visits the items of t in increasing order of their box
// distance to p, by leaf: it calls leaf for the item range [lo, hi) of
// level 0 of every leaf whose box is within bound() of p, nearest leaf
// first, and stops when the next leaf is farther than bound(), which the
// callback may lower as it finds items.
func (t *packedTree) nearestSearch(p *[3]float64, bound func() float64, leaf func(lo, hi int)) {
	if len(t.ids) == 0 {
		return
	}
	top := t.levels() - 1
	if top == 0 {
		leaf(0, len(t.ids))
		return
	}
	var buf [64]queued
	q := nodeQueue(buf[:0])
	if d := t.box(top, 0).dist2(p); d <= bound() {
		q.push(queued{d, treeRef{int32(top), 0}})
	}
	for len(q) > 0 {
		n := q.pop()
		if n.d2 > bound() {
			break
		}
		lo, hi := t.children(int(n.n.l), int(n.n.i))
		if n.n.l == 1 {
			leaf(lo, hi)
			continue
		}
		base := t.level[n.n.l-1]
		b := bound()
		for j := lo; j < hi; j++ {
			if d := t.boxes[base+j].dist2(p); d <= b {
				q.push(queued{d, treeRef{n.n.l - 1, int32(j)}})
			}
		}
	}
}

// Bytes returns the memory held by the tree.
func (t *packedTree) Bytes() int { return 4*len(t.ids) + 24*len(t.boxes) + 8*len(t.level) }

func minIgnoreNaN(a, b float64) float64 {
	if b < a {
		return b
	}
	return a
}

func maxIgnoreNaN(a, b float64) float64 {
	if b > a {
		return b
	}
	return a
}

// mortonBits is the largest resolution of a Morton code per axis.
const mortonBits = 16

// quantize maps v in [lo, lo+top/scale] to 0..top; NaN maps to 0.
func quantize(v, lo, scale float64, top uint64) uint64 {
	t := (v - lo) * scale
	if !(t > 0) {
		return 0
	}
	if t >= float64(top) {
		return top
	}
	return uint64(t)
}

// spread3 inserts two zero bits after each of the low 16 bits of x.
func spread3(x uint64) uint64 {
	x &= 0xffff
	x = (x | x<<16) & 0x0000ff0000ff
	x = (x | x<<8) & 0x00f00f00f00f
	x = (x | x<<4) & 0x0c30c30c30c3
	x = (x | x<<2) & 0x249249249249
	return x
}

// morton3 interleaves the bits of three 16-bit coordinates into a 48-bit
// Z-order code, x in the lowest bit.
func morton3(x, y, z uint64) uint64 {
	return spread3(x) | spread3(y)<<1 | spread3(z)<<2
}

// radixSort sorts keys of at most keyBits bits ascending, permuting ids
// alongside; the sort is stable. It is a least-significant-digit radix
// sort with 11-bit digits whose histograms are all counted in one pass.
func radixSort(keys []uint64, ids []int32, keyBits int) {
	const digit = 11
	const buckets = 1 << digit
	n := len(keys)
	if n < 2 {
		return
	}
	passes := (keyBits + digit - 1) / digit
	counts := make([][buckets]int, passes)
	for _, k := range keys {
		for p := range counts {
			counts[p][(k>>(p*digit))&(buckets-1)]++
		}
	}
	origK, origI := keys, ids
	tk := MakeLarge[uint64](n)
	ti := MakeLarge[int32](n)
	for p := range counts {
		count := &counts[p]
		shift := p * digit
		if count[(keys[0]>>shift)&(buckets-1)] == n {
			continue // every key has the same digit
		}
		sum := 0
		for b, c := range count {
			count[b] = sum
			sum += c
		}
		for i, k := range keys {
			b := (k >> shift) & (buckets - 1)
			tk[count[b]] = k
			ti[count[b]] = ids[i]
			count[b]++
		}
		keys, tk = tk, keys
		ids, ti = ti, ids
	}
	if &keys[0] != &origK[0] {
		copy(origK, keys)
		copy(origI, ids)
	}
}
