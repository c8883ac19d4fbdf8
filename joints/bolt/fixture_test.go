package bolt

import (
	"context"
	"math"
	"testing"

	"gonum.org/v1/gonum/spatial/r3"

	"github.com/joinery-cae/joinery/geom"
	"github.com/joinery-cae/joinery/joints"
)

// sheet describes one flat sheet of a test mesh in the plane z = Z
// (before the mesh's rotation): with Hole > 0 an annulus of quads round
// the origin from the hole's radius to Outer, Seg segments round and
// Rings rings out, its hole's edge nodes exactly on the circle; with
// Hole = 0 a square grid of H mm quads over [X0, X0+N*H] squared.
type sheet struct {
	Part    int64
	T, Z    float64
	Surface geom.Surface
	Hole    float64 // hole diameter, mm; 0: no hole, a grid
	Outer   float64 // annulus outer radius, mm
	Seg     int
	Rings   int
	X0, H   float64
	N       int
	// Warp spaces the annulus's nodes unevenly round it, still on their
	// circles: node k at angle a + Warp sin(a), a = 2 pi k / Seg.
	Warp float64
	// Quadratic meshes the annulus with 8-node quads: a midside node on
	// each edge, on the circle between two corners of a ring (numbered
	// after the corners, ring by ring), and half-way between two rings.
	Quadratic bool
	// Elem, with Quadratic, is the second-order element: Quad8 (the
	// default), Quad9 (a centre node too, numbered after the midsides)
	// or Tri6 (each quad cut along its diagonal from ring r at k to ring
	// r+1 at k+1, the diagonals' midside nodes numbered last).
	Elem geom.ElemType
	// Straight puts the midside nodes at the middle of the chords
	// between their corners (straight-sided second-order elements)
	// instead of on the circles.
	Straight bool
	// OvalX and OvalY, when set, make the hole an ellipse of these
	// diameters along x and y (Hole is then the ellipse's nominal size for
	// the rings beyond, which blend to circles by the outer one).
	OvalX, OvalY float64
	// CX moves the annulus (its hole's centre) to x = CX.
	CX float64
}

// rotation turns a point about the unit axis u by angle a (Rodrigues'
// formula).
type rotation struct {
	u r3.Vec
	a float64
}

func (r rotation) apply(v r3.Vec) r3.Vec {
	if r.a == 0 {
		return v
	}
	c, s := math.Cos(r.a), math.Sin(r.a)
	return r3.Add(r3.Add(r3.Scale(c, v), r3.Scale(s, r3.Cross(r.u, v))), r3.Scale((1-c)*r3.Dot(r.u, v), r.u))
}

// mesh builds a mesh of the sheets, turned by rot, with ids per part
// from part*10000+1.
func mesh(t *testing.T, rot rotation, sheets ...sheet) *geom.Mesh {
	t.Helper()
	m := &geom.Mesh{ElemStart: []int32{0}}
	for pi, s := range sheets {
		m.Parts = append(m.Parts, geom.Part{ID: s.Part, Thickness: s.T, Surface: s.Surface})
		base := int32(len(m.Coords))
		nNodes, nElems := 0, 0
		node := func(v r3.Vec) {
			nNodes++
			m.NodeIDs = append(m.NodeIDs, s.Part*10000+int64(nNodes))
			m.Coords = append(m.Coords, rot.apply(v))
		}
		elem := func(ns ...int32) {
			nElems++
			m.Conn = append(m.Conn, ns...)
			m.ElemStart = append(m.ElemStart, int32(len(m.Conn)))
			m.ElemIDs = append(m.ElemIDs, s.Part*10000+int64(nElems))
			m.ElemPart = append(m.ElemPart, int32(pi))
		}
		if s.Hole > 0 {
			radius := func(r float64) float64 { return s.Hole/2 + (s.Outer-s.Hole/2)*r/float64(s.Rings) }
			angle := func(k float64) float64 {
				a := 2 * math.Pi * k / float64(s.Seg)
				return a + s.Warp*math.Sin(a)
			}
			for r := 0; r <= s.Rings; r++ {
				rad := radius(float64(r))
				sx, sy := 1.0, 1.0
				if s.OvalX > 0 {
					blend := 1 - float64(r)/float64(s.Rings)
					sx, sy = 1+(s.OvalX/s.Hole-1)*blend, 1+(s.OvalY/s.Hole-1)*blend
				}
				for k := range s.Seg {
					a := angle(float64(k))
					node(r3.Vec{X: s.CX + sx*rad*math.Cos(a), Y: sy * rad * math.Sin(a), Z: s.Z})
				}
			}
			at := func(r, k int) int32 { return base + int32(r*s.Seg+k%s.Seg) }
			if !s.Quadratic {
				for r := range s.Rings {
					for k := range s.Seg {
						elem(at(r, k), at(r+1, k), at(r+1, k+1), at(r, k+1))
					}
				}
				continue
			}
			// mid places a node between angles k and k+1 at radius rad:
			// on the circle, or with Straight at the chord's middle.
			mid := func(rad, k float64) {
				a := angle(k + 0.5)
				if s.Straight {
					a0, a1 := angle(k), angle(k+1)
					node(r3.Vec{X: s.CX + rad*(math.Cos(a0)+math.Cos(a1))/2, Y: rad * (math.Sin(a0) + math.Sin(a1)) / 2, Z: s.Z})
					return
				}
				node(r3.Vec{X: s.CX + rad*math.Cos(a), Y: rad * math.Sin(a), Z: s.Z})
			}
			tb := base + int32((s.Rings+1)*s.Seg) // midsides on the rings
			for r := 0; r <= s.Rings; r++ {
				for k := range s.Seg {
					mid(radius(float64(r)), float64(k))
				}
			}
			rb := tb + int32((s.Rings+1)*s.Seg) // midsides between rings
			for r := range s.Rings {
				rad := radius(float64(r) + 0.5)
				for k := range s.Seg {
					a := angle(float64(k))
					node(r3.Vec{X: s.CX + rad*math.Cos(a), Y: rad * math.Sin(a), Z: s.Z})
				}
			}
			cb := rb + int32(s.Rings*s.Seg) // centres (Quad9) or diagonals' midsides (Tri6)
			if s.Elem == geom.Quad9 || s.Elem == geom.Tri6 {
				for r := range s.Rings {
					for k := range s.Seg {
						mid(radius(float64(r)+0.5), float64(k))
					}
				}
			}
			tm := func(r, k int) int32 { return tb + int32(r*s.Seg+k%s.Seg) }
			rm := func(r, k int) int32 { return rb + int32(r*s.Seg+k%s.Seg) }
			cm := func(r, k int) int32 { return cb + int32(r*s.Seg+k%s.Seg) }
			for r := range s.Rings {
				for k := range s.Seg {
					switch s.Elem {
					case geom.Tri6:
						elem(at(r, k), at(r+1, k), at(r+1, k+1), rm(r, k), tm(r+1, k), cm(r, k))
						elem(at(r, k), at(r+1, k+1), at(r, k+1), cm(r, k), rm(r, k+1), tm(r, k))
					case geom.Quad9:
						elem(at(r, k), at(r+1, k), at(r+1, k+1), at(r, k+1),
							rm(r, k), tm(r+1, k), rm(r, k+1), tm(r, k), cm(r, k))
					default:
						elem(at(r, k), at(r+1, k), at(r+1, k+1), at(r, k+1),
							rm(r, k), tm(r+1, k), rm(r, k+1), tm(r, k))
					}
				}
			}
			continue
		}
		for j := 0; j <= s.N; j++ {
			for i := 0; i <= s.N; i++ {
				node(r3.Vec{X: s.X0 + float64(i)*s.H, Y: s.X0 + float64(j)*s.H, Z: s.Z})
			}
		}
		for j := range s.N {
			for i := range s.N {
				n0 := base + int32(j*(s.N+1)+i)
				elem(n0, n0+1, n0+int32(s.N)+2, n0+int32(s.N)+1)
			}
		}
	}
	if err := m.Index(); err != nil {
		t.Fatal(err)
	}
	return m
}

// build builds the bolts js on m with options o, with a full index.
func build(t *testing.T, m *geom.Mesh, o joints.BuildOptions, js ...joints.Joint) []joints.Connector {
	t.Helper()
	cs, err := Build(context.Background(), geom.NewIndex(m), js, o, nil)
	if err != nil {
		t.Fatal(err)
	}
	return cs
}

// m10 is an M10 bolt at p with an ISO 7089 washer (20 mm) in an ISO 273
// medium clearance hole (11 mm).
func m10(id string, p r3.Vec) joints.Joint {
	return joints.Joint{ID: id, Kind: joints.Bolt, Point: p, Diameter: 10, Washer: 20, Hole: 11}
}

// holed returns two holed sheets in contact, 1.5 and 3 mm thick, meshed
// on their mid-surfaces at z = 0 and 2.25, hole diameter d in both.
func holed(d float64) []sheet {
	return []sheet{
		{Part: 1, T: 1.5, Z: 0, Hole: d, Outer: 40, Seg: 24, Rings: 6},
		{Part: 2, T: 3, Z: 2.25, Hole: d, Outer: 40, Seg: 24, Rings: 6},
	}
}

func near(a, b, tol float64) bool { return math.Abs(a-b) <= tol }

func codes(fs []joints.Finding) []string {
	var out []string
	for _, f := range fs {
		out = append(out, f.Code)
	}
	return out
}
