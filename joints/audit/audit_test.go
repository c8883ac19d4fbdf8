package audit

import (
	"math"
	"slices"
	"strconv"
	"strings"
	"testing"

	"gonum.org/v1/gonum/spatial/r3"

	"github.com/joinery-cae/joinery/geom"
	"github.com/joinery-cae/joinery/joints"
)

// flangeMesh returns two 0.8 mm sheets in contact (mid-surfaces 0.8 mm
// apart: contact (t1+t2)/2, shell mid-surface geometry, common
// practice), 200 x 50 mm, meshed alike with 5 mm quads, so that nodes
// face each other.
func flangeMesh() []plate {
	return []plate{
		{Part: 1, T: 0.8, NX: 40, NY: 10, H: 5},
		{Part: 2, T: 0.8, Z: 0.8, NX: 40, NY: 10, H: 5},
	}
}

// along returns weld points on the flange's centre line y = 25, mid-way
// between the sheets, at the given x.
func along(xs ...float64) []r3.Vec {
	pts := make([]r3.Vec, len(xs))
	for i, x := range xs {
		pts[i] = r3.Vec{X: x, Y: 25, Z: 0.4}
	}
	return pts
}

func steps(from, step float64, n int) []float64 {
	xs := make([]float64, n)
	for i := range xs {
		xs[i] = from + float64(i)*step
	}
	return xs
}

// Planted seams are found, each chain once with all its welds; a clean
// pitch on the same flange is not; node-pair lists and connectors give
// the same findings.
func TestSeams(t *testing.T) {
	nodePair := joints.BuildOptions{Attach: joints.NodePair}
	cases := []struct {
		name   string
		plates []plate
		welds  []r3.Vec
		o      joints.BuildOptions
		chains [][]string // the welds of each seam chain
		parts  [][]int64
		length []float64
	}{
		{
			// The classic case: every facing pair along 30 mm connected.
			name: "every facing pair along 30 mm", plates: flangeMesh(), welds: along(steps(50, 5, 7)...), o: nodePair,
			chains: [][]string{{"W1", "W2", "W3", "W4", "W5", "W6", "W7"}}, parts: [][]int64{{1, 2}}, length: []float64{30},
		},
		{
			// The same welds given at heights alternating through the
			// stack (0.1 and 0.9 mm): the seam is 30 mm long on the sheet,
			// not the 30.011 mm between the end points.
			name: "every facing pair, points at two heights", plates: flangeMesh(), o: nodePair,
			welds: []r3.Vec{
				{X: 50, Y: 25, Z: 0.1}, {X: 55, Y: 25, Z: 0.9}, {X: 60, Y: 25, Z: 0.1}, {X: 65, Y: 25, Z: 0.9},
				{X: 70, Y: 25, Z: 0.1}, {X: 75, Y: 25, Z: 0.9}, {X: 80, Y: 25, Z: 0.9},
			},
			chains: [][]string{{"W1", "W2", "W3", "W4", "W5", "W6", "W7"}}, parts: [][]int64{{1, 2}}, length: []float64{30},
		},
		{
			// The smallest case: two welds on mesh-adjacent nodes.
			name: "two welds on adjacent nodes", plates: flangeMesh(), welds: along(100, 105), o: nodePair,
			chains: [][]string{{"W1", "W2"}}, parts: [][]int64{{1, 2}}, length: []float64{5},
		},
		{
			name: "interpolated welds in neighbouring elements", plates: flangeMesh(), welds: along(102.5, 107.5, 160), o: joints.BuildOptions{},
			chains: [][]string{{"W1", "W2"}}, parts: [][]int64{{1, 2}}, length: []float64{5},
		},
		{
			// Three sheets: only the middle one (a coarse 16 mm mesh)
			// has the two welds' attachments in one element; the outer
			// sheets (2 mm mesh) keep them apart.
			name: "three sheets, one sheet's attachments touch",
			plates: []plate{
				{Part: 1, T: 1, NX: 100, NY: 25, H: 2},
				{Part: 2, T: 1, Z: 1, NX: 12, NY: 3, H: 16, X0: 4},
				{Part: 3, T: 1, Z: 2, NX: 100, NY: 25, H: 2},
			},
			welds: []r3.Vec{{X: 85, Y: 25, Z: 1}, {X: 99, Y: 25, Z: 1}}, o: joints.BuildOptions{},
			chains: [][]string{{"W1", "W2"}}, parts: [][]int64{{2, 1, 3}}, length: []float64{14},
		},
		{
			name: "clean 40 mm pitch, node pairs", plates: flangeMesh(), welds: along(steps(20, 40, 5)...), o: nodePair,
		},
		{
			name: "clean 40 mm pitch, interpolated", plates: flangeMesh(), welds: along(steps(22, 40, 5)...), o: joints.BuildOptions{},
		},
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			m := plates(tc.plates...)
			conns := build(t, m, weldsAt(tc.welds...), tc.o)
			rep := audit(t, m, conns, nil, tc.o)
			seams := ofCode(rep.Findings, joints.CodeSeam)
			if len(seams) != len(tc.chains) {
				t.Fatalf("%d seams, want %d: %v", len(seams), len(tc.chains), summary(rep.Findings))
			}
			for i, f := range seams {
				if !slices.Equal(f.Joints, tc.chains[i]) || f.Joint != tc.chains[i][0] || !slices.Equal(f.Parts, tc.parts[i]) {
					t.Errorf("seam %d: joints %v parts %v, want %v %v", i, f.Joints, f.Parts, tc.chains[i], tc.parts[i])
				}
				if want := tc.length[i]; !strings.Contains(f.Message, " "+joints.MM(want)+" mm long") {
					t.Errorf("seam %d: %q does not give the length %g mm", i, f.Message, want)
				}
				if f.Severity != SeamSeverity || !f.HasPoint {
					t.Errorf("seam %d: %+v", i, f)
				}
			}
			if len(tc.chains) == 0 && len(rep.Findings) != 0 {
				t.Errorf("clean flange: %v", summary(rep.Findings))
			}
			if tc.o.Attach == joints.NodePair {
				// The same welds as a node-pair list exported from a model.
				again := audit(t, m, fromCSV(t, m, nodePairCSV(m, conns), tc.o), nil, tc.o)
				if a, b := summary(rep.Findings), summary(again.Findings); !slices.Equal(a, b) {
					t.Errorf("connectors give %v, the node-pair list %v", a, b)
				}
			}
		})
	}
}

// Duplicates and pitch against the minimum spacing of the resistance
// welding manufacturers' optimum schedule for low-carbon steel (secondary
// copy of the table, inch values converted; joints.MinSpacing): 19.0 mm
// for 1.02 mm sheets, 30 per cent more for three sheets (the note with
// such tables).
func TestDuplicatesAndPitch(t *testing.T) {
	two := []plate{{Part: 1, T: 1.02, NX: 60, NY: 10, H: 5}, {Part: 2, T: 1.02, Z: 1.02, NX: 60, NY: 10, H: 5}}
	three := append(slices.Clone(two), plate{Part: 3, T: 1.02, Z: 2.04, NX: 60, NY: 10, H: 5})
	mid2, mid3 := 0.51, 1.02
	at := func(z float64, xs ...float64) []r3.Vec {
		var pts []r3.Vec
		for _, x := range xs {
			pts = append(pts, r3.Vec{X: x, Y: 25, Z: z})
		}
		return pts
	}
	cases := []struct {
		name   string
		plates []plate
		welds  []r3.Vec
		want   []string
	}{
		// Nugget 5*sqrt(1.02) = 5.05 mm: centres 1 mm apart overlap.
		{"overlapping nuggets", two, at(mid2, 51, 52, 120), []string{"duplicate [W1 W2] [1 2]"}},
		{"same point", two, at(mid2, 60, 60), []string{"duplicate [W1 W2] [1 2]"}},
		// 15 mm < 19.0 mm: too close, but the nuggets stay apart.
		{"pitch 15 mm, two sheets", two, at(mid2, 50, 65), []string{"pitch-short [W1 W2] [1 2]"}},
		{"pitch 20 mm, two sheets", two, at(mid2, 50, 70), nil},
		// Consecutive pairs only: three welds 15 mm apart give two.
		{"three welds at 15 mm", two, at(mid2, 50, 65, 80), []string{"pitch-short [W1 W2] [1 2]", "pitch-short [W2 W3] [1 2]"}},
		// 22 mm: above 19.0 for two sheets, below 19.0*1.3 = 24.7 for three.
		{"pitch 22 mm, three sheets", three, at(mid3, 50, 72), []string{"pitch-short [W1 W2] [1 2]"}},
		{"pitch 26 mm, three sheets", three, at(mid3, 50, 76), nil},
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			m := plates(tc.plates...)
			conns := build(t, m, weldsAt(tc.welds...), joints.BuildOptions{})
			rep := audit(t, m, conns, nil, joints.BuildOptions{})
			var got []string
			for _, s := range summary(rep.Findings) {
				if strings.HasPrefix(s, "duplicate") || strings.HasPrefix(s, "pitch-short") {
					got = append(got, s)
				}
			}
			if !slices.Equal(got, tc.want) {
				t.Errorf("findings %v, want %v (all: %v)", got, tc.want, summary(rep.Findings))
			}
		})
	}
	if s := joints.MinSpacing(1.02, 2); math.Abs(s-19.0) > 1e-9 {
		t.Fatalf("MinSpacing(1.02, 2) = %g, the table's 19.0 mm", s)
	}
}

// Two node-pair connectors on the same node pair are one weld twice.
func TestDuplicateNodePair(t *testing.T) {
	m := plates(flangeMesh()...)
	a, b := nodeAt(m, 1, 50, 25), nodeAt(m, 2, 50, 25)
	csv := "id,node_a,node_b\nW1," + itoa(a) + "," + itoa(b) + "\nW2," + itoa(b) + "," + itoa(a) + "\nW3," + itoa(nodeAt(m, 1, 150, 25)) + "," + itoa(nodeAt(m, 2, 150, 25)) + "\n"
	rep := audit(t, m, fromCSV(t, m, csv, joints.BuildOptions{}), nil, joints.BuildOptions{})
	if got := summary(ofCode(rep.Findings, joints.CodeDuplicate)); !slices.Equal(got, []string{"duplicate [W1 W2] [1 2]"}) {
		t.Errorf("%v", summary(rep.Findings))
	}
}

// Extra joint points (a joint list not built) are checked against the
// connectors: one on top of a weld is a duplicate, one 15 mm from it too
// close; an extra point with the id of a connector is that weld.
func TestExtraJoints(t *testing.T) {
	two := []plate{{Part: 1, T: 1.02, NX: 60, NY: 10, H: 5}, {Part: 2, T: 1.02, Z: 1.02, NX: 60, NY: 10, H: 5}}
	m := plates(two...)
	conns := build(t, m, weldsAt(r3.Vec{X: 50, Y: 25, Z: 0.51}, r3.Vec{X: 200, Y: 25, Z: 0.51}), joints.BuildOptions{})
	extra := []joints.Joint{
		{ID: "W1", Point: r3.Vec{X: 50, Y: 25, Z: 0.51}},
		{ID: "N1", Point: r3.Vec{X: 200.5, Y: 25, Z: 0.51}},
		{ID: "N2", Point: r3.Vec{X: 65, Y: 25, Z: 0.51}},
	}
	rep := audit(t, m, conns, extra, joints.BuildOptions{})
	want := []string{"duplicate [N1 W2] [1 2]", "pitch-short [N2 W1] [1 2]"}
	var got []string
	for _, f := range rep.Findings {
		if f.Code == joints.CodeDuplicate || f.Code == joints.CodePitchShort {
			got = append(got, summary([]joints.Finding{f})...)
		}
	}
	slices.Sort(got)
	if !slices.Equal(got, want) {
		t.Errorf("%v, want %v", got, want)
	}
}

// A planted loose part and a loose group are free parts; the welded
// main group is not.
func TestFreeParts(t *testing.T) {
	m := plates(
		plate{Part: 1, T: 1, NX: 20, NY: 10, H: 5},
		plate{Part: 2, T: 1, Z: 1, NX: 20, NY: 10, H: 5},
		plate{Part: 3, T: 1, Z: 50, NX: 4, NY: 4, H: 5},                    // loose part
		plate{Part: 4, T: 1, Z: 100, NX: 10, NY: 10, H: 5},                 // loose group: 4 and 5
		plate{Part: 5, T: 1, Z: 101, NX: 10, NY: 10, H: 5, X0: 1, Y0: 1.5}, // welded to 4 only
	)
	conns := build(t, m, weldsAt(
		r3.Vec{X: 20, Y: 25, Z: 0.5}, r3.Vec{X: 60, Y: 25, Z: 0.5},
		r3.Vec{X: 25, Y: 25, Z: 100.5}), joints.BuildOptions{})
	rep := audit(t, m, conns, nil, joints.BuildOptions{})
	free := ofCode(rep.Findings, joints.CodeFreePart)
	if got := summary(free); !slices.Equal(got, []string{"free-part [] [3]", "free-part [W3] [4 5]"}) {
		t.Fatalf("%v", summary(rep.Findings))
	}
	// The loose part's box is 20 x 20 mm at z = 50.
	if p := free[0].Point; !free[0].HasPoint || math.Abs(p.X-10) > 1e-9 || math.Abs(p.Z-50) > 1e-9 || free[0].Severity != joints.Warning {
		t.Errorf("%+v", free[0])
	}
	if rep.Kinematics.Groups != 3 || rep.Kinematics.RigidBodyModes != 18 {
		t.Errorf("%+v, want 3 groups, 18 rigid-body modes", rep.Kinematics)
	}
}

// A part without elements (declared by a mesh file, listed by a parts
// table) has nothing that can move: it is no free part, no group of its
// own and adds no rigid-body modes (6 for the one welded group: a free
// rigid body has six, from memory of rigid-body kinematics).
func TestPartWithoutElementsIsNotFree(t *testing.T) {
	m := plates(
		plate{Part: 1, T: 1, NX: 20, NY: 10, H: 5},
		plate{Part: 2, T: 1, Z: 1, NX: 20, NY: 10, H: 5},
	)
	m.Parts = append(m.Parts, geom.Part{ID: 9, Name: "declared, no elements", Thickness: 1})
	if err := m.Index(); err != nil {
		t.Fatal(err)
	}
	if _, ok := m.PartIndex(9); !ok {
		t.Fatal("part 9 is not in the mesh's parts")
	}
	conns := build(t, m, weldsAt(r3.Vec{X: 20, Y: 25, Z: 0.5}, r3.Vec{X: 60, Y: 25, Z: 0.5}), joints.BuildOptions{})
	rep := audit(t, m, conns, nil, joints.BuildOptions{})
	if free := ofCode(rep.Findings, joints.CodeFreePart); len(free) != 0 {
		t.Errorf("free parts %v", summary(free))
	}
	if k := rep.Kinematics; k.Groups != 1 || k.RigidBodyModes != 6 || k.Mechanisms != 0 {
		t.Errorf("%+v, want 1 group, 6 rigid-body modes", k)
	}
}

// A strip held by one straight line of welds that couple translations
// only turns about that line: a mechanism whose axis is the weld line;
// the same welds coupling all six degrees of freedom hold it.
func TestStripOnALineOfWelds(t *testing.T) {
	m := plates(
		plate{Part: 1, T: 1, NX: 40, NY: 20, H: 5},
		plate{Part: 2, T: 1, Z: 1, NX: 40, NY: 4, H: 5, Y0: 40},
	)
	welds := weldsAt(along(steps(20, 35, 5)...)...)
	for i := range welds {
		welds[i].Point.Y = 50
		welds[i].Point.Z = 0.5
	}
	for _, tc := range []struct {
		dofs joints.DOFs
		mech int
	}{{joints.Translations, 1}, {joints.AllDOFs, 0}} {
		o := joints.BuildOptions{SpotDOFs: tc.dofs}
		rep := audit(t, m, build(t, m, welds, o), nil, o)
		mech := ofCode(rep.Findings, joints.CodeMechanism)
		if rep.Kinematics.Mechanisms != tc.mech || len(mech) != tc.mech {
			t.Fatalf("%v: %+v %v", tc.dofs, rep.Kinematics, summary(rep.Findings))
		}
		if tc.mech == 0 {
			continue
		}
		f := mech[0]
		if f.Motion.Kind != joints.MotionRotation || math.Abs(f.Motion.Direction.X-1) > 1e-6 || math.Abs(f.Motion.Point.Y-50) > 1e-6 {
			t.Errorf("motion %+v, want a rotation about the weld line y = 50 along x", f.Motion)
		}
		if !slices.Equal(f.Parts, []int64{2, 1}) || len(f.Joints) != 5 || f.Severity != joints.Error {
			t.Errorf("%+v", f)
		}
	}
}

func itoa(v int64) string { return strconv.FormatInt(v, 10) }

// Distances between welds are measured on the sheet they share: two
// 1.5 mm sheets (mid-surfaces at z = 0 and 1.5, in contact) with one
// weld given at the lower sheet's mid-surface and the other at the upper
// one's, 1.5 mm higher. Minimum spacing for 1.5 mm, interpolated
// linearly in the resistance welding manufacturers' table between 1.27
// mm (22.2) and 1.57 mm (25.4): 24.653 mm; nugget 5 sqrt(1.5) = 6.124 mm
// (common practice). In the plane the welds lie 20, 24.63 and 6 mm
// apart; in space sqrt(d^2 + 1.5^2) = 20.056, 24.676 (above the
// spacing) and 6.185 mm (above the nugget diameter).
func TestDistancesOnTheSharedSheet(t *testing.T) {
	two := []plate{{Part: 1, T: 1.5, NX: 60, NY: 10, H: 5}, {Part: 2, T: 1.5, Z: 1.5, NX: 60, NY: 10, H: 5}}
	m := plates(two...)
	spacing := 22.2 + (1.5-1.27)/(1.57-1.27)*(25.4-22.2)
	if s := joints.MinSpacing(1.5, 2); math.Abs(s-spacing) > 1e-9 || s < 24.63 || math.Hypot(24.63, 1.5) < s {
		t.Fatalf("MinSpacing(1.5, 2) = %g, want %g between 24.63 and %g", s, spacing, math.Hypot(24.63, 1.5))
	}
	if d := 5 * math.Sqrt(1.5); d < 6 || math.Hypot(6, 1.5) < d {
		t.Fatalf("nugget %g not between 6 and %g", d, math.Hypot(6, 1.5))
	}
	for _, tc := range []struct {
		name  string
		dx    float64
		code  string
		apart string
	}{
		{"pitch-short, 20 mm in the plane", 20, joints.CodePitchShort, " are 20 mm apart"},
		{"pitch-short, 24.63 mm in the plane", 24.63, joints.CodePitchShort, " are 24.63 mm apart"},
		{"duplicate, 6 mm in the plane", 6, joints.CodeDuplicate, " are 6 mm apart"},
	} {
		t.Run(tc.name, func(t *testing.T) {
			pts := []r3.Vec{{X: 100, Y: 25, Z: 0}, {X: 100 + tc.dx, Y: 25, Z: 1.5}}
			conns := build(t, m, weldsAt(pts...), joints.BuildOptions{})
			for _, c := range conns {
				if c.Status == joints.NotBuilt || len(c.Stack.Sheets) != 2 {
					t.Fatalf("weld %s: %v, stack %v, %v", c.Joint.ID, c.Status, c.Stack.Parts(), c.Findings)
				}
			}
			// The same welds built, and as extra points beside a weld far
			// away (not built).
			far := build(t, m, weldsAt(r3.Vec{X: 280, Y: 25, Z: 0.75}), joints.BuildOptions{})
			far[0].Joint.ID = "F1"
			for _, rep := range []*Report{
				audit(t, m, conns, nil, joints.BuildOptions{}),
				audit(t, m, far, []joints.Joint{{ID: "W1", Kind: joints.Spot, Point: pts[0]}, {ID: "W2", Kind: joints.Spot, Point: pts[1]}}, joints.BuildOptions{}),
			} {
				fs := ofCode(rep.Findings, tc.code)
				if len(fs) != 1 || !slices.Equal(fs[0].Joints, []string{"W1", "W2"}) || !strings.Contains(fs[0].Message, tc.apart) {
					t.Errorf("want one %s of W1 and W2 saying %q: %v", tc.code, tc.apart, summary(rep.Findings))
					for _, f := range fs {
						t.Log(f.Message)
					}
				}
			}
		})
	}
}

// A weld placed exactly on a node ties that node alone: interpolated,
// its host element lists its other nodes with weight 0, which tie
// nothing and so close no flange. Welds on nodes 10 and 15 mm apart on a
// 5 mm mesh leave untied nodes between them (no seam, common practice:
// one free node between welds lets the sheets open), and are judged
// against the table's spacing (12.974 mm at 0.8 mm, joints.MinSpacing:
// 10 mm too close, 15 mm not) alike interpolated and node-pair; 5 mm
// apart they are a seam either way.
func TestWeldsOnNodes(t *testing.T) {
	for _, tc := range []struct {
		step  float64
		seams int
	}{{5, 1}, {10, 0}, {15, 0}} {
		got := map[joints.Attach][2]int{}
		for _, at := range []joints.Attach{joints.Interpolated, joints.NodePair} {
			m := plates(flangeMesh()...)
			o := joints.BuildOptions{Attach: at}
			conns := build(t, m, weldsAt(along(steps(50, tc.step, 7)...)...), o)
			rep := audit(t, m, conns, nil, o)
			got[at] = [2]int{len(ofCode(rep.Findings, joints.CodeSeam)), len(ofCode(rep.Findings, joints.CodePitchShort))}
		}
		if got[joints.Interpolated] != got[joints.NodePair] || got[joints.NodePair][0] != tc.seams {
			t.Errorf("welds on nodes %g mm apart: (seams, pitch-short) interpolated %v, node-pair %v; want %d seams both", tc.step, got[joints.Interpolated], got[joints.NodePair], tc.seams)
		}
	}
}

// A row of welds whose nuggets overlap one by one (5 mm apart on 1.02 mm
// sheets, nugget 5*sqrt(1.02) = 5.05 mm, common practice) is a seam, not
// only a run of duplicates; three definitions of one spot, or two welds
// 1 mm apart, are duplicates and no seam: they reach no farther than a
// nugget.
func TestOverlappingRowIsSeam(t *testing.T) {
	two := []plate{{Part: 1, T: 1.02, NX: 60, NY: 10, H: 5}, {Part: 2, T: 1.02, Z: 1.02, NX: 60, NY: 10, H: 5}}
	at := func(xs ...float64) []r3.Vec {
		var pts []r3.Vec
		for _, x := range xs {
			pts = append(pts, r3.Vec{X: x, Y: 25, Z: 0.51})
		}
		return pts
	}
	for _, tc := range []struct {
		name        string
		xs          []float64
		seams, dups int
	}{
		{"row at 5 mm", steps(50, 5, 9), 1, 8},
		{"one spot three times", []float64{120, 120, 120}, 0, 3},
		{"two welds 1 mm apart", []float64{120, 121}, 0, 1},
	} {
		for _, o := range []joints.BuildOptions{{Attach: joints.NodePair}, {}} {
			m := plates(two...)
			conns := build(t, m, weldsAt(at(tc.xs...)...), o)
			rep := audit(t, m, conns, nil, o)
			if s, d := len(ofCode(rep.Findings, joints.CodeSeam)), len(ofCode(rep.Findings, joints.CodeDuplicate)); s != tc.seams || d != tc.dups {
				t.Errorf("%s, %v: %d seams, %d duplicates; want %d, %d (%v)", tc.name, o.Attach, s, d, tc.seams, tc.dups, summary(rep.Findings))
			}
		}
	}
}

// A planned point (a joint list checked, not built) on fewer than two
// sheets within reach would join nothing: no-sheet or single-sheet, as
// its build would say, instead of being passed over.
func TestPlannedPointOffTheSheets(t *testing.T) {
	m := plates(flangeMesh()...) // 200 x 50 mm, two 0.8 mm sheets
	conns := build(t, m, weldsAt(along(20)...), joints.BuildOptions{})
	extra := []joints.Joint{
		{ID: "P1", Kind: joints.Spot, Point: r3.Vec{X: 400, Y: 25, Z: 0.4}},                       // 200 mm off the sheets
		{ID: "P2", Kind: joints.Spot, Point: r3.Vec{X: 400, Y: 25, Z: 0.4}, Parts: []int64{1, 2}}, // the same, listing its parts
		{ID: "P3", Kind: joints.Spot, Point: r3.Vec{X: 100, Y: 25, Z: 0.4}},                       // on both sheets
	}
	rep := audit(t, m, conns, extra, joints.BuildOptions{})
	got := summary(append(ofCode(rep.Findings, joints.CodeNoSheet), ofCode(rep.Findings, joints.CodeSingleSheet)...))
	if want := []string{"no-sheet [P1] []", "no-sheet [P2] [1 2]"}; !slices.Equal(got, want) {
		t.Errorf("%v, want %v", got, want)
	}
}

// A node a weld ties with a negative weight is tied all the same: patch
// weights may be negative near an edge (the least-norm weights that
// reproduce the point, joints.EvenWeights), and such a node moves with
// the weld. Two welds 15 mm apart on a 5 mm mesh leave two free
// elements between them (no seam); give the first a node of the
// second's host element, at weight -0.01, and they touch.
func TestNegativeWeightTies(t *testing.T) {
	for _, w := range []float64{0, -0.01} {
		m := plates(flangeMesh()...)
		pts := []r3.Vec{{X: 52.5, Y: 27.5, Z: 0.4}, {X: 67.5, Y: 27.5, Z: 0.4}}
		conns := build(t, m, weldsAt(pts...), joints.BuildOptions{})
		c := &conns[0]
		k := slices.IndexFunc(c.Stack.Sheets, func(s joints.Sheet) bool { return s.Part == 1 })
		n, _ := m.NodeIndex(nodeAt(m, 1, 65, 30))
		e := &c.Ends[k]
		e.Nodes = append(e.Nodes, n)
		e.Weights = append(e.Weights, w)
		e.Weights[0] -= w
		rep := audit(t, m, conns, nil, joints.BuildOptions{})
		want := 0
		if w != 0 {
			want = 1
		}
		if got := len(ofCode(rep.Findings, joints.CodeSeam)); got != want {
			t.Errorf("extra node at weight %g: %d seams, want %d (%v)", w, got, want, summary(rep.Findings))
		}
	}
}
