package spot

import (
	"math"
	"slices"
	"testing"

	"gonum.org/v1/gonum/spatial/r3"

	"github.com/joinery-cae/joinery/geom"
	"github.com/joinery-cae/joinery/joints"
)

// drawn is a way of drawing the same model: in another unit (the mesh and
// the joint list written in metres or inches, scaled to mm once read, as
// the pipeline does with geom.Mesh.Scale and joints.ScaleJoints) and
// moved away from the origin, as a body's parts lie. Each gives the same
// lengths as the model in mm up to the rounding of float64 arithmetic.
type drawn struct {
	name  string
	unit  joints.Unit
	shift r3.Vec // mm
}

var drawings = []drawn{
	{"mm", joints.Millimetre, r3.Vec{}},
	{"m", joints.Metre, r3.Vec{}},
	{"in", joints.Inch, r3.Vec{}},
	{"mm, moved", joints.Millimetre, r3.Vec{X: 1234.1, Y: -987.3, Z: 412.7}},
	{"in, moved", joints.Inch, r3.Vec{X: 1234.1, Y: -987.3, Z: 412.7}},
}

// model returns the plates drawn as d says (their lengths given in mm)
// and the joint's point there, both scaled back to mm.
func (d drawn) model(p r3.Vec, ps ...plate) (*geom.Mesh, r3.Vec) {
	f := d.unit.MM()
	for i := range ps {
		q := &ps[i]
		q.T, q.H = q.T/f, q.H/f
		q.X0, q.Y0, q.Z = (q.X0+d.shift.X)/f, (q.Y0+d.shift.Y)/f, (q.Z+d.shift.Z)/f
	}
	m := plates(ps...)
	m.Scale(f)
	js := []joints.Joint{{Point: r3.Scale(1/f, r3.Add(p, d.shift))}}
	joints.ScaleJoints(js, f)
	return m, js[0].Point
}

// A value exactly at a limit meets it, whatever the unit the model is
// drawn in or where it lies (README: lengths computed from coordinates
// are compared with joints.LengthRoundoff allowed). Two 1.0 mm sheets in
// contact, meshed on their mid-surfaces 1.0 mm apart, ending at x = 50:
// nugget 5*sqrt(1.0) = 5 mm (common practice), so the lateral limit is
// 0.5 * 2.5 = 1.25 mm (joints.DefaultLateralFactor nugget radii) and the
// edge limit one nugget diameter, 5 mm (joints.DefaultEdgeFactor, common
// practice); hand calculation. Before, in inches or moved, a weld
// 1.25 mm beyond the edge found no sheet (the lateral distance came out
// 1.2500000000000002 mm) and one 5 mm inside it was edge-close.
func TestLimitsMetWhateverTheUnit(t *testing.T) {
	ps := func() []plate {
		return []plate{{Part: 1, T: 1, NX: 10, NY: 10, H: 5}, {Part: 2, T: 1, Z: 1, NX: 10, NY: 10, H: 5}}
	}
	cases := []struct {
		name  string
		at    r3.Vec
		parts []int64
		state joints.Status
		codes []string
	}{
		// 1.25 mm beyond the edge: at the lateral limit, built, the
		// weld off the sheets by less than the limit (edge-close).
		{"at the lateral limit", r3.Vec{X: 51.25, Y: 22.5, Z: 0.5}, nil, joints.Flagged, []string{joints.CodeEdgeClose, joints.CodeEdgeClose}},
		{"at the lateral limit, listed", r3.Vec{X: 51.25, Y: 22.5, Z: 0.5}, []int64{1, 2}, joints.Flagged, []string{joints.CodeEdgeClose, joints.CodeEdgeClose}},
		{"at the lateral limit, other edge", r3.Vec{X: 22.5, Y: -1.25, Z: 0.5}, nil, joints.Flagged, []string{joints.CodeEdgeClose, joints.CodeEdgeClose}},
		// 5 mm inside the edge: at the edge limit, no finding.
		{"at the edge limit", r3.Vec{X: 45, Y: 22.5, Z: 0.5}, nil, joints.Built, nil},
		{"at the edge limit, other edge", r3.Vec{X: 22.5, Y: 5, Z: 0.5}, nil, joints.Built, nil},
		{"at the edge limit, corner", r3.Vec{X: 45, Y: 45, Z: 0.5}, nil, joints.Built, nil},
	}
	for _, d := range drawings {
		for _, tc := range cases {
			m, p := d.model(tc.at, ps()...)
			c := buildOne1(t, m, joints.Joint{ID: "W", Point: p, Parts: tc.parts}, joints.BuildOptions{})
			if c.Status != tc.state || !slices.Equal(codes(c), tc.codes) {
				t.Errorf("%s, %s: %v %v, want %v %v", d.name, tc.name, c.Status, codes(c), tc.state, tc.codes)
			}
		}
	}
}

// A patch ties every node within the nugget radius, a node exactly at it
// included, in every unit. A 2.5 mm grid and a weld on a node: the node
// and its four neighbours exactly 2.5 mm away (the radius of a
// 5*sqrt(1.0) = 5 mm nugget, common practice), which surround the weld,
// so no host element's far corner (3.54 mm, outside the nugget) is added:
// 5 nodes, each weighted 1/5 by symmetry (hand calculation), whichever of
// the four elements meeting at the node was taken as host. Before, in
// inches the neighbours came out 2.5000000000000004 mm away and were left
// out (3 or 4 nodes); and the patch always held the host's corners (6
// nodes, weights 0.09 to 0.23, depending on the elements' ids).
func TestPatchRadiusWhateverTheUnit(t *testing.T) {
	for _, d := range drawings {
		m, p := d.model(r3.Vec{X: 25, Y: 25, Z: 0.5},
			plate{Part: 1, T: 1, NX: 20, NY: 20, H: 2.5}, plate{Part: 2, T: 1, Z: 1, NX: 20, NY: 20, H: 2.5})
		c := buildOne1(t, m, joints.Joint{ID: "W", Point: p}, joints.BuildOptions{Attach: joints.Patch})
		if len(c.Ends) != 2 {
			t.Fatalf("%s: %d ends, %v", d.name, len(c.Ends), codes(c))
		}
		for i, e := range c.Ends {
			if len(e.Nodes) != 5 {
				t.Errorf("%s: end %d ties %d nodes, want 5", d.name, i, len(e.Nodes))
			}
			for k, w := range e.Weights {
				if math.Abs(w-0.2) > 1e-12 {
					t.Errorf("%s: end %d: node %d weight %g, want 0.2", d.name, i, m.NodeIDs[e.Nodes[k]], w)
				}
			}
			var sum float64
			var at r3.Vec
			for k, n := range e.Nodes {
				sum += e.Weights[k]
				at = r3.Add(at, r3.Scale(e.Weights[k], m.Coords[n]))
			}
			if math.Abs(sum-1) > 1e-9 || r3.Norm(r3.Sub(at, e.Point)) > 1e-9 {
				t.Errorf("%s: end %d: weights sum to %g and give %v, want 1 and %v", d.name, i, sum, at, e.Point)
			}
		}
	}
}

// Node-pair ends: nodes equally near the weld (within geom.TieDistance)
// are tied, and the lowest node id wins, in every unit and wherever the
// model lies. On a 10 mm grid a weld at an element's centre is 7.07 mm
// from its four corners, one midway along an edge 5 mm from its two ends
// (hand calculation); the lowest id of plates' numbering is the corner
// with the least y, then the least x. Every element centre and edge
// midpoint of the grid is tried. Before, the rounding of the distances
// picked another corner for some of them in inches or once moved.
func TestNodePairTiesWhateverTheUnit(t *testing.T) {
	type tie struct{ at, on r3.Vec } // weld point; the node both ends sit on (mm, before the shift)
	var cases []tie
	for i := 1; i < 5; i++ {
		for j := 1; j < 5; j++ {
			x, y := 10*float64(i), 10*float64(j)
			cases = append(cases,
				tie{r3.Vec{X: x + 5, Y: y + 5, Z: 0.5}, r3.Vec{X: x, Y: y}}, // element centre
				tie{r3.Vec{X: x + 5, Y: y, Z: 0.5}, r3.Vec{X: x, Y: y}},     // edge along x
				tie{r3.Vec{X: x, Y: y + 5, Z: 0.5}, r3.Vec{X: x, Y: y}})     // edge along y
		}
	}
	failed := 0
	for _, d := range drawings {
		for _, tc := range cases {
			m, p := d.model(tc.at, plate{Part: 1, T: 1, NX: 6, NY: 6, H: 10}, plate{Part: 2, T: 1, Z: 1, NX: 6, NY: 6, H: 10})
			c := buildOne1(t, m, joints.Joint{ID: "W", Point: p}, joints.BuildOptions{Attach: joints.NodePair})
			if len(c.Ends) != 2 {
				t.Fatalf("%s, weld at %v: %d ends, %v", d.name, tc.at, len(c.Ends), codes(c))
			}
			for i, e := range c.Ends {
				if got := r3.Sub(e.Point, d.shift); math.Hypot(got.X-tc.on.X, got.Y-tc.on.Y) > 1e-6 {
					if failed++; failed <= 10 {
						t.Errorf("%s, weld at %v: end %d on %v, want %v (the lowest node id of the tie)", d.name, tc.at, i, got, tc.on)
					}
				}
			}
		}
	}
}

// A link whose ends coincide is a zero-length link: length 0 and the zero
// direction (connectors.schema.json: "[0,0,0] for a zero-length link"),
// in every unit and wherever the model lies. Mid-surface sheets of 0.8,
// 2.0 and 1.2 mm at z = 0, 1.4 and 3.0 (contact, (t1+t2)/2) have their
// faying faces at z = 0.4 and 2.4, reached by offsets of t/2 from either
// side (shell geometry, hand calculation), so both faying joints have no
// length; a 1.0 mm sheet meshed on its top face and a 2.0 mm sheet meshed
// on its bottom face at the same z meet on that face, so the gap link
// between the meshes has no length either. Before, the rounding of
// 0.4 against 1.4 - 1.0 left a faying joint 1.1e-16 mm long along
// (0, 0, -1), its direction turning with the unit.
func TestZeroLengthLinksHaveNoDirection(t *testing.T) {
	stacked := func() []plate {
		return []plate{{Part: 1, T: 0.8, NX: 10, NY: 10, H: 5}, {Part: 2, T: 2, Z: 1.4, NX: 10, NY: 10, H: 5},
			{Part: 3, T: 1.2, Z: 3, NX: 10, NY: 10, H: 5}}
	}
	faces := func() []plate {
		return []plate{{Part: 1, T: 1, NX: 10, NY: 10, H: 5, Surface: geom.SurfaceTop},
			{Part: 2, T: 2, NX: 10, NY: 10, H: 5, Surface: geom.SurfaceBottom}}
	}
	cases := []struct {
		name  string
		ps    func() []plate
		at    r3.Vec
		links joints.LinkForm
		kind  joints.LinkKind // the links that must have no length
		n     int             // how many
	}{
		{"faying joints, mid-surfaces", stacked, r3.Vec{X: 21.5, Y: 26.5, Z: 1.4}, joints.OffsetLinks, joints.FayingJoint, 2},
		{"faying joints, other point", stacked, r3.Vec{X: 13.3, Y: 31.7, Z: 0}, joints.OffsetLinks, joints.FayingJoint, 2},
		{"gap link, faying-face meshes", faces, r3.Vec{X: 21.5, Y: 26.5, Z: 0}, joints.GapLinks, joints.GapLink, 1},
		{"faying joint, faying-face meshes", faces, r3.Vec{X: 21.5, Y: 26.5, Z: 0}, joints.OffsetLinks, joints.FayingJoint, 1},
	}
	for _, d := range drawings {
		for _, tc := range cases {
			m, p := d.model(tc.at, tc.ps()...)
			c := buildOne1(t, m, joints.Joint{ID: "W", Point: p}, joints.BuildOptions{Links: tc.links})
			if c.Status != joints.Built {
				t.Fatalf("%s, %s: %v %v", d.name, tc.name, c.Status, codes(c))
			}
			n := 0
			for _, l := range c.Links {
				if l.Kind != tc.kind {
					continue
				}
				n++
				if l.Length != 0 || l.Direction != (r3.Vec{}) {
					t.Errorf("%s, %s: %v link %d-%d: length %g, direction %v; want 0 and (0, 0, 0)", d.name, tc.name, l.Kind, l.From, l.To, l.Length, l.Direction)
				}
			}
			if n != tc.n {
				t.Errorf("%s, %s: %d links of kind %v, want %d", d.name, tc.name, n, tc.kind, tc.n)
			}
		}
	}
}
