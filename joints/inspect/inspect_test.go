package inspect

import (
	"encoding/json"
	"strings"
	"testing"

	"github.com/joinery-cae/joinery/geom"
	"github.com/joinery-cae/joinery/geom/native"
)

// A part record with no shells is valid native input: its bounding box
// is absent (null), so the inspection still encodes as JSON.
func TestInspectJSONPartWithoutElements(t *testing.T) {
	src := "joinery-mesh 1\npart 1 thickness=1\npart 2 thickness=2\n" +
		"node 1 0 0 0\nnode 2 1 0 0\nnode 3 0 1 0\nshell 1 1 1 2 3\n"
	m, err := native.Read(strings.NewReader(src), "e.jmesh", geom.ReadOptions{})
	if err != nil {
		t.Fatal(err)
	}
	for _, deep := range []bool{false, true} {
		in := Run(ModelInfo{Mesh: m}, nil, Options{Deep: deep})
		if _, err := json.Marshal(in); err != nil {
			t.Errorf("deep=%v: inspection does not encode as JSON: %v", deep, err)
		}
	}
}

// Part 1 has no thickness at all (no part value, no element values); it
// is reported even though another file gives its shells a thickness.
func TestInspectMissingThicknessWithOtherFileElementThickness(t *testing.T) {
	a, err := native.Read(strings.NewReader("joinery-mesh 1\nnode 1 0 0 0\nnode 2 1 0 0\nnode 3 0 1 0\nshell 1 1 1 2 3\n"), "a.jmesh", geom.ReadOptions{})
	if err != nil {
		t.Fatal(err)
	}
	b, err := native.Read(strings.NewReader("joinery-mesh 1\nnode 11 0 0 5\nnode 12 1 0 5\nnode 13 0 1 5\nshell 11 2 11 12 13 t=1\n"), "b.jmesh", geom.ReadOptions{})
	if err != nil {
		t.Fatal(err)
	}
	m, _, err := geom.Merge([]*geom.Mesh{a, b}, false)
	if err != nil {
		t.Fatal(err)
	}
	in := Run(ModelInfo{Mesh: m}, nil, Options{})
	found := false
	for _, id := range in.MissingThick {
		found = found || id == 1
	}
	if !found {
		t.Errorf("part 1 has no thickness anywhere but MissingThick = %v", in.MissingThick)
	}
}
