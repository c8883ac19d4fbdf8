package main

import (
	"encoding/json"
	"fmt"
	"math"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"gonum.org/v1/gonum/spatial/r3"

	"github.com/joinery-cae/joinery/geom"
	"github.com/joinery-cae/joinery/geom/geomtest"
	"github.com/joinery-cae/joinery/geom/native"
	"github.com/joinery-cae/joinery/geom/vtk"
)

// sheetVTK describes a legacy VTK file of one flat sheet of 5 mm quads,
// written as a mesher would: options say which arrays it carries.
type sheetVTK struct {
	z         float64
	part      int64
	partArray string  // name of the part id array; "" for none
	thickness float64 // > 0: a thickness cell array with this value
	ids       int64   // > 0: node_id and element_id arrays from this id
	extra     string  // cell type of an extra cell on nodes 0-2 ("1", "3", "7"), "" for none
	extraPart int64   // part id of the extra cell
}

func (s sheetVTK) write(t *testing.T, path string) {
	t.Helper()
	const n = 10 // quads per side
	var b strings.Builder
	fmt.Fprintf(&b, "# vtk DataFile Version 3.0\nsheet\nASCII\nDATASET UNSTRUCTURED_GRID\nPOINTS %d double\n", (n+1)*(n+1))
	for j := 0; j <= n; j++ {
		for i := 0; i <= n; i++ {
			fmt.Fprintf(&b, "%d %d %g\n", 5*i, 5*j, s.z)
		}
	}
	cells := n * n
	var conn []string
	var types []string
	for j := range n {
		for i := range n {
			a := j*(n+1) + i
			conn = append(conn, fmt.Sprintf("4 %d %d %d %d", a, a+1, a+n+2, a+n+1))
			types = append(types, "9")
		}
	}
	switch s.extra {
	case "1":
		conn, types = append(conn, "1 0"), append(types, "1")
	case "3":
		conn, types = append(conn, "2 0 1"), append(types, "3")
	case "7":
		conn, types = append(conn, "3 0 1 12"), append(types, "7")
	}
	size := 0
	for _, c := range conn {
		size += len(strings.Fields(c))
	}
	fmt.Fprintf(&b, "CELLS %d %d\n%s\nCELL_TYPES %d\n%s\n", len(conn), size, strings.Join(conn, "\n"), len(types), strings.Join(types, "\n"))
	fmt.Fprintf(&b, "CELL_DATA %d\n", len(conn))
	if s.partArray != "" {
		fmt.Fprintf(&b, "SCALARS %s int 1\nLOOKUP_TABLE default\n", s.partArray)
		for c := range conn {
			if c < cells {
				fmt.Fprintf(&b, "%d\n", s.part)
			} else {
				fmt.Fprintf(&b, "%d\n", s.extraPart)
			}
		}
	}
	if s.thickness > 0 {
		b.WriteString("SCALARS thickness double 1\nLOOKUP_TABLE default\n")
		for range conn {
			fmt.Fprintf(&b, "%g\n", s.thickness)
		}
	}
	if s.ids > 0 {
		b.WriteString("SCALARS element_id int 1\nLOOKUP_TABLE default\n")
		for c := range conn {
			fmt.Fprintf(&b, "%d\n", s.ids+int64(c))
		}
		fmt.Fprintf(&b, "POINT_DATA %d\nSCALARS node_id int 1\nLOOKUP_TABLE default\n", (n+1)*(n+1))
		for k := range (n + 1) * (n + 1) {
			fmt.Fprintf(&b, "%d\n", s.ids+int64(k))
		}
	}
	writePath(t, path, b.String())
}

func writePath(t *testing.T, path, content string) {
	t.Helper()
	if err := os.WriteFile(path, []byte(content), 0o644); err != nil {
		t.Fatal(err)
	}
}

// twoSheets writes two sheets (parts 1 and 2, 0.8 and 1.2 mm thick in the
// parts table, their mid-surfaces 1 mm apart: in contact) and a joint
// list of two welds; it returns the directory.
func twoSheets(t *testing.T, lower, upper sheetVTK) string {
	t.Helper()
	dir := t.TempDir()
	lower.write(t, filepath.Join(dir, "floor.vtk"))
	upper.write(t, filepath.Join(dir, "beam.vtk"))
	writePath(t, filepath.Join(dir, "parts.yaml"), "parts:\n  - {id: 1, thickness: 0.8}\n  - {id: 2, thickness: 1.2}\n")
	writePath(t, filepath.Join(dir, "welds.csv"), "id,x,y,z\nW1,21.5,26.5,0.5\nW2,31,12,0.5\n")
	return dir
}

func meshArgs(dir string, extra ...string) []string {
	return append([]string{"--mesh", filepath.Join(dir, "floor.vtk"), "--mesh", filepath.Join(dir, "beam.vtk"),
		"--parts", filepath.Join(dir, "parts.yaml"), "--joints", filepath.Join(dir, "welds.csv")}, extra...)
}

// readJSON decodes a JSON file of a build's output.
func readJSON(t *testing.T, path string, v any) {
	t.Helper()
	b, err := os.ReadFile(path)
	if err != nil {
		t.Fatal(err)
	}
	if err := json.Unmarshal(b, v); err != nil {
		t.Fatal(err)
	}
}

type reportFindings struct {
	Findings []struct {
		Severity string  `json:"severity"`
		Code     string  `json:"code"`
		Joint    *string `json:"joint"`
		Parts    []int64 `json:"parts"`
		Message  string  `json:"message"`
	} `json:"findings"`
}

// TestPartArray reads files that keep their part ids in a mesher's array
// (gmsh: CellEntityIds), with --part-array and the job key part_array;
// without them the error names the array asked for and the file's arrays.
func TestPartArray(t *testing.T) {
	dir := twoSheets(t, sheetVTK{z: 0, part: 1, partArray: "CellEntityIds", ids: 1},
		sheetVTK{z: 1, part: 2, partArray: "CellEntityIds", ids: 1001})
	code, _, errs := runCLI(t, append([]string{"inspect"}, meshArgs(dir)...)...)
	if code != exitBadInput || !strings.Contains(errs, `floor.vtk: no cell array "part"; the file's cell arrays are "CellEntityIds"`) ||
		!strings.Contains(errs, "--part-array") {
		t.Errorf("without --part-array: exit %d, %s", code, errs)
	}
	code, _, errs = runCLI(t, append([]string{"inspect", "--part-array", "physical"}, meshArgs(dir)...)...)
	if code != exitBadInput || !strings.Contains(errs, `no cell array "physical"`) {
		t.Errorf("--part-array physical: exit %d, %s", code, errs)
	}
	code, out, errs := runCLI(t, append([]string{"inspect", "--part-array", "CellEntityIds"}, meshArgs(dir)...)...)
	if code != exitOK || !strings.Contains(out, "2 part(s)") {
		t.Errorf("--part-array CellEntityIds: exit %d, %s%s", code, out, errs)
	}
	job := filepath.Join(dir, "job.yaml")
	writePath(t, job, "version: 1\nmeshes: [floor.vtk, beam.vtk]\nparts: parts.yaml\njoints: [welds.csv]\npart_array: CellEntityIds\n")
	out = filepath.Join(dir, "out")
	if code, _, errs := runCLI(t, "build", job, "--out", out, "--quiet"); code != exitOK {
		t.Errorf("job part_array: exit %d, %s", code, errs)
	}
	writePath(t, job, "version: 1\nmeshes: [floor.vtk]\npart_array: element_id\n")
	if code, _, errs := runCLI(t, "inspect", job); code != exitBadInput || !strings.Contains(errs, "part_array") {
		t.Errorf("part_array element_id: exit %d, %s", code, errs)
	}
}

// TestSkippedCellsNamed checks the words for skipped cells in inspect's
// text and JSON and the cells-skipped finding of build.
func TestSkippedCellsNamed(t *testing.T) {
	dir := twoSheets(t, sheetVTK{z: 0, part: 1, partArray: "part", ids: 1, extra: "1", extraPart: 1},
		sheetVTK{z: 1, part: 2, partArray: "part", ids: 1001, extra: "3", extraPart: 9})
	code, out, errs := runCLI(t, append([]string{"inspect"}, meshArgs(dir)...)...)
	if code != exitOK {
		t.Fatalf("exit %d: %s", code, errs)
	}
	for _, want := range []string{"floor.vtk: 121 nodes, 100 elements (skipped vertex (VTK type 1): 1)",
		"cells skipped (kinds Joinery does not read): vertex (VTK type 1): 1, line (VTK type 3): 1"} {
		if !strings.Contains(out, want) {
			t.Errorf("inspect lacks %q:\n%s", want, out)
		}
	}
	code, out, _ = runCLI(t, append([]string{"inspect", "--json"}, meshArgs(dir)...)...)
	var js struct {
		Skipped []struct {
			VTKType int    `json:"vtk_type"`
			Kind    string `json:"kind"`
			Cells   int    `json:"cells"`
		} `json:"skipped_cells"`
	}
	if err := json.Unmarshal([]byte(out), &js); err != nil || code != exitOK {
		t.Fatalf("exit %d, %v", code, err)
	}
	if len(js.Skipped) != 2 || js.Skipped[0].Kind != "vertex" || js.Skipped[1].VTKType != 3 || js.Skipped[1].Cells != 1 {
		t.Errorf("skipped_cells %+v", js.Skipped)
	}
	outDir := filepath.Join(dir, "out")
	code, out, errs = runCLI(t, append([]string{"build", "--out", outDir}, meshArgs(dir)...)...)
	if code != exitOK {
		t.Fatalf("build: exit %d, %s", code, errs)
	}
	var rep reportFindings
	readJSON(t, filepath.Join(outDir, "report.json"), &rep)
	var msgs []string
	for _, f := range rep.Findings {
		if f.Code == "cells-skipped" {
			if f.Severity != "info" || f.Joint != nil {
				t.Errorf("cells-skipped finding %+v", f)
			}
			msgs = append(msgs, f.Message)
		}
	}
	if len(msgs) != 2 || !strings.Contains(msgs[0], "floor.vtk: 1 cell(s) of kinds Joinery does not read were skipped: vertex (VTK type 1): 1") ||
		!strings.Contains(msgs[1], "beam.vtk") || !strings.Contains(msgs[1], "line (VTK type 3): 1") {
		t.Errorf("cells-skipped findings %q", msgs)
	}
	if txt, _ := os.ReadFile(filepath.Join(outDir, "report.txt")); !strings.Contains(string(txt), "cells-skipped") {
		t.Errorf("report.txt does not list cells-skipped")
	}
	if !strings.Contains(out, "cells-skipped 2") {
		t.Errorf("build summary lacks the cells-skipped count:\n%s", out)
	}
}

// TestDroppedShellsAreAnError checks that a part made only of surface
// cells Joinery does not read stops the run, naming the file and kinds.
func TestDroppedShellsAreAnError(t *testing.T) {
	dir := twoSheets(t, sheetVTK{z: 0, part: 1, partArray: "part", ids: 1, extra: "7", extraPart: 3},
		sheetVTK{z: 1, part: 2, partArray: "part", ids: 1001})
	code, _, errs := runCLI(t, append([]string{"inspect"}, meshArgs(dir)...)...)
	if code != exitBadInput || !strings.Contains(errs, "floor.vtk:") ||
		!strings.Contains(errs, "part 3 has no cell Joinery reads: its 1 surface cell(s) are of kinds it does not read (polygon (VTK type 7): 1)") {
		t.Errorf("exit %d, %s", code, errs)
	}
}

// TestImplicitIDsClash checks the message for files that number their
// nodes themselves (no node_id array) and the way out, --renumber.
func TestImplicitIDsClash(t *testing.T) {
	dir := twoSheets(t, sheetVTK{z: 0, part: 1, partArray: "part"}, sheetVTK{z: 1, part: 2, partArray: "part"})
	code, _, errs := runCLI(t, append([]string{"inspect"}, meshArgs(dir)...)...)
	want := "node id 1 appears twice (" + filepath.Join(dir, "floor.vtk") + " and " + filepath.Join(dir, "beam.vtk") +
		"): neither file has a node_id array, so both number their nodes 1, 2, 3, ...; --renumber shifts the ids of the later file"
	if code != exitBadInput || !strings.Contains(errs, want) {
		t.Errorf("exit %d, %s\nwant %s", code, errs, want)
	}
	if code, _, errs := runCLI(t, append([]string{"inspect", "--renumber"}, meshArgs(dir)...)...); code != exitOK {
		t.Errorf("--renumber: exit %d, %s", code, errs)
	}
}

// TestThicknessRule checks that a file's thickness array wins over the
// parts table everywhere: build uses it (and so does the default reach,
// 4.5 times the largest thickness), inspect shows it, and both report
// thickness-mismatch naming the part, the file and the two values.
func TestThicknessRule(t *testing.T) {
	dir := twoSheets(t, sheetVTK{z: 0, part: 1, partArray: "part", ids: 1},
		sheetVTK{z: 1, part: 2, partArray: "part", ids: 1001, thickness: 1.0})
	code, out, errs := runCLI(t, append([]string{"inspect"}, meshArgs(dir)...)...)
	if code != exitOK {
		t.Fatalf("exit %d: %s", code, errs)
	}
	wantMsg := "part 2: " + filepath.Join(dir, "beam.vtk") + " gives 100 element(s) a thickness of 1 mm where the parts table gives 1.2 mm; the file's values are used"
	if !strings.Contains(out, "warning thickness-mismatch: "+wantMsg) {
		t.Errorf("inspect lacks the warning:\n%s", out)
	}
	var row string
	for _, l := range strings.Split(out, "\n") {
		if f := strings.Fields(l); len(f) > 2 && f[0] == "2" {
			row = l
		}
	}
	if f := strings.Fields(row); len(f) < 3 || f[2] != "1" {
		t.Errorf("inspect shows part 2 as %q, want the thickness used, 1", row)
	}
	outDir := filepath.Join(dir, "out")
	if code, _, errs := runCLI(t, append([]string{"build", "--out", outDir, "--quiet"}, meshArgs(dir)...)...); code != exitOK {
		t.Fatalf("build: exit %d, %s", code, errs)
	}
	var conn struct {
		Options struct {
			Reach float64 `json:"reach"`
		} `json:"options"`
		Connectors []struct {
			Sheets []struct {
				Part      int64   `json:"part"`
				Thickness float64 `json:"thickness"`
			} `json:"sheets"`
		} `json:"connectors"`
	}
	readJSON(t, filepath.Join(outDir, "connectors.json"), &conn)
	// The default reach: 4.5 t of the thickest sheet as built (1.0 mm,
	// not the table's 1.2).
	if math.Abs(conn.Options.Reach-4.5) > 1e-12 {
		t.Errorf("reach %g, want 4.5", conn.Options.Reach)
	}
	for _, c := range conn.Connectors {
		for _, s := range c.Sheets {
			if s.Part == 2 && s.Thickness != 1 {
				t.Errorf("part 2 built with thickness %g, want the file's 1", s.Thickness)
			}
		}
	}
	var rep reportFindings
	readJSON(t, filepath.Join(outDir, "report.json"), &rep)
	found := false
	for _, f := range rep.Findings {
		if f.Code == "thickness-mismatch" && f.Severity == "warning" && f.Message == wantMsg && len(f.Parts) == 1 && f.Parts[0] == 2 {
			found = true
		}
	}
	if !found {
		t.Errorf("report.json lacks the thickness-mismatch warning: %+v", rep.Findings)
	}
	// Values that agree within the tolerance (0.1 %) give no warning.
	dir = twoSheets(t, sheetVTK{z: 0, part: 1, partArray: "part", ids: 1},
		sheetVTK{z: 1, part: 2, partArray: "part", ids: 1001, thickness: 1.2000001})
	if _, out, _ := runCLI(t, append([]string{"inspect"}, meshArgs(dir)...)...); strings.Contains(out, "thickness-mismatch") {
		t.Errorf("a warning for 1.2000001 against 1.2:\n%s", out)
	}
}

// TestSecondOrderBuild builds welds between two second-order sheets
// (Quad8 and Quad9 on a gently curved paraboloid z = (x^2+y^2)/1000, in
// VTK and native files) end to end: every weld is built, interpolated
// ends tie to all 8 or 9 nodes of their host, and inspect counts the
// elements.
func TestSecondOrderBuild(t *testing.T) {
	dir := t.TempDir()
	surf := func(dz float64) func(x, y float64) r3.Vec {
		return func(x, y float64) r3.Vec { return r3.Vec{X: x, Y: y, Z: (x*x+y*y)/1000 + dz} }
	}
	lower := geomtest.SecondOrder(geomtest.SecondOrderSpec{Type: geom.Quad8, NX: 8, NY: 8, H: 6, Part: 1, Surface: surf(0)})
	upper := geomtest.SecondOrder(geomtest.SecondOrderSpec{Type: geom.Quad9, NX: 10, NY: 10, H: 5, Part: 2,
		FirstNodeID: 5001, FirstElemID: 5001, Surface: surf(1)})
	f, err := os.Create(filepath.Join(dir, "floor.vtk"))
	if err != nil {
		t.Fatal(err)
	}
	if err := vtk.Write(f, lower, true); err != nil {
		t.Fatal(err)
	}
	f.Close()
	f, err = os.Create(filepath.Join(dir, "beam.jmesh"))
	if err != nil {
		t.Fatal(err)
	}
	if err := native.Write(f, upper); err != nil {
		t.Fatal(err)
	}
	f.Close()
	writePath(t, filepath.Join(dir, "parts.yaml"), "parts:\n  - {id: 1, thickness: 1}\n  - {id: 2, thickness: 1}\n")
	writePath(t, filepath.Join(dir, "welds.csv"), "id,x,y,z\nW1,21.5,26.5,0.5\nW2,31,12,0.5\nW3,12.2,40.3,0.5\n")
	args := []string{"--mesh", filepath.Join(dir, "floor.vtk"), "--mesh", filepath.Join(dir, "beam.jmesh"),
		"--parts", filepath.Join(dir, "parts.yaml"), "--joints", filepath.Join(dir, "welds.csv")}
	code, out, errs := runCLI(t, append([]string{"inspect", "--deep"}, args...)...)
	if code != exitOK || !strings.Contains(out, "164 elements (164 quads, 0 triangles, 164 of them second-order)") {
		t.Fatalf("inspect: exit %d, %s%s", code, out, errs)
	}
	outDir := filepath.Join(dir, "out")
	if code, _, errs := runCLI(t, append([]string{"build", "--out", outDir, "--quiet"}, args...)...); code != exitOK {
		t.Fatalf("build: exit %d, %s", code, errs)
	}
	var conn struct {
		Connectors []struct {
			ID     string `json:"id"`
			State  string `json:"state"`
			Sheets []struct {
				Part    int64     `json:"part"`
				Point   []float64 `json:"point"`
				Nodes   []int64   `json:"nodes"`
				Weights []float64 `json:"weights"`
			} `json:"sheets"`
		} `json:"connectors"`
	}
	readJSON(t, filepath.Join(outDir, "connectors.json"), &conn)
	if len(conn.Connectors) != 3 {
		t.Fatalf("%d connectors", len(conn.Connectors))
	}
	for _, c := range conn.Connectors {
		if c.State != "built" || len(c.Sheets) != 2 {
			t.Fatalf("%s: state %s, %d sheets", c.ID, c.State, len(c.Sheets))
		}
		for i, s := range c.Sheets {
			if want := 8 + i; len(s.Nodes) != want || len(s.Weights) != want {
				t.Errorf("%s sheet %d: %d nodes, want %d", c.ID, i, len(s.Nodes), want)
			}
			// The end lies on the curved sheet: z of the paraboloid.
			x, y := s.Point[0], s.Point[1]
			if z := (x*x+y*y)/1000 + float64(i); math.Abs(s.Point[2]-z) > 1e-9 {
				t.Errorf("%s sheet %d at %v, off the curved sheet (z %g)", c.ID, i, s.Point, z)
			}
		}
	}
	validate(t, "connectors.schema.json", filepath.Join(outDir, "connectors.json"))
}
