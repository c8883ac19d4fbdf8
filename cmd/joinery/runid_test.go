package main

import (
	"bytes"
	"encoding/json"
	"fmt"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"github.com/joinery-cae/joinery/joints"
	"github.com/joinery-cae/joinery/writers"
)

// runIDJobs are job files written beside a copy of the example: the
// same run spelled in several ways, and runs that differ.
var runIDJobs = map[string]string{
	// The example's inputs with no setting at all.
	"bare.yaml": `version: 1
meshes: [mesh/floor.vtk, mesh/beam.vtk, mesh/closing-plate.jmesh, mesh/bracket.jmesh]
parts: parts.yaml
joints: [welds.csv]
`,
	// The same with comments, its keys in another order, other YAML
	// styles and a default given explicitly.
	"commented.yaml": `# The example again, written another way.
joints:
  - welds.csv   # the joining plan
parts: "parts.yaml"
build: {attach: interpolated}
version: 1
meshes:
  - mesh/floor.vtk
  - mesh/beam.vtk
  - mesh/closing-plate.jmesh
  - mesh/bracket.jmesh
`,
	// Every setting given at its default (or 0 for automatic).
	"defaults.yaml": `version: 1
meshes: [mesh/floor.vtk, mesh/beam.vtk, mesh/closing-plate.jmesh, mesh/bracket.jmesh]
parts: parts.yaml
joints: [welds.csv]
renumber: false
part_array: part
units: mm
build:
  reach: 0
  gap_allowance: 0
  attach: interpolated
  spot_dofs: [tx, ty, tz, rx, ry, rz]
  id_start: 0
  nugget_rule: 5sqrt
  links: gap
  bolt_dofs: [tx, ty, tz]
  bolt_coupling: rigid
  shank: rigid
  bolt_ring: hole
  shank_modulus: 0
  hole_tolerance: 0
  fail_on: never
  groups: {}
flanges:
  pitch: 30
  end_margin: 0
`,
	// Another attachment, from the job rather than a flag.
	"patch.yaml": `version: 1
meshes: [mesh/floor.vtk, mesh/beam.vtk, mesh/closing-plate.jmesh, mesh/bracket.jmesh]
parts: parts.yaml
joints: [welds.csv]
build:
  attach: patch
`,
	// A pitch from the job rather than a flag, spelled otherwise.
	"pitch.yaml": `version: 1
meshes: [mesh/floor.vtk, mesh/beam.vtk, mesh/closing-plate.jmesh, mesh/bracket.jmesh]
parts: parts.yaml
flanges: {pitch: "30.0"}
`,
}

// A run id depends on what shapes the outputs and on nothing else: the
// same run given with its defaults left out or spelled out, by flags or
// by job keys, with or without a job file, from a job file with comments
// and its keys in another order, writes byte-identical sets with one run
// id; another setting or a changed input byte gives another id.
func TestRunIDFollowsOutputsNotSpelling(t *testing.T) {
	skipWithoutExample(t)
	dir := t.TempDir()
	if err := os.CopyFS(dir, os.DirFS(exampleDir)); err != nil {
		t.Fatal(err)
	}
	for name, text := range runIDJobs {
		if err := os.WriteFile(filepath.Join(dir, name), []byte(text), 0o644); err != nil {
			t.Fatal(err)
		}
	}
	t.Chdir(dir) // so that paths given by flags record as the job files record them
	outs := t.TempDir()
	n := 0
	// run runs one command line into a fresh output directory and
	// returns the set's run id and its files.
	run := func(args ...string) (string, map[string][]byte) {
		t.Helper()
		n++
		out := filepath.Join(outs, fmt.Sprint(n))
		code, _, errs := runCLI(t, append(args, "--out", out, "--quiet")...)
		if code != exitOK && code != exitFindings { // --fail-on changes the status only
			t.Fatalf("%s: exit %d: %s", strings.Join(args, " "), code, errs)
		}
		set, err := writers.ReadSet(out)
		if err != nil {
			t.Fatal(err)
		}
		files := map[string][]byte{}
		ents, err := os.ReadDir(out)
		if err != nil {
			t.Fatal(err)
		}
		for _, e := range ents {
			if files[e.Name()], err = os.ReadFile(filepath.Join(out, e.Name())); err != nil {
				t.Fatal(err)
			}
		}
		return set.Marker.RunID, files
	}
	mesh := []string{"-m", "mesh/floor.vtk", "-m", "mesh/beam.vtk", "-m", "mesh/closing-plate.jmesh", "-m", "mesh/bracket.jmesh", "-p", "parts.yaml"}
	flagsOnly := append([]string{"build"}, append(mesh, "-j", "welds.csv")...)

	baseID, baseFiles := run("build", "bare.yaml")
	// The values the defaults resolve to in the example, from its
	// connectors.json: reach 4.5 x 3 mm (the largest thickness) and
	// the first id above the mesh's largest.
	var conn struct {
		Options struct{ Reach float64 } `json:"options"`
		NewIDs  struct{ First int64 }   `json:"new_ids"`
	}
	if err := json.Unmarshal(baseFiles["connectors.json"], &conn); err != nil || conn.Options.Reach <= 0 || conn.NewIDs.First <= 0 {
		t.Fatalf("connectors.json: %v, %+v", err, conn)
	}
	explicit := []string{"--reach", fmt.Sprint(conn.Options.Reach), "--id-start", fmt.Sprint(conn.NewIDs.First),
		"--shank-modulus", fmt.Sprint(joints.DefaultShankModulus), "--hole-tolerance", fmt.Sprint(joints.DefaultHoleTolerance),
		"--bolt-dofs", "tz,tx,ty", "--spot-dofs", "rz,ry,rx,tz,ty,tx"}
	atDefaults := []string{"--attach", "interpolated", "--links", "gap", "--bolt-dofs", "tx,ty,tz", "--spot-dofs", "tx,ty,tz,rx,ry,rz",
		"--nugget-rule", "5sqrt", "--bolt-coupling", "rigid", "--shank", "rigid", "--bolt-ring", "hole", "--shank-modulus", "0",
		"--hole-tolerance", "0", "--reach", "0", "--gap-allowance", "0", "--id-start", "0", "--units", "mm", "--part-array", "part",
		"--renumber=false"}

	same := []struct {
		name string
		args []string
	}{
		{"the example's job (attach given at its default)", []string{"build", "job.yaml"}},
		{"a job with comments, keys in another order", []string{"build", "commented.yaml"}},
		{"a job with every default given", []string{"build", "defaults.yaml"}},
		{"every default given by a flag", append([]string{"build", "bare.yaml"}, atDefaults...)},
		{"the resolved values given by flags", append([]string{"build", "bare.yaml"}, explicit...)},
		{"flags alone, no job file", flagsOnly},
		{"flags alone at their defaults", append(flagsOnly, atDefaults...)},
		{"another failure level (the exit status only)", []string{"build", "bare.yaml", "--fail-on", "info"}},
	}
	for _, tc := range same {
		t.Run("same/"+tc.name, func(t *testing.T) {
			id, files := run(tc.args...)
			if id != baseID {
				t.Errorf("run id %s, want %s", id, baseID)
			}
			sameFiles(t, files, baseFiles)
		})
	}

	// A setting from a job key and from a flag give the same set.
	patchID, patchFiles := run("build", "patch.yaml")
	if id, files := run("build", "bare.yaml", "--attach", "patch"); id != patchID {
		t.Errorf("attach patch by a flag: run id %s, by the job %s", id, patchID)
	} else {
		sameFiles(t, files, patchFiles)
	}
	pitchID, pitchFiles := run(append([]string{"flanges"}, mesh...)...)
	if id, files := run("flanges", "bare.yaml"); id != pitchID { // joints are not read by flanges
		t.Errorf("flanges without a pitch, from the job: run id %s, from flags %s", id, pitchID)
	} else {
		sameFiles(t, files, pitchFiles)
	}
	pitch30ID, pitch30Files := run("flanges", "pitch.yaml")
	for _, args := range [][]string{{"flanges", "bare.yaml", "--pitch", "30"}, {"flanges", "defaults.yaml"}} {
		if id, files := run(args...); id != pitch30ID {
			t.Errorf("%s: run id %s, want %s (pitch 30.0 from the job)", strings.Join(args, " "), id, pitch30ID)
		} else {
			sameFiles(t, files, pitch30Files)
		}
	}

	// What changes the outputs changes the id.
	seen := map[string]string{baseID: "base", patchID: "attach patch", pitchID: "flanges without a pitch", pitch30ID: "flanges at pitch 30"}
	differ := func(what, id string) {
		t.Helper()
		if prev, ok := seen[id]; ok {
			t.Errorf("%s: run id %s, the same as %s", what, id, prev)
		}
		seen[id] = what
	}
	differ("attach node-pair", first(run("build", "bare.yaml", "--attach", "node-pair")))
	differ("links offset", first(run("build", "bare.yaml", "--links", "offset")))
	differ("bolt dofs", first(run("build", "bare.yaml", "--bolt-dofs", "tx,ty,tz,rx,ry,rz")))
	differ("another reach", first(run("build", "bare.yaml", "--reach", fmt.Sprint(conn.Options.Reach+1))))
	differ("another id start", first(run("build", "bare.yaml", "--id-start", fmt.Sprint(conn.NewIDs.First+1000))))
	differ("pitch 40", first(run("flanges", "bare.yaml", "--pitch", "40")))
	differ("check of the build", first(run("check", "bare.yaml", "--connectors", filepath.Join(outs, "1", "connectors.json"))))
	f, err := os.OpenFile("welds.csv", os.O_APPEND|os.O_WRONLY, 0)
	if err != nil {
		t.Fatal(err)
	}
	if _, err := f.WriteString("# one more comment\n"); err != nil {
		t.Fatal(err)
	}
	f.Close()
	differ("a byte added to the joint list", first(run("build", "bare.yaml")))
}

// sameFiles fails unless the two sets hold the same files, byte for
// byte.
func sameFiles(t *testing.T, got, want map[string][]byte) {
	t.Helper()
	if len(got) != len(want) {
		t.Errorf("%d files, want %d", len(got), len(want))
	}
	for name, w := range want {
		if g, ok := got[name]; !ok {
			t.Errorf("%s missing", name)
		} else if !bytes.Equal(g, w) {
			t.Errorf("%s differs", name)
		}
	}
}

func first(id string, _ map[string][]byte) string { return id }
