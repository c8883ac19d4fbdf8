package stiffness

import (
	"math"
	"testing"

	"gonum.org/v1/gonum/spatial/r3"

	"github.com/joinery-cae/joinery/joints"
)

func near(got, want, rel float64) bool {
	return math.Abs(got-want) <= rel*math.Max(math.Abs(want), 1e-300)
}

// iso is a spring of stiffness k in every translation.
func iso(p r3.Vec, k float64) Spring {
	return Spring{Point: p, Axis: r3.Vec{Z: 1}, Axial: k, Shear: k, DOFs: joints.Translations}
}

func TestParallelSprings(t *testing.T) {
	// n equal springs k in parallel: translational stiffness n k (statics
	// texts: springs in parallel add).
	const k = 1000.0
	for _, n := range []int{1, 2, 5} {
		var ss []Spring
		for i := range n {
			ss = append(ss, iso(r3.Vec{X: float64(10 * i)}, k))
		}
		c := r3.Vec{X: 10 * float64(n-1) / 2}
		tr, _ := Principal(Assemble(ss, c))
		for _, v := range tr {
			if !near(v, float64(n)*k, 1e-12) {
				t.Errorf("n=%d: translational %v, want %g each", n, tr, float64(n)*k)
			}
		}
	}
}

func TestParallelAxisRule(t *testing.T) {
	// Four springs k at (+-a, 0, 0) and (0, +-b, 0) around their
	// centroid: rotational stiffness sum k d_i^2 about each axis through
	// the centroid, d_i the distance of spring i from the axis
	// (parallel-axis rule; statics texts, REFERENCES.md): about x 2 k b^2,
	// about y 2 k a^2, about z 2 k (a^2 + b^2).
	const k, a, b = 500.0, 30.0, 20.0
	ss := []Spring{iso(r3.Vec{X: a}, k), iso(r3.Vec{X: -a}, k), iso(r3.Vec{Y: b}, k), iso(r3.Vec{Y: -b}, k)}
	_, rot := Principal(Assemble(ss, r3.Vec{}))
	want := [3]float64{2 * k * b * b, 2 * k * a * a, 2 * k * (a*a + b*b)} // ascending as a > b
	for i := range 3 {
		if !near(rot[i], want[i], 1e-12) {
			t.Errorf("rotational %v, want %v", rot, want)
		}
	}
	// Shifted off the origin, the same about their centroid.
	off := r3.Vec{X: 1000, Y: -400, Z: 7}
	for i := range ss {
		ss[i].Point = r3.Add(ss[i].Point, off)
	}
	_, rot2 := Principal(Assemble(ss, off))
	for i := range 3 {
		if !near(rot2[i], want[i], 1e-9) {
			t.Errorf("shifted: rotational %v, want %v", rot2, want)
		}
	}
}

func TestSingleTranslationsOnlyConnector(t *testing.T) {
	// One point constraint leaves three rotations about its own point
	// (classical rigid-body kinematics; from memory): zero rotational
	// stiffness about the spring's point.
	s := Beam(5, 1.15, Steel())
	s.Point, s.Axis, s.DOFs = r3.Vec{X: 3, Y: 4, Z: 5}, r3.Vec{Z: 1}, joints.Translations
	tr, rot := Principal(Assemble([]Spring{s}, s.Point))
	if rot != [3]float64{} {
		t.Errorf("rotational %v, want zero", rot)
	}
	if tr[0] <= 0 {
		t.Errorf("translational %v, want all positive", tr)
	}
}

func TestCoupledRotationsAddBeamTerms(t *testing.T) {
	// A single spring coupling all six, about its own point: the
	// rotational block is diag(EI/L, EI/L, GJ/L) for a beam along z.
	// By hand, steel E = 210,000 N/mm^2, nu = 0.3 (G = E/2.6 =
	// 80,769.23 N/mm^2; EN 1993-1-1 3.2.6, from memory), d = 5 mm, L = 1
	// mm: I = pi 5^4 / 64 = 30.6796 mm^4, EI/L = 6.44272e6 N mm/rad;
	// J = 2 I = 61.3592 mm^4, GJ/L = 4.95594e6 N mm/rad (a beam's end
	// rotation under a uniform moment M L/(EI), twist T L/(GJ); any
	// strength-of-materials text).
	s := Beam(5, 1, Steel())
	s.Axis, s.DOFs = r3.Vec{Z: 1}, joints.AllDOFs
	_, rot := Principal(Assemble([]Spring{s}, s.Point))
	want := [3]float64{4.95594e6, 6.44272e6, 6.44272e6}
	for i := range 3 {
		if !near(rot[i], want[i], 1e-5) {
			t.Errorf("rotational %v, want %v", rot, want)
		}
	}
	// Released rotations: zero again.
	s.DOFs = joints.Translations
	if _, rot := Principal(Assemble([]Spring{s}, s.Point)); rot != [3]float64{} {
		t.Errorf("translations only: rotational %v", rot)
	}
}

func TestBeamShear(t *testing.T) {
	m := Steel()
	// Cowper's shear coefficient of a circle at nu = 0.3: 7.8/8.8 =
	// 0.8864 (Cowper 1966; from memory).
	if k := ShearCoefficient(0.3); !near(k, 7.8/8.8, 1e-12) {
		t.Errorf("kappa %g", k)
	}
	const d = 5.0
	a := math.Pi * d * d / 4
	i := math.Pi * math.Pow(d, 4) / 64
	// A slender beam, L/d = 100: Euler-Bernoulli's clamped-clamped
	// transverse stiffness 12 EI / L^3 (REFERENCES.md; Przemieniecki 1968,
	// from memory), the shear term below 0.1 per cent.
	L := 100 * d
	if got, want := Beam(d, L, m).Shear, 12*m.E*i/(L*L*L); !near(got, want, 1e-3) {
		t.Errorf("slender: shear %g, want %g", got, want)
	}
	// A spot weld, L/d = 0.2: shear dominates and the stiffness tends to
	// that of a shear block kappa G A / L (Timoshenko's beam with phi >>
	// 1), here within 2 per cent (phi = 57 at this ratio).
	L = 0.2 * d
	if got, want := Beam(d, L, m).Shear, ShearCoefficient(m.Nu)*m.G*a/L; !near(got, want, 0.02) {
		t.Errorf("stubby: shear %g, want about %g", got, want)
	}
	if got, want := Beam(d, L, m).Axial, m.E*a/L; !near(got, want, 1e-12) {
		t.Errorf("axial %g, want EA/L %g", got, want)
	}
}

func TestPairsFromConnectors(t *testing.T) {
	// Three two-sheet welds in a line along x between parts 1 and 2,
	// translations only: rotational stiffness about the line is zero
	// (collinear point constraints leave one rotation about their line;
	// classical rigid-body kinematics, from memory), about z through the
	// centroid k_shear (2 * 20^2) (parallel-axis rule).
	var conns []joints.Connector
	for i, x := range []float64{-20, 0, 20} {
		c := joints.Connector{Joint: joints.Joint{ID: string(rune('a' + i)), Kind: joints.Spot}, Diameter: 5, DOFs: joints.Translations,
			Stack: joints.Stack{Axis: r3.Vec{Z: 1}, Sheets: []joints.Sheet{{Part: 2, Thickness: 1}, {Part: 1, Thickness: 1.5}}},
			Ends:  []joints.End{{Point: r3.Vec{X: x}}, {Point: r3.Vec{X: x, Z: 1.25}}}}
		conns = append(conns, c)
	}
	conns = append(conns, joints.Connector{Status: joints.NotBuilt, Joint: joints.Joint{ID: "x", Kind: joints.Spot}})
	ps := Pairs(conns, func(int64) Material { return Steel() })
	if len(ps) != 1 || ps[0].A != 1 || ps[0].B != 2 || ps[0].Springs != 3 || ps[0].Material != "steel" {
		t.Fatalf("pairs %+v", ps)
	}
	ks := Beam(5, 1.25, Steel()).Shear
	rot := ps[0].Rotational
	if rot[0] != 0 {
		t.Errorf("about the weld line: %g, want 0", rot[0])
	}
	if !near(rot[1], ks*2*400, 1e-9) && !near(rot[2], ks*2*400, 1e-9) {
		t.Errorf("rotational %v, want k_shear 800 = %g among them", rot, ks*800)
	}
}

func TestMaterialOf(t *testing.T) {
	for _, c := range []struct {
		name, want string
	}{{"", "steel"}, {"DC04", "steel"}, {"S355MC", "steel"}, {"EN AW-6082 T6", "aluminium"}, {"AlMg3", "aluminium"}, {"Aluminium", "aluminium"}} {
		if got := MaterialOf(c.name).Name; got != c.want {
			t.Errorf("%q: %s, want %s", c.name, got, c.want)
		}
	}
}

// bolt is a two-sheet bolt of diameter 10 mm between parts 1 and 2,
// along z, at (0, y, 0), its centres length mm apart.
func bolt(id string, y, length float64, shank joints.ShankForm, dofs joints.DOFs) joints.Connector {
	c := joints.Connector{Joint: joints.Joint{ID: id, Kind: joints.Bolt}, Diameter: 10, DOFs: dofs,
		Stack: joints.Stack{Axis: r3.Vec{Z: 1}, Sheets: []joints.Sheet{{Part: 1, Thickness: 2}, {Part: 2, Thickness: 2}}},
		Ends:  []joints.End{{Point: r3.Vec{Y: y}}, {Point: r3.Vec{Y: y, Z: length}}},
		Bolt:  &joints.BoltData{Shank: shank, Support: -1}}
	if shank == joints.BeamShank {
		c.Bolt.ShankModulus, c.Bolt.ShankPoisson = joints.DefaultShankModulus, joints.DefaultShankPoisson
	}
	return c
}

func TestBoltShankSprings(t *testing.T) {
	// One beam-shank M10 bolt, centres L = 4 mm apart, all six coupled,
	// about its own point. By hand, steel E = 210,000 N/mm^2, nu = 0.3,
	// G = E/2.6 = 80,769.23 N/mm^2 (EN 1993-1-1 3.2.6; from memory),
	// d = 10 mm: A = pi 10^2/4 = 78.5398 mm^2, I = pi 10^4/64 = 490.874
	// mm^4, J = 2 I = 981.748 mm^4 (circular section, any
	// strength-of-materials text; from memory):
	//   EA/L = 210,000 * 78.5398 / 4 = 4.12334e6 N/mm
	//   EI/L = 210,000 * 490.874 / 4 = 2.57709e7 N mm/rad
	//   GJ/L = 80,769.23 * 981.748 / 4 = 1.98238e7 N mm/rad
	//   phi = 12 EI / (kappa G A L^2), kappa = 7.8/8.8 (Cowper 1966; from
	//   memory) = 1.23700e9 / (0.886364 * 80,769.23 * 78.5398 * 16)
	//   = 1.23700e9 / 8.99638e7 = 13.75; across 12 EI / (L^3 (1 + phi))
	//   = 1.23700e9 / (64 * 14.75) = 1.31038e6 N/mm (clamped-clamped
	//   Timoshenko beam, Przemieniecki 1968; from memory).
	c := bolt("b", 0, 4, joints.BeamShank, joints.AllDOFs)
	ss, pairs := Springs(&c, func(int64) Material { return Aluminium() })
	if len(ss) != 1 || pairs[0] != [2]int64{1, 2} {
		t.Fatalf("springs %+v pairs %v", ss, pairs)
	}
	if p := ss[0].Point; p != (r3.Vec{Z: 2}) {
		t.Errorf("point %v, want the centres' midpoint (0, 0, 2)", p)
	}
	tr, rot := Principal(Assemble(ss, ss[0].Point))
	wantT := [3]float64{1.31038e6, 1.31038e6, 4.12334e6}
	wantR := [3]float64{1.98238e7, 2.57709e7, 2.57709e7}
	for i := range 3 {
		// The shank is steel, whatever the sheets' material.
		if !near(tr[i], wantT[i], 1e-5) || !near(rot[i], wantR[i], 1e-5) {
			t.Errorf("translational %v, want %v; rotational %v, want %v", tr, wantT, rot, wantR)
		}
	}
	// A rigid shank: the same beam times RigidShankFactor, every term.
	r := bolt("b", 0, 4, joints.RigidShank, joints.AllDOFs)
	rs, _ := Springs(&r, func(int64) Material { return Steel() })
	if len(rs) != 1 || !near(rs[0].Axial, RigidShankFactor*ss[0].Axial, 1e-12) || !near(rs[0].Shear, RigidShankFactor*ss[0].Shear, 1e-12) ||
		!near(rs[0].Torsion, RigidShankFactor*ss[0].Torsion, 1e-12) || !near(rs[0].Bending, RigidShankFactor*ss[0].Bending, 1e-12) {
		t.Errorf("rigid shank %+v, want %g x %+v", rs, RigidShankFactor, ss)
	}
	// Translations only: a single bolt holds no rotation about its own
	// point (a point constraint; classical rigid-body kinematics, from
	// memory).
	c.DOFs = joints.Translations
	if _, rot := Principal(Assemble(func() []Spring { s, _ := Springs(&c, nil); return s }(), r3.Vec{Z: 2})); rot != [3]float64{} {
		t.Errorf("translations only: rotational %v, want zero", rot)
	}
}

func TestBoltPairRotationalRelease(t *testing.T) {
	// Two beam-shank bolts at y = +-a along z, as the example's bracket
	// is held. Translations only, about the centroid (parallel-axis rule,
	// statics texts): about x 2 k_axial a^2, about z 2 k_across a^2,
	// about y (the line through the bolts) zero. Coupling rotations adds
	// each shank's 2 EI/L about x and y, 2 GJ/L about z: the smallest
	// principal rotational stiffness goes from 2 EI/L to zero when the
	// rotations are released.
	const a = 25.0
	mat := func(int64) Material { return Steel() }
	one := Beam(10, 4, Steel())
	for _, c := range []struct {
		dofs joints.DOFs
		want [3]float64
	}{
		{joints.Translations, [3]float64{0, 2 * one.Shear * a * a, 2 * one.Axial * a * a}},
		{joints.AllDOFs, [3]float64{2 * one.Bending, 2*one.Shear*a*a + 2*one.Torsion, 2*one.Axial*a*a + 2*one.Bending}},
	} {
		ps := Pairs([]joints.Connector{bolt("b1", -a, 4, joints.BeamShank, c.dofs), bolt("b2", a, 4, joints.BeamShank, c.dofs)}, mat)
		if len(ps) != 1 || ps[0].Springs != 2 || ps[0].Material != "steel" || ps[0].Centroid != (r3.Vec{Z: 2}) {
			t.Fatalf("%v: pairs %+v", c.dofs, ps)
		}
		for i := range 3 {
			if !near(ps[0].Rotational[i], c.want[i], 1e-9) && !(c.want[i] == 0 && math.Abs(ps[0].Rotational[i]) < 1e-6*c.want[2]) {
				t.Errorf("%v: rotational %v, want %v", c.dofs, ps[0].Rotational, c.want)
			}
		}
	}
}

// TestShankMaterialName: a beam shank of the default steel is "steel";
// one given another modulus is named by its constants, not "steel", in
// the spring and in the pair's summary, and its axial stiffness is EA/L
// of that modulus: E = 70,000 N/mm^2 (an aluminium alloy's, EN 1999-1-1
// 3.2.5; from memory), A = pi 10^2/4, L = 4 mm: 1.37445e6 N/mm (closed
// form).
func TestShankMaterialName(t *testing.T) {
	c := bolt("b", 0, 4, joints.BeamShank, joints.AllDOFs)
	if got := ShankMaterial(&c).Name; got != "steel" {
		t.Errorf("default shank named %q, want steel", got)
	}
	c.Bolt.ShankModulus = 70000
	if got := ShankMaterial(&c).Name; got != "E=70000 N/mm^2 nu=0.3" {
		t.Errorf("shank of E 70,000 named %q, want E=70000 N/mm^2 nu=0.3", got)
	}
	ss, _ := Springs(&c, func(int64) Material { return Steel() })
	if want := 70000 * math.Pi * 100 / 4 / 4; len(ss) != 1 || !near(ss[0].Axial, want, 1e-12) {
		t.Errorf("springs %+v, want axial %g", ss, want)
	}
	ps := Pairs([]joints.Connector{c}, func(int64) Material { return Steel() })
	if len(ps) != 1 || ps[0].Material != "E=70000 N/mm^2 nu=0.3" {
		t.Errorf("pairs %+v, want one of material E=70000 N/mm^2 nu=0.3", ps)
	}
	// Two bolts of one pair, one of each shank: mixed.
	d := bolt("d", 20, 4, joints.BeamShank, joints.AllDOFs)
	if ps = Pairs([]joints.Connector{c, d}, func(int64) Material { return Steel() }); len(ps) != 1 || ps[0].Material != "mixed" {
		t.Errorf("pairs %+v, want one, mixed", ps)
	}
}
