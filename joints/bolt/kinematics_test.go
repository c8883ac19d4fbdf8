package bolt

import (
	"math"
	"testing"

	"gonum.org/v1/gonum/spatial/r3"

	"github.com/joinery-cae/joinery/joints"
	"github.com/joinery-cae/joinery/joints/audit"
)

// TestKinematics runs the audit's rank check on bolts between two holed
// sheets (parts 1 and 2) for each coupling choice. The counts are those
// of classical rigid-body kinematics (REFERENCES.md, Kinematics; from
// memory): a free body has 6 degrees of freedom; rigid couplings (any
// DOFs holding the three translations at a ring of nodes not on one
// line) hold each centre rigidly to its sheet, so one bolt with a rigid
// shank joins the sheets rigidly: one group, 6 modes, nothing else free.
// Averaging rings on translations are ball joints at the two centres,
// joined by the rigid shank: a bar with a ball at each end, whose own
// spin about its axis nothing holds (1 unrestrained) and which leaves
// the second sheet 5 motions against the first (6 less the one distance
// the bar keeps): 6 + 5 + 1 = 12 modes. With all six DOFs the averaging
// form holds the centre's rotations too: well-posed. Rigid rings on tz
// alone, all in one plane z = const, hold tz, rx and ry of each sheet
// against the centres: the centres slide and turn in the plane (3
// unrestrained) and so does the second sheet against the first (3). A
// bolt to ground through one sheet with the default support (the
// bolt's DOFs: translations) is one point constraint: the sheet pivots
// about it (3 rotations free); supported on all six it is held.
func TestKinematics(t *testing.T) {
	for _, c := range []struct {
		name                         string
		o                            joints.BuildOptions
		single, ground               bool
		groups, grounded             int
		modes, mechanisms, unrestrnd int
		motion                       string // the unrestrained motion's kind, when one is
	}{
		{name: "rigid-translations (default)", groups: 1, modes: 6},
		{name: "rigid-beam", o: joints.BuildOptions{Shank: joints.BeamShank}, groups: 1, modes: 6},
		{name: "rigid-tz-only", o: joints.BuildOptions{BoltDOFs: 1 << 2}, groups: 1, modes: 12, mechanisms: 3, unrestrnd: 3},
		{name: "averaging-translations", o: joints.BuildOptions{BoltCoupling: joints.AveragingCoupling}, groups: 1,
			modes: 12, mechanisms: 5, unrestrnd: 1, motion: "rotation"},
		{name: "averaging-all", o: joints.BuildOptions{BoltCoupling: joints.AveragingCoupling, BoltDOFs: joints.AllDOFs}, groups: 1, modes: 6},
		{name: "ground-rigid", single: true, ground: true, groups: 1, grounded: 1, modes: 3, mechanisms: 3},
		{name: "ground-rigid-all", o: joints.BuildOptions{BoltDOFs: joints.AllDOFs}, single: true, ground: true, groups: 1, grounded: 1},
		{name: "ground-averaging", o: joints.BuildOptions{BoltCoupling: joints.AveragingCoupling}, single: true, ground: true,
			groups: 1, grounded: 1, modes: 3 + 3, mechanisms: 3, unrestrnd: 3},
	} {
		t.Run(c.name, func(t *testing.T) {
			ss := holed(11)
			if c.single {
				ss = ss[:1]
			}
			m := mesh(t, rotation{}, ss...)
			j := m10("B1", r3.Vec{Z: 1.125})
			if c.single {
				j.Point = r3.Vec{Z: 0.5}
			}
			j.Ground = c.ground
			cs := build(t, m, c.o, j)
			if cs[0].Status == joints.NotBuilt {
				t.Fatalf("not built: %v", codes(cs[0].Findings))
			}
			res, err := joints.NewResult(m, cs, nil, c.o)
			if err != nil {
				t.Fatal(err)
			}
			var parts []int64
			for _, p := range m.Parts {
				parts = append(parts, p.ID)
			}
			k := joints.NewConstraints(parts)
			for i := range res.Connectors {
				k.AddConnector(m, &res.Connectors[i])
			}
			kin, fs := audit.Kinematic(k, audit.Groups(k))
			if kin.Groups != c.groups || kin.Grounded != c.grounded || kin.RigidBodyModes != c.modes ||
				kin.Mechanisms != c.mechanisms || kin.Unrestrained != c.unrestrnd {
				t.Errorf("kinematics %+v, want groups %d grounded %d modes %d mechanisms %d unrestrained %d",
					kin, c.groups, c.grounded, c.modes, c.mechanisms, c.unrestrnd)
			}
			for _, f := range fs {
				if f.Joint != "B1" && !contains(f.Joints, "B1") {
					t.Errorf("%s finding names %q %v, not the bolt", f.Code, f.Joint, f.Joints)
				}
				if f.Code == joints.CodeUnrestrained && c.motion != "" && c.unrestrnd == 1 {
					if f.Motion == nil || f.Motion.Kind != c.motion || math.Abs(f.Motion.Direction.Z) < 1-1e-9 {
						t.Errorf("unrestrained motion %+v, want a %s about the bolt's axis (z)", f.Motion, c.motion)
					}
				}
			}
		})
	}
}

func contains(s []string, v string) bool {
	for _, x := range s {
		if x == v {
			return true
		}
	}
	return false
}
