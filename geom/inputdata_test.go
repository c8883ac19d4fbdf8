package geom

import (
	"bytes"
	"crypto/sha256"
	"errors"
	"os"
	"path/filepath"
	"runtime/debug"
	"testing"
)

// TestOpenData reads a file through OpenData as a reader does, giving
// its pages back as it goes, and wants every byte and the digest of the
// whole file.
func TestOpenData(t *testing.T) {
	dir := t.TempDir()
	for _, size := range []int{0, 1, 4095, 4096, 3<<20 + 17, 21 << 20} {
		want := make([]byte, size)
		for i := range want {
			want[i] = byte(i*7 + i>>13)
		}
		path := filepath.Join(dir, "f")
		if err := os.WriteFile(path, want, 0o644); err != nil {
			t.Fatal(err)
		}
		h := sha256.New()
		d, err := OpenData(path, h)
		if err != nil {
			t.Fatal(err)
		}
		if len(d.Data) != size {
			t.Fatalf("size %d: %d bytes", size, len(d.Data))
		}
		for lo := 0; lo < size; lo += 1 << 20 {
			hi := min(lo+1<<20, size)
			if !bytes.Equal(d.Data[lo:hi], want[lo:hi]) {
				t.Fatalf("size %d: bytes %d..%d differ", size, lo, hi)
			}
			d.Done(hi)
		}
		// Bytes given back can still be read.
		if size > 0 && d.Data[0] != want[0] {
			t.Errorf("size %d: byte 0 is %d after Done, want %d", size, d.Data[0], want[0])
		}
		if err := d.Finish(); err != nil {
			t.Fatal(err)
		}
		if got, sum := h.Sum(nil), sha256.Sum256(want); !bytes.Equal(got, sum[:]) {
			t.Errorf("size %d: digest differs", size)
		}
		d.Close()
	}
}

// TestOpenDataClosedEarly closes data before the reader reached its end:
// the digest stops without touching the unmapped file.
func TestOpenDataClosedEarly(t *testing.T) {
	path := filepath.Join(t.TempDir(), "f")
	if err := os.WriteFile(path, make([]byte, 40<<20), 0o644); err != nil {
		t.Fatal(err)
	}
	d, err := OpenData(path, sha256.New())
	if err != nil {
		t.Fatal(err)
	}
	d.Done(1 << 20)
	d.Close()
}

// TestOpenDataShrunk truncates a file while it is read: the reader's
// fault becomes an input error.
func TestOpenDataShrunk(t *testing.T) {
	path := filepath.Join(t.TempDir(), "f")
	if err := os.WriteFile(path, make([]byte, 1<<20), 0o644); err != nil {
		t.Fatal(err)
	}
	d, err := OpenData(path, nil)
	if err != nil {
		t.Fatal(err)
	}
	defer d.Close()
	if d.m == nil {
		t.Skip("files are read whole on this system")
	}
	if err := os.Truncate(path, 0); err != nil {
		t.Fatal(err)
	}
	err = func() (err error) {
		old := debug.SetPanicOnFault(true)
		defer func() {
			debug.SetPanicOnFault(old)
			if r := recover(); r != nil {
				err = d.Fault(r)
			}
		}()
		if d.Data[1<<19] != 0 {
			return errors.New("the file's bytes changed")
		}
		return nil
	}()
	if !errors.Is(err, ErrInput) {
		t.Fatalf("got %v, want an input error", err)
	}
	t.Log(err)
}
