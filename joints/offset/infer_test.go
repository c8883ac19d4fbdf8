package offset

import (
	"context"
	"slices"
	"testing"

	"gonum.org/v1/gonum/spatial/r3"

	"github.com/joinery-cae/joinery/geom"
	"github.com/joinery-cae/joinery/joints"
	"github.com/joinery-cae/joinery/joints/offset/offsettest"
)

// The planted model: every surface and every flipped element comes out
// exactly, and the one contact that stands off is the one reported.
func TestInferPlanted(t *testing.T) {
	plates := offsettest.Planted()
	m, err := offsettest.Mesh(plates, offsettest.H)
	if err != nil {
		t.Fatal(err)
	}
	res, err := Infer(context.Background(), geom.NewIndex(m), offsettest.PlantedWelds(), joints.BuildOptions{}, nil)
	if err != nil {
		t.Fatal(err)
	}
	for i, p := range plates {
		got := res.Parts[i]
		if got.Part != p.ID || got.Surface != p.Surface {
			t.Errorf("part %d: surface %s (confidence %.2f), want %s", got.Part, got.Surface, got.Confidence, p.Surface)
		}
		if want := offsettest.FlippedIDs(p, offsettest.H); !slices.Equal(got.Flip, want) {
			t.Errorf("part %d: flip %v, want %v", p.ID, got.Flip, want)
		}
		t.Logf("part %d: %s conf %.2f evidence %.0f agreeing %.0f contacts %d disagree %d", got.Part, got.Surface, got.Confidence, got.Evidence, got.Agreeing, got.Contacts, got.Disagreeing)
	}
	var bad [][2]int64
	for _, c := range res.Contacts {
		t.Logf("contact %d-%d opp %v sep %.3f exp %.3f area %.0f sites %d agrees %v", c.A, c.B, c.Opposed, c.Separation, c.Expected, c.Area, c.Sites, c.Agrees)
		if !c.Agrees {
			bad = append(bad, [2]int64{c.A, c.B})
		}
	}
	if !slices.Equal(bad, [][2]int64{{10, 50}}) {
		t.Errorf("disagreeing contacts %v, want [[10 50]]", bad)
	}
	for _, f := range res.Findings {
		t.Logf("%s %s %s", f.Severity, f.Code, f.Message)
	}
}

func infer(t *testing.T, plates []offsettest.Plate, js []joints.Joint) *Result {
	t.Helper()
	m, err := offsettest.Mesh(plates, offsettest.H)
	if err != nil {
		t.Fatal(err)
	}
	res, err := Infer(context.Background(), geom.NewIndex(m), js, joints.BuildOptions{}, nil)
	if err != nil {
		t.Fatal(err)
	}
	return res
}

// Two equal sheets both meshed on their top faces lie exactly as two
// mid-surface meshes do: the evidence cannot tell, mid is preferred, and
// the confidence says so.
func TestInferEqualSheetsPreferMid(t *testing.T) {
	res := infer(t, []offsettest.Plate{
		{ID: 1, Thickness: 1, Surface: geom.SurfaceTop, Mid: 0, X0: 0, X1: 40, Y0: 0, Y1: 40},
		{ID: 2, Thickness: 1, Surface: geom.SurfaceTop, Mid: 1, X0: 0, X1: 40, Y0: 0, Y1: 40},
	}, nil)
	for _, p := range res.Parts {
		if p.Surface != geom.SurfaceMid || p.Confidence != 0 {
			t.Errorf("part %d: %s, confidence %g; want mid with confidence 0", p.Part, p.Surface, p.Confidence)
		}
	}
	if n := countCode(res.Findings, joints.CodeSurfaceUnsure); n != 2 {
		t.Errorf("%d surface-unsure findings, want 2", n)
	}
}

// Two sheets of different thickness on their top faces can be told: a
// shift of both by half of one thickness does not fit the other.
func TestInferTopFacesUnequal(t *testing.T) {
	res := infer(t, []offsettest.Plate{
		{ID: 1, Thickness: 1, Surface: geom.SurfaceTop, Mid: 0, X0: 0, X1: 40, Y0: 0, Y1: 40},
		{ID: 2, Thickness: 2, Surface: geom.SurfaceTop, Mid: 1.5, X0: 0, X1: 40, Y0: 0, Y1: 40},
		{ID: 3, Thickness: 1, Surface: geom.SurfaceMid, Mid: -1, X0: 0, X1: 40, Y0: 0, Y1: 40},
	}, nil)
	want := []geom.Surface{geom.SurfaceTop, geom.SurfaceTop, geom.SurfaceMid}
	for i, p := range res.Parts {
		if p.Surface != want[i] {
			t.Errorf("part %d: %s (confidence %.2f), want %s", p.Part, p.Surface, p.Confidence, want[i])
		}
	}
}

// A part whose every normal is flipped is consistent: no element to
// flip, and its surface is told relative to its normals as they are: a
// mesh on the physical top face with normals pointing down is on the
// face opposite its normals, its bottom.
func TestInferFlippedPart(t *testing.T) {
	res := infer(t, []offsettest.Plate{
		{ID: 1, Thickness: 1, Surface: geom.SurfaceMid, Mid: 0, X0: 0, X1: 40, Y0: 0, Y1: 40},
		{ID: 2, Thickness: 1.5, Surface: geom.SurfaceBottom, FlipAll: true, Mid: -1.25, X0: 0, X1: 40, Y0: 0, Y1: 40},
	}, nil)
	if p := res.Parts[1]; p.Surface != geom.SurfaceBottom || len(p.Flip) != 0 || p.Offset != 0.75 {
		t.Errorf("part 2: %s offset %g flip %v; want bottom, +0.75 mm, none", p.Surface, p.Offset, p.Flip)
	}
	if c := res.Contacts[0]; !c.Opposed || !c.Agrees {
		t.Errorf("contact %+v: want opposed normals, agreeing", c)
	}
}

// A joint site is evidence beside the overlap around it: it joins the
// overlap's contact and adds its weight.
func TestInferJointSites(t *testing.T) {
	plates := []offsettest.Plate{
		{ID: 1, Thickness: 1, Surface: geom.SurfaceMid, Mid: 0, X0: 0, X1: 40, Y0: 0, Y1: 40},
		{ID: 2, Thickness: 2, Surface: geom.SurfaceTop, Mid: 1.5, X0: 0, X1: 40, Y0: 0, Y1: 40},
	}
	res := infer(t, plates, []joints.Joint{{ID: "S1", Kind: joints.Spot, Point: r3.Vec{X: 12.5, Y: 12.5, Z: 1}}})
	c := res.Contacts[0]
	if c.Sites != 1 || c.Weight != c.Area+JointSiteWeight {
		t.Errorf("contact %+v: want one joint site", c)
	}
	if res.Parts[1].Surface != geom.SurfaceTop {
		t.Errorf("part 2: %s, want top", res.Parts[1].Surface)
	}
}

func countCode(fs []joints.Finding, code string) int {
	n := 0
	for _, f := range fs {
		if f.Code == code {
			n++
		}
	}
	return n
}
