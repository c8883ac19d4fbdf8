package main

import (
	"bytes"
	"flag"
	"math"
	"os"
	"path/filepath"
	"slices"
	"testing"

	"gonum.org/v1/gonum/spatial/r3"

	"github.com/joinery-cae/joinery/geom"
	"github.com/joinery-cae/joinery/joints"
)

var update = flag.Bool("update", false, "rewrite the example's files in the parent folder")

var outputs = []string{
	"mesh/floor.vtk", "mesh/beam.vtk", "mesh/closing-plate.jmesh", "mesh/bracket.jmesh",
	"parts.yaml", "welds.csv", "job.yaml", "sweep.yaml",
}

// TestGolden checks that the example's files are what the generator
// writes (run with -update to rewrite them), and that they stay small.
func TestGolden(t *testing.T) {
	s, err := build()
	if err != nil {
		t.Fatal(err)
	}
	dir := t.TempDir()
	if *update {
		dir = ".."
	}
	if err := write(s, dir); err != nil {
		t.Fatal(err)
	}
	var total int
	for _, name := range outputs {
		got, err := os.ReadFile(filepath.Join(dir, name))
		if err != nil {
			t.Fatal(err)
		}
		total += len(got)
		want, err := os.ReadFile(filepath.Join("..", name))
		if err != nil {
			t.Errorf("%v (run go test ./examples/van-rear-crossmember/gen -update)", err)
			continue
		}
		if !bytes.Equal(got, want) {
			t.Errorf("%s differs from the generator's output (%d bytes, want %d); run with -update and review the diff", name, len(want), len(got))
		}
	}
	if total > 300_000 {
		t.Errorf("the example's files take %d bytes, want under 300 kB", total)
	}
}

// sheet is one part's mesh for the brute-force checks.
type sheet struct {
	m     *geom.Mesh
	id    int64
	t     float64
	edges [][2]int32 // free edges
}

func sheets(t *testing.T, s *scenario) []sheet {
	t.Helper()
	var out []sheet
	for _, m := range []*geom.Mesh{s.floor, s.beam, s.plate, s.bracket} {
		count := map[[2]int32]int{}
		for e := range m.NumElems() {
			ns := m.ElemNodes(e)
			for k := range ns {
				a, b := ns[k], ns[(k+1)%len(ns)]
				count[[2]int32{min(a, b), max(a, b)}]++
			}
		}
		sh := sheet{m: m, id: m.Parts[0].ID, t: m.Parts[0].Thickness}
		for e, n := range count {
			if n == 1 {
				sh.edges = append(sh.edges, e)
			}
		}
		out = append(out, sh)
	}
	return out
}

// closest returns the point of the sheet nearest p, by brute force over
// the triangles of every element.
func (sh *sheet) closest(p r3.Vec) (r3.Vec, float64) {
	best, bestD := r3.Vec{}, math.Inf(1)
	m := sh.m
	for e := range m.NumElems() {
		ns := m.ElemNodes(e)
		for k := 1; k+1 < len(ns); k++ {
			q, _ := geom.ClosestOnTriangle(p, m.Coords[ns[0]], m.Coords[ns[k]], m.Coords[ns[k+1]])
			if d := r3.Norm(r3.Sub(q, p)); d < bestD {
				best, bestD = q, d
			}
		}
	}
	return best, bestD
}

// edgeDistance returns the distance from p to the nearest free edge
// whose nodes lie farther than skip from p (0: every edge).
func (sh *sheet) edgeDistance(p r3.Vec, skip float64) float64 {
	d := math.Inf(1)
	for _, e := range sh.edges {
		a, b := sh.m.Coords[e[0]], sh.m.Coords[e[1]]
		if r3.Norm(r3.Sub(a, p)) <= skip && r3.Norm(r3.Sub(b, p)) <= skip {
			continue
		}
		ab := r3.Sub(b, a)
		f := max(0, min(1, r3.Dot(r3.Sub(p, a), ab)/r3.Dot(ab, ab)))
		d = min(d, r3.Norm(r3.Sub(p, r3.Add(a, r3.Scale(f, ab)))))
	}
	return d
}

// TestJoints checks the joining plan against the meshes by brute force:
// each joint's sheets are in contact and within half the stack's thickness
// of its point, no other sheet is near, and free edges keep their
// distance: 8 mm for spot welds (about 1.5 nugget diameters, common
// practice), the washer radius plus 2 mm for bolts, whose holes are
// meshed: their sheets' nearest points lie on the hole's edge, which
// lies round the axis at the hole's radius.
func TestJoints(t *testing.T) {
	s, err := build()
	if err != nil {
		t.Fatal(err)
	}
	shs := sheets(t, s)
	var spots, three, listed int
	for i, j := range s.joints {
		stack := s.stacks[i]
		var total float64
		var offs []float64
		for _, sh := range shs {
			if slices.Contains(stack, sh.id) {
				total += sh.t
			}
		}
		for _, id := range stack {
			for _, sh := range shs {
				if sh.id != id {
					continue
				}
				q, d := sh.closest(j.Point)
				limit, skip := total/2, 0.0
				if j.Kind == joints.Bolt {
					limit = math.Hypot(total/2, boltHoleWide/2)
					skip = limit + 0.01
				}
				if d > limit+0.01 {
					t.Errorf("%s: part %d is %.3f mm away, want <= %.3f", j.ID, id, d, limit)
				}
				offs = append(offs, r3.Norm(r3.Sub(q, j.Point)))
				edge := 8.0
				if j.Kind == joints.Bolt {
					edge = j.Washer/2 + 2
				}
				if d := sh.edgeDistance(j.Point, skip); d < edge {
					t.Errorf("%s: %.2f mm from a free edge of part %d, want >= %g", j.ID, d, id, edge)
				}
			}
		}
		// Mid-way: the outer sheets are equally far (bolts: the holes'
		// edges, of different sizes, are nearest).
		if j.Kind == joints.Spot && math.Abs(offs[0]-offs[len(offs)-1]) > 0.01 {
			t.Errorf("%s: outer sheets %.3f and %.3f mm away", j.ID, offs[0], offs[len(offs)-1])
		}
		for _, sh := range shs {
			if slices.Contains(stack, sh.id) {
				continue
			}
			if _, d := sh.closest(j.Point); d < total/2+1 {
				t.Errorf("%s: part %d outside its stack is %.3f mm away", j.ID, sh.id, d)
			}
		}
		if j.Kind == joints.Spot {
			spots++
			if len(stack) == 3 {
				three++
			}
		}
		if j.Parts != nil {
			listed++
		}
	}
	if spots < 20 || spots > 40 || three == 0 || listed == 0 || listed > len(s.joints)/2 {
		t.Errorf("%d spot welds (%d three-sheet), %d with parts listed", spots, three, listed)
	}
}
