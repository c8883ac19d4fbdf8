package html

import (
	"cmp"
	"math"
	"runtime"
	"slices"
	"sync"
	"sync/atomic"

	"gonum.org/v1/gonum/spatial/r3"

	"github.com/joinery-cae/joinery/geom"
)

// Outline is what the pictures draw of a model: the free edges of every
// part (the edges of geom.FreeEdges), chained into polylines at full
// resolution. Each picture projects and simplifies them for its own
// scale.
type Outline struct {
	Parts []PartOutline // by part id
}

// PartOutline is the outline of one part.
type PartOutline struct {
	ID     int64
	Name   string
	Chains []Chain
}

// Chain is a polyline of free edges; a closed one repeats its first
// point at the end.
type Chain []r3.Vec

// OutlineTolerance, mm, is how far an outline may stray from the free
// edges it stands for: NewOutline simplifies the chains to within it
// (Douglas-Peucker in 3-D), and an orthographic projection keeps the
// bound. It is half a pixel at the largest scale the page draws (the
// plan view of a short flange, 10 pixels per mm), so no picture shows
// the difference (our choice).
const OutlineTolerance = 0.05

// NewOutline returns the outline of m. It reads m only, so it may run
// while other steps read the same mesh.
//
// It finds the free edges part by part, without a node-to-element
// table: every element edge is filed under its lower node, and an edge
// is free when its higher node appears once among the edges filed under
// its lower node. That is the definition of geom.FreeEdges (an edge no
// other element of the same part shares; collapsed edges left out),
// checked against it in the tests; with the chaining it takes about a
// third of the time of geom.FreeEdges and geom.FreeEdgeLoops, which also
// build the loops' bookkeeping (pieces, outlines) that a picture does
// not need (BenchmarkOutline).
func NewOutline(m *geom.Mesh) *Outline {
	parts := make([]PartOutline, len(m.Parts))
	eachPart(m, func(t *partTables, pi int, es []int32) {
		nodes := t.nodeChains(m, es)
		chains := make([]Chain, len(nodes))
		for k, ns := range nodes {
			c := make(Chain, len(ns))
			for i, n := range ns {
				c[i] = m.Coords[n]
			}
			chains[k] = simplify3(c, OutlineTolerance)
		}
		p := m.Parts[pi]
		parts[pi] = PartOutline{ID: p.ID, Name: p.Name, Chains: chains}
	})
	slices.SortFunc(parts, func(a, b PartOutline) int { return cmp.Compare(a.ID, b.ID) })
	return &Outline{Parts: parts}
}

// In returns the outline, whose points are in mm, in a unit of mm
// millimetres (joints.Unit.MM): the unit of the documents a page draws
// it with. It returns o itself for mm 1 (or nil), else a copy.
func (o *Outline) In(mm float64) *Outline {
	if o == nil || mm == 1 || !(mm > 0) {
		return o
	}
	out := &Outline{Parts: make([]PartOutline, len(o.Parts))}
	for i, p := range o.Parts {
		q := PartOutline{ID: p.ID, Name: p.Name, Chains: make([]Chain, len(p.Chains))}
		for k, c := range p.Chains {
			cc := make(Chain, len(c))
			for j, v := range c {
				cc[j] = r3.Scale(1/mm, v)
			}
			q.Chains[k] = cc
		}
		out.Parts[i] = q
	}
	return out
}

// partChains returns the free edges of every part of m (see NewOutline)
// chained into polylines of node indices, indexed by part index.
func partChains(m *geom.Mesh) [][][]int32 {
	out := make([][][]int32, len(m.Parts))
	eachPart(m, func(t *partTables, pi int, es []int32) { out[pi] = t.nodeChains(m, es) })
	return out
}

// eachPart calls part for every part of m (its index and elements, in
// element order) from GOMAXPROCS goroutines, each with its own working
// tables. part must write only what belongs to its part, so that the
// result does not depend on the schedule. Each part is done on its own,
// with its nodes numbered locally, so that the tables stay small enough
// for the processor's caches whatever the size of the model.
func eachPart(m *geom.Mesh, part func(t *partTables, pi int, es []int32)) {
	first := make([]int32, len(m.Parts)+1)
	for _, p := range m.ElemPart {
		first[p+1]++
	}
	for i := 1; i < len(first); i++ {
		first[i] += first[i-1]
	}
	elems := make([]int32, len(m.ElemPart))
	fill := slices.Clone(first[:len(m.Parts)])
	for e, p := range m.ElemPart {
		elems[fill[p]] = int32(e)
		fill[p]++
	}
	var next atomic.Int64
	var wg sync.WaitGroup
	for range min(runtime.GOMAXPROCS(0), len(m.Parts)) {
		wg.Go(func() {
			var t partTables
			for {
				pi := int(next.Add(1) - 1)
				if pi >= len(m.Parts) {
					return
				}
				part(&t, pi, elems[first[pi]:first[pi+1]])
			}
		})
	}
	wg.Wait()
}

// nodeChains returns the free edges of the part made of elements es
// chained into polylines of node indices (see chains).
func (t *partTables) nodeChains(m *geom.Mesh, es []int32) [][]int32 {
	if len(es) == 0 {
		return nil
	}
	// Number the part's nodes locally, through a table over the range
	// of node indices the part uses (meshes number a part's nodes
	// together, so the range is short).
	lo, hi := int32(math.MaxInt32), int32(-1)
	for _, e := range es {
		for _, n := range m.Conn[m.ElemStart[e]:m.ElemStart[e+1]] {
			lo, hi = min(lo, n), max(hi, n)
		}
	}
	if r := int(hi-lo) + 1; len(t.local) < r {
		// Zero, and written before it is read: fresh memory first read
		// maps a shared page of zeros, which every first write then
		// replaces, and on a machine with other threads running each
		// replacement stops them all (a flush of their address
		// translations).
		t.local = make([]int32, r)
		clear(t.local)
	}
	local := t.local[:hi-lo+1] // node - lo -> 1 + its local number, else 0
	// Number the nodes in the order they come (t.global), keeping each
	// element's local corners.
	t.global = t.global[:0]
	t.corners = grow(t.corners, 4*len(es))
	for i, e := range es {
		nodes := m.Conn[m.ElemStart[e]:m.ElemStart[e+1]]
		nc := m.Type(int(e)).Corners()
		c := t.corners[4*i : 4*i+4]
		c[3] = -1
		for k, n := range nodes[:nc] {
			l := &local[n-lo]
			if *l == 0 {
				t.global = append(t.global, n)
				*l = int32(len(t.global))
			}
			c[k] = *l - 1
		}
	}
	// Then renumber them by node id, so that nothing after depends on
	// the order of the elements (or nodes) in the file: t.rank takes a
	// first-come number to the node's rank by id. The scan of the range
	// gives them by node index, which is by id where the file lists its
	// nodes by id (the common case); else they are sorted.
	nn := len(t.global)
	t.rank = grow(t.rank, nn)
	t.order = t.order[:0]
	for i, l := range local {
		if l != 0 {
			t.rank[l-1] = int32(len(t.order))
			t.order = append(t.order, lo+int32(i))
			local[i] = 0
		}
	}
	if !idsIncrease(m.NodeIDs, t.order) {
		slices.SortFunc(t.order, func(a, b int32) int { return cmp.Compare(m.NodeIDs[a], m.NodeIDs[b]) })
		for k, n := range t.order {
			local[n-lo] = int32(k)
		}
		for k, n := range t.global {
			t.rank[k] = local[n-lo]
			local[n-lo] = 0
		}
	}
	t.global, t.order = t.order, t.global
	// Renumber the corners, and count the edges filed under each lower
	// node (for freeEdges).
	t.start = grow(t.start, nn+1)
	clear(t.start)
	for i := 0; i < len(t.corners); i += 4 {
		c := t.corners[i : i+4]
		nc := 4 - int(c[3]>>31&1)
		for k := range c[:nc] {
			c[k] = t.rank[c[k]]
		}
		prev := c[nc-1]
		for _, n := range c[:nc] {
			if n != prev { // collapsed edges bound nothing
				t.start[min(n, prev)+1]++
			}
			prev = n
		}
	}
	t.freeEdges()
	return t.chains()
}

// partTables are the working tables of one part, in local node numbers;
// they are reused from part to part.
type partTables struct {
	local   []int32 // node index - the part's lowest -> 1 + local node, else 0
	global  []int32 // local node -> node index, by node id
	order   []int32 // scratch for global
	rank    []int32 // first-come local node -> local node
	corners []int32 // 4 local corner nodes per element; the 4th is -1 for triangles
	start   []int32 // edge buckets by lower node, then free-edge incidences by node
	filed   []int32 // higher nodes of the edges, by bucket
	free    []int32 // free edges: pairs of local nodes
	inc     []int32 // free edges by node
	seen    []int32 // uses of a higher node in the current bucket
	used    []bool
}

func grow(s []int32, n int) []int32 { return slices.Grow(s[:0], n)[:n] }

// idsIncrease reports whether the ids of nodes rise along nodes.
func idsIncrease(ids []int64, nodes []int32) bool {
	for k := 1; k < len(nodes); k++ {
		if ids[nodes[k]] <= ids[nodes[k-1]] {
			return false
		}
	}
	return true
}

// freeEdges sets t.free to the part's free edges, from the bucket sizes
// nodeChains counted: every element edge is filed under its lower node,
// and an edge is free when its higher node appears once in its lower
// node's bucket. Free edges come by lower node, then by higher node:
// in the order of their nodes' ids.
func (t *partTables) freeEdges() {
	nn := len(t.global)
	// t.start[lo+1] counts the edges of lo's bucket (see nodeChains); file
	// them.
	for i := 1; i <= nn; i++ {
		t.start[i] += t.start[i-1]
	}
	t.filed = grow(t.filed, int(t.start[nn]))
	for i := 0; i < len(t.corners); i += 4 {
		c := t.corners[i : i+4]
		nc := 4 - int(c[3]>>31&1)
		prev := c[nc-1]
		for _, n := range c[:nc] {
			if n != prev {
				lo := min(n, prev)
				t.filed[t.start[lo]] = max(n, prev)
				t.start[lo]++
			}
			prev = n
		}
	}
	// t.start[lo] is now the end of lo's bucket. Count each bucket's
	// higher nodes in t.seen, keep those seen once, and clear the counts.
	t.seen = grow(t.seen, nn)
	clear(t.seen)
	t.free = t.free[:0]
	from := int32(0)
	for lo := range int32(nn) {
		bucket := t.filed[from:t.start[lo]]
		from = t.start[lo]
		for _, hi := range bucket {
			t.seen[hi]++
		}
		at := len(t.free)
		for _, hi := range bucket {
			if t.seen[hi] == 1 {
				t.free = append(t.free, lo, hi)
				// By higher node: the bucket is filed in element
				// order, and holds a few edges.
				for k := len(t.free) - 2; k > at && t.free[k-1] > hi; k -= 2 {
					t.free[k+1], t.free[k-1] = t.free[k-1], hi
				}
			}
		}
		for _, hi := range bucket {
			t.seen[hi] = 0
		}
	}
}

// chains chains t.free into polylines of node indices, following edges
// regardless of direction; closed chains repeat their first node. Where
// more than two free edges meet at a node the unused edge of lowest
// index is taken, and chains start at the unused edge of lowest index,
// so the result depends only on the order of t.free, which is by node
// id (see freeEdges): a closed chain starts at its node of lowest id
// and goes on to the lower of its two neighbours, and chains come by
// the lowest id of their nodes.
func (t *partTables) chains() [][]int32 {
	nn := len(t.global)
	ne := len(t.free) / 2
	if ne == 0 {
		return nil
	}
	// Incidences by node, each node's in increasing edge order.
	t.start = grow(t.start, nn+1)
	clear(t.start)
	for _, n := range t.free {
		t.start[n+1]++
	}
	for i := 1; i <= nn; i++ {
		t.start[i] += t.start[i-1]
	}
	t.inc = grow(t.inc, 2*ne)
	for i, n := range t.free {
		t.inc[t.start[n]] = int32(i / 2)
		t.start[n]++
	}
	// t.start[n] is now the end of n's incidences; n's start is t.start[n-1].
	at := func(n int32) []int32 {
		lo := int32(0)
		if n > 0 {
			lo = t.start[n-1]
		}
		return t.inc[lo:t.start[n]]
	}
	t.used = slices.Grow(t.used[:0], ne)[:ne]
	clear(t.used)
	// walk follows unused edges from v until it reaches stop or a dead
	// end, appending the nodes it passes.
	walk := func(v, stop int32, nodes []int32) []int32 {
		for {
			next := int32(-1)
			for _, e := range at(v) {
				if !t.used[e] {
					next = e
					break
				}
			}
			if next < 0 {
				return nodes
			}
			t.used[next] = true
			w := t.free[2*next]
			if w == v {
				w = t.free[2*next+1]
			}
			nodes = append(nodes, w)
			if w == stop {
				return nodes
			}
			v = w
		}
	}
	var chains [][]int32
	for e := range int32(ne) {
		if t.used[e] {
			continue
		}
		t.used[e] = true
		a, b := t.free[2*e], t.free[2*e+1]
		nodes := walk(b, a, []int32{a, b})
		if nodes[len(nodes)-1] != a {
			back := walk(a, -1, nil)
			slices.Reverse(back)
			nodes = append(back, nodes...)
		}
		for i, n := range nodes {
			nodes[i] = t.global[n]
		}
		chains = append(chains, nodes)
	}
	return chains
}

// simplify3 returns the points of c that the Douglas-Peucker algorithm
// keeps for tolerance tol (mm): every dropped point lies within tol of
// the segment that replaces it. The ends are kept. It reuses c's
// storage.
func simplify3(c Chain, tol float64) Chain {
	if len(c) <= 2 {
		return c
	}
	keep := make([]bool, len(c))
	keep[0], keep[len(c)-1] = true, true
	stack := [][2]int{{0, len(c) - 1}}
	tol2 := tol * tol
	for len(stack) > 0 {
		s := stack[len(stack)-1]
		stack = stack[:len(stack)-1]
		a, b := c[s[0]], c[s[1]]
		ab := r3.Sub(b, a)
		l2 := r3.Dot(ab, ab)
		far, at := 0.0, -1
		for i := s[0] + 1; i < s[1]; i++ {
			ap := r3.Sub(c[i], a)
			d2 := r3.Dot(ap, ap)
			if l2 > 0 {
				t := min(max(r3.Dot(ap, ab)/l2, 0), 1)
				d := r3.Sub(ap, r3.Scale(t, ab))
				d2 = r3.Dot(d, d)
			}
			if d2 > far {
				far, at = d2, i
			}
		}
		if far > tol2 {
			keep[at] = true
			stack = append(stack, [2]int{s[0], at}, [2]int{at, s[1]})
		}
	}
	out := c[:0]
	for i, k := range keep {
		if k {
			out = append(out, c[i])
		}
	}
	return out
}
