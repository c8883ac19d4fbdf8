package geom_test

import (
	"fmt"
	"strings"
	"testing"

	"github.com/joinery-cae/joinery/geom"
	"github.com/joinery-cae/joinery/geom/native"
)

// A U-channel (3 x 3 x 3 mm, open at both ends: one outline of 24 mm)
// and a separate 1 x 1 mm patch of the same part lying inside the
// channel's bounding box: two pieces, two outlines, no hole.
func TestSeparatePieceInsideBoxIsNotAHole(t *testing.T) {
	var b strings.Builder
	b.WriteString("joinery-mesh 1\npart 7 thickness=1\n")
	prof := [][2]float64{{0, 3}, {0, 2}, {0, 1}, {0, 0}, {1, 0}, {2, 0}, {3, 0}, {3, 1}, {3, 2}, {3, 3}}
	nid := func(i, j int) int { return 100 + j*len(prof) + i }
	for j := 0; j < 4; j++ {
		for i, p := range prof {
			fmt.Fprintf(&b, "node %d %g %d %g\n", nid(i, j), p[0], j, p[1])
		}
	}
	e := 1
	for j := 0; j < 3; j++ {
		for i := 0; i+1 < len(prof); i++ {
			fmt.Fprintf(&b, "shell %d 7 %d %d %d %d\n", e, nid(i, j), nid(i+1, j), nid(i+1, j+1), nid(i, j+1))
			e++
		}
	}
	b.WriteString("node 9001 1 1 1.5\nnode 9002 2 1 1.5\nnode 9003 2 2 1.5\nnode 9004 1 2 1.5\nshell 9001 7 9001 9002 9003 9004\n")
	m, err := native.Read(strings.NewReader(b.String()), "u.jmesh", geom.ReadOptions{})
	if err != nil {
		t.Fatal(err)
	}
	loops := geom.FreeEdgeLoops(m, geom.FreeEdges(m, geom.NodeElements(m)))
	if len(loops) != 2 {
		t.Fatalf("%d loops, want 2", len(loops))
	}
	for _, lp := range loops {
		if !lp.Outline {
			t.Errorf("loop of %.1f mm (%d nodes) marked as a hole; it is the outline of a separate piece", lp.Length, len(lp.Nodes))
		}
	}
}
