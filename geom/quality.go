package geom

import (
	"math"

	"gonum.org/v1/gonum/spatial/r3"
)

// Quality holds the shape measures of one element.
type Quality struct {
	// Warp is the largest angle, in degrees, between the normals of the two
	// triangles a quad's corners split into, over both diagonals; 0 for
	// triangles and planar quads. The curvature of a second-order quad
	// between its corners is not warp.
	Warp float64
	// MinEdge and MaxEdge are the shortest and longest edge lengths, mm,
	// measured between corners (for second-order elements, the chords
	// of their curved edges).
	MinEdge, MaxEdge float64
	// Aspect is MaxEdge/MinEdge (+Inf for a zero-length edge).
	Aspect float64
	// Area is the element area, mm² (Mesh.Area: of the curved surface
	// for second-order elements).
	Area float64
	// Degenerate is set when an edge has zero length, two corners repeat
	// a node, or the area is below DegenerateAreaRatio times MaxEdge²;
	// a quad collapsed to a triangle (Collapsed) is not degenerate for
	// its repeated corner alone.
	Degenerate bool
	// Collapsed is set for a linear quad two adjacent corners of which
	// are one node, the others three distinct nodes: a triangle written
	// as a quad (common practice where a format or a mesher has quads
	// only; solvers take it as the triangle). Its edges and aspect are
	// the triangle's; it is degenerate only when the triangle is.
	Collapsed bool
}

// DegenerateAreaRatio is the area, as a fraction of the longest edge
// squared, below which an element counts as degenerate (collapsed to a
// line or a point). A square has 1, an equilateral triangle 0.433; 1e-6 is
// our own choice, far below any usable element.
const DegenerateAreaRatio = 1e-6

// ElemQuality measures element e.
func (m *Mesh) ElemQuality(e int) Quality {
	nodes := m.ElemNodes(e)
	nc := m.Type(e).Corners()
	q := Quality{MinEdge: math.Inf(1), Area: m.Area(e), Collapsed: collapsedQuad(m, e)}
	for k := 0; k < nc; k++ {
		a, b := nodes[k], nodes[(k+1)%nc]
		if q.Collapsed && a == b {
			continue // the repeated corner of a triangle written as a quad
		}
		l := r3.Norm(r3.Sub(m.Coords[b], m.Coords[a]))
		q.MinEdge = math.Min(q.MinEdge, l)
		q.MaxEdge = math.Max(q.MaxEdge, l)
		for j := k + 1; j < nc; j++ {
			if nodes[j] == nodes[k] && !(q.Collapsed && (j == k+1 || k == 0 && j == nc-1)) {
				q.Degenerate = true
			}
		}
	}
	q.Aspect = q.MaxEdge / q.MinEdge
	if q.MinEdge == 0 {
		q.Aspect = math.Inf(1)
		q.Degenerate = true
	}
	if q.Area < DegenerateAreaRatio*q.MaxEdge*q.MaxEdge {
		q.Degenerate = true
	}
	if nc == 4 && !q.Degenerate && !q.Collapsed {
		p := [4]r3.Vec{m.Coords[nodes[0]], m.Coords[nodes[1]], m.Coords[nodes[2]], m.Coords[nodes[3]]}
		q.Warp = math.Max(splitAngle(p[0], p[1], p[2], p[3]), splitAngle(p[1], p[2], p[3], p[0]))
	}
	return q
}

// splitAngle returns the angle in degrees between the normals of
// triangles (a,b,c) and (a,c,d), the two halves of quad abcd split along
// diagonal ac.
func splitAngle(a, b, c, d r3.Vec) float64 {
	n1 := r3.Cross(r3.Sub(b, a), r3.Sub(c, a))
	n2 := r3.Cross(r3.Sub(c, a), r3.Sub(d, a))
	l1, l2 := r3.Norm(n1), r3.Norm(n2)
	if l1 == 0 || l2 == 0 {
		return 0
	}
	cos := r3.Dot(n1, n2) / (l1 * l2)
	return math.Acos(math.Max(-1, math.Min(1, cos))) * 180 / math.Pi
}

// collapsedQuad reports whether element e is a linear quad exactly one
// pair of adjacent corners of which is one node (a triangle written as
// a quad).
func collapsedQuad(m *Mesh, e int) bool {
	if m.Type(e).Corners() != 4 || m.Type(e).Quadratic() {
		return false
	}
	n := m.ElemNodes(e)
	same := 0
	for k := range 4 {
		if n[k] == n[(k+1)%4] {
			same++
		}
	}
	return same == 1 && n[0] != n[2] && n[1] != n[3]
}
