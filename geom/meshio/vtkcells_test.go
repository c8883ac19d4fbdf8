package meshio

import (
	"bufio"
	"bytes"
	"os/exec"
	"strconv"
	"strings"
	"testing"

	"github.com/joinery-cae/joinery/geom"
)

// TestCellNamesAgainstVTKLibrary checks the names and dimensions of VTK
// cell types that Joinery shows for skipped cells against the cell
// classes VTK's own library instantiates for each type number
// (python3-vtk9; skipped without it): the same kind (the class name, in
// words) and the same dimension.
func TestCellNamesAgainstVTKLibrary(t *testing.T) {
	const python = "/usr/bin/python3"
	const script = `
import vtk
g = vtk.vtkGenericCell()
for t in range(256):
    c = g.InstantiateCell(t)
    if c is not None and c.GetClassName() != "vtkEmptyCell" or t == 0:
        print(t, c.GetClassName(), c.GetCellDimension())
`
	out, err := exec.Command(python, "-c", script).Output()
	if err != nil {
		t.Skip("python3-vtk9 not installed: VTK reference library unavailable")
	}
	norm := func(s string) string {
		s = strings.ToLower(strings.NewReplacer(" ", "", "-", "").Replace(strings.TrimPrefix(s, "vtk")))
		if strings.HasSuffix(s, "tetra") {
			s += "hedron"
		}
		return s
	}
	n := 0
	sc := bufio.NewScanner(bytes.NewReader(out))
	for sc.Scan() {
		f := strings.Fields(sc.Text())
		if len(f) != 3 {
			continue
		}
		typ, _ := strconv.Atoi(f[0])
		dim, _ := strconv.Atoi(f[2])
		name := geom.VTKCellName(uint8(typ))
		if norm(name) != norm(f[1]) || geom.VTKCellDimension(uint8(typ)) != dim {
			t.Errorf("VTK type %d: VTK's class %s of dimension %d; Joinery says %q of dimension %d", typ, f[1], dim, name, geom.VTKCellDimension(uint8(typ)))
		}
		n++
	}
	if n < 40 {
		t.Errorf("only %d cell types from VTK", n)
	}
}
