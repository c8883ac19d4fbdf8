package main

import (
	"encoding/json"
	"fmt"
	"os"
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
	var b strings.Builder
	b.WriteString("joinery-mesh 1\npart 1 thickness=1\npart 2 thickness=1\npart 9 thickness=1 name=declared\n")
	for p := int64(1); p <= 2; p++ {
		for j := range 11 {
			for i := range 21 {
				fmt.Fprintf(&b, "node %d %d %d %d\n", p*1000+int64(j*21+i)+1, 5*i, 5*j, p-1)
			}
		}
		for j := range 10 {
			for i := range 20 {
				n := p*1000 + int64(j*21+i) + 1
				fmt.Fprintf(&b, "shell %d %d %d %d %d %d\n", p*1000+int64(j*20+i)+1, p, n, n+1, n+22, n+21)
			}
		}
	}
	write(t, filepath.Join(dir, "plates.jmesh"), b.String())
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
	data, err := os.ReadFile(filepath.Join(out, "report.json"))
	if err != nil {
		t.Fatal(err)
	}
	var rep struct {
		Summary struct {
			ByCode   map[string]int `json:"by_code"`
			Assembly struct {
				Groups         int `json:"groups"`
				RigidBodyModes int `json:"rigid_body_modes"`
			} `json:"assembly"`
		} `json:"summary"`
	}
	if err := json.Unmarshal(data, &rep); err != nil {
		t.Fatal(err)
	}
	// One welded group: 6 rigid-body modes (a free rigid body's six, from
	// memory of rigid-body kinematics).
	if s := rep.Summary; s.ByCode["free-part"] != 0 || s.Assembly.Groups != 1 || s.Assembly.RigidBodyModes != 6 {
		t.Errorf("findings by code %v, assembly %+v: want no free-part, 1 group, 6 rigid-body modes", s.ByCode, s.Assembly)
	}
	code, text, errs := runCLI(t, append([]string{"inspect"}, in...)...)
	if code != exitOK || !strings.Contains(text, "parts in the table with no elements: 9 99") {
		t.Errorf("inspect: exit %d, %s%s", code, text, errs)
	}
}
