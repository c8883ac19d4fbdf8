package vtk

import (
	"errors"
	"os"
	"path/filepath"
	"testing"

	"github.com/joinery-cae/joinery/geom"
)

// FuzzRead feeds arbitrary bytes to the reader: it must never panic or
// hang, and every error must be an input error.
func FuzzRead(f *testing.F) {
	for _, dir := range []string{formats, "../../testdata/vtk"} {
		files, _ := filepath.Glob(filepath.Join(dir, "*.vtk"))
		for _, name := range files {
			data, err := os.ReadFile(name)
			if err != nil {
				f.Fatal(err)
			}
			f.Add(data)
		}
	}
	f.Add(smallBinary())
	f.Add(small51Binary())
	f.Fuzz(func(t *testing.T, data []byte) {
		m, err := Parse(data, "fuzz.vtk", geom.ReadOptions{DefaultPart: 1, HasDefaultPart: true})
		if err != nil {
			if !errors.Is(err, geom.ErrInput) {
				t.Fatalf("error %v is not an input error", err)
			}
			return
		}
		if len(m.ElemStart) != m.NumElems()+1 || len(m.ElemPart) != m.NumElems() || len(m.NodeIDs) != m.NumNodes() {
			t.Fatalf("inconsistent mesh: %d elements, %d starts, %d parts, %d nodes, %d ids",
				m.NumElems(), len(m.ElemStart), len(m.ElemPart), m.NumNodes(), len(m.NodeIDs))
		}
		for _, n := range m.Conn {
			if n < 0 || int(n) >= m.NumNodes() {
				t.Fatalf("element node %d out of range", n)
			}
		}
	})
}
