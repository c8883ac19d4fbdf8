package spot

import (
	"math"
	"slices"
	"testing"

	"gonum.org/v1/gonum/spatial/r3"

	"github.com/joinery-cae/joinery/geom"
	"github.com/joinery-cae/joinery/joints"
)

var offsetForm = joints.BuildOptions{Links: joints.OffsetLinks}

func near(a, b r3.Vec, tol float64) bool { return r3.Norm(r3.Sub(a, b)) <= tol }

// checkOffsetForm checks the structure of an offset-form connector: per
// pair of consecutive sheets an offset link from each sheet's end to its
// faying point, then the faying joint between the two faying points,
// with node references and ids that match.
func checkOffsetForm(t *testing.T, c joints.Connector) {
	t.Helper()
	if n := len(c.Stack.Sheets); len(c.Links) != 3*(n-1) {
		t.Fatalf("%d links for %d sheets, want %d", len(c.Links), n, 3*(n-1))
	}
	for i := 0; i+1 < len(c.Stack.Sheets); i++ {
		la, lb, fj := c.Links[3*i], c.Links[3*i+1], c.Links[3*i+2]
		if la.Kind != joints.OffsetLink || lb.Kind != joints.OffsetLink || fj.Kind != joints.FayingJoint {
			t.Errorf("pair %d: kinds %v %v %v", i, la.Kind, lb.Kind, fj.Kind)
		}
		if la.From != i || la.To != i+1 || lb.From != i+1 || lb.To != i || fj.From != i || fj.To != i+1 {
			t.Errorf("pair %d: sheets %d>%d %d>%d %d-%d", i, la.From, la.To, lb.From, lb.To, fj.From, fj.To)
		}
		if la.StartNode != c.EndIDs[i] || lb.StartNode != c.EndIDs[i+1] || !la.NewEnd || !lb.NewEnd ||
			la.EndNode != la.NewNode || lb.EndNode != lb.NewNode || fj.StartNode != la.NewNode || fj.EndNode != lb.NewNode {
			t.Errorf("pair %d: nodes %d>%d %d>%d %d-%d (ends %v)", i, la.StartNode, la.EndNode, lb.StartNode, lb.EndNode, fj.StartNode, fj.EndNode, c.EndIDs)
		}
		if fj.Start != la.End || fj.End != lb.End || la.Start != c.Ends[i].Point || lb.Start != c.Ends[i+1].Point {
			t.Errorf("pair %d: points do not chain", i)
		}
		if la.DOFs != joints.AllDOFs || lb.DOFs != joints.AllDOFs || fj.DOFs != c.DOFs {
			t.Errorf("pair %d: dofs %v %v %v", i, la.DOFs, lb.DOFs, fj.DOFs)
		}
	}
}

// Flat mid-surface sheets in contact: every offset is half its sheet's
// thickness (the mid-surface lies half the thickness from either face;
// shell geometry), along the normal toward the other sheet, and the two
// faying points coincide on the faying plane. Normals flipped on one
// sheet change nothing.
func TestOffsetLinksFlat(t *testing.T) {
	for _, flip := range []bool{false, true} {
		// 0.8 mm at z=0, 1.2 mm at z=1 (contact: (0.8+1.2)/2 = 1), 1.5 mm
		// at z=2.35: the faying planes are z=0.4 and z=1.6.
		m := plates(plate{Part: 1, T: 0.8, NX: 10, NY: 10, H: 5}, plate{Part: 2, T: 1.2, Z: 1, NX: 10, NY: 10, H: 5, FlipOrder: flip},
			plate{Part: 3, T: 1.5, Z: 2.35, NX: 10, NY: 10, H: 5})
		for _, a := range []joints.Attach{joints.Interpolated, joints.Patch, joints.NodePair} {
			o := offsetForm
			o.Attach = a
			c := buildOne1(t, m, joints.Joint{ID: "1", Point: r3.Vec{X: 21.5, Y: 26.5, Z: 1}}, o)
			if c.Status != joints.Built {
				t.Fatalf("flip %v %v: %v %v", flip, a, c.Status, c.Findings)
			}
			if a != joints.NodePair {
				checkOffsetForm(t, c)
			}
			// Faying planes by pair of parts, thickness by part.
			fayingZ := map[[2]int64]float64{{1, 2}: 0.4, {2, 3}: 1.6}
			thick := map[int64]float64{1: 0.8, 2: 1.2, 3: 1.5}
			for _, l := range c.Links {
				if l.Kind != joints.OffsetLink {
					continue
				}
				from, to := c.Stack.Sheets[l.From].Part, c.Stack.Sheets[l.To].Part
				fz := fayingZ[joints.PairKey(from, to)]
				if l.Length != thick[from]/2 || math.Abs(l.End.Z-fz) > 1e-12 {
					t.Errorf("flip %v %v offset of %d toward %d: length %g (want t/2 = %g exactly), faying z %g (want %g)", flip, a, from, to, l.Length, thick[from]/2, l.End.Z, fz)
				}
				if want := math.Copysign(1, fz-l.Start.Z); !near(l.Direction, r3.Vec{Z: want}, 1e-12) {
					t.Errorf("flip %v %v offset of %d: direction %v", flip, a, from, l.Direction)
				}
			}
			for _, fj := range []joints.Link{c.Links[2], c.Links[5]} {
				if fj.Length > 1e-12 || fj.Mismatch > 1e-12 {
					t.Errorf("flip %v %v: faying joint length %g mismatch %g, want 0", flip, a, fj.Length, fj.Mismatch)
				}
			}
		}
	}
}

// Outer-face meshes: the offset is 0 for a sheet meshed on its faying
// face and t for one meshed on its far face.
func TestOffsetLinksOuterFaces(t *testing.T) {
	// Part 1 (1 mm) meshed on its top face at z=0: faying face, offset 0.
	// Part 2 (1.5 mm) meshed on its top face at z=1.5: its faying face is
	// its bottom, offset 1.5 = t, downwards.
	m := plates(plate{Part: 1, T: 1, NX: 10, NY: 10, H: 5, Surface: geom.SurfaceTop},
		plate{Part: 2, T: 1.5, Z: 1.5, NX: 10, NY: 10, H: 5, Surface: geom.SurfaceTop})
	c := buildOne1(t, m, joints.Joint{ID: "1", Point: r3.Vec{X: 21.5, Y: 26.5, Z: 0.7}}, offsetForm)
	if c.Status != joints.Built {
		t.Fatalf("%v %v", c.Status, c.Findings)
	}
	checkOffsetForm(t, c)
	if l := c.Links[0]; l.Length != 0 || l.End != l.Start || l.Direction != (r3.Vec{}) {
		t.Errorf("faying-face mesh: offset %g, direction %v; want 0", l.Length, l.Direction)
	}
	if l := c.Links[1]; l.Length != 1.5 || math.Abs(l.End.Z) > 1e-12 || !near(l.Direction, r3.Vec{Z: -1}, 1e-12) {
		t.Errorf("far-face mesh: offset %g to z %g, direction %v; want t = 1.5 down to z 0", l.Length, l.End.Z, l.Direction)
	}
	if fj := c.Links[2]; fj.Length > 1e-12 || math.Abs(fj.MidGap-1.25) > 1e-12 || fj.Contact != 1.25 {
		t.Errorf("faying joint %+v", fj)
	}
	// The gap form of the same stack keeps its meaning: one link between
	// the meshes, 1.5 mm long, mid-surfaces 1.25 mm apart.
	g := buildOne1(t, m, joints.Joint{ID: "1", Point: r3.Vec{X: 21.5, Y: 26.5, Z: 0.7}}, joints.BuildOptions{})
	if len(g.Links) != 1 || g.Links[0].Kind != joints.GapLink || math.Abs(g.Links[0].Length-1.5) > 1e-12 || math.Abs(g.Links[0].MidGap-1.25) > 1e-12 {
		t.Errorf("gap form %+v", g.Links)
	}
}

// cylinder returns a cylindrical sheet of mid radius r about the z axis,
// n quads around (the first from angle a0) and nz quads of height h
// along z: quads with two generator edges and two chords, planar.
func cylinder(part int64, t, r float64, n int, a0 float64, nz int, h float64) *geom.Mesh {
	m := &geom.Mesh{Parts: []geom.Part{{ID: part, Thickness: t}}, ElemStart: []int32{0}}
	for j := 0; j <= nz; j++ {
		for i := range n {
			a := a0 + 2*math.Pi*float64(i)/float64(n)
			m.NodeIDs = append(m.NodeIDs, part*100000+int64(len(m.NodeIDs))+1)
			m.Coords = append(m.Coords, r3.Vec{X: r * math.Cos(a), Y: r * math.Sin(a), Z: float64(j) * h})
		}
	}
	for j := range nz {
		for i := range n {
			n0, n1 := int32(j*n+i), int32(j*n+(i+1)%n)
			m.Conn = append(m.Conn, n0, n1, n1+int32(n), n0+int32(n)) // normal outwards
			m.ElemStart = append(m.ElemStart, int32(len(m.Conn)))
			m.ElemIDs = append(m.ElemIDs, part*100000+int64(len(m.ElemIDs))+1)
			m.ElemPart = append(m.ElemPart, 0)
		}
	}
	return m
}

func cylinders(t *testing.T, cs ...*geom.Mesh) *geom.Mesh {
	t.Helper()
	m, _, err := geom.Merge(cs, false)
	if err != nil {
		t.Fatal(err)
	}
	if err := m.Index(); err != nil {
		t.Fatal(err)
	}
	return m
}

// Two concentric cylindrical sheets in contact, meshed alike: at a quad
// centre the quad's normal is radial (symmetry), so each offset runs
// radially, t/2 long exactly, and the faying points lie on one radius at
// the closed-form distances r1·cos(π/n) + t1/2 and r2·cos(π/n) - t2/2
// from the axis (the quads' centres lie at r·cos(π/n), chord geometry).
func TestOffsetLinksCylinder(t *testing.T) {
	const (
		r1, t1 = 50.0, 1.0
		t2     = 1.5
		r2     = r1 + (t1+t2)/2 // in contact
		n      = 60
	)
	m := cylinders(t, cylinder(1, t1, r1, n, 0, 10, 5), cylinder(2, t2, r2, n, 0, 10, 5))
	a := 2 * math.Pi * 10.5 / n // the centre of quad 10 of each ring
	rw := (r1 + r2) / 2 * math.Cos(math.Pi/n)
	c := buildOne1(t, m, joints.Joint{ID: "C", Point: r3.Vec{X: rw * math.Cos(a), Y: rw * math.Sin(a), Z: 22.5}}, offsetForm)
	if c.Status != joints.Built {
		t.Fatalf("%v %v", c.Status, c.Findings)
	}
	checkOffsetForm(t, c)
	radial := r3.Vec{X: math.Cos(a), Y: math.Sin(a)}
	la, lb, fj := c.Links[0], c.Links[1], c.Links[2]
	if la.Length != t1/2 || lb.Length != t2/2 {
		t.Errorf("offsets %g and %g, want t/2 = %g and %g exactly", la.Length, lb.Length, t1/2, t2/2)
	}
	if !near(la.Direction, radial, 1e-12) || !near(lb.Direction, r3.Scale(-1, radial), 1e-12) {
		t.Errorf("directions %v %v, want radial %v", la.Direction, lb.Direction, radial)
	}
	wantA := r3.Add(r3.Scale(r1*math.Cos(math.Pi/n)+t1/2, radial), r3.Vec{Z: 22.5})
	wantB := r3.Add(r3.Scale(r2*math.Cos(math.Pi/n)-t2/2, radial), r3.Vec{Z: 22.5})
	if !near(la.End, wantA, 1e-9) || !near(lb.End, wantB, 1e-9) {
		t.Errorf("faying points %v %v, want %v %v", la.End, lb.End, wantA, wantB)
	}
	// Along the radius they lie (r2-r1)(cos(π/n)-1) apart: the chords of
	// the two rings sag by different amounts; across it, not at all.
	if fj.Mismatch > 1e-9 || math.Abs(fj.Length-(r2-r1)*(1-math.Cos(math.Pi/n))) > 1e-9 {
		t.Errorf("faying joint length %g mismatch %g", fj.Length, fj.Mismatch)
	}
	if slices.Contains(codes(c), joints.CodeOffsetMismatch) {
		t.Errorf("findings %v", c.Findings)
	}
}

// The same rings meshed on their outer faces (normals outwards: their
// top faces): the inner ring's mesh is its faying face, offset 0; the
// outer ring's is its far face, offset t2 inwards, exactly. At the quad
// centre the normal is radial, so the faying points lie on one radius,
// at (r1 + t1/2)·cos(π/n) and (r2 + t2/2)·cos(π/n) - t2 from the axis;
// with r2 - r1 = (t1+t2)/2 they lie t2·(1 - cos(π/n)) apart along it
// (chord geometry; hand calculation) and not at all across it.
func TestOffsetLinksCylinderOuterFaces(t *testing.T) {
	const (
		r1, t1 = 50.0, 1.0
		t2     = 1.5
		r2     = r1 + (t1+t2)/2 // mid radii, in contact
		n      = 60
	)
	m := cylinders(t, cylinder(1, t1, r1+t1/2, n, 0, 10, 5), cylinder(2, t2, r2+t2/2, n, 0, 10, 5))
	for i := range m.Parts {
		m.Parts[i].Surface = geom.SurfaceTop
	}
	a := 2 * math.Pi * 10.5 / n // the centre of quad 10 of each ring
	rw := (r1 + t1/2) * math.Cos(math.Pi/n)
	c := buildOne1(t, m, joints.Joint{ID: "C", Point: r3.Vec{X: rw * math.Cos(a), Y: rw * math.Sin(a), Z: 22.5}}, offsetForm)
	if c.Status != joints.Built {
		t.Fatalf("%v %v", c.Status, c.Findings)
	}
	checkOffsetForm(t, c)
	radial := r3.Vec{X: math.Cos(a), Y: math.Sin(a)}
	cos := math.Cos(math.Pi / n)
	want := map[int64]struct {
		length float64
		end    r3.Vec
	}{
		1: {0, r3.Add(r3.Scale((r1+t1/2)*cos, radial), r3.Vec{Z: 22.5})},
		2: {t2, r3.Add(r3.Scale((r2+t2/2)*cos-t2, radial), r3.Vec{Z: 22.5})},
	}
	for _, l := range c.Links[:2] {
		part := c.Stack.Sheets[l.From].Part
		w := want[part]
		if l.Length != w.length || !near(l.End, w.end, 1e-9) {
			t.Errorf("part %d: offset %g to %v, want %g exactly, to %v", part, l.Length, l.End, w.length, w.end)
		}
		if part == 2 && !near(l.Direction, r3.Scale(-1, radial), 1e-12) {
			t.Errorf("part 2: direction %v, want inwards %v", l.Direction, r3.Scale(-1, radial))
		}
	}
	if fj := c.Links[2]; fj.Mismatch > 1e-9 || math.Abs(fj.Length-t2*(1-cos)) > 1e-9 {
		t.Errorf("faying joint length %g mismatch %g, want %g and 0", fj.Length, fj.Mismatch, t2*(1-cos))
	}
	if cs := codes(c); len(cs) != 0 {
		t.Errorf("findings %v, want none", c.Findings)
	}
}

// Rings meshed differently: the weld meets each sheet on a quad whose
// normal points elsewhere, and the faying points part across the stack.
// On coarse rings (30° quads) the step exceeds a tenth of the thinner
// sheet and offset-mismatch is reported; on fine ones it is not.
func TestOffsetMismatch(t *testing.T) {
	const r1, t1, t2 = 50.0, 1.0, 1.5
	r2 := r1 + (t1+t2)/2
	for _, tc := range []struct {
		n    int
		want bool
	}{{12, true}, {180, false}} {
		// The outer ring turned by a third of a quad against the inner.
		m := cylinders(t, cylinder(1, t1, r1, tc.n, 0, 10, 5), cylinder(2, t2, r2, tc.n, 2*math.Pi/float64(3*tc.n), 10, 5))
		a := 2 * math.Pi * 2.6 / float64(tc.n)
		rw := (r1 + r2) / 2
		c := buildOne1(t, m, joints.Joint{ID: "C", Point: r3.Vec{X: rw * math.Cos(a), Y: rw * math.Sin(a), Z: 22.5}}, offsetForm)
		if c.Status == joints.NotBuilt {
			t.Fatalf("n %d: %v", tc.n, c.Findings)
		}
		fj := c.Links[2]
		// The two quad normals differ by a third of a quad angle; each
		// offset turns its faying point by about t/2 times that angle.
		if got := slices.Contains(codes(c), joints.CodeOffsetMismatch); got != tc.want {
			t.Errorf("n %d: mismatch %g mm (limit %g), offset-mismatch %v, want %v", tc.n, fj.Mismatch, joints.OffsetMismatchFactor*t1, got, tc.want)
		}
	}
}
