package native

import (
	"os"
	"path/filepath"
	"testing"
)

// FuzzRead checks that no input makes the reader panic, that every input
// reads the same (mesh or error message) whether parsed whole or in
// pieces, and that every mesh it returns is consistent.
func FuzzRead(f *testing.F) {
	small, err := os.ReadFile(filepath.Join("..", "..", "testdata", "native", "small.jmesh"))
	if err != nil {
		f.Fatal(err)
	}
	f.Add(small)
	f.Add(gridFile(3, 2, true))
	for _, s := range []string{
		"",
		"joinery-mesh 1\n",
		"joinery-mesh 1\r\nnode 1 0 0 0\r\n",
		"joinery-mesh 1\nshell 1 2 3 4 5 t=1\nnode 3 0 0 0\nnode 4 1 0 0\nnode 5 0 1 0\npart 2 thickness=1 name=a b # c",
		"joinery-mesh 1\nnode 1 1e400 0 0\n",
		"joinery-mesh 1\nnode 1 0 0 0\nnode 1 0 0 0\n",
		"joinery-mesh 1\npart 1 surface=top material=x\npart 1\n",
		"joinery-mesh 1\nshell 9 1 1 2 3 4 5 6\n",
		"# c\n\n\tjoinery-mesh 1 # v\nnode 9223372036854775807 -0 .5 5.\n",
	} {
		f.Add([]byte(s))
	}
	f.Fuzz(func(t *testing.T, data []byte) {
		whole, errWhole := parseSplit(data, "f", 1)
		split, errSplit := parseSplit(data, "f", 3)
		if (errWhole == nil) != (errSplit == nil) {
			t.Fatalf("whole: %v; in pieces: %v", errWhole, errSplit)
		}
		if errWhole != nil {
			if errWhole.Error() != errSplit.Error() {
				t.Fatalf("whole: %v; in pieces: %v", errWhole, errSplit)
			}
			return
		}
		if d := sameMesh(split, whole); d != "" {
			t.Fatalf("pieces differ from whole: %s", d)
		}
		m := whole
		ne := m.NumElems()
		if len(m.NodeIDs) != m.NumNodes() || len(m.ElemPart) != ne || len(m.ElemStart) != ne+1 || int(m.ElemStart[ne]) != len(m.Conn) {
			t.Fatalf("inconsistent slices: %d nodes, %d elements, %d starts, %d conn", m.NumNodes(), ne, len(m.ElemStart), len(m.Conn))
		}
		if m.ElemThickness != nil && len(m.ElemThickness) != ne {
			t.Fatalf("%d thicknesses for %d elements", len(m.ElemThickness), ne)
		}
		for e := range ne {
			if k := m.Type(e).Corners(); k != len(m.ElemNodes(e)) {
				t.Fatalf("element %d has %d nodes", e, len(m.ElemNodes(e)))
			}
			for _, n := range m.ElemNodes(e) {
				if n < 0 || int(n) >= m.NumNodes() {
					t.Fatalf("element %d: node index %d out of range", e, n)
				}
			}
			if p := m.ElemPart[e]; p < 0 || int(p) >= len(m.Parts) {
				t.Fatalf("element %d: part index %d out of range", e, p)
			}
			if i, ok := m.ElemIndex(m.ElemIDs[e]); !ok || int(i) != e {
				t.Fatalf("ElemIndex(%d) = %d, %v; want %d", m.ElemIDs[e], i, ok, e)
			}
		}
		for i, id := range m.NodeIDs {
			if j, ok := m.NodeIndex(id); !ok || int(j) != i {
				t.Fatalf("NodeIndex(%d) = %d, %v; want %d", id, j, ok, i)
			}
		}
	})
}
