package geom

import (
	"runtime/debug"
	"testing"

	"gonum.org/v1/gonum/spatial/r3"
)

// MakeLarge and MakeLargeCap give what make gives: the length, the
// capacity and zeros, whatever the size (below, at and above the size
// from which the huge-page advice is asked for).
func TestMakeLarge(t *testing.T) {
	for _, n := range []int{0, 1, 1000, 2 * hugePage / 24, 2*hugePage/24 + 1, 3 << 20} {
		s := MakeLarge[r3.Vec](n)
		if len(s) != n || cap(s) != n {
			t.Fatalf("MakeLarge(%d): len %d cap %d", n, len(s), cap(s))
		}
		for i, v := range s {
			if v != (r3.Vec{}) {
				t.Fatalf("MakeLarge(%d)[%d] = %v, want zero", n, i, v)
			}
		}
		c := MakeLargeCap[int32](n/2, n)
		if len(c) != n/2 || cap(c) != n {
			t.Fatalf("MakeLargeCap(%d, %d): len %d cap %d", n/2, n, len(c), cap(c))
		}
		for i, v := range c[:cap(c)] {
			if v != 0 {
				t.Fatalf("MakeLargeCap(%d, %d)[%d] = %d, want zero", n/2, n, i, v)
			}
		}
	}
}

// BenchmarkMakeLarge makes and fills an array the size of a
// 2,000,000-element body's connectivity (32 MB) with make and with
// MakeLarge; the difference is the cost of the page faults that huge
// pages save (none where the system gives huge pages to every large
// mapping, or none at all). Each array is new to the process: the
// memory of the last is given back to the system first.
func BenchmarkMakeLarge(b *testing.B) {
	const n = 8_000_000
	for _, alt := range []struct {
		name string
		make func(int) []int32
	}{
		{"make", func(n int) []int32 { return make([]int32, n) }},
		{"MakeLarge", MakeLarge[int32]},
	} {
		b.Run(alt.name, func(b *testing.B) {
			for b.Loop() {
				b.StopTimer()
				debug.FreeOSMemory()
				b.StartTimer()
				s := alt.make(n)
				for i := range s {
					s[i] = int32(i)
				}
			}
		})
	}
}
