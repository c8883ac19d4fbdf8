package audit

import (
	"bytes"
	"context"
	"fmt"
	"math"
	"strings"
	"testing"

	"gonum.org/v1/gonum/spatial/r3"

	"github.com/joinery-cae/joinery/geom"
	"github.com/joinery-cae/joinery/geom/geomtest"
	"github.com/joinery-cae/joinery/joints"
	"github.com/joinery-cae/joinery/joints/bolt"
	"github.com/joinery-cae/joinery/joints/spot"
	"github.com/joinery-cae/joinery/writers/document"
)

// movedSheet is one sheet of a test mesh for end-moved: a grid of n x n
// quads (or triangles) of side h from (x0, x0), a second-order grid, or,
// with hole > 0, an annulus of quads round the z axis from the hole's
// radius to 40 mm, 24 segments round and 6 rings out; z gives each
// node's height above (x, y).
type movedSheet struct {
	part  int64
	t     float64
	z     func(x, y float64) float64
	n     int
	h, x0 float64
	tri   bool
	order geom.ElemType // Quad8, Quad9 or Tri6: a second-order grid
	hole  float64
}

func flat(z float64) func(x, y float64) float64 { return func(x, y float64) float64 { return z } }

// movedMesh builds the sheets into one mesh as a file in a unit of
// unitMM millimetres would give it once read and scaled to mm (every
// length divided by unitMM, then multiplied back), the first sheet moved
// by shift (mm).
func movedMesh(t *testing.T, unitMM float64, shift r3.Vec, sheets ...movedSheet) *geom.Mesh {
	t.Helper()
	m := &geom.Mesh{ElemStart: []int32{0}}
	for pi, s := range sheets {
		m.Parts = append(m.Parts, geom.Part{ID: s.part, Thickness: s.t / unitMM})
		base := int32(len(m.Coords))
		var coords []r3.Vec
		var elems [][]int32
		switch {
		case s.order != 0:
			g := geomtest.SecondOrder(geomtest.SecondOrderSpec{Type: s.order, NX: s.n, NY: s.n, H: s.h, X0: s.x0, Y0: s.x0,
				Surface: func(x, y float64) r3.Vec { return r3.Vec{X: x, Y: y, Z: s.z(x, y)} }})
			used := make([]int32, g.NumNodes())
			for i := range used {
				used[i] = -1
			}
			for e := range g.NumElems() {
				var ns []int32
				for _, n := range g.ElemNodes(e) {
					if used[n] < 0 {
						used[n] = int32(len(coords))
						coords = append(coords, g.Coords[n])
					}
					ns = append(ns, used[n])
				}
				elems = append(elems, ns)
			}
		case s.hole > 0:
			const seg, rings, outer = 24, 6, 40.0
			for r := 0; r <= rings; r++ {
				rad := s.hole/2 + (outer-s.hole/2)*float64(r)/rings
				for k := range seg {
					a := 2 * math.Pi * float64(k) / seg
					x, y := rad*math.Cos(a), rad*math.Sin(a)
					coords = append(coords, r3.Vec{X: x, Y: y, Z: s.z(x, y)})
				}
			}
			at := func(r, k int) int32 { return int32(r*seg + k%seg) }
			for r := range rings {
				for k := range seg {
					elems = append(elems, []int32{at(r, k), at(r+1, k), at(r+1, k+1), at(r, k+1)})
				}
			}
		default:
			for j := 0; j <= s.n; j++ {
				for i := 0; i <= s.n; i++ {
					x, y := s.x0+float64(i)*s.h, s.x0+float64(j)*s.h
					coords = append(coords, r3.Vec{X: x, Y: y, Z: s.z(x, y)})
				}
			}
			for j := range s.n {
				for i := range s.n {
					n0 := int32(j*(s.n+1) + i)
					n1, n2, n3 := n0+1, n0+int32(s.n)+2, n0+int32(s.n)+1
					if s.tri {
						elems = append(elems, []int32{n0, n1, n2}, []int32{n0, n2, n3})
					} else {
						elems = append(elems, []int32{n0, n1, n2, n3})
					}
				}
			}
		}
		for k, c := range coords {
			if pi == 0 {
				c = r3.Add(c, shift)
			}
			m.NodeIDs = append(m.NodeIDs, s.part*10000+int64(k)+1)
			m.Coords = append(m.Coords, r3.Scale(1/unitMM, c))
		}
		for k, ns := range elems {
			for _, n := range ns {
				m.Conn = append(m.Conn, base+n)
			}
			m.ElemStart = append(m.ElemStart, int32(len(m.Conn)))
			m.ElemIDs = append(m.ElemIDs, s.part*10000+int64(k)+1)
			m.ElemPart = append(m.ElemPart, int32(pi))
		}
	}
	if err := m.Index(); err != nil {
		t.Fatal(err)
	}
	m.Scale(unitMM)
	return m
}

// roundTrip builds joint j on m (mm) with options o, writes its
// connectors.json in the unit u, reads it back to mm and resolves it
// against mesh against, as check does. It returns the connector and its
// recorded rings.
func roundTrip(t *testing.T, m, against *geom.Mesh, j joints.Joint, o joints.BuildOptions, u joints.Unit) (joints.Connector, []RecordedRing) {
	t.Helper()
	x := geom.NewIndex(m)
	var cs []joints.Connector
	var err error
	if j.Kind == joints.Bolt {
		cs, err = bolt.Build(context.Background(), x, []joints.Joint{j}, o, nil)
	} else {
		cs, err = spot.Build(context.Background(), x, []joints.Joint{j}, o, nil)
	}
	if err != nil {
		t.Fatal(err)
	}
	if cs[0].Status == joints.NotBuilt {
		t.Fatalf("not built: %v", cs[0].Findings)
	}
	res, err := joints.NewResult(m, cs, nil, o.Defaults(joints.MaxThickness(m)))
	if err != nil {
		t.Fatal(err)
	}
	var buf bytes.Buffer
	if err := document.EncodeConnectors(&buf, document.NewConnectors(m, res, document.RunInfo{Unit: u})); err != nil {
		t.Fatal(err)
	}
	doc, err := document.ParseConnectors(buf.Bytes(), "connectors.json")
	if err != nil {
		t.Fatal(err)
	}
	if err := doc.ToMillimetres(); err != nil {
		t.Fatal(err)
	}
	back, err := doc.ToConnectors(against, "connectors.json")
	if err != nil {
		t.Fatal(err)
	}
	var rings []RecordedRing
	for _, s := range doc.Connectors[0].Sheets {
		r := RecordedRing{Kind: s.Ring}
		for _, v := range s.NodePoints {
			r.Points = append(r.Points, r3.Vec{X: v[0], Y: v[1], Z: v[2]})
		}
		rings = append(rings, r)
	}
	return back[0], rings
}

func TestEndsMoved(t *testing.T) {
	// Two 1 mm sheets in contact (mid-surfaces 1 mm apart, the contact
	// gap (t1+t2)/2), 5 mm elements; the first one of each case moves.
	lower := movedSheet{part: 1, t: 1, z: flat(0), n: 8, h: 5, x0: -20}
	upper := movedSheet{part: 2, t: 1, z: flat(1), n: 8, h: 5, x0: -20}
	with := func(s movedSheet, f func(*movedSheet)) movedSheet { f(&s); return s }
	// A gentle paraboloid (z = (x^2+y^2)/400, radius of curvature 200 mm
	// at the top) and a saddle (z = xy/200: every bilinear quad on it is
	// warped, none is flat).
	bowl := func(x, y float64) float64 { return (x*x + y*y) / 400 }
	saddle := func(x, y float64) float64 { return x * y / 200 }
	weld := joints.Joint{ID: "W1", Kind: joints.Spot, Point: r3.Vec{X: 1.3, Y: 2.1, Z: 0.5}}
	opts := func(a joints.Attach) joints.BuildOptions {
		o := joints.BuildOptions{Attach: a}
		return o
	}
	boltOpts := func(ring joints.BoltRing, c joints.BoltCoupling) joints.BuildOptions {
		return joints.BuildOptions{BoltRing: ring, BoltCoupling: c}
	}
	// An M10 bolt (ISO 7089 washer 20 mm, ISO 273 medium hole 11 mm)
	// through two sheets 1.5 and 3 mm thick in contact (2.25 mm apart).
	m10 := joints.Joint{ID: "B1", Kind: joints.Bolt, Point: r3.Vec{Z: 1}, Diameter: 10, Washer: 20, Hole: 11}
	// With a 30 mm washer (ISO 7093-1's large series for M10, from
	// memory) the washer ring holds the next ring of nodes out too.
	m10w := m10
	m10w.Washer = 30
	holeLow := movedSheet{part: 1, t: 1.5, z: flat(0), hole: 11}
	holeUp := movedSheet{part: 2, t: 3, z: flat(2.25), hole: 11}
	cases := []struct {
		name   string
		sheets []movedSheet
		j      joints.Joint
		o      joints.BuildOptions
	}{
		{"interpolated quads", []movedSheet{lower, upper}, weld, opts(joints.Interpolated)},
		{"interpolated triangles", []movedSheet{with(lower, func(s *movedSheet) { s.tri = true }), upper}, weld, opts(joints.Interpolated)},
		{"interpolated warped bilinear quads", []movedSheet{with(lower, func(s *movedSheet) { s.z = saddle }), upper}, weld, opts(joints.Interpolated)},
		{"interpolated quad9 on a paraboloid", []movedSheet{with(lower, func(s *movedSheet) { s.z, s.order, s.n, s.h = bowl, geom.Quad9, 4, 10 }), upper}, weld, opts(joints.Interpolated)},
		{"interpolated quad8 on a paraboloid", []movedSheet{with(lower, func(s *movedSheet) { s.z, s.order, s.n, s.h = bowl, geom.Quad8, 4, 10 }), upper}, weld, opts(joints.Interpolated)},
		{"interpolated tri6 on a paraboloid", []movedSheet{with(lower, func(s *movedSheet) { s.z, s.order, s.n, s.h = bowl, geom.Tri6, 4, 10 }), upper}, weld, opts(joints.Interpolated)},
		{"node-pair", []movedSheet{lower, upper}, weld, opts(joints.NodePair)},
		{"patch flat", []movedSheet{lower, upper}, weld, opts(joints.Patch)},
		{"patch on a paraboloid", []movedSheet{with(lower, func(s *movedSheet) { s.z = bowl }), upper}, weld, opts(joints.Patch)},
		{"patch quad8 on a paraboloid", []movedSheet{with(lower, func(s *movedSheet) { s.z, s.order, s.n, s.h = bowl, geom.Quad8, 4, 10 }), upper}, weld, opts(joints.Patch)},
		{"bolt rigid hole ring", []movedSheet{holeLow, holeUp}, m10, boltOpts(joints.HoleRing, joints.RigidCoupling)},
		{"bolt averaging washer ring", []movedSheet{holeLow, holeUp}, m10w, boltOpts(joints.WasherRing, joints.AveragingCoupling)},
		{"bolt washer ring on a paraboloid", []movedSheet{with(holeLow, func(s *movedSheet) { s.z = bowl }),
			with(holeUp, func(s *movedSheet) { s.z = func(x, y float64) float64 { return 2.25 + bowl(x, y) } })}, m10w, boltOpts(joints.WasherRing, joints.RigidCoupling)},
		{"bolt hole ring on a paraboloid", []movedSheet{with(holeLow, func(s *movedSheet) { s.z = bowl }),
			with(holeUp, func(s *movedSheet) { s.z = func(x, y float64) float64 { return 2.25 + bowl(x, y) } })}, m10, boltOpts(joints.HoleRing, joints.AveragingCoupling)},
		{"bolt patch ring (no hole)", []movedSheet{with(lower, func(s *movedSheet) { s.t = 1.5 }), with(upper, func(s *movedSheet) { s.t, s.z = 3, flat(2.25) })},
			m10, boltOpts(joints.HoleRing, joints.RigidCoupling)},
		{"bolt patch ring on a paraboloid", []movedSheet{with(lower, func(s *movedSheet) { s.t, s.z = 1.5, bowl }),
			with(upper, func(s *movedSheet) { s.t, s.z = 3, func(x, y float64) float64 { return 2.25 + bowl(x, y) } })}, m10, boltOpts(joints.HoleRing, joints.RigidCoupling)},
	}
	// Rigid moves of the first sheet and the distance each must give:
	// |d| (closed form: every reconstruction moves with its sheet).
	moves := []r3.Vec{
		{Z: 10},          // 10 mm along the sheets' normal
		{X: 300},         // 300 mm sideways
		{X: 0.3, Z: 0.4}, // 0.5 mm, a 3-4-5 triangle
	}
	units := []joints.Unit{joints.Millimetre, joints.Metre, joints.Inch}
	for _, tc := range cases {
		for _, u := range units {
			t.Run(fmt.Sprintf("%s/%s", tc.name, u), func(t *testing.T) {
				m := movedMesh(t, u.MM(), r3.Vec{}, tc.sheets...)
				j := tc.j
				j.Point = r3.Scale(u.MM(), r3.Scale(1/u.MM(), j.Point))
				c, rings := roundTrip(t, m, m, j, tc.o, u)
				if fs := EndsMoved(m, &c, rings, ""); len(fs) > 0 {
					t.Fatalf("unchanged mesh: %v", fs)
				}
				for i := range c.Ends {
					if d := endOffset(m, &c.Ends[i], &c.Stack.Sheets[i], endForm(&c, &c.Ends[i], ringAt(rings, i, &c)), ringAt(rings, i, &c)); d > 1e-9 {
						t.Errorf("unchanged mesh: end %d off by %g mm, want 0 to rounding", i, d)
					}
				}
				for _, d := range moves {
					moved := movedMesh(t, u.MM(), d, tc.sheets...)
					c, rings := roundTrip(t, m, moved, j, tc.o, u)
					fs := EndsMoved(moved, &c, rings, "")
					want := r3.Norm(d)
					if len(fs) != 1 || fs[0].Code != joints.CodeEndMoved || fs[0].Severity != joints.Error || len(fs[0].Parts) != 1 || fs[0].Parts[0] != 1 {
						t.Fatalf("moved by %v: findings %v, want one end-moved error on part 1", d, fs)
					}
					if !strings.Contains(fs[0].Message, joints.MM(want)+" mm from") || !strings.Contains(fs[0].Message, "mesh changed since the build") || !strings.Contains(fs[0].Message, "connector "+j.ID) {
						t.Errorf("moved by %v: message %q", d, fs[0].Message)
					}
					for i := range c.Ends {
						if c.Stack.Sheets[i].Part != 1 {
							continue
						}
						ring := ringAt(rings, i, &c)
						got := endOffset(moved, &c.Ends[i], &c.Stack.Sheets[i], endForm(&c, &c.Ends[i], ring), ring)
						if math.Abs(got-want) > 1e-9*(1+want) {
							t.Errorf("moved by %v: end %d off by %.12g mm, want %g", d, i, got, want)
						}
					}
				}
			})
		}
	}
}

// ringAt returns the recorded ring of sheet i of c, nil for spot welds.
func ringAt(rings []RecordedRing, i int, c *joints.Connector) *RecordedRing {
	if c.Bolt == nil || i >= len(rings) {
		return nil
	}
	return &rings[i]
}

func TestEndMovedTolerance(t *testing.T) {
	// Far above rounding, far below the thinnest sheet's tenth (ISO
	// 14373's range starts at 0.4 mm).
	if !(EndMovedTolerance >= 100*joints.LengthRoundoff && EndMovedTolerance <= 0.4/10) {
		t.Errorf("EndMovedTolerance %g mm", EndMovedTolerance)
	}
}
