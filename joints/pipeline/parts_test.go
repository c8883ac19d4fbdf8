package pipeline

import (
	"path/filepath"
	"slices"
	"strings"
	"testing"
)

// The job's parts key takes one table or a list: the first is the parts
// table, the others are laid over it.
func TestJobPartsList(t *testing.T) {
	job, err := ReadJob(strings.NewReader("version: 1\nmeshes: [a.vtk]\nparts: [parts.yaml, out/surfaces.yaml]\n"), "jobs/j.yaml")
	if err != nil {
		t.Fatal(err)
	}
	if job.Parts != filepath.Join("jobs", "parts.yaml") || !slices.Equal(job.PartsOverlays, []string{filepath.Join("jobs", "out", "surfaces.yaml")}) {
		t.Errorf("parts %q overlays %q", job.Parts, job.PartsOverlays)
	}
	job, err = ReadJob(strings.NewReader("version: 1\nmeshes: [a.vtk]\nparts: parts.yaml\n"), "j.yaml")
	if err != nil || job.Parts != "parts.yaml" || job.PartsOverlays != nil {
		t.Errorf("single table: %+v, %v", job, err)
	}
	_, err = ReadJob(strings.NewReader("version: 1\nmeshes: [a.vtk]\nparts: [parts.yaml, '']\n"), "j.yaml")
	checkErr(t, err, "j.yaml:3: parts: empty path")
}
