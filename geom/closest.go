package geom

import (
	"cmp"
	"math"
	"slices"

	"gonum.org/v1/gonum/spatial/r3"
)

// Projection is the closest point of one element's surface to a query
// point.
//
// For a triangle (Tri3, Tri6) Xi and Eta are the area coordinates of its
// second and third corner (L2, L3; L1 = 1-Xi-Eta). For a quad (Quad4,
// Quad8, Quad9) they are the parametric coordinates in [-1, 1], with
// corner 0 at (-1, -1), 1 at (1, -1), 2 at (1, 1) and 3 at (-1, 1), the
// midside nodes at the middles of the sides and a Quad9's centre at
// (0, 0). In all cases Weights holds the shape-function values of the
// element's nodes, in its node order, at the point (ShapeWeights; 0 past
// the element's node count): they sum to 1 and Point = sum of Weights[i]
// times node i. The weights of second-order elements may be negative
// (see ShapeWeights).
type Projection struct {
	Elem    int                   // element index
	Point   r3.Vec                // closest point on the element surface
	Dist    float64               // distance from the query point to Point, model units (mm)
	Xi, Eta float64               // parametric coordinates of Point, see above
	Weights [MaxElemNodes]float64 // shape-function weights of the element's nodes
	// Normal is the unit surface normal at Point, oriented by the
	// right-hand rule over the node order; zero for a degenerate element.
	Normal r3.Vec
}

// Offset returns the signed distance of q from the element's tangent plane
// at the projected point, positive on the side Normal points to.
func (pr *Projection) Offset(q r3.Vec) float64 {
	return r3.Dot(r3.Sub(q, pr.Point), pr.Normal)
}

// ClosestOnTriangle returns the point q of triangle abc closest to p and
// its area coordinates l (q = l[0] a + l[1] b + l[2] c, the l sum to 1).
// It uses the region-based method of C. Ericson, Real-Time Collision
// Detection (2005), section 5.1.5. A degenerate triangle (collinear or
// coincident corners) is treated as its three edges.
func ClosestOnTriangle(p, a, b, c r3.Vec) (q r3.Vec, l [3]float64) {
	ab := r3.Sub(b, a)
	ac := r3.Sub(c, a)
	// The region tests assume a proper triangle; a degenerate one (its
	// area tiny against its edges, here sin(angle at a) < 1e-8) is the
	// union of its edges.
	if !(r3.Norm2(r3.Cross(ab, ac)) > 1e-16*r3.Norm2(ab)*r3.Norm2(ac)) {
		return closestOnTriangleEdges(p, a, b, c)
	}
	ap := r3.Sub(p, a)
	d1 := r3.Dot(ab, ap)
	d2 := r3.Dot(ac, ap)
	if d1 <= 0 && d2 <= 0 {
		return a, [3]float64{1, 0, 0} // vertex region a
	}
	bp := r3.Sub(p, b)
	d3 := r3.Dot(ab, bp)
	d4 := r3.Dot(ac, bp)
	if d3 >= 0 && d4 <= d3 {
		return b, [3]float64{0, 1, 0} // vertex region b
	}
	vc := d1*d4 - d3*d2
	if vc <= 0 && d1 >= 0 && d3 <= 0 {
		v := ratio(d1, d1-d3) // edge region ab
		return r3.Add(a, r3.Scale(v, ab)), [3]float64{1 - v, v, 0}
	}
	cp := r3.Sub(p, c)
	d5 := r3.Dot(ab, cp)
	d6 := r3.Dot(ac, cp)
	if d6 >= 0 && d5 <= d6 {
		return c, [3]float64{0, 0, 1} // vertex region c
	}
	vb := d5*d2 - d1*d6
	if vb <= 0 && d2 >= 0 && d6 <= 0 {
		w := ratio(d2, d2-d6) // edge region ac
		return r3.Add(a, r3.Scale(w, ac)), [3]float64{1 - w, 0, w}
	}
	va := d3*d6 - d5*d4
	if va <= 0 && d4-d3 >= 0 && d5-d6 >= 0 {
		w := ratio(d4-d3, (d4-d3)+(d5-d6)) // edge region bc
		return r3.Add(b, r3.Scale(w, r3.Sub(c, b))), [3]float64{0, 1 - w, w}
	}
	// Face region. va+vb+vc is |ab x ac|^2 up to rounding.
	den := va + vb + vc
	if !(den > 0) {
		return closestOnTriangleEdges(p, a, b, c)
	}
	v := vb / den
	w := vc / den
	return r3.Add(a, r3.Add(r3.Scale(v, ab), r3.Scale(w, ac))), [3]float64{1 - v - w, v, w}
}

// ratio returns num/den clamped to [0, 1], and 0 when den is not positive.
func ratio(num, den float64) float64 {
	if !(den > 0) {
		return 0
	}
	return min(max(num/den, 0), 1)
}

// SegmentDistance returns the distance from p to the segment ab.
func SegmentDistance(p, a, b r3.Vec) float64 {
	t := closestOnSegment(p, a, b)
	return r3.Norm(r3.Sub(p, r3.Add(a, r3.Scale(t, r3.Sub(b, a)))))
}

// closestOnSegment returns the parameter t in [0, 1] of the point
// a + t (b-a) closest to p; 0 for a segment of zero length.
func closestOnSegment(p, a, b r3.Vec) float64 {
	ab := r3.Sub(b, a)
	return ratio(r3.Dot(r3.Sub(p, a), ab), r3.Norm2(ab))
}

func closestOnTriangleEdges(p, a, b, c r3.Vec) (r3.Vec, [3]float64) {
	corners := [3]r3.Vec{a, b, c}
	var (
		bestQ r3.Vec
		bestL [3]float64
		bestD = math.Inf(1)
	)
	for i := range 3 {
		j := (i + 1) % 3
		t := closestOnSegment(p, corners[i], corners[j])
		q := r3.Add(corners[i], r3.Scale(t, r3.Sub(corners[j], corners[i])))
		if d := r3.Norm2(r3.Sub(p, q)); d < bestD || i == 0 {
			bestD, bestQ = d, q
			bestL = [3]float64{}
			bestL[i], bestL[j] = 1-t, t
		}
	}
	return bestQ, bestL
}

// bilinear is a bilinear quad in the form
// x(xi, eta) = c + xi e1 + eta e2 + xi eta h.
type bilinear struct {
	x            [4]r3.Vec
	c, e1, e2, h r3.Vec
	size2        float64 // squared size scale for tolerances
}

// Settings of the Newton iteration on quads.
const (
	quadMaxIter    = 40    // Newton steps
	quadParamTol   = 1e-13 // converged when a full step moves (xi, eta) less
	quadLineSearch = 30    // step halvings
)

func newBilinear(x [4]r3.Vec) bilinear {
	q := func(s0, s1, s2, s3 float64) r3.Vec {
		return r3.Vec{
			X: (s0*x[0].X + s1*x[1].X + s2*x[2].X + s3*x[3].X) / 4,
			Y: (s0*x[0].Y + s1*x[1].Y + s2*x[2].Y + s3*x[3].Y) / 4,
			Z: (s0*x[0].Z + s1*x[1].Z + s2*x[2].Z + s3*x[3].Z) / 4,
		}
	}
	b := bilinear{
		x:  x,
		c:  q(1, 1, 1, 1),
		e1: q(-1, 1, 1, -1),
		e2: q(-1, -1, 1, 1),
		h:  q(1, -1, 1, -1),
	}
	b.size2 = r3.Norm2(b.e1) + r3.Norm2(b.e2)
	return b
}

// planarConvex reports whether the quad is flat to rounding and strictly
// convex: then its bilinear map is one-to-one and an interior stationary
// point of the distance is the closest point.
func (s *bilinear) planarConvex() bool {
	n := r3.Cross(s.e1, s.e2)
	nn := r3.Norm2(n)
	if !(nn > 0) {
		return false
	}
	if hn := r3.Dot(s.h, n); hn*hn > 1e-24*s.size2*nn {
		return false
	}
	for i := range 4 {
		c := s.x[i]
		turn := r3.Cross(r3.Sub(s.x[(i+1)%4], c), r3.Sub(s.x[(i+3)%4], c))
		if !(r3.Dot(turn, n) > 0) {
			return false
		}
	}
	return true
}

// quadWeights returns the bilinear shape functions at (xi, eta).
func quadWeights(xi, eta float64) [4]float64 {
	return [4]float64{
		(1 - xi) * (1 - eta) / 4,
		(1 + xi) * (1 - eta) / 4,
		(1 + xi) * (1 + eta) / 4,
		(1 - xi) * (1 + eta) / 4,
	}
}

// at returns the point at (xi, eta) as the weighted sum of the corners, so
// that it is reproduced exactly by quadWeights.
func (s *bilinear) at(xi, eta float64) r3.Vec {
	w := quadWeights(xi, eta)
	return r3.Vec{
		X: w[0]*s.x[0].X + w[1]*s.x[1].X + w[2]*s.x[2].X + w[3]*s.x[3].X,
		Y: w[0]*s.x[0].Y + w[1]*s.x[1].Y + w[2]*s.x[2].Y + w[3]*s.x[3].Y,
		Z: w[0]*s.x[0].Z + w[1]*s.x[1].Z + w[2]*s.x[2].Z + w[3]*s.x[3].Z,
	}
}

// tangents returns dx/dxi and dx/deta at (xi, eta).
func (s *bilinear) tangents(xi, eta float64) (a, b r3.Vec) {
	return r3.Add(s.e1, r3.Scale(eta, s.h)), r3.Add(s.e2, r3.Scale(xi, s.h))
}

// newton minimises |x(xi, eta) - p|^2 over [-1, 1]^2 from (xi, eta) with
// a damped, projected Newton method: the exact Hessian where it is
// positive definite, the Gauss-Newton one elsewhere, a backtracking line
// search, and clamping to the square. It reports whether the steps
// converged; the returned point is the best one reached in any case.
func (s *bilinear) newton(p r3.Vec, xi, eta float64) (float64, float64, bool) {
	d := r3.Sub(s.at(xi, eta), p)
	f := r3.Norm2(d)
	for range quadMaxIter {
		a, b := s.tangents(xi, eta)
		g1, g2 := r3.Dot(a, d), r3.Dot(b, d)
		h11, h22 := r3.Dot(a, a), r3.Dot(b, b)
		// A coordinate on its bound whose gradient points outwards stays
		// there; along the other one f is an exact quadratic (the quad's
		// parameter lines are straight), so one Newton step solves it.
		fixX := xi <= -1 && g1 > 0 || xi >= 1 && g1 < 0
		fixY := eta <= -1 && g2 > 0 || eta >= 1 && g2 < 0
		var sx, sy float64
		switch {
		case fixX && fixY:
			return xi, eta, true // corner
		case fixX:
			if !(h22 > 0) {
				return xi, eta, true
			}
			sy = -g2 / h22
		case fixY:
			if !(h11 > 0) {
				return xi, eta, true
			}
			sx = -g1 / h11
		default:
			ab := r3.Dot(a, b)
			h12 := ab + r3.Dot(s.h, d)
			det := h11*h22 - h12*h12
			if !(det > 1e-12*h11*h22) {
				h12 = ab // Gauss-Newton: drop the curvature term
				det = h11*h22 - h12*h12
			}
			switch {
			case det > 1e-14*h11*h22:
				sx = -(h22*g1 - h12*g2) / det
				sy = -(h11*g2 - h12*g1) / det
			case h11 > 1e-28*s.size2 || h22 > 1e-28*s.size2:
				// Parallel tangents (a collapsed edge): steepest descent
				// scaled by the larger curvature.
				hm := max(h11, h22)
				sx, sy = -g1/hm, -g2/hm
			default:
				return xi, eta, false
			}
		}
		// Trust region: never step more than the square's size.
		if n := math.Max(math.Abs(sx), math.Abs(sy)); n > 2 {
			sx, sy = sx*2/n, sy*2/n
		}
		if !finite(sx) || !finite(sy) {
			return xi, eta, false
		}
		fx := min(max(xi+sx, -1), 1)
		fy := min(max(eta+sy, -1), 1)
		if math.Abs(fx-xi)+math.Abs(fy-eta) < quadParamTol {
			return xi, eta, true
		}
		t := 1.0
		moved := false
		for range quadLineSearch {
			nx := min(max(xi+t*sx, -1), 1)
			ny := min(max(eta+t*sy, -1), 1)
			nd := r3.Sub(s.at(nx, ny), p)
			// The full step is also taken when f changes by rounding
			// only: near the minimum that is where Newton gains its
			// last digits of the point.
			if nf := r3.Norm2(nd); nf < f || t == 1 && nf <= f*(1+1e-13) {
				xi, eta, d, f = nx, ny, nd, nf
				moved = true
				break
			}
			t /= 2
		}
		if !moved {
			// No descent along a descent direction: stationary to within
			// rounding.
			return xi, eta, true
		}
	}
	return xi, eta, false
}

// stationary reports whether (xi, eta) satisfies the optimality
// conditions of min |x - p|^2 over the square to rounding: along each
// free coordinate the tangent is perpendicular to x - p; on a bound the
// distance may only grow inwards.
func (s *bilinear) stationary(p r3.Vec, xi, eta float64) bool {
	d := r3.Sub(s.at(xi, eta), p)
	a, b := s.tangents(xi, eta)
	floor := 1e-14 * math.Sqrt(s.size2)
	dn := r3.Norm(d)
	ok := func(t r3.Vec, u float64) bool {
		g := r3.Dot(t, d)
		tn := r3.Norm(t)
		switch {
		case math.Abs(g) <= 1e-8*tn*dn+floor*tn:
			return true
		case u <= -1:
			return g > 0
		case u >= 1:
			return g < 0
		}
		return false
	}
	return ok(a, xi) && ok(b, eta)
}

// ClosestOnQuad returns the point q of the bilinear quad with corners x
// closest to p, the corner weights w (q = sum w[i] x[i]) and the
// parametric coordinates (xi, eta) in [-1, 1]^2 of q. The result always
// lies on the bilinear surface; warped (non-planar), non-convex and
// collapsed quads are handled.
//
// It runs a damped Newton iteration from the centre and accepts its
// result when it satisfies the optimality conditions and is provably the
// only point that does: inside a flat convex quad, or anywhere when the
// squared distance is convex over the element (a bound on the warp
// against the element's shape and the distance, see convexFor; it holds
// for the mildly warped elements of real meshes and points within a few
// element sizes). Otherwise the closest points of the four straight
// edges are compared, the quad is scanned along its straight parameter
// lines xi = const, on each of which the closest point is closed-form,
// and Newton restarts from the best local minima of the scan.
func ClosestOnQuad(p r3.Vec, x [4]r3.Vec) (q r3.Vec, w [4]float64, xi, eta float64) {
	s := newBilinear(x)
	bestXi, bestEta := 0.0, 0.0
	bestQ := s.at(0, 0)
	bestD := r3.Norm2(r3.Sub(bestQ, p))
	consider := func(xi, eta float64) {
		q := s.at(xi, eta)
		if d := r3.Norm2(r3.Sub(q, p)); d < bestD {
			bestXi, bestEta, bestQ, bestD = xi, eta, q, d
		}
	}
	nxi, neta, ok := s.newton(p, 0, 0)
	consider(nxi, neta)
	if ok && s.stationary(p, nxi, neta) {
		// A point that satisfies the optimality conditions is the
		// minimum when it is the only such point: inside a flat convex
		// quad, or anywhere when the distance is convex over the quad.
		inside := math.Abs(nxi) < 1 && math.Abs(neta) < 1
		if inside && s.planarConvex() || s.convexFor(p) {
			return bestQ, quadWeights(bestXi, bestEta), bestXi, bestEta
		}
	}
	// Edges: corner i -> corner i+1, as (xi, eta) = start + t * dir.
	edges := [4][4]float64{
		{-1, -1, 2, 0},
		{1, -1, 0, 2},
		{1, 1, -2, 0},
		{-1, 1, 0, -2},
	}
	for i, e := range edges {
		t := closestOnSegment(p, x[i], x[(i+1)%4])
		consider(e[0]+t*e[2], e[1]+t*e[3])
	}
	// Scan the lines xi = const. On each the surface is the straight
	// segment c + xi e1 + eta (e2 + xi h), eta in [-1, 1].
	const nscan = 16
	var g [nscan + 1]float64
	var ge [nscan + 1]float64
	for k := range g {
		u := 2*float64(k)/nscan - 1
		ge[k] = s.lineMin(p, u)
		g[k] = r3.Norm2(r3.Sub(s.at(u, ge[k]), p))
		consider(u, ge[k])
	}
	// Restart Newton from the local minima of the scan, best first, at
	// most three.
	var starts [nscan + 1]int
	ns := 0
	for k := range g {
		if (k == 0 || g[k] <= g[k-1]) && (k == nscan || g[k] < g[k+1]) {
			starts[ns] = k
			ns++
		}
	}
	slices.SortFunc(starts[:ns], func(a, b int) int { return cmp.Compare(g[a], g[b]) })
	for _, k := range starts[:min(ns, 3)] {
		nx, ny, _ := s.newton(p, 2*float64(k)/nscan-1, ge[k])
		consider(nx, ny)
	}
	return bestQ, quadWeights(bestXi, bestEta), bestXi, bestEta
}

// lineMin returns the eta of the point of the line xi = u closest to p,
// clamped to [-1, 1] (the distance along the line is a quadratic in eta).
func (s *bilinear) lineMin(p r3.Vec, u float64) float64 {
	o := r3.Sub(r3.Add(s.c, r3.Scale(u, s.e1)), p)
	b := r3.Add(s.e2, r3.Scale(u, s.h))
	return ratio2(-r3.Dot(o, b), r3.Dot(b, b))
}

// ratio2 returns num/den clamped to [-1, 1], and 0 when den is not
// positive.
func ratio2(num, den float64) float64 {
	if !(den > 0) {
		return 0
	}
	return min(max(num/den, -1), 1)
}

// convexFor reports whether the squared distance from p is certainly
// convex over the whole element, so that any local minimum is the
// global one. With J = [dx/dxi dx/deta] = J0 + [eta h, xi h], the
// Hessian is J'J plus h.(x-p) off the diagonal; its smallest eigenvalue
// is at least (smin(J0) - sqrt2 |h|)^2 - |h| max|x-p|, and |x-p| is at
// most |p-c| plus the largest corner distance from the centre c.
func (s *bilinear) convexFor(p r3.Vec) bool {
	hn := r3.Norm(s.h)
	if hn == 0 {
		return true // a parallelogram: the distance is a convex quadratic
	}
	g11, g12, g22 := r3.Dot(s.e1, s.e1), r3.Dot(s.e1, s.e2), r3.Dot(s.e2, s.e2)
	tr, det := g11+g22, g11*g22-g12*g12
	lmax := (tr + math.Sqrt(max(tr*tr-4*det, 0))) / 2
	if !(lmax > 0) || !(det > 0) {
		return false
	}
	smin := math.Sqrt(det/lmax) - math.Sqrt2*hn
	if !(smin > 0) {
		return false
	}
	reach := 0.0
	for _, c := range s.x {
		reach = max(reach, r3.Norm(r3.Sub(c, s.c)))
	}
	return smin*smin > hn*(r3.Norm(r3.Sub(p, s.c))+reach)
}

// quadNormal returns the unit normal dx/dxi x dx/deta of the quad at
// (xi, eta), falling back to the cross product of the diagonals where the
// tangents are parallel (a collapsed corner), and zero for a degenerate
// quad.
func quadNormal(x [4]r3.Vec, xi, eta float64) r3.Vec {
	s := newBilinear(x)
	a, b := s.tangents(xi, eta)
	n := r3.Cross(a, b)
	if r3.Norm2(n) > 1e-20*r3.Norm2(a)*r3.Norm2(b) && r3.Norm2(n) > 0 {
		return r3.Unit(n)
	}
	return unitOrZero(r3.Cross(r3.Sub(x[2], x[0]), r3.Sub(x[3], x[1])))
}

func unitOrZero(v r3.Vec) r3.Vec {
	n := r3.Norm(v)
	if !(n > 0) || math.IsInf(n, 0) {
		return r3.Vec{}
	}
	return r3.Scale(1/n, v)
}

// Project returns the closest point of element e's surface to p.
// Triangles are flat; quads are bilinear surfaces through their four
// corners; second-order elements are the curved surfaces their shape
// functions describe, projected onto exactly (see closestOnPatch). An
// element of another node count gives Dist = +Inf.
func (m *Mesh) Project(e int, p r3.Vec) Projection {
	nodes := m.ElemNodes(e)
	pr := Projection{Elem: e}
	switch t := m.Type(e); t {
	case Tri3:
		a, b, c := m.Coords[nodes[0]], m.Coords[nodes[1]], m.Coords[nodes[2]]
		q, l := ClosestOnTriangle(p, a, b, c)
		pr.Point = q
		pr.Xi, pr.Eta = l[1], l[2]
		pr.Weights[0], pr.Weights[1], pr.Weights[2] = l[0], l[1], l[2]
		pr.Normal = unitOrZero(r3.Cross(r3.Sub(b, a), r3.Sub(c, a)))
	case Quad4:
		x := [4]r3.Vec{m.Coords[nodes[0]], m.Coords[nodes[1]], m.Coords[nodes[2]], m.Coords[nodes[3]]}
		var w [4]float64
		pr.Point, w, pr.Xi, pr.Eta = ClosestOnQuad(p, x)
		copy(pr.Weights[:], w[:])
		pr.Normal = quadNormal(x, pr.Xi, pr.Eta)
	case Tri6, Quad8, Quad9:
		m.projectQuadratic(e, p, &pr)
	default:
		pr.Dist = math.Inf(1)
		return pr
	}
	pr.Dist = r3.Norm(r3.Sub(p, pr.Point))
	return pr
}
