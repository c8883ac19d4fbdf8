package audit

import (
	"fmt"
	"math"
	"math/rand/v2"
	"testing"

	"gonum.org/v1/gonum/mat"
	"gonum.org/v1/gonum/spatial/r3"

	"github.com/joinery-cae/joinery/joints"
)

// kinematic runs Kinematic on k.
func kinematic(k *joints.Constraints) (joints.Kinematics, []joints.Finding) {
	return Kinematic(k, Groups(k))
}

func codesOf(fs []joints.Finding) map[string]int {
	out := map[string]int{}
	for _, f := range fs {
		out[f.Code]++
	}
	return out
}

// A rigid body held to a fixed one by point constraints, against
// classical rigid-body kinematics (a free body in space has 6 degrees of
// freedom; three non-collinear point constraints, each fixing three
// translations, fix it; collinear ones leave one rotation about their
// common line; one point leaves three rotations; one point that also
// fixes the rotations fixes it; from memory, as in REFERENCES.md).
func TestRigidBodyKinematics(t *testing.T) {
	line := r3.Unit(r3.Vec{X: 1, Y: 2, Z: 0.5}) // the common line of the collinear case
	p0 := r3.Vec{X: 10, Y: -20, Z: 5}
	at := func(s float64) r3.Vec { return r3.Add(p0, r3.Scale(s, line)) }
	cases := []struct {
		name   string
		points []r3.Vec
		dofs   joints.DOFs
		free   int    // free motions of body 2 relative to body 1
		kind   string // of the motion
	}{
		{"three non-collinear points, translations", []r3.Vec{{}, {X: 100}, {Y: 80}}, joints.Translations, 0, ""},
		{"three collinear points, translations", []r3.Vec{at(0), at(40), at(95)}, joints.Translations, 1, joints.MotionRotation},
		{"two points, translations", []r3.Vec{at(0), at(30)}, joints.Translations, 1, joints.MotionRotation},
		{"one point, translations", []r3.Vec{p0}, joints.Translations, 3, joints.MotionPivot},
		{"one point, rotations coupled", []r3.Vec{p0}, joints.AllDOFs, 0, ""},
		{"four points in a plane, translations", []r3.Vec{{}, {X: 40}, {X: 40, Y: 40}, {Y: 40}}, joints.Translations, 0, ""},
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			k := joints.NewConstraints([]int64{1, 2})
			for i, p := range tc.points {
				k.Tie(k.Part(1), k.Part(2), p, tc.dofs, fmt.Sprintf("W%d", i+1))
			}
			kin, fs := kinematic(k)
			if kin.Mechanisms != tc.free || kin.RigidBodyModes != 6+tc.free || kin.Groups != 1 {
				t.Fatalf("counts %+v, want %d free motions and %d rigid-body modes", kin, tc.free, 6+tc.free)
			}
			if tc.free == 0 {
				if len(fs) != 0 {
					t.Errorf("findings %v", fs)
				}
				return
			}
			if len(fs) != 1 || fs[0].Code != joints.CodeMechanism || fs[0].Motion == nil {
				t.Fatalf("findings %v, want one mechanism", fs)
			}
			f := fs[0]
			m := f.Motion
			if m.Kind != tc.kind || m.Count != tc.free {
				t.Errorf("motion %+v, want %s x %d", m, tc.kind, tc.free)
			}
			// Part 2 moves (the body), part 1 holds (the group's root is
			// the lower part id when sizes tie).
			if len(f.Parts) != 2 || f.Parts[0] != 2 || f.Parts[1] != 1 {
				t.Errorf("parts %v, want [2 1]", f.Parts)
			}
			switch m.Kind {
			case joints.MotionRotation:
				// The axis is the points' line: parallel to it and through p0.
				if c := math.Abs(r3.Dot(m.Direction, line)); math.Abs(c-1) > 1e-9 {
					t.Errorf("axis %v, want along %v", m.Direction, line)
				}
				off := r3.Sub(m.Point, p0)
				if d := r3.Norm(r3.Cross(off, line)); d > 1e-6 {
					t.Errorf("axis point %v is %g mm off the line", m.Point, d)
				}
			case joints.MotionPivot:
				if d := r3.Norm(r3.Sub(m.Point, p0)); d > 1e-6 {
					t.Errorf("pivot at %v, want %v", m.Point, p0)
				}
			}
			if len(f.Joints) != len(tc.points) || f.Joint != "W1" {
				t.Errorf("joints %v (first %q), want every weld", f.Joints, f.Joint)
			}
		})
	}
}

// Loose groups: each free group has the 6 rigid-body modes of a free
// body (classical rigid-body kinematics, from memory).
func TestRigidBodyModesOfLooseGroups(t *testing.T) {
	k := joints.NewConstraints([]int64{1, 2, 3, 4})
	k.Tie(k.Part(1), k.Part(2), r3.Vec{}, joints.AllDOFs, "W1")
	k.Tie(k.Part(3), k.Part(4), r3.Vec{X: 500}, joints.AllDOFs, "W2")
	kin, fs := kinematic(k)
	if kin.RigidBodyModes != 12 || kin.Groups != 2 || kin.Mechanisms != 0 || len(fs) != 0 {
		t.Errorf("%+v %v, want 12 rigid-body modes in 2 groups", kin, fs)
	}
	// A part alone is a group too.
	k.Part(5)
	if kin, _ = kinematic(k); kin.RigidBodyModes != 18 || kin.Groups != 3 {
		t.Errorf("%+v, want 18 modes in 3 groups", kin)
	}
}

// Ground: a body held to ground at one point on translations turns
// about it; at three points it is fixed.
func TestGround(t *testing.T) {
	k := joints.NewConstraints([]int64{1})
	g := k.Ground()
	k.Tie(g, k.Part(1), r3.Vec{X: 5}, joints.Translations, "B1")
	kin, fs := kinematic(k)
	if kin.RigidBodyModes != 3 || kin.Mechanisms != 3 || kin.Grounded != 1 || len(fs) != 1 || fs[0].Motion.Kind != joints.MotionPivot {
		t.Errorf("%+v %v", kin, fs)
	}
	k.Tie(g, k.Part(1), r3.Vec{X: 5, Y: 50}, joints.Translations, "B2")
	k.Tie(g, k.Part(1), r3.Vec{X: 60}, joints.Translations, "B3")
	if kin, fs = kinematic(k); kin.RigidBodyModes != 0 || len(fs) != 0 {
		t.Errorf("%+v %v", kin, fs)
	}
}

// Connector nodes: a centre following the translations of its ring
// (averaging form, translations only) has its three rotations free; two
// such centres joined by a rigid shank spin about the shank's axis (the
// averaging-ring case the bolt issue describes); rigid rings of three
// nodes or more hold the centre.
func TestUnrestrainedNodes(t *testing.T) {
	t.Run("one centre, averaging on translations", func(t *testing.T) {
		k := joints.NewConstraints([]int64{1})
		c := k.AddNode(900001, r3.Vec{Z: 1}, "B1")
		k.Tie(k.Part(1), c, r3.Vec{Z: 1}, joints.Translations, "B1")
		kin, fs := kinematic(k)
		if kin.Unrestrained != 3 || kin.Mechanisms != 0 || kin.RigidBodyModes != 9 || len(fs) != 1 || fs[0].Code != joints.CodeUnrestrained ||
			fs[0].Motion.Kind != joints.MotionPivot {
			t.Fatalf("%+v %v", kin, fs)
		}
	})
	t.Run("two centres on a rigid shank, averaging on translations", func(t *testing.T) {
		k := joints.NewConstraints([]int64{1, 2})
		axis := r3.Unit(r3.Vec{X: 0.3, Y: 0.1, Z: 1})
		x1, x2 := r3.Vec{X: 10}, r3.Add(r3.Vec{X: 10}, r3.Scale(2.5, axis))
		c1, c2 := k.AddNode(900001, x1, "B1"), k.AddNode(900002, x2, "B1")
		k.Tie(k.Part(1), c1, x1, joints.Translations, "B1")
		k.Tie(k.Part(2), c2, x2, joints.Translations, "B1")
		k.Tie(c1, c2, x2, joints.AllDOFs, "B1")
		// The two parts are also welded rigidly elsewhere.
		k.Tie(k.Part(1), k.Part(2), r3.Vec{X: 200}, joints.AllDOFs, "W1")
		kin, fs := kinematic(k)
		if kin.Unrestrained != 1 || kin.Mechanisms != 0 || len(fs) != 1 || fs[0].Code != joints.CodeUnrestrained {
			t.Fatalf("%+v %v", kin, fs)
		}
		m := fs[0].Motion
		if m.Kind != joints.MotionRotation || math.Abs(math.Abs(r3.Dot(m.Direction, axis))-1) > 1e-9 {
			t.Errorf("motion %+v, want a spin about %v", m, axis)
		}
	})
	t.Run("rigid rings", func(t *testing.T) {
		k := joints.NewConstraints([]int64{1, 2})
		c1, c2 := k.AddNode(900001, r3.Vec{}, "B1"), k.AddNode(900002, r3.Vec{Z: 2}, "B1")
		for i := range 6 {
			a := float64(i) * math.Pi / 3
			k.Tie(k.Part(1), c1, r3.Vec{X: 5 * math.Cos(a), Y: 5 * math.Sin(a)}, joints.Translations, "B1")
			k.Tie(k.Part(2), c2, r3.Vec{X: 5 * math.Cos(a), Y: 5 * math.Sin(a), Z: 2}, joints.Translations, "B1")
		}
		k.Tie(c1, c2, r3.Vec{Z: 2}, joints.AllDOFs, "B1")
		kin, fs := kinematic(k)
		if kin.Unrestrained != 0 || kin.Mechanisms != 0 || kin.RigidBodyModes != 6 || len(fs) != 0 {
			t.Fatalf("%+v %v", kin, fs)
		}
	})
}

// A planar four-bar linkage (four bodies in a loop, hinges with parallel
// axes) has one free motion; a spatial loop of three bodies pairwise
// hinged about axes that are not parallel is rigid (Grübler-Kutzbach
// count 6(n-1) - 5j: 12 - 15 < 0 with independent constraints; the
// planar four-bar's mobility of 1 is the classical exception; classical
// mechanism theory, from memory).
func TestLoops(t *testing.T) {
	hinge := func(k *joints.Constraints, a, b int64, p, d r3.Vec, id string) {
		k.Tie(k.Part(a), k.Part(b), p, joints.Translations, id+"a")
		k.Tie(k.Part(a), k.Part(b), r3.Add(p, r3.Scale(30, d)), joints.Translations, id+"b")
	}
	z := r3.Vec{Z: 1}
	k := joints.NewConstraints([]int64{1, 2, 3, 4})
	hinge(k, 1, 2, r3.Vec{}, z, "A")
	hinge(k, 2, 3, r3.Vec{X: 100}, z, "B")
	hinge(k, 3, 4, r3.Vec{X: 120, Y: 80}, z, "C")
	hinge(k, 4, 1, r3.Vec{X: -10, Y: 60}, z, "D")
	kin, _ := kinematic(k)
	if kin.Mechanisms != 1 || kin.RigidBodyModes != 7 {
		t.Errorf("four-bar: %+v, want 1 free motion", kin)
	}
	k = joints.NewConstraints([]int64{1, 2, 3})
	hinge(k, 1, 2, r3.Vec{}, z, "A")
	hinge(k, 2, 3, r3.Vec{X: 100}, r3.Vec{X: 1}, "B")
	hinge(k, 3, 1, r3.Vec{X: 50, Y: 90}, r3.Unit(r3.Vec{X: 1, Y: 1}), "C")
	if kin, _ = kinematic(k); kin.Mechanisms != 0 || kin.RigidBodyModes != 6 {
		t.Errorf("triangle of hinges: %+v, want rigid", kin)
	}
}

// bruteModes counts the free motions of k with one SVD of all its rows:
// the baseline the structured reduction must match.
func bruteModes(k *joints.Constraints) int {
	col := map[int]int{}
	n := 0
	for b, body := range k.Bodies {
		if body.Kind != joints.GroundBody {
			col[b] = n
			n += 6
		}
	}
	var o r3.Vec
	for _, t := range k.Ties {
		o = r3.Add(o, t.Point)
	}
	if len(k.Ties) > 0 {
		o = r3.Scale(1/float64(len(k.Ties)), o)
	}
	sc := 1.0
	for _, t := range k.Ties {
		sc = math.Max(sc, r3.Norm(r3.Sub(t.Point, o)))
	}
	var rows [][]float64
	for _, t := range k.Ties {
		for i := range 6 {
			if t.DOFs&(1<<i) == 0 {
				continue
			}
			var blk [6]float64
			if i < 3 {
				e := unit(i)
				c := r3.Cross(r3.Scale(1/sc, r3.Sub(t.Point, o)), e)
				blk = [6]float64{e.X, e.Y, e.Z, c.X, c.Y, c.Z}
			} else {
				blk[i] = 1
			}
			row := make([]float64, n)
			if j, ok := col[t.B]; ok {
				for d := range 6 {
					row[j+d] += blk[d]
				}
			}
			if j, ok := col[t.A]; ok {
				for d := range 6 {
					row[j+d] -= blk[d]
				}
			}
			rows = append(rows, row)
		}
	}
	if len(rows) == 0 {
		return n
	}
	a := mat.NewDense(len(rows), n, nil)
	for r, row := range rows {
		a.SetRow(r, row)
	}
	var svd mat.SVD
	svd.Factorize(a, mat.SVDNone)
	sv := svd.Values(nil)
	rank := 0
	for _, s := range sv {
		if s > 1e-7*sv[0] {
			rank++
		}
	}
	return n - rank
}

// The structured reduction against one dense SVD of the whole system,
// on seeded random assemblies of parts, connector nodes and ground with
// ties of every kind.
func TestKinematicAgainstBruteForce(t *testing.T) {
	rng := rand.New(rand.NewPCG(1, 1))
	dofSets := []joints.DOFs{joints.Translations, joints.AllDOFs, joints.Translations, 0x04, 0x3c, 0x07 | 0x20}
	for trial := range 300 {
		np := 2 + rng.IntN(8)
		parts := make([]int64, np)
		for i := range parts {
			parts[i] = int64(10 * (i + 1))
		}
		k := joints.NewConstraints(parts)
		bodies := np
		if rng.IntN(3) == 0 {
			k.Ground()
			bodies++
		}
		for range rng.IntN(4) {
			k.AddNode(int64(1000+bodies), r3.Vec{X: 100 * rng.Float64(), Y: 100 * rng.Float64()}, "N")
			bodies++
		}
		for ti := range rng.IntN(3 * np) {
			a, b := rng.IntN(bodies), rng.IntN(bodies)
			p := r3.Vec{X: 100 * rng.Float64(), Y: 100 * rng.Float64(), Z: 20 * rng.Float64()}
			k.Tie(a, b, p, dofSets[rng.IntN(len(dofSets))], fmt.Sprintf("T%d", ti))
		}
		kin, _ := kinematic(k)
		if want := bruteModes(k); kin.RigidBodyModes != want {
			t.Fatalf("trial %d: %d free motions, brute force %d (%d bodies, %d ties)", trial, kin.RigidBodyModes, want, bodies, len(k.Ties))
		}
	}
}
