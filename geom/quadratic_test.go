package geom

import (
	"math"
	"math/rand/v2"
	"testing"

	"gonum.org/v1/gonum/spatial/r3"
)

// paraboloid is z = c (x^2 + y^2), its unit normal (-2cx, -2cy, 1)/|..|
// (pointing into the bowl) and its smallest radius of curvature, 1/(2c)
// at the apex (closed form). A quadratic element whose nodes lie on it
// over an affine parameter map is exactly a piece of it: x^2 and y^2
// lie in the span of the Tri6, Quad8 and Quad9 shape functions, so the
// closest points and normals of the element are those of the surface.
type paraboloid struct{ c float64 }

func (s paraboloid) at(x, y float64) r3.Vec { return v3(x, y, s.c*(x*x+y*y)) }

func (s paraboloid) normal(x, y float64) r3.Vec {
	return r3.Unit(v3(-2*s.c*x, -2*s.c*y, 1))
}

// quadraticGrid returns an nx-by-ny grid of second-order elements of type
// t over [x0, x0+nx h] x [y0, y0+ny h] with nodes on the surface z(x, y)
// (Tri6: every square split along the diagonal from (x+h, y) to
// (x, y+h)); part 1, thickness 1, ids from 1. Quad8 grids keep the
// centre points as unused nodes.
func quadraticGrid(t ElemType, nx, ny int, h, x0, y0 float64, z func(x, y float64) r3.Vec) *Mesh {
	m := &Mesh{Parts: []Part{{ID: 1, Thickness: 1}}, ElemStart: []int32{0}}
	w := 2*nx + 1
	for b := 0; b <= 2*ny; b++ {
		for a := 0; a < w; a++ {
			m.NodeIDs = append(m.NodeIDs, int64(len(m.NodeIDs)+1))
			m.Coords = append(m.Coords, z(x0+float64(a)*h/2, y0+float64(b)*h/2))
		}
	}
	L := func(a, b int) int32 { return int32(b*w + a) }
	add := func(nodes ...int32) {
		m.Conn = append(m.Conn, nodes...)
		m.ElemStart = append(m.ElemStart, int32(len(m.Conn)))
		m.ElemIDs = append(m.ElemIDs, int64(len(m.ElemIDs)+1))
		m.ElemPart = append(m.ElemPart, 0)
	}
	for j := range ny {
		for i := range nx {
			a, b := 2*i, 2*j
			switch t {
			case Tri6:
				add(L(a, b), L(a+2, b), L(a, b+2), L(a+1, b), L(a+1, b+1), L(a, b+1))
				add(L(a+2, b), L(a+2, b+2), L(a, b+2), L(a+2, b+1), L(a+1, b+2), L(a+1, b+1))
			case Quad8:
				add(L(a, b), L(a+2, b), L(a+2, b+2), L(a, b+2), L(a+1, b), L(a+2, b+1), L(a+1, b+2), L(a, b+1))
			case Quad9:
				add(L(a, b), L(a+2, b), L(a+2, b+2), L(a, b+2), L(a+1, b), L(a+2, b+1), L(a+1, b+2), L(a, b+1), L(a+1, b+1))
			}
		}
	}
	if err := m.Index(); err != nil {
		panic(err)
	}
	return m
}

// paramOf returns the parametric coordinates of (x, y) in the single
// element of a 1x1 quadraticGrid over [x0, x0+h] x [y0, y0+h].
func paramOf(t ElemType, x, y, x0, y0, h float64) (float64, float64) {
	u, v := (x-x0)/h, (y-y0)/h
	if t == Tri6 {
		return u, v
	}
	return 2*u - 1, 2*v - 1
}

var quadraticTypes = []ElemType{Tri6, Quad8, Quad9}

func TestShapeWeights(t *testing.T) {
	// Node positions in (xi, eta): the functions are 1 at their own node
	// and 0 at the others (interpolation), and sum to 1 anywhere.
	nodes := map[ElemType][][2]float64{
		Tri6:  {{0, 0}, {1, 0}, {0, 1}, {0.5, 0}, {0.5, 0.5}, {0, 0.5}},
		Quad8: {{-1, -1}, {1, -1}, {1, 1}, {-1, 1}, {0, -1}, {1, 0}, {0, 1}, {-1, 0}},
		Quad9: {{-1, -1}, {1, -1}, {1, 1}, {-1, 1}, {0, -1}, {1, 0}, {0, 1}, {-1, 0}, {0, 0}},
		Tri3:  {{0, 0}, {1, 0}, {0, 1}},
		Quad4: {{-1, -1}, {1, -1}, {1, 1}, {-1, 1}},
	}
	for typ, pts := range nodes {
		for i, p := range pts {
			w := ShapeWeights(typ, p[0], p[1])
			for j := range w {
				want := 0.0
				if i == j {
					want = 1
				}
				if math.Abs(w[j]-want) > 1e-15 {
					t.Errorf("%v: weight %d at node %d = %g, want %g", typ, j, i, w[j], want)
				}
			}
		}
		rng := rand.New(rand.NewPCG(5, 5))
		for range 100 {
			u, v := 2*rng.Float64()-1, 2*rng.Float64()-1
			sum := 0.0
			for _, x := range ShapeWeights(typ, u, v) {
				sum += x
			}
			if math.Abs(sum-1) > 1e-14 {
				t.Errorf("%v: weights at (%g, %g) sum to %g", typ, u, v, sum)
			}
		}
	}
	// Negative corner weights inside the element, closed form: Tri6 at
	// the centroid L = 1/3: L(2L-1) = -1/9; Quad8 at the centre:
	// (1)(1)(0+0-1)/4 = -1/4; Quad9 corner 0 at (1/2, -1): l(1/2) l(-1)
	// with l(t) = t(t-1)/2, that is (-1/8)(1).
	if w := ShapeWeights(Tri6, 1.0/3, 1.0/3); math.Abs(w[0]+1.0/9) > 1e-15 || math.Abs(w[3]-4.0/9) > 1e-15 {
		t.Errorf("Tri6 at the centroid: %v", w)
	}
	if w := ShapeWeights(Quad8, 0, 0); w[0] != -0.25 || w[4] != 0.5 {
		t.Errorf("Quad8 at the centre: %v", w)
	}
	if w := ShapeWeights(Quad9, 0.5, -1); w[0] != -0.125 {
		t.Errorf("Quad9 at (1/2, -1): %v", w)
	}
}

// TestProjectParaboloid projects points that lie on a normal of the
// paraboloid onto one element whose nodes lie on it: the closest point
// is the foot of the normal (closed form), for any distance on the convex
// side and for distances below the smallest radius of curvature on the
// concave side, where the foot is the closest point of the whole surface.
func TestProjectParaboloid(t *testing.T) {
	rng := rand.New(rand.NewPCG(7, 7))
	for _, typ := range quadraticTypes {
		for _, c := range []float64{1, 0.01} { // strongly and mildly curved
			s := paraboloid{c}
			h := 1.0
			if c < 0.1 {
				h = 10 // a 10 mm element on a 50 mm radius
			}
			x0, y0 := 0.2*h, -0.3*h
			m := quadraticGrid(typ, 1, 1, h, x0, y0, s.at)
			e := 0
			if typ == Tri6 {
				e = 0 // the lower-left triangle
			}
			for range 300 {
				u, v := rng.Float64(), rng.Float64()
				if typ == Tri6 && u+v > 1 {
					u, v = 1-u, 1-v
				}
				x, y := x0+u*h, y0+v*h
				foot, n := s.at(x, y), s.normal(x, y)
				for _, delta := range []float64{-3 * h, -0.1 * h, -1e-3, 0, 1e-3, 0.8 / (2 * c) * rng.Float64()} {
					p := r3.Add(foot, r3.Scale(delta, n))
					pr := m.Project(e, p)
					if !near(pr.Point, foot, 1e-9*h) || math.Abs(pr.Dist-math.Abs(delta)) > 1e-9*h {
						t.Fatalf("%v c=%g: foot %v, delta %g: got %v at %g", typ, c, foot, delta, pr.Point, pr.Dist)
					}
					if !near(pr.Normal, n, 1e-9) {
						t.Fatalf("%v c=%g at %v: normal %v, want %v", typ, c, foot, pr.Normal, n)
					}
					wu, wv := paramOf(typ, x, y, x0, y0, h)
					if math.Abs(pr.Xi-wu) > 1e-9 || math.Abs(pr.Eta-wv) > 1e-9 {
						t.Fatalf("%v c=%g: (xi, eta) = (%g, %g), want (%g, %g)", typ, c, pr.Xi, pr.Eta, wu, wv)
					}
					checkWeightsSigned(t, pr.Point, pr.Weights[:typ], nodesOf(m, e), false)
				}
			}
		}
	}
}

func nodesOf(m *Mesh, e int) []r3.Vec {
	var x []r3.Vec
	for _, n := range m.ElemNodes(e) {
		x = append(x, m.Coords[n])
	}
	return x
}

// bruteClosest samples the element's surface on a fine parameter grid:
// an upper bound of the true distance within the grid's resolution.
func bruteClosest(m *Mesh, e int, p r3.Vec) float64 {
	typ := m.Type(e)
	x := nodesOf(m, e)
	const n = 120
	best := math.Inf(1)
	for i := 0; i <= n; i++ {
		for j := 0; j <= n; j++ {
			u, v := float64(i)/n, float64(j)/n
			if typ == Tri6 {
				if u+v > 1 {
					continue
				}
			} else {
				u, v = 2*u-1, 2*v-1
			}
			w := ShapeWeights(typ, u, v)
			best = math.Min(best, r3.Norm(r3.Sub(weighted(&w, x), p)))
		}
	}
	return best
}

// TestProjectQuadraticBrute compares projections of random points, also
// far off and beyond the element's sides, with brute-force sampling of
// strongly curved and distorted elements: never farther than a sampled
// point, and within the sampling's resolution of the best of them.
func TestProjectQuadraticBrute(t *testing.T) {
	rng := rand.New(rand.NewPCG(9, 9))
	cases := 30
	if testing.Short() {
		cases = 9
	}
	for _, typ := range quadraticTypes {
		for k := range cases {
			s := paraboloid{0.5 + rng.Float64()}
			m := quadraticGrid(typ, 1, 1, 1, -0.5, -0.5, s.at)
			// Distort: move every node a little, so the surface is a
			// general quadratic patch (saddles, twists, wavy edges).
			amp := 0.15 * float64(k%3)
			for i := range m.Coords {
				m.Coords[i] = r3.Add(m.Coords[i], randVec(rng, amp))
			}
			for range 10 {
				p := r3.Add(v3(0, 0, 0.3), randVec(rng, 3))
				pr := m.Project(0, p)
				want := bruteClosest(m, 0, p)
				if pr.Dist > want+1e-12 || want-pr.Dist > 2e-2 {
					t.Fatalf("%v case %d, p %v: distance %.12g, brute force %.12g", typ, k, p, pr.Dist, want)
				}
				checkWeightsSigned(t, pr.Point, pr.Weights[:typ], nodesOf(m, 0), false)
			}
		}
	}
}

// TestQuadraticBoxHoldsSurface checks that element boxes hold every
// point of the curved surface (the index must never miss an element).
func TestQuadraticBoxHoldsSurface(t *testing.T) {
	rng := rand.New(rand.NewPCG(11, 11))
	for _, typ := range quadraticTypes {
		for range 30 {
			m := quadraticGrid(typ, 1, 1, 1, -0.5, -0.5, paraboloid{1}.at)
			for i := range m.Coords {
				m.Coords[i] = r3.Add(m.Coords[i], randVec(rng, 0.3))
			}
			b := m.ElemBox(0)
			x := nodesOf(m, 0)
			for range 2000 {
				u, v := rng.Float64(), rng.Float64()
				if typ == Tri6 && u+v > 1 {
					u, v = 1-u, 1-v
				} else if typ != Tri6 {
					u, v = 2*u-1, 2*v-1
				}
				w := ShapeWeights(typ, u, v)
				if q := weighted(&w, x); !BoxContains(b, q, 0) {
					t.Fatalf("%v: surface point %v outside the box %v", typ, q, b)
				}
			}
		}
	}
}

// TestQuadraticArea checks areas against closed forms: a flat element
// with one edge bowed out in its plane by d adds the parabolic segment
// (2/3) h d (Archimedes), exactly; the parabolic cylinder z = x^2 over
// [0, 1] x [0, 1] has area (1/2) sqrt 5 + asinh(2)/4 (the arc length of
// the parabola), which the 4-point Gauss rule gives to 1e-5.
func TestQuadraticArea(t *testing.T) {
	h, d := 2.0, 0.3
	for _, typ := range []ElemType{Quad8, Quad9} {
		m := quadraticGrid(typ, 1, 1, h, 0, 0, func(x, y float64) r3.Vec { return v3(x, y, 0) })
		m.Coords[1] = v3(h/2, -d, 0) // the bottom midside node
		if got, want := m.Area(0), h*h+2*h*d/3; math.Abs(got-want) > 1e-12 {
			t.Errorf("%v flat bowed: area %.15g, want %.15g", typ, got, want)
		}
		if n := m.Normal(0); !near(n, v3(0, 0, 1), 1e-15) {
			t.Errorf("%v flat: normal %v", typ, n)
		}
		cyl := quadraticGrid(typ, 1, 1, 1, 0, 0, func(x, y float64) r3.Vec { return v3(x, y, x*x) })
		want := math.Sqrt(5)/2 + math.Asinh(2)/4
		if got := cyl.Area(0); math.Abs(got-want) > 1e-5 {
			t.Errorf("%v parabolic cylinder: area %.10g, want %.10g", typ, got, want)
		}
	}
	tri := quadraticGrid(Tri6, 1, 1, h, 0, 0, func(x, y float64) r3.Vec { return v3(x, y, 0) })
	if got := tri.Area(0) + tri.Area(1); math.Abs(got-h*h) > 1e-12 {
		t.Errorf("Tri6 flat: area %.15g, want %g", got, h*h)
	}
	tri.Coords[1] = v3(h/2, -d, 0)
	if got, want := tri.Area(0), h*h/2+2*h*d/3; math.Abs(got-want) > 1e-12 {
		t.Errorf("Tri6 flat bowed: area %.15g, want %.15g", got, want)
	}
}

// TestCurveDistance compares the closest point of a quadratic curve
// with dense sampling, and checks a closed form: the curve through
// (-1, 1), (0, 0), (1, 1) is the parabola (t, t^2); from (0, 1) the
// squared distance t^2 + (t^2 - 1)^2 is least at t^2 = 1/2, where it is
// 3/4.
func TestCurveDistance(t *testing.T) {
	a, m, b := v3(-1, 1, 0), v3(0, 0, 0), v3(1, 1, 0)
	if d, tt := CurveDistance(v3(0, 1, 0), a, m, b); math.Abs(d-math.Sqrt(3)/2) > 1e-14 || math.Abs(math.Abs(tt)-1/math.Sqrt2) > 1e-7 {
		t.Errorf("parabola from (0, 1): distance %.16g at t %g, want sqrt(3)/2 at +-1/sqrt2", d, tt)
	}
	rng := rand.New(rand.NewPCG(13, 13))
	for range 2000 {
		a, m, b := randVec(rng, 2), randVec(rng, 2), randVec(rng, 2)
		p := randVec(rng, 3)
		got, _ := CurveDistance(p, a, m, b)
		best := math.Inf(1)
		for i := 0; i <= 4000; i++ {
			s := 2*float64(i)/4000 - 1
			q := lin(s*(s-1)/2, a, 1-s*s, m, s*(s+1)/2, b)
			best = math.Min(best, r3.Norm(r3.Sub(q, p)))
		}
		if got > best+1e-12 || best-got > 1e-5 {
			t.Fatalf("distance %.12g, sampled %.12g", got, best)
		}
	}
}

// TestQuadraticFreeEdges checks free edges and loops of second-order
// grids: corner-to-corner edges carrying their midside nodes, loops that
// pass through them, and lengths along the curved edges (closed form on
// the parabolic cylinder z = x^2 / 2R: the arc length of the parabola).
func TestQuadraticFreeEdges(t *testing.T) {
	const R = 20.0
	arc := func(x float64) float64 { // arc length of z = x^2/(2R) from 0 to x
		s := x / R
		return R / 2 * (s*math.Sqrt(1+s*s) + math.Asinh(s))
	}
	for _, typ := range quadraticTypes {
		m := quadraticGrid(typ, 3, 2, 5, 0, 0, func(x, y float64) r3.Vec { return v3(x, y, x*x/(2*R)) })
		loops := FreeEdgeLoops(m, FreeEdges(m, NodeElements(m)))
		if len(loops) != 1 || !loops[0].Closed || !loops[0].Outline {
			t.Fatalf("%v: loops %+v", typ, loops)
		}
		lp := loops[0]
		// 2*(3+2) edges, each with its midside node.
		if len(lp.Nodes) != 20 {
			t.Errorf("%v: loop of %d nodes, want 20", typ, len(lp.Nodes))
		}
		want := 2*arc(15) + 2*10.0
		if math.Abs(lp.Length-want) > 1e-9 {
			t.Errorf("%v: loop length %.12g, want %.12g", typ, lp.Length, want)
		}
		for _, ed := range FreeEdges(m, NodeElements(m)) {
			if ed.Mid < 0 {
				t.Fatalf("%v: free edge without its midside node", typ)
			}
			mid := m.Coords[ed.Mid]
			if d := m.EdgeDistance(ed, mid); d > 1e-12 {
				t.Errorf("%v: midside node %g off its edge", typ, d)
			}
		}
	}
}

// TestIndexQuadratic checks index queries on a curved second-order mesh
// against projecting onto every element.
func TestIndexQuadratic(t *testing.T) {
	rng := rand.New(rand.NewPCG(15, 15))
	for _, typ := range quadraticTypes {
		m := quadraticGrid(typ, 6, 5, 4, -12, -10, paraboloid{0.02}.at)
		x := NewIndex(m)
		for range 200 {
			p := r3.Add(v3(rng.Float64()*28-14, rng.Float64()*24-12, 2), randVec(rng, 3))
			r := 0.5 + 3*rng.Float64()
			got := x.ProjectNear(p, r, nil)
			var want []Projection
			for e := range m.ElemIDs {
				if pr := m.Project(e, p); pr.Dist <= r {
					want = append(want, pr)
				}
			}
			if len(got) != len(want) {
				t.Fatalf("%v: %d projections within %g of %v, brute force %d", typ, len(got), r, p, len(want))
			}
			best, ok := x.ProjectNearest(p, math.Inf(1), nil)
			bd := math.Inf(1)
			for e := range m.ElemIDs {
				bd = math.Min(bd, m.Project(e, p).Dist)
			}
			if !ok || best.Dist != bd {
				t.Fatalf("%v: nearest at %g, brute force %g", typ, best.Dist, bd)
			}
		}
	}
}

// BenchmarkProjectQuadratic compares the projection onto mildly curved
// second-order elements (10 mm on a 500 mm radius, points within 3 mm,
// the case of a weld) with the projection onto the bilinear quad through
// their corners.
func BenchmarkProjectQuadratic(b *testing.B) {
	for _, typ := range []ElemType{Quad4, Tri6, Quad8, Quad9} {
		b.Run(typ.String(), func(b *testing.B) {
			gt := typ
			if typ == Quad4 {
				gt = Quad9
			}
			m := quadraticGrid(gt, 1, 1, 10, 20, -5, paraboloid{0.001}.at)
			if typ == Quad4 {
				// The same corners as a bilinear quad.
				n := m.ElemNodes(0)
				m.Conn = []int32{n[0], n[1], n[2], n[3]}
				m.ElemStart = []int32{0, 4}
			}
			rng := rand.New(rand.NewPCG(1, 2))
			pts := make([]r3.Vec, 256)
			for i := range pts {
				pts[i] = r3.Add(v3(23+4*rng.Float64(), -2+4*rng.Float64(), 0.6), randVec(rng, 3))
			}
			i := 0
			for b.Loop() {
				m.Project(0, pts[i%len(pts)])
				i++
			}
		})
	}
}
