package bolt

import (
	"math"
	"slices"
	"strings"
	"testing"

	"gonum.org/v1/gonum/spatial/r3"

	"github.com/joinery-cae/joinery/joints"
	"github.com/joinery-cae/joinery/joints/stiffness"
)

// TestSizes checks bolts against the published sizes and their holes as
// meshed. Table values: plain washers ISO 7089 (outer diameter M6 12,
// M8 16, M10 20, M12 24 mm) and clearance holes ISO 273 (fine / medium /
// coarse, M6 6.4/6.6/7.0, M8 8.4/9.0/10.0, M10 10.5/11.0/12.0, M12
// 13.0/13.5/14.5 mm), as in REFERENCES.md.
func TestSizes(t *testing.T) {
	for _, c := range []struct {
		name                  string
		d, washer, hole, mesh float64 // mesh: hole meshed, 0 none
		want                  []string
		state                 joints.Status
	}{
		{"M8 medium", 8, 16, 9.0, 9.0, nil, joints.Built},                                          // ISO 7089 16, ISO 273 medium 9.0
		{"M8 coarse", 8, 16, 10.0, 10.0, nil, joints.Built},                                        // ISO 273 coarse 10.0: allowed
		{"M8 beyond coarse", 8, 16, 10.5, 10.5, []string{joints.CodeHoleClass}, joints.Flagged},    // > 10.0
		{"M8 small washer", 8, 15, 9.0, 9.0, []string{joints.CodeWasherSmall}, joints.Flagged},     // < 16
		{"M6 fine", 6, 12, 6.4, 6.4, nil, joints.Built},                                            // ISO 7089 12, ISO 273 fine 6.4
		{"M6 beyond coarse", 6, 12, 7.1, 7.1, []string{joints.CodeHoleClass}, joints.Flagged},      // > 7.0
		{"M12 coarse", 12, 24, 14.5, 14.5, nil, joints.Built},                                      // ISO 7089 24, ISO 273 coarse 14.5
		{"M12 small washer", 12, 23, 13.5, 13.5, []string{joints.CodeWasherSmall}, joints.Flagged}, // < 24
		{"M10 no hole meshed", 10, 20, 11, 0, nil, joints.Built},
		{"M10 measured off", 10, 20, 11, 12, []string{joints.CodeHoleSize}, joints.Flagged},     // 1 mm > 0.25 mm
		{"M10 within tolerance", 10, 20, 11, 11.2, nil, joints.Built},                           // 0.2 mm <= 0.25 mm
		{"M10 hole too small", 10, 20, 11, 9.5, []string{joints.CodeHoleSize}, joints.NotBuilt}, // the shank does not pass
		{"M10 washer not covering", 10, 20, 11, 21, []string{joints.CodeHoleSize, joints.CodeWasherHole}, joints.NotBuilt},
		{"M14 not tabled", 14, 20, 30, 15, []string{joints.CodeHoleSize}, joints.Flagged}, // no table row: only the mesh is checked
		// Sizes given in inches to 6 or 4 significant digits (25.4 mm to
		// the inch, exactly) are the tabled sizes they stand for
		// (joints.SizeRoundoff): an M10 at 0.393701 in (10.0000054 mm)
		// in an ISO 273 coarse hole of 0.472441 in (12.0000014 mm) with
		// an ISO 7089 washer of 0.787402 in; an M8 at 0.3150 in
		// (8.001 mm) with a 16 mm washer at 0.629921 in (15.9999934 mm).
		{"M10 in inches, coarse hole", 0.393701 * 25.4, 0.787402 * 25.4, 0.472441 * 25.4, 12, nil, joints.Built},
		{"M8 in inches, ISO 7089 washer", 0.3150 * 25.4, 0.629921 * 25.4, 0.3543 * 25.4, 9, nil, joints.Built},
		// The same M8 is recognised: beyond coarse (0.4 in, 10.16 mm)
		// and with a smaller washer (0.62 in, 15.748 mm) it is reported.
		{"M8 in inches, beyond coarse", 0.3150 * 25.4, 0.629921 * 25.4, 0.4 * 25.4, 10.16, []string{joints.CodeHoleClass}, joints.Flagged},
		{"M8 in inches, small washer", 0.314961 * 25.4, 0.62 * 25.4, 0.3543 * 25.4, 9, []string{joints.CodeWasherSmall}, joints.Flagged},
	} {
		t.Run(c.name, func(t *testing.T) {
			var ss []sheet
			if c.mesh > 0 {
				ss = holed(c.mesh)
			} else {
				ss = []sheet{{Part: 1, T: 1.5, Z: 0, X0: -40, H: 5, N: 16}, {Part: 2, T: 3, Z: 2.25, X0: -40, H: 5, N: 16}}
			}
			m := mesh(t, rotation{}, ss...)
			j := joints.Joint{ID: "B1", Kind: joints.Bolt, Point: r3.Vec{Z: 1.125}, Diameter: c.d, Washer: c.washer, Hole: c.hole}
			b := build(t, m, joints.BuildOptions{}, j)[0]
			got := codes(b.Findings)
			var uniq []string
			for _, g := range got {
				if !slices.Contains(uniq, g) {
					uniq = append(uniq, g)
				}
			}
			if !slices.Equal(uniq, c.want) || b.Status != c.state {
				t.Errorf("findings %v, state %s; want %v, %s", got, b.Status, c.want, c.state)
			}
			for _, f := range b.Findings {
				if f.Code == joints.CodeHoleClass && !strings.Contains(f.Message, "ISO 273") ||
					f.Code == joints.CodeWasherSmall && !strings.Contains(f.Message, "ISO 7089") {
					t.Errorf("%s does not name its standard: %s", f.Code, f.Message)
				}
			}
		})
	}
}

// TestSheetsFound covers the stacks a bolt finds: gaps checked as for
// spot welds, listed parts not crossed, a single sheet without ground,
// and the offset link form.
func TestSheetsFound(t *testing.T) {
	t.Run("gap-open", func(t *testing.T) {
		ss := holed(11)
		ss[1].Z = 3.25 // 1 mm off contact (2.25), allowance 0.5625
		m := mesh(t, rotation{}, ss...)
		b := build(t, m, joints.BuildOptions{}, m10("B1", r3.Vec{Z: 1.6}))[0]
		if got := codes(b.Findings); !slices.Equal(got, []string{joints.CodeGapOpen}) {
			t.Errorf("findings %v, want gap-open", got)
		}
	})
	t.Run("thin-sheets", func(t *testing.T) {
		// 0.8 and 1 mm sheets: the default reach, 4.5 x 1 mm, is less
		// than the 5.5 mm from the axis to the edge of an M10's 11 mm
		// hole (ISO 273 medium), yet the bolt finds its axis and both
		// sheets: the axis search reaches the washer's diameter across.
		ss := holed(11)
		ss[0].T, ss[1].T, ss[1].Z = 0.8, 1, 0.9
		m := mesh(t, rotation{}, ss...)
		b := build(t, m, joints.BuildOptions{}, m10("B1", r3.Vec{Z: 0.45}))[0]
		if b.Status != joints.Built || len(b.Stack.Sheets) != 2 {
			t.Errorf("state %s, findings %v, %d sheets; want built on 2", b.Status, codes(b.Findings), len(b.Stack.Sheets))
		}
	})
	t.Run("no-sheet", func(t *testing.T) {
		// 40 mm above the sheets: nothing within the search radius,
		// hypot(reach 4.5 x 3 = 13.5, washer 20) = 24.13 mm; the message
		// says what was searched, not that the point is off the stack
		// in general.
		m := mesh(t, rotation{}, holed(11)...)
		j := m10("B1", r3.Vec{Z: 40})
		j.Parts = []int64{1, 2}
		b := build(t, m, joints.BuildOptions{}, j)[0]
		if len(b.Findings) != 1 || b.Findings[0].Code != joints.CodeNoSheet || b.Status != joints.NotBuilt ||
			!strings.Contains(b.Findings[0].Message, "within "+joints.MM(math.Hypot(13.5, 20))+" mm of the bolt's point") ||
			!strings.Contains(b.Findings[0].Message, "listed parts (1, 2)") {
			t.Errorf("state %s, findings %v", b.Status, b.Findings)
		}
	})
	t.Run("listed-missing", func(t *testing.T) {
		m := mesh(t, rotation{}, holed(11)...)
		j := m10("B1", r3.Vec{Z: 1.125})
		j.Parts = []int64{1, 7}
		b := build(t, m, joints.BuildOptions{}, j)[0]
		if got := codes(b.Findings); !slices.Contains(got, joints.CodePartNotFound) || b.Status != joints.NotBuilt {
			t.Errorf("findings %v, state %s; want part-not-found, not-built", got, b.Status)
		}
	})
	t.Run("single-sheet", func(t *testing.T) {
		m := mesh(t, rotation{}, holed(11)[:1]...)
		b := build(t, m, joints.BuildOptions{}, m10("B1", r3.Vec{Z: 0.5}))[0]
		if got := codes(b.Findings); !slices.Equal(got, []string{joints.CodeSingleSheet}) {
			t.Errorf("findings %v, want single-sheet", got)
		}
		j := m10("B1", r3.Vec{Z: 0.5})
		j.Ground = true
		b = build(t, m, joints.BuildOptions{}, j)[0]
		if b.Status != joints.Built || b.Bolt.Support != 0 || b.Bolt.SupportDOFs != joints.Translations {
			t.Errorf("grounded single sheet: %s %v, support %d %s", b.Status, codes(b.Findings), b.Bolt.Support, b.Bolt.SupportDOFs)
		}
		// The axis came from part 1's element normal, which chose the
		// fixture's side: said (info), and not when the list gives it.
		if len(b.Findings) != 1 || b.Findings[0].Code != joints.CodeFixtureSide || b.Findings[0].Severity != joints.Info ||
			!strings.Contains(b.Findings[0].Message, "element normal of part 1") || !strings.Contains(b.Findings[0].Message, "nx,ny,nz") {
			t.Errorf("grounded without axis: findings %v, want one fixture-side info", b.Findings)
		}
		j.Axis = r3.Vec{Z: -1}
		if b = build(t, m, joints.BuildOptions{}, j)[0]; len(b.Findings) != 0 {
			t.Errorf("grounded with its axis: findings %v, want none", codes(b.Findings))
		}
	})
	t.Run("offset-links", func(t *testing.T) {
		m := mesh(t, rotation{}, holed(11)...)
		b := build(t, m, joints.BuildOptions{Links: joints.OffsetLinks}, m10("B1", r3.Vec{Z: 1.125}))[0]
		if len(b.Links) != 3 || b.Links[0].Kind != joints.OffsetLink || b.Links[1].Kind != joints.OffsetLink || b.Links[2].Kind != joints.ShankLink {
			t.Fatalf("links %+v", b.Links)
		}
		// Mid-surface sheets in contact: offsets t/2 (0.75, 1.5) meet at
		// the faying face z = 0.75; the shank between them has no length.
		if !near(b.Links[0].Length, 0.75, 1e-9) || !near(b.Links[1].Length, 1.5, 1e-9) || !near(b.Links[2].Length, 0, 1e-9) {
			t.Errorf("lengths %g %g %g, want 0.75 1.5 0", b.Links[0].Length, b.Links[1].Length, b.Links[2].Length)
		}
	})
	t.Run("offset-links-beam", func(t *testing.T) {
		// A beam shank spans the grip whatever the link form: from the
		// centre of sheet 1 (z = 0) to that of sheet 2 (z = 2.25), no
		// offset links; the faying points (both at z = 0.75) would give a
		// beam of no length.
		m := mesh(t, rotation{}, holed(11)...)
		b := build(t, m, joints.BuildOptions{Links: joints.OffsetLinks, Shank: joints.BeamShank}, m10("B1", r3.Vec{Z: 1.125}))[0]
		if b.Status != joints.Built || len(b.Links) != 1 || b.Links[0].Kind != joints.ShankLink || !near(b.Links[0].Length, 2.25, 1e-9) ||
			b.Links[0].StartAt != joints.SheetEnd(0) || b.Links[0].EndAt != joints.SheetEnd(1) {
			t.Fatalf("state %s %v, links %+v; want one shank of 2.25 mm between the centres", b.Status, codes(b.Findings), b.Links)
		}
		// The sweep's stiffness summary takes the same length: axial
		// EA/L with E = 210,000 N/mm^2, A = pi 10^2/4, L = 2.25 mm
		// (closed form).
		sp, _ := stiffness.Springs(&b, func(int64) stiffness.Material { return stiffness.Steel() })
		if want := 210000 * math.Pi * 100 / 4 / 2.25; len(sp) != 1 || !near(sp[0].Axial, want, 1e-6*want) {
			t.Errorf("springs %+v, want axial %g", sp, want)
		}
	})
	t.Run("beam-short", func(t *testing.T) {
		// Both sheets meshed at z = 0: the centres coincide, a beam there
		// would have no length: shank-short, not built, no links.
		ss := holed(11)
		ss[1].Z = 0
		m := mesh(t, rotation{}, ss...)
		for _, lf := range []joints.LinkForm{joints.GapLinks, joints.OffsetLinks} {
			b := build(t, m, joints.BuildOptions{Links: lf, Shank: joints.BeamShank}, m10("B1", r3.Vec{Z: 0.5}))[0]
			if got := codes(b.Findings); !slices.Contains(got, joints.CodeShankShort) || b.Status != joints.NotBuilt || len(b.Links) != 0 {
				t.Errorf("%s: findings %v, state %s, %d links; want shank-short, not built, none", lf, got, b.Status, len(b.Links))
			}
		}
	})
	t.Run("beam", func(t *testing.T) {
		m := mesh(t, rotation{}, holed(11)...)
		b := build(t, m, joints.BuildOptions{Shank: joints.BeamShank}, m10("B1", r3.Vec{Z: 1.125}))[0]
		// Steel, E = 210,000 N/mm^2, nu = 0.3 (EN 1993-1-1, 3.2.6; from memory).
		if b.Bolt.ShankModulus != 210000 || b.Bolt.ShankPoisson != 0.3 {
			t.Errorf("beam shank %g, %g", b.Bolt.ShankModulus, b.Bolt.ShankPoisson)
		}
	})
}

// TestDeterministic: the same bolts give the same connectors whatever
// the order of the list and the number of workers.
func TestDeterministic(t *testing.T) {
	m := mesh(t, rotation{}, holed(11)...)
	var js []joints.Joint
	for i := range 40 {
		js = append(js, m10(string(rune('A'+i%26))+string(rune('a'+i/26)), r3.Vec{X: float64(i%5) * 0.1, Z: 1.125}))
	}
	a := build(t, m, joints.BuildOptions{}, js...)
	for i := range a {
		b := build(t, m, joints.BuildOptions{}, js[i])[0]
		if !slices.Equal(a[i].Ends[0].Nodes, b.Ends[0].Nodes) || a[i].Ends[1].Point != b.Ends[1].Point {
			t.Fatalf("bolt %s differs built alone", js[i].ID)
		}
	}
}

// TestSizesAtLimits holds a meshed hole exactly at a limit to meet it,
// whatever the rounding of its fitted circle (Kasa fit on 20 nodes gives
// 7.999999999999771 mm for a hole meshed 8 mm across): a hole meshed at
// the shank's diameter lets the shank pass (line-to-line, as for a
// fitted bolt), one meshed at the declared hole plus or minus the
// tolerance is within it, and a point off the centre by exactly the
// clearance between shank and hole is info, not a warning (the project's
// rule: a value exactly at a limit meets it, joints.LengthRoundoff).
func TestSizesAtLimits(t *testing.T) {
	for _, c := range []struct {
		name               string
		d, hole, mesh, off float64
		seg                int
		rot                float64 // turn of the mesh about z, radians
		want               []string
		state              joints.Status
	}{
		{"M8 hole meshed at the shank, 20 nodes", 8, 8, 8, 0, 20, 0, nil, joints.Built},
		{"M8 hole meshed at the shank, 12 nodes turned", 8, 8, 8, 0, 12, 0.1, nil, joints.Built},
		{"M8 medium at +tolerance", 8, 9, 9.25, 0, 20, 0.37, nil, joints.Built}, // 9 + 0.25 (DefaultHoleTolerance)
		{"M8 medium at -tolerance", 8, 9, 8.75, 0, 20, 0.37, nil, joints.Built},
		{"M8 off by the clearance", 8, 9, 9, 0.5, 20, 0.1, []string{joints.CodeHoleOffCentre}, joints.Built}, // (9-8)/2: info
		{"M8 off beyond the clearance", 8, 9, 9, 0.51, 20, 0.1, []string{joints.CodeHoleOffCentre}, joints.Flagged},
	} {
		t.Run(c.name, func(t *testing.T) {
			ss := []sheet{
				{Part: 1, T: 2, Z: 0, Hole: c.mesh, Outer: 20, Seg: c.seg, Rings: 4},
				{Part: 2, T: 2, Z: 2, Hole: c.mesh, Outer: 20, Seg: c.seg, Rings: 4},
			}
			m := mesh(t, rotation{u: r3.Vec{Z: 1}, a: c.rot}, ss...)
			j := joints.Joint{ID: "B1", Kind: joints.Bolt, Point: r3.Vec{X: c.off, Z: 1}, Diameter: c.d, Washer: 16, Hole: c.hole}
			b := build(t, m, joints.BuildOptions{}, j)[0]
			var uniq []string
			for _, g := range codes(b.Findings) {
				if !slices.Contains(uniq, g) {
					uniq = append(uniq, g)
				}
			}
			if !slices.Equal(uniq, c.want) || b.Status != c.state {
				t.Errorf("findings %v, state %s; want %v, %s (holes %v)", b.Findings, b.Status, c.want, c.state, b.Bolt.Holes)
			}
		})
	}
}

// TestOvalHole: an oval hole, meshed as an ellipse of 16 nodes evenly
// spaced in its parameter, measures as the circle fitted to its nodes,
// whose diameter is 2 sqrt((a^2 + b^2) / 2) for semi-axes a and b (Kasa's
// fit: by symmetry D = E = 0 and F = -mean(x^2 + y^2) = -(a^2 + b^2) / 2;
// hand calculation), and its narrowest width is its lesser axis, where
// nodes lie at its ends. The shank must pass the narrowest width: an M10
// in a 12.6 x 9.6 mm oval measures 11.2 mm, within the tolerance of the
// declared 11, yet does not pass.
func TestOvalHole(t *testing.T) {
	for _, c := range []struct {
		name       string
		ox, oy     float64 // the oval's axes, mm
		wantFit    float64 // fitted diameter, hand calculation above
		wantNarrow float64
		want       []string
		state      joints.Status
	}{
		{"round", 11, 11, 11, 11, nil, joints.Built},
		{"oval passing", 11.55, 10.45, 2 * math.Sqrt((11.55*11.55+10.45*10.45)/8), 10.45, nil, joints.Built},
		{"oval narrower than the shank", 12.6, 9.6, 2 * math.Sqrt((12.6*12.6+9.6*9.6)/8), 9.6, []string{joints.CodeHoleSize}, joints.NotBuilt},
		{"oval at the shank", 12, 10, 2 * math.Sqrt((12.0*12+10*10)/8), 10, nil, joints.Built}, // 10 mm exactly passes
	} {
		t.Run(c.name, func(t *testing.T) {
			ss := holed(11)
			for i := range ss {
				ss[i].Seg, ss[i].OvalX, ss[i].OvalY = 16, c.ox, c.oy
			}
			m := mesh(t, rotation{}, ss...)
			b := build(t, m, joints.BuildOptions{}, m10("B1", r3.Vec{Z: 1.125}))[0]
			var got []string
			for _, g := range codes(b.Findings) {
				if !slices.Contains(got, g) {
					got = append(got, g)
				}
			}
			if !slices.Equal(got, c.want) || b.Status != c.state {
				t.Errorf("findings %v, state %s; want %v, %s", got, b.Status, c.want, c.state)
			}
			for _, h := range b.Bolt.Holes {
				if !near(h.Diameter, c.wantFit, 1e-9) || !near(h.Narrowest, c.wantNarrow, 1e-9) {
					t.Errorf("hole %.9g, narrowest %.9g; want %.9g, %.9g", h.Diameter, h.Narrowest, c.wantFit, c.wantNarrow)
				}
			}
		})
	}
}

// TestPointBesideHole: an M10's point 6 or 8 mm off the centre of an
// 11 mm hole (ISO 273 medium, REFERENCES.md) lies outside the hole, on
// the sheet: the axis meets the sheet's material and the bolt is built
// there on a patch ring, and since the hole's centre lies within the
// washer's radius (10 mm, ISO 7089 washer 20 mm) of the axis, a
// hole-off-centre warning says the bolt misses its hole (besides
// edge-close: the hole's edge under the washer). At 12 mm the hole lies
// beyond the washer's radius: only the edge it leaves within the
// washer's diameter, no hole-off-centre.
func TestPointBesideHole(t *testing.T) {
	m := mesh(t, rotation{}, holed(11)...)
	for _, c := range []struct {
		off  float64
		want bool
	}{{6, true}, {8, true}, {12, false}} {
		b := build(t, m, joints.BuildOptions{}, m10("B1", r3.Vec{X: c.off, Z: 1.125}))[0]
		n := 0
		for _, f := range b.Findings {
			if f.Code == joints.CodeHoleOffCentre {
				n++
				if f.Severity != joints.Warning || !strings.Contains(f.Message, joints.MM(c.off)+" mm from the centre of a hole") || !strings.Contains(f.Message, "(11 mm across), outside the hole") {
					t.Errorf("off %g: %s", c.off, f.Message)
				}
			}
		}
		if got := n == 2; got != c.want || b.Status == joints.NotBuilt || b.Bolt.Holes[0].Ring != "patch" {
			t.Errorf("off %g: %d hole-off-centre, state %s, ring %s; want %v on both sheets, built on a patch", c.off, n, b.Status, b.Bolt.Holes[0].Ring, c.want)
		}
	}
}
