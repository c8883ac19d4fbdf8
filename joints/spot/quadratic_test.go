package spot

import (
	"math"
	"testing"

	"gonum.org/v1/gonum/spatial/r3"

	"github.com/joinery-cae/joinery/geom"
	"github.com/joinery-cae/joinery/geom/geomtest"
	"github.com/joinery-cae/joinery/joints"
)

// TestSecondOrderSheets builds welds between two second-order sheets
// curved as the paraboloid z = (x^2 + y^2)/(2R), R = 500 mm, 1 mm thick,
// their mid-surfaces 1 mm apart along z (in contact to within the
// curvature; mid-surface geometry, common practice). The ends lie on the
// curved surfaces (closed form: z of the paraboloid at the projection),
// tie to all the host's nodes with weights that reproduce them, and
// node-pair and patch ends use midside nodes too.
func TestSecondOrderSheets(t *testing.T) {
	const R = 500.0
	for _, typ := range []geom.ElemType{geom.Tri6, geom.Quad8, geom.Quad9} {
		sheet := func(part int64, dz float64, first int64) *geom.Mesh {
			return geomtest.SecondOrder(geomtest.SecondOrderSpec{
				Type: typ, NX: 8, NY: 8, H: 6, X0: -24, Y0: -24, Part: part, FirstNodeID: first, FirstElemID: first,
				Surface: func(x, y float64) r3.Vec { return r3.Vec{X: x, Y: y, Z: (x*x+y*y)/(2*R) + dz} },
			})
		}
		m, _, err := geom.Merge([]*geom.Mesh{sheet(1, 0, 1), sheet(2, 1, 10001)}, false)
		if err != nil {
			t.Fatal(err)
		}
		m.Parts[0].Thickness, m.Parts[1].Thickness = 1, 1
		// The nearest node to the weld is not a corner (corners lie on
		// multiples of 6 mm from -24): the centre of a Quad9, the
		// midside node of a Tri6's diagonal, of a Quad8's edge.
		p := r3.Vec{X: 1.7, Y: 2.9, Z: 0.5}
		corner := func(q r3.Vec) bool { return math.Mod(q.X+24, 6) == 0 && math.Mod(q.Y+24, 6) == 0 }
		for _, a := range []joints.Attach{joints.Interpolated, joints.NodePair, joints.Patch} {
			c := buildOne1(t, m, joints.Joint{ID: "1", Point: p}, joints.BuildOptions{Attach: a})
			if c.Status != joints.Built {
				t.Fatalf("%v %v: state %v %v", typ, a, c.Status, c.Findings)
			}
			for i, e := range c.Ends {
				sum := 0.0
				var pt r3.Vec
				for k, n := range e.Nodes {
					sum += e.Weights[k]
					pt = r3.Add(pt, r3.Scale(e.Weights[k], m.Coords[n]))
				}
				dev := r3.Sub(pt, e.Point)
				if a == joints.Patch {
					// Patch weights reproduce the point in the sheet's
					// tangent plane only.
					n := r3.Unit(r3.Vec{X: -e.Point.X / R, Y: -e.Point.Y / R, Z: 1})
					dev = r3.Sub(dev, r3.Scale(r3.Dot(dev, n), n))
				}
				if math.Abs(sum-1) > 1e-12 || r3.Norm(dev) > 1e-9 {
					t.Errorf("%v %v end %d: weights sum %g, give %v, end at %v", typ, a, i, sum, pt, e.Point)
				}
				x, y := e.Point.X, e.Point.Y
				if z := (x*x+y*y)/(2*R) + float64(i); math.Abs(e.Point.Z-z) > 1e-9 {
					t.Errorf("%v %v end %d at %v: off the curved sheet (z %g)", typ, a, i, e.Point, z)
				}
				switch a {
				case joints.Interpolated:
					if len(e.Nodes) != int(typ) {
						t.Errorf("%v end %d: %d nodes, want all %d of the host", typ, i, len(e.Nodes), int(typ))
					}
				case joints.NodePair:
					want := r3.Vec{X: 3, Y: 3}
					if typ == geom.Quad8 {
						want = r3.Vec{X: 0, Y: 3} // (3, 3) is no node of a Quad8
					}
					if math.Abs(e.Point.X-want.X) > 1e-12 || math.Abs(e.Point.Y-want.Y) > 1e-12 || corner(e.Point) {
						t.Errorf("%v end %d on node %v, want the node at %v", typ, i, e.Point, want)
					}
				case joints.Patch:
					mids := 0
					for _, n := range e.Nodes {
						if !corner(m.Coords[n]) {
							mids++
						}
					}
					if mids == 0 {
						t.Errorf("%v patch end %d: no midside node among %d", typ, i, len(e.Nodes))
					}
				}
			}
		}
	}
}
