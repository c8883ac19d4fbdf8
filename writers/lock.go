package writers

import (
	"errors"
	"fmt"
	"os"
	"runtime"
	"strconv"
	"strings"
	"time"
)

// ErrLocked marks the failure of a run whose output directory another
// run holds (errors.Is); it is also an output error.
var ErrLocked = errors.New("output directory locked by another run")

// errLocked is what tryLock returns when another process holds the lock.
var errLocked = errors.New("locked")

// lockedError says which run holds the output directory.
type lockedError struct {
	dir string
	pid int // 0 when not known
}

func (e *lockedError) Error() string {
	who := "process " + strconv.Itoa(e.pid)
	if e.pid <= 0 {
		who = "its process id not known"
	}
	return fmt.Sprintf("output directory %s is being written by another joinery run (%s); this run stopped before doing anything, "+
		"and %s is left as it is: wait for that run to end, or choose another output directory", e.dir, who, e.dir)
}

func (e *lockedError) Is(target error) bool { return target == ErrLocked }

// removeLockFile says whether a run removes its lock file when it ends.
// Windows cannot remove a file another process has open, so there the
// file stays (empty of meaning once unlocked).
const removeLockFile = runtime.GOOS != "windows"

// lockFile is the lock an output directory's run holds: a file beside
// the directory, locked for the run (flock, or LockFileEx on Windows),
// holding the run's process id. The system drops the lock when the
// process ends, however it ends, so a lock file left by a killed run
// does not keep the next one out.
type lockFile struct {
	f    *os.File
	path string
}

// acquireLock takes the lock at path for output directory dir (named in
// messages), failing at once when another run holds it.
func acquireLock(path, dir string) (*lockFile, error) {
	for try := 0; try < 10; try++ {
		f, err := os.OpenFile(path, os.O_RDWR|os.O_CREATE, 0o644)
		if err != nil {
			return nil, fmt.Errorf("writers: creating the lock %s beside output directory %s: %w", path, dir, err)
		}
		if err := tryLock(f); err != nil {
			pid := 0
			if errors.Is(err, errLocked) {
				pid = readPID(f)
			}
			f.Close()
			if errors.Is(err, errLocked) {
				return nil, &lockedError{dir: dir, pid: pid}
			}
			return nil, fmt.Errorf("writers: locking %s: %w", path, err)
		}
		// The run that held the lock may have removed the file between
		// our open and our lock: then this lock is on a file no other run
		// sees, so start again.
		fi, err1 := f.Stat()
		pi, err2 := os.Stat(path)
		if err1 != nil || err2 != nil || !os.SameFile(fi, pi) {
			f.Close()
			continue
		}
		pid := []byte(strconv.Itoa(os.Getpid()) + "\n")
		if err := f.Truncate(0); err == nil {
			_, err = f.WriteAt(pid, 0)
		}
		return &lockFile{f: f, path: path}, nil
	}
	return nil, fmt.Errorf("writers: could not take the lock %s: it keeps being replaced", path)
}

// readPID reads the process id the holder of a lock wrote in it,
// waiting a little for a holder that has just taken it; 0 when not
// known.
func readPID(f *os.File) int {
	buf := make([]byte, 24)
	for try := 0; try < 20; try++ {
		n, _ := f.ReadAt(buf, 0)
		if pid, err := strconv.Atoi(strings.TrimSpace(string(buf[:n]))); err == nil && n > 0 && buf[n-1] == '\n' {
			return pid
		}
		time.Sleep(5 * time.Millisecond)
	}
	return 0
}

// release removes the lock file (still holding it, so that no run takes
// a lock on a file about to disappear unseen: see acquireLock) and drops
// the lock.
func (l *lockFile) release() error {
	if removeLockFile {
		os.Remove(l.path)
	}
	return l.f.Close()
}
