//go:build windows

package writers

import (
	"errors"
	"os"

	"golang.org/x/sys/windows"
)

// tryLock locks f exclusively without waiting (LockFileEx): errLocked
// when another process holds it. The locked byte lies far beyond the
// process id the file holds, so that others can still read that.
func tryLock(f *os.File) error {
	ol := &windows.Overlapped{OffsetHigh: 1}
	err := windows.LockFileEx(windows.Handle(f.Fd()), windows.LOCKFILE_EXCLUSIVE_LOCK|windows.LOCKFILE_FAIL_IMMEDIATELY, 0, 1, 0, ol)
	if errors.Is(err, windows.ERROR_LOCK_VIOLATION) {
		return errLocked
	}
	return err
}
