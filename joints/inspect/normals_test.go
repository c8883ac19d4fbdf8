package inspect

import (
	"slices"
	"strings"
	"testing"

	"github.com/joinery-cae/joinery/geom"
	"github.com/joinery-cae/joinery/geom/native"
)

// --deep reports the elements whose normals disagree with their
// neighbours', as joinery offsets does (normals-flipped).
func TestInspectDeepNormalsFlipped(t *testing.T) {
	// A strip of three quads; the middle one's node order is reversed.
	src := "joinery-mesh 1\npart 1 thickness=1\n" +
		"node 1 0 0 0\nnode 2 1 0 0\nnode 3 2 0 0\nnode 4 3 0 0\n" +
		"node 5 0 1 0\nnode 6 1 1 0\nnode 7 2 1 0\nnode 8 3 1 0\n" +
		"shell 11 1 1 2 6 5\nshell 12 1 2 6 7 3\nshell 13 1 3 4 8 7\n"
	m, err := native.Read(strings.NewReader(src), "s.jmesh", geom.ReadOptions{})
	if err != nil {
		t.Fatal(err)
	}
	in := Run(ModelInfo{Mesh: m}, nil, DefaultOptions())
	if in.Parts[0].Deep != nil {
		t.Fatal("deep look without --deep")
	}
	o := DefaultOptions()
	o.Deep = true
	in = Run(ModelInfo{Mesh: m}, nil, o)
	if d := in.Parts[0].Deep; d.Flipped != 1 || !slices.Equal(d.FlipElems, []int64{12}) || d.Unorientable != 0 {
		t.Errorf("flipped %d %v unorientable %d, want 1 [12] 0", d.Flipped, d.FlipElems, d.Unorientable)
	}
}
