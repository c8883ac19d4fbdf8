package main

import (
	"bytes"
	"math/rand/v2"
	"os"
	"path/filepath"
	"regexp"
	"slices"
	"strings"
	"testing"

	"github.com/joinery-cae/joinery/geom"
	"github.com/joinery-cae/joinery/geom/meshio"
	"github.com/joinery-cae/joinery/geom/native"
	"github.com/joinery-cae/joinery/joints/pipeline"
)

// TestElementOrder runs build (each attachment), check and offsets on
// the example, its meshes written as native files, and on the same files
// with their shell lines shuffled (two seeds), and with their node lines
// shuffled as well (every element keeps its id, part and nodes): no
// output may depend on the order of the elements in the files. The
// outputs must be byte-identical but for the run id, which covers the
// files' digests; that includes report.html's drawings of the parts'
// outlines. The readers put each file's nodes and elements in id order
// (geom.Mesh.SortByID), so that no sum, tie or traced outline follows
// the lines of a file: flanges' areas, widths, centrelines and weld
// stations, and a bolt's ring nodes, included.
func TestElementOrder(t *testing.T) {
	skipWithoutExample(t)
	root := t.TempDir()
	variants := []struct {
		name  string
		seed  uint64
		nodes bool // node lines shuffled too
	}{{"ordered", 0, false}, {"shells-1", 1, false}, {"shells-2", 2, false}, {"nodes", 3, true}}
	for _, v := range variants {
		writeOrderVariant(t, filepath.Join(root, v.name), v.seed, v.nodes)
	}
	// check audits the ordered build's connectors on every variant.
	conns := filepath.Join(root, "ordered", "built", "connectors.json")
	runs := []struct {
		name  string
		args  []string
		files []string
		nodes bool // holds with the node lines shuffled
	}{
		{"build interpolated", []string{"build", "--attach", "interpolated"}, pipeline.BuildFiles(), true},
		{"build node-pair", []string{"build", "--attach", "node-pair"}, pipeline.BuildFiles(), true},
		{"build patch", []string{"build", "--attach", "patch"}, pipeline.BuildFiles(), true},
		{"check", []string{"check", "--connectors", conns, "--fail-on", "never"}, pipeline.CheckFiles(), true},
		{"offsets", []string{"offsets"}, pipeline.OffsetsFiles(), true},
		{"flanges", []string{"flanges", "--pitch", "30", "--fail-on", "never"}, pipeline.FlangesFiles(), true},
	}
	if code, _, errs := runCLI(t, "build", filepath.Join(root, "ordered", "job.yaml"), "--out", filepath.Dir(conns), "--quiet"); code != exitOK {
		t.Fatalf("build: exit %d: %s", code, errs)
	}
	for _, r := range runs {
		t.Run(r.name, func(t *testing.T) {
			outs := map[string]map[string][]byte{}
			for _, v := range variants {
				if v.nodes && !r.nodes {
					continue
				}
				dir := filepath.Join(root, v.name)
				out := filepath.Join(dir, strings.ReplaceAll(r.name, " ", "-"))
				args := append(slices.Clone(r.args), filepath.Join(dir, "job.yaml"), "--out", out, "--quiet")
				if code, _, errs := runCLI(t, args...); code != exitOK {
					t.Fatalf("%s: exit %d: %s", v.name, code, errs)
				}
				outs[v.name] = map[string][]byte{}
				for _, f := range r.files {
					b, err := os.ReadFile(filepath.Join(out, f))
					if err != nil {
						t.Fatal(err)
					}
					outs[v.name][f] = b
				}
			}
			for v, got := range outs {
				if v != "ordered" {
					compareOutputs(t, v, outs["ordered"], got)
				}
			}
		})
	}
}

// writeOrderVariant writes the example into dir, its meshes as native
// files, their shell lines (and node lines, with nodes) shuffled unless
// seed is 0.
func writeOrderVariant(t *testing.T, dir string, seed uint64, nodes bool) {
	t.Helper()
	exDir := filepath.Dir(exampleJob)
	meshes := []string{"floor.vtk", "beam.vtk", "closing-plate.jmesh", "bracket.jmesh"}
	var names []string
	for _, mn := range meshes {
		names = append(names, "mesh/"+strings.TrimSuffix(mn, filepath.Ext(mn))+".jmesh")
	}
	job := "version: 1\nmeshes: [" + strings.Join(names, ", ") + "]\nparts: parts.yaml\njoints: [welds.csv]\nout: out\n"
	if err := os.MkdirAll(filepath.Join(dir, "mesh"), 0o755); err != nil {
		t.Fatal(err)
	}
	copyExampleLists(t, exDir, dir)
	if err := os.WriteFile(filepath.Join(dir, "job.yaml"), []byte(job), 0o644); err != nil {
		t.Fatal(err)
	}
	rng := rand.New(rand.NewPCG(seed, 4))
	for k, mn := range meshes {
		m, err := meshio.ReadMesh(filepath.Join(exDir, "mesh", mn), geom.ReadOptions{})
		if err != nil {
			t.Fatal(err)
		}
		var buf bytes.Buffer
		if err := native.Write(&buf, m); err != nil {
			t.Fatal(err)
		}
		text := buf.Bytes()
		if nodes {
			text = shuffleBlocks(rng, text, "node ")
		}
		if seed != 0 {
			text = shuffleBlocks(rng, text, "shell ")
		}
		if err := os.WriteFile(filepath.Join(dir, names[k]), text, 0o644); err != nil {
			t.Fatal(err)
		}
	}
}

// compareOutputs compares the files of a run on shuffled meshes (got)
// with those on the ordered ones (want), byte for byte but for the run
// id, which must differ.
func compareOutputs(t *testing.T, variant string, want, got map[string][]byte) {
	t.Helper()
	runID := regexp.MustCompile(`[0-9a-f]{32}`)
	for f, w := range want {
		g := got[f]
		if bytes.Equal(g, w) && runID.Match(w) {
			t.Errorf("%s: %s: the run ids do not differ: the files were not shuffled", variant, f)
		}
		g, w = runID.ReplaceAll(g, nil), runID.ReplaceAll(w, nil)
		if bytes.Equal(g, w) {
			continue
		}
		gl, wl := strings.Split(string(g), "\n"), strings.Split(string(w), "\n")
		for i := range min(len(gl), len(wl)) {
			if gl[i] != wl[i] {
				at := 0
				for at < min(len(gl[i]), len(wl[i])) && gl[i][at] == wl[i][at] {
					at++
				}
				from := max(0, at-60)
				t.Errorf("%s: %s differs at line %d, byte %d:\n got: %.200q\nwant: %.200q", variant, f, i+1, at, gl[i][from:], wl[i][from:])
				break
			}
		}
		if len(gl) != len(wl) {
			t.Errorf("%s: %s: %d lines shuffled, %d in order", variant, f, len(gl), len(wl))
		}
	}
}

// shuffleBlocks shuffles the lines of text that start with each prefix
// among the lines of that prefix, leaving every other line in place.
func shuffleBlocks(rng *rand.Rand, text []byte, prefixes ...string) []byte {
	lines := bytes.SplitAfter(text, []byte("\n"))
	for _, p := range prefixes {
		var at []int
		for i, l := range lines {
			if bytes.HasPrefix(l, []byte(p)) {
				at = append(at, i)
			}
		}
		perm := rng.Perm(len(at))
		moved := make([][]byte, len(at))
		for k, j := range perm {
			moved[k] = lines[at[j]]
		}
		for k, i := range at {
			lines[i] = moved[k]
		}
	}
	return bytes.Join(lines, nil)
}

// TestPartOrder: the example's meshes merged into one native file, its
// part records in one order and reversed, give byte-identical outputs
// but for the run id. The readers list a file's parts in the order of
// their records (or of first use); which part of a pair is taken first
// decides the side a contact between them is sampled from, and offsets
// found 5 contacts with the records in one order, 6 reversed, until the
// loader put the parts in id order (geom.Mesh.SortByID); offsets now
// takes that side by geometry, so that renumbering the parts does not
// move it either (joints/offset TestInferIndependentOfIDsAndOrder).
func TestPartOrder(t *testing.T) {
	skipWithoutExample(t)
	root := t.TempDir()
	exDir := filepath.Dir(exampleJob)
	all := exampleMerged(t)
	var buf bytes.Buffer
	if err := native.Write(&buf, all); err != nil {
		t.Fatal(err)
	}
	lines := bytes.SplitAfter(buf.Bytes(), []byte("\n"))
	var at []int
	for i, l := range lines {
		if bytes.HasPrefix(l, []byte("part ")) {
			at = append(at, i)
		}
	}
	if len(at) < 2 {
		t.Fatalf("%d part records, want several", len(at))
	}
	rev := slices.Clone(lines)
	for k, i := range at {
		rev[i] = lines[at[len(at)-1-k]]
	}
	texts := map[string][]byte{"ordered": buf.Bytes(), "reversed": bytes.Join(rev, nil)}
	for name, text := range texts {
		dir := filepath.Join(root, name)
		if err := os.MkdirAll(dir, 0o755); err != nil {
			t.Fatal(err)
		}
		copyExampleLists(t, exDir, dir)
		job := "version: 1\nmeshes: [all.jmesh]\nparts: parts.yaml\njoints: [welds.csv]\nout: out\n"
		if err := os.WriteFile(filepath.Join(dir, "job.yaml"), []byte(job), 0o644); err != nil {
			t.Fatal(err)
		}
		if err := os.WriteFile(filepath.Join(dir, "all.jmesh"), text, 0o644); err != nil {
			t.Fatal(err)
		}
	}
	for _, r := range []struct {
		args  []string
		files []string
	}{
		{[]string{"build"}, pipeline.BuildFiles()},
		{[]string{"offsets"}, pipeline.OffsetsFiles()},
		{[]string{"flanges", "--pitch", "30"}, pipeline.FlangesFiles()},
	} {
		outs := map[string]map[string][]byte{}
		for name := range texts {
			out := filepath.Join(root, name, r.args[0])
			args := append(slices.Clone(r.args), filepath.Join(root, name, "job.yaml"), "--out", out, "--quiet", "--fail-on", "never")
			if code, _, errs := runCLI(t, args...); code != exitOK {
				t.Fatalf("%s %s: exit %d: %s", r.args[0], name, code, errs)
			}
			outs[name] = map[string][]byte{}
			for _, f := range r.files {
				b, err := os.ReadFile(filepath.Join(out, f))
				if err != nil {
					t.Fatal(err)
				}
				outs[name][f] = b
			}
		}
		compareOutputs(t, r.args[0]+" parts reversed", outs["ordered"], outs["reversed"])
	}
}

// copyExampleLists copies the example's parts table and joint list from
// exDir into dir.
func copyExampleLists(t *testing.T, exDir, dir string) {
	t.Helper()
	for _, f := range []string{"parts.yaml", "welds.csv"} {
		b, err := os.ReadFile(filepath.Join(exDir, f))
		if err != nil {
			t.Fatal(err)
		}
		if err := os.WriteFile(filepath.Join(dir, f), b, 0o644); err != nil {
			t.Fatal(err)
		}
	}
}
