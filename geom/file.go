package geom

import (
	"errors"
	"fmt"
	"io"
	"io/fs"
	"os"
	"path/filepath"
	"unicode/utf8"
)

// File is an input file opened by OpenRegular. Its reads stop at the size
// the file had when it was opened, so a file that grows while it is read
// (a log, a device behind a name) cannot make a reader grow without end.
type File struct {
	f    *os.File
	r    io.LimitedReader
	size int64
}

// OpenRegular opens the named file for reading. The file, after symbolic
// links are followed, must be a regular file: a directory, a device
// (/dev/zero), a named pipe (which would block the reader until someone
// writes to it) or a socket is an input error, reported before anything
// is read. Failures to open the file (it does not exist, it may not be
// read) are the os package's errors (errors.Is(err, fs.ErrNotExist)),
// not input errors, as before any reader existed.
//
// Every reader of a Joinery input (meshes, parts tables, joint lists, job
// files) opens its file through OpenRegular or ReadFile.
func OpenRegular(path string) (*File, error) {
	fi, err := os.Stat(path)
	if err != nil {
		return nil, openError(path, err)
	}
	if err := checkRegular(path, fi); err != nil {
		return nil, err
	}
	// openFlags keeps a named pipe swapped in after the Stat from
	// blocking the open; the second check below refuses it.
	f, err := os.OpenFile(path, openFlags, 0)
	if err != nil {
		return nil, openError(path, err)
	}
	if fi, err = f.Stat(); err != nil {
		f.Close()
		return nil, fmt.Errorf("%s: %w", path, err)
	}
	if err := checkRegular(path, fi); err != nil {
		f.Close()
		return nil, err
	}
	file := &File{f: f, size: fi.Size()}
	file.r = io.LimitedReader{R: f, N: fi.Size()}
	return file, nil
}

// Read reads from the file, up to the size it had when it was opened.
func (f *File) Read(p []byte) (int, error) { return f.r.Read(p) }

// Size returns the size of the file when it was opened, bytes.
func (f *File) Size() int64 { return f.size }

// Close closes the file.
func (f *File) Close() error { return f.f.Close() }

// SameFiles finds the first path of paths that names the same file as an
// earlier one, under the same spelling or another ("m.vtk",
// "./m.vtk", "/abs/dir/m.vtk", a symbolic or hard link): it returns the
// indices i < j of the two, and false when all are distinct. Files are
// compared with os.SameFile; paths that cannot be stat'ed compare by
// their cleaned spelling, and their readers report why they fail.
func SameFiles(paths []string) (i, j int, ok bool) {
	infos := make([]fs.FileInfo, len(paths))
	for k, p := range paths {
		infos[k], _ = os.Stat(p)
	}
	for j := range paths {
		for i := range j {
			switch {
			case infos[i] != nil && infos[j] != nil:
				if os.SameFile(infos[i], infos[j]) {
					return i, j, true
				}
			case filepath.Clean(paths[i]) == filepath.Clean(paths[j]):
				return i, j, true
			}
		}
	}
	return 0, 0, false
}

// StatRegular returns the error OpenRegular would give for path before
// opening it (no such file, no permission, not a regular file), or nil:
// for a caller that must refuse a path before it knows how to read it.
func StatRegular(path string) error {
	fi, err := os.Stat(path)
	if err != nil {
		return openError(path, err)
	}
	return checkRegular(path, fi)
}

// checkRegular refuses anything but a regular file.
func checkRegular(path string, fi fs.FileInfo) error {
	m := fi.Mode()
	if m.IsRegular() {
		return nil
	}
	what := "not a regular file"
	switch {
	case m.IsDir():
		what = "a directory"
	case m&fs.ModeNamedPipe != 0:
		what = "a named pipe (FIFO)"
	case m&fs.ModeSocket != 0:
		what = "a socket"
	case m&fs.ModeCharDevice != 0:
		what = "a character device"
	case m&fs.ModeDevice != 0:
		what = "a device"
	}
	return FileError(path, "%s, not a regular file: Joinery reads its inputs from regular files only", what)
}

// ExcerptLength is the most bytes of an input's text that a message
// echoes: enough to recognise a token, short enough that a garbage field
// of megabytes gives a one-line message.
const ExcerptLength = 40

// Excerpt cuts a text from an input to at most ExcerptLength bytes, at a
// character boundary, adding "..." when it cuts, for echoing in a
// message (usually with %q). Every reader and table cuts echoed input
// text through Excerpt.
func Excerpt[T ~string | ~[]byte](s T) string {
	if len(s) <= ExcerptLength {
		return string(s)
	}
	n := ExcerptLength
	for n > ExcerptLength-utf8.UTFMax && !utf8.RuneStart(s[n]) {
		n--
	}
	return string(s[:n]) + "..."
}

// openError turns the failure to open an input into an input error when
// the input is at fault (no such file, no permission to read it: the
// user named the wrong file), and keeps other failures as they are.
func openError(path string, err error) error {
	switch {
	case errors.Is(err, fs.ErrNotExist):
		return &InputError{File: path, Offset: -1, Record: -1, Err: openFailure{"no such file", fs.ErrNotExist}}
	case errors.Is(err, fs.ErrPermission):
		return &InputError{File: path, Offset: -1, Record: -1, Err: openFailure{"no permission to read it", fs.ErrPermission}}
	}
	return err
}

// openFailure is why an input could not be opened, in words, keeping
// the os package's error for errors.Is.
type openFailure struct {
	msg string
	err error
}

func (e openFailure) Error() string { return e.msg }
func (e openFailure) Unwrap() error { return e.err }
