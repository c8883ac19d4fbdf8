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
		Units:    "mm",
		Build: JobBuild{
			Reach:        ptr(0.0),
			GapAllowance: ptr(0.0),
			Attach:       "interpolated",
			SpotDOFs:     []string{"tx", "ty", "tz", "rx", "ry", "rz"},
			IDStart:      ptr(int64(0)),
			IDStartLine:  14,
			NuggetRule:   "5sqrt",
			FailOn:       "error",
			Groups:       map[string]JobGroup{"rear-rail": {Attach: "node-pair"}},
		},
		File: path,
	}
	// The outputs record the paths as the job file wrote them.
	for p, rec := range map[string]string{want.Meshes[0]: "mesh/floor.vtk", want.Meshes[1]: "mesh/beam.jmesh",
		want.Parts: "parts.yaml", want.Joints[0]: "welds.csv"} {
		if got := job.RecordedPath(p); got != rec {
			t.Errorf("RecordedPath(%s) = %q, want %q", p, got, rec)
		}
	}
	want.written = job.written
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
		{"unknown key far", head + "colour: red\n", `j.yaml:3: job: unknown key "colour" (known: version, meshes, parts, joints, out, renumber, part_array, units, build, flanges, sweep)`},
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
	// Hostile inputs of issue 7.
	f.Add("version: 1\nmeshes: [a.vtk]\nunits: in\nbuild: {reach: 1e300, id_start: 5}\n")
	f.Add("version: 1\nmeshes: [a.vtk]\nunits: km\n")
	f.Add("version: 1\nmeshes: [a.vtk]\nflanges: {pitch: 30, end_margin: 0, pairs: [[1, 2]]}\n")
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
		if _, err := joints.ParseUnit(job.Units); err != nil {
			t.Fatalf("units %q: %v", job.Units, err)
		}
		// A job that loads applies without error.
		var o joints.BuildOptions
		if err := job.Build.Apply(&o); err != nil {
			t.Fatalf("Apply: %v", err)
		}
		var fo joints.FlangeOptions
		if err := job.Flanges.Apply(&fo); err != nil {
			t.Fatalf("flanges Apply: %v", err)
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

// Recorded paths depend on the inputs, not on the working directory: a
// path of the job file as written; a flag's relative path relative to
// the job file's directory; without a job file, as given; forward
// slashes always.
func TestRecordedPath(t *testing.T) {
	job, err := ReadJob(strings.NewReader("version: 1\nmeshes: [./mesh//a.vtk, /models/b.vtu, ../shared/c.jmesh]\n"), filepath.Join("jobs", "van", "j.yaml"))
	if err != nil {
		t.Fatal(err)
	}
	cwd, err := os.Getwd()
	if err != nil {
		t.Fatal(err)
	}
	tests := []struct{ path, want string }{
		{job.Meshes[0], "mesh/a.vtk"},
		{job.Meshes[1], "/models/b.vtu"},
		{job.Meshes[2], "../shared/c.jmesh"},
		// Paths from flags, relative to the working directory.
		{filepath.Join("jobs", "van", "welds.csv"), "welds.csv"},
		{filepath.Join("jobs", "other", "x.csv"), "../other/x.csv"},
		{filepath.Join(cwd, "jobs", "van", "abs.csv"), filepath.ToSlash(filepath.Join(cwd, "jobs", "van", "abs.csv"))},
	}
	for _, tt := range tests {
		if got := job.RecordedPath(tt.path); got != tt.want {
			t.Errorf("RecordedPath(%q) = %q, want %q", tt.path, got, tt.want)
		}
	}
	none := &Job{}
	if got := none.RecordedPath(filepath.Join("a", ".", "b.vtk")); got != "a/b.vtk" {
		t.Errorf("without a job file: %q", got)
	}
}

// A mesh file or a joint list given where the job file goes is refused
// at once, naming the flag that takes it, whatever its extension; so is
// a file too large to be a job file (a 230 MB mesh was parsed as YAML
// for 12 s before).
func TestLoadJobNotAJobFile(t *testing.T) {
	dir := t.TempDir()
	write := func(name, text string) string {
		p := filepath.Join(dir, name)
		if err := os.WriteFile(p, []byte(text), 0o644); err != nil {
			t.Fatal(err)
		}
		return p
	}
	big := "version: 1\nmeshes: [a.vtk]\n#" + strings.Repeat("x", MaxJobFileBytes) + "\n"
	tests := []struct {
		name, file, text, want string
	}{
		{"native by extension", "m.jmesh", "joinery-mesh 1\n", "m.jmesh: this is a mesh file, not a job file: give it with --mesh (-m)"},
		{"legacy vtk by extension", "m.VTK", "", "m.VTK: this is a mesh file"},
		{"xml vtk by extension", "m.vtu", "", "m.vtu: this is a mesh file"},
		{"joint list", "w.csv", "id,x,y,z\n", "w.csv: this is a joint list, not a job file: give it with --joints (-j)"},
		{"native by first line", "job.yaml", "joinery-mesh 1\npart 1\n", "job.yaml: this is a mesh file"},
		{"legacy vtk by first line", "a.yaml", "# vtk DataFile Version 3.0\n", "a.yaml: this is a mesh file"},
		{"xml vtk by first line", "b.yaml", "  <VTKFile type=\"UnstructuredGrid\">\n", "b.yaml: this is a mesh file"},
		{"too large", "big.yaml", big, "big.yaml: larger than 1048576 bytes: not a job file"},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			_, err := LoadJob(write(tt.file, tt.text))
			checkErr(t, err, filepath.Join(dir, tt.want))
		})
	}
	// A job file of exactly the limit still loads.
	head := "version: 1\nmeshes: [a.vtk]\n#"
	exact := head + strings.Repeat("x", MaxJobFileBytes-len(head)-1) + "\n"
	if _, err := LoadJob(write("exact.yaml", exact)); err != nil {
		t.Errorf("a job file of %d bytes: %v", len(exact), err)
	}
}
