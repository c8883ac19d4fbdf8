package geom

import (
	"math"
	"math/rand/v2"
	"testing"

	"gonum.org/v1/gonum/spatial/r3"
)

func v3(x, y, z float64) r3.Vec { return r3.Vec{X: x, Y: y, Z: z} }

func near(a, b r3.Vec, tol float64) bool { return r3.Norm(r3.Sub(a, b)) <= tol }

// closestOnTriangleRef is an independent reference: the foot of the
// perpendicular on the plane when it falls inside (barycentric
// coordinates from Cramer's rule), otherwise the nearest of the three
// edges (closed form).
func closestOnTriangleRef(p, a, b, c r3.Vec) r3.Vec {
	ab, ac, ap := r3.Sub(b, a), r3.Sub(c, a), r3.Sub(p, a)
	m11, m12, m22 := r3.Dot(ab, ab), r3.Dot(ab, ac), r3.Dot(ac, ac)
	r1, r2 := r3.Dot(ab, ap), r3.Dot(ac, ap)
	det := m11*m22 - m12*m12
	if det > 1e-12*m11*m22 {
		v := (m22*r1 - m12*r2) / det
		w := (m11*r2 - m12*r1) / det
		if v >= 0 && w >= 0 && v+w <= 1 {
			return r3.Add(a, r3.Add(r3.Scale(v, ab), r3.Scale(w, ac)))
		}
	}
	best, bestD := a, math.Inf(1)
	for _, e := range [3][2]r3.Vec{{a, b}, {b, c}, {c, a}} {
		t := closestOnSegment(p, e[0], e[1])
		q := r3.Add(e[0], r3.Scale(t, r3.Sub(e[1], e[0])))
		if d := r3.Norm(r3.Sub(p, q)); d < bestD {
			best, bestD = q, d
		}
	}
	return best
}

func TestClosestOnTriangle(t *testing.T) {
	// Right triangle with legs 2 in the xy plane; expected points are
	// closed-form (foot of the perpendicular on the face, edge or corner).
	a, b, c := v3(0, 0, 0), v3(2, 0, 0), v3(0, 2, 0)
	tests := []struct {
		name string
		p    r3.Vec
		q    r3.Vec
		l    [3]float64
	}{
		{"above face", v3(0.5, 0.5, 3), v3(0.5, 0.5, 0), [3]float64{0.5, 0.25, 0.25}},
		{"below face", v3(0.5, 1, -2), v3(0.5, 1, 0), [3]float64{0.25, 0.25, 0.5}},
		{"on face", v3(0.2, 0.3, 0), v3(0.2, 0.3, 0), [3]float64{0.75, 0.1, 0.15}},
		{"corner a", v3(-1, -1, 1), a, [3]float64{1, 0, 0}},
		{"corner b", v3(3, -0.5, 0), b, [3]float64{0, 1, 0}},
		{"corner c", v3(-0.5, 3, 5), c, [3]float64{0, 0, 1}},
		{"edge ab", v3(1, -1, 2), v3(1, 0, 0), [3]float64{0.5, 0.5, 0}},
		{"edge ac", v3(-1, 1.5, 0), v3(0, 1.5, 0), [3]float64{0.25, 0, 0.75}},
		{"edge bc", v3(2, 2, 1), v3(1, 1, 0), [3]float64{0, 0.5, 0.5}},
		{"far away", v3(1e6, 1e6, 1e6), v3(1, 1, 0), [3]float64{0, 0.5, 0.5}},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			q, l := ClosestOnTriangle(tt.p, a, b, c)
			if !near(q, tt.q, 1e-12) {
				t.Errorf("q = %v, want %v", q, tt.q)
			}
			for i := range l {
				if math.Abs(l[i]-tt.l[i]) > 1e-12 {
					t.Errorf("l = %v, want %v", l, tt.l)
					break
				}
			}
		})
	}
}

func TestClosestOnTriangleDegenerate(t *testing.T) {
	tests := []struct {
		name    string
		p       r3.Vec
		a, b, c r3.Vec
		q       r3.Vec
	}{
		// Closed form: the triangle is the segment (0,0,0)-(2,0,0).
		{"collinear", v3(1.5, 1, 0), v3(0, 0, 0), v3(1, 0, 0), v3(2, 0, 0), v3(1.5, 0, 0)},
		{"collinear beyond", v3(3, 1, 0), v3(0, 0, 0), v3(2, 0, 0), v3(1, 0, 0), v3(2, 0, 0)},
		{"two coincident", v3(0.5, 1, 1), v3(0, 0, 0), v3(1, 0, 0), v3(1, 0, 0), v3(0.5, 0, 0)},
		{"all coincident", v3(1, 2, 3), v3(1, 1, 1), v3(1, 1, 1), v3(1, 1, 1), v3(1, 1, 1)},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			q, l := ClosestOnTriangle(tt.p, tt.a, tt.b, tt.c)
			if !near(q, tt.q, 1e-12) {
				t.Errorf("q = %v, want %v", q, tt.q)
			}
			checkWeights(t, q, l[:], []r3.Vec{tt.a, tt.b, tt.c})
		})
	}
}

// checkWeights checks that the weights lie in [0, 1], sum to 1 and
// reproduce q to 1e-12 relative to the size of the coordinates.
func checkWeights(t *testing.T, q r3.Vec, w []float64, x []r3.Vec) {
	t.Helper()
	checkWeightsSigned(t, q, w, x, true)
}

// checkWeightsSigned is checkWeights, with weights outside [0, 1]
// allowed unless convex is set (quadratic shape functions).
func checkWeightsSigned(t *testing.T, q r3.Vec, w []float64, x []r3.Vec, convex bool) {
	t.Helper()
	var sum float64
	var s r3.Vec
	scale := 1.0
	for i := range x {
		sum += w[i]
		s = r3.Add(s, r3.Scale(w[i], x[i]))
		scale = max(scale, r3.Norm(x[i]))
		if convex && (w[i] < -1e-12 || w[i] > 1+1e-12) {
			t.Errorf("weight %d = %g outside [0, 1]", i, w[i])
		}
	}
	if math.Abs(sum-1) > 1e-12 {
		t.Errorf("weights %v sum to %.17g", w, sum)
	}
	if !near(s, q, 1e-12*scale) {
		t.Errorf("weights reproduce %v, want %v", s, q)
	}
}

func randVec(rng *rand.Rand, s float64) r3.Vec {
	return v3(s*(2*rng.Float64()-1), s*(2*rng.Float64()-1), s*(2*rng.Float64()-1))
}

func TestClosestOnTriangleRandom(t *testing.T) {
	rng := rand.New(rand.NewPCG(1, 1))
	for i := range 20000 {
		a, b, c := randVec(rng, 10), randVec(rng, 10), randVec(rng, 10)
		if i%10 == 0 { // slivers
			c = r3.Add(r3.Scale(0.3, a), r3.Add(r3.Scale(0.7, b), randVec(rng, 1e-6)))
		}
		p := randVec(rng, 30)
		q, l := ClosestOnTriangle(p, a, b, c)
		checkWeights(t, q, l[:], []r3.Vec{a, b, c})
		// Valid weights put q on the triangle, so got >= the true
		// distance; the reference bounds it from above. (For slivers
		// the reference's own rounding is larger than 1e-9, so a
		// two-sided test would measure the reference.)
		want := r3.Norm(r3.Sub(p, closestOnTriangleRef(p, a, b, c)))
		got := r3.Norm(r3.Sub(p, q))
		if got > want+1e-9 || i%10 != 0 && want-got > 1e-9 {
			t.Fatalf("case %d: distance %.15g, reference %.15g", i, got, want)
		}
	}
}

// bruteQuad returns the distance from p to the bilinear quad x by
// sampling (xi, eta) on a 101 x 101 grid and refining five times around
// the best sample by a factor of 20; the result is within about 1e-10 of
// the true minimum for the smooth cases used here.
func bruteQuad(p r3.Vec, x [4]r3.Vec) (dist, xi, eta float64) {
	s := newBilinear(x)
	cx, cy, half := 0.0, 0.0, 1.0
	best := math.Inf(1)
	const n = 100
	for range 6 {
		bx, by := cx, cy
		for i := 0; i <= n; i++ {
			for j := 0; j <= n; j++ {
				u := min(max(cx+half*(2*float64(i)/n-1), -1), 1)
				v := min(max(cy+half*(2*float64(j)/n-1), -1), 1)
				if d := r3.Norm(r3.Sub(s.at(u, v), p)); d < best {
					best, bx, by = d, u, v
				}
			}
		}
		cx, cy, half = bx, by, half/20
	}
	return best, cx, cy
}

func TestClosestOnQuad(t *testing.T) {
	square := [4]r3.Vec{v3(0, 0, 0), v3(2, 0, 0), v3(2, 2, 0), v3(0, 2, 0)}
	// Trapezoid in the plane z = 1 whose centre (xi = eta = 0) is the
	// mean of its corners, (1, 1, 1). Expected points are closed-form feet
	// of perpendiculars on the plane or on an edge.
	trap := [4]r3.Vec{v3(-2, 0, 1), v3(4, 0, 1), v3(3, 2, 1), v3(-1, 2, 1)}
	tests := []struct {
		name     string
		x        [4]r3.Vec
		p, q     r3.Vec
		xi, eta  float64
		dist     float64
		n        r3.Vec
		checkPar bool
	}{
		{"square above", square, v3(0.5, 1.5, 4), v3(0.5, 1.5, 0), -0.5, 0.5, 4, v3(0, 0, 1), true},
		{"square below", square, v3(1, 1, -3), v3(1, 1, 0), 0, 0, 3, v3(0, 0, 1), true},
		{"square on", square, v3(1.5, 0.25, 0), v3(1.5, 0.25, 0), 0.5, -0.75, 0, v3(0, 0, 1), true},
		{"square corner 2", square, v3(3, 4, 1), v3(2, 2, 0), 1, 1, math.Sqrt(1 + 4 + 1), v3(0, 0, 1), true},
		{"square corner 0", square, v3(-1, -1, 0), v3(0, 0, 0), -1, -1, math.Sqrt2, v3(0, 0, 1), true},
		{"square edge 1-2", square, v3(5, 0.5, 4), v3(2, 0.5, 0), 1, -0.5, 5, v3(0, 0, 1), true},
		{"square edge 3-0", square, v3(-3, 1, -4), v3(0, 1, 0), -1, 0, 5, v3(0, 0, 1), true},
		{"far away", square, v3(1e7, 1, 0), v3(2, 1, 0), 1, 0, 1e7 - 2, v3(0, 0, 1), true},
		{"trapezoid", trap, v3(1, 1, 7), v3(1, 1, 1), 0, 0, 6, v3(0, 0, 1), true},
		{"trapezoid slanted edge", trap, v3(5, 1, 1), v3(3.8, 0.4, 1), 0, 0, math.Sqrt(1.2*1.2 + 0.6*0.6), v3(0, 0, 1), false},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			q, w, xi, eta := ClosestOnQuad(tt.p, tt.x)
			if !near(q, tt.q, 1e-9) {
				t.Errorf("q = %v, want %v", q, tt.q)
			}
			if d := r3.Norm(r3.Sub(tt.p, q)); math.Abs(d-tt.dist) > 1e-9*max(1, tt.dist) {
				t.Errorf("dist = %.15g, want %.15g", d, tt.dist)
			}
			if tt.checkPar && (math.Abs(xi-tt.xi) > 1e-9 || math.Abs(eta-tt.eta) > 1e-9) {
				t.Errorf("(xi, eta) = (%g, %g), want (%g, %g)", xi, eta, tt.xi, tt.eta)
			}
			checkWeights(t, q, w[:], tt.x[:])
			if n := quadNormal(tt.x, xi, eta); !near(n, tt.n, 1e-12) {
				t.Errorf("normal = %v, want %v", n, tt.n)
			}
		})
	}
}

func TestClosestOnQuadWarped(t *testing.T) {
	// Unit-size square with corner 2 lifted by h: a hyperbolic
	// paraboloid z = h (1+xi)(1+eta)/4. Expected values come from a fine
	// brute-force sampling (bruteQuad); tolerance 1e-9 on the distance.
	for _, h := range []float64{0.05, 0.3, 1, 3} {
		x := [4]r3.Vec{v3(0, 0, 0), v3(1, 0, 0), v3(1, 1, h), v3(0, 1, 0)}
		pts := []r3.Vec{
			v3(0.5, 0.5, 1), v3(0.5, 0.5, -1), v3(0.9, 0.9, 2), v3(0.9, 0.9, -2),
			v3(0.2, 0.7, 0.1), v3(1.2, 1.2, h), v3(0.5, 0.5, h/4), v3(0.1, 0.1, 5),
			v3(-1, 0.5, 0.3), v3(0.6, 1.5, -0.5), v3(0.3, 0.8, -10),
		}
		for _, p := range pts {
			q, w, xi, eta := ClosestOnQuad(p, x)
			checkWeights(t, q, w[:], x[:])
			got := r3.Norm(r3.Sub(p, q))
			want, bxi, beta := bruteQuad(p, x)
			if got > want+1e-12 || want-got > 1e-9 {
				t.Errorf("h=%g p=%v: dist %.15g at (%.6f, %.6f), brute force %.15g at (%.6f, %.6f)",
					h, p, got, xi, eta, want, bxi, beta)
			}
			// Interior minimum: p - q is normal to the surface.
			if math.Abs(xi) < 1-1e-9 && math.Abs(eta) < 1-1e-9 {
				s := newBilinear(x)
				a, b := s.tangents(xi, eta)
				d := r3.Sub(p, q)
				if math.Abs(r3.Dot(d, r3.Unit(a))) > 1e-9 || math.Abs(r3.Dot(d, r3.Unit(b))) > 1e-9 {
					t.Errorf("h=%g p=%v: p-q not normal to the surface", h, p)
				}
				if n := quadNormal(x, xi, eta); math.Abs(math.Abs(r3.Dot(n, r3.Unit(d)))-1) > 1e-9 && got > 1e-9 {
					t.Errorf("h=%g p=%v: normal %v not along p-q %v", h, p, n, d)
				}
			}
		}
	}
}

func TestClosestOnQuadCollapsed(t *testing.T) {
	// A quad with corners 2 and 3 merged is the triangle 0-1-2; its
	// distances must match the triangle's (closed form via
	// closestOnTriangleRef).
	rng := rand.New(rand.NewPCG(2, 2))
	for i := range 2000 {
		a, b, c := randVec(rng, 5), randVec(rng, 5), randVec(rng, 5)
		x := [4]r3.Vec{a, b, c, c}
		if i%2 == 1 {
			x = [4]r3.Vec{a, a, b, c} // corners 0 and 1 merged
		}
		p := randVec(rng, 10)
		q, w, _, _ := ClosestOnQuad(p, x)
		checkWeights(t, q, w[:], x[:])
		got := r3.Norm(r3.Sub(p, q))
		want := r3.Norm(r3.Sub(p, closestOnTriangleRef(p, a, b, c)))
		if math.Abs(got-want) > 1e-9 {
			t.Fatalf("case %d: distance %.15g, triangle %.15g", i, got, want)
		}
	}
}

func TestClosestOnQuadRandom(t *testing.T) {
	// Random quads against brute force: gently warped (corners moved out
	// of plane by up to 20% of the size), flat, and flat non-convex.
	rng := rand.New(rand.NewPCG(3, 3))
	n := 300
	if testing.Short() {
		n = 60
	}
	for i := range n {
		size := 1 + 9*rng.Float64()
		lift := 0.2 * size
		if i%3 == 1 {
			lift = 0 // flat
		}
		var x [4]r3.Vec
		for k := range 4 {
			ang := (float64(k) + 0.25*rng.Float64()) * math.Pi / 2
			x[k] = v3(size*math.Cos(ang), size*math.Sin(ang), lift*(2*rng.Float64()-1))
		}
		if i%6 == 1 {
			// A flat dart: corner 2 pulled across the diagonal 1-3.
			x[2] = r3.Scale(-0.5, x[2])
		}
		p := randVec(rng, 2*size)
		q, w, _, _ := ClosestOnQuad(p, x)
		checkWeights(t, q, w[:], x[:])
		got := r3.Norm(r3.Sub(p, q))
		want, _, _ := bruteQuad(p, x)
		if got > want+1e-12 || want-got > 1e-9 {
			t.Fatalf("case %d: distance %.15g, brute force %.15g", i, got, want)
		}
	}
}

func TestProject(t *testing.T) {
	// One triangle and one quad sharing an edge; the normal follows the
	// right-hand rule over the node order.
	m := &Mesh{
		Parts:     []Part{{ID: 1}},
		NodeIDs:   []int64{1, 2, 3, 4, 5},
		Coords:    []r3.Vec{v3(0, 0, 0), v3(1, 0, 0), v3(1, 1, 0), v3(0, 1, 0), v3(2, 0.5, 0)},
		ElemIDs:   []int64{1, 2, 3},
		ElemPart:  []int32{0, 0, 0},
		ElemStart: []int32{0, 4, 7, 10},
		Conn:      []int32{0, 1, 2, 3, 1, 4, 2, 0, 3, 2}, // quad up, tri up, tri down
	}
	tests := []struct {
		e       int
		p       r3.Vec
		q, n    r3.Vec
		w       [4]float64
		xi, eta float64
	}{
		{0, v3(0.25, 0.75, 2), v3(0.25, 0.75, 0), v3(0, 0, 1), [4]float64{0.1875, 0.0625, 0.1875, 0.5625}, -0.5, 0.5},
		{1, v3(1.5, 0.5, -1), v3(1.5, 0.5, 0), v3(0, 0, 1), [4]float64{0.25, 0.5, 0.25, 0}, 0.5, 0.25},
		{2, v3(0.25, 0.5, 1), v3(0.25, 0.5, 0), v3(0, 0, -1), [4]float64{0.5, 0.25, 0.25, 0}, 0.25, 0.25},
	}
	for _, tt := range tests {
		pr := m.Project(tt.e, tt.p)
		if pr.Elem != tt.e || !near(pr.Point, tt.q, 1e-12) || !near(pr.Normal, tt.n, 1e-12) {
			t.Errorf("element %d: got %+v, want point %v normal %v", tt.e, pr, tt.q, tt.n)
		}
		if math.Abs(pr.Dist-r3.Norm(r3.Sub(tt.p, tt.q))) > 1e-12 {
			t.Errorf("element %d: dist %g", tt.e, pr.Dist)
		}
		for i := range tt.w {
			if math.Abs(pr.Weights[i]-tt.w[i]) > 1e-12 {
				t.Errorf("element %d: weights %v, want %v", tt.e, pr.Weights, tt.w)
				break
			}
		}
		if math.Abs(pr.Xi-tt.xi) > 1e-12 || math.Abs(pr.Eta-tt.eta) > 1e-12 {
			t.Errorf("element %d: (xi, eta) = (%g, %g), want (%g, %g)", tt.e, pr.Xi, pr.Eta, tt.xi, tt.eta)
		}
		if off := pr.Offset(tt.p); math.Abs(off-r3.Dot(r3.Sub(tt.p, tt.q), tt.n)) > 1e-12 {
			t.Errorf("element %d: offset %g", tt.e, off)
		}
	}
}

// cylinderMesh meshes the side of a cylinder of radius r and length l
// along z with n facets around and nz rows, each facet rectangle split
// into two triangles. Corner k of a ring sits at angle 2 pi k / n.
func cylinderMesh(r, l float64, n, nz int) *Mesh {
	m := &Mesh{Parts: []Part{{ID: 1}}, ElemStart: []int32{0}}
	for j := 0; j <= nz; j++ {
		for k := range n {
			a := 2 * math.Pi * float64(k) / float64(n)
			m.Coords = append(m.Coords, v3(r*math.Cos(a), r*math.Sin(a), l*float64(j)/float64(nz)))
			m.NodeIDs = append(m.NodeIDs, int64(len(m.Coords)))
		}
	}
	node := func(j, k int) int32 { return int32(j*n + k%n) }
	for j := range nz {
		for k := range n {
			m.Conn = append(m.Conn, node(j, k), node(j, k+1), node(j+1, k+1))
			m.ElemStart = append(m.ElemStart, int32(len(m.Conn)))
			m.Conn = append(m.Conn, node(j, k), node(j+1, k+1), node(j+1, k))
			m.ElemStart = append(m.ElemStart, int32(len(m.Conn)))
		}
	}
	for range len(m.ElemStart) - 1 {
		m.ElemIDs = append(m.ElemIDs, int64(len(m.ElemIDs)+1))
		m.ElemPart = append(m.ElemPart, 0)
	}
	return m
}

func TestProjectCylinder(t *testing.T) {
	// Faceted cylinder, radius R, n facets. Closed form for a point in the
	// mid-length plane at radius rho: along a facet's mid-normal (angle
	// (k+1/2) 2pi/n) the nearest point is the foot on that facet, at
	// distance |R cos(pi/n) - rho|; along a corner direction (angle
	// 2pi k/n) outside the cylinder it is the corner line, at rho - R;
	// inside, it lies on the two adjacent facets at (R - rho) cos(pi/n).
	const R, L, n = 50.0, 40.0, 24
	m := cylinderMesh(R, L, n, 4)
	x := NewIndex(m)
	apothem := R * math.Cos(math.Pi/n)
	tests := []struct {
		name     string
		ang, rho float64
		want     float64
	}{
		{"axis", 0.3, 0, apothem},
		{"facet inside", 2.5 * 2 * math.Pi / n, 30, apothem - 30},
		{"facet just inside", 7.5 * 2 * math.Pi / n, apothem - 1e-3, 1e-3},
		{"facet outside", 0.5 * 2 * math.Pi / n, 80, 80 - apothem},
		{"corner outside", 3 * 2 * math.Pi / n, 65, 65 - R},
		{"corner inside", 11 * 2 * math.Pi / n, 20, (R - 20) * math.Cos(math.Pi/n)},
	}
	for _, tt := range tests {
		p := v3(tt.rho*math.Cos(tt.ang), tt.rho*math.Sin(tt.ang), L/2+0.1)
		pr, ok := x.ProjectNearest(p, math.Inf(1), nil)
		if !ok || math.Abs(pr.Dist-tt.want) > 1e-9 {
			t.Errorf("%s: nearest %v %.15g, want %.15g", tt.name, ok, pr.Dist, tt.want)
		}
		brute := math.Inf(1)
		for e := range m.NumElems() {
			brute = min(brute, m.Project(e, p).Dist)
		}
		if math.Abs(brute-tt.want) > 1e-9 {
			t.Errorf("%s: brute force %.15g, want %.15g", tt.name, brute, tt.want)
		}
	}
}
