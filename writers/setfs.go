package writers

import (
	"errors"
	"io"
	"io/fs"
	"math/rand/v2"
	"os"
	"strconv"
)

// FS is what writing an output set asks of the file system. OSFS is the
// operating system's; tests wrap it to inject failures (a full disk, a
// rename that fails) and check that the output directory stays whole.
type FS interface {
	// Mkdir creates a directory; it fails when name exists.
	Mkdir(name string, perm fs.FileMode) error
	// Create creates or truncates a file for writing.
	Create(name string) (WritableFile, error)
	// Rename moves a directory to a name that does not exist; it fails
	// when newpath exists, also as an empty directory, where the system
	// can tell.
	Rename(oldpath, newpath string) error
	// Exchange swaps two directories in one atomic step; the error is
	// ErrNoExchange (errors.Is) where the system or the file system
	// cannot.
	Exchange(a, b string) error
	// RemoveAll removes a directory and everything in it.
	RemoveAll(path string) error
	// SyncDir flushes a directory's entries to disk, where the system
	// can.
	SyncDir(path string) error
	// Chmod sets a file's or directory's permissions.
	Chmod(name string, mode fs.FileMode) error
}

// WritableFile is a file being written.
type WritableFile interface {
	io.Writer
	Sync() error
	Close() error
}

// ErrNoExchange says the system cannot exchange two directories in one
// step; output sets then use two renames (see the top of outdir.go).
var ErrNoExchange = errors.New("atomic exchange of directories not supported")

// OSFS is the operating system's file system.
type OSFS struct{}

func (OSFS) Mkdir(name string, perm fs.FileMode) error { return os.Mkdir(name, perm) }

func (OSFS) Create(name string) (WritableFile, error) {
	return os.OpenFile(name, os.O_WRONLY|os.O_CREATE|os.O_TRUNC, 0o644)
}

func (OSFS) Rename(oldpath, newpath string) error      { return renameNoReplace(oldpath, newpath) }
func (OSFS) Exchange(a, b string) error                { return exchange(a, b) }
func (OSFS) RemoveAll(path string) error               { return os.RemoveAll(path) }
func (OSFS) SyncDir(path string) error                 { return syncDir(path) }
func (OSFS) Chmod(name string, mode fs.FileMode) error { return os.Chmod(name, mode) }

// mkdirUnique creates the directory prefix<digits> and returns its path.
func mkdirUnique(fsys FS, prefix string) (string, error) {
	for try := 0; ; try++ {
		name := prefix + strconv.FormatUint(uint64(rand.Uint32()), 10)
		err := fsys.Mkdir(name, 0o755)
		if err == nil {
			return name, nil
		}
		if !errors.Is(err, fs.ErrExist) || try == 100 {
			return "", err
		}
	}
}

// renameChecked renames oldpath to newpath after checking that newpath
// is not there (the lock keeps other runs away; only another program
// could slip in between).
func renameChecked(oldpath, newpath string) error {
	if _, err := os.Lstat(newpath); err == nil {
		return &os.LinkError{Op: "rename", Old: oldpath, New: newpath, Err: fs.ErrExist}
	}
	return os.Rename(oldpath, newpath)
}
