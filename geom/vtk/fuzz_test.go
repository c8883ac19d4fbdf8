package vtk

import (
	"bytes"
	"os"
	"path/filepath"
	"testing"

	"github.com/joinery-cae/joinery/geom"
	"github.com/joinery-cae/joinery/geom/geomtest"
)

// FuzzRead feeds arbitrary bytes to the reader: it must never panic or
// hang, every error must be an input error and every mesh consistent.
func FuzzRead(f *testing.F) {
	geomtest.AddFiles(f, filepath.Join(formats, "*.vtk"), "../../testdata/vtk/*.vtk", "../../testdata/polydata/*.vtk")
	f.Add(smallBinary())
	f.Add(small51Binary())
	// Hostile inputs of issue 7: a thickness and a coordinate no sheet
	// metal has.
	if b, err := os.ReadFile(filepath.Join(formats, "small_ascii.vtk")); err == nil {
		f.Add(bytes.Replace(b, []byte("1 1 1 1 1.5 1.5"), []byte("1 1 1 1 1e300 1.5"), 1))
		f.Add(bytes.Replace(b, []byte("\n10.5 0 0\n"), []byte("\n1e9 0 0\n"), 1))
	}
	f.Fuzz(func(t *testing.T, data []byte) {
		if err := geomtest.CheckRead(Parse(data, "fuzz.vtk", geom.ReadOptions{DefaultPart: 1, HasDefaultPart: true})); err != nil {
			t.Fatal(err)
		}
	})
}
