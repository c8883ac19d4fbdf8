package meshio

import (
	"errors"
	"os"
	"path/filepath"
	"strings"
	"testing"
	"unicode/utf8"

	"github.com/joinery-cae/joinery/geom"
)

// FuzzReadParts feeds the same input to the YAML and the CSV reader.
func FuzzReadParts(f *testing.F) {
	files, _ := filepath.Glob(filepath.Join("..", "..", "testdata", "parts", "*"))
	for _, p := range files {
		b, err := os.ReadFile(p)
		if err != nil {
			f.Fatal(err)
		}
		f.Add(string(b))
	}
	f.Add("parts:\n  - &p {id: 1, thickness: 1, mesh: a.vtk}\n  - *p\n")
	f.Add("id,thickness,mesh,surface\n1,0.7,a.vtk,TOP\n2,1e-3,,\n")
	f.Add("id;thickness;name\n1;0,7;\"a;b\"\n")
	f.Add("id\tthickness\n1\t\t\n")
	// Hostile inputs of issue 7.
	f.Add("parts:\n  - {id: 1, thickness: 1e300}\n")
	f.Add("id,thickness,name,material\n1,1,br\xe9cket,S\xff\n2,150,,\n")
	f.Add("parts:\n  - {id: 1, thickness: 1, surface: " + strings.Repeat("x", 3000) + "}\n")
	f.Fuzz(func(t *testing.T, in string) {
		for name, read := range map[string]func(string) ([]geom.Part, error){
			"yaml": func(s string) ([]geom.Part, error) { return ReadPartsYAML(strings.NewReader(s), "f.yaml") },
			"csv":  func(s string) ([]geom.Part, error) { return ReadPartsCSV(strings.NewReader(s), "f.csv") },
		} {
			parts, err := read(in)
			if err != nil {
				if !errors.Is(err, geom.ErrInput) {
					t.Fatalf("%s: not an input error: %v", name, err)
				}
				continue
			}
			ids := map[int64]bool{}
			for _, p := range parts {
				if p.ID <= 0 || ids[p.ID] || geom.CheckThickness(p.Thickness, 1) != nil || !utf8.ValidString(p.Name) || !utf8.ValidString(p.Material) || !utf8.ValidString(p.Mesh) {
					t.Fatalf("%s: part %+v", name, p)
				}
				ids[p.ID] = true
			}
		}
	})
}
