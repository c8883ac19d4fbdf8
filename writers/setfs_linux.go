package writers

import (
	"errors"
	"os"

	"golang.org/x/sys/unix"
)

// exchange swaps two directories atomically with renameat2
// RENAME_EXCHANGE (Linux 3.15 and later). File systems that cannot
// (some network and FUSE file systems) give EINVAL; old kernels ENOSYS.
func exchange(a, b string) error {
	err := unix.Renameat2(unix.AT_FDCWD, a, unix.AT_FDCWD, b, unix.RENAME_EXCHANGE)
	if errors.Is(err, unix.EINVAL) || errors.Is(err, unix.ENOSYS) || errors.Is(err, unix.ENOTSUP) {
		return &os.LinkError{Op: "exchange", Old: a, New: b, Err: ErrNoExchange}
	}
	if err != nil {
		return &os.LinkError{Op: "exchange", Old: a, New: b, Err: err}
	}
	return nil
}

// renameNoReplace renames oldpath to newpath, failing when newpath
// exists (renameat2 RENAME_NOREPLACE); where the file system cannot, a
// plain rename after checking that newpath is not there.
func renameNoReplace(oldpath, newpath string) error {
	err := unix.Renameat2(unix.AT_FDCWD, oldpath, unix.AT_FDCWD, newpath, unix.RENAME_NOREPLACE)
	if errors.Is(err, unix.EINVAL) || errors.Is(err, unix.ENOSYS) || errors.Is(err, unix.ENOTSUP) {
		return renameChecked(oldpath, newpath)
	}
	if err != nil {
		return &os.LinkError{Op: "rename", Old: oldpath, New: newpath, Err: err}
	}
	return nil
}

// syncDir flushes a directory's entries to disk.
func syncDir(path string) error {
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
