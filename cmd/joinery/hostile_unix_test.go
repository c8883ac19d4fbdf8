//go:build unix

package main

import (
	"os"
	"path/filepath"
	"strings"
	"syscall"
	"testing"
	"time"
)

// Every input named by a device or a named pipe is refused at once with
// an input error (issue: `ln -s /dev/zero z.jmesh` grew memory without
// end, a FIFO hung), whatever role the file plays.
func TestNonRegularInputsRefused(t *testing.T) {
	for _, kind := range []string{"device", "fifo"} {
		for _, role := range []string{"m.jmesh", "m.vtk", "m.vtu", "w.csv", "parts.yaml", "job.yaml"} {
			t.Run(kind+"/"+role, func(t *testing.T) {
				dir := hostileDir(t)
				bad := filepath.Join(dir, "bad-"+role)
				switch kind {
				case "device":
					if err := os.Symlink("/dev/zero", bad); err != nil {
						t.Skip("no symbolic links:", err)
					}
				case "fifo":
					if err := syscall.Mkfifo(bad, 0o644); err != nil {
						t.Skip("no named pipes:", err)
					}
				}
				mesh, joints := filepath.Join(dir, "m.jmesh"), filepath.Join(dir, "w.csv")
				args := []string{"build", "-o", filepath.Join(dir, "out"), "--quiet"}
				switch role {
				case "w.csv":
					args = append(args, "-m", mesh, "-j", bad)
				case "parts.yaml":
					args = append(args, "-m", mesh, "-j", joints, "-p", bad)
				case "job.yaml":
					args = append(args, bad)
				default:
					args = append(args, "-m", bad, "-j", joints)
				}
				code, _, errs := runCLIWithin(t, 10*time.Second, args...)
				if code != exitBadInput || !strings.Contains(errs, "not a regular file") || !strings.Contains(errs, bad) {
					t.Errorf("exit %d, stderr %q; want exit %d naming %s as not a regular file", code, errs, exitBadInput, bad)
				}
				if _, err := os.Stat(filepath.Join(dir, "out")); err == nil {
					t.Errorf("outputs written")
				}
			})
		}
	}
}
