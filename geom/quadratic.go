package geom

import (
	"math"
	"slices"

	"gonum.org/v1/gonum/spatial/r3"
)

// MaxElemNodes is the largest number of nodes of an element (Quad9).
const MaxElemNodes = 9

// patch is the curved surface of a second-order element: the polynomial
// x(u, v) = sum over p, q of a[p][q] u^p v^q, with (u, v) = (xi, eta) in
// [-1, 1]^2 for quads and the area coordinates (L2, L3) of the triangle
// u, v >= 0, u + v <= 1 for triangles (as Projection describes them).
// Quad8 is held as the biquadratic patch through its eight nodes and the
// centre point of its serendipity interpolation: the serendipity
// functions lie in the span of the biquadratic ones, so both give the
// same surface.
type patch struct {
	t   ElemType
	x   [MaxElemNodes]r3.Vec // the element's nodes, in its order
	a   [3][3]r3.Vec         // monomial coefficients
	tri bool
}

// lagrange3 are the coefficients (of 1, t, t^2) of the quadratic Lagrange
// polynomials of the nodes t = -1, 0, 1.
var lagrange3 = [3][3]float64{{0, -0.5, 0.5}, {1, 0, -1}, {0, 0.5, 0.5}}

// q9Grid maps the (xi, eta) grid position (i, j), 0 for -1, 1 for 0 and
// 2 for +1, to the node of a Quad9.
var q9Grid = [3][3]int{{0, 7, 3}, {4, 8, 6}, {1, 5, 2}}

// newPatch returns the patch of a second-order element with the given
// nodes (6, 8 or 9 of them, t saying which).
func newPatch(t ElemType, nodes []r3.Vec) patch {
	s := patch{t: t, tri: t == Tri6}
	copy(s.x[:], nodes)
	if s.tri {
		x := &s.x
		s.a[0][0] = x[0]
		s.a[1][0] = lin(-3, x[0], -1, x[1], 4, x[3])
		s.a[0][1] = lin(-3, x[0], -1, x[2], 4, x[5])
		s.a[2][0] = lin(2, x[0], 2, x[1], -4, x[3])
		s.a[0][2] = lin(2, x[0], 2, x[2], -4, x[5])
		s.a[1][1] = r3.Scale(4, r3.Add(r3.Sub(x[0], x[3]), r3.Sub(x[4], x[5])))
		return s
	}
	if t == Quad8 {
		// The serendipity surface at (0, 0): corners weigh -1/4,
		// midsides 1/2.
		c := r3.Add(r3.Add(s.x[0], s.x[1]), r3.Add(s.x[2], s.x[3]))
		m := r3.Add(r3.Add(s.x[4], s.x[5]), r3.Add(s.x[6], s.x[7]))
		s.x[8] = r3.Sub(r3.Scale(0.5, m), r3.Scale(0.25, c))
	}
	for i := range 3 {
		for j := range 3 {
			g := s.x[q9Grid[i][j]]
			for p := range 3 {
				for q := range 3 {
					if w := lagrange3[i][p] * lagrange3[j][q]; w != 0 {
						s.a[p][q] = r3.Add(s.a[p][q], r3.Scale(w, g))
					}
				}
			}
		}
	}
	if t == Quad8 {
		s.x[8] = r3.Vec{} // not a node of the element
	}
	return s
}

// lin returns ca a + cb b + cc c.
func lin(ca float64, a r3.Vec, cb float64, b r3.Vec, cc float64, c r3.Vec) r3.Vec {
	return r3.Vec{
		X: ca*a.X + cb*b.X + cc*c.X,
		Y: ca*a.Y + cb*b.Y + cc*c.Y,
		Z: ca*a.Z + cb*b.Z + cc*c.Z,
	}
}

// eval returns the point at (u, v) from the monomial form, with its
// first and second derivatives.
func (s *patch) eval(u, v float64) (x, xu, xv, xuu, xuv, xvv r3.Vec) {
	pu := [3]float64{1, u, u * u}
	pv := [3]float64{1, v, v * v}
	du := [3]float64{0, 1, 2 * u}
	dv := [3]float64{0, 1, 2 * v}
	for p := range 3 {
		for q := range 3 {
			c := s.a[p][q]
			if c == (r3.Vec{}) {
				continue
			}
			x = r3.Add(x, r3.Scale(pu[p]*pv[q], c))
			xu = r3.Add(xu, r3.Scale(du[p]*pv[q], c))
			xv = r3.Add(xv, r3.Scale(pu[p]*dv[q], c))
			if p == 2 {
				xuu = r3.Add(xuu, r3.Scale(2*pv[q], c))
			}
			if q == 2 {
				xvv = r3.Add(xvv, r3.Scale(2*pu[p], c))
			}
			xuv = r3.Add(xuv, r3.Scale(du[p]*dv[q], c))
		}
	}
	return
}

// point returns the point at (u, v) from the monomial form.
func (s *patch) point(u, v float64) r3.Vec {
	x, _, _, _, _, _ := s.eval(u, v)
	return x
}

// tangents returns dx/du and dx/dv at (u, v).
func (s *patch) tangents(u, v float64) (r3.Vec, r3.Vec) {
	_, a, b, _, _, _ := s.eval(u, v)
	return a, b
}

// ShapeWeights returns the shape-function values of the nodes of an
// element of type t at the parametric point (xi, eta) (see Projection):
// for Tri3 and Quad4 the linear and bilinear functions, for Tri6
// L_i (2 L_i - 1) at the corners and 4 L_i L_j at the midsides, for Quad8
// the serendipity functions and for Quad9 the products of the quadratic
// Lagrange polynomials in xi and eta. They sum to 1, and the element maps
// (xi, eta) to sum w_i x_i. The weights of quadratic elements are not all
// positive inside the element: the corner weights of Tri6 and Quad8 are
// negative near the element's middle (-1/9 at a Tri6's centroid, -1/4 at
// a Quad8's centre), and Quad9 weights change sign along every parameter
// line (-1/8 for a corner at xi = 1/2, eta = -1, for instance).
func ShapeWeights(t ElemType, xi, eta float64) [MaxElemNodes]float64 {
	var w [MaxElemNodes]float64
	switch t {
	case Tri3:
		w[0], w[1], w[2] = 1-xi-eta, xi, eta
	case Quad4:
		q := quadWeights(xi, eta)
		copy(w[:], q[:])
	case Tri6:
		l1, l2, l3 := 1-xi-eta, xi, eta
		w[0], w[1], w[2] = l1*(2*l1-1), l2*(2*l2-1), l3*(2*l3-1)
		w[3], w[4], w[5] = 4*l1*l2, 4*l2*l3, 4*l3*l1
	case Quad8:
		corners := [4][2]float64{{-1, -1}, {1, -1}, {1, 1}, {-1, 1}}
		for k, c := range corners {
			w[k] = (1 + xi*c[0]) * (1 + eta*c[1]) * (xi*c[0] + eta*c[1] - 1) / 4
		}
		w[4] = (1 - xi*xi) * (1 - eta) / 2
		w[5] = (1 + xi) * (1 - eta*eta) / 2
		w[6] = (1 - xi*xi) * (1 + eta) / 2
		w[7] = (1 - xi) * (1 - eta*eta) / 2
	case Quad9:
		lx := [3]float64{xi * (xi - 1) / 2, 1 - xi*xi, xi * (xi + 1) / 2}
		ly := [3]float64{eta * (eta - 1) / 2, 1 - eta*eta, eta * (eta + 1) / 2}
		for i := range 3 {
			for j := range 3 {
				w[q9Grid[i][j]] = lx[i] * ly[j]
			}
		}
	}
	return w
}

// weighted returns sum w[i] x[i] over the n nodes.
func weighted(w *[MaxElemNodes]float64, x []r3.Vec) r3.Vec {
	var p r3.Vec
	for i, xi := range x {
		p.X += w[i] * xi.X
		p.Y += w[i] * xi.Y
		p.Z += w[i] * xi.Z
	}
	return p
}

// controlNet returns the control points of the patch over the parameter
// cell with corners c[0..n) (a sub-square given by its corners (u0, v0)
// and (u1, v1) for quads, a sub-triangle by its three corners for
// triangles): the patch restricted to the cell is a quadratic patch of
// the same kind, and its Bernstein-Bezier control points are the values
// at the cell's corners, and 2m - (a+b)/2 for an edge with end values a
// and b and midpoint value m (applied along both directions for quads,
// which gives the centre point). The patch over the cell lies in the
// convex hull of these points.
func (s *patch) controlNet(cell [3][2]float64) (pts [9]r3.Vec, n int) {
	ctl := func(a, m, b r3.Vec) r3.Vec { return lin(2, m, -0.5, a, -0.5, b) }
	if s.tri {
		var c [3]r3.Vec
		for k := range 3 {
			c[k] = s.point(cell[k][0], cell[k][1])
			pts[k] = c[k]
		}
		for k := range 3 {
			a, b := cell[k], cell[(k+1)%3]
			m := s.point((a[0]+b[0])/2, (a[1]+b[1])/2)
			pts[3+k] = ctl(c[k], m, c[(k+1)%3])
		}
		return pts, 6
	}
	u0, v0, u1, v1 := cell[0][0], cell[0][1], cell[1][0], cell[1][1]
	us := [3]float64{u0, (u0 + u1) / 2, u1}
	vs := [3]float64{v0, (v0 + v1) / 2, v1}
	var g [3][3]r3.Vec
	for i := range 3 {
		for j := range 3 {
			g[i][j] = s.point(us[i], vs[j])
		}
	}
	for j := range 3 {
		g[1][j] = ctl(g[0][j], g[1][j], g[2][j])
	}
	for i := range 3 {
		g[i][1] = ctl(g[i][0], g[i][1], g[i][2])
	}
	for i := range 3 {
		for j := range 3 {
			pts[3*i+j] = g[i][j]
		}
	}
	return pts, 9
}

// wholeCell is the parameter domain of the patch as a cell for
// controlNet.
func (s *patch) wholeCell() [3][2]float64 {
	if s.tri {
		return [3][2]float64{{0, 0}, {1, 0}, {0, 1}}
	}
	return [3][2]float64{{-1, -1}, {1, 1}}
}

// controlBox returns the bounding box of the control points of element
// e, a second-order element: it holds the element's whole curved surface.
// For a flat element with straight edges and midside nodes at the edge
// middles it is the box of the corners. NaN coordinates are ignored.
func controlBox(s *patch) (lo, hi r3.Vec) {
	lo = r3.Vec{X: math.Inf(1), Y: math.Inf(1), Z: math.Inf(1)}
	hi = r3.Vec{X: math.Inf(-1), Y: math.Inf(-1), Z: math.Inf(-1)}
	pts, n := s.controlNet(s.wholeCell())
	// The corners exactly, the control points as computed.
	for _, v := range pts[:n] {
		lo.X, hi.X = minIgnoreNaN(lo.X, v.X), maxIgnoreNaN(hi.X, v.X)
		lo.Y, hi.Y = minIgnoreNaN(lo.Y, v.Y), maxIgnoreNaN(hi.Y, v.Y)
		lo.Z, hi.Z = minIgnoreNaN(lo.Z, v.Z), maxIgnoreNaN(hi.Z, v.Z)
	}
	for _, v := range s.x[:s.t.Corners()] {
		lo.X, hi.X = minIgnoreNaN(lo.X, v.X), maxIgnoreNaN(hi.X, v.X)
		lo.Y, hi.Y = minIgnoreNaN(lo.Y, v.Y), maxIgnoreNaN(hi.Y, v.Y)
		lo.Z, hi.Z = minIgnoreNaN(lo.Z, v.Z), maxIgnoreNaN(hi.Z, v.Z)
	}
	// Widen by a few units in the last place of the control points'
	// size: they come from a few roundings each.
	pad := 1e-14 * (math.Max(math.Abs(lo.X), math.Abs(hi.X)) + math.Max(math.Abs(lo.Y), math.Abs(hi.Y)) +
		math.Max(math.Abs(lo.Z), math.Abs(hi.Z)) + (hi.X - lo.X) + (hi.Y - lo.Y) + (hi.Z - lo.Z))
	if finite(pad) {
		d := r3.Vec{X: pad, Y: pad, Z: pad}
		lo, hi = r3.Sub(lo, d), r3.Add(hi, d)
	}
	return lo, hi
}

// quadraticBox is elemBox for second-order element e, out of line so
// that the linear elements' path stays small.
func quadraticBox(m *Mesh, e int) (lo, hi r3.Vec) {
	s := m.patchOf(e)
	return controlBox(&s)
}

// A constraint n . (u, v) <= c of the parameter domain.
type constraint struct{ nu, nv, c float64 }

var (
	squareSides = [...]constraint{{-1, 0, 1}, {1, 0, 1}, {0, -1, 1}, {0, 1, 1}}
	triSides    = [...]constraint{{-1, 0, 0}, {0, -1, 0}, {1, 1, 1}}
)

func (s *patch) sides() []constraint {
	if s.tri {
		return triSides[:]
	}
	return squareSides[:]
}

// clampDomain returns the point of the domain nearest to (u, v).
func (s *patch) clampDomain(u, v float64) (float64, float64) {
	if !s.tri {
		return min(max(u, -1), 1), min(max(v, -1), 1)
	}
	if u >= 0 && v >= 0 && u+v <= 1 {
		return u, v
	}
	// The nearest point of the three sides.
	bu, bv, bd := 0.0, 0.0, math.Inf(1)
	try := func(pu, pv float64) {
		if d := (pu-u)*(pu-u) + (pv-v)*(pv-v); d < bd {
			bu, bv, bd = pu, pv, d
		}
	}
	try(min(max(u, 0), 1), 0)
	try(0, min(max(v, 0), 1))
	t := min(max((u-v+1)/2, 0), 1) // along (1, 0) -> (0, 1)
	try(t, 1-t)
	return bu, bv
}

// onSide reports whether (u, v) lies on side k of the domain.
func onSide(k constraint, u, v float64) bool { return k.nu*u+k.nv*v >= k.c-1e-15 }

// newton minimises |x(u, v) - p|^2 over the domain from (u, v) with a
// damped, projected Newton method: the exact Hessian where it is
// positive definite, the Gauss-Newton one elsewhere, restricted to a side
// of the domain when the gradient pushes out through it, a backtracking
// line search, and projection onto the domain. It reports whether the
// steps converged; the point returned is the best one reached.
func (s *patch) newton(p r3.Vec, u, v float64) (float64, float64, bool) {
	x, xu, xv, xuu, xuv, xvv := s.eval(u, v)
	d := r3.Sub(x, p)
	f := r3.Norm2(d)
	size2 := r3.Norm2(xu) + r3.Norm2(xv)
	for range quadMaxIter {
		g1, g2 := r3.Dot(xu, d), r3.Dot(xv, d)
		j11, j12, j22 := r3.Dot(xu, xu), r3.Dot(xu, xv), r3.Dot(xv, xv)
		h11, h12, h22 := j11+r3.Dot(d, xuu), j12+r3.Dot(d, xuv), j22+r3.Dot(d, xvv)
		// Sides the point is on and the descent direction leaves through.
		var act [2]constraint
		na := 0
		for _, k := range s.sides() {
			if onSide(k, u, v) && -(g1*k.nu+g2*k.nv) > 0 && na < 2 {
				act[na] = k
				na++
			}
		}
		var su, sv float64
		if na == 2 {
			// At a vertex: move along one of its sides if that descends.
			moved := false
			for i := range 2 {
				k, o := act[i], act[1-i]
				tu, tv := -k.nv, k.nu
				if tu*o.nu+tv*o.nv > 0 {
					tu, tv = -tu, -tv // point into the domain
				}
				if g1*tu+g2*tv < 0 {
					act[0], na, moved = k, 1, true
					break
				}
			}
			if !moved {
				return u, v, true
			}
		}
		switch na {
		case 1:
			k := act[0]
			tu, tv := -k.nv, k.nu
			gt := g1*tu + g2*tv
			ht := h11*tu*tu + 2*h12*tu*tv + h22*tv*tv
			if !(ht > 1e-12*(j11*tu*tu+j22*tv*tv)) {
				ht = j11*tu*tu + 2*j12*tu*tv + j22*tv*tv
			}
			if !(ht > 0) {
				return u, v, true
			}
			su, sv = -gt/ht*tu, -gt/ht*tv
		default:
			det := h11*h22 - h12*h12
			if !(det > 1e-12*h11*h22) || !(h11 > 0) {
				h11, h12, h22 = j11, j12, j22 // Gauss-Newton
				det = h11*h22 - h12*h12
			}
			switch {
			case det > 1e-14*h11*h22:
				su = -(h22*g1 - h12*g2) / det
				sv = -(h11*g2 - h12*g1) / det
			case h11 > 1e-28*size2 || h22 > 1e-28*size2:
				hm := max(h11, h22)
				su, sv = -g1/hm, -g2/hm
			default:
				return u, v, false
			}
		}
		if n := math.Max(math.Abs(su), math.Abs(sv)); n > 2 {
			su, sv = su*2/n, sv*2/n
		}
		if !finite(su) || !finite(sv) {
			return u, v, false
		}
		fu, fv := s.clampDomain(u+su, v+sv)
		if math.Abs(fu-u)+math.Abs(fv-v) < quadParamTol {
			return u, v, true
		}
		t := 1.0
		moved := false
		for range quadLineSearch {
			nu, nv := s.clampDomain(u+t*su, v+t*sv)
			nx, nxu, nxv, nxuu, nxuv, nxvv := s.eval(nu, nv)
			nd := r3.Sub(nx, p)
			if nf := r3.Norm2(nd); nf < f || t == 1 && nf <= f*(1+1e-13) {
				u, v, d, f = nu, nv, nd, nf
				xu, xv, xuu, xuv, xvv = nxu, nxv, nxuu, nxuv, nxvv
				moved = true
				break
			}
			t /= 2
		}
		if !moved {
			return u, v, true
		}
	}
	return u, v, false
}

// stationary reports whether (u, v) satisfies the optimality conditions
// of min |x - p|^2 over the domain to rounding: the gradient is a
// non-negative combination of the outward normals of the sides the point
// is on.
func (s *patch) stationary(p r3.Vec, u, v float64) bool {
	x, xu, xv, _, _, _ := s.eval(u, v)
	d := r3.Sub(x, p)
	g1, g2 := r3.Dot(xu, d), r3.Dot(xv, d)
	dn := vnorm(d)
	floor := 1e-14 * math.Sqrt(r3.Norm2(xu)+r3.Norm2(xv))
	tol1 := 1e-8*vnorm(xu)*dn + floor*vnorm(xu)
	tol2 := 1e-8*vnorm(xv)*dn + floor*vnorm(xv)
	small := func(r1, r2 float64) bool { return math.Abs(r1) <= tol1 && math.Abs(r2) <= tol2 }
	if small(g1, g2) {
		return true
	}
	var act []constraint
	for _, k := range s.sides() {
		if onSide(k, u, v) {
			act = append(act, k)
		}
	}
	switch len(act) {
	case 1:
		// -g = lambda n with lambda >= 0.
		k := act[0]
		lam := -(g1*k.nu + g2*k.nv) / (k.nu*k.nu + k.nv*k.nv)
		return lam >= 0 && small(g1+lam*k.nu, g2+lam*k.nv)
	case 2:
		// At a vertex: -g = la na + lb nb with la, lb >= 0.
		a, b := act[0], act[1]
		det := a.nu*b.nv - a.nv*b.nu
		if det == 0 {
			return false
		}
		la := (-g1*b.nv + g2*b.nu) / det
		lb := (-a.nu*g2 + a.nv*g1) / det
		return la >= -(tol1+tol2) && lb >= -(tol1+tol2)
	}
	return false
}

// convexFor reports whether the squared distance from p is certainly
// convex over the whole patch, so that a point satisfying the optimality
// conditions is the closest one. Half the Hessian is J'J + S with S the
// second derivatives of x dotted with x - p; its smallest eigenvalue is
// at least (smin(J0) - |J - J0|)^2 - |x - p| |second derivatives|, with
// J0 the Jacobian at the domain's centre, the variation of J and the
// second derivatives bounded term by term from the monomial form, and
// |x - p| at most |p - x0| plus a bound of |x - x0| over the domain from
// the monomial coefficients.
func (s *patch) convexFor(p r3.Vec) bool {
	n := func(p, q int) float64 { return vnorm(s.a[p][q]) }
	var u0, v0, r float64 // centre and half-width of the domain
	var dU, dV, bUU, bUV, bVV float64
	if s.tri {
		u0, v0, r = 1.0/3, 1.0/3, 2.0/3
		dU = r * (2*n(2, 0) + n(1, 1))
		dV = r * (n(1, 1) + 2*n(0, 2))
		bUU, bUV, bVV = 2*n(2, 0), n(1, 1), 2*n(0, 2)
	} else {
		dU = 2*n(2, 0) + n(1, 1) + 2*n(2, 1) + n(1, 2) + 2*n(2, 2)
		dV = n(1, 1) + 2*n(0, 2) + n(2, 1) + 2*n(1, 2) + 2*n(2, 2)
		bUU = 2 * (n(2, 0) + n(2, 1) + n(2, 2))
		bVV = 2 * (n(0, 2) + n(1, 2) + n(2, 2))
		bUV = n(1, 1) + 2*n(2, 1) + 2*n(1, 2) + 4*n(2, 2)
	}
	x0, a, b, _, _, _ := s.eval(u0, v0)
	g11, g12, g22 := r3.Dot(a, a), r3.Dot(a, b), r3.Dot(b, b)
	tr, det := g11+g22, g11*g22-g12*g12
	lmax := (tr + math.Sqrt(max(tr*tr-4*det, 0))) / 2
	if !(lmax > 0) || !(det > 0) {
		return false
	}
	smin := math.Sqrt(det/lmax) - math.Sqrt(dU*dU+dV*dV)
	if !(smin > 0) {
		return false
	}
	// |x - x0| <= |x - a00| + |a00 - x0|, and |x - a00| is at most the
	// sum of the other coefficients' norms (|u|, |v| <= 1 on both
	// domains).
	reach := vnorm(r3.Sub(s.a[0][0], x0))
	for p := range 3 {
		for q := range 3 {
			if p+q > 0 {
				reach += n(p, q)
			}
		}
	}
	curv := math.Sqrt(bUU*bUU + 2*bUV*bUV + bVV*bVV)
	return smin*smin > (vnorm(r3.Sub(p, x0))+reach)*curv*(1+1e-9)
}

// Settings of the search on second-order elements when the Newton
// result cannot be certified.
const (
	patchLeafLevel = 4  // cells are cut four times (to 1/16 of a side) before Newton runs in them
	patchNewtons   = 64 // at most this many Newton runs
	patchCells     = 4096
)

// closest returns the parametric coordinates of the point of the patch
// closest to p.
//
// Newton runs from (su, sv) (the closest point of the element through its
// corners, a good guess for mildly curved elements) and its result is
// accepted when it satisfies the optimality conditions and the distance
// is provably convex over the patch (convexFor), which holds for the
// curvatures of real sheet meshes and points within a few element sizes.
// Otherwise a branch-and-bound search runs: cells of the parameter domain
// are taken by increasing lower bound of their distance (the distance to
// the box of their control net, which holds the cell's surface), cut in
// four until they are 1/16 of the domain's side, and Newton runs from the
// centre of every such cell whose bound is below the best distance found,
// up to a budget (patchNewtons, patchCells) that only nearly equidistant
// surfaces (a point near a centre of curvature) exhaust, where any of the
// candidates is as close as the others to rounding. The best point
// reached is returned; it always lies on the patch.
func (s *patch) closest(p r3.Vec, su, sv float64) (float64, float64) {
	bu, bv := s.clampDomain(su, sv)
	bd := r3.Norm2(r3.Sub(s.point(bu, bv), p))
	consider := func(u, v float64) {
		if d := r3.Norm2(r3.Sub(s.point(u, v), p)); d < bd {
			bu, bv, bd = u, v, d
		}
	}
	nu, nv, ok := s.newton(p, bu, bv)
	consider(nu, nv)
	if ok && s.stationary(p, nu, nv) && s.convexFor(p) {
		return nu, nv
	}
	type cell struct {
		c     [3][2]float64
		lb    float64 // squared distance from p to the control net's box
		level int
	}
	bound := func(c [3][2]float64) float64 {
		pts, n := s.controlNet(c)
		lo, hi := pts[0], pts[0]
		for _, q := range pts[1:n] {
			lo = r3.Vec{X: math.Min(lo.X, q.X), Y: math.Min(lo.Y, q.Y), Z: math.Min(lo.Z, q.Z)}
			hi = r3.Vec{X: math.Max(hi.X, q.X), Y: math.Max(hi.Y, q.Y), Z: math.Max(hi.Z, q.Z)}
		}
		return boxDist2(lo, hi, p)
	}
	// heap is a min-heap of cells by lower bound.
	var heap []cell
	less := func(i, j int) bool { return heap[i].lb < heap[j].lb }
	push := func(c cell) {
		heap = append(heap, c)
		for i := len(heap) - 1; i > 0; {
			up := (i - 1) / 2
			if !less(i, up) {
				break
			}
			heap[i], heap[up] = heap[up], heap[i]
			i = up
		}
	}
	pop := func() cell {
		top := heap[0]
		last := len(heap) - 1
		heap[0] = heap[last]
		heap = heap[:last]
		for i := 0; ; {
			l, r, m := 2*i+1, 2*i+2, i
			if l < len(heap) && less(l, m) {
				m = l
			}
			if r < len(heap) && less(r, m) {
				m = r
			}
			if m == i {
				break
			}
			heap[i], heap[m] = heap[m], heap[i]
			i = m
		}
		return top
	}
	whole := s.wholeCell()
	push(cell{whole, bound(whole), 0})
	newtons, cells := 0, 0
	for len(heap) > 0 && newtons < patchNewtons && cells < patchCells {
		c := pop()
		if c.lb > bd*pruneSlack {
			break // every cell left is farther than the best point
		}
		var kids [4][3][2]float64
		mid := func(a, b [2]float64) [2]float64 { return [2]float64{(a[0] + b[0]) / 2, (a[1] + b[1]) / 2} }
		if s.tri {
			a, b, d := c.c[0], c.c[1], c.c[2]
			ab, bd2, da := mid(a, b), mid(b, d), mid(d, a)
			kids = [4][3][2]float64{{a, ab, da}, {ab, b, bd2}, {da, bd2, d}, {bd2, da, ab}}
		} else {
			lo, hi := c.c[0], c.c[1]
			m := mid(lo, hi)
			kids = [4][3][2]float64{
				{lo, m}, {{m[0], lo[1]}, {hi[0], m[1]}},
				{{lo[0], m[1]}, {m[0], hi[1]}}, {m, hi},
			}
		}
		if c.level < patchLeafLevel {
			for _, k := range kids {
				push(cell{k, bound(k), c.level + 1})
				cells++
			}
			continue
		}
		// A leaf: Newton from its centre.
		var cu, cv float64
		if s.tri {
			cu, cv = (c.c[0][0]+c.c[1][0]+c.c[2][0])/3, (c.c[0][1]+c.c[1][1]+c.c[2][1])/3
		} else {
			cu, cv = (c.c[0][0]+c.c[1][0])/2, (c.c[0][1]+c.c[1][1])/2
		}
		consider(cu, cv)
		nu, nv, _ := s.newton(p, cu, cv)
		consider(nu, nv)
		newtons++
	}
	return bu, bv
}

// normal returns the unit normal dx/du x dx/dv at (u, v), falling back to
// the normal of the element through its corners where the tangents are
// parallel, and zero for a degenerate element.
func (s *patch) normal(u, v float64) r3.Vec {
	a, b := s.tangents(u, v)
	n := r3.Cross(a, b)
	if r3.Norm2(n) > 1e-20*r3.Norm2(a)*r3.Norm2(b) && r3.Norm2(n) > 0 {
		return r3.Unit(n)
	}
	return unitOrZero(s.cornerAreaVector())
}

// cornerAreaVector is the area vector of the linear element through the
// patch's corners.
func (s *patch) cornerAreaVector() r3.Vec {
	x := &s.x
	if s.tri {
		return r3.Scale(0.5, r3.Cross(r3.Sub(x[1], x[0]), r3.Sub(x[2], x[0])))
	}
	return r3.Scale(0.5, r3.Cross(r3.Sub(x[2], x[0]), r3.Sub(x[3], x[1])))
}

// Quadrature rules. Gauss-Legendre points and weights on [-1, 1]
// (Abramowitz and Stegun, Handbook of Mathematical Functions, table
// 25.4): three points, exact for polynomials up to degree 5, and four
// points, up to degree 7. Radon's seven-point rule on the triangle
// (A. H. Stroud, Approximate Calculation of Multiple Integrals, 1971,
// formula T2:5-1), exact up to degree 5: the centroid, and the points
// (a, a, 1-2a) for a = (6 -+ sqrt 15)/21, weights relative to the area.
var (
	gauss3w = [3]float64{5.0 / 9, 8.0 / 9, 5.0 / 9}
	gauss3x = [3]float64{-0.7745966692414834, 0, 0.7745966692414834}
	gauss4w = [4]float64{0.3478548451374538, 0.6521451548625461, 0.6521451548625461, 0.3478548451374538}
	gauss4x = [4]float64{-0.8611363115940526, -0.3399810435848563, 0.3399810435848563, 0.8611363115940526}
	radon7  = func() (pts [7][3]float64) {
		s15 := math.Sqrt(15)
		a1, a2 := (6-s15)/21, (6+s15)/21
		w1, w2 := (155-s15)/1200, (155+s15)/1200
		pts[0] = [3]float64{1.0 / 3, 1.0 / 3, 9.0 / 40}
		for k, a := range [2]float64{a1, a2} {
			w := [2]float64{w1, w2}[k]
			pts[1+3*k] = [3]float64{a, a, w}
			pts[2+3*k] = [3]float64{a, 1 - 2*a, w}
			pts[3+3*k] = [3]float64{1 - 2*a, a, w}
		}
		return pts
	}()
)

// integrate sums f(u, v) times the quadrature weight over the domain,
// with the 7-point rule on triangles and order-by-order Gauss on quads
// (order 3 or 4 per direction).
func (s *patch) integrate(order int, f func(u, v, w float64)) {
	if s.tri {
		for _, q := range radon7 {
			f(q[0], q[1], q[2]/2) // the domain's area is 1/2
		}
		return
	}
	xs, ws := gauss3x[:], gauss3w[:]
	if order >= 4 {
		xs, ws = gauss4x[:], gauss4w[:]
	}
	for i, u := range xs {
		for j, v := range xs {
			f(u, v, ws[i]*ws[j])
		}
	}
}

// areaVector returns the integral of dx/du x dx/dv over the domain: a
// vector normal to the element's mean plane whose length is the area of
// the element's projection onto that plane (exact: the integrand is a
// polynomial the rules integrate exactly).
func (s *patch) areaVector() r3.Vec {
	var sum r3.Vec
	s.integrate(3, func(u, v, w float64) {
		a, b := s.tangents(u, v)
		sum = r3.Add(sum, r3.Scale(w, r3.Cross(a, b)))
	})
	return sum
}

// area returns the area of the curved surface, the integral of
// |dx/du x dx/dv|: exact for flat elements, by 4x4-point Gauss (quads) or
// the 7-point rule (triangles) for curved ones.
func (s *patch) area() float64 {
	sum := 0.0
	s.integrate(4, func(u, v, w float64) {
		a, b := s.tangents(u, v)
		sum += w * vnorm(r3.Cross(a, b))
	})
	return sum
}

// quadraticAreaVector is areaVector for second-order element e.
func (m *Mesh) quadraticAreaVector(e int) r3.Vec {
	s := m.patchOf(e)
	return s.areaVector()
}

// quadraticArea is Area for second-order element e.
func (m *Mesh) quadraticArea(e int) float64 {
	s := m.patchOf(e)
	return s.area()
}

// patchOf returns the patch of second-order element e.
func (m *Mesh) patchOf(e int) patch {
	var x [MaxElemNodes]r3.Vec
	nodes := m.ElemNodes(e)
	for i, n := range nodes {
		x[i] = m.Coords[n]
	}
	return newPatch(m.Type(e), x[:len(nodes)])
}

// projectQuadratic fills pr with the closest point of second-order
// element e to p.
func (m *Mesh) projectQuadratic(e int, p r3.Vec, pr *Projection) {
	s := m.patchOf(e)
	t := s.t
	var su, sv float64
	if s.tri {
		_, l := ClosestOnTriangle(p, s.x[0], s.x[1], s.x[2])
		su, sv = l[1], l[2]
	} else {
		b := newBilinear([4]r3.Vec{s.x[0], s.x[1], s.x[2], s.x[3]})
		su, sv, _ = b.newton(p, 0, 0)
	}
	u, v := s.closest(p, su, sv)
	pr.Xi, pr.Eta = u, v
	pr.Weights = ShapeWeights(t, u, v)
	pr.Point = weighted(&pr.Weights, s.x[:int(t)])
	pr.Normal = s.normal(u, v)
}

// CurveDistance returns the distance from q to the quadratic curve
// through a (t = -1), m (t = 0) and b (t = 1), t in [-1, 1], and the t of
// its closest point. The squared distance is a quartic in t; its
// stationary points, the roots of a cubic, are found exactly (to
// rounding) on the intervals where the cubic is monotone.
func CurveDistance(q, a, m, b r3.Vec) (dist, t float64) {
	e := r3.Scale(0.5, r3.Sub(b, a))
	k := r3.Sub(r3.Scale(0.5, r3.Add(a, b)), m)
	w := r3.Sub(m, q)
	// Half the derivative of |w + t e + t^2 k|^2.
	c0, c1, c2, c3 := r3.Dot(e, w), r3.Dot(e, e)+2*r3.Dot(k, w), 3*r3.Dot(e, k), 2*r3.Dot(k, k)
	df := func(t float64) float64 { return ((c3*t+c2)*t+c1)*t + c0 }
	at := func(t float64) r3.Vec {
		return lin(t*(t-1)/2, a, 1-t*t, m, t*(t+1)/2, b)
	}
	best, bestT := math.Inf(1), 0.0
	try := func(t float64) {
		if d := r3.Norm2(r3.Sub(at(t), q)); d < best {
			best, bestT = d, t
		}
	}
	// Split [-1, 1] where the cubic's derivative vanishes.
	cuts := []float64{-1}
	if A, B, C := 3*c3, 2*c2, c1; A != 0 {
		if disc := B*B - 4*A*C; disc >= 0 {
			r := math.Sqrt(disc)
			for _, z := range []float64{(-B - r) / (2 * A), (-B + r) / (2 * A)} {
				if z > -1 && z < 1 {
					cuts = append(cuts, z)
				}
			}
		}
	} else if B != 0 {
		if z := -C / B; z > -1 && z < 1 {
			cuts = append(cuts, z)
		}
	}
	cuts = append(cuts, 1)
	slices.Sort(cuts)
	for i, lo := range cuts {
		try(lo)
		if i+1 == len(cuts) {
			break
		}
		hi := cuts[i+1]
		flo, fhi := df(lo), df(hi)
		if flo == 0 || fhi == 0 || (flo < 0) == (fhi < 0) {
			continue
		}
		for range 80 {
			mid := (lo + hi) / 2
			if mid == lo || mid == hi {
				break
			}
			if fm := df(mid); (fm < 0) == (flo < 0) {
				lo, flo = mid, fm
			} else {
				hi = mid
			}
		}
		try(lo)
		try(hi)
	}
	return math.Sqrt(best), bestT
}

// vnorm is the length of v, without the overflow guard of r3.Norm
// (math.Hypot), which mesh coordinates do not need.
func vnorm(v r3.Vec) float64 { return math.Sqrt(r3.Norm2(v)) }
