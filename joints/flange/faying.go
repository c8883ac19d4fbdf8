package flange

import (
	"cmp"
	"math"
	"slices"

	"gonum.org/v1/gonum/spatial/r3"

	"github.com/joinery-cae/joinery/geom"
)

// sharedEdge is an element edge that the elements of two pieces of an
// overlap share.
type sharedEdge struct {
	key  uint64 // edgeKey
	a, b int32  // the samples, a < b
	u, v int32  // the edge's nodes, as a's element runs round it
	// same is set when b's element runs round it from u to v as well: the
	// two elements' normals then point to opposite sides of the sheet.
	same bool
	// tee is set on an edge that more than two pieces share (every two of
	// them get a sharedEdge).
	tee bool
}

// sharedEdges returns the element edges shared by the pieces of an
// overlap, every two pieces that share one, ordered by edge, then by
// pieces.
func sharedEdges(m *geom.Mesh, samples []sample) []sharedEdge {
	type use struct {
		key  uint64
		i    int32
		u, v int32
	}
	uses := make([]use, 0, 4*len(samples))
	for i, s := range samples {
		nodes := m.ElemNodes(int(s.elem))
		nc := m.Type(int(s.elem)).Corners()
		for k := range nc {
			u, v := nodes[k], nodes[(k+1)%nc]
			uses = append(uses, use{edgeKey(u, v), int32(i), u, v})
		}
	}
	slices.SortFunc(uses, func(x, y use) int { return cmp.Or(cmp.Compare(x.key, y.key), cmp.Compare(x.i, y.i)) })
	var out []sharedEdge
	for lo := 0; lo < len(uses); {
		hi := lo + 1
		for hi < len(uses) && uses[hi].key == uses[lo].key {
			hi++
		}
		for x := lo; x < hi; x++ {
			f := uses[x]
			for _, o := range uses[x+1 : hi] {
				out = append(out, sharedEdge{key: f.key, a: f.i, b: o.i, u: f.u, v: f.v, same: o.u == f.u, tee: hi-lo > 2})
			}
		}
		lo = hi
	}
	return out
}

// creaseCos is the cosine of 45 degrees: pieces whose normals all lie
// within 45 degrees of the first piece's normal line are oriented by the
// sign of their dot product with it (orient).
const creaseCos = math.Sqrt2 / 2

// flatNormals reports whether every piece's normal is parallel to the
// first one's, to rounding (a flat flange: no crease to orient across or
// to mitre).
func flatNormals(samples []sample) bool {
	n0 := samples[0].normal
	for _, s := range samples {
		if r3.Norm(r3.Cross(s.normal, n0)) > 1e-12 {
			return false
		}
	}
	return true
}

// orient sets every sample's up to its normal turned to one side of the
// sheet over the whole overlap, the first sample's own. Where every
// normal lies within 45 degrees of the first one's line, the sign of the
// dot product with it decides. Elsewhere the sheet bends, maybe by more
// than a right angle across a crease, where two normals of one
// orientation have a negative dot product: the orientation is carried
// from piece to piece across the element edges they share (edges, from
// sharedEdges): two elements whose normals point to one side run round
// their shared edge in opposite directions. Pieces no shared edge
// reaches (joined through a node only) take the dot product's sign with
// the first piece of their own group, that one with the first sample.
func orient(samples []sample, edges []sharedEdge) {
	n0 := samples[0].normal
	byDot := true
	for _, s := range samples {
		if math.Abs(r3.Dot(s.normal, n0)) < creaseCos {
			byDot = false
			break
		}
	}
	if byDot {
		for i := range samples {
			s := &samples[i]
			s.up = s.normal
			if r3.Dot(s.normal, n0) < 0 {
				s.up = r3.Scale(-1, s.normal)
			}
		}
		return
	}
	// Adjacency in compressed rows: for every sample, its shared edges.
	start := make([]int32, len(samples)+1)
	for _, e := range edges {
		start[e.a+1]++
		start[e.b+1]++
	}
	for i := range samples {
		start[i+1] += start[i]
	}
	adj := make([]int32, 2*len(edges))
	fill := slices.Clone(start[:len(samples)])
	for k, e := range edges {
		adj[fill[e.a]], adj[fill[e.b]] = int32(k), int32(k)
		fill[e.a]++
		fill[e.b]++
	}
	done := make([]bool, len(samples))
	queue := make([]int32, 0, len(samples))
	for root := range samples {
		if done[root] {
			continue
		}
		r := &samples[root]
		r.up = r.normal
		if root > 0 && r3.Dot(r.normal, n0) < 0 {
			r.up = r3.Scale(-1, r.normal)
		}
		done[root] = true
		queue = append(queue[:0], int32(root))
		for len(queue) > 0 {
			i := queue[0]
			queue = queue[1:]
			for _, k := range adj[start[i]:start[i+1]] {
				e := edges[k]
				j := e.a + e.b - i
				if done[j] {
					continue
				}
				// The sign that turns j's normal to i's side: up_i is
				// +-normal_i, and normal_j agrees with normal_i unless
				// the two elements run round the edge the same way.
				agree := r3.Dot(samples[i].up, samples[i].normal) > 0
				if e.same {
					agree = !agree
				}
				s := &samples[j]
				s.up = s.normal
				if !agree {
					s.up = r3.Scale(-1, s.normal)
				}
				done[j] = true
				queue = append(queue, j)
			}
		}
	}
}

// mitreTan bounds tan(a/2) of the angle a between two pieces' normals
// in the mitre of fayingArea: a fold sharper than about 152 degrees
// counts as that sharp (the faying surfaces of a sheet folded back on
// itself would meet far off the fold).
const mitreTan = 4

// fayingArea returns the overlap's area on the faying surface: the
// pieces' own area (the host's mid-surface) corrected where two of them
// meet at a crease. Each piece is lifted along its normal by its shift
// to the faying surface; where two pieces share an element edge and
// their normals differ, the lifted pieces stand apart (the host outside
// the faying surface's bend) or run across each other (inside it), and
// the faying surface runs along the line where their planes meet, as the
// other sheet's face does (see draper). Over a shared stretch of length
// L, piece a reaches past that line by t_a = (v_b - v_a).n_b / (u_a.n_b)
// (v the lifts, n the oriented normals, u_a the unit vector in a's
// plane square to the edge pointing into a), b by t_b likewise, and the
// area changes by -L (t_a + t_b): for a bend by angle a and lifts d_a,
// d_b towards its inside, -L (d_a + d_b) tan(a/2) (closed form).
// With u_a.n_b and u_b.n_a, equal for two planes through the edge,
// replaced by their mean s, the sum is (v_b - v_a).(n_b - n_a) / s,
// which stays finite as the normals come together (gently curved
// sheets: the lifted area of a cylinder of radius R, (1 + d/R) times the
// mid-surface's, to first order in the angle between pieces). The
// shared stretch is the part of the edge in the overlap: the whole edge
// between two nodes in contact, from the node in contact to the
// crossing (cross) on an edge the overlap ends on. An edge that more
// than two pieces share is left out.
func (w *pairWork) fayingArea(samples []sample, edges []sharedEdge, area float64) float64 {
	m := w.m
	corr := 0.0
	for _, e := range edges {
		sa, sb := &samples[e.a], &samples[e.b]
		d := r3.Sub(sb.up, sa.up)
		if e.tee || r3.Norm2(d) < 1e-24 {
			continue
		}
		inU, inV := w.rec(e.u) != nil, w.rec(e.v) != nil
		var p, q r3.Vec
		switch {
		case inU && inV:
			p, q = m.Coords[e.u], m.Coords[e.v]
		case inU || inV:
			c, ok := w.cross[vkey{min(e.u, e.v), max(e.u, e.v)}]
			if !ok {
				continue
			}
			p, q = m.Coords[e.u], c
			if inV {
				p = m.Coords[e.v]
			}
		default:
			continue
		}
		l := r3.Norm(r3.Sub(q, p))
		if l == 0 {
			continue
		}
		along := r3.Unit(r3.Sub(m.Coords[e.v], m.Coords[e.u]))
		into := func(s *sample) r3.Vec {
			u := r3.Cross(s.up, along)
			if r3.Dot(u, r3.Sub(m.Centroid(int(s.elem)), p)) < 0 {
				u = r3.Scale(-1, u)
			}
			return r3.Unit(u)
		}
		ua, ub := into(sa), into(sb)
		s := (r3.Dot(ua, sb.up) + r3.Dot(ub, sa.up)) / 2
		va, vb := r3.Scale(sa.shift, sa.normal), r3.Scale(sb.shift, sb.normal)
		num := r3.Dot(r3.Sub(vb, va), d)
		if math.Abs(s) < 1e-12 {
			continue
		}
		t := num / s
		// The bound on the mitre: tan(a/2) <= mitreTan, a the angle
		// between the normals (tan(a/2) = |d| / |n_a + n_b|).
		if sum := r3.Norm(r3.Add(sa.up, sb.up)); mitreTan*sum < r3.Norm(d) {
			lim := (math.Abs(sa.shift) + math.Abs(sb.shift)) * mitreTan
			t = math.Max(-lim, math.Min(lim, t))
		}
		corr -= l * t
	}
	return area + corr
}
