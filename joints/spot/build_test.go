package spot

import (
	"context"
	"fmt"
	"math"
	"slices"
	"strings"
	"testing"

	"gonum.org/v1/gonum/spatial/r3"

	"github.com/joinery-cae/joinery/geom"
	"github.com/joinery-cae/joinery/joints"
)

func buildOne1(t *testing.T, m *geom.Mesh, j joints.Joint, o joints.BuildOptions) joints.Connector {
	t.Helper()
	res, err := buildAll(context.Background(), geom.NewIndex(m), []joints.Joint{j}, o, nil)
	if err != nil {
		t.Fatal(err)
	}
	return res.Connectors[0]
}

func codes(c joints.Connector) []string {
	var out []string
	for _, f := range c.Findings {
		out = append(out, f.Code)
	}
	slices.Sort(out)
	return out
}

// joints.Stack cases on flat plates. Mid-surface meshes of sheets in contact lie
// (t1+t2)/2 apart (shell mid-surface geometry, common practice): a 0.8 mm
// sheet at z=0 and a 1.2 mm sheet on top of it at z=1.0.
func TestStacks(t *testing.T) {
	at := r3.Vec{X: 25, Y: 25, Z: 0.5}
	cases := []struct {
		name   string
		plates []plate
		joint  joints.Joint
		opt    joints.BuildOptions
		status joints.Status
		parts  []int64 // expected stack, in order
		codes  []string
	}{
		{
			name:   "two sheets in contact",
			plates: []plate{{Part: 1, T: 0.8, NX: 10, NY: 10, H: 5}, {Part: 2, T: 1.2, Z: 1, NX: 10, NY: 10, H: 5}},
			joint:  joints.Joint{ID: "W1", Point: at},
			status: joints.Built, parts: []int64{1, 2},
		},
		{
			name: "three sheets, mixed meshes",
			plates: []plate{
				{Part: 1, T: 0.8, NX: 10, NY: 10, H: 5},
				{Part: 2, T: 1.2, Z: 1, NX: 12, NY: 12, H: 4.2, X0: 0.3, Tri: true},
				{Part: 3, T: 1.5, Z: 2.35, NX: 7, NY: 7, H: 7, Y0: -0.5},
			},
			joint:  joints.Joint{ID: "W2", Point: r3.Vec{X: 24, Y: 26, Z: 1}},
			status: joints.Built, parts: []int64{1, 2, 3},
		},
		{
			name: "decoy panel just outside the search distance",
			plates: []plate{
				{Part: 1, T: 1, NX: 10, NY: 10, H: 5},
				{Part: 2, T: 1, Z: 1, NX: 10, NY: 10, H: 5},
				{Part: 9, T: 1, Z: 1 + 3.01, NX: 10, NY: 10, H: 5},
			},
			joint:  joints.Joint{ID: "W3", Point: at},
			opt:    joints.BuildOptions{Reach: 3.5}, // decoy at 3.51 mm from the point
			status: joints.Built, parts: []int64{1, 2},
		},
		{
			name:   "weld over one sheet only",
			plates: []plate{{Part: 1, T: 1, NX: 10, NY: 10, H: 5}, {Part: 2, T: 1, Z: 1, X0: 40, NX: 10, NY: 10, H: 5}},
			joint:  joints.Joint{ID: "W4", Point: r3.Vec{X: 10, Y: 25, Z: 0.5}},
			status: joints.NotBuilt, parts: []int64{1}, codes: []string{joints.CodeSingleSheet},
		},
		{
			name:   "weld in open air",
			plates: []plate{{Part: 1, T: 1, NX: 10, NY: 10, H: 5}, {Part: 2, T: 1, Z: 1, NX: 10, NY: 10, H: 5}},
			joint:  joints.Joint{ID: "W5", Point: r3.Vec{X: 25, Y: 25, Z: 40}},
			status: joints.NotBuilt, codes: []string{joints.CodeNoSheet},
		},
		{
			name:   "sheets too far apart",
			plates: []plate{{Part: 1, T: 1, NX: 10, NY: 10, H: 5}, {Part: 2, T: 1, Z: 2.5, NX: 10, NY: 10, H: 5}},
			joint:  joints.Joint{ID: "W6", Point: r3.Vec{X: 25, Y: 25, Z: 1.25}},
			status: joints.Flagged, parts: []int64{1, 2}, codes: []string{joints.CodeGapOpen},
		},
		{
			name: "small gap within the default tolerance",
			// Two 1 mm sheets 1.2 mm apart: 0.2 mm off contact, within
			// 0.25*(1+1)/2 = 0.25 mm.
			plates: []plate{{Part: 1, T: 1, NX: 10, NY: 10, H: 5}, {Part: 2, T: 1, Z: 1.2, NX: 10, NY: 10, H: 5}},
			joint:  joints.Joint{ID: "W6a", Point: r3.Vec{X: 25, Y: 25, Z: 0.6}},
			status: joints.Built, parts: []int64{1, 2},
		},
		{
			name:   "gap just beyond the default tolerance",
			plates: []plate{{Part: 1, T: 1, NX: 10, NY: 10, H: 5}, {Part: 2, T: 1, Z: 1.3, NX: 10, NY: 10, H: 5}},
			joint:  joints.Joint{ID: "W6b", Point: r3.Vec{X: 25, Y: 25, Z: 0.65}},
			status: joints.Flagged, parts: []int64{1, 2}, codes: []string{joints.CodeGapOpen},
		},
		{
			// Two 0.7 mm sheets 0.875 mm apart: 0.175 mm off contact, exactly
			// the allowance 0.25*(0.7+0.7)/2 (0.875-0.7 is 0.17500000000000004
			// in float64), as the mirror case 0.525 mm below.
			name:   "gap open by exactly the allowance",
			plates: []plate{{Part: 1, T: 0.7, NX: 10, NY: 10, H: 5}, {Part: 2, T: 0.7, Z: 0.875, NX: 10, NY: 10, H: 5}},
			joint:  joints.Joint{ID: "W6d", Point: r3.Vec{X: 25, Y: 25, Z: 0.4}},
			status: joints.Built, parts: []int64{1, 2},
		},
		{
			name:   "gap closed by exactly the allowance",
			plates: []plate{{Part: 1, T: 0.7, NX: 10, NY: 10, H: 5}, {Part: 2, T: 0.7, Z: 0.525, NX: 10, NY: 10, H: 5}},
			joint:  joints.Joint{ID: "W6e", Point: r3.Vec{X: 25, Y: 25, Z: 0.25}},
			status: joints.Built, parts: []int64{1, 2},
		},
		{
			name:   "gap open by a micrometre more than the allowance",
			plates: []plate{{Part: 1, T: 0.7, NX: 10, NY: 10, H: 5}, {Part: 2, T: 0.7, Z: 0.87501, NX: 10, NY: 10, H: 5}},
			joint:  joints.Joint{ID: "W6f", Point: r3.Vec{X: 25, Y: 25, Z: 0.4}},
			status: joints.Flagged, parts: []int64{1, 2}, codes: []string{joints.CodeGapOpen},
		},
		{
			name:   "gap within an explicit tolerance",
			plates: []plate{{Part: 1, T: 1, NX: 10, NY: 10, H: 5}, {Part: 2, T: 1, Z: 1.3, NX: 10, NY: 10, H: 5}},
			joint:  joints.Joint{ID: "W6c", Point: r3.Vec{X: 25, Y: 25, Z: 0.65}},
			opt:    joints.BuildOptions{GapAllowance: 0.4},
			status: joints.Built, parts: []int64{1, 2},
		},
		{
			name: "parallel panel within reach but apart",
			// A pair in contact and a third panel 2 mm above it: the weld
			// joins the pair; the panel is reported, not joined.
			plates: []plate{
				{Part: 1, T: 1, NX: 10, NY: 10, H: 5},
				{Part: 2, T: 1, Z: 1, NX: 10, NY: 10, H: 5},
				{Part: 9, T: 1, Z: 4, NX: 10, NY: 10, H: 5},
			},
			joint:  joints.Joint{ID: "W3b", Point: at},
			status: joints.Built, parts: []int64{1, 2}, codes: []string{joints.CodeSheetApart},
		},
		{
			name:   "listed flange ending short of the weld",
			plates: []plate{{Part: 1, T: 1, NX: 10, NY: 10, H: 5}, {Part: 2, T: 1, Z: 1, NX: 4, NY: 10, H: 5}},
			joint:  joints.Joint{ID: "W3c", Point: r3.Vec{X: 22, Y: 25, Z: 0.5}, Parts: []int64{1, 2}},
			status: joints.NotBuilt, parts: []int64{1, 2}, codes: []string{joints.CodeOffSheet},
		},
		{
			name:   "penetrating sheets",
			plates: []plate{{Part: 1, T: 1.5, NX: 10, NY: 10, H: 5}, {Part: 2, T: 1.5, Z: 0.5, NX: 10, NY: 10, H: 5}},
			joint:  joints.Joint{ID: "W7", Point: r3.Vec{X: 25, Y: 25, Z: 0.25}},
			status: joints.Flagged, parts: []int64{1, 2}, codes: []string{joints.CodeGapClosed},
		},
		{
			name: "outer-surface meshes in contact",
			// Part 1 meshed on its top surface (z=0), part 2 on its bottom
			// surface (z=0 too): the sheets touch, mid-surfaces 1 mm apart.
			plates: []plate{
				{Part: 1, T: 1, NX: 10, NY: 10, H: 5, Surface: geom.SurfaceTop},
				{Part: 2, T: 1, Z: 0, NX: 10, NY: 10, H: 5, X0: 2.5, Surface: geom.SurfaceBottom},
			},
			joint:  joints.Joint{ID: "W8", Point: r3.Vec{X: 25, Y: 25}},
			status: joints.Built, parts: []int64{1, 2},
		},
		{
			name:   "listed part missing",
			plates: []plate{{Part: 1, T: 1, NX: 10, NY: 10, H: 5}, {Part: 2, T: 1, Z: 1, NX: 10, NY: 10, H: 5}, {Part: 3, T: 1, Z: 30, NX: 2, NY: 2, H: 5}},
			joint:  joints.Joint{ID: "W9", Point: at, Parts: []int64{1, 3}},
			status: joints.NotBuilt, parts: []int64{1}, codes: []string{joints.CodePartNotFound},
		},
		{
			name:   "listed parts chosen over a closer sheet",
			plates: []plate{{Part: 1, T: 1, NX: 10, NY: 10, H: 5}, {Part: 2, T: 1, Z: 1, NX: 10, NY: 10, H: 5}, {Part: 3, T: 1, Z: 2, NX: 10, NY: 10, H: 5}},
			joint:  joints.Joint{ID: "W10", Point: r3.Vec{X: 25, Y: 25, Z: 1}, Parts: []int64{3, 1}},
			status: joints.Flagged, parts: []int64{1, 3}, codes: []string{joints.CodeGapOpen},
		},
		{
			name:   "weld near a flange edge",
			plates: []plate{{Part: 1, T: 1, NX: 10, NY: 10, H: 5}, {Part: 2, T: 1, Z: 1, NX: 10, NY: 10, H: 5}},
			joint:  joints.Joint{ID: "W11", Point: r3.Vec{X: 47, Y: 25, Z: 0.5}},
			status: joints.Flagged, parts: []int64{1, 2}, codes: []string{joints.CodeEdgeClose, joints.CodeEdgeClose},
		},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			con := buildOne1(t, plates(c.plates...), c.joint, c.opt)
			if con.Status != c.status {
				t.Errorf("status %v, want %v (findings %v)", con.Status, c.status, con.Findings)
			}
			if got := con.Stack.Parts(); !slices.Equal(got, c.parts) && !(len(got) == 0 && len(c.parts) == 0) {
				t.Errorf("stack %v, want %v", got, c.parts)
			}
			if got := codes(con); !slices.Equal(got, c.codes) {
				t.Errorf("findings %v, want %v: %v", got, c.codes, con.Findings)
			}
		})
	}
}

func TestGapValues(t *testing.T) {
	// 0.8 mm at z=0 and 1.5 mm at z=1.15: in contact, (0.8+1.5)/2 = 1.15.
	m := plates(plate{Part: 1, T: 0.8, NX: 10, NY: 10, H: 5}, plate{Part: 2, T: 1.5, Z: 1.15, NX: 10, NY: 10, H: 5})
	c := buildOne1(t, m, joints.Joint{ID: "1", Point: r3.Vec{X: 22, Y: 27, Z: 0.3}}, joints.BuildOptions{})
	if c.Status != joints.Built || len(c.Links) != 1 {
		t.Fatalf("status %v links %d findings %v", c.Status, len(c.Links), c.Findings)
	}
	l := c.Links[0]
	if math.Abs(l.Length-1.15) > 1e-12 || math.Abs(l.Contact-1.15) > 1e-12 {
		t.Errorf("link length %g contact %g, want 1.15", l.Length, l.Contact)
	}
	// Nugget from the governing (thinner) sheet, 5*sqrt(0.8) (AWS D8.1M
	// governing thickness; 5*sqrt(t) rule, common practice).
	if want := 5 * math.Sqrt(0.8); math.Abs(c.Diameter-want) > 1e-12 || c.DiameterSource != "5sqrt" {
		t.Errorf("diameter %g (%s), want %g", c.Diameter, c.DiameterSource, want)
	}
}

func TestAttachments(t *testing.T) {
	// Matching 5 mm meshes: the weld at (21.5, 26.5) lies inside element
	// (4,5); its nearest node is (20, 25), 2.12 mm away: inside the
	// 2.5 mm nugget radius.
	m := plates(plate{Part: 1, T: 1, NX: 10, NY: 10, H: 5}, plate{Part: 2, T: 1, Z: 1, NX: 10, NY: 10, H: 5})
	p := r3.Vec{X: 21.5, Y: 26.5, Z: 0.5}
	for _, a := range []joints.Attach{joints.Interpolated, joints.NodePair, joints.Patch} {
		c := buildOne1(t, m, joints.Joint{ID: "1", Point: p}, joints.BuildOptions{Attach: a})
		if c.Status != joints.Built {
			t.Fatalf("%v: status %v %v", a, c.Status, c.Findings)
		}
		for i, e := range c.Ends {
			sum := 0.0
			var pt r3.Vec
			for k, n := range e.Nodes {
				sum += e.Weights[k]
				pt = r3.Add(pt, r3.Scale(e.Weights[k], m.Coords[n]))
			}
			if math.Abs(sum-1) > 1e-12 {
				t.Errorf("%v end %d: weights sum %g", a, i, sum)
			}
			if r3.Norm(r3.Sub(pt, e.Point)) > 1e-9 {
				t.Errorf("%v end %d: weights give %v, end at %v", a, i, pt, e.Point)
			}
			want := r3.Vec{X: 21.5, Y: 26.5, Z: float64(i)}
			if a == joints.NodePair {
				want = r3.Vec{X: 20, Y: 25, Z: float64(i)}
			}
			if r3.Norm(r3.Sub(e.Point, want)) > 1e-9 {
				t.Errorf("%v end %d at %v, want %v", a, i, e.Point, want)
			}
		}
		if a == joints.Patch {
			// Nugget radius 2.5 mm around (21.5,26.5): the host element's
			// four corners and no other node (the next nearest lie at
			// 6.67 mm).
			if n := len(c.Ends[0].Nodes); n != 4 {
				t.Errorf("patch: %d nodes, want 4", n)
			}
		}
	}
}

func TestMidGapOuterSurfaces(t *testing.T) {
	// Part 1 meshed on its top surface and part 2 on its bottom surface,
	// both at z=0: the sheets touch; the link joins the meshed surfaces
	// (length 0) but the mid-surface gap equals contact, 1 mm.
	m := plates(
		plate{Part: 1, T: 1, NX: 10, NY: 10, H: 5, Surface: geom.SurfaceTop},
		plate{Part: 2, T: 1, NX: 10, NY: 10, H: 5, X0: 2.5, Surface: geom.SurfaceBottom},
	)
	c := buildOne1(t, m, joints.Joint{ID: "1", Point: r3.Vec{X: 25, Y: 25}}, joints.BuildOptions{})
	if c.Status != joints.Built || len(c.Links) != 1 {
		t.Fatalf("status %v findings %v", c.Status, c.Findings)
	}
	if l := c.Links[0]; math.Abs(l.MidGap-1) > 1e-12 || l.Length != 0 || l.Contact != 1 {
		t.Errorf("link %+v", l)
	}
}

func TestNodePairOffWeld(t *testing.T) {
	// Weld at (22.4, 27.4) on a 5 mm mesh: the nearest node (20, 25) lies
	// 3.39 mm away, outside the 2.5 mm nugget: the connector would move
	// off the weld.
	m := plates(plate{Part: 1, T: 1, NX: 10, NY: 10, H: 5}, plate{Part: 2, T: 1, Z: 1, NX: 10, NY: 10, H: 5})
	c := buildOne1(t, m, joints.Joint{ID: "1", Point: r3.Vec{X: 22.4, Y: 27.4, Z: 0.5}}, joints.BuildOptions{Attach: joints.NodePair})
	if got := codes(c); !slices.Equal(got, []string{joints.CodeNodesApart, joints.CodeNodesApart}) {
		t.Fatalf("findings %v", c.Findings)
	}
}

func TestPatchWithManyNodes(t *testing.T) {
	// A 12 mm nugget over 2 mm elements: the patch takes every node within
	// 6 mm; the weights must still sum to 1 and reproduce the point.
	m := plates(plate{Part: 1, T: 1, NX: 25, NY: 25, H: 2}, plate{Part: 2, T: 1, Z: 1, NX: 20, NY: 20, H: 2.5, Tri: true})
	p := r3.Vec{X: 23.3, Y: 26.1, Z: 0.5}
	c := buildOne1(t, m, joints.Joint{ID: "1", Point: p, Diameter: 12}, joints.BuildOptions{Attach: joints.Patch})
	if c.Status != joints.Built {
		t.Fatalf("status %v %v", c.Status, c.Findings)
	}
	for i, e := range c.Ends {
		if len(e.Nodes) < 15 { // about pi*6²/h² nodes: 28 for h=2, 18 for h=2.5
			t.Errorf("end %d: only %d nodes", i, len(e.Nodes))
		}
		sum := 0.0
		var pt r3.Vec
		for k, n := range e.Nodes {
			sum += e.Weights[k]
			pt = r3.Add(pt, r3.Scale(e.Weights[k], m.Coords[n]))
			if d := r3.Norm(r3.Sub(m.Coords[n], e.Point)); d > 6+1e-9 {
				t.Errorf("end %d: node %d at %g mm, beyond the 6 mm radius", i, m.NodeIDs[n], d)
			}
		}
		if math.Abs(sum-1) > 1e-12 || r3.Norm(r3.Sub(pt, e.Point)) > 1e-9 {
			t.Errorf("end %d: weights sum %g, give %v for %v", i, sum, pt, e.Point)
		}
	}
}

func TestIDStartCollision(t *testing.T) {
	m := plates(plate{Part: 1, T: 1, NX: 2, NY: 2, H: 5})
	if _, err := buildAll(context.Background(), geom.NewIndex(m), nil, joints.BuildOptions{IDStart: 100001}, nil); err == nil {
		t.Fatal("no error for an id start below the mesh ids")
	}
}

func TestNodePairNotFacing(t *testing.T) {
	// Meshes offset by half an element: nearest nodes 3.54 mm apart
	// across the axis, above the limit 0.5 * 2.5 mm.
	m := plates(plate{Part: 1, T: 1, NX: 10, NY: 10, H: 5}, plate{Part: 2, T: 1, Z: 1, X0: -2.5, Y0: -2.5, NX: 11, NY: 11, H: 5})
	c := buildOne1(t, m, joints.Joint{ID: "1", Point: r3.Vec{X: 21, Y: 21, Z: 0.5}}, joints.BuildOptions{Attach: joints.NodePair})
	if got := codes(c); !slices.Equal(got, []string{joints.CodeNodesApart}) {
		t.Fatalf("findings %v", c.Findings)
	}
}

func TestBoltNotSupported(t *testing.T) {
	m := plates(plate{Part: 1, T: 1, NX: 2, NY: 2, H: 5})
	c := buildOne1(t, m, joints.Joint{ID: "B1", Kind: joints.Bolt, Point: r3.Vec{X: 5, Y: 5}}, joints.BuildOptions{})
	if c.Status != joints.NotBuilt || !slices.Equal(codes(c), []string{joints.CodeNotSupported}) {
		t.Fatalf("status %v findings %v", c.Status, c.Findings)
	}
}

func TestIDsStableAndAboveMesh(t *testing.T) {
	m := plates(plate{Part: 1, T: 1, NX: 10, NY: 10, H: 5}, plate{Part: 2, T: 1, Z: 1, NX: 10, NY: 10, H: 5})
	js := []joints.Joint{{ID: "W10", Point: r3.Vec{X: 10, Y: 10, Z: .5}}, {ID: "W2", Point: r3.Vec{X: 30, Y: 30, Z: .5}}}
	res, err := buildAll(context.Background(), geom.NewIndex(m), js, joints.BuildOptions{}, nil)
	if err != nil {
		t.Fatal(err)
	}
	// Largest id in the mesh is 200121 (node of part 2): ids start at
	// 300000. W2 sorts before W10 (natural order).
	if res.IDStart != 300000 || res.Connectors[0].Joint.ID != "W2" {
		t.Fatalf("id start %d, first %s", res.IDStart, res.Connectors[0].Joint.ID)
	}
	c := res.Connectors[0]
	if !slices.Equal(c.EndIDs, []int64{300000, 300001}) || c.Links[0].ID != 300002 || res.NextID != 300006 {
		t.Fatalf("ids %v link %d next %d", c.EndIDs, c.Links[0].ID, res.NextID)
	}
}

// buildAll builds js and assembles the result, as the pipeline does for
// spot welds.
func buildAll(ctx context.Context, x *geom.Index, js []joints.Joint, o joints.BuildOptions, prog geom.Progress) (*joints.Result, error) {
	conns, err := Build(ctx, x, js, o, prog)
	if err != nil {
		return nil, err
	}
	for i := range js {
		if js[i].Kind != joints.Spot {
			conns = append(conns, joints.NotSupported(&js[i], &o))
		}
	}
	return joints.NewResult(x.Mesh(), conns, nil, o)
}

func TestGapNamesFlippedHost(t *testing.T) {
	// Part 2 is declared meshed on its bottom face, which lies on part 1's
	// top face (z = 0.5; part 1 is a 1 mm mid-surface mesh at z = 0), but
	// its elements' normals point down (-z): the mid-surface is placed at
	// z = 0 instead of z = 1, which reads as 1 mm of penetration. Reversed,
	// the normal gives contact exactly (closed form: (t1+t2)/2 = 1 mm).
	m := plates(plate{Part: 1, T: 1, NX: 10, NY: 10, H: 5},
		plate{Part: 2, T: 1, Z: 0.5, NX: 10, NY: 10, H: 5, Surface: geom.SurfaceBottom, FlipOrder: true})
	c := buildOne1(t, m, joints.Joint{ID: "F1", Point: r3.Vec{X: 22, Y: 23, Z: 0.5}}, joints.BuildOptions{})
	if got := codes(c); !slices.Equal(got, []string{joints.CodeGapClosed}) {
		t.Fatalf("findings %v", c.Findings)
	}
	host := m.ElemIDs[c.Stack.Sheets[1].Proj.Elem]
	if c.Stack.Sheets[1].Part != 2 {
		host = m.ElemIDs[c.Stack.Sheets[0].Proj.Elem]
	}
	want := fmt.Sprintf("part 2 is meshed on its bottom face, and the sheets would touch if the normal of its element %d under the weld pointed the other way", host)
	if msg := c.Findings[0].Message; !strings.Contains(msg, want) {
		t.Errorf("message %q lacks %q", msg, want)
	}
	// The same sheets with part 2's normals pointing up build clean: no hint
	// where there is no finding.
	m = plates(plate{Part: 1, T: 1, NX: 10, NY: 10, H: 5},
		plate{Part: 2, T: 1, Z: 0.5, NX: 10, NY: 10, H: 5, Surface: geom.SurfaceBottom})
	if c := buildOne1(t, m, joints.Joint{ID: "F2", Point: r3.Vec{X: 22, Y: 23, Z: 0.5}}, joints.BuildOptions{}); len(c.Findings) != 0 {
		t.Errorf("unflipped: findings %v", c.Findings)
	}
	// A mid-surface pair 2 mm apart gets no hint: no outer-surface sheet.
	m = plates(plate{Part: 1, T: 1, NX: 10, NY: 10, H: 5}, plate{Part: 2, T: 1, Z: 2, NX: 10, NY: 10, H: 5})
	c = buildOne1(t, m, joints.Joint{ID: "F3", Point: r3.Vec{X: 22, Y: 23, Z: 1}}, joints.BuildOptions{})
	for _, f := range c.Findings {
		if strings.Contains(f.Message, "pointed the other way") {
			t.Errorf("hint on a mid-surface pair: %q", f.Message)
		}
	}
}

func TestTiltedGapIndependentOfHeight(t *testing.T) {
	// Part 1 (1 mm) is flat at z = 0; part 2 (1.5 mm) is tilted by 10
	// degrees about the line y = 25, z = 1.25, where its mid-surface lies
	// (t1+t2)/2 = 1.25 mm above part 1's along part 1's normal (square to
	// the sheets, joints.SquareGap, 0.0115 mm less: within the allowance).
	// The stack axis is part 1's normal (part 1 is the closer sheet for
	// every height below), and it meets part 2's plane at z = 1.25 exactly
	// (elementary geometry): the gap must not depend on the height at
	// which the weld point is given. Measured through the closest points
	// instead it would be z0 + (1.25 - z0) cos^2(10 deg), 1.212 mm at z0 = 0.
	a := 10 * math.Pi / 180
	m := plates(plate{Part: 1, T: 1, NX: 10, NY: 10, H: 5}, plate{Part: 2, T: 1.5, Z: 1.25, NX: 10, NY: 10, H: 5})
	for i := range m.Coords {
		if m.NodeIDs[i] >= 200000 {
			y := m.Coords[i].Y - 25
			m.Coords[i].Y = 25 + y*math.Cos(a)
			m.Coords[i].Z = 1.25 + y*math.Sin(a)
		}
	}
	for _, z0 := range []float64{0, 0.3, 0.55} {
		c := buildOne1(t, m, joints.Joint{ID: "T", Point: r3.Vec{X: 22, Y: 25, Z: z0}}, joints.BuildOptions{})
		if c.Status != joints.Built || len(c.Links) != 1 {
			t.Fatalf("z0 %g: status %v findings %v", z0, c.Status, c.Findings)
		}
		if got := c.Links[0].MidGap; math.Abs(got-1.25) > 1e-9 {
			t.Errorf("z0 %g: gap %.6f, want 1.25", z0, got)
		}
	}
}

// The edge-close message tells a weld centre over the sheet near its
// edge from one that lies off the sheet: two 1 mm plates 50 mm square
// (edge at x = 50), nugget 5 sqrt(1) = 5 mm (common practice), so the
// edge limit is 5 mm; a weld at x = 47 lies 50 - 47 = 3 mm inside the
// edge, one at x = 51 lies 51 - 50 = 1 mm beyond it (still within the
// lateral limit of 0.5 x 5/2 = 1.25 mm that holds the sheets in the
// stack), and one at x = 50 lies on it (plate geometry).
func TestEdgeCloseOffSheet(t *testing.T) {
	m := plates(plate{Part: 1, T: 1, NX: 10, NY: 10, H: 5}, plate{Part: 2, T: 1, Z: 1, NX: 10, NY: 10, H: 5})
	for _, tc := range []struct {
		x    float64
		want string
	}{
		{47, "weld centre 3 mm from a free edge of part %d (minimum 5 mm = 1 nugget diameter(s))"},
		{50, "weld centre 0 mm from a free edge of part %d (minimum 5 mm = 1 nugget diameter(s))"},
		{51, "weld centre off part %d: 1 mm beyond its free edge (it should lie at least 5 mm = 1 nugget diameter(s) inside it)"},
	} {
		c := buildOne1(t, m, joints.Joint{ID: "W", Point: r3.Vec{X: tc.x, Y: 25, Z: 0.5}}, joints.BuildOptions{})
		if got := codes(c); !slices.Equal(got, []string{joints.CodeEdgeClose, joints.CodeEdgeClose}) {
			t.Fatalf("x = %g: findings %v, want two edge-close", tc.x, c.Findings)
		}
		for _, f := range c.Findings {
			if want := fmt.Sprintf(tc.want, f.Parts[0]); f.Message != want {
				t.Errorf("x = %g: %q, want %q", tc.x, f.Message, want)
			}
		}
	}
}
