package audit

import (
	"context"
	"fmt"
	"strings"
	"testing"

	"github.com/joinery-cae/joinery/geom"
	"github.com/joinery-cae/joinery/joints"
	"github.com/joinery-cae/joinery/joints/spot"
	"github.com/joinery-cae/joinery/joints/synth"
)

// synthBuild generates the synthetic body and builds its spot welds with
// options o.
func synthBuild(tb testing.TB, cfg synth.Config, o joints.BuildOptions) (*synth.Model, []joints.Connector) {
	tb.Helper()
	md, err := synth.Generate(cfg)
	if err != nil {
		tb.Fatal(err)
	}
	o = o.Defaults(joints.MaxThickness(md.Mesh))
	conns, err := spot.Build(context.Background(), spot.IndexFor(md.Mesh, md.Joints, o), md.Joints, o, nil)
	if err != nil {
		tb.Fatal(err)
	}
	res, err := joints.NewResult(md.Mesh, conns, nil, o)
	if err != nil {
		tb.Fatal(err)
	}
	return md, res.Connectors
}

// The synthetic body against its ground truth: its panels form one
// assembly (the generator chains them), no weld sits on another's
// attachments, and with welds that couple translations only, exactly the
// parts held by a single straight weld line turn: one free motion each
// for the second sheet of every lap and angle assembly and for every
// doubler (the generator's layout; classical rigid-body kinematics for
// a line of ball joints).
func TestSyntheticBody(t *testing.T) {
	cfg := synth.Config{Elements: 100_000, Welds: 400, Seed: 3}
	for _, tc := range []struct {
		dofs joints.DOFs
	}{{joints.AllDOFs}, {joints.Translations}} {
		o := joints.BuildOptions{SpotDOFs: tc.dofs}
		md, conns := synthBuild(t, cfg, o)
		rep := audit(t, md.Mesh, conns, nil, o)
		hinged := 0
		asm := map[string]bool{}
		for _, p := range md.Mesh.Parts {
			switch {
			case strings.HasSuffix(p.Name, "-doubler"):
				hinged++
			case strings.HasPrefix(p.Name, "lap-") || strings.HasPrefix(p.Name, "angle-"):
				asm[strings.Join(strings.SplitN(p.Name, "-", 3)[:2], "-")] = true
			}
		}
		hinged += len(asm)
		want := 0
		if tc.dofs == joints.Translations {
			want = hinged
		}
		k := rep.Kinematics
		if k.Groups != 1 || k.Mechanisms != want || k.RigidBodyModes != 6+want || k.Unrestrained != 0 {
			t.Errorf("%v: %+v, want one group and %d mechanism motions (%d parts)", tc.dofs, k, want, len(md.Mesh.Parts))
		}
		c := codesOf(rep.Findings)
		if c[joints.CodeSeam] != 0 || c[joints.CodeDuplicate] != 0 || c[joints.CodeFreePart] != 0 || c[joints.CodeMechanism] != want {
			t.Errorf("%v: findings %v", tc.dofs, c)
		}
		for _, f := range rep.Findings {
			if f.Code == joints.CodeMechanism && (f.Motion == nil || f.Motion.Kind != joints.MotionRotation) {
				t.Errorf("%s", f.Message)
			}
		}
	}
}

// BenchmarkAudit measures the audit of the 6,000 welds built on the
// 2,000,000-element synthetic body (one chained assembly of about 400
// parts), beside the build of the same welds (index and welds), so
// that the two can be compared in one run: with the default degrees of
// freedom (every weld rigid) and with translations only (the kinematic
// reduction has work to do). Skipped with -short.
func BenchmarkAudit(b *testing.B) {
	if testing.Short() {
		b.Skip("2,000,000 elements")
	}
	cfg := synth.Config{Elements: 2_000_000, Welds: 6000, Bolts: 20, Seed: 1}
	for _, dofs := range []joints.DOFs{joints.AllDOFs, joints.Translations} {
		o := joints.BuildOptions{SpotDOFs: dofs}
		md, conns := synthBuild(b, cfg, o)
		name := strings.ReplaceAll(dofs.String(), ",", "")
		b.Run(fmt.Sprintf("build/dofs=%s", name), func(b *testing.B) {
			oo := o.Defaults(joints.MaxThickness(md.Mesh))
			for b.Loop() {
				x := spot.IndexFor(md.Mesh, md.Joints, oo)
				if _, err := spot.Build(context.Background(), x, md.Joints, oo, nil); err != nil {
					b.Fatal(err)
				}
			}
		})
		b.Run(fmt.Sprintf("audit/dofs=%s", name), func(b *testing.B) {
			var rep *Report
			for b.Loop() {
				var err error
				if rep, err = Run(context.Background(), md.Mesh, conns, nil, o, geom.NoProgress{}); err != nil {
					b.Fatal(err)
				}
			}
			b.ReportMetric(float64(len(md.Mesh.Parts)), "parts")
			b.ReportMetric(float64(rep.Kinematics.Groups), "groups")
			b.ReportMetric(float64(rep.Kinematics.Mechanisms), "mechanisms")
		})
	}
}
