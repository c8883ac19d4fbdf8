package meshio

import (
	"bytes"
	"crypto/sha256"
	"io"
	"os"
	"path/filepath"
	"sync"
	"testing"
)

// Load passes every byte of the parts table and of each mesh file, of
// each format, to the writer Digest gives for its path, as it reads
// them: the digests equal the SHA-256 of the files.
func TestLoadDigest(t *testing.T) {
	formats := filepath.Join("..", "..", "testdata", "formats")
	meshes := []string{filepath.Join(formats, "small_binary.vtk"), filepath.Join(formats, "small_appended_raw_zlib.vtu"),
		filepath.Join("..", "..", "testdata", "native", "small.jmesh")}
	parts := filepath.Join("..", "..", "testdata", "parts", "small.yaml")
	for _, mesh := range meshes {
		var mu sync.Mutex
		sums := map[string]*bytes.Buffer{}
		digest := func(path string) io.Writer {
			mu.Lock()
			defer mu.Unlock()
			sums[path] = &bytes.Buffer{}
			return sums[path]
		}
		if _, err := Load(LoadOptions{Meshes: []string{mesh}, Parts: parts, Digest: digest}); err != nil {
			t.Fatal(err)
		}
		for _, p := range []string{mesh, parts} {
			want, err := os.ReadFile(p)
			if err != nil {
				t.Fatal(err)
			}
			got, ok := sums[p]
			if !ok || sha256.Sum256(got.Bytes()) != sha256.Sum256(want) {
				t.Errorf("%s: digest got %d bytes, not the file's %d", p, got.Len(), len(want))
			}
		}
	}
}
