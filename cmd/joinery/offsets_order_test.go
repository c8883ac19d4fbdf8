package main

import (
	"bytes"
	"math/rand/v2"
	"os"
	"path/filepath"
	"regexp"
	"strings"
	"testing"

	"github.com/joinery-cae/joinery/geom"
	"github.com/joinery-cae/joinery/geom/meshio"
	"github.com/joinery-cae/joinery/geom/native"
	"github.com/joinery-cae/joinery/joints/pipeline"
)

// TestOffsetsElementOrder runs offsets on the example, its meshes written
// as native files, and on the same files with their node lines and
// their shell lines shuffled (each block among itself; every element
// keeps its id, part and nodes): the facing elements, and so every
// output, must not depend on the order of the elements in the file.
// The outputs must be byte-identical but for the run id, which covers
// the files' digests, and, in report.html, the drawing of the parts'
// outlines, whose paths start where the elements' order has them start
// (the same shapes, the same page otherwise).
func TestOffsetsElementOrder(t *testing.T) {
	skipWithoutExample(t)
	exDir := filepath.Dir(exampleJob)
	meshes := []string{"floor.vtk", "beam.vtk", "closing-plate.jmesh", "bracket.jmesh"}
	root := t.TempDir()
	var names []string
	for _, mn := range meshes {
		names = append(names, "mesh/"+strings.TrimSuffix(mn, filepath.Ext(mn))+".jmesh")
	}
	job := "version: 1\nmeshes: [" + strings.Join(names, ", ") + "]\nparts: parts.yaml\njoints: [welds.csv]\nout: out\n"
	rng := rand.New(rand.NewPCG(3, 4))
	outs := map[string]map[string][]byte{}
	for _, variant := range []string{"ordered", "shuffled"} {
		dir := filepath.Join(root, variant)
		if err := os.MkdirAll(filepath.Join(dir, "mesh"), 0o755); err != nil {
			t.Fatal(err)
		}
		for _, f := range []string{"parts.yaml", "welds.csv"} {
			b, err := os.ReadFile(filepath.Join(exDir, f))
			if err != nil {
				t.Fatal(err)
			}
			if err := os.WriteFile(filepath.Join(dir, f), b, 0o644); err != nil {
				t.Fatal(err)
			}
		}
		if err := os.WriteFile(filepath.Join(dir, "job.yaml"), []byte(job), 0o644); err != nil {
			t.Fatal(err)
		}
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
			if variant == "shuffled" {
				text = shuffleBlocks(rng, text, "node ", "shell ")
			}
			if err := os.WriteFile(filepath.Join(dir, names[k]), text, 0o644); err != nil {
				t.Fatal(err)
			}
		}
		out := filepath.Join(dir, "out")
		if code, _, errs := runCLI(t, "offsets", filepath.Join(dir, "job.yaml"), "--out", out, "--quiet"); code != exitOK {
			t.Fatalf("%s: offsets: exit %d: %s", variant, code, errs)
		}
		outs[variant] = map[string][]byte{}
		for _, f := range pipeline.OffsetsFiles() {
			b, err := os.ReadFile(filepath.Join(out, f))
			if err != nil {
				t.Fatal(err)
			}
			outs[variant][f] = b
		}
	}
	runID, path := regexp.MustCompile(`[0-9a-f]{32}`), regexp.MustCompile(` d="[^"]*"`)
	for f, want := range outs["ordered"] {
		got := outs["shuffled"][f]
		if bytes.Equal(got, want) {
			t.Errorf("%s: the run ids do not differ: the files were not shuffled", f)
		}
		g, w := runID.ReplaceAll(got, nil), runID.ReplaceAll(want, nil)
		if f == pipeline.PageFile {
			g, w = path.ReplaceAll(g, nil), path.ReplaceAll(w, nil)
		}
		if !bytes.Equal(g, w) {
			gl, wl := strings.Split(string(g), "\n"), strings.Split(string(w), "\n")
			for i := range min(len(gl), len(wl)) {
				if gl[i] != wl[i] {
					t.Errorf("%s differs at line %d with the elements shuffled:\n got: %.200q\nwant: %.200q", f, i+1, gl[i], wl[i])
					break
				}
			}
			if len(gl) != len(wl) {
				t.Errorf("%s: %d lines with the elements shuffled, %d in order", f, len(gl), len(wl))
			}
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
