package spot

import (
	"context"
	"math"
	"strings"
	"testing"

	"gonum.org/v1/gonum/spatial/r3"

	"github.com/joinery-cae/joinery/geom"
	"github.com/joinery-cae/joinery/joints"
)

// New ids must stay positive and above the mesh ids whatever the mesh
// ids are (node ids may be any positive int64).
func TestNewIDsDoNotOverflow(t *testing.T) {
	for _, maxID := range []int64{9_000_000_000_000_000_000, math.MaxInt64 - 1} {
		if got := joints.DefaultIDStart(maxID); got <= maxID {
			t.Errorf("joints.DefaultIDStart(%d) = %d: not above the mesh ids", maxID, got)
		}
	}
	m := plates(plate{Part: 1, T: 1, NX: 4, NY: 4, H: 5}, plate{Part: 2, T: 1, Z: 1, NX: 4, NY: 4, H: 5})
	res, err := buildAll(context.Background(), geom.NewIndex(m), []joints.Joint{{ID: "1", Point: r3.Vec{X: 10, Y: 10, Z: 0.5}}},
		joints.BuildOptions{IDStart: math.MaxInt64}, nil)
	if err != nil {
		return // refusing an id range that cannot hold the new ids is fine
	}
	for _, c := range res.Connectors {
		for _, id := range c.EndIDs {
			if id < 0 {
				t.Errorf("negative end node id %d", id)
			}
		}
		for _, l := range c.Links {
			if l.ID <= 0 {
				t.Errorf("negative link id %d", l.ID)
			}
		}
	}
}

// The default search distance reaches every sheet of a four-sheet stack
// of the thickest parts from a point on an outer sheet, even with every
// gap 0.1 mm off contact (inside the default tolerance, 0.375 mm here).
func TestDefaultSearchReachesFourSheets(t *testing.T) {
	m := plates(
		plate{Part: 1, T: 1.5, NX: 10, NY: 10, H: 5},
		plate{Part: 2, T: 1.5, Z: 1.6, NX: 10, NY: 10, H: 5},
		plate{Part: 3, T: 1.5, Z: 3.2, NX: 10, NY: 10, H: 5},
		plate{Part: 4, T: 1.5, Z: 4.8, NX: 10, NY: 10, H: 5},
	)
	c := buildOne1(t, m, joints.Joint{ID: "1", Point: r3.Vec{X: 22, Y: 25, Z: 0}}, joints.BuildOptions{})
	if n := len(c.Stack.Sheets); n != 4 && c.Status == joints.Built {
		t.Errorf("stack %v, status %v with no finding: part 4 (0.1 mm off contact) silently left out", c.Stack.Parts(), c.Status)
	}
}

// A patch end ties at most joints.MaxPatchNodes nodes, the nearest ones,
// and says so (issue: a 1000 mm nugget in patch mode wrote a 200 MB
// connectors.json). The weights still sum to 1 and reproduce the point.
func TestPatchCapped(t *testing.T) {
	// 1 mm quads: a 50 mm nugget (joints.MaxNugget) covers about
	// π·25² ≈ 1960 nodes of each sheet.
	m := plates(plate{Part: 1, T: 1, NX: 60, NY: 60, H: 1}, plate{Part: 2, T: 1, Z: 1, NX: 60, NY: 60, H: 1})
	p := r3.Vec{X: 30.3, Y: 29.6, Z: 0.5}
	c := buildOne1(t, m, joints.Joint{ID: "W1", Point: p, Diameter: joints.MaxNugget}, joints.BuildOptions{Attach: joints.Patch})
	if len(c.Ends) != 2 {
		t.Fatalf("%d ends; findings %v", len(c.Ends), codes(c))
	}
	capped := 0
	for _, f := range c.Findings {
		if f.Code == joints.CodePatchCapped {
			capped++
		}
	}
	if capped != 2 {
		t.Errorf("%d patch-capped findings, want one per sheet: %v", capped, codes(c))
	}
	for i, e := range c.Ends {
		if len(e.Nodes) != joints.MaxPatchNodes {
			t.Errorf("end %d ties %d nodes, want %d", i, len(e.Nodes), joints.MaxPatchNodes)
		}
		var sum float64
		var at r3.Vec
		far := 0.0
		for k, n := range e.Nodes {
			sum += e.Weights[k]
			at = r3.Add(at, r3.Scale(e.Weights[k], m.Coords[n]))
			d := m.Coords[n]
			far = math.Max(far, math.Hypot(d.X-p.X, d.Y-p.Y))
		}
		if math.Abs(sum-1) > 1e-9 || math.Abs(at.X-p.X) > 1e-9 || math.Abs(at.Y-p.Y) > 1e-9 {
			t.Errorf("end %d: weights sum to %g and give (%g, %g), want 1 and (%g, %g)", i, sum, at.X, at.Y, p.X, p.Y)
		}
		// The 100 nearest nodes of a 1 mm grid lie within about
		// sqrt(100/π) ≈ 5.6 mm of the point.
		if far > 7 {
			t.Errorf("end %d ties a node %g mm away: not the nearest", i, far)
		}
	}
}

// A weld found its sheets by itself is held to the same lateral limit as
// one that lists them: LateralFactor (0.5, DefaultLateralFactor) radii of
// the nugget the weld is built with, the rule's (5*sqrt(t), common
// practice) for the stack's governing thickness (AWS D8.1M: the thinner
// of two sheets, the second thickest of three). The sheets end at x = 0;
// a weld at x = -d lies d mm off each. Three sheets 1.0, 1.5 and 1.2 mm:
// governing 1.2 mm, limit 0.25*5*sqrt(1.2) = 1.369 mm. Two sheets 1.0
// and 1.5 mm: governing 1.0 mm, limit 1.25 mm. Before, an automatic stack
// took the limit of the sheet whose normal gave the axis (1.531 mm for
// the 1.5 mm sheet), so welds at 1.3 and 1.5 mm were built unless listed.
func TestAutomaticStackHeldToGoverningNugget(t *testing.T) {
	three := plates(
		plate{Part: 1, T: 1.0, NX: 10, NY: 10, H: 5},
		plate{Part: 2, T: 1.5, Z: 1.25, NX: 10, NY: 10, H: 5},
		plate{Part: 3, T: 1.2, Z: 2.6, NX: 10, NY: 10, H: 5},
	)
	two := plates(
		plate{Part: 1, T: 1.0, NX: 10, NY: 10, H: 5},
		plate{Part: 2, T: 1.5, Z: 1.25, NX: 10, NY: 10, H: 5},
	)
	cases := []struct {
		name  string
		m     *geom.Mesh
		parts []int64
		off   float64 // mm beyond the sheets' edge
		built bool
	}{
		{"three, 1.0 mm", three, []int64{1, 2, 3}, 1.0, true},
		{"three, 1.3 mm", three, []int64{1, 2, 3}, 1.3, true},
		{"three, 1.36 mm", three, []int64{1, 2, 3}, 1.36, true},
		{"three, 1.38 mm", three, []int64{1, 2, 3}, 1.38, false},
		{"three, 1.5 mm", three, []int64{1, 2, 3}, 1.5, false},
		{"two, 1.2 mm", two, []int64{1, 2}, 1.2, true},
		{"two, 1.3 mm", two, []int64{1, 2}, 1.3, false},
		{"two, 1.5 mm", two, []int64{1, 2}, 1.5, false},
	}
	for _, tc := range cases {
		for _, listed := range []bool{false, true} {
			j := joints.Joint{ID: "1", Point: r3.Vec{X: -tc.off, Y: 22.5, Z: 1.3}}
			if listed {
				j.Parts = tc.parts
			}
			c := buildOne1(t, tc.m, j, joints.BuildOptions{})
			// Built or flagged (the weld is beyond the edges: edge-close).
			if got := c.Status != joints.NotBuilt; got != tc.built {
				t.Errorf("%s, parts listed %v: status %v %v, want built or flagged %v", tc.name, listed, c.Status, codes(c), tc.built)
			}
			if !tc.built && !listed {
				// The message gives one limit, the stack's, for every sheet.
				want := "limit 1.369 mm"
				if len(tc.parts) == 2 {
					want = "limit 1.25 mm"
				}
				seen := 0
				for _, f := range c.Findings {
					if f.Code == joints.CodeNoSheet {
						seen++
						if strings.Count(f.Message, "limit ") != strings.Count(f.Message, want) {
							t.Errorf("%s: %s: want every %q", tc.name, f.Message, want)
						}
					}
				}
				if seen != 1 {
					t.Errorf("%s: findings %v, want one no-sheet", tc.name, codes(c))
				}
			}
		}
	}
}
