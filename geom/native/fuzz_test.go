package native

import (
	"path/filepath"
	"strings"
	"testing"

	"github.com/joinery-cae/joinery/geom/geomtest"
)

// FuzzRead checks that no input makes the reader panic, that every input
// reads the same (mesh or error message) whether parsed whole or in
// pieces, that every error is an input error and that every mesh it
// returns is consistent.
func FuzzRead(f *testing.F) {
	geomtest.AddFiles(f, filepath.Join("..", "..", "testdata", "native", "small.jmesh"))
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
		"joinery-mesh 1\nnode 1 0 0 0\nnode 2 2 0 0\nnode 3 2 2 0\nnode 4 0 2 0\nnode 5 1 0 0\nnode 6 2 1 0\nnode 7 1 2 0\nnode 8 0 1 0\nnode 9 1 1 .5\nshell 1 1 1 2 3 4 5 6 7 8 9\nshell 2 1 1 2 3 4 5 6 7 8 t=2\nshell 3 1 1 2 4 5 9 8\n",
		"# c\n\n\tjoinery-mesh 1 # v\nnode 9223372036854775807 -0 .5 5.\n",
		// Hostile inputs of issue 7: values no sheet metal has, text
		// that is not UTF-8, a long garbage token.
		"joinery-mesh 1\npart 1 thickness=1e300\nnode 1 0 0 0\n",
		"joinery-mesh 1\nnode 1 0 0 0\nnode 2 1 0 0\nnode 3 0 1e8 0\nshell 1 1 1 2 3 t=150\n",
		"joinery-mesh 1\npart 1 thickness=1 name=br\xe9cket material=S\xff\n",
		"joinery-mesh 1\nnode 1 0 0 0\n" + strings.Repeat("x", 5000) + "\n",
	} {
		f.Add([]byte(s))
	}
	f.Fuzz(func(t *testing.T, data []byte) {
		whole, errWhole := parseSplit(data, "f", 1)
		split, errSplit := parseSplit(data, "f", 3)
		if err := geomtest.CheckRead(whole, errWhole); err != nil {
			t.Fatal(err)
		}
		if (errWhole == nil) != (errSplit == nil) {
			t.Fatalf("whole: %v; in pieces: %v", errWhole, errSplit)
		}
		if errWhole != nil {
			if errWhole.Error() != errSplit.Error() {
				t.Fatalf("whole: %v; in pieces: %v", errWhole, errSplit)
			}
			return
		}
		if d := geomtest.Diff(split, whole); d != "" {
			t.Fatalf("pieces differ from whole: %s", d)
		}
	})
}
