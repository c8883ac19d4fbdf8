package main

import (
	"path/filepath"
	"strings"
	"testing"
)

// A part that has no elements (one the mesh file declares without
// elements, and one only the parts table lists) cannot move: build
// reports no free part for it and counts one group of parts, while
// inspect names both among the table's parts with no elements.
func TestPartWithoutElementsIsNotFree(t *testing.T) {
	dir := t.TempDir()
	// Two 1 mm plates of 20 x 10 elements of 5 mm, in contact (mid-surfaces
	// 1 mm apart), and part 9 declared with no element.
	writeLines(t, filepath.Join(dir, "plates.jmesh"), jmesh([]sheet{
		{part: 1, t: 1, nx: 20, ny: 10, h: 5, base: 1000},
		{part: 2, t: 1, z: 1, nx: 20, ny: 10, h: 5, base: 2000},
	}, "part 9 thickness=1 name=declared"))
	write(t, filepath.Join(dir, "parts.yaml"), `parts:
  - {id: 1, thickness: 1}
  - {id: 2, thickness: 1}
  - {id: 9, thickness: 1, name: declared}
  - {id: 99, thickness: 2, name: only in the table}
`)
	write(t, filepath.Join(dir, "welds.csv"), "id,x,y,z\nW1,22.5,22.5,0.5\nW2,72.5,22.5,0.5\n")
	in := []string{"-m", filepath.Join(dir, "plates.jmesh"), "-p", filepath.Join(dir, "parts.yaml"), "-j", filepath.Join(dir, "welds.csv")}
	out := filepath.Join(dir, "out")
	if code, _, errs := runCLI(t, append(append([]string{"build"}, in...), "-o", out, "--quiet", "--fail-on", "never")...); code != exitOK {
		t.Fatalf("build: exit %d: %s", code, errs)
	}
	// One welded group: 6 rigid-body modes (a free rigid body's six, from
	// memory of rigid-body kinematics).
	s := reportOf(t, out).Summary
	if s.ByCode["free-part"] != 0 || s.Assembly == nil || s.Assembly.Groups != 1 || s.Assembly.RigidBodyModes != 6 {
		t.Errorf("findings by code %v, assembly %+v: want no free-part, 1 group, 6 rigid-body modes", s.ByCode, s.Assembly)
	}
	code, text, errs := runCLI(t, append([]string{"inspect"}, in...)...)
	if code != exitOK || !strings.Contains(text, "parts in the table with no elements: 9 99") {
		t.Errorf("inspect: exit %d, %s%s", code, text, errs)
	}
}
