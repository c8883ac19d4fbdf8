package vtu

import (
	"bytes"
	"errors"
	"os"
	"path/filepath"
	"testing"

	"github.com/joinery-cae/joinery/geom"
)

// FuzzRead checks that no input makes Read panic, that every failure is an
// input error, and that every mesh it returns is consistent.
func FuzzRead(f *testing.F) {
	for _, pattern := range []string{"../../testdata/formats/small_*.vtu", "../../testdata/vtu/*.vtu"} {
		files, err := filepath.Glob(pattern)
		if err != nil {
			f.Fatal(err)
		}
		for _, name := range files {
			data, err := os.ReadFile(name)
			if err != nil {
				f.Fatal(err)
			}
			f.Add(data)
		}
	}
	f.Add([]byte(errTemplate))
	f.Fuzz(func(t *testing.T, data []byte) {
		m, err := Read(bytes.NewReader(data), "fuzz.vtu", geom.ReadOptions{DefaultPart: 1, HasDefaultPart: true})
		if err != nil {
			if !errors.Is(err, geom.ErrInput) {
				t.Fatalf("error %v is not an input error", err)
			}
			return
		}
		if len(m.ElemStart) != m.NumElems()+1 || len(m.ElemPart) != m.NumElems() || len(m.NodeIDs) != m.NumNodes() {
			t.Fatalf("inconsistent mesh: %d elements, %d starts, %d parts; %d nodes, %d ids",
				m.NumElems(), len(m.ElemStart), len(m.ElemPart), m.NumNodes(), len(m.NodeIDs))
		}
		for _, n := range m.Conn {
			if n < 0 || int(n) >= m.NumNodes() {
				t.Fatalf("connectivity refers to node %d of %d", n, m.NumNodes())
			}
		}
	})
}
