package geom

import (
	"cmp"
	"context"
	"errors"
	"fmt"
	"iter"
	"math"
	"slices"
	"sync"

	"gonum.org/v1/gonum/spatial/r3"
)

// ContactRule says when two sheets of different parts lie in contact,
// and when a node of one faces a node of the other.
//
// A point q on a sheet of part A is in contact with part B when the
// closest point p of B's mesh to q is not on a free edge of B (q lies
// over B, not beside it), the element normals at q and p lie within
// AngleLimit of parallel or anti-parallel (either part's normals may
// point either way), and the gap between the two sheets' mid-surfaces
// along the normal differs from contact, (tA+tB)/2, by at most
// Allowance(tA, tB). Mid-surfaces are found from the meshed surfaces with
// Surface.MidOffset, so parts meshed on their top or bottom surface are
// measured like mid-surface meshes.
//
// A node u of A and a node v of B face each other when both are in
// contact, each is the other's nearest node of the other part (mutual
// nearest, so facing pairs are one to one), the separation of the two
// nodes' mid-surface points matches contact within the allowance, and v
// lies within FacingFactor times the local element size (the smaller of
// the two elements' sizes, see ElemSize) of the normal line through u.
type ContactRule struct {
	// Allowance returns the allowed deviation from contact of the
	// mid-surface gap between sheets of thickness t1 and t2, mm. It must
	// not decrease as the thicknesses grow.
	Allowance func(t1, t2 float64) float64
	// AngleLimit, degrees, in (0, 90).
	AngleLimit float64
	// FacingFactor, in (0, 0.5), times the local element size bounds the
	// lateral offset of a facing node pair.
	FacingFactor float64
	// Pair, when not nil, limits the search to the part pairs it accepts
	// (part indices, the smaller first).
	Pair func(a, b int32) bool
}

func (r *ContactRule) check() error {
	switch {
	case r.Allowance == nil:
		return errors.New("geom: contact rule without an allowance")
	case !(r.AngleLimit > 0 && r.AngleLimit < 90):
		return fmt.Errorf("geom: contact angle limit %g degrees: want more than 0 and less than 90", r.AngleLimit)
	case !(r.FacingFactor > 0 && r.FacingFactor < 0.5):
		return fmt.Errorf("geom: facing factor %g: want more than 0 and less than 0.5", r.FacingFactor)
	}
	return nil
}

// NodeContact is a node of one part in contact with the sheet of another
// part (see ContactRule).
type NodeContact struct {
	Node  int32 // node index
	Part  int32 // part index of the node's sheet
	Other int32 // part index of the sheet it touches
	// Elem is the element of Part, among those using the node, whose
	// normal is closest to parallel with the other sheet's.
	Elem int32
	// OtherElem is the element of Other under the node, and Foot the
	// closest point of Other's mesh to the node.
	OtherElem int32
	Foot      r3.Vec
	// Axis is the unit normal of Elem, turned to point from the node's
	// sheet towards the other.
	Axis r3.Vec
	// Gap is the distance between the two sheets' mid-surfaces along
	// Axis, mm; Contact is (t1+t2)/2 with the two elements' thicknesses.
	Gap, Contact float64
	// Faying is the point on the faying surface between the two sheets:
	// mid-way between the node's sheet's surface facing the other and the
	// other's surface facing it.
	Faying r3.Vec
	// Margin says how far the point is from the edge of the contact, mm:
	// the larger of the gap's deviation from contact less the allowance
	// and the distance beside the other sheet's free edge less its slack;
	// not above 0 in contact. It is 1 when the normals are not
	// near-parallel.
	Margin float64
	// Nearest is the nearest node of Other to the node when the foot lies
	// near one of OtherElem's corners (a facing candidate), else -1.
	Nearest int32
}

// FacingPair is a node of one part and a node of another that face each
// other across sheets in contact (see ContactRule).
type FacingPair struct {
	A, B         int32 // node indices; A's part has the smaller id
	PartA, PartB int32 // part indices
	// Separation is the distance between the mid-surface points of the
	// two nodes along the host node's normal (the node of the pair's
	// host, Contacts.Host, whichever of A and B it is), mm; Contact is
	// (tA+tB)/2.
	Separation, Contact float64
	// Lateral is the distance of the other node from the normal line
	// through the host node, mm, and Tolerance the limit it was held to
	// (FacingFactor times the local element size). Measured from the
	// host, chosen by geometry, neither follows the parts' ids.
	Lateral, Tolerance float64
}

// Contacts holds where the sheets of a mesh touch one another: the nodes
// in contact with another part, the facing node pairs, and the element
// pairs they were found from, for further point tests (Probe).
type Contacts struct {
	// m is the mesh; Contacts keeps no reference to the index it was
	// found with, so that the index can be let go when only the
	// contacts are needed further on.
	m        *Mesh
	rule     ContactRule
	cosLimit float64
	elems    []int32    // elements with a partner, increasing
	elemPos  []int32    // per mesh element: its index in elems, or -1
	info     []elemInfo // aligned with elems
	reach    float64    // the largest contact reach of any pair, mm
	pStart   []int32    // partners of elems[i]: partners[pStart[i]:pStart[i+1]]
	partners []int32    // sorted by part, then element index
	nStart   []int32    // per mesh node n: its elements among elems
	nElems   []int32
	hosts    map[[2]int32]int32 // part pair (smaller index first) -> host part
	// records holds the host nodes in contact, sorted by node, part,
	// other part, in blocks of parallelBlock nodes: records[b] those of
	// nodes b*parallelBlock to (b+1)*parallelBlock-1. nrec counts them.
	records [][]NodeContact
	nrec    int
	facing  []FacingPair
}

// ElemSize returns the size of element e, mm: the square root of its area
// for a quad and of twice its area for a triangle (the side of the square
// it would be half of), so that a regular mesh of size h gives h either
// way.
func (m *Mesh) ElemSize(e int) float64 {
	a := m.Area(e)
	if m.Type(e).Corners() == 3 {
		a *= 2
	}
	return math.Sqrt(a)
}

// FindContacts finds every node of the mesh of x in contact with another
// part's sheet, and the facing node pairs, with rule r.
//
// Its cost is linear in the mesh plus n log n in the nodes near another
// part: one self-join of the element tree (see nearPairs) yields the
// pairs of elements of different parts within contact reach with
// near-parallel normals; only the nodes of those elements are then
// projected, each onto the elements paired with its own, which hold
// every element of the other part within reach of it. No part is ever
// compared with every other. Work is shared between GOMAXPROCS
// goroutines; the result does not depend on their number.
func FindContacts(ctx context.Context, x *Index, r ContactRule) (*Contacts, error) {
	if err := r.check(); err != nil {
		return nil, err
	}
	m := x.m
	c := &Contacts{m: x.m, rule: r, cosLimit: math.Cos(r.AngleLimit * math.Pi / 180)}
	tmax, outer := 0.0, false
	for _, p := range m.Parts {
		tmax = math.Max(tmax, p.Thickness)
		outer = outer || p.Surface != SurfaceMid
	}
	for _, t := range m.ElemThickness {
		if !math.IsNaN(t) {
			tmax = math.Max(tmax, t)
		}
	}
	// The farthest two meshed surfaces in contact can be: mid-surfaces
	// (t1+t2)/2 plus the allowance apart, each meshed surface half a
	// thickness off its mid-surface.
	reach := tmax + r.Allowance(tmax, tmax)
	if outer {
		reach += tmax
	}
	c.reach = reach
	pairs := x.contactPairs(reach, func(a, b int32, na, nb *[3]float32, d2 float64) bool {
		pa, pb := m.ElemPart[a], m.ElemPart[b]
		if r.Pair != nil && !r.Pair(min(pa, pb), max(pa, pb)) {
			return false
		}
		if math.Abs(dot32(na, nb)) < c.cosLimit {
			return false
		}
		ra := c.pairReach(a, b)
		return !(d2 > ra*ra*pruneSlack)
	})
	if err := ctx.Err(); err != nil {
		return nil, err
	}
	c.index(pairs)
	if err := ctx.Err(); err != nil {
		return nil, err
	}
	c.chooseHosts()
	c.nodeRecords()
	c.facingPairs()
	return c, ctx.Err()
}

// boxBoxDist2 returns the squared distance between two boxes.
func boxBoxDist2(a, b r3.Box) float64 {
	axis := func(alo, ahi, blo, bhi float64) float64 {
		d := math.Max(blo-ahi, alo-bhi)
		if d > 0 {
			return d * d
		}
		return 0
	}
	return axis(a.Min.X, a.Max.X, b.Min.X, b.Max.X) + axis(a.Min.Y, a.Max.Y, b.Min.Y, b.Max.Y) + axis(a.Min.Z, a.Max.Z, b.Min.Z, b.Max.Z)
}

// midOffset returns the offset of element e's mid-surface from its mesh
// along its normal, and its thickness.
func (c *Contacts) midOffset(e int32) (off, t float64) {
	if c.info != nil {
		if i := c.elemPos[e]; i >= 0 {
			return c.info[i].off, c.info[i].t
		}
	}
	m := c.m
	t = m.Thickness(int(e))
	return m.Part(int(e)).Surface.MidOffset(t), t
}

// pairReach returns the largest distance between the meshes of elements a
// and b for their sheets to count as in contact.
func (c *Contacts) pairReach(a, b int32) float64 {
	oa, ta := c.midOffset(a)
	ob, tb := c.midOffset(b)
	return (ta+tb)/2 + c.rule.Allowance(ta, tb) + math.Abs(oa) + math.Abs(ob)
}

// index builds the partner lists of the elements in pairs (chunks of
// pairs, see contactPairs) and the lists of those elements per node.
func (c *Contacts) index(chunks [][][2]int32) {
	m := c.m
	ne, nn := m.NumElems(), m.NumNodes()
	npairs := 0
	deg := make([]int32, ne+1)
	for _, pairs := range chunks {
		npairs += len(pairs)
		for _, p := range pairs {
			deg[p[0]+1]++
			deg[p[1]+1]++
		}
	}
	// The degrees become the positions in elems, in place (fresh memory
	// is dear: this is one array fewer).
	count := 0
	for _, d := range deg[1:] {
		if d > 0 {
			count++
		}
	}
	c.elemPos = deg[1:]
	c.elems = make([]int32, 0, count)
	c.pStart = make([]int32, 1, count+1)
	for e := range ne {
		d := c.elemPos[e]
		c.elemPos[e] = -1
		if d > 0 {
			c.elemPos[e] = int32(len(c.elems))
			c.elems = append(c.elems, int32(e))
			c.pStart = append(c.pStart, c.pStart[len(c.pStart)-1]+d)
		}
	}
	c.info = make([]elemInfo, len(c.elems))
	parallelBlocks(len(c.elems), func(from, to int) {
		for i := from; i < to; i++ {
			e := int(c.elems[i])
			lo, hi := elemBox(m, e)
			t := m.Thickness(e)
			in := elemInfo{box: box32Of(lo, hi), normal: m.Normal(e), centre: m.Centroid(e), t: t, off: m.Part(e).Surface.MidOffset(t), size: m.ElemSize(e)}
			for k := range m.Type(e).Corners() {
				in.warp = math.Max(in.warp, math.Abs(r3.Dot(r3.Sub(m.Corner(e, k), in.centre), in.normal)))
			}
			if r3.Norm2(in.normal) == 0 {
				in.warp = math.Inf(1) // no plane: the bound is the box's
			}
			c.info[i] = in
		}
	})
	c.partners = make([]int32, 2*npairs)
	fill := make([]int32, len(c.elems))
	for _, pairs := range chunks {
		for _, p := range pairs {
			for k := range 2 {
				i := c.elemPos[p[k]]
				c.partners[c.pStart[i]+fill[i]] = p[1-k]
				fill[i]++
			}
		}
	}
	parallelBlocks(len(c.elems), func(from, to int) {
		for i := from; i < to; i++ {
			ps := c.partners[c.pStart[i]:c.pStart[i+1]]
			slices.SortFunc(ps, func(a, b int32) int {
				return cmp.Or(cmp.Compare(m.ElemPart[a], m.ElemPart[b]), cmp.Compare(a, b))
			})
		}
	})
	c.nStart = make([]int32, nn+1)
	for _, e := range c.elems {
		for _, n := range m.ElemNodes(int(e)) {
			c.nStart[n+1]++
		}
	}
	for i := 1; i <= nn; i++ {
		c.nStart[i] += c.nStart[i-1]
	}
	// Each node's start serves as its cursor while the lists fill (each
	// ends at the next one's start), and is put back after.
	c.nElems = make([]int32, c.nStart[nn])
	for _, e := range c.elems {
		for _, n := range m.ElemNodes(int(e)) {
			c.nElems[c.nStart[n]] = e
			c.nStart[n]++
		}
	}
	copy(c.nStart[1:], c.nStart[:nn])
	c.nStart[0] = 0
}

// size returns ElemSize of element e, from the cache for candidate
// elements.
func (c *Contacts) size(e int32) float64 {
	if i := c.elemPos[e]; i >= 0 && c.info != nil {
		return c.info[i].size
	}
	return c.m.ElemSize(int(e))
}

// normal returns the normal of element e, from the cache for candidate
// elements.
func (c *Contacts) normal(e int32) r3.Vec {
	if i := c.elemPos[e]; i >= 0 && c.info != nil {
		return c.info[i].normal
	}
	return c.m.Normal(int(e))
}

// Mesh returns the mesh the contacts were found in.
func (c *Contacts) Mesh() *Mesh { return c.m }

// Rule returns the rule the contacts were found with.
func (c *Contacts) Rule() ContactRule { return c.rule }

// Elems returns, in increasing order, the elements that lie within
// contact reach of an element of another part with a near-parallel
// normal. The slice aliases c: do not modify it.
func (c *Contacts) Elems() []int32 { return c.elems }

// Partners returns the elements of other parts within contact reach of
// element e with near-parallel normals, sorted by part index, then
// element index; nil when there are none. The slice aliases c.
func (c *Contacts) Partners(e int32) []int32 {
	if e < 0 || int(e) >= len(c.elemPos) || c.elemPos[e] < 0 {
		return nil
	}
	i := c.elemPos[e]
	return c.partners[c.pStart[i]:c.pStart[i+1]]
}

// NodeElems returns the elements of Elems that use node n, in increasing
// order. The slice aliases c.
func (c *Contacts) NodeElems(n int32) []int32 { return c.nElems[c.nStart[n]:c.nStart[n+1]] }

// Records yields the nodes in contact with another part, sorted by
// node, part and other part: for every pair of parts, the nodes of its
// host (see Host). The records alias c.
func (c *Contacts) Records() iter.Seq[*NodeContact] {
	return func(yield func(*NodeContact) bool) {
		for _, b := range c.records {
			for i := range b {
				if !yield(&b[i]) {
					return
				}
			}
		}
	}
}

// NumRecords returns the number of records Records yields.
func (c *Contacts) NumRecords() int { return c.nrec }

// Record returns the contact of node n of part with the other part, and
// false when the node is not in contact with it or part is not the
// pair's host.
func (c *Contacts) Record(n, part, other int32) (*NodeContact, bool) {
	b := int(n) / parallelBlock
	if n < 0 || b >= len(c.records) {
		return nil, false
	}
	rs := c.records[b]
	i, ok := slices.BinarySearchFunc(rs, [3]int32{n, part, other}, func(r NodeContact, k [3]int32) int {
		return cmp.Or(cmp.Compare(r.Node, k[0]), cmp.Compare(r.Part, k[1]), cmp.Compare(r.Other, k[2]))
	})
	if !ok {
		return nil, false
	}
	return &rs[i], true
}

// Facing returns the facing node pairs, sorted by the part ids of PartA
// and PartB, then by the node id of A. The slice aliases c.
func (c *Contacts) Facing() []FacingPair { return c.facing }

// elemInfo is what the point tests need of a candidate element.
type elemInfo struct {
	box    box32
	normal r3.Vec
	centre r3.Vec  // mean of the corners
	warp   float64 // largest distance of a corner from the plane through centre normal to normal
	t, off float64 // thickness and mid-surface offset along the normal
	size   float64 // ElemSize
}

// candidate is an element with its squared box distance to a point.
type candidate struct {
	e  int32
	d2 float64
}

// nearest returns the projection of q onto the nearest of the elements
// cands within reach; Elem is -1 when there is none. The element with
// the nearest centre is projected first; then only the elements whose
// lower bound of the distance (box, or plane less warp) lies below the
// best distance so far. Of elements at the same distance (to a relative
// 1e-9) the first found is kept, in the order of cands.
func (c *Contacts) nearest(q r3.Vec, cands []int32, buf *[]candidate) Projection {
	m := c.m
	list := (*buf)[:0]
	qa := [3]float64{q.X, q.Y, q.Z}
	r2 := c.reach * c.reach * pruneSlack
	first, firstD := -1, math.Inf(1)
	for _, b := range cands {
		// A lower bound of the squared distance: the box distance, or
		// the distance to the element's plane less its warp when that is
		// larger (it is for the neighbours of the element under q).
		var d2, cd float64
		if i := c.elemPos[b]; i >= 0 {
			in := &c.info[i]
			d2 = in.box.dist2(&qa)
			v := r3.Sub(q, in.centre)
			if pd := math.Abs(r3.Dot(v, in.normal)) - in.warp; pd > 0 {
				d2 = math.Max(d2, pd*pd/pruneSlack)
			}
			cd = r3.Norm2(v)
		} else {
			d2 = BoxDist2(m.ElemBox(int(b)), q)
			cd = r3.Norm2(r3.Sub(q, m.Centroid(int(b))))
		}
		if d2 > r2 {
			continue
		}
		list = append(list, candidate{b, d2})
		// The element whose centre is nearest is most likely the one
		// under q: project it first.
		if cd < firstD || cd == firstD && b < list[first].e {
			first, firstD = len(list)-1, cd
		}
	}
	*buf = list
	best := Projection{Elem: -1, Dist: math.Inf(1)}
	if first < 0 {
		return best
	}
	best = c.project(list[first].e, q)
	for k, cd := range list {
		// An element whose bound is not below the best distance (to a
		// relative 1e-9) cannot be nearer; ties go to the first found.
		if k == first || cd.d2 >= best.Dist*best.Dist*(1-1e-9) {
			continue
		}
		pr := c.project(cd.e, q)
		if pr.Dist < best.Dist {
			best = pr
		}
	}
	return best
}

// freeEdgeSlack, times the size of the element under a point, is how far
// beside a free edge of the other sheet the point may lie and still count
// as over it: a few micrometres for common element sizes, the rounding
// of coordinates written to 0.001 mm.
const freeEdgeSlack = 2e-4

// freeEdgeLean, times the distance between the two meshes, is how much
// farther beside a free edge the point may lie: the normals of a faceted
// curved sheet lean by half a facet angle at its nodes, which puts the
// node facing an edge node slightly beside the edge (5 per cent covers
// facets of up to 6 degrees).
const freeEdgeLean = 0.05

// evaluate tests point q on element a of one part against best, the
// projection of q onto the nearest of the elements cands of another part
// (every element of that part within reach of q with a near-parallel
// normal). It returns the contact record (Node and Nearest unset) and
// whether q is in contact.
func (c *Contacts) evaluate(q r3.Vec, a int32, best *Projection, cands []int32) (NodeContact, bool) {
	return c.evaluateLean(q, a, best, cands, freeEdgeLean)
}

// evaluateLean is evaluate with the given lean (see freeEdgeLean) of the
// free-edge test.
func (c *Contacts) evaluateLean(q r3.Vec, a int32, best *Projection, cands []int32, lean float64) (NodeContact, bool) {
	m := c.m
	b := int32(best.Elem)
	na, nb := c.normal(a), best.Normal
	offA, ta := c.midOffset(a)
	offB, tb := c.midOffset(b)
	midA := r3.Add(q, r3.Scale(offA, na))
	midB := r3.Add(best.Point, r3.Scale(offB, nb))
	// The axis points from this sheet's mid-surface towards the other's:
	// meshed on their faces, the meshed surfaces of sheets in contact may
	// coincide or cross (both meshed on the faying face), and which sheet
	// lies on which side is said by the mid-surfaces alone. Where these
	// coincide (no side), the meshed surfaces decide.
	axis := na
	if s := r3.Dot(r3.Sub(midB, midA), na); s < -1e-9*(ta+tb) || math.Abs(s) <= 1e-9*(ta+tb) && r3.Dot(r3.Sub(best.Point, q), na) < -1e-9*(ta+tb) {
		axis = r3.Scale(-1, na)
	}
	rec := NodeContact{
		Node: -1, Elem: a, Part: m.ElemPart[a], OtherElem: b, Other: m.ElemPart[b], Foot: best.Point, Axis: axis,
		Gap: r3.Dot(r3.Sub(midB, midA), axis), Contact: (ta + tb) / 2, Nearest: -1,
	}
	rec.Faying = r3.Scale(0.5, r3.Add(r3.Add(midA, r3.Scale(ta/2, axis)), r3.Sub(midB, r3.Scale(tb/2, axis))))
	if !(r3.Norm2(nb) > 0 && r3.Norm2(na) > 0 && math.Abs(r3.Dot(na, nb)) >= c.cosLimit) {
		rec.Margin = 1
		return rec, false
	}
	// When the closest point lies on a free edge of the other sheet, q is
	// beside that sheet unless it lies right over the edge.
	rec.Margin = math.Max(math.Abs(rec.Gap-rec.Contact)-c.rule.Allowance(ta, tb),
		c.beyondFreeEdge(q, best, cands)-(freeEdgeSlack*c.size(b)+lean*best.Dist+1e-9*(1+math.Sqrt(r3.Norm2(q)))))
	return rec, rec.Margin <= 0
}

// beyondFreeEdge returns how far q lies beyond the free edges of the
// other sheet that its projection pr lies on: the largest component of
// q - foot along the outward in-plane normal of such an edge (an element
// edge no other element among cands shares); 0 when the foot lies on no
// free edge. A foot on an edge shared with a neighbour (a crease of a
// faceted curved sheet) does not count.
func (c *Contacts) beyondFreeEdge(q r3.Vec, pr *Projection, cands []int32) float64 {
	m := c.m
	e := pr.Elem
	nodes := m.ElemNodes(e)
	nc := m.Type(e).Corners()
	var onEdge [4]bool
	any := false
	if nc == 3 {
		// Area coordinates: weight k zero puts the point on the edge
		// opposite corner k, from corner k+1 to k+2.
		for k := range 3 {
			if pr.Weights[k] == 0 {
				onEdge[(k+1)%3] = true
				any = true
			}
		}
	} else {
		onEdge[0] = pr.Eta <= -1
		onEdge[1] = pr.Xi >= 1
		onEdge[2] = pr.Eta >= 1
		onEdge[3] = pr.Xi <= -1
		any = onEdge[0] || onEdge[1] || onEdge[2] || onEdge[3]
	}
	if !any {
		return 0
	}
	centre := m.Centroid(e)
	beyond := 0.0
	for k := range nc {
		if !onEdge[k] {
			continue
		}
		u, w := nodes[k], nodes[(k+1)%nc]
		shared := false
		for _, f := range cands {
			if int(f) == e {
				continue
			}
			fn := m.ElemNodes(int(f))[:m.Type(int(f)).Corners()]
			if slices.Contains(fn, u) && slices.Contains(fn, w) {
				shared = true
				break
			}
		}
		if shared {
			continue
		}
		a, b := m.Coords[u], m.Coords[w]
		out := r3.Cross(r3.Sub(b, a), pr.Normal)
		if l := r3.Norm(out); l > 0 {
			out = r3.Scale(1/l, out)
		}
		if r3.Dot(r3.Sub(centre, a), out) > 0 {
			out = r3.Scale(-1, out)
		}
		beyond = math.Max(beyond, r3.Dot(r3.Sub(q, pr.Point), out))
	}
	return beyond
}

// Probe tests point q, lying on element e, against the sheet of part
// other, with e's normal: it returns the contact record (Node -1) and
// whether q is in contact; a point near no element of other paired with
// e is not. Unlike the node tests, a point beside the other sheet's
// free edge by more than a few micrometres is out (no lean allowance):
// Probe finds where an overlap ends.
func (c *Contacts) Probe(q r3.Vec, e, other int32) (NodeContact, bool) {
	var sc ProbeScratch
	return c.ProbeWith(&sc, q, e, other)
}

// ProbeScratch is the reusable memory of a goroutine's probes.
type ProbeScratch struct{ buf []candidate }

// ProbeWith is Probe with scratch memory sc, which the caller reuses
// from probe to probe (not concurrently).
func (c *Contacts) ProbeWith(sc *ProbeScratch, q r3.Vec, e, other int32) (NodeContact, bool) {
	cands := c.partnersOf(e, other)
	best := c.nearest(q, cands, &sc.buf)
	if best.Elem < 0 {
		return NodeContact{Node: -1, Nearest: -1, Elem: e, OtherElem: -1, Part: c.m.ElemPart[e], Other: other, Margin: 1}, false
	}
	return c.evaluateLean(q, e, &best, cands, 0)
}

// PartnersIn returns the partners of element e that belong to part
// other (see Partners). The slice aliases c.
func (c *Contacts) PartnersIn(e, other int32) []int32 { return c.partnersOf(e, other) }

// Normal returns the unit normal of element e (cached for Elems).
func (c *Contacts) Normal(e int32) r3.Vec { return c.normal(e) }

// partnersOf returns the partners of element e that belong to part other.
func (c *Contacts) partnersOf(e, other int32) []int32 {
	ps := c.Partners(e)
	lo, _ := slices.BinarySearchFunc(ps, other, func(b, p int32) int { return cmp.Compare(c.m.ElemPart[b], p) })
	hi := lo
	for hi < len(ps) && c.m.ElemPart[ps[hi]] == other {
		hi++
	}
	return ps[lo:hi]
}

// chooseHosts picks, for every pair of parts with elements paired, the
// part whose nodes are tested against the other, whose mesh traces
// their overlaps and from whose nodes the facing pairs are measured: the
// one with the finer mesh there (the smaller mean size, ElemSize, of its
// elements paired with the other part's), sizes compared at the grain of
// PartOrder; where they tie (meshes of one element size: shifted grids,
// triangles against quads of one size), the one PartOrder takes first.
// The choice follows geometry alone, never the parts' ids or the order
// of their records, but between parts that coincide: with the host taken
// by id on ties, two plates meshed at one size were traced on the other
// plate once their ids were swapped, which moved the flange's area,
// widths, centreline, facing pairs and welds
// (cmd/joinery TestFlangesRenumbered).
func (c *Contacts) chooseHosts() {
	m := c.m
	type acc struct {
		n    int
		size float64
	}
	sums := map[[2]int32]*acc{}
	for i, a := range c.elems {
		pa := m.ElemPart[a]
		ps := c.partners[c.pStart[i]:c.pStart[i+1]]
		for k, b := range ps {
			if pb := m.ElemPart[b]; k == 0 || pb != m.ElemPart[ps[k-1]] {
				key := [2]int32{pa, pb}
				s := sums[key]
				if s == nil {
					s = &acc{}
					sums[key] = s
				}
				s.n++
				s.size += c.info[i].size
			}
		}
	}
	c.hosts = make(map[[2]int32]int32, len(sums)/2+1)
	var rank []int32 // PartOrder, found at the first tie
	for k, s := range sums {
		if k[0] > k[1] {
			continue
		}
		h := k[0]
		if t := sums[[2]int32{k[1], k[0]}]; t != nil {
			ms, mt := grain(s.size/float64(s.n)), grain(t.size/float64(t.n))
			if mt == ms && rank == nil {
				rank = m.PartOrder()
			}
			if mt < ms || mt == ms && rank[k[1]] < rank[k[0]] {
				h = k[1]
			}
		}
		c.hosts[k] = h
	}
}

// Host returns the host of the pair of parts a and b (part indices), the
// part whose nodes Records holds, and false when the parts are not in
// contact anywhere. The host is the finer mesh there, then the part
// PartOrder takes first: chosen by geometry, not by the parts' ids.
func (c *Contacts) Host(a, b int32) (int32, bool) {
	h, ok := c.hosts[[2]int32{min(a, b), max(a, b)}]
	return h, ok
}

// Pairs returns the pairs of parts (indices, smaller first) with
// elements within contact reach of each other, sorted.
func (c *Contacts) Pairs() [][2]int32 {
	out := make([][2]int32, 0, len(c.hosts))
	for k := range c.hosts {
		out = append(out, k)
	}
	slices.SortFunc(out, func(x, y [2]int32) int { return cmp.Or(cmp.Compare(x[0], y[0]), cmp.Compare(x[1], y[1])) })
	return out
}

// contactScratch is the scratch space of one goroutine's node tests.
type contactScratch struct {
	buf   []candidate
	cands []int32
}

// nodeContact tests node n of part own against part other: the node's
// element of own best aligned with the other sheet decides (a node on a
// bend belongs to the flange as well as to the wall). It returns the
// record with Nearest set, and whether the node is in contact.
func (c *Contacts) nodeContact(n, own, other int32, sc *contactScratch) (NodeContact, bool) {
	m := c.m
	es := c.NodeElems(n)
	sc.cands = sc.cands[:0]
	for _, a := range es {
		if m.ElemPart[a] != own {
			continue
		}
		for _, b := range c.partnersOf(a, other) {
			if !slices.Contains(sc.cands, b) {
				sc.cands = append(sc.cands, b)
			}
		}
	}
	q := m.Coords[n]
	pr := c.nearest(q, sc.cands, &sc.buf)
	if pr.Elem < 0 {
		return NodeContact{}, false
	}
	bestA, bestCos := int32(-1), -1.0
	for _, a := range es {
		if m.ElemPart[a] != own || len(c.partnersOf(a, other)) == 0 {
			continue
		}
		if cs := math.Abs(r3.Dot(c.normal(a), pr.Normal)); cs > bestCos {
			bestA, bestCos = a, cs
		}
	}
	rec, in := c.evaluate(q, bestA, &pr, sc.cands)
	if !in {
		return rec, false
	}
	rec.Node = n
	rec.Nearest = c.nearestFacing(n, &rec, sc.cands)
	return rec, true
}

// nodeRecords tests every node of the candidate elements of a host part
// against each other part it is paired with, and keeps the nodes in
// contact.
func (c *Contacts) nodeRecords() {
	m := c.m
	nn := m.NumNodes()
	blocks := make([][]NodeContact, (nn+parallelBlock-1)/parallelBlock)
	// A block's records are gathered in a buffer used again from block
	// to block and kept in a slice of their size: sized for every node
	// of a candidate element, the blocks would hold more than twice the
	// records (most such nodes are not in contact), all of it cleared
	// or fresh memory.
	bufs := sync.Pool{New: func() any { return new([]NodeContact) }}
	parallelBlocks(nn, func(from, to int) {
		buf := bufs.Get().(*[]NodeContact)
		out := (*buf)[:0]
		var (
			sc   contactScratch
			keys [][2]int32
		)
		for n := int32(from); n < int32(to); n++ {
			es := c.NodeElems(n)
			if len(es) == 0 {
				continue
			}
			// The (own part, other part) pairs around the node where the
			// node's part is the host.
			keys = keys[:0]
			for _, a := range es {
				pa := m.ElemPart[a]
				ps := c.Partners(a)
				for k, b := range ps {
					pb := m.ElemPart[b]
					if k > 0 && pb == m.ElemPart[ps[k-1]] {
						continue
					}
					if key := [2]int32{pa, pb}; c.hosts[[2]int32{min(pa, pb), max(pa, pb)}] == pa && !slices.Contains(keys, key) {
						keys = append(keys, key)
					}
				}
			}
			slices.SortFunc(keys, func(x, y [2]int32) int { return cmp.Or(cmp.Compare(x[0], y[0]), cmp.Compare(x[1], y[1])) })
			for _, k := range keys {
				if rec, in := c.nodeContact(n, k[0], k[1], &sc); in {
					out = append(out, rec)
				}
			}
		}
		blocks[from/parallelBlock] = slices.Clone(out)
		*buf = out
		bufs.Put(buf)
	})
	// The blocks are kept as they are (nodes in order within and across
	// them): one slice of all would be a copy in fresh memory.
	c.records = blocks
	for _, b := range blocks {
		c.nrec += len(b)
	}
}

// facingLimit returns the lateral limit of a facing pair between elements
// a and b.
func (c *Contacts) facingLimit(a, b int32) float64 {
	return c.rule.FacingFactor * math.Min(c.size(a), c.size(b))
}

// nearestFacing returns the nearest node of the other part to node n
// when rec's foot lies within the facing limit of a corner of the element
// under it, else -1. The nodes of cands hold the nearest one: every
// element of the other part within reach is among them. Ties go to the
// lower node id.
func (c *Contacts) nearestFacing(n int32, rec *NodeContact, cands []int32) int32 {
	m := c.m
	lim := c.facingLimit(rec.Elem, rec.OtherElem)
	near := false
	for _, v := range m.ElemNodes(int(rec.OtherElem)) {
		if r3.Norm2(r3.Sub(m.Coords[v], rec.Foot)) <= lim*lim {
			near = true
			break
		}
	}
	if !near {
		return -1
	}
	q := m.Coords[n]
	best, bestD := int32(-1), math.Inf(1)
	for _, b := range cands {
		for _, v := range m.ElemNodes(int(b)) {
			d := r3.Norm2(r3.Sub(m.Coords[v], q))
			if d < bestD || d == bestD && m.NodeIDs[v] < m.NodeIDs[best] {
				best, bestD = v, d
			}
		}
	}
	return best
}

// facingPairs pairs the host nodes with the nodes of the other part
// that are each other's nearest across a contact and face each other
// within the lateral limit. The other part's node is tested on demand.
func (c *Contacts) facingPairs() {
	m := c.m
	blocks := make([][]FacingPair, len(c.records))
	ParallelEach(len(c.records), func(b int) {
		var (
			out []FacingPair
			sc  contactScratch
		)
		for k := range c.records[b] {
			r := &c.records[b][k]
			if r.Nearest < 0 {
				continue
			}
			back, in := c.nodeContact(r.Nearest, r.Other, r.Part, &sc)
			if !in || back.Nearest != r.Node {
				continue
			}
			u, v := m.Coords[r.Node], m.Coords[r.Nearest]
			d := r3.Sub(v, u)
			along := r3.Dot(d, r.Axis)
			lat := math.Sqrt(r3.Norm2(r3.Sub(d, r3.Scale(along, r.Axis))))
			lim := c.facingLimit(r.Elem, back.Elem)
			if lat > lim {
				continue
			}
			offA, ta := c.midOffset(r.Elem)
			offB, tb := c.midOffset(back.Elem)
			midA := r3.Add(u, r3.Scale(offA, c.normal(r.Elem)))
			midB := r3.Add(v, r3.Scale(offB, c.normal(back.Elem)))
			sep := r3.Dot(r3.Sub(midB, midA), r.Axis)
			if math.Abs(sep-(ta+tb)/2) > c.rule.Allowance(ta, tb) {
				continue
			}
			fp := FacingPair{A: r.Node, B: r.Nearest, PartA: r.Part, PartB: r.Other,
				Separation: sep, Contact: (ta + tb) / 2, Lateral: lat, Tolerance: lim}
			if m.Parts[r.Part].ID > m.Parts[r.Other].ID {
				fp.A, fp.B, fp.PartA, fp.PartB = fp.B, fp.A, fp.PartB, fp.PartA
			}
			out = append(out, fp)
		}
		blocks[b] = out
	})
	var out []FacingPair
	for _, b := range blocks {
		out = append(out, b...)
	}
	slices.SortFunc(out, func(x, y FacingPair) int {
		return cmp.Or(cmp.Compare(m.Parts[x.PartA].ID, m.Parts[y.PartA].ID), cmp.Compare(m.Parts[x.PartB].ID, m.Parts[y.PartB].ID),
			cmp.Compare(m.NodeIDs[x.A], m.NodeIDs[y.A]))
	})
	c.facing = out
}

// project returns the closest point of element e's surface to q, as
// Mesh.Project does, taking a short cut for flat convex quads (most
// elements of a formed sheet's flange, see flatQuadFoot).
func (c *Contacts) project(e int32, q r3.Vec) Projection {
	m := c.m
	nodes := m.ElemNodes(int(e))
	if m.Type(int(e)).Corners() != 4 || len(nodes) < 4 {
		return m.Project(int(e), q)
	}
	x := [4]r3.Vec{m.Coords[nodes[0]], m.Coords[nodes[1]], m.Coords[nodes[2]], m.Coords[nodes[3]]}
	if pr, ok := flatQuadFoot(x, q); ok {
		pr.Elem = int(e)
		return pr
	}
	return m.Project(int(e), q)
}

// flatWarp bounds the warp of the quads flatQuadFoot handles: the
// quad's twist out of its mean plane, relative to its size. Below it the
// plane-projected foot lies within a few tenths of a micrometre of the
// exact closest point for a 5 mm quad, and its distance within 1e-7 mm.
const flatWarp = 1e-3

// flatQuadFoot returns the closest point of a flat (warp below flatWarp),
// strictly convex quad to q, and false for other quads (the caller then
// projects in full). When q's projection onto the quad's mean plane lies
// inside the quad, the foot is the point of the bilinear surface over it,
// found by inverting the bilinear map in the plane; otherwise it is the
// closest point of the quad's straight edges.
func flatQuadFoot(x [4]r3.Vec, q r3.Vec) (Projection, bool) {
	s := newBilinear(x)
	nv := r3.Cross(s.e1, s.e2)
	nn := math.Sqrt(r3.Norm2(nv))
	if !(nn > 0) {
		return Projection{}, false
	}
	n := r3.Scale(1/nn, nv)
	if math.Abs(r3.Dot(s.h, n)) > flatWarp*math.Sqrt(s.size2) {
		return Projection{}, false
	}
	for i := range 4 {
		c := s.x[i]
		turn := r3.Cross(r3.Sub(s.x[(i+1)%4], c), r3.Sub(s.x[(i+3)%4], c))
		if !(r3.Dot(turn, n) > 0) {
			return Projection{}, false
		}
	}
	d := r3.Sub(q, s.c)
	p := r3.Sub(d, r3.Scale(r3.Dot(d, n), n)) // in-plane offset from the centre
	// Newton on xi e1 + eta e2 + xi eta h = p in the plane: exact in one
	// step for a parallelogram.
	xi, eta := 0.0, 0.0
	converged := false
	for range 12 {
		a, b := s.tangents(xi, eta)
		f := r3.Sub(r3.Add(r3.Add(r3.Scale(xi, s.e1), r3.Scale(eta, s.e2)), r3.Scale(xi*eta, s.h)), p)
		aa, ab, bb := r3.Dot(a, a), r3.Dot(a, b), r3.Dot(b, b)
		det := aa*bb - ab*ab
		if !(det > 0) {
			return Projection{}, false
		}
		fa, fb := r3.Dot(f, a), r3.Dot(f, b)
		dxi := -(bb*fa - ab*fb) / det
		deta := -(aa*fb - ab*fa) / det
		xi, eta = xi+dxi, eta+deta
		if !finite(xi) || !finite(eta) || math.Abs(xi) > 4 || math.Abs(eta) > 4 {
			return Projection{}, false
		}
		if math.Abs(dxi)+math.Abs(deta) < quadParamTol {
			converged = true
			break
		}
	}
	if !converged || math.Abs(xi) > 1 || math.Abs(eta) > 1 {
		// Outside the quad in its plane: the closest point lies on the
		// boundary, whose four edges are straight.
		edges := [4][4]float64{{-1, -1, 2, 0}, {1, -1, 0, 2}, {1, 1, -2, 0}, {-1, 1, 0, -2}}
		bestD := math.Inf(1)
		for i, e := range edges {
			t := closestOnSegment(q, x[i], x[(i+1)%4])
			pt := r3.Add(x[i], r3.Scale(t, r3.Sub(x[(i+1)%4], x[i])))
			if d := r3.Norm2(r3.Sub(q, pt)); d < bestD {
				bestD = d
				xi, eta = e[0]+t*e[2], e[1]+t*e[3]
			}
		}
		// Snap to the edge exactly, as the full projection does.
		xi, eta = min(max(xi, -1), 1), min(max(eta, -1), 1)
	}
	foot := s.at(xi, eta)
	a, b := s.tangents(xi, eta)
	normal := r3.Cross(a, b)
	nl := math.Sqrt(r3.Norm2(normal))
	if !(nl > 1e-10*s.size2) {
		return Projection{}, false
	}
	normal = r3.Scale(1/nl, normal)
	var w [MaxElemNodes]float64
	q4 := quadWeights(xi, eta)
	copy(w[:], q4[:])
	return Projection{Point: foot, Dist: math.Sqrt(r3.Norm2(r3.Sub(q, foot))), Xi: xi, Eta: eta,
		Weights: w, Normal: normal}, true
}
