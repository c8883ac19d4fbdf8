//go:build linux

package geom

import (
	"runtime"
	"syscall"
	"testing"
)

// cpuMetric pins the benchmark goroutine to its thread and returns a
// function that reports the thread's CPU time per operation as
// "cpu-ns/op": on a machine shared with other jobs that is steadier than
// the wall time. Use as: defer cpuMetric(b)().
func cpuMetric(b *testing.B) func() {
	const rusageThread = 1 // RUSAGE_THREAD, Linux
	runtime.LockOSThread()
	var start syscall.Rusage
	if err := syscall.Getrusage(rusageThread, &start); err != nil {
		runtime.UnlockOSThread()
		return func() {}
	}
	return func() {
		defer runtime.UnlockOSThread()
		var end syscall.Rusage
		if err := syscall.Getrusage(rusageThread, &end); err != nil || b.N == 0 {
			return
		}
		ns := func(r *syscall.Rusage) int64 { return r.Utime.Nano() + r.Stime.Nano() }
		b.ReportMetric(float64(ns(&end)-ns(&start))/float64(b.N), "cpu-ns/op")
	}
}
