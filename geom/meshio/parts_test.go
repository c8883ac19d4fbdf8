package meshio

import (
	"errors"
	"path/filepath"
	"strings"
	"testing"

	"github.com/joinery-cae/joinery/geom"
)

func TestReadPartsFiles(t *testing.T) {
	want := []geom.Part{
		{ID: 10, Name: "floor panel", Thickness: 1, Material: "DC04", Surface: geom.SurfaceMid},
		{ID: 20, Name: "bracket", Thickness: 1.5, Material: "S355", Surface: geom.SurfaceTop},
		{ID: 30, Name: "spare", Thickness: 0.8},
	}
	for _, name := range []string{"small.yaml", "small.csv"} {
		t.Run(name, func(t *testing.T) {
			got, err := ReadParts(filepath.Join("..", "..", "testdata", "parts", name))
			if err != nil {
				t.Fatal(err)
			}
			if len(got) != len(want) {
				t.Fatalf("got %d parts, want %d: %+v", len(got), len(want), got)
			}
			for i := range want {
				if got[i] != want[i] {
					t.Errorf("part %d = %+v, want %+v", i, got[i], want[i])
				}
			}
		})
	}
}

func TestReadPartsMeshKey(t *testing.T) {
	got, err := ReadPartsYAML(strings.NewReader("parts:\n- {id: 7, thickness: 2, mesh: beam.jmesh, surface: Bottom}\n"), "p.yaml")
	if err != nil {
		t.Fatal(err)
	}
	if len(got) != 1 || got[0].Mesh != "beam.jmesh" || got[0].Surface != geom.SurfaceBottom {
		t.Errorf("got %+v", got)
	}
	got, err = ReadPartsCSV(strings.NewReader("mesh,thickness,id\nbeam.jmesh,2,7\n"), "p.csv")
	if err != nil {
		t.Fatal(err)
	}
	if len(got) != 1 || got[0].Mesh != "beam.jmesh" || got[0].ID != 7 {
		t.Errorf("got %+v", got)
	}
	// A spreadsheet export with semicolons, and one with tabs.
	for _, in := range []string{"id;name;thickness\n7;rear rail, left;1.5\n", "id\tname\tthickness\n7\trear rail, left\t1.5\n"} {
		got, err = ReadPartsCSV(strings.NewReader(in), "p.csv")
		if err != nil {
			t.Fatal(err)
		}
		if len(got) != 1 || got[0].ID != 7 || got[0].Name != "rear rail, left" || got[0].Thickness != 1.5 {
			t.Errorf("%q: got %+v", in, got)
		}
	}
}

func TestReadPartsEmpty(t *testing.T) {
	for _, in := range []string{"", "parts:\n", "parts: []\n"} {
		got, err := ReadPartsYAML(strings.NewReader(in), "p.yaml")
		if err != nil || len(got) != 0 {
			t.Errorf("ReadPartsYAML(%q) = %v, %v", in, got, err)
		}
	}
	got, err := ReadPartsCSV(strings.NewReader("id,thickness\n"), "p.csv")
	if err != nil || len(got) != 0 {
		t.Errorf("header only: %v, %v", got, err)
	}
}

func TestReadPartsYAMLErrors(t *testing.T) {
	tests := []struct {
		name, in, want string
	}{
		{"unknown key", "parts:\n  - id: 1\n    thickness: 1\n    thicknes: 2\n", `p.yaml:4: part: unknown key "thicknes" (did you mean "thickness"?)`},
		{"unknown top key", "part:\n  - id: 1\n", `p.yaml:1: parts table: unknown key "part" (did you mean "parts"?)`},
		{"not a list", "parts: 3\n", `p.yaml:1: parts: want a list, got "3"`},
		{"item not a map", "parts:\n  - 3\n", `p.yaml:2: part: want a map of key: value, got "3"`},
		{"no id", "parts:\n  - thickness: 1\n", "p.yaml:2: part has no id"},
		{"no thickness", "parts:\n  - id: 4\n", "p.yaml:2: part 4 has no thickness"},
		{"zero id", "parts:\n  - {id: 0, thickness: 1}\n", "p.yaml:2: id: part id 0 is not positive"},
		{"text id", "parts:\n  - {id: A1, thickness: 1}\n", `p.yaml:2: id: want an integer, got "A1"`},
		{"zero thickness", "parts:\n  - id: 1\n    thickness: 0\n", "p.yaml:3: thickness: 0 mm is not positive"},
		{"negative thickness", "parts:\n  - {id: 1, thickness: -1}\n", "p.yaml:2: thickness: -1 mm is not positive"},
		{"nan thickness", "parts:\n  - {id: 1, thickness: .nan}\n", `p.yaml:2: thickness: ".nan" is not a finite number`},
		{"inf thickness", "parts:\n  - {id: 1, thickness: .inf}\n", `p.yaml:2: thickness: ".inf" is not a finite number`},
		{"bad surface", "parts:\n  - {id: 1, thickness: 1, surface: middle}\n", `p.yaml:2: surface: unknown reference surface "middle"`},
		{"mesh path", "parts:\n  - {id: 1, thickness: 1, mesh: a/b.vtk}\n", `p.yaml:2: mesh: "a/b.vtk" is not a file base name`},
		{"duplicate id", "parts:\n  - {id: 1, thickness: 1}\n  - {id: 2, thickness: 1}\n  - {id: 1, thickness: 2}\n", "p.yaml:4: part id 1 given twice (lines 2 and 4)"},
		{"duplicate mesh", "parts:\n  - {id: 1, thickness: 1, mesh: a.vtk}\n  - {id: 2, thickness: 1, mesh: a.vtk}\n", `p.yaml:3: mesh "a.vtk" given to two parts (lines 2 and 3)`},
		{"duplicate key", "parts:\n  - id: 1\n    id: 2\n", `p.yaml:3: part: key "id" given twice (lines 2 and 3)`},
		{"syntax", "parts:\n  - {id: 1\n", "p.yaml:"},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			_, err := ReadPartsYAML(strings.NewReader(tt.in), "p.yaml")
			checkErr(t, err, tt.want)
		})
	}
}

func TestReadPartsCSVErrors(t *testing.T) {
	tests := []struct {
		name, in, want string
	}{
		{"unknown column", "id,thicknes\n", `p.csv:1: unknown column "thicknes" (did you mean "thickness"?)`},
		{"unknown column far", "id,thickness,colour\n", `p.csv:1: unknown column "colour" (known: id, name, thickness, material, surface, mesh, offset)`},
		{"no thickness column", "id,name\n", `p.csv:1: missing required column "thickness"`},
		{"no id column", "# c\nthickness\n", `p.csv:2: missing required column "id"`},
		{"empty thickness", "id,thickness\n1,\n", "p.csv:2: part 1 has no thickness"},
		{"bad id", "id,thickness\nx,1\n", `p.csv:2: id: "x" is not an integer`},
		{"negative id", "id,thickness\n-3,1\n", "p.csv:2: id: part id -3 is not positive"},
		{"bad thickness", "id,thickness\n1,1.2.3\n", `p.csv:2: thickness: "1.2.3" is not a finite number`},
		{"zero thickness", "id,thickness\n1,0\n", "p.csv:2: thickness: 0 mm is not positive"},
		{"bad surface", "id,thickness,surface\n1,1,side\n", `p.csv:2: surface: unknown reference surface "side"`},
		{"duplicate id", "id,thickness\n1,1\n\n1,2\n", "p.csv:4: part id 1 given twice (lines 2 and 4)"},
		{"duplicate mesh", "id,thickness,mesh\n1,1,a.vtk\n2,1,a.vtk\n", `p.csv:3: mesh "a.vtk" given to two parts (lines 2 and 3)`},
		{"short row", "id,thickness\n1\n", "p.csv:2: row has 1 fields"},
		{"decimal comma", "id;thickness\n1;1,5\n", `p.csv:2: thickness: "1,5" has a decimal comma; write 1.5 (the decimal separator is '.')`},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			_, err := ReadPartsCSV(strings.NewReader(tt.in), "p.csv")
			checkErr(t, err, tt.want)
		})
	}
}

func TestReadPartsExtension(t *testing.T) {
	_, err := ReadParts("parts.txt")
	checkErr(t, err, `parts.txt: unknown parts table type ".txt"`)
	if _, err := ReadParts("does-not-exist.yaml"); !errors.Is(err, geom.ErrInput) || !strings.Contains(err.Error(), "does-not-exist.yaml: no such file") {
		t.Errorf("missing file: err = %v, want an input error naming the file", err)
	}
}

// checkErr fails unless err starts with want and is an input error.
func checkErr(t *testing.T, err error, want string) {
	t.Helper()
	if err == nil || !strings.HasPrefix(err.Error(), want) {
		t.Fatalf("err = %v\nwant prefix %s", err, want)
	}
	if !errors.Is(err, geom.ErrInput) {
		t.Errorf("errors.Is(err, geom.ErrInput) = false for %v", err)
	}
}
