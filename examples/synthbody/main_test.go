package main

import (
	"io"
	"os"
	"path/filepath"
	"reflect"
	"testing"

	"github.com/joinery-cae/joinery/geom/meshio"
	"github.com/joinery-cae/joinery/joints"
	"github.com/joinery-cae/joinery/joints/pipeline"
	"github.com/joinery-cae/joinery/joints/synth"
)

// TestRun writes a small body in both mesh formats and reads it back with
// Joinery's readers: the same mesh from each, the table's thicknesses, and
// the same joints.
func TestRun(t *testing.T) {
	cfg := synth.Config{Elements: 12_000, Welds: 40, Bolts: 2, Seed: 3}
	dir := t.TempDir()
	if err := run(options{cfg: cfg, out: dir, format: "both"}, io.Discard); err != nil {
		t.Fatal(err)
	}
	want, err := synth.Generate(cfg)
	if err != nil {
		t.Fatal(err)
	}
	for _, name := range []string{"body.jmesh", "body.vtk"} {
		got, err := meshio.Load(meshio.LoadOptions{Meshes: []string{filepath.Join(dir, name)}, Parts: filepath.Join(dir, "parts.yaml")})
		if err != nil {
			t.Fatal(err)
		}
		m, w := got.Mesh, want.Mesh
		if !reflect.DeepEqual(m.Coords, w.Coords) || !reflect.DeepEqual(m.NodeIDs, w.NodeIDs) ||
			!reflect.DeepEqual(m.ElemIDs, w.ElemIDs) || !reflect.DeepEqual(m.Conn, w.Conn) {
			t.Errorf("%s: mesh read back differs from the generated one", name)
		}
		for i, p := range m.Parts {
			if q := w.Parts[i]; p.ID != q.ID || p.Thickness != q.Thickness || p.Name != q.Name {
				t.Errorf("%s: part %+v, want %+v", name, p, q)
			}
		}
	}
	js, warns, err := joints.ReadJoints(filepath.Join(dir, "welds.csv"))
	if err != nil || len(warns) > 0 {
		t.Fatal(err, warns)
	}
	if len(js) != len(want.Joints) {
		t.Fatalf("%d joints read back, want %d", len(js), len(want.Joints))
	}
	for i, j := range js {
		j.File, j.Line, j.Tags = "", 0, nil
		if !reflect.DeepEqual(j, want.Joints[i]) {
			t.Errorf("joint %d read back as %+v, want %+v", i, j, want.Joints[i])
		}
	}
	if _, err := pipeline.LoadJob(filepath.Join(dir, "job.yaml")); err != nil {
		t.Error(err)
	}
}

func TestRunBadFormat(t *testing.T) {
	if err := run(options{cfg: synth.Config{Elements: 100}, out: t.TempDir(), format: "stl"}, io.Discard); err == nil {
		t.Error("no error for -format stl")
	}
}

func TestDefaultOutOutsideCheckout(t *testing.T) {
	// Without -out the files go under the system's temporary directory,
	// not into the working directory (the checkout).
	out := defaultOut()
	if !filepath.IsAbs(out) || filepath.Dir(out) != filepath.Clean(os.TempDir()) {
		t.Errorf("default -out %q is not directly under %q", out, os.TempDir())
	}
}
