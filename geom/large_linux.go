//go:build linux

package geom

import "golang.org/x/sys/unix"

// adviseHuge marks the whole huge pages of [p, p+size) MADV_HUGEPAGE.
// The advice is only a saving: an error is ignored.
func adviseHuge(p, size uintptr) {
	start := (p + hugePage - 1) &^ (hugePage - 1)
	end := (p + size) &^ (hugePage - 1)
	if end > start {
		_, _, _ = unix.Syscall(unix.SYS_MADVISE, start, end-start, unix.MADV_HUGEPAGE)
	}
}
