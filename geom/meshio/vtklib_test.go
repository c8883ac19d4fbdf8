package meshio

import (
	"encoding/json"
	"math"
	"os/exec"
	"path/filepath"
	"testing"

	"github.com/joinery-cae/joinery/geom"
)

// vtkDump is what testdata/vtkdump.py prints: a file as VTK's own readers
// (python3-vtk9, the reference implementation of the format) see it.
type vtkDump struct {
	Points    [][3]float64 `json:"points"`
	Cells     [][]int64    `json:"cells"` // type, then point indices
	NodeID    []float64    `json:"node_id"`
	Part      []float64    `json:"part"`
	Thickness []float64    `json:"thickness"`
	ElementID []float64    `json:"element_id"`
}

// TestAgainstVTKLibrary reads every VTK file under testdata and the
// example with VTK's own readers (through python3-vtk9, when installed:
// `apt-get install python3-vtk9`; skipped otherwise) and with Joinery's,
// and compares points, kept cells, ids, parts and thicknesses value by
// value.
func TestAgainstVTKLibrary(t *testing.T) {
	const python = "/usr/bin/python3"
	if err := exec.Command(python, "-c", "import vtk").Run(); err != nil {
		t.Skip("python3-vtk9 not installed: VTK reference reader unavailable")
	}
	var files []string
	for _, pat := range []string{"../../testdata/formats/*.vt[ku]", "../../testdata/vtk/*.vtk", "../../testdata/vtu/*.vtu", "../../testdata/polydata/*.vt[kp]", "../../examples/*/mesh/*.vtk"} {
		m, _ := filepath.Glob(pat)
		files = append(files, m...)
	}
	if len(files) < 10 {
		t.Fatalf("only %d files found", len(files))
	}
	for _, f := range files {
		t.Run(filepath.Base(f), func(t *testing.T) {
			out, err := exec.Command(python, "testdata/vtkdump.py", f).Output()
			if err != nil {
				t.Fatalf("VTK reader: %v", err)
			}
			var ref vtkDump
			if err := json.Unmarshal(out, &ref); err != nil {
				t.Fatal(err)
			}
			m, err := ReadMesh(f, geom.ReadOptions{HasDefaultPart: ref.Part == nil, DefaultPart: 1})
			if err != nil {
				t.Fatal(err)
			}
			compareWithVTK(t, m, &ref)
		})
	}
}

func compareWithVTK(t *testing.T, m *geom.Mesh, ref *vtkDump) {
	t.Helper()
	if len(ref.Points) != m.NumNodes() {
		t.Fatalf("%d points, VTK reads %d", m.NumNodes(), len(ref.Points))
	}
	for i, p := range ref.Points {
		c := m.Coords[i]
		if c.X != p[0] || c.Y != p[1] || c.Z != p[2] {
			t.Fatalf("point %d = %v, VTK reads %v", i, c, p)
		}
		want := int64(i) + 1
		if ref.NodeID != nil {
			want = int64(ref.NodeID[i])
		}
		if m.NodeIDs[i] != want {
			t.Fatalf("point %d: node id %d, VTK reads %d", i, m.NodeIDs[i], want)
		}
	}
	e := 0
	skipped := geom.SkippedCells{}
	for c, cell := range ref.Cells {
		if _, ok := geom.VTKElemType(uint8(cell[0])); !ok {
			skipped[uint8(cell[0])]++
			continue
		}
		if e >= m.NumElems() {
			t.Fatalf("fewer elements than VTK's %d shell cells", e+1)
		}
		nodes := m.ElemNodes(e)
		if len(nodes) != len(cell)-1 {
			t.Fatalf("cell %d: %d nodes, VTK reads %d", c, len(nodes), len(cell)-1)
		}
		for k, n := range nodes {
			if int64(n) != cell[k+1] {
				t.Fatalf("cell %d: nodes %v, VTK reads %v", c, nodes, cell[1:])
			}
		}
		if ref.ElementID != nil && m.ElemIDs[e] != int64(ref.ElementID[c]) {
			t.Fatalf("cell %d: element id %d, VTK reads %g", c, m.ElemIDs[e], ref.ElementID[c])
		}
		if ref.Part != nil && m.Part(e).ID != int64(ref.Part[c]) {
			t.Fatalf("cell %d: part %d, VTK reads %g", c, m.Part(e).ID, ref.Part[c])
		}
		if ref.Thickness != nil && m.Thickness(e) != ref.Thickness[c] && !(math.IsNaN(ref.Thickness[c])) {
			t.Fatalf("cell %d: thickness %g, VTK reads %g", c, m.Thickness(e), ref.Thickness[c])
		}
		e++
	}
	if e != m.NumElems() {
		t.Fatalf("%d elements, VTK has %d shell cells", m.NumElems(), e)
	}
	for k, v := range skipped {
		if m.Sources[0].Skipped[k] != v {
			t.Fatalf("skipped %v, VTK's cells give %v", m.Sources[0].Skipped, skipped)
		}
	}
}
