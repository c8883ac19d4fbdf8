package writers

import (
	"bytes"
	"errors"
	"fmt"
	"io/fs"
	"os"
	"path/filepath"
	"slices"
	"strconv"
	"strings"
	"sync"
	"syscall"
	"testing"

	"github.com/joinery-cae/joinery/geom"
	"github.com/joinery-cae/joinery/writers/document"
)

// testSet returns a set of three files of run id id; size pads one file
// so that sets can be told apart and made large.
func testSet(id string, size int) Set {
	return Set{Job: "build", Generator: "joinery test", RunID: id, Files: []Rendered{
		{Name: "connectors.json", Data: []byte(fmt.Sprintf("{\n  \"schema\": \"x\",\n  \"run_id\": \"%s\",\n  \"pad\": %q\n}\n", id, strings.Repeat("p", size)))},
		{Name: "connectors.csv", Data: []byte("# joinery connectors (joinery test; run " + id + "); CAUTION: ...\na,b\n")},
		{Name: "report.txt", Data: []byte("joinery connector report (joinery test; run " + id + ")\n\nok\n")},
	}}
}

const (
	runA = "aaaaaaaaaaaaaaaaaaaaaaaaaaaaaaaa"
	runB = "bbbbbbbbbbbbbbbbbbbbbbbbbbbbbbbb"
)

// snapshot returns every entry under dir with its content ("/" for
// directories), and the names beside dir in its parent.
func snapshot(t *testing.T, dir string) (map[string]string, []string) {
	t.Helper()
	got := map[string]string{}
	filepath.WalkDir(dir, func(p string, e fs.DirEntry, err error) error {
		if err != nil || p == dir {
			return nil
		}
		rel, _ := filepath.Rel(dir, p)
		if e.IsDir() {
			got[rel] = "/"
			return nil
		}
		b, _ := os.ReadFile(p)
		got[rel] = string(b)
		return nil
	})
	entries, err := os.ReadDir(filepath.Dir(dir))
	if err != nil {
		t.Fatal(err)
	}
	var beside []string
	for _, e := range entries {
		beside = append(beside, e.Name())
	}
	return got, beside
}

// checkWhole fails unless dir holds the whole set of run id, read back
// through ReadSet, and nothing but the set stands beside it.
func checkWhole(t *testing.T, dir, id string) {
	t.Helper()
	set, err := ReadSet(dir)
	if err != nil {
		t.Fatalf("set in %s: %v", dir, err)
	}
	if set.Marker.RunID != id {
		t.Fatalf("set in %s is of run %s, want %s", dir, set.Marker.RunID, id)
	}
	checkNoLeftovers(t, dir)
}

// checkNoLeftovers fails when anything but dir stands in its parent.
func checkNoLeftovers(t *testing.T, dir string) {
	t.Helper()
	_, beside := snapshot(t, dir)
	if !slices.Equal(beside, []string{filepath.Base(dir)}) && !(len(beside) == 0) {
		t.Errorf("beside the output directory: %v", beside)
	}
}

func TestWriteSetReplacesWhole(t *testing.T) {
	dir := filepath.Join(t.TempDir(), "out")
	if err := WriteSet(dir, testSet(runA, 10)); err != nil {
		t.Fatal(err)
	}
	checkWhole(t, dir, runA)
	b := testSet(runB, 20)
	b.Files = b.Files[:2] // a smaller set: report.txt must go
	if err := WriteSet(dir, b); err != nil {
		t.Fatal(err)
	}
	checkWhole(t, dir, runB)
	got, _ := snapshot(t, dir)
	if _, ok := got["report.txt"]; ok || len(got) != 3 {
		t.Errorf("files after the second set: %v", keys(got))
	}
	// The marker validates against its published schema and lists the
	// files with their sizes and SHA-256.
	m, err := CheckSet(dir)
	if err != nil || len(m.Files) != 2 || m.Files[0].Name != "connectors.json" || m.Files[1].Bytes != int64(len(b.Files[1].Data)) || !m.Complete || m.Job != "build" {
		t.Errorf("marker %+v: %v", m, err)
	}
}

func keys(m map[string]string) []string {
	var k []string
	for n := range m {
		k = append(k, n)
	}
	slices.Sort(k)
	return k
}

// The reproduction of the issue: report.json of a set replaced by a
// directory. The next run must not swap away what Joinery did not write:
// it fails (an output error), and the directory stays as it was.
func TestSetDirectoryInTheWay(t *testing.T) {
	dir := filepath.Join(t.TempDir(), "o1")
	if err := WriteSet(dir, testSet(runA, 10)); err != nil {
		t.Fatal(err)
	}
	os.Remove(filepath.Join(dir, "connectors.csv"))
	if err := os.MkdirAll(filepath.Join(dir, "connectors.csv", "mine"), 0o755); err != nil {
		t.Fatal(err)
	}
	before, _ := snapshot(t, dir)
	err := WriteSet(dir, testSet(runB, 10))
	if !errors.Is(err, ErrOutput) || errors.Is(err, ErrNotOwned) {
		t.Fatalf("err %v: want an output error", err)
	}
	for _, want := range []string{"connectors.csv (not the file Joinery wrote there)", "left as it is", runA} {
		if !strings.Contains(err.Error(), want) {
			t.Errorf("message %q lacks %q", err, want)
		}
	}
	after, _ := snapshot(t, dir)
	if fmt.Sprint(before) != fmt.Sprint(after) {
		t.Errorf("directory changed:\n%v\n%v", keys(before), keys(after))
	}
	checkNoLeftovers(t, dir)
}

// faultFS fails the n-th (from 1) operation op on a file named name
// ("" for any) with err; a write fails after half its bytes.
type faultFS struct {
	OSFS
	op, name string
	n        int
	err      error
	mu       sync.Mutex
	seen     int
}

func (f *faultFS) fail(op, path string) error {
	f.mu.Lock()
	defer f.mu.Unlock()
	if op != f.op || f.name != "" && filepath.Base(path) != f.name {
		return nil
	}
	f.seen++
	if f.seen == f.n {
		return &fs.PathError{Op: op, Path: path, Err: f.err}
	}
	return nil
}

func (f *faultFS) Mkdir(name string, perm fs.FileMode) error {
	if err := f.fail("mkdir", name); err != nil {
		return err
	}
	return f.OSFS.Mkdir(name, perm)
}

func (f *faultFS) Create(name string) (WritableFile, error) {
	if err := f.fail("create", name); err != nil {
		return nil, err
	}
	w, err := f.OSFS.Create(name)
	if err != nil {
		return nil, err
	}
	return &faultFile{WritableFile: w, fs: f, name: name}, nil
}

func (f *faultFS) Rename(a, b string) error {
	if err := f.fail("rename", a); err != nil {
		return err
	}
	return f.OSFS.Rename(a, b)
}

func (f *faultFS) Exchange(a, b string) error {
	if err := f.fail("exchange", a); err != nil {
		return err
	}
	return f.OSFS.Exchange(a, b)
}

func (f *faultFS) SyncDir(p string) error {
	if err := f.fail("syncdir", p); err != nil {
		return err
	}
	return f.OSFS.SyncDir(p)
}

func (f *faultFS) Chmod(p string, m fs.FileMode) error {
	if err := f.fail("chmod", p); err != nil {
		return err
	}
	return f.OSFS.Chmod(p, m)
}

type faultFile struct {
	WritableFile
	fs   *faultFS
	name string
}

func (f *faultFile) Write(p []byte) (int, error) {
	if err := f.fs.fail("write", f.name); err != nil {
		n, _ := f.WritableFile.Write(p[:len(p)/2])
		return n, err
	}
	return f.WritableFile.Write(p)
}

func (f *faultFile) Sync() error {
	if err := f.fs.fail("sync", f.name); err != nil {
		return err
	}
	return f.WritableFile.Sync()
}

func (f *faultFile) Close() error {
	err := f.fs.fail("close", f.name)
	if cerr := f.WritableFile.Close(); err == nil {
		err = cerr
	}
	return err
}

// Every write of a set can fail (a full disk, an I/O error, a rename
// refused): the run fails with an output error saying what is left, and
// what is left is the old set, whole, or nothing; no temporary remains.
func TestSetInjectedFailures(t *testing.T) {
	enospc := syscall.ENOSPC // a full disk
	faults := []faultFS{
		{op: "mkdir", n: 1, err: enospc},
		{op: "create", name: document.SetMarker, n: 1, err: enospc},
		{op: "write", name: document.SetMarker, n: 2, err: enospc},
		{op: "create", name: "report.txt", n: 1, err: enospc},
		{op: "write", name: "connectors.json", n: 1, err: enospc},
		{op: "sync", name: "connectors.csv", n: 1, err: syscall.EIO},
		{op: "close", name: "connectors.json", n: 1, err: enospc},
		{op: "syncdir", n: 1, err: syscall.EIO},
		{op: "chmod", n: 1, err: syscall.EPERM},
		{op: "exchange", n: 1, err: syscall.EBUSY},
		{op: "rename", n: 1, err: syscall.EXDEV},
	}
	for _, old := range []bool{true, false} {
		for i := range faults {
			f := &faultFS{op: faults[i].op, name: faults[i].name, n: faults[i].n, err: faults[i].err}
			t.Run(fmt.Sprintf("old=%v/%s-%s", old, f.op, f.name), func(t *testing.T) {
				dir := filepath.Join(t.TempDir(), "out")
				if old {
					if err := WriteSet(dir, testSet(runA, 1000)); err != nil {
						t.Fatal(err)
					}
				}
				d, err := OpenSetFS(dir, f)
				if err != nil {
					t.Fatal(err)
				}
				err = d.Write(testSet(runB, 5000))
				d.Close()
				if old && f.op == "rename" || !old && (f.op == "exchange" || f.op == "chmod") {
					// An operation this case does not use.
					if err != nil {
						t.Fatal(err)
					}
					checkWhole(t, dir, runB)
					return
				}
				if !errors.Is(err, ErrOutput) || !errors.Is(err, f.err) {
					t.Fatalf("err %v: want an output error wrapping %v", err, f.err)
				}
				if old {
					if !strings.Contains(err.Error(), "is as it was before this run: the whole set of run "+runA) {
						t.Errorf("message %q does not say the old set is left", err)
					}
					checkWhole(t, dir, runA)
					return
				}
				if !strings.Contains(err.Error(), "nothing was written") {
					t.Errorf("message %q does not say nothing was written", err)
				}
				if _, err := os.Lstat(dir); !errors.Is(err, fs.ErrNotExist) {
					t.Errorf("output directory exists after a failed first run")
				}
				checkNoLeftovers(t, dir)
			})
		}
	}
}

// noExchangeFS is a system that cannot exchange directories: sets are
// swapped in two renames.
type noExchangeFS struct {
	faultFS
}

func (f *noExchangeFS) Exchange(a, b string) error {
	return &os.LinkError{Op: "exchange", Old: a, New: b, Err: ErrNoExchange}
}

func TestSetTwoStepSwap(t *testing.T) {
	dir := filepath.Join(t.TempDir(), "out")
	if err := WriteSet(dir, testSet(runA, 10)); err != nil {
		t.Fatal(err)
	}
	d, err := OpenSetFS(dir, &noExchangeFS{})
	if err != nil {
		t.Fatal(err)
	}
	if err := d.Write(testSet(runB, 10)); err != nil {
		t.Fatal(err)
	}
	d.Close()
	checkWhole(t, dir, runB)

	// The second rename (new set in) fails: the old set goes back.
	for _, n := range []int{1, 2} {
		d, err = OpenSetFS(dir, &noExchangeFS{faultFS{op: "rename", n: n, err: syscall.EIO}})
		if err != nil {
			t.Fatal(err)
		}
		err = d.Write(testSet(runA, 10))
		d.Close()
		if !errors.Is(err, ErrOutput) || !strings.Contains(err.Error(), "the whole set of run "+runB) {
			t.Errorf("rename %d: %v", n, err)
		}
		checkWhole(t, dir, runB)
	}
}

// What a killed run leaves beside the output directory is dealt with by
// the next run: an old set set aside by a two-step swap cut between its
// renames is put back; temporary directories Joinery wrote are removed;
// other things are left alone.
func TestSetRecoversFromKilledRun(t *testing.T) {
	parent := t.TempDir()
	dir := filepath.Join(parent, "out")
	// Run A wrote a set; run B was cut after setting it aside, leaving
	// its own new set unplaced.
	if err := WriteSet(dir, testSet(runA, 10)); err != nil {
		t.Fatal(err)
	}
	if err := os.Rename(dir, filepath.Join(parent, ".out.old-123")); err != nil {
		t.Fatal(err)
	}
	other := filepath.Join(t.TempDir(), "b")
	if err := WriteSet(other, testSet(runB, 10)); err != nil {
		t.Fatal(err)
	}
	if err := os.Rename(other, filepath.Join(parent, ".out.new-123")); err != nil {
		t.Fatal(err)
	}
	// A temporary directory cut before its marker, one cut while writing
	// files; and names that are not Joinery's leftovers.
	mk := func(name string, files ...string) {
		os.MkdirAll(filepath.Join(parent, name), 0o755)
		for _, f := range files {
			os.WriteFile(filepath.Join(parent, name, f), []byte("x"), 0o644)
		}
	}
	mk(".out.new-77")
	mk(".out.new-78", document.SetMarker, "connectors.json")
	mk(".out.new-mine", "keep")
	mk(".out.new-79", "keep") // no marker: not Joinery's
	mk(".other.new-80", document.SetMarker)
	os.WriteFile(filepath.Join(parent, ".out.lock"), []byte("99999\n"), 0o644) // a dead run's lock

	d, err := OpenSet(dir)
	if err != nil {
		t.Fatal(err)
	}
	if set, err := ReadSet(dir); err != nil || set.Marker.RunID != runA {
		t.Fatalf("old set not put back: %v", err)
	}
	if err := d.Write(testSet(runB, 10)); err != nil {
		t.Fatal(err)
	}
	d.Close()
	_, beside := snapshot(t, dir)
	want := []string{".other.new-80", ".out.new-79", ".out.new-mine", "out"}
	if !slices.Equal(beside, want) {
		t.Errorf("beside the output directory: %v, want %v", beside, want)
	}
	if set, err := ReadSet(dir); err != nil || set.Marker.RunID != runB {
		t.Errorf("new set: %v", err)
	}
}

// Joinery replaces only a directory it owns: new, empty, marked by its
// set marker (and holding nothing else, bar what file browsers drop), or
// written by an earlier Joinery without a marker.
func TestSetOwnership(t *testing.T) {
	write := func(dir string, files map[string]string) {
		os.MkdirAll(dir, 0o755)
		for name, data := range files {
			os.WriteFile(filepath.Join(dir, name), []byte(data), 0o644)
		}
	}
	tests := []struct {
		name  string
		setup func(dir string)
		want  error // nil: the set is written
		text  string
	}{
		{"empty", func(dir string) { os.Mkdir(dir, 0o700) }, nil, ""},
		{"inputs", func(dir string) { write(dir, map[string]string{"body.vtk": "x", "welds.csv": "y"}) }, ErrNotOwned,
			"is not one Joinery wrote: it holds body.vtk, welds.csv and no .joinery-set marker"},
		{"one set file and more", func(dir string) { write(dir, map[string]string{"report.txt": "x", "notes.md": "y"}) }, ErrNotOwned, "notes.md"},
		{"a file", func(dir string) { os.WriteFile(dir, []byte("x"), 0o644) }, ErrNotOwned, "is a file, not a directory"},
		{"earlier Joinery", func(dir string) {
			write(dir, map[string]string{"connectors.json": "{}", "report.txt": "r", ".connectors.json.tmp123": "half"})
		}, nil, ""},
		{"set and a note", func(dir string) {
			WriteSet(dir, testSet(runA, 1))
			write(dir, map[string]string{"notes.md": "mine"})
		}, ErrOutput, "also notes.md, which Joinery did not write"},
		{"set and browser files", func(dir string) {
			WriteSet(dir, testSet(runA, 1))
			write(dir, map[string]string{".DS_Store": "x", ".~lock.connectors.csv#": "y"})
		}, nil, ""},
		{"damaged marker", func(dir string) {
			WriteSet(dir, testSet(runA, 1))
			write(dir, map[string]string{document.SetMarker: "{"})
		}, ErrOutput, "marker cannot be read"},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			dir := filepath.Join(t.TempDir(), "out")
			tt.setup(dir)
			before, _ := snapshot(t, dir)
			err := WriteSet(dir, testSet(runB, 1))
			if tt.want == nil {
				if err != nil {
					t.Fatal(err)
				}
				checkWhole(t, dir, runB)
				return
			}
			if !errors.Is(err, tt.want) || !strings.Contains(err.Error(), tt.text) {
				t.Fatalf("err %v\nwant %v containing %q", err, tt.want, tt.text)
			}
			if after, _ := snapshot(t, dir); fmt.Sprint(before) != fmt.Sprint(after) {
				t.Errorf("refused directory changed")
			}
			checkNoLeftovers(t, dir)
		})
	}
	t.Run("root", func(t *testing.T) {
		if _, err := OpenSet("/"); !errors.Is(err, ErrNotOwned) {
			t.Errorf("err %v", err)
		}
	})
	t.Run("current directory", func(t *testing.T) {
		t.Chdir(t.TempDir())
		os.WriteFile("job.yaml", []byte("version: 1\n"), 0o644)
		if _, err := OpenSet("."); !errors.Is(err, ErrNotOwned) || !strings.Contains(err.Error(), "output directory . is not one Joinery wrote") {
			t.Errorf("err %v", err)
		}
	})
}

// A link to an output directory: the directory it points to is
// replaced, and the link stays.
func TestSetThroughLink(t *testing.T) {
	base := t.TempDir()
	real := filepath.Join(base, "scratch", "out")
	if err := WriteSet(real, testSet(runA, 1)); err != nil {
		t.Fatal(err)
	}
	link := filepath.Join(base, "out")
	if err := os.Symlink(real, link); err != nil {
		t.Skip(err)
	}
	if err := WriteSet(link, testSet(runB, 1)); err != nil {
		t.Fatal(err)
	}
	if fi, err := os.Lstat(link); err != nil || fi.Mode()&fs.ModeSymlink == 0 {
		t.Fatalf("link gone: %v", err)
	}
	checkWhole(t, real, runB)
}

// A second run into a directory another run holds fails at once, naming
// the holder's process id; the lock goes with the run that held it.
func TestSetLock(t *testing.T) {
	dir := filepath.Join(t.TempDir(), "out")
	d, err := OpenSet(dir)
	if err != nil {
		t.Fatal(err)
	}
	_, err = OpenSet(dir)
	if !errors.Is(err, ErrLocked) || !errors.Is(err, ErrOutput) || !strings.Contains(err.Error(), "(process "+strconv.Itoa(os.Getpid())+")") {
		t.Fatalf("second open: %v", err)
	}
	// Another spelling of the same directory shares the lock.
	if _, err := OpenSet(filepath.Join(dir, "..", "out")); !errors.Is(err, ErrLocked) {
		t.Errorf("other spelling: %v", err)
	}
	if err := d.Write(testSet(runA, 1)); err != nil {
		t.Fatal(err)
	}
	d.Close()
	checkWhole(t, dir, runA) // the lock file is gone too
	d, err = OpenSet(dir)
	if err != nil {
		t.Fatal(err)
	}
	d.Close()
}

// A run that fails before writing (bad input) leaves nothing, also not
// the parent directories OpenSet made.
func TestSetOpenCloseLeavesNothing(t *testing.T) {
	base := t.TempDir()
	d, err := OpenSet(filepath.Join(base, "a", "b", "out"))
	if err != nil {
		t.Fatal(err)
	}
	d.Close()
	if entries, _ := os.ReadDir(base); len(entries) != 0 {
		t.Errorf("left %v", entries)
	}
}

// The set's own files must carry its run id; a caller that forgets is
// stopped before anything is written.
func TestSetChecksRunIDs(t *testing.T) {
	dir := filepath.Join(t.TempDir(), "out")
	bad := testSet(runA, 1)
	bad.Files[2].Data = []byte("no id here\n")
	if err := WriteSet(dir, bad); err == nil || errors.Is(err, ErrOutput) || !strings.Contains(err.Error(), "report.txt does not carry") {
		t.Errorf("err %v", err)
	}
	bad = testSet("A", 1)
	if err := WriteSet(dir, bad); err == nil {
		t.Errorf("invalid run id accepted")
	}
	bad = testSet(runA, 1)
	bad.Files[0].Name = "../x"
	if err := WriteSet(dir, bad); err == nil {
		t.Errorf("bad name accepted")
	}
	if _, err := os.Lstat(dir); !errors.Is(err, fs.ErrNotExist) {
		t.Errorf("written")
	}
}

// ReadSet refuses a set that is not whole or not of one run, and so
// does ReadSetFile, whichever file it keeps.
func TestReadSetRefusesMixedSets(t *testing.T) {
	base := t.TempDir()
	a, b := filepath.Join(base, "a"), filepath.Join(base, "b")
	if err := WriteSet(a, testSet(runA, 1)); err != nil {
		t.Fatal(err)
	}
	if err := WriteSet(b, testSet(runB, 1)); err != nil {
		t.Fatal(err)
	}
	copyFile := func(name string) {
		raw, _ := os.ReadFile(filepath.Join(b, name))
		os.WriteFile(filepath.Join(a, name), raw, 0o644)
	}
	tests := []struct {
		name   string
		change func()
		want   string
	}{
		{"whole", func() {}, ""},
		{"mixed", func() { copyFile("report.txt") }, "report.txt: carries run id \"" + runB + "\", not the set's " + runA + ": the set is mixed"},
		{"missing", func() { os.Remove(filepath.Join(a, "connectors.csv")) }, "connectors.csv: missing from the output set"},
		{"changed", func() { os.WriteFile(filepath.Join(a, "report.txt"), []byte("joinery (run "+runA+") edited\n"), 0o644) }, "report.txt: not the file the set's marker lists"},
		{"changed past the first read", func() {
			p := filepath.Join(a, "connectors.json")
			raw, _ := os.ReadFile(p)
			raw[len(raw)-5] = 'q'
			os.WriteFile(p, raw, 0o644)
		}, "connectors.json: not the file the set's marker lists"},
		{"no marker", func() { os.Remove(filepath.Join(a, document.SetMarker)) }, "not an output set of Joinery"},
		{"no directory", func() { os.RemoveAll(a) }, "no such output directory"},
	}
	readers := []struct {
		name string
		read func(string) (*SetContents, error)
		kept int // files kept of the whole set
	}{
		{"ReadSet", ReadSet, len(testSet(runA, 1).Files)},
		{"ReadSetFile report.txt", func(d string) (*SetContents, error) { return ReadSetFile(d, "report.txt") }, 1},
		{"ReadSetFile connectors.csv", func(d string) (*SetContents, error) { return ReadSetFile(d, "connectors.csv") }, 1},
	}
	for _, r := range readers {
		for _, tt := range tests {
			t.Run(r.name+"/"+tt.name, func(t *testing.T) {
				os.RemoveAll(a)
				// connectors.json larger than hashFile's buffer
				if err := WriteSet(a, testSet(runA, 300<<10)); err != nil {
					t.Fatal(err)
				}
				tt.change()
				set, err := r.read(a)
				if tt.want == "" {
					if err != nil || set.Marker.RunID != runA || len(set.Files) != r.kept {
						t.Fatalf("whole set: %v", err)
					}
					for name, data := range set.Files {
						if !bytes.Contains(data, []byte(runA)) {
							t.Errorf("%s: %q", name, data)
						}
					}
					return
				}
				if err == nil || !strings.Contains(err.Error(), tt.want) || !errors.Is(err, geom.ErrInput) {
					t.Fatalf("err %v\nwant an input error containing %q", err, tt.want)
				}
			})
		}
	}
}

// A reader reading sets back while a writer replaces them over and over
// gets the whole set of one run each time, never a mix.
func TestReadSetWhileReplaced(t *testing.T) {
	dir := filepath.Join(t.TempDir(), "out")
	if err := WriteSet(dir, testSet(runA, 1)); err != nil {
		t.Fatal(err)
	}
	done := make(chan error)
	go func() {
		var err error
		for i := 0; i < 8 && err == nil; i++ {
			err = WriteSet(dir, testSet([]string{runA, runB}[i%2], 1000*(i%3)))
		}
		done <- err
	}()
	reads := 0
	for {
		select {
		case err := <-done:
			if err != nil {
				t.Fatal(err)
			}
			t.Logf("%d reads", reads)
			return
		default:
		}
		set, err := ReadSet(dir)
		if err != nil {
			if strings.Contains(err.Error(), "keeps changing") {
				continue
			}
			t.Fatal(err)
		}
		reads++
		for name, data := range set.Files {
			if document.FindRunID(data) != set.Marker.RunID {
				t.Fatalf("%s of another run", name)
			}
		}
	}
}

// An output directory inside another set's directory is refused before
// anything is written (ErrNotOwned: the command line's mistake): the new
// set would be a folder the outer set does not list, so that the next run
// into the outer directory refuses it (exit 3), as the example's
// flanges --out out/flanges followed by build did. A set whose parent
// holds no marker is written as before.
func TestSetInsideAnotherSet(t *testing.T) {
	base := t.TempDir()
	outer := filepath.Join(base, "out")
	if err := WriteSet(outer, testSet(runA, 1)); err != nil {
		t.Fatal(err)
	}
	before, _ := snapshot(t, outer)
	for _, inner := range []string{filepath.Join(outer, "flanges"), filepath.Join(outer, "a", "b")} {
		err := WriteSet(inner, testSet(runB, 1))
		if want := "lies inside the output set of run " + runA; !errors.Is(err, ErrNotOwned) || !strings.Contains(err.Error(), want) {
			t.Errorf("%s: err %v, want ErrNotOwned containing %q", inner, err, want)
		}
	}
	if after, _ := snapshot(t, outer); fmt.Sprint(before) != fmt.Sprint(after) {
		t.Errorf("the outer set changed: %v", keys(after))
	}
	if _, err := CheckSet(outer); err != nil {
		t.Errorf("the outer set after the refusals: %v", err)
	}
	if err := WriteSet(outer, testSet(runB, 1)); err != nil {
		t.Errorf("the next run into the outer directory: %v", err)
	}
	beside := filepath.Join(base, "out-flanges")
	if err := WriteSet(beside, testSet(runB, 1)); err != nil {
		t.Errorf("a set beside another: %v", err)
	}
	plain := filepath.Join(base, "work", "out")
	if err := WriteSet(plain, testSet(runB, 1)); err != nil {
		t.Errorf("a set in a plain directory: %v", err)
	}
}
