package writers

import (
	"bytes"
	"errors"
	"io"
	"io/fs"
	"os"
	"path/filepath"
	"strings"
	"sync"
	"syscall"
	"testing"

	"github.com/joinery-cae/joinery/writers/document"
)

func TestNestedSets(t *testing.T) {
	const runC = "cccccccccccccccccccccccccccccccc"
	dir := filepath.Join(t.TempDir(), "sweep")
	outer := testSet(runC, 1)
	outer.Job = "sweep"
	outer.Sets = []NestedSet{{Dir: "01-a=x", Set: testSet(runA, 2)}, {Dir: "02-a=y", Set: testSet(runB, 3)}}
	if err := WriteSet(dir, outer); err != nil {
		t.Fatal(err)
	}
	set, err := ReadSet(dir)
	if err != nil {
		t.Fatal(err)
	}
	if set.Marker.RunID != runC || len(set.Sets) != 2 || set.Sets["01-a=x"].RunID != runA || set.Sets["02-a=y"].RunID != runB {
		t.Fatalf("read back %+v", set.Sets)
	}
	for name, id := range map[string]string{"01-a=x": runA, "02-a=y": runB} {
		sub, err := ReadSet(filepath.Join(dir, name))
		if err != nil || sub.Marker.RunID != id || len(sub.Files) != 3 {
			t.Errorf("%s: %v", name, err)
		}
	}
	// A second run replaces the whole, nested folders included.
	outer.Sets = outer.Sets[:1]
	if err := WriteSet(dir, outer); err != nil {
		t.Fatal(err)
	}
	if _, err := os.Stat(filepath.Join(dir, "02-a=y")); !os.IsNotExist(err) {
		t.Errorf("the old variant folder survived the new set")
	}
	// A nested set replaced by another run's: the outer set is mixed.
	other := filepath.Join(t.TempDir(), "other")
	if err := WriteSet(other, testSet(runB, 4)); err != nil {
		t.Fatal(err)
	}
	raw, _ := os.ReadFile(filepath.Join(other, document.SetMarker))
	if err := os.WriteFile(filepath.Join(dir, "01-a=x", document.SetMarker), raw, 0o644); err != nil {
		t.Fatal(err)
	}
	if _, err := ReadSet(dir); err == nil || !strings.Contains(err.Error(), "mixed") {
		t.Errorf("mixed nested set: %v", err)
	}
	// Bad folder names and nested sets of nested sets are refused.
	for _, bad := range []NestedSet{{Dir: "a/b", Set: testSet(runA, 1)}, {Dir: "report.txt", Set: testSet(runA, 1)},
		{Dir: "x", Set: Set{RunID: runA, Sets: []NestedSet{{Dir: "y", Set: testSet(runA, 1)}}}}} {
		s := testSet(runC, 1)
		s.Sets = []NestedSet{bad}
		if err := WriteSet(filepath.Join(t.TempDir(), "bad"), s); err == nil {
			t.Errorf("nested set %q accepted", bad.Dir)
		}
	}
	// A folder put into the directory that the marker does not list is
	// not Joinery's: the next run refuses to replace it.
	if err := os.Mkdir(filepath.Join(dir, "mine"), 0o755); err != nil {
		t.Fatal(err)
	}
	if err := WriteSet(dir, outer); err == nil || !strings.Contains(err.Error(), "mine") {
		t.Errorf("foreign folder: %v", err)
	}
}

// Nested sets written one by one while the run goes on (a sweep's
// variants, concurrently) make the same set as nested sets given to
// Write; a failed one fails the whole, which leaves the old set and no
// temporary directory.
func TestWriteNestedStreamed(t *testing.T) {
	const runC = "cccccccccccccccccccccccccccccccc"
	dirs := []string{"01-a=x", "02-a=y", "03-a=z"}
	want := filepath.Join(t.TempDir(), "want")
	outer := testSet(runC, 1)
	outer.Job = "sweep"
	for i, d := range dirs {
		outer.Sets = append(outer.Sets, NestedSet{Dir: d, Set: testSet([]string{runA, runB, runA}[i], 2+i)})
	}
	if err := WriteSet(want, outer); err != nil {
		t.Fatal(err)
	}
	dir := filepath.Join(t.TempDir(), "got")
	if err := WriteSet(dir, testSet(runB, 7)); err != nil { // an old set to replace
		t.Fatal(err)
	}
	d, err := OpenSet(dir)
	if err != nil {
		t.Fatal(err)
	}
	var wg sync.WaitGroup
	errs := make([]error, len(dirs))
	for i := len(dirs) - 1; i >= 1; i-- { // out of order, at once
		wg.Go(func() { errs[i] = d.WriteNested(outer.Sets[i]) })
	}
	wg.Wait()
	if err := errors.Join(errs...); err != nil {
		t.Fatal(err)
	}
	if err := d.WriteNested(outer.Sets[1]); err == nil {
		t.Error("a nested set written twice was accepted")
	}
	rest := outer
	rest.Sets = outer.Sets[:1] // the first given to Write
	if err := d.Write(rest); err != nil {
		t.Fatal(err)
	}
	d.Close()
	got, exp := readAll(t, dir), readAll(t, want)
	if len(got) != len(exp) {
		t.Fatalf("%d files, want %d", len(got), len(exp))
	}
	for name, b := range exp {
		if !bytes.Equal(got[name], b) {
			t.Errorf("%s differs from the set written whole", name)
		}
	}

	// A nested set that cannot be written: Write fails, the old set stays.
	f := &faultFS{op: "create", name: "report.txt", n: 2, err: syscall.ENOSPC}
	d, err = OpenSetFS(dir, f)
	if err != nil {
		t.Fatal(err)
	}
	if err := d.WriteNested(NestedSet{Dir: "01-a=x", Set: testSet(runA, 3)}); err != nil {
		t.Fatal(err)
	}
	if err := d.WriteNested(NestedSet{Dir: "02-a=y", Set: testSet(runA, 3)}); !errors.Is(err, ErrOutput) || !errors.Is(err, syscall.ENOSPC) {
		t.Fatalf("err %v: want an output error wrapping ENOSPC", err)
	}
	if err := d.Write(testSet(runB, 1)); !errors.Is(err, ErrOutput) {
		t.Fatalf("Write after a failed nested set: %v", err)
	}
	d.Close()
	checkWhole(t, dir, runC)
	checkNoLeftovers(t, dir)

	// Nested sets written and no Write (the run failed elsewhere): Close
	// removes them.
	d, err = OpenSet(dir)
	if err != nil {
		t.Fatal(err)
	}
	if err := d.WriteNested(NestedSet{Dir: "01-a=x", Set: testSet(runA, 3)}); err != nil {
		t.Fatal(err)
	}
	d.Close()
	checkWhole(t, dir, runC)
	checkNoLeftovers(t, dir)
}

// readAll reads every file under dir by its path relative to dir.
func readAll(t *testing.T, dir string) map[string][]byte {
	t.Helper()
	out := map[string][]byte{}
	err := filepath.WalkDir(dir, func(p string, e fs.DirEntry, err error) error {
		if err != nil || e.IsDir() {
			return err
		}
		b, err := os.ReadFile(p)
		rel, _ := filepath.Rel(dir, p)
		out[rel] = b
		return err
	})
	if err != nil {
		t.Fatal(err)
	}
	return out
}

// A nested set rendered straight into its folder is the set written
// from memory; a rendering that fails, or a file without the run id,
// is the caller's error, a write that fails an output error, and
// either fails the whole.
func TestWriteNestedFilesRendered(t *testing.T) {
	const runC = "cccccccccccccccccccccccccccccccc"
	mem := testSet(runA, 3000)
	var files []File
	for _, f := range mem.Files {
		files = append(files, File{Name: f.Name, Render: func(w io.Writer) error { _, err := w.Write(f.Data); return err }})
	}
	outer := testSet(runC, 1)
	want := filepath.Join(t.TempDir(), "want")
	whole := outer
	whole.Sets = []NestedSet{{Dir: "01-a=x", Set: mem}}
	if err := WriteSet(want, whole); err != nil {
		t.Fatal(err)
	}
	dir := filepath.Join(t.TempDir(), "got")
	d, err := OpenSet(dir)
	if err != nil {
		t.Fatal(err)
	}
	listed, err := d.WriteNestedFiles("01-a=x", Set{Job: mem.Job, Generator: mem.Generator, RunID: runA}, files)
	if err != nil {
		t.Fatal(err)
	}
	for i, f := range mem.Files {
		if listed[i].Name != f.Name || listed[i].Bytes != int64(len(f.Data)) || listed[i].SHA256 != hashHex(f.Data) {
			t.Errorf("listed %+v for %s", listed[i], f.Name)
		}
	}
	if err := d.Write(outer); err != nil {
		t.Fatal(err)
	}
	d.Close()
	got, exp := readAll(t, dir), readAll(t, want)
	if len(got) != len(exp) {
		t.Fatalf("%d files, want %d", len(got), len(exp))
	}
	for name, b := range exp {
		if !bytes.Equal(got[name], b) {
			t.Errorf("%s differs from the set written from memory", name)
		}
	}

	bad := errors.New("no such connector")
	for _, tc := range []struct {
		name   string
		fsys   FS
		file   File
		output bool
	}{
		{"render fails", OSFS{}, File{Name: "x.txt", Render: func(w io.Writer) error { return bad }}, false},
		{"no run id", OSFS{}, File{Name: "x.txt", Render: func(w io.Writer) error { _, err := io.WriteString(w, "run nothing\n"); return err }}, false},
		{"disk full", &faultFS{op: "write", name: "connectors.csv", n: 1, err: syscall.ENOSPC}, files[1], true},
	} {
		t.Run(tc.name, func(t *testing.T) {
			d, err := OpenSetFS(dir, tc.fsys)
			if err != nil {
				t.Fatal(err)
			}
			_, err = d.WriteNestedFiles("01-a=x", Set{Job: "build", Generator: "joinery test", RunID: runA}, []File{files[0], tc.file})
			if err == nil || errors.Is(err, ErrOutput) != tc.output {
				t.Errorf("err %v: output error %v, want %v", err, errors.Is(err, ErrOutput), tc.output)
			}
			if err := d.Write(outer); !errors.Is(err, ErrOutput) {
				t.Errorf("Write after a failed nested set: %v", err)
			}
			d.Close()
			checkWhole(t, dir, runC)
			checkNoLeftovers(t, dir)
		})
	}
}
