package audit

import (
	"cmp"
	"fmt"
	"math"
	"slices"
	"strings"
	"testing"

	"gonum.org/v1/gonum/spatial/r3"

	"github.com/joinery-cae/joinery/geom"
	"github.com/joinery-cae/joinery/joints"
)

// Planted models with answers known by counting or in closed form, each
// compared with the audit's whole list of findings (no more, no fewer).

// surface is a part meshed as NU x NV quads whose node (i, j) lies at
// At(i, j): a flat plate, or a curved sheet.
type surface struct {
	Part   int64
	T      float64
	NU, NV int
	At     func(i, j int) r3.Vec
	name   string // the parts' names: "<name> <id>", "sheet" when empty
}

// surfaces builds a mesh of surfaces; node and element ids of part p
// start at p*100000+1, as plates numbers them.
func surfaces(ss ...surface) *geom.Mesh {
	m := &geom.Mesh{ElemStart: []int32{0}}
	for pi, s := range ss {
		name := cmp.Or(s.name, "sheet")
		m.Parts = append(m.Parts, geom.Part{ID: s.Part, Name: fmt.Sprintf("%s %d", name, s.Part), Thickness: s.T})
		base := int32(len(m.Coords))
		for j := 0; j <= s.NV; j++ {
			for i := 0; i <= s.NU; i++ {
				m.NodeIDs = append(m.NodeIDs, s.Part*100000+int64(len(m.Coords)-int(base))+1)
				m.Coords = append(m.Coords, s.At(i, j))
			}
		}
		for j := 0; j < s.NV; j++ {
			for i := 0; i < s.NU; i++ {
				n0 := base + int32(j*(s.NU+1)+i)
				m.Conn = append(m.Conn, n0, n0+1, n0+int32(s.NU)+2, n0+int32(s.NU)+1)
				m.ElemStart = append(m.ElemStart, int32(len(m.Conn)))
				m.ElemIDs = append(m.ElemIDs, s.Part*100000+int64(len(m.ElemIDs))+1)
				m.ElemPart = append(m.ElemPart, int32(pi))
			}
		}
	}
	if err := m.Index(); err != nil {
		panic(err)
	}
	return m
}

// cylinder returns a sheet on the cylinder of radius r about the x axis:
// nu elements of h mm along x from 0, nv elements of da radians round
// from angle a0 (angle 0 at the top, +y side for positive angles).
func cylinder(part int64, t, r float64, nu, nv int, h, a0, da float64) surface {
	return surface{Part: part, T: t, NU: nu, NV: nv, At: func(i, j int) r3.Vec {
		a := a0 + float64(j)*da
		return r3.Vec{X: float64(i) * h, Y: r * math.Sin(a), Z: r * math.Cos(a)}
	}}
}

// auditAll builds welds at pts with o and returns every finding of the
// audit, as "code joints parts" lines, with the report.
func auditAll(t *testing.T, m *geom.Mesh, pts []r3.Vec, o joints.BuildOptions) ([]string, *Report) {
	t.Helper()
	rep := audit(t, m, build(t, m, weldsAt(pts...), o), nil, o)
	return summary(rep.Findings), rep
}

// ids returns "W<from>" to "W<to>".
func ids(from, to int) []string {
	var out []string
	for i := from; i <= to; i++ {
		out = append(out, fmt.Sprintf("W%d", i))
	}
	return out
}

func seamLine(ws []string, parts string) string {
	return fmt.Sprintf("seam [%s] %s", strings.Join(ws, " "), parts)
}

// Seams on a strip, by counting nodes (the rule the user states: at
// least one node left unconnected between two welds, else the flange
// acts as if seam-welded). Two 0.8 mm sheets 200 x 50 mm, 5 mm quads,
// nodes facing. Minimum spacing at 0.8 mm: 12.7 + (0.8 - 0.79) / (1.02 -
// 0.79) x 6.3 = 12.974 mm (resistance welding manufacturers' table,
// interpolated, joints.MinSpacing); nugget 5 sqrt(0.8) = 4.47 mm
// (common practice).
func TestReviewSeamCounting(t *testing.T) {
	np := joints.BuildOptions{Attach: joints.NodePair}
	ip := joints.BuildOptions{}
	var pitch5 []string
	for i := 1; i < 6; i++ {
		pitch5 = append(pitch5, fmt.Sprintf("pitch-short [W%d W%d] [1 2]", i, i+1))
	}
	cases := []struct {
		name string
		o    joints.BuildOptions
		xs   []float64
		want []string
	}{
		// Every facing node pair from x = 50 to 100 (11 nodes): one seam
		// of all 11, and nothing else (its pitch is the seam's).
		{"node pairs on every node", np, steps(50, 5, 11), []string{seamLine(ids(1, 11), "[1 2]")}},
		// Every other node: one free node between welds, no seam; 10 mm
		// < 12.974 mm, so each of the 5 consecutive pairs is short.
		{"node pairs on every other node", np, steps(50, 10, 6), pitch5},
		// Every third node: two free nodes between, 15 mm > 12.974 mm.
		{"node pairs on every third node", np, steps(50, 15, 5), nil},
		// Interpolated in every other element: each weld ties its
		// element's 4 nodes, and the element between two welds holds a
		// tied node of each: no node on the line stays free, a seam.
		{"interpolated in every other element", ip, steps(52.5, 10, 6), []string{seamLine(ids(1, 6), "[1 2]")}},
		// Two free elements between (x = 52.5, 67.5, ...): node x = 60
		// stays free; 15 mm > 12.974 mm.
		{"interpolated in every third element", ip, steps(52.5, 15, 5), nil},
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			m := plates(flangeMesh()...)
			got, _ := auditAll(t, m, along(tc.xs...), tc.o)
			if !slices.Equal(got, tc.want) {
				t.Errorf("findings\n %v\nwant\n %v", got, tc.want)
			}
		})
	}
}

// Two welds inside one element (a coarse 20 mm mesh, 1 mm sheets): they
// share its four nodes' element, so the flange cannot open between them:
// a seam of two, 10 mm long; its pitch (10 mm < 18.452 mm) is left to
// the seam, and the nuggets (5 mm) do not overlap.
func TestReviewWeldsShareAnElement(t *testing.T) {
	m := plates(plate{Part: 1, T: 1, NX: 10, NY: 3, H: 20}, plate{Part: 2, T: 1, Z: 1, NX: 10, NY: 3, H: 20})
	got, _ := auditAll(t, m, []r3.Vec{{X: 45, Y: 30, Z: 0.5}, {X: 55, Y: 30, Z: 0.5}}, joints.BuildOptions{})
	if want := []string{"seam [W1 W2] [1 2]"}; !slices.Equal(got, want) {
		t.Errorf("findings %v, want %v", got, want)
	}
}

// Welds at exactly the minimum spacing meet it; a hair below does not.
// 1.02 mm sheets: 19.0 mm, the table's own row (two sheets); three
// 1.02 mm sheets: 19.0 x 1.3 = 24.7 mm (the note of such tables).
// The welds sit in elements with two free elements between, so no seam.
func TestReviewPitchAtTheLimit(t *testing.T) {
	two := []plate{{Part: 1, T: 1.02, NX: 40, NY: 10, H: 5}, {Part: 2, T: 1.02, Z: 1.02, NX: 40, NY: 10, H: 5}}
	three := append(slices.Clone(two), plate{Part: 3, T: 1.02, Z: 2.04, NX: 40, NY: 10, H: 5})
	for _, tc := range []struct {
		name   string
		plates []plate
		z, d   float64
		want   []string
	}{
		{"two sheets at 19.0 mm", two, 0.51, 19.0, nil},
		{"two sheets at 19.0 mm less 1e-7", two, 0.51, 19.0 - 1e-7, nil}, // within joints.LengthRoundoff
		{"two sheets at 18.99 mm", two, 0.51, 18.99, []string{"pitch-short [W1 W2] [1 2]"}},
		{"three sheets at 24.7 mm", three, 1.02, 24.7, nil},
		// One finding for the pair of welds, under the stack's first part
		// pair (a three-sheet weld joins two pairs; it is one defect).
		{"three sheets at 24.69 mm", three, 1.02, 24.69, []string{"pitch-short [W1 W2] [1 2]"}},
	} {
		t.Run(tc.name, func(t *testing.T) {
			m := plates(tc.plates...)
			got, _ := auditAll(t, m, []r3.Vec{{X: 60.5, Y: 25, Z: tc.z}, {X: 60.5 + tc.d, Y: 25, Z: tc.z}}, joints.BuildOptions{})
			if !slices.Equal(got, tc.want) {
				t.Errorf("findings %v, want %v", got, tc.want)
			}
		})
	}
}

// Pitch on a curved flange is the straight distance between the welds'
// points on the sheet (the chord), not the length along the sheet (the
// arc): two 1.02 mm sheets bent to radii 20 and 21.02 mm about the x
// axis, welds 19.5 mm apart along the arc of the mid radius 20.51 mm lie
// 2 x 20 x sin(19.5 / 2 / 20.51)... apart on the inner sheet's arc
// (closed form: chord = 2 R sin(s / 2R)); the audit takes the least
// over the shared sheets, on the inner one, and 18.77 mm < 19.0 mm is
// short although the arc is not. Along x (a straight line on the same
// sheets) 19.5 mm is not short.
func TestReviewPitchOnACurvedFlange(t *testing.T) {
	const r1, t1 = 20.0, 1.02
	r2 := r1 + t1
	rm := (r1 + r2) / 2
	da := 1.0 / r1 // 1 mm elements round the inner sheet
	m := surfaces(cylinder(1, t1, r1, 40, 80, 2.5, -40*da, da), cylinder(2, t1, r2, 40, 80, 2.5, -40*da, da))
	s := 19.5 // along the mid-radius arc
	a := s / rm
	chord := 2 * r1 * math.Sin(a/2) // on the inner sheet
	if !(chord < 19.0 && s*r1/rm > 19.0-0.5) {
		t.Fatalf("chord %g", chord)
	}
	at := func(x, ang float64) r3.Vec { return r3.Vec{X: x, Y: rm * math.Sin(ang), Z: rm * math.Cos(ang)} }
	got, rep := auditAll(t, m, []r3.Vec{at(50.3, -a/2), at(50.3, a/2)}, joints.BuildOptions{})
	if want := []string{"pitch-short [W1 W2] [1 2]"}; !slices.Equal(got, want) {
		t.Fatalf("round the bend: %v, want %v", got, want)
	}
	if msg := rep.Findings[0].Message; !strings.Contains(msg, " are "+joints.MM(chord)[:5]) {
		t.Errorf("%q does not give the chord %g mm", msg, chord)
	}
	got, _ = auditAll(t, m, []r3.Vec{at(30.3, 0.3*da), at(49.8, 0.3*da)}, joints.BuildOptions{})
	if len(got) != 0 {
		t.Errorf("along the generator: %v, want none", got)
	}
}

// Duplicates: nuggets overlap when the centres lie closer than the mean
// nugget diameter (5 sqrt(1) = 5 mm on 1 mm sheets, common practice).
// A 1 mm mesh keeps the welds' elements apart (no seam). Just inside the
// diameter: a duplicate, and no pitch-short (one finding for one
// defect); at or just outside it: no duplicate, but 5 mm < 18.452 mm
// (minimum spacing at 1 mm, interpolated) is short.
func TestReviewDuplicateTolerance(t *testing.T) {
	for _, tc := range []struct {
		d    float64
		want string
	}{
		{0, "duplicate [W1 W2] [1 2]"},
		{4.999, "duplicate [W1 W2] [1 2]"},
		{5, "pitch-short [W1 W2] [1 2]"},
		{5.001, "pitch-short [W1 W2] [1 2]"},
	} {
		for _, o := range []joints.BuildOptions{{}, {Attach: joints.NodePair}} {
			if o.Attach == joints.NodePair && tc.d != 0 {
				continue // node pairs sit on the 1 mm grid
			}
			m := plates(plate{Part: 1, T: 1, NX: 100, NY: 20, H: 1}, plate{Part: 2, T: 1, Z: 1, NX: 100, NY: 20, H: 1})
			got, _ := auditAll(t, m, []r3.Vec{{X: 40.5, Y: 10.5, Z: 0.5}, {X: 40.5 + tc.d, Y: 10.5, Z: 0.5}}, o)
			if !slices.Equal(got, []string{tc.want}) {
				t.Errorf("%v, %g mm apart: %v, want [%s]", o.Attach, tc.d, got, tc.want)
			}
		}
	}
}

// The same node pair under two ids is one duplicate finding (not one
// per rule that sees it), and a third definition of it makes three pairs.
func TestReviewSameNodePairTwice(t *testing.T) {
	m := plates(flangeMesh()...)
	a, b := itoa(nodeAt(m, 1, 50, 25)), itoa(nodeAt(m, 2, 50, 25))
	far := itoa(nodeAt(m, 1, 150, 25)) + "," + itoa(nodeAt(m, 2, 150, 25))
	for _, tc := range []struct {
		csv  string
		want []string
	}{
		{"id,node_a,node_b\nA,%[1]s,%[2]s\nB,%[2]s,%[1]s\nC,%[3]s\n", []string{"duplicate [A B] [1 2]"}},
		{"id,node_a,node_b\nA,%[1]s,%[2]s\nB,%[2]s,%[1]s\nC,%[1]s,%[2]s\nD,%[3]s\n", []string{"duplicate [A B] [1 2]", "duplicate [A C] [1 2]", "duplicate [B C] [1 2]"}},
	} {
		rep := audit(t, m, fromCSV(t, m, fmt.Sprintf(tc.csv, a, b, far), joints.BuildOptions{}), nil, joints.BuildOptions{})
		if got := summary(rep.Findings); !slices.Equal(got, tc.want) {
			t.Errorf("%v, want %v", got, tc.want)
		}
	}
}

// bench is a base plate (part 1, 200 x 100 mm) and a strip on it (part
// 2, 200 x 20 mm at y = 40 to 60), 1 mm sheets in contact, 5 mm quads.
func bench(more ...plate) *geom.Mesh {
	return plates(append([]plate{
		{Part: 1, T: 1, NX: 40, NY: 20, H: 5},
		{Part: 2, T: 1, Z: 1, NX: 40, NY: 4, H: 5, Y0: 40},
	}, more...)...)
}

// mechOf returns the mechanism findings with their motions as
// "parts kind count" lines.
func mechOf(fs []joints.Finding) []string {
	var out []string
	for _, f := range ofCode(fs, joints.CodeMechanism) {
		out = append(out, fmt.Sprintf("%v %s %d", f.Parts, f.Motion.Kind, f.Motion.Count))
	}
	return out
}

// Parts held by welds that couple translations only (ball joints),
// against classical rigid-body kinematics (from memory, as in
// REFERENCES.md): one ball joint leaves 3 rotations about its point
// (a pivot), two or more on one line 1 rotation about the line, three
// not on one line none. Welds between the 1 mm sheets at z = 0.5, the
// strip on y = 40 to 60.
func TestReviewHinges(t *testing.T) {
	tr := joints.BuildOptions{SpotDOFs: joints.Translations}
	cases := []struct {
		name string
		pts  []r3.Vec
		o    joints.BuildOptions
		want []string // mechanisms
		axis r3.Vec   // of a rotation; zero for none
		on   r3.Vec   // a point of the axis
	}{
		{"one weld", []r3.Vec{{X: 100, Y: 50, Z: 0.5}}, tr, []string{"[2 1] pivot 3"}, r3.Vec{}, r3.Vec{}},
		{"one weld, six degrees of freedom", []r3.Vec{{X: 100, Y: 50, Z: 0.5}}, joints.BuildOptions{}, nil, r3.Vec{}, r3.Vec{}},
		{"two welds", []r3.Vec{{X: 40, Y: 50, Z: 0.5}, {X: 160, Y: 50, Z: 0.5}}, tr, []string{"[2 1] rotation 1"}, r3.Vec{X: 1}, r3.Vec{X: 40, Y: 50, Z: 0.5}},
		{"three collinear welds, slanted line", []r3.Vec{{X: 20, Y: 42.5, Z: 0.5}, {X: 100, Y: 50, Z: 0.5}, {X: 180, Y: 57.5, Z: 0.5}}, tr,
			[]string{"[2 1] rotation 1"}, r3.Unit(r3.Vec{X: 160, Y: 15}), r3.Vec{X: 100, Y: 50, Z: 0.5}},
		// 1e-4 mm off a 160 mm line: 6e-7 of the welds' size, below
		// MotionTolerance (1e-5): the row still turns.
		{"three welds 1e-4 mm off one line", []r3.Vec{{X: 20, Y: 50, Z: 0.5}, {X: 100, Y: 50.0001, Z: 0.5}, {X: 180, Y: 50, Z: 0.5}}, tr,
			[]string{"[2 1] rotation 1"}, r3.Vec{X: 1}, r3.Vec{X: 20, Y: 50, Z: 0.5}},
		{"three welds 3 mm off one line", []r3.Vec{{X: 20, Y: 50, Z: 0.5}, {X: 100, Y: 53, Z: 0.5}, {X: 180, Y: 50, Z: 0.5}}, tr, nil, r3.Vec{}, r3.Vec{}},
		{"two rows", []r3.Vec{{X: 20, Y: 45, Z: 0.5}, {X: 180, Y: 45, Z: 0.5}, {X: 100, Y: 55, Z: 0.5}}, tr, nil, r3.Vec{}, r3.Vec{}},
	}
	for _, tc := range cases {
		for _, at := range []joints.Attach{joints.Interpolated, joints.NodePair} {
			o := tc.o
			o.Attach = at
			if at == joints.NodePair && (strings.Contains(tc.name, "off") || strings.Contains(tc.name, "slanted")) {
				continue // node pairs snap to the grid
			}
			t.Run(fmt.Sprintf("%s/%v", tc.name, at), func(t *testing.T) {
				m := bench()
				_, rep := auditAll(t, m, tc.pts, o)
				if got := mechOf(rep.Findings); !slices.Equal(got, tc.want) {
					t.Fatalf("mechanisms %v, want %v (all %v)", got, tc.want, summary(rep.Findings))
				}
				if len(rep.Findings) != len(tc.want) {
					t.Errorf("findings %v, want only the mechanisms", summary(rep.Findings))
				}
				k := rep.Kinematics
				free := 0
				for _, w := range tc.want {
					free += int(w[len(w)-1] - '0')
				}
				if k.Groups != 1 || k.Mechanisms != free || k.RigidBodyModes != 6+free || k.Unrestrained != 0 {
					t.Errorf("kinematics %+v, want %d free motions", k, free)
				}
				if tc.axis == (r3.Vec{}) {
					return
				}
				mo := ofCode(rep.Findings, joints.CodeMechanism)[0].Motion
				if c := math.Abs(r3.Dot(mo.Direction, tc.axis)); math.Abs(c-1) > 1e-6 {
					t.Errorf("axis %v, want along %v", mo.Direction, tc.axis)
				}
				if d := r3.Norm(r3.Cross(r3.Sub(mo.Point, tc.on), tc.axis)); d > 1e-3 {
					t.Errorf("axis through %v, %g mm off the weld line", mo.Point, d)
				}
			})
		}
	}
}

// Collinear on a curved part: two sheets on cylinders of radii 100 and
// 101 mm about the x axis. Three ball-joint welds along one generator
// (a straight line on the curved sheet) leave the turn about it; three
// round the bend at one x lie on an arc, not a line, and hold it.
func TestReviewHingeOnACurvedPart(t *testing.T) {
	tr := joints.BuildOptions{SpotDOFs: joints.Translations}
	da := 5.0 / 100
	mesh := func() *geom.Mesh {
		return surfaces(cylinder(1, 1, 100, 40, 20, 5, -10*da, da), cylinder(2, 1, 101, 40, 20, 5, -10*da, da))
	}
	at := func(x, ang float64) r3.Vec { return r3.Vec{X: x, Y: 100.5 * math.Sin(ang), Z: 100.5 * math.Cos(ang)} }
	_, rep := auditAll(t, mesh(), []r3.Vec{at(22, 0.2), at(101, 0.2), at(178, 0.2)}, tr)
	// The outer sheet is the larger (101/100 of the inner's area): it is
	// held, the inner one moves.
	if got := mechOf(rep.Findings); !slices.Equal(got, []string{"[1 2] rotation 1"}) || len(rep.Findings) != 1 {
		t.Fatalf("along a generator: %v", summary(rep.Findings))
	}
	mo := rep.Findings[0].Motion
	// The weld ends lie on the flat elements, up to their sagitta
	// 100 (1 - cos 0.025) = 0.031 mm inside the cylinders.
	if math.Abs(mo.Direction.X-1) > 1e-6 || math.Abs(mo.Point.Y-100.5*math.Sin(0.2)) > 0.04 || math.Abs(mo.Point.Z-100.5*math.Cos(0.2)) > 0.04 {
		t.Errorf("motion %+v, want the turn about the generator at angle 0.2", mo)
	}
	if _, rep = auditAll(t, mesh(), []r3.Vec{at(102, -0.3), at(102, 0.01), at(102, 0.3)}, tr); len(rep.Findings) != 0 {
		t.Errorf("round the bend: %v, want none", summary(rep.Findings))
	}
}

// A loose part, and parts held through a chain: the base holds the strip
// (part 2) rigidly (three welds not on one line); a plate on the strip
// (part 3) hangs on one row along x, a plate on that (part 4) on one row
// along y: each turns about its own row relative to the part below it,
// 2 free motions in all (the assembly's 6 rigid-body modes besides); a
// part 5 with no weld is free (6 more). The row of 3-4 is 15 mm long,
// short of 18.452 mm (1 mm sheets); its welds' attachments keep a free
// node between them (y = 50), so it is no seam.
func TestReviewChain(t *testing.T) {
	tr := joints.BuildOptions{SpotDOFs: joints.Translations}
	m := bench(
		plate{Part: 3, T: 1, Z: 2, NX: 20, NY: 4, H: 5, X0: 60, Y0: 40},
		plate{Part: 4, T: 1, Z: 3, NX: 4, NY: 4, H: 5, X0: 120, Y0: 40},
		plate{Part: 5, T: 1, Z: 200, NX: 2, NY: 2, H: 5},
	)
	pts := []r3.Vec{
		{X: 20.5, Y: 45.5, Z: 0.5}, {X: 180.5, Y: 45.5, Z: 0.5}, {X: 120.5, Y: 55.5, Z: 0.5}, // 1-2
		{X: 62.5, Y: 42.5, Z: 1.5}, {X: 92.5, Y: 42.5, Z: 1.5}, // 2-3
		{X: 132.5, Y: 42.5, Z: 2.5}, {X: 132.5, Y: 57.5, Z: 2.5}, // 3-4
	}
	o := tr
	o.Reach = 0.9 // each weld on its own pair of sheets
	got, rep := auditAll(t, m, pts, o)
	want := []string{"pitch-short [W6 W7] [3 4]", "free-part [] [5]", "mechanism [W4 W5] [3 2]", "mechanism [W6 W7] [4 3]"}
	if !slices.Equal(got, want) {
		t.Errorf("findings\n %v\nwant\n %v", got, want)
	}
	if k := rep.Kinematics; k.Groups != 2 || k.Mechanisms != 2 || k.RigidBodyModes != 14 {
		t.Errorf("kinematics %+v, want 2 groups, 2 mechanism motions, 14 modes", k)
	}
}

// A three-sheet stack (1, 2, 3, 1 mm each) joined by three-sheet welds
// on translations: on one row each of the two upper sheets turns about
// it relative to the sheet below (2 free motions); three welds not on a
// line hold the stack. Pitch on three sheets: 18.452 x 1.3 = 23.99 mm;
// the welds are 40 mm and more apart.
func TestReviewThreeSheetStack(t *testing.T) {
	tr := joints.BuildOptions{SpotDOFs: joints.Translations}
	stack := func() *geom.Mesh {
		return plates(plate{Part: 1, T: 1, NX: 40, NY: 10, H: 5}, plate{Part: 2, T: 1, Z: 1, NX: 40, NY: 10, H: 5}, plate{Part: 3, T: 1, Z: 2, NX: 40, NY: 10, H: 5})
	}
	_, rep := auditAll(t, stack(), []r3.Vec{{X: 50.5, Y: 25.5, Z: 1}, {X: 150.5, Y: 25.5, Z: 1}}, tr)
	if got := mechOf(rep.Findings); !slices.Equal(got, []string{"[2 1] rotation 1", "[3 2] rotation 1"}) || len(rep.Findings) != 2 || rep.Kinematics.Mechanisms != 2 {
		t.Errorf("one row: %v %+v", summary(rep.Findings), rep.Kinematics)
	}
	if _, rep = auditAll(t, stack(), []r3.Vec{{X: 50.5, Y: 15.5, Z: 1}, {X: 150.5, Y: 15.5, Z: 1}, {X: 100.5, Y: 35.5, Z: 1}}, tr); len(rep.Findings) != 0 {
		t.Errorf("three welds: %v", summary(rep.Findings))
	}
}

// Renumbering the parts does not change which part a finding names as
// moving or as free: the strip (200 x 20 mm) on one row of ball-joint
// welds turns against the base plate (200 x 100 mm), whichever id is
// lower; of two welded pairs of two parts each, the pair of smaller
// area is the free one (areas by hand: 200 x 100 + 200 x 20 = 24,000
// mm² against 2 x 40 x 40 = 3,200 mm²).
func TestReviewRenumberedParts(t *testing.T) {
	tr := joints.BuildOptions{SpotDOFs: joints.Translations}
	for _, ids := range [][4]int64{{1, 2, 3, 4}, {9, 3, 2, 1}} {
		base, strip, lo, hi := ids[0], ids[1], ids[2], ids[3]
		m := plates(
			plate{Part: base, T: 1, NX: 40, NY: 20, H: 5},
			plate{Part: strip, T: 1, Z: 1, NX: 40, NY: 4, H: 5, Y0: 40},
			plate{Part: lo, T: 1, Z: 100, NX: 8, NY: 8, H: 5},
			plate{Part: hi, T: 1, Z: 101, NX: 8, NY: 8, H: 5},
		)
		pts := []r3.Vec{{X: 20.5, Y: 50.5, Z: 0.5}, {X: 100.5, Y: 50.5, Z: 0.5}, {X: 180.5, Y: 50.5, Z: 0.5}, // one row
			{X: 10.5, Y: 10.5, Z: 100.5}, {X: 30.5, Y: 10.5, Z: 100.5}, {X: 20.5, Y: 30.5, Z: 100.5}} // three not on a line
		o := tr
		o.Reach = 0.9
		got, _ := auditAll(t, m, pts, o)
		want := []string{
			fmt.Sprintf("free-part [W4 W5 W6] [%d %d]", min(lo, hi), max(lo, hi)),
			fmt.Sprintf("mechanism [W1 W2 W3] [%d %d]", strip, base),
		}
		if !slices.Equal(got, want) {
			t.Errorf("ids %v: %v, want %v", ids, got, want)
		}
	}
}
