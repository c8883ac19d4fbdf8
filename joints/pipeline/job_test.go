package pipeline

import (
	"errors"
	"os"
	"path/filepath"
	"reflect"
	"strings"
	"testing"

	"gopkg.in/yaml.v3"

	"github.com/joinery-cae/joinery/geom"
	"github.com/joinery-cae/joinery/joints"
)

func ptr[T any](v T) *T { return &v }

func TestLoadJobExample(t *testing.T) {
	path := filepath.Join("..", "..", "testdata", "job", "job.yaml")
	job, err := LoadJob(path)
	if err != nil {
		t.Fatal(err)
	}
	dir := filepath.Dir(path)
	want := &Job{
		Version:  1,
		Meshes:   []string{filepath.Join(dir, "mesh", "floor.vtk"), filepath.Join(dir, "mesh", "beam.jmesh")},
		Parts:    filepath.Join(dir, "parts.yaml"),
		Joints:   []string{filepath.Join(dir, "welds.csv")},
		Out:      filepath.Join(dir, "out"),
		Renumber: ptr(false),
		Build: JobBuild{
			Reach:        ptr(0.0),
			GapAllowance: ptr(0.0),
			Attach:       "interpolated",
			SpotDOFs:     []string{"tx", "ty", "tz", "rx", "ry", "rz"},
			IDStart:      ptr(int64(0)),
			NuggetRule:   "5sqrt",
			FailOn:       "error",
			Groups:       map[string]JobGroup{"rear-rail": {Attach: "node-pair"}},
		},
		File: path,
	}
	if !reflect.DeepEqual(job, want) {
		got, _ := yaml.Marshal(job)
		exp, _ := yaml.Marshal(want)
		t.Errorf("got\n%s\nwant\n%s", got, exp)
	}
}

func TestLoadJobMinimal(t *testing.T) {
	job, err := LoadJob(filepath.Join("..", "..", "testdata", "job", "minimal.yaml"))
	if err != nil {
		t.Fatal(err)
	}
	// Absolute paths stay as they are; nothing else is set.
	b := job.Build
	if len(job.Meshes) != 1 || job.Meshes[0] != "/models/van/body.vtu" || job.Renumber != nil || job.Parts != "" ||
		b.Reach != nil || b.Attach != "" || b.SpotDOFs != nil || b.Groups != nil {
		t.Errorf("job %+v", job)
	}
}

func TestJobBuildApply(t *testing.T) {
	job, err := ReadJob(strings.NewReader(`version: 1
meshes: [a.vtk]
build:
  reach: 4.5
  attach: patch
  spot_dofs: [tx, ty, tz]
  nugget_rule: 4sqrt
  groups:
    rear-rail: {attach: node-pair}
    quiet: {}
`), "jobs/j.yaml")
	if err != nil {
		t.Fatal(err)
	}
	if job.Meshes[0] != filepath.Join("jobs", "a.vtk") {
		t.Errorf("mesh path %q", job.Meshes[0])
	}
	// Settings the job does not give keep their values (here as set by
	// the command before applying the job).
	o := joints.BuildOptions{GapAllowance: 0.3, IDStart: 5000}
	if err := job.Build.Apply(&o); err != nil {
		t.Fatal(err)
	}
	want := joints.BuildOptions{
		Reach:        4.5,
		GapAllowance: 0.3,
		IDStart:      5000,
		Attach:       joints.Patch,
		SpotDOFs:     joints.Translations,
		Rule:         joints.Rule4Sqrt,
		GroupAttach:  map[string]joints.Attach{"rear-rail": joints.NodePair},
	}
	if !reflect.DeepEqual(o, want) {
		t.Errorf("options %+v\nwant    %+v", o, want)
	}
}

func TestReadJobErrors(t *testing.T) {
	const head = "version: 1\nmeshes: [a.vtk]\n"
	tests := []struct {
		name, in, want string
	}{
		{"empty", "", "j.yaml:1: empty job file"},
		{"no version", "meshes: [a.vtk]\n", "j.yaml:1: no version"},
		{"version 2", "version: 2\nmeshes: [a.vtk]\n", "j.yaml:1: version: job file version 2; this Joinery reads version 1"},
		{"version text", "version: one\n", `j.yaml:1: version: want an integer, got "one"`},
		{"no meshes", "version: 1\n", "j.yaml:1: no meshes"},
		{"empty meshes", "version: 1\nmeshes: []\n", "j.yaml:2: meshes: the list is empty"},
		{"mesh not list", "version: 1\nmeshes: a.vtk\n", `j.yaml:2: meshes: want a list, got "a.vtk"`},
		{"empty path", "version: 1\nmeshes: ['']\n", "j.yaml:2: meshes: empty path"},
		{"unknown key", head + "mesh: [b.vtk]\n", `j.yaml:3: job: unknown key "mesh" (did you mean "meshes"?)`},
		{"unknown key far", head + "colour: red\n", `j.yaml:3: job: unknown key "colour" (known: version, meshes, parts, joints, out, renumber, build)`},
		{"duplicate key", head + "out: a\nout: b\n", `j.yaml:4: job: key "out" given twice (lines 3 and 4)`},
		{"renumber", head + "renumber: yes please\n", `j.yaml:3: renumber: want true or false, got "yes please"`},
		{"build key", head + "build:\n  atach: patch\n", `j.yaml:4: build: unknown key "atach" (did you mean "attach"?)`},
		{"attach", head + "build:\n  attach: glue\n", `j.yaml:4: attach: unknown attachment "glue"`},
		{"attach empty", head + "build:\n  attach:\n", "j.yaml:4: attach: no value"},
		{"negative distance", head + "build:\n  reach: -1\n", "j.yaml:4: reach: -1 mm is negative (0 means automatic)"},
		{"nan gap", head + "build:\n  gap_allowance: .nan\n", `j.yaml:4: gap_allowance: ".nan" is not a finite number`},
		{"dof name", head + "build:\n  spot_dofs: [tx, tq]\n", `j.yaml:4: spot_dofs: unknown degree of freedom "tq"`},
		{"dof twice", head + "build:\n  spot_dofs: [tx, rx, tx]\n", `j.yaml:4: spot_dofs: degree of freedom "tx" given twice`},
		{"dofs empty", head + "build:\n  spot_dofs: []\n", "j.yaml:4: spot_dofs: no degree of freedom given"},
		{"id_start", head + "build:\n  id_start: -5\n", "j.yaml:4: id_start: -5 is negative"},
		{"nugget rule", head + "build:\n  nugget_rule: 6sqrt\n", `j.yaml:4: nugget_rule: unknown nugget rule "6sqrt"`},
		{"fail_on", head + "build:\n  fail_on: always\n", `j.yaml:4: fail_on: unknown failure level "always"`},
		{"group key", head + "build:\n  groups:\n    rear: {atach: patch}\n", `j.yaml:5: group rear: unknown key "atach" (did you mean "attach"?)`},
		{"group attach", head + "build:\n  groups:\n    rear:\n      attach: weld\n", `j.yaml:6: attach: unknown attachment "weld"`},
		{"group not map", head + "build:\n  groups: [a]\n", "j.yaml:4: groups: want a map of key: value, got a list"},
		{"two documents", head + "---\nversion: 1\n", "j.yaml:3: a second YAML document"},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			_, err := ReadJob(strings.NewReader(tt.in), "j.yaml")
			checkErr(t, err, tt.want)
		})
	}
}

func FuzzLoadJob(f *testing.F) {
	for _, name := range []string{"job.yaml", "minimal.yaml"} {
		b, err := os.ReadFile(filepath.Join("..", "..", "testdata", "job", name))
		if err != nil {
			f.Fatal(err)
		}
		f.Add(string(b))
	}
	f.Add("version: 1\nmeshes: [a.vtk]\nbuild: {groups: {g: {attach: patch}}, spot_dofs: [rz]}\n")
	f.Fuzz(func(t *testing.T, in string) {
		job, err := ReadJob(strings.NewReader(in), "d/f.yaml")
		if err != nil {
			if !errors.Is(err, geom.ErrInput) {
				t.Fatalf("not an input error: %v", err)
			}
			return
		}
		if job.Version != JobVersion || len(job.Meshes) == 0 {
			t.Fatalf("job %+v", job)
		}
		// A job that loads applies without error.
		var o joints.BuildOptions
		if err := job.Build.Apply(&o); err != nil {
			t.Fatalf("Apply: %v", err)
		}
	})
}

// checkErr fails unless err starts with want and is an input error.
func checkErr(t *testing.T, err error, want string) {
	t.Helper()
	if err == nil || !strings.HasPrefix(err.Error(), want) {
		t.Fatalf("err = %v\nwant prefix %s", err, want)
	}
	if !errors.Is(err, geom.ErrInput) {
		t.Errorf("errors.Is(err, geom.ErrInput) = false for %v", err)
	}
}
