package geom

import (
	"cmp"
	"slices"

	"gonum.org/v1/gonum/spatial/r3"
)

// Adjacency lists, for every node, the elements that use it (compressed
// rows: the elements of node n are Elems[Start[n]:Start[n+1]], in
// increasing order).
type Adjacency struct {
	Start []int32
	Elems []int32
}

// NodeElements builds the node-to-element adjacency of m in O(n) time.
func NodeElements(m *Mesh) Adjacency {
	nn := m.NumNodes()
	start := make([]int32, nn+1)
	for _, n := range m.Conn {
		start[n+1]++
	}
	for i := 1; i <= nn; i++ {
		start[i] += start[i-1]
	}
	fill := make([]int32, nn)
	elems := make([]int32, len(m.Conn))
	for e := range m.ElemIDs {
		for _, n := range m.ElemNodes(e) {
			elems[start[n]+fill[n]] = int32(e)
			fill[n]++
		}
	}
	return Adjacency{Start: start, Elems: elems}
}

// Of returns the elements that use node n. The slice aliases a: do not
// modify it.
func (a Adjacency) Of(n int32) []int32 { return a.Elems[a.Start[n]:a.Start[n+1]] }

// Edge is one edge of one element: from corner Local to the next corner,
// joining nodes A and B (node indices). The edge of a second-order
// element is curved: Mid is its midside node, -1 for a straight edge.
// Edges are identified by their corner nodes A and B.
type Edge struct {
	Elem  int32
	Local int8
	A, B  int32
	Mid   int32
}

// ElemEdge returns edge k of element e.
func (m *Mesh) ElemEdge(e, k int) Edge {
	nodes := m.ElemNodes(e)
	t := m.Type(e)
	nc := t.Corners()
	ed := Edge{Elem: int32(e), Local: int8(k), A: nodes[k], B: nodes[(k+1)%nc], Mid: -1}
	if t.Quadratic() {
		ed.Mid = nodes[nc+k]
	}
	return ed
}

// EdgeDistance returns the distance from q to edge ed: to the segment
// between its corners, or to the quadratic curve through its corners and
// midside node (CurveDistance).
func (m *Mesh) EdgeDistance(ed Edge, q r3.Vec) float64 {
	if ed.Mid < 0 {
		return SegmentDistance(q, m.Coords[ed.A], m.Coords[ed.B])
	}
	d, _ := CurveDistance(q, m.Coords[ed.A], m.Coords[ed.Mid], m.Coords[ed.B])
	return d
}

// EdgeLength returns the length of edge ed, mm: of the segment between
// its corners, or of the quadratic curve through its midside node (by
// five-point Gauss-Legendre quadrature of the curve's speed, accurate to
// rounding for the gentle curvature of shell edges).
func (m *Mesh) EdgeLength(ed Edge) float64 {
	a, b := m.Coords[ed.A], m.Coords[ed.B]
	if ed.Mid < 0 {
		return r3.Norm(r3.Sub(b, a))
	}
	mid := m.Coords[ed.Mid]
	e := r3.Scale(0.5, r3.Sub(b, a))
	k := r3.Sub(r3.Scale(0.5, r3.Add(a, b)), mid)
	// Five-point Gauss-Legendre rule (Abramowitz and Stegun, table 25.4).
	xs := [5]float64{-0.9061798459386640, -0.5384693101056831, 0, 0.5384693101056831, 0.9061798459386640}
	ws := [5]float64{0.2369268850561891, 0.4786286704993665, 0.5688888888888889, 0.4786286704993665, 0.2369268850561891}
	l := 0.0
	for i, t := range xs {
		l += ws[i] * r3.Norm(r3.Add(e, r3.Scale(2*t, k)))
	}
	return l
}

// EdgeNeighbors appends to dst the elements other than e that share edge
// k of element e, of any part, in increasing order.
func EdgeNeighbors(m *Mesh, adj Adjacency, e, k int, dst []int32) []int32 {
	ed := m.ElemEdge(e, k)
	for _, f := range adj.Of(ed.A) {
		if int(f) != e && usesNode(m, int(f), ed.B) {
			dst = append(dst, f)
		}
	}
	return dst
}

func usesNode(m *Mesh, e int, n int32) bool {
	return slices.Contains(m.ElemNodes(e)[:m.Type(e).Corners()], n)
}

// FreeEdges returns the boundary edges of every part: the element edges no
// other element of the same part shares (collapsed edges, whose two ends
// are one node, are left out). Edges where two parts meet are
// free edges of both parts. The result is in element order.
func FreeEdges(m *Mesh, adj Adjacency) []Edge {
	var out []Edge
	for e := range m.ElemIDs {
		nc := m.Type(e).Corners()
		part := m.ElemPart[e]
		for k := 0; k < nc; k++ {
			ed := m.ElemEdge(e, k)
			if ed.A == ed.B {
				continue // a collapsed edge of a degenerate element bounds nothing
			}
			shared := false
			for _, f := range adj.Of(ed.A) {
				if int(f) != e && m.ElemPart[f] == part && usesNode(m, int(f), ed.B) {
					shared = true
					break
				}
			}
			if !shared {
				out = append(out, ed)
			}
		}
	}
	return out
}

// Loop is a chain of free edges of one part.
type Loop struct {
	Part int32 // index into Mesh.Parts
	// Nodes are the node indices in order, the midside nodes of curved
	// edges included; a closed loop does not repeat the first node.
	Nodes  []int32
	Closed bool
	Length float64 // mm, along curved edges

	// Piece labels the connected piece of the part the loop bounds
	// (elements of the part joined through shared nodes).
	Piece int32
	// Outline marks the loop that bounds its piece from outside: the one
	// with the largest bounding box. The piece's other loops bound holes
	// or cut-outs. A part made of several pieces has several outlines.
	Outline bool
}

// FreeEdgeLoops chains free edges into loops, part by part. Edges are
// followed regardless of their direction, so parts with inconsistently
// oriented elements still give closed loops. Where more than two free
// edges meet at a node (a pinch point), the unused edge of lowest index is
// taken. Loops come sorted by part index, then by their first edge.
func FreeEdgeLoops(m *Mesh, edges []Edge) []Loop {
	// Incidence lists of free edges per node.
	type inc struct {
		node int32
		edge int32
	}
	incs := make([]inc, 0, 2*len(edges))
	for i, ed := range edges {
		incs = append(incs, inc{ed.A, int32(i)}, inc{ed.B, int32(i)})
	}
	slices.SortFunc(incs, func(a, b inc) int {
		return cmp.Or(cmp.Compare(a.node, b.node), cmp.Compare(a.edge, b.edge))
	})
	at := func(n int32) []inc {
		lo, _ := slices.BinarySearchFunc(incs, n, func(a inc, n int32) int { return cmp.Compare(a.node, n) })
		hi := lo
		for hi < len(incs) && incs[hi].node == n {
			hi++
		}
		return incs[lo:hi]
	}
	order := make([]int32, len(edges))
	for i := range order {
		order[i] = int32(i)
	}
	slices.SortStableFunc(order, func(a, b int32) int {
		return cmp.Compare(m.ElemPart[edges[a].Elem], m.ElemPart[edges[b].Elem])
	})
	used := make([]bool, len(edges))
	var loops []Loop
	var firsts []int32 // the first edge of each loop
	for _, first := range order {
		if used[first] {
			continue
		}
		part := m.ElemPart[edges[first].Elem]
		used[first] = true
		start := edges[first].A
		// walk follows unused free edges of the part from node v until it
		// comes back to start or reaches a dead end; it returns the nodes
		// visited after v and the length walked.
		walk := func(v int32) (nodes []int32, length float64) {
			for v != start {
				next := int32(-1)
				for _, c := range at(v) {
					if !used[c.edge] && m.ElemPart[edges[c.edge].Elem] == part {
						next = c.edge
						break
					}
				}
				if next < 0 {
					return nodes, length
				}
				used[next] = true
				ed := edges[next]
				w := ed.A
				if w == v {
					w = ed.B
				}
				length += m.EdgeLength(ed)
				if ed.Mid >= 0 {
					nodes = append(nodes, ed.Mid)
				}
				nodes = append(nodes, w)
				v = w
			}
			return nodes, length
		}
		b := edges[first].B
		fwd, length := walk(b)
		lp := Loop{Part: part, Length: length + m.EdgeLength(edges[first])}
		lp.Closed = len(fwd) > 0 && fwd[len(fwd)-1] == start
		lp.Nodes = []int32{start}
		if mid := edges[first].Mid; mid >= 0 {
			lp.Nodes = append(lp.Nodes, mid)
		}
		lp.Nodes = append(append(lp.Nodes, b), fwd...)
		if lp.Closed {
			lp.Nodes = lp.Nodes[:len(lp.Nodes)-1]
		} else {
			// An open chain: extend it backwards from the first edge's start.
			start = b // walk stops only at dead ends now (b is already passed)
			back, blen := walk(lp.Nodes[0])
			slices.Reverse(back)
			lp.Nodes = append(back, lp.Nodes...)
			lp.Length += blen
		}
		loops = append(loops, lp)
		firsts = append(firsts, first)
	}
	markOutlines(m, loops, edges, firsts)
	return loops
}

// markOutlines sets Outline on one loop of every connected piece of a
// part (elements of the part joined through shared nodes): the loop with
// the largest bounding box, ties to the longer, then the first. The
// piece's other loops bound holes or cut-outs.
func markOutlines(m *Mesh, loops []Loop, edges []Edge, first []int32) {
	piece := pieces(m)
	diag := func(lp *Loop) float64 {
		b := EmptyBox()
		for _, n := range lp.Nodes {
			b = growBox(b, m.Coords[n])
		}
		return r3.Norm(r3.Sub(b.Max, b.Min))
	}
	best := map[int32]int{} // piece -> loop
	sizes := make([]float64, len(loops))
	for i := range loops {
		sizes[i] = diag(&loops[i])
		p := piece[edges[first[i]].Elem]
		loops[i].Piece = p
		j, ok := best[p]
		if !ok || sizes[i] > sizes[j] || sizes[i] == sizes[j] && loops[i].Length > loops[j].Length {
			best[p] = i
		}
	}
	for _, i := range best {
		loops[i].Outline = true
	}
}

// pieces labels every element with its connected piece: elements of one
// part that share a node are in the same piece. A label is the smallest
// element index of its piece.
func pieces(m *Mesh) []int32 {
	parent := make([]int32, m.NumElems())
	for i := range parent {
		parent[i] = int32(i)
	}
	var find func(e int32) int32
	find = func(e int32) int32 {
		for parent[e] != e {
			parent[e] = parent[parent[e]]
			e = parent[e]
		}
		return e
	}
	adj := NodeElements(m)
	for n := range m.Coords {
		es := adj.Of(int32(n))
		for i, a := range es {
			for _, b := range es[:i] {
				if m.ElemPart[a] == m.ElemPart[b] {
					ra, rb := find(a), find(b)
					if ra != rb {
						parent[max(ra, rb)] = min(ra, rb)
					}
					break
				}
			}
		}
	}
	for e := range parent {
		parent[e] = find(int32(e))
	}
	return parent
}
