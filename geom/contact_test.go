package geom

import (
	"context"
	"math"
	"math/rand/v2"
	"slices"
	"testing"

	"gonum.org/v1/gonum/spatial/r3"
)

// randomSoup returns a mesh of n small random triangles and quads in a
// 60 mm cube, spread over parts.
func randomSoup(rng *rand.Rand, n, parts int) *Mesh {
	m := &Mesh{ElemStart: []int32{0}}
	for p := range parts {
		m.Parts = append(m.Parts, Part{ID: int64(p + 1), Thickness: 1})
	}
	for e := range n {
		c := r3.Vec{X: rng.Float64() * 60, Y: rng.Float64() * 60, Z: rng.Float64() * 60}
		k := 3 + rng.IntN(2)
		for range k {
			m.Coords = append(m.Coords, r3.Add(c, r3.Vec{X: rng.Float64()*6 - 3, Y: rng.Float64()*6 - 3, Z: rng.Float64()*6 - 3}))
			m.NodeIDs = append(m.NodeIDs, int64(len(m.NodeIDs)+1))
			m.Conn = append(m.Conn, int32(len(m.Coords)-1))
		}
		m.ElemStart = append(m.ElemStart, int32(len(m.Conn)))
		m.ElemIDs = append(m.ElemIDs, int64(e+1))
		m.ElemPart = append(m.ElemPart, int32(rng.IntN(parts)))
	}
	if err := m.Index(); err != nil {
		panic(err)
	}
	return m
}

// The self-join of the element tree finds exactly the pairs a brute-force
// comparison of every element with every other finds (gonum-style check
// of a fast path against the plain one, on seeded random data).
func TestContactPairsAgainstBruteForce(t *testing.T) {
	rng := rand.New(rand.NewPCG(1, 1))
	for _, n := range []int{10, 300, 3000} {
		m := randomSoup(rng, n, 4)
		x := NewElemIndex(m)
		const r = 2.0
		keep := func(a, b int32, na, nb *[3]float32, d2 float64) bool { return (a+b)%3 != 0 }
		got := slices.Concat(x.contactPairs(r, keep)...)
		slices.SortFunc(got, func(p, q [2]int32) int {
			if p[0] != q[0] {
				return int(p[0] - q[0])
			}
			return int(p[1] - q[1])
		})
		var want [][2]int32
		for a := range n {
			for b := a + 1; b < n; b++ {
				if m.ElemPart[a] == m.ElemPart[b] || (a+b)%3 == 0 {
					continue
				}
				la, ha := elemBox(m, a)
				lb, hb := elemBox(m, b)
				ba, bb := box32Of(la, ha), box32Of(lb, hb)
				if ba.dist2Box(&bb) <= r*r*pruneSlack {
					want = append(want, [2]int32{int32(a), int32(b)})
				}
			}
		}
		if !slices.Equal(got, want) {
			t.Errorf("%d elements: %d pairs, brute force %d", n, len(got), len(want))
		}
	}
}

// The short cut for flat convex quads gives the closest point of the
// general projection.
func TestFlatQuadFootMatchesClosestOnQuad(t *testing.T) {
	rng := rand.New(rand.NewPCG(2, 3))
	tried := 0
	for range 5000 {
		// A convex quad in a random plane: a rectangle with its corners
		// moved a little in the plane.
		n := r3.Unit(r3.Vec{X: rng.NormFloat64(), Y: rng.NormFloat64(), Z: rng.NormFloat64()})
		u := r3.Unit(r3.Cross(n, r3.Vec{X: 1, Y: 0.3, Z: 0.2}))
		v := r3.Cross(n, u)
		o := r3.Vec{X: rng.Float64() * 100, Y: rng.Float64() * 100, Z: rng.Float64() * 100}
		var x [4]r3.Vec
		for k, c := range [4][2]float64{{0, 0}, {5, 0}, {5, 4}, {0, 4}} {
			x[k] = r3.Add(o, r3.Add(r3.Scale(c[0]+rng.Float64()-0.5, u), r3.Scale(c[1]+rng.Float64()-0.5, v)))
		}
		q := r3.Add(o, r3.Add(r3.Add(r3.Scale(rng.Float64()*9-2, u), r3.Scale(rng.Float64()*8-2, v)), r3.Scale(rng.Float64()*4-2, n)))
		pr, ok := flatQuadFoot(x, q)
		if !ok {
			continue
		}
		tried++
		want, _, _, _ := ClosestOnQuad(q, x)
		if d := r3.Norm(r3.Sub(q, want)); math.Abs(pr.Dist-d) > 1e-9*(1+d) || r3.Norm(r3.Sub(pr.Point, want)) > 1e-6 {
			t.Fatalf("quad %v, point %v: short cut %v (%g), full %v (%g)", x, q, pr.Point, pr.Dist, want, d)
		}
	}
	if tried < 4000 {
		t.Errorf("short cut taken for %d of 5000 flat quads", tried)
	}
}

// sheetGrid is a flat rectangular sheet z = zc, x0..x0+nx*h, y0..y0+ny*h.
type sheetGrid struct {
	part      int64
	t, zc     float64
	x0, y0, h float64
	nx, ny    int
}

func sheets(gs ...sheetGrid) *Mesh {
	m := &Mesh{ElemStart: []int32{0}}
	for pi, g := range gs {
		m.Parts = append(m.Parts, Part{ID: g.part, Thickness: g.t})
		base := int32(len(m.Coords))
		for j := 0; j <= g.ny; j++ {
			for i := 0; i <= g.nx; i++ {
				m.Coords = append(m.Coords, r3.Vec{X: g.x0 + float64(i)*g.h, Y: g.y0 + float64(j)*g.h, Z: g.zc})
				m.NodeIDs = append(m.NodeIDs, int64(len(m.NodeIDs)+1))
			}
		}
		row := int32(g.nx + 1)
		for j := range int32(g.ny) {
			for i := range int32(g.nx) {
				n0 := base + j*row + i
				m.Conn = append(m.Conn, n0, n0+1, n0+row+1, n0+row)
				m.ElemStart = append(m.ElemStart, int32(len(m.Conn)))
				m.ElemIDs = append(m.ElemIDs, int64(len(m.ElemIDs)+1))
				m.ElemPart = append(m.ElemPart, int32(pi))
			}
		}
	}
	if err := m.Index(); err != nil {
		panic(err)
	}
	return m
}

// Nodes in contact against the rule worked out by hand on flat sheets:
// a node of the host is in contact when it lies over the other sheet's
// rectangle and the mid-surface gap is within the allowance of
// (t1+t2)/2.
func TestContactsAgainstRule(t *testing.T) {
	allow := func(t1, t2 float64) float64 { return 0.25 * (t1 + t2) / 2 }
	for _, tc := range []struct {
		name string
		a, b sheetGrid
	}{
		{"fine on coarse, in contact", sheetGrid{1, 1, 0, 0, 0, 5, 20, 10}, sheetGrid{2, 1.2, 1.1, 13.3, 11.7, 3.1, 15, 7}},
		{"gap at the limit", sheetGrid{1, 1, 0, 0, 0, 5, 20, 10}, sheetGrid{2, 1, 1.24, 13.3, 11.7, 3.1, 15, 7}},
		{"gap beyond the limit", sheetGrid{1, 1, 0, 0, 0, 5, 20, 10}, sheetGrid{2, 1, 1.26, 13.3, 11.7, 3.1, 15, 7}},
	} {
		t.Run(tc.name, func(t *testing.T) {
			m := sheets(tc.a, tc.b)
			c, err := FindContacts(context.Background(), NewElemIndex(m), ContactRule{Allowance: allow, AngleLimit: 20, FacingFactor: 0.1})
			if err != nil {
				t.Fatal(err)
			}
			if host, ok := c.Host(0, 1); ok && host != 1 {
				t.Fatalf("host %d, want the finer sheet 1", host)
			}
			in := map[int32]bool{}
			for r := range c.Records() {
				in[r.Node] = true
				if r.Part != 1 || r.Other != 0 || math.Abs(r.Gap-tc.b.zc) > 1e-12 || math.Abs(r.Contact-(tc.a.t+tc.b.t)/2) > 1e-12 {
					t.Fatalf("record %+v", r)
				}
			}
			a := tc.a
			gapOK := math.Abs(tc.b.zc-(a.t+tc.b.t)/2) <= allow(a.t, tc.b.t)
			for n := range m.Coords {
				p := m.Coords[n]
				if n < (a.nx+1)*(a.ny+1) {
					continue // a node of the other sheet
				}
				over := p.X >= a.x0-1e-9 && p.X <= a.x0+float64(a.nx)*a.h+1e-9 && p.Y >= a.y0-1e-9 && p.Y <= a.y0+float64(a.ny)*a.h+1e-9
				if in[int32(n)] != (over && gapOK) {
					t.Errorf("node %d at %v: in contact %v, want %v", m.NodeIDs[n], p, in[int32(n)], over && gapOK)
				}
			}
		})
	}
}

// Sheets meshed on their faces whose meshed surfaces coincide (both parts
// meshed on the faying face, common practice) or cross by a little: the
// mid-surfaces lie (t1+t2)/2 apart whichever sheet lies on top, so every
// node over the other sheet is in contact, from either part, and the
// coincident nodes face each other (hand calculation: t 1 and 1.5, mid
// offsets 0.5 and 0.75 from the faying face, gap 1.25 = contact).
func TestContactsMeshedOnFaces(t *testing.T) {
	allow := func(t1, t2 float64) float64 { return 0.25 * (t1 + t2) / 2 }
	for _, tc := range []struct {
		name   string
		s1, s2 Surface
		z2     float64 // meshed surface of part 2; part 1's at 0
		flip1  bool    // part 1's normals point down
	}{
		{"top on bottom, normals up", SurfaceTop, SurfaceBottom, 0, false},
		{"bottom on top, normals up", SurfaceBottom, SurfaceTop, 0, false},
		{"top on bottom, part 1 normals down", SurfaceBottom, SurfaceBottom, 0, true},
		{"bottom on top, part 1 normals down", SurfaceTop, SurfaceTop, 0, true},
		{"bottom on top, meshes crossing by 0.01", SurfaceBottom, SurfaceTop, 0.01, false},
	} {
		t.Run(tc.name, func(t *testing.T) {
			m := sheets(sheetGrid{1, 1, 0, 0, 0, 5, 20, 4}, sheetGrid{2, 1.5, tc.z2, 0, 0, 5, 20, 8})
			m.Parts[0].Surface, m.Parts[1].Surface = tc.s1, tc.s2
			if tc.flip1 {
				for e := range 80 {
					ns := m.Conn[m.ElemStart[e]:m.ElemStart[e+1]]
					ns[1], ns[3] = ns[3], ns[1]
				}
			}
			c, err := FindContacts(context.Background(), NewElemIndex(m), ContactRule{Allowance: allow, AngleLimit: 20, FacingFactor: 0.1})
			if err != nil {
				t.Fatal(err)
			}
			n := 0
			for r := range c.Records() {
				n++
				if want := 1.25 - tc.z2; math.Abs(r.Gap-want) > 1e-9 || math.Abs(r.Faying.Z-tc.z2/2) > 1e-9 {
					t.Errorf("node %d: gap %g, faying %v; want gap %g (hand calculation), faying z %g", m.NodeIDs[r.Node], r.Gap, r.Faying, want, tc.z2/2)
				}
			}
			// 21 x 5 nodes of part 1 lie over part 2 (host: the lower id).
			if n != 105 {
				t.Errorf("%d nodes in contact, want 105", n)
			}
			if len(c.Facing()) != 105 {
				t.Errorf("%d facing pairs, want 105 (the coincident nodes)", len(c.Facing()))
			}
		})
	}
}
