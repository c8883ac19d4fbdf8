package writers

import (
	"bufio"
	"bytes"
	"crypto/sha256"
	"encoding/hex"
	"errors"
	"fmt"
	"hash"
	"io"
	"io/fs"
	"os"
	"path/filepath"
	"regexp"
	"slices"
	"strings"
	"sync"

	"github.com/joinery-cae/joinery/writers/document"
)

// How an output set is written
//
// A run writes its whole set into a temporary directory beside the
// output directory, then swaps the two, so that a reader of the output
// directory sees the old set or the new one, never a mix, whatever
// happens (a full disk, a kill, a power cut, a second run):
//
//   - OpenSet, before the run does its work, takes a lock beside the
//     output directory (.<name>.lock in its parent, holding the process
//     id), so that a second run into the same directory fails at once;
//     it removes what a killed run left beside the directory; and it
//     checks that the directory is Joinery's to replace: new, empty, or
//     marked by the .joinery-set file of an earlier set and holding
//     nothing else.
//   - Write writes every file and the marker into .<name>.new-<digits>,
//     syncs them to disk, and swaps the directory in (a sweep writes
//     each nested set, a variant's folder, into that directory before
//     Write, with WriteNestedFiles, which renders the files straight
//     into it, or WriteNested; each file is synced, then its folder's
//     marker, completed, and the folder, while the next variants are
//     built. Write then adds the outer files and marker and does the
//     swap, so the swap still comes only after every file and folder of
//     the whole set is on disk, and a run killed before it leaves the
//     old set as it was): on Linux an atomic
//     exchange of the two directories (renameat2 with RENAME_EXCHANGE),
//     then the old set is removed; elsewhere, or where the file system
//     cannot exchange, two renames (the old set aside to
//     .<name>.old-<digits>, the new one in), then the old set is
//     removed. Between those two renames the directory is briefly
//     absent; a run killed there leaves the old set aside, and the next
//     run puts it back before it starts.
//   - Close releases the lock.
//
// The directory must not be a mount point, and its parent must be
// writable: the temporary directory, the lock and the swap live there.

// Names beside and in an output directory.
const (
	lockSuffix = ".lock" // .<name>.lock
	newInfix   = ".new-" // .<name>.new-<digits>: a set being written, or the old set after an exchange
	oldInfix   = ".old-" // .<name>.old-<digits>: the old set set aside by the two-step swap
)

// ErrNotOwned marks an output directory Joinery refuses to replace
// because it did not write it: it exists, is not empty and holds no set
// marker (the current directory, a folder of inputs), or it is not a
// directory. It is the caller's choice of directory, so commands report
// it as a usage error (joints/pipeline does).
var ErrNotOwned = errors.New("output directory not Joinery's")

// notOwned is an error marked with ErrNotOwned.
type notOwned struct{ err error }

func (e *notOwned) Error() string        { return e.err.Error() }
func (e *notOwned) Unwrap() error        { return e.err }
func (e *notOwned) Is(target error) bool { return target == ErrNotOwned }

// Set is one run's output set: its files, rendered, and the run id that
// every one of them carries near its start (document.FindRunID) and
// that the marker records.
type Set struct {
	Job       string // the command that writes the set ("build")
	Generator string // "joinery <version>"
	RunID     string
	Files     []Rendered
	// Sets are whole sets nested in folders of this one (the variants of
	// a sweep): each is written into its own folder, with its own marker
	// and run id, in the same temporary directory and the same swap as
	// the outer set, and the outer marker lists them with their run ids.
	// Nested sets hold files only.
	Sets []NestedSet
}

// NestedSet is a set written in the folder Dir of an outer set.
type NestedSet struct {
	Dir string // a plain folder name
	Set Set
}

// WriteSet writes set into dir as one set through the operating
// system's file system: OpenSet, Write and Close in one call, for a
// caller with nothing to do in between. Errors are output errors
// (ErrOutput) or ErrNotOwned.
func WriteSet(dir string, set Set) error {
	d, err := OpenSet(dir)
	if err != nil {
		return err
	}
	defer d.Close()
	return d.Write(set)
}

// OutputDir is an output directory held by one run, from OpenSet to
// Close.
type OutputDir struct {
	fsys    FS
	name    string // as the caller gave it, for messages
	dir     string // resolved: absolute, links followed
	parent  string
	base    string
	lock    *lockFile
	created []string // parent directories OpenSet made, innermost first
	state   dirState
	written bool // Write was called
	placed  bool // the new set stands in the output directory
	closed  bool

	mu     sync.Mutex           // guards what follows, for WriteNested
	tmp    string               // the temporary directory, once made
	nested []document.NestedSet // the nested sets written into tmp
	failed bool                 // a WriteNested failed: Write fails too
}

// dirState is what stands at the output directory when a run starts.
type dirState struct {
	exists bool
	mode   fs.FileMode
	runID  string // run id of the set there, "" when none
	empty  bool
}

// OpenSet takes the output directory dir for one run, through the
// operating system's file system; see OpenSetFS.
func OpenSet(dir string) (*OutputDir, error) { return OpenSetFS(dir, OSFS{}) }

// OpenSetFS takes the output directory dir for one run: it creates dir's
// parent when needed, locks dir against other runs (an output error
// naming the other run's process id when one holds it), puts back or
// removes what a killed run left beside dir, and checks that dir is new,
// empty or holds a set Joinery wrote and nothing else. Call it before
// the run does its work, so that a run that could not write its outputs
// fails at once, then Write the set and Close. A directory Joinery did
// not write is refused with ErrNotOwned; one holding a set Joinery wrote
// and something more (a file put there, a set file replaced by a
// directory) with an output error. Either way it is left as it is.
//
// fsys carries the writes (tests inject failures through it); reading
// the directory, the lock and the recovery use the operating system.
func OpenSetFS(dir string, fsys FS) (*OutputDir, error) {
	d := &OutputDir{fsys: fsys, name: dir}
	if err := d.resolve(); err != nil {
		return nil, err
	}
	// A directory that is not Joinery's is refused before anything is
	// written beside it (its parent may not even be writable); the check
	// is made again under the lock.
	if _, err := inspectDir(d.dir, d.name); errors.Is(err, ErrNotOwned) {
		d.removeCreated()
		return nil, err
	}
	lock, err := acquireLock(filepath.Join(d.parent, "."+d.base+lockSuffix), d.name)
	if err != nil {
		d.removeCreated()
		return nil, OutputError(err)
	}
	d.lock = lock
	if err := d.recoverStale(); err != nil {
		d.Close()
		return nil, OutputError(err)
	}
	if d.state, err = inspectDir(d.dir, d.name); err != nil {
		d.Close()
		return nil, err
	}
	return d, nil
}

// resolve makes the directory's path absolute with links followed, so
// that two spellings of one directory share one lock, and creates its
// parent.
func (d *OutputDir) resolve() error {
	abs, err := filepath.Abs(d.name)
	if err != nil {
		return OutputError(fmt.Errorf("writers: output directory %s: %w", d.name, err))
	}
	parent := filepath.Dir(abs)
	if parent == abs {
		return &notOwned{fmt.Errorf("output directory %s is the root of the file system; choose a directory of its own", d.name)}
	}
	if err := insideSet(d.name, parent); err != nil {
		return err
	}
	for p := parent; ; p = filepath.Dir(p) {
		if _, err := os.Lstat(p); err == nil || filepath.Dir(p) == p {
			break
		}
		d.created = append(d.created, p)
	}
	if err := os.MkdirAll(parent, 0o755); err != nil {
		return OutputError(fmt.Errorf("writers: creating the parent of output directory %s: %w", d.name, err))
	}
	if parent, err = filepath.EvalSymlinks(parent); err != nil {
		return OutputError(fmt.Errorf("writers: output directory %s: %w", d.name, err))
	}
	dir := filepath.Join(parent, filepath.Base(abs))
	if fi, err := os.Lstat(dir); err == nil && fi.Mode()&fs.ModeSymlink != 0 {
		// Swap the directory the link points to, not the link.
		if dir, err = filepath.EvalSymlinks(dir); err != nil {
			return &notOwned{fmt.Errorf("output directory %s is a link to nowhere (%v); choose another output directory", d.name, err)}
		}
		parent = filepath.Dir(dir)
	}
	d.dir, d.parent, d.base = dir, parent, filepath.Base(dir)
	return nil
}

// insideSet refuses an output directory (name, whose parent is the
// absolute path parent) that would lie inside the directory of another
// set: that set's marker does not list it, so the next run into the
// outer directory would refuse the whole (a set's directory holds that
// set alone). Nested sets (a sweep's variants) are written by the outer
// set's own run, not through OpenSet.
func insideSet(name, parent string) error {
	for p := parent; ; p = filepath.Dir(p) {
		if fi, err := os.Lstat(filepath.Join(p, document.SetMarker)); err == nil && fi.Mode().IsRegular() {
			run := "unknown"
			if doc, err := readMarker(p); err == nil {
				run = doc.RunID
			}
			return &notOwned{fmt.Errorf("output directory %s lies inside the output set of run %s in %s; a set's directory holds that set alone "+
				"(the next run into %s would refuse what is added to it): choose a directory beside it, such as %s-%s",
				name, run, p, p, p, filepath.Base(name))}
		}
		if filepath.Dir(p) == p {
			return nil
		}
	}
}

// leftovers matches the names a run leaves beside the output directory
// named base while it writes: the directory of the new set and the old
// set set aside.
func leftovers(base string) *regexp.Regexp {
	return regexp.MustCompile(`^\.` + regexp.QuoteMeta(base) + `\.(new|old)-[0-9]+$`)
}

// recoverStale deals with what killed runs left beside the output
// directory (the lock is held, so no run is writing): when the directory
// is missing and an old set stands aside (a two-step swap cut between
// its renames), the old set is put back; then every leftover directory
// that holds a set marker, or nothing, is removed. Anything else with
// such a name is left alone.
func (d *OutputDir) recoverStale() error {
	entries, err := os.ReadDir(d.parent)
	if err != nil {
		return fmt.Errorf("writers: reading %s: %w", d.parent, err)
	}
	re := leftovers(d.base)
	var stale []string
	for _, e := range entries {
		if e.IsDir() && re.MatchString(e.Name()) {
			stale = append(stale, filepath.Join(d.parent, e.Name()))
		}
	}
	if len(stale) == 0 {
		return nil
	}
	if _, err := os.Lstat(d.dir); errors.Is(err, fs.ErrNotExist) {
		for i, p := range stale {
			if strings.Contains(filepath.Base(p), oldInfix) && completeMarker(p) {
				if err := os.Rename(p, d.dir); err != nil {
					return fmt.Errorf("writers: putting back the set %s set aside by a run that was cut short: %w", p, err)
				}
				stale = slices.Delete(stale, i, i+1)
				break
			}
		}
	}
	for _, p := range stale {
		if ours(p) {
			os.RemoveAll(p) // what cannot be removed now is tried again next run
		}
	}
	return nil
}

// completeMarker reports whether dir holds the marker of a whole set.
func completeMarker(dir string) bool {
	doc, err := readMarker(dir)
	return err == nil && doc.Complete
}

// ours reports whether a leftover directory is one Joinery wrote: it
// holds a set marker, or nothing.
func ours(dir string) bool {
	if _, err := os.Lstat(filepath.Join(dir, document.SetMarker)); err == nil {
		return true
	}
	entries, err := os.ReadDir(dir)
	return err == nil && len(entries) == 0
}

// readMarker reads the set marker in dir.
func readMarker(dir string) (*document.SetDoc, error) {
	name := filepath.Join(dir, document.SetMarker)
	f, err := os.Open(name)
	if err != nil {
		return nil, err
	}
	defer f.Close()
	return document.DecodeSet(f, name)
}

// legacyFiles are the files of a build set written before sets had a
// marker; a directory holding only these (and the temporary files of
// that writer, .<file>.tmp<digits>) is adopted.
var legacyFiles = regexp.MustCompile(`^(connectors\.json|connectors\.csv|connectors\.vtk|report\.json|report\.txt)$|` +
	`^\.(connectors\.json|connectors\.csv|connectors\.vtk|report\.json|report\.txt)\.tmp[0-9]+$`)

// harmless matches files that file browsers and office programs drop
// into a directory they show or whose files they open; they go with the
// old set.
var harmless = regexp.MustCompile(`^(\.DS_Store|Thumbs\.db|desktop\.ini|\.~lock\..*#|~\$.*)$`)

// inspectDir says what stands at dir and whether Joinery may replace it.
func inspectDir(dir, name string) (dirState, error) {
	fi, err := os.Lstat(dir)
	if errors.Is(err, fs.ErrNotExist) {
		return dirState{}, nil
	}
	if err != nil {
		return dirState{}, OutputError(fmt.Errorf("writers: output directory %s: %w", name, err))
	}
	if !fi.IsDir() {
		return dirState{}, &notOwned{fmt.Errorf("output directory %s is a file, not a directory; choose another output directory", name)}
	}
	st := dirState{exists: true, mode: fi.Mode().Perm()}
	entries, err := os.ReadDir(dir)
	if err != nil {
		return st, OutputError(fmt.Errorf("writers: reading output directory %s: %w", name, err))
	}
	if len(entries) == 0 {
		st.empty = true
		return st, nil
	}
	if !slices.ContainsFunc(entries, func(e fs.DirEntry) bool { return e.Name() == document.SetMarker }) {
		var foreign []string
		for _, e := range entries {
			if !e.Type().IsRegular() || !legacyFiles.MatchString(e.Name()) && !harmless.MatchString(e.Name()) {
				foreign = append(foreign, e.Name())
			}
		}
		if len(foreign) == 0 {
			return st, nil // a set of an earlier Joinery
		}
		return st, &notOwned{fmt.Errorf("output directory %s is not one Joinery wrote: it holds %s and no %s marker. "+
			"Joinery replaces its output directory whole, so it writes only into a new or empty directory or one it wrote before; "+
			"choose another output directory (%s is left as it is)", name, listNames(foreign), document.SetMarker, name)}
	}
	doc, err := readMarker(dir)
	if err != nil {
		return st, OutputError(fmt.Errorf("writers: output directory %s: its set marker cannot be read (%w); "+
			"%s is left as it is: remove it, or choose another output directory", name, err, name))
	}
	st.runID = doc.RunID
	listed, nested := map[string]bool{}, map[string]bool{}
	for _, f := range doc.Files {
		listed[f.Name] = true
	}
	for _, n := range doc.Sets {
		nested[n.Name] = true
	}
	var foreign []string
	for _, e := range entries {
		n := e.Name()
		switch {
		case n == document.SetMarker && e.Type().IsRegular():
		case listed[n] && e.Type().IsRegular():
		case nested[n] && e.IsDir():
		case listed[n]:
			foreign = append(foreign, n+" (not the file Joinery wrote there)")
		case harmless.MatchString(n) && e.Type().IsRegular():
		default:
			foreign = append(foreign, n)
		}
	}
	if len(foreign) > 0 {
		return st, OutputError(fmt.Errorf("output directory %s holds the set of run %s and also %s, which Joinery did not write; "+
			"Joinery replaces only a set it wrote, whole: move that away, or choose another output directory (%s is left as it is)",
			name, doc.RunID, listNames(foreign), name))
	}
	return st, nil
}

// listNames lists a few names for a message.
func listNames(names []string) string {
	const most = 5
	if len(names) > most {
		return fmt.Sprintf("%s and %d more", strings.Join(names[:most], ", "), len(names)-most)
	}
	return strings.Join(names, ", ")
}

// Write writes set into the output directory as one set (see the
// comment at the top of this file). Every file must carry set.RunID
// near its start. On failure the output directory is as it was before
// the run, and the error (an output error) says so. Write may be called
// once.
func (d *OutputDir) Write(set Set) error {
	if d.closed || d.written {
		return errors.New("writers: output directory written twice or after Close")
	}
	if err := checkSet(set); err != nil {
		return err
	}
	d.mu.Lock()
	defer d.mu.Unlock()
	d.written = true
	if d.failed {
		d.removeTemp()
		return OutputError(fmt.Errorf("writing the output set into %s: a nested set was not written; %s", d.name, d.leftAs()))
	}
	err := d.writeTemp(set)
	if err == nil {
		err = d.swap(d.tmp)
	}
	if err != nil {
		d.removeTemp()
		return OutputError(fmt.Errorf("writing the output set into %s: %w; %s", d.name, err, d.leftAs()))
	}
	d.placed = true
	d.fsys.SyncDir(d.parent)
	return nil
}

// WriteNested writes the nested set n into the set being written now,
// before Write, so that a caller making many nested sets (a sweep's
// variants) need not hold them all in memory: its folder, its files and
// its marker are written into the temporary directory and synced to
// disk, and Write lists it in the outer marker (in folder-name order)
// with the nested sets of its own Set.Sets. Safe for concurrent use; not
// after Write. On failure the error (an output error) says what is left,
// and Write fails too.
func (d *OutputDir) WriteNested(n NestedSet) error {
	if err := checkNested(n); err != nil {
		return err
	}
	return d.nestedInto(n, func(sub string, marker *document.SetDoc) error { return d.writeFiles(sub, n.Set, marker) })
}

// nestedInto makes the folder of the nested set n in the temporary
// directory and fills it with fill, given the folder and its marker.
func (d *OutputDir) nestedInto(n NestedSet, fill func(sub string, marker *document.SetDoc) error) error {
	d.mu.Lock()
	if d.closed || d.written {
		d.mu.Unlock()
		return errors.New("writers: nested set written after Write or Close")
	}
	if slices.ContainsFunc(d.nested, func(o document.NestedSet) bool { return o.Name == n.Dir }) {
		d.mu.Unlock()
		return fmt.Errorf("writers: nested set %s written twice", n.Dir)
	}
	err := d.makeTemp(n.Set.Generator)
	if err == nil {
		// Reserved now, so that a second writer of the same folder fails.
		d.nested = append(d.nested, document.NestedSet{Name: n.Dir, RunID: n.Set.RunID, Job: n.Set.Job})
	}
	tmp := d.tmp
	d.mu.Unlock()
	if err == nil {
		sub := filepath.Join(tmp, n.Dir)
		if err = d.fsys.Mkdir(sub, 0o755); err == nil {
			if err = fill(sub, newMarker(n.Set)); err != nil {
				err = fmt.Errorf("%s: %w", n.Dir, err)
			}
		}
	}
	if err != nil {
		d.mu.Lock()
		d.failed = true
		d.mu.Unlock()
		var re *renderError
		if errors.As(err, &re) {
			return err
		}
		return OutputError(fmt.Errorf("writing the output set into %s: %w; %s", d.name, err, d.leftAs()))
	}
	return nil
}

// WriteNestedFiles writes a nested set as WriteNested does, rendering
// each of files (concurrently) straight into its file in the temporary
// directory instead of into memory first, hashing it as it goes, and
// returns the files as its marker lists them (name, size, SHA-256), in
// the order given. set gives the folder's job, generator and run id
// (its Files and Sets are not used). A file that does not carry the run
// id near its start, or whose rendering fails, fails the nested set
// (not an output error: the caller's); a write that fails is an output
// error. Either way Write fails too.
func (d *OutputDir) WriteNestedFiles(dir string, set Set, files []File) ([]document.SetFile, error) {
	n := NestedSet{Dir: dir, Set: Set{Job: set.Job, Generator: set.Generator, RunID: set.RunID}}
	if err := checkNested(n); err != nil {
		return nil, err
	}
	seen := map[string]bool{}
	for _, f := range files {
		if !plainName(f.Name) || seen[f.Name] {
			return nil, fmt.Errorf("writers: bad or repeated file name %q in an output set", f.Name)
		}
		seen[f.Name] = true
	}
	var listed []document.SetFile
	err := d.nestedInto(n, func(sub string, marker *document.SetDoc) error {
		var err error
		listed, err = d.renderFiles(sub, set.RunID, files)
		if err != nil {
			return err
		}
		marker.Files = append(marker.Files, listed...)
		return d.completeSet(sub, marker)
	})
	return listed, err
}

// renderError marks a file's rendering that failed, as opposed to its
// writing: the caller's error, not an output error.
type renderError struct{ err error }

func (e *renderError) Error() string { return e.err.Error() }
func (e *renderError) Unwrap() error { return e.err }

// renderFiles renders files into dir, each synced to disk, and returns
// them as a marker lists them.
func (d *OutputDir) renderFiles(dir, runID string, files []File) ([]document.SetFile, error) {
	listed := make([]document.SetFile, len(files))
	errs := make([]error, len(files))
	var wg sync.WaitGroup
	for i := range files {
		wg.Go(func() { listed[i], errs[i] = d.renderFile(filepath.Join(dir, files[i].Name), runID, &files[i]) })
	}
	wg.Wait()
	return listed, errors.Join(errs...)
}

// renderFile renders f into a new file at path through a buffer,
// hashing what it writes, checks that the file carries runID near its
// start and syncs it.
func (d *OutputDir) renderFile(path, runID string, f *File) (document.SetFile, error) {
	out, err := d.fsys.Create(path)
	if err != nil {
		return document.SetFile{}, err
	}
	w := &hashWriter{w: out, h: sha256.New()}
	bw := bufio.NewWriterSize(w, renderBuffer)
	rerr := f.Render(bw)
	if rerr == nil {
		rerr = bw.Flush()
	}
	err = w.err // the file's own failure comes first
	if err == nil && rerr != nil {
		err = &renderError{fmt.Errorf("writers: rendering %s: %w", f.Name, rerr)}
	}
	if err == nil {
		if got := document.FindRunID(w.head); got != runID {
			err = &renderError{fmt.Errorf("writers: %s does not carry the set's run id %s near its start (found %q)", f.Name, runID, got)}
		}
	}
	if err == nil {
		err = out.Sync()
	}
	if cerr := out.Close(); err == nil {
		err = cerr
	}
	if err != nil {
		if _, ok := err.(*renderError); ok {
			return document.SetFile{}, err
		}
		return document.SetFile{}, fmt.Errorf("writing %s: %w", f.Name, err)
	}
	return document.SetFile{Name: f.Name, Bytes: w.n, SHA256: hex.EncodeToString(w.h.Sum(nil))}, nil
}

// renderBuffer is the buffer between a file's rendering and its file
// (our choice: large enough that writes are few, small beside a file).
const renderBuffer = 1 << 20

// hashWriter writes to w, hashing what it writes, counting it and
// keeping its first document.RunIDHead bytes; it keeps w's first error.
type hashWriter struct {
	w    io.Writer
	h    hash.Hash
	n    int64
	head []byte
	err  error
}

func (w *hashWriter) Write(p []byte) (int, error) {
	if w.err != nil {
		return 0, w.err
	}
	if k := document.RunIDHead - len(w.head); k > 0 {
		w.head = append(w.head, p[:min(k, len(p))]...)
	}
	w.h.Write(p)
	n, err := w.w.Write(p)
	w.n += int64(n)
	if err == nil && n < len(p) {
		err = io.ErrShortWrite
	}
	w.err = err
	return n, err
}

// removeTemp removes the temporary directory, when made.
func (d *OutputDir) removeTemp() {
	if d.tmp != "" {
		d.fsys.RemoveAll(d.tmp)
		d.tmp = ""
	}
}

// leftAs says what a failed run left in the output directory.
func (d *OutputDir) leftAs() string {
	switch {
	case !d.state.exists:
		return "nothing was written (" + d.name + " does not exist)"
	case d.state.runID != "":
		return d.name + " is as it was before this run: the whole set of run " + d.state.runID
	case d.state.empty:
		return d.name + " is as it was before this run (empty)"
	}
	return d.name + " is as it was before this run"
}

// checkSet refuses a set its caller got wrong: no run id, a file that
// does not carry it, a name that is not a plain file name.
func checkSet(set Set) error {
	if err := checkFiles(set); err != nil {
		return err
	}
	seen := map[string]bool{}
	for _, f := range set.Files {
		seen[f.Name] = true
	}
	for _, n := range set.Sets {
		if seen[n.Dir] {
			return fmt.Errorf("writers: bad or repeated folder name %q of a nested set", n.Dir)
		}
		seen[n.Dir] = true
		if err := checkNested(n); err != nil {
			return err
		}
	}
	return nil
}

// checkNested checks a nested set: a plain folder name, files only,
// every file carrying its run id.
func checkNested(n NestedSet) error {
	if !plainName(n.Dir) {
		return fmt.Errorf("writers: bad or repeated folder name %q of a nested set", n.Dir)
	}
	if len(n.Set.Sets) > 0 {
		return fmt.Errorf("writers: nested set %s holds sets of its own", n.Dir)
	}
	if err := checkFiles(n.Set); err != nil {
		return fmt.Errorf("%w (in nested set %s)", err, n.Dir)
	}
	return nil
}

// plainName reports whether name is a plain file or folder name.
func plainName(name string) bool {
	return name != "" && name != document.SetMarker && name == filepath.Base(name) && !strings.ContainsAny(name, `/\`) && name != "." && name != ".."
}

// checkFiles checks the run id and the file names of a set's files.
func checkFiles(set Set) error {
	if !document.ValidRunID(set.RunID) {
		return fmt.Errorf("writers: set has no valid run id (%q)", set.RunID)
	}
	seen := map[string]bool{}
	for _, f := range set.Files {
		if !plainName(f.Name) || seen[f.Name] {
			return fmt.Errorf("writers: bad or repeated file name %q in an output set", f.Name)
		}
		seen[f.Name] = true
		if got := document.FindRunID(f.Data); got != set.RunID {
			return fmt.Errorf("writers: %s does not carry the set's run id %s near its start (found %q)", f.Name, set.RunID, got)
		}
	}
	return nil
}

// makeTemp makes the temporary directory beside the output directory,
// once, with a marker not yet complete in it. d.mu is held.
func (d *OutputDir) makeTemp(generator string) error {
	if d.tmp != "" {
		return nil
	}
	tmp, err := mkdirUnique(d.fsys, filepath.Join(d.parent, "."+d.base+newInfix))
	if err != nil {
		return err
	}
	d.tmp = tmp
	// A marker first, so that a run killed while writing leaves a
	// directory the next run recognises as its own to remove.
	return d.writeMarker(tmp, newMarker(Set{Generator: generator}))
}

// writeNested writes the nested set n into its folder of tmp, synced to
// disk.
func (d *OutputDir) writeNested(tmp string, n NestedSet) error {
	sub := filepath.Join(tmp, n.Dir)
	if err := d.fsys.Mkdir(sub, 0o755); err != nil {
		return err
	}
	if err := d.writeFiles(sub, n.Set, newMarker(n.Set)); err != nil {
		return fmt.Errorf("%s: %w", n.Dir, err)
	}
	return nil
}

// writeTemp writes the set and its marker into the temporary directory
// beside the output directory (made when no nested set made it), synced
// to disk, beside the nested sets WriteNested wrote there. d.mu is held.
func (d *OutputDir) writeTemp(set Set) error {
	if err := d.makeTemp(set.Generator); err != nil {
		return err
	}
	for _, n := range set.Sets {
		if slices.ContainsFunc(d.nested, func(o document.NestedSet) bool { return o.Name == n.Dir }) {
			return fmt.Errorf("writers: nested set %s written twice", n.Dir)
		}
		if err := d.writeNested(d.tmp, n); err != nil {
			return err
		}
		d.nested = append(d.nested, document.NestedSet{Name: n.Dir, RunID: n.Set.RunID, Job: n.Set.Job})
	}
	marker := newMarker(set)
	marker.Sets = slices.Clone(d.nested)
	slices.SortFunc(marker.Sets, func(a, b document.NestedSet) int { return strings.Compare(a.Name, b.Name) })
	if len(marker.Sets) == 0 {
		marker.Sets = nil
	}
	if err := d.writeFiles(d.tmp, set, marker); err != nil {
		return err
	}
	if d.state.exists {
		if err := d.fsys.Chmod(d.tmp, d.state.mode); err != nil {
			return err
		}
	}
	return nil
}

// newMarker returns the marker of set, not yet complete, listing no
// file.
func newMarker(set Set) *document.SetDoc {
	return &document.SetDoc{Schema: document.SetSchema, Version: document.SetVersion, Generator: set.Generator,
		RunID: set.RunID, Job: set.Job, Files: []document.SetFile{}}
}

// writeFiles writes the files of set (not its nested sets) into dir,
// then marker with them listed, complete, and syncs dir.
func (d *OutputDir) writeFiles(dir string, set Set, marker *document.SetDoc) error {
	errs := make([]error, len(set.Files))
	var wg sync.WaitGroup
	for i := range set.Files {
		wg.Go(func() { errs[i] = writeFile(d.fsys, filepath.Join(dir, set.Files[i].Name), set.Files[i].Data) })
	}
	wg.Wait()
	if err := errors.Join(errs...); err != nil {
		return err
	}
	for _, f := range set.Files {
		marker.Files = append(marker.Files, document.SetFile{Name: f.Name, Bytes: int64(len(f.Data)), SHA256: f.sum()})
	}
	return d.completeSet(dir, marker)
}

// completeSet writes marker, complete, into dir beside the files it
// lists, written and synced, and syncs dir.
func (d *OutputDir) completeSet(dir string, marker *document.SetDoc) error {
	marker.Complete = true
	if err := d.writeMarker(dir, marker); err != nil {
		return err
	}
	return d.fsys.SyncDir(dir)
}

func (d *OutputDir) writeMarker(tmp string, doc *document.SetDoc) error {
	var buf bytes.Buffer
	if err := document.EncodeSet(&buf, doc); err != nil {
		return err
	}
	return writeFile(d.fsys, filepath.Join(tmp, document.SetMarker), buf.Bytes())
}

// writeFile writes data to a new file at path and syncs it to disk.
func writeFile(fsys FS, path string, data []byte) error {
	f, err := fsys.Create(path)
	if err != nil {
		return err
	}
	_, err = f.Write(data)
	if err == nil {
		err = f.Sync()
	}
	if cerr := f.Close(); err == nil {
		err = cerr
	}
	if err != nil {
		return fmt.Errorf("writing %s: %w", filepath.Base(path), err)
	}
	return nil
}

// swap puts the set written in tmp in place of the output directory and
// removes the old set.
func (d *OutputDir) swap(tmp string) error {
	if !d.state.exists {
		return d.fsys.Rename(tmp, d.dir)
	}
	err := d.fsys.Exchange(tmp, d.dir)
	switch {
	case err == nil:
		d.fsys.RemoveAll(tmp) // now the old set; what stays is removed next run
		return nil
	case !errors.Is(err, ErrNoExchange):
		return err
	}
	// Two steps: the old set aside, the new one in, the old one away.
	aside := filepath.Join(d.parent, "."+d.base+oldInfix+strings.TrimPrefix(filepath.Base(tmp), "."+d.base+newInfix))
	if err := d.fsys.Rename(d.dir, aside); err != nil {
		return err
	}
	if err := d.fsys.Rename(tmp, d.dir); err != nil {
		if rerr := d.fsys.Rename(aside, d.dir); rerr != nil {
			return fmt.Errorf("%w; and putting the old set back failed (%v): it is in %s, and the next run into %s puts it back", err, rerr, aside, d.name)
		}
		return err
	}
	d.fsys.RemoveAll(aside)
	return nil
}

// Close releases the output directory: it removes the temporary
// directory of a failed Write, releases the lock and, when nothing was
// written, removes the parent directories OpenSet made. It is safe to
// call more than once.
func (d *OutputDir) Close() error {
	d.mu.Lock()
	defer d.mu.Unlock()
	if d.closed {
		return nil
	}
	d.closed = true
	if !d.placed {
		d.removeTemp() // nested sets written for a Write that never came
	}
	var err error
	if d.lock != nil {
		err = d.lock.release()
	}
	if !d.placed {
		d.removeCreated()
	}
	return err
}

// removeCreated removes the parent directories OpenSet made, when empty.
func (d *OutputDir) removeCreated() {
	for _, p := range d.created {
		if os.Remove(p) != nil {
			return
		}
	}
}

// Dir returns the output directory as its caller named it.
func (d *OutputDir) Dir() string { return d.name }
