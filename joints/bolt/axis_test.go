package bolt

import (
	"math"
	"slices"
	"strings"
	"testing"

	"gonum.org/v1/gonum/spatial/r3"

	"github.com/joinery-cae/joinery/joints"
)

// TestAxisThroughHoles: the bolt's axis runs through its meshed holes,
// along the listed direction, and every centre lies on it, holed or not
// (a straight shank). Sheets 1.5 mm thick in contact, mid-surfaces 1.5
// mm apart; holes 11 mm (ISO 273 medium for M10), so the shank has
// (11 - 10) / 2 = 0.5 mm to each side. The fitted line of a given
// direction is the least squares one: through the mean of the holes'
// centres across it (hand calculation). A plain sheet between holed
// ones used to keep its centre on the listed point's line, kinking the
// shank; misaligned holes put each hole's centre off the fitted axis
// by half their misalignment, a warning (holes-misaligned) when that
// exceeds the 0.5 mm of clearance (then no straight shank passes both:
// two discs of radius 0.5 mm whose centres lie more than 1 mm apart do
// not overlap).
func TestAxisThroughHoles(t *testing.T) {
	holedAt := func(part int64, z, cx float64) sheet {
		return sheet{Part: part, T: 1.5, Z: z, Hole: 11, Outer: 40, Seg: 24, Rings: 6, CX: cx}
	}
	plain := func(part int64, z float64) sheet {
		// The axis lies inside an element, not on a grid line: nodes at
		// x, y = -41 + 5 k.
		return sheet{Part: part, T: 1.5, Z: z, X0: -41, H: 5, N: 16}
	}
	type want struct {
		axisX   float64   // the fitted axis's x (y = 0)
		lateral []float64 // per sheet; holes only, 0 for plain sheets
		codes   []string
		state   joints.Status
	}
	for _, c := range []struct {
		name string
		ss   []sheet
		p    r3.Vec
		want want
	}{
		// The listed point 0.316 mm off both holes' common axis (info):
		// the plain sheet's centre on the holes' axis, x = 0.
		{"plain-between", []sheet{holedAt(1, 0, 0), plain(2, 1.5), holedAt(3, 3, 0)}, r3.Vec{X: 0.3, Y: -0.1, Z: 1.5},
			want{0, []float64{0, 0, 0}, []string{joints.CodeHoleOffCentre, joints.CodeHoleOffCentre}, joints.Built}},
		// Holes at x = -0.2 and +0.2: the axis at x = 0, each hole 0.2 mm
		// off it, within the 0.5 mm clearance.
		{"misaligned-within", []sheet{holedAt(1, 0, -0.2), plain(2, 1.5), holedAt(3, 3, 0.2)}, r3.Vec{Z: 1.5},
			want{0, []float64{0.2, 0, 0.2}, []string{joints.CodeHoleOffCentre, joints.CodeHoleOffCentre}, joints.Built}},
		// Holes 1.2 mm apart: 0.6 mm each off the axis, beyond the
		// clearance; the listed point 0.6 mm off each hole too.
		{"misaligned-beyond", []sheet{holedAt(1, 0, -0.6), holedAt(2, 1.5, 0.6)}, r3.Vec{Z: 0.75},
			want{0, []float64{0.6, 0.6}, []string{joints.CodeHoleOffCentre, joints.CodeHolesMisaligned, joints.CodeHoleOffCentre, joints.CodeHolesMisaligned}, joints.Flagged}},
		// Four sheets, holes at x = -0.25 and +0.35 outside, two plain
		// sheets between: the axis at their mean, x = 0.05, 0.3 mm from
		// each hole.
		{"four-sheets", []sheet{holedAt(1, 0, -0.25), plain(2, 1.5), plain(3, 3), holedAt(4, 4.5, 0.35)}, r3.Vec{Z: 2.25},
			want{0.05, []float64{0.3, 0, 0, 0.3}, []string{joints.CodeHoleOffCentre, joints.CodeHoleOffCentre}, joints.Built}},
	} {
		t.Run(c.name, func(t *testing.T) {
			m := mesh(t, rotation{}, c.ss...)
			j := m10("B1", c.p)
			j.Axis = r3.Vec{Z: 1}
			b := build(t, m, joints.BuildOptions{}, j)[0]
			if got := codes(b.Findings); !slices.Equal(got, c.want.codes) || b.Status != c.want.state {
				t.Fatalf("findings %v, state %s; want %v, %s", b.Findings, b.Status, c.want.codes, c.want.state)
			}
			if len(b.Ends) != len(c.ss) {
				t.Fatalf("%d ends, want %d", len(b.Ends), len(c.ss))
			}
			for i, e := range b.Ends {
				want := r3.Vec{X: c.want.axisX, Z: c.ss[i].Z}
				if r3.Norm(r3.Sub(e.Point, want)) > 1e-9 {
					t.Errorf("sheet %d (part %d): centre %v, want %v", i, b.Stack.Sheets[i].Part, e.Point, want)
				}
				if s := b.Stack.Sheets[i]; !near(s.Lateral, c.want.lateral[i], 1e-9) || !near(s.Position, c.ss[i].Z-c.p.Z, 1e-9) {
					t.Errorf("sheet %d: lateral %g, position %g; want %g, %g", i, s.Lateral, s.Position, c.want.lateral[i], c.ss[i].Z-c.p.Z)
				}
				// The ring still has the centre as its weighted mean.
				var mean r3.Vec
				for k, n := range e.Nodes {
					mean = r3.Add(mean, r3.Scale(e.Weights[k], m.Coords[n]))
				}
				if r3.Norm(r3.Sub(mean, e.Point)) > 1e-9 {
					t.Errorf("sheet %d: ring mean %v, want the centre %v", i, mean, e.Point)
				}
			}
			for _, l := range b.Links {
				if d := l.Direction; l.Length > 0 && math.Abs(math.Abs(d.Z)-1) > 1e-12 {
					t.Errorf("shank %d-%d along %v, want the axis (0, 0, 1)", l.From, l.To, d)
				}
			}
		})
	}
}

// TestTiltedAxisGap: on an axis tilted to the sheets, the gap along the
// axis is compared with contact, (t1+t2)/2, square to the sheets, like
// with like: two parallel planes d apart lie d / cos(theta) apart along
// a line at theta to their normal (hand calculation). Sheets 1.5 and
// 3 mm, contact 2.25 mm, allowance 0.25 x 2.25 = 0.5625 mm; at 40
// degrees contact reads 2.25 / cos 40 = 2.937 mm along the axis, which
// the old comparison took for 0.687 mm open.
func TestTiltedAxisGap(t *testing.T) {
	for _, c := range []struct {
		name  string
		tilt  float64 // degrees
		z2    float64 // sheet 2's mid-surface; contact at 2.25
		code  string
		words string
	}{
		{"contact-0deg", 0, 2.25, "", ""},
		{"contact-40deg", 40, 2.25, "", ""},
		{"open-40deg", 40, 3.25, joints.CodeGapOpen, "3.25 mm apart square to the sheets (" + joints.MM(3.25/math.Cos(40*math.Pi/180)) + " mm along the bolt's tilted axis), contact at 2.25 mm (allowance " + joints.MM(0.5625) + " mm); the shank bridges 1 mm of air"},
		{"closed-40deg", 40, 1.5, joints.CodeGapClosed, "1.5 mm apart square to the sheets (" + joints.MM(1.5/math.Cos(40*math.Pi/180)) + " mm along the bolt's tilted axis), contact at 2.25 mm (allowance " + joints.MM(0.5625) + " mm); the sheets penetrate by 0.75 mm"},
		{"open-0deg", 0, 3.25, joints.CodeGapOpen, "3.25 mm apart, contact at 2.25 mm"},
	} {
		t.Run(c.name, func(t *testing.T) {
			m := mesh(t, rotation{},
				sheet{Part: 1, T: 1.5, Z: 0, X0: -41, H: 5, N: 16},
				sheet{Part: 2, T: 3, Z: c.z2, X0: -41, H: 5, N: 16})
			a := c.tilt * math.Pi / 180
			j := m10("B1", r3.Vec{X: 1, Y: 2, Z: c.z2 / 2})
			j.Axis = r3.Vec{X: math.Sin(a), Z: math.Cos(a)}
			b := build(t, m, joints.BuildOptions{AngleLimit: 45}, j)[0]
			var want []string
			if c.code != "" {
				want = []string{c.code}
			}
			if got := codes(b.Findings); !slices.Equal(got, want) {
				t.Fatalf("findings %v, want %v", b.Findings, want)
			}
			if c.code != "" && !strings.Contains(b.Findings[0].Message, c.words) {
				t.Errorf("message %q, want it to hold %q", b.Findings[0].Message, c.words)
			}
			// The link keeps the gap along the axis (mid_gap) and the
			// planes' separation square to them (square_gap): z2.
			if l := b.Links[0]; !near(l.MidGap, c.z2/math.Cos(a), 1e-9) || !near(l.SquareGap, c.z2, 1e-9) {
				t.Errorf("mid gap %.9g, square gap %.9g; want %.9g, %.9g", l.MidGap, l.SquareGap, c.z2/math.Cos(a), c.z2)
			}
		})
	}
}

// TestWasherRingTilted: on an axis tilted to the sheet, the washer's
// footprint is the disc of its radius in the sheet about the centre,
// not the nodes within its radius of the axis (in the sheet an ellipse
// of semi-axes r and r / cos(theta), 11.55 mm for r = 10 mm at 30
// degrees). Holes 11 mm with rings of 16 nodes at 5.5, 7, 8.5, 10 and
// 11.5 mm: the disc of 10 mm holds the first four, 64 nodes (counted);
// the ellipse took two of the 11.5 mm ring as well (at angles 0 and 180
// degrees, 11.5 cos 30 = 9.96 mm from the axis). The second sheet's
// hole lies on the tilted axis, 2.25 tan 30 along x; the gap square to
// the sheets is contact. On a 2 mm grid with the axis through a node,
// the disc holds the nodes (2i, 2j) with i^2 + j^2 <= 25: 81 (Gauss
// circle problem, N(5) = 81).
func TestWasherRingTilted(t *testing.T) {
	a := 30 * math.Pi / 180
	shift := 2.25 * math.Tan(a)
	axis := r3.Vec{X: math.Sin(a), Z: math.Cos(a)}
	p := r3.Vec{X: shift / 2, Z: 1.125} // on the axis through (0, 0, 0)
	o := joints.BuildOptions{BoltRing: joints.WasherRing, AngleLimit: 35}
	t.Run("holes", func(t *testing.T) {
		m := mesh(t, rotation{},
			sheet{Part: 1, T: 1.5, Z: 0, Hole: 11, Outer: 11.5, Seg: 16, Rings: 4},
			sheet{Part: 2, T: 3, Z: 2.25, Hole: 11, Outer: 11.5, Seg: 16, Rings: 4, CX: shift})
		j := m10("B1", p)
		j.Axis = axis
		b := build(t, m, o, j)[0]
		if b.Status != joints.Built || len(b.Findings) != 0 {
			t.Fatalf("state %s, findings %v", b.Status, b.Findings)
		}
		for i, e := range b.Ends {
			if len(e.Nodes) != 64 {
				t.Errorf("sheet %d: %d ring nodes, want 64", i, len(e.Nodes))
			}
			want := r3.Vec{X: shift * float64(i), Z: 2.25 * float64(i)}
			if r3.Norm(r3.Sub(e.Point, want)) > 1e-9 {
				t.Errorf("sheet %d: centre %v, want %v", i, e.Point, want)
			}
		}
	})
	t.Run("grid", func(t *testing.T) {
		m := mesh(t, rotation{},
			sheet{Part: 1, T: 1.5, Z: 0, X0: -20, H: 2, N: 20},
			sheet{Part: 2, T: 3, Z: 2.25, X0: -20, H: 2, N: 20})
		j := m10("B1", p)
		j.Axis = axis
		b := build(t, m, o, j)[0]
		if b.Status != joints.Built {
			t.Fatalf("state %s, findings %v", b.Status, b.Findings)
		}
		if n := len(b.Ends[0].Nodes); n != 81 {
			t.Errorf("sheet 1: %d ring nodes, want 81", n)
		}
	})
}

// TestWasherAtEdge: a washer whose footprint, the disc of its radius
// about the centre, runs past a sheet's free edge is edge-close (a
// disc of radius r about a point d from a straight edge crosses it when
// d < r; closed form), and each sheet records its centre's distance to
// the nearest free edge other than its hole (+Inf beyond the washer's
// diameter). Plates 40 mm square (x, y from -20 to 20), washer 20 mm;
// annuli of 24 segments, whose outer edge is a regular 24-gon of
// apothem R cos(pi / 24) (hand calculation).
func TestWasherAtEdge(t *testing.T) {
	grid := []sheet{{Part: 1, T: 1.5, Z: 0, X0: -20, H: 2, N: 20}, {Part: 2, T: 3, Z: 2.25, X0: -20, H: 2, N: 20}}
	ring := func(outer float64) []sheet {
		ss := holed(11)
		for i := range ss {
			ss[i].Outer = outer
		}
		return ss
	}
	for _, c := range []struct {
		name string
		ss   []sheet
		x    float64
		edge float64
		warn bool
	}{
		{"grid-6mm", grid, 14, 6, true},
		{"grid-at-radius", grid, 10, 10, false}, // at the limit: meets it
		{"grid-centre", grid, 0, 20, false},
		{"hole-wide", ring(40), 0, math.Inf(1), false},
		{"hole-narrow-ring", ring(9), 0, 9 * math.Cos(math.Pi/24), true},
		{"hole-ring-14", ring(14), 0, 14 * math.Cos(math.Pi/24), false},
	} {
		t.Run(c.name, func(t *testing.T) {
			m := mesh(t, rotation{}, c.ss...)
			j := m10("B1", r3.Vec{X: c.x, Z: 1.125})
			j.Axis = r3.Vec{Z: 1}
			b := build(t, m, joints.BuildOptions{}, j)[0]
			var want []string
			if c.warn {
				want = []string{joints.CodeEdgeClose, joints.CodeEdgeClose}
			}
			if got := codes(b.Findings); !slices.Equal(got, want) {
				t.Errorf("findings %v, want %v", b.Findings, want)
			}
			for i, s := range b.Stack.Sheets {
				if !(s.EdgeDistance == c.edge || near(s.EdgeDistance, c.edge, 1e-9)) {
					t.Errorf("sheet %d: edge distance %g, want %g", i, s.EdgeDistance, c.edge)
				}
			}
		})
	}
}
