//go:build unix

package geom

import (
	"errors"
	"os"
	"path/filepath"
	"strings"
	"syscall"
	"testing"
	"time"
)

// Devices and named pipes behind an input's name are refused before
// anything is read: /dev/zero would grow memory without end, a FIFO
// would block the reader for ever.
func TestOpenRegularRefusesDevicesAndPipes(t *testing.T) {
	dir := t.TempDir()
	zero := filepath.Join(dir, "z.jmesh")
	if err := os.Symlink("/dev/zero", zero); err != nil {
		t.Skip("no symbolic links here:", err)
	}
	fifo := filepath.Join(dir, "f.vtk")
	if err := syscall.Mkfifo(fifo, 0o644); err != nil {
		t.Skip("no named pipes here:", err)
	}
	for _, c := range []struct{ path, want string }{
		{zero, "character device"},
		{fifo, "named pipe"},
	} {
		done := make(chan error, 1)
		go func() { _, err := ReadFile(c.path, nil); done <- err }()
		select {
		case err := <-done:
			if !errors.Is(err, ErrInput) || !strings.Contains(err.Error(), c.want) {
				t.Errorf("%s: %v, want an input error saying %q", c.path, err, c.want)
			}
		case <-time.After(5 * time.Second):
			t.Fatalf("%s: still reading after 5 s", c.path)
		}
	}
}
