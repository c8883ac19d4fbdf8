package geom

import (
	"errors"
	"io/fs"
	"os"
	"path/filepath"
	"strings"
	"testing"
	"unicode/utf8"
)

func TestReadFileRegularOnly(t *testing.T) {
	dir := t.TempDir()
	good := filepath.Join(dir, "good.txt")
	if err := os.WriteFile(good, []byte("hello\n"), 0o644); err != nil {
		t.Fatal(err)
	}
	link := filepath.Join(dir, "link.txt")
	if err := os.Symlink(good, link); err != nil {
		t.Skip("no symbolic links here:", err)
	}
	for _, p := range []string{good, link} {
		b, err := ReadFile(p, nil)
		if err != nil || string(b) != "hello\n" {
			t.Errorf("%s: %q, %v", p, b, err)
		}
	}
	if _, err := ReadFile(dir, nil); !errors.Is(err, ErrInput) || !strings.Contains(err.Error(), "a directory") {
		t.Errorf("%s: %v, want an input error saying it is a directory", dir, err)
	}
	missing := filepath.Join(dir, "missing.txt")
	if _, err := ReadFile(missing, nil); !errors.Is(err, fs.ErrNotExist) || !errors.Is(err, ErrInput) {
		t.Errorf("%s: %v, want an input error that is the os package's not-exist error", missing, err)
	}
}

func TestOpenRegularBoundsReadsToSize(t *testing.T) {
	p := filepath.Join(t.TempDir(), "grows.txt")
	if err := os.WriteFile(p, []byte("12345"), 0o644); err != nil {
		t.Fatal(err)
	}
	f, err := OpenRegular(p)
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	// The file grows after it was opened: the reader stops at the old size.
	if err := os.WriteFile(p, []byte("1234567890"), 0o644); err != nil {
		t.Fatal(err)
	}
	b := make([]byte, 100)
	n, _ := f.Read(b)
	if n != 5 || f.Size() != 5 {
		t.Errorf("read %d bytes (%q) of a file opened at 5 bytes", n, b[:n])
	}
}

func TestExcerpt(t *testing.T) {
	long := strings.Repeat("x", 10_000_000)
	if got := Excerpt(long); len(got) != ExcerptLength+3 || !strings.HasSuffix(got, "...") {
		t.Errorf("Excerpt of 10 MB: %d bytes", len(got))
	}
	if got := Excerpt([]byte("short")); got != "short" {
		t.Errorf("Excerpt(short) = %q", got)
	}
	// A cut never splits a character.
	s := strings.Repeat("é", 30) // 60 bytes
	if got := Excerpt(s); !utf8.ValidString(got) || len(got) > ExcerptLength+3 {
		t.Errorf("Excerpt split a character: %q", got)
	}
}

func TestSameFiles(t *testing.T) {
	dir := t.TempDir()
	a := filepath.Join(dir, "a.vtk")
	b := filepath.Join(dir, "b.vtk")
	for _, p := range []string{a, b} {
		if err := os.WriteFile(p, []byte("x"), 0o644); err != nil {
			t.Fatal(err)
		}
	}
	hard := filepath.Join(dir, "hard.vtk")
	if err := os.Link(a, hard); err != nil {
		hard = a
	}
	for _, c := range []struct {
		paths []string
		i, j  int
		ok    bool
	}{
		{[]string{a, b}, 0, 0, false},
		{[]string{a, b, filepath.Join(dir, "sub", "..", "a.vtk")}, 0, 2, true},
		{[]string{b, hard, a}, 1, 2, true},
		{[]string{"missing.vtk", "./missing.vtk"}, 0, 1, true},
		{[]string{"missing.vtk", a}, 0, 0, false},
	} {
		i, j, ok := SameFiles(c.paths)
		if i != c.i || j != c.j || ok != c.ok {
			t.Errorf("SameFiles(%q) = %d, %d, %v; want %d, %d, %v", c.paths, i, j, ok, c.i, c.j, c.ok)
		}
	}
}
