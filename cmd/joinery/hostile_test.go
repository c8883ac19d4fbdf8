package main

import (
	"os"
	"path/filepath"
	"strings"
	"testing"
	"time"
)

// smallMesh is the shared "small" fixture in the native format
// (testdata/formats/README.md): four 1 mm quads of part 10 at z = 0 and a
// 1.5 mm triangle of part 20 at z = 2.5 above the corner at the origin.
const smallMesh = "../../testdata/native/small.jmesh"

// hostileDir returns a directory holding m.jmesh (the small fixture) and
// w.csv, one weld between its two parts.
func hostileDir(t *testing.T) string {
	t.Helper()
	dir := t.TempDir()
	mesh, err := os.ReadFile(smallMesh)
	if err != nil {
		t.Fatal(err)
	}
	writeFile(t, dir, "m.jmesh", string(mesh))
	writeFile(t, dir, "w.csv", "id,x,y,z\nW1,3,3,1.25\n")
	return dir
}

func writeFile(t *testing.T, dir, name, content string) string {
	t.Helper()
	p := filepath.Join(dir, name)
	if err := os.WriteFile(p, []byte(content), 0o644); err != nil {
		t.Fatal(err)
	}
	return p
}

// runCLIWithin runs a command line like runCLI, failing the test when it
// takes longer than limit (a reader blocked on a pipe would hang for ever).
func runCLIWithin(t *testing.T, limit time.Duration, args ...string) (int, string, string) {
	t.Helper()
	type result struct {
		code     int
		out, err string
	}
	done := make(chan result, 1)
	go func() {
		code, out, errs := runCLI(t, args...)
		done <- result{code, out, errs}
	}()
	select {
	case r := <-done:
		return r.code, r.out, r.err
	case <-time.After(limit):
		t.Fatalf("%s: still running after %v", strings.Join(args, " "), limit)
	}
	return 0, "", ""
}

func TestHostileBaseline(t *testing.T) {
	dir := hostileDir(t)
	code, _, errs := runCLI(t, "build", "-m", filepath.Join(dir, "m.jmesh"), "-j", filepath.Join(dir, "w.csv"), "-o", filepath.Join(dir, "out"), "--quiet")
	if code != exitOK {
		t.Fatalf("exit %d: %s", code, errs)
	}
}
