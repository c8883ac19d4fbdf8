package offset

import (
	"context"
	"fmt"
	"reflect"
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

// plantedVariant is the planted model changed in a way that must not
// change the answer: its plates (by index into offsettest.Planted) with
// ids, order, and possibly mirrored through z = 0.
type plantedVariant struct {
	name   string
	id     func(int64) int64 // new id of a plate
	order  []int             // plate records in this order (indices into Planted)
	mirror bool              // z -> -z: the sheet above becomes the one below, top faces bottom ones
}

// plantedAnswer is what one plate of the planted model got, by plate.
type plantedAnswer struct {
	surface               geom.Surface
	confidence            float64
	evidence, agreeing    float64
	contacts, disagreeing int
	flipped               bool // the flip list is the planted one
	disagreeingWith       []int
}

// TestInferIndependentOfIDsAndOrder: the planted model (one part meshed
// on its top face, one on its bottom face, one with half its normals
// flipped, one contact that disagrees) gives the same assignment,
// confidences, evidence, disagreeing contacts and flipped elements when
// its parts are renumbered so that their id order is reversed, when
// their records come in reverse order, both, and when it is mirrored
// through z = 0 (top and bottom faces swap, the sheet above each one
// becomes the one below). Each pair used to be sampled from its part of
// lower index and framed on its part of lower id, so the side a contact
// was measured from followed the numbering.
//
// So that the side matters, 50 and 60 are moved 3 mm along x (63 to 103)
// and 50 is meshed finer (4 mm): its stand-off from 10, 17 mm by 20,
// then holds 20 of 50's elements (320 mm²) but 12 of 10's (300 mm²).
func TestInferIndependentOfIDsAndOrder(t *testing.T) {
	base := offsettest.Planted()
	for i := range base {
		if base[i].ID == 50 || base[i].ID == 60 {
			base[i].X0, base[i].X1 = 63, 103
		}
		if base[i].ID == 50 {
			base[i].H = 4
		}
	}
	n := len(base)
	fwd, rev := make([]int, n), make([]int, n)
	for i := range n {
		fwd[i], rev[i] = i, n-1-i
	}
	same := func(id int64) int64 { return id }
	flip := func(id int64) int64 { return 70 - id } // 10..60 -> 60..10
	variants := []plantedVariant{
		{"as planted", same, fwd, false},
		{"records reversed", same, rev, false},
		{"ids reversed", flip, fwd, false},
		{"ids and records reversed", flip, rev, false},
		{"mirrored", same, fwd, true},
		{"mirrored, ids reversed", flip, rev, true},
	}
	var want []plantedAnswer
	for _, v := range variants {
		plates := make([]offsettest.Plate, 0, n)
		byID := map[int64]int{}
		for _, i := range v.order {
			p := base[i]
			p.ID = v.id(p.ID)
			if v.mirror {
				p.Mid = -p.Mid
				switch p.Surface {
				case geom.SurfaceTop:
					p.Surface = geom.SurfaceBottom
				case geom.SurfaceBottom:
					p.Surface = geom.SurfaceTop
				}
			}
			byID[p.ID] = i
			plates = append(plates, p)
		}
		welds := offsettest.PlantedWelds()
		if v.mirror {
			for k := range welds {
				welds[k].Point.Z = -welds[k].Point.Z
			}
		}
		res := infer(t, plates, welds)
		got := make([]plantedAnswer, n)
		for _, ps := range res.Parts {
			i := byID[ps.Part]
			var p offsettest.Plate
			for _, q := range plates {
				if q.ID == ps.Part {
					p = q
				}
			}
			if ps.Surface != p.Surface {
				t.Errorf("%s: part %d (planted %d): %s, want %s", v.name, ps.Part, base[i].ID, ps.Surface, p.Surface)
			}
			got[i] = plantedAnswer{surface: ps.Surface, confidence: ps.Confidence, evidence: ps.Evidence, agreeing: ps.Agreeing,
				contacts: ps.Contacts, disagreeing: ps.Disagreeing, flipped: slices.Equal(ps.Flip, offsettest.FlippedIDs(p, offsettest.H))}
			if v.mirror {
				// Surfaces are compared as planted: top and bottom swap.
				got[i].surface = base[i].Surface
			}
		}
		for _, c := range res.Contacts {
			if !c.Agrees {
				a, b := byID[c.A], byID[c.B]
				got[a].disagreeingWith = append(got[a].disagreeingWith, b)
				got[b].disagreeingWith = append(got[b].disagreeingWith, a)
			}
		}
		for i := range got {
			slices.Sort(got[i].disagreeingWith)
			if !got[i].flipped {
				t.Errorf("%s: planted part %d: flip list is not the planted one", v.name, base[i].ID)
			}
		}
		if want == nil {
			want = got
			if w := want[0].disagreeingWith; !slices.Equal(w, []int{4}) {
				t.Errorf("%s: planted part 10 disagrees with plates %v, want [4] (part 50)", v.name, w)
			}
			continue
		}
		for i := range got {
			if !reflect.DeepEqual(got[i], want[i]) {
				t.Errorf("%s: planted part %d: %+v, want %+v (as planted)", v.name, base[i].ID, got[i], want[i])
			}
		}
	}
}

// Two sheets drawn on their mating faces, whose meshes coincide (A, 1 mm,
// meshed on its top face at z = 0; B, 1.2 mm, on its bottom face at z =
// 0, lying on A), and a third under A (C, 0.8 mm, mid-surface at z =
// -1.4: in contact, (t/2 of C) + (t of A) below A's mesh; hand
// calculation). Seen from A's elements, B lies on one side or the other
// and hides neither: A's contact with C is measured whichever part
// samples it. B, seen at C's distance through A, makes a contact with C
// that no surfaces explain (a sheet beyond a sheet, which C's elements
// cannot tell from its neighbour, whose mesh coincides): info. Whatever
// the ids and mesh sizes (which decide the side each pair is sampled
// from), the surfaces are the planted ones; when B hid C from A, with
// C's mesh the finest they came out mid, mid, bottom. With eight welds
// through the stack, every site pairs A with B, whose meshes coincide
// there, and neither with C (either may be the one C touches): the
// contact that disagrees has no site, so it stays info (the sites went
// to B and C, by the order a sort gave the coinciding sheets, and made
// it a warning).
func TestInferCoincidingMeshes(t *testing.T) {
	var welds []joints.Joint
	for k := range 8 {
		welds = append(welds, joints.Joint{ID: fmt.Sprint(k), Kind: joints.Spot, Point: r3.Vec{X: 7.3 + 3*float64(k), Y: 21.1, Z: -0.5}})
	}
	for _, js := range [][]joints.Joint{nil, welds} {
		for _, ids := range [][3]int64{{1, 2, 3}, {3, 2, 1}, {2, 3, 1}} {
			for _, h := range [][3]float64{{5, 5, 5}, {4, 5, 2.5}, {2.5, 4, 5}, {5, 4, 2.5}} {
				plates := []offsettest.Plate{
					{ID: ids[0], H: h[0], Thickness: 1, Surface: geom.SurfaceTop, Mid: -0.5, X0: 0, X1: 40, Y0: 0, Y1: 40},
					{ID: ids[1], H: h[1], Thickness: 1.2, Surface: geom.SurfaceBottom, Mid: 0.6, X0: 0, X1: 40, Y0: 0, Y1: 40},
					{ID: ids[2], H: h[2], Thickness: 0.8, Surface: geom.SurfaceMid, Mid: -1.4, X0: 0, X1: 40, Y0: 0, Y1: 40},
				}
				res := infer(t, plates, js)
				for _, ps := range res.Parts {
					for _, p := range plates {
						if p.ID == ps.Part && ps.Surface != p.Surface {
							t.Errorf("ids %v sizes %v: part %d %s, want %s", ids, h, ps.Part, ps.Surface, p.Surface)
						}
					}
				}
				pair := func(a, b int64) [2]int64 { return [2]int64{min(a, b), max(a, b)} }
				agree := map[[2]int64]bool{}
				sites := map[[2]int64]int{}
				for _, c := range res.Contacts {
					agree[pair(c.A, c.B)] = c.Agrees
					sites[pair(c.A, c.B)] += c.Sites
				}
				want := map[[2]int64]bool{pair(ids[0], ids[1]): true, pair(ids[0], ids[2]): true, pair(ids[1], ids[2]): false}
				if !reflect.DeepEqual(agree, want) {
					t.Errorf("ids %v sizes %v welds %d: contacts (agree) %v, want %v", ids, h, len(js), agree, want)
				}
				if wantSites := map[[2]int64]int{pair(ids[0], ids[1]): len(js), pair(ids[0], ids[2]): 0, pair(ids[1], ids[2]): 0}; !reflect.DeepEqual(sites, wantSites) {
					t.Errorf("ids %v sizes %v welds %d: joint sites by pair %v, want %v", ids, h, len(js), sites, wantSites)
				}
			}
		}
	}
}

// Two equal sheets (1 mm), the lower meshed on its mid-surface at z = 0,
// the upper on its bottom face at z = 0.5 (mid-surface at 1: in
// contact). The separation, 0.5 mm, is explained as well by the lower
// meshed on its top face and the upper on its mid-surface (-0.5 + 0 + 1
// against 0 - 0.5 + 1; hand calculation): both readings have one part on
// mid, so the table decides where it gives one of them, and otherwise
// the same reading is taken whatever the ids; each part's confidence is
// 0 and both are reported unsure.
func TestInferEqualSheetsFayingFace(t *testing.T) {
	var first []geom.Surface // by plate, the table saying mid
	for _, ids := range [][2]int64{{1, 2}, {2, 1}} {
		for _, decl := range [][2]geom.Surface{{geom.SurfaceMid, geom.SurfaceMid}, {geom.SurfaceMid, geom.SurfaceBottom}, {geom.SurfaceTop, geom.SurfaceMid}} {
			plates := []offsettest.Plate{
				{ID: ids[0], Thickness: 1, Surface: geom.SurfaceMid, Mid: 0, X0: 0, X1: 40, Y0: 0, Y1: 40},
				{ID: ids[1], Thickness: 1, Surface: geom.SurfaceBottom, Mid: 1, X0: 0, X1: 40, Y0: 0, Y1: 40},
			}
			m, err := offsettest.Mesh(plates, offsettest.H)
			if err != nil {
				t.Fatal(err)
			}
			m.Parts[0].Surface, m.Parts[1].Surface = decl[0], decl[1]
			res, err := Infer(context.Background(), geom.NewIndex(m), nil, joints.BuildOptions{}, nil)
			if err != nil {
				t.Fatal(err)
			}
			got := make([]geom.Surface, 2)
			for _, ps := range res.Parts {
				i := slices.Index(ids[:], ps.Part)
				got[i] = ps.Surface
				if ps.Confidence != 0 {
					t.Errorf("ids %v table %v: part %d confidence %g, want 0", ids, decl, ps.Part, ps.Confidence)
				}
			}
			if n := countCode(res.Findings, joints.CodeSurfaceUnsure); n != 2 {
				t.Errorf("ids %v table %v: %d surface-unsure, want 2", ids, decl, n)
			}
			if c := res.Contacts; len(c) != 1 || !c[0].Agrees {
				t.Errorf("ids %v table %v: contacts %+v, want one, agreeing", ids, decl, c)
			}
			switch {
			case decl[1] == geom.SurfaceBottom || decl[0] == geom.SurfaceTop:
				if !slices.Equal(got, decl[:]) {
					t.Errorf("ids %v table %v: %v, want the table's", ids, decl, got)
				}
			case first == nil:
				first = got
				if !slices.Equal(got, []geom.Surface{geom.SurfaceTop, geom.SurfaceMid}) && !slices.Equal(got, []geom.Surface{geom.SurfaceMid, geom.SurfaceBottom}) {
					t.Errorf("ids %v table %v: %v, want one of the two readings", ids, decl, got)
				}
			case !slices.Equal(got, first):
				t.Errorf("ids %v table %v: %v, want %v as with the other ids", ids, decl, got, first)
			}
		}
	}
}
