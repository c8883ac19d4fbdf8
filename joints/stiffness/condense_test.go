package stiffness

import (
	"testing"

	"gonum.org/v1/gonum/spatial/r3"

	"github.com/joinery-cae/joinery/joints"
)

// at returns s placed at p.
func at(s Spring, p r3.Vec) Spring { s.Point = p; return s }

// meanOf returns the plain mean of the springs' points.
func meanOf(ss []Spring) r3.Vec {
	var m r3.Vec
	for _, s := range ss {
		m = r3.Add(m, s.Point)
	}
	return r3.Scale(1/float64(len(ss)), m)
}

// plainRotational returns the eigenvalues of k's rotational block K_rr
// alone, ascending: what the summary reported before the translations
// were condensed out.
func plainRotational(k Matrix) [3]float64 {
	var p Matrix
	for i := range 3 {
		for j := range 3 {
			p[i][j] = k[i+3][j+3]
		}
	}
	tr, _ := Principal(p)
	return tr
}

// TestRotationalIndependentOfReferencePoint assembles the same springs
// about several points: the condensed rotational stiffnesses are the
// same about every one. Static condensation (any matrix structural
// analysis text; from memory): S = K_rr - K_rt K_tt^+ K_tr is the
// minimum of the energy over the translations at a given rotation, and
// moving the reference point only shifts the translations by a linear
// function of the rotation. The plain block K_rr is not (parallel-axis
// terms; statics texts): where the springs differ in stiffness it
// differs from S even about their plain mean, which is the reviewer's
// case.
func TestRotationalIndependentOfReferencePoint(t *testing.T) {
	weld := Beam(5, 1, Steel())
	weld.Axis, weld.DOFs = r3.Vec{Z: 1}, joints.Translations
	six := Beam(8, 2, Steel())
	six.Axis, six.DOFs = r3.Vec{Z: 1}, joints.AllDOFs
	rigid := six // a rigid shank: RigidShankFactor times the beam
	rigid.Axial, rigid.Shear = RigidShankFactor*six.Axial, RigidShankFactor*six.Shear
	rigid.Torsion, rigid.Bending = RigidShankFactor*six.Torsion, RigidShankFactor*six.Bending
	tz := weld
	tz.DOFs = joints.DOFs(1 << 2) // tz alone: K_tt singular
	tilted := six
	tilted.Axis = r3.Unit(r3.Vec{X: 1, Y: 2, Z: 3})
	for _, c := range []struct {
		name    string
		springs []Spring
		// plainDiffers: K_rr about the plain mean differs from S.
		plainDiffers bool
	}{
		{"five node-pair welds and a rigid bolt (the reviewer's line)", []Spring{
			at(weld, r3.Vec{X: 5, Y: 10}), at(weld, r3.Vec{X: 25, Y: 10}), at(weld, r3.Vec{X: 45, Y: 10}),
			at(weld, r3.Vec{X: 65, Y: 10}), at(weld, r3.Vec{X: 85, Y: 10}), at(rigid, r3.Vec{X: 50, Y: 10, Z: 0.5})}, true},
		{"welds in a plane, one coupling all six", []Spring{
			at(weld, r3.Vec{X: -20, Y: 3}), at(weld, r3.Vec{X: 15, Y: -8}), at(six, r3.Vec{X: 2, Y: 30, Z: 1})}, true},
		{"tz alone (singular translational block)", []Spring{
			at(tz, r3.Vec{}), at(tz, r3.Vec{X: 10, Y: 1}), at(tz, r3.Vec{X: 40, Y: -3})}, false},
		{"a tilted spring among welds", []Spring{
			at(tilted, r3.Vec{X: 3, Y: 4, Z: 5}), at(weld, r3.Vec{X: -10}), at(weld, r3.Vec{Y: 12})}, true},
	} {
		mean := meanOf(c.springs)
		kMean := Assemble(c.springs, mean)
		trRef, rotRef := Principal(kMean)
		if rotRef[2] <= 0 {
			t.Fatalf("%s: rotational %v, want some stiffness", c.name, rotRef)
		}
		for _, p := range []r3.Vec{{}, {X: 47.5, Y: 10}, {X: 200, Y: -150, Z: 30}, {X: -1000, Y: 400, Z: 7}} {
			tr, rot := Principal(Assemble(c.springs, p))
			for i := range 3 {
				if !near(tr[i], trRef[i], 1e-9) {
					t.Errorf("%s about %v: translational %v, about the mean %v", c.name, p, tr, trRef)
				}
				// A zero may come out as noise below 1e-9 of the largest.
				if !near(rot[i], rotRef[i], 1e-9) && !(rotRef[i] == 0 && rot[i] < 1e-9*rotRef[2]) {
					t.Errorf("%s about %v: rotational %v, about the mean %v", c.name, p, rot, rotRef)
				}
			}
		}
		if plain := plainRotational(kMean); c.plainDiffers == near(plain[2], rotRef[2], 1e-6) {
			t.Errorf("%s: K_rr about the mean %v, condensed %v: want them to differ %v", c.name, plain, rotRef, c.plainDiffers)
		}
	}
}

// TestRotationalClosedForm checks the condensed rotational stiffness of
// two isotropic translational springs on the x axis against the
// elastic-centre result, by hand (statics of springs in parallel; from
// memory). Rotate the second body by theta about y (about z likewise,
// with y for z) and let it translate freely by w: a spring at x_i is
// stretched by w - theta x_i along z, so the energy is
//
//	E = 1/2 sum k_i (w - theta x_i)^2.
//
// dE/dw = 0 gives w = theta x_k, x_k = (k1 x1 + k2 x2)/(k1 + k2) the
// elastic centre, and then E = 1/2 theta^2 sum k_i (x_i - x_k)^2 =
// 1/2 theta^2 k1 k2 (x1 - x2)^2 / (k1 + k2) (x1 - x_k = k2 (x1 - x2) /
// (k1 + k2), x2 - x_k = k1 (x2 - x1) / (k1 + k2)): the stiffness about
// y and z is k1 k2 (x1 - x2)^2 / (k1 + k2), springs of the lever arm in
// series. For k1 = k2 = k at x = +-a it is k k (2a)^2 / (2k) = 2 k a^2
// (the parallel-axis sum k a^2 + k a^2 about their centre). About x
// both points stay put: zero. None depends on the reference point, and
// the plain mean is the elastic centre only where k1 = k2.
func TestRotationalClosedForm(t *testing.T) {
	for _, c := range []struct {
		name           string
		k1, x1, k2, x2 float64
		ref            r3.Vec // where the matrix is assembled
	}{
		{"equal, about the centre", 1000, -30, 1000, 30, r3.Vec{}},
		{"equal, about an end", 1000, -30, 1000, 30, r3.Vec{X: 30}},
		{"equal, off both", 2500, 10, 2500, 70, r3.Vec{X: -500, Y: 80, Z: -20}},
		{"unequal, about the plain mean", 1000, -10, 3000, 30, r3.Vec{X: 10}},
		{"unequal, about the origin", 1000, -10, 3000, 30, r3.Vec{}},
		{"unequal, one 1000 times the other", 1e6, 50, 1e3, 0, r3.Vec{X: 25, Z: 0.5}},
		{"unequal, far off", 4e5, 7, 2e3, 87, r3.Vec{X: 1e4, Y: -3e3, Z: 2e3}},
	} {
		ss := []Spring{iso(r3.Vec{X: c.x1}, c.k1), iso(r3.Vec{X: c.x2}, c.k2)}
		d := c.x1 - c.x2
		s := c.k1 * c.k2 * d * d / (c.k1 + c.k2)
		tr, rot := Principal(Assemble(ss, c.ref))
		if rot[0] > 1e-9*s || !near(rot[1], s, 1e-9) || !near(rot[2], s, 1e-9) {
			t.Errorf("%s: rotational %v, want [0 %g %g]", c.name, rot, s, s)
		}
		for _, v := range tr {
			if !near(v, c.k1+c.k2, 1e-12) {
				t.Errorf("%s: translational %v, want k1 + k2 = %g each (springs in parallel)", c.name, tr, c.k1+c.k2)
			}
		}
	}
}
