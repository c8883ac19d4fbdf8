package vtu

import (
	"bytes"
	"os"
	"path/filepath"
	"syscall"
	"testing"
	"time"

	"github.com/joinery-cae/joinery/geom"
)

// cpuTime returns the user and system CPU time used by the process.
func cpuTime() time.Duration {
	var ru syscall.Rusage
	if err := syscall.Getrusage(syscall.RUSAGE_SELF, &ru); err != nil {
		return 0
	}
	return time.Duration(ru.Utime.Nano() + ru.Stime.Nano())
}

// benchRead measures ReadFile on a flat quad grid of nx by ny elements
// with node_id, element_id, part and thickness, written in layout o.
func benchRead(b *testing.B, nx, ny int, o wOpts) {
	if testing.Short() && nx*ny >= 1_000_000 {
		b.Skip("large benchmark skipped with -short")
	}
	var buf bytes.Buffer
	if err := writeVTU(&buf, []wPiece{gridPiece(nx, ny)}, o); err != nil {
		b.Fatal(err)
	}
	path := filepath.Join(b.TempDir(), "grid.vtu")
	if err := os.WriteFile(path, buf.Bytes(), 0o644); err != nil {
		b.Fatal(err)
	}
	b.SetBytes(int64(buf.Len()))
	buf = bytes.Buffer{}
	b.ReportAllocs()
	var m *geom.Mesh
	cpu0 := cpuTime()
	for b.Loop() {
		var err error
		if m, err = ReadFile(path, geom.ReadOptions{}); err != nil {
			b.Fatal(err)
		}
	}
	cpu := cpuTime() - cpu0
	ne := float64(nx * ny)
	if m.NumElems() != nx*ny {
		b.Fatalf("%d elements, want %d", m.NumElems(), nx*ny)
	}
	b.ReportMetric(ne*float64(b.N)/b.Elapsed().Seconds(), "elems/s")
	// The machine is shared, so wall time varies with the load; the
	// process's CPU time (all threads, garbage collection included) is
	// steadier.
	b.ReportMetric(ne*float64(b.N)/cpu.Seconds(), "elems/cpu-s")
	b.ReportMetric(float64(m.Bytes())/ne, "mesh-B/elem")
}

func BenchmarkReadAppendedRaw200k(b *testing.B) {
	benchRead(b, 500, 400, wOpts{format: "appended"})
}

func BenchmarkReadAppendedRaw2M(b *testing.B) {
	benchRead(b, 2000, 1000, wOpts{format: "appended"})
}

func BenchmarkReadBase64Zlib200k(b *testing.B) {
	benchRead(b, 500, 400, wOpts{format: "binary", compress: true})
}

func BenchmarkReadBase64Zlib2M(b *testing.B) {
	benchRead(b, 2000, 1000, wOpts{format: "binary", compress: true})
}

func BenchmarkReadASCII200k(b *testing.B) {
	benchRead(b, 500, 400, wOpts{format: "ascii"})
}

func BenchmarkReadASCII2M(b *testing.B) {
	benchRead(b, 2000, 1000, wOpts{format: "ascii"})
}
