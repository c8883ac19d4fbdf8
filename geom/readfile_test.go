package geom

import (
	"bytes"
	"crypto/sha256"
	"errors"
	"os"
	"path/filepath"
	"testing"
)

// ReadFile gives the bytes os.ReadFile gives and feeds the digest the
// same bytes, in order, for files smaller and larger than one chunk.
func TestReadFileDigest(t *testing.T) {
	dir := t.TempDir()
	for _, size := range []int{0, 1, readChunk - 1, readChunk, 3*readChunk + 17} {
		data := make([]byte, size)
		for i := range data {
			data[i] = byte(i*7 + i>>11)
		}
		path := filepath.Join(dir, "f")
		if err := os.WriteFile(path, data, 0o644); err != nil {
			t.Fatal(err)
		}
		h := sha256.New()
		got, err := ReadFile(path, h)
		if err != nil {
			t.Fatal(err)
		}
		want := sha256.Sum256(data)
		if !bytes.Equal(got, data) || !bytes.Equal(h.Sum(nil), want[:]) {
			t.Errorf("size %d: bytes or digest differ", size)
		}
		if plain, err := ReadFile(path, nil); err != nil || !bytes.Equal(plain, data) {
			t.Errorf("size %d: without a digest: %v", size, err)
		}
	}
	if _, err := ReadFile(filepath.Join(dir, "missing"), sha256.New()); !errors.Is(err, os.ErrNotExist) || !errors.Is(err, ErrInput) {
		t.Errorf("missing file: %v", err)
	}
}
