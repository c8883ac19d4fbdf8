package spot

import (
	"fmt"
	"math"
	"slices"
	"strings"
	"testing"

	"gonum.org/v1/gonum/spatial/r3"

	"github.com/joinery-cae/joinery/geom"
	"github.com/joinery-cae/joinery/geom/geomtest"
	"github.com/joinery-cae/joinery/joints"
)

// gapModel is a stack whose gap under test lies dev mm off contact
// square to the sheets, by construction: the mesh (in mm), the weld
// point, the stack expected along the axis, and the closed-form gap of
// each link along the axis (mid_gap). Link vary is the one dev moves;
// the others lie at contact.
type gapModel struct {
	m     *geom.Mesh
	p     r3.Vec
	stack []int64
	along []float64
	vary  int
	tol   float64 // the allowance of link vary, 0.25 (t1+t2)/2 (joints.DefaultGapAllowanceFactor)
}

// wedge: part 1, 1 mm, flat on z = 0 (faying face z = 0.5); part 2,
// 1.5 mm, its faying face through the line y = 25, z = 0.5 (along x) at
// deg degrees to part 1's. Contact (1 + 1.5)/2 = 1.25 mm, allowance
// 0.3125 mm. The axis is square to one sheet's face, a line s from the
// faces' meeting line: the faces lie s tan(theta) apart along it, and
// midway between them they lie s tan(theta)/2 and s tan(theta) cos(theta)/2
// away square to each (plane geometry), so the gap square to the sheets
// is contact + s tan(theta) (1 + cos(theta))/2; s is chosen for dev.
// Along the axis the mid-surfaces lie t_axis/2 + s tan(theta) +
// t_other/(2 cos(theta)) apart (a plane d away lies d / cos(theta) along a
// line at theta to its normal).
//
// at says where the weld point lies: "mid1" on part 1's mid-surface
// (axis: part 1's normal), "face1" on part 1's faying face, "below"
// 1 mm below part 1 (outside the stack), "above2" 1 mm above part 2
// (outside the stack on the other side: the axis is part 2's normal and
// s is measured in part 2's face). surf1 and surf2 are the surfaces the
// parts are meshed on (parts table): the meshed surface lies t/2 off
// the mid-surface, the contact separations of the meshes 0, t/2 or t.
func wedge(deg, dev float64, at string, surf1, surf2 geom.Surface) gapModel {
	const t1, t2 = 1.0, 1.5
	th := deg * math.Pi / 180
	s := dev / (math.Tan(th) * (1 + math.Cos(th)) / 2)
	z1 := 0.0 // part 1's meshed surface
	switch surf1 {
	case geom.SurfaceTop:
		z1 = t1 / 2
	case geom.SurfaceBottom:
		z1 = -t1 / 2
	}
	z2 := 0.5 + t2/2 // part 2's meshed surface before tilting
	switch surf2 {
	case geom.SurfaceTop:
		z2 = 0.5 + t2
	case geom.SurfaceBottom:
		z2 = 0.5
	}
	m := plates(plate{Part: 1, T: t1, Z: z1, NX: 10, NY: 10, H: 5, Surface: surf1},
		plate{Part: 2, T: t2, Z: z2, NX: 10, NY: 10, H: 5, Surface: surf2})
	m = tilted(m, 1, deg, 25, 0.5)
	g := gapModel{m: m, stack: []int64{1, 2}, vary: 0, tol: 0.25 * (t1 + t2) / 2}
	sn, cs := math.Sincos(th)
	switch at {
	case "mid1":
		g.p = r3.Vec{X: 22, Y: 25 + s, Z: 0}
	case "face1":
		g.p = r3.Vec{X: 22, Y: 25 + s, Z: t1 / 2}
	case "below":
		g.p = r3.Vec{X: 22, Y: 25 + s, Z: -1}
	case "above2":
		// s along part 2's face from the meeting line, then 1 mm above
		// its top face along its normal (0, -sin, cos).
		h := t2 + 1
		g.p = r3.Vec{X: 22, Y: 25 + s*cs - h*sn, Z: 0.5 + s*sn + h*cs}
		g.along = []float64{t2/2 + s*math.Tan(th) + t1/(2*cs)}
		return g
	}
	g.along = []float64{t1/2 + s*math.Tan(th) + t2/(2*cs)}
	return g
}

// flat: part 1, 1 mm, its mid-surface on z = 0, and part 2, 1.5 mm,
// its mid-surface on z = 1.25 + dev (contact (1 + 1.5)/2 = 1.25 mm),
// each meshed on the surface given (t/2 off the mid-surface), the weld
// 1 mm below part 1's mid-surface.
func flat(dev float64, surf1, surf2 geom.Surface) gapModel {
	m := plates(plate{Part: 1, T: 1, Z: -surf1.MidOffset(1), NX: 10, NY: 10, H: 5, Surface: surf1},
		plate{Part: 2, T: 1.5, Z: 1.25 + dev - surf2.MidOffset(1.5), NX: 10, NY: 10, H: 5, Surface: surf2})
	return gapModel{m: m, p: r3.Vec{X: 22, Y: 27, Z: -1}, stack: []int64{1, 2}, along: []float64{1.25 + dev}, tol: 0.3125}
}

// threeSheets: part 1, 0.8 mm, at deg degrees to parts 2 (1.5 mm, flat
// on z = 0) and 3 (2 mm, flat, parallel to part 2), its faying face
// meeting part 2's on the line y = 25, z = -0.75, where the weld lies
// on part 1's mid-surface: the axis is part 1's normal (the closest
// sheet's; the three make a stack whichever sheet gives the axis), and
// it crosses the faces' meeting line, so parts 1 and 2 are at contact
// (0.8 + 1.5)/2 = 1.15 mm. Parts 2 and 3 lie 1.75 + dev mm apart square
// to themselves (contact (1.5 + 2)/2 = 1.75 mm, allowance 0.4375 mm),
// (1.75 + dev)/cos(theta) along the tilted axis; parts 1 and 2 lie
// 0.4 + 0.75/cos(theta) apart along it (a plane d away lies d/cos(theta)
// along a line at theta to its normal).
func threeSheets(deg, dev float64) gapModel {
	th := deg * math.Pi / 180
	sn, cs := math.Sincos(th)
	m := plates(plate{Part: 1, T: 0.8, Z: -0.75 - 0.4, NX: 10, NY: 10, H: 5},
		plate{Part: 2, T: 1.5, NX: 10, NY: 10, H: 5},
		plate{Part: 3, T: 2, Z: 1.75 + dev, NX: 10, NY: 10, H: 5})
	m = tilted(m, 0, deg, 25, -0.75)
	// The meeting line's point under the weld, less 0.4 mm along part
	// 1's normal (0, -sin, cos).
	p := r3.Vec{X: 22, Y: 25 + 0.4*sn, Z: -0.75 - 0.4*cs}
	return gapModel{m: m, p: p, stack: []int64{1, 2, 3}, vary: 1, tol: 0.4375,
		along: []float64{0.4 + 0.75/cs, (1.75 + dev) / cs}}
}

// facets: two concentric cylindrical sheets of 60 planar quads round
// (cylinder), 1 and 1.5 mm, the weld on the radius through a quad
// centre, where each quad's normal is radial (symmetry) and its plane
// lies r cos(pi/60) from the axis (chord geometry): the meshes' gap there
// is (r2 - r1) cos(pi/60), made contact + dev.
func facets(dev float64) gapModel {
	const r1, n = 50.0, 60
	c := math.Cos(math.Pi / n)
	r2 := r1 + (1.25+dev)/c
	a := 2 * math.Pi * 10.5 / n
	rw := (r1 + r2) / 2 * c
	m, _, err := geom.Merge([]*geom.Mesh{cylinder(1, 1, r1, n, 0, 10, 5), cylinder(2, 1.5, r2, n, 0, 10, 5)}, false)
	if err != nil {
		panic(err)
	}
	if err := m.Index(); err != nil {
		panic(err)
	}
	return gapModel{m: m, p: r3.Vec{X: rw * math.Cos(a), Y: rw * math.Sin(a), Z: 22.5}, stack: []int64{1, 2},
		along: []float64{(r2 - r1) * c}, tol: 0.3125}
}

// curved: two concentric cylindrical sheets of second-order elements
// (typ) whose nodes lie on circles of radius r1 = 50 and r2 = r1 + 1.25
// + dev about the z axis (1 and 1.5 mm thick), 0.12 rad per element. On
// the radius through an element's centre the elements pass through the
// circle with a radial normal (symmetry; a Quad8's centre, -1/4 of the
// corners plus 1/2 of the midside nodes, lies at r: -r cos(a) + r/2
// (2 + 2 cos(a)) = r, a the half angle), so the gap is r2 - r1 exactly.
func curved(typ geom.ElemType, dev float64) gapModel {
	const r1 = 50.0
	r2 := r1 + 1.25 + dev
	sheet := func(part int64, r float64, first int64) *geom.Mesh {
		return geomtest.SecondOrder(geomtest.SecondOrderSpec{
			Type: typ, NX: 8, NY: 8, H: 6, X0: -24, Y0: -24, Part: part, FirstNodeID: first, FirstElemID: first,
			Surface: func(x, y float64) r3.Vec { return r3.Vec{X: r * math.Cos(x/50), Y: r * math.Sin(x/50), Z: y} },
		})
	}
	m, _, err := geom.Merge([]*geom.Mesh{sheet(1, r1, 1), sheet(2, r2, 10001)}, false)
	if err != nil {
		panic(err)
	}
	m.Parts[0].Thickness, m.Parts[1].Thickness = 1, 1.5
	if err := m.Index(); err != nil {
		panic(err)
	}
	a, rw := 3.0/50, (r1+r2)/2 // the centre of the element from x = 0 to 6, y = 0 to 6
	return gapModel{m: m, p: r3.Vec{X: rw * math.Cos(a), Y: rw * math.Sin(a), Z: 3}, stack: []int64{1, 2},
		along: []float64{r2 - r1}, tol: 0.3125}
}

// redraw draws model g as d says: its lengths in d's unit and moved by
// d's shift, then scaled back to mm as the pipeline does on reading
// (geom.Mesh.Scale, joints.ScaleJoints).
func redraw(g gapModel, d drawn) gapModel {
	f := d.unit.MM()
	for i := range g.m.Coords {
		g.m.Coords[i] = r3.Scale(1/f, r3.Add(g.m.Coords[i], d.shift))
	}
	for i := range g.m.Parts {
		g.m.Parts[i].Thickness /= f
	}
	g.m.Scale(f)
	js := []joints.Joint{{Point: r3.Scale(1/f, r3.Add(g.p, d.shift))}}
	joints.ScaleJoints(js, f)
	g.p = js[0].Point
	return g
}

// TestGapSquareToSheets: the gaps between consecutive sheets are judged
// square to the sheets, against contact (t1+t2)/2, whether the sheets
// are parallel or at an angle, the weld point on a mid-surface, a faying
// face or outside the stack, the sheets curved or meshed on an outer
// face, the model in mm, m or inches: gap-open and gap-closed fire just
// outside the allowance (eps = 1e-5 mm, ten times joints.LengthRoundoff)
// and not just inside it nor at it (a value at a limit meets it). Along
// a tilted axis the gaps read up to 1/cos(20 deg) = 1.064 times longer;
// compared as they read, the three-sheet stacks at 19 degrees were
// gap-open at 0.4375 - eps (1.0576 x 2.1875 - 1.75 = 0.563 mm) and the
// wedges at 19 degrees at 0.3125 - eps. Each link records both
// figures: mid_gap the model's closed-form distance along the axis,
// square_gap its contact plus dev.
func TestGapSquareToSheets(t *testing.T) {
	const eps = 1e-5
	mid, top, bot := geom.SurfaceMid, geom.SurfaceTop, geom.SurfaceBottom
	families := []struct {
		name   string
		parts  []int64
		model  func(dev float64) gapModel
		closed bool // a gap-closed side exists (the sheets may penetrate)
		// tie: at contact the weld point lies on both meshes, and either
		// may give the axis (a tie rounding breaks); along either the gap
		// is contact, but mid_gap differs.
		tie bool
	}{
		{"wedge 10deg, on part 1's mid-surface", nil, func(d float64) gapModel { return wedge(10, d, "mid1", mid, mid) }, true, false},
		{"wedge 19deg, on part 1's mid-surface", nil, func(d float64) gapModel { return wedge(19, d, "mid1", mid, mid) }, true, false},
		{"wedge 19deg, listed", []int64{2, 1}, func(d float64) gapModel { return wedge(19, d, "mid1", mid, mid) }, true, false},
		{"wedge 19deg, below the stack", nil, func(d float64) gapModel { return wedge(19, d, "below", mid, mid) }, true, false},
		{"wedge 19deg, above the stack", nil, func(d float64) gapModel { return wedge(19, d, "above2", mid, mid) }, true, false},
		{"wedge 10deg, on the faying face", nil, func(d float64) gapModel { return wedge(10, d, "face1", mid, mid) }, false, false},
		// The meshes meet on the line where the faces do: from below, part
		// 2's mesh is the closer and gives the axis; on part 1's mesh,
		// listed, part 1 gives it (the lower part id where both are 0 away).
		{"wedge 19deg, top/bottom meshes (0 apart at contact)", []int64{1, 2}, func(d float64) gapModel { return wedge(19, d, "face1", top, bot) }, true, true},
		{"wedge 19deg, mid/bottom meshes (t1/2 apart)", nil, func(d float64) gapModel { return wedge(19, d, "mid1", mid, bot) }, true, false},
		{"wedge 19deg, top/mid meshes (t2/2 apart)", nil, func(d float64) gapModel { return wedge(19, d, "below", top, mid) }, true, false},
		{"wedge 10deg, bottom/top meshes (t1 + t2 apart)", nil, func(d float64) gapModel { return wedge(10, d, "below", bot, top) }, true, false},
		{"parallel, mid/mid meshes (t1/2 + t2/2 apart)", nil, func(d float64) gapModel { return flat(d, mid, mid) }, true, false},
		{"parallel, top/bottom meshes (0 apart)", nil, func(d float64) gapModel { return flat(d, top, bot) }, true, false},
		{"parallel, mid/bottom meshes (t1/2 apart)", nil, func(d float64) gapModel { return flat(d, mid, bot) }, true, false},
		{"parallel, top/mid meshes (t2/2 apart)", nil, func(d float64) gapModel { return flat(d, top, mid) }, true, false},
		{"parallel, bottom/top meshes (t1 + t2 apart)", nil, func(d float64) gapModel { return flat(d, bot, top) }, true, false},
		{"three sheets 10deg", nil, func(d float64) gapModel { return threeSheets(10, d) }, true, false},
		{"three sheets 19deg", nil, func(d float64) gapModel { return threeSheets(19, d) }, true, false},
		{"three sheets 19deg, listed", []int64{3, 1, 2}, func(d float64) gapModel { return threeSheets(19, d) }, true, false},
		{"cylinders, planar quads", nil, facets, true, false},
		{"cylinders, Quad8", nil, func(d float64) gapModel { return curved(geom.Quad8, d) }, true, false},
		{"cylinders, Quad9", nil, func(d float64) gapModel { return curved(geom.Quad9, d) }, true, false},
	}
	for _, fam := range families {
		tol := fam.model(0).tol
		sides := []struct {
			name string
			dev  float64
			code string
		}{
			{"contact", 0, ""},
			{"just inside open", tol - eps, ""},
			{"at the allowance, open", tol, ""},
			{"just outside open", tol + eps, joints.CodeGapOpen},
		}
		if fam.closed {
			sides = append(sides, []struct {
				name string
				dev  float64
				code string
			}{
				{"just inside closed", -tol + eps, ""},
				{"at the allowance, closed", -tol, ""},
				{"just outside closed", -tol - eps, joints.CodeGapClosed},
			}...)
		}
		for _, side := range sides {
			for _, d := range drawings {
				name := fmt.Sprintf("%s/%s/%s", fam.name, side.name, d.name)
				g := redraw(fam.model(side.dev), d)
				c := buildOne1(t, g.m, joints.Joint{ID: "G", Point: g.p, Parts: fam.parts}, joints.BuildOptions{})
				if got := c.Stack.Parts(); !slices.Equal(got, g.stack) {
					t.Errorf("%s: stack %v, want %v; findings %v", name, got, g.stack, c.Findings)
					continue
				}
				var want []string
				if side.code != "" {
					want = []string{side.code}
				}
				var got []string
				for _, f := range c.Findings {
					if f.Code == joints.CodeGapOpen || f.Code == joints.CodeGapClosed {
						got = append(got, f.Code)
					}
				}
				if !slices.Equal(got, want) {
					t.Errorf("%s: gap findings %v, want %v: %v", name, got, want, c.Findings)
				}
				for i, l := range c.Links {
					if fam.tie && side.dev == 0 {
						break
					}
					if math.Abs(l.MidGap-g.along[i]) > 1e-9 {
						t.Errorf("%s: link %d mid_gap %.12g, want %.12g along the axis", name, i, l.MidGap, g.along[i])
					}
					// square_gap: contact, plus dev on the link dev moves
					// (the model's construction, square to the sheets).
					want := l.Contact
					if i == g.vary {
						want += side.dev
					}
					if math.Abs(l.SquareGap-want) > 1e-9 {
						t.Errorf("%s: link %d square_gap %.12g, want %.12g", name, i, l.SquareGap, want)
					}
				}
			}
		}
	}
}

// The gap finding states the gap square to the sheets and, where it
// differs at the precision shown, the distance along the weld axis.
// Three sheets at 19 degrees, parts 2 and 3 0.5 mm open (2.25 mm apart,
// 2.25 / cos 19 deg along the axis; plane geometry), allowance 0.4375 mm:
// the weld bridges 0.5 mm of air. Untilted the message names one figure.
func TestGapMessageSquareToSheets(t *testing.T) {
	g := threeSheets(19, 0.5)
	c := buildOne1(t, g.m, joints.Joint{ID: "M", Point: g.p}, joints.BuildOptions{})
	msgs := messages(c, joints.CodeGapOpen)
	want := "parts 2 and 3 do not touch: mid-surfaces 2.25 mm apart square to the sheets (" +
		joints.MM(2.25/math.Cos(19*math.Pi/180)) + " mm along the weld axis), contact at 1.75 mm (allowance 0.438 mm); the weld would bridge 0.5 mm of air"
	if len(msgs) != 1 || !strings.Contains(msgs[0], want) {
		t.Errorf("messages %q, want one holding %q", msgs, want)
	}
	g = threeSheets(0, 0.5)
	c = buildOne1(t, g.m, joints.Joint{ID: "M", Point: g.p}, joints.BuildOptions{})
	msgs = messages(c, joints.CodeGapOpen)
	want = "mid-surfaces 2.25 mm apart, contact at 1.75 mm"
	if len(msgs) != 1 || !strings.Contains(msgs[0], want) {
		t.Errorf("untilted: messages %q, want one holding %q", msgs, want)
	}
}

// A stack is split where a gap square to the sheets exceeds contact by
// more than the two sheets' mean thickness, (t2+t3)/2 = 1.75 mm for
// parts 2 and 3 of threeSheets: 0.01 mm inside that, the three are one
// stack with the gap open; 0.01 mm beyond it, part 3 is apart. At 10
// degrees the gap along the axis reads (1.75 + 1.74)/cos(10 deg) =
// 3.544 mm, 1.794 mm off contact, which split the stack before.
func TestSplitSquareToSheets(t *testing.T) {
	for _, c := range []struct {
		dev   float64
		stack []int64
		code  string
	}{
		{1.75 - 0.01, []int64{1, 2, 3}, joints.CodeGapOpen},
		{1.75 + 0.01, []int64{1, 2}, joints.CodeSheetApart},
	} {
		g := threeSheets(10, c.dev)
		con := buildOne1(t, g.m, joints.Joint{ID: "S", Point: g.p}, joints.BuildOptions{})
		if got := con.Stack.Parts(); !slices.Equal(got, c.stack) || !slices.Equal(codes(con), []string{c.code}) {
			t.Errorf("dev %g: stack %v findings %v, want %v with %s", c.dev, got, con.Findings, c.stack, c.code)
		}
	}
}

// TestSplitAtLimitWhateverHeight checks that a gap exactly at the split
// limit, contact plus the sheets' mean thickness, meets it (joined, with
// gap-open) whatever the height of the weld point along the axis. Three
// 0.7 mm sheets at z = 0, 0.7 and 2.1: the upper gap is 1.4 mm, contact
// 0.7 mm plus 0.7 mm (hand calculation). In float64, 2.1 - z and 0.7 - z
// for a weld at z = 0.021 differ by 1.4000000000000004, which split part
// 3 off as apart while a weld at z = 0.35 kept it.
func TestSplitAtLimitWhateverHeight(t *testing.T) {
	m := plates(plate{Part: 1, T: 0.7, NX: 10, NY: 10, H: 5}, plate{Part: 2, T: 0.7, Z: 0.7, NX: 10, NY: 10, H: 5},
		plate{Part: 3, T: 0.7, Z: 2.1, NX: 10, NY: 10, H: 5})
	for _, z := range []float64{0.021, 0.0105, 0.35, 0.5, 0.69} {
		c := buildOne1(t, m, joints.Joint{ID: "S", Point: r3.Vec{X: 25, Y: 25, Z: z}}, joints.BuildOptions{})
		if got := c.Stack.Parts(); !slices.Equal(got, []int64{1, 2, 3}) || !slices.Equal(codes(c), []string{joints.CodeGapOpen}) {
			t.Errorf("weld at z = %g: stack %v findings %v, want parts 1, 2, 3 with gap-open", z, got, c.Findings)
		}
	}
}
