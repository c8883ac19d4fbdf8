package pipeline

import (
	"errors"
	"strings"
	"testing"
)

func TestParseVary(t *testing.T) {
	for _, c := range []struct {
		in      string
		key     string
		values  []string
		wantErr string
	}{
		{in: "attach=interpolated,patch", key: "attach", values: []string{"interpolated", "patch"}},
		{in: "spot_dofs=tx+ty+tz,rz+rx+ry+tz+ty+tx", key: "spot-dofs", values: []string{"tx+ty+tz", "tx+ty+tz+rx+ry+rz"}},
		{in: "links=gap,offset", key: "links", values: []string{"gap", "offset"}},
		{in: "nugget-rule=4sqrt,5sqrt", key: "nugget-rule", values: []string{"4sqrt", "5sqrt"}},
		{in: "atach=patch", wantErr: `unknown key "atach"`},
		{in: "attach=patch,glue", wantErr: `attach: unknown attachment "glue"`},
		{in: "attach=patch,patch", wantErr: `attach: value "patch" given twice`},
		{in: "attach=", wantErr: "attach: no value given"},
		{in: "attach", wantErr: "want KEY=VALUE"},
		{in: "spot-dofs=tx+qq", wantErr: `spot-dofs: unknown degree of freedom "qq"`},
		{in: "bolt-dofs=tx+ty+tz,tx+ty+tz+rx+ry+rz", key: "bolt-dofs", values: []string{"tx+ty+tz", "tx+ty+tz+rx+ry+rz"}},
		{in: "bolt-coupling=rigid,averaging", key: "bolt-coupling", values: []string{"rigid", "averaging"}},
		{in: "shank=rigid,beam", key: "shank", values: []string{"rigid", "beam"}},
		{in: "bolt-ring=hole,washer", key: "bolt-ring", values: []string{"hole", "washer"}},
		{in: "shank=bar", wantErr: "shank: "},
	} {
		v, err := ParseVary(c.in)
		if c.wantErr != "" {
			if err == nil || !strings.Contains(err.Error(), c.wantErr) || !errors.Is(err, ErrUsage) {
				t.Errorf("%q: error %v, want a usage error with %q", c.in, err, c.wantErr)
			}
			continue
		}
		if err != nil || v.Key != c.key || strings.Join(v.Values, " ") != strings.Join(c.values, " ") {
			t.Errorf("%q: %+v %v, want %s %v", c.in, v, err, c.key, c.values)
		}
	}
}

func TestVariantsCartesianProduct(t *testing.T) {
	job := &Job{Version: 1, Meshes: []string{"m.vtk"}}
	var vary []Vary
	for _, s := range []string{"attach=interpolated,node-pair,patch", "links=gap,offset", "spot-dofs=tx+ty+tz,tx+ty+tz+rx+ry+rz"} {
		v, err := ParseVary(s)
		if err != nil {
			t.Fatal(err)
		}
		vary = append(vary, v)
	}
	s, err := job.SweepSettings(vary, 0)
	if err != nil {
		t.Fatal(err)
	}
	vs, err := s.Variants(job)
	if err != nil {
		t.Fatal(err)
	}
	// The count is the product of the value counts: 3 x 2 x 2.
	if len(vs) != 12 {
		t.Fatalf("%d variants, want 12", len(vs))
	}
	// The last key varies fastest.
	want := []string{
		"01-attach=interpolated-links=gap-spot-dofs=tx+ty+tz",
		"02-attach=interpolated-links=gap-spot-dofs=tx+ty+tz+rx+ry+rz",
		"03-attach=interpolated-links=offset-spot-dofs=tx+ty+tz",
	}
	for i, w := range want {
		if vs[i].Name != w {
			t.Errorf("variant %d: %s, want %s", i+1, vs[i].Name, w)
		}
	}
	if vs[11].Name != "12-attach=patch-links=offset-spot-dofs=tx+ty+tz+rx+ry+rz" {
		t.Errorf("last variant %s", vs[11].Name)
	}
	// Each variant's settings are applied as the flags would be, and the
	// job itself is left alone.
	if o := vs[11].Build.Options; o.Attach.String() != "patch" || o.Links.String() != "offset" || o.SpotDOFs.String() != "tx,ty,tz,rx,ry,rz" {
		t.Errorf("variant 12 options %+v", o)
	}
	if job.Build.Attach != "" || job.Build.SpotDOFs != nil {
		t.Errorf("the job was changed: %+v", job.Build)
	}
	// --max-variants guards the product.
	if _, err := job.SweepSettings(vary, 11); err == nil || !errors.Is(err, ErrUsage) || !strings.Contains(err.Error(), "12 variants, more than --max-variants 11") {
		t.Errorf("max variants: %v", err)
	}
	if _, err := job.SweepSettings(nil, 0); err == nil || !strings.Contains(err.Error(), "nothing to vary") {
		t.Errorf("nothing to vary: %v", err)
	}
	if _, err := job.SweepSettings([]Vary{vary[0], vary[0]}, 0); err == nil || !strings.Contains(err.Error(), "given twice") {
		t.Errorf("a key twice: %v", err)
	}
}

func TestJobSweepSection(t *testing.T) {
	src := `version: 1
meshes: [m.vtk]
sweep:
  vary:
    spot_dofs: [tx+ty+tz, [tx, ty, tz, rx, ry, rz]]
    attach: [interpolated, patch]
  max_variants: 8
`
	job, err := ReadJob(strings.NewReader(src), "job.yaml")
	if err != nil {
		t.Fatal(err)
	}
	s, err := job.SweepSettings(nil, 0)
	if err != nil {
		t.Fatal(err)
	}
	if s.MaxVariants != 8 || len(s.Vary) != 2 || s.Vary[0].Key != "spot-dofs" || s.Vary[0].Values[1] != "tx+ty+tz+rx+ry+rz" || s.Vary[1].Key != "attach" {
		t.Errorf("settings %+v", s)
	}
	// The bound names where it came from: the job's, or the flag's,
	// which wins and is held to the job's range.
	three, err := ParseVary("attach=interpolated,node-pair,patch")
	if err != nil {
		t.Fatal(err)
	}
	for _, c := range []struct {
		flag int
		want string
	}{
		{0, "2 x 3 values of spot-dofs, attach make 6 variants, more than the job's max_variants 5"},
		{5, "make 6 variants, more than --max-variants 5"},
		{MaxMaxVariants + 1, "--max-variants 10000: want 1 to 9999"},
	} {
		j := *job
		five := 5
		j.Sweep.MaxVariants = &five
		_, err := j.SweepSettings([]Vary{s.Vary[0], three}, c.flag)
		if err == nil || !errors.Is(err, ErrUsage) || !strings.Contains(err.Error(), c.want) {
			t.Errorf("--max-variants %d: %v, want a usage error with %q", c.flag, err, c.want)
		}
	}
	// Neither set: the default bound, named as such.
	many := []Vary{}
	for _, v := range []string{"attach=interpolated,node-pair,patch", "spot-dofs=tx+ty+tz,tx+ty+tz+rx+ry+rz,tz", "bolt-dofs=tx+ty+tz,tx+ty+tz+rx+ry+rz,tz", "links=gap,offset", "bolt-coupling=rigid,averaging"} {
		vv, err := ParseVary(v)
		if err != nil {
			t.Fatal(err)
		}
		many = append(many, vv)
	}
	plain := *job
	plain.Sweep.MaxVariants = nil
	if _, err := plain.SweepSettings(many, 0); err == nil || !strings.Contains(err.Error(), "make 108 variants, more than the default bound 64") {
		t.Errorf("default bound: %v", err)
	}
	for _, c := range []struct{ src, want string }{
		{"version: 1\nmeshes: [m.vtk]\nsweep:\n  vary:\n    atach: [patch]\n", `job.yaml:5: sweep vary: unknown key "atach"`},
		{"version: 1\nmeshes: [m.vtk]\nsweep:\n  vary:\n    attach: [patch, glue]\n", `job.yaml:5: sweep vary: attach: unknown attachment "glue"`},
		{"version: 1\nmeshes: [m.vtk]\nsweep:\n  max_variants: 0\n", "job.yaml:4"},
		{"version: 1\nmeshes: [m.vtk]\nsweep:\n  vary:\n    attach: [patch]\n    attach: [node-pair]\n", "given twice"},
		{"version: 1\nmeshes: [m.vtk]\nsweep:\n  vary:\n    bolt_dofs: [tx+qq]\n", "bolt-dofs: "},
	} {
		if _, err := ReadJob(strings.NewReader(c.src), "job.yaml"); err == nil || !strings.Contains(err.Error(), c.want) {
			t.Errorf("%q: error %v, want %q", c.src, err, c.want)
		}
	}
}
