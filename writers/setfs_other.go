//go:build !linux

package writers

import (
	"os"
	"runtime"
)

// exchange is not available outside Linux: output sets use two renames
// (see the top of outdir.go).
func exchange(a, b string) error {
	return &os.LinkError{Op: "exchange", Old: a, New: b, Err: ErrNoExchange}
}

// renameNoReplace renames oldpath to newpath after checking that newpath
// is not there.
func renameNoReplace(oldpath, newpath string) error { return renameChecked(oldpath, newpath) }

// syncDir flushes a directory's entries to disk; Windows cannot sync a
// directory (its renames are durable once done), so there it does
// nothing.
func syncDir(path string) error {
	if runtime.GOOS == "windows" {
		return nil
	}
	f, err := os.Open(path)
	if err != nil {
		return err
	}
	err = f.Sync()
	if cerr := f.Close(); err == nil {
		err = cerr
	}
	return err
}
