package vtk

import (
	"path/filepath"
	"testing"

	"github.com/joinery-cae/joinery/geom"
	"github.com/joinery-cae/joinery/geom/geomtest"
)

// FuzzRead feeds arbitrary bytes to the reader: it must never panic or
// hang, every error must be an input error and every mesh consistent.
func FuzzRead(f *testing.F) {
	geomtest.AddFiles(f, filepath.Join(formats, "*.vtk"), "../../testdata/vtk/*.vtk")
	f.Add(smallBinary())
	f.Add(small51Binary())
	f.Fuzz(func(t *testing.T, data []byte) {
		if err := geomtest.CheckRead(Parse(data, "fuzz.vtk", geom.ReadOptions{DefaultPart: 1, HasDefaultPart: true})); err != nil {
			t.Fatal(err)
		}
	})
}
