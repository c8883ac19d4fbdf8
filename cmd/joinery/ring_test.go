package main

import (
	"fmt"
	"math"
	"path/filepath"
	"testing"

	"github.com/joinery-cae/joinery/joints"
)

// frameSheet is a square sheet of n by n quads of size h from (x0, x0)
// at height z, the quads from hole0 to hole1 (exclusive) both ways left
// out: a frame round a square opening. Node and element ids from
// base+1.
type frameSheet struct {
	part         int64
	t, z, x0, h  float64
	n            int
	hole0, hole1 int
	base         int64
}

// frameMesh returns the lines of a native mesh file of the frames.
func frameMesh(fs ...frameSheet) []string {
	lines := []string{"joinery-mesh 1"}
	for _, f := range fs {
		lines = append(lines, fmt.Sprintf("part %d thickness=%g", f.part, f.t))
	}
	for _, f := range fs {
		for j := 0; j <= f.n; j++ {
			for i := 0; i <= f.n; i++ {
				lines = append(lines, fmt.Sprintf("node %d %g %g %g", f.base+int64(j*(f.n+1)+i)+1, f.x0+float64(i)*f.h, f.x0+float64(j)*f.h, f.z))
			}
		}
	}
	for _, f := range fs {
		id := f.base
		for j := 0; j < f.n; j++ {
			for i := 0; i < f.n; i++ {
				if i >= f.hole0 && i < f.hole1 && j >= f.hole0 && j < f.hole1 {
					continue
				}
				n0 := f.base + int64(j*(f.n+1)+i) + 1
				id++
				lines = append(lines, fmt.Sprintf("shell %d %d %d %d %d %d", id, f.part, n0, n0+1, n0+int64(f.n)+2, n0+int64(f.n)+1))
			}
		}
	}
	return lines
}

// flanges --pitch on a square ring flange (a frame round a window
// opening), then build on its joints.csv: every weld built, none closer
// than one nugget diameter (5 sqrt(t) = 5 mm for 1 mm sheets, common
// practice) to a free edge (no edge-close). The rings are 15 mm wide
// round a 30 mm opening, the welds on the mid-line 7.5 mm from both
// edges, and, the reviewer's model, 10 mm wide round a 20 mm opening at
// 20 mm pitch (5 welds), the mid-line exactly one nugget diameter from
// both edges.
func TestFlangesOnSquareRingBuildClean(t *testing.T) {
	for _, tc := range []struct {
		name   string
		sheets []frameSheet
		length float64 // 4 (a + w), closed form
		tol    float64
		pitch  string
	}{
		{"congruent, 15 mm wide", []frameSheet{
			{part: 1, t: 1, h: 5, n: 12, hole0: 3, hole1: 9, base: 100000},
			{part: 2, t: 1, z: 1, h: 5, n: 12, hole0: 3, hole1: 9, base: 200000},
		}, 180, 0.1, "30"},
		// Part 2 on a 2.7 mm grid from -4.3 mm, its own opening (17.3 to
		// 44.3 mm) inside part 1's: the overlap is part 1's frame, whose
		// edges cut part 2's elements (see joints/flange's square ring
		// tests for the tolerance, 0.5 h).
		{"projected, 15 mm wide", []frameSheet{
			{part: 1, t: 1, h: 5, n: 12, hole0: 3, hole1: 9, base: 100000},
			{part: 2, t: 1, z: 1, x0: -4.3, h: 2.7, n: 27, hole0: 8, hole1: 18, base: 200000},
		}, 180, 1.35, "30"},
		{"congruent, 10 mm wide", []frameSheet{
			{part: 1, t: 1, h: 5, n: 8, hole0: 2, hole1: 6, base: 100000},
			{part: 2, t: 1, z: 1, h: 5, n: 8, hole0: 2, hole1: 6, base: 200000},
		}, 120, 0.1, "20"},
	} {
		t.Run(tc.name, func(t *testing.T) {
			dir := t.TempDir()
			mesh := writeLines(t, filepath.Join(dir, "ring.jmesh"), frameMesh(tc.sheets...))
			fl := runDocs(t, "flanges", "--mesh", mesh, "--pitch", tc.pitch)
			doc := readFlanges(t, filepath.Join(fl, "flanges.json"))
			if len(doc.Flanges) != 1 || doc.Flanges[0].Shape != "closed" || math.Abs(doc.Flanges[0].Length-tc.length) > tc.tol {
				t.Fatalf("flanges %+v; want one closed flange %g mm round", doc.Flanges, tc.length)
			}
			list := filepath.Join(fl, "joints.csv")
			welds, _, err := joints.ReadJoints(list)
			if err != nil || len(welds) < 4 {
				t.Fatalf("joints.csv: %d welds, %v", len(welds), err)
			}
			bl := runDocs(t, "build", "--mesh", mesh, "--joints", list)
			cs := readConnectors(t, filepath.Join(bl, "connectors.json"))
			if len(cs.Connectors) != len(welds) {
				t.Errorf("%d connectors for %d welds", len(cs.Connectors), len(welds))
			}
			for _, c := range cs.Connectors {
				if c.State != "built" || len(c.Findings) > 0 {
					t.Errorf("weld %s: %s, findings %v", c.ID, c.State, c.Findings)
				}
			}
		})
	}
}
