package geom

import "unsafe"

// hugePage is the size of a transparent huge page on the systems that
// have them (2 MiB on x86-64 and arm64 Linux).
const hugePage = 2 << 20

// MakeLarge returns make([]T, n) and, for an array of several huge pages
// holding no pointers, asks the system to back it with huge pages where
// it allows them only on request (Linux with transparent huge pages in
// "madvise" mode; a no-op elsewhere). Fresh memory is then mapped in one
// fault per 2 MiB instead of one per 4 KiB page; on a virtual machine a
// page fault costs several microseconds, which for the arrays of a
// mesh of millions of elements is a sizeable part of a run. Use it for
// the large arrays of a mesh, an index or a rendered file, made once and
// filled at once.
func MakeLarge[T any](n int) []T {
	s := make([]T, n)
	if size := uintptr(n) * unsafe.Sizeof(*new(T)); size >= 2*hugePage {
		adviseHuge(uintptr(unsafe.Pointer(unsafe.SliceData(s))), size)
	}
	return s
}

// MakeLargeCap returns make([]T, n, c) with MakeLarge's advice.
func MakeLargeCap[T any](n, c int) []T {
	return MakeLarge[T](c)[:n]
}
