package main

import (
	"bytes"
	"os"
	"path/filepath"
	"regexp"
	"testing"
)

// TestBuildFromPolyData rewrites the example's VTK meshes (one ASCII, one
// binary) as polydata sets, their cells in a POLYGONS section in place of
// CELLS and CELL_TYPES, as a tool that writes surface meshes as polydata
// would, and checks that build writes the same connectors and report:
// only the run id, a hash of the inputs' bytes, differs.
func TestBuildFromPolyData(t *testing.T) {
	skipWithoutExample(t)
	dir := t.TempDir()
	if err := os.CopyFS(dir, os.DirFS(exampleDir)); err != nil {
		t.Fatal(err)
	}
	for _, name := range []string{"floor.vtk", "beam.vtk"} {
		path := filepath.Join(dir, "mesh", name)
		b, err := os.ReadFile(path)
		if err != nil {
			t.Fatal(err)
		}
		b = bytes.Replace(b, []byte("DATASET UNSTRUCTURED_GRID\n"), []byte("DATASET POLYDATA\n"), 1)
		cells := regexp.MustCompile(`\nCELLS (\d+) `).FindSubmatchIndex(b)
		types := bytes.Index(b, []byte("\nCELL_TYPES "))
		data := bytes.Index(b, []byte("\nCELL_DATA "))
		if cells == nil || types < 0 || data < types {
			t.Fatalf("%s: no CELLS, CELL_TYPES and CELL_DATA in that order", name)
		}
		// Every cell of the example is a triangle or a quad: as polygons
		// they take the same types.
		var out []byte
		out = append(out, b[:cells[0]]...)
		out = append(out, "\nPOLYGONS "...)
		out = append(out, b[cells[2]:types]...)
		out = append(out, b[data:]...)
		if err := os.WriteFile(path, out, 0o644); err != nil {
			t.Fatal(err)
		}
	}
	runID := regexp.MustCompile(`"run_id": "[0-9a-f]+"|run [0-9a-f]{32}`)
	outs := t.TempDir()
	build := func(job, name string) map[string][]byte {
		t.Helper()
		out := filepath.Join(outs, name)
		if code, _, errs := runCLI(t, "build", job, "-o", out, "--quiet"); code != exitOK && code != exitFindings {
			t.Fatalf("%s: exit %d: %s", job, code, errs)
		}
		files := map[string][]byte{}
		for _, f := range []string{"connectors.json", "connectors.csv", "report.json"} {
			b, err := os.ReadFile(filepath.Join(out, f))
			if err != nil {
				t.Fatal(err)
			}
			files[f] = runID.ReplaceAll(b, nil)
		}
		return files
	}
	grid := build(filepath.Join(exampleDir, "job.yaml"), "grid")
	poly := build(filepath.Join(dir, "job.yaml"), "poly")
	for name, b := range grid {
		if !bytes.Equal(b, poly[name]) {
			t.Errorf("%s differs when the meshes are polydata", name)
		}
	}
}
