package writers

import (
	"bytes"
	"crypto/sha256"
	"encoding/hex"
	"errors"
	"fmt"
	"io"
	"io/fs"
	"os"
	"path/filepath"

	"github.com/joinery-cae/joinery/geom"
	"github.com/joinery-cae/joinery/writers/document"
)

// SetContents is an output set read back whole: its marker and the
// bytes of every file it lists.
type SetContents struct {
	Marker *document.SetDoc
	Files  map[string][]byte
	// Sets holds the markers of the nested sets (Marker.Sets) by folder
	// name, each checked to be complete and of the run the outer marker
	// lists; read a nested set's files with ReadSet on its folder.
	Sets map[string]*document.SetDoc
}

// ReadSet reads the output set in dir back and checks that it is whole
// and of one run: the marker .joinery-set is there and complete, every
// file it lists is there with its size and SHA-256, and each carries
// the marker's run id near its start (document.FindRunID). Commands that
// read a set back (check, sweep) call it, so that a mixed, damaged or
// foreign set is refused before they use it.
//
// The files are read through one handle on the directory, so a run that
// replaces the set meanwhile cannot mix two sets into what is returned;
// when the set being read is removed under it, ReadSet reads the new
// one. Errors are input errors naming the file (geom.ErrInput): the set
// is the input of the command that reads it.
func ReadSet(dir string) (*SetContents, error) {
	return readSet(dir, func(string) bool { return true })
}

// ReadSetFile checks the output set in dir as ReadSet does and returns
// it with the bytes of its file name alone in Files: the other files
// are hashed as they are read, through a small buffer, and not kept (a
// check that reads a build's connectors.json needs neither the memory
// nor the fresh pages of the set's other files).
func ReadSetFile(dir, name string) (*SetContents, error) {
	return readSet(dir, func(n string) bool { return n == name })
}

func readSet(dir string, keep func(name string) bool) (*SetContents, error) {
	set, err := readSetOnce(dir, keep)
	if errors.Is(err, errSetGone) {
		set, err = readSetOnce(dir, keep)
	}
	if errors.Is(err, errSetGone) {
		return nil, geom.FileError(dir, "the output set keeps changing while it is read (another run is writing it); read it again when that run is done")
	}
	return set, err
}

// CheckSet checks the output set in dir as ReadSet does and returns its
// marker.
func CheckSet(dir string) (*document.SetDoc, error) {
	set, err := ReadSet(dir)
	if err != nil {
		return nil, err
	}
	return set.Marker, nil
}

// errSetGone says a set was removed while being read.
var errSetGone = errors.New("set removed while read")

func readSetOnce(dir string, keep func(name string) bool) (*SetContents, error) {
	root, err := os.OpenRoot(dir)
	if errors.Is(err, fs.ErrNotExist) {
		return nil, geom.FileError(dir, "no such output directory")
	}
	if err != nil {
		return nil, fmt.Errorf("writers: reading output set %s: %w", dir, err)
	}
	defer root.Close()
	// gone reports whether dir no longer is the directory root opened: a
	// run swapped a new set in meanwhile.
	gone := func() bool {
		fr, err1 := root.Stat(".")
		fd, err2 := os.Stat(dir)
		return err1 != nil || err2 != nil || !os.SameFile(fr, fd)
	}
	// ReadFile sizes its buffer from the file's size (io.ReadAll grows
	// its own step by step, copying and clearing several times the size
	// of a set's large files).
	open := root.ReadFile
	markerName := filepath.Join(dir, document.SetMarker)
	raw, err := open(document.SetMarker)
	if errors.Is(err, fs.ErrNotExist) {
		if gone() {
			return nil, errSetGone
		}
		return nil, geom.FileError(dir, "not an output set of Joinery: no %s marker", document.SetMarker)
	}
	if err != nil {
		return nil, fmt.Errorf("writers: reading %s: %w", markerName, err)
	}
	marker, err := document.DecodeSet(bytes.NewReader(raw), markerName)
	if err != nil {
		return nil, err
	}
	if !marker.Complete {
		return nil, geom.FileError(markerName, "the set was not finished")
	}
	if !document.ValidRunID(marker.RunID) {
		return nil, geom.FileError(markerName, "run_id %q is not a run id", geom.Excerpt(marker.RunID))
	}
	set := &SetContents{Marker: marker, Files: make(map[string][]byte, len(marker.Files))}
	var buf []byte // hashFile's, allocated on first use
	for _, sf := range marker.Files {
		name := filepath.Join(dir, sf.Name)
		if sf.Name != filepath.Base(sf.Name) || sf.Name == document.SetMarker {
			return nil, geom.FileError(markerName, "file name %q is not a file of the set", geom.Excerpt(sf.Name))
		}
		var data []byte
		var size int64
		var sum [sha256.Size]byte
		if keep(sf.Name) {
			data, err = open(sf.Name)
			size, sum = int64(len(data)), sha256.Sum256(data)
		} else {
			if buf == nil {
				buf = make([]byte, 256<<10)
			}
			data, size, sum, err = hashFile(root, sf.Name, buf)
		}
		switch {
		case errors.Is(err, fs.ErrNotExist):
			if gone() {
				return nil, errSetGone
			}
			return nil, geom.FileError(name, "missing from the output set of run %s: the set is not whole", marker.RunID)
		case err != nil:
			return nil, fmt.Errorf("writers: reading %s: %w", name, err)
		}
		if id := document.FindRunID(data); id != marker.RunID {
			return nil, geom.FileError(name, "carries run id %q, not the set's %s: the set is mixed", id, marker.RunID)
		}
		if size != sf.Bytes || hex.EncodeToString(sum[:]) != sf.SHA256 {
			return nil, geom.FileError(name, "not the file the set's marker lists (size or SHA-256 differ): changed since run %s wrote it", marker.RunID)
		}
		if keep(sf.Name) {
			set.Files[sf.Name] = data
		}
	}
	for _, n := range marker.Sets {
		if n.Name != filepath.Base(n.Name) || n.Name == document.SetMarker || n.Name == "." || n.Name == ".." || n.Name == "" {
			return nil, geom.FileError(markerName, "folder name %q is not a folder of the set", geom.Excerpt(n.Name))
		}
		name := filepath.Join(dir, n.Name, document.SetMarker)
		raw, err := open(filepath.Join(n.Name, document.SetMarker))
		switch {
		case errors.Is(err, fs.ErrNotExist):
			if gone() {
				return nil, errSetGone
			}
			return nil, geom.FileError(name, "missing from the output set of run %s: the set is not whole", marker.RunID)
		case err != nil:
			return nil, fmt.Errorf("writers: reading %s: %w", name, err)
		}
		sub, err := document.DecodeSet(bytes.NewReader(raw), name)
		if err != nil {
			return nil, err
		}
		if !sub.Complete || sub.RunID != n.RunID || sub.Job != n.Job {
			return nil, geom.FileError(name, "is not the nested set of run %s that the set of run %s lists: the set is mixed", n.RunID, marker.RunID)
		}
		if set.Sets == nil {
			set.Sets = map[string]*document.SetDoc{}
		}
		set.Sets[n.Name] = sub
	}
	return set, nil
}

// hashFile reads the file name of root through buf and returns its first document.RunIDHead bytes, its size and its
// SHA-256.
func hashFile(root *os.Root, name string, buf []byte) (head []byte, size int64, sum [sha256.Size]byte, err error) {
	f, err := root.Open(name)
	if err != nil {
		return nil, 0, sum, err
	}
	defer f.Close()
	h := sha256.New()
	for {
		n, err := f.Read(buf)
		if len(head) < document.RunIDHead {
			head = append(head, buf[:min(n, document.RunIDHead-len(head))]...)
		}
		h.Write(buf[:n])
		size += int64(n)
		if err == io.EOF {
			break
		}
		if err != nil {
			return nil, 0, sum, err
		}
	}
	h.Sum(sum[:0])
	return head, size, sum, nil
}
