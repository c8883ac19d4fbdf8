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

// buildIn runs build with the given flags from the fixture directory's
// files and returns the exit status, stderr and whether outputs exist.
func buildIn(t *testing.T, dir string, args ...string) (int, string, bool) {
	t.Helper()
	out := filepath.Join(dir, "out")
	code, _, errs := runCLI(t, append([]string{"build", "-o", out, "--quiet"}, args...)...)
	_, err := os.Stat(out)
	return code, errs, err == nil
}

// Text that is not UTF-8 is an input error at its line: two ids that
// differ only in such bytes (W\xff1, W\xfe1) would both be written as
// "W\ufffd1" (issue). Also free-tag values, groups and part names.
func TestNotUTF8Refused(t *testing.T) {
	for _, c := range []struct {
		name, file, content, want string
	}{
		{"joint ids", "w.csv", "id,x,y,z\nW\xff1,3,3,1.25\nW\xfe1,4,4,1.25\n", "w.csv:2: joint id \"W\\xff1\" is not valid UTF-8"},
		{"group", "w.csv", "id,x,y,z,group\nW1,3,3,1.25,g\xff\n", "w.csv:2: joint \"W1\": group \"g\\xff\" is not valid UTF-8"},
		{"tag value", "w.csv", "id,x,y,z,station\nW1,3,3,1.25,S\xfe\n", "w.csv:2: joint \"W1\": tag \"station\" = \"S\\xfe\" is not valid UTF-8"},
		{"yaml joint list", "w.yaml", "joints:\n  - {id: W1, point: [3, 3, 1.25]}\n  - {id: W\xff2, point: [4, 4, 1.25]}\n", "w.yaml:3: not valid UTF-8 text"},
		{"parts csv name", "p.csv", "id,thickness,name\n10,1,floor\n20,1.5,br\xe9cket\n", "p.csv:3: name: \"br\\xe9cket\" is not valid UTF-8"},
		{"parts yaml", "p.yaml", "parts:\n  - {id: 10, thickness: 1}\n  - {id: 20, thickness: 1.5, material: S\xff}\n", "p.yaml:3: not valid UTF-8 text"},
	} {
		t.Run(c.name, func(t *testing.T) {
			dir := hostileDir(t)
			p := writeFile(t, dir, c.file, c.content)
			args := []string{"-m", filepath.Join(dir, "m.jmesh"), "-j", p}
			if strings.HasPrefix(c.file, "p.") {
				args = []string{"-m", filepath.Join(dir, "m.jmesh"), "-j", filepath.Join(dir, "w.csv"), "-p", p}
			}
			code, errs, wrote := buildIn(t, dir, args...)
			if code != exitBadInput || !strings.Contains(errs, c.want) || wrote {
				t.Errorf("exit %d, outputs %v, stderr %q; want exit 2 and %q", code, wrote, errs, c.want)
			}
		})
	}
}

// The same file under two spellings is refused like the same spelling
// twice (issue: -m m.jmesh -m $PWD/m.jmesh --renumber was accepted and
// half the sheets got nothing).
func TestSameFileTwice(t *testing.T) {
	dir := hostileDir(t)
	rel, err := filepath.Rel(mustGetwd(t), filepath.Join(dir, "m.jmesh"))
	if err != nil {
		t.Skip(err)
	}
	abs := filepath.Join(dir, "m.jmesh")
	dotted := filepath.Join(dir, ".", "sub", "..") + string(filepath.Separator) + "m.jmesh"
	os.Mkdir(filepath.Join(dir, "sub"), 0o755)
	link := filepath.Join(dir, "link.jmesh")
	hasLink := os.Symlink("m.jmesh", link) == nil
	joints := filepath.Join(dir, "w.csv")
	cases := [][]string{
		{"-m", rel, "-m", abs, "--renumber", "-j", joints},
		{"-m", abs, "-m", dotted, "--renumber", "-j", joints},
		{"-m", abs, "-j", joints, "-j", dotted[:len(dotted)-len("m.jmesh")] + "w.csv"},
	}
	if hasLink {
		cases = append(cases, []string{"-m", abs, "-m", link, "--renumber", "-j", joints})
	}
	for _, args := range cases {
		code, errs, wrote := buildIn(t, dir, args...)
		if code != exitBadInput || !strings.Contains(errs, "given twice") || wrote {
			t.Errorf("%v: exit %d, outputs %v, stderr %q; want exit 2, given twice", args, code, wrote, errs)
		}
	}
}

func mustGetwd(t *testing.T) string {
	t.Helper()
	wd, err := os.Getwd()
	if err != nil {
		t.Fatal(err)
	}
	return wd
}
