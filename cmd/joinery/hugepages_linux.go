//go:build linux

package main

import (
	"os"
	"runtime"
	"strings"
	"syscall"
	"unsafe"
)

// hugePageSize is the size of a transparent huge page on linux/amd64 and
// arm64 with 4 KiB base pages (the kernel's HPAGE_PMD_SIZE).
const hugePageSize = 2 << 20

// adviseHugePages asks the system to back the first n bytes the heap
// will grow into with transparent huge pages: it maps them by
// allocating them (the pages are not touched), advises them
// (madvise MADV_HUGEPAGE, which lasts as long as the mapping: the Go
// runtime never unmaps heap memory) and lets them go, so that the arrays
// of the mesh, the index and the contacts fill them next.
//
// On a system whose transparent huge pages are set to "madvise" (the
// default of many distributions) a first touch of heap memory otherwise
// costs a page fault per 4 KiB, which on a virtual machine costs about
// 18 us (100 MB of fresh memory: 0.4-0.55 s); with huge pages it is one
// fault per 2 MiB. Where they are "always" or "never", or memory is
// accounted strictly, no advice is given (hugePagesWorthAdvice).
// GODEBUG=disablethp=1 (the runtime's own switch against huge
// pages) turns it off. Advice that fails is ignored: it is only advice.
func adviseHugePages(n int) {
	if n < hugePageSize || strings.Contains(os.Getenv("GODEBUG"), "disablethp=1") || !hugePagesWorthAdvice() {
		return
	}
	b := make([]byte, n)
	p := uintptr(unsafe.Pointer(unsafe.SliceData(b)))
	lo := int((p+hugePageSize-1)&^(hugePageSize-1) - p)
	hi := int((p+uintptr(n))&^(hugePageSize-1) - p)
	if lo < hi {
		_ = syscall.Madvise(b[lo:hi], syscall.MADV_HUGEPAGE)
	}
	runtime.KeepAlive(b)
	b = nil
	runtime.GC()
}

// hugePagesWorthAdvice reports whether the advice can help and cannot
// hurt: the system's transparent huge pages are set to "madvise" (with
// "always" the heap has them already, with "never" it cannot), and the
// system does not account memory strictly (vm.overcommit_memory 2),
// where mapping 1 GiB of heap, even untouched, could be refused and end
// the process. Anything unreadable means no advice.
func hugePagesWorthAdvice() bool {
	mode, err := os.ReadFile("/sys/kernel/mm/transparent_hugepage/enabled")
	if err != nil || !strings.Contains(string(mode), "[madvise]") {
		return false
	}
	commit, err := os.ReadFile("/proc/sys/vm/overcommit_memory")
	return err == nil && strings.TrimSpace(string(commit)) != "2"
}
