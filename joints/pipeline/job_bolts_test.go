package pipeline

import (
	"errors"
	"strings"
	"testing"

	"github.com/joinery-cae/joinery/geom"
	"github.com/joinery-cae/joinery/joints"
)

// TestJobBoltKeys reads the bolt settings of a job file into the build
// options, and refuses bad values at their line.
func TestJobBoltKeys(t *testing.T) {
	const head = "version: 1\nmeshes: [m.jmesh]\nbuild:\n"
	job, err := ReadJob(strings.NewReader(head+
		"  bolt_dofs: [tx, ty, tz, rx]\n  bolt_coupling: averaging\n  shank: beam\n  bolt_ring: washer\n  shank_modulus: 70000\n  hole_tolerance: 0.5\n"), "job.yaml")
	if err != nil {
		t.Fatal(err)
	}
	s, err := job.BuildSettings()
	if err != nil {
		t.Fatal(err)
	}
	o := s.Options
	if o.BoltDOFs != joints.Translations|1<<3 || o.BoltCoupling != joints.AveragingCoupling || o.Shank != joints.BeamShank ||
		o.BoltRing != joints.WasherRing || o.ShankModulus != 70000 || o.HoleTolerance != 0.5 {
		t.Errorf("options %+v", o)
	}
	for _, c := range []struct{ line, want string }{
		{"  bolt_coupling: glued\n", `job.yaml:4: bolt_coupling: unknown bolt coupling "glued"`},
		{"  shank: spring\n", `job.yaml:4: shank: unknown shank form "spring"`},
		{"  bolt_dofs: [tx, qq]\n", `job.yaml:4: bolt_dofs: unknown degree of freedom "qq"`},
		{"  shank_modulus: -1\n", "job.yaml:4: shank_modulus: -1 N/mm^2"},
	} {
		_, err := ReadJob(strings.NewReader(head+c.line), "job.yaml")
		if err == nil || !strings.Contains(err.Error(), c.want) || !errors.Is(err, geom.ErrInput) {
			t.Errorf("%q: %v, want %q", c.line, err, c.want)
		}
	}
}
