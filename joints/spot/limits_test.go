package spot

import (
	"context"
	"math"
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
